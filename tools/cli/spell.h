/* spell.h - how close two spellings are, for the "did you mean" hints of the program
 * (unknown commands, options and words). The distance is the optimal string alignment
 * distance over Unicode code points: the fewest insertions, deletions, substitutions
 * and swaps of two neighbouring characters that turn one word into the other, no
 * substring edited twice (Damerau, "A technique for computer detection and correction
 * of spelling errors", CACM 7(3), 1964, extended by Levenshtein's insertions and
 * deletions). Plain C, no library calls beyond libc, so the tests build it alone. */
#ifndef ISTHMUS_SPELL_H
#define ISTHMUS_SPELL_H

#include <stddef.h>

/* Longest word compared, in code points; longer words are only equal or far apart. */
#define SPELL_MAX_CHARS 64

/* The distance between a and b (UTF-8; a byte that is no valid UTF-8 counts as one
 * character), or limit + 1 as soon as it is known to exceed limit. */
size_t spell_distance(const char *a, const char *b, size_t limit);

/* The largest distance that still looks like a slip of the keys for a word of this
 * spelling: 1 up to 4 characters, 2 up to 8, else 3. */
size_t spell_limit(const char *word);

/* The closest of n candidates to word (get(ctx, i) gives candidate i; NULL skips it):
 * up to cap indices, nearest first and, at one distance, in candidate order, all
 * within spell_limit(word) and none equal to word. Returns how many were stored. */
size_t spell_nearest(const char *word, const char *(*get)(const void *ctx, size_t i),
                     const void *ctx, size_t n, size_t *out, size_t cap);

#endif
