/* sgns_kern.c - the FAST path's vector kernels for each instruction set, and the choice
 * between them at run time (the default build targets baseline x86-64 or aarch64). */
#include <stdlib.h>
#include <string.h>

#include "sgns_int.h"

/* ---- portable: GCC/Clang vector extensions, 4 lanes (SSE2 on x86-64, NEON on aarch64) --- */

typedef float ist_v4f __attribute__((vector_size(16)));

static inline ist_v4f
v4_load(const float *p)
{
    ist_v4f v;
    memcpy(&v, p, sizeof v);
    return v;
}

static inline void
v4_store(float *p, ist_v4f v)
{
    memcpy(p, &v, sizeof v);
}

static inline float
v4_sum(ist_v4f v)
{
    return (v[0] + v[1]) + (v[2] + v[3]);
}

#define KFN(name) portable_##name
#define KTARGET
#define V ist_v4f
#define VW 4
#define VZERO ((ist_v4f){0.0f, 0.0f, 0.0f, 0.0f})
#define VLOAD(p) v4_load(p)
#define VSTORE(p, v) v4_store((p), (v))
#define VBCAST(x) ((ist_v4f){0.0f, 0.0f, 0.0f, 0.0f} + (float)(x))
#define VFMA(a, b, c) ((a) * (b) + (c))
#define VSUM(v) v4_sum(v)
#include "sgns_kern_tmpl.h"
#undef KFN
#undef KTARGET
#undef V
#undef VW
#undef VZERO
#undef VLOAD
#undef VSTORE
#undef VBCAST
#undef VFMA
#undef VSUM

static const ist_sgns_simd simd_portable = {"portable", portable_dots, portable_acc,
                                            portable_add};

#if defined(__x86_64__) && defined(__GNUC__)
#include <immintrin.h>

/* ---- AVX2 + FMA: 8 lanes --------------------------------------------------------------- */

__attribute__((target("avx2,fma"))) static inline float
v8_sum(__m256 v)
{
    __m128 s = _mm_add_ps(_mm256_castps256_ps128(v), _mm256_extractf128_ps(v, 1));
    s = _mm_add_ps(s, _mm_movehl_ps(s, s));
    s = _mm_add_ss(s, _mm_shuffle_ps(s, s, 1));
    return _mm_cvtss_f32(s);
}

#define KFN(name) avx2_##name
#define KTARGET __attribute__((target("avx2,fma")))
#define V __m256
#define VW 8
#define VZERO _mm256_setzero_ps()
#define VLOAD(p) _mm256_loadu_ps(p)
#define VSTORE(p, v) _mm256_storeu_ps((p), (v))
#define VBCAST(x) _mm256_set1_ps(x)
#define VFMA(a, b, c) _mm256_fmadd_ps((a), (b), (c))
#define VSUM(v) v8_sum(v)
#include "sgns_kern_tmpl.h"
#undef KFN
#undef KTARGET
#undef V
#undef VW
#undef VZERO
#undef VLOAD
#undef VSTORE
#undef VBCAST
#undef VFMA
#undef VSUM

static const ist_sgns_simd simd_avx2 = {"avx2", avx2_dots, avx2_acc, avx2_add};

/* ---- AVX-512F: 16 lanes ---------------------------------------------------------------- */

#define KFN(name) avx512_##name
#define KTARGET __attribute__((target("avx512f")))
#define V __m512
#define VW 16
#define VZERO _mm512_setzero_ps()
#define VLOAD(p) _mm512_loadu_ps(p)
#define VSTORE(p, v) _mm512_storeu_ps((p), (v))
#define VBCAST(x) _mm512_set1_ps(x)
#define VFMA(a, b, c) _mm512_fmadd_ps((a), (b), (c))
#define VSUM(v) _mm512_reduce_add_ps(v)
#include "sgns_kern_tmpl.h"
#undef KFN
#undef KTARGET
#undef V
#undef VW
#undef VZERO
#undef VLOAD
#undef VSTORE
#undef VBCAST
#undef VFMA
#undef VSUM

static const ist_sgns_simd simd_avx512 = {"avx512", avx512_dots, avx512_acc, avx512_add};
#endif

const ist_sgns_simd *
ist_sgns_simd_pick(const char *name)
{
    const ist_sgns_simd *best = &simd_portable;
#if defined(__x86_64__) && defined(__GNUC__)
    __builtin_cpu_init();
    bool has512 = __builtin_cpu_supports("avx512f");
    bool has2 = __builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma");
    if (has512)
        best = &simd_avx512;
    else if (has2)
        best = &simd_avx2;
    if (name && strcmp(name, "portable") == 0)
        return &simd_portable;
    if (name && strcmp(name, "avx2") == 0 && has2)
        return &simd_avx2;
#else
    if (name && strcmp(name, "portable") == 0)
        return &simd_portable;
#endif
    return best;
}

const char *
ist_sgns_simd_name(const char *request)
{
    return ist_sgns_simd_pick(request)->name;
}
