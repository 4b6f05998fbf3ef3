/* test_corpus.c - raw text to vocabulary and id stream: counting, pruning,
 * de-duplication, gzip, bad input, and the prepared-corpus file. */
#include "harness.h"

#include <sys/stat.h>

#include <zlib.h>

#include <isthmus/cancel.h>
#include <isthmus/corpus.h>
#include <isthmus/testing.h>

static const char shop_text[] =
    "The blue MUG is on sale.\n"
    "the blue mug ships today\n"
    "Blue lid, blue mug!\n"
    "\n"
    "the mug\n"
    "The blue MUG is on sale.\n";

static ist_corpus *
build_one(const char *path, const ist_corpus_opts *o)
{
    ist_corpus *c = NULL;
    ist_error err;
    const char *paths[] = {path};
    ist_status rc = ist_corpus_build(paths, 1, o, &c, &err);
    if (rc != IST_OK) {
        char buf[1024];
        print_message("%s\n", ist_error_format(&err, buf, sizeof buf));
    }
    assert_int_equal(rc, IST_OK);
    return c;
}

static void
counts_order_and_stream(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    ist_corpus_opts o;
    ist_corpus_stats st;
    size_t n;

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    assert_int_equal(o.min_count, 5);
    o.min_count = 2;
    ist_corpus *c = build_one(p, &o);
    const ist_vocab *v = ist_corpus_vocab(c);
    /* counts by hand: blue 5, mug 5, the 4, is 2, on 2, sale 2; ships/today/lid once */
    assert_int_equal(ist_vocab_size(v), 6);
    assert_string_equal(ist_vocab_word(v, 0), "blue");   /* ties broken by bytes */
    assert_string_equal(ist_vocab_word(v, 1), "mug");
    assert_string_equal(ist_vocab_word(v, 2), "the");
    assert_int_equal(ist_vocab_count(v, 2), 4);
    ist_corpus_stats_get(c, &st);
    assert_int_equal(st.lines, 6);
    assert_int_equal(st.lines_dropped_dup, 0);
    assert_int_equal(st.tokens_in, 23);
    assert_int_equal(st.tokens_kept, 20);
    assert_int_equal(st.types_before_prune, 9);
    const uint32_t *ids = ist_corpus_ids(c, &n);
    assert_int_equal(n, 20 + 6);                 /* one IST_CORPUS_EOL per line */
    /* line 3 "Blue lid, blue mug!" -> blue blue mug (lid pruned) */
    const uint32_t line1[] = {2, 0, 1, 3, 4, 5, IST_CORPUS_EOL};
    assert_memory_equal(ids, line1, sizeof line1);
    const uint32_t line3[] = {0, 0, 1, IST_CORPUS_EOL, IST_CORPUS_EOL};
    assert_memory_equal(ids + 11, line3, sizeof line3);
    assert_non_null(strstr(ist_corpus_sources_json(c), "\"lines\":6"));
    assert_true(ist_corpus_text_opts(c)->nfkc);
    ist_corpus_free(c);

    o.max_vocab = 2;                             /* size limit keeps the two most frequent */
    c = build_one(p, &o);
    assert_int_equal(ist_vocab_size(ist_corpus_vocab(c)), 2);
    ist_corpus_stats_get(c, &st);
    assert_int_equal(st.tokens_kept, 10);
    ist_corpus_free(c);
    ist_corpus_free(NULL);
    free(p);
    harness_rmdir(dir);
}

static void
dedup_drops_repeats(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    ist_corpus_opts o;
    ist_corpus_stats st;
    size_t n;

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 1;
    o.dedup_lines = true;
    ist_corpus *c = build_one(p, &o);
    ist_corpus_stats_get(c, &st);
    /* line 6 repeats line 1 exactly; line 2 differs only in case and punctuation, so
     * after folding it is "the blue mug ships today" - not a repeat */
    assert_int_equal(st.lines, 6);
    assert_int_equal(st.lines_dropped_dup, 1);
    assert_int_equal(st.tokens_in, 17);
    ist_corpus_ids(c, &n);
    assert_int_equal(n, 17 + 5);
    ist_corpus_free(c);
    free(p);
    harness_rmdir(dir);
}

