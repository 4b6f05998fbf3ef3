/* result_diag_load.c - read the "diagnostics" object of a result JSON back into the
 * figures of an ist_diag (no per-target arrays: only what the file records). */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "diag_int.h"
#include "error_int.h"
#include "result_int.h"
#include "result_keys_int.h"

static char *
dup_or_fail(ist_rd *r, const char *s)
{
    char *d = ist_strdup(s ? s : "");
    if (!d && r->rc == IST_OK)
        r->rc = ist_error_nomem(r->err);
    return d;
}

static void
read_num(ist_rd *r, const ist_jv *o, const char *key, const char *where, double *out)
{
    const ist_jv *v = ist_rd_get(r, o, key, IST_JNUM, false, where);
    *out = v ? ist_jv_num(v, 0) : NAN;
}

static void
read_hubs(ist_rd *r, const ist_jv *o, const char *where, ist_diag *d, int m)
{
    const ist_jv *hubs = ist_rd_get(r, o, RK_TOP_HUBS, IST_JARR, false, where);
    const ist_jv *dist = ist_rd_get(r, o, RK_DISTRIBUTION, IST_JARR, false, where);
    size_t v;

    read_num(r, o, RK_SKEWNESS, where, &d->skew[m]);
    ist_rd_size(r, o, RK_HUBS_LEFT_OUT, false, where, &d->hubs_left_out[m]);
    if (ist_rd_size(r, o, RK_MAX_OCC, false, where, &v))
        d->occ_max[m] = (uint32_t)v;
    if (ist_jv_len(hubs) && !(d->hubs[m] = ist_calloc(ist_jv_len(hubs), sizeof *d->hubs[m]))) {
        r->rc = ist_error_nomem(r->err);
        return;
    }
    for (size_t h = 0; r->rc == IST_OK && h < ist_jv_len(hubs); h++) {
        const ist_jv *e = ist_jv_at(hubs, h);
        diag_hub *hub = &d->hubs[m][d->nhubs[m]++];
        hub->word = ist_rd_str(r, e, RK_WORD, true, where);
        if (ist_rd_size(r, e, RK_OCC, true, where, &v))
            hub->occ = (uint32_t)v;
    }
    if (dist && ist_jv_len(dist) != IST_DIAG_OCC_BINS)
        ist_rd_fail(r, dist, "%s.%s: expected %d bins", where, RK_DISTRIBUTION,
                    IST_DIAG_OCC_BINS);
    for (size_t b = 0; dist && r->rc == IST_OK && b < IST_DIAG_OCC_BINS; b++)
        ist_rd_size(r, ist_jv_at(dist, b), RK_TARGETS, true, where, &d->occ_hist[m][b]);
}

static void
read_hubness(ist_rd *r, const ist_jv *dg, ist_diag *d)
{
    static const char where[] = RK_DIAGNOSTICS "." RK_HUBNESS;
    const ist_jv *h = ist_rd_get(r, dg, RK_HUBNESS, IST_JOBJ, false, RK_DIAGNOSTICS), *m;
    if (!h)
        return;
    ist_rd_size(r, h, RK_K, false, where, &d->k);
    ist_rd_size(r, h, RK_QUERIES, false, where, &d->nq);
    ist_rd_size(r, h, RK_TARGETS, false, where, &d->nt);
    ist_rd_size(r, h, RK_NEIGHBOURHOOD, false, where, &d->neighbourhood);
    d->hub_numbers = true;   /* files from before the list was filtered listed every hub */
    ist_rd_bool(r, h, RK_HUB_NUMBERS, false, where, &d->hub_numbers);
    if ((m = ist_rd_get(r, h, RK_COSINE, IST_JOBJ, false, where)))
        read_hubs(r, m, where, d, 0);
    if ((m = ist_rd_get(r, h, RK_CSLS, IST_JOBJ, false, where)))
        read_hubs(r, m, where, d, 1);
}

static void
read_isometry(ist_rd *r, const ist_jv *dg, ist_diag *d)
{
    static const char where[] = RK_DIAGNOSTICS "." RK_ISOMETRY;
    const ist_jv *o = ist_rd_get(r, dg, RK_ISOMETRY, IST_JOBJ, false, RK_DIAGNOSTICS);
    d->iso = -1;
    if (!o)
        return;
    ist_rd_size(r, o, RK_TOP_N, false, where, &d->iso_words);
    ist_rd_size(r, o, RK_GRAPH_K, false, where, &d->iso_k);
    ist_rd_size(r, o, RK_EIG_COMPARED, false, where, &d->iso_terms);
    read_num(r, o, RK_EIG_SIMILARITY, where, &d->iso);
    if (r->rc == IST_OK && !(d->iso >= 0))
        ist_rd_fail(r, o, "%s.%s: expected a number of at least 0", where, RK_EIG_SIMILARITY);
}

