/* test_reliab.c - lying headers and damaged metadata in the files isthmus reads (map file,
 * prepared corpus): each is refused with a message naming the file and what is wrong,
 * before any allocation sized by the lie. Checksums are recomputed after each edit so the
 * size checks behind them are reached. Inputs the fuzzers found are replayed here too. */
#include <math.h>

#include <isthmus/align.h>
#include <isthmus/linalg.h>
#include <isthmus/norm.h>
#include <isthmus/matrix.h>
#include <isthmus/cancel.h>
#include <isthmus/metrics.h>
#include <isthmus/result.h>
#include <isthmus/corpus.h>
#include <isthmus/pairs.h>
#include <isthmus/store.h>

#include <zlib.h>

#include "harness.h"
#include "hash_int.h"

static char *dir;

static int
setup(void **state)
{
    (void)state;
    dir = harness_tmpdir();
    return 0;
}

static int
teardown(void **state)
{
    (void)state;
    harness_rmdir(dir);
    return 0;
}

static unsigned char *
read_file(const char *path, size_t *n)
{
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    assert_int_equal(fseek(f, 0, SEEK_END), 0);
    long len = ftell(f);
    assert_true(len >= 0);
    rewind(f);
    unsigned char *b = malloc((size_t)len + 1);
    assert_non_null(b);
    assert_int_equal(fread(b, 1, (size_t)len, f), (size_t)len);
    fclose(f);
    *n = (size_t)len;
    return b;
}

static void
put64(unsigned char *p, uint64_t v)
{
    for (int i = 0; i < 8; i++)
        p[i] = (unsigned char)(v >> (8 * i));
}

/* ---- map file ---------------------------------------------------------------- */

/* A 4-dimensional map fitted on 6 words whose target rows are the source rows rotated. */
static char *
make_map(void)
{
    static const char *const words[] = {"cup", "mug", "lid", "jar", "pan", "pot"};
    ist_store *src = NULL, *tgt = NULL;
    ist_pairs *seeds = NULL;
    ist_map *map = NULL;
    ist_align_opts ao;
    uint64_t rs = 7;
    ist_error err;

    assert_int_equal(ist_store_new(6, 4, &src, &err), IST_OK);
    assert_int_equal(ist_store_new(6, 4, &tgt, &err), IST_OK);
    assert_int_equal(ist_pairs_new(&seeds, &err), IST_OK);
    for (size_t i = 0; i < 6; i++) {
        float *a = ist_store_row_mut(src, i), *b = ist_store_row_mut(tgt, i);
        for (size_t j = 0; j < 4; j++)
            a[j] = harness_randf(&rs) - 0.5f;
        b[0] = -a[1], b[1] = a[0], b[2] = a[3], b[3] = a[2];   /* orthogonal */
        assert_int_equal(ist_store_set_word(src, i, words[i], 10, &err), IST_OK);
        assert_int_equal(ist_store_set_word(tgt, i, words[i], 10, &err), IST_OK);
        assert_int_equal(ist_pairs_add(seeds, words[i], words[i], &err), IST_OK);
    }
    assert_int_equal(ist_pairs_resolve(seeds, src, tgt, NULL, &err), IST_OK);
    ist_align_opts_init(&ao);
    ao.refine_rounds = 1;
    ao.search.retrieve.threads = 1;
    assert_int_equal(ist_align_fit(src, tgt, seeds, &ao, &map, &err), IST_OK);
    char *p = harness_path(dir, "good.map");
    assert_int_equal(ist_map_save(map, p, &err), IST_OK);
    ist_map_free(map);
    ist_pairs_free(seeds);
    ist_store_free(src);
    ist_store_free(tgt);
    return p;
}

/* Write bytes as NAME with a freshly computed checksum and expect the load to fail with
 * a message holding want. */
