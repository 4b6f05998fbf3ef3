/* cmd_stack.c - isthmus stack: one vector file from several files over the same words. */
#include <getopt.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define MAX_BLOCKS 16

static void
help(FILE *out)
{
    fputs("Usage: isthmus stack [OPTIONS] -o OUT VECTORS VECTORS...\n"
          "Set the vectors of several files over the same words side by side: each file's rows\n"
          "are scaled to unit length, its mean row is subtracted and it is multiplied by its\n"
          "weight (concatenation of normalised blocks, docs/methods.md \"Combined spaces\").\n"
          "The result is an ordinary vector file for align, score, lookup and propose.\n"
          "\n"
          "Arguments:\n"
          "  VECTORS...              two to 16 vector files (native or text) with the same words;\n"
          "                          the order of their rows may differ\n"
          "\n"
          "Options:\n"
          "  -o, --output=OUT        native vector file to write (required)\n"
          "      --block-weights=W,...  one positive weight per input, in order\n"
          "                          [default: 1 for each]\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "Rows follow the first file's order; words and counts are the first file's. A word\n"
          "missing from a later file is an error naming the file and the word. The provenance\n"
          "records each input's path, weight and own provenance.\n"
          "\n"
          "Example (en-sg.isv and en-ppmi.isv trained by 'isthmus train' from one text, with\n"
          "the skip-gram and the PPMI method):\n"
          "  isthmus stack --block-weights=1,1 -o en.isv en-sg.isv en-ppmi.isv\n",
          out);
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        CLI_OPT_OUTPUT,
        CLI_OPT_BLOCK_WEIGHTS_ROW,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    const char *out = NULL, *wspec = NULL;
    int c;
    while ((c = getopt_long(argc, argv, "ho:" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (c) {
        case 'o': out = optarg; break;
        case CLI_OPT_BLOCK_WEIGHTS: wspec = optarg; break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (!cli_other_option("stack", c, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    size_t n = (size_t)(argc - optind);
    if (!out)
        return cli_usage_error("stack", "expected --output OUT");
    ist_store_format fmt;
    if (!cli_vector_format("stack", "-o", out, NULL, &fmt))
        return CLI_EXIT_USAGE;
    if (n < 2 || n > MAX_BLOCKS)
        return cli_usage_error("stack", "expected 2 to %d vector files, got %zu", MAX_BLOCKS, n);
    double w[MAX_BLOCKS];
    char expected[96];
    snprintf(expected, sizeof expected, "expected %zu positive numbers up to 1000 separated "
             "by commas, one per input", n);
    for (size_t i = 0; i < n; i++)
        w[i] = 1.0;
    if (wspec && !cli_parse_weights("stack", wspec, w, n, expected))
        return CLI_EXIT_USAGE;
    const char *const *ins = (const char *const *)argv + optind;
    int fc = cli_check_files("stack", ins, n, &out, 1);
    if (fc != 0)
        return fc;

    ist_store *s[MAX_BLOCKS] = {0}, *res = NULL;
    size_t *map[MAX_BLOCKS] = {0};
    ist_cmatview blocks[MAX_BLOCKS];
    const char *provs[MAX_BLOCKS];
    ist_matrix *m = NULL;
    char *prov = NULL;
    ist_error err;
    ist_store_opts so;
    int st = CLI_EXIT_OK;
    double t0 = cli_now();

    ist_store_opts_init(&so);
    for (size_t i = 0; i < n; i++)
        if (ist_store_open(ins[i], &so, &s[i], &err) != IST_OK) {
            st = cli_report("stack", &err);
            goto done;
        }
    size_t rows = ist_store_rows(s[0]);
    for (size_t i = 0; i < n; i++) {
        blocks[i] = ist_store_view(s[i]);
        provs[i] = ist_store_provenance(s[i]);
        if (i == 0)
            continue;
        if (ist_store_rows(s[i]) != rows) {
            fprintf(stderr, "isthmus stack: %s has %zu words, %s has %zu: the files must hold "
                    "the same words\n", ins[i], ist_store_rows(s[i]), ins[0], rows);
            st = CLI_EXIT_ERROR;
            goto done;
        }
        map[i] = malloc(rows * sizeof *map[i]);
        if (!map[i]) {
            fprintf(stderr, "isthmus stack: out of memory\n");
            st = CLI_EXIT_ERROR;
            goto done;
        }
        for (size_t r = 0; r < rows; r++) {
            const char *word = ist_store_word(s[0], r);
            ptrdiff_t j = ist_store_find(s[i], word);
            if (j < 0) {
                fprintf(stderr, "isthmus stack: %s: no vector for '%s' (row %zu of %s): the "
                        "files must hold the same words\n", ins[i], word, r + 1, ins[0]);
                st = CLI_EXIT_ERROR;
                goto done;
            }
            map[i][r] = (size_t)j;
        }
    }
    if (ist_combine_concat(blocks, (const size_t *const *)map, w, n, &m, &err) != IST_OK ||
        ist_combine_provenance_json("stack", provs, ins, w, n, &prov, &err) != IST_OK) {
        st = cli_report("stack", &err);
        goto done;
    }
    ist_cmatview mv = ist_matrix_cview(m);
    if (ist_store_new(rows, mv.cols, &res, &err) != IST_OK) {
        st = cli_report("stack", &err);
        goto done;
    }
    for (size_t r = 0; r < rows; r++) {
        memcpy(ist_store_row_mut(res, r), mv.data + r * mv.stride, mv.cols * sizeof(float));
        if (ist_store_set_word(res, r, ist_store_word(s[0], r), ist_store_count(s[0], r),
                               &err) != IST_OK) {
            st = cli_report("stack", &err);
            goto done;
        }
    }
    if (ist_store_set_provenance(res, prov, &err) != IST_OK ||
        ist_store_save(res, out, NULL, &err) != IST_OK) {
        st = cli_report("stack", &err);
        goto done;
    }
    cli_wrote(out, "%zu words x %zu dimensions from %zu blocks in %.2f s", rows, mv.cols, n,
              cli_now() - t0);
done:
    for (size_t i = 0; i < n; i++) {
        ist_store_free(s[i]);
        free(map[i]);
    }
    ist_store_free(res);
    ist_matrix_free(m);
    ist_combine_free(prov);
    return st;
}

const cli_command cmd_stack = {"stack", "set vector files over the same words side by side", run,
                               help};
