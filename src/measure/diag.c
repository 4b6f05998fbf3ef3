/* diag.c - hubness, isometry, worst misses and similarity histograms of a map
 * (methods and papers in include/isthmus/diag.h and docs/methods.md). */
#include <isthmus/diag.h>

#include <lapacke.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/cancel.h>
#include <isthmus/text.h>

#include "alloc_int.h"
#include "blas_int.h"
#include "diag_int.h"
#include "error_int.h"

const uint32_t ist_diag_occ_from[IST_DIAG_OCC_BINS] = {0, 1, 2, 3, 5, 10, 20, 50, 100, 200};

void
ist_diag_opts_init(ist_diag_opts *o)
{
    memset(o, 0, sizeof *o);
    o->k = 10;
    o->queries = 5000;
    o->top_hubs = 10;
    o->isometry_words = 1000;
    o->isometry_k = 10;
    o->worst_misses = 20;
    o->seed = 1;
    ist_search_opts_init(&o->search);
}

double
ist_diag_skew(const double *v, size_t n)
{
    double mean = 0, m2 = 0, m3 = 0;

    if (n < 2)
        return 0;
    for (size_t i = 0; i < n; i++)
        mean += v[i];
    mean /= (double)n;
    for (size_t i = 0; i < n; i++) {
        double d = v[i] - mean;
        m2 += d * d;
        m3 += d * d * d;
    }
    m2 /= (double)n;
    m3 /= (double)n;
    if (m2 <= 1e-300 * (1 + mean * mean))
        return 0;
    return m3 / (m2 * sqrt(m2));
}

static ist_cmatview
first_rows(ist_cmatview v, size_t n)
{
    v.rows = n < v.rows ? n : v.rows;
    return v;
}

/* ---- isometry ----------------------------------------------------------- */

/* Laplacian eigenvalues (descending) of the symmetrised cosine k-NN graph of the n rows of a. */
static ist_status
graph_spectrum(ist_cmatview a, size_t k, const ist_retrieve_opts *ro, double *ev, ist_error *err)
{
    size_t n = a.rows, cells;
    ist_topk *tk = NULL;
    ist_status rc;
    double *lap;

    if (ist_mul_size(n, n, &cells) != 0 || ist_mul_size(cells, sizeof *lap, &cells) != 0)
        return ist_error_set(err, IST_ERR_INVALID, "isometry: %zu words is too many", n);
    lap = ist_calloc(1, cells);
    if (!lap)
        return ist_error_nomem(err);
    rc = ist_retrieve_topk(a, a, k + 1, 1.0f, NULL, NULL, ro, &tk, err);
    if (rc != IST_OK)
        goto done;
    for (size_t i = 0; i < n; i++) {
        const uint32_t *idx = ist_topk_index(tk, i);
        size_t taken = 0;
        for (size_t j = 0; j < k + 1 && taken < k; j++) {
            if (idx[j] == UINT32_MAX || idx[j] == i)
                continue;
            lap[i * n + idx[j]] = -1;
            lap[(size_t)idx[j] * n + i] = -1;
            taken++;
        }
    }
    for (size_t i = 0; i < n; i++) {
        double deg = 0;
        for (size_t j = 0; j < n; j++)
            deg -= lap[i * n + j];
        lap[i * n + i] = deg;
    }
    if (ist_cancel_requested()) {
        rc = ist_error_set(err, IST_ERR_CANCELLED, "isometry: cancelled");
        goto done;
    }
    ist_blas_serial();
    lapack_int info = LAPACKE_dsyevd(LAPACK_ROW_MAJOR, 'N', 'U', (lapack_int)n, lap,
                                     (lapack_int)n, ev);
    if (info == LAPACK_WORK_MEMORY_ERROR) {
        rc = ist_error_set(err, IST_ERR_NOMEM, "LAPACKE_dsyevd: out of memory for workspace");
        goto done;
    }
    if (info != 0) {
        rc = ist_error_set(err, IST_ERR_NUMERIC, "LAPACKE_dsyevd: failed (info %d)", (int)info);
        goto done;
    }
    for (size_t i = 0; i < n / 2; i++) {
        double t = ev[i];
        ev[i] = ev[n - 1 - i];
        ev[n - 1 - i] = t;
    }
done:
    ist_topk_free(tk);
    ist_free(lap);
    return rc;
}

