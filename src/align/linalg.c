/* linalg.c - checked CBLAS/LAPACKE wrappers and orthogonal Procrustes. */
#include <isthmus/linalg.h>

#include <limits.h>
#include <math.h>
#include <string.h>

#include <lapacke.h>

#include "alloc_int.h"
#include "blas_int.h"
#include "error_int.h"

#define PROCRUSTES_BLOCK 4096   /* rows converted to double per dgemm */

ist_status
ist_linalg_gemm(bool ta, bool tb, float alpha, ist_cmatview a, ist_cmatview b, float beta,
                ist_matview c, ist_error *err)
{
    size_t m = ta ? a.cols : a.rows, ka = ta ? a.rows : a.cols;
    size_t kb = tb ? b.cols : b.rows, n = tb ? b.rows : b.cols;

    if (ka != kb || c.rows != m || c.cols != n)
        return ist_error_set(err, IST_ERR_INVALID,
                             "gemm: shapes do not agree: %zu x %zu times %zu x %zu into %zu x %zu",
                             m, ka, kb, n, c.rows, c.cols);
    if (m > INT_MAX || n > INT_MAX || ka > INT_MAX || a.stride > INT_MAX || b.stride > INT_MAX ||
        c.stride > INT_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "gemm: a dimension exceeds the BLAS int range");
    if (m == 0 || n == 0)
        return IST_OK;
    if (ka == 0) {
        for (size_t i = 0; i < m; i++)
            for (size_t j = 0; j < n; j++)
                c.data[i * c.stride + j] *= beta;
        return IST_OK;
    }
    ist_blas_serial();
    cblas_sgemm(CblasRowMajor, ta ? CblasTrans : CblasNoTrans, tb ? CblasTrans : CblasNoTrans,
                (int)m, (int)n, (int)ka, alpha, a.data, (int)a.stride, b.data, (int)b.stride, beta,
                c.data, (int)c.stride);
    return IST_OK;
}

/* Singular values (jobz 'N') or the full SVD (jobz 'A') of a square or
 * rectangular double matrix a (rows x cols, row-major, destroyed). */
static ist_status
svd_double(char jobz, double *a, size_t rows, size_t cols, double *s, double *u, double *vt,
           bool *no_convergence, ist_error *err)
{
    ist_blas_serial();
    lapack_int info = LAPACKE_dgesdd(LAPACK_ROW_MAJOR, jobz, (lapack_int)rows, (lapack_int)cols,
                                     a, (lapack_int)cols, s, u, (lapack_int)rows, vt,
                                     (lapack_int)cols);
    if (info == 0)
        return IST_OK;
    if (info == LAPACK_WORK_MEMORY_ERROR || info == LAPACK_TRANSPOSE_MEMORY_ERROR)
        return ist_error_set(err, IST_ERR_NOMEM, "out of memory for the workspace of the "
                             "singular value decomposition (LAPACKE_dgesdd)");
    if (info < 0)
        return ist_error_set(err, IST_ERR_NUMERIC,
                             "the singular value decomposition refused its input (LAPACKE_dgesdd, "
                             "argument %d): a number that is not finite is the usual cause; "
                             "check the vector files with 'isthmus inspect'", (int)-info);
    if (no_convergence)
        *no_convergence = true;
    return ist_error_set(err, IST_ERR_NUMERIC,
                         "the singular value decomposition did not converge (LAPACKE_dgesdd, "
                         "info %d)", (int)info);
}

ist_status
ist_linalg_singular_values(ist_cmatview a, double *out, ist_error *err)
{
    size_t n;
    double *d;
    ist_status rc;

    if (a.rows == 0 || a.cols == 0)
        return IST_OK;
    if (ist_mul_size(a.rows, a.cols, &n) || ist_mul_size(n, sizeof *d, &n))
        return ist_error_set(err, IST_ERR_INVALID, "matrix too large for an SVD");
    d = ist_malloc(n);
    if (!d)
        return ist_error_nomem(err);
    for (size_t i = 0; i < a.rows; i++)
        for (size_t j = 0; j < a.cols; j++)
            d[i * a.cols + j] = a.data[i * a.stride + j];
    rc = svd_double('N', d, a.rows, a.cols, out, NULL, NULL, NULL, err);
    ist_free(d);
    return rc;
}

double
ist_linalg_orth_error(ist_cmatview w)
{
    double sum = 0;
    size_t d = w.rows;

    for (size_t i = 0; i < d; i++)
        for (size_t j = 0; j < d; j++) {
            double g = 0;
            for (size_t k = 0; k < d; k++)
                g += (double)w.data[k * w.stride + i] * w.data[k * w.stride + j];
            g -= i == j;
            sum += g * g;
        }
    return sqrt(sum);
}

/* M += X^T Z over all rows, X and Z converted to double a block at a time. */
static ist_status
accumulate_cross(ist_cmatview x, ist_cmatview z, double *m, ist_error *err)
{
    size_t d = x.cols, blk = x.rows < PROCRUSTES_BLOCK ? x.rows : PROCRUSTES_BLOCK;
    double *bx = ist_malloc(blk * d * sizeof *bx), *bz = ist_malloc(blk * d * sizeof *bz);

    if (!bx || !bz) {
        ist_free(bx);
        ist_free(bz);
        return ist_error_nomem(err);
    }
    ist_blas_serial();
    memset(m, 0, d * d * sizeof *m);
    for (size_t r0 = 0; r0 < x.rows; r0 += blk) {
        size_t nr = x.rows - r0 < blk ? x.rows - r0 : blk;
        for (size_t i = 0; i < nr; i++)
            for (size_t j = 0; j < d; j++) {
                bx[i * d + j] = x.data[(r0 + i) * x.stride + j];
                bz[i * d + j] = z.data[(r0 + i) * z.stride + j];
            }
        cblas_dgemm(CblasRowMajor, CblasTrans, CblasNoTrans, (int)d, (int)d, (int)nr, 1.0, bx,
                    (int)d, bz, (int)d, 1.0, m, (int)d);
    }
    ist_free(bx);
    ist_free(bz);
    return IST_OK;
}

