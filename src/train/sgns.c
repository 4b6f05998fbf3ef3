/* sgns.c - skip-gram with negative sampling: options, samplers, threads, the two update
 * kernels (formulas and citations in include/isthmus/sgns.h and docs/methods.md). */
#include <isthmus/sgns.h>

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <time.h>
#include <unistd.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "cluster_int.h"
#include "error_int.h"
#include "matrix_int.h"
#include "sgns_int.h"

#define SENT_MAX 1024          /* kept words per window unit; longer lines are cut */
#define PUBLISH_EVERY 10000    /* stream words between updates of the shared counters */
#define SIG_RANGE 8.0f         /* sigmoid table covers [-8, 8] */
#define SIG_SIZE 2048
#define LOSS_EVERY_MASK 7      /* the loss (for progress only) is summed on every 8th window */
#define MAX_THREADS 256
#define MAX_DIM 10000
#define MAX_WINDOW 1000
#define MAX_NEGATIVES 1000
#define HOT_ROWS 0             /* words whose rows each thread keeps a private copy of: none by
                                * default, measured slower here (docs/performance.md) */
#define MAX_HOT_ROWS 65536
#define AHEAD_IDS ((size_t)1 << 22) /* ids (16 MiB) a thread asks the kernel to read ahead */
#define MERGE_EVERY 1          /* publications between merges of the private rows */

void
ist_sgns_opts_init(ist_sgns_opts *o)
{
    memset(o, 0, sizeof *o);
    o->dim = 100;
    o->window = 10;   /* measured best on the real-data check: docs/defaults.md */
    o->negatives = 5;
    o->epochs = 5;
    o->lr0 = 0.025;
    o->lr_floor = 1e-4;
    o->subsample = 1e-4;
    o->threads = 1;
    o->exchanges = 4;
    o->merge = IST_SGNS_MERGE_CHANGES;
    o->seed = 1;
    o->kernel = IST_SGNS_FAST;
}

/* ---- subsampling and noise ------------------------------------------------------------ */

double
ist_sgns_keep_prob(uint64_t count, uint64_t total, double t)
{
    if (t <= 0.0 || count == 0 || total == 0)
        return 1.0;
    double f = (double)count / (double)total;
    double p = sqrt(t / f);
    return p < 1.0 ? p : 1.0;
}

ist_status
ist_sgns_keep_table(const uint64_t *counts, size_t n, double t, uint32_t **out, ist_error *err)
{
    uint64_t total = 0;
    uint32_t *thr;

    *out = NULL;
    thr = ist_malloc((n ? n : 1) * sizeof *thr);
    if (!thr)
        return ist_error_nomem(err);
    for (size_t i = 0; i < n; i++)
        total += counts[i];
    for (size_t i = 0; i < n; i++) {
        double p = ist_sgns_keep_prob(counts[i], total, t);
        thr[i] = p >= 1.0 ? UINT32_MAX : (uint32_t)(p * 4294967296.0);
    }
    *out = thr;
    return IST_OK;
}

ist_status
ist_sgns_noise_build(const uint64_t *counts, size_t n, double power, ist_sgns_noise *out,
                     ist_error *err)
{
    double *p = NULL, sum = 0.0;
    uint32_t *small = NULL, *large = NULL;
    size_t ns = 0, nl = 0;

    memset(out, 0, sizeof *out);
    if (n == 0 || n >= UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "noise distribution over %zu words", n);
    for (size_t i = 0; i < n; i++)
        sum += pow((double)counts[i], power);
    if (!(sum > 0.0))
        return ist_error_set(err, IST_ERR_INVALID, "every word count is zero");
    p = ist_malloc(n * sizeof *p);
    small = ist_malloc(n * sizeof *small);
    large = ist_malloc(n * sizeof *large);
    out->cells = ist_malloc(n * sizeof *out->cells);
    if (!p || !small || !large || !out->cells) {
        ist_free(p), ist_free(small), ist_free(large), ist_free(out->cells);
        out->cells = NULL;
        return ist_error_nomem(err);
    }
    out->n = (uint32_t)n;
    /* Vose's method: scale to mean 1, pair each under-full cell with an over-full one. */
    for (size_t i = 0; i < n; i++) {
        p[i] = pow((double)counts[i], power) * (double)n / sum;
        if (p[i] < 1.0)
            small[ns++] = (uint32_t)i;
        else
            large[nl++] = (uint32_t)i;
    }
    while (ns > 0 && nl > 0) {
        uint32_t s = small[--ns], l = large[nl - 1];
        out->cells[s].keep = (uint32_t)(p[s] * 4294967296.0);
        out->cells[s].alias = l;
        p[l] -= 1.0 - p[s];
        if (p[l] < 1.0) {
            nl--;
            small[ns++] = l;
        }
    }
    while (nl > 0) {             /* what rounding left: full cells */
        uint32_t l = large[--nl];
        out->cells[l].keep = UINT32_MAX;
        out->cells[l].alias = l;
    }
    while (ns > 0) {
        uint32_t s = small[--ns];
        out->cells[s].keep = UINT32_MAX;
        out->cells[s].alias = s;
    }
    ist_free(p), ist_free(small), ist_free(large);
    return IST_OK;
}

void
ist_sgns_noise_free(ist_sgns_noise *z)
{
    if (z) {
        ist_free(z->cells);
        z->cells = NULL;
        z->n = 0;
    }
}

