/* test_result.c - the result record: ist_evaluate() fills it from a map, it is written,
 * loaded back equal, and the loader refuses documents that are not results of this
 * version or hold impossible figures. */
#include "harness.h"
#include "synth.h"
#include "synth_space.h"

#include <math.h>

#include <isthmus/isthmus.h>

#include "json_int.h"

typedef struct fixture {
    synth sy;
    ist_map *map;
    ist_pairs *seeds, *test;
    ist_pairs_coverage cov;
} fixture;

/* 800 words in 12 dimensions; seeds w0..w199, test w600..w699; refined twice. */
static void
make_fixture(fixture *f, size_t rounds)
{
    ist_align_opts ao;
    ist_error err;
    make_synth(&f->sy, 800, 12, 0.01, 21);
    f->seeds = range_pairs(&f->sy, 0, 200);
    f->test = range_pairs(&f->sy, 600, 700);
    assert_int_equal(ist_pairs_resolve(f->test, f->sy.src, f->sy.tgt, &f->cov, &err), IST_OK);
    ist_align_opts_init(&ao);
    ao.refine_rounds = rounds;
    ao.refine_vocab = 600;
    assert_int_equal(ist_align_fit(f->sy.src, f->sy.tgt, f->seeds, &ao, &f->map, &err), IST_OK);
}

static void
free_fixture(fixture *f)
{
    ist_map_free(f->map);
    ist_pairs_free(f->seeds);
    ist_pairs_free(f->test);
    free_synth(&f->sy);
}

static ist_result *
evaluate(const fixture *f, unsigned stages)
{
    ist_evaluate_opts o;
    ist_result *r = NULL;
    ist_error err;
    ist_evaluate_opts_init(&o);
    o.stages = stages;
    o.eval.band_edges[0] = 650;   /* ranks 1-650 and 651+: 50 test words in each */
    o.eval.nedges = 1;
    o.eval.bands_auto = false;
    o.ci.resamples = 200;
    o.diag.isometry_words = 100;
    o.source_path = "src.isv";
    o.target_path = "tgt.isv";
    o.map_path = "m.map";
    if (ist_evaluate(f->map, f->sy.src, f->sy.tgt, f->test, &f->cov, &o, &r, &err) != IST_OK)
        fail_msg("ist_evaluate: %s", err.msg);
    return r;
}

/* Bands that follow the vocabulary's size (the default) are recorded among the options as
 * the edges used: 800 source rows give 80 and 270 (a tenth and a third, two digits). */
static void
test_auto_bands_recorded(void **state)
{
    (void)state;
    fixture f;
    ist_evaluate_opts o;
    ist_result *r = NULL;
    ist_error err;
    make_fixture(&f, 0);
    ist_evaluate_opts_init(&o);
    o.ci.resamples = 50;
    o.diagnostics = false;
    if (ist_evaluate(f.map, f.sy.src, f.sy.tgt, f.test, &f.cov, &o, &r, &err) != IST_OK)
        fail_msg("ist_evaluate: %s", err.msg);
    assert_int_equal(r->runs[0].m.nbands, 3);
    assert_int_equal(r->options.nedges, 2);
    assert_int_equal(r->options.band_edges[0], 80);
    assert_int_equal(r->options.band_edges[1], 270);
    for (size_t i = 0; i < r->options.nedges; i++)
        assert_int_equal(r->options.band_edges[i], r->runs[0].m.band[i].hi);
    ist_result_free(r);
    free_fixture(&f);
}

/* One evaluation call: both stages, both methods, intervals, per-query words and
 * diagnostics, with the test list's identity. */
