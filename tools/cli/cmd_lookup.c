/* cmd_lookup.c - isthmus lookup: translations of words under a map (either way), the
 * nearest words within one vector file, or the vectors themselves, as one table. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/filekind.h>

#include "eval_cli.h"
#include "spell.h"

#define CMD "lookup"

static void
help(FILE *out)
{
    fputs("Usage: isthmus lookup [OPTIONS] SRC TGT --map=MAP WORD...\n"
          "       isthmus lookup [OPTIONS] --near|--vector VECTORS WORD...\n"
          "Show the best target words for each source word under a map, with their scores;\n"
          "or, with --reverse, the best source words for target words; or the nearest words\n"
          "within one vector file; or the vectors of words.\n"
          "\n"
          "Arguments:\n"
          "  SRC, TGT                the vector files the map was fitted on\n"
          "  VECTORS                 one vector file (--near, --vector)\n"
          "  WORD...                 words to look up (normalised like the vocabulary)\n"
          "\n"
          "Options:\n"
          "      --map=MAP           map file written by 'isthmus align' (required for\n"
          "                          translations)\n"
          "      --reverse           translate target words into source words: the map's\n"
          "                          transpose, which for an orthogonal map is the same\n"
          "                          comparison read the other way\n"
          "      --near              the nearest words within VECTORS (cosine of the stored\n"
          "                          vectors unless --rank-by=csls); the word itself is left out\n"
          "      --vector            print each word's stored vector: the word, then its\n"
          "                          components, as a line of a text vector table\n"
          "      --words=FILE        also look up the words of FILE, one per line ('#' starts\n"
          "                          a comment line); '-' reads standard input\n"
          "      --top=N             candidates shown per word [default: 10]\n"
          "      --with-numbers, --with-variants, --stop-share=PCT, --min-score=X\n"
          "                          the review filters of 'isthmus propose': by default\n"
          "                          number-shaped words and codes (unless the query is one,\n"
          "                          or spelt as the query), likely misspellings, words\n"
          "                          above 0.5% of the tokens and scores below 0 are not\n"
          "                          shown\n",
          out);
    ev_common_help(out, EV_HELP_SEARCH | EV_HELP_RANK, "csls (--near: cosine)");
    fputs("  -h, --help              show this help and exit\n"
          "\n"
          "Output: a header line, then one line per candidate: query, place (1 = best),\n"
          "candidate, score (CSLS or cosine) and the candidate's count in its corpus ('-'\n"
          "when the file holds none, as a text table). A word the vocabulary lacks is named\n"
          "on standard error with the closest spellings there; the other words are still\n"
          "answered.\n"
          "Exit status: 0 when at least one word was found, 1 when none was (or on bad input),\n"
          "2 bad usage.\n"
          "\n"
          "The output is a statistical suggestion; have a speaker of the language review it\n"
          "before it drives anything customer-facing or financial.\n"
          "\n"
          "Examples:\n"
          "  isthmus lookup en.isv es.isv --map=shop.map --top=3 kettle blue\n"
          "  isthmus lookup en.isv es.isv --map=shop.map --reverse --top=3 hervidor\n"
          "  isthmus lookup --near --top=5 en.isv kettle\n"
          "  printf 'kettle\\nmug\\n' | isthmus lookup en.isv es.isv --map=shop.map --words=-\n",
          out);
}

enum {
    OPT_MAP = 1, OPT_WORDS, OPT_TOP, OPT_REVERSE,
    OPT_NEAR, OPT_VECTOR
};

typedef enum mode { MODE_TRANSLATE, MODE_REVERSE, MODE_NEAR, MODE_VECTOR } mode;

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

/* One word a line, blank lines and '#' lines skipped, from a file or standard input. */
static int
read_words(const char *path, wordlist *l)
{
    bool in = strcmp(path, "-") == 0;
    const char *name = in ? "standard input" : path;
    FILE *f = in ? stdin : fopen(path, "r");
    char line[4096];
    size_t lineno = 0;
    ist_error err;

    if (f && !in && ist_file_expect(path, IST_FILE_ANY_TEXT, 0, "a word list", &err) != IST_OK) {
        fclose(f);
        return cli_report(CMD, &err);
    }
    if (!f) {
        fprintf(stderr, "isthmus %s: %s: cannot open for reading (%s)\n", CMD, path,
                strerror(errno));
        return CLI_EXIT_ERROR;
    }
    while (fgets(line, sizeof line, f)) {
        size_t len = strcspn(line, "\r\n");
        size_t st = strspn(line, " \t");
        lineno++;
        if (line[len] == '\0' && !feof(f)) {
            fprintf(stderr, "isthmus %s: %s:%zu: line longer than %zu bytes\n", CMD, name,
                    lineno, sizeof line - 2);
            if (!in)
                fclose(f);
            return CLI_EXIT_ERROR;
        }
        while (len > st && (line[len - 1] == ' ' || line[len - 1] == '\t'))
            len--;
        if (len > st && line[st] != '#' && !push_word(l, line + st, len - st)) {
            if (!in)
                fclose(f);
            fprintf(stderr, "isthmus %s: out of memory\n", CMD);
            return CLI_EXIT_ERROR;
        }
    }
    bool bad = ferror(f);
    if (!in)
        fclose(f);
    if (bad) {
        fprintf(stderr, "isthmus %s: %s: cannot read (%s)\n", CMD, name, strerror(errno));
        return CLI_EXIT_ERROR;
    }
    return 0;
}

