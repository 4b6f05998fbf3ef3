/* test_align.c - Procrustes, normalisation, retrieval, CSLS, the map file and
 * the synthetic rotation check. */
#include "harness.h"
#include "synth.h"
#include "synth_space.h"

#include <math.h>

#include <isthmus/isthmus.h>
#include <isthmus/testing.h>

/* ---- synthetic rotation (closed-form fact: a rotated space is recovered) -- */

static void
test_synthetic_rotation(void **state)
{
    (void)state;
    synth sy;
    ist_align_opts ao;
    ist_map *map;
    ist_error err;

    make_synth(&sy, 3000, 40, 0.02, 42);
    ist_pairs *seeds = range_pairs(&sy, 0, 500), *test = range_pairs(&sy, 500, 3000);
    ist_align_opts_init(&ao);
    ao.source_norm = "none";
    ao.target_norm = "none";
    ao.refine_rounds = 0;
    assert_int_equal(ist_align_fit(sy.src, sy.tgt, seeds, &ao, &map, &err), IST_OK);
    ist_cmatview w = ist_map_matrix(map);
    double maxdiff = 0;
    for (size_t i = 0; i < sy.d; i++)
        for (size_t j = 0; j < sy.d; j++)
            maxdiff = fmax(maxdiff, fabs(w.data[i * w.stride + j] - sy.rot[i * sy.d + j]));
    /* noise 0.02 per component against unit-variance signal over 500 pairs:
     * the estimate is within a few 1e-3 of the rotation (measured 2026-12-01: 2.3e-3) */
    assert_true(maxdiff < 0.01);
    assert_true(ist_map_seed_fit(map).orth_error < 1e-4);
    assert_true(ist_map_seed_fit(map).seed_cos > 0.99);

    ist_matrix *xs, *zt;
    ist_metrics m;
    ist_eval_opts eo;
    ist_eval_opts_init(&eo);
    assert_int_equal(ist_map_apply(map, sy.src, sy.tgt, &xs, &zt, &err), IST_OK);
    /* the test rows are not unit length here; cosine ranking needs unit rows:
     * the check below runs the default pipeline (which normalises) instead */
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    ist_map_free(map);

    ist_align_opts_init(&ao);   /* default normalisation and refinement */
    assert_int_equal(ist_align_fit(sy.src, sy.tgt, seeds, &ao, &map, &err), IST_OK);
    assert_int_equal(ist_map_apply(map, sy.src, sy.tgt, &xs, &zt, &err), IST_OK);
    for (int method = 0; method < 2; method++) {
        eo.method = method ? IST_RETRIEVAL_CSLS : IST_RETRIEVAL_COSINE;
        assert_int_equal(ist_eval_run(ist_matrix_cview(xs), ist_matrix_cview(zt), test, &eo, &m,
                                      &err), IST_OK);
        assert_int_equal(m.queries, 2500);
        assert_true(m.coverage == 1.0);
        assert_true(m.p[0] >= 0.99);
        /* bands from the vocabulary's size (3000 rows): 1-300, 301-1000, 1001+; the test
         * words are rows 500-2999, ranks 501-3000 */
        assert_int_equal(m.nbands, 3);
        assert_int_equal(m.band[0].hi, 300);
        assert_int_equal(m.band[1].hi, 1000);
        assert_int_equal(m.band[0].queries, 0);
        assert_int_equal(m.band[1].queries, 500);
        assert_int_equal(m.band[2].queries, 2000);
        assert_int_equal(m.query_row[0], 500);
        assert_int_equal(m.query_place[0], 0);
        ist_metrics_release(&m);
    }
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    ist_map_free(map);
    ist_pairs_free(seeds);
    ist_pairs_free(test);
    free_synth(&sy);
}

/* ---- CSLS on a hand-worked example ---------------------------------------- */

