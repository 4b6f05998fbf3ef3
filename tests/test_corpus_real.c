/* test_corpus_real.c - preparation of the open Bible texts (suite slow).
 *
 * Data: Debian's sword-text-kjv (English, King James Version) and sword-text-sparv
 * (Spanish, Reina-Valera 1909), extracted one verse a line by tests/fetch-real-data.sh
 * (which the test runs). The figures are measured on these texts with the default
 * options on 2026-12-01 and are exact: the texts and the rules are fixed, so any change
 * means the normalisation, segmentation or counting changed. Exits 77 when the Debian
 * packages are missing. */
#include "harness.h"

#include <time.h>

#include <zlib.h>

#include <isthmus/corpus.h>

static const char *data_dir;

typedef struct expect {
    const char *file;
    uint64_t lines, tokens_in, tokens_kept, types_before, types_kept;
    const char *top[5];
    uint64_t dups_with_dedup;
} expect;

/* measured 2026-12-01 (see the file comment) */
static const expect english = {"en.txt", 31102, 791521, 778534, 12696, 5361,
                               {"the", "and", "of", "to", "that"}, 268};
static const expect spanish = {"es.txt", 31084, 703820, 670178, 28400, 7545,
                               {"y", "de", "que", "\xc3\xa1", "la"}, 227};

static ist_corpus *
build(const char *path, bool dedup)
{
    ist_corpus_opts o;
    ist_corpus *c = NULL;
    ist_error err;
    const char *paths[] = {path};

    ist_corpus_opts_init(&o);
    o.dedup_lines = dedup;
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_OK);
    return c;
}

static void
check_language(const expect *e)
{
    char *path = harness_path(data_dir, e->file);
    ist_corpus_stats st;
    double t0 = (double)clock();
    ist_corpus *c = build(path, false);
    double secs = ((double)clock() - t0) / CLOCKS_PER_SEC;
    const ist_vocab *v = ist_corpus_vocab(c);

    ist_corpus_source src;
    ist_corpus_stats_get(c, &st);
    assert_int_equal(ist_corpus_source_get(c, 0, &src, NULL), IST_OK);
    printf("# %s: %llu lines, %llu tokens, %llu types, %zu kept (%.1f MB/s of CPU time)\n",
           e->file, (unsigned long long)st.lines, (unsigned long long)st.tokens_in,
           (unsigned long long)st.types_before_prune, ist_vocab_size(v),
           secs > 0 ? (double)src.text_bytes / 1e6 / secs : 0.0);
    assert_int_equal(st.lines, e->lines);
    assert_int_equal(st.tokens_in, e->tokens_in);
    assert_int_equal(st.tokens_kept, e->tokens_kept);
    assert_int_equal(st.types_before_prune, e->types_before);
    assert_int_equal(ist_vocab_size(v), e->types_kept);
    assert_int_equal(st.replaced_utf8, 0);
    for (uint32_t i = 0; i < 5; i++)
        assert_string_equal(ist_vocab_word(v, i), e->top[i]);
    size_t n, eol = 0;
    const uint32_t *ids = ist_corpus_ids(c, &n);
    for (size_t i = 0; i < n; i++)
        eol += ids[i] == IST_CORPUS_EOL;
    assert_int_equal(eol, e->lines);
    assert_int_equal(n, e->tokens_kept + e->lines);
    ist_corpus_free(c);

    c = build(path, true);
    ist_corpus_stats_get(c, &st);
    assert_int_equal(st.lines_dropped_dup, e->dups_with_dedup);
    ist_corpus_free(c);
    free(path);
}

static void
english_bible(void **state)
{
    (void)state;
    check_language(&english);
}

static void
spanish_bible(void **state)
{
    (void)state;
    check_language(&spanish);
}

/* gzip and plain give the same stream, and a saved corpus opens to the same stream */
static void
gzip_and_file_round_trip(void **state)
{
    char *path = harness_path(data_dir, "es.txt");
    char *dir = harness_tmpdir(), *gz = harness_path(dir, "es.txt.gz");
    char *prep = harness_path(dir, "es.prep"), buf[1 << 16];
    FILE *in = fopen(path, "rb");
    gzFile g = gzopen(gz, "wb6");
    size_t k, n1, n2, n3;
    ist_corpus *d = NULL;

    (void)state;
    assert_non_null(in);
    assert_non_null(g);
    while ((k = fread(buf, 1, sizeof buf, in)) > 0)
        assert_int_equal(gzwrite(g, buf, (unsigned)k), (int)k);
    fclose(in);
    assert_int_equal(gzclose(g), Z_OK);
    ist_corpus *a = build(path, false), *b = build(gz, false);
    const uint32_t *ia = ist_corpus_ids(a, &n1), *ib = ist_corpus_ids(b, &n2);
    assert_int_equal(n1, n2);
    assert_memory_equal(ia, ib, n1 * sizeof *ia);
    assert_int_equal(ist_corpus_save(a, prep, NULL), IST_OK);
    assert_int_equal(ist_corpus_open(prep, &d, NULL), IST_OK);
    const uint32_t *id = ist_corpus_ids(d, &n3);
    assert_int_equal(n1, n3);
    assert_memory_equal(ia, id, n1 * sizeof *ia);
    ist_corpus_free(a);
    ist_corpus_free(b);
    ist_corpus_free(d);
    free(path);
    free(gz);
    free(prep);
    harness_rmdir(dir);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(english_bible),
        cmocka_unit_test(spanish_bible),
        cmocka_unit_test(gzip_and_file_round_trip),
    };
    const char *script = getenv("ISTHMUS_FETCH_REAL_DATA");
    char cmd[2048];

    data_dir = getenv("ISTHMUS_REAL_DATA_DIR");
    if (!script || !data_dir) {
        printf("1..0 # SKIP ISTHMUS_FETCH_REAL_DATA and ISTHMUS_REAL_DATA_DIR not set\n");
        return 77;
    }
    snprintf(cmd, sizeof cmd, "sh '%s' '%s' >/dev/null", script, data_dir);
    if (system(cmd) != 0) {
        printf("1..0 # SKIP the Debian Bible packages are missing (see %s)\n", script);
        return 77;
    }
    HARNESS_RUN("corpus_real", tests);
}