static void
test_evaluate_fills_the_record(void **state)
{
    (void)state;
    fixture f;
    ist_error err;
    make_fixture(&f, 2);
    ist_result *r = evaluate(&f, IST_STAGE_SEED | IST_STAGE_REFINED);

    assert_int_equal(r->nruns, 4);
    assert_string_equal(r->runs[0].label, "seed");
    assert_string_equal(r->runs[3].label, "refined");
    assert_int_equal(r->runs[0].m.method, IST_RETRIEVAL_COSINE);
    assert_int_equal(r->runs[1].m.method, IST_RETRIEVAL_CSLS);
    assert_int_equal(r->runs[1].m.band[0].queries, 50);
    assert_int_equal(r->runs[1].m.band[1].queries, 50);
    /* the intervals are the bootstrap's on the run's own outcomes */
    ist_metrics_ci ci;
    ist_ci_opts o;
    ist_ci_opts_init(&o);
    o.resamples = 200;
    assert_int_equal(ist_metrics_ci_compute(&r->runs[1].m, &o, &ci, &err), IST_OK);
    assert_true(r->runs[1].has_ci && ci.lo[0] == r->runs[1].ci.lo[0] &&
                ci.band_hi[1][2] == r->runs[1].ci.band_hi[1][2]);
    /* per-query: source words in ascending frequency rank, band of each */
    assert_int_equal(r->runs[1].nper_query, 100);
    assert_string_equal(r->runs[1].query_source[0], "w600");
    assert_int_equal(r->runs[1].query_band[0], 0);
    assert_int_equal(r->runs[1].query_band[99], 1);
    /* identity: the list built in memory has no list checksum, the kept pairs have one */
    uint64_t ck;
    assert_false(r->test.list.has_checksum);
    assert_int_equal(ist_pairs_checksum(f.test, &ck, &err), IST_OK);
    assert_true(r->test.has_kept && r->test.kept_checksum == ck);
    assert_true(r->source.fingerprint == ist_store_fingerprint(f.sy.src));
    assert_int_equal(r->test.source_words, 100);
    assert_true(r->test.has_overlap && r->test.overlap == 0);
    assert_non_null(r->diagnostics);
    assert_true(ist_diag_isometry(r->diagnostics) >= 0);
    assert_int_equal(r->options.stages, IST_STAGE_SEED | IST_STAGE_REFINED);
    ist_result_free(r);
    free_fixture(&f);
}

/* build -> write -> load -> equal: the written text of the loaded record is the same
 * text, and the figures the gate reads are the same numbers. */
static void
test_round_trip(void **state)
{
    (void)state;
    fixture f;
    ist_error err;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "r.json"), *t1, *t2;
    ist_result *loaded;
    make_fixture(&f, 1);
    /* how each file was made: a JSON object is kept (compact), other text is not */
    assert_int_equal(ist_store_set_provenance(f.sy.src, "{\"training\": {\"method\": \"m\", "
                                              "\"dimension\": 12}}", &err), IST_OK);
    assert_int_equal(ist_store_set_provenance(f.sy.tgt, "made by hand", &err), IST_OK);
    ist_result *r = evaluate(&f, IST_STAGE_REFINED);
    assert_string_equal(r->source.provenance,
                        "{\"training\":{\"method\":\"m\",\"dimension\":12}}");
    assert_null(r->target.provenance);

    assert_int_equal(ist_result_write(r, path, &err), IST_OK);
    if (ist_result_load(path, &loaded, &err) != IST_OK)
        fail_msg("load: %s", err.msg);
    assert_int_equal(ist_result_render(r, &t1, &err), IST_OK);
    assert_int_equal(ist_result_render(loaded, &t2, &err), IST_OK);
    assert_string_equal(t1, t2);
    assert_string_equal(loaded->source.provenance, r->source.provenance);
    assert_null(loaded->target.provenance);
    assert_int_equal(loaded->nruns, r->nruns);
    for (size_t i = 0; i < r->nruns; i++) {
        const ist_result_run *a = &r->runs[i], *b = &loaded->runs[i];
        assert_string_equal(a->label, b->label);
        assert_int_equal(a->m.method, b->m.method);
        assert_int_equal(a->m.queries, b->m.queries);
        for (size_t j = 0; j < IST_METRICS_NK; j++) {
            assert_true(a->m.p[j] == b->m.p[j] && a->m.hits[j] == b->m.hits[j]);
            assert_true(a->ci.lo[j] == b->ci.lo[j] && a->ci.hi[j] == b->ci.hi[j]);
        }
        assert_int_equal(b->nper_query, a->nper_query);
        assert_true(b->has_rows);
        for (size_t q = 0; q < a->nper_query; q++) {
            assert_string_equal(a->query_source[q], b->query_source[q]);
            assert_int_equal(a->m.query_place[q], b->m.query_place[q]);
            assert_int_equal(a->m.query_row[q], b->m.query_row[q]);
        }
    }
    assert_true(loaded->test.kept_checksum == r->test.kept_checksum);
    assert_true(loaded->target.fingerprint == r->target.fingerprint);
    assert_non_null(loaded->diagnostics);
    assert_true(ist_diag_isometry(loaded->diagnostics) == ist_diag_isometry(r->diagnostics));
    assert_true(ist_diag_skewness(loaded->diagnostics, IST_RETRIEVAL_CSLS) ==
                ist_diag_skewness(r->diagnostics, IST_RETRIEVAL_CSLS));
    ist_result_free_text(t1);
    ist_result_free_text(t2);
    ist_result_free(loaded);
    ist_result_free(r);
    free_fixture(&f);
    free(path);
    harness_rmdir(dir);
}

