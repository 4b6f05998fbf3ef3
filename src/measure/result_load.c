/* result_load.c - read a result JSON back into the typed record, checking every member
 * it holds: type, range and consistency (docs/formats.md, "Result JSON"). */
#include <isthmus/result.h>
#include <isthmus/filekind.h>

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "json_int.h"
#include "result_int.h"
#include "result_keys_int.h"

ist_status
ist_rd_fail(ist_rd *r, const ist_jv *at, const char *fmt, ...)
{
    char msg[400];
    va_list ap;

    if (r->rc != IST_OK)
        return r->rc;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    r->rc = ist_error_at(r->err, IST_ERR_FORMAT, r->name, ist_jv_line(at), "%s", msg);
    return r->rc;
}

static const char *
type_name(ist_jtype t)
{
    static const char *const names[] = {"null", "true or false", "a number", "a string",
                                        "an array", "an object"};
    return names[t];
}

const ist_jv *
ist_rd_get(ist_rd *r, const ist_jv *obj, const char *key, ist_jtype want, bool required,
           const char *where)
{
    const ist_jv *v = ist_jv_get(obj, key);
    if (r->rc != IST_OK)
        return NULL;
    if (!v || (ist_jv_type(v) == IST_JNULL && want != IST_JNULL)) {
        if (required)
            ist_rd_fail(r, obj, "%s%s%s: expected %s, found %s", where, *where ? "." : "", key,
                        type_name(want), v ? "null" : "nothing");
        return NULL;
    }
    if (ist_jv_type(v) != want) {
        ist_rd_fail(r, v, "%s%s%s: expected %s, found %s", where, *where ? "." : "", key,
                    type_name(want), type_name(ist_jv_type(v)));
        return NULL;
    }
    return v;
}

/* A whole number from 0 to max. */
static bool
whole(ist_rd *r, const ist_jv *v, double max, const char *what, const char *key, size_t *out)
{
    double x = ist_jv_num(v, -1);
    if (!(x >= 0 && x <= max) || x != floor(x)) {
        ist_rd_fail(r, v, "%s%s%s: expected a whole number from 0 to %.0f, found %.17g", what,
                    *what ? "." : "", key, max, x);
        return false;
    }
    *out = (size_t)x;
    return true;
}

bool
ist_rd_size(ist_rd *r, const ist_jv *obj, const char *key, bool required, const char *where,
            size_t *out)
{
    const ist_jv *v = ist_rd_get(r, obj, key, IST_JNUM, required, where);
    return v && whole(r, v, 9007199254740992.0, where, key, out);
}

bool
ist_rd_frac(ist_rd *r, const ist_jv *obj, const char *key, bool required, const char *where,
            double *out)
{
    const ist_jv *v = ist_rd_get(r, obj, key, IST_JNUM, required, where);
    if (!v)
        return false;
    double x = ist_jv_num(v, 0);
    if (!(x >= 0 && x <= 1)) {
        ist_rd_fail(r, v, "%s%s%s: expected a fraction from 0 to 1, found %.17g", where,
                    *where ? "." : "", key, x);
        return false;
    }
    *out = x;
    return true;
}

bool
ist_rd_bool(ist_rd *r, const ist_jv *obj, const char *key, bool required, const char *where,
            bool *out)
{
    const ist_jv *v = ist_rd_get(r, obj, key, IST_JBOOL, required, where);
    if (v)
        *out = ist_jv_bool(v, false);
    return v != NULL;
}

/* A copy of a string member; NULL when absent or null (or on failure, r->rc set). */
char *
ist_rd_str(ist_rd *r, const ist_jv *obj, const char *key, bool required, const char *where)
{
    const ist_jv *v = ist_rd_get(r, obj, key, IST_JSTR, required, where);
    char *s;
    if (!v)
        return NULL;
    if (!(s = ist_strdup(ist_jv_str(v, ""))))
        r->rc = ist_error_nomem(r->err);
    return s;
}

