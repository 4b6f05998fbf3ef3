/* test_store.c - vector files: lossless round trips, and every kind of bad input
 * refused with file, line or byte offset, leaving no output behind. */
#include "harness.h"

#include <errno.h>
#include <sys/stat.h>
#include <zlib.h>

#include <isthmus/store.h>

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

static ist_store *
random_store(size_t rows, size_t dim, uint64_t seed)
{
    ist_store *s;
    char w[32];

    assert_int_equal(ist_store_new(rows, dim, &s, NULL), IST_OK);
    for (size_t i = 0; i < rows; i++) {
        float *r = ist_store_row_mut(s, i);
        for (size_t j = 0; j < dim; j++) {
            /* mix magnitudes: tiny, ordinary, large, exact zero, negative zero */
            uint64_t k = harness_rand(&seed) % 16;
            float v = harness_randf(&seed);
            r[j] = k == 0 ? 0.0f : k == 1 ? -0.0f : k == 2 ? v * 1e-30f : k == 3 ? v * 1e30f : v;
        }
        snprintf(w, sizeof w, i % 7 == 0 ? "ma\xc3\xb1" "ana%zu" : "w%zu", i);
        assert_int_equal(ist_store_set_word(s, i, w, i * 3, NULL), IST_OK);
    }
    return s;
}

static void
assert_same(const ist_store *a, const ist_store *b, bool counts)
{
    assert_int_equal(ist_store_rows(a), ist_store_rows(b));
    assert_int_equal(ist_store_dim(a), ist_store_dim(b));
    for (size_t i = 0; i < ist_store_rows(a); i++) {
        assert_string_equal(ist_store_word(a, i), ist_store_word(b, i));
        assert_memory_equal(ist_store_row(a, i), ist_store_row(b, i),
                            ist_store_dim(a) * sizeof(float));
        if (counts)
            assert_int_equal(ist_store_count(a, i), ist_store_count(b, i));
    }
    assert_true(ist_store_fingerprint(a) == ist_store_fingerprint(b));
}

static void
round_trips_are_bit_exact(void **state)
{
    ist_store *s = random_store(500, 37, 7), *t, *n;
    char *txt = harness_path(dir, "v.txt"), *gz = harness_path(dir, "v.txt.gz");
    char *nat = harness_path(dir, "v.isv"), *back = harness_path(dir, "back.txt");
    ist_store_save_opts so;

    (void)state;
    assert_int_equal(ist_store_set_provenance(s, "{\"producer\":\"test\"}", NULL), IST_OK);
    ist_store_save_opts_init(&so);
    so.text_header = true;
    assert_int_equal(ist_store_save(s, txt, &so, NULL), IST_OK);
    assert_int_equal(ist_store_save(s, gz, NULL, NULL), IST_OK);
    assert_int_equal(ist_store_save(s, nat, NULL, NULL), IST_OK);

    assert_int_equal(ist_store_open(txt, NULL, &t, NULL), IST_OK);
    assert_true(ist_store_source_header(t));
    assert_same(s, t, false);
    ist_store_free(t);

    assert_int_equal(ist_store_open(gz, NULL, &t, NULL), IST_OK);
    assert_true(ist_store_source_gzip(t));
    assert_false(ist_store_source_header(t));
    assert_same(s, t, false);

    ist_store_opts vo;
    ist_store_opts_init(&vo);
    vo.verify = true;
    assert_int_equal(ist_store_open(nat, NULL, &n, NULL), IST_OK);
    assert_int_equal(ist_store_checked(n), IST_STORE_CHECK_META);
    ist_store_free(n);
    assert_int_equal(ist_store_open(nat, &vo, &n, NULL), IST_OK);
    assert_int_equal(ist_store_source_format(n), IST_STORE_NATIVE);
    assert_int_equal(ist_store_checked(n), IST_STORE_CHECK_FULL);
    assert_same(s, n, true);
    assert_string_equal(ist_store_provenance(n), "{\"producer\":\"test\"}");
    assert_int_equal(ist_store_find(n, "w500"), -1);
    assert_int_equal(ist_store_find(n, "w499"), 499);
    assert_int_equal(ist_store_find(n, "ma\xc3\xb1" "ana7"), 7);
    /* matrix rows are 64-byte aligned in the mapping */
    assert_int_equal((uintptr_t)ist_store_row(n, 3) % 64, 0);

    /* text -> native -> text gives the same bytes as the direct text copy */
    assert_int_equal(ist_store_save(n, back, &so, NULL), IST_OK);
    FILE *a = fopen(txt, "rb"), *b = fopen(back, "rb");
    int ca, cb;
    do {
        ca = fgetc(a);
        cb = fgetc(b);
        assert_int_equal(ca, cb);
    } while (ca != EOF);
    fclose(a);
    fclose(b);
    ist_store_free(n);
    ist_store_free(t);
    ist_store_free(s);
    free(txt);
    free(gz);
    free(nat);
    free(back);
}

