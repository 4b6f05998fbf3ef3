/* cmd_lookup.c - isthmus lookup: the best translations of a few words under a map. */
#include <errno.h>
#include <getopt.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "eval_cli.h"

#define CMD "lookup"

static void
help(FILE *out)
{
    fputs("Usage: isthmus lookup [OPTIONS] SRC TGT --map=MAP WORD...\n"
          "Show the best target words for each source word under a map, with their scores.\n"
          "\n"
          "Arguments:\n"
          "  SRC, TGT                the vector files the map was fitted on\n"
          "  WORD...                 source words (normalised like the source vocabulary)\n"
          "\n"
          "Options:\n"
          "      --map=MAP           map file written by 'isthmus align' (required)\n"
          "      --words=FILE        also look up the words of FILE, one per line\n"
          "      --top=N             translations shown per word [default: 10]\n"
          "      --with-numbers, --with-variants, --stop-share=PCT, --min-score=X\n"
          "                          the review filters of 'isthmus propose': by default\n"
          "                          number-shaped words and codes (unless the query is one,\n"
          "                          or spelt as the query), likely misspellings, words\n"
          "                          above 0.5% of the target's tokens and scores below 0\n"
          "                          are not shown\n",
          out);
    ev_common_help(out, EV_HELP_SEARCH | EV_HELP_RANK, "csls");
    fputs("  -h, --help              show this help and exit\n"
          "\n"
          "The output is a statistical suggestion; have a speaker of the language review it\n"
          "before it drives anything customer-facing.\n"
          "\n"
          "Example:\n"
          "  isthmus lookup en.isv es.isv --map=shop.map --top=3 kettle blue\n",
          out);
}

enum { OPT_MAP = 1, OPT_WORDS, OPT_TOP, OPT_NUMBERS, OPT_VARIANTS, OPT_STOP, OPT_MIN };

typedef struct wordlist {
    char **w;
    size_t n, cap;
} wordlist;

static bool
push_word(wordlist *l, const char *w, size_t len)
{
    if (l->n == l->cap) {
        size_t nc = l->cap ? 2 * l->cap : 16;
        char **nw = realloc(l->w, nc * sizeof *nw);
        if (!nw)
            return false;
        l->w = nw;
        l->cap = nc;
    }
    l->w[l->n] = malloc(len + 1);
    if (!l->w[l->n])
        return false;
    memcpy(l->w[l->n], w, len);
    l->w[l->n][len] = '\0';
    l->n++;
    return true;
}

static int
read_words(const char *path, wordlist *l)
{
    FILE *f = fopen(path, "r");
    char line[4096];
    if (!f) {
        fprintf(stderr, "isthmus %s: %s: cannot open: %s\n", CMD, path, strerror(errno));
        return CLI_EXIT_ERROR;
    }
    while (fgets(line, sizeof line, f)) {
        size_t len = strcspn(line, "\r\n");
        size_t st = strspn(line, " \t");
        while (len > st && (line[len - 1] == ' ' || line[len - 1] == '\t'))
            len--;
        if (len > st && line[st] != '#' && !push_word(l, line + st, len - st)) {
            fclose(f);
            fprintf(stderr, "isthmus %s: out of memory\n", CMD);
            return CLI_EXIT_ERROR;
        }
    }
    fclose(f);
    return 0;
}