static const char *
store_word(const void *ctx, size_t i)
{
    return ist_store_word(ctx, i);
}

/* Rows of the words in s (SIZE_MAX when absent, named on stderr with the closest
 * spellings of the vocabulary). *found gets how many were there. */
static int
resolve(const wordlist *l, const ist_store *s, const char *side, const char *path, size_t *rows,
        size_t *found)
{
    ist_error err;

    *found = 0;
    for (size_t i = 0; i < l->n; i++) {
        ptrdiff_t r;
        if (ist_pairs_find_word(s, l->w[i], &r, &err) != IST_OK)
            return cli_report(CMD, &err);
        rows[i] = r < 0 ? SIZE_MAX : (size_t)r;
        if (r >= 0) {
            ++*found;
            continue;
        }
        size_t near[3], nn = spell_nearest(l->w[i], store_word, s, ist_store_rows(s), near, 3);
        char hint[512] = "";
        for (size_t k = 0, len = 0; k < nn && len < sizeof hint; k++) {
            int w = snprintf(hint + len, sizeof hint - len, "%s%s", k ? ", " : "",
                             ist_store_word(s, near[k]));
            if (w < 0)
                break;
            len += (size_t)w;
        }
        cli_progress_done();
        if (nn)
            fprintf(stderr, "isthmus %s: '%s' is not in the %s (%s); closest spellings there: "
                    "%s\n", CMD, l->w[i], side, path, hint);
        else
            fprintf(stderr, "isthmus %s: '%s' is not in the %s (%s), nor anything spelt close "
                    "to it\n", CMD, l->w[i], side, path);
    }
    return 0;
}

/* Code points of a UTF-8 word: its width in a column of this table. */
static size_t
width_of(const char *s)
{
    size_t n = 0;
    for (; *s; s++)
        n += ((unsigned char)*s & 0xc0) != 0x80;
    return n;
}

static void
put_padded(const char *s, size_t width)
{
    fputs(s, stdout);
    for (size_t w = width_of(s); w < width; w++)
        putchar(' ');
}

typedef struct answer {
    size_t query;       /* index into the word list */
    size_t place;       /* 1 = best */
    uint32_t cand;      /* row of the candidate store */
    float score;
} answer;

