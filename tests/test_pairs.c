/* test_pairs.c - word lists: parsing, coverage, split, leakage, identical strings. */
#include "harness.h"

#include <isthmus/isthmus.h>
#include <isthmus/testing.h>

static ist_store *
store_of(const char *const *words, const uint64_t *counts, size_t n)
{
    ist_store *s;
    ist_error err;
    assert_int_equal(ist_store_new(n, 4, &s, &err), IST_OK);
    for (size_t i = 0; i < n; i++) {
        float *r = ist_store_row_mut(s, i);
        r[i % 4] = 1;
        assert_int_equal(ist_store_set_word(s, i, words[i], counts ? counts[i] : 0, &err),
                         IST_OK);
    }
    return s;
}

static ist_pairs *
read_text(const char *text, ist_status want, ist_error *err)
{
    char *dir = harness_tmpdir(), *path = harness_path(dir, "pairs.txt");
    ist_pairs *p = NULL;
    harness_write(path, text, strlen(text));
    assert_int_equal(ist_pairs_read(path, &p, err), want);
    free(path);
    harness_rmdir(dir);
    return p;
}

static void
test_parse_edge_cases(void **state)
{
    (void)state;
    ist_error err;
    /* BOM, CRLF, comments (also indented), blank lines, tab and space separation,
     * runs of separators, several gold targets for one source */
    ist_pairs *p = read_text("\xef\xbb\xbf" "casa\thouse\r\n"
                             "# a comment\n"
                             "\n"
                             "   \t \n"
                             "  # indented comment\n"
                             "perro dog\n"
                             "perro  \t hound\r\n"
                             "niño\tchild   \n"
                             "\xc3\xb1" "u gnu",
                             IST_OK, &err);
    assert_int_equal(ist_pairs_count(p), 5);
    assert_string_equal(ist_pairs_source(p, 0), "casa");
    assert_string_equal(ist_pairs_target(p, 0), "house");
    assert_int_equal(ist_pairs_line(p, 0), 1);
    assert_string_equal(ist_pairs_target(p, 2), "hound");
    assert_int_equal(ist_pairs_line(p, 2), 7);
    assert_string_equal(ist_pairs_source(p, 3), "niño");
    assert_string_equal(ist_pairs_target(p, 3), "child");
    assert_string_equal(ist_pairs_source(p, 4), "ñu");   /* last line without newline */
    ist_pairs_free(p);

    p = read_text("uno one\ndos\ntres three\n", IST_ERR_FORMAT, &err);
    assert_null(p);
    assert_int_equal(err.line, 2);
    assert_non_null(strstr(err.file, "pairs.txt"));
    assert_non_null(strstr(err.msg, "found 1 word"));
    p = read_text("uno one\ndos two deux\n", IST_ERR_FORMAT, &err);
    assert_int_equal(err.line, 2);
    assert_non_null(strstr(err.msg, "found 3 words"));
    p = read_text("uno one\ncaf\xe9 coffee\n", IST_ERR_FORMAT, &err);   /* Latin-1 byte */
    assert_int_equal(err.line, 2);
    assert_non_null(strstr(err.msg, "UTF-8"));
    p = read_text("a b\n\xed\xa0\x80 x\n", IST_ERR_FORMAT, &err);   /* encoded surrogate */
    assert_int_equal(err.line, 2);
    p = read_text("a b\n\xc0\xaf x\n", IST_ERR_FORMAT, &err);       /* overlong '/' */
    assert_int_equal(err.line, 2);
    ist_pairs *q = NULL;
    assert_int_equal(ist_pairs_read("/nonexistent/dir/p.txt", &q, &err), IST_ERR_IO);
}

