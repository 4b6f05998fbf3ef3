/* cluster_mpi.c - the job's ranks over MPI (built when meson finds MPI).
 *
 * Only the calling thread of the program talks to MPI (MPI_THREAD_SERIALIZED is
 * asked for; worker threads never call it). MPI errors are returned, not fatal,
 * and become IST_ERR_IO naming the exchange. */
#include "cluster_int.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <mpi.h>

#include "alloc_int.h"
#include "error_int.h"

/* one exchange moves at most this many bytes into a rank (chunks otherwise) */
#define EXCHANGE_BYTES_MAX ((size_t)32 << 20)

typedef struct cand {
    float s;
    uint32_t j;
} cand;

static struct {
    bool joined;
    unsigned rank, size;
    uint64_t traffic;
} g = {false, 0, 1, 0};

bool
ist_cluster_built(void)
{
    return true;
}

/* Set by Open MPI's launcher, or by a PMI/PMIx launcher (e.g. a batch scheduler). */
static bool
launched(void)
{
    static const char *const vars[] = {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_RANK", NULL};
    for (int i = 0; vars[i]; i++)
        if (getenv(vars[i]))
            return true;
    return false;
}

static ist_status
mpi_failed(ist_error *err, int code, const char *what)
{
    char text[MPI_MAX_ERROR_STRING];
    int len = 0;
    if (MPI_Error_string(code, text, &len) != MPI_SUCCESS)
        snprintf(text, sizeof text, "MPI error %d", code);
    return ist_error_set(err, IST_ERR_IO, "rank %u of %u: %s failed: %s", g.rank, g.size, what,
                         text);
}

ist_status
ist_cluster_init(int *argc, char ***argv, ist_error *err)
{
    int provided = 0, rank = 0, size = 1, rc;

    if (g.joined || !launched())
        return IST_OK;
    rc = MPI_Init_thread(argc, argv, MPI_THREAD_SERIALIZED, &provided);
    if (rc != MPI_SUCCESS)
        return ist_error_set(err, IST_ERR_IO, "cannot join the MPI job (MPI_Init_thread)");
    MPI_Comm_set_errhandler(MPI_COMM_WORLD, MPI_ERRORS_RETURN);
    if (provided < MPI_THREAD_SERIALIZED) {
        MPI_Finalize();
        return ist_error_set(err, IST_ERR_IO,
                             "the MPI library offers no thread support (level %d); isthmus "
                             "needs MPI_THREAD_SERIALIZED", provided);
    }
    MPI_Comm_rank(MPI_COMM_WORLD, &rank);
    MPI_Comm_size(MPI_COMM_WORLD, &size);
    g.joined = true;
    g.rank = (unsigned)rank;
    g.size = (unsigned)size;
    g.traffic = 0;
    return IST_OK;
}

void
ist_cluster_finalize(void)
{
    if (!g.joined)
        return;
    MPI_Finalize();
    g.joined = false;
    g.rank = 0;
    g.size = 1;
}

void
ist_cluster_abort(int code)
{
    if (g.joined)
        MPI_Abort(MPI_COMM_WORLD, code);
    exit(code);
}

bool
ist_cluster_finish(int status, double timeout_s, int *first_status)
{
    MPI_Request req;
    struct timespec t0, now, nap = {0, 5000000};
    int done = 0;

    *first_status = status;
    if (!g.joined || g.size <= 1)
        return true;
    if (MPI_Ibarrier(MPI_COMM_WORLD, &req) != MPI_SUCCESS)
        return false;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    for (;;) {
        if (MPI_Test(&req, &done, MPI_STATUS_IGNORE) != MPI_SUCCESS)
            return false;
        if (done)
            break;
        clock_gettime(CLOCK_MONOTONIC, &now);
        if (status != 0 && (double)(now.tv_sec - t0.tv_sec) +
                                   1e-9 * (double)(now.tv_nsec - t0.tv_nsec) > timeout_s)
            return false;
        nanosleep(&nap, NULL);
    }
    return MPI_Bcast(first_status, 1, MPI_INT, 0, MPI_COMM_WORLD) == MPI_SUCCESS;
}

unsigned
ist_cluster_rank(void)
{
    return g.rank;
}

unsigned
ist_cluster_size(void)
{
    return g.size;
}

bool
ist_cluster_writes_files(void)
{
    return g.rank == 0;
}

void
ist_cluster_share(size_t n, size_t *begin, size_t *end)
{
    size_t base = n / g.size, extra = n % g.size, r = g.rank;
    *begin = r * base + (r < extra ? r : extra);
    *end = *begin + base + (r < extra ? 1 : 0);
}

ist_status
ist_cluster_agree(ist_status local, ist_error *err)
{
    int mine = local != IST_OK ? (int)g.rank : (int)g.size, first = mine, rc;
    ist_error tmp;

    if (g.size <= 1)
        return local;
    rc = MPI_Allreduce(&mine, &first, 1, MPI_INT, MPI_MIN, MPI_COMM_WORLD);
    if (rc != MPI_SUCCESS)
        return mpi_failed(err, rc, "agreeing on the outcome");
    if (first == (int)g.size)
        return IST_OK;
    memset(&tmp, 0, sizeof tmp);
    if (err && first == (int)g.rank)
        tmp = *err;
    rc = MPI_Bcast(&tmp, (int)sizeof tmp, MPI_BYTE, first, MPI_COMM_WORLD);
    if (rc != MPI_SUCCESS)
        return mpi_failed(err, rc, "passing on a rank's error");
    if (tmp.code == IST_OK)
        tmp.code = IST_ERR_INTERNAL;
    ist_error_prefix(&tmp, "rank %d of %u", first, g.size);
    if (err)
        *err = tmp;
    return tmp.code;
}

static inline bool
better(cand a, cand b)
{
    return a.s > b.s || (a.s == b.s && a.j < b.j);
}

/* rows lists of k from every rank in all[rank][row][k] -> the k best of each row */
static void
merge_rows(const cand *all, size_t rows, size_t k, float *score, uint32_t *index,
           size_t *head)
{
    size_t n = g.size;
    for (size_t i = 0; i < rows; i++) {
        for (size_t r = 0; r < n; r++)
            head[r] = 0;
        for (size_t a = 0; a < k; a++) {
            size_t best = n;
            cand bc = {-INFINITY, UINT32_MAX};
            for (size_t r = 0; r < n; r++) {
                if (head[r] >= k)
                    continue;
                cand c = all[(r * rows + i) * k + head[r]];
                if (best == n || better(c, bc)) {
                    best = r;
                    bc = c;
                }
            }
            head[best]++;
            index[i * k + a] = bc.j;
            score[i * k + a] = bc.j == UINT32_MAX ? -INFINITY : bc.s;
        }
    }
}

ist_status
ist_cluster_merge_topk(float *score, uint32_t *index, size_t rows, size_t k, ist_error *err)
{
    size_t chunk, n = g.size;
    cand *mine = NULL, *all = NULL;
    size_t *head = NULL;
    ist_status rc = IST_OK;

    if (n <= 1 || rows == 0)
        return IST_OK;
    chunk = EXCHANGE_BYTES_MAX / (n * k * sizeof(cand));
    if (chunk < 1)
        chunk = 1;
    if (chunk > rows)
        chunk = rows;
    mine = ist_malloc(chunk * k * sizeof *mine);
    all = ist_malloc(n * chunk * k * sizeof *all);
    head = ist_malloc(n * sizeof *head);
    rc = ist_cluster_agree(mine && all && head ? IST_OK : ist_error_nomem(err), err);
    for (size_t i0 = 0; rc == IST_OK && i0 < rows; i0 += chunk) {
        size_t m = rows - i0 < chunk ? rows - i0 : chunk, bytes = m * k * sizeof(cand);
        for (size_t e = 0; e < m * k; e++) {
            mine[e].s = score[i0 * k + e];
            mine[e].j = index[i0 * k + e];
        }
        int mr = MPI_Allgather(mine, (int)bytes, MPI_BYTE, all, (int)bytes, MPI_BYTE,
                               MPI_COMM_WORLD);
        if (mr != MPI_SUCCESS) {
            rc = mpi_failed(err, mr, "merging nearest-neighbour lists");
            break;
        }
        g.traffic += (uint64_t)bytes * n;
        merge_rows(all, m, k, score + i0 * k, index + i0 * k, head);
    }
    ist_free(head);
    ist_free(all);
    ist_free(mine);
    return rc;
}

ist_status
ist_cluster_average(float *x, size_t n, ist_error *err)
{
    const size_t step = EXCHANGE_BYTES_MAX / sizeof(float);
    float inv;
    int mr;

    if (g.size <= 1)
        return IST_OK;
    inv = 1.0f / (float)g.size;
    /* reduce on rank 0, then broadcast: every rank gets the very same bits */
    for (size_t i0 = 0; i0 < n; i0 += step) {
        int m = (int)(n - i0 < step ? n - i0 : step);
        if (g.rank == 0)
            mr = MPI_Reduce(MPI_IN_PLACE, x + i0, m, MPI_FLOAT, MPI_SUM, 0, MPI_COMM_WORLD);
        else
            mr = MPI_Reduce(x + i0, NULL, m, MPI_FLOAT, MPI_SUM, 0, MPI_COMM_WORLD);
        if (mr != MPI_SUCCESS)
            return mpi_failed(err, mr, "averaging parameters");
        if (g.rank == 0)
            for (int a = 0; a < m; a++)
                x[i0 + (size_t)a] *= inv;
        mr = MPI_Bcast(x + i0, m, MPI_FLOAT, 0, MPI_COMM_WORLD);
        if (mr != MPI_SUCCESS)
            return mpi_failed(err, mr, "sharing averaged parameters");
        g.traffic += 2 * (uint64_t)m * sizeof(float);
    }
    return IST_OK;
}

ist_status
ist_cluster_sum_u64(uint64_t *v, size_t n, ist_error *err)
{
    int mr;
    if (g.size <= 1 || n == 0)
        return IST_OK;
    mr = MPI_Allreduce(MPI_IN_PLACE, v, (int)n, MPI_UINT64_T, MPI_SUM, MPI_COMM_WORLD);
    if (mr != MPI_SUCCESS)
        return mpi_failed(err, mr, "adding counts");
    g.traffic += 2 * (uint64_t)n * sizeof *v;
    return IST_OK;
}

ist_status
ist_cluster_sum_f64(double *v, size_t n, ist_error *err)
{
    int mr;
    if (g.size <= 1 || n == 0)
        return IST_OK;
    /* on rank 0, then broadcast: an all-reduce may round differently on different ranks */
    if (g.rank == 0)
        mr = MPI_Reduce(MPI_IN_PLACE, v, (int)n, MPI_DOUBLE, MPI_SUM, 0, MPI_COMM_WORLD);
    else
        mr = MPI_Reduce(v, NULL, (int)n, MPI_DOUBLE, MPI_SUM, 0, MPI_COMM_WORLD);
    if (mr == MPI_SUCCESS)
        mr = MPI_Bcast(v, (int)n, MPI_DOUBLE, 0, MPI_COMM_WORLD);
    if (mr != MPI_SUCCESS)
        return mpi_failed(err, mr, "adding figures");
    g.traffic += 2 * (uint64_t)n * sizeof *v;
    return IST_OK;
}

uint64_t
ist_cluster_traffic(void)
{
    return g.traffic;
}