static void
max_rows_and_find(void **state)
{
    ist_store *s = random_store(50, 4, 9), *t;
    char *nat = harness_path(dir, "m.isv");
    ist_store_opts o;

    (void)state;
    assert_int_equal(ist_store_save(s, nat, NULL, NULL), IST_OK);
    ist_store_opts_init(&o);
    o.max_rows = 10;
    assert_int_equal(ist_store_open(nat, &o, &t, NULL), IST_OK);
    assert_int_equal(ist_store_rows(t), 10);
    assert_int_equal(ist_store_find(t, "w20"), -1);
    ist_store_free(t);
    ist_store_free(s);
    free(nat);
}

/* Write content to a file, open it, and expect a format/io error whose
 * formatted text contains want. */
static void
expect_bad(const char *name, const void *content, size_t n, const ist_store_opts *o,
           const char *want)
{
    char *p = harness_path(dir, name);
    ist_store *s = (ist_store *)1;
    ist_error e;
    char buf[700];

    if (content)
        harness_write(p, content, n);
    assert_int_not_equal(ist_store_open(p, o, &s, &e), IST_OK);
    assert_null(s);
    ist_error_format(&e, buf, sizeof buf);
    if (!strstr(buf, want))
        fail_msg("%s: expected '%s' in '%s'", name, want, buf);
    if (strncmp(buf, p, strlen(p)) != 0)
        fail_msg("%s: message does not start with the file name: '%s'", name, buf);
    free(p);
}

#define BAD_TEXT(name, text, want) expect_bad(name, text, strlen(text), NULL, want)

