/* retrieve.c - tiled GEMM scoring with per-query top-k heaps, over threads. */
#include <isthmus/retrieve.h>

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>


#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "blas_int.h"
#include "cluster_int.h"
#include "error_int.h"

/* 512 x 2048 floats = 4 MiB per thread: the tile a thread has just written is
 * still in cache when its top-k scan reads it */
#define TILE_QUERIES_MAX 512
#define TILE_TARGETS_MAX 2048
#define TILE_TARGETS_MIN 16
#define THREADS_MAX 64

struct ist_topk {
    size_t rows, k;
    uint32_t *index;   /* rows * k */
    float *score;
};

typedef struct entry {
    float s;
    uint32_t j;
} entry;

typedef struct job {
    ist_cmatview q, t;
    size_t k, qb, tb, nqt, ntt;   /* tile sizes and tile counts */
    size_t first, last;           /* this rank's tiles [first, last): whole target blocks */
    float scale;
    const float *qsub, *tsub;
    atomic_size_t next;
    atomic_bool stop;
} job;

typedef struct worker {
    job *jb;
    entry *heaps;     /* q.rows * k */
    float *tile;      /* qb * tb */
    pthread_t tid;
    bool started;
} worker;

void
ist_retrieve_opts_init(ist_retrieve_opts *o)
{
    o->budget = IST_RETRIEVE_BUDGET_DEFAULT;
    o->threads = 0;
}

void
ist_search_opts_init(ist_search_opts *o)
{
    o->csls_k = IST_RETRIEVE_NEIGHBOURHOOD_DEFAULT;
    ist_retrieve_opts_init(&o->retrieve);
}

ist_status
ist_search_opts_check(const ist_search_opts *o, const char *who, ist_error *err)
{
    if (o->csls_k < 1 || o->csls_k > IST_CSLS_K_MAX)
        return ist_error_set(err, IST_ERR_INVALID,
                             "%s: expected a CSLS neighbourhood from 1 to %u, found %zu", who,
                             IST_CSLS_K_MAX, o->csls_k);
    if (o->retrieve.threads > IST_THREADS_MAX)
        return ist_error_set(err, IST_ERR_INVALID,
                             "%s: expected at most %u threads, found %u", who, IST_THREADS_MAX,
                             o->retrieve.threads);
    return IST_OK;
}

/* a is worse than b: lower score, or equal score and higher row */
static inline bool
worse(entry a, entry b)
{
    return a.s < b.s || (a.s == b.s && a.j > b.j);
}

/* Replace the root of a min-heap (worst kept first) and restore order. */
static void
heap_replace(entry *h, size_t k, entry e)
{
    size_t i = 0;
    for (;;) {
        size_t l = 2 * i + 1, r = l + 1, m = i;
        entry best = e;
        if (l < k && worse(h[l], best)) {
            m = l;
            best = h[l];
        }
        if (r < k && worse(h[r], best))
            m = r;
        if (m == i)
            break;
        h[i] = h[m];
        i = m;
    }
    h[i] = e;
}

/* Largest of 16 floats; written so the compiler can keep it in vector registers. */
static inline float
max16(const float *x)
{
    float m[8];
    for (int i = 0; i < 8; i++)
        m[i] = x[i] > x[i + 8] ? x[i] : x[i + 8];
    for (int i = 0; i < 4; i++)
        m[i] = m[i] > m[i + 4] ? m[i] : m[i + 4];
    m[0] = m[0] > m[2] ? m[0] : m[2];
    m[1] = m[1] > m[3] ? m[1] : m[3];
    return m[0] > m[1] ? m[0] : m[1];
}

static inline void
offer(entry *h, size_t k, float s, size_t j)
{
    if (s >= h[0].s) {
        entry e = {s, (uint32_t)j};
        if (worse(h[0], e))
            heap_replace(h, k, e);
    }
}

/* Plain scores: most blocks of 16 fall below the heap's worst and are skipped
 * after one vector maximum. */
static void
scan_plain(entry *h, size_t k, const float *row, size_t t0, size_t nt)
{
    size_t j = 0;
    for (; j + 16 <= nt; j += 16) {
        if (max16(row + j) < h[0].s)
            continue;
        for (size_t a = 0; a < 16; a++)
            offer(h, k, row[j + a], t0 + j + a);
    }
    for (; j < nt; j++)
        offer(h, k, row[j], t0 + j);
}

