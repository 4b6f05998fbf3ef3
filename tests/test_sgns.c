/* test_sgns.c - skip-gram training: the published closed forms it must meet, the kernels
 * against sums in double precision, windows at line ends, stopping and bad options (whole
 * runs: test_sgns_runs.c). */
#include "sgns_env.h"

#include <isthmus/cancel.h>
#include <isthmus/testing.h>

#include <time.h>

#include "sgns_int.h"

/* ---- Levy & Goldberg 2014: w . c -> PMI(w, c) - log k ----------------------------------- */

static double
pearson(const double *a, const double *b, size_t n)
{
    double ma = 0, mb = 0, sab = 0, saa = 0, sbb = 0;
    for (size_t i = 0; i < n; i++)
        ma += a[i], mb += b[i];
    ma /= (double)n, mb /= (double)n;
    for (size_t i = 0; i < n; i++) {
        sab += (a[i] - ma) * (b[i] - mb);
        saa += (a[i] - ma) * (a[i] - ma);
        sbb += (b[i] - mb) * (b[i] - mb);
    }
    return sab / sqrt(saa * sbb);
}

/* Lines of two tokens "w c": w from 0..NW-1, c from NW..NW+NC-1, drawn from a fixed random
 * joint distribution. With window 1 and no subsampling the training pairs are exactly the
 * (w, c) cells. Levy & Goldberg 2014 (sec. 3.1) show that the optimum of the SGNS objective is
 * in(w) . out(c) = log( #(w,c) / (#(w) * P_n(c)) ) - log k, which for a noise distribution
 * P_n(c) = #(c)/|D| is PMI(w,c) - log k; with the unigram^0.75 noise of Mikolov et al. 2013 it
 * is the smoothed PMI of Levy, Goldberg & Dagan 2015 (sec. 3.2) shifted by log k. */
static void
shifted_pmi(ist_sgns_kernel kernel, double floor_r)
{
    enum { NW = 16, NC = 16, PAIRS = 150000 };
    double joint[NW][NC], cum[NW * NC], tot = 0;
    uint64_t s = 2026;
    corpus c;
    corpus_init(&c, NW + NC);
    for (int i = 0; i < NW; i++)
        for (int j = 0; j < NC; j++) {
            double u = unif(&s);
            joint[i][j] = 0.05 + u * u * u;
            tot += joint[i][j];
            cum[i * NC + j] = tot;
        }
    for (int p = 0; p < PAIRS; p++) {
        double u = unif(&s) * tot;
        int lo = 0;
        while (cum[lo] < u)
            lo++;
        corpus_put(&c, (uint32_t)(lo / NC));
        corpus_put(&c, (uint32_t)(NW + lo % NC));
        corpus_put(&c, IST_CORPUS_EOL);
    }
    /* observed pair counts and the noise distribution the trainer uses */
    double nwc[NW][NC] = {{0}}, nw[NW] = {0}, pn[NW + NC], zsum = 0;
    for (size_t i = 0; i + 1 < c.n; i += 3) {
        nwc[c.ids[i]][c.ids[i + 1] - NW] += 1;
        nw[c.ids[i]] += 1;
    }
    for (int v = 0; v < NW + NC; v++)
        zsum += pow((double)c.counts[v], 0.75);
    for (int v = 0; v < NW + NC; v++)
        pn[v] = pow((double)c.counts[v], 0.75) / zsum;

    ist_sgns_opts o;
    ist_sgns_opts_init(&o);
    o.dim = 48;
    o.window = 1;
    o.negatives = 5;
    o.epochs = 10;
    o.subsample = 0;
    o.kernel = kernel;
    o.keep_context = true;
    ist_matrix *ctx = NULL, *in = train(&c, &o, &ctx);
    ist_cmatview vi = ist_matrix_cview(in), vc = ist_matrix_cview(ctx);
    double got[NW * NC], want[NW * NC];
    for (int i = 0; i < NW; i++)
        for (int j = 0; j < NC; j++) {
            double dot = 0;
            for (size_t d = 0; d < vi.cols; d++)
                dot += (double)vi.data[i * vi.stride + d] * vc.data[(NW + j) * vc.stride + d];
            got[i * NC + j] = dot;
            want[i * NC + j] = log(nwc[i][j] / (nw[i] * pn[NW + j])) - log(5.0);
        }
    double r = pearson(got, want, NW * NC);
    printf("# shifted PMI (%s kernel): Pearson r = %.4f over %d cells\n",
           kernel == IST_SGNS_FAST ? "fast" : "reference", r, NW * NC);
    assert_true(r >= floor_r);
    ist_matrix_free(in);
    ist_matrix_free(ctx);
    corpus_free(&c);
}

