/* isthmus/linalg.h - checked dense linear algebra and orthogonal Procrustes.
 * The normalisation steps applied before aligning are in isthmus/norm.h.
 *
 * Owns nothing. The routines wrap CBLAS and LAPACKE and check every shape; a
 * LAPACKE failure (info != 0) becomes IST_ERR_NUMERIC naming the routine.
 *
 * Orthogonal Procrustes: the orthogonal W minimising ||XW - Z||_F is W = U V^T
 * where U S V^T is the SVD of X^T Z (Schönemann 1966, "A generalized solution of
 * the orthogonal Procrustes problem"); its use for word vectors: Xing et al.
 * 2015, Smith et al. 2017. Rows are vectors: a source row x maps to x W. */
#ifndef ISTHMUS_LINALG_H
#define ISTHMUS_LINALG_H

#include <stdbool.h>
#include <stddef.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>

#ifdef __cplusplus
extern "C" {
#endif

/** C = alpha * op(A) op(B) + beta * C in single precision, where op(X) is X or
 *  X^T (ta, tb). IST_ERR_INVALID when the shapes do not agree. */
IST_API ist_status ist_linalg_gemm(bool ta, bool tb, float alpha, ist_cmatview a, ist_cmatview b,
                                   float beta, ist_matview c, ist_error *err);

/** Singular values of A (rows x cols) in descending order into out (room for
 *  min(rows, cols) values), computed in double precision (LAPACKE dgesdd).
 *  IST_ERR_NUMERIC when the routine does not converge. */
IST_API ist_status ist_linalg_singular_values(ist_cmatview a, double *out, ist_error *err);

/** What a Procrustes fit reports. */
typedef struct ist_procrustes_info {
    double orth_error;     /* ||W^T W - I||_F, computed in double */
    double seed_cos;       /* mean cosine of (x_i W, z_i) over the pairs */
    double residual;       /* ||XW - Z||_F / ||Z||_F */
    double sv_min, sv_max; /* extreme singular values of X^T Z */
} ist_procrustes_info;

/** Orthogonal W (dim x dim, written into w) minimising ||XW - Z||_F for the
 *  pairs of rows of x and z (n x dim each, n >= 1). X^T Z is accumulated in
 *  double precision (dgemm over blocks of rows), its SVD taken with dgesdd
 *  (dgesvd when that fails to converge). info may be NULL. */
IST_API ist_status ist_linalg_procrustes(ist_cmatview x, ist_cmatview z, ist_matview w,
                                         ist_procrustes_info *info, ist_error *err);

/** ||W^T W - I||_F for a square matrix, in double precision. */
IST_API double ist_linalg_orth_error(ist_cmatview w);

#ifdef __cplusplus
}
#endif
#endif
