/* isthmus/propose.h - growing a bilingual word list: candidate pairs for a
 * person to review, and the reviewed rows merged back into a pair file.
 *
 * Owns the candidate lists it returns. For the frequent source words that no
 * given list holds yet, the best target words under a map are found by CSLS
 * (cross-domain similarity local scaling, Conneau et al. 2018, "Word
 * translation without parallel data", ICLR) with the blocked retrieval of
 * retrieve.h, each with its margin to the best other candidate and whether
 * the pair are mutual nearest neighbours. The review order puts first the
 * frequent words whose answer is least certain (margin sampling, Scheffer et
 * al. 2001, "Active hidden Markov models for information extraction"), or,
 * on request, the most certain pairs first; docs/methods.md explains both.
 * The candidate list file is in docs/formats.md, section "Candidate list".
 *
 * Candidates are statistical suggestions: a speaker of the language reviews
 * them before they drive anything customer-facing. */
#ifndef ISTHMUS_PROPOSE_H
#define ISTHMUS_PROPOSE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/align.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>
#include <isthmus/pairs.h>
#include <isthmus/retrieve.h>
#include <isthmus/store.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Which candidates a reviewer sees first. */
typedef enum ist_propose_order {
    IST_PROPOSE_INFORMATIVE = 0,   /* lowest margin / count first (margin x rank without counts) */
    IST_PROPOSE_CERTAIN            /* mutual neighbours, then highest margin first */
} ist_propose_order;

#define IST_PROPOSE_SOURCES_DEFAULT 5000u
#define IST_PROPOSE_CANDIDATES_DEFAULT 3u
#define IST_PROPOSE_MAX_CANDIDATES 100u
#define IST_PROPOSE_MIN_SCORE_DEFAULT 0.0f
#define IST_PROPOSE_STOP_SHARE_DEFAULT 0.005

/** The review filters, shared by propose, lookup and the diagnostics' lists. */
typedef struct ist_word_filter {
    bool numbers;         /* let number-shaped words (6.39, 4493, 40cm) and codes (tw-4410)
                           * through [false: a code passes only as its own same-spelling
                           * candidate; see ist_word_shape()] */
    float min_score;      /* candidates scoring (CSLS or cosine) below this are left out
                           * [0]; -INFINITY keeps all */
    double stop_share;    /* stop list: words whose count is more than this share of all
                           * counted tokens of their file (function words: the, de, en)
                           * are left out, as source words and as candidates [0.005];
                           * 0 or 1 or more = no stop list; ignored without counts */
    bool variants;        /* leave out likely misspellings: a word of 4 or more bytes one
                           * edit (two neighbouring characters swapped, or one character
                           * changed, added or removed) from a word of the same file at
                           * least 50 times as frequent: ewll (well), tilwlick (tillwick),
                           * áfcil (fácil); an inflection is
                           * rarely that much rarer than its base form [true]; ignored
                           * without counts */
} ist_word_filter;

#define IST_FILTER_VARIANT_RATIO 50u
#define IST_FILTER_VARIANT_ROWS 20000u   /* only the most frequent rows are checked */

/** Fill f with the defaults above. */
IST_API void ist_word_filter_init(ist_word_filter *f);

/** The bits ist_word_filter_mark() sets, shifted left by its `shift`. */
enum { IST_FILTER_STOP = 1, IST_FILTER_SHAPE = 2, IST_FILTER_VARIANT = 4 };

/** Which rows of s the filter leaves out as words: flags[r] |= (IST_FILTER_STOP
 *  for a stop-list word, else IST_FILTER_SHAPE for a number or a code unless
 *  f->numbers, else IST_FILTER_VARIANT for a likely misspelling) << shift. n[3]
 *  (may be NULL) gets how many rows each rule marked (stop, shape, variant).
 *  IST_ERR_INVALID for a NaN share or score. */
IST_API ist_status ist_word_filter_mark(const ist_word_filter *f, const ist_store *s,
                                        unsigned char *flags, unsigned shift, size_t n[3],
                                        ist_error *err);

