/* test_report.c - the HTML report: text from the inputs is escaped, absent
 * keys are tolerated, a verdict is shown, bad input names file and line and
 * leaves no output. (Rendering in a browser: tests/report/check_report.py.) */
#include "harness.h"

#include <string.h>

#include <isthmus/isthmus.h>
#include <isthmus/testing.h>

static char *
slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *p = malloc((size_t)n + 1);
    assert_int_equal(fread(p, 1, (size_t)n, f), (size_t)n);
    p[n] = 0;
    fclose(f);
    return p;
}

static void
put(const char *path, const char *text)
{
    harness_write(path, text, strlen(text));
}

/* Load the result at in (and the verdict at v) and write its report, as the command does. */
static ist_status
report_file(const char *in, const char *v, const char *out, ist_error *err)
{
    ist_result *r = NULL;
    ist_verdict *vd = NULL;
    ist_status rc = ist_result_load(in, &r, err);
    if (rc == IST_OK && v)
        rc = ist_verdict_load(v, r, &vd, err);
    if (rc == IST_OK)
        rc = ist_report_write(r, vd, NULL, out, err);
    ist_verdict_free(vd);
    ist_result_free(r);
    return rc;
}

static const char *const nasty =
    "{\"format\": \"isthmus result\", \"version\": 1, \"command\": \"score\",\n"
    " \"inputs\": {\"source\": {\"path\": \"<en>.isv\", \"fingerprint\": \"00000000000000ff\"}},\n"
    " \"test\": {\"path\": \"a&b.pairs\"},\n"
    " \"runs\": [{\"label\": \"refined\", \"retrieval\": \"csls\", \"sources\": 4, \"queries\": 4,\n"
    "   \"coverage\": 1, \"precision\": {\"p@1\": 0.5, \"p@5\": 0.75, \"p@10\": 1},\n"
    "   \"ci\": {\"p@1\": [0.25, 0.75], \"p@5\": [0.5, 1], \"p@10\": [1, 1]},\n"
    "   \"bands\": [{\"rank_from\": 1, \"rank_to\": null, \"queries\": 4,\n"
    "     \"precision\": {\"p@1\": 0.5, \"p@5\": 0.75, \"p@10\": 1},\n"
    "     \"ci\": {\"p@1\": [0.25, 0.75], \"p@5\": [0.5, 1], \"p@10\": [1, 1]}}]}],\n"
    " \"diagnostics\": {\"worst_misses\": [{\"source\": \"<script>x</script>\",\n"
    "   \"gold\": [\"\\\"q\\\" & 'a'\"], \"ranked\": \"b<c\", \"score\": 0.5,\n"
    "   \"gold_rank\": 0}]}}\n";

static void
escapes_input_text(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "r.json"),
         *out = harness_path(dir, "r.html");
    put(in, nasty);
    assert_int_equal(report_file(in, NULL, out, NULL), IST_OK);
    char *h = slurp(out);
    assert_null(strstr(h, "<script"));                      /* no script at all */
    assert_non_null(strstr(h, "&lt;script&gt;x&lt;/script&gt;"));
    assert_non_null(strstr(h, "&quot;q&quot; &amp; &#39;a&#39;"));
    assert_non_null(strstr(h, "b&lt;c"));
    assert_non_null(strstr(h, "&lt;en&gt;.isv"));
    assert_non_null(strstr(h, "a&amp;b.pairs"));
    assert_non_null(strstr(h, "not in top 10"));
    assert_non_null(strstr(h, "[25.0, 75.0]"));             /* the interval from "ci" */
    assert_non_null(strstr(h, "speaker of the language"));  /* the caution */
    for (const char *at = strstr(h, "http"); at; at = strstr(at + 1, "http"))
        assert_memory_equal(at, "http://www.w3.org/2000/svg", 26);  /* only the SVG namespace */
    assert_null(strstr(h, "src="));                        /* no external resources */
    free(h);
    free(in);
    free(out);
    harness_rmdir(dir);
}

