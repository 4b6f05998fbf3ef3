/* sgns_int.h - pieces of the skip-gram trainer that tests reach directly: the random
 * numbers, the subsampling rule, the noise sampler and the vector kernels. */
#ifndef ISTHMUS_SGNS_INT_H
#define ISTHMUS_SGNS_INT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <isthmus/error.h>
#include <isthmus/sgns.h>

/* ---- random numbers: splitmix64 (Steele, Lea & Flood 2014), one state per thread ---------- */

static inline uint64_t
ist_sgns_rand(uint64_t *s)
{
    uint64_t z = (*s += 0x9e3779b97f4a7c15u);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

/* Uniform integer in [0, n) from the high 32 bits (n < 2^32). */
static inline uint32_t
ist_sgns_below(uint64_t r, uint32_t n)
{
    return (uint32_t)(((r >> 32) * (uint64_t)n) >> 32);
}

/* ---- subsampling (Mikolov et al. 2013, eq. 5) -------------------------------------------- */

/* Probability of keeping one occurrence of a word seen count times out of total:
 * min(1, sqrt(t / f)), f = count / total; 1 when t == 0 or count == 0. */
double ist_sgns_keep_prob(uint64_t count, uint64_t total, double t);

/* Per-word thresholds: an occurrence of id is kept when a uniform 32-bit number is below
 * thr[id]; UINT32_MAX means always kept (no random number drawn). *out: ist_free(). */
ist_status ist_sgns_keep_table(const uint64_t *counts, size_t n, double t, uint32_t **out,
                               ist_error *err);

static inline bool
ist_sgns_keep(const uint32_t *thr, uint32_t id, uint64_t *rng)
{
    uint32_t th = thr[id];
    return th == UINT32_MAX || (uint32_t)(ist_sgns_rand(rng) >> 32) < th;
}

/* ---- noise words: alias table for count^power (Walker 1977, Vose 1991) -------------------- */

typedef struct ist_sgns_alias_cell {
    uint32_t keep;     /* draw this cell's own id when u32 < keep */
    uint32_t alias;    /* else this id */
} ist_sgns_alias_cell;

typedef struct ist_sgns_noise {
    ist_sgns_alias_cell *cells;   /* n cells, 8 bytes each */
    uint32_t n;
} ist_sgns_noise;

/* Build the sampler for P(w) proportional to counts[w]^power. IST_ERR_INVALID when every
 * count is zero or n >= 2^32 - 1. */
ist_status ist_sgns_noise_build(const uint64_t *counts, size_t n, double power,
                                ist_sgns_noise *out, ist_error *err);
void ist_sgns_noise_free(ist_sgns_noise *z);

static inline uint32_t
ist_sgns_noise_draw(const ist_sgns_noise *z, uint64_t *rng)
{
    uint64_t r = ist_sgns_rand(rng);
    uint32_t i = ist_sgns_below(r, z->n);
    ist_sgns_alias_cell c = z->cells[i];
    uint32_t own = (uint32_t)0 - (uint32_t)((uint32_t)r < c.keep);   /* all ones: own id */
    return (i & own) | (c.alias & ~own);                              /* without a branch */
}

/* ---- vector kernels (src/train/sgns_kern.c); row lengths are multiples of 16 floats ------------- */

typedef struct ist_sgns_simd {
    const char *name;
    /* s[j * n + k] = x_j . y_k for j < m, k < n */
    void (*dots)(const float *const *x, size_t m, const float *const *y, size_t n, size_t len,
                 float *s);
    /* out_a += sum_b c[a * nb + b] in_b for a < na; the out rows are distinct */
    void (*acc)(float *const *out, size_t na, const float *const *in, size_t nb, const float *c,
                size_t len);
    /* y += x */
    void (*add)(float *y, const float *x, size_t len);
} ist_sgns_simd;

/* The kernel set for this CPU, or the one the name asks for ("portable", "avx2", "avx512")
 * when the CPU has it; NULL name or "" = best available. */
const ist_sgns_simd *ist_sgns_simd_pick(const char *name);

#endif
