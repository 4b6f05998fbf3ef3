/* sgns_walk.c - the threads of a skip-gram run: the walk over their part of the stream, the
 * two update kernels (one window at a time), the private rows of hot words, and the
 * calling thread's progress monitor. */
#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <time.h>

#include <isthmus/cancel.h>

#include "sgns_run_int.h"

void
ist_sgns_sig_tables(shared *sh)
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

double
ist_sgns_current_lr(const shared *sh, uint64_t done)
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
    return w->in + (size_t)id * sh->stride;
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
    return w->out + (size_t)id * sh->stride;
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
    if (last_epoch && sh->copies) {
        w->own_loss += w->loss;
        w->own_loss_n += w->loss_n;
    } else if (last_epoch) {
        sh->last_epoch_loss += w->loss;
        sh->last_epoch_n += w->loss_n;
    }
    if (sh->copies) {
        w->slice_words += w->words;
        lr = ist_sgns_current_lr(sh, sh->words_at_slice + w->slice_words * sh->nthreads);
    } else {
        lr = ist_sgns_current_lr(sh, sh->words_done);
    }
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

void *
ist_sgns_worker_main(void *arg)
{
    worker *w = arg;
    shared *sh = w->sh;
    float lr = (float)sh->lr_start;   /* lr0 at the start; a slice of a rank's share goes on
                                       * from there */
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

double
ist_sgns_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

/* The calling thread waits, reports progress every 0.25 s and passes on a stop request. */
void
ist_sgns_monitor(shared *sh, const ist_sgns_opts *o)
{
    const double t0 = sh->t_start;
    uint64_t last_done, last_n;
    double last_loss, last_t = ist_sgns_now();

    pthread_mutex_lock(&sh->lock);
    /* this run may be one slice of several: the recent rate and loss start from here */
    last_done = sh->words_done;
    last_n = sh->loss_n;
    last_loss = sh->loss_sum;
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
        double t = ist_sgns_now();
        ist_sgns_progress p;
        p.words_done = sh->words_done;
        p.fraction = (double)sh->words_done / (double)sh->words_total;
        p.words_per_sec = t > t0 ? (double)sh->words_done / (t - t0) : 0.0;
        double recent = t > last_t ? (double)(sh->words_done - last_done) / (t - last_t) : 0.0;
        double rate = recent > 0.0 ? recent : p.words_per_sec;
        p.eta_sec = rate > 0.0 ? (double)(sh->words_total - sh->words_done) / rate : 0.0;
        p.lr = ist_sgns_current_lr(sh, sh->words_done);
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