/* 16 hex digits. */
static bool
read_hex(ist_rd *r, const ist_jv *obj, const char *key, const char *where, bool *has,
         uint64_t *out)
{
    const ist_jv *v = ist_rd_get(r, obj, key, IST_JSTR, false, where);
    const char *s = ist_jv_str(v, "");
    uint64_t x = 0;

    *has = false;
    *out = 0;
    if (!v)
        return r->rc == IST_OK;
    size_t n = strlen(s);
    for (size_t i = 0; i < n; i++) {
        int d = s[i] >= '0' && s[i] <= '9' ? s[i] - '0' : s[i] >= 'a' && s[i] <= 'f' ? s[i] - 'a' + 10 : -1;
        if (d < 0) {
            n = 0;
            break;
        }
        x = x << 4 | (uint64_t)d;
    }
    if (n != 16) {
        ist_rd_fail(r, v, "%s.%s: expected 16 lower-case hex digits", where, key);
        return false;
    }
    *has = true;
    *out = x;
    return true;
}

static void
read_vectors(ist_rd *r, const ist_jv *inputs, const char *key, ist_result_vectors *out)
{
    char where[32];
    snprintf(where, sizeof where, "%s.%s", RK_INPUTS, key);
    const ist_jv *o = ist_rd_get(r, inputs, key, IST_JOBJ, false, RK_INPUTS);
    if (!o)
        return;
    out->path = ist_rd_str(r, o, RK_PATH, false, where);
    read_hex(r, o, RK_FINGERPRINT, where, &out->has_fingerprint, &out->fingerprint);
    const ist_jv *prov = ist_rd_get(r, o, RK_PROVENANCE, IST_JOBJ, false, where);
    if (prov && r->rc == IST_OK)
        r->rc = ist_json_text(prov, &out->provenance, r->err);
}

static void
read_list(ist_rd *r, const ist_jv *o, const char *where, const char *ck_key,
          ist_result_list *out)
{
    out->path = ist_rd_str(r, o, RK_PATH, false, where);
    out->label = ist_rd_str(r, o, RK_LABEL, false, where);
    read_hex(r, o, ck_key, where, &out->has_checksum, &out->checksum);
}

static void
read_coverage(ist_rd *r, const ist_jv *o, ist_pairs_coverage *c)
{
    static const char where[] = RK_TEST "." RK_COVERAGE;
    ist_rd_size(r, o, RK_PAIRS_READ, true, where, &c->read);
    ist_rd_size(r, o, RK_PAIRS_KEPT, true, where, &c->kept);
    ist_rd_size(r, o, RK_DUPLICATES, true, where, &c->duplicates);
    ist_rd_size(r, o, RK_MISSING_SOURCE, true, where, &c->missing_source);
    ist_rd_size(r, o, RK_MISSING_TARGET, true, where, &c->missing_target);
    ist_rd_size(r, o, RK_MISSING_BOTH, true, where, &c->missing_both);
    ist_rd_size(r, o, RK_SOURCES_READ, true, where, &c->sources_read);
    ist_rd_size(r, o, RK_SOURCES_KEPT, true, where, &c->sources_kept);
    const char *sm = ist_jv_str(ist_rd_get(r, o, RK_SOURCE_MATCHING, IST_JSTR, true, where), "");
    const char *tm = ist_jv_str(ist_rd_get(r, o, RK_TARGET_MATCHING, IST_JSTR, true, where), "");
    c->source_exact = strcmp(sm, RK_MATCH_EXACT) == 0;
    c->target_exact = strcmp(tm, RK_MATCH_EXACT) == 0;
    if (r->rc == IST_OK &&
        (c->kept + c->duplicates + c->missing_source + c->missing_target + c->missing_both !=
             c->read ||
         c->sources_kept > c->sources_read))
        ist_rd_fail(r, o, "%s: the counts do not add up (kept, duplicates and missing pairs "
                          "must sum to pairs_read; sources_kept at most sources_read)", where);
}

