/* isthmus/error.h - status codes and the error record every fallible call fills.
 *
 * Every fallible function returns an ist_status and takes an ist_error * as its
 * last argument. The record is owned by the caller, filling it never allocates,
 * it may be NULL, and it is written only on failure: the first cause stays and
 * callers add context in front with ist_error_prefix(). */
#ifndef ISTHMUS_ERROR_H
#define ISTHMUS_ERROR_H

#include <stddef.h>
#include <stdint.h>

#if defined(_WIN32)
#define IST_API
#elif defined(__GNUC__)
#define IST_API __attribute__((visibility("default")))
#else
#define IST_API
#endif

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_status {
    IST_OK = 0,
    IST_ERR_NOMEM,      /* an allocation failed */
    IST_ERR_IO,         /* the system refused a read, write, open or rename */
    IST_ERR_FORMAT,     /* a file's content is not what its format allows */
    IST_ERR_INVALID,    /* an argument or option is out of its range */
    IST_ERR_NUMERIC,    /* a numerical routine failed (no convergence, NaN) */
    IST_ERR_CANCELLED,  /* the caller asked to stop */
    IST_ERR_INTERNAL    /* a bug in isthmus: please report it */
} ist_status;

#define IST_ERROR_MSG_CAP 512
#define IST_ERROR_FILE_CAP 256

typedef struct ist_error {
    ist_status code;
    int sys_errno;                    /* errno at the failure, 0 when none */
    char file[IST_ERROR_FILE_CAP];    /* file concerned, "" when none */
    uint64_t line;                    /* 1-based line, 0 when unknown */
    uint64_t offset;                  /* byte offset, valid when has_offset */
    int has_offset;
    char msg[IST_ERROR_MSG_CAP];      /* lower case, no final period */
} ist_error;

/** Reset an error record to "no error". */
IST_API void ist_error_clear(ist_error *err);

/** Short stable name of a status, e.g. "format". Never NULL. */
IST_API const char *ist_status_name(ist_status code);

/** Put "context: " in front of the message, keeping the first cause.
 *  Does nothing when err is NULL or holds no error. */
IST_API void ist_error_prefix(ist_error *err, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;

/** Write "file:line: message (strerror)" into buf (at most cap bytes, always
 *  terminated when cap > 0). Parts that are unknown are left out; a byte
 *  offset is shown as "file: byte N:" when there is no line. Returns buf. */
IST_API char *ist_error_format(const ist_error *err, char *buf, size_t cap);

#ifdef __cplusplus
}
#endif
#endif