static void
test_coverage_counts(void **state)
{
    (void)state;
    static const char *const sw[] = {"casa", "perro", "gato", "agua"};
    static const char *const tw[] = {"house", "dog", "cat", "hound"};
    ist_store *src = store_of(sw, NULL, 4), *tgt = store_of(tw, NULL, 4);
    ist_pairs_coverage c;
    ist_error err;
    ist_pairs *p = read_text("casa house\n"
                             "perro dog\n"
                             "perro hound\n"
                             "perro dog\n"          /* duplicate */
                             "gato kitty\n"         /* target missing */
                             "raton mouse\n"        /* both missing */
                             "sol cat\n"            /* source missing */
                             "luna moon\n",         /* both missing */
                             IST_OK, &err);
    assert_int_equal(ist_pairs_resolve(p, src, tgt, &c, &err), IST_OK);
    assert_int_equal(c.read, 8);
    assert_int_equal(c.kept, 3);
    assert_int_equal(c.duplicates, 1);
    assert_int_equal(c.missing_target, 1);
    assert_int_equal(c.missing_source, 1);
    assert_int_equal(c.missing_both, 2);
    assert_int_equal(c.sources_read, 6);   /* casa perro gato raton sol luna */
    assert_int_equal(c.sources_kept, 2);
    assert_true(c.source_exact && c.target_exact);   /* in-memory stores carry no text options */
    assert_int_equal(ist_pairs_kept(p), 3);
    assert_int_equal(ist_pairs_source_row(p, 1), 1);
    assert_int_equal(ist_pairs_target_row(p, 2), 3);
    assert_int_equal(ist_pairs_source_row(p, 3), -1);   /* the duplicate is not kept */
    assert_int_equal(ist_pairs_source_row(p, 4), -1);
    ist_pairs_free(p);
    ist_store_free(src);
    ist_store_free(tgt);
}

static ist_pairs *
numbered(size_t n, bool reversed)
{
    ist_pairs *p;
    ist_error err;
    char s[32], t[32];
    assert_int_equal(ist_pairs_new(&p, &err), IST_OK);
    for (size_t a = 0; a < n; a++) {
        size_t i = reversed ? n - 1 - a : a;
        for (int g = 0; g < 2; g++) {   /* two gold targets per source */
            snprintf(s, sizeof s, "src%zu", i);
            snprintf(t, sizeof t, "tgt%zu_%d", i, reversed ? 1 - g : g);
            assert_int_equal(ist_pairs_add(p, s, t, &err), IST_OK);
        }
    }
    return p;
}

static void
test_split_deterministic(void **state)
{
    (void)state;
    ist_pairs *p = numbered(300, false), *r = numbered(300, true);
    ist_pairs *s1, *t1, *s2, *t2, *s3, *t3;
    ist_error err;
    const char *shared[4];

    assert_int_equal(ist_pairs_split(p, 1.0 / 3, 11, &s1, &t1, &err), IST_OK);
    assert_int_equal(ist_pairs_split(r, 1.0 / 3, 11, &s2, &t2, &err), IST_OK);
    assert_int_equal(ist_pairs_split(p, 1.0 / 3, 12, &s3, &t3, &err), IST_OK);
    /* exactly one third of the 300 source words, each with both its targets */
    assert_int_equal(ist_pairs_count(t1), 200);
    assert_int_equal(ist_pairs_count(s1), 400);
    /* the same seed gives the same parts whatever the line order */
    uint64_t a, b;
    size_t n;
    assert_int_equal(ist_pairs_checksum(t1, &a, &err), IST_OK);
    assert_int_equal(ist_pairs_checksum(t2, &b, &err), IST_OK);
    assert_int_equal(a, b);
    assert_int_equal(ist_pairs_sources_hash(t1, &a, &err), IST_OK);
    assert_int_equal(ist_pairs_sources_hash(t2, &b, &err), IST_OK);
    assert_int_equal(a, b);
    assert_int_equal(ist_pairs_checksum(s1, &a, &err), IST_OK);
    assert_int_equal(ist_pairs_checksum(s2, &b, &err), IST_OK);
    assert_int_equal(a, b);
    /* another seed, another split */
    assert_int_equal(ist_pairs_sources_hash(t1, &a, &err), IST_OK);
    assert_int_equal(ist_pairs_sources_hash(t3, &b, &err), IST_OK);
    assert_true(a != b);
    /* no source word on both sides */
    assert_int_equal(ist_pairs_overlap(s1, t1, shared, 4, &n, &err), IST_OK);
    assert_int_equal(n, 0);
    assert_int_equal(ist_pairs_overlap(s3, t3, shared, 4, &n, &err), IST_OK);
    assert_int_equal(n, 0);
    ist_pairs *bad;
    assert_int_equal(ist_pairs_split(p, 1.5, 1, &bad, &bad, &err), IST_ERR_INVALID);
    ist_pairs_free(s1), ist_pairs_free(t1), ist_pairs_free(s2), ist_pairs_free(t2);
    ist_pairs_free(s3), ist_pairs_free(t3), ist_pairs_free(p), ist_pairs_free(r);
}