static void
read_test(ist_rd *r, const ist_jv *root, ist_result_test *t)
{
    const ist_jv *o = ist_rd_get(r, root, RK_TEST, IST_JOBJ, false, "");
    const ist_jv *c;
    bool has_sh = false;

    if (!o)
        return;
    t->present = true;
    t->list.path = ist_rd_str(r, o, RK_PATH, false, RK_TEST);
    t->list.label = ist_rd_str(r, o, RK_LABEL, false, RK_TEST);
    read_hex(r, o, RK_LIST_CHECKSUM, RK_TEST, &t->list.has_checksum, &t->list.checksum);
    read_hex(r, o, RK_CHECKSUM, RK_TEST, &t->has_kept, &t->kept_checksum);
    read_hex(r, o, RK_SOURCES_HASH, RK_TEST, &has_sh, &t->sources_hash);
    if (r->rc == IST_OK && has_sh != t->has_kept)
        ist_rd_fail(r, o, "%s: expected both %s and %s, or neither", RK_TEST, RK_CHECKSUM,
                    RK_SOURCES_HASH);
    ist_rd_size(r, o, RK_SOURCE_WORDS, false, RK_TEST, &t->source_words);
    if ((c = ist_rd_get(r, o, RK_COVERAGE, IST_JOBJ, false, RK_TEST))) {
        t->has_coverage = true;
        read_coverage(r, c, &t->coverage);
    }
    t->has_overlap = ist_rd_size(r, o, RK_OVERLAP, false, RK_TEST, &t->overlap);
    ist_rd_bool(r, o, RK_OVERLAP_ALLOWED, false, RK_TEST, &t->overlap_allowed);
}

static bool
pick(const char *s, const char *a, const char *b, const char *c, unsigned va, unsigned vb,
     unsigned vc, unsigned *out)
{
    if (strcmp(s, a) == 0)
        *out = va;
    else if (strcmp(s, b) == 0)
        *out = vb;
    else if (strcmp(s, c) == 0)
        *out = vc;
    else
        return false;
    return true;
}

static void
read_fit(ist_rd *r, const ist_jv *o, ist_result_options *opt)
{
    ist_result_fit *f = &opt->fit;
    if (!ist_jv_get(o, RK_NORMALISE))
        return;
    opt->has_fit = true;
    f->normalise = ist_rd_str(r, o, RK_NORMALISE, true, RK_OPTIONS);
    ist_rd_size(r, o, RK_REFINE_ROUNDS, true, RK_OPTIONS, &f->refine_rounds);
    ist_rd_size(r, o, RK_REFINE_VOCAB, true, RK_OPTIONS, &f->refine_vocab);
    ist_rd_bool(r, o, RK_IDENT, true, RK_OPTIONS, &f->identical_seeds);
    size_t v = 0;
    if (ist_rd_size(r, o, RK_IDENT_MIN, true, RK_OPTIONS, &v))
        f->identical_min_count = v;
    ist_rd_bool(r, o, RK_IDENT_MARKED, true, RK_OPTIONS, &f->identical_marked);
    ist_rd_frac(r, o, RK_HOLD_OUT, true, RK_OPTIONS, &f->hold_out);
    const ist_jv *ss = ist_rd_get(r, o, RK_SPLIT_SEED, IST_JNUM, true, RK_OPTIONS);
    if (ss)
        f->split_seed = (uint64_t)ist_jv_num(ss, 0);
    ist_rd_bool(r, o, RK_KEEP_SEEDS, false, RK_OPTIONS, &f->refine_keep_seeds);
}

