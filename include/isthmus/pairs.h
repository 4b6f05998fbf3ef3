/* isthmus/pairs.h - bilingual word lists: read, match to two vocabularies, split,
 * check for leakage, and make seed pairs from strings both sides share.
 *
 * Owns the words of a list (one pool) and, once resolved, the row of each word
 * in the source and target vector files. A pair file is UTF-8 text, plain or
 * gzip: one pair per line, the source word then the target word separated by
 * tabs or spaces; blank lines and lines starting with '#' are skipped; a byte
 * order mark and CRLF line ends are accepted; several lines may share a source
 * word (several gold translations). Words are normalised as the vocabulary of
 * each side was, with the text options read from the vector file's provenance;
 * a file without them is matched exactly, and the coverage report says so.
 * Seeds from identical strings follow the practice of Artetxe et al. 2017
 * ("Learning bilingual word embeddings with (almost) no bilingual data"). */
#ifndef ISTHMUS_PAIRS_H
#define ISTHMUS_PAIRS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/store.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct ist_pairs ist_pairs;   /* opaque, one owner */

/** Read a pair file. A line with one word or more than two, or invalid UTF-8,
 *  is IST_ERR_FORMAT naming the file and line. Success: *out owns the list;
 *  release with ist_pairs_free(). */
IST_API ist_status ist_pairs_read(const char *path, ist_pairs **out, ist_error *err);

/** The file a list was read from (borrowed), or NULL for a list made in memory or split
 *  from another. */
IST_API const char *ist_pairs_path(const ist_pairs *p);
/** How to name the list to people (borrowed): its path, "held out from PATH" or "kept
 *  as seeds from PATH" for the parts of ist_pairs_split(); NULL for a list made in
 *  memory. */
IST_API const char *ist_pairs_label(const ist_pairs *p);
/** The checksum of the list as it came in: for a list read from a file, of every pair
 *  as read, before any vocabulary was consulted (ist_pairs_checksum() of the unresolved
 *  list); for a part of ist_pairs_split(), of the pairs it received, so the part saved
 *  with ist_pairs_save() and read back has the same one. false (and *out 0) for a list
 *  made in memory or changed by ist_pairs_add() since. */
IST_API bool ist_pairs_list_checksum(const ist_pairs *p, uint64_t *out);

/** An empty list to fill with ist_pairs_add(). */
IST_API ist_status ist_pairs_new(ist_pairs **out, ist_error *err);
/** Append a pair (words copied, not normalised). */
IST_API ist_status ist_pairs_add(ist_pairs *p, const char *src, const char *tgt, ist_error *err);
IST_API void ist_pairs_free(ist_pairs *p);           /* NULL: no-op */

IST_API size_t ist_pairs_count(const ist_pairs *p);
/** Words of pair i (normalised once resolved). Borrowed until the next change. */
IST_API const char *ist_pairs_source(const ist_pairs *p, size_t i);
IST_API const char *ist_pairs_target(const ist_pairs *p, size_t i);
/** 1-based line of pair i in its file; 0 for pairs made in memory. */
IST_API uint64_t ist_pairs_line(const ist_pairs *p, size_t i);

/** What matching a list against two vocabularies found. */
typedef struct ist_pairs_coverage {
    size_t read;             /* pairs in the list */
    size_t kept;             /* both words found, pair not seen before */
    size_t duplicates;       /* both found, pair seen before (after normalisation) */
    size_t missing_source;   /* only the source word is missing */
    size_t missing_target;   /* only the target word is missing */
    size_t missing_both;
    size_t sources_read;     /* distinct source words in the list */
    size_t sources_kept;     /* distinct source words among kept pairs */
    bool source_exact;       /* source vectors carry no text options: exact match */
    bool target_exact;
} ist_pairs_coverage;

/** Normalise the words as each side's vocabulary was, find their rows, and
 *  mark each pair kept, missing or duplicate. cov may be NULL. */
IST_API ist_status ist_pairs_resolve(ist_pairs *p, const ist_store *src, const ist_store *tgt,
                                     ist_pairs_coverage *cov, ist_error *err);
/** Rows of pair i in the source / target vectors; -1 when the pair is not kept
 *  (or the list is not resolved). */
IST_API ptrdiff_t ist_pairs_source_row(const ist_pairs *p, size_t i);
IST_API ptrdiff_t ist_pairs_target_row(const ist_pairs *p, size_t i);
/** Write the kept pairs (all when not resolved) as a pair file, one
 *  "source<TAB>target" line each, atomically. */
IST_API ist_status ist_pairs_save(const ist_pairs *p, const char *path, ist_error *err);

/** Number of kept pairs (all pairs when not resolved). */
IST_API size_t ist_pairs_kept(const ist_pairs *p);

/** Split the kept pairs by source word: the distinct source words are ordered
 *  by a hash of (seed, word) and the first round(test_fraction * n) go to the
 *  test part with all their pairs, the rest to the seed part. The same list,
 *  fraction and seed give the same split whatever the line order. Both parts
 *  keep the rows of a resolved list. */
IST_API ist_status ist_pairs_split(const ist_pairs *p, double test_fraction, uint64_t seed,
                                   ist_pairs **seeds, ist_pairs **test, ist_error *err);

/** Source words of b also found among the source words of a (kept pairs of
 *  resolved lists): *shared gets their count, and the first up to cap of them
 *  (in b's order) go to first[] (borrowed from b; may be NULL when cap is 0). */
IST_API ist_status ist_pairs_overlap(const ist_pairs *a, const ist_pairs *b, const char **first,
                                     size_t cap, size_t *shared, ist_error *err);

/** Seed pairs (w, w) for every word w in both vector files whose count is at
 *  least min_count on both sides (the floor is ignored for a file that carries
 *  no counts); with marked_only, only words holding both a letter and a
 *  decimal digit (model codes such as tw-4410, sizes such as 500ml; not bare
 *  numbers such as prices) or an upper-case letter (left only where the
 *  vocabulary kept case). The list comes resolved. */
IST_API ist_status ist_pairs_identical(const ist_store *src, const ist_store *tgt,
                                       uint64_t min_count, bool marked_only, ist_pairs **out,
                                       ist_error *err);

/** Row of one word in a vector file after normalising it as that file's
 *  vocabulary was (exact match when the file carries no text options); -1
 *  when absent. */
IST_API ist_status ist_pairs_find_word(const ist_store *s, const char *word, ptrdiff_t *row,
                                       ist_error *err);

/** Order-independent checksum of the kept (source, target) pairs. */
IST_API ist_status ist_pairs_checksum(const ist_pairs *p, uint64_t *out, ist_error *err);
/** Order-independent hash of the distinct source words of the kept pairs. */
IST_API ist_status ist_pairs_sources_hash(const ist_pairs *p, uint64_t *out, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