static void
print_table(const wordlist *l, const ist_store *cs, const answer *a, size_t na)
{
    size_t wq = strlen("query"), wc = strlen("candidate");
    for (size_t i = 0; i < na; i++) {
        size_t w = width_of(l->w[a[i].query]);
        wq = w > wq ? w : wq;
        w = width_of(ist_store_word(cs, a[i].cand));
        wc = w > wc ? w : wc;
    }
    put_padded("query", wq);
    fputs("  place  ", stdout);
    put_padded("candidate", wc);
    fputs("     score       count\n", stdout);
    for (size_t i = 0; i < na; i++) {
        put_padded(l->w[a[i].query], wq);
        printf("  %5zu  ", a[i].place);
        put_padded(ist_store_word(cs, a[i].cand), wc);
        uint64_t n = ist_store_count(cs, a[i].cand);
        if (n)
            printf("  %8.4f  %10llu\n", a[i].score, (unsigned long long)n);
        else   /* a text table carries no counts */
            printf("  %8.4f  %10s\n", a[i].score, "-");
    }
}

/* The rows of s scaled to unit length (zero rows stay zero): the space of --near. */
static ist_status
unit_rows(const ist_store *s, ist_matrix **out, ist_error *err)
{
    size_t rows = ist_store_rows(s), dim = ist_store_dim(s);
    ist_status rc = ist_matrix_new(rows, dim, out, err);
    if (rc != IST_OK)
        return rc;
    ist_matview v = ist_matrix_view(*out);
    for (size_t r = 0; r < rows; r++) {
        const float *x = ist_store_row(s, r);
        float *y = v.data + r * v.stride;
        double sum = 0;
        for (size_t j = 0; j < dim; j++)
            sum += (double)x[j] * x[j];
        double inv = sum > 0 ? 1.0 / sqrt(sum) : 0.0;
        for (size_t j = 0; j < dim; j++)
            y[j] = (float)(x[j] * inv);
    }
    return IST_OK;
}

typedef struct job {
    mode mode;
    size_t top;
    ist_retrieval method;
    const ev_common *c;
    const ist_word_filter *wf;
    const ist_map *map;
    const ist_store *s, *t;   /* t is NULL for --near and --vector */
    const char *spath, *tpath;
} job;

static void
print_vectors(const wordlist *l, const ist_store *s, const size_t *rows)
{
    for (size_t i = 0; i < l->n; i++) {
        if (rows[i] == SIZE_MAX)
            continue;
        const float *x = ist_store_row(s, rows[i]);
        fputs(ist_store_word(s, rows[i]), stdout);
        for (size_t j = 0; j < ist_store_dim(s); j++)
            printf(" %.9g", x[j]);   /* 9 digits carry a float exactly */
        putchar('\n');
    }
}

