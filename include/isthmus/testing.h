/* isthmus/testing.h - hooks for the project's own tests (fault injection).
 * Not for production use; harmless in a normal build, where they do nothing. */
#ifndef ISTHMUS_TESTING_H
#define ISTHMUS_TESTING_H

#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Make the allocation after the next n succeed fail (n = 0: the next one);
 *  n < 0 turns failing off. Only effective in a fault_injection build. */
IST_API void ist_testing_fail_alloc_after(long n);

/** 1 when the library was built with fault injection, else 0. */
IST_API int ist_testing_fault_injection_enabled(void);

#ifdef __cplusplus
}
#endif
#endif
