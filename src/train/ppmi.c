/* ppmi.c - count-based vectors: PPMI with context-distribution smoothing of the windowed
 * co-occurrence counts (counted in ppmi_count.c), randomized truncated SVD, the whole run
 * (methods and citations in include/isthmus/ppmi.h and docs/methods.md). */
#include <isthmus/ppmi.h>

#include <lapacke.h>
#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "blas_int.h"
#include "error_int.h"
#include "ppmi_int.h"

#define MAX_THREADS 256
#define MAX_DIM 10000
#define MAX_WINDOW 1000

void
ist_ppmi_opts_init(ist_ppmi_opts *o)
{
    memset(o, 0, sizeof *o);
    o->dim = 300;
    o->window = 10;
    o->weighting = IST_PPMI_LINEAR;
    o->alpha = 0.75;
    o->shift = 1.0;
    o->power = 0.5;
    o->oversample = 20;
    o->power_iters = 4;
    o->threads = 1;
    o->seed = 1;
    o->buffer_mb = 256;
}

static double
now_sec(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}


/* ---- progress ------------------------------------------------------------------------------ */

int
ist_ppmi_watch_tick(ist_ppmi_watch *wt, double part, uint64_t pairs)
{
    if (ist_cancel_requested())
        return 1;
    if (!wt->o->progress)
        return 0;
    double t = now_sec();
    if (t - wt->last_call < 0.25)
        return 0;
    wt->last_call = t;
    ist_ppmi_progress p;
    p.stage = wt->stage;
    p.fraction = wt->base + wt->span * (part < 0 ? 0 : part > 1 ? 1 : part);
    p.pairs = pairs;
    p.eta_sec = p.fraction > 0.02 ? (t - wt->t0) * (1.0 - p.fraction) / p.fraction : 0.0;
    return wt->o->progress(wt->o->progress_ctx, &p);
}

void
ist_ppmi_sleep_short(void)
{
    struct timespec ts = {0, 20 * 1000 * 1000};
    nanosleep(&ts, NULL);
}


/* ---- the PPMI matrix ----------------------------------------------------------------------- */

/* Rows of the symmetric count matrix in compressed form; va holds PPMI(row, col) and vt holds
 * PPMI(col, row), so the same structure serves products with the matrix and its transpose. */
typedef struct csr {
    size_t n;
    size_t *ptr;                     /* n + 1 */
    uint32_t *col;
    float *va, *vt;
} csr;

static void
csr_free(csr *m)
{
    ist_free(m->ptr), ist_free(m->col), ist_free(m->va), ist_free(m->vt);
    memset(m, 0, sizeof *m);
}

static ist_status
build_ppmi(const uint64_t *keys, const uint64_t *vals, size_t np, size_t n,
           const ist_ppmi_opts *o, csr *m, uint64_t *positive, ist_error *err)
{
    uint64_t *rows = ist_calloc(n ? n : 1, sizeof *rows);
    double *lr = ist_malloc((n ? n : 1) * sizeof *lr);
    size_t *fill = NULL;
    ist_status rc = IST_OK;

    memset(m, 0, sizeof *m);
    m->n = n;
    m->ptr = ist_calloc(n + 1, sizeof *m->ptr);
    if (!rows || !lr || !m->ptr) {
        rc = ist_error_nomem(err);
        goto done;
    }
    for (size_t i = 0; i < np; i++) {
        uint64_t a = keys[i] / n, b = keys[i] % n;
        rows[a] += vals[i];
        m->ptr[a + 1]++;
        if (a != b) {
            rows[b] += vals[i];
            m->ptr[b + 1]++;
        }
    }
    for (size_t i = 0; i < n; i++)
        m->ptr[i + 1] += m->ptr[i];
    size_t nnz = m->ptr[n];
    m->col = ist_malloc((nnz ? nnz : 1) * sizeof *m->col);
    m->va = ist_malloc((nnz ? nnz : 1) * sizeof *m->va);
    m->vt = ist_malloc((nnz ? nnz : 1) * sizeof *m->vt);
    fill = ist_malloc((n ? n : 1) * sizeof *fill);
    if (!m->col || !m->va || !m->vt || !fill) {
        rc = ist_error_nomem(err);
        goto done;
    }
    double z = 0.0;
    for (size_t i = 0; i < n; i++) {
        z += rows[i] ? pow((double)rows[i], o->alpha) : 0.0;
        lr[i] = rows[i] ? log((double)rows[i]) : 0.0;
        fill[i] = m->ptr[i];
    }
    if (!(z > 0.0)) {
        rc = ist_error_set(err, IST_ERR_NUMERIC, "no two words co-occur within the context "
                                                 "window: nothing to factor");
        goto done;
    }
    double base = log(z) - log(o->shift), al = o->alpha;
    uint64_t pos = 0;
    /* keys ascend by (lo, hi): every row receives its columns in ascending order */
    for (size_t i = 0; i < np; i++) {
        uint64_t a = keys[i] / n, b = keys[i] % n;
        double lc = log((double)vals[i]) + base;
        double ab = lc - lr[a] - al * lr[b];   /* PPMI(a, b) before clipping */
        double ba = lc - lr[b] - al * lr[a];   /* PPMI(b, a) */
        float fab = ab > 0.0 ? (float)ab : 0.0f, fba = ba > 0.0 ? (float)ba : 0.0f;
        size_t p = fill[a]++;
        m->col[p] = (uint32_t)b;
        m->va[p] = fab;
        m->vt[p] = fba;
        pos += fab > 0.0f;
        if (a != b) {
            p = fill[b]++;
            m->col[p] = (uint32_t)a;
            m->va[p] = fba;
            m->vt[p] = fab;
            pos += fba > 0.0f;
        }
    }
    *positive = pos;
done:
    ist_free(rows), ist_free(lr), ist_free(fill);
    if (rc != IST_OK)
        csr_free(m);
    return rc;
}

