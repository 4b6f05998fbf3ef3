/* test_review.c - what a reviewer is shown and what comes back: the review filters (stop
 * words, numbers, same spelling, likely misspellings, minimum score), the same-spelling
 * block of the candidate file, and merging reviewed lists back into a pair file. */
#include "harness.h"
#include "propose_env.h"

#include <math.h>

#include <isthmus/isthmus.h>
#include <isthmus/testing.h>

/* ---- the review filters ------------------------------------------------ */

/* A store of named words with counts; row i is the vector v[i] (dimension 8). */
static ist_store *
named_store(const char *const *w, const uint64_t *c, const float (*v)[8], size_t n)
{
    ist_store *s;
    ist_error err;
    assert_int_equal(ist_store_new(n, 8, &s, &err), IST_OK);
    for (size_t i = 0; i < n; i++) {
        memcpy(ist_store_row_mut(s, i), v[i], sizeof v[i]);
        assert_int_equal(ist_store_set_word(s, i, w[i], c[i], &err), IST_OK);
    }
    return s;
}

/* Each filter on its own word: the stop list (the, de), numbers (6.39, and 7,00 passed
 * over as bowl's best candidate), a code offered with its own spelling only (tw-4410,
 * in the same-spelling block), likely misspellings (ewll, bein), the minimum score
 * (lamp points nowhere). */
