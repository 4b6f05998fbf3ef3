/* fit_and_score.c - libisthmus from a C program: open two vector files, fit an orthogonal
 * map on seed pairs (Procrustes, then refinement), and print precision@1 of a test list
 * under cosine and CSLS retrieval. Built against the installed library:
 *
 *     cc -std=c11 fit_and_score.c $(pkg-config --cflags --libs isthmus) -o fit_and_score
 *     ./fit_and_score en.isv es.isv data-samples/demo-seed.pairs data-samples/demo-test.pairs
 *
 * The figures are statistical: the translations behind them are suggestions to be reviewed
 * by a speaker of the language before they drive anything customer-facing. */
#include <stdio.h>

#include <isthmus/isthmus.h>

static int
fail(const ist_error *err)
{
    char msg[1024];
    fprintf(stderr, "fit_and_score: %s\n", ist_error_format(err, msg, sizeof msg));
    return 1;
}

int
main(int argc, char **argv)
{
    ist_store *src = NULL, *tgt = NULL;
    ist_pairs *seeds = NULL, *test = NULL;
    ist_pairs_coverage cov;
    ist_map *map = NULL;
    ist_matrix *xs = NULL, *zt = NULL;
    ist_align_opts ao;
    ist_error err;
    int rc = 1;

    if (argc != 5) {
        fprintf(stderr, "usage: fit_and_score SRC TGT SEEDS TEST\n");
        return 2;
    }
    if (ist_store_open(argv[1], NULL, &src, &err) != IST_OK ||
        ist_store_open(argv[2], NULL, &tgt, &err) != IST_OK ||
        ist_pairs_read(argv[3], &seeds, &err) != IST_OK ||
        ist_pairs_resolve(seeds, src, tgt, &cov, &err) != IST_OK ||
        ist_pairs_read(argv[4], &test, &err) != IST_OK ||
        ist_pairs_resolve(test, src, tgt, &cov, &err) != IST_OK) {
        rc = fail(&err);
        goto done;
    }
    ist_align_opts_init(&ao);
    if (ist_align_fit(src, tgt, seeds, &ao, &map, &err) != IST_OK ||
        ist_map_apply(map, src, tgt, &xs, &zt, &err) != IST_OK) {
        rc = fail(&err);
        goto done;
    }
    printf("isthmus %s: %zu x %zu and %zu x %zu vectors, %zu seed pairs, %zu refinement "
           "rounds\n", ist_version(), ist_store_rows(src), ist_store_dim(src),
           ist_store_rows(tgt), ist_store_dim(tgt), ist_map_seed_pairs(map),
           ist_map_rounds(map));
    for (int m = 0; m < 2; m++) {
        ist_eval_opts eo;
        ist_metrics res;
        ist_eval_opts_init(&eo);
        eo.method = m ? IST_RETRIEVAL_CSLS : IST_RETRIEVAL_COSINE;
        if (ist_eval_run(ist_matrix_cview(xs), ist_matrix_cview(zt), test, &eo, &res, &err) !=
            IST_OK) {
            rc = fail(&err);
            goto done;
        }
        printf("%-6s p@1 %5.1f%% of %zu test words (%zu hits)\n", ist_retrieval_name(eo.method),
               100 * res.p[0], res.queries, res.hits[0]);
        ist_metrics_release(&res);
    }
    rc = 0;
done:
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    ist_map_free(map);
    ist_pairs_free(seeds);
    ist_pairs_free(test);
    ist_store_free(src);
    ist_store_free(tgt);
    return rc;
}
