/* sgns.c - skip-gram with negative sampling: options, their checks, the setup of a run, its
 * threads and ranks (the walk and the kernels are in sgns_walk.c, the samplers in
 * sgns_sample.c; formulas and citations in include/isthmus/sgns.h and docs/methods.md). */
#include <isthmus/sgns.h>

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "cluster_int.h"
#include "error_int.h"
#include "matrix_int.h"
#include "sgns_run_int.h"
#include "train_part_int.h"

#define MAX_THREADS 256
#define MAX_DIM 10000
#define MAX_WINDOW 1000
#define MAX_NEGATIVES 1000
#define MAX_HOT_ROWS 65536     /* words whose rows each thread may keep a private copy of
                                * (none by default: measured slower here, docs/performance.md) */
#define MAX_HOT_MERGE 1000     /* publications between merges of the private rows */

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
    if (o->parallel != IST_SGNS_PARALLEL_AUTO && o->parallel != IST_SGNS_PARALLEL_COPIES &&
        o->parallel != IST_SGNS_PARALLEL_SHARED)
        return ist_error_set(err, IST_ERR_INVALID, "unknown way of sharing the threads' work %d",
                             (int)o->parallel);
    if (o->hot_rows > MAX_HOT_ROWS || o->hot_merge > MAX_HOT_MERGE)
        return ist_error_set(err, IST_ERR_INVALID, "hot rows: expected 0 to %d words merged "
                             "every 0 to %d publications, found %zu every %zu", MAX_HOT_ROWS,
                             MAX_HOT_MERGE, o->hot_rows, o->hot_merge);
    if (o->exchanges > 1000)
        return ist_error_set(err, IST_ERR_INVALID, "exchanges per pass: expected 1 to 1000, "
                             "found %zu", o->exchanges);
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

/* How many hot words get private rows: none on one thread (so that a one-thread run is the
 * plain algorithm, bit for bit) or with copies, else what hot_rows asks for (0: plain
 * lock-free updates of the shared rows). */
static size_t
hot_rows_wanted(size_t threads, size_t vocab, bool copies, size_t hot_rows)
{
    if (threads < 2 || copies)
        return 0;
    return hot_rows < vocab ? hot_rows : vocab;
}

/* The n_hot most frequent words (ties: lower id first) and their slots. */
static ist_status
hot_setup(shared *sh, const uint64_t *counts, size_t vocab, size_t n_hot, size_t merge,
          ist_error *err)
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
    sh->merge_every = merge ? merge : 1;
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

/* Whether the threads of this run train copies of their own (IST_SGNS_PARALLEL_COPIES). */
static bool
copies_wanted(const ist_sgns_opts *o, size_t vocab, size_t stride)
{
    if (o->threads < 2 || ist_cluster_size() > 1 || o->parallel == IST_SGNS_PARALLEL_SHARED)
        return false;
    if (o->parallel == IST_SGNS_PARALLEL_COPIES)
        return true;
    return (uint64_t)o->threads * 2 * vocab * stride * sizeof(float) <= IST_SGNS_COPIES_BUDGET;
}

/* The matrices a thread trains: the shared ones, or copies of them. */
static ist_status
worker_matrices(worker *w, const shared *sh, size_t vocab, ist_error *err)
{
    size_t bytes = vocab * sh->stride * sizeof(float);

    w->in = sh->in;
    w->out = sh->out;
    if (!sh->copies)
        return IST_OK;
    w->own_in = ist_aligned_alloc(bytes);
    w->own_out = ist_aligned_alloc(bytes);
    if (!w->own_in || !w->own_out)
        return ist_error_set(err, IST_ERR_NOMEM, "out of memory for the threads' copies of the "
                             "vectors (%.1f MB each): use fewer threads or parallel = shared",
                             2.0 * (double)bytes / 1e6);
    memcpy(w->own_in, sh->in, bytes);
    memcpy(w->own_out, sh->out, bytes);
    w->in = w->own_in;
    w->out = w->own_out;
    return IST_OK;
}

