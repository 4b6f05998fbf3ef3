/* test_gate.c - thresholds parsing, bootstrap intervals, paired comparison and the
 * verdict on synthetic results. */
#include <isthmus/isthmus.h>

#include <math.h>

#include "harness.h"
#include "json_int.h"

#include <isthmus/testing.h>

static ist_thresholds *
parse_ok(const char *text)
{
    ist_thresholds *t = NULL;
    ist_error err;
    ist_status rc = ist_thresholds_parse(text, strlen(text), "rules.txt", &t, &err);
    if (rc != IST_OK)
        fail_msg("unexpected error: %s", err.msg);
    return t;
}

static void
test_thresholds_parse(void **state)
{
    (void)state;
    ist_thresholds *t = parse_ok("# release rules\n"
                                 "\n"
                                 "min p@1 csls refined 0.60   # the headline\n"
                                 "  min   coverage\t0.80\n"
                                 "max drop p@1 csls 0.03\n"
                                 "min p@10 cosine band 1-5000 85%\n"
                                 "min p@5 seed csls band 20001+ 0.5");
    assert_int_equal(ist_thresholds_count(t), 5);
    const ist_gate_rule *r = ist_thresholds_rule(t, 0);
    assert_int_equal(r->line, 3);
    assert_string_equal(r->text, "min p@1 csls refined 0.60");
    assert_int_equal(r->bound_kind, IST_GATE_MIN);
    assert_int_equal(r->figure, IST_GATE_PRECISION);
    assert_int_equal(r->k, 1);
    assert_int_equal(r->retrieval, IST_RETRIEVAL_CSLS);
    assert_string_equal(r->label, "refined");
    assert_false(r->has_band);
    assert_true(r->bound == 0.60);
    r = ist_thresholds_rule(t, 1);
    assert_int_equal(r->line, 4);
    assert_int_equal(r->figure, IST_GATE_COVERAGE);
    assert_int_equal(r->retrieval, -1);
    assert_null(r->label);
    assert_string_equal(r->text, "min coverage 0.80");
    r = ist_thresholds_rule(t, 2);
    assert_int_equal(r->figure, IST_GATE_DROP);
    assert_int_equal(r->bound_kind, IST_GATE_MAX);
    assert_true(r->bound == 0.03);
    r = ist_thresholds_rule(t, 3);
    assert_int_equal(r->k, 10);
    assert_int_equal(r->retrieval, IST_RETRIEVAL_COSINE);
    assert_true(r->has_band);
    assert_int_equal(r->band_from, 1);
    assert_int_equal(r->band_to, 5000);
    assert_true(fabs(r->bound - 0.85) < 1e-12);
    r = ist_thresholds_rule(t, 4);
    assert_int_equal(r->line, 7);   /* last line without a newline */
    assert_string_equal(r->label, "seed");
    assert_int_equal(r->band_from, 20001);
    assert_int_equal(r->band_to, 0);
    assert_null(ist_thresholds_rule(t, 5));
    ist_thresholds_free(t);

    /* rules files written before p@K became the one spelling said precision@K */
    t = parse_ok("min precision@5 csls 0.5\nmax drop precision@10 cosine 2%\n");
    assert_int_equal(ist_thresholds_rule(t, 0)->figure, IST_GATE_PRECISION);
    assert_int_equal(ist_thresholds_rule(t, 0)->k, 5);
    assert_int_equal(ist_thresholds_rule(t, 1)->figure, IST_GATE_DROP);
    assert_int_equal(ist_thresholds_rule(t, 1)->k, 10);
    ist_thresholds_free(t);
}

