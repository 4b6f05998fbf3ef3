/* align.c - fitting and refining the orthogonal map between two vector spaces. */
#include <isthmus/align.h>

#include <math.h>
#include <string.h>

#include <isthmus/cancel.h>

#include "align_int.h"
#include "alloc_int.h"
#include "error_int.h"
#include "matrix_int.h"

void
ist_align_opts_init(ist_align_opts *o)
{
    memset(o, 0, sizeof *o);
    o->source_norm = IST_NORM_DEFAULT;
    o->target_norm = IST_NORM_DEFAULT;
    o->refine_rounds = IST_ALIGN_REFINE_ROUNDS_DEFAULT;
    o->refine_vocab = IST_ALIGN_REFINE_VOCAB_DEFAULT;
    o->min_gain = 1e-4;
    ist_search_opts_init(&o->search);
}

void
ist_map_free(ist_map *m)
{
    if (!m)
        return;
    ist_matrix_free(m->w);
    ist_matrix_free(m->w0);
    ist_norm_free(m->ns);
    ist_norm_free(m->nt);
    ist_pairs_free(m->seeds);
    ist_free(m);
}

ist_status
ist_align_copy_store(const ist_store *s, ist_matrix **out, ist_error *err)
{
    ist_cmatview v = ist_store_view(s);
    ist_status rc = ist_matrix_new(v.rows, v.cols, out, err);
    if (rc != IST_OK)
        return rc;
    for (size_t i = 0; i < v.rows; i++)
        memcpy((*out)->data + i * (*out)->stride, v.data + i * v.stride, v.cols * sizeof(float));
    return IST_OK;
}

/* Rows srows[i] of a and trows[i] of b gathered into two n x d matrices. */
static ist_status
gather(const ist_matrix *a, const ist_matrix *b, const size_t *arow, const size_t *brow,
       size_t n, ist_matrix **xa, ist_matrix **xb, ist_error *err)
{
    ist_status rc = ist_matrix_new(n, a->cols, xa, err);
    if (rc == IST_OK)
        rc = ist_matrix_new(n, b->cols, xb, err);
    if (rc != IST_OK) {
        ist_matrix_free(*xa);
        *xa = NULL;
        return rc;
    }
    for (size_t i = 0; i < n; i++) {
        memcpy((*xa)->data + i * (*xa)->stride, a->data + arow[i] * a->stride,
               a->cols * sizeof(float));
        memcpy((*xb)->data + i * (*xb)->stride, b->data + brow[i] * b->stride,
               b->cols * sizeof(float));
    }
    return IST_OK;
}

/* Procrustes on the row pairs (arow[i], brow[i]) of a and b, into w. */
static ist_status
fit_rows(const ist_matrix *a, const ist_matrix *b, const size_t *arow, const size_t *brow,
         size_t n, ist_matrix *w, ist_procrustes_info *info, ist_error *err)
{
    ist_matrix *xa = NULL, *xb = NULL;
    ist_status rc = gather(a, b, arow, brow, n, &xa, &xb, err);
    if (rc == IST_OK)
        rc = ist_linalg_procrustes(ist_matrix_cview(xa), ist_matrix_cview(xb),
                                   ist_matrix_view(w), info, err);
    ist_matrix_free(xa);
    ist_matrix_free(xb);
    return rc;
}

/* Mutual nearest neighbours under CSLS between the first n rows of xn mapped
 * by w and the first n rows of zn. Pairs go to arow/brow (room for n). */