static void
read_options(ist_rd *r, const ist_jv *root, ist_result_options *opt)
{
    const ist_jv *o = ist_rd_get(r, root, RK_OPTIONS, IST_JOBJ, false, ""), *b;
    size_t v;

    if (!o)
        return;
    opt->present = true;
    const char *m = ist_jv_str(ist_rd_get(r, o, RK_RANK_BY, IST_JSTR, true, RK_OPTIONS), "");
    if (r->rc == IST_OK &&
        !pick(m, RK_BOTH, RK_CSLS, RK_COSINE, IST_RESULT_COSINE | IST_RESULT_CSLS,
              IST_RESULT_CSLS, IST_RESULT_COSINE, &opt->methods))
        ist_rd_fail(r, o, "%s.%s: expected cosine, csls or both, found '%s'", RK_OPTIONS,
                    RK_RANK_BY, m);
    ist_rd_size(r, o, RK_CSLS_K, true, RK_OPTIONS, &opt->neighbourhood);
    ist_rd_size(r, o, RK_MEMORY, true, RK_OPTIONS, &opt->memory_bytes);
    if (ist_rd_size(r, o, RK_THREADS, true, RK_OPTIONS, &v))
        opt->threads = (unsigned)v;
    ist_rd_bool(r, o, RK_ALLOW_OVERLAP, true, RK_OPTIONS, &opt->allow_overlap);
    if ((b = ist_rd_get(r, o, RK_BANDS, IST_JARR, true, RK_OPTIONS))) {
        if (ist_jv_len(b) >= IST_METRICS_MAX_BANDS)
            ist_rd_fail(r, b, "options.bands: expected at most %d limits",
                        IST_METRICS_MAX_BANDS - 1);
        for (size_t i = 0; r->rc == IST_OK && i < ist_jv_len(b); i++)
            if (whole(r, ist_jv_at(b, i), 1e15, RK_OPTIONS, RK_BANDS, &v))
                opt->band_edges[opt->nedges++] = v;
    }
    read_fit(r, o, opt);
    const char *st = ist_jv_str(ist_rd_get(r, o, RK_STAGE, IST_JSTR, false, RK_OPTIONS), NULL);
    if (st && strcmp(st, RK_STAGE_OLD_REFINED) == 0)
        st = RK_STAGE_REFINED;
    if (st && !pick(st, RK_BOTH, RK_STAGE_SEED, RK_STAGE_REFINED,
                    IST_STAGE_SEED | IST_STAGE_REFINED, IST_STAGE_SEED, IST_STAGE_REFINED,
                    &opt->stages))
        ist_rd_fail(r, o, "options.stage: expected refined, seed or both, found '%s'", st);
}

/* precision {"p@K"} (required) and hits {"@K"} (optional) of a run or band. */
static void
read_figures(ist_rd *r, const ist_jv *o, const char *where, size_t queries, size_t *hits,
             double *p)
{
    const ist_jv *pr = ist_rd_get(r, o, RK_PRECISION, IST_JOBJ, true, where);
    const ist_jv *h = ist_rd_get(r, o, RK_HITS, IST_JOBJ, false, where);
    char key[16], w2[96];

    snprintf(w2, sizeof w2, "%s.%s", where, RK_PRECISION);
    for (size_t i = 0; pr && i < IST_METRICS_NK; i++) {
        snprintf(key, sizeof key, RK_PRECISION_FMT, ist_metrics_k(i));
        ist_rd_frac(r, pr, key, true, w2, &p[i]);
    }
    snprintf(w2, sizeof w2, "%s.%s", where, RK_HITS);
    for (size_t i = 0; h && i < IST_METRICS_NK; i++) {
        snprintf(key, sizeof key, RK_HITS_FMT, ist_metrics_k(i));
        if (ist_rd_size(r, h, key, true, w2, &hits[i]) && hits[i] > queries)
            ist_rd_fail(r, h, "%s.%s: %zu hits but only %zu queries", w2, key, hits[i], queries);
    }
    if (!h)
        for (size_t i = 0; i < IST_METRICS_NK; i++)
            hits[i] = (size_t)llround(p[i] * (double)queries);
}

/* A "ci" object into lo/hi; false when absent. */
static bool
read_ci(ist_rd *r, const ist_jv *o, const char *where, ist_ci_opts *opts, double *lo, double *hi)
{
    const ist_jv *ci = ist_rd_get(r, o, RK_CI, IST_JOBJ, false, where);
    char key[16], w2[96];
    size_t v;

    if (!ci)
        return false;
    snprintf(w2, sizeof w2, "%s.%s", where, RK_CI);
    ist_rd_frac(r, ci, RK_LEVEL, false, w2, &opts->level);
    if (ist_rd_size(r, ci, RK_RESAMPLES, false, w2, &v))
        opts->resamples = v;
    const ist_jv *sd = ist_rd_get(r, ci, RK_SEED, IST_JNUM, false, w2);
    if (sd)
        opts->seed = (uint64_t)ist_jv_num(sd, 0);
    for (size_t j = 0; j < IST_METRICS_NK; j++) {
        snprintf(key, sizeof key, RK_PRECISION_FMT, ist_metrics_k(j));
        const ist_jv *a = ist_rd_get(r, ci, key, IST_JARR, false, w2);
        if (!a) {
            lo[j] = hi[j] = NAN;   /* no interval of this figure */
            if (r->rc != IST_OK)
                return false;
            continue;
        }
        const ist_jv *x = ist_jv_at(a, 0), *y = ist_jv_at(a, 1);
        lo[j] = ist_jv_num(x, NAN);
        hi[j] = ist_jv_num(y, NAN);
        if (ist_jv_len(a) != 2 || !(lo[j] >= 0 && lo[j] <= hi[j] && hi[j] <= 1)) {
            ist_rd_fail(r, a, "%s.%s: expected [lo, hi] with 0 <= lo <= hi <= 1", w2, key);
            return false;
        }
    }
    return true;
}