static void
test_thresholds_errors(void **state)
{
    (void)state;
    static const struct {
        const char *text;
        uint64_t line;
        const char *msg;
    } cases[] = {
        {"# only a comment\n\n", 0, "expected at least one rule, found none"},
        {"min coverage 0.8\nminimum coverage 0.8\n", 2, "expected 'min', 'max' or 'refuse'*found 'minimum'"},
        {"min precison@1 csls 0.5\n", 1, "expected p@1, p@5, p@10, "
                                         "coverage or drop, found 'precison@1'"},
        {"min p@2 csls 0.5\n", 1, "*found 'p@2'"},
        {"min precision@2 csls 0.5\n", 1, "*found 'precision@2'"},
        {"min p@1 csls\n", 1, "expected a bound from 0% to 100%*found 'csls'"},
        {"min p@1 csls 1.5\n", 1, "expected a bound from 0% to 100%*found '1.5'"},
        {"min p@1 csls 0.5x\n", 1, "*found '0.5x'"},
        {"min p@1 0.5\n", 1, "expected the retrieval method (cosine or csls)*"},
        {"min p@1 csls cosine 0.5\n", 1, "expected one retrieval method, found 'cosine'"},
        {"min p@1 csls fancy 0.5\n", 1, "expected cosine, csls, seed, refined, "
                                                "band or the bound, found 'fancy'"},
        {"min p@1 csls band 0.5\n", 1, "expected a band of frequency ranks*"},
        {"min p@1 csls band 50-10 0.5\n", 1, "*found '50-10'"},
        {"min drop p@1 csls 0.03\n", 1, "expected 'max drop'*"},
        {"max drop csls 0.03\n", 1, "expected p@1, p@5 or p@10 after "
                                    "'drop', found 'csls'"},
        {"max drop p@1 csls band 1-5000 0.03\n", 1, "expected no band*"},
        {"min coverage band 1-10 0.5\n", 1, "expected no band*"},
        {"min\n", 1, "*found the end of the line"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        ist_thresholds *t = (ist_thresholds *)1;
        ist_error err;
        memset(&err, 0, sizeof err);
        assert_int_equal(ist_thresholds_parse(cases[i].text, strlen(cases[i].text), "r.txt", &t,
                                              &err),
                         IST_ERR_FORMAT);
        assert_null(t);
        assert_int_equal(err.line, cases[i].line);
        assert_string_equal(err.file, "r.txt");
        /* glob-free comparison: the fixed parts must appear in order */
        char pat[256];
        snprintf(pat, sizeof pat, "%s", cases[i].msg);
        const char *at = err.msg;
        for (char *save = NULL, *part = strtok_r(pat, "*", &save); part;
             part = strtok_r(NULL, "*", &save)) {
            const char *hit = strstr(at, part);
            if (!hit)
                fail_msg("case %zu: '%s' not in '%s'", i, part, err.msg);
            at = hit + strlen(part);
        }
    }
}

static void
test_thresholds_file(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "demo.thresholds");
    static const char text[] = "min coverage 0.9\n# next\nmax drop p@5 csls\n";
    ist_thresholds *t;
    ist_error err;
    char buf[600];

    harness_write(path, text, sizeof text - 1);
    assert_int_equal(ist_thresholds_read(path, &t, &err), IST_ERR_FORMAT);
    ist_error_format(&err, buf, sizeof buf);
    char want[300];
    snprintf(want, sizeof want, "%s:3: expected a bound", path);
    assert_non_null(strstr(buf, want));
    harness_write(path, text, 17);
    assert_int_equal(ist_thresholds_read(path, &t, &err), IST_OK);
    assert_int_equal(ist_thresholds_count(t), 1);
    ist_thresholds_free(t);
    free(path);
    harness_rmdir(dir);
}

/* n outcomes with exactly `hits` hits at 1 (place 0), the rest misses. */
static uint8_t *
outcomes(size_t n, size_t hits)
{
    uint8_t *p = malloc(n);
    for (size_t i = 0; i < n; i++)
        p[i] = i < hits ? 0 : IST_CI_MISS;
    return p;
}