static void
write_gzip(const char *path, const char *data, size_t n)
{
    gzFile g = gzopen(path, "wb");
    assert_non_null(g);
    assert_int_equal(gzwrite(g, data, (unsigned)n), (int)n);
    assert_int_equal(gzclose(g), Z_OK);
}

static void
gzip_equals_plain_and_sources(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    char *g = harness_path(dir, "shop.data");    /* gzip found by magic bytes, not by name */
    ist_corpus_opts o;
    size_t n1, n2;
    char crc[16];

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    write_gzip(g, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 1;
    ist_corpus *a = build_one(p, &o), *b = build_one(g, &o);
    const uint32_t *ia = ist_corpus_ids(a, &n1), *ib = ist_corpus_ids(b, &n2);
    assert_int_equal(n1, n2);
    assert_memory_equal(ia, ib, n1 * sizeof *ia);
    assert_int_equal(ist_vocab_size(ist_corpus_vocab(a)), ist_vocab_size(ist_corpus_vocab(b)));
    snprintf(crc, sizeof crc, "\"%08lx\"",
             crc32(0, (const unsigned char *)shop_text, sizeof shop_text - 1));
    assert_non_null(strstr(ist_corpus_sources_json(a), crc));
    assert_non_null(strstr(ist_corpus_sources_json(b), "\"gzip\":true"));
    ist_corpus_source sa, sb;
    assert_int_equal(ist_corpus_n_sources(b), 1);
    assert_int_equal(ist_corpus_source_get(a, 0, &sa, NULL), IST_OK);
    assert_int_equal(ist_corpus_source_get(b, 0, &sb, NULL), IST_OK);
    assert_int_equal(ist_corpus_source_get(b, 1, &sb, NULL), IST_ERR_INVALID);
    assert_false(sa.gzip);
    assert_true(sb.gzip);
    assert_int_equal(sa.bytes, sizeof shop_text - 1);
    assert_int_equal(sb.text_bytes, sizeof shop_text - 1);
    assert_int_equal(sa.crc32, crc32(0, (const unsigned char *)shop_text, sizeof shop_text - 1));
    assert_int_equal(sb.lines, 6);
    ist_corpus_free(a);
    ist_corpus_free(b);

    const char *two[] = {p, g};
    ist_corpus *c = NULL;
    ist_corpus_stats st;
    assert_int_equal(ist_corpus_build(two, 2, &o, &c, NULL), IST_OK);
    ist_corpus_stats_get(c, &st);
    assert_int_equal(st.lines, 12);
    const char *src = ist_corpus_sources_json(c);
    assert_non_null(strstr(src, "shop.txt"));
    assert_non_null(strstr(src, "shop.data"));
    ist_corpus_free(c);
    free(p);
    free(g);
    harness_rmdir(dir);
}

static void
invalid_utf8_policy(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "bad.txt");
    static const char bad[] = "good line\nstill good\ncaf\xc3 au lait \xff\n";
    ist_corpus_opts o;
    ist_corpus_stats st;
    ist_corpus *c = NULL;
    ist_error err;
    char buf[1024];

    (void)state;
    harness_write(p, bad, sizeof bad - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 1;
    c = build_one(p, &o);
    ist_corpus_stats_get(c, &st);
    assert_int_equal(st.replaced_utf8, 2);
    assert_non_null(strstr(ist_corpus_sources_json(c), "\"replaced_utf8\":2"));
    ist_corpus_free(c);

    o.text.strict_utf8 = true;
    const char *paths[] = {p};
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_ERR_FORMAT);
    assert_null(c);
    assert_string_equal(err.file, p);
    assert_int_equal(err.line, 3);
    assert_true(err.has_offset);
    assert_int_equal(err.offset, 21 + 3);       /* two lines of 10 and 11 bytes, then "caf" */
    ist_error_format(&err, buf, sizeof buf);
    assert_non_null(strstr(buf, ":3: invalid UTF-8"));
    assert_non_null(strstr(buf, "found bytes c3 20 (byte offset 3 in the line, 24 in the text)"));
    free(p);
    harness_rmdir(dir);
}