static void
shows_a_verdict_and_tolerates_a_bare_result(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "r.json"),
         *v = harness_path(dir, "v.json"), *out = harness_path(dir, "r.html");
    put(in, "{\"format\": \"isthmus result\"}");
    put(v, "{\"format\": \"isthmus verdict\", \"version\": 1, \"verdict\": \"fail\", "
           "\"rules_passed\": 1, \"rules_failed\": 1, \"rules_skipped\": 0, "
           "\"rules\": [{\"rule\": \"min p@1 <csls>\", \"figure\": 0.5,"
           " \"bound\": 0.6, \"outcome\": \"fail\"}, {\"rule\": \"coverage\", \"figure\": 1,"
           " \"bound\": 0.9, \"outcome\": \"pass\"}]}");
    assert_int_equal(report_file(in, v, out, NULL), IST_OK);
    char *h = slurp(out);
    assert_non_null(strstr(h, "Gate verdict"));
    assert_non_null(strstr(h, "min p@1 &lt;csls&gt;"));
    assert_non_null(strstr(h, "badge fail\">\xe2\x9c\x97 fail"));  /* a sign, not colour alone */
    assert_non_null(strstr(h, "badge pass\">\xe2\x9c\x93 pass"));
    assert_non_null(strstr(h, "no diagnostics"));
    free(h);
    assert_int_equal(report_file(in, NULL, out, NULL), IST_OK);
    h = slurp(out);
    assert_non_null(strstr(h, "No verdict file was given"));
    free(h);
    free(in);
    free(v);
    free(out);
    harness_rmdir(dir);
}

static void
bad_input_names_file_and_line(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "r.json"),
         *out = harness_path(dir, "r.html"), *miss = harness_path(dir, "none.json");
    ist_error err;

    put(in, "{\"format\": \"isthmus result\",\n \"runs\": [1,\n}");
    assert_int_equal(report_file(in, NULL, out, &err), IST_ERR_FORMAT);
    assert_int_equal(err.line, 3);
    assert_non_null(strstr(err.file, "r.json"));
    put(in, "{\"format\": \"something else\"}");
    assert_int_equal(report_file(in, NULL, out, &err), IST_ERR_FORMAT);
    assert_non_null(strstr(err.msg, "isthmus result"));
    assert_int_equal(report_file(miss, NULL, out, &err), IST_ERR_IO);
    put(in, "{\"format\": \"isthmus result\"}");
    assert_int_equal(report_file(in, miss, out, &err), IST_ERR_IO);
    assert_int_equal(harness_count_entries(dir), 1);        /* only r.json: no output left */
    free(in);
    free(out);
    free(miss);
    harness_rmdir(dir);
}

/* The page opens with the answer (verdict, p@1 with its interval, conditions),
 * shows figures for people (percent with one decimal, the interval beside, never a raw
 * fraction or null), a provenance table of both vector files and what the hub list
 * leaves out. */