static void
test_bootstrap_properties(void **state)
{
    (void)state;
    ist_ci_opts o;
    double lo[IST_METRICS_NK], hi[IST_METRICS_NK], lo2[IST_METRICS_NK], hi2[IST_METRICS_NK];
    ist_error err;

    ist_ci_opts_init(&o);
    assert_int_equal(o.resamples, 1000);
    assert_true(o.level == 0.95);
    /* deterministic from the seed */
    uint8_t *p = outcomes(200, 90);
    assert_int_equal(ist_ci_precision(p, 200, &o, lo, hi, &err), IST_OK);
    assert_int_equal(ist_ci_precision(p, 200, &o, lo2, hi2, &err), IST_OK);
    assert_memory_equal(lo, lo2, sizeof lo);
    assert_memory_equal(hi, hi2, sizeof hi);
    o.seed++;
    assert_int_equal(ist_ci_precision(p, 200, &o, lo2, hi2, &err), IST_OK);
    assert_true(lo[0] != lo2[0] || hi[0] != hi2[0]);
    o.seed--;
    /* contains the point estimate 0.45 */
    assert_true(lo[0] < 0.45 && 0.45 < hi[0]);
    free(p);

    /* Width against the binomial standard error sqrt(p(1-p)/n) (the normal approximation
     * of a proportion, common practice): the percentile interval of a mean of 0/1
     * outcomes is close to +-1.96 standard errors, so its width shrinks like 1/sqrt(n). */
    double width[2];
    size_t ns[2] = {100, 1600};
    for (int i = 0; i < 2; i++) {
        size_t n = ns[i];
        p = outcomes(n, n / 2);
        assert_int_equal(ist_ci_precision(p, n, &o, lo, hi, &err), IST_OK);
        width[i] = hi[0] - lo[0];
        double normal = 2 * 1.96 * sqrt(0.25 / (double)n);
        assert_true(fabs(width[i] - normal) < 0.15 * normal);
        assert_true(lo[0] < 0.5 && 0.5 < hi[0]);
        free(p);
    }
    double ratio = width[0] / width[1];            /* sqrt(1600 / 100) = 4 */
    assert_true(ratio > 3.4 && ratio < 4.6);

    /* all hits: every resample gives 1; uncovered queries leave the denominator */
    uint8_t mixed[6] = {0, 0, IST_CI_UNCOVERED, 0, IST_CI_UNCOVERED, 0};
    assert_int_equal(ist_ci_precision(mixed, 6, &o, lo, hi, &err), IST_OK);
    assert_true(lo[0] == 1 && hi[0] == 1 && lo[2] == 1);
    /* places 0..9 count at 10 but not at 1 */
    uint8_t late[4] = {9, 9, 9, 9};
    assert_int_equal(ist_ci_precision(late, 4, &o, lo, hi, &err), IST_OK);
    assert_true(hi[0] == 0 && hi[1] == 0 && lo[2] == 1);
    o.level = 1.5;
    assert_int_equal(ist_ci_precision(late, 4, &o, lo, hi, &err), IST_ERR_INVALID);
}

static void
test_bootstrap_paired(void **state)
{
    (void)state;
    ist_ci_opts o;
    double d, lo, hi;
    ist_error err;

    ist_ci_opts_init(&o);
    /* identical runs: every resample's change is 0 */
    uint8_t *a = outcomes(300, 170);
    assert_int_equal(ist_ci_paired(a, a, 300, 1, &o, &d, &lo, &hi, &err), IST_OK);
    assert_true(d == 0 && lo == 0 && hi == 0);
    /* Hand-worked case: a hits the first 240 of 400 queries, b the first 200 (b's hits
     * are a subset). A resample's change is (draws among the 40 discordant queries)/400,
     * a binomial(400, 0.1)/400 variable: mean 0.1, standard deviation
     * sqrt(0.1 * 0.9 / 400) = 0.015, so the 95% interval is close to 0.1 +- 0.0294. */
    uint8_t *x = outcomes(400, 240), *y = outcomes(400, 200);
    assert_int_equal(ist_ci_paired(x, y, 400, 1, &o, &d, &lo, &hi, &err), IST_OK);
    assert_true(fabs(d - 0.1) < 1e-12);
    assert_true(fabs(lo - (0.1 - 0.0294)) < 0.008);
    assert_true(fabs(hi - (0.1 + 0.0294)) < 0.008);
    /* the other way round: the change is negated */
    double lo2, hi2;
    assert_int_equal(ist_ci_paired(y, x, 400, 1, &o, &d, &lo2, &hi2, &err), IST_OK);
    assert_true(fabs(d + 0.1) < 1e-12 && hi2 < 0);
    /* deterministic */
    assert_int_equal(ist_ci_paired(x, y, 400, 1, &o, &d, &lo2, &hi2, &err), IST_OK);
    assert_true(lo2 == lo && hi2 == hi);
    /* a query one run does not cover leaves only that run's denominator */
    uint8_t p[3] = {0, 0, IST_CI_MISS}, q[3] = {0, IST_CI_UNCOVERED, IST_CI_MISS};
    assert_int_equal(ist_ci_paired(p, q, 3, 1, &o, &d, &lo, &hi, &err), IST_OK);
    assert_true(fabs(d - (2.0 / 3 - 1.0 / 2)) < 1e-12);
    free(a);
    free(x);
    free(y);
}

