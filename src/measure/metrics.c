/* metrics.c - precision@k over a test list, by frequency band. */
#include <isthmus/metrics.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"

static const size_t ks[IST_METRICS_NK] = {1, 5, 10};

size_t
ist_metrics_k(size_t i)
{
    return i < IST_METRICS_NK ? ks[i] : 0;
}

const char *
ist_retrieval_name(ist_retrieval m)
{
    return m == IST_RETRIEVAL_CSLS ? "csls" : "cosine";
}

void
ist_eval_opts_init(ist_eval_opts *o)
{
    memset(o, 0, sizeof *o);
    o->method = IST_RETRIEVAL_CSLS;
    o->band_edges[0] = 5000;
    o->band_edges[1] = 20000;
    o->nedges = 2;
    o->bands_auto = true;
    o->keep_queries = true;
    ist_search_opts_init(&o->search);
}

typedef struct gold {
    size_t s, t;
} gold;

static int
cmp_gold(const void *a, const void *b)
{
    const gold *x = a, *y = b;
    if (x->s != y->s)
        return x->s < y->s ? -1 : 1;
    return x->t < y->t ? -1 : x->t > y->t;
}

static int
cmp_str(const void *a, const void *b)
{
    return strcmp(*(const char *const *)a, *(const char *const *)b);
}

static size_t
distinct_sources(const ist_pairs *p, ist_error *err, bool *ok)
{
    size_t n = ist_pairs_count(p), d = 0;
    const char **w = ist_malloc((n + 1) * sizeof *w);

    *ok = w != NULL;
    if (!w) {
        ist_error_nomem(err);
        return 0;
    }
    for (size_t i = 0; i < n; i++)
        w[i] = ist_pairs_source(p, i);
    qsort(w, n, sizeof *w, cmp_str);
    for (size_t i = 0; i < n; i++)
        d += i == 0 || strcmp(w[i], w[i - 1]) != 0;
    ist_free(w);
    return d;
}

/* n rounded to two significant digits (at least 1). */
static size_t
round2(size_t n)
{
    size_t unit = 1;
    while (n / unit >= 100)
        unit *= 10;
    size_t r = (n + unit / 2) / unit * unit;
    return r ? r : 1;
}

static void
setup_bands(ist_metrics *m, const ist_eval_opts *o, size_t rows)
{
    size_t lo = 1, edges[IST_METRICS_MAX_BANDS - 1], ne = 0;
    if (o->bands_auto) {
        /* bands that follow the vocabulary: the first tenth, up to the first third, the
         * rest; an edge at or past the last row, or not above the one before, is left out */
        size_t cand[2] = {round2(rows / 10), round2(rows / 3)};
        for (size_t i = 0; i < 2; i++)
            if (rows >= 10 && cand[i] < rows && (ne == 0 || cand[i] > edges[ne - 1]))
                edges[ne++] = cand[i];
    } else {
        for (size_t i = 0; i < o->nedges && i < IST_METRICS_MAX_BANDS - 1; i++)
            edges[ne++] = o->band_edges[i];
    }
    m->nbands = 0;
    for (size_t i = 0; i < ne; i++) {
        m->band[m->nbands].lo = lo;
        m->band[m->nbands].hi = edges[i];
        lo = edges[i] + 1;
        m->nbands++;
    }
    m->band[m->nbands].lo = lo;
    m->band[m->nbands].hi = 0;
    m->nbands++;
}

void
ist_metrics_release(ist_metrics *m)
{
    ist_free(m->query_row);
    ist_free(m->query_place);
    m->query_row = NULL;
    m->query_place = NULL;
}

char *
ist_band_label(size_t lo, size_t hi, const char *dash, char *buf, size_t cap)
{
    if (hi)
        snprintf(buf, cap, "%zu%s%zu", lo, dash, hi);
    else
        snprintf(buf, cap, "%zu+", lo);
    return buf;
}

