/* test_diag.c - diagnostics on synthetic spaces with known answers: a planted
 * hub, skewness, isometry of rotated and of unrelated spaces, worst misses,
 * similarity histograms, and their place in the result JSON. */
#include "harness.h"
#include "synth.h"

#include <math.h>
#include <string.h>

#include <isthmus/isthmus.h>
#include <isthmus/testing.h>

#include "json_int.h"

static void
unit_row(float *r, size_t d)
{
    double n = 0;
    for (size_t j = 0; j < d; j++)
        n += (double)r[j] * r[j];
    n = sqrt(n);
    for (size_t j = 0; j < d; j++)
        r[j] = (float)(r[j] / n);
}

/* A store of n unit Gaussian rows named w0, w1, ... (or prefix + number). */
static ist_store *
random_store(size_t n, size_t d, uint64_t seed, const char *prefix)
{
    ist_store *s = NULL;
    uint64_t st = seed;
    assert_int_equal(ist_store_new(n, d, &s, NULL), IST_OK);
    for (size_t i = 0; i < n; i++) {
        float *r = ist_store_row_mut(s, i);
        char w[32];
        for (size_t j = 0; j < d; j++)
            r[j] = (float)gauss(&st);
        unit_row(r, d);
        snprintf(w, sizeof w, "%s%zu", prefix, i);
        if (strcmp(prefix, "n") == 0)      /* words of letters only: i in base 26, a..z */
            for (size_t k = 0, x = i; k < 4; k++, x /= 26)
                w[k] = (char)('a' + x % 26), w[k + 1] = 0;
        if (strcmp(prefix, "h") == 0 && i == 7)
            strcpy(w, "<hub&\"");                      /* the planted hub's row */
        if (strcmp(prefix, "n") == 0 && i == 7)
            strcpy(w, "4493");                         /* the same, named like a number */
        assert_int_equal(ist_store_set_word(s, i, w, 1000 - i, NULL), IST_OK);
    }
    return s;
}

/* Skewness of {1, 2, 3, 10}: mean 4, deviations -3 -2 -1 6, m2 = 50/4 = 12.5,
 * m3 = 180/4 = 45, g1 = 45 / 12.5^1.5 = 1.018233764908628 (computed by hand; the
 * same as scipy.stats.skew([1, 2, 3, 10]) with its default bias=True, the
 * population form Radovanović et al. 2010 use). A symmetric set has 0. */
static void
skewness_known_values(void **state)
{
    (void)state;
    const double a[] = {1, 2, 3, 10}, sym[] = {-2, -1, 0, 1, 2}, flat[] = {3, 3, 3};
    assert_true(fabs(ist_diag_skew(a, 4) - 1.018233764908628) < 1e-12);
    assert_true(fabs(ist_diag_skew(sym, 5)) < 1e-12);
    assert_true(ist_diag_skew(flat, 3) == 0);
    assert_true(ist_diag_skew(a, 1) == 0);
    const double neg[] = {-1, -2, -3, -10};
    assert_true(fabs(ist_diag_skew(neg, 4) + 1.018233764908628) < 1e-12);
}

/* Queries share a common direction c; the target row 7 is c itself, so it is
 * near every query: the planted hub must have the largest k-occurrence under
 * cosine, and CSLS (which subtracts the hub's mean similarity to the sources)
 * must find it less often. */