static ist_status
fit_report(ist_cmatview x, ist_cmatview z, ist_cmatview w, ist_procrustes_info *info,
           ist_error *err)
{
    size_t d = x.cols, blk = x.rows < PROCRUSTES_BLOCK ? x.rows : PROCRUSTES_BLOCK;
    double cos_sum = 0, res = 0, zz = 0;
    float *y = ist_malloc(blk * d * sizeof *y);

    if (!y)
        return ist_error_nomem(err);
    for (size_t r0 = 0; r0 < x.rows; r0 += blk) {
        size_t nr = x.rows - r0 < blk ? x.rows - r0 : blk;
        cblas_sgemm(CblasRowMajor, CblasNoTrans, CblasNoTrans, (int)nr, (int)d, (int)d, 1.0f,
                    x.data + r0 * x.stride, (int)x.stride, w.data, (int)w.stride, 0.0f, y,
                    (int)d);
        for (size_t i = 0; i < nr; i++) {
            const float *yr = y + i * d, *zr = z.data + (r0 + i) * z.stride;
            double dot = 0, nn = 0, nz = 0;
            for (size_t j = 0; j < d; j++) {
                dot += (double)yr[j] * zr[j];
                nn += (double)yr[j] * yr[j];
                nz += (double)zr[j] * zr[j];
                res += ((double)yr[j] - zr[j]) * ((double)yr[j] - zr[j]);
            }
            zz += nz;
            if (nn > 0 && nz > 0)
                cos_sum += dot / sqrt(nn * nz);
        }
    }
    ist_free(y);
    info->seed_cos = cos_sum / (double)x.rows;
    info->residual = zz > 0 ? sqrt(res / zz) : 0;
    info->orth_error = ist_linalg_orth_error(w);
    return IST_OK;
}

ist_status
ist_linalg_procrustes(ist_cmatview x, ist_cmatview z, ist_matview w, ist_procrustes_info *info,
                      ist_error *err)
{
    size_t d = x.cols;
    double *m = NULL, *u = NULL, *vt = NULL, *s = NULL, *keep = NULL;
    ist_status rc;

    if (x.rows == 0 || x.rows != z.rows || z.cols != d || w.rows != d || w.cols != d)
        return ist_error_set(err, IST_ERR_INVALID,
                             "procrustes: expected two n x d matrices (n >= 1) and a d x d "
                             "result, found %zu x %zu, %zu x %zu, %zu x %zu",
                             x.rows, x.cols, z.rows, z.cols, w.rows, w.cols);
    m = ist_malloc(d * d * sizeof *m);
    keep = ist_malloc(d * d * sizeof *keep);
    u = ist_malloc(d * d * sizeof *u);
    vt = ist_malloc(d * d * sizeof *vt);
    s = ist_malloc(d * sizeof *s);
    if (!m || !keep || !u || !vt || !s) {
        rc = ist_error_nomem(err);
        goto done;
    }
    rc = accumulate_cross(x, z, m, err);
    if (rc != IST_OK)
        goto done;
    for (size_t i = 0; i < d * d; i++)
        if (!isfinite(m[i])) {
            rc = ist_error_set(err, IST_ERR_NUMERIC,
                               "procrustes: the seed vectors give a cross product that is not "
                               "finite: a seed row holds NaN, an infinity or a huge number; "
                               "check the vector files with 'isthmus inspect'");
            goto done;
        }
    memcpy(keep, m, d * d * sizeof *m);
    bool no_conv = false;
    rc = svd_double('A', m, d, d, s, u, vt, &no_conv, err);
    if (no_conv) {
        /* dgesdd's divide and conquer can fail where the QR iteration does not */
        double *superb = ist_malloc(d * sizeof *superb);
        if (!superb) {
            rc = ist_error_nomem(err);
            goto done;
        }
        lapack_int info2 = LAPACKE_dgesvd(LAPACK_ROW_MAJOR, 'A', 'A', (lapack_int)d,
                                          (lapack_int)d, keep, (lapack_int)d, s, u,
                                          (lapack_int)d, vt, (lapack_int)d, superb);
        ist_free(superb);
        if (info2 != 0) {
            rc = ist_error_set(err, IST_ERR_NUMERIC,
                               "the singular value decomposition did not converge by either "
                               "method (LAPACKE_dgesdd, then LAPACKE_dgesvd info %d): check the "
                               "seed vectors for extreme values with 'isthmus inspect'",
                               (int)info2);
            goto done;
        }
        rc = IST_OK;
    } else if (rc != IST_OK) {
        goto done;
    }
    /* W = U V^T, in double, then rounded once */
    cblas_dgemm(CblasRowMajor, CblasNoTrans, CblasNoTrans, (int)d, (int)d, (int)d, 1.0, u, (int)d,
                vt, (int)d, 0.0, m, (int)d);
    for (size_t i = 0; i < d; i++)
        for (size_t j = 0; j < d; j++)
            w.data[i * w.stride + j] = (float)m[i * d + j];
    if (info) {
        rc = fit_report(x, z, ist_matview_const(w), info, err);
        info->sv_max = s[0];
        info->sv_min = s[d - 1];
    }
done:
    ist_free(m);
    ist_free(keep);
    ist_free(u);
    ist_free(vt);
    ist_free(s);
    return rc;
}