/* Smallest m such that the first m (descending) eigenvalues hold 90% of the sum. */
static size_t
energy_count(const double *ev, size_t n)
{
    double total = 0, run = 0;
    for (size_t i = 0; i < n; i++)
        total += ev[i] > 0 ? ev[i] : 0;
    for (size_t i = 0; i < n; i++) {
        run += ev[i] > 0 ? ev[i] : 0;
        if (run >= 0.9 * total)
            return i + 1;
    }
    return n;
}

ist_status
ist_diag_eigen_similarity(ist_cmatview a, ist_cmatview b, size_t n, size_t k,
                          const ist_retrieve_opts *ro, double *out, size_t *terms,
                          ist_error *err)
{
    double *ea = NULL, *eb = NULL;
    ist_status rc;

    n = n < a.rows ? n : a.rows;
    n = n < b.rows ? n : b.rows;
    if (n < 2 || k == 0)
        return ist_error_set(err, IST_ERR_INVALID,
                             "isometry: expected at least 2 words and 1 neighbour, found %zu "
                             "and %zu", n, k);
    if (k > n - 1)
        k = n - 1;
    ea = ist_malloc(n * sizeof *ea);
    eb = ist_malloc(n * sizeof *eb);
    if (!ea || !eb) {
        rc = ist_error_nomem(err);
        goto done;
    }
    if ((rc = graph_spectrum(first_rows(a, n), k, ro, ea, err)) != IST_OK ||
        (rc = graph_spectrum(first_rows(b, n), k, ro, eb, err)) != IST_OK)
        goto done;
    size_t ma = energy_count(ea, n), mb = energy_count(eb, n), m = ma < mb ? ma : mb;
    double s = 0;
    for (size_t i = 0; i < m; i++)
        s += (ea[i] - eb[i]) * (ea[i] - eb[i]);
    *out = s;
    if (terms)
        *terms = m;
done:
    ist_free(ea);
    ist_free(eb);
    return rc;
}

/* ---- hubness ------------------------------------------------------------ */

ist_status
ist_diag_csls_topk(const ist_diag *d, ist_cmatview q, ist_cmatview zt, size_t k,
                   const ist_diag_opts *o, ist_topk **out, ist_error *err)
{
    float *rt = ist_malloc(q.rows * sizeof *rt + 1);
    ist_status rc;

    *out = NULL;
    if (!rt)
        return ist_error_nomem(err);
    rc = ist_retrieve_neighbourhood(q, zt, o->search.csls_k, &o->search.retrieve, rt, err);
    if (rc == IST_OK)
        rc = ist_retrieve_topk(q, zt, k, 2.0f, rt, d->rs, &o->search.retrieve, out, err);
    ist_free(rt);
    return rc;
}

static int
cmp_hub(const void *x, const void *y)
{
    const diag_hub *a = x, *b = y;
    if (a->occ != b->occ)
        return a->occ > b->occ ? -1 : 1;
    return a->word < b->word ? -1 : a->word > b->word;   /* word holds the row until named */
}