/* Measured 2026-12-01 on this machine (AVX2): Pearson r = 0.9985 for both kernels over the
 * 256 cells; the floor 0.98 leaves room for other compilers and instruction sets. */
static void
pmi_fast(void **state)
{
    (void)state;
    shifted_pmi(IST_SGNS_FAST, 0.98);
}

static void
pmi_reference(void **state)
{
    (void)state;
    shifted_pmi(IST_SGNS_REFERENCE, 0.98);
}

/* ---- Mikolov et al. 2013, eq. 5: subsampling ------------------------------------------- */

static void
keep_probability_formula(void **state)
{
    (void)state;
    /* f = 0.01, t = 1e-4: discard 1 - sqrt(1e-4 / 0.01) = 0.9, keep 0.1 */
    assert_float_equal(ist_sgns_keep_prob(100, 10000, 1e-4), 0.1, 1e-12);
    assert_float_equal(ist_sgns_keep_prob(1, 10000, 1e-4), 1.0, 0);    /* f < t: always kept */
    assert_float_equal(ist_sgns_keep_prob(5000, 10000, 0), 1.0, 0);    /* off */
    assert_float_equal(ist_sgns_keep_prob(4, 100, 1e-3), sqrt(1e-3 / 0.04), 1e-12);
}

/* Zipf corpus; the kept count of each word must be within 5 standard deviations of the
 * binomial expectation n * min(1, sqrt(t / f)). */
static void
kept_fraction_matches_formula(void **state)
{
    enum { V = 500, N = 1000000 };
    double cum[V], tot = 0;
    uint64_t s = 99, rng = 7, counts[V] = {0}, kept[V] = {0};
    uint32_t *ids = malloc(N * sizeof *ids), *thr;
    (void)state;
    for (int v = 0; v < V; v++)
        cum[v] = (tot += 1.0 / (v + 1));
    for (int i = 0; i < N; i++) {
        double u = unif(&s) * tot;
        int lo = 0, hi = V - 1;
        while (lo < hi) {
            int mid = (lo + hi) / 2;
            if (cum[mid] < u)
                lo = mid + 1;
            else
                hi = mid;
        }
        ids[i] = (uint32_t)lo;
        counts[lo]++;
    }
    assert_int_equal(ist_sgns_keep_table(counts, V, 1e-3, &thr, NULL), IST_OK);
    for (int i = 0; i < N; i++)
        kept[ids[i]] += ist_sgns_keep(thr, ids[i], &rng);
    int checked = 0, subsampled = 0;
    for (int v = 0; v < V; v++) {
        if (counts[v] < 200)
            continue;
        double p = ist_sgns_keep_prob(counts[v], N, 1e-3), n = (double)counts[v];
        double sd = sqrt(n * p * (1 - p));
        assert_true(fabs((double)kept[v] - n * p) <= 5 * sd + 1e-9);
        checked++;
        subsampled += p < 1;
    }
    assert_true(checked > 100);
    assert_true(subsampled > 20);
    free(thr);
    free(ids);
}