static const char *const provenanced =
    "{\"format\": \"isthmus result\", \"version\": 1, \"command\": \"score\",\n"
    " \"inputs\": {\"source\": {\"path\": \"en.isv\", \"fingerprint\": \"00000000000000ff\",\n"
    "   \"provenance\": {\"producer\": \"isthmus 0.1.0\", \"text\": {\"nfkc\": true,\n"
    "     \"casefold\": true, \"numbers\": \"keep\"}, \"corpus\": {\"sources\": [{\"path\":\n"
    "     \"shop-en.txt.gz\"}], \"tokens\": 1344752, \"types\": 2482}, \"training\": {\"method\":\n"
    "     \"skip-gram negative sampling\", \"dimension\": 100, \"passes\": 20, \"seed\": 3}}},\n"
    "  \"target\": {\"path\": \"es.isv\"}},\n"
    " \"test\": {\"path\": \"t.pairs\"},\n"
    " \"runs\": [{\"label\": \"refined\", \"retrieval\": \"csls\", \"sources\": 441,\n"
    "   \"queries\": 441, \"coverage\": 1, \"precision\": {\"p@1\": 0.84126984, \"p@5\": 0.9, \"p@10\": 0.95},\n"
    "   \"ci\": {\"p@1\": [0.80952381, 0.87301587], \"p@5\": [0.87, 0.93],\n"
    "   \"p@10\": [0.93, 0.97]},\n"
    "   \"bands\": [{\"rank_from\": 1, \"rank_to\": 250, \"queries\": 441,\n"
    "     \"precision\": {\"p@1\": 0.84126984, \"p@5\": 0.9, \"p@10\": 0.95}},\n"
    "    {\"rank_from\": 251, \"rank_to\": null, \"queries\": 0,\n"
    "     \"precision\": {\"p@1\": 0, \"p@5\": 0, \"p@10\": 0}}]}],\n"
    " \"diagnostics\": {\"hubness\": {\"k\": 10, \"queries\": 2482, \"targets\": 2808,\n"
    "   \"neighbourhood\": 10, \"hubs_with_numbers\": false, \"cosine\": {\"skewness\": 0.87,\n"
    "   \"top_hubs\": [{\"word\": \"lomo\", \"k_occurrence\": 35}], \"hubs_left_out\": 6},\n"
    "   \"csls\": {\"skewness\": 0.51,\n"
    "   \"top_hubs\": [{\"word\": \"idea\", \"k_occurrence\": 24}],\n"
    "   \"hubs_left_out\": 0}}}}\n";