/* ---- shared state --------------------------------------------------------------------- */

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
    float sig[SIG_SIZE + 1], logsig[SIG_SIZE + 1];
    atomic_int stop;
    pthread_mutex_t lock;            /* guards the counters below */
    pthread_cond_t wake;
    uint64_t words_done, trained, pairs;
    double loss_sum, last_epoch_loss;
    uint64_t loss_n, last_epoch_n;
    size_t finished;
    ist_status fail;
    /* Optional, with two threads or more (ISTHMUS_SGNS_HOT): the hot words (the most frequent
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

static void
sig_tables(shared *sh)
{
    for (int i = 0; i <= SIG_SIZE; i++) {
        double x = ((double)i / SIG_SIZE * 2.0 - 1.0) * SIG_RANGE;
        sh->sig[i] = (float)(1.0 / (1.0 + exp(-x)));
        sh->logsig[i] = (float)(-log1p(exp(-x)));   /* log s(x) */
    }
}

static inline int
sig_index(float x)
{
    return (int)((x + SIG_RANGE) * (SIG_SIZE / (2.0f * SIG_RANGE)) + 0.5f);
}

/* Gradient factor (label - s(x)) and the pair's loss -log s(+-x). */
static inline float
grad_loss(const shared *sh, float x, int label, double *loss)
{
    if (x >= SIG_RANGE) {
        *loss += label ? 0.0 : x;
        return label ? 0.0f : -1.0f;
    }
    if (x <= -SIG_RANGE) {
        *loss += label ? -x : 0.0;
        return label ? 1.0f : 0.0f;
    }
    int i = sig_index(x);
    float s = sh->sig[i];
    /* log s(-x) = log s(x) - x */
    *loss -= label ? sh->logsig[i] : sh->logsig[i] - x;
    return (float)label - s;
}

/* Gradient factor alone. */
static inline float
grad_only(const shared *sh, float x, int label)
{
    if (x >= SIG_RANGE)
        return label ? 0.0f : -1.0f;
    if (x <= -SIG_RANGE)
        return label ? 1.0f : 0.0f;
    return (float)label - sh->sig[sig_index(x)];
}

static double
current_lr(const shared *sh, uint64_t done)
{
    double f = 1.0 - (double)done / (double)(sh->words_total + 1);
    return sh->lr0 * (f > sh->lr_floor ? f : sh->lr_floor);
}

/* ---- rows: shared, or this thread's copy for a hot word --------------------------------- */

static inline float *
in_row(const worker *w, uint32_t id)
{
    const shared *sh = w->sh;
    if (sh->n_hot) {
        int32_t s = sh->hot_slot[id];
        if (s >= 0)
            return w->rep_in + (size_t)s * sh->stride;
    }
    return sh->in + (size_t)id * sh->stride;
}

static inline float *
out_row(const worker *w, uint32_t id)
{
    const shared *sh = w->sh;
    if (sh->n_hot) {
        int32_t s = sh->hot_slot[id];
        if (s >= 0)
            return w->rep_out + (size_t)s * sh->stride;
    }
    return sh->out + (size_t)id * sh->stride;
}

/* Fold this thread's changes to its hot rows into the shared rows, then start again from the
 * shared rows (which hold the other threads' merged changes too):
 *   shared += copy - base;  copy = base = shared. */
static void
merge_hot(worker *w)
{
    shared *sh = w->sh;
    size_t len = sh->stride, dim = sh->dim;

    pthread_mutex_lock(&sh->merge_lock);
    for (size_t s = 0; s < sh->n_hot; s++) {
        size_t off = (size_t)s * len, row = (size_t)sh->hot_ids[s] * len;
        float *si = sh->in + row, *so = sh->out + row;
        float *ci = w->rep_in + off, *co = w->rep_out + off;
        float *bi = w->base_in + off, *bo = w->base_out + off;
        for (size_t c = 0; c < dim; c++) {
            si[c] += ci[c] - bi[c];
            so[c] += co[c] - bo[c];
            ci[c] = bi[c] = si[c];
            co[c] = bo[c] = so[c];
        }
    }
    pthread_mutex_unlock(&sh->merge_lock);
}

/* ---- the two kernels: one window centred on sent[i] ----------------------------------- */

/* Plain per-pair loop: every (context, centre) pair draws its own noise words. The loops are
 * left to the compiler (allowed to vectorise the sums, and built for AVX2 + FMA as well, chosen
 * at run time) so that the comparison with the fast path is against a well-compiled loop. */
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
__attribute__((target_clones("arch=x86-64-v3", "default")))
#endif
static void
window_reference(worker *w, size_t n, size_t i, size_t r, float lr)
{
    shared *sh = w->sh;
    size_t lo = i >= r ? i - r : 0, hi = i + r + 1 < n ? i + r + 1 : n, dim = sh->dim;
    uint32_t centre = w->sent[i];
    float *grad = w->dx;
    bool sample = (w->windows++ & LOSS_EVERY_MASK) == 0;

    for (size_t j = lo; j < hi; j++) {
        if (j == i)
            continue;
        float *x = in_row(w, w->sent[j]);
        memset(grad, 0, dim * sizeof *grad);
        for (size_t d = 0; d <= sh->negatives; d++) {
            uint32_t o = d == 0 ? centre : ist_sgns_noise_draw(&sh->noise, &w->rng);
            if (d > 0 && o == centre)
                continue;
            float *y = out_row(w, o), dot = 0.0f;
#pragma omp simd reduction(+ : dot)
            for (size_t c = 0; c < dim; c++)
                dot += x[c] * y[c];
            float g = sample ? grad_loss(sh, dot, d == 0, &w->loss) : grad_only(sh, dot, d == 0);
            g *= lr;
#pragma omp simd
            for (size_t c = 0; c < dim; c++)
                grad[c] += g * y[c];
#pragma omp simd
            for (size_t c = 0; c < dim; c++)
                y[c] += g * x[c];
            w->pairs++;
            w->loss_n += sample;
        }
#pragma omp simd
        for (size_t c = 0; c < dim; c++)
            x[c] += grad[c];
    }
}