static void
worker_free(worker *w)
{
    ist_aligned_free(w->own_in), ist_aligned_free(w->own_out);
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

/* A part of the stream for a thread or a rank (a line may be cut: see train_part_int.h). */
static size_t
part_start(const uint32_t *ids, size_t n, size_t t, size_t T)
{
    return ist_train_part_start(ids, n, t, T, false);
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
    ist_status rc = IST_OK;

    (void)n_ids;
    sh->finished = 0;
    sh->lr_start = ist_sgns_current_lr(sh, sh->words_done);
    for (size_t t = 0; t < sh->nthreads; t++) {
        if (pthread_create(&ws[t].thread, NULL, ist_sgns_worker_main, &ws[t]) != 0) {
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
    ist_sgns_monitor(sh, o);
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
    ist_sgns_sig_tables(sh);
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
            double t = ist_sgns_now();
            rc = ist_cluster_agree(rc, err);
            wsec += ist_sgns_now() - t;
            t = ist_sgns_now();
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
            xsec += ist_sgns_now() - t;
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

/* Combine the threads' copies in thread order (deterministic), as o->merge says, into the
 * shared matrices (which hold the state at the last combination), then restart every copy
 * from the result. */
static void
combine_copies(shared *sh, worker *ws, size_t cells, int merge)
{
    size_t T = sh->nthreads;
    float inv = 1.0f / (float)T;

    for (int m = 0; m < 2; m++) {
        float *x = m ? sh->out : sh->in;
        for (size_t i = 0; i < cells; i++) {
            float base = x[i], acc = merge == IST_SGNS_MERGE_MEAN ? 0.0f : base;
            for (size_t t = 0; t < T; t++) {
                float v = (m ? ws[t].out : ws[t].in)[i];
                acc += merge == IST_SGNS_MERGE_MEAN ? v : v - base;
            }
            if (merge == IST_SGNS_MERGE_MEAN)
                acc *= inv;
            x[i] = acc;
        }
        for (size_t t = 0; t < T; t++)
            memcpy(m ? ws[t].out : ws[t].in, x, cells * sizeof *x);
    }
}

/* Copies: the stream in `exchanges` slices per pass, each slice shared by the threads as a
 * pass of its own on their own matrices, then the copies combined. */
static ist_status
train_copies(shared *sh, worker *ws, const ist_sgns_opts *o, size_t n_ids, size_t rows,
             ist_sgns_result *res, ist_error *err)
{
    size_t epochs = sh->epochs, x = o->exchanges ? o->exchanges : 1, cells = rows * sh->stride;
    uint64_t count = 0;
    double xsec = 0.0;
    ist_status rc = IST_OK;

    sh->epochs = 1;
    for (size_t e = 0; e < epochs && rc == IST_OK; e++) {
        for (size_t c = 0; c < x && rc == IST_OK; c++) {
            set_parts(sh, ws, part_start(sh->ids, n_ids, c, x),
                      part_start(sh->ids, n_ids, c + 1, x));
            sh->final_pass = e + 1 == epochs;
            sh->words_at_slice = sh->words_done;
            for (size_t t = 0; t < sh->nthreads; t++)
                ws[t].slice_words = 0;
            rc = run_threads(sh, ws, o, n_ids, err);
            if (rc != IST_OK)
                break;
            double t0 = ist_sgns_now();
            combine_copies(sh, ws, cells, o->merge);
            xsec += ist_sgns_now() - t0;
            count++;
        }
    }
    sh->epochs = epochs;
    for (size_t t = 0; t < sh->nthreads; t++) {
        sh->last_epoch_loss += ws[t].own_loss;
        sh->last_epoch_n += ws[t].own_loss_n;
    }
    if (res && rc == IST_OK) {
        res->thread_copies = true;
        res->exchange_count = count;
        res->exchange_seconds = xsec;
    }
    return rc;
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
    double t0 = ist_sgns_now();

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
    sh->t_start = t0;
    sh->copies = copies_wanted(o, vocab_size, in->stride);
    init_vectors(in->data, vocab_size, o->dim, in->stride, o->seed);
    if ((rc = hot_setup(sh, counts, vocab_size,
                        hot_rows_wanted(o->threads, vocab_size, sh->copies, o->hot_rows),
                        o->hot_merge, err)) != IST_OK)
        goto fail_sync;
    for (size_t t = 0; t < o->threads; t++) {
        ws[t].sh = sh;
        ws[t].rng = o->seed * 0x9e3779b97f4a7c15u + (uint64_t)t * 0xd1b54a32d192ed03u + 1 +
                    (uint64_t)ist_cluster_rank() * 0xa0761d6478bd642fu;
        if ((rc = worker_alloc(&ws[t], sh, err)) != IST_OK ||
            (rc = worker_matrices(&ws[t], sh, vocab_size, err)) != IST_OK ||
            (rc = hot_copies(&ws[t], sh, err)) != IST_OK)
            goto fail_sync;
    }
    if (ist_cluster_size() > 1)
        rc = train_ranks(sh, ws, o, n_ids, vocab_size, res, err);
    else if (sh->copies)
        rc = train_copies(sh, ws, o, n_ids, vocab_size, res, err);
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
        res->seconds = ist_sgns_now() - t0;
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