static void
read_bands(ist_rd *r, const ist_jv *o, const char *where, ist_result_run *run)
{
    const ist_jv *bands = ist_rd_get(r, o, RK_BANDS, IST_JARR, false, where);
    ist_metrics *m = &run->m;
    char w2[96];

    if (ist_jv_len(bands) > IST_METRICS_MAX_BANDS) {
        ist_rd_fail(r, bands, "%s.%s: expected at most %d bands", where, RK_BANDS,
                    IST_METRICS_MAX_BANDS);
        return;
    }
    for (size_t b = 0; r->rc == IST_OK && b < ist_jv_len(bands); b++) {
        const ist_jv *bo = ist_jv_at(bands, b);
        ist_band *band = &m->band[m->nbands++];
        snprintf(w2, sizeof w2, "%s.%s[%zu]", where, RK_BANDS, b);
        if (ist_jv_type(bo) != IST_JOBJ) {
            ist_rd_fail(r, bo, "%s: expected an object", w2);
            return;
        }
        ist_rd_size(r, bo, RK_RANK_FROM, true, w2, &band->lo);
        ist_rd_size(r, bo, RK_RANK_TO, false, w2, &band->hi);
        if (ist_rd_size(r, bo, RK_QUERIES, true, w2, &band->queries) && band->queries > m->queries)
            ist_rd_fail(r, bo, "%s: %zu queries but the run has %zu", w2, band->queries,
                        m->queries);
        if (r->rc == IST_OK && (band->lo == 0 || (band->hi && band->hi < band->lo)))
            ist_rd_fail(r, bo, "%s: expected rank_from >= 1 and rank_to >= rank_from", w2);
        read_figures(r, bo, w2, band->queries, band->hits, band->p);
        run->band_has_ci[b] = read_ci(r, bo, w2, &run->ci_opts, run->ci.band_lo[b],
                                      run->ci.band_hi[b]);
    }
}