static void
test_leakage_listed(void **state)
{
    (void)state;
    ist_pairs *seed, *test;
    ist_error err;
    const char *shared[2];

    assert_int_equal(ist_pairs_new(&seed, &err), IST_OK);
    assert_int_equal(ist_pairs_new(&test, &err), IST_OK);
    ist_pairs_add(seed, "uno", "one", &err);
    ist_pairs_add(seed, "dos", "two", &err);
    ist_pairs_add(seed, "tres", "three", &err);
    ist_pairs_add(test, "cuatro", "four", &err);
    ist_pairs_add(test, "tres", "third", &err);     /* same source, other target: still a leak */
    ist_pairs_add(test, "uno", "one", &err);
    ist_pairs_add(test, "tres", "three", &err);
    ist_pairs_add(test, "dos", "two", &err);
    size_t n;
    assert_int_equal(ist_pairs_overlap(seed, test, shared, 2, &n, &err), IST_OK);
    assert_int_equal(n, 3);
    assert_string_equal(shared[0], "tres");   /* in the test list's order, first two */
    assert_string_equal(shared[1], "uno");
    ist_pairs_free(seed);
    ist_pairs_free(test);
}

static void
test_identical_seeds(void **state)
{
    (void)state;
    static const char *const sw[] = {"the", "tk-500", "500ml", "Tillwick", "mesa", "rare7",
                                     "17.99", "4493"};
    static const uint64_t sc[] = {900, 80, 60, 40, 30, 2, 1, 1};
    static const char *const tw[] = {"de", "500ml", "tk-500", "mesa", "Tillwick", "rare7",
                                     "17.99", "4493"};
    static const uint64_t tc[] = {950, 70, 65, 50, 45, 3, 1, 1};
    ist_store *src = store_of(sw, sc, 8), *tgt = store_of(tw, tc, 8);
    ist_pairs *p;
    ist_error err;

    assert_int_equal(ist_pairs_identical(src, tgt, 5, false, &p, &err), IST_OK);
    assert_int_equal(ist_pairs_count(p), 4);   /* rare7 is under the floor on both sides */
    assert_string_equal(ist_pairs_source(p, 0), "tk-500");
    assert_int_equal(ist_pairs_target_row(p, 0), 2);
    assert_string_equal(ist_pairs_source(p, 3), "mesa");
    assert_int_equal(ist_pairs_kept(p), 4);
    ist_pairs_free(p);
    assert_int_equal(ist_pairs_identical(src, tgt, 5, true, &p, &err), IST_OK);
    assert_int_equal(ist_pairs_count(p), 3);   /* mesa has neither digit nor capital */
    assert_string_equal(ist_pairs_source(p, 2), "Tillwick");
    ist_pairs_free(p);
    assert_int_equal(ist_pairs_identical(src, tgt, 1, true, &p, &err), IST_OK);
    /* rare7 passes a floor of 1; the price and the order number are not marked */
    assert_int_equal(ist_pairs_count(p), 4);
    ist_pairs_free(p);
    assert_int_equal(ist_pairs_identical(src, tgt, 1, false, &p, &err), IST_OK);
    assert_int_equal(ist_pairs_count(p), 7);
    ist_pairs_free(p);
    ist_store_free(src);
    ist_store_free(tgt);
    /* after case folding no word has a capital: codes and sizes are still marked,
     * prices and plain words are not */
    static const char *const fw[] = {"tw-4410", "16,99", "tillwick", "500ml",
                                     "\xc3\xa9t\xc3\xa9" "3", "mesa"};
    src = store_of(fw, NULL, 6);
    tgt = store_of(fw, NULL, 6);
    assert_int_equal(ist_pairs_identical(src, tgt, 1, true, &p, &err), IST_OK);
    assert_int_equal(ist_pairs_count(p), 3);
    assert_string_equal(ist_pairs_source(p, 0), "tw-4410");
    assert_string_equal(ist_pairs_source(p, 1), "500ml");
    ist_pairs_free(p);
    ist_store_free(src);
    ist_store_free(tgt);
}