/* Mikolov et al. 2013, sec. 2.2: noise words drawn with P(w) ~ count^0.75. */
static void
noise_is_unigram_075(void **state)
{
    enum { V = 300, DRAWS = 2000000 };
    uint64_t counts[V], rng = 3, got[V] = {0};
    double z = 0;
    ist_sgns_noise nz;
    (void)state;
    for (int v = 0; v < V; v++) {
        counts[v] = v % 7 == 3 ? 0 : (uint64_t)(100000 / (v + 1) + 1);
        z += pow((double)counts[v], 0.75);
    }
    assert_int_equal(ist_sgns_noise_build(counts, V, 0.75, &nz, NULL), IST_OK);
    for (int i = 0; i < DRAWS; i++)
        got[ist_sgns_noise_draw(&nz, &rng)]++;
    for (int v = 0; v < V; v++) {
        double p = pow((double)counts[v], 0.75) / z, e = p * DRAWS;
        assert_true(fabs((double)got[v] - e) <= 5 * sqrt(e * (1 - p)) + 1e-9);
        if (counts[v] == 0)
            assert_int_equal(got[v], 0);
    }
    ist_sgns_noise_free(&nz);
}

/* ---- the kernels and the windows ------------------------------------------------------ */

/* Every kernel set this CPU has, on odd sizes that exercise the tile tails, against sums in
 * double precision (the products the fast path needs: S = X Y^T, out += C In, y += x). */
static void
kernels_match_double_sums(void **state)
{
    static const char *const sets[] = {"portable", "avx2", "avx512"};
    enum { LEN = 48, MAXR = 11 };
    uint64_t rs = 77;
    (void)state;
    for (size_t si = 0; si < 3; si++) {
        const ist_sgns_simd *k = ist_sgns_simd_pick(sets[si]);
        if (strcmp(k->name, sets[si]) != 0) {
            printf("# %s kernels: not supported by this CPU, skipped\n", sets[si]);
            continue;
        }
        for (size_t m = 1; m <= MAXR; m += 2)
            for (size_t n = 1; n <= 8; n++) {
                float xs[MAXR][LEN], ys[8][LEN], s[MAXR * 8], c[MAXR * 8], o[MAXR][LEN];
                const float *xp[MAXR], *yp[8];
                float *op[MAXR];
                for (size_t j = 0; j < m; j++)
                    for (size_t d = 0; d < LEN; d++)
                        xs[j][d] = harness_randf(&rs), o[j][d] = harness_randf(&rs);
                for (size_t q = 0; q < n; q++)
                    for (size_t d = 0; d < LEN; d++)
                        ys[q][d] = harness_randf(&rs);
                for (size_t j = 0; j < m; j++)
                    xp[j] = xs[j], op[j] = o[j];
                for (size_t q = 0; q < n; q++)
                    yp[q] = ys[q];
                for (size_t i = 0; i < m * n; i++)
                    c[i] = harness_randf(&rs);
                k->dots(xp, m, yp, n, LEN, s);
                for (size_t j = 0; j < m; j++)
                    for (size_t q = 0; q < n; q++) {
                        double want = 0;
                        for (size_t d = 0; d < LEN; d++)
                            want += (double)xs[j][d] * ys[q][d];
                        assert_float_equal(s[j * n + q], want, 1e-4);
                    }
                float before[MAXR][LEN];
                memcpy(before, o, sizeof o);
                k->acc(op, m, yp, n, c, LEN);
                for (size_t j = 0; j < m; j++)
                    for (size_t d = 0; d < LEN; d++) {
                        double want = before[j][d];
                        for (size_t q = 0; q < n; q++)
                            want += (double)c[j * n + q] * ys[q][d];
                        assert_float_equal(o[j][d], want, 1e-4);
                    }
                float mid[LEN];
                memcpy(mid, o[m - 1], sizeof mid);
                k->add(o[m - 1], xs[0], LEN);
                for (size_t d = 0; d < LEN; d++)
                    assert_true(o[m - 1][d] == mid[d] + xs[0][d]);   /* one rounding: exact */
            }
        printf("# %s kernels: agree with double-precision sums\n", sets[si]);
    }
}