static ist_status
hubness(ist_diag *d, int m, ist_cmatview xs, ist_cmatview zt, const ist_store *tgt,
        const ist_diag_opts *o, ist_error *err)
{
    ist_topk *tk = NULL;
    double *v = NULL;
    ist_status rc;

    if (m)
        rc = ist_diag_csls_topk(d, first_rows(xs, d->nq), zt, d->k, o, &tk, err);
    else
        rc = ist_retrieve_topk(first_rows(xs, d->nq), zt, d->k, 1.0f, NULL, NULL, &o->search.retrieve,
                               &tk, err);
    if (rc != IST_OK)
        return rc;
    d->occ[m] = ist_calloc(d->nt + 1, sizeof *d->occ[m]);
    v = ist_malloc((d->nt + 1) * sizeof *v);
    d->hubs[m] = ist_calloc(d->nt + 1, sizeof *d->hubs[m]);
    if (!d->occ[m] || !v || !d->hubs[m]) {
        rc = ist_error_nomem(err);
        goto done;
    }
    for (size_t i = 0; i < d->nq; i++) {
        const uint32_t *idx = ist_topk_index(tk, i);
        for (size_t j = 0; j < ist_topk_k(tk); j++)
            if (idx[j] != UINT32_MAX)
                d->occ[m][idx[j]]++;
    }
    for (size_t t = 0; t < d->nt; t++) {
        uint32_t c = d->occ[m][t];
        size_t b = IST_DIAG_OCC_BINS - 1;
        while (b > 0 && c < ist_diag_occ_from[b])
            b--;
        d->occ_hist[m][b]++;
        d->occ_max[m] = c > d->occ_max[m] ? c : d->occ_max[m];
        v[t] = c;
        d->hubs[m][t].occ = c;
        d->hubs[m][t].word = (char *)(uintptr_t)t;
    }
    d->skew[m] = ist_diag_skew(v, d->nt);
    qsort(d->hubs[m], d->nt, sizeof *d->hubs[m], cmp_hub);
    /* the list: the most found targets, passing over number-shaped words and codes unless
     * asked; hubs[m][0..nhubs) is compacted in place (a listed entry never lies after the
     * one it overwrites) */
    for (size_t t = 0; t < d->nt && d->nhubs[m] < o->top_hubs; t++) {
        size_t row = (size_t)(uintptr_t)d->hubs[m][t].word;
        const char *w = tgt && row < ist_store_rows(tgt) ? ist_store_word(tgt, row) : "?";
        uint32_t occ = d->hubs[m][t].occ;
        if (!o->hub_numbers && ist_word_shape_of(w, strlen(w)) != IST_SHAPE_WORD) {
            d->hubs_left_out[m]++;
            continue;
        }
        diag_hub *h = &d->hubs[m][d->nhubs[m]];
        h->occ = occ;
        if (!(h->word = ist_strdup(w))) {
            rc = ist_error_nomem(err);
            goto done;
        }
        d->nhubs[m]++;
    }
done:
    ist_free(v);
    ist_topk_free(tk);
    return rc;
}

ist_status
ist_diag_run(ist_cmatview xs, ist_cmatview zt, const ist_store *tgt, const ist_pairs *test,
             const ist_diag_opts *opts, ist_diag **out, ist_error *err)
{
    ist_diag_opts dflt;
    ist_diag *d;
    ist_status rc;

    *out = NULL;
    if (!opts) {
        ist_diag_opts_init(&dflt);
        opts = &dflt;
    }
    if (xs.rows == 0 || zt.rows == 0 || xs.cols != zt.cols)
        return ist_error_set(err, IST_ERR_INVALID,
                             "diagnostics: expected two non-empty spaces of one dimension, "
                             "found %zu x %zu and %zu x %zu", xs.rows, xs.cols, zt.rows, zt.cols);
    d = ist_calloc(1, sizeof *d);
    if (!d)
        return ist_error_nomem(err);
    d->k = opts->k ? opts->k : 10;
    d->nq = opts->queries < xs.rows ? opts->queries : xs.rows;
    d->nt = zt.rows;
    d->neighbourhood = opts->search.csls_k;
    d->hub_numbers = opts->hub_numbers;
    d->iso = -1;
    if ((rc = ist_search_opts_check(&opts->search, "diagnostics", err)) != IST_OK)
        goto fail;
    d->rs = ist_malloc(zt.rows * sizeof *d->rs);
    if (!d->rs) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    if ((rc = ist_retrieve_neighbourhood(zt, xs, d->neighbourhood, &opts->search.retrieve, d->rs,
                                         err)) != IST_OK)
        goto fail;
    for (int m = 0; m < 2; m++)
        if ((rc = hubness(d, m, xs, zt, tgt, opts, err)) != IST_OK)
            goto fail;
    if (opts->isometry_words >= 2) {
        size_t n = opts->isometry_words;
        n = n < xs.rows ? n : xs.rows;
        n = n < zt.rows ? n : zt.rows;
        if (n >= 2) {
            d->iso_words = n;
            d->iso_k = opts->isometry_k < n - 1 ? opts->isometry_k : n - 1;
            rc = ist_diag_eigen_similarity(xs, zt, n, d->iso_k, &opts->search.retrieve, &d->iso,
                                           &d->iso_terms, err);
            if (rc != IST_OK)
                goto fail;
        }
    }
    if (test && (rc = ist_diag_fill_test(d, xs, zt, tgt, test, opts, err)) != IST_OK)
        goto fail;
    ist_free(d->rs);
    d->rs = NULL;
    *out = d;
    return IST_OK;
fail:
    ist_diag_free(d);
    return rc;
}