static void
long_line_and_missing_file(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "long.txt");
    char *missing = harness_path(dir, "nope.txt");
    char text[300];
    ist_corpus_opts o;
    ist_corpus *c = NULL;
    ist_error err;

    (void)state;
    memset(text, 'a', sizeof text);
    memcpy(text, "short\n", 6);
    text[sizeof text - 1] = '\n';
    harness_write(p, text, sizeof text);
    ist_corpus_opts_init(&o);
    o.max_line = 100;
    const char *paths[] = {p};
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_ERR_FORMAT);
    assert_null(c);
    assert_string_equal(err.file, p);
    assert_int_equal(err.line, 2);
    assert_non_null(strstr(err.msg, "longer than"));

    const char *two[] = {p, missing};
    o.max_line = 1000;
    assert_int_equal(ist_corpus_build(two, 2, &o, &c, &err), IST_ERR_IO);
    assert_null(c);
    assert_string_equal(err.file, missing);
    assert_int_equal(ist_corpus_build(two, 0, &o, &c, &err), IST_ERR_INVALID);
    free(p);
    free(missing);
    harness_rmdir(dir);
}

static void
save_open_round_trip(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    char *q = harness_path(dir, "shop.prep");
    ist_corpus_opts o;
    ist_corpus_stats s1, s2;
    ist_corpus *c, *d = NULL;
    ist_error err;
    size_t n1, n2;

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 2;
    o.text.mask_digits = true;
    c = build_one(p, &o);
    assert_int_equal(ist_corpus_save(c, q, &err), IST_OK);
    assert_int_equal(harness_count_entries(dir), 2);    /* no temporary left behind */
    assert_int_equal(ist_corpus_open(q, &d, &err), IST_OK);
    const uint32_t *a = ist_corpus_ids(c, &n1), *b = ist_corpus_ids(d, &n2);
    assert_int_equal(n1, n2);
    assert_memory_equal(a, b, n1 * sizeof *a);
    const ist_vocab *va = ist_corpus_vocab(c), *vb = ist_corpus_vocab(d);
    assert_int_equal(ist_vocab_size(va), ist_vocab_size(vb));
    for (uint32_t i = 0; i < ist_vocab_size(va); i++) {
        assert_string_equal(ist_vocab_word(va, i), ist_vocab_word(vb, i));
        assert_int_equal(ist_vocab_count(va, i), ist_vocab_count(vb, i));
    }
    ist_corpus_stats_get(c, &s1);
    ist_corpus_stats_get(d, &s2);
    assert_memory_equal(&s1, &s2, sizeof s1);
    assert_memory_equal(ist_corpus_text_opts(c), ist_corpus_text_opts(d), sizeof(ist_text_opts));
    assert_string_equal(ist_corpus_sources_json(c), ist_corpus_sources_json(d));
    ist_corpus_source sc, sd;
    assert_int_equal(ist_corpus_n_sources(d), 1);
    assert_int_equal(ist_corpus_source_get(c, 0, &sc, NULL), IST_OK);
    assert_int_equal(ist_corpus_source_get(d, 0, &sd, NULL), IST_OK);
    assert_string_equal(sc.path, sd.path);
    assert_int_equal(sc.crc32, sd.crc32);
    assert_int_equal(sc.text_bytes, sd.text_bytes);
    ist_corpus_free(d);
    ist_corpus_free(c);
    free(p);
    free(q);
    harness_rmdir(dir);
}

static unsigned char *
slurp(const char *path, size_t *n)
{
    struct stat sb;
    assert_int_equal(stat(path, &sb), 0);
    unsigned char *buf = malloc((size_t)sb.st_size);
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    assert_int_equal(fread(buf, 1, (size_t)sb.st_size, f), (size_t)sb.st_size);
    fclose(f);
    *n = (size_t)sb.st_size;
    return buf;
}

/* The first place of needle in buf, or NULL. */
static unsigned char *
find_bytes(unsigned char *buf, size_t n, const char *needle, size_t len)
{
    for (size_t i = 0; len <= n && i <= n - len; i++)
        if (memcmp(buf + i, needle, len) == 0)
            return buf + i;
    return NULL;
}

