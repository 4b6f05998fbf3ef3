/* isthmus/result.h - the result of a scoring run as one typed record: its inputs, the
 * options it ran with, every run's precision@k with intervals and per-query outcomes,
 * the test list's coverage and the diagnostics. The library builds it (ist_evaluate()),
 * writes it as the result JSON, loads it back, and the gate and the report take it as it
 * is. The file layout is in docs/formats.md, section "Result JSON"; the member names are
 * kept by the result module alone.
 *
 * Owns every string, array and the diagnostics it holds; release with ist_result_free().
 * The fields are for reading: change them only through the functions below. Intervals are
 * percentile bootstrap intervals (isthmus/bootstrap.h). */
#ifndef ISTHMUS_RESULT_H
#define ISTHMUS_RESULT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/align.h>
#include <isthmus/bootstrap.h>
#include <isthmus/diag.h>
#include <isthmus/error.h>
#include <isthmus/metrics.h>
#include <isthmus/pairs.h>
#include <isthmus/store.h>

#ifdef __cplusplus
extern "C" {
#endif

/** The result file format version this library writes and reads. */
#define IST_RESULT_VERSION 1

/** A vector file the result was scored on. */
typedef struct ist_result_vectors {
    char *path;                   /* as given, or NULL */
    bool has_fingerprint;
    uint64_t fingerprint;         /* store fingerprint recorded in the map */
    char *provenance;             /* the store's provenance JSON (how it was trained:
                                     ist_store_provenance()) when it is a JSON object,
                                     else NULL */
} ist_result_vectors;

/** A pair list: where it came from and its checksum as read (ist_pairs_list_checksum()). */
typedef struct ist_result_list {
    char *path;                   /* the file, or NULL when it was made in memory */
    char *label;                  /* for people: the path, or how the list was made; or NULL */
    bool has_checksum;
    uint64_t checksum;
} ist_result_list;

/** The test list and what the vectors covered of it. */
typedef struct ist_result_test {
    bool present;                 /* false: the run had no test list */
    ist_result_list list;         /* list.checksum: of the pairs as read ("list_checksum") */
    bool has_kept;
    uint64_t kept_checksum;       /* ist_pairs_checksum() of the kept pairs */
    uint64_t sources_hash;        /* ist_pairs_sources_hash() of the kept pairs */
    size_t source_words;          /* distinct source words kept */
    bool has_coverage;
    ist_pairs_coverage coverage;
    bool has_overlap;
    size_t overlap;               /* test source words also seed source words */
    bool overlap_allowed;
} ist_result_test;

/** Which retrieval methods and map stages a scoring run covers (bit sets). */
enum { IST_RESULT_COSINE = 1, IST_RESULT_CSLS = 2 };
enum { IST_STAGE_SEED = 1, IST_STAGE_REFINED = 2 };

/** How align made the map and its seeds, recorded among the options of its result. */
typedef struct ist_result_fit {
    const char *normalise;        /* normalisation steps of both sides */
    size_t refine_rounds, refine_vocab;
    bool refine_keep_seeds;
    bool identical_seeds, identical_marked;
    uint64_t identical_min_count;
    double hold_out;              /* share of the seed list held out as the test list */
    uint64_t split_seed;
} ist_result_fit;

/** The options of a scoring run as the result records them. */
typedef struct ist_result_options {
    bool present;
    unsigned methods;             /* IST_RESULT_COSINE | IST_RESULT_CSLS */
    size_t neighbourhood;         /* CSLS k */
    size_t memory_bytes;
    unsigned threads;
    bool allow_overlap;
    size_t band_edges[IST_METRICS_MAX_BANDS - 1];
    size_t nedges;
    unsigned stages;              /* 0 when the result does not say (align records fit) */
    bool has_fit;
    ist_result_fit fit;           /* fit.normalise owned by the result */
} ist_result_options;

/** One scored run: a map stage with one retrieval method. */
typedef struct ist_result_run {
    char *label;                  /* "seed" (the map fitted on the seeds) or "refined" */
    ist_metrics m;                /* figures; m.query_row / m.query_place when per-query kept */
    bool has_ci;
    ist_ci_opts ci_opts;          /* how the intervals were drawn */
    ist_metrics_ci ci;            /* intervals overall and per band */
    bool band_has_ci[IST_METRICS_MAX_BANDS];
    size_t nper_query;            /* per-query outcomes (0: none); m.queries when built */
    char **query_source;          /* source word of each (NULL entries when unknown) */
    size_t *query_band;           /* band index of each */
    bool has_rows;                /* m.query_row holds frequency rank - 1 */
} ist_result_run;

/** A scoring run's whole record. */
typedef struct ist_result {
    int version;
    char *command;                /* "align", "score", or NULL */
    ist_result_vectors source, target;
    char *map_path;
    ist_result_list seeds;        /* seeds.checksum: ist_map_seed_checksum() */
    ist_result_test test;
    ist_result_options options;
    char *map_json;               /* the map's description (ist_map_describe()), or NULL */
    ist_result_run *runs;
    size_t nruns;
    ist_diag *diagnostics;        /* or NULL */
    char *name;                   /* the file it was loaded from, or a label, for messages */
} ist_result;

/** Release a result and everything it owns. NULL: no-op. */
IST_API void ist_result_free(ist_result *r);

/** Options of ist_evaluate(). */
typedef struct ist_evaluate_opts {
    ist_eval_opts eval;           /* bands and the search group (method unused) */
    unsigned methods;             /* [IST_RESULT_COSINE | IST_RESULT_CSLS] */
    unsigned stages;              /* [IST_STAGE_REFINED]; a map without refinement rounds
                                     has only its seed stage: REFINED scores it as "seed" */
    bool record_stages;           /* write the stages among the options [true] */
    bool allow_overlap;           /* score a test list sharing source words with the seeds
                                     [false: IST_ERR_INVALID] */
    bool diagnostics;             /* run ist_diag_run() on the last stage scored [true] */
    ist_diag_opts diag;           /* its search group comes from eval */
    ist_ci_opts ci;               /* intervals of each run */
    const char *command;          /* recorded: "align" or "score" [score] */
    const char *name;             /* how messages name the result [NULL: the command] */
    const char *source_path, *target_path, *map_path;  /* recorded; may be NULL */
    const char *seeds_path;       /* recorded seed list (NULL: none or made in memory) */
    const char *seeds_label;      /* for people [NULL: the path] */
    const ist_result_fit *fit;    /* align's choices, recorded among the options; or NULL */
    /* The refined stage's map already applied (ist_map_apply()), so that it is applied
     * once; both NULL: ist_evaluate() applies it. Borrowed. */
    const ist_matrix *refined_xs, *refined_zt;
} ist_evaluate_opts;

IST_API void ist_evaluate_opts_init(ist_evaluate_opts *opts);

/** Score map on a resolved test list (NULL: a result of inputs only): apply each stage's
 *  map once, score each retrieval method, draw the intervals, diagnose the final stage,
 *  and record inputs, coverage, overlap and options. cov: the coverage of the test list
 *  (ist_pairs_resolve()), may be NULL. IST_ERR_INVALID when the test list shares source
 *  words with the map's seeds and overlap is not allowed (the message names the first
 *  few), or when no query is covered. Success: *out owns the result. */
IST_API ist_status ist_evaluate(const ist_map *map, const ist_store *src, const ist_store *tgt,
                                const ist_pairs *test, const ist_pairs_coverage *cov,
                                const ist_evaluate_opts *opts, ist_result **out,
                                ist_error *err);

/** The result JSON as text (NUL-terminated; release with ist_result_free_text()). */
IST_API ist_status ist_result_render(const ist_result *r, char **text, ist_error *err);
IST_API void ist_result_free_text(char *text);

/** Write the result JSON to path atomically; "-" writes to standard output. */
IST_API ist_status ist_result_write(const ist_result *r, const char *path, ist_error *err);

/** Load a result JSON (plain or gzip). Refused (IST_ERR_FORMAT naming the file and line):
 *  another kind of document, another version, a duplicate member, a member of the wrong
 *  type, a figure out of its range (a precision or coverage outside [0, 1], hits above
 *  queries, queries above sources, an interval outside [0, 1] or upside down), a per-query
 *  rank outside 0..10 or a source word listed twice in one run. Members the format marks
 *  optional may be absent. Success: *out owns the result. */
IST_API ist_status ist_result_load(const char *path, ist_result **out, ist_error *err);
/** The same from text of len bytes; name is used in messages (NULL: "(result)"). */
IST_API ist_status ist_result_parse(const char *text, size_t len, const char *name,
                                    ist_result **out, ist_error *err);

/** Format a 64-bit checksum or fingerprint as the result file does: 16 lower-case hex
 *  digits and a NUL into buf. */
IST_API void ist_result_hex(uint64_t v, char buf[17]);

#ifdef __cplusplus
}
#endif
#endif