void
ist_diag_free(ist_diag *d)
{
    if (!d)
        return;
    for (int m = 0; m < 2; m++) {
        for (size_t h = 0; h < d->nhubs[m]; h++)
            ist_free(d->hubs[m][h].word);
        ist_free(d->hubs[m]);
        ist_free(d->occ[m]);
    }
    for (size_t i = 0; i < d->nmiss; i++) {
        ist_free(d->miss[i].source);
        ist_free(d->miss[i].ranked);
        for (size_t g = 0; g < d->miss[i].ngold; g++)
            ist_free(d->miss[i].gold[g]);
        ist_free(d->miss[i].gold);
    }
    ist_free(d->miss);
    ist_free(d->rs);
    ist_free(d);
}

double
ist_diag_skewness(const ist_diag *d, ist_retrieval m)
{
    return d->skew[m == IST_RETRIEVAL_CSLS];
}

const uint32_t *
ist_diag_k_occurrence(const ist_diag *d, ist_retrieval m)
{
    return d->occ[m == IST_RETRIEVAL_CSLS];
}

size_t
ist_diag_queries(const ist_diag *d)
{
    return d->nq;
}

double
ist_diag_isometry(const ist_diag *d)
{
    return d->iso;
}

size_t
ist_diag_isometry_terms(const ist_diag *d)
{
    return d->iso_terms;
}

size_t
ist_diag_misses(const ist_diag *d)
{
    return d->nmiss;
}

void
ist_diag_miss(const ist_diag *d, size_t i, size_t *source_row, size_t *ranked_row, float *score,
              size_t *gold_rank)
{
    const diag_miss *m = &d->miss[i];
    *source_row = m->source_row;
    *ranked_row = m->ranked_row;
    *score = m->score;
    *gold_rank = m->gold_rank;
}

const size_t *
ist_diag_gold_hist(const ist_diag *d)
{
    return d->gold_hist;
}

const size_t *
ist_diag_random_hist(const ist_diag *d)
{
    return d->random_hist;
}

const char *
ist_diag_hub(const ist_diag *d, ist_retrieval m, size_t i, uint32_t *occ)
{
    int j = m == IST_RETRIEVAL_CSLS;
    if (i >= d->nhubs[j])
        return NULL;
    if (occ)
        *occ = d->hubs[j][i].occ;
    return d->hubs[j][i].word;
}

const char *
ist_diag_miss_words(const ist_diag *d, size_t i, const char **ranked, const char *const **gold,
                    size_t *ngold)
{
    if (i >= d->nmiss)
        return NULL;
    const diag_miss *m = &d->miss[i];
    if (ranked)
        *ranked = m->ranked;
    if (gold)
        *gold = (const char *const *)m->gold;
    if (ngold)
        *ngold = m->ngold;
    return m->source;
}

void
ist_diag_summarise(const ist_diag *d, ist_diag_summary *out)
{
    memset(out, 0, sizeof *out);
    out->k = d->k;
    out->queries = d->nq;
    out->targets = d->nt;
    out->neighbourhood = d->neighbourhood;
    out->hub_numbers = d->hub_numbers;
    for (int m = 0; m < 2; m++) {
        out->skewness[m] = d->skew[m];
        out->max_occ[m] = d->occ_max[m];
        memcpy(out->occ_hist[m], d->occ_hist[m], sizeof out->occ_hist[m]);
        out->hubs[m] = d->nhubs[m];
        out->hubs_left_out[m] = d->hubs_left_out[m];
    }
    memcpy(out->occ_from, ist_diag_occ_from, sizeof out->occ_from);
    out->isometry = d->iso;
    out->isometry_terms = d->iso_terms;
    out->isometry_words = d->iso_words;
    out->isometry_k = d->iso_k;
    out->misses = d->nmiss;
    out->misses_total = d->misses_total;
    out->misses_queries = d->queries_scored;
    memcpy(out->gold_hist, d->gold_hist, sizeof out->gold_hist);
    memcpy(out->random_hist, d->random_hist, sizeof out->random_hist);
    out->gold_mean = d->gold_mean;
    out->random_mean = d->random_mean;
}