static ist_status
induce(const ist_matrix *xn, const ist_matrix *zn, const ist_matrix *w, size_t n, size_t nb,
       const ist_retrieve_opts *ro, size_t *arow, size_t *brow, size_t *npairs, double *mean,
       ist_error *err)
{
    ist_cmatview x = {xn->data, n < xn->rows ? n : xn->rows, xn->cols, xn->stride};
    ist_cmatview z = {zn->data, n < zn->rows ? n : zn->rows, zn->cols, zn->stride};
    ist_matrix *xm = NULL;
    ist_topk *fwd = NULL, *bwd = NULL;
    float *rt = NULL, *rs = NULL;
    ist_status rc;

    *npairs = 0;
    *mean = 0;
    rc = ist_matrix_new(x.rows, x.cols, &xm, err);
    if (rc != IST_OK)
        return rc;
    rc = ist_linalg_gemm(false, false, 1.0f, x, ist_matrix_cview(w), 0.0f, ist_matrix_view(xm),
                         err);
    rt = ist_malloc(x.rows * sizeof *rt + 1);
    rs = ist_malloc(z.rows * sizeof *rs + 1);
    if (rc == IST_OK && (!rt || !rs))
        rc = ist_error_nomem(err);
    ist_cmatview xv = ist_matrix_cview(xm);
    if (rc == IST_OK)
        rc = ist_retrieve_neighbourhood(xv, z, nb, ro, rt, err);
    if (rc == IST_OK)
        rc = ist_retrieve_neighbourhood(z, xv, nb, ro, rs, err);
    if (rc == IST_OK)
        rc = ist_retrieve_topk(xv, z, 1, 2.0f, rt, rs, ro, &fwd, err);
    if (rc == IST_OK)
        rc = ist_retrieve_topk(z, xv, 1, 2.0f, rs, rt, ro, &bwd, err);
    if (rc == IST_OK) {
        double sum = 0;
        for (size_t i = 0; i < x.rows; i++) {
            uint32_t j = ist_topk_index(fwd, i)[0];
            if (j == UINT32_MAX || ist_topk_index(bwd, j)[0] != i)
                continue;
            arow[*npairs] = i;
            brow[*npairs] = j;
            (*npairs)++;
            sum += ist_topk_score(fwd, i)[0];
        }
        *mean = *npairs ? sum / (double)*npairs : 0;
    }
    ist_topk_free(fwd);
    ist_topk_free(bwd);
    ist_free(rt);
    ist_free(rs);
    ist_matrix_free(xm);
    return rc;
}

static void
copy_w(ist_matrix *dst, const ist_matrix *src)
{
    memcpy(dst->data, src->data, src->rows * src->stride * sizeof(float));
}

static ist_status
refine(ist_map *m, const ist_matrix *xn, const ist_matrix *zn, const ist_align_opts *o,
       const size_t *sa, const size_t *sb, size_t ns, ist_error *err)
{
    size_t n = o->refine_vocab, np = 0;
    size_t *arow = NULL, *brow = NULL;
    ist_matrix *prev = NULL;
    double c, c_prev = -INFINITY;
    ist_status rc;

    if (n > xn->rows)
        n = xn->rows;
    if (n > zn->rows)
        n = zn->rows;
    if (!o->refine_keep_seeds)
        ns = 0;
    /* induced pairs first, then (with refine_keep_seeds) the seed pairs */
    arow = ist_malloc((n + ns + 1) * sizeof *arow);
    brow = ist_malloc((n + ns + 1) * sizeof *brow);
    if (!arow || !brow) {
        rc = ist_error_nomem(err);
        goto done;
    }
    if ((rc = ist_matrix_new(m->dim, m->dim, &prev, err)) != IST_OK)
        goto done;
    for (size_t r = 1; r <= o->refine_rounds + 1 && r <= IST_MAP_MAX_ROUNDS; r++) {
        ist_align_round rd = {r, 0, 0, NAN, NAN, true};
        if (ist_cancel_requested()) {
            rc = ist_error_set(err, IST_ERR_CANCELLED, "refinement cancelled");
            goto done;
        }
        rc = induce(xn, zn, m->w, n, o->search.csls_k, &o->search.retrieve, arow, brow, &np, &c, err);
        if (rc != IST_OK)
            goto done;
        rd.pairs = np;
        rd.mean_csls = c;
        if (r >= 2 && !(c > c_prev + o->min_gain)) {
            copy_w(m->w, prev);      /* the last refit did not help: undo it */
            rd.kept = false;
        } else if (r <= o->refine_rounds && np > 0) {
            ist_procrustes_info info;
            copy_w(prev, m->w);
            memcpy(arow + np, sa, ns * sizeof *arow);
            memcpy(brow + np, sb, ns * sizeof *brow);
            rc = fit_rows(xn, zn, arow, brow, np + ns, m->w, &info, err);
            if (rc != IST_OK)
                goto done;
            rd.seed_cos = info.seed_cos;
            rd.orth_error = info.orth_error;
        }
        m->rounds[m->nrounds++] = rd;
        if (o->on_round)
            o->on_round(&rd, o->ctx);
        if (!rd.kept || r > o->refine_rounds || np == 0)
            break;
        c_prev = c;
    }
done:
    ist_free(arow);
    ist_free(brow);
    ist_matrix_free(prev);
    return rc;
}