/* ---- products with the sparse matrix, on the library's threads ---------------------------- */

typedef struct spmm_job {
    const csr *m;
    bool transpose;
    const double *x;
    double *y;
    size_t l, r0, r1;
    const atomic_int *stop;
    atomic_int finished;
    pthread_t thread;
} spmm_job;

static void *
spmm_main(void *arg)
{
    spmm_job *j = arg;
    const csr *m = j->m;
    const float *v = j->transpose ? m->vt : m->va;
    size_t l = j->l;
    for (size_t i = j->r0; i < j->r1; i++) {
        if ((i & 255) == 0 && atomic_load(j->stop))
            break;
        double *restrict y = j->y + i * l;
        for (size_t c = 0; c < l; c++)
            y[c] = 0.0;
        for (size_t k = m->ptr[i]; k < m->ptr[i + 1]; k++) {
            double a = v[k];
            if (a == 0.0)
                continue;
            const double *restrict x = j->x + (size_t)m->col[k] * l;
#pragma omp simd
            for (size_t c = 0; c < l; c++)
                y[c] += a * x[c];
        }
    }
    atomic_store(&j->finished, 1);
    return NULL;
}

/* y = A x (or A^T x); x, y: n x l row-major. Rows are split by stored entries. */
static ist_status
spmm(const csr *m, bool transpose, const double *x, double *y, size_t l, size_t threads,
     ist_ppmi_watch *wt, double part0, double part1, ist_error *err)
{
    spmm_job js[MAX_THREADS];
    atomic_int stop;
    size_t T = threads, nnz = m->ptr[m->n], r = 0;
    ist_status rc = IST_OK;
    bool cancelled = false;

    atomic_init(&stop, 0);
    for (size_t t = 0; t < T; t++) {
        size_t goal = (size_t)((double)nnz * (double)(t + 1) / (double)T);
        size_t r1 = r;
        while (r1 < m->n && (m->ptr[r1] < goal || t + 1 == T))
            r1++;
        js[t] = (spmm_job){m, transpose, x, y, l, r, r1, &stop, 0, 0};
        atomic_init(&js[t].finished, 0);
        r = r1;
    }
    size_t started = 0;
    for (; started < T; started++)
        if (pthread_create(&js[started].thread, NULL, spmm_main, &js[started]) != 0) {
            rc = ist_error_sys(err, IST_ERR_NOMEM, NULL, "cannot start thread %zu",
                               started + 1);
            atomic_store(&stop, 1);
            break;
        }
    for (;;) {
        size_t running = 0;
        for (size_t t = 0; t < started; t++)
            running += !atomic_load(&js[t].finished);
        if (running == 0)
            break;
        ist_ppmi_sleep_short();
        if (!cancelled && ist_ppmi_watch_tick(wt, (part0 + part1) / 2, 0)) {
            cancelled = true;
            atomic_store(&stop, 1);
        }
    }
    for (size_t t = 0; t < started; t++)
        pthread_join(js[t].thread, NULL);
    if (rc == IST_OK && (cancelled || ist_ppmi_watch_tick(wt, part1, 0)))
        rc = ist_error_set(err, IST_ERR_CANCELLED, "training cancelled");
    return rc;
}

/* ---- randomized SVD ---------------------------------------------------------------------- */