static int
lookup(const job *jb, const wordlist *l)
{
    const ist_store *qs = jb->mode == MODE_REVERSE ? jb->t : jb->s;   /* where the words are */
    const ist_store *cs = jb->mode == MODE_TRANSLATE ? jb->t : jb->s; /* where candidates are */
    const char *side = jb->mode == MODE_TRANSLATE ? "source vectors"
                       : jb->mode == MODE_REVERSE ? "target vectors" : "vectors";
    ist_matrix *xs = NULL, *zt = NULL, *q = NULL;
    ist_topk *tk = NULL;
    size_t *rows = calloc(l->n + 1, sizeof *rows), nq = 0, na = 0;
    unsigned char *hide = calloc(ist_store_rows(cs) + 1, 1);   /* review filters */
    answer *ans = NULL;
    ist_error err;
    int rc = 0;

    if (!rows || !hide) {
        rc = CLI_EXIT_ERROR;
        fprintf(stderr, "isthmus %s: out of memory\n", CMD);
        goto done;
    }
    if ((rc = resolve(l, qs, side, jb->mode == MODE_REVERSE ? jb->tpath : jb->spath, rows,
                      &nq)) != 0)
        goto done;
    if (nq == 0) {
        rc = CLI_EXIT_ERROR;
        goto done;
    }
    if (jb->mode == MODE_VECTOR) {
        print_vectors(l, qs, rows);
        goto done;
    }
    if (ist_word_filter_mark(jb->wf, cs, hide, 0, NULL, &err) != IST_OK)
        goto fail;
    /* the query side (xs) and the candidate side (zt) of the search */
    if (jb->mode == MODE_NEAR) {
        if (unit_rows(qs, &xs, &err) != IST_OK)
            goto fail;
    } else if (ist_map_apply(jb->map, jb->s, jb->t, jb->mode == MODE_TRANSLATE ? &xs : &zt,
                             jb->mode == MODE_TRANSLATE ? &zt : &xs, &err) != IST_OK) {
        goto fail;
    }
    ist_cmatview qside = ist_matrix_cview(xs);
    ist_cmatview cside = zt ? ist_matrix_cview(zt) : qside;
    if (ist_matrix_new(nq, qside.cols, &q, &err) != IST_OK)
        goto fail;
    ist_matview qv = ist_matrix_view(q);
    for (size_t i = 0, k = 0; i < l->n; i++)
        if (rows[i] != SIZE_MAX)
            memcpy(qv.data + k++ * qv.stride, qside.data + rows[i] * qside.stride,
                   qside.cols * sizeof(float));
    size_t want = jb->top + 64 + (jb->mode == MODE_NEAR);
    size_t depth = want < cside.rows ? want : cside.rows;
    if (ist_retrieve_rank(ist_matview_const(qv), qside, cside, jb->method, depth,
                          jb->c->search.csls_k, &jb->c->search.retrieve, &tk, &err) != IST_OK)
        goto fail;
    ans = calloc(nq * jb->top + 1, sizeof *ans);
    if (!ans) {
        rc = CLI_EXIT_ERROR;
        fprintf(stderr, "isthmus %s: out of memory\n", CMD);
        goto done;
    }
    for (size_t i = 0, k = 0; i < l->n; i++) {
        if (rows[i] == SIZE_MAX)
            continue;
        const uint32_t *ix = ist_topk_index(tk, k);
        const float *sc = ist_topk_score(tk, k);
        /* a number or code asked for gets numbers and codes as candidates */
        const char *qw = ist_store_word(qs, rows[i]);
        unsigned char skip = ist_word_shape_of(qw, strlen(qw)) == IST_SHAPE_WORD
                                 ? 0xff : (unsigned char)~IST_FILTER_SHAPE;
        for (size_t a = 0, shown = 0; a < depth && shown < jb->top && ix[a] != UINT32_MAX; a++) {
            const char *w = ist_store_word(cs, ix[a]);
            if (jb->mode == MODE_NEAR && ix[a] == rows[i])
                continue;   /* the word itself */
            if (sc[a] < jb->wf->min_score)
                break;
            if ((hide[ix[a]] & skip) && strcmp(w, qw) != 0)
                continue;
            ans[na++] = (answer){i, ++shown, ix[a], sc[a]};
        }
        k++;
    }
    print_table(l, cs, ans, na);
    goto done;
fail:
    rc = cli_report(CMD, &err);
done:
    free(ans);
    ist_topk_free(tk);
    ist_matrix_free(q);
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    free(rows);
    free(hide);
    return rc;
}

