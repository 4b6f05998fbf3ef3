/* isthmus/metrics.h - how well a map translates: precision@k with coverage, by
 * frequency band.
 *
 * Owns nothing. A test query is a distinct source word of a resolved test list
 * whose source and (some) target are in the vectors; it is right at k when any
 * of its gold targets is among its k best targets (cosine, or CSLS of Conneau
 * et al. 2018, "Word translation without parallel data"). Precision is over
 * covered queries; coverage (covered / distinct source words of the list) is
 * reported beside it. The frequency rank of a word is its row in the source
 * vector file plus one (isthmus writes rows in descending frequency). The
 * result record that holds these figures is in isthmus/result.h; their intervals are
 * in isthmus/bootstrap.h. */
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

/** The label of the frequency band of ranks lo..hi (hi 0: no upper end) into buf of cap
 * bytes, cut to fit: "lo" dash "hi", or "lo+". dash is "-" in plain text (the spelling of
 * a band in a thresholds file and the program's tables) and "\xe2\x80\x93" (an en dash)
 * in typeset output such as the report. Returns buf. */
IST_API char *ist_band_label(size_t lo, size_t hi, const char *dash, char *buf, size_t cap);

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

#ifdef __cplusplus
}
#endif
#endif