/* A test list that shares source words with the seeds is refused before scoring, naming
 * them; allowed, the record says how many. */
static void
test_overlap(void **state)
{
    (void)state;
    fixture f;
    ist_evaluate_opts o;
    ist_result *r = NULL;
    ist_error err;
    make_fixture(&f, 0);
    ist_pairs *leaky = range_pairs(&f.sy, 195, 210);   /* w195..w199 are seeds */
    ist_evaluate_opts_init(&o);
    o.diagnostics = false;
    assert_int_equal(ist_evaluate(f.map, f.sy.src, f.sy.tgt, leaky, NULL, &o, &r, &err),
                     IST_ERR_INVALID);
    assert_null(r);
    assert_non_null(strstr(err.msg, "5 test source words are also seed source words (w195"));
    o.allow_overlap = true;
    assert_int_equal(ist_evaluate(f.map, f.sy.src, f.sy.tgt, leaky, NULL, &o, &r, &err), IST_OK);
    assert_int_equal(r->test.overlap, 5);
    assert_true(r->test.overlap_allowed);
    ist_result_free(r);
    ist_pairs_free(leaky);
    free_fixture(&f);
}

/* The pair reader records the checksum of what it read; a held-out part saved and read
 * back has the checksum the part had. */
static void
test_list_checksum(void **state)
{
    (void)state;
    fixture f;
    ist_error err;
    char *dir = harness_tmpdir(), *in = harness_path(dir, "l.pairs"),
         *out = harness_path(dir, "held.pairs");
    ist_pairs *p, *seeds, *test, *back;
    uint64_t a, b, c;
    static const char text[] = "# a list\nw1 w1\nw2\tw2\nw3 w3\nw4 w4\nw5 w5\nnone none\n";

    make_fixture(&f, 0);
    harness_write(in, text, sizeof text - 1);
    assert_int_equal(ist_pairs_read(in, &p, &err), IST_OK);
    assert_true(ist_pairs_list_checksum(p, &a));
    assert_string_equal(ist_pairs_path(p), in);
    assert_int_equal(ist_pairs_resolve(p, f.sy.src, f.sy.tgt, NULL, &err), IST_OK);
    assert_true(ist_pairs_list_checksum(p, &b) && a == b);   /* as read, not as resolved */
    assert_int_equal(ist_pairs_checksum(p, &c, &err), IST_OK);
    assert_true(c != a);                                     /* 'none none' is not kept */
    assert_int_equal(ist_pairs_split(p, 0.4, 1, &seeds, &test, &err), IST_OK);
    assert_null(ist_pairs_path(test));
    assert_non_null(strstr(ist_pairs_label(test), "held out from "));
    assert_true(ist_pairs_list_checksum(test, &a));
    assert_int_equal(ist_pairs_save(test, out, &err), IST_OK);
    assert_int_equal(ist_pairs_read(out, &back, &err), IST_OK);
    assert_true(ist_pairs_list_checksum(back, &b) && a == b);
    ist_pairs_free(back);
    ist_pairs_free(seeds);
    ist_pairs_free(test);
    ist_pairs_free(p);
    free_fixture(&f);
    free(in);
    free(out);
    harness_rmdir(dir);
}