static int
cmp_word(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

/* No source word twice among a run's per-query outcomes (they pair two runs by word). */
static void
check_distinct(ist_rd *r, const ist_jv *pq, const char *where, ist_result_run *run)
{
    size_t n = 0;
    char **w = ist_malloc((run->nper_query + 1) * sizeof *w);
    if (!w) {
        r->rc = ist_error_nomem(r->err);
        return;
    }
    for (size_t i = 0; i < run->nper_query; i++)
        if (run->query_source[i])
            w[n++] = run->query_source[i];
    qsort(w, n, sizeof *w, cmp_word);
    for (size_t i = 1; i < n; i++)
        if (strcmp(w[i], w[i - 1]) == 0) {
            ist_rd_fail(r, pq, "%s.%s: source word '%s' is listed more than once", where,
                        RK_PER_QUERY, w[i]);
            break;
        }
    ist_free(w);
}

static void
read_per_query(ist_rd *r, const ist_jv *o, const char *where, ist_result_run *run)
{
    const ist_jv *pq = ist_rd_get(r, o, RK_PER_QUERY, IST_JARR, false, where);
    size_t n = ist_jv_len(pq), rows = 0;
    ist_metrics *m = &run->m;
    char w2[96];

    if (!pq || n == 0)
        return;
    if (n != m->queries) {
        ist_rd_fail(r, pq, "%s.%s: %zu entries but the run has %zu queries", where,
                    RK_PER_QUERY, n, m->queries);
        return;
    }
    run->query_source = ist_calloc(n, sizeof *run->query_source);
    run->query_band = ist_calloc(n, sizeof *run->query_band);
    m->query_place = ist_calloc(n, 1);
    m->query_row = ist_calloc(n, sizeof *m->query_row);
    if (!run->query_source || !run->query_band || !m->query_place || !m->query_row) {
        r->rc = ist_error_nomem(r->err);
        return;
    }
    run->nper_query = n;
    for (size_t i = 0; r->rc == IST_OK && i < n; i++) {
        const ist_jv *q = ist_jv_at(pq, i);
        size_t rank = 0, fr = 0;
        snprintf(w2, sizeof w2, "%s.%s[%zu]", where, RK_PER_QUERY, i);
        if (ist_jv_type(q) != IST_JOBJ) {
            ist_rd_fail(r, q, "%s: expected an object", w2);
            return;
        }
        run->query_source[i] = ist_rd_str(r, q, RK_SOURCE, false, w2);
        const ist_jv *rv = ist_rd_get(r, q, RK_RANK, IST_JNUM, true, w2);
        if (rv && !whole(r, rv, IST_CI_MISS, w2, RK_RANK, &rank))
            return;
        m->query_place[i] = rank == 0 ? IST_CI_MISS : (uint8_t)(rank - 1);
        if (ist_rd_size(r, q, RK_BAND, true, w2, &run->query_band[i]) &&
            run->query_band[i] >= (m->nbands ? m->nbands : 1))
            ist_rd_fail(r, q, "%s.%s: no band %zu in this run", w2, RK_BAND, run->query_band[i]);
        if (ist_rd_size(r, q, RK_FREQ_RANK, false, w2, &fr) && fr > 0) {
            m->query_row[i] = fr - 1;
            rows++;
        }
    }
    run->has_rows = rows == n;
    if (r->rc == IST_OK)
        check_distinct(r, pq, where, run);
}

static void
read_run(ist_rd *r, const ist_jv *o, size_t i, ist_result_run *run)
{
    ist_metrics *m = &run->m;
    char where[48];

    snprintf(where, sizeof where, "%s[%zu]", RK_RUNS, i);
    if (ist_jv_type(o) != IST_JOBJ) {
        ist_rd_fail(r, o, "%s: expected an object", where);
        return;
    }
    ist_ci_opts_init(&run->ci_opts);
    run->label = ist_rd_str(r, o, RK_LABEL, true, where);
    if (run->label && strcmp(run->label, RK_RUN_OLD_SEED) == 0)
        strcpy(run->label, RK_RUN_SEED);   /* an earlier version's name, no longer */
    const char *ret = ist_jv_str(ist_rd_get(r, o, RK_RETRIEVAL, IST_JSTR, true, where), "");
    unsigned meth = 0;
    if (r->rc == IST_OK && !pick(ret, RK_CSLS, RK_COSINE, RK_COSINE, IST_RESULT_CSLS,
                                 IST_RESULT_COSINE, IST_RESULT_COSINE, &meth))
        ist_rd_fail(r, o, "%s.%s: expected cosine or csls, found '%s'", where, RK_RETRIEVAL, ret);
    m->method = meth == IST_RESULT_CSLS ? IST_RETRIEVAL_CSLS : IST_RETRIEVAL_COSINE;
    ist_rd_size(r, o, RK_NEIGHBOURHOOD, false, where, &m->neighbourhood);
    ist_rd_size(r, o, RK_SOURCES, true, where, &m->sources);
    ist_rd_size(r, o, RK_QUERIES, true, where, &m->queries);
    if (r->rc == IST_OK && m->queries > m->sources)
        ist_rd_fail(r, o, "%s: %zu queries but only %zu source words", where, m->queries,
                    m->sources);
    ist_rd_frac(r, o, RK_COVERAGE, true, where, &m->coverage);
    read_figures(r, o, where, m->queries, m->hits, m->p);
    read_bands(r, o, where, run);
    run->has_ci = read_ci(r, o, where, &run->ci_opts, run->ci.lo, run->ci.hi);
    read_per_query(r, o, where, run);
}

static ist_status
from_tree(const ist_jv *root, const char *name, ist_result **out, ist_error *err)
{
    ist_rd r = {name, err, IST_OK};
    ist_result *res;
    size_t v = 0;

    if (ist_jv_type(root) != IST_JOBJ)
        return ist_error_at(err, IST_ERR_FORMAT, name, ist_jv_line(root),
                            "expected a JSON object at the top level");
    const char *f = ist_jv_str(ist_jv_get(root, RK_FORMAT), NULL);
    if (!f || strcmp(f, RK_FORMAT_NAME) != 0)
        return ist_error_at(err, IST_ERR_FORMAT, name, ist_jv_line(root),
                            "expected \"%s\": \"%s\", found %s%s%s", RK_FORMAT, RK_FORMAT_NAME,
                            f ? "\"" : "", f ? f : "none", f ? "\"" : "");
    if (!(res = ist_calloc(1, sizeof *res)) || !(res->name = ist_strdup(name))) {
        ist_free(res);
        return ist_error_nomem(err);
    }
    res->version = IST_RESULT_VERSION;
    if (ist_rd_size(&r, root, RK_VERSION, false, "", &v) && v != IST_RESULT_VERSION)
        ist_rd_fail(&r, ist_jv_get(root, RK_VERSION),
                    "result format version %zu; this isthmus reads version %d", v,
                    IST_RESULT_VERSION);
    res->command = ist_rd_str(&r, root, RK_COMMAND, false, "");
    const ist_jv *in = ist_rd_get(&r, root, RK_INPUTS, IST_JOBJ, false, "");
    if (in) {
        read_vectors(&r, in, RK_SOURCE, &res->source);
        read_vectors(&r, in, RK_TARGET, &res->target);
        res->map_path = ist_rd_str(&r, in, RK_MAP, false, RK_INPUTS);
        const ist_jv *sd = ist_rd_get(&r, in, RK_SEEDS, IST_JOBJ, false, RK_INPUTS);
        if (sd)
            read_list(&r, sd, RK_INPUTS "." RK_SEEDS, RK_CHECKSUM, &res->seeds);
    }
    read_test(&r, root, &res->test);
    read_options(&r, root, &res->options);
    const ist_jv *mj = ist_rd_get(&r, root, RK_MAP, IST_JOBJ, false, "");
    if (mj && ist_json_text(mj, &res->map_json, err) != IST_OK)
        r.rc = IST_ERR_NOMEM;
    const ist_jv *runs = ist_rd_get(&r, root, RK_RUNS, IST_JARR, false, "");
    if (runs && ist_jv_len(runs)) {
        if (!(res->runs = ist_calloc(ist_jv_len(runs), sizeof *res->runs)))
            r.rc = ist_error_nomem(err);
        for (size_t i = 0; r.rc == IST_OK && i < ist_jv_len(runs); i++) {
            res->nruns++;
            read_run(&r, ist_jv_at(runs, i), i, &res->runs[i]);
        }
    }
    const ist_jv *dg = ist_rd_get(&r, root, RK_DIAGNOSTICS, IST_JOBJ, false, "");
    if (dg && r.rc == IST_OK)
        r.rc = ist_result_read_diag(dg, name, &res->diagnostics, err);
    if (r.rc != IST_OK) {
        ist_result_free(res);
        return r.rc;
    }
    *out = res;
    return IST_OK;
}

ist_status
ist_result_parse(const char *text, size_t len, const char *name, ist_result **out,
                 ist_error *err)
{
    ist_jv *root;
    ist_status rc;

    *out = NULL;
    if (!name)
        name = "(result)";
    if ((rc = ist_json_parse(text, len, name, &root, err)) != IST_OK)
        return rc;
    rc = from_tree(root, name, out, err);
    ist_jv_free(root);
    return rc;
}

ist_status
ist_result_load(const char *path, ist_result **out, ist_error *err)
{
    ist_jv *root;
    ist_status rc;

    *out = NULL;
    if ((rc = ist_file_expect(path, IST_FILE_BIT(IST_FILE_RESULT) | IST_FILE_BIT(IST_FILE_JSON) |
                                        IST_FILE_BIT(IST_FILE_VERDICT) | IST_FILE_ANY_TEXT,
                              1, "a result file", err)) != IST_OK ||
        (rc = ist_json_parse_file(path, &root, err)) != IST_OK)
        return rc;
    rc = from_tree(root, path, out, err);
    ist_jv_free(root);
    return rc;
}
