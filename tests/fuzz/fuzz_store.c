/* fuzz_store.c - any bytes given as a vector file (text table, gzip or native) are
 * either loaded consistently or refused with a message; never a crash or a leak. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <isthmus/store.h>

#include "fuzz_file.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[FUZZ_PATH_CAP];
    ist_store_opts o;
    ist_store *s;
    ist_error e;

    if (!fuzz_write_file(path, sizeof path, data, size))
        return 0;
    ist_store_opts_init(&o);
    o.verify = size & 1;
    o.max_line = 1 << 16;
    o.max_dim = 4096;
    if (ist_store_open(path, &o, &s, &e) == IST_OK) {
        size_t rows = ist_store_rows(s), dim = ist_store_dim(s);
        if (rows == 0 || dim == 0)
            abort();
        for (size_t i = 0; i < rows; i++) {
            const char *w = ist_store_word(s, i);
            if (ist_store_find(s, w) != (ptrdiff_t)i)
                abort();   /* every word finds its own row */
            volatile float x = ist_store_row(s, i)[dim - 1];
            (void)x;
        }
        (void)ist_store_fingerprint(s);
        ist_store_free(s);
    } else {
        if (e.msg[0] == '\0' || s != NULL)
            abort();   /* a refusal always says why and hands back nothing */
    }
    unlink(path);
    return 0;
}
