/* eval_cli.c - option handling, evaluation and tables shared by the commands that
 * read two vector files. */
#include "eval_cli.h"

#include <stdlib.h>
#include <string.h>

#define OVERLAP_SHOWN 8

void
ev_common_init(ev_common *c, ev_methods dflt)
{
    memset(c, 0, sizeof *c);
    c->methods = dflt;
    ist_search_opts_init(&c->search);
    ist_eval_opts_init(&c->eval);
    c->diagnostics = true;
    ist_diag_opts_init(&c->diag);
    ist_word_filter_init(&c->filter);
}

static bool
parse_bands(const char *cmd, const char *arg, ist_eval_opts *e)
{
    char buf[256], *save = NULL;
    size_t prev = 0;

    if (strlen(arg) >= sizeof buf)
        return cli_usage_error(cmd, "--bands: list too long") == 0;
    strcpy(buf, arg);
    e->nedges = 0;
    e->bands_auto = false;
    for (char *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        size_t v;
        if (e->nedges >= IST_METRICS_MAX_BANDS - 1)
            return cli_usage_error(cmd, "--bands: at most %d limits",
                                   IST_METRICS_MAX_BANDS - 1) == 0;
        if (!cli_parse_size(cmd, "--bands", tok, prev + 1, (size_t)1 << 40, &v))
            return false;
        e->band_edges[e->nedges++] = v;
        prev = v;
    }
    return true;
}

bool
ev_common_option(const char *cmd, ev_common *c, int opt, const char *arg)
{
    static const char *const methods[] = {"cosine", "csls", "both", NULL};
    size_t v;
    double x;
    int m;

    switch (opt) {
    case EV_OPT_RANK_BY:
        if (!cli_parse_choice(cmd, "--rank-by", arg, methods, &m))
            return false;
        c->methods = (ev_methods)(m + 1);
        return true;
    case EV_OPT_CSLS_K:
        return cli_parse_size(cmd, "--csls-k", arg, 1, IST_CSLS_K_MAX, &c->search.csls_k);
    case EV_OPT_MEMORY:
        if (!cli_parse_size(cmd, "--memory", arg, 1, (size_t)1 << 20, &v))
            return false;
        c->search.retrieve.budget = v << 20;
        return true;
    case EV_OPT_THREADS:
        return cli_parse_threads(cmd, arg, &c->search.retrieve.threads);
    case EV_OPT_BANDS:
        return parse_bands(cmd, arg, &c->eval);
    case EV_OPT_ALLOW_OVERLAP:
        c->allow_overlap = true;
        return true;
    case EV_OPT_JSON_OUT:
        c->json_out = arg;
        return true;
    case EV_OPT_NO_DIAG:
        c->diagnostics = false;
        return true;
    case EV_OPT_DIAG_WORDS:
        return cli_parse_size(cmd, "--diagnostics-words", arg, 1, (size_t)1 << 24,
                              &c->diag.queries);
    case EV_OPT_ISO_WORDS:
        return cli_parse_size(cmd, "--isometry-words", arg, 0, 4000, &c->diag.isometry_words);
    case EV_OPT_HUB_NUMBERS:
        c->diag.hub_numbers = true;
        return true;
    case EV_OPT_WITH_NUMBERS:
        c->filter.numbers = true;
        return true;
    case EV_OPT_WITH_VARIANTS:
        c->filter.variants = false;
        return true;
    case EV_OPT_STOP_SHARE:
        if (!cli_parse_double(cmd, "--stop-share", arg, 0, 100, &x))
            return false;
        c->filter.stop_share = x / 100;   /* given in percent */
        return true;
    case EV_OPT_MIN_SCORE:
        if (!cli_parse_double(cmd, "--min-score", arg, -4, 4, &x))
            return false;
        c->filter.min_score = (float)x;
        return true;
    default:
        return false;
    }
}

