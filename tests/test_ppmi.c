/* test_ppmi.c - count-based vectors: the sparse counting and merging against plain loops, the
 * PPMI formula and the SVD against a dense computation made here, reproducibility across
 * threads and buffer sizes, cancellation, bad options; combined spaces; the pass rule. */
#include "harness.h"

#include <math.h>

#include <isthmus/cancel.h>
#include <isthmus/combine.h>
#include <isthmus/ppmi.h>
#include <isthmus/sgns.h>
#include <isthmus/testing.h>

#include "ppmi_int.h"

/* ---- synthetic streams ---------------------------------------------------------------- */

/* Lines of random length 1..maxlen with ids drawn from a skewed distribution over vocab
 * words; topic t of each line prefers ids near t * vocab / 4, so the counts have structure. */
static uint32_t *
make_stream(size_t lines, size_t maxlen, size_t vocab, uint64_t seed, size_t *n)
{
    size_t cap = lines * (maxlen + 1), k = 0;
    uint32_t *ids = malloc(cap * sizeof *ids);
    uint64_t s = seed;
    for (size_t l = 0; l < lines; l++) {
        size_t len = 1 + harness_rand(&s) % maxlen;
        size_t topic = harness_rand(&s) % 4;
        for (size_t i = 0; i < len; i++) {
            uint64_t r = harness_rand(&s);
            size_t id;
            if (r % 3 == 0)
                id = (size_t)((r >> 8) % vocab);
            else
                id = (topic * vocab / 4 + (size_t)((r >> 8) % (vocab / 4 ? vocab / 4 : 1))) %
                     vocab;
            ids[k++] = (uint32_t)id;
        }
        ids[k++] = IST_CORPUS_EOL;
    }
    *n = k;
    return ids;
}

/* The PPMI matrix by the formula of include/isthmus/ppmi.h, dense, in double. */
static double *
dense_ppmi(const uint32_t *ids, size_t n, size_t V, size_t W, bool linear, double alpha)
{
    double *c = calloc(V * V, sizeof *c), *r = calloc(V, sizeof *r);
    for (size_t t = 0; t < n; t++) {
        if (ids[t] == IST_CORPUS_EOL)
            continue;
        for (size_t d = 1; d <= W && t + d < n && ids[t + d] != IST_CORPUS_EOL; d++) {
            double w = linear ? (double)(W - d + 1) / (double)W : 1.0;
            c[ids[t] * V + ids[t + d]] += w;
            c[ids[t + d] * V + ids[t]] += w;
        }
    }
    double z = 0;
    for (size_t i = 0; i < V; i++) {
        for (size_t j = 0; j < V; j++)
            r[i] += c[i * V + j];
        z += r[i] > 0 ? pow(r[i], alpha) : 0;
    }
    for (size_t i = 0; i < V; i++)
        for (size_t j = 0; j < V; j++) {
            double x = c[i * V + j];
            double p = x > 0 ? log(x * z / (r[i] * pow(r[j], alpha))) : 0;
            c[i * V + j] = p > 0 ? p : 0;
        }
    free(r);
    return c;
}

/* ---- sorting and merging ---------------------------------------------------------------- */

static int
cmp_u64(const void *a, const void *b)
{
    uint64_t x = *(const uint64_t *)a, y = *(const uint64_t *)b;
    return x < y ? -1 : x > y;
}

static void
radix_sort_matches_qsort(void **state)
{
    (void)state;
    size_t n = 5000;
    uint64_t *k = malloc(n * 8), *v = malloc(n * 8), *tk = malloc(n * 8), *tv = malloc(n * 8);
    uint64_t *ref = malloc(n * 8), s = 7;
    for (size_t i = 0; i < n; i++) {
        k[i] = harness_rand(&s) % 100000000u;
        v[i] = k[i] * 3 + 1;             /* the value travels with its key */
        ref[i] = k[i];
    }
    ist_ppmi_radix_sort(k, v, tk, tv, n, 100000000u);
    qsort(ref, n, 8, cmp_u64);
    for (size_t i = 0; i < n; i++) {
        assert_int_equal(k[i], ref[i]);
        assert_int_equal(v[i], k[i] * 3 + 1);
    }
    free(k), free(v), free(tk), free(tv), free(ref);
}