static void
text_tables_refuse_bad_input(void **state)
{
    ist_store_opts o;

    (void)state;
    expect_bad("missing.txt", NULL, 0, NULL, "cannot open for reading (No such file");
    BAD_TEXT("empty.txt", "", "empty file");
    BAD_TEXT("dim.txt", "cup 1 2 3\nmug 1 2\n", "dim.txt:2: expected 3 numbers after 'mug', found 2");
    BAD_TEXT("dim2.txt", "cup 1 2 3\nmug 1 2 3 4\n", "dim2.txt:2: expected 3 numbers after 'mug', found 4");
    BAD_TEXT("nonnum.txt", "cup 1 2 3\nmug 1 x2 3\n", "nonnum.txt:2: component 2 of 'mug' is not a number: 'x2'");
    BAD_TEXT("nan.txt", "cup 1 nan 3\n", "nan.txt:1: component 2 of 'cup' is not a number: 'nan'");
    BAD_TEXT("inf.txt", "cup 1 2 1e39\n", "inf.txt:1: component 3 of 'cup' is not a finite float32");
    BAD_TEXT("dup.txt", "cup 1 2\nmug 3 4\ncup 5 6\n", "dup.txt:3: duplicate word 'cup' (first on line 1)");
    BAD_TEXT("utf8.txt", "cup 1 2\nm\xff" "g 3 4\n", "utf8.txt:2: invalid UTF-8 in word (byte 2 of the line)");
    BAD_TEXT("dim0.txt", "cup\n", "dim0.txt:1: a word with no numbers: dimension 0");
    BAD_TEXT("hdr0.txt", "2 0\n", "hdr0.txt:1: header gives dimension 0");
    BAD_TEXT("hdrbig.txt", "2 1000000\n", "hdrbig.txt:1: header gives dimension 1000000, expected 1..100000");
    BAD_TEXT("hdrrows.txt", "3 2\ncup 1 2\nmug 3 4\n", "hdrrows.txt:3: header declares 3 rows, found 2");
    BAD_TEXT("hdrmore.txt", "1 2\ncup 1 2\nmug 3 4\n", "hdrmore.txt:3: header declares 1 rows, but the table goes on");
    BAD_TEXT("blank.txt", "cup 1 2\n\nmug 3 4\n", "blank.txt:2: empty line");
    ist_store_opts_init(&o);
    o.max_line = 64;
    char longline[200];
    memset(longline, '1', sizeof longline);
    memcpy(longline, "cup ", 4);
    longline[sizeof longline - 1] = '\n';
    expect_bad("long.txt", longline, sizeof longline, &o, "long.txt:1: line longer than the limit of 64 bytes");
    o.max_dim = 2;
    expect_bad("wide.txt", "cup 1 2 3\n", 10, &o, "wide.txt:1: dimension 3 exceeds the limit of 2");
    char *d = harness_path(dir, "adir");
    assert_int_equal(mkdir(d, 0755), 0);
    expect_bad("adir", NULL, 0, NULL, "is a directory");
    free(d);
}

static void
text_tables_tolerate_crlf_bom_and_tabs(void **state)
{
    char *p = harness_path(dir, "crlf.txt");
    const char *t = "\xEF\xBB\xBF" "2 3\r\ncup\t1 2 3\r\nmug 4  5 6 \r\n";
    ist_store *s;

    (void)state;
    harness_write(p, t, strlen(t));
    assert_int_equal(ist_store_open(p, NULL, &s, NULL), IST_OK);
    assert_int_equal(ist_store_rows(s), 2);
    assert_int_equal(ist_store_dim(s), 3);
    assert_true(ist_store_row(s, 1)[2] == 6.0f);
    ist_store_free(s);
    free(p);
}

static unsigned char *
read_file(const char *p, size_t *n)
{
    FILE *f = fopen(p, "rb");
    assert_non_null(f);
    fseek(f, 0, SEEK_END);
    *n = (size_t)ftell(f);
    fseek(f, 0, SEEK_SET);
    unsigned char *b = malloc(*n);
    assert_int_equal(fread(b, 1, *n, f), *n);
    fclose(f);
    return b;
}

