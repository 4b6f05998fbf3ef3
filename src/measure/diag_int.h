/* diag_int.h - the diagnostics' figures, shared by diag.c and the result
 * writer (result_diag.c). Internal. */
#ifndef ISTHMUS_DIAG_INT_H
#define ISTHMUS_DIAG_INT_H

#include <isthmus/diag.h>

#include "json_int.h"

typedef struct diag_hub {
    char *word;
    uint32_t occ;
} diag_hub;

typedef struct diag_miss {
    char *source;
    char **gold;              /* ngold target words */
    size_t ngold;
    char *ranked;
    float score;
    size_t gold_rank;         /* 1-based within the top 10; 0 none */
    size_t source_row, ranked_row;
} diag_miss;

/* k-occurrence histogram: bin i holds targets with occ in [occ_from[i], occ_from[i+1]). */
extern const uint32_t ist_diag_occ_from[IST_DIAG_OCC_BINS];

struct ist_diag {
    size_t k, nq, nt, neighbourhood;
    uint32_t *occ[2];                 /* per target row, cosine and CSLS */
    double skew[2];
    size_t occ_hist[2][IST_DIAG_OCC_BINS];
    uint32_t occ_max[2];
    diag_hub *hubs[2];
    size_t nhubs[2];
    bool hub_numbers;                 /* the lists may hold number-shaped words and codes */
    size_t hubs_left_out[2];          /* found more often than the last listed, not listed */
    double iso;                       /* < 0: skipped */
    size_t iso_terms, iso_words, iso_k;
    diag_miss *miss;
    size_t nmiss, queries_scored, misses_total;
    size_t gold_hist[IST_DIAG_SIM_BINS], random_hist[IST_DIAG_SIM_BINS];
    size_t ngold, nrandom;
    double gold_mean, random_mean;
    float *rs;                        /* CSLS r_S of every target row, while computing */
};

/* Top-k of the queries q among zt by CSLS, with the target term r_S (d->rs)
 * computed once for all callers. */
ist_status ist_diag_csls_topk(const ist_diag *d, ist_cmatview q, ist_cmatview zt, size_t k,
                              const ist_diag_opts *o, ist_topk **out, ist_error *err);

/* Worst misses and the gold/random similarity histograms (diag_gold.c). */
ist_status ist_diag_fill_test(ist_diag *d, ist_cmatview xs, ist_cmatview zt, const ist_store *tgt,
                              const ist_pairs *test, const ist_diag_opts *o, ist_error *err);

/* Write the "diagnostics" object member into an open result object. */
void ist_result_write_diag(ist_jw *w, const ist_diag *d);

#endif