static void
test_filters(void **state)
{
    (void)state;
    static const char *const sw[] = {"the", "kettle", "bowl", "6.39", "tw-4410", "well",
                                     "lamp", "ewll"};
    static const uint64_t sc[] = {10000, 3000, 2000, 1500, 1200, 1000, 900, 10};
    static const float sv[][8] = {{1, 0, 0, 0, 0, 0, 0, 0}, {0, 1, 0, 0, 0, 0, 0, 0},
                                  {0, 0, .6f, .8f, 0, 0, 0, 0}, {0, 0, 0, 1, 0, 0, 0, 0},
                                  {0, 0, 0, 0, 1, 0, 0, 0}, {0, 0, 0, 0, 0, 1, 0, 0},
                                  {0, -1, 0, 0, 0, 0, 0, 0}, {0, 0, 0, 0, 0, 0, 0, 1}};
    static const char *const tw[] = {"de", "hervidor", "cuenco", "7,00", "tw-4410", "bien",
                                     "l\xc3\xa1mpara", "bein"};
    static const uint64_t tc[] = {12000, 3000, 2000, 1500, 1200, 1000, 900, 5};
    static const float tv[][8] = {{1, 0, 0, 0, 0, 0, 0, 0}, {0, 1, 0, 0, 0, 0, 0, 0},
                                  {0, 0, 1, 0, 0, 0, 0, 0}, {0, 0, 0, 1, 0, 0, 0, 0},
                                  {0, 0, 0, 0, 1, 0, 0, 0}, {0, 0, 0, 0, 0, 1, 0, 0},
                                  {0, 0, 0, 0, 0, 0, 1, 0}, {0, 0, 0, 0, 0, 0, 0, 1}};
    ist_store *src = named_store(sw, sc, sv, 8), *tgt = named_store(tw, tc, tv, 8);
    ist_propose_opts po;
    ist_proposals *p;
    ist_error err;

    ist_propose_opts_init(&po);
    assert_false(po.filter.numbers);
    assert_true(po.filter.variants && po.same_block);
    assert_true(po.filter.min_score == 0.0f && po.filter.stop_share == 0.005);
    po.candidates = 1;
    po.search.csls_k = 2;
    po.filter.stop_share = 0.3;      /* with eight words each is over 0.5% */
    po.filter.min_score = 0.05f;
    assert_int_equal(ist_propose_views(ist_store_view(src), ist_store_view(tgt), src, tgt, NULL,
                                       0, &po, &p, &err), IST_OK);
    ist_propose_stats st = ist_proposals_stats(p);
    assert_int_equal(st.left_stop, 1);
    assert_int_equal(st.left_numbers, 1);
    assert_int_equal(st.left_variants, 1);
    assert_int_equal(st.left_low, 1);
    assert_int_equal(st.proposed, 4);
    assert_int_equal(st.same_spelling, 1);
    assert_int_equal(ist_proposals_count(p), 4);
    static const char *const want_src[] = {"kettle", "bowl", "well"};
    static const char *const want_tgt[] = {"hervidor", "cuenco", "bien"};
    for (size_t i = 0; i < 4; i++) {
        const ist_proposal *r = ist_proposals_get(p, i);
        const char *s = ist_store_word(src, r->source_row), *t = ist_store_word(tgt, r->target_row);
        if (i == 3) {   /* the block comes last */
            assert_string_equal(s, "tw-4410");
            assert_string_equal(t, "tw-4410");
            assert_true(r->same_spelling);
            assert_int_equal(r->priority, 4);
            continue;
        }
        assert_false(r->same_spelling);
        size_t k = 0;
        while (k < 3 && strcmp(want_src[k], s) != 0)
            k++;
        assert_true(k < 3);
        assert_string_equal(t, want_tgt[k]);   /* de, 7,00 and bein are passed over */
        assert_true(r->score >= 0.05f);
    }
    ist_proposals_free(p);

    /* every filter off: all eight words, the same-spelling pair in the review order */
    no_filters(&po);
    assert_int_equal(ist_propose_views(ist_store_view(src), ist_store_view(tgt), src, tgt, NULL,
                                       0, &po, &p, &err), IST_OK);
    st = ist_proposals_stats(p);
    assert_int_equal(st.proposed, 8);
    assert_int_equal(st.left_stop + st.left_numbers + st.left_variants + st.left_low, 0);
    assert_int_equal(st.same_spelling, 0);
    ist_proposals_free(p);

    /* the filter alone, as lookup and the diagnostics use it */
    ist_word_filter f;
    unsigned char flags[8] = {0};
    size_t n[3];
    ist_word_filter_init(&f);
    f.stop_share = 0.3;
    assert_int_equal(ist_word_filter_mark(&f, tgt, flags, 1, n, &err), IST_OK);
    assert_int_equal(n[0], 1);
    assert_int_equal(n[1], 2);   /* 7,00 and tw-4410 */
    assert_int_equal(n[2], 1);
    assert_int_equal(flags[0], IST_FILTER_STOP << 1);
    assert_int_equal(flags[3], IST_FILTER_SHAPE << 1);
    assert_int_equal(flags[7], IST_FILTER_VARIANT << 1);
    assert_int_equal(flags[1] | flags[2] | flags[5] | flags[6], 0);
    f.stop_share = NAN;
    assert_int_equal(ist_word_filter_mark(&f, tgt, flags, 0, NULL, &err), IST_ERR_INVALID);
    ist_store_free(src);
    ist_store_free(tgt);
}

/* Misspellings are one character from a far more frequent word, not one byte: a swap with
 * an accented letter (áfcil, fcáil) and the loss of one (fcil) count, as does a changed
 * accent (fécil); a word two edits away (frágil) or one at a common ratio (fáciles) does
 * not. */
static void
test_variants_by_character(void **state)
{
    (void)state;
    static const char *const w[] = {"f\xc3\xa1" "cil", "fr\xc3\xa1gil", "f\xc3\xa1" "ciles",
                                    "\xc3\xa1" "fcil", "fc\xc3\xa1il", "fcil", "f\xc3\xa9" "cil"};
    static const uint64_t c[] = {8000, 100, 400, 12, 14, 7, 9};
    static const float v[][8] = {{1}, {1}, {1}, {1}, {1}, {1}, {1}};
    ist_store *s = named_store(w, c, v, 7);
    ist_word_filter f;
    unsigned char flags[7] = {0};
    size_t n[3];
    ist_error err;
    ist_word_filter_init(&f);
    f.stop_share = 0;
    assert_int_equal(ist_word_filter_mark(&f, s, flags, 0, n, &err), IST_OK);
    assert_int_equal(n[2], 4);
    assert_int_equal(flags[0] | flags[1] | flags[2], 0);
    for (int i = 3; i < 7; i++)
        assert_int_equal(flags[i], IST_FILTER_VARIANT);
    ist_store_free(s);
}

