/* propose_env.h - what test_propose.c and test_review.c share: switching the review
 * filters off, reading a file whole, and a directory with a seed list for merging. */
#ifndef ISTHMUS_TEST_PROPOSE_ENV_H
#define ISTHMUS_TEST_PROPOSE_ENV_H

#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include <isthmus/propose.h>

#include "harness.h"

/* The synthetic words (w0, w1, ...) are code-shaped and translate to themselves:
 * the review filters and the same-spelling block would hide them all, so the tests
 * of retrieval, order and margins switch them off (test_filters checks them). */
static inline void
no_filters(ist_propose_opts *po)
{
    po->filter.numbers = true;
    po->filter.stop_share = 0;
    po->filter.variants = false;
    po->filter.min_score = -INFINITY;
    po->same_block = false;
}

static inline bool
exists(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0;
}

static inline char *
slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *buf = malloc((size_t)n + 1);
    assert_int_equal(fread(buf, 1, (size_t)n, f), (size_t)n);
    buf[n] = '\0';
    fclose(f);
    return buf;
}

/* ---- merging ------------------------------------------------------------ */

typedef struct merge_env {
    char *dir, *seed, *out;
} merge_env;

static inline void
env_open(merge_env *e, const char *seed_text)
{
    e->dir = harness_tmpdir();
    e->seed = harness_path(e->dir, "seed.pairs");
    e->out = harness_path(e->dir, "out.pairs");
    harness_write(e->seed, seed_text, strlen(seed_text));
}

static inline char *
env_file(const merge_env *e, const char *name, const char *text)
{
    char *p = harness_path(e->dir, name);
    harness_write(p, text, strlen(text));
    return p;
}

static inline void
env_close(merge_env *e)
{
    free(e->seed);
    free(e->out);
    harness_rmdir(e->dir);
}

#define HDR "# a comment\ndecision\tsource\tcandidate\tplace\n"

#endif