static void
merge_sums_equal_keys(void **state)
{
    (void)state;
    /* two sorted distinct lists, merged: union of keys, values of shared keys summed */
    uint64_t *ak = malloc(4 * 8), *av = malloc(4 * 8);
    size_t an = 4, acap = 4;
    uint64_t a_k[4] = {2, 5, 9, 11}, a_v[4] = {1, 2, 3, 4};
    memcpy(ak, a_k, sizeof a_k), memcpy(av, a_v, sizeof a_v);
    uint64_t bk[5] = {1, 5, 6, 11, 20}, bv[5] = {10, 20, 30, 40, 50};
    assert_int_equal(ist_ppmi_merge(&ak, &av, &an, &acap, bk, bv, 5, NULL), IST_OK);
    uint64_t wk[7] = {1, 2, 5, 6, 9, 11, 20}, wv[7] = {10, 1, 22, 30, 3, 44, 50};
    assert_int_equal(an, 7);
    for (size_t i = 0; i < 7; i++) {
        assert_int_equal(ak[i], wk[i]);
        assert_int_equal(av[i], wv[i]);
    }
    /* merging into an empty list copies */
    uint64_t *ek = NULL, *ev = NULL;
    size_t en = 0, ecap = 0;
    assert_int_equal(ist_ppmi_merge(&ek, &ev, &en, &ecap, bk, bv, 5, NULL), IST_OK);
    assert_int_equal(en, 5);
    assert_int_equal(ek[4], 20);
    free(ak), free(av), free(ek), free(ev);
}

/* ---- the trained rows ------------------------------------------------------------------ */

/* With the full rank and exponent 1 the rows are U S, so rows . rows^T = A A^T for the dense
 * PPMI matrix A computed above: counting, weighting and factoring checked at once. */
static void
check_gram(bool linear, size_t window, double alpha)
{
    size_t n, V = 40;
    uint32_t *ids = make_stream(300, 12, V, 11, &n);
    double *a = dense_ppmi(ids, n, V, window, linear, alpha);
    ist_ppmi_opts o;
    ist_ppmi_opts_init(&o);
    o.dim = V;
    o.window = window;
    o.weighting = linear ? IST_PPMI_LINEAR : IST_PPMI_FLAT;
    o.alpha = alpha;
    o.power = 1.0;
    o.oversample = 0;
    o.power_iters = 2;
    ist_matrix *m = NULL;
    double *sv = NULL;
    ist_ppmi_result res;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &m, &sv, &res, NULL), IST_OK);
    ist_cmatview v = ist_matrix_cview(m);
    double worst = 0, scale = 0;
    for (size_t i = 0; i < V; i++)
        for (size_t j = 0; j < V; j++) {
            double want = 0, got = 0;
            for (size_t c = 0; c < V; c++) {
                want += a[i * V + c] * a[j * V + c];
                got += (double)v.data[i * v.stride + c] * v.data[j * v.stride + c];
            }
            worst = fmax(worst, fabs(got - want));
            scale = fmax(scale, fabs(want));
        }
    assert_true(worst <= 1e-5 * scale);
    for (size_t c = 1; c < V; c++)
        assert_true(sv[c] <= sv[c - 1]);
    assert_true(res.positive > 0 && res.positive <= res.nonzeros);
    ist_matrix_free(m);
    ist_ppmi_free(sv);
    free(a), free(ids);
}

static void
full_rank_rows_reproduce_ppmi(void **state)
{
    (void)state;
    check_gram(true, 3, 0.75);
    check_gram(false, 5, 0.75);
    check_gram(true, 2, 1.0);
}

static bool
same_bytes(const ist_matrix *a, const ist_matrix *b)
{
    ist_cmatview x = ist_matrix_cview(a), y = ist_matrix_cview(b);
    if (x.rows != y.rows || x.cols != y.cols)
        return false;
    for (size_t r = 0; r < x.rows; r++)
        if (memcmp(x.data + r * x.stride, y.data + r * y.stride, x.cols * sizeof(float)) != 0)
            return false;
    return true;
}

/* Counts are integers: threads and the size of the pair buffer (forcing many merges) change
 * nothing; the same seed gives the same bytes, another seed a different test matrix. */
static void
threads_and_buffer_change_nothing(void **state)
{
    (void)state;
    size_t n, V = 3000;
    uint32_t *ids = make_stream(4000, 60, V, 5, &n);
    ist_ppmi_opts o;
    ist_ppmi_opts_init(&o);
    o.dim = 20;
    o.window = 8;
    ist_matrix *base = NULL, *m = NULL;
    ist_ppmi_result r0, r1;
    o.buffer_mb = 64;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &base, NULL, &r0, NULL), IST_OK);
    /* 1 MiB holds ~23k pairs per thread: far fewer than the distinct pairs here */
    assert_true(r0.nonzeros > 200000);
    o.buffer_mb = 1;
    o.threads = 3;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &m, NULL, &r1, NULL), IST_OK);
    assert_int_equal(r0.nonzeros, r1.nonzeros);
    assert_int_equal(r0.positive, r1.positive);
    assert_true(same_bytes(base, m));
    ist_matrix_free(m);
    o.threads = 1;
    o.seed = 2;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &m, NULL, NULL, NULL), IST_OK);
    assert_false(same_bytes(base, m));
    ist_matrix_free(m);
    ist_matrix_free(base);
    free(ids);
}

