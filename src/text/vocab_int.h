/* vocab_int.h - the word index used by vocab and store. */
#ifndef ISTHMUS_VOCAB_INT_H
#define ISTHMUS_VOCAB_INT_H

#include <stddef.h>
#include <stdint.h>

#include <isthmus/error.h>

/* Open-addressing index from a word to a 32-bit id; words live elsewhere and
 * are reached through the callback. */
typedef struct ist_index {
    uint32_t *slots;      /* id + 1; 0 = empty */
    uint32_t *tags;       /* high bits of the hash, to skip most compares */
    size_t cap;           /* power of two */
    size_t used;
} ist_index;

typedef const char *(*ist_index_word_fn)(const void *ctx, uint32_t id, size_t *len);

ist_status ist_index_init(ist_index *ix, size_t expect, ist_error *err);
void ist_index_free(ist_index *ix);
/* Find id or -1. */
ptrdiff_t ist_index_find(const ist_index *ix, const char *w, size_t len, ist_index_word_fn fn,
                         const void *ctx);
/* Insert id for word (must be absent); grows as needed. */
ist_status ist_index_insert(ist_index *ix, const char *w, size_t len, uint32_t id,
                            ist_index_word_fn fn, const void *ctx, ist_error *err);

#endif