static size_t
tally(ist_metrics *m, const gold *g, size_t ng, const uint32_t *top, size_t k)
{
    size_t pos = k, rank = g[0].s + 1;
    for (size_t a = 0; a < k && pos == k; a++)
        for (size_t b = 0; b < ng; b++)
            if (top[a] == g[b].t) {
                pos = a;
                break;
            }
    if (pos == k)
        pos = ks[IST_METRICS_NK - 1];   /* a miss, also when fewer than 10 were ranked */
    ist_band *band = &m->band[m->nbands - 1];
    for (size_t i = 0; i < m->nbands; i++)
        if (rank >= m->band[i].lo && (m->band[i].hi == 0 || rank <= m->band[i].hi)) {
            band = &m->band[i];
            break;
        }
    m->queries++;
    band->queries++;
    for (size_t i = 0; i < IST_METRICS_NK; i++)
        if (pos < ks[i]) {
            m->hits[i]++;
            band->hits[i]++;
        }
    return pos;
}

static void
finish(ist_metrics *m)
{
    m->coverage = m->sources ? (double)m->queries / (double)m->sources : 0;
    for (size_t i = 0; i < IST_METRICS_NK; i++) {
        m->p[i] = m->queries ? (double)m->hits[i] / (double)m->queries : 0;
        for (size_t b = 0; b < m->nbands; b++)
            m->band[b].p[i] = m->band[b].queries
                                  ? (double)m->band[b].hits[i] / (double)m->band[b].queries
                                  : 0;
    }
}

ist_status
ist_eval_run(ist_cmatview xs, ist_cmatview zt, const ist_pairs *test, const ist_eval_opts *opts,
             ist_metrics *out, ist_error *err)
{
    ist_eval_opts dflt;
    size_t n = ist_pairs_count(test), ng = 0, nq = 0;
    gold *g = NULL;
    size_t *first = NULL;
    ist_matrix *q = NULL;
    ist_topk *tk = NULL;
    ist_status rc;
    bool ok;

    if (!opts) {
        ist_eval_opts_init(&dflt);
        opts = &dflt;
    }
    memset(out, 0, sizeof *out);
    out->method = opts->method;
    out->neighbourhood = opts->method == IST_RETRIEVAL_CSLS ? opts->search.csls_k : 0;
    setup_bands(out, opts, xs.rows);
    out->sources = distinct_sources(test, err, &ok);
    if (!ok)
        return IST_ERR_NOMEM;
    g = ist_malloc((n + 1) * sizeof *g);
    first = ist_malloc((n + 2) * sizeof *first);
    if (!g || !first) {
        rc = ist_error_nomem(err);
        goto done;
    }
    for (size_t i = 0; i < n; i++) {
        ptrdiff_t s = ist_pairs_source_row(test, i), t = ist_pairs_target_row(test, i);
        if (s >= 0 && t >= 0 && (size_t)s < xs.rows && (size_t)t < zt.rows)
            g[ng++] = (gold){(size_t)s, (size_t)t};
    }
    if (ng == 0) {
        rc = ist_error_set(err, IST_ERR_INVALID,
                           "scoring: no test pair has both words in the vectors");
        goto done;
    }
    qsort(g, ng, sizeof *g, cmp_gold);
    for (size_t i = 0; i < ng; i++)
        if (i == 0 || g[i].s != g[i - 1].s)
            first[nq++] = i;
    first[nq] = ng;
    if ((rc = ist_matrix_new(nq, xs.cols, &q, err)) != IST_OK)
        goto done;
    ist_matview qv = ist_matrix_view(q);
    for (size_t i = 0; i < nq; i++)
        memcpy(qv.data + i * qv.stride, xs.data + g[first[i]].s * xs.stride,
               xs.cols * sizeof(float));
    rc = ist_retrieve_rank(ist_matview_const(qv), xs, zt, opts->method, ks[IST_METRICS_NK - 1],
                           opts->search.csls_k, &opts->search.retrieve, &tk, err);
    if (rc != IST_OK)
        goto done;
    if (opts->keep_queries) {
        out->query_row = ist_malloc((nq + 1) * sizeof *out->query_row);
        out->query_place = ist_malloc(nq + 1);
        if (!out->query_row || !out->query_place) {
            ist_metrics_release(out);
            rc = ist_error_nomem(err);
            goto done;
        }
    }
    for (size_t i = 0; i < nq; i++) {
        size_t pos = tally(out, g + first[i], first[i + 1] - first[i], ist_topk_index(tk, i),
                           ist_topk_k(tk));
        if (out->query_row) {
            out->query_row[i] = g[first[i]].s;
            out->query_place[i] = (uint8_t)pos;
        }
    }
    finish(out);
done:
    ist_topk_free(tk);
    ist_matrix_free(q);
    ist_free(g);
    ist_free(first);
    return rc;
}
