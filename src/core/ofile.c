/* ofile.c - atomic output files: temporary name, then rename. */
#include "ofile_int.h"

#include <errno.h>
#include <fcntl.h>
#include <pthread.h>
#include <signal.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <zlib.h>

#include <isthmus/cancel.h>
#include <isthmus/output.h>

#include "alloc_int.h"
#include "cluster_int.h"
#include "error_int.h"

#define OFILE_BUF (1u << 18)

static int stdout_fd = STDOUT_FILENO;   /* where "-" goes (output.h) */

void
ist_output_set_stdout(int fd)
{
    stdout_fd = fd;
}

struct ist_ofile {
    char *path;         /* final name; NULL for stdout */
    char *tmp;          /* temporary name */
    int fd;
    gzFile gz;
    unsigned char *buf;
    size_t used;
    unsigned long long total;
    bool failed;
    bool device;        /* writing in place to a device or pipe: no rename */
};

static ist_status
make_tmp(ist_ofile *f, const char *path, ist_error *err)
{
    const char *slash = strrchr(path, '/');
    size_t dirlen = slash ? (size_t)(slash - path + 1) : 0;
    const char *base = slash ? slash + 1 : path;
    size_t n = strlen(path) + 32;

    if (*base == '\0')
        return ist_error_at(err, IST_ERR_INVALID, path, 0, "output path names a directory");
    f->tmp = ist_malloc(n);
    if (!f->tmp)
        return ist_error_nomem(err);
    snprintf(f->tmp, n, "%.*s.%s.tmp-XXXXXX", (int)dirlen, path, base);
    f->fd = mkstemp(f->tmp);
    if (f->fd < 0) {
        ist_status rc = ist_error_sys(err, IST_ERR_IO, path, "cannot create output file");
        ist_free(f->tmp);
        f->tmp = NULL;
        return rc;
    }
    /* mkstemp makes 0600; give the usual permissions a new file would get. */
    mode_t um = umask(0);
    umask(um);
    (void)fchmod(f->fd, 0666 & ~um);
    return IST_OK;
}

ist_status
ist_ofile_open(const char *path, bool gz, ist_ofile **out, ist_error *err)
{
    ist_ofile *f;
    ist_status rc;
    struct stat st;

    *out = NULL;
    if (!ist_cluster_writes_files())
        path = "/dev/null";   /* several ranks, one writer: rank 0 */
    f = ist_calloc(1, sizeof *f);
    if (!f)
        return ist_error_nomem(err);
    f->fd = -1;
    f->buf = ist_malloc(OFILE_BUF);
    if (!f->buf) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    bool exists = stat(path, &st) == 0;
    if (strcmp(path, "-") == 0) {
        f->fd = stdout_fd;
    } else if (exists && S_ISDIR(st.st_mode)) {
        rc = ist_error_at(err, IST_ERR_INVALID, path, 0, "output path is a directory");
        goto fail;
    } else if (exists && !S_ISREG(st.st_mode)) {
        /* a device or pipe (/dev/null, /dev/stdout, a FIFO): write to it in place;
         * renaming over it would replace the device node */
        f->device = true;
        f->path = ist_strdup(path);
        if (!f->path) {
            rc = ist_error_nomem(err);
            goto fail;
        }
        f->fd = open(path, O_WRONLY | O_CLOEXEC);
        if (f->fd < 0) {
            rc = ist_error_sys(err, IST_ERR_IO, path, "cannot open for writing");
            goto fail;
        }
    } else {
        f->path = ist_strdup(path);
        if (!f->path) {
            rc = ist_error_nomem(err);
            goto fail;
        }
        rc = make_tmp(f, path, err);
        if (rc != IST_OK)
            goto fail;
    }
    if (gz) {
        int fd2 = dup(f->fd);
        if (fd2 < 0 || !(f->gz = gzdopen(fd2, "wb6"))) {
            if (fd2 >= 0)
                close(fd2);
            rc = ist_error_sys(err, IST_ERR_IO, path, "cannot start gzip stream");
            goto fail;
        }
        gzbuffer(f->gz, 1u << 17);
    }
    *out = f;
    return IST_OK;
fail:
    ist_ofile_abort(f);
    return rc;
}

static ist_status
write_fd(ist_ofile *f, const unsigned char *p, size_t n, ist_error *err)
{
    while (n > 0) {
        ssize_t w = write(f->fd, p, n);
        if (w < 0) {
            if (errno == EINTR && !ist_cancel_requested())
                continue;
            return ist_error_sys(err, IST_ERR_IO, f->path ? f->path : "<stdout>",
                                 "cannot write");
        }
        p += w;
        n -= (size_t)w;
    }
    return IST_OK;
}