static void
test_metrics_ci(void **state)
{
    (void)state;
    ist_metrics m;
    ist_metrics_ci ci;
    ist_error err;

    memset(&m, 0, sizeof m);
    m.nbands = 2;
    m.band[0] = (ist_band){.lo = 1, .hi = 100};
    m.band[1] = (ist_band){.lo = 101, .hi = 0};
    assert_int_equal(ist_metrics_ci_compute(&m, NULL, &ci, &err), IST_ERR_INVALID);
    m.queries = 200;
    size_t rows[200];
    uint8_t places[200];
    for (size_t i = 0; i < 200; i++) {
        rows[i] = i;                              /* ranks 1..200: 100 per band */
        places[i] = i < 100 ? 0 : (i % 2 ? 0 : IST_CI_MISS);
    }
    m.query_row = rows;
    m.query_place = places;
    assert_int_equal(ist_metrics_band_of(&m, 100), 0);
    assert_int_equal(ist_metrics_band_of(&m, 101), 1);
    assert_int_equal(ist_metrics_ci_compute(&m, NULL, &ci, &err), IST_OK);
    assert_true(ci.band_lo[0][0] == 1 && ci.band_hi[0][0] == 1);   /* all hits */
    assert_true(ci.band_lo[1][0] < 0.5 && ci.band_hi[1][0] > 0.5);
    assert_true(ci.lo[0] < 0.75 && ci.hi[0] > 0.75);
    assert_true(ci.band_hi[1][0] - ci.band_lo[1][0] > ci.hi[0] - ci.lo[0]);  /* fewer queries */
}

/* A synthetic result: one run (refined csls) with n queries w0..w{n-1}, the first hits
 * at place 1, the rest misses; checksum names the test list. */
static char *
synthetic_text(size_t n, size_t hits, const char *checksum, bool per_query)
{
    ist_jw w;
    char *text;
    ist_error err;

    ist_jw_init(&w, false);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "format", "isthmus result");
    ist_jw_obj_begin(&w, "test");
    ist_jw_str(&w, "list_checksum", checksum);
    ist_jw_obj_end(&w);
    ist_jw_arr_begin(&w, "runs");
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "label", "refined");
    ist_jw_str(&w, "retrieval", "csls");
    ist_jw_uint(&w, "sources", n + n / 9);
    ist_jw_uint(&w, "queries", n);
    ist_jw_num(&w, "coverage", 0.9);
    ist_jw_obj_begin(&w, "precision");
    ist_jw_num(&w, "p@1", (double)hits / (double)n);
    ist_jw_num(&w, "p@5", (double)hits / (double)n);
    ist_jw_num(&w, "p@10", (double)hits / (double)n);
    ist_jw_obj_end(&w);
    ist_jw_arr_begin(&w, "bands");
    ist_jw_obj_begin(&w, NULL);
    ist_jw_uint(&w, "rank_from", 1);
    ist_jw_null(&w, "rank_to");
    ist_jw_uint(&w, "queries", n);
    ist_jw_obj_begin(&w, "precision");
    ist_jw_num(&w, "p@1", (double)hits / (double)n);
    ist_jw_num(&w, "p@5", (double)hits / (double)n);
    ist_jw_num(&w, "p@10", (double)hits / (double)n);
    ist_jw_obj_end(&w);
    ist_jw_obj_end(&w);
    ist_jw_arr_end(&w);
    if (per_query) {
        ist_jw_arr_begin(&w, "per_query");
        for (size_t i = 0; i < n; i++) {
            char word[16];
            snprintf(word, sizeof word, "w%zu", i);
            ist_jw_obj_begin(&w, NULL);
            ist_jw_str(&w, "source", word);
            ist_jw_uint(&w, "rank", i < hits ? 1 : 0);
            ist_jw_uint(&w, "band", 0);
            ist_jw_obj_end(&w);
        }
        ist_jw_arr_end(&w);
    }
    ist_jw_obj_end(&w);
    ist_jw_arr_end(&w);
    ist_jw_obj_end(&w);
    assert_int_equal(ist_jw_finish(&w, &text, &err), IST_OK);
    return text;
}

