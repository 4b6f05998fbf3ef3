/* reader.c - buffered line reader over zlib's gzFile (transparent for plain files). */
#include "reader_int.h"

#include <errno.h>
#include <fcntl.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <zlib.h>

#include "alloc_int.h"
#include "error_int.h"

#define CHUNK (1u << 18)

struct ist_reader {
    char *path;
    gzFile gz;
    bool is_gzip;
    uint64_t file_size;
    char *buf;
    size_t cap;          /* max_line + CHUNK + 1 */
    size_t start, end;   /* unread bytes are buf[start..end) */
    size_t max_line;
    bool at_eof;         /* no more bytes from the file */
    uint64_t lineno;
    uint64_t consumed;   /* bytes before buf[start] */
    uint64_t line_off;
};

ist_status
ist_reader_open(const char *path, size_t max_line, ist_reader **out, ist_error *err)
{
    ist_reader *r;
    ist_status rc;
    struct stat st;
    unsigned char magic[2];
    int fd;

    *out = NULL;
    fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot open for reading");
    if (fstat(fd, &st) != 0) {
        rc = ist_error_sys(err, IST_ERR_IO, path, "cannot examine");
        close(fd);
        return rc;
    }
    if (S_ISDIR(st.st_mode)) {
        close(fd);
        return ist_error_at(err, IST_ERR_IO, path, 0, "is a directory, expected a file");
    }
    r = ist_calloc(1, sizeof *r);
    if (!r) {
        close(fd);
        return ist_error_nomem(err);
    }
    r->file_size = (uint64_t)st.st_size;
    r->max_line = max_line;
    r->cap = max_line + CHUNK + 1;
    r->path = ist_strdup(path);
    r->buf = ist_malloc(r->cap);
    if (!r->path || !r->buf) {
        close(fd);
        rc = ist_error_nomem(err);
        goto fail;
    }
    ssize_t got = pread(fd, magic, 2, 0);
    r->is_gzip = got == 2 && magic[0] == 0x1f && magic[1] == 0x8b;
    r->gz = gzdopen(fd, "rb");
    if (!r->gz) {
        close(fd);
        rc = ist_error_sys(err, IST_ERR_IO, path, "cannot start reading");
        goto fail;
    }
    gzbuffer(r->gz, CHUNK);
    *out = r;
    return IST_OK;
fail:
    ist_reader_close(r);
    return rc;
}

/* zlib's reason without the "<fd:N>: " it puts in front, the offset in the compressed
 * file (what a hex dump of the file shows) and how much text came out before. */
static ist_status
gzip_damage(ist_reader *r, const char *what, ist_error *err)
{
    int ze;
    const char *zmsg = gzerror(r->gz, &ze);
    const char *colon = zmsg && zmsg[0] == '<' ? strstr(zmsg, ">: ") : NULL;
    z_off_t at = gzoffset(r->gz);

    if (colon)
        zmsg = colon + 3;
    return ist_error_at_offset(err, IST_ERR_FORMAT, r->path, at < 0 ? 0 : (uint64_t)at,
                               "%s (%s), after %llu bytes of text", what,
                               zmsg && *zmsg ? zmsg : "no reason given",
                               (unsigned long long)(r->consumed + r->end));
}

static ist_status
refill(ist_reader *r, ist_error *err)
{
    if (r->start > 0) {
        memmove(r->buf, r->buf + r->start, r->end - r->start);
        r->consumed += r->start;
        r->end -= r->start;
        r->start = 0;
    }
    size_t room = r->cap - 1 - r->end;
    if (room == 0 || r->at_eof)
        return IST_OK;
    int n = gzread(r->gz, r->buf + r->end, (unsigned)(room > CHUNK ? CHUNK : room));
    if (n < 0) {
        int ze;
        gzerror(r->gz, &ze);
        if (ze == Z_ERRNO)
            return ist_error_sys(err, IST_ERR_IO, r->path, "cannot read");
        return gzip_damage(r, "corrupt gzip data", err);
    }
    if (n == 0) {
        int ze;
        gzerror(r->gz, &ze);
        if (ze != Z_OK && ze != Z_STREAM_END)
            return gzip_damage(r, "truncated or corrupt gzip data", err);
        r->at_eof = true;
    }
    r->end += (size_t)n;
    return IST_OK;
}

ist_status
ist_reader_next(ist_reader *r, char **line, size_t *len, bool *eof, ist_error *err)
{
    size_t scanned = 0;
    ist_status rc;

    *line = NULL;
    *len = 0;
    *eof = false;
    for (;;) {
        char *p = r->buf + r->start;
        size_t avail = r->end - r->start;
        char *nl = avail > scanned ? memchr(p + scanned, '\n', avail - scanned) : NULL;
        if (nl || (r->at_eof && avail > 0)) {
            size_t n = nl ? (size_t)(nl - p) : avail;
            if (n > r->max_line)
                goto too_long;
            r->lineno++;
            r->line_off = r->consumed + r->start;
            r->start += nl ? n + 1 : n;
            if (n > 0 && p[n - 1] == '\r')
                n--;
            p[n] = '\0';   /* safe: buf has one spare byte past end */
            *line = p;
            *len = n;
            return IST_OK;
        }
        if (r->at_eof) {
            *eof = true;
            return IST_OK;
        }
        scanned = avail;
        if (avail > r->max_line)
            goto too_long;
        rc = refill(r, err);
        if (rc != IST_OK)
            return rc;
    }
too_long:
    return ist_error_at(err, IST_ERR_FORMAT, r->path, r->lineno + 1,
                        "line longer than the limit of %zu bytes", r->max_line);
}

uint64_t
ist_reader_lineno(const ist_reader *r)
{
    return r->lineno;
}

uint64_t
ist_reader_offset(const ist_reader *r)
{
    return r->line_off;
}

uint64_t
ist_reader_bytes(const ist_reader *r)
{
    return r->consumed + r->start;
}

bool
ist_reader_is_gzip(const ist_reader *r)
{
    return r->is_gzip;
}

const char *
ist_reader_path(const ist_reader *r)
{
    return r->path;
}

uint64_t
ist_reader_file_size(const ist_reader *r)
{
    return r->file_size;
}

uint64_t
ist_reader_raw_pos(const ist_reader *r)
{
    if (!r->is_gzip)
        return ist_reader_bytes(r);
    z_off_t off = gzoffset(r->gz);
    return off < 0 ? 0 : (uint64_t)off;
}

void
ist_reader_close(ist_reader *r)
{
    if (!r)
        return;
    if (r->gz)
        gzclose(r->gz);
    ist_free(r->buf);
    ist_free(r->path);
    ist_free(r);
}