static void
expect_bad_map(const char *name, unsigned char *b, size_t n, const char *want)
{
    char *p = harness_path(dir, name);
    ist_map *m = (ist_map *)1;
    ist_error e;
    char buf[700];

    put64(b + n - 8, ist_hash_bytes(b, n - 8));
    harness_write(p, b, n);
    assert_int_not_equal(ist_map_load(p, &m, &e), IST_OK);
    assert_null(m);
    ist_error_format(&e, buf, sizeof buf);
    if (!strstr(buf, want) || strncmp(buf, p, strlen(p)) != 0)
        fail_msg("%s: expected '%s' after the file name in '%s'", name, want, buf);
    free(p);
}

/* Replace the first occurrence of from by to (same length) in b. */
static void
patch(unsigned char *b, size_t n, const char *from, const char *to)
{
    size_t k = strlen(from);
    assert_int_equal(strlen(to), k);
    for (size_t i = 0; i + k <= n; i++)
        if (memcmp(b + i, from, k) == 0) {
            memcpy(b + i, to, k);
            return;
        }
    fail_msg("'%s' not found in the map file", from);
}

static void
map_lying_header(void **state)
{
    char *good = make_map();
    size_t n;
    unsigned char *b = read_file(good, &n), *c = malloc(n);
    ist_map *m = NULL;
    ist_error e;

    (void)state;
    assert_int_equal(ist_map_load(good, &m, &e), IST_OK);   /* the untouched file loads */
    ist_map_free(m);
    memcpy(c, b, n);
    c[12] = 0xa0, c[13] = 0x86, c[14] = 0x01;               /* dimension 100000 */
    expect_bad_map("dim.map", c, n, "map file sizes do not agree (dimension 100000");
    memcpy(c, b, n);
    c[12] = 0, c[13] = 0;                                    /* dimension 0 */
    expect_bad_map("dim0.map", c, n, "map file sizes do not agree (dimension 0");
    memcpy(c, b, n);
    put64(c + 16, UINT64_MAX - 8);                           /* metadata longer than anything */
    expect_bad_map("meta.map", c, n, "map file sizes do not agree");
    memcpy(c, b, n);
    c[8] = 2;
    expect_bad_map("version.map", c, n, "map file version 2, this isthmus reads version 1");
    memcpy(c, b, n);
    c[0] = 'X';
    expect_bad_map("magic.map", c, n, "expected an isthmus map file (magic ISTHMUSM)");
    /* without the checksum fix-up: any changed byte is named as damage */
    memcpy(c, b, n);
    c[n / 2] ^= 1;
    char *p = harness_path(dir, "flip.map");
    harness_write(p, c, n);
    assert_int_equal(ist_map_load(p, &m, &e), IST_ERR_FORMAT);
    assert_non_null(strstr(e.msg, "checksum does not match"));
    free(p);
    free(c);
    free(b);
    free(good);
}

/* A NaN or an infinity in the matrix or in a mean (checksum recomputed) is refused; a number
 * beyond double range in the metadata is refused by the JSON reader. */
static void
map_non_finite(void **state)
{
    char *good = make_map();
    size_t n;
    unsigned char *b = read_file(good, &n), *c = malloc(n);
    uint64_t ml;
    double nan_ = NAN, inf_ = INFINITY;

    (void)state;
    memcpy(&ml, b + 16, 8);
    size_t mat = 24 + (size_t)ml + (8 - (24 + (size_t)ml) % 8) % 8;
    memcpy(c, b, n);
    memcpy(c + mat + 8 * 5, &nan_, 8);                     /* W[1][1] */
    expect_bad_map("nan.map", c, n, "map matrix holds a number that is not finite");
    memcpy(c, b, n);
    memcpy(c + mat + 16 * 8 + 8 * 3, &inf_, 8);            /* the seed-only matrix */
    expect_bad_map("inf.map", c, n, "map matrix holds a number that is not finite");
    memcpy(c, b, n);
    memcpy(c + mat + 32 * 8, &nan_, 8);                    /* first source mean */
    expect_bad_map("mean.map", c, n, "map source mean holds a number that is not finite");
    memcpy(c, b, n);
    patch(c, n, "\"rows\": 6,\n    ", "\"rows\":1e999,\n ");
    expect_bad_map("big.map", c, n, "big.map:7: number out of range: 1e999");
    free(c);
    free(b);
    free(good);
}