static ist_result *
synthetic(size_t n, size_t hits, const char *checksum, bool per_query)
{
    char *text = synthetic_text(n, hits, checksum, per_query);
    ist_result *r;
    ist_error err;
    if (ist_result_parse(text, strlen(text), "new.json", &r, &err) != IST_OK)
        fail_msg("%s", err.msg);
    free(text);
    return r;
}

static ist_verdict *
evaluate(const char *rules, const ist_result *res, const ist_result *base,
         ist_status want, const char *msg_part)
{
    ist_thresholds *t = parse_ok(rules);
    ist_verdict *v = NULL;
    ist_error err;
    memset(&err, 0, sizeof err);
    assert_int_equal(ist_gate_evaluate(t, res, base, NULL, &v, &err), want);
    if (msg_part && !strstr(err.msg, msg_part))
        fail_msg("'%s' not in '%s'", msg_part, err.msg);
    ist_thresholds_free(t);
    if (want != IST_OK)
        assert_null(v);
    return v;
}

static void
test_verdict_logic(void **state)
{
    (void)state;
    ist_result *res = synthetic(400, 300, "0000000000000001", true);    /* P@1 0.75 */
    ist_result *base = synthetic(400, 310, "0000000000000001", true);   /* 0.775 */
    ist_result *far = synthetic(400, 360, "0000000000000001", true);    /* 0.90 */
    ist_result *other = synthetic(400, 300, "0000000000000002", true);
    ist_result *bare = synthetic(400, 300, "0000000000000001", false);
    static const char rules[] = "min p@1 csls refined 0.75\n"    /* equal: pass */
                                "min p@1 csls 0.76\n"            /* fail */
                                "max p@5 csls 0.70\n"            /* 0.75 > 0.70: fail */
                                "min coverage 0.9\n"                     /* pass */
                                "min p@1 csls band 1+ 0.7\n"     /* pass */
                                "max drop p@1 csls 0.03\n";

    /* without a baseline the drop rule is not checked */
    ist_verdict *v = evaluate(rules, res, NULL, IST_OK, NULL);
    assert_int_equal(ist_verdict_count(v), 6);
    assert_int_equal(ist_verdict_check(v, 0)->outcome, IST_GATE_PASS);
    assert_int_equal(ist_verdict_check(v, 1)->outcome, IST_GATE_FAIL);
    assert_int_equal(ist_verdict_check(v, 2)->outcome, IST_GATE_FAIL);
    assert_int_equal(ist_verdict_check(v, 3)->outcome, IST_GATE_PASS);
    assert_int_equal(ist_verdict_check(v, 4)->outcome, IST_GATE_PASS);
    assert_int_equal(ist_verdict_check(v, 5)->outcome, IST_GATE_SKIP);
    assert_false(ist_verdict_passed(v));
    assert_int_equal(ist_verdict_tally(v, IST_GATE_FAIL), 2);
    /* the interval is computed from per_query when the result holds none */
    const ist_gate_check *c = ist_verdict_check(v, 0);
    assert_true(c->has_interval && c->lo < 0.75 && c->hi > 0.75);
    assert_string_equal(c->run, "refined csls");
    char line[512];
    ist_verdict_line(v, 1, line, sizeof line);
    if (!strstr(line, "FAIL  rules.txt:2  min p@1 csls 0.76: 75.0% [") ||
        !strstr(line, "(refined csls); bound >= 76.0%"))
        fail_msg("line: %s", line);
    ist_verdict_free(v);

    /* A drop of 0.025 over 10 discordant queries of 400: the paired interval is about
     * -0.025 +- 0.015 (binomial, as in test_bootstrap_paired), so it straddles -0.03 and
     * the rule passes; a drop of 0.15 lies wholly below and fails. */
    v = evaluate("max drop p@1 csls 0.03\n", res, base, IST_OK, NULL);
    c = ist_verdict_check(v, 0);
    assert_true(fabs(c->figure + 0.025) < 1e-12);
    assert_true(c->lo < -0.03 && c->hi > -0.03);
    assert_int_equal(c->outcome, IST_GATE_PASS);
    assert_true(fabs(c->new_value - 0.75) < 1e-12 && fabs(c->baseline_value - 0.775) < 1e-12);
    ist_verdict_free(v);
    v = evaluate("max drop p@1 csls 0.03\n", res, far, IST_OK, NULL);
    c = ist_verdict_check(v, 0);
    assert_true(c->hi < -0.03);
    assert_int_equal(c->outcome, IST_GATE_FAIL);
    ist_verdict_line(v, 0, line, sizeof line);
    if (!strstr(line, "change -15.0 points [") || !strstr(line, "(75.0% vs baseline 90.0%") ||
        !strstr(line, "wholly below -3.0 points"))
        fail_msg("line: %s", line);
    ist_verdict_free(v);
    /* identical results: change 0, interval [0, 0] */
    v = evaluate("max drop p@1 csls 0\n", res, res, IST_OK, NULL);
    c = ist_verdict_check(v, 0);
    assert_true(c->figure == 0 && c->lo == 0 && c->hi == 0);
    assert_int_equal(c->outcome, IST_GATE_PASS);
    ist_verdict_free(v);

    /* refusals */
    evaluate("min coverage 0.5\n", res, other, IST_ERR_INVALID, "different test lists");
    evaluate("max drop p@1 csls 0.03\n", bare, base, IST_ERR_INVALID, "no per_query");
    evaluate("min p@1 cosine 0.5\n", res, NULL, IST_ERR_INVALID, "no run");
    evaluate("min p@1 csls band 1-5000 0.5\n", res, NULL, IST_ERR_INVALID,
             "no band 1-5000");
    ist_result_free(res);
    ist_result_free(base);
    ist_result_free(far);
    ist_result_free(other);
    ist_result_free(bare);
}

