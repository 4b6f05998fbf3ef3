/* fuzz_file.h - fuzz inputs that the library reads from a path go to files in a directory
 * private to the process: "$TMPDIR/isthmus-fuzz-XXXXXX" (TMPDIR unset: /tmp), made on
 * first use and removed with what is left in it at exit. Two fuzzers, or a fuzzer and a
 * test run, never share a name, and a run can be pointed at a directory of its own
 * (tools/dev/run-fuzz gives each target one under build-fuzz/). */
#ifndef ISTHMUS_FUZZ_FILE_H
#define ISTHMUS_FUZZ_FILE_H

#include <dirent.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#define FUZZ_PATH_CAP 4096

static char fuzz_dir_path[FUZZ_PATH_CAP];

static inline void
fuzz_dir_remove(void)
{
    DIR *d = opendir(fuzz_dir_path);
    struct dirent *e;
    char p[FUZZ_PATH_CAP + 256];

    if (!d)
        return;
    while ((e = readdir(d)))
        if (strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0) {
            snprintf(p, sizeof p, "%s/%s", fuzz_dir_path, e->d_name);
            unlink(p);
        }
    closedir(d);
    rmdir(fuzz_dir_path);
}

/* The process's directory, or NULL when it cannot be made. */
static inline const char *
fuzz_dir(void)
{
    if (!fuzz_dir_path[0]) {
        const char *t = getenv("TMPDIR");
        if (!t || !*t)
            t = "/tmp";
        if ((size_t)snprintf(fuzz_dir_path, sizeof fuzz_dir_path, "%s/isthmus-fuzz-XXXXXX", t) >=
                sizeof fuzz_dir_path ||
            !mkdtemp(fuzz_dir_path)) {
            fuzz_dir_path[0] = '\0';
            return NULL;
        }
        atexit(fuzz_dir_remove);
    }
    return fuzz_dir_path;
}

/* path = the process's directory / name; 0 when there is none. */
static inline int
fuzz_path(char *path, size_t cap, const char *name)
{
    const char *d = fuzz_dir();
    return d && (size_t)snprintf(path, cap, "%s/%s", d, name) < cap;
}

/* Write data to a fresh file in the process's directory; path gets its name. */
static inline int
fuzz_write_file(char *path, size_t cap, const uint8_t *data, size_t size)
{
    if (!fuzz_path(path, cap, "in-XXXXXX"))
        return 0;
    int fd = mkstemp(path);
    if (fd < 0)
        return 0;
    size_t off = 0;
    while (off < size) {
        ssize_t w = write(fd, data + off, size - off);
        if (w <= 0) {
            close(fd);
            unlink(path);
            return 0;
        }
        off += (size_t)w;
    }
    close(fd);
    return 1;
}

#endif