/* Regression: a negative or huge count in the metadata was cast from double to size_t
 * (undefined behaviour); now it is refused. */
static void
map_bad_counts(void **state)
{
    char *good = make_map();
    size_t n;
    unsigned char *b = read_file(good, &n), *c = malloc(n);

    (void)state;
    memcpy(c, b, n);
    patch(c, n, "\"rows\": 6", "\"rows\":-6");
    expect_bad_map("rows.map", c, n, "map metadata: rows: expected a whole number");
    memcpy(c, b, n);
    patch(c, n, "\"rows\": 6,\n    ", "\"rows\":1e99,\n  ");
    expect_bad_map("rows-huge.map", c, n, "map metadata: rows: expected a whole number");
    memcpy(c, b, n);
    patch(c, n, "\"pairs\": 6", "\"pairs\":-6");
    expect_bad_map("pairs.map", c, n, "map metadata: seed pairs: expected a whole number");
    memcpy(c, b, n);
    patch(c, n, "\"neighbourhood\": 10", "\"neighbourhood\":\"x\"");
    expect_bad_map("nb.map", c, n, "map metadata: neighbourhood: expected a number");
    free(c);
    free(b);
    free(good);
}

/* ---- word-pair list ------------------------------------------------------------- */

/* Regression (found by fuzz_pairs, tests/fuzz/corpus/pairs/nul-in-word.pairs): a NUL byte
 * in a line was kept and cut the word short, so a pair could have an empty source word.
 * Control characters are now refused with the line and byte. */
static void
pairs_control_characters(void **state)
{
    static const char nul[] = "kettle\ttetera\n\0up taza\n";
    static const char bell[] = "cup\ttaza\nmug ta\aza\n";
    char *p = harness_path(dir, "nul.pairs"), *q = harness_path(dir, "bell.pairs");
    ist_pairs *l = (ist_pairs *)1;
    ist_error e;
    char buf[700];

    (void)state;
    harness_write(p, nul, sizeof nul - 1);
    assert_int_equal(ist_pairs_read(p, &l, &e), IST_ERR_FORMAT);
    assert_null(l);
    ist_error_format(&e, buf, sizeof buf);
    assert_non_null(strstr(buf, "nul.pairs:2: control character 0x00 at byte 1 of the line"));
    harness_write(q, bell, sizeof bell - 1);
    assert_int_equal(ist_pairs_read(q, &l, &e), IST_ERR_FORMAT);
    ist_error_format(&e, buf, sizeof buf);
    assert_non_null(strstr(buf, "bell.pairs:2: control character 0x07 at byte 7 of the line"));
    free(p);
    free(q);
}

/* Regression (found by fuzz_pairs, tests/fuzz/corpus/pairs/bom-on-line-2.pairs): a byte
 * order mark at the start of a later line (two lists joined with cat) stayed part of the
 * source word, which then read back differently once saved. */
static void
pairs_bom_on_later_lines(void **state)
{
    static const char text[] = "\xef\xbb\xbf" "cup\ttaza\n\xef\xbb\xbfmug\ttaza\n"
                               "  \xef\xbb\xbf lid\ttapa\r\n";
    char *p = harness_path(dir, "joined.pairs"), *q = harness_path(dir, "saved.pairs");
    ist_pairs *l = NULL, *m = NULL;
    ist_error e;

    (void)state;
    harness_write(p, text, sizeof text - 1);
    assert_int_equal(ist_pairs_read(p, &l, &e), IST_OK);
    assert_int_equal(ist_pairs_count(l), 3);
    assert_string_equal(ist_pairs_source(l, 0), "cup");
    assert_string_equal(ist_pairs_source(l, 1), "mug");
    assert_string_equal(ist_pairs_source(l, 2), "lid");
    assert_string_equal(ist_pairs_target(l, 2), "tapa");
    assert_int_equal(ist_pairs_save(l, q, &e), IST_OK);
    assert_int_equal(ist_pairs_read(q, &m, &e), IST_OK);
    assert_int_equal(ist_pairs_count(m), 3);
    for (size_t i = 0; i < 3; i++)
        assert_string_equal(ist_pairs_source(m, i), ist_pairs_source(l, i));
    ist_pairs_free(l);
    ist_pairs_free(m);
    free(p);
    free(q);
}

