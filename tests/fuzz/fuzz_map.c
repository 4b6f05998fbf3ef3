/* fuzz_map.c - any bytes given as a map file are either loaded into a consistent map or
 * refused with a message; never a crash or a leak. Random bytes almost never carry a
 * matching checksum, so each input is tried twice: as it is, and with its last 8 bytes
 * replaced by the checksum of the rest, which lets the fuzzer reach the header, metadata
 * and matrix checks behind it. A loaded map is saved and loaded again: the second save is
 * byte-identical to the first. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <isthmus/align.h>

#include "fuzz_file.h"
#include "hash_int.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static unsigned char *
slurp(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    unsigned char *p = NULL;
    long n;

    if (!f || fseek(f, 0, SEEK_END) != 0 || (n = ftell(f)) < 0 || fseek(f, 0, SEEK_SET) != 0)
        abort();
    p = malloc((size_t)n + 1);
    if (!p || fread(p, 1, (size_t)n, f) != (size_t)n)
        abort();
    fclose(f);
    *len = (size_t)n;
    return p;
}

static void
check_map(const ist_map *m)
{
    char a[FUZZ_PATH_CAP], b[FUZZ_PATH_CAP];
    ist_map *m2 = NULL;
    char *desc = NULL;
    ist_error e;
    size_t la, lb;

    if (ist_map_dim(m) == 0 || ist_map_matrix(m).rows != ist_map_dim(m))
        abort();
    if (ist_map_describe(m, &desc, &e) != IST_OK)
        abort();
    ist_map_free_text(desc);
    if (!fuzz_path(a, sizeof a, "a.map") || !fuzz_path(b, sizeof b, "b.map"))
        abort();
    if (ist_map_save(m, a, &e) != IST_OK || ist_map_load(a, &m2, &e) != IST_OK ||
        ist_map_save(m2, b, &e) != IST_OK)
        abort();   /* what was loaded can be written and read back */
    unsigned char *pa = slurp(a, &la), *pb = slurp(b, &lb);
    if (la != lb || memcmp(pa, pb, la) != 0)
        abort();
    free(pa);
    free(pb);
    ist_map_free(m2);
    unlink(a);
    unlink(b);
}

static void
try_load(const uint8_t *data, size_t size)
{
    char path[FUZZ_PATH_CAP];
    ist_map *m = NULL;
    ist_error e;

    if (!fuzz_write_file(path, sizeof path, data, size))
        return;
    if (ist_map_load(path, &m, &e) == IST_OK) {
        check_map(m);
        ist_map_free(m);
    } else if (e.msg[0] == '\0' || m != NULL) {
        abort();   /* a refusal always says why and hands back nothing */
    }
    unlink(path);
}

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    try_load(data, size);
    if (size >= 16) {
        unsigned char *fixed = malloc(size);
        if (!fixed)
            return 0;
        memcpy(fixed, data, size);
        uint64_t h = ist_hash_bytes(fixed, size - 8);
        for (int i = 0; i < 8; i++)
            fixed[size - 8 + i] = (unsigned char)(h >> (8 * i));
        try_load(fixed, size);
        free(fixed);
    }
    return 0;
}
