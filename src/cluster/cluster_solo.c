/* cluster_solo.c - the job is one process (a build without MPI). */
#include "cluster_int.h"

#include <stdlib.h>

#include "error_int.h"

bool
ist_cluster_built(void)
{
    return false;
}

static bool
launched_as_many(void)
{
    static const char *const vars[] = {"OMPI_COMM_WORLD_SIZE", "PMI_SIZE", "PMIX_SIZE", NULL};
    for (int i = 0; vars[i]; i++) {
        const char *v = getenv(vars[i]);
        if (v && atoi(v) > 1)
            return true;
    }
    return false;
}

ist_status
ist_cluster_init(int *argc, char ***argv, ist_error *err)
{
    (void)argc;
    (void)argv;
    if (launched_as_many())
        return ist_error_set(err, IST_ERR_INVALID,
                             "started as several ranks, but this build has no MPI (each rank "
                             "would do the whole job alone); rebuild with -Dmpi=enabled");
    return IST_OK;
}

void
ist_cluster_finalize(void)
{
}

void
ist_cluster_abort(int code)
{
    exit(code);
}

bool
ist_cluster_finish(int status, double timeout_s, int *first_status)
{
    (void)timeout_s;
    *first_status = status;
    return true;
}

unsigned
ist_cluster_rank(void)
{
    return 0;
}

unsigned
ist_cluster_size(void)
{
    return 1;
}

bool
ist_cluster_writes_files(void)
{
    return true;
}

void
ist_cluster_share(size_t n, size_t *begin, size_t *end)
{
    *begin = 0;
    *end = n;
}

ist_status
ist_cluster_agree(ist_status local, ist_error *err)
{
    (void)err;
    return local;
}

ist_status
ist_cluster_merge_topk(float *score, uint32_t *index, size_t rows, size_t k, ist_error *err)
{
    (void)score;
    (void)index;
    (void)rows;
    (void)k;
    (void)err;
    return IST_OK;
}

ist_status
ist_cluster_average(float *x, size_t n, ist_error *err)
{
    (void)x;
    (void)n;
    (void)err;
    return IST_OK;
}

ist_status
ist_cluster_sum_u64(uint64_t *v, size_t n, ist_error *err)
{
    (void)v;
    (void)n;
    (void)err;
    return IST_OK;
}

ist_status
ist_cluster_sum_f64(double *v, size_t n, ist_error *err)
{
    (void)v;
    (void)n;
    (void)err;
    return IST_OK;
}

uint64_t
ist_cluster_traffic(void)
{
    return 0;
}