static ist_status
seed_rows(const ist_pairs *seeds, size_t **arow, size_t **brow, size_t *n, ist_error *err)
{
    size_t np = ist_pairs_count(seeds);
    *arow = ist_malloc((np + 1) * sizeof **arow);
    *brow = ist_malloc((np + 1) * sizeof **brow);
    *n = 0;
    if (!*arow || !*brow)
        return ist_error_nomem(err);
    for (size_t i = 0; i < np; i++) {
        ptrdiff_t s = ist_pairs_source_row(seeds, i), t = ist_pairs_target_row(seeds, i);
        if (s < 0 || t < 0)
            continue;
        (*arow)[*n] = (size_t)s;
        (*brow)[*n] = (size_t)t;
        (*n)++;
    }
    if (*n == 0)
        return ist_error_set(err, IST_ERR_INVALID,
                             "align: no seed pair has both words in the vectors");
    return IST_OK;
}

static ist_status
copy_seed_words(const ist_pairs *seeds, ist_pairs **out, ist_error *err)
{
    ist_status rc = ist_pairs_new(out, err);
    for (size_t i = 0; rc == IST_OK && i < ist_pairs_count(seeds); i++)
        if (ist_pairs_source_row(seeds, i) >= 0 && ist_pairs_target_row(seeds, i) >= 0)
            rc = ist_pairs_add(*out, ist_pairs_source(seeds, i), ist_pairs_target(seeds, i), err);
    return rc;
}

