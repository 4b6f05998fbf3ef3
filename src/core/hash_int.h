/* hash_int.h - the string hash used by every table in the library. */
#ifndef ISTHMUS_HASH_INT_H
#define ISTHMUS_HASH_INT_H

#include <stddef.h>
#include <stdint.h>

/* 64-bit FNV-1a with a final avalanche; good enough for word tables, stable
 * across platforms (dictionary splits and dedup decisions depend on it). */
static inline uint64_t
ist_hash_bytes(const void *data, size_t len)
{
    const unsigned char *p = data;
    uint64_t h = 0xcbf29ce484222325ull;

    for (size_t i = 0; i < len; i++) {
        h ^= p[i];
        h *= 0x100000001b3ull;
    }
    h ^= h >> 33;
    h *= 0xff51afd7ed558ccdull;
    h ^= h >> 33;
    return h;
}

#endif