static void
test_normalised_like_vocabulary(void **state)
{
    (void)state;
    static const char *const sw[] = {"casa", "niño", "ﬁn"};
    static const char *const tw[] = {"house", "child", "end"};
    ist_store *src = store_of(sw, NULL, 3), *tgt = store_of(tw, NULL, 3);
    ist_pairs_coverage c;
    ist_error err;
    ptrdiff_t row;

    /* the source side says how its vocabulary was normalised (NFKC + case folding,
     * UAX #15); the target side says nothing and is matched exactly */
    assert_int_equal(ist_store_set_provenance(src,
                         "{\"kind\":\"test\",\"text\":{\"nfkc\":true,\"casefold\":true,"
                         "\"strip_marks\":false,\"mask_digits\":false,\"strict_utf8\":false}}",
                         &err),
                     IST_OK);
    ist_pairs *p = read_text("CASA house\n"
                             "Nin\xcc\x83o child\n"     /* n + combining tilde: NFKC composes */
                             "fin end\n"                  /* the vocabulary keeps U+FB01 */
                             "casa HOUSE\n",              /* target side exact: missing */
                             IST_OK, &err);
    assert_int_equal(ist_pairs_resolve(p, src, tgt, &c, &err), IST_OK);
    assert_false(c.source_exact);
    assert_true(c.target_exact);
    assert_string_equal(ist_pairs_source(p, 0), "casa");
    assert_string_equal(ist_pairs_source(p, 1), "niño");
    assert_int_equal(ist_pairs_source_row(p, 1), 1);
    assert_int_equal(c.kept, 2);
    assert_int_equal(c.missing_source, 1);   /* "fin" is not the ligature word */
    assert_int_equal(c.missing_target, 1);   /* HOUSE */
    assert_int_equal(ist_pairs_find_word(src, "NIÑO", &row, &err), IST_OK);
    assert_int_equal(row, 1);
    ist_pairs_free(p);
    ist_store_free(src);
    ist_store_free(tgt);
}

/* A vocabulary prepared with --numbers=mask holds 0.00 for every price: pair words
 * are masked the same way, codes are not. */
static void
test_numbers_masked_like_vocabulary(void **state)
{
    (void)state;
    static const char *const sw[] = {"0.00", "tw-4410", "00cm"};
    static const char *const tw[] = {"0,00", "tw-4410", "00cm"};
    ist_store *src = store_of(sw, NULL, 3), *tgt = store_of(tw, NULL, 3);
    static const char prov[] = "{\"text\":{\"nfkc\":true,\"casefold\":true,"
                               "\"numbers\":\"mask\"}}";
    ist_pairs_coverage c;
    ist_error err;
    ptrdiff_t row;

    assert_int_equal(ist_store_set_provenance(src, prov, &err), IST_OK);
    assert_int_equal(ist_store_set_provenance(tgt, prov, &err), IST_OK);
    ist_pairs *p = read_text("6.39 7,00\nTW-4410 tw-4410\n40cm 40cm\ntw-9999 tw-9999\n", IST_OK,
                             &err);
    assert_int_equal(ist_pairs_resolve(p, src, tgt, &c, &err), IST_OK);
    assert_int_equal(c.kept, 3);
    assert_int_equal(c.missing_both, 1);   /* a code keeps its digits */
    assert_int_equal(ist_pairs_find_word(src, "9.99", &row, &err), IST_OK);
    assert_int_equal(row, 0);
    ist_pairs_free(p);
    ist_store_free(src);
    ist_store_free(tgt);
}