ist_status
ist_align_fit(const ist_store *src, const ist_store *tgt, const ist_pairs *seeds,
              const ist_align_opts *opts, ist_map **out, ist_error *err)
{
    ist_align_opts dflt;
    ist_matrix *xn = NULL, *zn = NULL;
    size_t *arow = NULL, *brow = NULL, n;
    ist_map *m = NULL;
    ist_status rc;

    *out = NULL;
    if (!opts) {
        ist_align_opts_init(&dflt);
        opts = &dflt;
    }
    if (ist_store_dim(src) != ist_store_dim(tgt))
        return ist_error_set(err, IST_ERR_INVALID,
                             "align: source vectors have dimension %zu, target vectors %zu",
                             ist_store_dim(src), ist_store_dim(tgt));
    if ((rc = ist_search_opts_check(&opts->search, "align", err)) != IST_OK)
        return rc;
    m = ist_calloc(1, sizeof *m);
    if (!m)
        return ist_error_nomem(err);
    m->dim = ist_store_dim(src);
    m->fp_s = ist_store_fingerprint(src);
    m->fp_t = ist_store_fingerprint(tgt);
    m->rows_s = ist_store_rows(src);
    m->rows_t = ist_store_rows(tgt);
    if ((rc = ist_pairs_checksum(seeds, &m->seed_ck, err)) != IST_OK)
        goto fail;
    m->refine_vocab = opts->refine_vocab;
    m->neighbourhood = opts->search.csls_k;
    if ((rc = seed_rows(seeds, &arow, &brow, &n, err)) != IST_OK)
        goto fail;
    size_t need = opts->min_seed_pairs ? opts->min_seed_pairs : m->dim;
    if (n < need) {
        rc = ist_error_set(err, IST_ERR_INVALID,
                           "align: %zu seed pair%s kept, fewer than the minimum of %zu (%s): "
                           "the fit would be undetermined",
                           n, n == 1 ? "" : "s", need,
                           opts->min_seed_pairs ? "asked for" : "the vector dimension");
        goto fail;
    }
    m->seed_n = n;
    if ((rc = copy_seed_words(seeds, &m->seeds, err)) != IST_OK)
        goto fail;
    if ((rc = ist_align_copy_store(src, &xn, err)) != IST_OK ||
        (rc = ist_align_copy_store(tgt, &zn, err)) != IST_OK)
        goto fail;
    if ((rc = ist_norm_fit(opts->source_norm, ist_matrix_view(xn), &m->ns, err)) != IST_OK) {
        ist_error_prefix(err, "source vectors");
        goto fail;
    }
    if ((rc = ist_norm_fit(opts->target_norm, ist_matrix_view(zn), &m->nt, err)) != IST_OK) {
        ist_error_prefix(err, "target vectors");
        goto fail;
    }
    if ((rc = ist_matrix_new(m->dim, m->dim, &m->w, err)) != IST_OK ||
        (rc = ist_matrix_new(m->dim, m->dim, &m->w0, err)) != IST_OK)
        goto fail;
    rc = fit_rows(xn, zn, arow, brow, n, m->w0, &m->fit0, err);
    if (rc != IST_OK)
        goto fail;
    copy_w(m->w, m->w0);
    if (opts->refine_rounds > 0 && (rc = refine(m, xn, zn, opts, arow, brow, n, err)) != IST_OK)
        goto fail;
    ist_free(arow);
    ist_free(brow);
    ist_matrix_free(xn);
    ist_matrix_free(zn);
    *out = m;
    return IST_OK;
fail:
    ist_free(arow);
    ist_free(brow);
    ist_matrix_free(xn);
    ist_matrix_free(zn);
    ist_map_free(m);
    return rc;
}

size_t
ist_map_dim(const ist_map *m)
{
    return m->dim;
}

ist_cmatview
ist_map_matrix(const ist_map *m)
{
    return ist_matrix_cview(m->w);
}

const ist_norm *
ist_map_source_norm(const ist_map *m)
{
    return m->ns;
}

const ist_norm *
ist_map_target_norm(const ist_map *m)
{
    return m->nt;
}

uint64_t
ist_map_source_fingerprint(const ist_map *m)
{
    return m->fp_s;
}

uint64_t
ist_map_target_fingerprint(const ist_map *m)
{
    return m->fp_t;
}

const ist_pairs *
ist_map_seeds(const ist_map *m)
{
    return m->seeds;
}

uint64_t
ist_map_seed_checksum(const ist_map *m)
{
    return m->seed_ck;
}

size_t
ist_map_seed_pairs(const ist_map *m)
{
    return m->seed_n;
}

ist_procrustes_info
ist_map_seed_fit(const ist_map *m)
{
    return m->fit0;
}

size_t
ist_map_rounds(const ist_map *m)
{
    return m->nrounds;
}

ist_align_round
ist_map_round(const ist_map *m, size_t i)
{
    return m->rounds[i];
}

static ist_status
clone_norm(const ist_norm *p, ist_norm **out, ist_error *err)
{
    size_t n = ist_norm_steps(p), d = ist_norm_dim(p), c = 0;
    ist_norm_kind kinds[IST_MAP_MAX_STEPS];
    double *means = ist_malloc((n * d + 1) * sizeof *means);
    ist_status rc;

    if (!means)
        return ist_error_nomem(err);
    for (size_t i = 0; i < n && i < IST_MAP_MAX_STEPS; i++) {
        kinds[i] = ist_norm_step_kind(p, i);
        if (kinds[i] == IST_NORM_CENTRE)
            memcpy(means + d * c++, ist_norm_step_mean(p, i), d * sizeof *means);
    }
    rc = ist_norm_from_steps(d, kinds, n, means, out, err);
    ist_free(means);
    return rc;
}

