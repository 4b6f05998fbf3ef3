/* diag_gold.c - the diagnostics that need a test list: the worst misses under
 * CSLS and the cosine histograms of gold pairs vs random pairs. */
#include <isthmus/diag.h>

#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "diag_int.h"
#include "error_int.h"

#define MISS_TOP 10

typedef struct tpair {
    size_t s, t, i;           /* source row, target row, pair index */
} tpair;

static int
cmp_tpair(const void *x, const void *y)
{
    const tpair *a = x, *b = y;
    if (a->s != b->s)
        return a->s < b->s ? -1 : 1;
    return a->i < b->i ? -1 : a->i > b->i;
}

static int
cmp_miss(const void *x, const void *y)
{
    const diag_miss *a = x, *b = y;
    if ((a->gold_rank == 0) != (b->gold_rank == 0))
        return a->gold_rank == 0 ? -1 : 1;
    if (a->score != b->score)
        return a->score > b->score ? -1 : 1;
    return a->source_row < b->source_row ? -1 : a->source_row > b->source_row;
}

static size_t
sim_bin(double c)
{
    /* readers refuse non-finite numbers; a NaN here still lands in the first bin
     * rather than reaching an undefined conversion */
    if (!(c > -1.0))
        return 0;
    if (!(c < 1.0))
        return IST_DIAG_SIM_BINS - 1;
    long b = (long)((c + 1.0) * 10.0);
    return b >= IST_DIAG_SIM_BINS ? IST_DIAG_SIM_BINS - 1 : (size_t)b;
}

static double
dot(ist_cmatview a, size_t i, ist_cmatview b, size_t j)
{
    const float *x = a.data + i * a.stride, *y = b.data + j * b.stride;
    double s = 0;
    for (size_t c = 0; c < a.cols; c++)
        s += (double)x[c] * y[c];
    return s;
}