static void
planted_hub_has_highest_k_occurrence(void **state)
{
    (void)state;
    const size_t d = 24, nq = 300, nt = 400, hub = 7;
    ist_store *src = NULL, *tgt = random_store(nt, d, 11, "h");
    uint64_t st = 5;
    float c[24];
    ist_diag *dg = NULL;
    ist_diag_opts o;

    for (size_t j = 0; j < d; j++)
        c[j] = (float)gauss(&st);
    unit_row(c, d);
    memcpy(ist_store_row_mut(tgt, hub), c, sizeof c);
    assert_int_equal(ist_store_new(nq, d, &src, NULL), IST_OK);
    for (size_t i = 0; i < nq; i++) {
        float *r = ist_store_row_mut(src, i);
        for (size_t j = 0; j < d; j++)
            r[j] = (float)(1.2 * c[j] + 0.3 * gauss(&st));
        unit_row(r, d);
    }
    ist_diag_opts_init(&o);
    o.isometry_words = 0;
    assert_int_equal(ist_diag_run(ist_store_view(src), ist_store_view(tgt), tgt, NULL, &o, &dg,
                                  NULL),
                     IST_OK);
    const uint32_t *cos = ist_diag_k_occurrence(dg, IST_RETRIEVAL_COSINE);
    const uint32_t *csls = ist_diag_k_occurrence(dg, IST_RETRIEVAL_CSLS);
    uint64_t total = 0;
    for (size_t t = 0; t < nt; t++) {
        total += cos[t];
        if (t != hub)
            assert_true(cos[t] < cos[hub]);
    }
    assert_int_equal(total, nq * 10);                 /* every query names 10 targets */
    assert_true(cos[hub] >= nq * 9 / 10);            /* the hub is in nearly every top 10 */
    assert_true(csls[hub] < cos[hub]);
    assert_true(ist_diag_skewness(dg, IST_RETRIEVAL_COSINE) > 3);
    assert_int_equal(ist_diag_queries(dg), nq);
    assert_true(ist_diag_isometry(dg) < 0);           /* skipped */
    uint32_t occ = 0, hub_occ = cos[hub];
    double skew = ist_diag_skewness(dg, IST_RETRIEVAL_COSINE);
    assert_string_equal(ist_diag_hub(dg, IST_RETRIEVAL_COSINE, 0, &occ), "<hub&\"");
    assert_int_equal(occ, hub_occ);
    assert_null(ist_diag_hub(dg, IST_RETRIEVAL_COSINE, o.top_hubs, NULL));
    ist_diag_free(dg);

    /* the hub named like an order number: passed over in the list (and counted), unless
     * number-shaped words are asked for; the k-occurrence figures do not change */
    ist_store *tgt_n = random_store(nt, d, 11, "n");
    memcpy(ist_store_row_mut(tgt_n, hub), c, sizeof c);
    ist_diag_summary sum;
    for (int with = 0; with < 2; with++) {
        o.hub_numbers = with;
        assert_int_equal(ist_diag_run(ist_store_view(src), ist_store_view(tgt_n), tgt_n, NULL,
                                      &o, &dg, NULL),
                         IST_OK);
        ist_diag_summarise(dg, &sum);
        const char *first = ist_diag_hub(dg, IST_RETRIEVAL_COSINE, 0, &occ);
        assert_int_equal(sum.hub_numbers, with);
        assert_int_equal(sum.hubs[0], o.top_hubs);   /* the list is still full */
        assert_int_equal(ist_diag_k_occurrence(dg, IST_RETRIEVAL_COSINE)[hub], hub_occ);
        assert_true(ist_diag_skewness(dg, IST_RETRIEVAL_COSINE) == skew);
        if (with) {
            assert_string_equal(first, "4493");
            assert_int_equal(sum.hubs_left_out[0], 0);
        } else {
            assert_string_not_equal(first, "4493");
            assert_true(occ < hub_occ);
            assert_int_equal(sum.hubs_left_out[0], 1);
            for (size_t i = 0; ist_diag_hub(dg, IST_RETRIEVAL_COSINE, i, NULL); i++)
                assert_string_not_equal(ist_diag_hub(dg, IST_RETRIEVAL_COSINE, i, NULL), "4493");
        }
        ist_diag_free(dg);
    }
    ist_store_free(tgt_n);
    ist_store_free(src);
    ist_store_free(tgt);
}

/* Eigenvector similarity: a space and a rotated copy have the same k-NN graph
 * (cosines are kept by a rotation), so the figure is 0; two unrelated random
 * spaces differ clearly. */
