/* sgns_env.h - what test_sgns.c and test_sgns_runs.c share: a synthetic corpus of token ids
 * with its counts, planted word clusters, and training that fails the test on an error. */
#ifndef ISTHMUS_TEST_SGNS_ENV_H
#define ISTHMUS_TEST_SGNS_ENV_H

#include "harness.h"

#include <math.h>

#include <isthmus/sgns.h>

/* ---- synthetic corpora ------------------------------------------------------------------ */

typedef struct corpus {
    uint32_t *ids;
    size_t n, cap;
    uint64_t *counts;
    size_t vocab;
} corpus;


static inline void
corpus_init(corpus *c, size_t vocab)
{
    c->n = 0;
    c->cap = 1024;
    c->ids = malloc(c->cap * sizeof *c->ids);
    c->counts = calloc(vocab, sizeof *c->counts);
    c->vocab = vocab;
}

static inline void
corpus_put(corpus *c, uint32_t id)
{
    if (c->n == c->cap) {
        c->cap *= 2;
        c->ids = realloc(c->ids, c->cap * sizeof *c->ids);
    }
    c->ids[c->n++] = id;
    if (id != IST_CORPUS_EOL)
        c->counts[id]++;
}

static inline void
corpus_free(corpus *c)
{
    free(c->ids);
    free(c->counts);
}

static inline double
unif(uint64_t *s)
{
    return (double)(harness_rand(s) >> 11) / 9007199254740992.0;
}

static inline double
zipf_total(size_t per)
{
    double t = 0;
    for (size_t r = 0; r < per; r++)
        t += 1.0 / (double)((r + 1) * (r + 1));
    return t;
}

/* Planted clusters: nclus groups of per words; a line is 12 words of one group, each replaced
 * with probability noise by a word of any group. */
static inline void
make_clusters(corpus *c, size_t nclus, size_t per, size_t lines, double noise, uint64_t seed)
{
    uint64_t s = seed;
    corpus_init(c, nclus * per);
    for (size_t l = 0; l < lines; l++) {
        size_t g = harness_rand(&s) % nclus;
        for (int i = 0; i < 12; i++) {
            /* within a group, word r has weight 1 / (r + 1)^2: the rare words are hard */
            size_t r = 0;
            double u = unif(&s) * zipf_total(per);
            while (r + 1 < per && (u -= 1.0 / (double)((r + 1) * (r + 1))) > 0)
                r++;
            uint32_t id = (uint32_t)(g * per + r);
            if (unif(&s) < noise)
                id = (uint32_t)(harness_rand(&s) % (nclus * per));
            corpus_put(c, id);
        }
        corpus_put(c, IST_CORPUS_EOL);
    }
}

static inline ist_matrix *
train(const corpus *c, const ist_sgns_opts *o, ist_matrix **ctx)
{
    ist_matrix *in = NULL;
    ist_error err;
    ist_status rc = ist_sgns_train(c->ids, c->n, c->counts, c->vocab, o, &in, ctx, NULL, &err);
    if (rc != IST_OK)
        fail_msg("training failed: %s", err.msg);
    return in;
}

#endif