/* ---- every writer: full disk, missing directory, stop request ------------------------ */

typedef struct objects {
    ist_store *store;
    ist_corpus *corpus;
    ist_pairs *pairs;
    ist_map *map;
} objects;

enum { W_NATIVE, W_TEXT, W_GZIP, W_CORPUS, W_PAIRS, W_MAP, W_RESULT, W_COUNT };
static const char *const kind_name[W_COUNT] = {
    "vectors.isv", "vectors.txt", "vectors.txt.gz", "corpus.prep", "list.pairs", "m.map",
    "result.json",
};

static ist_status
write_kind(const objects *o, int kind, const char *path, ist_error *e)
{
    switch (kind) {
    case W_NATIVE: case W_TEXT: case W_GZIP:
        return ist_store_save(o->store, path, NULL, e);
    case W_CORPUS:
        return ist_corpus_save(o->corpus, path, e);
    case W_PAIRS:
        return ist_pairs_save(o->pairs, path, e);
    case W_MAP:
        return ist_map_save(o->map, path, e);
    default: {
        ist_result res;
        memset(&res, 0, sizeof res);
        res.command = (char *)"score";
        return ist_result_write(&res, path, e);
    }
    }
}

static void
make_objects(objects *o)
{
    char *txt = harness_path(dir, "c.txt"), *mp = make_map();
    const char *paths[1] = {txt};
    static const char text[] = "the blue mug\nthe red mug\nthe blue lid\n";
    ist_corpus_opts co;
    uint64_t rs = 3;
    ist_error e;

    harness_write(txt, text, sizeof text - 1);
    ist_corpus_opts_init(&co);
    co.min_count = 1;
    assert_int_equal(ist_corpus_build(paths, 1, &co, &o->corpus, &e), IST_OK);
    assert_int_equal(ist_store_new(300, 8, &o->store, &e), IST_OK);
    for (size_t i = 0; i < 300; i++) {
        char w[16];
        snprintf(w, sizeof w, "w%zu", i);
        for (size_t j = 0; j < 8; j++)
            ist_store_row_mut(o->store, i)[j] = harness_randf(&rs);
        assert_int_equal(ist_store_set_word(o->store, i, w, 300 - i, &e), IST_OK);
    }
    assert_int_equal(ist_pairs_new(&o->pairs, &e), IST_OK);
    assert_int_equal(ist_pairs_add(o->pairs, "cup", "taza", &e), IST_OK);
    assert_int_equal(ist_map_load(mp, &o->map, &e), IST_OK);
    unlink(txt);
    unlink(mp);
    free(txt);
    free(mp);
}

static void
free_objects(objects *o)
{
    ist_store_free(o->store);
    ist_corpus_free(o->corpus);
    ist_pairs_free(o->pairs);
    ist_map_free(o->map);
}

/* Each file type: on /dev/full the write fails with "cannot write (No space left on
 * device)" (IST_ERR_IO); into a missing directory it fails naming the path; with a stop
 * requested (what SIGINT/SIGTERM do through the CLI's handler; the flag is checked before
 * every buffer flush and before the final rename) it fails with IST_ERR_CANCELLED. In
 * every case the directory holds no file afterwards, not even a temporary one. */
