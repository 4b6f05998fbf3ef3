/* isthmus/align.h - an orthogonal map from a source vector space onto a target
 * space: fit it on seed pairs, refine it, save it, and replay it.
 *
 * Owns the map: the d x d orthogonal matrix W (a normalised source row x maps
 * to x W), the normalisation plans of both sides, the fingerprints of the two
 * vector files it was fitted on, the seed list's checksum and the history of
 * refinement. The file layout is in docs/formats.md, section "Map file".
 *
 * Fit: orthogonal Procrustes on the seed pairs (Schönemann 1966; Xing et al.
 * 2015, "Normalized word embedding and orthogonal transform for bilingual word
 * translation"; Smith et al. 2017, "Offline bilingual word vectors, orthogonal
 * transformations and the inverted softmax"). Refinement by self-learning
 * (Artetxe et al. 2017, "Learning bilingual word embeddings with (almost) no
 * bilingual data"): a new dictionary is induced from the mutual nearest
 * neighbours under CSLS among the N most frequent words of each side, and W is
 * refitted on it (Conneau et al. 2018, "Word translation without parallel
 * data"); this repeats while the mean CSLS of the induced pairs rises. */
#ifndef ISTHMUS_ALIGN_H
#define ISTHMUS_ALIGN_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/linalg.h>
#include <isthmus/matrix.h>
#include <isthmus/norm.h>
#include <isthmus/pairs.h>
#include <isthmus/retrieve.h>
#include <isthmus/store.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct ist_map ist_map;   /* opaque; read-only use may be shared by threads */

/** One refinement round, as reported to the callback and kept in the map. */
typedef struct ist_align_round {
    size_t round;          /* 1-based */
    size_t pairs;          /* mutual CSLS neighbours induced by the map of the round before */
    double mean_csls;      /* their mean CSLS */
    double seed_cos;       /* fit of the refitted map on the induced pairs */
    double orth_error;     /* ||W^T W - I||_F of the refitted map */
    bool kept;             /* false: the mean CSLS did not rise and the earlier map stays */
} ist_align_round;

typedef void (*ist_align_round_fn)(const ist_align_round *round, void *ctx);

#define IST_ALIGN_REFINE_ROUNDS_DEFAULT 5u
#define IST_ALIGN_REFINE_VOCAB_DEFAULT 5000u

typedef struct ist_align_opts {
    const char *source_norm;      /* normalisation spec, source [IST_NORM_DEFAULT] */
    const char *target_norm;      /* target [IST_NORM_DEFAULT] */
    size_t refine_rounds;         /* at most this many rounds; 0 = Procrustes only [5] */
    size_t refine_vocab;          /* N most frequent words of each side [5000] */
    bool refine_keep_seeds;       /* refit on induced pairs plus the seed pairs [false] */
    double min_gain;              /* a round must raise the mean CSLS by more [1e-4] */
    size_t min_seed_pairs;        /* refuse fewer kept seed pairs; 0 = the dimension [0]:
                                     fewer pairs than dimensions leave the rotation
                                     undetermined outside the span of the seeds */
    ist_search_opts search;       /* CSLS k, tile memory and threads */
    ist_align_round_fn on_round;  /* called after each round; may be NULL */
    void *ctx;
} ist_align_opts;

IST_API void ist_align_opts_init(ist_align_opts *opts);

/** Fit a map on resolved seed pairs (ist_pairs_resolve() against the same
 *  stores, at least one kept pair), then refine it as the options say.
 *  Success: *out owns the map; release with ist_map_free(). */
IST_API ist_status ist_align_fit(const ist_store *src, const ist_store *tgt,
                                 const ist_pairs *seeds, const ist_align_opts *opts,
                                 ist_map **out, ist_error *err);

IST_API void ist_map_free(ist_map *map);          /* NULL: no-op */

IST_API size_t ist_map_dim(const ist_map *map);
/** W, dim x dim; borrowed until ist_map_free(). */
IST_API ist_cmatview ist_map_matrix(const ist_map *map);
IST_API const ist_norm *ist_map_source_norm(const ist_map *map);
IST_API const ist_norm *ist_map_target_norm(const ist_map *map);
IST_API uint64_t ist_map_source_fingerprint(const ist_map *map);
IST_API uint64_t ist_map_target_fingerprint(const ist_map *map);
IST_API uint64_t ist_map_seed_checksum(const ist_map *map);
IST_API size_t ist_map_seed_pairs(const ist_map *map);
/** The seed pairs the map was fitted on (words, not resolved), for leakage
 *  checks with ist_pairs_overlap(). Borrowed; valid until ist_map_free(). */
IST_API const ist_pairs *ist_map_seeds(const ist_map *map);
/** The map's metadata as a JSON object text (fingerprints, normalisation,
 *  seed fit, refinement rounds; not the matrix or the seed words).
 *  Success: *json is the caller's; release with ist_map_free_text(). */
IST_API ist_status ist_map_describe(const ist_map *map, char **json, ist_error *err);
IST_API void ist_map_free_text(char *text);        /* NULL: no-op */
/** Fit of the Procrustes map on the seeds (before refinement). */
IST_API ist_procrustes_info ist_map_seed_fit(const ist_map *map);
/** Refinement history: rounds run (kept or not) and round i. */
IST_API size_t ist_map_rounds(const ist_map *map);
IST_API ist_align_round ist_map_round(const ist_map *map, size_t i);
/** A map with the same plans and fingerprints but W from the seeds only
 *  (before refinement). Success: *out owns it. */
IST_API ist_status ist_map_seed_only(const ist_map *map, ist_map **out, ist_error *err);

/** Check that src and tgt are the files the map was fitted on (fingerprints
 *  and dimension). IST_ERR_INVALID names the side that differs. */
IST_API ist_status ist_map_check(const ist_map *map, const ist_store *src, const ist_store *tgt,
                                 ist_error *err);

/** Normalised, mapped copies of all source rows (xs) and normalised copies of
 *  all target rows (zt), ready for retrieval. Either out-pointer may be NULL
 *  when not needed. Success: the caller owns the matrices. */
IST_API ist_status ist_map_apply(const ist_map *map, const ist_store *src, const ist_store *tgt,
                                 ist_matrix **xs, ist_matrix **zt, ist_error *err);

/** Write the map (docs/formats.md "Map file"), atomically. */
IST_API ist_status ist_map_save(const ist_map *map, const char *path, ist_error *err);
/** Read a map file; IST_ERR_FORMAT names what is wrong (magic, version,
 *  checksum, sizes). Success: *out owns the map. */
IST_API ist_status ist_map_load(const char *path, ist_map **out, ist_error *err);

/** Write the mapped source vectors (xs from ist_map_apply()) as a vector file
 *  with the source words and counts; the provenance names the map. */
IST_API ist_status ist_map_save_mapped(const ist_map *map, const ist_store *src,
                                       const ist_matrix *xs, const char *path, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