void
ev_common_help(FILE *out, unsigned groups, const char *rank_default)
{
    if (groups & EV_HELP_RANK)
        fprintf(out, "      --rank-by=METHOD    rank target words by %s [default: %s]\n",
                strcmp(rank_default, "both") == 0 ? "cosine, csls or both" : "cosine or csls",
                rank_default);
    if (groups & EV_HELP_SCORING)
        fputs("      --bands=R1,R2,...   upper frequency ranks of the bands reported [default:\n"
              "                          the first tenth and third of the source rows, to two\n"
              "                          digits: 250,830 for 2482 rows]\n"
              "      --allow-overlap     score even when test source words are also seed\n"
              "                          source words (the result says so) [default: refuse]\n"
              "      --json-out=FILE     write every figure as JSON ('-': standard output)\n",
              out);
    if (groups & EV_HELP_DIAG)
        fputs("      --no-diagnostics    leave the diagnostics (hubness, isometry, worst misses,\n"
              "                          similarity histograms) out of the JSON result\n"
              "      --diagnostics-words=N  hubness queries: the N most frequent source words\n"
              "                          [default: 5000]\n"
              "      --isometry-words=N  isometry: the N most frequent words of each side,\n"
              "                          0 to skip, at most 4000 [default: 1000]\n"
              "      --hubs-with-numbers  list number-shaped words and codes among the top\n"
              "                          hubs too (the skewness counts every target word)\n"
              "                          [default: left out of the list, as in propose]\n",
              out);
    if (groups & EV_HELP_SEARCH)
        fputs("      --csls-k=K          neighbours averaged in the CSLS hub penalty, 1..1000\n"
              "                          [default: 10]\n"
              "      --memory=MIB        memory for score tiles, MiB [default: 256]\n"
              CLI_HELP_THREADS,
              out);
}

int
ev_open_stores(const char *cmd, const char *src, const char *tgt, ist_store **s, ist_store **t)
{
    ist_store_opts so;
    ist_error err;

    /* these commands read every row anyway: check the matrix checksum and that every
     * number is finite before any of it reaches the maths (docs/formats.md) */
    ist_store_opts_init(&so);
    so.verify = true;
    *s = *t = NULL;
    if (ist_store_open(src, &so, s, &err) != IST_OK)
        return cli_report(cmd, &err);
    if (ist_store_open(tgt, &so, t, &err) != IST_OK) {
        ist_store_free(*s);
        *s = NULL;
        return cli_report(cmd, &err);
    }
    if (ist_store_dim(*s) != ist_store_dim(*t)) {
        fprintf(stderr, "isthmus %s: %s has dimension %zu but %s has %zu\n", cmd, src,
                ist_store_dim(*s), tgt, ist_store_dim(*t));
        ist_store_free(*s);
        ist_store_free(*t);
        *s = *t = NULL;
        return CLI_EXIT_ERROR;
    }
    return 0;
}

void
ev_print_coverage(FILE *out, const char *what, const char *path, const ist_pairs_coverage *c)
{
    if (out == stderr && cli_g.verbosity < 0)
        return;   /* a log line: -q silences it */
    fprintf(out, "%-10s %s: %zu pairs read, %zu kept; %zu of %zu source words covered\n", what,
            path, c->read, c->kept, c->sources_kept, c->sources_read);
    fprintf(out, "%-10s dropped: %zu source word missing, %zu target word missing, %zu both, "
            "%zu duplicate%s\n",
            "", c->missing_source, c->missing_target, c->missing_both, c->duplicates,
            c->duplicates == 1 ? "" : "s");
    if (c->source_exact || c->target_exact)
        fprintf(out, "%-10s words matched exactly (no text options recorded in the %s vectors)\n",
                "", c->source_exact && c->target_exact ? "source and target"
                    : c->source_exact                  ? "source"
                                                       : "target");
}

void
ev_swap_hint(const char *cmd, const char *path, const ist_store *s, const ist_store *t,
             size_t kept)
{
    ist_pairs *again = NULL;
    ist_pairs_coverage sw;
    ist_error err;

    memset(&sw, 0, sizeof sw);
    if (ist_pairs_read(path, &again, &err) == IST_OK &&
        ist_pairs_resolve(again, t, s, &sw, &err) == IST_OK && sw.kept > 2 * kept)
        fprintf(stderr, "isthmus %s: with the sides swapped %zu pairs would be kept: did you "
                "swap SRC and TGT? (SRC is the language on the left of %s)\n", cmd, sw.kept,
                path);
    ist_pairs_free(again);
}

