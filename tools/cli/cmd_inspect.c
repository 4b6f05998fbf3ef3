/* cmd_inspect.c - isthmus inspect: what a vector file holds and whether it is intact. */
#include <getopt.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

static void
help(FILE *out)
{
    fputs("Usage: isthmus inspect [OPTIONS] FILE\n"
          "Show what a vector file holds: rows, dimension, format, row-length summary,\n"
          "provenance, and whether its checksums hold (native files are checked in full).\n"
          "\n"
          "Arguments:\n"
          "  FILE                    native vector file, or text table (plain or gzip)\n"
          "\n"
          "Options:\n"
          "      --words=N           also list the first N words with their places (from 1,\n"
          "                          as lookup counts) and counts [default: 0]\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "Example:\n"
          "  isthmus inspect data-samples/tiny-en.txt\n",
          out);
}

static int
cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return x < y ? -1 : x > y;
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        {"words", required_argument, NULL, 'w'},
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    size_t show = 0;
    int c;

    while ((c = getopt_long(argc, argv, "h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (c) {
        case 'w':
            if (!cli_parse_size("inspect", "--words", optarg, 0, 1000000, &show))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (!cli_other_option("inspect", c, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (optind + 1 != argc)
        return cli_usage_error("inspect", optind == argc ? "expected a vector FILE"
                                                         : "expected one FILE, got more");
    const char *path = argv[optind];
    ist_store_opts so;
    ist_store *s;
    ist_error err;
    ist_store_opts_init(&so);
    so.verify = true;
    if (ist_store_open(path, &so, &s, &err) != IST_OK)
        return cli_report("inspect", &err);

    size_t rows = ist_store_rows(s), dim = ist_store_dim(s);
    double *norms = malloc(rows * sizeof *norms);
    if (!norms) {
        ist_store_free(s);
        fprintf(stderr, "isthmus inspect: out of memory\n");
        return CLI_EXIT_ERROR;
    }
    size_t zero = 0;
    double sum = 0;
    for (size_t i = 0; i < rows; i++) {
        const float *r = ist_store_row(s, i);
        double q = 0;
        for (size_t j = 0; j < dim; j++)
            q += (double)r[j] * r[j];
        norms[i] = sqrt(q);
        sum += norms[i];
        zero += norms[i] == 0;
    }
    qsort(norms, rows, sizeof *norms, cmp_double);

    ist_store_format fmt = ist_store_source_format(s);
    printf("file:         %s\n", path);
    printf("format:       %s%s%s\n", fmt == IST_STORE_NATIVE ? "native" : "text table",
           ist_store_source_gzip(s) ? ", gzip" : "",
           fmt == IST_STORE_TEXT ? (ist_store_source_header(s) ? ", with rows/dim line"
                                                                : ", no rows/dim line")
                                 : "");
    printf("rows:         %zu\n", rows);
    printf("dimension:    %zu\n", dim);
    printf("row length:   min %.4g  median %.4g  mean %.4g  max %.4g  (zero rows: %zu)\n",
           norms[0], norms[rows / 2], sum / (double)rows, norms[rows - 1], zero);
    printf("fingerprint:  %016llx\n", (unsigned long long)ist_store_fingerprint(s));
    printf("checksums:    %s\n", fmt == IST_STORE_NATIVE ? "intact (header, words, matrix)"
                                                         : "none (text tables carry none)");
    const char *prov = ist_store_provenance(s);
    printf("provenance:   %s\n", prov[0] ? prov : "(none)");
    uint64_t total = 0;
    for (size_t i = 0; i < rows; i++)
        total += ist_store_count(s, i);
    if (total)
        printf("corpus count: %llu tokens over these words\n", (unsigned long long)total);
    for (size_t i = 0; i < show && i < rows; i++)
        printf("%8zu  %-24s %llu\n", i + 1, ist_store_word(s, i),   /* places from 1, as lookup */
               (unsigned long long)ist_store_count(s, i));
    free(norms);
    ist_store_free(s);
    return CLI_EXIT_OK;
}

const cli_command cmd_inspect = {"inspect", "show what a vector file holds and check it", run, help};