static void
read_miss(ist_rd *r, const ist_jv *e, const char *where, diag_miss *m)
{
    const ist_jv *gold = ist_rd_get(r, e, RK_GOLD, IST_JARR, false, where);
    double score;

    m->source = ist_rd_str(r, e, RK_SOURCE, true, where);
    m->ranked = ist_rd_str(r, e, RK_RANKED, false, where);
    read_num(r, e, RK_SCORE, where, &score);
    m->score = (float)score;
    ist_rd_size(r, e, RK_GOLD_RANK, false, where, &m->gold_rank);
    if (ist_jv_len(gold) && !(m->gold = ist_calloc(ist_jv_len(gold), sizeof *m->gold))) {
        r->rc = ist_error_nomem(r->err);
        return;
    }
    for (size_t g = 0; r->rc == IST_OK && g < ist_jv_len(gold); g++) {
        if (ist_jv_type(ist_jv_at(gold, g)) != IST_JSTR) {
            ist_rd_fail(r, ist_jv_at(gold, g), "%s.%s: expected strings", where, RK_GOLD);
            return;
        }
        m->gold[m->ngold++] = dup_or_fail(r, ist_jv_str(ist_jv_at(gold, g), ""));
    }
}

static void
read_misses(ist_rd *r, const ist_jv *dg, ist_diag *d)
{
    static const char where[] = RK_DIAGNOSTICS "." RK_WORST_MISSES;
    const ist_jv *a = ist_rd_get(r, dg, RK_WORST_MISSES, IST_JARR, false, RK_DIAGNOSTICS);
    ist_rd_size(r, dg, RK_MISSES_TOTAL, false, RK_DIAGNOSTICS, &d->misses_total);
    ist_rd_size(r, dg, RK_MISSES_QUERIES, false, RK_DIAGNOSTICS, &d->queries_scored);
    if (!ist_jv_len(a))
        return;
    if (!(d->miss = ist_calloc(ist_jv_len(a), sizeof *d->miss))) {
        r->rc = ist_error_nomem(r->err);
        return;
    }
    for (size_t i = 0; r->rc == IST_OK && i < ist_jv_len(a); i++) {
        if (ist_jv_type(ist_jv_at(a, i)) != IST_JOBJ) {
            ist_rd_fail(r, ist_jv_at(a, i), "%s: expected objects", where);
            return;
        }
        read_miss(r, ist_jv_at(a, i), where, &d->miss[d->nmiss++]);
    }
}

static void
read_counts(ist_rd *r, const ist_jv *o, const char *key, const char *where, size_t *out)
{
    const ist_jv *a = ist_rd_get(r, o, key, IST_JARR, false, where);
    if (!a)
        return;
    if (ist_jv_len(a) != IST_DIAG_SIM_BINS) {
        ist_rd_fail(r, a, "%s.%s: expected %d bins", where, key, IST_DIAG_SIM_BINS);
        return;
    }
    for (size_t b = 0; b < IST_DIAG_SIM_BINS; b++) {
        double x = ist_jv_num(ist_jv_at(a, b), -1);
        if (!(x >= 0) || x != floor(x)) {
            ist_rd_fail(r, ist_jv_at(a, b), "%s.%s: expected counts", where, key);
            return;
        }
        out[b] = (size_t)x;
    }
}

static void
read_similarity(ist_rd *r, const ist_jv *dg, ist_diag *d)
{
    static const char where[] = RK_DIAGNOSTICS "." RK_SIMILARITY;
    const ist_jv *o = ist_rd_get(r, dg, RK_SIMILARITY, IST_JOBJ, false, RK_DIAGNOSTICS);
    d->gold_mean = d->random_mean = NAN;
    if (!o)
        return;
    read_counts(r, o, RK_GOLD, where, d->gold_hist);
    read_counts(r, o, RK_RANDOM, where, d->random_hist);
    read_num(r, o, RK_GOLD_MEAN, where, &d->gold_mean);
    read_num(r, o, RK_RANDOM_MEAN, where, &d->random_mean);
}

ist_status
ist_result_read_diag(const ist_jv *dg, const char *name, ist_diag **out, ist_error *err)
{
    ist_rd r = {name, err, IST_OK};
    ist_diag *d = ist_calloc(1, sizeof *d);

    *out = NULL;
    if (!d)
        return ist_error_nomem(err);
    d->skew[0] = d->skew[1] = NAN;
    read_hubness(&r, dg, d);
    read_isometry(&r, dg, d);
    read_misses(&r, dg, d);
    read_similarity(&r, dg, d);
    if (r.rc != IST_OK) {
        ist_diag_free(d);
        return r.rc;
    }
    *out = d;
    return IST_OK;
}
