/* matrix_int.h - the matrix struct, shared by the modules that fill matrices. */
#ifndef ISTHMUS_MATRIX_INT_H
#define ISTHMUS_MATRIX_INT_H

#include <isthmus/matrix.h>

struct ist_matrix {
    float *data;            /* 64-byte aligned, rows * stride floats */
    size_t rows, cols, stride;
};

#endif