int
ev_read_pairs(const char *cmd, const char *what, const char *path, const ist_store *s,
              const ist_store *t, ist_pairs **out, ist_pairs_coverage *cov)
{
    ist_error err;

    if (ist_pairs_read(path, out, &err) != IST_OK)
        return cli_report(cmd, &err);
    if (ist_pairs_resolve(*out, s, t, cov, &err) != IST_OK) {
        ist_pairs_free(*out);
        *out = NULL;
        return cli_report(cmd, &err);
    }
    /* the seed list's coverage belongs to the fitting log (standard error); a test list's
     * is the head of the figures (standard output) */
    ev_print_coverage(strcmp(what, "seeds") == 0 ? stderr : stdout, what, path, cov);
    if (cov->kept == 0) {
        cli_progress_done();
        if (cov->read == 0)
            fprintf(stderr, "isthmus %s: %s: the %s list holds no pair (only blank or comment "
                    "lines)\n", cmd, path, what);
        else
            fprintf(stderr, "isthmus %s: %s: none of its %zu pairs has both words in the vectors "
                    "(%zu source, %zu target and %zu both words missing)\n", cmd, path,
                    cov->read, cov->missing_source, cov->missing_target, cov->missing_both);
        if (cov->read)
            ev_swap_hint(cmd, path, s, t, 0);
        ist_pairs_free(*out);
        *out = NULL;
        return CLI_EXIT_ERROR;
    }
    return 0;
}

int
ev_check_overlap(const char *cmd, const ist_pairs *seeds, const ist_pairs *test, bool allow,
                 size_t *shared)
{
    const char *first[OVERLAP_SHOWN];
    ist_error err;
    size_t n;

    if (ist_pairs_overlap(seeds, test, first, OVERLAP_SHOWN, &n, &err) != IST_OK)
        return cli_report(cmd, &err);
    *shared = n;
    if (n == 0)
        return 0;
    fprintf(stderr, "isthmus %s: %s%zu test source word%s also %sseed source word%s:", cmd,
            allow ? "warning: " : "", n, n == 1 ? " is" : "s are", n == 1 ? "a " : "",
            n == 1 ? "" : "s");
    for (size_t i = 0; i < n && i < OVERLAP_SHOWN; i++)
        fprintf(stderr, " %s", first[i]);
    fprintf(stderr, "%s\n", n > OVERLAP_SHOWN ? " ..." : "");
    if (allow) {
        printf("%-10s LEAKAGE: %zu test source words are also seeds (--allow-overlap)\n", "", n);
        return 0;
    }
    fprintf(stderr, "isthmus %s: refusing to score a test list that shares words with the "
                    "seeds; use --allow-overlap to score it anyway\n", cmd);
    return CLI_EXIT_ERROR;
}

/* One figure for people: percent with the sign and one decimal, the interval beside it
 * in the same unit when there is one ("86.6% [83.2, 90.0]"). */
static void
figure_cell(double p, bool has_ci, double lo, double hi, char *buf, size_t cap)
{
    if (has_ci)
        snprintf(buf, cap, "%.1f%% [%.1f, %.1f]", 100 * p, 100 * lo, 100 * hi);
    else
        snprintf(buf, cap, "%.1f%%", 100 * p);
}

/* Columns as wide as a cell with its interval when any run has intervals. */
static void
print_figures(const double *p, bool has_ci, const double *lo, const double *hi, int width)
{
    for (size_t j = 0; j < IST_METRICS_NK; j++) {
        char cell[64];
        figure_cell(p[j], has_ci, has_ci ? lo[j] : 0, has_ci ? hi[j] : 0, cell, sizeof cell);
        if (j + 1 < IST_METRICS_NK)
            printf("  %-*s", width, cell);
        else
            printf("  %s\n", cell);
    }
}

static void
print_figure_heads(int width)
{
    for (size_t j = 0; j < IST_METRICS_NK; j++) {
        char head[16];
        snprintf(head, sizeof head, "p@%zu", ist_metrics_k(j));
        if (j + 1 < IST_METRICS_NK)
            printf("  %-*s", width, head);
        else
            printf("  %s\n", head);
    }
}

