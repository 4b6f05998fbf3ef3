/* store_int.h - the store struct, shared by store.c, store_native.c and store_text.c. */
#ifndef ISTHMUS_STORE_INT_H
#define ISTHMUS_STORE_INT_H

#include <isthmus/store.h>

#include "vocab_int.h"

struct ist_store {
    size_t rows, dim, stride;
    size_t file_rows;         /* native: rows in the file (rows may be fewer) */
    float *data;              /* own aligned block, or inside map */
    bool owns_data;
    /* row i's word is wbase + woff[i], wlen[i] bytes, NUL-terminated */
    const char *wbase;        /* blob (own) or inside map */
    const uint64_t *woff;     /* own_woff or inside map */
    uint64_t *own_woff;
    uint32_t *wlen;           /* own, rows entries; UINT32_MAX = not set yet */
    const uint64_t *counts;   /* own_counts or inside map */
    uint64_t *own_counts;
    char *blob;               /* own word pool (text / new) */
    size_t blob_used, blob_cap;
    size_t cap_rows;          /* rows the own arrays have room for */
    ist_index ix;
    char *prov;               /* own, NUL-terminated */
    void *map;                /* native: the mapped file */
    size_t map_len;
    ist_store_format src_format;
    bool src_gzip, src_header;
    ist_store_check checked;
    bool have_fp;
    uint64_t fp;
};

/* Native layout constants (docs/formats.md). */
#define IST_NATIVE_MAGIC "ISTHMUSV"
#define IST_NATIVE_VERSION 1u
#define IST_NATIVE_HEADER 128u

ist_status ist_store_alloc(size_t rows, size_t dim, size_t cap_rows, ist_store **out,
                           ist_error *err);
/* Append a word for the next row during loading (rows grows separately). */
ist_status ist_store_push_word(ist_store *s, size_t row, const char *w, size_t len,
                               uint64_t count, ist_error *err);
/* Check a word: valid UTF-8, no whitespace or control bytes, not empty.
 * Returns NULL when fine, else a short description of the problem. */
const char *ist_store_word_problem(const char *w, size_t len, size_t *bad_at);
/* Words index lookup helper for ist_index. */
const char *ist_store_word_of(const void *ctx, uint32_t id, size_t *len);
/* crc32 of the words, each followed by a NUL, in row order. */
uint32_t ist_store_words_crc(const ist_store *s);
/* crc32 of the matrix block (rows * stride floats, padding zero). */
uint32_t ist_store_matrix_crc(const float *data, size_t rows, size_t stride);

ist_status ist_store_open_native(const char *path, int fd, const ist_store_opts *opts,
                                 ist_store **out, ist_error *err);
ist_status ist_store_open_text(const char *path, const ist_store_opts *opts, ist_store **out,
                               ist_error *err);
ist_status ist_store_save_native(const ist_store *s, const char *path, ist_error *err);
ist_status ist_store_save_text(const ist_store *s, const char *path,
                               const ist_store_save_opts *opts, ist_error *err);

#endif