/* The same-spelling block in the file: a comment line before it, the block column. */
static void
test_write_same_block(void **state)
{
    (void)state;
    static const char *const w[] = {"kettle", "tw-4410"};
    static const uint64_t c[] = {3000, 1200};
    static const float v[][8] = {{0, 1, 0, 0, 0, 0, 0, 0}, {0, 0, 0, 0, 1, 0, 0, 0}};
    static const char *const tw[] = {"hervidor", "tw-4410"};
    ist_store *src = named_store(w, c, v, 2), *tgt = named_store(tw, c, v, 2);
    char *dir = harness_tmpdir(), *path = harness_path(dir, "c.tsv");
    ist_propose_opts po;
    ist_proposals *p;
    ist_error err;

    ist_propose_opts_init(&po);
    po.filter.stop_share = 0;
    po.candidates = 1;
    assert_int_equal(ist_propose_views(ist_store_view(src), ist_store_view(tgt), src, tgt, NULL,
                                       0, &po, &p, &err), IST_OK);
    assert_int_equal(ist_proposals_write(p, src, tgt, NULL, path, &err), IST_OK);
    char *text = slurp(path);
    const char *row1 = strstr(text, "\tkettle\thervidor\t1\t"),
               *note = strstr(text, "# same spelling on both sides"),
               *row2 = strstr(text, "\ttw-4410\ttw-4410\t1\t");
    assert_non_null(row1);
    assert_non_null(note);
    assert_non_null(row2);
    assert_true(row1 < note && note < row2);
    assert_non_null(strstr(note, "1 words"));
    assert_non_null(strstr(row2, "\t2\tsame-spelling\n"));
    assert_non_null(strstr(row1, "\t1\treview\n"));
    assert_null(strstr(text, "-0.0000"));
    free(text);
    ist_proposals_free(p);
    ist_store_free(src);
    ist_store_free(tgt);
    free(path);
    harness_rmdir(dir);
}

static void
count_conflict(const char *msg, void *ctx)
{
    assert_non_null(strstr(msg, "conflict"));
    (*(int *)ctx)++;
}

static void
test_merge_basic(void **state)
{
    (void)state;
    merge_env e;
    ist_merge_summary sum;
    ist_error err;
    /* a byte order mark and CRLF line ends in both files */
    env_open(&e, "\xef\xbb\xbf# seeds\r\nkettle\thervidor\r\nblue azul\r\n");
    char *r = env_file(&e, "r.tsv",
                       "\xef\xbb\xbf# header\r\n"
                       "decision\tsource\tcandidate\tplace\r\n"
                       "accept\tlamp\tlámpara\t1\r\n"
                       "REJECT\tlamp\tluz\t2\r\n"
                       "use taza\tmug\tvaso\t1\r\n"
                       "\tspoon\tcuchara\t1\r\n"
                       "accept\tkettle\thervidor\t1\r\n"
                       "Accept\tbowl\tcuenco\t1\r\n"
                       "use plato\tplate\tplato\t1\r\n"
                       "accept\tlamp\tlámpara\t1\r\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, NULL, e.out, &sum,
                                       &err), IST_OK);
    assert_int_equal(sum.seed_pairs, 2);
    assert_int_equal(sum.rows, 8);
    assert_int_equal(sum.accepted, 5);    /* incl. "use plato" for plato */
    assert_int_equal(sum.corrected, 1);
    assert_int_equal(sum.rejected, 1);
    assert_int_equal(sum.undecided, 1);
    assert_int_equal(sum.duplicates, 2);  /* kettle (seed), lamp (twice) */
    assert_int_equal(sum.conflicts, 0);
    assert_int_equal(sum.added, 4);
    char *text = slurp(e.out), want[1024];
    snprintf(want, sizeof want,
             "# seeds\nkettle\thervidor\nblue azul\n"
             "# added after review (isthmus merge-pairs) from: %s\n"
             "lamp\tlámpara\nmug\ttaza\nbowl\tcuenco\nplate\tplato\n", r);
    assert_string_equal(text, want);
    free(text);
    /* the output is a pair file again */
    ist_pairs *pp;
    assert_int_equal(ist_pairs_read(e.out, &pp, &err), IST_OK);
    assert_int_equal(ist_pairs_count(pp), 6);
    ist_pairs_free(pp);
    free(r);
    env_close(&e);
}

