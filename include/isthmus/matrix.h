/* isthmus/matrix.h - dense float32 row-major matrices with 64-byte aligned rows.
 *
 * ist_matrix owns its block; ist_matview and ist_cmatview are non-owning views
 * (data, rows, cols, stride in floats) that every numeric routine takes. */
#ifndef ISTHMUS_MATRIX_H
#define ISTHMUS_MATRIX_H

#include <stddef.h>
#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct ist_matview {
    float *data;
    size_t rows, cols, stride;   /* stride >= cols, in floats */
} ist_matview;

typedef struct ist_cmatview {
    const float *data;
    size_t rows, cols, stride;
} ist_cmatview;

typedef struct ist_matrix ist_matrix;   /* opaque, one owner */

/** Row stride (in floats) isthmus uses for a row of cols floats: cols rounded
 *  up to a multiple of 16, so that every row starts on a 64-byte boundary. */
IST_API size_t ist_matrix_stride_for(size_t cols);

/** Allocate a zero-filled rows x cols matrix. Fails with IST_ERR_INVALID when
 *  the size overflows and IST_ERR_NOMEM when it cannot be had.
 *  Success: *out owns it; release with ist_matrix_free(). */
IST_API ist_status ist_matrix_new(size_t rows, size_t cols, ist_matrix **out, ist_error *err);
IST_API void ist_matrix_free(ist_matrix *m);             /* NULL: no-op */

/** Views of the whole matrix; valid until ist_matrix_free(). */
IST_API ist_matview ist_matrix_view(ist_matrix *m);
IST_API ist_cmatview ist_matrix_cview(const ist_matrix *m);

/** Read-only view of a mutable one. */
IST_API ist_cmatview ist_matview_const(ist_matview v);

#ifdef __cplusplus
}
#endif
#endif