/* The pruning is recorded under the option names of prepare ("min-freq", "vocab-limit"),
 * and a file written with the former spellings ("min_count", "max_vocab") still opens with
 * its values, which a second save writes under the new names. The old file is made from a
 * new one by renaming the two keys in its provenance (one space keeps the length) and
 * putting the CRC-32 trailer right (zlib's crc32, as docs/formats.md says). */
static void
prune_keys_named_like_options(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    char *q = harness_path(dir, "shop.prep"), *r = harness_path(dir, "old.prep");
    char *t = harness_path(dir, "again.prep");
    static const char now[] = "\"min-freq\":2,\"vocab-limit\":7}";
    static const char old[] = "\"min_count\":2,\"max_vocab\":7 }";
    ist_corpus_opts o;
    ist_corpus *c, *d = NULL;
    ist_error err;
    size_t n;

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 2;
    o.max_vocab = 7;
    c = build_one(p, &o);
    assert_int_equal(ist_corpus_save(c, q, &err), IST_OK);
    ist_corpus_free(c);
    unsigned char *buf = slurp(q, &n);
    unsigned char *at = find_bytes(buf, n, now, sizeof now - 1);
    assert_non_null(at);
    assert_null(find_bytes(buf, n, "min_count", 9));
    assert_int_equal(sizeof now, sizeof old);
    memcpy(at, old, sizeof old - 1);
    uint32_t crc = (uint32_t)crc32(0, buf, (uInt)(n - 8));
    for (int i = 0; i < 4; i++)
        buf[n - 8 + (size_t)i] = (unsigned char)(crc >> (8 * i));
    harness_write(r, buf, n);
    free(buf);

    assert_int_equal(ist_corpus_open(r, &d, &err), IST_OK);
    assert_int_equal(ist_corpus_save(d, t, &err), IST_OK);
    ist_corpus_free(d);
    buf = slurp(t, &n);
    assert_non_null(find_bytes(buf, n, now, sizeof now - 1));
    free(buf);
    free(p);
    free(q);
    free(r);
    free(t);
    harness_rmdir(dir);
}

static void
damaged_file_rejected(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    char *q = harness_path(dir, "shop.prep"), *r = harness_path(dir, "bad.prep");
    ist_corpus_opts o;
    ist_corpus *c, *d = NULL;
    ist_error err;
    size_t n;

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 1;
    c = build_one(p, &o);
    assert_int_equal(ist_corpus_save(c, q, &err), IST_OK);
    ist_corpus_free(c);
    unsigned char *buf = slurp(q, &n);

    buf[130] ^= 0x01;                                  /* a flipped bit in the id stream */
    harness_write(r, buf, n);
    assert_int_equal(ist_corpus_open(r, &d, &err), IST_ERR_FORMAT);
    assert_null(d);
    assert_non_null(strstr(err.msg, "checksum"));
    buf[130] ^= 0x01;

    harness_write(r, buf, n - 9);                      /* truncated */
    assert_int_equal(ist_corpus_open(r, &d, &err), IST_ERR_FORMAT);
    assert_non_null(strstr(err.msg, "truncated"));
    harness_write(r, buf, 40);
    assert_int_equal(ist_corpus_open(r, &d, &err), IST_ERR_FORMAT);
    harness_write(r, shop_text, sizeof shop_text - 1);   /* not a prepared corpus at all */
    assert_int_equal(ist_corpus_open(r, &d, &err), IST_ERR_FORMAT);
    assert_string_equal(err.file, r);
    assert_int_equal(ist_corpus_open("/nonexistent/x.prep", &d, &err),
                     IST_ERR_IO);
    harness_write(r, buf, n);                          /* intact copy still opens */
    assert_int_equal(ist_corpus_open(r, &d, &err), IST_OK);
    ist_corpus_free(d);
    free(buf);
    free(p);
    free(q);
    free(r);
    harness_rmdir(dir);
}

typedef struct prog {
    int calls;
    uint64_t last, total;
    bool monotone;
} prog;

static void
on_progress(void *ctx, uint64_t done, uint64_t total)
{
    prog *p = ctx;
    p->monotone = p->monotone && done >= p->last && done <= total;
    p->last = done;
    p->total = total;
    p->calls++;
}