static void
writers_leave_nothing(void **state)
{
    objects o;
    char buf[700];
    ist_error e;

    (void)state;
    make_objects(&o);
    assert_int_equal(harness_count_entries(dir), 0);
    for (int k = 0; k < W_COUNT; k++) {
        ist_status rc = write_kind(&o, k, "/dev/full", &e);
        ist_error_format(&e, buf, sizeof buf);
        if (rc != IST_ERR_IO || !strstr(buf, "/dev/full") || !strstr(buf, "No space left"))
            fail_msg("%s on /dev/full: status %d, '%s'", kind_name[k], rc, buf);

        char *sub = harness_path(dir, "missing"), *p = harness_path(sub, kind_name[k]);
        rc = write_kind(&o, k, p, &e);
        ist_error_format(&e, buf, sizeof buf);
        if (rc != IST_ERR_IO || !strstr(buf, p) || !strstr(buf, "No such file or directory"))
            fail_msg("%s in a missing directory: status %d, '%s'", kind_name[k], rc, buf);
        free(p);
        free(sub);

        p = harness_path(dir, kind_name[k]);
        ist_cancel_request();
        rc = write_kind(&o, k, p, &e);
        ist_cancel_reset();
        if (rc != IST_ERR_CANCELLED || !strstr(e.msg, "stopped on request while writing"))
            fail_msg("%s stopped: status %d, '%s'", kind_name[k], rc, e.msg);
        assert_int_equal(harness_count_entries(dir), 0);
        assert_int_equal(write_kind(&o, k, p, &e), IST_OK);   /* and without the stop: written */
        assert_int_equal(harness_count_entries(dir), 1);
        unlink(p);
        free(p);
    }
    free_objects(&o);
}

/* ---- prepared corpus ------------------------------------------------------------- */

static void
expect_bad_prep(const char *name, unsigned char *b, size_t n, const char *want)
{
    char *p = harness_path(dir, name);
    ist_corpus *c = (ist_corpus *)1;
    ist_error e;
    char buf[700];

    uLong crc = crc32(0L, Z_NULL, 0);
    crc = crc32(crc, b, (uInt)(n - 8));
    for (int i = 0; i < 4; i++)
        b[n - 8 + i] = (unsigned char)(crc >> (8 * i));
    harness_write(p, b, n);
    assert_int_not_equal(ist_corpus_open(p, &c, &e), IST_OK);
    assert_null(c);
    ist_error_format(&e, buf, sizeof buf);
    if (!strstr(buf, want) || strncmp(buf, p, strlen(p)) != 0)
        fail_msg("%s: expected '%s' after the file name in '%s'", name, want, buf);
    free(p);
}

static void
prep_lying_header(void **state)
{
    char *txt = harness_path(dir, "c.txt"), *prep = harness_path(dir, "c.prep");
    const char *paths[1] = {txt};
    static const char text[] = "the blue mug\nthe red mug\nthe blue lid\n";
    ist_corpus_opts o;
    ist_corpus *c = NULL;
    ist_error e;
    size_t n;

    (void)state;
    harness_write(txt, text, sizeof text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 1;
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &e), IST_OK);
    assert_int_equal(ist_corpus_save(c, prep, &e), IST_OK);
    ist_corpus_free(c);
    unsigned char *b = read_file(prep, &n), *d = malloc(n);
    memcpy(d, b, n);
    put64(d + 16, UINT64_MAX / 4);                 /* ids: far more than the file holds */
    expect_bad_prep("ids.prep", d, n, "section offsets out of range");
    memcpy(d, b, n);
    put64(d + 16, (n - 128) / 4 + 1);              /* ids: one more than could fit */
    expect_bad_prep("ids1.prep", d, n, "section offsets out of range");
    memcpy(d, b, n);
    put64(d + 24, 1000000);                        /* words: more than the word section */
    expect_bad_prep("words.prep", d, n, "runs past the word section");
    memcpy(d, b, n);
    put64(d + 48, UINT64_MAX - 64);                /* word section size */
    expect_bad_prep("wbytes.prep", d, n, "section offsets out of range");
    memcpy(d, b, n);
    put64(d + 64, n);                              /* provenance size */
    expect_bad_prep("meta.prep", d, n, "section offsets out of range");
    memcpy(d, b, n);
    put64(d + 72, n + 4096);                       /* whole-file size */
    expect_bad_prep("size.prep", d, n, "truncated or padded: header says");
    /* the untouched bytes, with the checksum recomputed the same way, still open */
    memcpy(d, b, n);
    char *q = harness_path(dir, "same.prep");
    harness_write(q, d, n);
    assert_int_equal(ist_corpus_open(q, &c, &e), IST_OK);
    ist_corpus_free(c);
    free(q);
    free(d);
    free(b);
    free(txt);
    free(prep);
}

/* ---- numbers reaching the maths ------------------------------------------------ */