static ist_status
flush_buf(ist_ofile *f, ist_error *err)
{
    ist_status rc = IST_OK;

    if (f->used == 0)
        return IST_OK;
    if (ist_cancel_requested()) {
        f->failed = true;
        return ist_error_set(err, IST_ERR_CANCELLED, "stopped on request while writing %s",
                             f->path ? f->path : "<stdout>");
    }
    if (f->gz) {
        size_t off = 0;
        while (off < f->used) {
            unsigned chunk = (unsigned)((f->used - off) > (1u << 30) ? (1u << 30) : f->used - off);
            int w = gzwrite(f->gz, f->buf + off, chunk);
            if (w <= 0) {
                int ze;
                const char *zmsg = gzerror(f->gz, &ze);
                if (ze == Z_ERRNO)
                    rc = ist_error_sys(err, IST_ERR_IO, f->path ? f->path : "<stdout>",
                                       "cannot write");
                else
                    rc = ist_error_at(err, IST_ERR_IO, f->path ? f->path : "<stdout>", 0,
                                      "gzip write failed: %s", zmsg);
                break;
            }
            off += (size_t)w;
        }
    } else {
        rc = write_fd(f, f->buf, f->used, err);
    }
    f->used = 0;
    if (rc != IST_OK)
        f->failed = true;
    return rc;
}

ist_status
ist_ofile_write(ist_ofile *f, const void *buf, size_t n, ist_error *err)
{
    const unsigned char *p = buf;
    ist_status rc;

    if (f->failed)
        return ist_error_set(err, IST_ERR_IO, "write after a failed write");
    f->total += n;
    while (n > 0) {
        size_t room = OFILE_BUF - f->used;
        size_t take = n < room ? n : room;
        memcpy(f->buf + f->used, p, take);
        f->used += take;
        p += take;
        n -= take;
        if (f->used == OFILE_BUF) {
            rc = flush_buf(f, err);
            if (rc != IST_OK)
                return rc;
        }
    }
    return IST_OK;
}

ist_status
ist_ofile_puts(ist_ofile *f, const char *s, ist_error *err)
{
    return ist_ofile_write(f, s, strlen(s), err);
}

ist_status
ist_ofile_printf(ist_ofile *f, ist_error *err, const char *fmt, ...)
{
    char small[1024];
    va_list ap;
    int n;

    va_start(ap, fmt);
    n = vsnprintf(small, sizeof small, fmt, ap);
    va_end(ap);
    if (n < 0)
        return ist_error_set(err, IST_ERR_INTERNAL, "bad format string");
    if ((size_t)n < sizeof small)
        return ist_ofile_write(f, small, (size_t)n, err);
    char *big = ist_malloc((size_t)n + 1);
    if (!big)
        return ist_error_nomem(err);
    va_start(ap, fmt);
    vsnprintf(big, (size_t)n + 1, fmt, ap);
    va_end(ap);
    ist_status rc = ist_ofile_write(f, big, (size_t)n, err);
    ist_free(big);
    return rc;
}

unsigned long long
ist_ofile_tell(const ist_ofile *f)
{
    return f->total;
}

bool
ist_ofile_is_tty(const ist_ofile *f)
{
    return f->path == NULL && isatty(f->fd);
}

static void
release(ist_ofile *f)
{
    if (f->gz)
        gzclose(f->gz);
    if (f->fd >= 0 && f->path)
        close(f->fd);
    ist_free(f->buf);
    ist_free(f->tmp);
    ist_free(f->path);
    ist_free(f);
}

/* The held group (output.h): finished temporaries waiting for their rename. */
typedef struct held_file {
    char *tmp, *path;
} held_file;

static pthread_mutex_t held_lock = PTHREAD_MUTEX_INITIALIZER;
static bool holding;
static held_file *held;
static size_t nheld, capheld;

/* When holding, move f's names to the group: 1 taken, 0 not holding, -1 out of memory. */
static int
hold_take(ist_ofile *f, ist_error *err)
{
    int r = 0;

    pthread_mutex_lock(&held_lock);
    if (holding) {
        r = 1;
        if (nheld == capheld) {
            size_t cap = capheld ? 2 * capheld : 8;
            held_file *p = ist_realloc(held, cap * sizeof *p);
            if (!p) {
                r = -1;
                ist_error_nomem(err);
            } else {
                held = p;
                capheld = cap;
            }
        }
        if (r == 1) {
            held[nheld].tmp = f->tmp;
            held[nheld].path = f->path;
            nheld++;
            f->tmp = f->path = NULL;
        }
    }
    pthread_mutex_unlock(&held_lock);
    return r;
}

void
ist_output_hold(void)
{
    pthread_mutex_lock(&held_lock);
    holding = true;
    pthread_mutex_unlock(&held_lock);
}

size_t
ist_output_waiting(void)
{
    pthread_mutex_lock(&held_lock);
    size_t n = nheld;
    pthread_mutex_unlock(&held_lock);
    return n;
}

const char *
ist_output_waiting_name(size_t i)
{
    pthread_mutex_lock(&held_lock);
    const char *p = i < nheld ? held[i].path : NULL;
    pthread_mutex_unlock(&held_lock);
    return p;
}