static void
progress_and_cancel(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "many.txt");
    size_t n = 5000 * (sizeof "blue mug number 12345\n" - 1);
    char *text = malloc(n + 1), *q = text;
    ist_corpus_opts o;
    ist_corpus *c = NULL;
    ist_error err;
    prog pr = {0, 0, 0, true};

    (void)state;
    for (int i = 0; i < 5000; i++)
        q += sprintf(q, "blue mug number %05d\n", i);
    harness_write(p, text, n);
    ist_corpus_opts_init(&o);
    o.progress = on_progress;
    o.progress_ctx = &pr;
    const char *paths[] = {p};
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_OK);
    assert_true(pr.calls >= 4);         /* every 1024 lines and at the end of the file */
    assert_true(pr.monotone);
    assert_int_equal(pr.last, n);
    assert_int_equal(pr.total, n);
    ist_corpus_free(c);
    c = NULL;

    ist_cancel_request();
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_ERR_CANCELLED);
    ist_cancel_reset();
    assert_null(c);
    free(text);
    free(p);
    harness_rmdir(dir);
}

/* Every allocation failure on the way is reported as IST_ERR_NOMEM and leaves
 * nothing behind (ASan in the sanitizer build checks the "nothing"). */
static void
allocation_failures_are_clean(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "shop.txt");
    char *q = harness_path(dir, "shop.prep");
    ist_corpus_opts o;
    int failures = 0;

    (void)state;
    harness_write(p, shop_text, sizeof shop_text - 1);
    ist_corpus_opts_init(&o);
    o.min_count = 1;
    o.dedup_lines = true;
    const char *paths[] = {p};
    for (long n = 0;; n++) {
        ist_corpus *c = NULL, *d = NULL;
        ist_error err;
        ist_testing_fail_alloc_after(n);
        ist_status rc = ist_corpus_build(paths, 1, &o, &c, &err);
        if (rc == IST_OK)
            rc = ist_corpus_save(c, q, &err);
        if (rc == IST_OK)
            rc = ist_corpus_open(q, &d, &err);
        ist_testing_fail_alloc_after(-1);
        ist_corpus_free(c);
        ist_corpus_free(d);
        if (rc == IST_OK)
            break;
        assert_int_equal(rc, IST_ERR_NOMEM);
        assert_null(d);
        failures++;
        unlink(q);
        assert_int_equal(harness_count_entries(dir), 1);   /* no temporary left */
    }
    assert_true(failures > 10);
    free(p);
    free(q);
    harness_rmdir(dir);
}

static unsigned char *
read_all(const char *path, size_t *n)
{
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    fseek(f, 0, SEEK_END);
    long len = ftell(f);
    fseek(f, 0, SEEK_SET);
    unsigned char *buf = malloc(len > 0 ? (size_t)len : 1);
    assert_int_equal(fread(buf, 1, (size_t)len, f), (size_t)len);
    fclose(f);
    *n = (size_t)len;
    return buf;
}

/* Spilling the token stream to a temporary file writes the same prepared file, byte for byte,
 * as holding it in memory, also when 3 threads segment the text (second variant): two inputs (plain and gzip), repeated lines dropped, words pruned
 * by count and by a vocabulary limit, and a stream of over half a million ids, so that it
 * crosses the boundaries of the spill's 256 Ki-id chunks. The temporary file leaves no trace. */