static void
refused(const char *text, const char *msg_part)
{
    ist_result *r = NULL;
    ist_error err;
    memset(&err, 0, sizeof err);
    assert_int_equal(ist_result_parse(text, strlen(text), "r.json", &r, &err), IST_ERR_FORMAT);
    assert_null(r);
    if (!strstr(err.msg, msg_part))
        fail_msg("'%s' not in '%s'", msg_part, err.msg);
    assert_string_equal(err.file, "r.json");
}

#define RUN_HEAD "{\"format\": \"isthmus result\", \"version\": 1, \"runs\": [{\"label\": " \
                 "\"refined\", \"retrieval\": \"csls\", "

/* Impossible figures, another version, duplicate members and repeated query words are
 * refused, naming the member. */
static void
test_loader_refuses(void **state)
{
    (void)state;
    refused("{\"format\": \"isthmus map\"}", "expected \"format\": \"isthmus result\"");
    refused("{\"format\": \"isthmus result\", \"version\": 2}", "version 2");
    refused("{\"format\": \"isthmus result\", \"version\": 1, \"version\": 1}",
            "duplicate member \"version\"");
    refused(RUN_HEAD "\"sources\": 4, \"queries\": 4, \"coverage\": 1, \"precision\": "
                     "{\"p@1\": 2.5, \"p@5\": 1, \"p@10\": 1}}]}",
            "runs[0].precision.p@1: expected a fraction from 0 to 1, found 2.5");
    refused(RUN_HEAD "\"sources\": 4, \"queries\": 4, \"coverage\": 7, \"precision\": "
                     "{\"p@1\": 1, \"p@5\": 1, \"p@10\": 1}}]}",
            "runs[0].coverage: expected a fraction");
    refused(RUN_HEAD "\"sources\": 4, \"queries\": -5, \"coverage\": 1}]}",
            "runs[0].queries: expected a whole number");
    refused(RUN_HEAD "\"sources\": 2, \"queries\": 4, \"coverage\": 1}]}",
            "4 queries but only 2 source words");
    refused(RUN_HEAD "\"sources\": 2, \"queries\": 2, \"coverage\": 1, \"precision\": "
                     "{\"p@1\": 1, \"p@5\": 1, \"p@10\": 1}, \"hits\": {\"@1\": 3, \"@5\": 2, "
                     "\"@10\": 2}}]}",
            "3 hits but only 2 queries");
    refused(RUN_HEAD "\"sources\": 2, \"queries\": 2, \"coverage\": 1, \"precision\": "
                     "{\"p@1\": 1, \"p@5\": 1, \"p@10\": 1}, \"bands\": [{\"rank_from\": 1, "
                     "\"rank_to\": null, \"queries\": 2, \"precision\": {\"p@1\": 1, \"p@5\": "
                     "1, \"p@10\": 1}}], \"per_query\": [{\"source\": \"cup\", \"rank\": 1, "
                     "\"band\": 0}, {\"source\": \"cup\", \"rank\": 1, \"band\": 0}]}]}",
            "source word 'cup' is listed more than once");
    refused(RUN_HEAD "\"sources\": 1, \"queries\": 1, \"coverage\": 1, \"precision\": "
                     "{\"p@1\": 1, \"p@5\": 1, \"p@10\": 1}, \"ci\": {\"p@1\": [0.9, 0.2]}}]}",
            "expected [lo, hi] with 0 <= lo <= hi <= 1");
    refused("{\"format\": \"isthmus result\", \"test\": {\"list_checksum\": \"12\"}}",
            "test.list_checksum: expected 16 lower-case hex digits");
    /* a bare result loads: nothing is required beyond the format */
    ist_result *r = NULL;
    assert_int_equal(ist_result_parse("{\"format\": \"isthmus result\"}", 28, NULL, &r, NULL),
                     IST_OK);
    assert_int_equal(r->nruns, 0);
    ist_result_free(r);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_evaluate_fills_the_record),
        cmocka_unit_test(test_round_trip),
        cmocka_unit_test(test_auto_bands_recorded),
        cmocka_unit_test(test_overlap),
        cmocka_unit_test(test_list_checksum),
        cmocka_unit_test(test_loader_refuses),
    };
    HARNESS_RUN("result", tests);
}