/* A legal row of tiny numbers gets unit length (the scale factor 1e40 is out of float
 * range, so it is applied in double); a zero row stays zero; a NaN or an infinity is
 * refused naming its row. */
static void
norm_tiny_zero_and_non_finite_rows(void **state)
{
    (void)state;
    ist_matrix *m;
    ist_norm *p = NULL;
    ist_error err;

    assert_int_equal(ist_matrix_new(3, 4, &m, &err), IST_OK);
    ist_matview v = ist_matrix_view(m);
    memset(v.data, 0, v.rows * v.stride * sizeof(float));
    v.data[0] = 1e-40f;                              /* a float subnormal */
    v.data[v.stride + 1] = 3.0f, v.data[v.stride + 2] = 4.0f;
    assert_int_equal(ist_norm_fit("length", v, &p, &err), IST_OK);
    assert_true(v.data[0] == 1.0f);
    for (size_t j = 1; j < 4; j++)
        assert_true(v.data[j] == 0.0f);
    assert_true(fabsf(v.data[v.stride + 1] - 0.6f) < 1e-7f);
    for (size_t j = 0; j < 4; j++)
        assert_true(v.data[2 * v.stride + j] == 0.0f); /* the zero row is left as it is */
    ist_norm_free(p);
    v.data[2 * v.stride + 3] = NAN;
    assert_int_equal(ist_norm_fit("length,mean", v, &p, &err), IST_ERR_NUMERIC);
    assert_null(p);
    assert_non_null(strstr(err.msg, "row 2 holds a number that is not finite"));
    v.data[2 * v.stride + 3] = INFINITY;
    assert_int_equal(ist_norm_fit("length", v, &p, &err), IST_ERR_NUMERIC);
    ist_matrix_free(m);
}

/* Procrustes on a seed matrix holding NaN says so in the tool's words instead of passing
 * LAPACK's "argument 5 is invalid" on. */
static void
procrustes_non_finite_seeds(void **state)
{
    (void)state;
    ist_matrix *x, *w;
    ist_error err;

    assert_int_equal(ist_matrix_new(4, 2, &x, &err), IST_OK);
    assert_int_equal(ist_matrix_new(2, 2, &w, &err), IST_OK);
    ist_matview v = ist_matrix_view(x);
    for (size_t i = 0; i < 4; i++)
        v.data[i * v.stride] = 1.0f, v.data[i * v.stride + 1] = (float)i;
    v.data[v.stride] = NAN;
    assert_int_equal(ist_linalg_procrustes(ist_matrix_cview(x), ist_matrix_cview(x),
                                           ist_matrix_view(w), NULL, &err), IST_ERR_NUMERIC);
    assert_non_null(strstr(err.msg, "not finite"));
    assert_non_null(strstr(err.msg, "isthmus inspect"));
    assert_null(strstr(err.msg, "argument"));
    ist_matrix_free(x);
    ist_matrix_free(w);
}

/* ---- every byte of a native file flipped -------------------------------------- */

/* What a reader hands back, for comparing two opens. */
static bool
same_store(const ist_store *a, const ist_store *b, size_t *changed_numbers)
{
    if (ist_store_rows(a) != ist_store_rows(b) || ist_store_dim(a) != ist_store_dim(b) ||
        strcmp(ist_store_provenance(a), ist_store_provenance(b)) != 0)
        return false;
    *changed_numbers = 0;
    for (size_t i = 0; i < ist_store_rows(a); i++) {
        if (strcmp(ist_store_word(a, i), ist_store_word(b, i)) != 0 ||
            ist_store_count(a, i) != ist_store_count(b, i))
            return false;
        *changed_numbers += memcmp(ist_store_row(a, i), ist_store_row(b, i),
                                   ist_store_dim(a) * sizeof(float)) != 0;
    }
    return true;
}

/* The promise of docs/formats.md, tested: every byte of a small native file is flipped
 * (XOR 0xff) in turn. The verified open (what inspect, convert, align, score, lookup,
 * propose and gate use) refuses every one. The default open refuses every flip outside
 * the matrix; a flip inside it is the one documented unchecked case: the words,
 * counts and provenance are the same, and either nothing visible changed (the padding
 * of a row) or exactly one row's numbers did. */