/* Windows never cross a line end: lines "a b" with a from 0..9 and b from 10..19. Two a-words
 * never share a line, so in(a) . out(a') is pushed far below the (a, b) cells; were windows to
 * cross into the next line, (a, a') would be trained as positive pairs as often as (a, b). */
static void
windows_stop_at_line_ends(void **state)
{
    corpus c;
    ist_sgns_opts o;
    uint64_t s = 4;
    (void)state;
    corpus_init(&c, 20);
    for (int l = 0; l < 40000; l++) {
        corpus_put(&c, (uint32_t)(harness_rand(&s) % 10));
        corpus_put(&c, (uint32_t)(10 + harness_rand(&s) % 10));
        corpus_put(&c, IST_CORPUS_EOL);
    }
    ist_sgns_opts_init(&o);
    o.dim = 16;
    o.epochs = 3;
    o.subsample = 0;
    o.keep_context = true;
    for (int k = 0; k < 2; k++) {
        o.kernel = k ? IST_SGNS_REFERENCE : IST_SGNS_FAST;
        ist_matrix *ctx = NULL, *in = train(&c, &o, &ctx);
        ist_cmatview vi = ist_matrix_cview(in), vc = ist_matrix_cview(ctx);
        double aa = 0, ab = 0;
        for (int a = 0; a < 10; a++)
            for (int b = 0; b < 20; b++) {
                double dot = 0;
                for (size_t d = 0; d < vi.cols; d++)
                    dot += (double)vi.data[a * vi.stride + d] * vc.data[b * vc.stride + d];
                if (b < 10 && b != a)
                    aa += dot / 90;
                else if (b >= 10)
                    ab += dot / 100;
            }
        printf("# line ends (%s): mean in(a).out(a') %.2f, in(a).out(b) %.2f\n",
               k ? "reference" : "fast", aa, ab);
        /* Levy & Goldberg 2014 optimum for the (a, b) cells: log(#(a,b) / (#(a) P_n(b))) -
         * log k = log((1/10) / (1/20)) - log 5 = log 0.4 */
        assert_float_equal(ab, log(0.4), 0.3);
        assert_true(aa < ab - 3.0);
        ist_matrix_free(in), ist_matrix_free(ctx);
    }
    corpus_free(&c);
}

/* ---- stopping and bad input ------------------------------------------------------------ */

static int
stop_now(void *ctx, const ist_sgns_progress *p)
{
    int *calls = ctx;
    (*calls)++;
    assert_true(p->fraction >= 0 && p->fraction <= 1);
    return 1;
}

static void
progress_can_cancel(void **state)
{
    corpus c;
    ist_sgns_opts o;
    ist_matrix *in = (ist_matrix *)&o, *ctx = (ist_matrix *)&o;
    ist_error err;
    int calls = 0;
    (void)state;
    make_clusters(&c, 20, 10, 20000, 0.1, 9);
    ist_sgns_opts_init(&o);
    o.kernel = IST_SGNS_REFERENCE;
    o.dim = 200;
    o.epochs = 50;
    o.keep_context = true;
    o.progress = stop_now;
    o.progress_ctx = &calls;
    assert_int_equal(ist_sgns_train(c.ids, c.n, c.counts, c.vocab, &o, &in, &ctx, NULL, &err),
                     IST_ERR_CANCELLED);
    assert_null(in);
    assert_null(ctx);
    assert_int_equal(calls, 1);
    assert_non_null(strstr(err.msg, "cancel"));
    /* two threads training copies of their own stop as well, inside the first slice, and
     * return nothing */
    calls = 0;
    o.threads = 2;
    o.parallel = IST_SGNS_PARALLEL_COPIES;
    in = ctx = (ist_matrix *)&o;
    assert_int_equal(ist_sgns_train(c.ids, c.n, c.counts, c.vocab, &o, &in, &ctx, NULL, &err),
                     IST_ERR_CANCELLED);
    assert_null(in);
    assert_null(ctx);
    assert_true(calls >= 1 && calls <= 2);
    corpus_free(&c);
}

