/* synth.h - synthetic vector spaces for the tests: Gaussian numbers and random rotations,
 * deterministic from a seed (harness_rand). */
#ifndef ISTHMUS_TEST_SYNTH_H
#define ISTHMUS_TEST_SYNTH_H

#include <math.h>
#include <stddef.h>
#include <stdint.h>

#include "harness.h"

/* A standard normal number (Box-Muller transform, common practice). */
static inline double
gauss(uint64_t *s)
{
    double u = (harness_rand(s) >> 11) * (1.0 / 9007199254740992.0) + 1e-300;
    double v = (harness_rand(s) >> 11) * (1.0 / 9007199254740992.0);
    return sqrt(-2.0 * log(u)) * cos(6.283185307179586 * v);
}

/* A random orthogonal d x d matrix: Gram-Schmidt on Gaussian rows (common practice). */
static inline void
random_rotation(double *r, size_t d, uint64_t *s)
{
    for (size_t i = 0; i < d; i++) {
        for (size_t j = 0; j < d; j++)
            r[i * d + j] = gauss(s);
        for (int pass = 0; pass < 2; pass++)
            for (size_t k = 0; k < i; k++) {
                double dot = 0;
                for (size_t j = 0; j < d; j++)
                    dot += r[i * d + j] * r[k * d + j];
                for (size_t j = 0; j < d; j++)
                    r[i * d + j] -= dot * r[k * d + j];
            }
        double n = 0;
        for (size_t j = 0; j < d; j++)
            n += r[i * d + j] * r[i * d + j];
        for (size_t j = 0; j < d; j++)
            r[i * d + j] /= sqrt(n);
    }
}

#endif