static void
test_csls_hand_example(void **state)
{
    (void)state;
    /* Mapped sources x1 = (1, 0), x2 = (0.6, 0.8), x3 = (0, 1); targets
     * h = (0.8, 0.6), b = (0.6, -0.8), c = (0, 1); neighbourhood k = 2.
     * Cosines:      h     b      c
     *        x1   0.80  0.60   0.00
     *        x2   0.96 -0.28   0.80
     *        x3   0.60 -0.80   1.00
     * r_T (mean of the 2 best per row): x1 (0.8+0.6)/2 = 0.70, x2 (0.96+0.8)/2 = 0.88,
     *      x3 (1+0.6)/2 = 0.80.
     * r_S (mean of the 2 best per column): h (0.96+0.8)/2 = 0.88, b (0.6-0.28)/2 = 0.16,
     *      c (1+0.8)/2 = 0.90.
     * CSLS(x1, h) = 1.60 - 0.70 - 0.88 = 0.02;  CSLS(x1, b) = 1.20 - 0.70 - 0.16 = 0.34;
     * CSLS(x1, c) = 0 - 0.70 - 0.90 = -1.60. So cosine ranks the hub h first for x1, CSLS
     * ranks b first. x3: CSLS(x3, c) = 2 - 0.8 - 0.9 = 0.30 stays first. */
    static const float xs[] = {1, 0, 0.6f, 0.8f, 0, 1};
    static const float ts[] = {0.8f, 0.6f, 0.6f, -0.8f, 0, 1};
    ist_cmatview x = {xs, 3, 2, 2}, t = {ts, 3, 2, 2};
    float rt[3], rs[3];
    ist_topk *cos, *csls;
    ist_error err;
    ist_retrieve_opts ro;

    ist_retrieve_opts_init(&ro);
    ro.threads = 2;
    assert_int_equal(ist_retrieve_neighbourhood(x, t, 2, &ro, rt, &err), IST_OK);
    assert_int_equal(ist_retrieve_neighbourhood(t, x, 2, &ro, rs, &err), IST_OK);
    assert_float_equal(rt[0], 0.70, 1e-6);
    assert_float_equal(rt[1], 0.88, 1e-6);
    assert_float_equal(rt[2], 0.80, 1e-6);
    assert_float_equal(rs[0], 0.88, 1e-6);
    assert_float_equal(rs[1], 0.16, 1e-6);
    assert_float_equal(rs[2], 0.90, 1e-6);
    assert_int_equal(ist_retrieve_rank(x, x, t, IST_RETRIEVAL_COSINE, 3, 2, &ro, &cos, &err),
                     IST_OK);
    assert_int_equal(ist_retrieve_rank(x, x, t, IST_RETRIEVAL_CSLS, 3, 2, &ro, &csls, &err),
                     IST_OK);
    assert_int_equal(ist_topk_index(cos, 0)[0], 0);     /* hub h by cosine */
    assert_float_equal(ist_topk_score(cos, 0)[0], 0.80, 1e-6);
    assert_int_equal(ist_topk_index(csls, 0)[0], 1);    /* b by CSLS */
    assert_float_equal(ist_topk_score(csls, 0)[0], 0.34, 1e-6);
    assert_int_equal(ist_topk_index(csls, 0)[1], 0);
    assert_float_equal(ist_topk_score(csls, 0)[1], 0.02, 1e-6);
    assert_int_equal(ist_topk_index(csls, 0)[2], 2);
    assert_float_equal(ist_topk_score(csls, 0)[2], -1.60, 1e-6);
    assert_int_equal(ist_topk_index(csls, 2)[0], 2);
    assert_float_equal(ist_topk_score(csls, 2)[0], 0.30, 1e-6);
    ist_topk_free(cos);
    ist_topk_free(csls);
}

/* ---- tiled, threaded top-k against a direct loop --------------------------- */

