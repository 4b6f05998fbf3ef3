/* result_diag.c - the RK_DIAGNOSTICS object of the result JSON (docs/formats.md,
 * "Result JSON"). */
#include <stdio.h>

#include "diag_int.h"
#include "result_keys_int.h"

static void
hubness(ist_jw *w, const char *key, const ist_diag *d, int m)
{
    ist_jw_obj_begin(w, key);
    ist_jw_num(w, RK_SKEWNESS, d->skew[m]);
    ist_jw_uint(w, RK_MAX_OCC, d->occ_max[m]);
    ist_jw_arr_begin(w, RK_TOP_HUBS);
    for (size_t h = 0; h < d->nhubs[m]; h++) {
        ist_jw_obj_begin(w, NULL);
        ist_jw_str(w, RK_WORD, d->hubs[m][h].word);
        ist_jw_uint(w, RK_OCC, d->hubs[m][h].occ);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
    ist_jw_uint(w, RK_HUBS_LEFT_OUT, d->hubs_left_out[m]);
    ist_jw_arr_begin(w, RK_DISTRIBUTION);
    for (size_t b = 0; b < IST_DIAG_OCC_BINS; b++) {
        ist_jw_obj_begin(w, NULL);
        ist_jw_uint(w, RK_FROM, ist_diag_occ_from[b]);
        if (b + 1 < IST_DIAG_OCC_BINS)
            ist_jw_uint(w, RK_TO, ist_diag_occ_from[b + 1] - 1);
        else
            ist_jw_null(w, RK_TO);
        ist_jw_uint(w, RK_TARGETS, d->occ_hist[m][b]);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
    ist_jw_obj_end(w);
}

static void
isometry(ist_jw *w, const ist_diag *d)
{
    char note[400];
    ist_jw_obj_begin(w, RK_ISOMETRY);
    ist_jw_uint(w, RK_TOP_N, d->iso_words);
    ist_jw_uint(w, RK_GRAPH_K, d->iso_k);
    ist_jw_uint(w, RK_EIG_COMPARED, d->iso_terms);
    ist_jw_num(w, RK_EIG_SIMILARITY, d->iso);   /* NaN never; skipped: no object */
    snprintf(note, sizeof note,
             "sum of squared differences between the largest Laplacian eigenvalues of the "
             "%zu-nearest-neighbour graphs of the %zu most frequent words of each side; 0 means "
             "the two neighbourhood structures have the same shape, and the larger the value "
             "the less the spaces look alike, so the less a rotation can align them",
             d->iso_k, d->iso_words);
    ist_jw_str(w, RK_NOTE, note);
    ist_jw_obj_end(w);
}

static void
misses(ist_jw *w, const ist_diag *d)
{
    ist_jw_arr_begin(w, RK_WORST_MISSES);
    for (size_t i = 0; i < d->nmiss; i++) {
        const diag_miss *m = &d->miss[i];
        ist_jw_obj_begin(w, NULL);
        ist_jw_str(w, RK_SOURCE, m->source);
        ist_jw_arr_begin(w, RK_GOLD);
        for (size_t g = 0; g < m->ngold; g++)
            ist_jw_str(w, NULL, m->gold[g]);
        ist_jw_arr_end(w);
        ist_jw_str(w, RK_RANKED, m->ranked);
        ist_jw_num(w, RK_SCORE, m->score);
        ist_jw_uint(w, RK_GOLD_RANK, m->gold_rank);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
}

static void
histogram(ist_jw *w, const ist_diag *d)
{
    ist_jw_obj_begin(w, RK_SIMILARITY);
    ist_jw_str(w, RK_MEASURE, RK_COSINE);
    ist_jw_arr_begin(w, RK_BINS);
    for (size_t b = 0; b <= IST_DIAG_SIM_BINS; b++)
        ist_jw_num(w, NULL, -1.0 + 0.1 * (double)b);
    ist_jw_arr_end(w);
    ist_jw_arr_begin(w, RK_GOLD);
    for (size_t b = 0; b < IST_DIAG_SIM_BINS; b++)
        ist_jw_uint(w, NULL, d->gold_hist[b]);
    ist_jw_arr_end(w);
    ist_jw_arr_begin(w, RK_RANDOM);
    for (size_t b = 0; b < IST_DIAG_SIM_BINS; b++)
        ist_jw_uint(w, NULL, d->random_hist[b]);
    ist_jw_arr_end(w);
    ist_jw_num(w, RK_GOLD_MEAN, d->gold_mean);
    ist_jw_num(w, RK_RANDOM_MEAN, d->random_mean);
    ist_jw_obj_end(w);
}

void
ist_result_write_diag(ist_jw *w, const ist_diag *d)
{
    ist_jw_obj_begin(w, RK_DIAGNOSTICS);
    ist_jw_obj_begin(w, RK_HUBNESS);
    ist_jw_uint(w, RK_K, d->k);
    ist_jw_uint(w, RK_QUERIES, d->nq);
    ist_jw_uint(w, RK_TARGETS, d->nt);
    ist_jw_uint(w, RK_NEIGHBOURHOOD, d->neighbourhood);
    ist_jw_bool(w, RK_HUB_NUMBERS, d->hub_numbers);
    hubness(w, RK_COSINE, d, 0);
    hubness(w, RK_CSLS, d, 1);
    ist_jw_obj_end(w);
    if (d->iso >= 0)
        isometry(w, d);
    ist_jw_str(w, RK_MISSES_RETRIEVAL, RK_CSLS);
    ist_jw_uint(w, RK_MISSES_TOTAL, d->misses_total);
    ist_jw_uint(w, RK_MISSES_QUERIES, d->queries_scored);
    misses(w, d);
    histogram(w, d);
    ist_jw_obj_end(w);
}