static inline uint64_t
mix64(uint64_t *s)
{
    uint64_t z = (*s += 0x9e3779b97f4a7c15u);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

/* Standard normal numbers by the Box-Muller transform (one per pair of uniforms). */
static void
gaussian_fill(double *a, size_t n, uint64_t seed)
{
    uint64_t s = seed * 0x2545f4914f6cdd1du + 0x51ed270b2a6c3f4bu;
    for (size_t i = 0; i < n; i++) {
        double u1 = ((double)(mix64(&s) >> 11) + 1.0) / 9007199254740993.0;  /* (0, 1] */
        double u2 = (double)(mix64(&s) >> 11) / 9007199254740992.0;
        a[i] = sqrt(-2.0 * log(u1)) * cos(6.283185307179586 * u2);
    }
}

/* Row-major n x l into column-major (leading dimension n), and back. */
static void
to_cols(const double *a, double *t, size_t n, size_t l)
{
    for (size_t i = 0; i < n; i++)
        for (size_t c = 0; c < l; c++)
            t[c * n + i] = a[i * l + c];
}

static void
to_rows(const double *t, double *a, size_t n, size_t l)
{
    for (size_t i = 0; i < n; i++)
        for (size_t c = 0; c < l; c++)
            a[i * l + c] = t[c * n + i];
}

/* Replace the columns of a (n x l, row-major) by an orthonormal basis of their span; t is
 * scratch of n x l (LAPACK runs on the column-major copy). */
static ist_status
orthonormalise(double *a, double *t, size_t n, size_t l, double *tau, ist_error *err)
{
    ist_blas_serial();
    to_cols(a, t, n, l);
    lapack_int info = LAPACKE_dgeqrf(LAPACK_COL_MAJOR, (lapack_int)n, (lapack_int)l, t,
                                     (lapack_int)n, tau);
    if (info != 0)
        return ist_error_set(err, info < 0 ? IST_ERR_NOMEM : IST_ERR_NUMERIC,
                             "LAPACK dgeqrf failed (info %d)", (int)info);
    info = LAPACKE_dorgqr(LAPACK_COL_MAJOR, (lapack_int)n, (lapack_int)l, (lapack_int)l, t,
                          (lapack_int)n, tau);
    if (info != 0)
        return ist_error_set(err, info < 0 ? IST_ERR_NOMEM : IST_ERR_NUMERIC,
                             "LAPACK dorgqr failed (info %d)", (int)info);
    to_rows(t, a, n, l);
    return IST_OK;
}

/* The k leading left singular vectors (u: n x k row-major) and singular values of the
 * sparse matrix by the randomized range finder with q power iterations. */
static ist_status
rsvd(const csr *m, size_t k, const ist_ppmi_opts *o, ist_ppmi_watch *wt, double *u, double *sv,
     size_t *peak, ist_error *err)
{
    size_t n = m->n, l = k + o->oversample;
    if (l > n)
        l = n;
    size_t q = o->power_iters, products = 2 * q + 2, done = 0;
    double *y = NULL, *z = NULL, *t = NULL, *tau = NULL, *r = NULL, *ur = NULL, *vt = NULL,
           *s = NULL;
    ist_status rc = IST_OK;
    size_t nl;

    if (ist_mul_size(n, l, &nl))
        return ist_error_set(err, IST_ERR_INVALID, "the factorisation is too large");
    y = ist_malloc(nl * sizeof *y);
    z = ist_malloc(nl * sizeof *z);
    t = ist_malloc(nl * sizeof *t);
    tau = ist_malloc(l * sizeof *tau);
    r = ist_calloc(l * l, sizeof *r);
    ur = ist_malloc(l * l * sizeof *ur);
    vt = ist_malloc(l * l * sizeof *vt);
    s = ist_malloc(l * sizeof *s);
    if (!y || !z || !t || !tau || !r || !ur || !vt || !s) {
        rc = ist_error_nomem(err);
        goto done;
    }
    /* three n x l blocks and the sparse matrix */
    size_t mem = 3 * nl * sizeof(double) + m->ptr[n] * 12 + (n + 1) * sizeof(size_t);
    if (mem > *peak)
        *peak = mem;
#define PRODUCT(tr, from, to)                                                              \
    do {                                                                                   \
        rc = spmm(m, tr, from, to, l, o->threads, wt, (double)done / (double)products,      \
                  (double)(done + 1) / (double)products, err);                             \
        done++;                                                                            \
        if (rc != IST_OK)                                                                  \
            goto done;                                                                     \
    } while (0)
    gaussian_fill(z, nl, o->seed);
    PRODUCT(false, z, y);                        /* Y = A Omega */
    if ((rc = orthonormalise(y, t, n, l, tau, err)) != IST_OK)
        goto done;
    for (size_t it = 0; it < q; it++) {
        PRODUCT(true, y, z);                     /* Z = A^T Q */
        if ((rc = orthonormalise(z, t, n, l, tau, err)) != IST_OK)
            goto done;
        PRODUCT(false, z, y);                    /* Y = A Z */
        if ((rc = orthonormalise(y, t, n, l, tau, err)) != IST_OK)
            goto done;
    }
    PRODUCT(true, y, z);                         /* Z = A^T Q = B^T */
#undef PRODUCT
    /* B^T = Q2 R, so B = R^T Q2^T and the left singular vectors of B are those of R^T */
    to_cols(z, t, n, l);
    lapack_int info = LAPACKE_dgeqrf(LAPACK_COL_MAJOR, (lapack_int)n, (lapack_int)l, t,
                                     (lapack_int)n, tau);
    if (info != 0) {
        rc = ist_error_set(err, IST_ERR_NUMERIC, "LAPACK dgeqrf failed (info %d)", (int)info);
        goto done;
    }
    for (size_t i = 0; i < l; i++)
        for (size_t j = i; j < l; j++)
            r[j * l + i] = t[j * n + i];         /* r = R^T (lower triangular) */
    info = LAPACKE_dgesdd(LAPACK_ROW_MAJOR, 'A', (lapack_int)l, (lapack_int)l, r, (lapack_int)l,
                          s, ur, (lapack_int)l, vt, (lapack_int)l);
    if (info != 0) {
        rc = ist_error_set(err, IST_ERR_NUMERIC, "LAPACK dgesdd failed (info %d)", (int)info);
        goto done;
    }
    /* U = Q U_r[:, :k] */
    cblas_dgemm(CblasRowMajor, CblasNoTrans, CblasNoTrans, (int)n, (int)k, (int)l, 1.0, y,
                (int)l, ur, (int)l, 0.0, u, (int)k);
    for (size_t c = 0; c < k; c++) {
        sv[c] = s[c];
        size_t best = 0;
        for (size_t i = 1; i < n; i++)
            if (fabs(u[i * k + c]) > fabs(u[best * k + c]))
                best = i;
        if (u[best * k + c] < 0.0)
            for (size_t i = 0; i < n; i++)
                u[i * k + c] = -u[i * k + c];
    }
done:
    ist_free(y), ist_free(z), ist_free(t), ist_free(tau), ist_free(r), ist_free(ur), ist_free(vt),
        ist_free(s);
    return rc;
}

/* ---- the whole run ------------------------------------------------------------------------- */

static ist_status
check_opts(const ist_ppmi_opts *o, size_t n_ids, size_t vocab_size, ist_error *err)
{
    if (o->dim == 0 || o->dim > MAX_DIM)
        return ist_error_set(err, IST_ERR_INVALID, "dimension: expected 1 to %d, found %zu",
                             MAX_DIM, o->dim);
    if (o->window == 0 || o->window > MAX_WINDOW)
        return ist_error_set(err, IST_ERR_INVALID, "context window: expected 1 to %d, found %zu",
                             MAX_WINDOW, o->window);
    if (o->weighting != IST_PPMI_LINEAR && o->weighting != IST_PPMI_FLAT)
        return ist_error_set(err, IST_ERR_INVALID, "unknown weighting %d", (int)o->weighting);
    if (!(o->alpha > 0.0 && o->alpha <= 1.0))
        return ist_error_set(err, IST_ERR_INVALID,
                             "smoothing exponent: expected a number in (0, 1], found %g",
                             o->alpha);
    if (!(o->shift >= 1.0 && o->shift <= 1e6))
        return ist_error_set(err, IST_ERR_INVALID, "shift: expected 1 to 1e6, found %g",
                             o->shift);
    if (!(o->power >= 0.0 && o->power <= 1.0))
        return ist_error_set(err, IST_ERR_INVALID,
                             "singular-value exponent: expected 0 to 1, found %g", o->power);
    if (o->oversample > 1000 || o->power_iters > 100)
        return ist_error_set(err, IST_ERR_INVALID, "oversampling (0 to 1000, found %zu) or "
                             "power iterations (0 to 100, found %zu) out of range",
                             o->oversample, o->power_iters);
    if (o->threads == 0 || o->threads > MAX_THREADS)
        return ist_error_set(err, IST_ERR_INVALID, "threads: expected 1 to %d, found %zu",
                             MAX_THREADS, o->threads);
    if (o->buffer_mb == 0 || o->buffer_mb > ((size_t)1 << 20))
        return ist_error_set(err, IST_ERR_INVALID, "pair buffer: expected 1 to 1048576 MiB, "
                             "found %zu", o->buffer_mb);
    if (vocab_size == 0 || vocab_size >= ((size_t)1 << 31))
        return ist_error_set(err, IST_ERR_INVALID, "vocabulary size: expected 1 to 2^31 words, "
                             "found %zu", vocab_size);
    if (n_ids == 0)
        return ist_error_set(err, IST_ERR_INVALID, "the token stream is empty");
    return IST_OK;
}

ist_status
ist_ppmi_train(const uint32_t *ids, size_t n_ids, size_t vocab_size, const ist_ppmi_opts *o,
               ist_matrix **vectors, double **singular, ist_ppmi_result *res, ist_error *err)
{
    uint64_t *keys = NULL, *vals = NULL, words = 0, positive = 0;
    /* a matrix of vocab_size rows has at most vocab_size singular vectors: the columns past
     * them stay zero, so the width is the asked dimension whatever the corpus */
    size_t np = 0, peak = 0, dim = o->dim, k = dim < vocab_size ? dim : vocab_size;
    double *u = NULL, *sv = NULL;
    ist_matrix *out = NULL;
    csr m;
    ist_status rc;
    double t0 = now_sec(), tc;
    ist_ppmi_watch wt = {o, t0, 0.0, 0.5, IST_PPMI_COUNTING, 0.0};

    memset(&m, 0, sizeof m);
    *vectors = NULL;
    if (singular)
        *singular = NULL;
    if ((rc = check_opts(o, n_ids, vocab_size, err)) != IST_OK)
        return rc;
    for (size_t i = 0; i < n_ids; i++) {
        if (ids[i] == IST_CORPUS_EOL)
            continue;
        if (ids[i] >= vocab_size)
            return ist_error_set(err, IST_ERR_INVALID, "token %zu of the stream has id %u, "
                                 "expected below the vocabulary size %zu", i, ids[i],
                                 vocab_size);
        words++;
    }
    if (words == 0)
        return ist_error_set(err, IST_ERR_INVALID, "the token stream is empty (only line ends)");
    if ((rc = ist_ppmi_count_pairs(ids, n_ids, vocab_size, o, &wt, &keys, &vals, &np, &peak,
                                   err)) != IST_OK)
        goto done;
    tc = now_sec() - t0;
    wt.stage = IST_PPMI_WEIGHTING;
    wt.base = 0.5, wt.span = 0.0;
    rc = build_ppmi(keys, vals, np, vocab_size, o, &m, &positive, err);
    if (np * 16 + (m.n ? m.ptr[m.n] * 12 : 0) > peak)
        peak = np * 16 + (m.n ? m.ptr[m.n] * 12 : 0);
    ist_free(keys), ist_free(vals);
    keys = vals = NULL;
    if (rc != IST_OK)
        goto done;
    if (ist_cancel_requested()) {
        rc = ist_error_set(err, IST_ERR_CANCELLED, "training cancelled");
        goto done;
    }
    wt.stage = IST_PPMI_FACTORING;
    wt.base = 0.5, wt.span = 0.5;
    u = ist_malloc(vocab_size * k * sizeof *u);
    sv = ist_calloc(dim, sizeof *sv);
    if (!u || !sv) {
        rc = ist_error_nomem(err);
        goto done;
    }
    if ((rc = rsvd(&m, k, o, &wt, u, sv, &peak, err)) != IST_OK)
        goto done;
    if ((rc = ist_matrix_new(vocab_size, dim, &out, err)) != IST_OK)
        goto done;
    ist_matview v = ist_matrix_view(out);
    for (size_t c = 0; c < k; c++) {
        double f = o->power == 0.0 ? 1.0 : pow(sv[c], o->power);
        for (size_t i = 0; i < vocab_size; i++)
            v.data[i * v.stride + c] = (float)(u[i * k + c] * f);
    }
    if (res) {
        memset(res, 0, sizeof *res);
        res->words = words;
        res->nonzeros = m.ptr[m.n];
        res->positive = positive;
        res->rank = k;
        res->sv_max = sv[0];
        res->sv_min = sv[k - 1];
        res->seconds = now_sec() - t0;
        res->count_seconds = tc;
        res->peak_bytes = peak;
    }
    *vectors = out;
    out = NULL;
    if (singular) {
        *singular = sv;
        sv = NULL;
    }
done:
    ist_free(keys), ist_free(vals), ist_free(u), ist_free(sv);
    csr_free(&m);
    ist_matrix_free(out);
    return rc;
}

void
ist_ppmi_free(void *p)
{
    ist_free(p);
}