/* A word that never shares a line with another gets a zero row; windows stop at line ends. */
static void
lonely_word_gets_zero_row(void **state)
{
    (void)state;
    size_t n, V = 30;
    uint32_t *ids = make_stream(200, 8, V - 1, 3, &n);
    ids = realloc(ids, (n + 4) * sizeof *ids);
    ids[n++] = (uint32_t)(V - 1);       /* alone on its line, twice */
    ids[n++] = IST_CORPUS_EOL;
    ids[n++] = (uint32_t)(V - 1);
    ids[n++] = IST_CORPUS_EOL;
    ist_ppmi_opts o;
    ist_ppmi_opts_init(&o);
    o.dim = 10;
    ist_matrix *m = NULL;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &m, NULL, NULL, NULL), IST_OK);
    ist_cmatview v = ist_matrix_cview(m);
    for (size_t c = 0; c < v.cols; c++)
        assert_true(v.data[(V - 1) * v.stride + c] == 0.0f);
    ist_matrix_free(m);
    free(ids);
}

/* A dimension above the vocabulary keeps its width: the first columns are those of the full
 * rank, the rest zero, so two small corpora trained alike can be aligned. */
static void
dimension_above_vocabulary_pads_with_zeros(void **state)
{
    (void)state;
    size_t n, V = 24;
    uint32_t *ids = make_stream(150, 10, V, 9, &n);
    ist_ppmi_opts o;
    ist_ppmi_opts_init(&o);
    o.dim = V;
    ist_matrix *full = NULL, *wide = NULL;
    double *sv_full = NULL, *sv_wide = NULL;
    ist_ppmi_result rf, rw;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &full, &sv_full, &rf, NULL), IST_OK);
    o.dim = 40;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &wide, &sv_wide, &rw, NULL), IST_OK);
    ist_cmatview f = ist_matrix_cview(full), w = ist_matrix_cview(wide);
    assert_int_equal(w.rows, V);
    assert_int_equal(w.cols, 40);
    assert_int_equal(rf.rank, V);
    assert_int_equal(rw.rank, V);
    assert_true(rw.sv_min == rf.sv_min && rw.sv_max == rf.sv_max);
    for (size_t r = 0; r < V; r++) {
        assert_memory_equal(w.data + r * w.stride, f.data + r * f.stride, V * sizeof(float));
        for (size_t c = V; c < 40; c++)
            assert_true(w.data[r * w.stride + c] == 0.0f);
    }
    for (size_t c = 0; c < 40; c++)
        assert_true(sv_wide[c] == (c < V ? sv_full[c] : 0.0));
    ist_matrix_free(full), ist_matrix_free(wide);
    ist_ppmi_free(sv_full), ist_ppmi_free(sv_wide);
    free(ids);
}

static int
stop_now(void *ctx, const ist_ppmi_progress *p)
{
    int *calls = ctx;
    assert_true(p->fraction >= 0.0 && p->fraction <= 1.0);
    return ++*calls >= 1;
}

static void
progress_can_cancel(void **state)
{
    (void)state;
    size_t n, V = 3000;
    uint32_t *ids = make_stream(20000, 60, V, 9, &n);
    ist_ppmi_opts o;
    ist_ppmi_opts_init(&o);
    o.dim = 50;
    o.power_iters = 20;
    int calls = 0;
    o.progress = stop_now;
    o.progress_ctx = &calls;
    ist_matrix *m = (ist_matrix *)1;
    ist_error err;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &m, NULL, NULL, &err), IST_ERR_CANCELLED);
    assert_null(m);
    assert_true(calls >= 1);
    /* the process-wide request stops it too */
    o.progress = NULL;
    ist_cancel_request();
    m = (ist_matrix *)1;
    assert_int_equal(ist_ppmi_train(ids, n, V, &o, &m, NULL, NULL, &err), IST_ERR_CANCELLED);
    ist_cancel_reset();
    assert_null(m);
    free(ids);
}