static inline void
prefetch_row(const float *row, size_t len)
{
    for (size_t d = 0; d < len; d += 16)
        __builtin_prefetch(row + d, 1, 3);
}

/* The window's output rows: the centre word (label 1) then the distinct noise words with
 * their multiplicities (a noise word equal to the centre is skipped). The noise words are
 * drawn one window ahead so that their rows can be fetched from memory while the current
 * window computes. Returns the number of rows; *drawn counts centre + noise words used. */
static size_t
window_outputs(worker *w, uint32_t centre, size_t *drawn)
{
    shared *sh = w->sh;
    size_t no = 1, kn = sh->negatives, len = sh->stride;

    if (!w->have_pre)
        for (size_t d = 0; d < kn; d++)
            w->pre[d] = ist_sgns_noise_draw(&sh->noise, &w->rng);
    w->outs[0] = centre;
    w->mult[0] = 1;
    *drawn = 1;
    for (size_t d = 0; d < kn; d++) {
        uint32_t o = w->pre[d];
        if (o == centre)
            continue;
        (*drawn)++;
        size_t k = 1;
        while (k < no && w->outs[k] != o)
            k++;
        if (k == no) {
            w->outs[no] = o;
            w->mult[no++] = 1;
        } else {
            w->mult[k]++;
        }
    }
    for (size_t d = 0; d < kn; d++) {
        w->pre[d] = ist_sgns_noise_draw(&sh->noise, &w->rng);
        prefetch_row(out_row(w, w->pre[d]), len);
    }
    w->have_pre = true;
    for (size_t k = 0; k < no; k++) {
        float *y = out_row(w, w->outs[k]);
        w->yr[k] = y;
        w->yw[k] = y;
    }
    return no;
}

/* G = lr (L - s(S)) weighted by the output multiplicities, and its transpose; the loss is
 * summed on every 8th window. Also zeroes the dX rows. Returns whether the loss was summed. */
static bool
window_gradients(worker *w, size_t m, size_t no, float lr)
{
    const shared *sh = w->sh;
    bool sample = (w->windows++ & LOSS_EVERY_MASK) == 0;

    for (size_t j = 0; j < m; j++) {
        for (size_t k = 0; k < no; k++) {
            float x = w->s[j * no + k], g;
            if (sample) {
                double l = 0.0;
                g = grad_loss(sh, x, k == 0, &l);
                w->loss += l * w->mult[k];
            } else {
                g = grad_only(sh, x, k == 0);
            }
            g *= lr * (float)w->mult[k];
            w->g[j * no + k] = g;
            w->gt[k * m + j] = g;
        }
        memset(w->dxr[j], 0, sh->stride * sizeof(float));
    }
    return sample;
}

/* Shared noise words for the window; updates as small matrix products (Ji et al. 2016). */
static void
window_fast(worker *w, size_t n, size_t i, size_t r, float lr)
{
    shared *sh = w->sh;
    size_t lo = i >= r ? i - r : 0, hi = i + r + 1 < n ? i + r + 1 : n, len = sh->stride;
    size_t m = 0, drawn;
    const ist_sgns_simd *v = sh->simd;

    size_t no = window_outputs(w, w->sent[i], &drawn);
    if (i + 1 < n)
        prefetch_row(out_row(w, w->sent[i + 1]), len);
    if (i + sh->window + 1 < n)
        prefetch_row(in_row(w, w->sent[i + sh->window + 1]), len);
    for (size_t j = lo; j < hi; j++) {
        if (j == i)
            continue;
        float *x = in_row(w, w->sent[j]);
        w->xr[m] = x;
        w->xw[m] = x;
        m++;
    }
    if (m == 0)
        return;
    v->dots(w->xr, m, w->yr, no, len, w->s);
    bool sample = window_gradients(w, m, no, lr);
    v->acc(w->dxr, m, w->yr, no, w->g, len);       /* dX = G Y          */
    v->acc(w->yw, no, w->xr, m, w->gt, len);       /* Y += G^T X        */
    for (size_t j = 0; j < m; j++)                 /* X += dX, row by row: contexts may repeat */
        v->add(w->xw[j], w->dxr[j], len);
    w->pairs += m * drawn;
    if (sample)
        w->loss_n += m * drawn;
}

/* ---- threads ---------------------------------------------------------------------------- */

/* Add this worker's counts to the shared ones; returns the learning rate to use next. */
static float
publish(worker *w, bool last_epoch)
{
    shared *sh = w->sh;
    double lr;

    pthread_mutex_lock(&sh->lock);
    sh->words_done += w->words * sh->ranks;
    sh->trained += w->trained;
    sh->pairs += w->pairs;
    sh->loss_sum += w->loss;
    sh->loss_n += w->loss_n;
    if (last_epoch) {
        sh->last_epoch_loss += w->loss;
        sh->last_epoch_n += w->loss_n;
    }
    lr = current_lr(sh, sh->words_done);
    pthread_mutex_unlock(&sh->lock);
    w->words = w->trained = w->pairs = w->loss_n = 0;
    w->loss = 0.0;
    if (sh->n_hot && ++w->publications % sh->merge_every == 0)
        merge_hot(w);
    return (float)lr;
}

