/* isthmus/retrieve.h - nearest neighbours of many queries among many targets,
 * by cosine or CSLS, in bounded memory.
 *
 * Owns the top-k lists it returns. Scores are computed a tile at a time with
 * single-precision GEMM (queries x targets^T), tiles sized to a memory budget
 * rather than to the whole product; each query keeps its best k in a heap;
 * threads (pthreads) take tiles from a shared counter. When more than one
 * thread is used the BLAS is told to use one thread per call.
 *
 * In a job of several MPI ranks (isthmus/cluster.h) every call is collective:
 * each rank scores whole blocks of target rows, planned as for the whole
 * problem, and the ranks merge their k best lists exactly, so every rank
 * returns the lists (and scores, bit for bit) that one process would.
 *
 * CSLS, cross-domain similarity local scaling (Conneau et al. 2018, "Word
 * translation without parallel data", ICLR):
 *     CSLS(x, y) = 2 cos(x, y) - r_T(x) - r_S(y)
 * where r_T(x) is the mean cosine of x to its k nearest targets and r_S(y) the
 * mean cosine of target y to its k nearest (mapped) source vectors. Rows are
 * expected to have unit length, so dot products are cosines. */
#ifndef ISTHMUS_RETRIEVE_H
#define ISTHMUS_RETRIEVE_H

#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_retrieval {
    IST_RETRIEVAL_COSINE = 0,
    IST_RETRIEVAL_CSLS
} ist_retrieval;

#define IST_RETRIEVE_BUDGET_DEFAULT ((size_t)256 << 20)
#define IST_RETRIEVE_NEIGHBOURHOOD_DEFAULT 10u
#define IST_CSLS_K_MAX 1000u          /* largest CSLS neighbourhood accepted */
#define IST_THREADS_MAX 256u          /* largest thread count accepted anywhere */

typedef struct ist_retrieve_opts {
    size_t budget;        /* bytes for score tiles, all threads together [256 MiB] */
    unsigned threads;     /* worker threads, 0..IST_THREADS_MAX; 0 = online processors [0] */
} ist_retrieve_opts;

IST_API void ist_retrieve_opts_init(ist_retrieve_opts *opts);

/** The neighbour-search group every ranking step shares (alignment refinement,
 *  scoring, diagnostics, proposals): the CSLS neighbourhood size and the tile
 *  memory and threads. Embedded once in each of those option structs. */
typedef struct ist_search_opts {
    size_t csls_k;                /* CSLS neighbourhood size k, 1..IST_CSLS_K_MAX [10] */
    ist_retrieve_opts retrieve;   /* tile memory and threads */
} ist_search_opts;

IST_API void ist_search_opts_init(ist_search_opts *opts);
/** IST_ERR_INVALID naming `who` when k or the thread count is out of range. */
IST_API ist_status ist_search_opts_check(const ist_search_opts *opts, const char *who,
                                         ist_error *err);

typedef struct ist_topk ist_topk;   /* opaque: k best targets per query */

/** For every query row i keep the k targets j with the highest
 *      score(i, j) = scale * q_i . t_j - qsub[i] - tsub[j]
 *  (qsub, tsub may be NULL for zero). Ties go to the lower target row.
 *  q and t have the same number of columns; t has fewer than 2^32 rows.
 *  opts may be NULL for the defaults. Memory: the tiles within opts->budget,
 *  plus k entries per query for each thread.
 *  Success: *out owns the lists; release with ist_topk_free().
 *  IST_ERR_CANCELLED when ist_cancel_requested() became true. */
IST_API ist_status ist_retrieve_topk(ist_cmatview q, ist_cmatview t, size_t k, float scale,
                                     const float *qsub, const float *tsub,
                                     const ist_retrieve_opts *opts, ist_topk **out,
                                     ist_error *err);

/** r[i] = mean of the k largest q_i . t_j over all target rows j (the CSLS
 *  neighbourhood term; fewer when t has fewer than k rows). r has q.rows
 *  entries. Same machinery, memory and errors as ist_retrieve_topk(). */
IST_API ist_status ist_retrieve_neighbourhood(ist_cmatview q, ist_cmatview t, size_t k,
                                              const ist_retrieve_opts *opts, float *r,
                                              ist_error *err);

/** The k best targets of each query by cosine, or by CSLS with neighbourhood
 *  size nb, where r_T comes from the targets and r_S from the rows of
 *  `source` (all mapped source vectors; may be the queries themselves).
 *  Scores in the lists are cosines or CSLS values. */
IST_API ist_status ist_retrieve_rank(ist_cmatview q, ist_cmatview source, ist_cmatview t,
                                     ist_retrieval method, size_t k, size_t nb,
                                     const ist_retrieve_opts *opts, ist_topk **out,
                                     ist_error *err);

IST_API void ist_topk_free(ist_topk *tk);     /* NULL: no-op */
IST_API size_t ist_topk_rows(const ist_topk *tk);
IST_API size_t ist_topk_k(const ist_topk *tk);
/** Target rows of query i, best first; UINT32_MAX marks an empty place (fewer
 *  targets than k). Borrowed; valid until ist_topk_free(). */
IST_API const uint32_t *ist_topk_index(const ist_topk *tk, size_t i);
/** Their scores, best first. Borrowed. */
IST_API const float *ist_topk_score(const ist_topk *tk, size_t i);

#ifdef __cplusplus
}
#endif
#endif