static void
scan_tile(const job *jb, entry *heaps, float *tile, size_t q0, size_t nq, size_t t0, size_t nt)
{
    size_t k = jb->k;
    for (size_t i = 0; i < nq; i++) {
        entry *h = heaps + (q0 + i) * k;
        float *row = tile + i * nt;
        float qs = jb->qsub ? jb->qsub[q0 + i] : 0.0f;
        if (jb->tsub || jb->scale != 1.0f || qs != 0.0f) {
            /* scale * dot - qsub - tsub, in place, then as plain scores */
            const float *ts = jb->tsub ? jb->tsub + t0 : NULL;
            for (size_t j = 0; j < nt; j++)
                row[j] = jb->scale * row[j] - qs - (ts ? ts[j] : 0.0f);
        }
        scan_plain(h, k, row, t0, nt);
    }
}

static void *
work(void *arg)
{
    worker *w = arg;
    job *jb = w->jb;
    size_t d = jb->q.cols;

    for (;;) {
        if (atomic_load(&jb->stop))
            break;
        size_t tile = jb->first + atomic_fetch_add(&jb->next, 1);
        if (tile >= jb->last)
            break;
        if (ist_cancel_requested()) {
            atomic_store(&jb->stop, true);
            break;
        }
        /* target-major order: neighbouring tiles share the target block */
        size_t tt = tile / jb->nqt, qt = tile % jb->nqt;
        size_t q0 = qt * jb->qb, t0 = tt * jb->tb;
        size_t nq = jb->q.rows - q0 < jb->qb ? jb->q.rows - q0 : jb->qb;
        size_t nt = jb->t.rows - t0 < jb->tb ? jb->t.rows - t0 : jb->tb;
        cblas_sgemm(CblasRowMajor, CblasNoTrans, CblasTrans, (int)nq, (int)nt, (int)d, 1.0f,
                    jb->q.data + q0 * jb->q.stride, (int)jb->q.stride,
                    jb->t.data + t0 * jb->t.stride, (int)jb->t.stride, 0.0f, w->tile, (int)nt);
        scan_tile(jb, w->heaps, w->tile, q0, nq, t0, nt);
    }
    return NULL;
}

static unsigned
thread_count(const ist_retrieve_opts *o, size_t tiles)
{
    long n = o->threads ? (long)o->threads : sysconf(_SC_NPROCESSORS_ONLN);
    if (n < 1)
        n = 1;
    if (n > THREADS_MAX)
        n = THREADS_MAX;
    if ((size_t)n > tiles)
        n = (long)tiles;
    return (unsigned)(n < 1 ? 1 : n);
}

static int
cmp_entry_desc(const void *a, const void *b)
{
    const entry *x = a, *y = b;
    return worse(*x, *y) ? 1 : worse(*y, *x) ? -1 : 0;
}

static void
merge_into(ist_topk *tk, worker *ws, unsigned nw, size_t k)
{
    entry *tmp = (entry *)ws[0].tile;   /* room for nw * k entries: checked by caller */
    for (size_t i = 0; i < tk->rows; i++) {
        size_t n = 0;
        for (unsigned w = 0; w < nw; w++)
            for (size_t a = 0; a < k; a++)
                tmp[n++] = ws[w].heaps[i * k + a];
        qsort(tmp, n, sizeof *tmp, cmp_entry_desc);
        for (size_t a = 0; a < k; a++) {
            bool empty = tmp[a].j == UINT32_MAX;
            tk->index[i * k + a] = tmp[a].j;
            tk->score[i * k + a] = empty ? -INFINITY : tmp[a].s;
        }
    }
}