/* Ask for the next AHEAD_IDS ids of this thread's part to be read in (the stream may be a
 * memory-mapped file larger than memory, on a slow disk): advice only, results unchanged. */
static void
read_ahead(const worker *w, size_t pos)
{
    size_t page = w->sh->page, end = pos + AHEAD_IDS < w->end ? pos + AHEAD_IDS : w->end;
    uintptr_t a = (uintptr_t)(w->sh->ids + pos) & ~(uintptr_t)(page - 1);
    uintptr_t b = (uintptr_t)(w->sh->ids + end);
    if (b > a)
        posix_madvise((void *)a, (size_t)(b - a), POSIX_MADV_WILLNEED);
}

static void *
worker_main(void *arg)
{
    worker *w = arg;
    shared *sh = w->sh;
    float lr = (float)current_lr(sh, sh->words_done);   /* lr0 at the start; a slice of
                                                         * a rank's share goes on from there */
    uint64_t since = 0;
    uint32_t win = (uint32_t)sh->window;

    for (size_t e = 0; e < sh->epochs && !atomic_load_explicit(&sh->stop, memory_order_relaxed);
         e++) {
        bool last = e + 1 == sh->epochs && sh->final_pass;
        size_t pos = w->begin, ahead = pos;
        while (pos < w->end) {
            size_t n = 0;
            if (pos >= ahead) {
                read_ahead(w, pos);
                ahead = pos + AHEAD_IDS / 2;
            }
            while (pos < w->end) {
                uint32_t id = sh->ids[pos++];
                if (id == IST_CORPUS_EOL)
                    break;
                w->words++;
                since++;
                if (ist_sgns_keep(sh->keep, id, &w->rng)) {
                    w->sent[n++] = id;
                    if (n == SENT_MAX)
                        break;
                }
            }
            for (size_t i = 0; i < n; i++) {
                size_t r = win - ist_sgns_below(ist_sgns_rand(&w->rng), win);
                if (sh->kernel == IST_SGNS_FAST)
                    window_fast(w, n, i, r, lr);
                else
                    window_reference(w, n, i, r, lr);
            }
            w->trained += n;
            if (since >= PUBLISH_EVERY) {
                since = 0;
                lr = publish(w, last);
                if (atomic_load_explicit(&sh->stop, memory_order_relaxed))
                    break;
            }
        }
        lr = publish(w, last);
    }
    if (sh->n_hot)
        merge_hot(w);                /* whatever the last publication left */
    pthread_mutex_lock(&sh->lock);
    sh->finished++;
    pthread_cond_signal(&sh->wake);
    pthread_mutex_unlock(&sh->lock);
    return NULL;
}