static void
test_merge_errors(void **state)
{
    (void)state;
    merge_env e;
    ist_merge_summary sum;
    ist_error err;
    env_open(&e, "kettle\thervidor\n");

    /* an unknown decision word names file and line; nothing is written */
    char *r = env_file(&e, "typo.tsv", HDR "accept\tlamp\tlámpara\t1\n"
                                           "acept\tmug\ttaza\t1\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, NULL, e.out, &sum,
                                       &err), IST_ERR_FORMAT);
    assert_string_equal(err.file, r);
    assert_int_equal(err.line, 4);
    assert_non_null(strstr(err.msg, "found 'acept'"));
    assert_false(exists(e.out));
    free(r);

    /* "use" without a word */
    r = env_file(&e, "use.tsv", HDR "use \tmug\ttaza\t1\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, NULL, e.out, &sum,
                                       &err), IST_ERR_FORMAT);
    assert_int_equal(err.line, 3);
    assert_false(exists(e.out));
    free(r);

    /* no header line */
    r = env_file(&e, "nohdr.tsv", "# only a comment\naccept\tlamp\tlámpara\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, NULL, e.out, &sum,
                                       &err), IST_ERR_FORMAT);
    assert_int_equal(err.line, 2);
    assert_non_null(strstr(err.msg, "decision, source and candidate"));
    assert_false(exists(e.out));
    free(r);

    /* a row without its candidate column */
    r = env_file(&e, "short.tsv", HDR "accept\tlamp\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, NULL, e.out, &sum,
                                       &err), IST_ERR_FORMAT);
    assert_int_equal(err.line, 3);
    assert_false(exists(e.out));
    free(r);

    /* bytes that are not UTF-8, a NUL byte, a source word a pair file would read as a
     * comment: each names its line */
    static const struct {
        const char *text;
        size_t len;
        const char *msg;
    } bad[] = {
#define BAD_UTF8 HDR "accept\tlamp\tl\xe1mpara\t1\n"
#define BAD_NUL HDR "accept\tlamp\0\tluz\t1\n"
#define BAD_HASH HDR "accept\t#sale\toferta\t1\n"
        {BAD_UTF8, sizeof BAD_UTF8 - 1, "invalid UTF-8 at byte 14"},
        {BAD_NUL, sizeof BAD_NUL - 1, "NUL byte"},
        {BAD_HASH, sizeof BAD_HASH - 1, "starts with '#'"},
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        r = harness_path(e.dir, "bad.tsv");
        harness_write(r, bad[i].text, bad[i].len);
        assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, NULL, e.out,
                                           &sum, &err), IST_ERR_FORMAT);
        assert_int_equal(err.line, 3);
        assert_non_null(strstr(err.msg, bad[i].msg));
        assert_false(exists(e.out));
        free(r);
    }

    /* a missing reviewed file */
    char *missing = harness_path(e.dir, "absent.tsv");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&missing, 1, NULL, e.out,
                                       &sum, &err), IST_ERR_IO);
    assert_false(exists(e.out));
    free(missing);
    env_close(&e);
}

