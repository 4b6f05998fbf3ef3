/* error_int.h - helpers that fill an ist_error; internal to the library. */
#ifndef ISTHMUS_ERROR_INT_H
#define ISTHMUS_ERROR_INT_H

#include <stdarg.h>
#include <stdint.h>

#include <isthmus/error.h>

#define IST_PRINTF(a, b) __attribute__((format(printf, a, b)))

/* Set code and message, no file. Returns code so callers can `return ist_error_set(...)`. */
ist_status ist_error_set(ist_error *err, ist_status code, const char *fmt, ...) IST_PRINTF(3, 4);

/* Set code, file and line (0 = unknown) and message. */
ist_status ist_error_at(ist_error *err, ist_status code, const char *file, uint64_t line,
                        const char *fmt, ...) IST_PRINTF(5, 6);

/* Set code, file and byte offset and message. */
ist_status ist_error_at_offset(ist_error *err, ist_status code, const char *file,
                               uint64_t offset, const char *fmt, ...) IST_PRINTF(5, 6);

/* Like ist_error_at with line 0 but records errno as it is now. */
ist_status ist_error_sys(ist_error *err, ist_status code, const char *file,
                         const char *fmt, ...) IST_PRINTF(4, 5);

/* IST_ERR_NOMEM with a fixed message. */
ist_status ist_error_nomem(ist_error *err);

#endif