static double
now_sec(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

/* The calling thread waits, reports progress every 0.25 s and passes on a stop request. */
static void
monitor(shared *sh, const ist_sgns_opts *o, double t0)
{
    uint64_t last_done = 0, last_n = 0;
    double last_loss = 0.0, last_t = t0;

    pthread_mutex_lock(&sh->lock);
    while (sh->finished < sh->nthreads) {
        struct timespec ts;
        clock_gettime(CLOCK_REALTIME, &ts);
        ts.tv_nsec += 250000000L;
        if (ts.tv_nsec >= 1000000000L) {
            ts.tv_sec++;
            ts.tv_nsec -= 1000000000L;
        }
        pthread_cond_timedwait(&sh->wake, &sh->lock, &ts);
        if (sh->finished >= sh->nthreads)
            break;
        if (ist_cancel_requested() && sh->fail == IST_OK) {
            sh->fail = IST_ERR_CANCELLED;
            atomic_store(&sh->stop, 1);
        }
        if (!o->progress || sh->fail != IST_OK)
            continue;
        double t = now_sec();
        ist_sgns_progress p;
        p.words_done = sh->words_done;
        p.fraction = (double)sh->words_done / (double)sh->words_total;
        p.words_per_sec = t > t0 ? (double)sh->words_done / (t - t0) : 0.0;
        double recent = t > last_t ? (double)(sh->words_done - last_done) / (t - last_t) : 0.0;
        double rate = recent > 0.0 ? recent : p.words_per_sec;
        p.eta_sec = rate > 0.0 ? (double)(sh->words_total - sh->words_done) / rate : 0.0;
        p.lr = current_lr(sh, sh->words_done);
        p.loss = sh->loss_n > last_n ? (sh->loss_sum - last_loss) / (double)(sh->loss_n - last_n)
                                     : 0.0;
        if (sh->words_done != last_done) {
            last_done = sh->words_done;
            last_t = t;
        }
        last_loss = sh->loss_sum;
        last_n = sh->loss_n;
        pthread_mutex_unlock(&sh->lock);
        int stop = o->progress(o->progress_ctx, &p);
        pthread_mutex_lock(&sh->lock);
        if (stop && sh->fail == IST_OK) {
            sh->fail = IST_ERR_CANCELLED;
            atomic_store(&sh->stop, 1);
        }
    }
    pthread_mutex_unlock(&sh->lock);
}

/* ---- setup ------------------------------------------------------------------------------ */

static ist_status
check_opts(const ist_sgns_opts *o, size_t n_ids, size_t vocab_size, ist_error *err)
{
    if (o->dim == 0 || o->dim > MAX_DIM)
        return ist_error_set(err, IST_ERR_INVALID, "dimension: expected 1 to %d, found %zu",
                             MAX_DIM, o->dim);
    if (o->window == 0 || o->window > MAX_WINDOW)
        return ist_error_set(err, IST_ERR_INVALID, "context window: expected 1 to %d, found %zu",
                             MAX_WINDOW, o->window);
    if (o->negatives == 0 || o->negatives > MAX_NEGATIVES)
        return ist_error_set(err, IST_ERR_INVALID, "noise samples: expected 1 to %d, found %zu",
                             MAX_NEGATIVES, o->negatives);
    if (o->epochs == 0 || o->epochs > 100000)
        return ist_error_set(err, IST_ERR_INVALID, "passes: expected 1 to 100000, found %zu",
                             o->epochs);
    if (o->threads == 0 || o->threads > MAX_THREADS)
        return ist_error_set(err, IST_ERR_INVALID, "threads: expected 1 to %d, found %zu",
                             MAX_THREADS, o->threads);
    if (!(o->lr_floor > 0.0 && o->lr_floor <= 1.0))
        return ist_error_set(err, IST_ERR_INVALID,
                             "learning-rate floor: expected a fraction in (0, 1], found %g",
                             o->lr_floor);
    if (!(o->lr0 > 0.0 && o->lr0 <= 10.0))
        return ist_error_set(err, IST_ERR_INVALID,
                             "learning rate: expected a number in (0, 10], found %g", o->lr0);
    if (!(o->subsample >= 0.0 && o->subsample <= 1.0))
        return ist_error_set(err, IST_ERR_INVALID,
                             "subsampling threshold: expected 0 to 1, found %g", o->subsample);
    if (o->kernel != IST_SGNS_FAST && o->kernel != IST_SGNS_REFERENCE)
        return ist_error_set(err, IST_ERR_INVALID, "unknown kernel %d", (int)o->kernel);
    if (vocab_size == 0 || vocab_size >= UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID,
                             "vocabulary size: expected 1 to %u words, found %zu",
                             UINT32_MAX - 1, vocab_size);
    if (n_ids == 0)
        return ist_error_set(err, IST_ERR_INVALID, "the token stream is empty");
    return IST_OK;
}

/* Count the words of the stream and check every id. */
static ist_status
scan_stream(const uint32_t *ids, size_t n, size_t vocab_size, uint64_t *words, ist_error *err)
{
    uint64_t c = 0;
    for (size_t i = 0; i < n; i++) {
        if (ids[i] == IST_CORPUS_EOL)
            continue;
        if (ids[i] >= vocab_size)
            return ist_error_set(err, IST_ERR_INVALID,
                                 "token %zu of the stream has id %u, expected below the "
                                 "vocabulary size %zu", i, ids[i], vocab_size);
        c++;
    }
    if (c == 0)
        return ist_error_set(err, IST_ERR_INVALID, "the token stream is empty (only line ends)");
    *words = c;
    return IST_OK;
}

typedef struct ranked {
    uint64_t count;
    uint32_t id;
} ranked;

static int
by_count_desc(const void *a, const void *b)
{
    const ranked *x = a, *y = b;
    if (x->count != y->count)
        return x->count < y->count ? 1 : -1;
    return (x->id > y->id) - (x->id < y->id);
}

/* A count from the environment (for measurements), or def when unset or not a number. */
static size_t
env_count(const char *name, size_t def, size_t max)
{
    const char *e = getenv(name);
    if (e && *e) {
        char *end;
        unsigned long long v = strtoull(e, &end, 10);
        if (*end == '\0')
            return v > max ? max : (size_t)v;
    }
    return def;
}

/* How many hot words get private rows: none on one thread (so that a one-thread run is the
 * plain algorithm, bit for bit), else HOT_ROWS or what ISTHMUS_SGNS_HOT asks for (0: plain
 * lock-free updates of the shared rows). */
static size_t
hot_rows_wanted(size_t threads, size_t vocab)
{
    size_t n = env_count("ISTHMUS_SGNS_HOT", HOT_ROWS, MAX_HOT_ROWS);
    if (threads < 2)
        return 0;
    return n < vocab ? n : vocab;
}

/* The n_hot most frequent words (ties: lower id first) and their slots. */
static ist_status
hot_setup(shared *sh, const uint64_t *counts, size_t vocab, size_t n_hot, ist_error *err)
{
    ranked *r;

    sh->n_hot = 0;
    if (n_hot == 0)
        return IST_OK;
    r = ist_malloc(vocab * sizeof *r);
    sh->hot_ids = ist_malloc(n_hot * sizeof *sh->hot_ids);
    sh->hot_slot = ist_malloc(vocab * sizeof *sh->hot_slot);
    if (!r || !sh->hot_ids || !sh->hot_slot) {
        ist_free(r);
        return ist_error_nomem(err);
    }
    for (size_t i = 0; i < vocab; i++) {
        r[i].count = counts[i];
        r[i].id = (uint32_t)i;
        sh->hot_slot[i] = -1;
    }
    qsort(r, vocab, sizeof *r, by_count_desc);
    for (size_t s = 0; s < n_hot; s++) {
        sh->hot_ids[s] = r[s].id;
        sh->hot_slot[r[s].id] = (int32_t)s;
    }
    ist_free(r);
    sh->n_hot = n_hot;
    sh->merge_every = env_count("ISTHMUS_SGNS_MERGE", MERGE_EVERY, 1000);
    if (sh->merge_every == 0)
        sh->merge_every = 1;
    return IST_OK;
}

/* This thread's copies of the hot rows, taken from the shared rows. */
static ist_status
hot_copies(worker *w, const shared *sh, ist_error *err)
{
    size_t bytes = sh->n_hot * sh->stride * sizeof(float);

    if (sh->n_hot == 0)
        return IST_OK;
    w->rep_in = ist_aligned_alloc(bytes);
    w->rep_out = ist_aligned_alloc(bytes);
    w->base_in = ist_aligned_alloc(bytes);
    w->base_out = ist_aligned_alloc(bytes);
    if (!w->rep_in || !w->rep_out || !w->base_in || !w->base_out)
        return ist_error_nomem(err);
    for (size_t s = 0; s < sh->n_hot; s++) {
        size_t off = s * sh->stride, row = (size_t)sh->hot_ids[s] * sh->stride;
        memcpy(w->rep_in + off, sh->in + row, sh->stride * sizeof(float));
        memcpy(w->rep_out + off, sh->out + row, sh->stride * sizeof(float));
    }
    memcpy(w->base_in, w->rep_in, bytes);
    memcpy(w->base_out, w->rep_out, bytes);
    return IST_OK;
}

static void
worker_free(worker *w)
{
    ist_aligned_free(w->rep_in), ist_aligned_free(w->rep_out);
    ist_aligned_free(w->base_in), ist_aligned_free(w->base_out);
    ist_free(w->xr), ist_free(w->yr), ist_free(w->xw), ist_free(w->yw), ist_free(w->dxr);
    ist_free(w->outs), ist_free(w->mult), ist_free(w->pre);
    ist_free(w->s), ist_free(w->g), ist_free(w->gt);
    ist_aligned_free(w->dx);
}

static ist_status
worker_alloc(worker *w, const shared *sh, ist_error *err)
{
    size_t m = 2 * sh->window, no = 1 + sh->negatives, rows = m > 1 ? m : 1;
    w->xr = ist_malloc(m * sizeof *w->xr);
    w->xw = ist_malloc(m * sizeof *w->xw);
    w->dxr = ist_malloc(m * sizeof *w->dxr);
    w->yr = ist_malloc(no * sizeof *w->yr);
    w->yw = ist_malloc(no * sizeof *w->yw);
    w->outs = ist_malloc(no * sizeof *w->outs);
    w->mult = ist_malloc(no * sizeof *w->mult);
    w->pre = ist_malloc(no * sizeof *w->pre);
    w->s = ist_malloc(m * no * sizeof *w->s);
    w->g = ist_malloc(m * no * sizeof *w->g);
    w->gt = ist_malloc(m * no * sizeof *w->gt);
    w->dx = ist_aligned_alloc(rows * sh->stride * sizeof *w->dx);
    if (!w->xr || !w->xw || !w->dxr || !w->yr || !w->yw || !w->outs || !w->mult || !w->pre ||
        !w->s || !w->g || !w->gt || !w->dx)
        return ist_error_nomem(err);
    for (size_t j = 0; j < m; j++)
        w->dxr[j] = w->dx + j * sh->stride;
    return IST_OK;
}

/* Thread t's part of the stream starts after the first line end at or past t * n / T. */
static size_t
part_start(const uint32_t *ids, size_t n, size_t t, size_t T)
{
    if (t == 0)
        return 0;
    if (t >= T)
        return n;
    size_t p = (size_t)((double)n * (double)t / (double)T), q = p;
    while (q < n && ids[q] != IST_CORPUS_EOL && q - p < 100000)
        q++;
    return q < n && ids[q] == IST_CORPUS_EOL ? q + 1 : p;
}

/* The threads share [lo, hi) of the stream. */
static void
set_parts(shared *sh, worker *ws, size_t lo, size_t hi)
{
    for (size_t t = 0; t < sh->nthreads; t++) {
        ws[t].begin = lo + part_start(sh->ids + lo, hi - lo, t, sh->nthreads);
        ws[t].end = lo + part_start(sh->ids + lo, hi - lo, t + 1, sh->nthreads);
    }
}

static ist_status
run_threads(shared *sh, worker *ws, const ist_sgns_opts *o, size_t n_ids, ist_error *err)
{
    double t0 = now_sec();
    ist_status rc = IST_OK;

    (void)n_ids;
    sh->finished = 0;
    for (size_t t = 0; t < sh->nthreads; t++) {
        if (pthread_create(&ws[t].thread, NULL, worker_main, &ws[t]) != 0) {
            rc = ist_error_sys(err, IST_ERR_NOMEM, NULL, "cannot start training thread %zu",
                               t + 1);
            pthread_mutex_lock(&sh->lock);
            sh->finished += sh->nthreads - t;     /* the ones never started */
            atomic_store(&sh->stop, 1);
            pthread_mutex_unlock(&sh->lock);
            break;
        }
        ws[t].started = true;
    }
    monitor(sh, o, t0);
    for (size_t t = 0; t < sh->nthreads; t++)
        if (ws[t].started)
            pthread_join(ws[t].thread, NULL);
    if (rc == IST_OK && (sh->fail == IST_ERR_CANCELLED || ist_cancel_requested()))
        rc = ist_error_set(err, IST_ERR_CANCELLED, "training cancelled");
    return rc;
}

static void
init_vectors(float *in, size_t rows, size_t dim, size_t stride, uint64_t seed)
{
    uint64_t rng = seed ^ 0x5851f42d4c957f2du;
    float scale = 1.0f / (float)dim;
    for (size_t r = 0; r < rows; r++)
        for (size_t c = 0; c < dim; c++)
            in[r * stride + c] =
                ((float)(ist_sgns_rand(&rng) >> 40) / 16777216.0f - 0.5f) * scale;
}

static bool
all_finite(const float *a, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (!isfinite(a[i]))
            return false;
    return true;
}

/* Fill the shared state of a run (the matrices and samplers are made by the caller). */
static void
shared_setup(shared *sh, const uint32_t *ids, const ist_sgns_opts *o, ist_matrix *in,
             ist_matrix *out, const uint32_t *keep, uint64_t words)
{
    sh->ids = ids;
    sh->dim = o->dim;
    sh->stride = in->stride;
    sh->window = o->window;
    sh->negatives = o->negatives;
    sh->epochs = o->epochs;
    sh->nthreads = o->threads;
    sh->in = in->data;
    sh->out = out->data;
    sh->keep = keep;
    sh->simd = ist_sgns_simd_pick(o->simd);
    sh->kernel = o->kernel;
    sh->lr0 = o->lr0;
    sh->lr_floor = o->lr_floor;
    sh->words_per_epoch = words;
    sh->words_total = words * o->epochs;
    sh->ranks = 1;
    sh->final_pass = true;
    sig_tables(sh);
    long page = sysconf(_SC_PAGESIZE);
    sh->page = page > 0 ? (size_t)page : 4096;
    atomic_init(&sh->stop, 0);
    pthread_mutex_init(&sh->lock, NULL);
    pthread_mutex_init(&sh->merge_lock, NULL);
    pthread_cond_init(&sh->wake, NULL);
}

/* x holds the mean over n ranks: base + n (mean - base) is base plus every rank's change;
 * it becomes the new base. */
static void
add_changes(float *x, float *base, size_t cells, float n)
{
    for (size_t i = 0; i < cells; i++) {
        x[i] = base[i] + n * (x[i] - base[i]);
        base[i] = x[i];
    }
}

/* After an exchange the threads' copies of the hot rows start again from the averages. */
static void
hot_refresh(worker *ws, const shared *sh)
{
    size_t bytes = sh->stride * sizeof(float);
    for (size_t t = 0; t < sh->nthreads && sh->n_hot; t++)
        for (size_t s = 0; s < sh->n_hot; s++) {
            size_t off = s * sh->stride, row = (size_t)sh->hot_ids[s] * sh->stride;
            memcpy(ws[t].rep_in + off, sh->in + row, bytes);
            memcpy(ws[t].rep_out + off, sh->out + row, bytes);
            memcpy(ws[t].base_in + off, sh->in + row, bytes);
            memcpy(ws[t].base_out + off, sh->out + row, bytes);
        }
}

/* Several ranks: the rank's share of the stream in `exchanges` slices per pass, each slice
 * run by the threads as a pass of its own, then both matrices averaged over the ranks. */
static ist_status
train_ranks(shared *sh, worker *ws, const ist_sgns_opts *o, size_t n_ids, size_t rows,
            ist_sgns_result *res, ist_error *err)
{
    size_t n = ist_cluster_size(), r = ist_cluster_rank(), epochs = sh->epochs;
    size_t lo = part_start(sh->ids, n_ids, r, n), hi = part_start(sh->ids, n_ids, r + 1, n);
    size_t cells = rows * sh->stride, x = o->exchanges ? o->exchanges : 1;
    uint64_t count = 0, sums[2];
    double xsec = 0.0, wsec = 0.0, losses[2];
    float *base = NULL;
    ist_status rc = IST_OK;

    if (o->merge == IST_SGNS_MERGE_CHANGES) {
        /* both matrices as they were after the last exchange */
        base = ist_aligned_alloc(2 * cells * sizeof *base);
        rc = ist_cluster_agree(base ? IST_OK : ist_error_nomem(err), err);
        if (rc != IST_OK) {
            ist_aligned_free(base);
            return rc;
        }
        memcpy(base, sh->in, cells * sizeof *base);
        memcpy(base + cells, sh->out, cells * sizeof *base);
    }
    sh->ranks = n;
    sh->epochs = 1;
    for (size_t e = 0; e < epochs && rc == IST_OK; e++) {
        for (size_t c = 0; c < x && rc == IST_OK; c++) {
            uint64_t before = sh->words_done, mine;
            set_parts(sh, ws, lo + part_start(sh->ids + lo, hi - lo, c, x),
                      lo + part_start(sh->ids + lo, hi - lo, c + 1, x));
            sh->final_pass = e + 1 == epochs;
            rc = run_threads(sh, ws, o, n_ids, err);
            double t = now_sec();
            rc = ist_cluster_agree(rc, err);
            wsec += now_sec() - t;
            t = now_sec();
            /* the schedule counted this rank's words n times; count every rank's once */
            mine = (sh->words_done - before) / n;
            if (rc == IST_OK)
                rc = ist_cluster_sum_u64(&mine, 1, err);
            sh->words_done = before + mine;
            if (rc == IST_OK)
                rc = ist_cluster_average(sh->in, cells, err);
            if (rc == IST_OK)
                rc = ist_cluster_average(sh->out, cells, err);
            if (rc == IST_OK && base) {
                add_changes(sh->in, base, cells, (float)n);
                add_changes(sh->out, base + cells, cells, (float)n);
            }
            hot_refresh(ws, sh);
            xsec += now_sec() - t;
            count++;
        }
    }
    sh->epochs = epochs;
    ist_aligned_free(base);
    sums[0] = sh->trained;
    sums[1] = sh->pairs;
    losses[0] = sh->last_epoch_loss;
    losses[1] = (double)sh->last_epoch_n;
    if (rc == IST_OK)
        rc = ist_cluster_sum_u64(sums, 2, err);
    if (rc == IST_OK)
        rc = ist_cluster_sum_f64(losses, 2, err);
    if (rc != IST_OK) {
        if (rc != IST_ERR_CANCELLED)
            ist_error_prefix(err, "training over %zu ranks", n);
        return rc;
    }
    sh->trained = sums[0];
    sh->pairs = sums[1];
    sh->last_epoch_loss = losses[0];
    sh->last_epoch_n = (uint64_t)losses[1];
    if (res) {
        res->exchange_count = count;
        res->exchange_seconds = xsec;
        res->wait_seconds = wsec;
        res->exchange_bytes = 2 * (uint64_t)cells * sizeof(float);
    }
    return IST_OK;
}

ist_status
ist_sgns_train(const uint32_t *ids, size_t n_ids, const uint64_t *counts, size_t vocab_size,
               const ist_sgns_opts *o, ist_matrix **in_vectors, ist_matrix **ctx_vectors,
               ist_sgns_result *res, ist_error *err)
{
    ist_matrix *in = NULL, *out = NULL;
    uint32_t *keep = NULL;
    worker *ws = NULL;
    shared *sh = NULL;
    uint64_t words = 0;
    ist_status rc;
    double t0 = now_sec();

    *in_vectors = NULL;
    if (ctx_vectors)
        *ctx_vectors = NULL;
    if (res)
        memset(res, 0, sizeof *res);
    if ((rc = check_opts(o, n_ids, vocab_size, err)) != IST_OK)
        return rc;
    if (o->keep_context && !ctx_vectors)
        return ist_error_set(err, IST_ERR_INVALID, "keep_context is set but ctx_vectors is NULL");
    if ((rc = scan_stream(ids, n_ids, vocab_size, &words, err)) != IST_OK)
        return rc;
    sh = ist_calloc(1, sizeof *sh);
    ws = ist_calloc(o->threads, sizeof *ws);
    if (!sh || !ws) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    if ((rc = ist_sgns_noise_build(counts, vocab_size, 0.75, &sh->noise, err)) != IST_OK ||
        (rc = ist_sgns_keep_table(counts, vocab_size, o->subsample, &keep, err)) != IST_OK ||
        (rc = ist_matrix_new(vocab_size, o->dim, &in, err)) != IST_OK ||
        (rc = ist_matrix_new(vocab_size, o->dim, &out, err)) != IST_OK)
        goto fail;
    shared_setup(sh, ids, o, in, out, keep, words);
    init_vectors(in->data, vocab_size, o->dim, in->stride, o->seed);
    if ((rc = hot_setup(sh, counts, vocab_size, hot_rows_wanted(o->threads, vocab_size), err))
        != IST_OK)
        goto fail_sync;
    for (size_t t = 0; t < o->threads; t++) {
        ws[t].sh = sh;
        ws[t].rng = o->seed * 0x9e3779b97f4a7c15u + (uint64_t)t * 0xd1b54a32d192ed03u + 1 +
                    (uint64_t)ist_cluster_rank() * 0xa0761d6478bd642fu;
        if ((rc = worker_alloc(&ws[t], sh, err)) != IST_OK ||
            (rc = hot_copies(&ws[t], sh, err)) != IST_OK)
            goto fail_sync;
    }
    if (ist_cluster_size() > 1)
        rc = train_ranks(sh, ws, o, n_ids, vocab_size, res, err);
    else {
        set_parts(sh, ws, 0, n_ids);
        rc = run_threads(sh, ws, o, n_ids, err);
    }
    if (rc != IST_OK)
        goto fail_sync;
    if (!all_finite(in->data, vocab_size * in->stride)) {
        rc = ist_error_set(err, IST_ERR_NUMERIC, "training diverged (the vectors hold NaN or "
                                                 "infinity): lower the learning rate");
        goto fail_sync;
    }
    if (res) {
        res->ranks = ist_cluster_size();
        res->words_seen = sh->words_done;
        res->words_trained = sh->trained;
        res->pairs = sh->pairs;
        res->seconds = now_sec() - t0;
        res->words_per_sec = res->seconds > 0 ? (double)sh->words_done / res->seconds : 0.0;
        res->final_loss = sh->last_epoch_n ? sh->last_epoch_loss / (double)sh->last_epoch_n : 0.0;
    }
    *in_vectors = in;
    if (o->keep_context)
        *ctx_vectors = out;
    else
        ist_matrix_free(out);
    in = out = NULL;
fail_sync:
    pthread_mutex_destroy(&sh->lock);
    pthread_mutex_destroy(&sh->merge_lock);
    pthread_cond_destroy(&sh->wake);
fail:
    if (ws)
        for (size_t t = 0; t < o->threads; t++)
            worker_free(&ws[t]);
    ist_free(ws);
    if (sh) {
        ist_sgns_noise_free(&sh->noise);
        ist_free(sh->hot_ids);
        ist_free(sh->hot_slot);
    }
    ist_free(sh);
    ist_free(keep);
    ist_matrix_free(in);
    ist_matrix_free(out);
    return rc;
}