static void
test_topk_matches_brute_force(void **state)
{
    (void)state;
    size_t m = 300, n = 5003, d = 24, k = 10;
    float *q = malloc(m * d * sizeof *q), *t = malloc(n * d * sizeof *t);
    float *qs = malloc(m * sizeof *qs), *ts = malloc(n * sizeof *ts);
    uint64_t s = 7;
    ist_retrieve_opts ro;
    ist_topk *tk;
    ist_error err;

    for (size_t i = 0; i < m * d; i++)
        q[i] = harness_randf(&s);
    for (size_t i = 0; i < n * d; i++)
        t[i] = harness_randf(&s);
    for (size_t i = 0; i < m; i++)
        qs[i] = harness_randf(&s);
    for (size_t i = 0; i < n; i++)
        ts[i] = harness_randf(&s);
    ist_retrieve_opts_init(&ro);
    ro.threads = 3;
    ro.budget = 64 * 1024;   /* forces many small tiles */
    ist_cmatview qv = {q, m, d, d}, tv = {t, n, d, d};
    assert_int_equal(ist_retrieve_topk(qv, tv, k, 2.0f, qs, ts, &ro, &tk, &err), IST_OK);
    double *sc = malloc(n * sizeof *sc);
    for (size_t i = 0; i < m; i++) {
        for (size_t j = 0; j < n; j++) {
            double dot = 0;
            for (size_t a = 0; a < d; a++)
                dot += (double)q[i * d + a] * t[j * d + a];
            sc[j] = 2 * dot - qs[i] - ts[j];
        }
        const uint32_t *ix = ist_topk_index(tk, i);
        const float *sv = ist_topk_score(tk, i);
        for (size_t a = 0; a < k; a++) {
            assert_true(ix[a] < n);
            assert_float_equal(sv[a], sc[ix[a]], 1e-4);
            if (a > 0)
                assert_true(sv[a] <= sv[a - 1]);
        }
        /* nothing outside the list beats its last entry (beyond rounding) */
        size_t better = 0;
        for (size_t j = 0; j < n; j++)
            better += sc[j] > sv[k - 1] + 1e-4;
        assert_true(better <= k);
        for (size_t j = 0; j < n; j++)
            if (sc[j] > sv[k - 1] + 1e-4) {
                bool found = false;
                for (size_t a = 0; a < k; a++)
                    found |= ix[a] == j;
                assert_true(found);
            }
    }
    ist_topk_free(tk);
    /* fewer targets than k: empty places are marked */
    ist_cmatview small = {t, 3, d, d};
    assert_int_equal(ist_retrieve_topk(qv, small, 5, 1.0f, NULL, NULL, &ro, &tk, &err), IST_OK);
    assert_true(ist_topk_index(tk, 0)[2] < 3);
    assert_int_equal(ist_topk_index(tk, 0)[3], UINT32_MAX);
    ist_topk_free(tk);
    /* a budget too small for one row is refused */
    ro.budget = 8;
    assert_int_equal(ist_retrieve_topk(qv, tv, k, 1.0f, NULL, NULL, &ro, &tk, &err),
                     IST_ERR_INVALID);
    free(sc);
    free(q);
    free(t);
    free(qs);
    free(ts);
}

/* ---- normalisation plans -------------------------------------------------- */

static void
test_normalisation(void **state)
{
    (void)state;
    float a[4 * 3] = {1, 2, 3, 4, 5, 6, -1, 0, 2, 3, 3, 3};
    float b[4 * 3];
    ist_matview m = {a, 4, 3, 3};
    ist_norm *p;
    ist_error err;

    memcpy(b, a, sizeof a);
    assert_int_equal(ist_norm_fit("length,mean,length", m, &p, &err), IST_OK);
    assert_int_equal(ist_norm_steps(p), 3);
    assert_non_null(ist_norm_step_mean(p, 1));
    assert_null(ist_norm_step_mean(p, 0));
    for (size_t i = 0; i < 4; i++) {
        double q = 0;
        for (size_t j = 0; j < 3; j++)
            q += (double)a[i * 3 + j] * a[i * 3 + j];
        assert_float_equal(q, 1.0, 1e-6);
    }
    /* replay on the original gives the same numbers */
    ist_matview mb = {b, 4, 3, 3};
    assert_int_equal(ist_norm_apply(p, mb, &err), IST_OK);
    for (size_t i = 0; i < 12; i++)
        assert_float_equal(a[i], b[i], 1e-7);
    ist_norm_free(p);

    /* iterative normalisation: after it, rows are unit and the mean is near zero
     * (Zhang et al. 2019 report convergence within a few rounds) */
    uint64_t s = 3;
    size_t n = 200, d = 8;
    float *c = malloc(n * d * sizeof *c);
    for (size_t i = 0; i < n * d; i++)
        c[i] = harness_randf(&s) + 0.7f;
    ist_matview mc = {c, n, d, d};
    assert_int_equal(ist_norm_fit("alternate=10", mc, &p, &err), IST_OK);
    assert_int_equal(ist_norm_steps(p), 21);
    for (size_t j = 0; j < d; j++) {
        double mean = 0;
        for (size_t i = 0; i < n; i++)
            mean += c[i * d + j];
        assert_true(fabs(mean / (double)n) < 1e-3);
    }
    ist_norm_free(p);
    free(c);
    assert_int_equal(ist_norm_check("length,sideways", &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "sideways"));
    assert_int_equal(ist_norm_check("alternate=0", &err), IST_ERR_INVALID);
    assert_int_equal(ist_norm_check("none", &err), IST_OK);
}

/* ---- the map file ---------------------------------------------------------- */