/* Every allocation failure in reading, resolving, splitting and saving is reported
 * (effective in a -Dfault_injection=true build; elsewhere the first round succeeds). */
static void
test_allocation_failures(void **state)
{
    (void)state;
    static const char *const sw[] = {"casa", "perro", "gato", "agua"};
    static const char *const tw[] = {"house", "dog", "cat", "water"};
    ist_store *src = store_of(sw, NULL, 4), *tgt = store_of(tw, NULL, 4);
    char *dir = harness_tmpdir(), path[512], out[512];
    snprintf(path, sizeof path, "%s/p.txt", dir);
    snprintf(out, sizeof out, "%s/o.txt", dir);
    static const char text[] = "casa house\nperro dog\ngato cat\nagua water\nsol sun\n";
    ist_error err;
    harness_write(path, text, sizeof text - 1);
    for (long n = 0;; n++) {
        ist_pairs *p = NULL, *a = NULL, *b = NULL, *id = NULL;
        uint64_t h;
        size_t shared;
        ist_testing_fail_alloc_after(n);
        ist_status rc = ist_pairs_read(path, &p, &err);
        if (rc == IST_OK)
            rc = ist_pairs_resolve(p, src, tgt, NULL, &err);
        if (rc == IST_OK)
            rc = ist_pairs_split(p, 0.5, 3, &a, &b, &err);
        if (rc == IST_OK)
            rc = ist_pairs_overlap(a, b, NULL, 0, &shared, &err);
        if (rc == IST_OK)
            rc = ist_pairs_sources_hash(b, &h, &err);
        if (rc == IST_OK)
            rc = ist_pairs_identical(src, tgt, 0, false, &id, &err);
        if (rc == IST_OK)
            rc = ist_pairs_save(p, out, &err);
        ist_testing_fail_alloc_after(-1);
        ist_pairs_free(p), ist_pairs_free(a), ist_pairs_free(b), ist_pairs_free(id);
        if (rc == IST_OK) {
            assert_true(!ist_testing_fault_injection_enabled() || n > 10);
            break;
        }
        assert_int_equal(rc, IST_ERR_NOMEM);
    }
    harness_rmdir(dir);
    ist_store_free(src);
    ist_store_free(tgt);
}

/* A list read from a file is saved so that it reads back with the same pairs, even when
 * its first word opens with '{' (behind a comment when read): saved bare, that file would
 * be taken for JSON. Found by fuzz_pairs. */
static void
test_saved_list_reads_back(void **state)
{
    (void)state;
    ist_error err;
    char *dir = harness_tmpdir(), *out = harness_path(dir, "saved.pairs");
    ist_pairs *p = read_text("# made by hand\n{ brace\nuno one\n", IST_OK, &err), *q = NULL;
    assert_int_equal(ist_pairs_count(p), 2);
    assert_int_equal(ist_pairs_save(p, out, &err), IST_OK);
    assert_int_equal(ist_pairs_read(out, &q, &err), IST_OK);
    assert_int_equal(ist_pairs_count(q), 2);
    assert_string_equal(ist_pairs_source(q, 0), "{");
    assert_string_equal(ist_pairs_target(q, 0), "brace");
    assert_string_equal(ist_pairs_source(q, 1), "uno");
    ist_pairs_free(q);
    ist_pairs_free(p);
    free(out);
    harness_rmdir(dir);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_parse_edge_cases),
        cmocka_unit_test(test_coverage_counts),
        cmocka_unit_test(test_split_deterministic),
        cmocka_unit_test(test_leakage_listed),
        cmocka_unit_test(test_identical_seeds),
        cmocka_unit_test(test_normalised_like_vocabulary),
        cmocka_unit_test(test_numbers_masked_like_vocabulary),
        cmocka_unit_test(test_saved_list_reads_back),
        cmocka_unit_test(test_allocation_failures),
    };
    HARNESS_RUN("pairs", tests);
}
