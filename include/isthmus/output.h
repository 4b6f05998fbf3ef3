/* isthmus/output.h - committing a command's output files as one group.
 *
 * Every output file is written under a temporary name beside its target and
 * renamed into place when finished. A program that writes several files (a
 * vector file and its text copy, a map and the mapped vectors) holds those
 * renames back with ist_output_hold(): from then on a finished file waits as
 * a complete temporary, and ist_output_release() renames them all at once with
 * SIGINT and SIGTERM held off, so a stop or a failure leaves either every file
 * of the run in place or none. Standard output and devices are written in
 * place and are not held.
 *
 * The held list is process-wide (like the stop flag of cancel.h) and guarded
 * by a mutex. */
#ifndef ISTHMUS_OUTPUT_H
#define ISTHMUS_OUTPUT_H

#include <stddef.h>

#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

/** From now on, finished output files wait under their temporary names until
 *  ist_output_release() or ist_output_discard(). Calling it again is a no-op. */
IST_API void ist_output_hold(void);

/** Number of finished files waiting, and the final name of the i-th (in the
 *  order they were finished; borrowed until the next call of this module). */
IST_API size_t ist_output_waiting(void);
IST_API const char *ist_output_waiting_name(size_t i);

/** Rename every waiting file into place and stop holding. SIGINT and SIGTERM
 *  are blocked during the renames. When a stop was requested before the
 *  renames start (ist_cancel_requested()) nothing is renamed, every temporary
 *  is removed and IST_ERR_CANCELLED is returned. When a rename fails the
 *  others still waiting are removed; *done (may be NULL) gets the number of
 *  files renamed into place, which are the first *done waiting names. */
IST_API ist_status ist_output_release(size_t *done, ist_error *err);

/** Remove every waiting temporary and stop holding. */
IST_API void ist_output_discard(void);

/** The descriptor an output named "-" is written to [default: 1, standard output]. A
 *  program that moves its own messages off standard output while data goes there sets
 *  the descriptor it kept for the data. */
IST_API void ist_output_set_stdout(int fd);

#ifdef __cplusplus
}
#endif
#endif
