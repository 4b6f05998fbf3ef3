/* isthmus/vocab.h - word <-> id table with counts.
 *
 * Owns UTF-8 strings (in an arena) and an open-addressing hash index with O(1)
 * expected lookup. Ids are dense, 0..size-1, in insertion order until
 * ist_vocab_sort_prune() puts them in frequency order. */
#ifndef ISTHMUS_VOCAB_H
#define ISTHMUS_VOCAB_H

#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

/** The longest word, in bytes of UTF-8, that any isthmus file holds: one limit for the
 *  field everywhere. Training skips longer tokens; vector files, pair lists, candidate
 *  lists and reviewed rows refuse longer words naming file and line, so whatever one
 *  command writes the next reads (a pair line is then far below its 64 KiB line limit,
 *  a reviewed row below its 1 MiB one). */
#define IST_WORD_MAX_BYTES 4096

typedef struct ist_vocab ist_vocab;     /* opaque, one owner */

/** Empty table. Success: *out owns it; release with ist_vocab_free(). */
IST_API ist_status ist_vocab_new(ist_vocab **out, ist_error *err);
IST_API void ist_vocab_free(ist_vocab *v);               /* NULL: no-op */

/** Number of words. */
IST_API size_t ist_vocab_size(const ist_vocab *v);

/** Add `count` occurrences of the word (len bytes, need not be terminated).
 *  A new word gets the next id. *id (may be NULL) receives the word's id. */
IST_API ist_status ist_vocab_add(ist_vocab *v, const char *word, size_t len, uint64_t count,
                                 uint32_t *id, ist_error *err);

/** Id of a word, or -1 when absent. */
IST_API ptrdiff_t ist_vocab_find(const ist_vocab *v, const char *word, size_t len);

/** Borrowed, NUL-terminated; valid until the table is freed or pruned. */
IST_API const char *ist_vocab_word(const ist_vocab *v, uint32_t id);
IST_API size_t ist_vocab_word_len(const ist_vocab *v, uint32_t id);
IST_API uint64_t ist_vocab_count(const ist_vocab *v, uint32_t id);
/** Sum of all counts. */
IST_API uint64_t ist_vocab_total(const ist_vocab *v);

/** Re-number ids by descending count (ties: byte order of the word, so the
 *  result does not depend on insertion order), then keep only words with
 *  count >= min_count and, when max_size > 0, the max_size most frequent.
 *  When remap is not NULL it must hold ist_vocab_size() entries before the
 *  call; remap[old_id] receives the new id or UINT32_MAX for a dropped word. */
IST_API ist_status ist_vocab_sort_prune(ist_vocab *v, uint64_t min_count, size_t max_size,
                                        uint32_t *remap, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