static void
answer_first_and_figures_for_people(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "r.json"),
         *v = harness_path(dir, "v.json"), *out = harness_path(dir, "r.html");
    ist_result *r = NULL;
    ist_verdict *vd = NULL;
    ist_report_opts ro;

    put(in, provenanced);
    put(v, "{\"format\": \"isthmus verdict\", \"version\": 1, \"verdict\": \"pass\", "
           "\"rules_passed\": 1, \"rules_failed\": 0, \"rules_skipped\": 1, "
           "\"thresholds\": \"ship.thresholds\", \"conditions\": [\"1 rule not checked\"], "
           "\"vectors\": {\"source\": \"00000000000000ff\"}, "
           "\"rules\": [{\"line\": 3, \"rule\": \"min p@1 csls 0.70\", "
           "\"figure_name\": \"p@1\", \"run\": \"refined csls\", \"bound_kind\": "
           "\"min\", \"bound\": 0.7, \"figure\": 0.84126984, \"interval\": [0.80952381, "
           "0.87301587], \"outcome\": \"pass\"}, {\"line\": 4, \"rule\": \"max drop "
           "precision@1 csls 0.03\", \"figure_name\": \"drop precision@1\", \"run\": null, "
           "\"bound_kind\": \"max\", \"bound\": 0.03, \"figure\": null, \"interval\": null, "
           "\"outcome\": \"skip\", \"note\": \"no baseline result given\"}]}");
    ist_error err;
    if (ist_result_load(in, &r, &err) != IST_OK || ist_verdict_load(v, r, &vd, &err) != IST_OK)
        fail_msg("%s:%llu: %s", err.file, (unsigned long long)err.line, err.msg);
    ist_report_opts_init(&ro);
    ro.source_language = "English";
    ro.target_language = "Spanish";
    assert_int_equal(ist_report_write(r, vd, &ro, out, NULL), IST_OK);
    char *h = slurp(out);
    const char *ans = strstr(h, "Can we ship these vectors?");
    assert_non_null(ans);
    assert_true(ans < strstr(h, "id=\"verdict\""));        /* the answer before every section */
    assert_true(ans < strstr(h, "id=\"headline\""));
    assert_non_null(strstr(ans, "Yes, with conditions"));
    assert_non_null(strstr(ans, "p@1 <strong>84.1%</strong> <span class=\"muted\">"
                                "[81.0, 87.3]</span> (refined map, CSLS) over 441 test words"));
    assert_non_null(strstr(h, "<strong>Conditions:</strong> 1 rule not checked"));
    assert_non_null(strstr(h, "English \xe2\x86\x92 Spanish"));
    /* the verdict table: percents and intervals, no raw fraction, no null */
    const char *vt = strstr(h, "id=\"verdict\""), *vend = strstr(h, "id=\"reading\"");
    assert_non_null(vt);
    assert_non_null(vend);
    char *gate = strndup(vt, (size_t)(vend - vt));
    assert_non_null(strstr(gate, "84.1% <span class=\"muted\">[81.0, 87.3]</span>"));
    assert_non_null(strstr(gate, "at least 70.0%"));
    assert_non_null(strstr(gate, "no baseline result given"));
    assert_non_null(strstr(gate, "not checked"));
    assert_null(strstr(gate, "0.841"));
    assert_null(strstr(gate, "null"));
    free(gate);
    /* every figure explained; a band without test words left out */
    assert_non_null(strstr(h, "<dt>Cosine and CSLS</dt>"));
    assert_non_null(strstr(h, "<dt>Seed map and refined map</dt>"));
    assert_non_null(strstr(h, "1 of 2 bands hold test words"));
    assert_null(strstr(h, "<td>251+</td>"));          /* no row for the empty band */
    /* provenance: a readable table, not raw keys */
    assert_non_null(strstr(h, "<th scope=\"row\">language</th><td>English</td><td>Spanish</td>"));
    assert_non_null(strstr(h, "<th scope=\"row\">method</th><td>skip-gram negative "
                              "sampling</td>"));
    assert_non_null(strstr(h, "<th scope=\"row\">dimension</th><td>100</td>"));
    assert_non_null(strstr(h, "<td>1,344,752 tokens, 2,482 words kept</td>"));
    assert_non_null(strstr(h, "<th scope=\"row\">passes over the corpus</th><td>20</td>"));
    assert_non_null(strstr(h, "<td>NFKC, case folded, numbers: keep</td>"));
    assert_non_null(strstr(h, "<code>shop-en.txt.gz</code>"));
    assert_null(strstr(h, "inputs.source"));
    /* the hub list says what it leaves out */
    assert_non_null(strstr(h, "<td>lomo</td>"));
    assert_non_null(strstr(h, "6 under cosine and 0 under CSLS"));
    free(h);
    ist_verdict_free(vd);
    ist_result_free(r);
    free(in);
    free(v);
    free(out);
    harness_rmdir(dir);
}

/* Two series side by side leave each bar about 28 px on the k-occurrence chart: a value
 * label wider than its bar ran into its neighbour's ("36.8%37.3%"), so such labels are
 * whole percents, "<1%" for a share above zero that rounds to none. The first bin holds
 * the targets found by no query: "0", not "0+". */