static void
native_files_refuse_damage(void **state)
{
    ist_store *s = random_store(20, 5, 3);
    char *p = harness_path(dir, "good.isv");
    size_t n;

    (void)state;
    assert_int_equal(ist_store_save(s, p, NULL, NULL), IST_OK);
    unsigned char *b = read_file(p, &n);
    unsigned char *c = malloc(n);

    expect_bad("trunc.isv", b, n - 10, NULL, "file is truncated: header says");
    expect_bad("trunc2.isv", b, 60, NULL, "shorter than the 128-byte header");
    memcpy(c, b, n);
    c[7] = 'X';
    expect_bad("magic.isv", c, n, NULL, "not a native vector file this build knows");
    memcpy(c, b, n);
    c[8] = 9;
    expect_bad("version.isv", c, n, NULL, "version 9, this build reads version 1");
    memcpy(c, b, n);
    c[128 + 4 * 3] ^= 0x40;             /* a matrix byte */
    ist_store_opts vo;
    ist_store_opts_init(&vo);
    vo.verify = true;
    expect_bad("crc.isv", c, n, &vo, "matrix checksum mismatch");
    memcpy(c, b, n);
    c[n - 3] ^= 1;                      /* a provenance/word byte */
    expect_bad("meta.isv", c, n, NULL, "checksum mismatch in header, words or provenance");
    memcpy(c, b, n);
    c[16] = 0xff;                       /* rows: a lying header */
    c[17] = 0xff;
    c[18] = 0xff;
    expect_bad("rows.isv", c, n, NULL, "more than the file holds");
    memcpy(c, b, n);
    c[24] = 0;                          /* dim 0 */
    expect_bad("dim0.isv", c, n, NULL, "dimension 0 is outside");

    /* a damaged matrix opened without verification is caught by ist_store_verify */
    memcpy(c, b, n);
    c[128 + 4 * 3] ^= 0x40;
    char *q = harness_path(dir, "late.isv");
    harness_write(q, c, n);
    ist_store_opts o;
    ist_store_opts_init(&o);
    o.verify = false;
    ist_store *t;
    ist_error e;
    assert_int_equal(ist_store_open(q, &o, &t, NULL), IST_OK);
    assert_int_equal(ist_store_checked(t), IST_STORE_CHECK_META);
    assert_int_equal(ist_store_verify(t, &e), IST_ERR_FORMAT);
    assert_non_null(strstr(e.msg, "checksum mismatch"));
    ist_store_free(t);
    free(q);
    free(b);
    free(c);
    free(p);
    ist_store_free(s);
}

static void
failed_saves_leave_nothing(void **state)
{
    ist_store *s = random_store(100, 8, 5);
    char *sub = harness_path(dir, "out");
    char *missing = harness_path(dir, "no/such/dir/v.isv");
    char *in_sub = harness_path(sub, "v.isv");
    ist_error e;

    (void)state;
    assert_int_equal(ist_store_save(s, missing, NULL, &e), IST_ERR_IO);
    assert_non_null(strstr(e.file, "no/such/dir/v.isv"));
    assert_int_equal(e.sys_errno, ENOENT);

    /* /dev/full accepts the open and fails every write with ENOSPC */
    assert_int_equal(ist_store_save(s, "/dev/full", NULL, &e), IST_ERR_IO);
    assert_int_equal(e.sys_errno, ENOSPC);
    struct stat st;
    assert_int_equal(stat("/dev/full", &st), 0);
    assert_true(S_ISCHR(st.st_mode));   /* still the device: never renamed over */

    /* a word missing on a row: refused before anything is written */
    ist_store *t;
    assert_int_equal(mkdir(sub, 0755), 0);
    assert_int_equal(ist_store_new(3, 2, &t, NULL), IST_OK);
    assert_int_equal(ist_store_set_word(t, 0, "a", 1, NULL), IST_OK);
    assert_int_equal(ist_store_save(t, in_sub, NULL, &e), IST_ERR_INVALID);
    assert_int_equal(harness_count_entries(sub), 0);
    assert_int_equal(ist_store_set_word(t, 1, "a", 1, &e), IST_ERR_INVALID);  /* duplicate */
    assert_int_equal(ist_store_set_word(t, 1, "has space", 1, &e), IST_ERR_INVALID);
    assert_int_equal(ist_store_save(t, in_sub, NULL, &e), IST_ERR_INVALID);
    assert_int_equal(harness_count_entries(sub), 0);
    ist_store_free(t);
    ist_store_free(s);
    free(sub);
    free(missing);
    free(in_sub);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(round_trips_are_bit_exact),
        cmocka_unit_test(max_rows_and_find),
        cmocka_unit_test(text_tables_refuse_bad_input),
        cmocka_unit_test(text_tables_tolerate_crlf_bom_and_tabs),
        cmocka_unit_test(native_files_refuse_damage),
        cmocka_unit_test(failed_saves_leave_nothing),
    };
    cmocka_set_message_output(CM_OUTPUT_TAP);
    int failed = cmocka_run_group_tests_name("store", tests, setup, teardown);
    printf("# store: %zu passed, %d failed\n", sizeof tests / sizeof tests[0] - (size_t)failed,
           failed);
    return failed ? 1 : 0;
}
