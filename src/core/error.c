/* error.c - filling and formatting ist_error records; never allocates. */
#include <isthmus/error.h>

#include <errno.h>
#include <stdio.h>
#include <string.h>

#include "error_int.h"

void
ist_error_clear(ist_error *err)
{
    if (err)
        memset(err, 0, sizeof *err);
}

const char *
ist_status_name(ist_status code)
{
    switch (code) {
    case IST_OK: return "ok";
    case IST_ERR_NOMEM: return "out of memory";
    case IST_ERR_IO: return "i/o";
    case IST_ERR_FORMAT: return "format";
    case IST_ERR_INVALID: return "invalid argument";
    case IST_ERR_NUMERIC: return "numeric";
    case IST_ERR_CANCELLED: return "cancelled";
    case IST_ERR_INTERNAL: return "internal";
    }
    return "unknown";
}

static void
fill(ist_error *err, ist_status code, const char *file, uint64_t line, const char *fmt,
     va_list ap)
{
    err->code = code;
    err->sys_errno = 0;
    err->line = line;
    err->offset = 0;
    err->has_offset = 0;
    snprintf(err->file, sizeof err->file, "%s", file ? file : "");
    vsnprintf(err->msg, sizeof err->msg, fmt, ap);
}

ist_status
ist_error_set(ist_error *err, ist_status code, const char *fmt, ...)
{
    va_list ap;

    if (!err)
        return code;
    va_start(ap, fmt);
    fill(err, code, NULL, 0, fmt, ap);
    va_end(ap);
    return code;
}

ist_status
ist_error_at(ist_error *err, ist_status code, const char *file, uint64_t line,
             const char *fmt, ...)
{
    va_list ap;

    if (!err)
        return code;
    va_start(ap, fmt);
    fill(err, code, file, line, fmt, ap);
    va_end(ap);
    return code;
}

ist_status
ist_error_at_offset(ist_error *err, ist_status code, const char *file, uint64_t offset,
                    const char *fmt, ...)
{
    va_list ap;

    if (!err)
        return code;
    va_start(ap, fmt);
    fill(err, code, file, 0, fmt, ap);
    va_end(ap);
    err->offset = offset;
    err->has_offset = 1;
    return code;
}

ist_status
ist_error_sys(ist_error *err, ist_status code, const char *file, const char *fmt, ...)
{
    int saved = errno;
    va_list ap;

    if (!err)
        return code;
    va_start(ap, fmt);
    fill(err, code, file, 0, fmt, ap);
    va_end(ap);
    err->sys_errno = saved;
    return code;
}

ist_status
ist_error_nomem(ist_error *err)
{
    return ist_error_set(err, IST_ERR_NOMEM, "out of memory");
}

void
ist_error_prefix(ist_error *err, const char *fmt, ...)
{
    char head[IST_ERROR_MSG_CAP];
    char old[IST_ERROR_MSG_CAP];
    va_list ap;

    if (!err || err->code == IST_OK)
        return;
    va_start(ap, fmt);
    vsnprintf(head, sizeof head, fmt, ap);
    va_end(ap);
    memcpy(old, err->msg, sizeof old);
    size_t h = strlen(head);
    if (h > sizeof err->msg - 3)
        h = sizeof err->msg - 3;
    memcpy(err->msg, head, h);
    memcpy(err->msg + h, ": ", 2);
    size_t room = sizeof err->msg - h - 3, o = strlen(old);
    if (o > room)
        o = room;
    memcpy(err->msg + h + 2, old, o);
    err->msg[h + 2 + o] = '\0';
}

char *
ist_error_format(const ist_error *err, char *buf, size_t cap)
{
    size_t n = 0;
    int w;

    if (!buf || cap == 0)
        return buf;
    buf[0] = '\0';
    if (!err)
        return buf;
#define PUT(...)                                                     \
    do {                                                             \
        w = snprintf(buf + n, cap - n, __VA_ARGS__);                 \
        if (w < 0)                                                   \
            return buf;                                              \
        n += (size_t)w < cap - n ? (size_t)w : cap - n - 1;          \
    } while (0)
    if (err->file[0]) {
        if (err->line)
            PUT("%s:%llu: ", err->file, (unsigned long long)err->line);
        else if (err->has_offset)
            PUT("%s: byte %llu: ", err->file, (unsigned long long)err->offset);
        else
            PUT("%s: ", err->file);
    }
    PUT("%s", err->msg[0] ? err->msg : ist_status_name(err->code));
    if (err->sys_errno)
        PUT(" (%s)", strerror(err->sys_errno));
#undef PUT
    return buf;
}
