/* synth_space.h - two synthetic vector files related by a known rotation, and pair lists
 * over their words, for the alignment and result tests. Needs cmocka (harness.h). */
#ifndef ISTHMUS_TEST_SYNTH_SPACE_H
#define ISTHMUS_TEST_SYNTH_SPACE_H

#include "harness.h"
#include "synth.h"

#include <isthmus/isthmus.h>

static ist_store *
make_store(size_t rows, size_t dim, const char *prefix, const float *data)
{
    ist_store *s;
    ist_error err;
    char w[64];
    assert_int_equal(ist_store_new(rows, dim, &s, &err), IST_OK);
    for (size_t i = 0; i < rows; i++) {
        memcpy(ist_store_row_mut(s, i), data + i * dim, dim * sizeof(float));
        snprintf(w, sizeof w, "%s%zu", prefix, i);
        assert_int_equal(ist_store_set_word(s, i, w, 1000000 - i, &err), IST_OK);
    }
    return s;
}

typedef struct synth {
    size_t n, d;
    double *rot;          /* source = target R^T + noise, so source R ~ target */
    ist_store *src, *tgt;
} synth;

static void
make_synth(synth *sy, size_t n, size_t d, double noise, uint64_t seed)
{
    float *t = malloc(n * d * sizeof *t), *x = malloc(n * d * sizeof *x);
    uint64_t s = seed;
    sy->n = n;
    sy->d = d;
    sy->rot = malloc(d * d * sizeof *sy->rot);
    random_rotation(sy->rot, d, &s);
    for (size_t i = 0; i < n * d; i++)
        t[i] = (float)gauss(&s);
    for (size_t i = 0; i < n; i++)
        for (size_t a = 0; a < d; a++) {
            double v = 0;
            for (size_t b = 0; b < d; b++)
                v += t[i * d + b] * sy->rot[a * d + b];   /* (t R^T)_a = sum_b t_b R_ab */
            x[i * d + a] = (float)(v + noise * gauss(&s));
        }
    sy->src = make_store(n, d, "w", x);
    sy->tgt = make_store(n, d, "w", t);
    free(t);
    free(x);
}

static void
free_synth(synth *sy)
{
    ist_store_free(sy->src);
    ist_store_free(sy->tgt);
    free(sy->rot);
}

static ist_pairs *
range_pairs(const synth *sy, size_t from, size_t to)
{
    ist_pairs *p;
    ist_error err;
    char w[32];
    assert_int_equal(ist_pairs_new(&p, &err), IST_OK);
    for (size_t i = from; i < to; i++) {
        snprintf(w, sizeof w, "w%zu", i);
        assert_int_equal(ist_pairs_add(p, w, w, &err), IST_OK);
    }
    assert_int_equal(ist_pairs_resolve(p, sy->src, sy->tgt, NULL, &err), IST_OK);
    return p;
}

#endif