static void
spilled_stream_same_file(void **state)
{
    char *dir = harness_tmpdir(), *spill = harness_path(dir, "spill");
    char *p1 = harness_path(dir, "a.txt"), *p2 = harness_path(dir, "b.txt.gz");
    char *qm = harness_path(dir, "mem.prep"), *qs = harness_path(dir, "spilled.prep");
    const char *paths[] = {p1, p2};
    uint64_t rng = 42;
    ist_error err;

    (void)state;
    assert_int_equal(mkdir(spill, 0755), 0);
    for (int f = 0; f < 2; f++) {
        size_t cap = (size_t)6 << 20, len = 0;
        char *text = malloc(cap);
        for (int line = 0; line < 60000; line++) {
            int words = (int)(harness_rand(&rng) % 14);
            uint64_t again = 7, *r = line % 97 == 5 ? &again : &rng;   /* exact repeats */
            if (r == &again)
                words = 3;
            for (int w = 0; w < words; w++) {
                /* word ranks spread roughly like text: rank = r^3 of a uniform r */
                double u = (double)(harness_rand(r) >> 11) / 9007199254740992.0;
                unsigned rank = (unsigned)(u * u * u * 3000.0);
                len += (size_t)snprintf(text + len, cap - len, "%sw%u", w ? " " : "", rank);
            }
            text[len++] = '\n';
        }
        if (f == 0) {
            harness_write(p1, text, len);
        } else {
            gzFile gz = gzopen(p2, "wb");
            assert_non_null(gz);
            assert_int_equal(gzwrite(gz, text, (unsigned)len), (int)len);
            assert_int_equal(gzclose(gz), Z_OK);
        }
        free(text);
    }
    for (int variant = 0; variant < 2; variant++) {
        ist_corpus_opts o;
        ist_corpus *c = NULL, *d = NULL;
        size_t n;
        ist_corpus_opts_init(&o);
        o.min_count = 3;
        o.dedup_lines = variant == 1;
        o.max_vocab = variant == 1 ? 1000 : 0;
        assert_int_equal(ist_corpus_build(paths, 2, &o, &c, &err), IST_OK);
        assert_non_null(ist_corpus_ids(c, &n));
        print_message("# %zu ids in memory\n", n);
        assert_true(n > 2 * 262144);
        o.spill_dir = spill;
        o.threads = variant == 1 ? 3 : 1;    /* segmenting threads: same bytes again */
        assert_int_equal(ist_corpus_build(paths, 2, &o, &d, &err), IST_OK);
        assert_null(ist_corpus_ids(d, &n));
        assert_int_equal(n, 0);
        assert_int_equal(harness_count_entries(spill), 0);    /* unnamed from the start */
        assert_int_equal(ist_corpus_save(c, qm, &err), IST_OK);
        assert_int_equal(ist_corpus_save(d, qs, &err), IST_OK);
        ist_corpus_stats s1, s2;
        ist_corpus_stats_get(c, &s1);
        ist_corpus_stats_get(d, &s2);
        assert_memory_equal(&s1, &s2, sizeof s1);
        ist_corpus_free(c);
        ist_corpus_free(d);
        size_t nm, ns;
        unsigned char *bm = read_all(qm, &nm), *bs = read_all(qs, &ns);
        assert_int_equal(nm, ns);
        assert_memory_equal(bm, bs, nm);
        free(bm), free(bs);
    }
    /* a spill directory that does not exist: the error names it, nothing is built */
    ist_corpus_opts o;
    ist_corpus *c = NULL;
    ist_corpus_opts_init(&o);
    o.spill_dir = "/nonexistent-isthmus-dir";
    assert_int_equal(ist_corpus_build(paths, 2, &o, &c, &err), IST_ERR_IO);
    assert_null(c);
    assert_non_null(strstr(err.msg, "temporary file"));
    char buf[1024];
    assert_non_null(strstr(ist_error_format(&err, buf, sizeof buf), "/nonexistent-isthmus-dir"));
    free(p1), free(p2), free(qm), free(qs), free(spill);
    harness_rmdir(dir);
}

/* Segmenting on several threads gives the same corpus as one thread: same stream, same
 * vocabulary and counts (each chunk's words numbered on a worker, the corpus ids given in the
 * reading thread), same statistics; an invalid byte in strict mode is reported at the
 * same file, line and offset, and cancelling works. */
