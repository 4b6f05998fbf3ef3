/* isthmus/cancel.h - asking long work to stop (Ctrl-C).
 *
 * One process-wide flag (with the held outputs of output.h, the only mutable
 * globals of the library): a signal
 * handler sets it with ist_cancel_request() (async-signal-safe); training,
 * retrieval and file writers poll it, stop, remove what they were writing and
 * return IST_ERR_CANCELLED. */
#ifndef ISTHMUS_CANCEL_H
#define ISTHMUS_CANCEL_H

#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Ask running work to stop. Safe to call from a signal handler. */
IST_API void ist_cancel_request(void);
/** Clear the request (before starting new work). */
IST_API void ist_cancel_reset(void);
/** Non-zero once a stop was requested. */
IST_API int ist_cancel_requested(void);

#ifdef __cplusplus
}
#endif
#endif
