/* result_diag.c - the "diagnostics" object of the result JSON (docs/formats.md,
 * "Result JSON"). */
#include <stdio.h>

#include "diag_int.h"

static void
hubness(ist_jw *w, const char *key, const ist_diag *d, int m)
{
    ist_jw_obj_begin(w, key);
    ist_jw_num(w, "skewness", d->skew[m]);
    ist_jw_uint(w, "max_k_occurrence", d->occ_max[m]);
    ist_jw_arr_begin(w, "top_hubs");
    for (size_t h = 0; h < d->nhubs[m]; h++) {
        ist_jw_obj_begin(w, NULL);
        ist_jw_str(w, "word", d->hubs[m][h].word);
        ist_jw_uint(w, "k_occurrence", d->hubs[m][h].occ);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
    ist_jw_arr_begin(w, "distribution");
    for (size_t b = 0; b < IST_DIAG_OCC_BINS; b++) {
        ist_jw_obj_begin(w, NULL);
        ist_jw_uint(w, "from", ist_diag_occ_from[b]);
        if (b + 1 < IST_DIAG_OCC_BINS)
            ist_jw_uint(w, "to", ist_diag_occ_from[b + 1] - 1);
        else
            ist_jw_null(w, "to");
        ist_jw_uint(w, "targets", d->occ_hist[m][b]);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
    ist_jw_obj_end(w);
}

static void
isometry(ist_jw *w, const ist_diag *d)
{
    char note[400];
    ist_jw_obj_begin(w, "isometry");
    ist_jw_uint(w, "top_n", d->iso_words);
    ist_jw_uint(w, "graph_k", d->iso_k);
    ist_jw_uint(w, "eigenvalues_compared", d->iso_terms);
    ist_jw_num(w, "eigenvector_similarity", d->iso);   /* NaN never; skipped: no object */
    snprintf(note, sizeof note,
             "sum of squared differences between the largest Laplacian eigenvalues of the "
             "%zu-nearest-neighbour graphs of the %zu most frequent words of each side; 0 means "
             "the two neighbourhood structures have the same shape, and the larger the value "
             "the less the spaces look alike, so the less a rotation can align them",
             d->iso_k, d->iso_words);
    ist_jw_str(w, "note", note);
    ist_jw_obj_end(w);
}

static void
misses(ist_jw *w, const ist_diag *d)
{
    ist_jw_arr_begin(w, "worst_misses");
    for (size_t i = 0; i < d->nmiss; i++) {
        const diag_miss *m = &d->miss[i];
        ist_jw_obj_begin(w, NULL);
        ist_jw_str(w, "source", m->source);
        ist_jw_arr_begin(w, "gold");
        for (size_t g = 0; g < m->ngold; g++)
            ist_jw_str(w, NULL, m->gold[g]);
        ist_jw_arr_end(w);
        ist_jw_str(w, "ranked", m->ranked);
        ist_jw_num(w, "score", m->score);
        ist_jw_uint(w, "gold_rank", m->gold_rank);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
}

static void
histogram(ist_jw *w, const ist_diag *d)
{
    ist_jw_obj_begin(w, "similarity");
    ist_jw_str(w, "measure", "cosine");
    ist_jw_arr_begin(w, "bins");
    for (size_t b = 0; b <= IST_DIAG_SIM_BINS; b++)
        ist_jw_num(w, NULL, -1.0 + 0.1 * (double)b);
    ist_jw_arr_end(w);
    ist_jw_arr_begin(w, "gold");
    for (size_t b = 0; b < IST_DIAG_SIM_BINS; b++)
        ist_jw_uint(w, NULL, d->gold_hist[b]);
    ist_jw_arr_end(w);
    ist_jw_arr_begin(w, "random");
    for (size_t b = 0; b < IST_DIAG_SIM_BINS; b++)
        ist_jw_uint(w, NULL, d->random_hist[b]);
    ist_jw_arr_end(w);
    ist_jw_num(w, "gold_mean", d->gold_mean);
    ist_jw_num(w, "random_mean", d->random_mean);
    ist_jw_obj_end(w);
}

void
ist_result_write_diag(ist_jw *w, const ist_diag *d)
{
    ist_jw_obj_begin(w, "diagnostics");
    ist_jw_obj_begin(w, "hubness");
    ist_jw_uint(w, "k", d->k);
    ist_jw_uint(w, "queries", d->nq);
    ist_jw_uint(w, "targets", d->nt);
    ist_jw_uint(w, "neighbourhood", d->neighbourhood);
    hubness(w, "cosine", d, 0);
    hubness(w, "csls", d, 1);
    ist_jw_obj_end(w);
    if (d->iso >= 0)
        isometry(w, d);
    ist_jw_str(w, "misses_retrieval", "csls");
    ist_jw_uint(w, "misses_total", d->misses_total);
    ist_jw_uint(w, "misses_queries", d->queries_scored);
    misses(w, d);
    histogram(w, d);
    ist_jw_obj_end(w);
}