static void
test_map_file_round_trip(void **state)
{
    (void)state;
    synth sy, other;
    ist_align_opts ao;
    ist_map *map, *back;
    ist_error err;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "m.map");

    make_synth(&sy, 600, 16, 0.05, 9);
    make_synth(&other, 600, 16, 0.05, 10);
    ist_pairs *seeds = range_pairs(&sy, 0, 200);
    ist_align_opts_init(&ao);
    ao.refine_rounds = 2;
    ao.refine_vocab = 400;
    assert_int_equal(ist_align_fit(sy.src, sy.tgt, seeds, &ao, &map, &err), IST_OK);
    assert_true(ist_map_rounds(map) >= 1);
    assert_int_equal(ist_map_save(map, path, &err), IST_OK);
    assert_int_equal(harness_count_entries(dir), 1);
    assert_int_equal(ist_map_load(path, &back, &err), IST_OK);
    assert_int_equal(ist_map_dim(back), 16);
    ist_cmatview a = ist_map_matrix(map), b = ist_map_matrix(back);
    for (size_t i = 0; i < 16; i++)
        for (size_t j = 0; j < 16; j++)
            assert_true(a.data[i * a.stride + j] == b.data[i * b.stride + j]);
    assert_int_equal(ist_map_source_fingerprint(back), ist_store_fingerprint(sy.src));
    uint64_t ck;
    assert_int_equal(ist_pairs_checksum(seeds, &ck, &err), IST_OK);
    assert_int_equal(ist_map_seed_checksum(back), ck);
    assert_int_equal(ist_map_rounds(back), ist_map_rounds(map));
    assert_int_equal(ist_pairs_count(ist_map_seeds(back)), 200);
    assert_string_equal(ist_pairs_source(ist_map_seeds(back), 7), "w7");
    assert_string_equal(ist_norm_spec(ist_map_source_norm(back)), "length,mean,length");
    const double *m1 = ist_norm_step_mean(ist_map_source_norm(map), 1);
    const double *m2 = ist_norm_step_mean(ist_map_source_norm(back), 1);
    for (size_t j = 0; j < 16; j++)
        assert_true(m1[j] == m2[j]);
    assert_int_equal(ist_map_check(back, sy.src, sy.tgt, &err), IST_OK);
    assert_int_equal(ist_map_check(back, other.src, sy.tgt, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "source vectors"));

    /* the replayed mapping equals the one the fit saw */
    ist_matrix *x1, *x2;
    assert_int_equal(ist_map_apply(map, sy.src, sy.tgt, &x1, NULL, &err), IST_OK);
    assert_int_equal(ist_map_apply(back, sy.src, sy.tgt, &x2, NULL, &err), IST_OK);
    ist_cmatview v1 = ist_matrix_cview(x1), v2 = ist_matrix_cview(x2);
    for (size_t i = 0; i < v1.rows * v1.stride; i++)
        assert_true(v1.data[i] == v2.data[i]);
    ist_matrix_free(x1);
    ist_matrix_free(x2);
    ist_map_free(back);

    /* one flipped byte is caught by the checksum */
    FILE *f = fopen(path, "r+b");
    assert_non_null(f);
    fseek(f, 300, SEEK_SET);
    int ch = fgetc(f);
    fseek(f, 300, SEEK_SET);
    fputc(ch ^ 0x20, f);
    fclose(f);
    assert_int_equal(ist_map_load(path, &back, &err), IST_ERR_FORMAT);
    assert_null(back);
    assert_non_null(strstr(err.msg, "checksum"));
    harness_write(path, "not a map at all, just text\n", 28);
    assert_int_equal(ist_map_load(path, &back, &err), IST_ERR_FORMAT);
    ist_map_free(map);
    ist_pairs_free(seeds);
    free_synth(&sy);
    free_synth(&other);
    free(path);
    harness_rmdir(dir);
}

static void
test_procrustes_input_checks(void **state)
{
    (void)state;
    float x[6] = {1, 0, 0, 1, 1, 1}, w[4];
    ist_cmatview a = {x, 3, 2, 2}, b = {x, 2, 2, 2};
    ist_matview wv = {w, 2, 2, 2};
    ist_error err;
    ist_procrustes_info info;
    assert_int_equal(ist_linalg_procrustes(a, b, wv, &info, &err), IST_ERR_INVALID);
    assert_int_equal(ist_linalg_procrustes(a, a, wv, &info, &err), IST_OK);
    /* X^T X is symmetric positive definite: the best rotation of X onto itself is I */
    assert_float_equal(w[0], 1, 1e-6);
    assert_float_equal(w[1], 0, 1e-6);
    assert_float_equal(w[3], 1, 1e-6);
    assert_true(info.orth_error < 1e-6);
    assert_float_equal(info.seed_cos, 1.0, 1e-6);
}

/* Every allocation failure during fitting, saving and loading is reported, not crashed on
 * (effective in a -Dfault_injection=true build; elsewhere the first round succeeds). */