/* Progress over slices: with copies combined between slices each slice is a run of its own,
 * but the rate shown is the whole training's (words done over the time since it began), so
 * words_done / words_per_sec is the time since the start, not since the slice began. */
typedef struct {
    double t_before, worst;   /* worst: the least (elapsed by the rate) / (elapsed here) */
    int calls, late;          /* late: calls after the first quarter of the words */
} rate_watch;

static double
mono_sec(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static int
watch_rate(void *ctx, const ist_sgns_progress *p)
{
    rate_watch *w = ctx;
    double here = mono_sec() - w->t_before;
    w->calls++;
    if (p->fraction > 0.25 && p->words_per_sec > 0) {
        double by_rate = (double)p->words_done / p->words_per_sec;
        w->late++;
        if (by_rate / here < w->worst)
            w->worst = by_rate / here;
    }
    return 0;
}

static void
progress_rate_spans_slices(void **state)
{
    corpus c;
    ist_sgns_opts o;
    ist_matrix *in, *ctx;
    ist_sgns_result res;
    ist_error err;
    rate_watch w = {0, 1.0, 0, 0};
    (void)state;
    make_clusters(&c, 20, 10, 20000, 0.1, 9);
    ist_sgns_opts_init(&o);
    o.dim = 100;
    o.epochs = 24;
    o.threads = 2;
    o.parallel = IST_SGNS_PARALLEL_COPIES;
    o.exchanges = 4;          /* 96 slices: a 0.25 s report lands in a late one */
    o.keep_context = true;
    o.progress = watch_rate;
    o.progress_ctx = &w;
    w.t_before = mono_sec();
    assert_int_equal(ist_sgns_train(c.ids, c.n, c.counts, c.vocab, &o, &in, &ctx, &res, &err),
                     IST_OK);
    printf("# %d progress reports (%d late), %.2f s, worst elapsed-by-rate / elapsed %.2f\n",
           w.calls, w.late, res.seconds, w.worst);
    ist_matrix_free(in), ist_matrix_free(ctx);
    corpus_free(&c);
    assert_true(res.thread_copies);
    if (w.late == 0)
        skip();               /* a machine this fast trains it before a report is due */
    /* the setup before the training (noise table, first vectors) is a small part of it */
    assert_true(w.worst > 0.6);
}

static void
bad_options(void **state)
{
    uint32_t ids[] = {0, 1, 2, IST_CORPUS_EOL, 1, 2};
    uint32_t eols[] = {IST_CORPUS_EOL, IST_CORPUS_EOL};
    uint32_t wild[] = {0, 7};
    uint64_t counts[] = {1, 2, 2};
    ist_sgns_opts o;
    ist_matrix *m;
    ist_error err;
    (void)state;
    struct {
        size_t field_off;
        const char *needle;
    } cases[] = {
        {offsetof(ist_sgns_opts, dim), "dimension"},
        {offsetof(ist_sgns_opts, window), "context window"},
        {offsetof(ist_sgns_opts, threads), "threads"},
        {offsetof(ist_sgns_opts, epochs), "passes"},
        {offsetof(ist_sgns_opts, negatives), "noise samples"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        ist_sgns_opts_init(&o);
        *(size_t *)((char *)&o + cases[i].field_off) = 0;
        assert_int_equal(ist_sgns_train(ids, 6, counts, 3, &o, &m, NULL, NULL, &err),
                         IST_ERR_INVALID);
        assert_null(m);
        assert_non_null(strstr(err.msg, cases[i].needle));
        assert_non_null(strstr(err.msg, "found 0"));
    }
    ist_sgns_opts_init(&o);
    o.lr0 = -1;
    assert_int_equal(ist_sgns_train(ids, 6, counts, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "learning rate"));
    ist_sgns_opts_init(&o);
    assert_int_equal(ist_sgns_train(ids, 0, counts, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "empty"));
    assert_int_equal(ist_sgns_train(eols, 2, counts, 3, &o, &m, NULL, NULL, &err),
                     IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "empty"));
    assert_int_equal(ist_sgns_train(wild, 2, counts, 3, &o, &m, NULL, NULL, &err),
                     IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "id 7"));
    uint64_t zeros[] = {0, 0, 0};
    assert_int_equal(ist_sgns_train(ids, 6, zeros, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "zero"));
    ist_sgns_opts_init(&o);
    o.parallel = (ist_sgns_parallel)7;
    assert_int_equal(ist_sgns_train(ids, 6, counts, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_null(m);
    assert_non_null(strstr(err.msg, "threads"));
    ist_sgns_opts_init(&o);
    o.exchanges = 1001;
    assert_int_equal(ist_sgns_train(ids, 6, counts, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "found 1001"));
    /* the measured hot-row design is an option now (the library reads no environment) */
    ist_sgns_opts_init(&o);
    o.hot_rows = 65537;
    assert_int_equal(ist_sgns_train(ids, 6, counts, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_null(m);
    assert_non_null(strstr(err.msg, "hot rows: expected 0 to 65536 words"));
    ist_sgns_opts_init(&o);
    o.hot_merge = 1001;
    assert_int_equal(ist_sgns_train(ids, 6, counts, 3, &o, &m, NULL, NULL, &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "found 0 every 1001"));
}

/* In a fault-injection build (-Dfault_injection=true): fail allocation k for k = 0, 1, ...
 * until training succeeds; every failure must be a clean IST_ERR_NOMEM with no vectors
 * returned (ASan in that build finds leaks). A normal build only notes that it did not run. */
static void
every_failed_allocation_is_clean(void **state)
{
    corpus c;
    ist_sgns_opts o;
    (void)state;
    if (!ist_testing_fault_injection_enabled()) {
        printf("# allocation failures: not tried (built without -Dfault_injection=true)\n");
        return;
    }
    make_clusters(&c, 5, 4, 50, 0.1, 3);
    ist_sgns_opts_init(&o);
    o.dim = 8;
    o.epochs = 1;
    o.keep_context = true;
    int k, tried = 0;
    for (int kern = 0; kern < 2; kern++) {
        o.kernel = kern ? IST_SGNS_REFERENCE : IST_SGNS_FAST;
        for (k = 0; k < 1000; k++) {
            ist_matrix *in = NULL, *ctx = NULL;
            char *prov = NULL;
            ist_testing_fail_alloc_after(k);
            ist_status rc = ist_sgns_train(c.ids, c.n, c.counts, c.vocab, &o, &in, &ctx, NULL,
                                           NULL);
            if (rc == IST_OK)
                rc = ist_sgns_provenance_json(&o, NULL, "{}", "[]", 1, 1, &prov, NULL);
            ist_testing_fail_alloc_after(-1);
            if (rc == IST_OK) {
                assert_non_null(prov);
                ist_sgns_free(prov);
                ist_matrix_free(in), ist_matrix_free(ctx);
                break;
            }
            assert_int_equal(rc, IST_ERR_NOMEM);
            assert_null(prov);
            if (in) {                  /* training succeeded, the provenance failed */
                ist_matrix_free(in), ist_matrix_free(ctx);
            } else {
                assert_null(ctx);
            }
            tried++;
        }
        assert_true(k > 0 && k < 1000);
    }
    printf("# allocation failures: %d failure points tried, all clean\n", tried);
    corpus_free(&c);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(keep_probability_formula),
        cmocka_unit_test(kept_fraction_matches_formula),
        cmocka_unit_test(noise_is_unigram_075),
        cmocka_unit_test(pmi_fast),
        cmocka_unit_test(pmi_reference),
        cmocka_unit_test(kernels_match_double_sums),
        cmocka_unit_test(windows_stop_at_line_ends),
        cmocka_unit_test(progress_can_cancel),
        cmocka_unit_test(progress_rate_spans_slices),
        cmocka_unit_test(bad_options),
        cmocka_unit_test(every_failed_allocation_is_clean),
    };
    HARNESS_RUN("sgns", tests);
}