typedef struct ist_propose_opts {
    size_t top_sources;          /* look at the N most frequent source rows; 0 = all [5000] */
    size_t candidates;           /* target candidates per source word, 1..100 [3] */
    ist_propose_order order;     /* [IST_PROPOSE_INFORMATIVE] */
    bool skip_gold_targets;      /* drop targets that are gold targets of a listed word [false] */
    ist_word_filter filter;      /* numbers, stop list, minimum score [ist_word_filter_init] */
    bool same_block;             /* words whose first candidate is spelt the same (brands,
                                  * model codes, sizes) go to a block after the others, in
                                  * frequency order, for acceptance in bulk [true] */
    ist_search_opts search;      /* CSLS k, tile memory and threads */
} ist_propose_opts;

IST_API void ist_propose_opts_init(ist_propose_opts *opts);

/** One (source, candidate) row. */
typedef struct ist_proposal {
    size_t source_row;           /* row in the source vectors (frequency rank - 1) */
    size_t target_row;           /* row in the target vectors */
    size_t place;                /* 1-based place among this source word's candidates */
    float score;                 /* CSLS(source, target) */
    float margin;                /* score minus the best score of the word's other kept
                                  * candidates: > 0 only for the first; +inf when there is
                                  * no other target */
    bool mutual;                 /* the target's best source word under CSLS is this one */
    uint64_t source_count, target_count;   /* counts from the vector files (0: none) */
    size_t priority;             /* 1-based review position of the source word */
    bool same_spelling;          /* in the same-spelling block (see same_block) */
} ist_proposal;

/** What a run looked at. */
typedef struct ist_propose_stats {
    size_t considered;           /* source rows looked at (the N most frequent) */
    size_t listed;               /* of them, source words of a given list (skipped) */
    size_t proposed;             /* source words with at least one candidate */
    size_t rows;                 /* (source, candidate) rows */
    size_t gold_targets;         /* distinct target rows that are gold targets of a list */
    size_t skipped_targets;      /* candidates dropped as gold targets (skip_gold_targets) */
    size_t left_numbers;         /* unlisted source words left out as numbers or codes */
    size_t left_stop;            /* unlisted source words left out by the stop list */
    size_t left_variants;        /* unlisted source words left out as likely misspellings */
    size_t left_low;             /* source words whose every candidate scored below the
                                  * minimum score */
    size_t filtered_targets;     /* candidates passed over as numbers, codes, stop-list words
                                  * or likely misspellings */
    size_t same_spelling;        /* source words in the same-spelling block */
} ist_propose_stats;

typedef struct ist_proposals ist_proposals;   /* opaque, one owner */

/** Candidates from ready matrices: xs holds all mapped source rows and zt all
 *  normalised target rows (as ist_map_apply() makes them; rows of unit
 *  length), src and tgt the stores they came from (words and counts). The
 *  source words of the nlists lists (resolved or not; words are normalised as
 *  each vocabulary was, as ist_pairs_find_word() does) are not proposed;
 *  lists may be NULL when nlists is 0. With skip_gold_targets their target
 *  words are not proposed either. The CSLS terms use all rows of xs and zt.
 *  opts may be NULL for the
 *  defaults. Success: *out owns the rows, in review order; release with
 *  ist_proposals_free(). IST_ERR_INVALID for mismatched shapes or options,
 *  IST_ERR_CANCELLED when ist_cancel_requested() became true. */
IST_API ist_status ist_propose_views(ist_cmatview xs, ist_cmatview zt, const ist_store *src,
                                     const ist_store *tgt, const ist_pairs *const *lists,
                                     size_t nlists, const ist_propose_opts *opts,
                                     ist_proposals **out, ist_error *err);

/** Candidates under a map: checks that src and tgt are the map's files
 *  (ist_map_check()), applies the map and calls ist_propose_views(); the
 *  map's own seed pairs are excluded as well as the given lists. */
IST_API ist_status ist_propose_run(const ist_map *map, const ist_store *src,
                                   const ist_store *tgt, const ist_pairs *const *lists,
                                   size_t nlists, const ist_propose_opts *opts,
                                   ist_proposals **out, ist_error *err);