static void
narrow_bars_get_whole_percent_labels(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "r.json"),
         *out = harness_path(dir, "r.html");
    static const unsigned cos[] = {104, 129, 115, 330, 977, 1033, 120, 0, 0, 0},
                          csls[] = {14, 25, 39, 157, 1499, 1047, 27, 0, 0, 0},
                          from[] = {0, 1, 2, 3, 5, 10, 20, 50, 100, 200};
    char json[4096], dist[2][1024];
    for (int m = 0; m < 2; m++) {
        size_t o = 0;
        for (int i = 0; i < 10; i++) {
            char to[16] = "null";
            if (i < 9)
                snprintf(to, sizeof to, "%u", from[i + 1] - 1);
            o += (size_t)snprintf(dist[m] + o, sizeof dist[m] - o,
                                  "%s{\"from\": %u, \"to\": %s, \"targets\": %u}", i ? ", " : "",
                                  from[i], to, m ? csls[i] : cos[i]);
        }
    }
    snprintf(json, sizeof json,
             "{\"format\": \"isthmus result\", \"version\": 1, \"command\": \"score\",\n"
             " \"runs\": [],\n"
             " \"diagnostics\": {\"hubness\": {\"k\": 10, \"queries\": 2482, \"targets\": 2808,\n"
             "   \"neighbourhood\": 10, \"cosine\": {\"skewness\": 0.83, \"distribution\": [%s]},\n"
             "   \"csls\": {\"skewness\": 0.6, \"distribution\": [%s]}}}}\n",
             dist[0], dist[1]);
    put(in, json);
    ist_error err;
    if (report_file(in, NULL, out, &err) != IST_OK)
        fail_msg("%s:%llu: %s", err.file, (unsigned long long)err.line, err.msg);
    char *h = slurp(out);
    const char *chart = strstr(h, "Distribution of the k-occurrence");
    assert_non_null(chart);
    assert_non_null(strstr(chart, "font-size=\"10\">37%</text>"));   /* 36.8% and 37.3% */
    assert_non_null(strstr(chart, "font-size=\"10\">&lt;1%</text>")); /* 14 of 2808 */
    assert_non_null(strstr(chart, "font-size=\"10\">0%</text>"));
    assert_null(strstr(chart, "font-size=\"10\">36.8%</text>"));
    assert_non_null(strstr(chart, ": 36.8%</title>"));               /* the tooltip keeps it */
    assert_non_null(strstr(chart, "font-size=\"11\">0</text>"));   /* the first bin: 0 alone */
    assert_null(strstr(chart, ">0+</text>"));
    assert_non_null(strstr(chart, "font-size=\"11\">200+</text>"));
    free(h);
    free(in);
    free(out);
    harness_rmdir(dir);
}

/* Every allocation of the report can fail: IST_ERR_NOMEM, nothing leaked, no page left. */
static void
report_survives_every_failed_allocation(void **state)
{
    (void)state;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "r.json"),
         *v = harness_path(dir, "v.json"), *out = harness_path(dir, "r.html");
    int k;
    put(in, nasty);
    put(v, "{\"format\": \"isthmus verdict\", \"version\": 1, \"verdict\": \"pass\", "
           "\"rules_passed\": 1, \"rules_failed\": 0, \"rules_skipped\": 0, "
           "\"vectors\": {\"source\": \"00000000000000ff\"}, "
           "\"rules\": [{\"rule\": \"x\", \"figure\": 1, "
           "\"bound\": 0, \"outcome\": \"pass\"}]}");
    for (k = 0; k < 100000; k++) {
        ist_testing_fail_alloc_after(k);
        ist_status rc = report_file(in, v, out, NULL);
        ist_testing_fail_alloc_after(-1);
        if (rc == IST_OK)
            break;
        if (rc != IST_ERR_NOMEM)
            fail_msg("allocation %d failing gave status %d, expected out of memory", k, (int)rc);
        assert_int_equal(harness_count_entries(dir), 2);   /* no page, no temporary file */
    }
    /* with injection on (the sanitizer build) many points were failed first; off, the first
     * call succeeds */
    assert_true((!ist_testing_fault_injection_enabled() || k > 0) && k < 100000);
    free(in);
    free(v);
    free(out);
    harness_rmdir(dir);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(escapes_input_text),
        cmocka_unit_test(shows_a_verdict_and_tolerates_a_bare_result),
        cmocka_unit_test(bad_input_names_file_and_line),
        cmocka_unit_test(answer_first_and_figures_for_people),
        cmocka_unit_test(narrow_bars_get_whole_percent_labels),
        cmocka_unit_test(report_survives_every_failed_allocation),
    };
    HARNESS_RUN("report", tests);
}