static int
open_one(const char *path, ist_store **s)
{
    ist_store_opts so;
    ist_error err;

    ist_store_opts_init(&so);
    so.verify = true;   /* every row may be read: refuse damage first */
    if (ist_store_open(path, &so, s, &err) != IST_OK)
        return cli_report(CMD, &err);
    return 0;
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        EV_OPT_MAP_ROW(OPT_MAP),
        {"reverse", no_argument, NULL, OPT_REVERSE},
        {"near", no_argument, NULL, OPT_NEAR},
        {"vector", no_argument, NULL, OPT_VECTOR},
        {"words", required_argument, NULL, OPT_WORDS},
        {"top", required_argument, NULL, OPT_TOP},
        EV_OPTS_FILTER,
        EV_OPTS_SEARCH,
        EV_OPTS_RANK,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    const char *mpath = NULL, *wpath = NULL;
    wordlist l = {0};
    ist_store *s = NULL, *t = NULL;
    ist_map *map = NULL;
    ist_error err;
    ev_common c;
    job jb = {.mode = MODE_TRANSLATE, .top = 10};
    bool rank_given = false;
    int nmodes = 0, nfiles;
    int rc;

    ev_common_init(&c, EV_CSLS);
    while ((rc = getopt_long(argc, argv, "h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (rc) {
        case OPT_MAP: mpath = optarg; break;
        case OPT_REVERSE: jb.mode = MODE_REVERSE; nmodes++; break;
        case OPT_NEAR: jb.mode = MODE_NEAR; nmodes++; break;
        case OPT_VECTOR: jb.mode = MODE_VECTOR; nmodes++; break;
        case OPT_WORDS: wpath = optarg; break;
        case OPT_TOP:
            if (!cli_parse_size(CMD, "--top", optarg, 1, 1000, &jb.top))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (rc >= 1000) {
                if (!ev_common_option(CMD, &c, rc, optarg))
                    return CLI_EXIT_USAGE;
                if (c.methods == EV_BOTH)
                    return cli_usage_error(CMD, "--rank-by: expected cosine or csls");
                rank_given |= rc == EV_OPT_RANK_BY;
                break;
            }
            if (!cli_other_option(CMD, rc, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (nmodes > 1)
        return cli_usage_error(CMD, "--reverse, --near and --vector exclude each other");
    nfiles = jb.mode == MODE_NEAR || jb.mode == MODE_VECTOR ? 1 : 2;
    if (nfiles == 1 && mpath)
        return cli_usage_error(CMD, "--%s reads one vector file and no map; --map is for "
                               "translations", jb.mode == MODE_NEAR ? "near" : "vector");
    if (argc - optind < nfiles)
        return cli_usage_error(CMD, nfiles == 2 ? "expected SRC and TGT vector files, then words"
                                                : "expected a vector file, then words");
    if (nfiles == 2 && !mpath)
        return cli_usage_error(CMD, "expected --map=MAP (or --near or --vector with one "
                               "vector file)");
    if (argc - optind == nfiles && !wpath)
        return cli_usage_error(CMD, "expected at least one WORD or --words=FILE");
    for (int i = optind + nfiles; i < argc; i++)
        if (!push_word(&l, argv[i], strlen(argv[i]))) {
            rc = CLI_EXIT_ERROR;
            goto done;
        }
    if (wpath && (rc = read_words(wpath, &l)) != 0)
        goto done;
    if (l.n == 0) {
        fprintf(stderr, "isthmus %s: %s: no words to look up\n", CMD,
                strcmp(wpath, "-") == 0 ? "standard input" : wpath);
        rc = CLI_EXIT_ERROR;
        goto done;
    }
    if (nfiles == 2) {
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
    } else if ((rc = open_one(argv[optind], &s)) != 0) {
        goto done;
    }
    jb.method = c.methods == EV_COSINE || (jb.mode == MODE_NEAR && !rank_given)
                    ? IST_RETRIEVAL_COSINE : IST_RETRIEVAL_CSLS;
    jb.c = &c;
    jb.wf = &c.filter;
    jb.map = map;
    jb.s = s;
    jb.t = t;
    jb.spath = argv[optind];
    jb.tpath = nfiles == 2 ? argv[optind + 1] : NULL;
    rc = lookup(&jb, &l);
done:
    for (size_t i = 0; i < l.n; i++)
        free(l.w[i]);
    free(l.w);
    ist_map_free(map);
    ist_store_free(s);
    ist_store_free(t);
    return rc;
}

const cli_command cmd_lookup = {"lookup", "translate words under a map, or show near words",
                                run, help};