static void
threads_same_corpus(void **state)
{
    char *dir = harness_tmpdir(), *p = harness_path(dir, "t.txt");
    uint64_t rng = 9;
    size_t cap = (size_t)3 << 20, len = 0;
    char *text = malloc(cap);
    ist_error err;

    (void)state;
    for (int line = 0; line < 40000; line++) {
        int words = (int)(harness_rand(&rng) % 9);
        for (int w = 0; w < words; w++)
            len += (size_t)snprintf(text + len, cap - len, "%s%s%u", w ? " " : "",
                                    w % 3 ? "Caf\xc3\xa9" : "X", (unsigned)(harness_rand(&rng) % 700));
        if (harness_rand(&rng) % 4 == 0)   /* rare words: once in a chunk, or not at all */
            len += (size_t)snprintf(text + len, cap - len, " r%u",
                                    (unsigned)(harness_rand(&rng) % 20000));
        if (line == 31234)                 /* one invalid byte, deep into the file */
            text[len++] = (char)0xff;
        if (line == 77 || line == 20001) { /* a word too long to be a word: left out */
            text[len++] = ' ';
            memset(text + len, 'q', IST_WORD_MAX_BYTES + 1);
            len += IST_WORD_MAX_BYTES + 1;
        }
        text[len++] = '\n';
    }
    harness_write(p, text, len);
    free(text);
    ist_corpus_opts o;
    ist_corpus_opts_init(&o);
    assert_int_equal(o.threads, 1);
    o.min_count = 2;
    o.dedup_lines = true;
    ist_corpus *one = build_one(p, &o);
    size_t n1, nk;
    const uint32_t *a = ist_corpus_ids(one, &n1);
    ist_corpus_stats s1, sk;
    ist_corpus_stats_get(one, &s1);
    assert_int_equal(s1.replaced_utf8, 1);
    for (size_t t = 2; t <= 4; t++) {
        o.threads = t;
        ist_corpus *k = build_one(p, &o);
        const uint32_t *b = ist_corpus_ids(k, &nk);
        assert_int_equal(n1, nk);
        assert_memory_equal(a, b, n1 * sizeof *a);
        ist_corpus_stats_get(k, &sk);
        assert_memory_equal(&s1, &sk, sizeof s1);
        const ist_vocab *va = ist_corpus_vocab(one), *vb = ist_corpus_vocab(k);
        assert_int_equal(ist_vocab_size(va), ist_vocab_size(vb));
        for (uint32_t i = 0; i < ist_vocab_size(va); i++) {
            assert_string_equal(ist_vocab_word(va, i), ist_vocab_word(vb, i));
            assert_int_equal(ist_vocab_count(va, i), ist_vocab_count(vb, i));
        }
        ist_corpus_source x, y;
        assert_int_equal(ist_corpus_source_get(one, 0, &x, NULL), IST_OK);
        assert_int_equal(ist_corpus_source_get(k, 0, &y, NULL), IST_OK);
        assert_int_equal(x.lines, y.lines);
        assert_int_equal(x.replaced_utf8, y.replaced_utf8);
        ist_corpus_free(k);
    }
    /* strict UTF-8: the same message on one thread and on three */
    char m1[1024], m3[1024];
    const char *paths[] = {p};
    ist_corpus *c = NULL;
    o.text.strict_utf8 = true;
    o.threads = 1;
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_ERR_FORMAT);
    ist_error_format(&err, m1, sizeof m1);
    o.threads = 3;
    assert_int_equal(ist_corpus_build(paths, 1, &o, &c, &err), IST_ERR_FORMAT);
    assert_null(c);
    ist_error_format(&err, m3, sizeof m3);
    assert_string_equal(m1, m3);
    assert_non_null(strstr(m1, ":31235"));
    ist_corpus_free(one);
    free(p);
    harness_rmdir(dir);
}

#define CORPUS_TESTS                                   \
    cmocka_unit_test(counts_order_and_stream),         \
    cmocka_unit_test(dedup_drops_repeats),             \
    cmocka_unit_test(gzip_equals_plain_and_sources),   \
    cmocka_unit_test(invalid_utf8_policy),             \
    cmocka_unit_test(long_line_and_missing_file),      \
    cmocka_unit_test(save_open_round_trip),            \
    cmocka_unit_test(prune_keys_named_like_options),   \
    cmocka_unit_test(spilled_stream_same_file),        \
    cmocka_unit_test(threads_same_corpus),             \
    cmocka_unit_test(damaged_file_rejected),           \
    cmocka_unit_test(progress_and_cancel)

int
main(void)
{
    const struct CMUnitTest tests[] = {CORPUS_TESTS};
    /* the fault-injection case exists only in a fault_injection build */
    const struct CMUnitTest with_faults[] = {CORPUS_TESTS,
                                             cmocka_unit_test(allocation_failures_are_clean)};

    if (ist_testing_fault_injection_enabled())
        HARNESS_RUN("corpus", with_faults);
    HARNESS_RUN("corpus", tests);
}
