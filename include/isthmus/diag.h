/* isthmus/diag.h - diagnostics of a mapped pair of spaces: hubness, isometry,
 * the worst misses of a test list and the similarity of gold vs random pairs.
 *
 * Owns the figures it computes (an opaque ist_diag). Methods:
 *
 * Hubness (Radovanović et al. 2010, "Hubs in space: popular nearest neighbors
 * in high-dimensional data", JMLR 11): the k-occurrence N_k(y) of a target y
 * is the number of queries that have y among their k best targets; a space
 * with hubs has a right-skewed N_k distribution, measured by its skewness
 * (third standardised moment, population form). Queries are the N most
 * frequent mapped source words; it is computed under cosine and under CSLS
 * (Conneau et al. 2018), which was designed to reduce hubness.
 *
 * Isometry by eigenvector similarity (Søgaard et al. 2018, "On the limitations
 * of unsupervised bilingual dictionary induction", ACL): the k-nearest-
 * neighbour graphs (cosine, symmetrised, unweighted) of the N most frequent
 * words of each space, the eigenvalues of their Laplacians L = D - A (LAPACKE
 * dsyevd) in descending order, and the sum of squared differences over the
 * first m eigenvalues, m the smallest count whose eigenvalues hold 90% of the
 * sum in both graphs (the smaller of the two counts). 0 for graphs with the
 * same spectrum (e.g. a space and a rotated copy); larger values mean the two
 * spaces are less alike in shape and less likely to align by a rotation. */
#ifndef ISTHMUS_DIAG_H
#define ISTHMUS_DIAG_H

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

typedef struct ist_diag ist_diag;   /* opaque, one owner */

#define IST_DIAG_SIM_BINS 20        /* similarity histogram: 20 bins of 0.1 over [-1, 1] */
#define IST_DIAG_OCC_BINS 10        /* k-occurrence histogram bins */

typedef struct ist_diag_opts {
    size_t k;                 /* hubness: top-k of each query [10] */
    size_t queries;           /* hubness: the N most frequent source words [5000] */
    size_t top_hubs;          /* hubs listed per method [10] */
    bool hub_numbers;         /* list number-shaped words and codes (6.39, 4493, 40cm,
                                 tw-4410; ist_word_shape_of()) among the hubs too [false:
                                 passed over in the list; the k-occurrence figures and
                                 the skewness count every target all the same] */
    size_t isometry_words;    /* isometry: the N most frequent words of each side [1000];
                                 0 skips the isometry */
    size_t isometry_k;        /* isometry: neighbours per word in the graphs [10] */
    size_t worst_misses;      /* misses listed [20] */
    size_t random_pairs;      /* random pairs for the histogram; 0 = 10 per gold pair,
                                 at least 1000 [0] */
    uint64_t seed;            /* random pairs [1] */
    ist_search_opts search;   /* CSLS k, tile memory and threads */
} ist_diag_opts;

IST_API void ist_diag_opts_init(ist_diag_opts *opts);

/** Compute the diagnostics. xs: all mapped source rows, zt: all normalised
 *  target rows (ist_map_apply()), rows in descending frequency. tgt names the
 *  target rows (words of hubs and misses); test (resolved against the same
 *  stores) gives the worst misses and gold pairs and may be NULL. Worst misses
 *  use CSLS. Success: *out owns the figures; release with ist_diag_free().
 *  IST_ERR_INVALID when xs or zt has no row; IST_ERR_CANCELLED on request. */
IST_API ist_status ist_diag_run(ist_cmatview xs, ist_cmatview zt, const ist_store *tgt,
                                const ist_pairs *test, const ist_diag_opts *opts,
                                ist_diag **out, ist_error *err);

IST_API void ist_diag_free(ist_diag *d);        /* NULL: no-op */

/** Hubness under one method (0 cosine, 1 CSLS): the skewness of the
 *  k-occurrence over all target rows, and the count of target rows. */
IST_API double ist_diag_skewness(const ist_diag *d, ist_retrieval method);
/** k-occurrence of every target row under a method; borrowed until
 *  ist_diag_free(). Length: zt.rows. */