static void
test_verdict_json(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "verdict.json");
    ist_result *res = synthetic(100, 80, "0000000000000001", true);
    ist_verdict *v = evaluate("min p@1 csls 0.9\nmax drop p@1 csls 0.1\n", res,
                              NULL, IST_OK, NULL);
    ist_jv *root;
    ist_error err;

    assert_int_equal(ist_verdict_write(v, path, &err), IST_OK);
    assert_int_equal(harness_count_entries(dir), 1);   /* no temporary file left */
    assert_int_equal(ist_json_parse_file(path, &root, &err), IST_OK);
    assert_string_equal(ist_jv_str(ist_jv_get(root, "verdict"), ""), "fail");
    assert_int_equal((int)ist_jv_num(ist_jv_get(root, "rules_failed"), -1), 1);
    assert_int_equal((int)ist_jv_num(ist_jv_get(root, "rules_skipped"), -1), 1);
    const ist_jv *r0 = ist_jv_at(ist_jv_get(root, "rules"), 0);
    assert_true(ist_jv_num(ist_jv_get(r0, "figure"), 0) == 0.8);
    assert_true(ist_jv_num(ist_jv_get(r0, "bound"), 0) == 0.9);
    assert_string_equal(ist_jv_str(ist_jv_get(r0, "outcome"), ""), "fail");
    assert_int_equal(ist_jv_len(ist_jv_get(r0, "interval")), 2);
    const ist_jv *r1 = ist_jv_at(ist_jv_get(root, "rules"), 1);
    assert_string_equal(ist_jv_str(ist_jv_get(r1, "outcome"), ""), "skip");
    assert_int_equal(ist_jv_type(ist_jv_get(r1, "figure")), IST_JNULL);
    ist_jv_free(root);
    ist_verdict_free(v);
    ist_result_free(res);
    /* not a result */
    ist_result *r = NULL;
    assert_int_equal(ist_result_parse("{\"format\":\"x\"}", 14, "x.json", &r, &err),
                     IST_ERR_FORMAT);
    assert_null(r);
    free(path);
    harness_rmdir(dir);
}