static ist_status
plan_tiles(job *jb, const ist_retrieve_opts *o, unsigned *nthreads, ist_error *err)
{
    size_t m = jb->q.rows, n = jb->t.rows;
    unsigned nt = thread_count(o, (size_t)-1);
    size_t per = o->budget / nt / sizeof(float);

    jb->qb = m < TILE_QUERIES_MAX ? m : TILE_QUERIES_MAX;
    while (jb->qb > 1 && per / jb->qb < TILE_TARGETS_MIN)
        jb->qb /= 2;
    jb->tb = per / jb->qb;
    if (jb->tb > TILE_TARGETS_MAX)
        jb->tb = TILE_TARGETS_MAX;
    if (jb->tb > n)
        jb->tb = n;
    if (jb->tb < 1 || per < jb->qb)
        return ist_error_set(err, IST_ERR_INVALID,
                             "retrieval: a memory budget of %zu bytes is too small", o->budget);
    jb->nqt = (m + jb->qb - 1) / jb->qb;
    jb->ntt = (n + jb->tb - 1) / jb->tb;
    /* in a job of several ranks each takes whole target blocks, planned as for the whole
     * problem, so every score is computed exactly as one process would */
    size_t tt0, tt1;
    ist_cluster_share(jb->ntt, &tt0, &tt1);
    jb->first = tt0 * jb->nqt;
    jb->last = tt1 * jb->nqt;
    *nthreads = thread_count(o, jb->last - jb->first);
    return IST_OK;
}

static void
free_workers(worker *ws, unsigned nw)
{
    for (unsigned w = 0; w < nw; w++) {
        ist_aligned_free(ws[w].tile);
        ist_free(ws[w].heaps);
    }
}

static ist_status
alloc_workers(worker *ws, unsigned nw, job *jb, ist_error *err)
{
    size_t hn, tn, tbytes;
    if (ist_mul_size(jb->q.rows, jb->k * sizeof(entry), &hn) ||
        ist_mul_size(jb->qb, jb->tb * sizeof(float), &tn))
        return ist_error_set(err, IST_ERR_INVALID, "retrieval: problem too large");
    tbytes = tn;
    if (tbytes < (size_t)nw * jb->k * sizeof(entry))
        tbytes = (size_t)nw * jb->k * sizeof(entry);   /* tile 0 doubles as merge space */
    for (unsigned w = 0; w < nw; w++) {
        ws[w].jb = jb;
        ws[w].heaps = ist_malloc(hn ? hn : 1);
        ws[w].tile = ist_aligned_alloc(tbytes);
        if (!ws[w].heaps || !ws[w].tile)
            return ist_error_nomem(err);
        for (size_t i = 0; i < jb->q.rows * jb->k; i++) {
            ws[w].heaps[i].s = -INFINITY;
            ws[w].heaps[i].j = UINT32_MAX;
        }
    }
    return IST_OK;
}

static ist_status
run_workers(worker *ws, unsigned nw, ist_error *err)
{
    unsigned started = 0;
    /* our threads are the parallelism, also when there is one: a tile multiplied by a
     * threaded BLAS is split differently and its scores differ in the last bits, so
     * --threads=1 and --threads=2 would not give the same result file */
    ist_blas_serial();
    for (unsigned w = 1; w < nw; w++) {
        if (pthread_create(&ws[w].tid, NULL, work, &ws[w]) != 0)
            break;   /* fewer helpers; the others take their tiles */
        ws[w].started = true;
        started++;
    }
    work(&ws[0]);
    for (unsigned w = 1; w < nw; w++)
        if (ws[w].started)
            pthread_join(ws[w].tid, NULL);
    (void)started;
    if (atomic_load(&ws[0].jb->stop))
        return ist_error_set(err, IST_ERR_CANCELLED, "retrieval cancelled");
    return IST_OK;
}

