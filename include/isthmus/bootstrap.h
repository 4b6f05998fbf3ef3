/* isthmus/bootstrap.h - confidence intervals of precision@k, by resampling the test
 * queries.
 *
 * Owns nothing. Percentile bootstrap intervals (Efron & Tibshirani 1993, "An Introduction
 * to the Bootstrap", ch. 13): the test queries are resampled with replacement B times, the
 * figure is recomputed on each resample, and the interval runs from the k-th to the
 * (B+1-k)-th smallest of the B values, k = floor((B+1)(1-level)/2) (at least 1). The
 * generator is seeded from the options, so an interval is the same on every run. The
 * paired form resamples the queries of two runs on one list together (Koehn 2004,
 * "Statistical significance tests for machine translation evaluation"). */
#ifndef ISTHMUS_BOOTSTRAP_H
#define ISTHMUS_BOOTSTRAP_H

#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/metrics.h>

#ifdef __cplusplus
extern "C" {
#endif

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

#ifdef __cplusplus
}
#endif
#endif
