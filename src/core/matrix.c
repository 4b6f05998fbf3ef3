/* matrix.c - aligned float32 matrices. */
#include <isthmus/matrix.h>

#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "matrix_int.h"

size_t
ist_matrix_stride_for(size_t cols)
{
    return (cols + 15) & ~(size_t)15;
}

ist_status
ist_matrix_new(size_t rows, size_t cols, ist_matrix **out, ist_error *err)
{
    ist_matrix *m;
    size_t stride = ist_matrix_stride_for(cols), n, bytes;

    *out = NULL;
    if (stride < cols || ist_mul_size(rows, stride, &n) || ist_mul_size(n, sizeof(float), &bytes))
        return ist_error_set(err, IST_ERR_INVALID, "matrix of %zu x %zu is too large", rows, cols);
    m = ist_calloc(1, sizeof *m);
    if (!m)
        return ist_error_nomem(err);
    m->data = ist_aligned_alloc(bytes);
    if (!m->data) {
        ist_free(m);
        return ist_error_set(err, IST_ERR_NOMEM, "out of memory for a %zu x %zu matrix", rows,
                             cols);
    }
    memset(m->data, 0, bytes);
    m->rows = rows;
    m->cols = cols;
    m->stride = stride;
    *out = m;
    return IST_OK;
}

void
ist_matrix_free(ist_matrix *m)
{
    if (!m)
        return;
    ist_aligned_free(m->data);
    ist_free(m);
}

ist_matview
ist_matrix_view(ist_matrix *m)
{
    ist_matview v = {m->data, m->rows, m->cols, m->stride};
    return v;
}

ist_cmatview
ist_matrix_cview(const ist_matrix *m)
{
    ist_cmatview v = {m->data, m->rows, m->cols, m->stride};
    return v;
}

ist_cmatview
ist_matview_const(ist_matview v)
{
    ist_cmatview c = {v.data, v.rows, v.cols, v.stride};
    return c;
}
