/* isthmus/ppmi.h - count-based word vectors: positive PMI of windowed co-occurrence counts,
 * reduced by a truncated SVD.
 *
 * Owns nothing between calls: ist_ppmi_train() reads a token-id stream and returns a new
 * matrix. The method, each step with its source (formulas in docs/methods.md):
 *
 * - Co-occurrence counts: for every pair of positions t < u on one line (windows never cross
 *   IST_CORPUS_EOL) with distance d = u - t <= window, the pair (w_t, w_u) and (w_u, w_t) gets
 *   weight 1 (flat) or (window - d + 1) / window (linear, the expected weight of the dynamic
 *   window of skip-gram: Levy, Goldberg & Dagan 2015, "Improving distributional similarity
 *   with lessons learned from word embeddings", section 3.2). Weights are summed as integers
 *   (in units of 1/window), so the counts do not depend on the order or the thread count.
 *   The counts are kept sparse; pairs are gathered in a hash table of bounded size that is
 *   sorted and merged into the sorted list of distinct pairs whenever it fills, so memory is
 *   the distinct pairs plus a fixed buffer.
 * - Positive PMI with context-distribution smoothing (same paper, section 3.1):
 *   PPMI(w, c) = max(0, log( C(w,c) * Z / (C(w) * C(c)^alpha) ) - log shift),
 *   C(w) = sum_c C(w,c), Z = sum_c C(c)^alpha, alpha = 0.75 by default; shift > 1 gives the
 *   shifted PPMI of Levy & Goldberg 2014.
 * - Truncated SVD by the randomized range finder with power iterations (Halko, Martinsson &
 *   Tropp 2011, "Finding structure with randomness", algorithms 4.3/4.4 and 5.1): a Gaussian
 *   test matrix of dim + oversample columns, q rounds of re-orthonormalised power iteration,
 *   QR (LAPACK dgeqrf) and the SVD of the small projected matrix (LAPACK dgesdd). The sparse
 *   products run on the library's threads, row by row, so the result is the same for every
 *   thread count; the dense steps run on BLAS/LAPACK in double precision.
 * - Rows U_k * S_k^p with the exponent p an option (eigenvalue weighting: the same 2015
 *   paper, section 3.3; p = 0.5 by default). Each singular vector's sign is fixed so that
 *   its largest component is positive.
 * The same stream, options and seed give bit-identical vectors (any thread count).
 */
#ifndef ISTHMUS_PPMI_H
#define ISTHMUS_PPMI_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/corpus.h>            /* IST_CORPUS_EOL */
#include <isthmus/error.h>
#include <isthmus/matrix.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_ppmi_weighting {
    IST_PPMI_LINEAR = 0,     /* weight (window - d + 1) / window at distance d */
    IST_PPMI_FLAT            /* weight 1 at every distance up to window */
} ist_ppmi_weighting;

/** The stages the progress callback reports, in order. */
typedef enum ist_ppmi_stage {
    IST_PPMI_COUNTING = 0,   /* gathering co-occurrence counts */
    IST_PPMI_WEIGHTING,      /* building the sparse PPMI matrix */
    IST_PPMI_FACTORING       /* randomized SVD: products with the matrix */
} ist_ppmi_stage;

/** What the progress callback sees. */
typedef struct ist_ppmi_progress {
    ist_ppmi_stage stage;
    double fraction;         /* of all work, 0..1 (counting ~ first half) */
    uint64_t pairs;          /* distinct co-occurring pairs found so far */
    double eta_sec;          /* estimated seconds left (0 when unknown) */
} ist_ppmi_progress;

typedef struct ist_ppmi_opts {
    size_t dim;              /* vector dimension k [default 300] */
    size_t window;           /* largest distance counted [default 10] */
    ist_ppmi_weighting weighting;   /* [default IST_PPMI_LINEAR] */
    double alpha;            /* context-distribution smoothing exponent [default 0.75] */
    double shift;            /* PMI shift: log(shift) subtracted, >= 1 [default 1 = none] */
    double power;            /* exponent p of S in U S^p [default 0.5] */
    size_t oversample;       /* extra columns of the test matrix [default 20] */
    size_t power_iters;      /* power iterations q [default 4] */
    size_t threads;          /* worker threads [default 1] */
    uint64_t seed;           /* seed of the Gaussian test matrix [default 1] */
    size_t buffer_mb;        /* size of the pair buffer in MiB [default 256] */
    /* Called from the calling thread every 0.25 s or so; return non-zero to cancel
     * (ist_ppmi_train then returns IST_ERR_CANCELLED). May be NULL. */
    int (*progress)(void *ctx, const struct ist_ppmi_progress *p);
    void *progress_ctx;
} ist_ppmi_opts;

/** Fill o with the defaults above. */
IST_API void ist_ppmi_opts_init(ist_ppmi_opts *o);

typedef struct ist_ppmi_result {
    uint64_t words;          /* stream words read */
    uint64_t nonzeros;       /* distinct (word, context) pairs counted (both orders) */
    uint64_t positive;       /* entries of the PPMI matrix above zero */
    size_t rank;             /* columns factored: min(dim, vocabulary); the rest are zero */
    double sv_max, sv_min;   /* largest and smallest singular value kept */
    double seconds;          /* wall-clock time */
    double count_seconds;    /* of which counting */
    size_t peak_bytes;       /* largest working memory held at once (estimate, bytes) */
} ist_ppmi_result;

/** Train count-based vectors.
 *  ids[n_ids]: the token stream (IST_CORPUS_EOL separates lines), ids < vocab_size.
 *  Success: *vectors is a new vocab_size x dim matrix (row = id; a word that never
 *  co-occurs gets a zero row) owned by the caller (ist_matrix_free); when singular (may be
 *  NULL) is given, *singular is a new array of the dim singular values kept, largest first
 *  (release with ist_ppmi_free). A vocabulary smaller than dim has only vocab_size singular
 *  vectors: the columns (and singular values) past them are zero, so that vectors of two
 *  corpora trained with one dim always have the same width. res (may be NULL) gets counts
 *  and timings.
 *  Errors: IST_ERR_INVALID for options out of range, an empty stream or an id >=
 *  vocab_size; IST_ERR_NOMEM; IST_ERR_CANCELLED when
 *  ist_cancel_requested() or the progress callback asked to stop; IST_ERR_NUMERIC when
 *  LAPACK fails or no pair co-occurs. */
IST_API ist_status ist_ppmi_train(const uint32_t *ids, size_t n_ids, size_t vocab_size,
                                  const ist_ppmi_opts *o, ist_matrix **vectors,
                                  double **singular, ist_ppmi_result *res, ist_error *err);

/** Provenance text for vectors trained by ist_ppmi_train(), a JSON object of the same
 *  shape as ist_sgns_provenance_json() gives, with
 *  "training":{"method":"PPMI truncated SVD","dimension":..,"context":..,"weighting":
 *  "linear"|"flat","smoothing":..,"shift":..,"singular_power":..,"oversample":..,
 *  "power_iterations":..,"threads":..,"seed":..} and
 *  "result":{"nonzeros":..,"positive":..,"rank":..,"sv_max":..,"sv_min":..}.
 *  *json is owned by the caller: release with ist_ppmi_free(). */
IST_API ist_status ist_ppmi_provenance_json(const ist_ppmi_opts *o, const ist_ppmi_result *res,
                                            const char *text_json, const char *sources_json,
                                            uint64_t tokens, size_t types, char **json,
                                            ist_error *err);

/** Release memory returned by this module. NULL: no-op. */
IST_API void ist_ppmi_free(void *p);

#ifdef __cplusplus
}
#endif
#endif