static void
test_allocation_failures(void **state)
{
    (void)state;
    synth sy;
    ist_align_opts ao;
    ist_error err;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "f.map");
    make_synth(&sy, 300, 8, 0.05, 4);
    ist_pairs *seeds = range_pairs(&sy, 0, 100);
    ist_align_opts_init(&ao);
    ao.refine_rounds = 1;
    ao.search.retrieve.threads = 1;
    for (long n = 0;; n++) {
        ist_map *map = NULL, *back = NULL;
        ist_testing_fail_alloc_after(n);
        ist_status rc = ist_align_fit(sy.src, sy.tgt, seeds, &ao, &map, &err);
        if (rc == IST_OK)
            rc = ist_map_save(map, path, &err);
        if (rc == IST_OK)
            rc = ist_map_load(path, &back, &err);
        ist_testing_fail_alloc_after(-1);
        ist_map_free(map);
        ist_map_free(back);
        if (rc == IST_OK) {
            /* with injection on, many allocations were failed one by one first */
            assert_true(!ist_testing_fault_injection_enabled() || n > 20);
            break;
        }
        assert_int_equal(rc, IST_ERR_NOMEM);
        assert_null(back);
    }
    ist_pairs_free(seeds);
    free_synth(&sy);
    free(path);
    harness_rmdir(dir);
}

/* A stop request ends retrieval with IST_ERR_CANCELLED. */
static void
test_cancel(void **state)
{
    (void)state;
    float q[32 * 8] = {0}, t[64 * 8] = {0};
    ist_cmatview qv = {q, 32, 8, 8}, tv = {t, 64, 8, 8};
    ist_topk *tk;
    ist_error err;
    ist_cancel_request();
    assert_int_equal(ist_retrieve_topk(qv, tv, 3, 1.0f, NULL, NULL, NULL, &tk, &err),
                     IST_ERR_CANCELLED);
    assert_null(tk);
    ist_cancel_reset();
    assert_int_equal(ist_retrieve_topk(qv, tv, 3, 1.0f, NULL, NULL, NULL, &tk, &err), IST_OK);
    ist_topk_free(tk);
}

/* The neighbour-search group: one default, one range check, embedded in every
 * ranking step's options, which all start from it. */
static void
test_search_opts(void **state)
{
    (void)state;
    ist_search_opts so;
    ist_align_opts ao;
    ist_eval_opts eo;
    ist_diag_opts dg;
    ist_propose_opts po;
    ist_error err;

    /* the byte comparisons below include the padding after `threads`, which the other
     * initialisers zero with their whole struct: zero it here too */
    memset(&so, 0, sizeof so);
    ist_search_opts_init(&so);
    assert_int_equal(so.csls_k, 10);
    assert_int_equal(so.retrieve.threads, 0);
    assert_int_equal(so.retrieve.budget, (size_t)256 << 20);
    assert_int_equal(ist_search_opts_check(&so, "x", &err), IST_OK);
    ist_align_opts_init(&ao);
    ist_eval_opts_init(&eo);
    ist_diag_opts_init(&dg);
    ist_propose_opts_init(&po);
    assert_memory_equal(&ao.search, &so, sizeof so);
    assert_memory_equal(&eo.search, &so, sizeof so);
    assert_memory_equal(&dg.search, &so, sizeof so);
    assert_memory_equal(&po.search, &so, sizeof so);
    so.csls_k = 0;
    assert_int_equal(ist_search_opts_check(&so, "scoring", &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "scoring: expected a CSLS neighbourhood from 1 to 1000"));
    so.csls_k = IST_CSLS_K_MAX + 1;
    assert_int_equal(ist_search_opts_check(&so, "x", &err), IST_ERR_INVALID);
    so.csls_k = IST_CSLS_K_MAX;
    so.retrieve.threads = IST_THREADS_MAX + 1;
    assert_int_equal(ist_search_opts_check(&so, "x", &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "at most 256 threads"));
    so.retrieve.threads = IST_THREADS_MAX;
    assert_int_equal(ist_search_opts_check(&so, "x", &err), IST_OK);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_synthetic_rotation),
        cmocka_unit_test(test_csls_hand_example),
        cmocka_unit_test(test_topk_matches_brute_force),
        cmocka_unit_test(test_normalisation),
        cmocka_unit_test(test_map_file_round_trip),
        cmocka_unit_test(test_procrustes_input_checks),
        cmocka_unit_test(test_allocation_failures),
        cmocka_unit_test(test_cancel),
        cmocka_unit_test(test_search_opts),
    };
    HARNESS_RUN("align", tests);
}