IST_API void ist_proposals_free(ist_proposals *p);   /* NULL: no-op */
IST_API size_t ist_proposals_count(const ist_proposals *p);
/** Row i in review order (rows of one source word together, by place).
 *  Borrowed; valid until ist_proposals_free(). */
IST_API const ist_proposal *ist_proposals_get(const ist_proposals *p, size_t i);
IST_API ist_propose_stats ist_proposals_stats(const ist_proposals *p);

/** What the candidate file's comment header names. Paths may be NULL. */
typedef struct ist_propose_inputs {
    const char *source_path, *target_path, *map_path;
    uint64_t seed_checksum;              /* the map's seed checksum (0: none) */
    const char *const *list_paths;       /* the excluded lists' paths */
    const uint64_t *list_checksums;      /* and their ist_pairs_checksum() */
    size_t nlists;
} ist_propose_inputs;

/** Write the rows as a candidate list (docs/formats.md "Candidate list"):
 *  two comment lines (inputs with fingerprints, options, the review caution),
 *  the column names, then one tab-separated row each with an empty decision;
 *  the same-spelling block follows the other rows after a comment line, its
 *  rows marked "same-spelling" in the block column.
 *  src and tgt are the stores of the run. Atomic; "-" writes to standard
 *  output. */
IST_API ist_status ist_proposals_write(const ist_proposals *p, const ist_store *src,
                                       const ist_store *tgt, const ist_propose_inputs *in,
                                       const char *path, ist_error *err);

/* ---- merging reviewed candidate lists into a pair file ------------------- */

/** Called once per conflict with a message naming both places. */
typedef void (*ist_merge_conflict_fn)(const char *msg, void *ctx);

typedef struct ist_merge_opts {
    bool one_target;             /* a source word may have one target only [false] */
    bool accept_same_spelling;   /* undecided rows of the same-spelling block count as
                                  * accepted (a decision written in the row still wins) [false] */
    bool skip_conflicts;         /* leave conflicting pairs out instead of failing [false] */
    ist_merge_conflict_fn on_conflict;   /* may be NULL */
    void *ctx;
    const ist_store *target_vectors;     /* check the word of every "use WORD" against this
                                            vocabulary (normalised as it was) and refuse one
                                            it lacks [NULL: unchecked, counted in
                                            ist_merge_summary.unchecked] */
} ist_merge_opts;

IST_API void ist_merge_opts_init(ist_merge_opts *opts);

typedef struct ist_merge_summary {
    size_t seed_pairs;           /* pairs in the seed list */
    size_t rows;                 /* candidate rows read */
    size_t accepted;             /* rows marked accept (bulk_accepted included) */
    size_t bulk_accepted;        /* undecided same-spelling rows taken by accept_same_spelling */
    size_t corrected;            /* rows marked "use WORD" with another target */
    size_t rejected;
    size_t undecided;            /* empty decision */
    size_t duplicates;           /* accepted pairs already in the list (skipped) */
    size_t conflicts;
    size_t added;                /* pairs written after the seed lines */
    size_t unchecked;            /* "use WORD" corrections not checked against a vocabulary */
} ist_merge_summary;

/** Merge reviewed candidate lists into the seed pair file seed_path and write
 *  the result to out_path (atomic): the seed file's lines first, as they
 *  were, then the new pairs. A decision is empty, "accept", "reject" or "use
 *  WORD" (keywords in any case); anything else is IST_ERR_FORMAT naming the
 *  file and line. With accept_same_spelling, an empty decision in a row whose
 *  "block" column says same-spelling is an accept. Pairs are compared byte for byte. A conflict is a pair
 *  both accepted (or in the seed list) and rejected, or, with one_target, a
 *  source word given two targets; each is passed to on_conflict, and unless
 *  skip_conflicts the merge fails with IST_ERR_INVALID (the first conflict in
 *  err) and writes nothing. sum may be NULL; it is filled also on failure
 *  as far as the merge went. */
IST_API ist_status ist_propose_merge(const char *seed_path, const char *const *reviewed,
                                     size_t nreviewed, const ist_merge_opts *opts,
                                     const char *out_path, ist_merge_summary *sum,
                                     ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