static void
isometry_rotated_vs_unrelated(void **state)
{
    (void)state;
    const size_t n = 300, d = 16;
    ist_store *a = random_store(n, d, 21, "a"), *b = NULL, *u = random_store(n, d, 99, "u");
    double q[16 * 16], same = -1, other = -1;
    uint64_t st = 3;
    size_t terms = 0;

    for (size_t i = 0; i < d * d; i++)
        q[i] = gauss(&st);
    for (size_t i = 0; i < d; i++) {   /* Gram-Schmidt rows: an orthogonal matrix */
        for (size_t k = 0; k < i; k++) {
            double dot = 0;
            for (size_t j = 0; j < d; j++)
                dot += q[i * d + j] * q[k * d + j];
            for (size_t j = 0; j < d; j++)
                q[i * d + j] -= dot * q[k * d + j];
        }
        double nn = 0;
        for (size_t j = 0; j < d; j++)
            nn += q[i * d + j] * q[i * d + j];
        for (size_t j = 0; j < d; j++)
            q[i * d + j] /= sqrt(nn);
    }
    assert_int_equal(ist_store_new(n, d, &b, NULL), IST_OK);
    for (size_t i = 0; i < n; i++) {
        const float *x = ist_store_row(a, i);
        float *y = ist_store_row_mut(b, i);
        for (size_t j = 0; j < d; j++) {
            double s = 0;
            for (size_t k = 0; k < d; k++)
                s += x[k] * q[k * d + j];
            y[j] = (float)s;
        }
    }
    assert_int_equal(ist_diag_eigen_similarity(ist_store_view(a), ist_store_view(b), n, 10, NULL,
                                               &same, &terms, NULL),
                     IST_OK);
    assert_true(terms > 0 && terms <= n);
    assert_true(same < 1e-9);
    assert_int_equal(ist_diag_eigen_similarity(ist_store_view(a), ist_store_view(u), n, 10, NULL,
                                               &other, NULL, NULL),
                     IST_OK);
    assert_true(other > 100 * (same + 1e-3));
    assert_true(other > 1.0);
    ist_error err;
    assert_int_equal(ist_diag_eigen_similarity(ist_store_view(a), ist_store_view(u), 1, 10, NULL,
                                               &other, NULL, &err),
                     IST_ERR_INVALID);
    ist_store_free(a);
    ist_store_free(b);
    ist_store_free(u);
}

/* Identity "map": source row i is target row i. Test pairs name row i as the
 * gold of source i, except two planted errors whose gold is another row. */
static void
worst_misses_and_histograms(void **state)
{
    (void)state;
    const size_t n = 200, d = 20;
    ist_store *s = random_store(n, d, 7, "s"), *t = random_store(n, d, 7, "t");
    ist_pairs *p = NULL;
    ist_diag *dg = NULL;
    ist_diag_opts o;

    assert_int_equal(ist_pairs_new(&p, NULL), IST_OK);
    for (size_t i = 0; i < 40; i++) {
        char a[16], b[16];
        snprintf(a, sizeof a, "s%zu", i);
        snprintf(b, sizeof b, "t%zu", i == 3 ? 150 : i == 9 ? 151 : i);
        assert_int_equal(ist_pairs_add(p, a, b, NULL), IST_OK);
    }
    assert_int_equal(ist_pairs_resolve(p, s, t, NULL, NULL), IST_OK);
    ist_diag_opts_init(&o);
    o.isometry_words = 100;
    assert_int_equal(ist_diag_run(ist_store_view(s), ist_store_view(t), t, p, &o, &dg, NULL),
                     IST_OK);
    assert_int_equal(ist_diag_misses(dg), 2);
    for (size_t m = 0; m < 2; m++) {
        size_t sr, rr, gr;
        float sc;
        ist_diag_miss(dg, m, &sr, &rr, &sc, &gr);
        assert_true(sr == 3 || sr == 9);
        assert_int_equal(rr, sr);                     /* its own row is ranked first */
        assert_true(gr != 1);
    }
    const size_t *g = ist_diag_gold_hist(dg), *r = ist_diag_random_hist(dg);
    size_t ng = 0, nr = 0;
    for (size_t b = 0; b < IST_DIAG_SIM_BINS; b++) {
        ng += g[b];
        nr += r[b];
    }
    assert_int_equal(ng, 40);
    assert_int_equal(nr, 1000);                       /* at least 1000 random pairs */
    assert_true(g[IST_DIAG_SIM_BINS - 1] >= 38);      /* cosine 1 of the 38 true pairs */
    assert_true(r[IST_DIAG_SIM_BINS - 1] < 50);
    assert_true(fabs(ist_diag_isometry(dg)) < 1e-9);  /* the two spaces are the same */

    /* the result JSON carries them under "diagnostics" */
    char *dir = harness_tmpdir(), *path = harness_path(dir, "r.json");
    ist_result res;
    memset(&res, 0, sizeof res);
    res.command = (char *)"score";
    res.diagnostics = dg;
    assert_int_equal(ist_result_write(&res, path, NULL), IST_OK);
    ist_jv *root = NULL;
    assert_int_equal(ist_json_parse_file(path, &root, NULL), IST_OK);
    const ist_jv *dj = ist_jv_get(root, "diagnostics");
    assert_int_equal(ist_jv_num(ist_jv_get(ist_jv_get(dj, "hubness"), "k"), 0), 10);
    assert_int_equal(ist_jv_len(ist_jv_get(dj, "worst_misses")), 2);
    assert_int_equal(ist_jv_len(ist_jv_get(ist_jv_get(dj, "similarity"), "bins")), 21);
    assert_non_null(ist_jv_str(ist_jv_get(ist_jv_get(dj, "isometry"), "note"), NULL));
    const ist_jv *m0 = ist_jv_at(ist_jv_get(dj, "worst_misses"), 0);
    assert_true(strcmp(ist_jv_str(ist_jv_at(ist_jv_get(m0, "gold"), 0), ""), "t150") == 0 ||
                strcmp(ist_jv_str(ist_jv_at(ist_jv_get(m0, "gold"), 0), ""), "t151") == 0);
    ist_jv_free(root);
    free(path);
    harness_rmdir(dir);
    ist_diag_free(dg);
    ist_pairs_free(p);
    ist_store_free(s);
    ist_store_free(t);
}