ist_status
ist_map_seed_only(const ist_map *m, ist_map **out, ist_error *err)
{
    ist_map *c = ist_calloc(1, sizeof *c);
    ist_status rc;

    *out = NULL;
    if (!c)
        return ist_error_nomem(err);
    *c = *m;
    c->w = c->w0 = NULL;
    c->ns = c->nt = NULL;
    c->seeds = NULL;
    c->nrounds = 0;
    if ((rc = copy_seed_words(m->seeds, &c->seeds, err)) != IST_OK ||
        (rc = ist_matrix_new(m->dim, m->dim, &c->w, err)) != IST_OK ||
        (rc = ist_matrix_new(m->dim, m->dim, &c->w0, err)) != IST_OK ||
        (rc = clone_norm(m->ns, &c->ns, err)) != IST_OK ||
        (rc = clone_norm(m->nt, &c->nt, err)) != IST_OK) {
        ist_map_free(c);
        return rc;
    }
    copy_w(c->w, m->w0);
    copy_w(c->w0, m->w0);
    *out = c;
    return IST_OK;
}

ist_status
ist_map_check(const ist_map *m, const ist_store *src, const ist_store *tgt, ist_error *err)
{
    if (ist_store_dim(src) != m->dim || ist_store_dim(tgt) != m->dim)
        return ist_error_set(err, IST_ERR_INVALID,
                             "the map is for dimension %zu, the vectors have %zu and %zu", m->dim,
                             ist_store_dim(src), ist_store_dim(tgt));
    if (ist_store_fingerprint(src) != m->fp_s)
        return ist_error_set(err, IST_ERR_INVALID,
                             "the source vectors are not the ones the map was fitted on: "
                             "expected fingerprint %016llx, found %016llx",
                             (unsigned long long)m->fp_s,
                             (unsigned long long)ist_store_fingerprint(src));
    if (ist_store_fingerprint(tgt) != m->fp_t)
        return ist_error_set(err, IST_ERR_INVALID,
                             "the target vectors are not the ones the map was fitted on: "
                             "expected fingerprint %016llx, found %016llx",
                             (unsigned long long)m->fp_t,
                             (unsigned long long)ist_store_fingerprint(tgt));
    return IST_OK;
}

ist_status
ist_map_apply(const ist_map *m, const ist_store *src, const ist_store *tgt, ist_matrix **xs,
              ist_matrix **zt, ist_error *err)
{
    ist_matrix *x = NULL, *y = NULL, *z = NULL;
    ist_status rc = IST_OK;

    if (xs) {
        *xs = NULL;
        if ((rc = ist_align_copy_store(src, &x, err)) != IST_OK ||
            (rc = ist_norm_apply(m->ns, ist_matrix_view(x), err)) != IST_OK ||
            (rc = ist_matrix_new(x->rows, x->cols, &y, err)) != IST_OK ||
            (rc = ist_linalg_gemm(false, false, 1.0f, ist_matrix_cview(x),
                                  ist_matrix_cview(m->w), 0.0f, ist_matrix_view(y), err)) !=
                IST_OK)
            goto fail;
        ist_matrix_free(x);
        x = NULL;
    }
    if (zt) {
        *zt = NULL;
        if ((rc = ist_align_copy_store(tgt, &z, err)) != IST_OK ||
            (rc = ist_norm_apply(m->nt, ist_matrix_view(z), err)) != IST_OK)
            goto fail;
        *zt = z;
    }
    if (xs)
        *xs = y;
    return IST_OK;
fail:
    ist_matrix_free(x);
    ist_matrix_free(y);
    ist_matrix_free(z);
    return rc;
}
