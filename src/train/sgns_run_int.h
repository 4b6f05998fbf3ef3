/* sgns_run_int.h - the state one skip-gram run shares between the setup (sgns.c) and the
 * threads that walk the stream (sgns_walk.c). */
#ifndef ISTHMUS_SGNS_RUN_INT_H
#define ISTHMUS_SGNS_RUN_INT_H

#include <pthread.h>
#include <stdatomic.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "sgns_int.h"

#define SENT_MAX 1024          /* kept words per window unit; longer lines are cut */
#define PUBLISH_EVERY 10000    /* stream words between updates of the shared counters */
#define SIG_RANGE 8.0f         /* sigmoid table covers [-8, 8] */
#define SIG_SIZE 2048
#define LOSS_EVERY_MASK 7      /* the loss (for progress only) is summed on every 8th window */
#define AHEAD_IDS ((size_t)1 << 22) /* ids (16 MiB) a thread asks the kernel to read ahead */

typedef struct shared {
    const uint32_t *ids;
    size_t dim, stride, window, negatives, epochs, nthreads;
    float *in, *out;                 /* vocab x stride each */
    const uint32_t *keep;
    ist_sgns_noise noise;
    const ist_sgns_simd *simd;
    ist_sgns_kernel kernel;
    double lr0, lr_floor;
    uint64_t words_per_epoch, words_total;
    uint64_t ranks;                  /* words done here count this many times (schedule) */
    bool final_pass;                 /* the pass being run is the last one */
    double lr_start;                 /* the rate the threads of a run start with, set before
                                      * they start (they must not read words_done unlocked) */
    double t_start;                  /* when the training began: the progress rate is
                                      * words_done over the time since, as in the result */
    /* Own copies (IST_SGNS_PARALLEL_COPIES): each thread trains its own matrices; the
     * learning rate of a thread follows words_at_slice + its own words x nthreads, so that
     * it does not depend on how the threads are scheduled. */
    bool copies;
    uint64_t words_at_slice;
    float sig[SIG_SIZE + 1], logsig[SIG_SIZE + 1];
    atomic_int stop;
    pthread_mutex_t lock;            /* guards the counters below */
    pthread_cond_t wake;
    uint64_t words_done, trained, pairs;
    double loss_sum, last_epoch_loss;
    uint64_t loss_n, last_epoch_n;
    size_t finished;
    ist_status fail;
    /* Optional, with two threads or more (ist_sgns_opts.hot_rows): the hot words (the most frequent
     * ones) are trained on private copies of their input and output rows in each thread,
     * merged into the shared matrices every merge_every x PUBLISH_EVERY stream words
     * (docs/performance.md, "Threads"). */
    size_t n_hot, merge_every;
    size_t page;                     /* bytes of a memory page, for read-ahead advice */
    uint32_t *hot_ids;               /* n_hot ids, most frequent first */
    int32_t *hot_slot;               /* vocab entries: slot of the word, or -1 */
    pthread_mutex_t merge_lock;
} shared;

typedef struct worker {
    char pad_head[128];              /* keeps the hot fields of neighbours off shared lines */
    shared *sh;
    float *in, *out;                 /* the matrices this thread trains: the shared ones, or
                                      * its own copies (own_in, own_out) */
    float *own_in, *own_out;
    uint64_t slice_words;            /* copies: stream words of this slice so far */
    double own_loss;                 /* copies: last-pass loss, summed in thread order later */
    uint64_t own_loss_n;
    size_t begin, end;               /* part of the stream */
    uint64_t rng;
    uint32_t sent[SENT_MAX];
    /* FAST: pointers and products of one window; REFERENCE: the gradient row */
    const float **xr, **yr;
    float **xw, **yw, **dxr;
    uint32_t *outs, *mult;
    uint32_t *pre;                   /* FAST: noise words drawn ahead for the next window */
    bool have_pre;
    float *s, *g, *gt, *dx;
    pthread_t thread;
    bool started;
    /* hot rows: the private copies (n_hot x stride, inputs then outputs) and the shared rows
     * as they were at the last merge */
    float *rep_in, *rep_out, *base_in, *base_out;
    size_t publications;
    /* since the last publication */
    uint64_t words, trained, pairs, loss_n, windows;
    double loss;
    char pad_tail[128];
} worker;

/* Fill the sigmoid and log-sigmoid tables of sh. */
void ist_sgns_sig_tables(shared *sh);

/* The learning rate after done stream words (linear decay to lr_floor times lr0). */
double ist_sgns_current_lr(const shared *sh, uint64_t done);

/* One training thread (pthread start routine; arg is its worker). */
void *ist_sgns_worker_main(void *arg);

/* The calling thread waits for the workers, reports progress every 0.25 s and passes on a
 * stop request. A run may be one slice of several: the rate counts from sh->t_start. */
void ist_sgns_monitor(shared *sh, const ist_sgns_opts *o);

/* Monotonic clock in seconds. */
double ist_sgns_now(void);

#endif