static void
bad_options(void **state)
{
    (void)state;
    uint32_t ids[6] = {0, 1, 2, IST_CORPUS_EOL, 1, 0};
    uint32_t eols[2] = {IST_CORPUS_EOL, IST_CORPUS_EOL};
    uint32_t bad[3] = {0, 7, 1};
    ist_ppmi_opts o;
    ist_matrix *m = NULL;
    ist_error err;
    ist_ppmi_opts_init(&o);
    o.dim = 2;
    o.alpha = 0;
    assert_int_equal(ist_ppmi_train(ids, 6, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    o.alpha = 0.75;
    o.shift = 0.5;
    assert_int_equal(ist_ppmi_train(ids, 6, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    o.shift = 1;
    o.window = 0;
    assert_int_equal(ist_ppmi_train(ids, 6, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    o.window = 2;
    assert_int_equal(ist_ppmi_train(bad, 3, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "id 7"));
    assert_int_equal(ist_ppmi_train(eols, 2, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_int_equal(ist_ppmi_train(ids, 0, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    /* every word alone on its line: nothing co-occurs */
    uint32_t alone[4] = {0, IST_CORPUS_EOL, 1, IST_CORPUS_EOL};
    o.dim = 1;
    assert_int_equal(ist_ppmi_train(alone, 4, 2, &o, &m, NULL, NULL, &err), IST_ERR_NUMERIC);
    assert_null(m);
}

static void
every_failed_allocation_is_clean(void **state)
{
    (void)state;
    if (!ist_testing_fault_injection_enabled()) {
        printf("# allocation failures: not tried (built without -Dfault_injection=true)\n");
        return;
    }
    size_t n, V = 50;
    uint32_t *ids = make_stream(100, 10, V, 4, &n);
    ist_ppmi_opts o;
    ist_ppmi_opts_init(&o);
    o.dim = 5;
    o.buffer_mb = 1;
    int tried = 0;
    for (int k = 0; k < 1000; k++) {
        ist_matrix *m = NULL;
        double *sv = NULL;
        char *prov = NULL;
        ist_testing_fail_alloc_after(k);
        ist_status rc = ist_ppmi_train(ids, n, V, &o, &m, &sv, NULL, NULL);
        if (rc == IST_OK)
            rc = ist_ppmi_provenance_json(&o, NULL, "{}", "[]", 1, 1, &prov, NULL);
        ist_testing_fail_alloc_after(-1);
        if (rc == IST_OK) {
            ist_ppmi_free(prov), ist_ppmi_free(sv), ist_matrix_free(m);
            break;
        }
        assert_int_equal(rc, IST_ERR_NOMEM);
        assert_null(prov);
        ist_ppmi_free(sv), ist_matrix_free(m);
        tried++;
    }
    assert_true(tried > 10);
    free(ids);
}

/* ---- combined spaces --------------------------------------------------------------------- */

static void
blocks_are_unit_centred_and_weighted(void **state)
{
    (void)state;
    ist_matrix *a = NULL, *b = NULL, *c = NULL;
    size_t rows = 50;
    assert_int_equal(ist_matrix_new(rows, 3, &a, NULL), IST_OK);
    assert_int_equal(ist_matrix_new(rows, 5, &b, NULL), IST_OK);
    ist_matview av = ist_matrix_view(a), bv = ist_matrix_view(b);
    uint64_t s = 1;
    for (size_t r = 0; r < rows; r++) {
        for (size_t j = 0; j < 3; j++)
            av.data[r * av.stride + j] = (float)(harness_rand(&s) % 1000) / 100.0f + 1.0f;
        for (size_t j = 0; j < 5; j++)
            bv.data[r * bv.stride + j] = (float)(harness_rand(&s) % 1000) / 10.0f - 50.0f;
    }
    for (size_t j = 0; j < 5; j++)
        bv.data[7 * bv.stride + j] = 0.0f;   /* a word block b has no vector for */
    ist_cmatview blocks[2] = {ist_matrix_cview(a), ist_matrix_cview(b)};
    double w[2] = {1.0, 0.5};
    assert_int_equal(ist_combine_concat(blocks, NULL, w, 2, &c, NULL), IST_OK);
    ist_cmatview cv = ist_matrix_cview(c);
    assert_int_equal(cv.cols, 8);
    double mean[8] = {0};
    for (size_t r = 0; r < rows; r++)
        for (size_t j = 0; j < 8; j++)
            mean[j] += cv.data[r * cv.stride + j];
    for (size_t j = 0; j < 3; j++)
        assert_true(fabs(mean[j] / rows) < 1e-6);
    /* block b: centred over its 49 non-zero rows; row 7 stays zero */
    for (size_t j = 3; j < 8; j++) {
        assert_true(fabs(mean[j] / 49) < 1e-6);
        assert_true(cv.data[7 * cv.stride + j] == 0.0f);
    }
    /* undoing the centring gives unit rows times the weight: (x - m) + m, |.| = w */
    double mb[5] = {0};
    for (size_t r = 0; r < rows; r++) {
        if (r == 7)
            continue;
        double ss = 0;
        for (size_t j = 0; j < 5; j++) {
            double x = bv.data[r * bv.stride + j];
            for (size_t q = 0; q < 5; q++)
                ss += q == j ? x * x : 0;
        }
        for (size_t j = 0; j < 5; j++)
            mb[j] += bv.data[r * bv.stride + j] / sqrt(ss) / 49.0;
    }
    for (size_t r = 0; r < rows; r++) {
        if (r == 7)
            continue;
        double ss = 0;
        for (size_t j = 0; j < 5; j++) {
            double x = cv.data[r * cv.stride + 3 + j] / 0.5 + mb[j];
            ss += x * x;
        }
        assert_true(fabs(sqrt(ss) - 1.0) < 1e-5);
    }
    ist_matrix_free(c);
    /* a row map lines up the words of the second block */
    size_t map1[50];
    for (size_t r = 0; r < rows; r++)
        map1[r] = rows - 1 - r;
    const size_t *maps[2] = {NULL, map1};
    assert_int_equal(ist_combine_concat(blocks, maps, NULL, 2, &c, NULL), IST_OK);
    ist_matrix *d = NULL;
    ist_cmatview one = ist_matrix_cview(b);
    assert_int_equal(ist_combine_concat(&one, NULL, NULL, 1, &d, NULL), IST_OK);
    ist_cmatview c2 = ist_matrix_cview(c), d2 = ist_matrix_cview(d);
    for (size_t r = 0; r < rows; r++)
        for (size_t j = 0; j < 5; j++)
            assert_true(fabsf(c2.data[r * c2.stride + 3 + j] -
                              d2.data[(rows - 1 - r) * d2.stride + j]) < 1e-6f);
    ist_matrix_free(c), ist_matrix_free(d);
    /* bad input */
    ist_error err;
    double bad[2] = {1.0, 0.0};
    assert_int_equal(ist_combine_concat(blocks, NULL, bad, 2, &c, &err), IST_ERR_INVALID);
    assert_null(c);
    assert_int_equal(ist_combine_concat(blocks, NULL, NULL, 0, &c, &err), IST_ERR_INVALID);
    ist_cmatview uneven[2] = {ist_matrix_cview(a), ist_matrix_cview(a)};
    uneven[1].rows = 10;
    assert_int_equal(ist_combine_concat(uneven, NULL, NULL, 2, &c, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "rows"));
    char *prov = NULL;
    const char *provs[2] = {"{\"method\":\"x\"}", "not json"};
    assert_int_equal(ist_combine_provenance_json("stack", provs, NULL, w, 2, &prov, NULL),
                     IST_OK);
    assert_non_null(strstr(prov, "\"provenance\":{\"method\":\"x\"}"));
    assert_non_null(strstr(prov, "\"provenance\":\"not json\""));
    assert_non_null(strstr(prov, "\"weight\":0.5"));
    ist_combine_free(prov);
    ist_matrix_free(a), ist_matrix_free(b);
}

/* The automatic pass count keeps 20 passes on small corpora (docs/defaults.md). */
static void
auto_passes_have_a_floor(void **state)
{
    (void)state;
    assert_int_equal(ist_sgns_auto_passes(100000), 20);
    assert_int_equal(ist_sgns_auto_passes(791521), 20);     /* the real-data check */
    assert_int_equal(ist_sgns_auto_passes(2000000), 20);    /* 16M/2M = 8 before the floor */
    assert_int_equal(ist_sgns_auto_passes(8000000), 10);
    assert_int_equal(ist_sgns_auto_passes(16000000), 5);
    assert_int_equal(ist_sgns_auto_passes(100000000), 5);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(radix_sort_matches_qsort),
        cmocka_unit_test(merge_sums_equal_keys),
        cmocka_unit_test(full_rank_rows_reproduce_ppmi),
        cmocka_unit_test(threads_and_buffer_change_nothing),
        cmocka_unit_test(lonely_word_gets_zero_row),
        cmocka_unit_test(dimension_above_vocabulary_pads_with_zeros),
        cmocka_unit_test(progress_can_cancel),
        cmocka_unit_test(bad_options),
        cmocka_unit_test(every_failed_allocation_is_clean),
        cmocka_unit_test(blocks_are_unit_centred_and_weighted),
        cmocka_unit_test(auto_passes_have_a_floor),
    };
    HARNESS_RUN("ppmi", tests);
}