/* Remove held temporaries from index i on and empty the group (lock held). */
static void
drop_from(size_t i)
{
    for (size_t j = 0; j < nheld; j++) {
        if (j >= i)
            unlink(held[j].tmp);
        ist_free(held[j].tmp);
        ist_free(held[j].path);
    }
    ist_free(held);
    held = NULL;
    nheld = capheld = 0;
    holding = false;
}

void
ist_output_discard(void)
{
    pthread_mutex_lock(&held_lock);
    drop_from(0);
    pthread_mutex_unlock(&held_lock);
}

ist_status
ist_output_release(size_t *done, ist_error *err)
{
    sigset_t stop, old;
    ist_status rc = IST_OK;
    size_t i = 0;

    sigemptyset(&stop);
    sigaddset(&stop, SIGINT);
    sigaddset(&stop, SIGTERM);
    pthread_sigmask(SIG_BLOCK, &stop, &old);
    pthread_mutex_lock(&held_lock);
    if (ist_cancel_requested()) {
        rc = ist_error_set(err, IST_ERR_CANCELLED, "stopped on request before the output files "
                           "were moved into place");
    } else {
        for (; i < nheld; i++) {
            if (rename(held[i].tmp, held[i].path) != 0) {
                rc = ist_error_sys(err, IST_ERR_IO, held[i].path,
                                   "cannot move the finished file into place");
                break;
            }
        }
    }
    if (done)
        *done = rc == IST_ERR_CANCELLED ? 0 : i;
    drop_from(rc == IST_ERR_CANCELLED ? 0 : i);
    pthread_mutex_unlock(&held_lock);
    pthread_sigmask(SIG_SETMASK, &old, NULL);
    return rc;
}

ist_status
ist_ofile_commit(ist_ofile *f, ist_error *err)
{
    const char *name = f->path ? f->path : "<stdout>";
    ist_status rc = flush_buf(f, err);

    if (rc != IST_OK)
        goto fail;
    if (f->gz) {
        int zr = gzclose(f->gz);
        f->gz = NULL;
        if (zr != Z_OK) {
            rc = zr == Z_ERRNO ? ist_error_sys(err, IST_ERR_IO, name, "cannot write")
                               : ist_error_at(err, IST_ERR_IO, name, 0, "gzip stream failed");
            goto fail;
        }
    }
    if (!f->path) {
        release(f);
        return IST_OK;
    }
    if (f->device) {
        if (close(f->fd) != 0) {
            f->fd = -1;
            rc = ist_error_sys(err, IST_ERR_IO, name, "cannot write");
            goto fail;
        }
        f->fd = -1;
        release(f);
        return IST_OK;
    }
    if (fsync(f->fd) != 0 && errno != EINVAL && errno != EROFS) {
        rc = ist_error_sys(err, IST_ERR_IO, name, "cannot flush to disk");
        goto fail;
    }
    if (close(f->fd) != 0) {
        f->fd = -1;
        rc = ist_error_sys(err, IST_ERR_IO, name, "cannot write");
        goto fail;
    }
    f->fd = -1;
    if (ist_cancel_requested()) {
        rc = ist_error_set(err, IST_ERR_CANCELLED, "stopped on request while writing %s", name);
        goto fail;
    }
    switch (hold_take(f, err)) {
    case 1:
        release(f);
        return IST_OK;
    case -1:
        rc = IST_ERR_NOMEM;
        goto fail;
    default:
        break;
    }
    if (rename(f->tmp, f->path) != 0) {
        rc = ist_error_sys(err, IST_ERR_IO, name, "cannot move the finished file into place");
        goto fail;
    }
    release(f);
    return IST_OK;
fail:
    ist_ofile_abort(f);
    return rc;
}

void
ist_ofile_abort(ist_ofile *f)
{
    if (!f)
        return;
    if (f->gz) {
        gzclose(f->gz);
        f->gz = NULL;
    }
    if (f->fd >= 0 && f->path) {
        close(f->fd);
        f->fd = -1;
    }
    if (f->tmp)
        unlink(f->tmp);
    release(f);
}

/* Write a then b (nb may be 0) to path atomically, plain. */
static ist_status
write_whole(const char *path, const void *a, size_t na, const void *b, size_t nb, ist_error *err)
{
    ist_ofile *f;
    ist_status rc = ist_ofile_open(path, false, &f, err);

    if (rc != IST_OK)
        return rc;
    rc = ist_ofile_write(f, a, na, err);
    if (rc == IST_OK && nb > 0)
        rc = ist_ofile_write(f, b, nb, err);
    if (rc != IST_OK) {
        ist_ofile_abort(f);
        return rc;
    }
    return ist_ofile_commit(f, err);
}

ist_status
ist_ofile_write_all(const char *path, const void *buf, size_t n, ist_error *err)
{
    return write_whole(path, buf, n, NULL, 0, err);
}

ist_status
ist_ofile_write_text(const char *path, const char *text, ist_error *err)
{
    return write_whole(path, text, strlen(text), "\n", 1, err);
}
