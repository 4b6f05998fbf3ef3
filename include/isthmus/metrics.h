/* isthmus/metrics.h - how well a map translates: precision@k with coverage, by
 * frequency band, and the result file that records it.
 *
 * Owns nothing. A test query is a distinct source word of a resolved test list
 * whose source and (some) target are in the vectors; it is right at k when any
 * of its gold targets is among its k best targets (cosine, or CSLS of Conneau
 * et al. 2018, "Word translation without parallel data"). Precision is over
 * covered queries; coverage (covered / distinct source words of the list) is
 * reported beside it. The frequency rank of a word is its row in the source
 * vector file plus one (isthmus writes rows in descending frequency). The
 * result file layout is in docs/formats.md, section "Result JSON". */
#ifndef ISTHMUS_METRICS_H
#define ISTHMUS_METRICS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>
#include <isthmus/pairs.h>
#include <isthmus/retrieve.h>
#include <isthmus/store.h>

#ifdef __cplusplus
extern "C" {
#endif

#define IST_METRICS_MAX_BANDS 8
#define IST_METRICS_NK 3                 /* precision at 1, 5 and 10 */

/** The k of each precision figure: 1, 5, 10. */
IST_API size_t ist_metrics_k(size_t i);

typedef struct ist_band {
    size_t lo, hi;                 /* frequency ranks lo..hi (1-based); hi 0: no upper end */
    size_t queries;
    size_t hits[IST_METRICS_NK];
    double p[IST_METRICS_NK];      /* hits / queries; 0 when no query */
} ist_band;

typedef struct ist_metrics {
    ist_retrieval method;
    size_t neighbourhood;          /* CSLS k (0 for cosine) */
    size_t sources;                /* distinct source words in the list */
    size_t queries;                /* of them covered */
    double coverage;               /* queries / sources */
    size_t hits[IST_METRICS_NK];
    double p[IST_METRICS_NK];
    size_t nbands;
    ist_band band[IST_METRICS_MAX_BANDS];
    /* per query (when ist_eval_opts.keep_queries): its source row, ascending, and the
     * 0-based place of its first gold target in its top 10 (10: none). Owned; release
     * with ist_metrics_release(). They let two runs on one list be compared query by
     * query (paired resampling). */
    size_t *query_row;
    uint8_t *query_place;
} ist_metrics;

/** Release the per-query arrays of m (and set them to NULL). */
IST_API void ist_metrics_release(ist_metrics *m);

typedef struct ist_eval_opts {
    ist_retrieval method;          /* [CSLS] */
    size_t band_edges[IST_METRICS_MAX_BANDS - 1];  /* upper ranks of the bands (when not
                                    * bands_auto) [5000, 20000] */
    size_t nedges;                 /* [2] */
    bool bands_auto;               /* edges from the source vocabulary's size V instead: the
                                    * first tenth and the first third of the rows, each rounded
                                    * to two significant digits (V = 2482: 250, 830) [true] */
    bool keep_queries;             /* fill query_row / query_place [true] */
    ist_search_opts search;        /* CSLS k, tile memory and threads */
} ist_eval_opts;

IST_API void ist_eval_opts_init(ist_eval_opts *opts);

/** Score a resolved test list: xs holds all mapped source rows, zt all
 *  normalised target rows (ist_map_apply()). The CSLS source term r_S uses all
 *  rows of xs. IST_ERR_INVALID when the list has no covered query. */
IST_API ist_status ist_eval_run(ist_cmatview xs, ist_cmatview zt, const ist_pairs *test,
                                const ist_eval_opts *opts, ist_metrics *out, ist_error *err);

/** Name of a retrieval method: "cosine" or "csls". */
IST_API const char *ist_retrieval_name(ist_retrieval method);

/** One scored run for the result file: a label ("procrustes", "refined", ...)
 *  and its figures. */
typedef struct ist_result_run {
    const char *label;
    ist_metrics m;
} ist_result_run;

/** Everything a result file records besides the figures. Strings may be NULL. */
typedef struct ist_result_info {
    const char *command;                  /* "align" or "score" */
    const char *source_path, *target_path, *map_path, *seeds_path, *test_path;
    uint64_t source_fingerprint, target_fingerprint;
    uint64_t seeds_checksum;              /* 0 when no seed list */
    uint64_t test_checksum, test_sources_hash;
    size_t test_sources;                  /* distinct test source words (kept) */
    ist_pairs_coverage test_coverage;
    bool overlap_allowed;
    size_t overlap;                       /* test source words also in the seeds */
    const char *options_json;             /* the options as a JSON object, or NULL */
    const ist_store *source;              /* names the per-query source words; may be NULL */
    const char *map_json;                 /* map summary as a JSON object, or NULL */
    const struct ist_diag *diagnostics;   /* ist_diag_run() figures (isthmus/diag.h), or NULL */
} ist_result_info;

/** Write the result JSON (docs/formats.md "Result JSON") to path atomically;
 *  "-" writes to standard output. */
IST_API ist_status ist_result_write(const char *path, const ist_result_info *info,
                                    const ist_result_run *runs, size_t nruns, ist_error *err);

/* ---- confidence intervals and per-query outcomes (src/measure/result_ci.c) ------------------
 *
 * Percentile bootstrap intervals (Efron & Tibshirani 1993, "An Introduction to the
 * Bootstrap", ch. 13): the test queries are resampled with replacement B times, the
 * figure is recomputed on each resample, and the interval runs from the k-th to the
 * (B+1-k)-th smallest of the B values, k = floor((B+1)(1-level)/2) (at least 1). The
 * generator is seeded from the options, so an interval is the same on every run. The
 * paired form resamples the queries of two runs on one list together (Koehn 2004,
 * "Statistical significance tests for machine translation evaluation"). */

#define IST_CI_RESAMPLES_DEFAULT 1000
#define IST_CI_SEED_DEFAULT 20261201u
#define IST_CI_MISS 10          /* a query outcome: no gold target in the top 10 */
#define IST_CI_UNCOVERED 255    /* a query outcome: the query is not covered by this run */

typedef struct ist_ci_opts {
    double level;               /* [0.95] */
    size_t resamples;           /* B [IST_CI_RESAMPLES_DEFAULT] */
    uint64_t seed;              /* [IST_CI_SEED_DEFAULT] */
} ist_ci_opts;

IST_API void ist_ci_opts_init(ist_ci_opts *opts);

/** Interval of precision@1, @5 and @10 over n queries. place[i] is the 0-based place of
 *  query i's first gold target (IST_CI_MISS: none in the top 10; IST_CI_UNCOVERED: left
 *  out of the denominator). lo[j], hi[j] get the interval of precision at
 *  ist_metrics_k(j); with no covered query both are 0. IST_ERR_INVALID for a level outside
 *  (0, 1) or no resamples; IST_ERR_CANCELLED when asked to stop. */
IST_API ist_status ist_ci_precision(const uint8_t *place, size_t n, const ist_ci_opts *opts,
                                    double lo[IST_METRICS_NK], double hi[IST_METRICS_NK],
                                    ist_error *err);

/** Paired bootstrap of the change in precision at k between run a and run b on one list:
 *  a[i] and b[i] are query i's outcomes in each (as for ist_ci_precision; uncovered
 *  queries leave that run's denominator). Each resample draws n query indices with
 *  replacement and applies them to both runs. *diff gets precision(a) - precision(b) on
 *  the full list, [*lo, *hi] its interval. Identical runs give [0, 0]. */
IST_API ist_status ist_ci_paired(const uint8_t *a, const uint8_t *b, size_t n, size_t k,
                                 const ist_ci_opts *opts, double *diff, double *lo, double *hi,
                                 ist_error *err);

/** Intervals of every precision figure of a scored run, overall and per band (each band
 *  resampled on its own queries). Needs m->query_row and m->query_place
 *  (ist_eval_opts.keep_queries); IST_ERR_INVALID without them. */
typedef struct ist_metrics_ci {
    double lo[IST_METRICS_NK], hi[IST_METRICS_NK];
    double band_lo[IST_METRICS_MAX_BANDS][IST_METRICS_NK];
    double band_hi[IST_METRICS_MAX_BANDS][IST_METRICS_NK];
} ist_metrics_ci;

IST_API ist_status ist_metrics_ci_compute(const ist_metrics *m, const ist_ci_opts *opts,
                                          ist_metrics_ci *out, ist_error *err);

/** Band index (into m->band) of a 1-based frequency rank. */
IST_API size_t ist_metrics_band_of(const ist_metrics *m, size_t rank);

/** The result JSON of ist_result_write() as text (NUL-terminated; release with
 *  ist_result_free_text()). ci: the bootstrap options of the "ci" objects (NULL:
 *  defaults). ist_result_write() uses the defaults. */
IST_API ist_status ist_result_render(const ist_result_info *info, const ist_result_run *runs,
                                     size_t nruns, const ist_ci_opts *ci, char **text,
                                     ist_error *err);
IST_API void ist_result_free_text(char *text);

#ifdef __cplusplus
}
#endif
#endif