static void
test_merge_conflicts(void **state)
{
    (void)state;
    merge_env e;
    ist_merge_summary sum;
    ist_merge_opts mo;
    ist_error err;
    int calls = 0;
    env_open(&e, "kettle\thervidor\n");
    ist_merge_opts_init(&mo);
    mo.on_conflict = count_conflict;
    mo.ctx = &calls;

    /* a file contradicting itself: accepted on line 3, rejected on line 5 */
    char *r = env_file(&e, "self.tsv", HDR "accept\tlamp\tlámpara\t1\n"
                                           "accept\tmug\ttaza\t1\n"
                                           "reject\tlamp\tlámpara\t1\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, &mo, e.out, &sum,
                                       &err), IST_ERR_INVALID);
    assert_int_equal(sum.conflicts, 1);
    assert_int_equal(calls, 1);
    assert_int_equal(err.line, 5);
    assert_non_null(strstr(err.msg, "self.tsv:3"));
    assert_false(exists(e.out));

    /* with skip_conflicts the pair is left out and the rest written */
    mo.skip_conflicts = true;
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, &mo, e.out, &sum,
                                       &err), IST_OK);
    assert_int_equal(sum.conflicts, 1);
    assert_int_equal(sum.added, 1);
    char *text = slurp(e.out);
    assert_null(strstr(text, "lámpara"));
    assert_non_null(strstr(text, "mug\ttaza\n"));
    free(text);
    unlink(e.out);
    free(r);
    mo.skip_conflicts = false;

    /* rejecting a seed pair is a conflict */
    calls = 0;
    r = env_file(&e, "seedrej.tsv", HDR "reject\tkettle\thervidor\t1\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&r, 1, &mo, e.out, &sum,
                                       &err), IST_ERR_INVALID);
    assert_non_null(strstr(err.msg, "seed list"));
    assert_int_equal(calls, 1);
    free(r);

    /* two files giving one source word two targets: fine by default, a conflict
     * with one_target (also against the seed list) */
    char *two[2];
    two[0] = env_file(&e, "a.tsv", HDR "accept\tlamp\tlámpara\t1\n");
    two[1] = env_file(&e, "b.tsv", HDR "use luz\tlamp\tlámpara\t1\n"
                                       "accept\tkettle\ttetera\t1\n");
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)two, 2, &mo, e.out, &sum,
                                       &err), IST_OK);
    assert_int_equal(sum.added, 3);
    assert_int_equal(sum.corrected, 1);
    unlink(e.out);
    calls = 0;
    mo.one_target = true;
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)two, 2, &mo, e.out, &sum,
                                       &err), IST_ERR_INVALID);
    assert_int_equal(sum.conflicts, 2);
    assert_int_equal(calls, 2);
    assert_string_equal(err.file, two[1]);
    assert_int_equal(err.line, 3);
    assert_non_null(strstr(err.msg, "a.tsv:3"));
    assert_non_null(strstr(err.msg, "2 conflicts"));
    assert_false(exists(e.out));
    free(two[0]);
    free(two[1]);
    env_close(&e);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_filters),
        cmocka_unit_test(test_variants_by_character),
        cmocka_unit_test(test_write_same_block),
        cmocka_unit_test(test_merge_basic),
        cmocka_unit_test(test_merge_errors),
        cmocka_unit_test(test_merge_conflicts),
    };
    if (ist_testing_fault_injection_enabled()) {
        /* as before the split: the filter tests are left out of a fault-injection build */
        const struct CMUnitTest all[] = {
            cmocka_unit_test(test_merge_basic),
            cmocka_unit_test(test_merge_errors),
            cmocka_unit_test(test_merge_conflicts),
        };
        HARNESS_RUN("review", all);
    }
    HARNESS_RUN("review", tests);
}