/* Every allocation of the diagnostics can fail: the call then reports
 * IST_ERR_NOMEM and leaks nothing (LeakSanitizer in the sanitizer build). */
static void
diagnostics_survive_every_failed_allocation(void **state)
{
    (void)state;
    const size_t n = 60, d = 8;
    ist_store *s = random_store(n, d, 4, "s"), *t = random_store(n, d, 5, "t");
    ist_pairs *p = NULL;
    ist_diag_opts o;
    int k;

    assert_int_equal(ist_pairs_new(&p, NULL), IST_OK);
    for (size_t i = 0; i < 20; i++) {
        char a[16], b[16];
        snprintf(a, sizeof a, "s%zu", i);
        snprintf(b, sizeof b, "t%zu", (i * 7) % n);
        assert_int_equal(ist_pairs_add(p, a, b, NULL), IST_OK);
    }
    assert_int_equal(ist_pairs_resolve(p, s, t, NULL, NULL), IST_OK);
    ist_diag_opts_init(&o);
    o.isometry_words = 30;
    o.search.retrieve.threads = 1;
    for (k = 0; k < 100000; k++) {
        ist_diag *dg = NULL;
        ist_testing_fail_alloc_after(k);
        ist_status rc = ist_diag_run(ist_store_view(s), ist_store_view(t), t, p, &o, &dg, NULL);
        ist_testing_fail_alloc_after(-1);
        ist_diag_free(dg);
        if (rc == IST_OK)
            break;
        if (rc != IST_ERR_NOMEM)
            fail_msg("allocation %d failing gave status %d, expected out of memory", k, (int)rc);
        assert_null(dg);
    }
    /* with injection on (the sanitizer build) many points were failed first; off, the first
     * call succeeds */
    assert_true((!ist_testing_fault_injection_enabled() || k > 0) && k < 100000);
    ist_pairs_free(p);
    ist_store_free(s);
    ist_store_free(t);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(skewness_known_values),
        cmocka_unit_test(planted_hub_has_highest_k_occurrence),
        cmocka_unit_test(isometry_rotated_vs_unrelated),
        cmocka_unit_test(worst_misses_and_histograms),
        cmocka_unit_test(diagnostics_survive_every_failed_allocation),
    };
    HARNESS_RUN("diag", tests);
}
