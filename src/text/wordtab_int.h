/* wordtab_int.h - the counting table behind corpus building.
 *
 * Counting is the hot loop of preparation (one lookup per token), so it has
 * its own open-addressing table: 32-byte slots that hold the count, a 32-bit
 * tag of the hash, the id and words of up to 12 bytes inline, so counting a
 * word usually touches one cache line. Ids are dense in first-seen order; the words then go into an
 * ist_vocab in that order (same ids) for sorting and pruning. The hash is not
 * stored anywhere, so it may change between versions. */
#ifndef ISTHMUS_WORDTAB_INT_H
#define ISTHMUS_WORDTAB_INT_H

#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <isthmus/error.h>

#define IST_WORDTAB_INLINE 12

typedef struct ist_wslot {
    uint64_t count;
    uint32_t tag;          /* high half of the hash */
    uint32_t id_plus1;     /* 0 = empty */
    uint32_t len;
    char w[IST_WORDTAB_INLINE];
} ist_wslot;

typedef struct ist_wordtab {
    ist_wslot *slot;
    size_t cap, n;         /* cap a power of two, n words */
    uint64_t *off;         /* [n] into pool */
    size_t meta_cap;
    char *pool;            /* all words, each NUL-terminated */
    size_t pool_used, pool_cap;
} ist_wordtab;

ist_status ist_wordtab_init(ist_wordtab *t, ist_error *err);
void ist_wordtab_free(ist_wordtab *t);
/* Count one occurrence; *id receives the word's id. */
ist_status ist_wordtab_add(ist_wordtab *t, const char *w, size_t len, uint32_t *id,
                           ist_error *err);

/* Count n occurrences at once (n may be 0: the word gets its id, its count stays). */
ist_status ist_wordtab_add_n(ist_wordtab *t, const char *w, size_t len, uint64_t n,
                             uint32_t *id, ist_error *err);
/* Forget every word, keeping the memory (ids start from 0 again). */
void ist_wordtab_reset(ist_wordtab *t);

/* Counts by id into out[n] (allocated by the caller). */
void ist_wordtab_counts(const ist_wordtab *t, uint64_t *out);

static inline const char *
ist_wordtab_word(const ist_wordtab *t, uint32_t id)
{
    return t->pool + t->off[id];
}

/* Length in bytes of word `id` (its bytes are NUL-terminated in the pool). */
static inline size_t
ist_wordtab_len(const ist_wordtab *t, uint32_t id)
{
    uint64_t end = id + 1 < t->n ? t->off[id + 1] : t->pool_used;
    return (size_t)(end - t->off[id] - 1);
}

#endif