IST_API const uint32_t *ist_diag_k_occurrence(const ist_diag *d, ist_retrieval method);
/** Number of hubness queries used. */
IST_API size_t ist_diag_queries(const ist_diag *d);
/** Eigenvector similarity of the two k-NN graphs; negative when skipped. */
IST_API double ist_diag_isometry(const ist_diag *d);
/** Eigenvalues compared by the isometry figure. */
IST_API size_t ist_diag_isometry_terms(const ist_diag *d);
/** Number of worst misses kept, and miss i: source and target row of the
 *  best-ranked target, its CSLS score, and the 1-based rank of the first gold
 *  target in the top 10 (0: none there). */
IST_API size_t ist_diag_misses(const ist_diag *d);
IST_API void ist_diag_miss(const ist_diag *d, size_t i, size_t *source_row, size_t *ranked_row,
                           float *score, size_t *gold_rank);
/** Similarity histogram counts of gold and random pairs (IST_DIAG_SIM_BINS
 *  each; bin b covers [-1 + 0.1 b, -0.9 + 0.1 b), the last includes 1). */
IST_API const size_t *ist_diag_gold_hist(const ist_diag *d);
IST_API const size_t *ist_diag_random_hist(const ist_diag *d);

/** One hub of the list under a method (0 cosine, 1 CSLS), most found first: its word and
 *  (occ may be NULL) its k-occurrence; NULL past the last. Borrowed until
 *  ist_diag_free(). */
IST_API const char *ist_diag_hub(const ist_diag *d, ist_retrieval method, size_t i,
                                 uint32_t *occ);
/** The words of worst miss i: returns its source word (NULL past the last), and fills
 *  the word ranked first instead, the gold target words and their count (each out
 *  pointer may be NULL). Borrowed until ist_diag_free(). */
IST_API const char *ist_diag_miss_words(const ist_diag *d, size_t i, const char **ranked,
                                        const char *const **gold, size_t *ngold);

/** The figures of a diagnostics record, as a result file keeps them. */
typedef struct ist_diag_summary {
    size_t k, queries, targets;        /* hubness: best k per query, queries, target rows */
    size_t neighbourhood;              /* CSLS k of the hubness under CSLS */
    double skewness[2];                /* of the k-occurrence: cosine, CSLS; NaN: absent */
    uint32_t max_occ[2];
    size_t occ_hist[2][IST_DIAG_OCC_BINS];   /* targets per k-occurrence bin */
    uint32_t occ_from[IST_DIAG_OCC_BINS];    /* bin b: from occ_from[b] to occ_from[b+1] - 1;
                                                the last bin has no upper end */
    size_t hubs[2];                    /* hubs listed (ist_diag_hub()) */
    bool hub_numbers;                  /* ist_diag_opts.hub_numbers of the run */
    size_t hubs_left_out[2];           /* number-shaped hubs passed over in the lists */
    double isometry;                   /* eigenvector similarity; < 0: not computed */
    size_t isometry_terms, isometry_words, isometry_k;
    size_t misses;                     /* listed (ist_diag_miss_words()) */
    size_t misses_total, misses_queries;   /* test words missed at rank 1, of those scored */
    size_t gold_hist[IST_DIAG_SIM_BINS], random_hist[IST_DIAG_SIM_BINS];
    double gold_mean, random_mean;     /* mean cosines; NaN: absent */
} ist_diag_summary;

/** Fill out with the figures of d. */
IST_API void ist_diag_summarise(const ist_diag *d, ist_diag_summary *out);

/** Population skewness (third standardised moment) of n values; 0 when the
 *  values do not vary or n < 2. */
IST_API double ist_diag_skew(const double *v, size_t n);

/** Eigenvector similarity of the cosine k-NN graphs of the first n rows of a
 *  and of b (both unit rows, same dimension or not); *terms (may be NULL)
 *  gets the number of eigenvalues compared. */
IST_API ist_status ist_diag_eigen_similarity(ist_cmatview a, ist_cmatview b, size_t n, size_t k,
                                             const ist_retrieve_opts *opts, double *out,
                                             size_t *terms, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
