/* blas_int.h - how the library calls OpenBLAS. */
#ifndef ISTHMUS_BLAS_INT_H
#define ISTHMUS_BLAS_INT_H

#include <cblas.h>

/* Every BLAS and LAPACK call of the library runs on one OpenBLAS thread; the library's own
 * threads are the parallelism. A product that OpenBLAS splits over its threads sums in a
 * different order, so its last bits would depend on the machine's core count and on
 * whether an earlier call in the same process had already asked for one thread (the first
 * align of a process would then differ from the second). Called before each use, as the
 * setting is process-wide and a host program (numpy beside ctypes) may change it. */
static inline void
ist_blas_serial(void)
{
    openblas_set_num_threads(1);
}

#endif