void
ev_print_runs(const ist_result *res)
{
    const ist_result_run *with_ci = NULL;
    bool all_ci = res->nruns > 0;

    for (size_t i = 0; i < res->nruns; i++) {
        if (res->runs[i].has_ci && !with_ci)
            with_ci = &res->runs[i];
        all_ci = all_ci && res->runs[i].has_ci;
    }
    bool ci = with_ci != NULL;
    int width = ci ? 21 : 6;
    printf("\n%-12s %-9s %8s %9s", "map", "retrieval", "queries", "coverage");
    print_figure_heads(width);
    for (size_t i = 0; i < res->nruns; i++) {
        const ist_result_run *run = &res->runs[i];
        const ist_metrics *m = &run->m;
        printf("%-12s %-9s %8zu %8.1f%%", run->label, ist_retrieval_name(m->method), m->queries,
               100 * m->coverage);
        print_figures(m->p, run->has_ci, run->ci.lo, run->ci.hi, width);
    }
    printf("\n%-12s %-9s %-14s %8s", "map", "retrieval", "frequency rank", "queries");
    print_figure_heads(width);
    for (size_t i = 0; i < res->nruns; i++) {
        const ist_result_run *run = &res->runs[i];
        const ist_metrics *m = &run->m;
        for (size_t b = 0; b < m->nbands; b++) {
            char name[48];
            ist_band_label(m->band[b].lo, m->band[b].hi, "-", name, sizeof name);
            if (m->band[b].queries == 0)
                continue;   /* the JSON result lists every band */
            bool has = run->has_ci && run->band_has_ci[b];
            printf("%-12s %-9s %-14s %8zu", run->label, ist_retrieval_name(m->method), name,
                   m->band[b].queries);
            print_figures(m->band[b].p, has, run->ci.band_lo[b], run->ci.band_hi[b], width);
        }
    }
    printf("\n(p@k: the share of covered queries with a gold target among their k best targets");
    if (ci)
        printf(";\n [lo, hi]: %.0f%% interval, percentile bootstrap over the queries, %zu "
               "resamples, seed %llu%s", 100 * with_ci->ci_opts.level, with_ci->ci_opts.resamples,
               (unsigned long long)with_ci->ci_opts.seed,
               all_ci ? "" : "; none where no per-query outcomes were kept");
    printf(")\n");
}

void
ev_evaluate_opts(const ev_common *c, ist_evaluate_opts *o)
{
    ist_evaluate_opts_init(o);
    o->eval = c->eval;
    o->eval.search = c->search;
    o->methods = (c->methods & EV_COSINE ? IST_RESULT_COSINE : 0u) |
                 (c->methods & EV_CSLS ? IST_RESULT_CSLS : 0u);
    o->allow_overlap = c->allow_overlap;
    o->diagnostics = c->diagnostics && c->json_out;
    o->diag = c->diag;
}

int
ev_evaluate(const char *cmd, const ist_map *map, const ist_store *s, const ist_store *t,
            const ist_pairs *test, const ist_pairs_coverage *cov, const ist_evaluate_opts *o,
            ist_result **out)
{
    ist_error err;
    double t0 = cli_now();

    char label[160];
    snprintf(label, sizeof label, "%s: scoring %zu test pairs against %zu target words", cmd,
             ist_pairs_kept(test), ist_store_rows(t));
    cli_progress_start(label);
    ist_status st = ist_evaluate(map, s, t, test, cov, o, out, &err);
    cli_progress_stop();
    if (st != IST_OK)
        return cli_report(cmd, &err);
    if ((*out)->nruns)
        ev_print_runs(*out);
    const ist_diag *d = (*out)->diagnostics;
    if (d) {
        printf("\n%-10s hubness skewness (k=10, %zu queries): cosine %.2f, csls %.2f", "diagnose",
               ist_diag_queries(d), ist_diag_skewness(d, IST_RETRIEVAL_COSINE),
               ist_diag_skewness(d, IST_RETRIEVAL_CSLS));
        if (ist_diag_isometry(d) >= 0)
            printf("; isometry %.4g", ist_diag_isometry(d));
        printf("\n");
    }
    if (test)
        cli_info("scored%s in %.1f s\n", d ? " and diagnosed" : "", cli_now() - t0);
    return 0;
}