static void
native_byte_flips(void **state)
{
    (void)state;
    static const char *const words[] = {"cup", "mug", "kettle"};
    ist_store *s, *ref, *got;
    ist_store_opts vo;
    ist_error err;
    size_t n;

    assert_int_equal(ist_store_new(3, 5, &s, &err), IST_OK);
    for (size_t i = 0; i < 3; i++) {
        for (size_t j = 0; j < 5; j++)
            ist_store_row_mut(s, i)[j] = (float)(i * 5 + j) - 6.5f;
        assert_int_equal(ist_store_set_word(s, i, words[i], 10 + i, &err), IST_OK);
    }
    assert_int_equal(ist_store_set_provenance(s, "{\"demo\":true}", &err), IST_OK);
    char *good = harness_path(dir, "good.isv"), *bad = harness_path(dir, "flip.isv");
    assert_int_equal(ist_store_save(s, good, NULL, &err), IST_OK);
    ist_store_free(s);
    unsigned char *b = read_file(good, &n);
    assert_int_equal(ist_store_open(good, NULL, &ref, &err), IST_OK);
    size_t stride = (size_t)b[32] | (size_t)b[33] << 8;      /* header field, docs/formats.md */
    size_t mbeg = 128, mend = 128 + 3 * stride * 4;
    ist_store_opts_init(&vo);
    vo.verify = true;
    size_t v_refused = 0, d_refused = 0, d_same = 0, d_one_row = 0;
    for (size_t at = 0; at < n; at++) {
        size_t changed;
        b[at] ^= 0xff;
        harness_write(bad, b, n);
        b[at] ^= 0xff;
        if (ist_store_open(bad, &vo, &got, &err) == IST_OK) {
            ist_store_free(got);
            fail_msg("byte %zu flipped: the verified open accepted it", at);
        }
        assert_true(err.msg[0] != '\0');
        v_refused++;
        if (ist_store_open(bad, NULL, &got, &err) != IST_OK) {
            if (at >= mbeg && at < mend)
                fail_msg("byte %zu (matrix) flipped: the default open refused it", at);
            d_refused++;
            continue;
        }
        if (at < mbeg || at >= mend)
            fail_msg("byte %zu (outside the matrix) flipped: the default open accepted it", at);
        if (!same_store(ref, got, &changed))
            fail_msg("byte %zu flipped: words, counts or provenance changed", at);
        bool padding = (at - mbeg) % (stride * 4) >= 5 * 4;
        assert_int_equal(changed, padding ? 0 : 1);
        padding ? d_same++ : d_one_row++;
        ist_store_free(got);
    }
    assert_int_equal(v_refused, n);
    assert_int_equal(d_refused + d_same + d_one_row, n);
    print_message("# byte flips of a %zu-byte native file: verified open refused %zu; default "
                  "open refused %zu, gave the same result for %zu (row padding) and changed "
                  "one row's numbers for %zu (matrix, unchecked without verify)\n", n, v_refused,
                  d_refused, d_same, d_one_row);
    ist_store_free(ref);
    free(b);
    free(good);
    free(bad);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(map_lying_header, setup, teardown),
        cmocka_unit_test_setup_teardown(map_bad_counts, setup, teardown),
        cmocka_unit_test_setup_teardown(map_non_finite, setup, teardown),
        cmocka_unit_test_setup_teardown(pairs_control_characters, setup, teardown),
        cmocka_unit_test_setup_teardown(pairs_bom_on_later_lines, setup, teardown),
        cmocka_unit_test_setup_teardown(prep_lying_header, setup, teardown),
        cmocka_unit_test_setup_teardown(writers_leave_nothing, setup, teardown),
        cmocka_unit_test(norm_tiny_zero_and_non_finite_rows),
        cmocka_unit_test(procrustes_non_finite_seeds),
        cmocka_unit_test_setup_teardown(native_byte_flips, setup, teardown),
    };
    HARNESS_RUN("reliab", tests);
}
