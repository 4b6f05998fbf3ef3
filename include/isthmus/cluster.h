/* isthmus/cluster.h - one job run as several processes (MPI ranks).
 *
 * When the program is started by an MPI launcher (mpirun) and isthmus was built
 * with MPI, each process is a rank of one job. Retrieval then splits the target
 * rows among the ranks and merges the lists exactly (every rank ends with the
 * result a single process would have found); training splits the corpus and
 * averages the parameters at intervals (docs/cluster.md). Only rank 0 writes
 * output files. Without a launcher, or in a build without MPI, the job is one
 * process: rank 0 of 1, and nothing here changes any result.
 *
 * The rank and rank count are process-wide, like MPI itself: set once by
 * ist_cluster_init() before any other work, cleared by ist_cluster_finalize(). */
#ifndef ISTHMUS_CLUSTER_H
#define ISTHMUS_CLUSTER_H

#include <stdbool.h>
#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

/** True when this build of the library was made with MPI. */
IST_API bool ist_cluster_built(void);

/** Join the job when the process was started by an MPI launcher (it sets the
 *  rank count in the environment); otherwise do nothing and stay rank 0 of 1.
 *  argc and argv may be changed by the MPI library. Call once, first.
 *  Errors: IST_ERR_INVALID when launched as several ranks by a build without
 *  MPI (each would do the whole job alone); IST_ERR_IO when MPI cannot start. */
IST_API ist_status ist_cluster_init(int *argc, char ***argv, ist_error *err);

/** Leave the job (all ranks must call it). No-op when not joined. */
IST_API void ist_cluster_finalize(void);

/** End every rank of the job at once with exit status code (for a rank that
 *  cannot go on while the others wait for it). Exits the process also when
 *  not joined. */
IST_API void ist_cluster_abort(int code);

/** End a command on every rank: wait until all ranks have arrived here. A rank
 *  whose status is 0 waits as long as it takes; a failing rank waits at most
 *  timeout_s seconds (the others may be stuck waiting for it in an exchange).
 *  Returns true when all arrived, with *first_status the status of rank 0;
 *  false when this rank gave up waiting (then ist_cluster_abort() it). Returns
 *  true at once when not joined. */
IST_API bool ist_cluster_finish(int status, double timeout_s, int *first_status);

/** This process's rank, 0 when not joined. */
IST_API unsigned ist_cluster_rank(void);

/** Number of ranks in the job, 1 when not joined. */
IST_API unsigned ist_cluster_size(void);

#ifdef __cplusplus
}
#endif
#endif