/* A verdict written and loaded back (what the report shows) holds the same checks: rule
 * text, line, figure kind and k, bound, outcome, figure, interval, run, note and the
 * conditions; a verdict for another result or with a figure out of range is refused. */
static void
test_verdict_load(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "verdict.json");
    ist_result *res = synthetic(100, 80, "0000000000000001", true);
    ist_result *other = synthetic(100, 80, "0000000000000002", true);
    ist_verdict *v = evaluate("min precision@1 csls 0.7\nmin coverage 0.5\n"
                              "max drop precision@1 csls 0.1\n", res, NULL, IST_OK, NULL);
    ist_verdict *back = NULL;
    ist_error err;

    assert_int_equal(ist_verdict_write(v, path, &err), IST_OK);
    assert_int_equal(ist_verdict_load(path, res, &back, &err), IST_OK);
    assert_int_equal(ist_verdict_count(back), ist_verdict_count(v));
    assert_int_equal(ist_verdict_passed(back), ist_verdict_passed(v));
    assert_string_equal(ist_verdict_thresholds(back), ist_verdict_thresholds(v));
    for (size_t i = 0; i < ist_verdict_count(v); i++) {
        const ist_gate_check *a = ist_verdict_check(v, i), *b = ist_verdict_check(back, i);
        assert_string_equal(a->rule->text, b->rule->text);
        assert_int_equal(a->rule->line, b->rule->line);
        assert_int_equal(a->rule->figure, b->rule->figure);
        assert_int_equal(a->rule->k, b->rule->k);
        assert_int_equal(a->rule->bound_kind, b->rule->bound_kind);
        assert_true(a->rule->bound == b->rule->bound);
        assert_int_equal(a->outcome, b->outcome);
        assert_int_equal(a->has_interval, b->has_interval);
        if (a->outcome != IST_GATE_SKIP)
            assert_true(a->figure == b->figure);
        if (a->has_interval)
            assert_true(a->lo == b->lo && a->hi == b->hi);
        assert_string_equal(a->run, b->run);
        assert_string_equal(a->note, b->note);
    }
    assert_int_equal(ist_verdict_check(back, 0)->rule->figure, IST_GATE_PRECISION);
    assert_int_equal(ist_verdict_check(back, 0)->rule->k, 1);
    assert_int_equal(ist_verdict_check(back, 1)->rule->figure, IST_GATE_COVERAGE);
    assert_int_equal(ist_verdict_check(back, 2)->rule->figure, IST_GATE_DROP);
    assert_int_equal(ist_verdict_check(back, 2)->outcome, IST_GATE_SKIP);  /* no baseline */
    assert_string_equal(ist_verdict_condition(back, 0), ist_verdict_condition(v, 0));
    assert_null(ist_verdict_condition(back, 1));
    char la[512], lb[512];
    ist_verdict_line(v, 0, la, sizeof la);
    ist_verdict_line(back, 0, lb, sizeof lb);
    assert_string_equal(la, lb);                     /* the same line as the gate printed */
    ist_verdict_free(back);
    back = NULL;

    /* made for another test list */
    assert_int_equal(ist_verdict_load(path, other, &back, &err), IST_ERR_FORMAT);
    assert_non_null(strstr(err.msg, "another result"));
    assert_null(back);
    /* a bound out of range names the line */
    static const char wide[] = "{\"format\": \"isthmus verdict\", \"version\": 1, \"verdict\": "
                               "\"pass\",\n\"rules_passed\": 1, \"rules_failed\": 0, "
                               "\"rules_skipped\": 0, \"rules\": [\n{\"rule\": \"x\",\n"
                               "\"bound\": 7, \"outcome\": \"pass\"}]}";
    ist_result *bare = NULL;        /* records no identity, so only the schema is checked */
    static const char bare_text[] = "{\"format\": \"isthmus result\"}";
    assert_int_equal(ist_result_parse(bare_text, strlen(bare_text), "b", &bare, &err), IST_OK);
    harness_write(path, wide, strlen(wide));
    assert_int_equal(ist_verdict_load(path, bare, &back, &err), IST_ERR_FORMAT);
    ist_result_free(bare);
    assert_int_equal(err.line, 4);
    assert_non_null(strstr(err.msg, "\"bound\""));
    assert_null(back);
    ist_verdict_free(v);
    ist_result_free(res);
    ist_result_free(other);
    free(path);
    harness_rmdir(dir);
}