ist_status
ist_retrieve_topk(ist_cmatview q, ist_cmatview t, size_t k, float scale, const float *qsub,
                  const float *tsub, const ist_retrieve_opts *opts, ist_topk **out,
                  ist_error *err)
{
    ist_retrieve_opts dflt;
    worker ws[THREADS_MAX];
    unsigned nw = 0;
    ist_topk *tk = NULL;
    ist_status rc;
    job jb;

    *out = NULL;
    if (!opts) {
        ist_retrieve_opts_init(&dflt);
        opts = &dflt;
    }
    if (k == 0 || q.cols != t.cols || t.rows >= UINT32_MAX || q.cols == 0)
        return ist_error_set(err, IST_ERR_INVALID,
                             "retrieval: expected k >= 1 and equal dimensions, found k %zu, "
                             "%zu and %zu columns", k, q.cols, t.cols);
    memset(&jb, 0, sizeof jb);
    memset(ws, 0, sizeof ws);
    jb.q = q;
    jb.t = t;
    jb.k = k;
    jb.scale = scale;
    jb.qsub = qsub;
    jb.tsub = tsub;
    atomic_init(&jb.next, 0);
    atomic_init(&jb.stop, false);
    tk = ist_calloc(1, sizeof *tk);
    if (!tk)
        return ist_error_nomem(err);
    tk->rows = q.rows;
    tk->k = k;
    tk->index = ist_malloc(q.rows * k * sizeof *tk->index + 1);
    tk->score = ist_malloc(q.rows * k * sizeof *tk->score + 1);
    if (!tk->index || !tk->score) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    if (q.rows == 0)
        goto done;
    if (t.rows == 0) {
        for (size_t i = 0; i < q.rows * k; i++) {
            tk->index[i] = UINT32_MAX;
            tk->score[i] = -INFINITY;
        }
        goto done;
    }
    rc = plan_tiles(&jb, opts, &nw, err);
    if (rc != IST_OK)
        goto fail;
    rc = alloc_workers(ws, nw, &jb, err);
    if (rc == IST_OK)
        rc = run_workers(ws, nw, err);
    rc = ist_cluster_agree(rc, err);
    if (rc != IST_OK)
        goto fail;
    merge_into(tk, ws, nw, k);
    free_workers(ws, nw);
    nw = 0;
    rc = ist_cluster_merge_topk(tk->score, tk->index, tk->rows, k, err);
    if (rc != IST_OK)
        goto fail;
done:
    *out = tk;
    return IST_OK;
fail:
    free_workers(ws, nw);
    ist_topk_free(tk);
    return rc;
}

ist_status
ist_retrieve_neighbourhood(ist_cmatview q, ist_cmatview t, size_t k,
                           const ist_retrieve_opts *opts, float *r, ist_error *err)
{
    ist_topk *tk;
    ist_status rc = ist_retrieve_topk(q, t, k, 1.0f, NULL, NULL, opts, &tk, err);

    if (rc != IST_OK)
        return rc;
    for (size_t i = 0; i < q.rows; i++) {
        double s = 0;
        size_t n = 0;
        for (size_t a = 0; a < k; a++)
            if (tk->index[i * k + a] != UINT32_MAX) {
                s += tk->score[i * k + a];
                n++;
            }
        r[i] = n ? (float)(s / (double)n) : 0.0f;
    }
    ist_topk_free(tk);
    return IST_OK;
}

ist_status
ist_retrieve_rank(ist_cmatview q, ist_cmatview source, ist_cmatview t, ist_retrieval method,
                  size_t k, size_t nb, const ist_retrieve_opts *opts, ist_topk **out,
                  ist_error *err)
{
    float *rt = NULL, *rs = NULL;
    ist_status rc;

    *out = NULL;
    if (method == IST_RETRIEVAL_COSINE)
        return ist_retrieve_topk(q, t, k, 1.0f, NULL, NULL, opts, out, err);
    if (nb == 0 || source.cols != t.cols)
        return ist_error_set(err, IST_ERR_INVALID,
                             "csls: expected a neighbourhood >= 1 and equal dimensions");
    rt = ist_malloc(q.rows * sizeof *rt + 1);
    rs = ist_malloc(t.rows * sizeof *rs + 1);
    if (!rt || !rs) {
        rc = ist_error_nomem(err);
        goto done;
    }
    rc = ist_retrieve_neighbourhood(q, t, nb, opts, rt, err);
    if (rc == IST_OK)
        rc = ist_retrieve_neighbourhood(t, source, nb, opts, rs, err);
    if (rc == IST_OK)
        rc = ist_retrieve_topk(q, t, k, 2.0f, rt, rs, opts, out, err);
done:
    ist_free(rt);
    ist_free(rs);
    return rc;
}

void
ist_topk_free(ist_topk *tk)
{
    if (!tk)
        return;
    ist_free(tk->index);
    ist_free(tk->score);
    ist_free(tk);
}

size_t
ist_topk_rows(const ist_topk *tk)
{
    return tk->rows;
}

size_t
ist_topk_k(const ist_topk *tk)
{
    return tk->k;
}

const uint32_t *
ist_topk_index(const ist_topk *tk, size_t i)
{
    return tk->index + i * tk->k;
}

const float *
ist_topk_score(const ist_topk *tk, size_t i)
{
    return tk->score + i * tk->k;
}
