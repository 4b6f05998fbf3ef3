/* fuzz_file.h - fuzz inputs that the library reads from a path go to a private temp file. */
#ifndef ISTHMUS_FUZZ_FILE_H
#define ISTHMUS_FUZZ_FILE_H

#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>

static inline int
fuzz_write_file(char *path, size_t cap, const uint8_t *data, size_t size)
{
    snprintf(path, cap, "/tmp/isthmus-fuzz-XXXXXX");
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