static int
lookup(const ev_common *c, size_t top, const ist_word_filter *wf, const ist_map *map,
       const ist_store *s, const ist_store *t, const wordlist *l)
{
    ist_matrix *xs = NULL, *zt = NULL, *q = NULL;
    ist_topk *tk = NULL;
    size_t *rows = calloc(l->n + 1, sizeof *rows), nq = 0;
    unsigned char *hide = calloc(ist_store_rows(t) + 1, 1);   /* review filters */
    bool missing = false;
    ist_error err;
    int rc = 0;

    if (!rows || !hide) {
        free(rows);
        free(hide);
        return CLI_EXIT_ERROR;
    }
    if (ist_word_filter_mark(wf, t, hide, 0, NULL, &err) != IST_OK) {
        free(rows);
        free(hide);
        return cli_report(CMD, &err);
    }
    for (size_t i = 0; i < l->n; i++) {
        ptrdiff_t r;
        if (ist_pairs_find_word(s, l->w[i], &r, &err) != IST_OK) {
            free(rows);
            return cli_report(CMD, &err);
        }
        if (r < 0) {
            fprintf(stderr, "isthmus %s: '%s' is not in the source vectors\n", CMD, l->w[i]);
            missing = true;
        }
        rows[i] = r < 0 ? SIZE_MAX : (size_t)r;
        nq += r >= 0;
    }
    if (nq == 0)
        goto done;
    if (ist_map_apply(map, s, t, &xs, &zt, &err) != IST_OK ||
        ist_matrix_new(nq, ist_map_dim(map), &q, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    ist_matview qv = ist_matrix_view(q);
    ist_cmatview xv = ist_matrix_cview(xs);
    for (size_t i = 0, k = 0; i < l->n; i++)
        if (rows[i] != SIZE_MAX)
            memcpy(qv.data + k++ * qv.stride, xv.data + rows[i] * xv.stride,
                   xv.cols * sizeof(float));
    ist_retrieval m = c->methods == EV_COSINE ? IST_RETRIEVAL_COSINE : IST_RETRIEVAL_CSLS;
    size_t depth = top + 64 < ist_store_rows(t) ? top + 64 : ist_store_rows(t);
    if (ist_retrieve_rank(ist_matview_const(qv), xv, ist_matrix_cview(zt), m, depth,
                          c->search.csls_k, &c->search.retrieve, &tk, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    for (size_t i = 0, k = 0; i < l->n; i++) {
        if (rows[i] == SIZE_MAX)
            continue;
        printf("%s%s  (source rank %zu, %s)\n", k ? "\n" : "", ist_store_word(s, rows[i]),
               rows[i] + 1, ist_retrieval_name(m));
        const uint32_t *ix = ist_topk_index(tk, k);
        const float *sc = ist_topk_score(tk, k);
        /* a number or code asked for gets numbers and codes as candidates */
        const char *qw = ist_store_word(s, rows[i]);
        unsigned char skip = ist_word_shape_of(qw, strlen(qw)) == IST_SHAPE_WORD
                                 ? 0xff : (unsigned char)~IST_FILTER_SHAPE;
        for (size_t a = 0, shown = 0; a < depth && shown < top && ix[a] != UINT32_MAX; a++) {
            const char *w = ist_store_word(t, ix[a]);
            if (sc[a] < wf->min_score)
                break;
            if ((hide[ix[a]] & skip) && strcmp(w, qw) != 0)
                continue;
            printf("  %3zu  %-24s %8.4f\n", ++shown, w, sc[a]);
        }
        k++;
    }
done:
    ist_topk_free(tk);
    ist_matrix_free(q);
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    free(rows);
    free(hide);
    return rc ? rc : missing ? CLI_EXIT_ERROR : 0;
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        {"map", required_argument, NULL, OPT_MAP},
        {"words", required_argument, NULL, OPT_WORDS},
        {"top", required_argument, NULL, OPT_TOP},
        {"with-numbers", no_argument, NULL, OPT_NUMBERS},
        {"with-variants", no_argument, NULL, OPT_VARIANTS},
        {"stop-share", required_argument, NULL, OPT_STOP},
        {"min-score", required_argument, NULL, OPT_MIN},
        EV_OPTS_SEARCH,
        EV_OPTS_RANK,
        {"help", no_argument, NULL, 'h'},
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    const char *mpath = NULL, *wpath = NULL;
    wordlist l = {0};
    size_t top = 10;
    ist_store *s = NULL, *t = NULL;
    ist_map *map = NULL;
    ist_error err;
    ev_common c;
    ist_word_filter wf;
    double v;
    int rc;

    ev_common_init(&c, EV_CSLS);
    ist_word_filter_init(&wf);
    while ((rc = getopt_long(argc, argv, "h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (rc) {
        case OPT_MAP: mpath = optarg; break;
        case OPT_WORDS: wpath = optarg; break;
        case OPT_TOP:
            if (!cli_parse_size(CMD, "--top", optarg, 1, 1000, &top))
                return CLI_EXIT_USAGE;
            break;
        case OPT_NUMBERS: wf.numbers = true; break;
        case OPT_VARIANTS: wf.variants = false; break;
        case OPT_STOP:
            if (!cli_parse_double(CMD, "--stop-share", optarg, 0, 100, &v))
                return CLI_EXIT_USAGE;
            wf.stop_share = v / 100;
            break;
        case OPT_MIN:
            if (!cli_parse_double(CMD, "--min-score", optarg, -4, 4, &v))
                return CLI_EXIT_USAGE;
            wf.min_score = (float)v;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (rc >= 1000) {
                if (!ev_common_option(CMD, &c, rc, optarg))
                    return CLI_EXIT_USAGE;
                if (c.methods == EV_BOTH)
                    return cli_usage_error(CMD, "--rank-by: expected cosine or csls");
                break;
            }
            if (!cli_other_option(CMD, rc, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind < 2)
        return cli_usage_error(CMD, "expected SRC and TGT vector files, then words");
    if (!mpath)
        return cli_usage_error(CMD, "expected --map=MAP");
    if (argc - optind == 2 && !wpath)
        return cli_usage_error(CMD, "expected at least one WORD or --words=FILE");
    for (int i = optind + 2; i < argc; i++)
        if (!push_word(&l, argv[i], strlen(argv[i]))) {
            rc = CLI_EXIT_ERROR;
            goto done;
        }
    if (wpath && (rc = read_words(wpath, &l)) != 0)
        goto done;
    if (ist_map_load(mpath, &map, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    if ((rc = ev_open_stores(CMD, argv[optind], argv[optind + 1], &s, &t)) != 0)
        goto done;
    if (ist_map_check(map, s, t, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    rc = lookup(&c, top, &wf, map, s, t, &l);
done:
    for (size_t i = 0; i < l.n; i++)
        free(l.w[i]);
    free(l.w);
    ist_map_free(map);
    ist_store_free(s);
    ist_store_free(t);
    return rc;
}

const cli_command cmd_lookup = {"lookup", "show the best translations of words under a map", run,
                                help};
