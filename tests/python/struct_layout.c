/* struct_layout.c - the size and member offsets of every structure isthmus.native mirrors
 * with ctypes, as the compiler lays them out from the public headers: "TYPE size N" and
 * "TYPE.MEMBER N" lines, read by tests/python/test_native.py. */
#include <stddef.h>
#include <stdio.h>

#include <isthmus/isthmus.h>

#define SIZE(t) printf("%s size %zu\n", #t, sizeof(t))
#define AT(t, m) printf("%s.%s %zu\n", #t, #m, offsetof(t, m))

int
main(void)
{
    SIZE(ist_error);
    AT(ist_error, code); AT(ist_error, sys_errno); AT(ist_error, file); AT(ist_error, line);
    AT(ist_error, offset); AT(ist_error, has_offset); AT(ist_error, msg);
    SIZE(ist_cmatview);
    AT(ist_cmatview, data); AT(ist_cmatview, rows); AT(ist_cmatview, cols);
    AT(ist_cmatview, stride);
    SIZE(ist_store_opts);
    AT(ist_store_opts, max_rows); AT(ist_store_opts, verify); AT(ist_store_opts, max_dim);
    AT(ist_store_opts, max_line);
    SIZE(ist_retrieve_opts);
    AT(ist_retrieve_opts, budget); AT(ist_retrieve_opts, threads);
    SIZE(ist_search_opts);
    AT(ist_search_opts, csls_k); AT(ist_search_opts, retrieve);
    SIZE(ist_align_opts);
    AT(ist_align_opts, source_norm); AT(ist_align_opts, target_norm);
    AT(ist_align_opts, refine_rounds); AT(ist_align_opts, refine_vocab);
    AT(ist_align_opts, refine_keep_seeds); AT(ist_align_opts, min_gain);
    AT(ist_align_opts, min_seed_pairs); AT(ist_align_opts, search);
    AT(ist_align_opts, on_round); AT(ist_align_opts, ctx);
    SIZE(ist_align_round);
    AT(ist_align_round, round); AT(ist_align_round, pairs); AT(ist_align_round, mean_csls);
    AT(ist_align_round, seed_cos); AT(ist_align_round, orth_error); AT(ist_align_round, kept);
    SIZE(ist_eval_opts);
    AT(ist_eval_opts, method); AT(ist_eval_opts, band_edges); AT(ist_eval_opts, nedges);
    AT(ist_eval_opts, bands_auto); AT(ist_eval_opts, keep_queries); AT(ist_eval_opts, search);
    SIZE(ist_diag_opts);
    AT(ist_diag_opts, k); AT(ist_diag_opts, queries); AT(ist_diag_opts, top_hubs);
    AT(ist_diag_opts, isometry_words); AT(ist_diag_opts, isometry_k);
    AT(ist_diag_opts, worst_misses); AT(ist_diag_opts, random_pairs); AT(ist_diag_opts, seed);
    AT(ist_diag_opts, search);
    SIZE(ist_ci_opts);
    AT(ist_ci_opts, level); AT(ist_ci_opts, resamples); AT(ist_ci_opts, seed);
    SIZE(ist_evaluate_opts);
    AT(ist_evaluate_opts, eval); AT(ist_evaluate_opts, methods); AT(ist_evaluate_opts, stages);
    AT(ist_evaluate_opts, record_stages); AT(ist_evaluate_opts, allow_overlap);
    AT(ist_evaluate_opts, diagnostics); AT(ist_evaluate_opts, diag); AT(ist_evaluate_opts, ci);
    AT(ist_evaluate_opts, command); AT(ist_evaluate_opts, name);
    AT(ist_evaluate_opts, source_path); AT(ist_evaluate_opts, target_path);
    AT(ist_evaluate_opts, map_path); AT(ist_evaluate_opts, seeds_path);
    AT(ist_evaluate_opts, seeds_label); AT(ist_evaluate_opts, fit);
    AT(ist_evaluate_opts, refined_xs); AT(ist_evaluate_opts, refined_zt);
    SIZE(ist_pairs_coverage);
    AT(ist_pairs_coverage, read); AT(ist_pairs_coverage, kept);
    AT(ist_pairs_coverage, duplicates); AT(ist_pairs_coverage, missing_source);
    AT(ist_pairs_coverage, missing_target); AT(ist_pairs_coverage, missing_both);
    AT(ist_pairs_coverage, sources_read); AT(ist_pairs_coverage, sources_kept);
    AT(ist_pairs_coverage, source_exact); AT(ist_pairs_coverage, target_exact);
    SIZE(ist_word_filter);
    AT(ist_word_filter, numbers); AT(ist_word_filter, min_score);
    AT(ist_word_filter, stop_share); AT(ist_word_filter, variants);
    /* the status codes the package maps to its exceptions */
    printf("IST_OK %d\nIST_ERR_FORMAT %d\nIST_ERR_INVALID %d\nIST_ERR_CANCELLED %d\n",
           (int)IST_OK, (int)IST_ERR_FORMAT, (int)IST_ERR_INVALID, (int)IST_ERR_CANCELLED);
    printf("IST_METRICS_MAX_BANDS %d\nIST_FILTER_SHAPE %d\nIST_SHAPE_WORD %d\n",
           IST_METRICS_MAX_BANDS, (int)IST_FILTER_SHAPE, (int)IST_SHAPE_WORD);
    printf("IST_RESULT_COSINE %d\nIST_RESULT_CSLS %d\nIST_STAGE_SEED %d\nIST_STAGE_REFINED %d\n",
           IST_RESULT_COSINE, IST_RESULT_CSLS, IST_STAGE_SEED, IST_STAGE_REFINED);
    printf("IST_RETRIEVAL_COSINE %d\nIST_RETRIEVAL_CSLS %d\n", (int)IST_RETRIEVAL_COSINE,
           (int)IST_RETRIEVAL_CSLS);
    return 0;
}