static uint64_t
next_rand(uint64_t *s)
{
    uint64_t z = (*s += 0x9e3779b97f4a7c15u);   /* splitmix64 (common practice) */
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

static void
similarities(ist_diag *d, ist_cmatview xs, ist_cmatview zt, const tpair *p, size_t np,
             const ist_diag_opts *o)
{
    uint64_t seed = o->seed;
    size_t nr = o->random_pairs ? o->random_pairs : (np * 10 > 1000 ? np * 10 : 1000);
    double sum = 0;

    for (size_t i = 0; i < np; i++) {
        double c = dot(xs, p[i].s, zt, p[i].t);
        d->gold_hist[sim_bin(c)]++;
        sum += c;
    }
    d->ngold = np;
    d->gold_mean = np ? sum / (double)np : 0;
    sum = 0;
    for (size_t i = 0; i < nr && np; i++) {
        size_t s = p[next_rand(&seed) % np].s, t = next_rand(&seed) % zt.rows;
        double c = dot(xs, s, zt, t);
        d->random_hist[sim_bin(c)]++;
        sum += c;
    }
    d->nrandom = np ? nr : 0;
    d->random_mean = d->nrandom ? sum / (double)nr : 0;
}

static ist_status
name_miss(diag_miss *m, const tpair *g, size_t ng, const ist_store *tgt, const ist_pairs *test)
{
    const char *rw = tgt && m->ranked_row < ist_store_rows(tgt) ? ist_store_word(tgt, m->ranked_row)
                                                                : "?";
    m->source = ist_strdup(ist_pairs_source(test, g[0].i));
    m->ranked = ist_strdup(rw);
    m->gold = ist_calloc(ng, sizeof *m->gold);
    if (!m->source || !m->ranked || !m->gold)
        return IST_ERR_NOMEM;
    for (size_t j = 0; j < ng; j++) {
        const char *gw = tgt && g[j].t < ist_store_rows(tgt) ? ist_store_word(tgt, g[j].t)
                                                             : ist_pairs_target(test, g[j].i);
        if (!(m->gold[j] = ist_strdup(gw)))
            return IST_ERR_NOMEM;
        m->ngold = j + 1;
    }
    return IST_OK;
}

static ist_status
misses(ist_diag *d, ist_cmatview xs, ist_cmatview zt, const ist_store *tgt,
       const ist_pairs *test, const tpair *p, size_t np, const ist_diag_opts *o, ist_error *err)
{
    size_t nq = 0, *first = ist_malloc((np + 1) * sizeof *first);
    ist_matrix *q = NULL;
    ist_topk *tk = NULL;
    ist_status rc;

    if (!first)
        return ist_error_nomem(err);
    for (size_t i = 0; i < np; i++)
        if (i == 0 || p[i].s != p[i - 1].s)
            first[nq++] = i;
    first[nq] = np;
    if ((rc = ist_matrix_new(nq, xs.cols, &q, err)) != IST_OK)
        goto done;
    ist_matview qv = ist_matrix_view(q);
    for (size_t i = 0; i < nq; i++)
        memcpy(qv.data + i * qv.stride, xs.data + p[first[i]].s * xs.stride,
               xs.cols * sizeof(float));
    rc = ist_diag_csls_topk(d, ist_matview_const(qv), zt, MISS_TOP, o, &tk, err);
    if (rc != IST_OK)
        goto done;
    d->miss = ist_calloc(nq + 1, sizeof *d->miss);
    if (!d->miss) {
        rc = ist_error_nomem(err);
        goto done;
    }
    size_t nm = 0;
    for (size_t i = 0; i < nq; i++) {
        const uint32_t *idx = ist_topk_index(tk, i);
        size_t rank = 0;
        for (size_t a = 0; a < ist_topk_k(tk) && !rank; a++)
            for (size_t b = first[i]; b < first[i + 1]; b++)
                if (idx[a] == p[b].t) {
                    rank = a + 1;
                    break;
                }
        if (rank == 1 || idx[0] == UINT32_MAX)
            continue;
        d->miss[nm++] = (diag_miss){.score = ist_topk_score(tk, i)[0], .gold_rank = rank,
                                    .source_row = p[first[i]].s, .ranked_row = idx[0],
                                    .ngold = i};   /* query index until named */
    }
    d->queries_scored = nq;
    d->misses_total = nm;
    qsort(d->miss, nm, sizeof *d->miss, cmp_miss);
    d->nmiss = nm < o->worst_misses ? nm : o->worst_misses;
    for (size_t j = 0; j < d->nmiss; j++) {
        size_t qi = d->miss[j].ngold;
        d->miss[j].ngold = 0;
        if (name_miss(&d->miss[j], p + first[qi], first[qi + 1] - first[qi], tgt, test) !=
            IST_OK) {
            for (size_t r = j + 1; r < d->nmiss; r++)
                d->miss[r].ngold = 0;
            rc = ist_error_nomem(err);
            goto done;
        }
    }
done:
    ist_topk_free(tk);
    ist_matrix_free(q);
    ist_free(first);
    return rc;
}

ist_status
ist_diag_fill_test(ist_diag *d, ist_cmatview xs, ist_cmatview zt, const ist_store *tgt,
                   const ist_pairs *test, const ist_diag_opts *o, ist_error *err)
{
    size_t n = ist_pairs_count(test), np = 0;
    tpair *p = ist_malloc((n + 1) * sizeof *p);
    ist_status rc = IST_OK;

    if (!p)
        return ist_error_nomem(err);
    for (size_t i = 0; i < n; i++) {
        ptrdiff_t s = ist_pairs_source_row(test, i), t = ist_pairs_target_row(test, i);
        if (s >= 0 && t >= 0 && (size_t)s < xs.rows && (size_t)t < zt.rows)
            p[np++] = (tpair){(size_t)s, (size_t)t, i};
    }
    qsort(p, np, sizeof *p, cmp_tpair);
    similarities(d, xs, zt, p, np, o);
    if (np)
        rc = misses(d, xs, zt, tgt, test, p, np, o, err);
    ist_free(p);
    return rc;
}