/* Only in a fault-injection build (main registers it there): failing any one allocation of the whole gate path
 * gives IST_ERR_NOMEM and no verdict file. */
static const char *fault_new, *fault_old, *fault_out;

static ist_status
gate_once(void)
{
    static const char rules[] = "min p@1 csls 0.5\nmin coverage 0.5\n"
                                "max drop p@1 csls 0.03\n";
    ist_thresholds *t = NULL;
    ist_result *a = NULL, *b = NULL;
    ist_verdict *v = NULL;
    ist_gate_opts go;
    ist_gate_opts_init(&go);
    go.ci.resamples = 50;       /* every failure point reruns the whole path: keep it short */
    ist_status rc = IST_OK;
    if (rc == IST_OK)
        rc = ist_thresholds_parse(rules, sizeof rules - 1, "r", &t, NULL);
    if (rc == IST_OK)
        rc = ist_result_parse(fault_new, strlen(fault_new), "new", &a, NULL);
    if (rc == IST_OK)
        rc = ist_result_parse(fault_old, strlen(fault_old), "old", &b, NULL);
    if (rc == IST_OK)
        rc = ist_gate_evaluate(t, a, b, &go, &v, NULL);
    if (rc == IST_OK)
        rc = ist_verdict_write(v, fault_out, NULL);
    ist_verdict_free(v);
    ist_result_free(a);
    ist_result_free(b);
    ist_thresholds_free(t);
    return rc;
}

static void
test_every_failed_allocation(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *out = harness_path(dir, "verdict.json");
    char *a = synthetic_text(50, 30, "0000000000000001", true);
    char *b = synthetic_text(50, 40, "0000000000000001", true);
    int k;
    fault_new = a;
    fault_old = b;
    fault_out = out;
    for (k = 0; k < 100000; k++) {
        ist_testing_fail_alloc_after(k);
        ist_status rc = gate_once();
        ist_testing_fail_alloc_after(-1);
        if (rc == IST_OK)
            break;
        if (rc != IST_ERR_NOMEM)
            fail_msg("allocation %d failing gave status %d, expected out of memory", k, (int)rc);
        assert_int_equal(harness_count_entries(dir), 0);
    }
    assert_true(k > 10 && k < 100000);
    assert_int_equal(harness_count_entries(dir), 1);
    free(a);
    free(b);
    free(out);
    harness_rmdir(dir);
}

#define GATE_TESTS                                                                      \
    cmocka_unit_test(test_thresholds_parse), cmocka_unit_test(test_thresholds_errors),   \
        cmocka_unit_test(test_thresholds_file), cmocka_unit_test(test_bootstrap_properties), \
        cmocka_unit_test(test_bootstrap_paired), cmocka_unit_test(test_metrics_ci),       \
        cmocka_unit_test(test_verdict_logic),      \
        cmocka_unit_test(test_verdict_json), cmocka_unit_test(test_verdict_load)

int
main(void)
{
    if (ist_testing_fault_injection_enabled()) {
        const struct CMUnitTest all[] = {GATE_TESTS,
                                         cmocka_unit_test(test_every_failed_allocation)};
        HARNESS_RUN("gate", all);
    }
    const struct CMUnitTest tests[] = {GATE_TESTS};
    HARNESS_RUN("gate", tests);
}
