/* cluster_int.h - what the other stages ask of the job's ranks; internal.
 *
 * Two builds share this interface: cluster_mpi.c (MPI found at build time) and
 * cluster_solo.c (one process; every call is the identity). All calls that
 * exchange data are collective: every rank must make the same calls in the same
 * order, which holds because every rank runs the same command on the same
 * inputs. */
#ifndef ISTHMUS_CLUSTER_INT_H
#define ISTHMUS_CLUSTER_INT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <isthmus/cluster.h>

/* True on the rank that writes output files: rank 0, or the only process. */
bool ist_cluster_writes_files(void);

/* This rank's contiguous share [*begin, *end) of n units; the shares of ranks
 * 0, 1, ... follow each other and differ in size by at most one. */
void ist_cluster_share(size_t n, size_t *begin, size_t *end);

/* Collective. Every rank passes its own outcome; all return IST_OK when all
 * succeeded, otherwise the failure of the lowest failing rank, with its error
 * copied into err on every rank and prefixed "rank R of N: ". err may be NULL
 * when local is IST_OK. */
ist_status ist_cluster_agree(ist_status local, ist_error *err);

/* Collective. Each rank holds, for rows queries, its k best (score, index)
 * pairs, best first, empty places as (-inf, UINT32_MAX). On return every rank
 * holds the k best of the union under the order of retrieval: higher score
 * first, lower index on equal scores. */
ist_status ist_cluster_merge_topk(float *score, uint32_t *index, size_t rows, size_t k,
                                  ist_error *err);

/* Collective. x[i] becomes the mean over ranks of x[i] (float sums in double,
 * the same on every rank). */
ist_status ist_cluster_average(float *x, size_t n, ist_error *err);

/* Collective. v[i] becomes the sum over ranks of v[i]. */
ist_status ist_cluster_sum_u64(uint64_t *v, size_t n, ist_error *err);

/* Collective. v[i] becomes the sum over ranks of v[i], the same bits on every rank. */
ist_status ist_cluster_sum_f64(double *v, size_t n, ist_error *err);

/* Bytes this rank has sent and received in exchanges since the start. */
uint64_t ist_cluster_traffic(void);

#endif
