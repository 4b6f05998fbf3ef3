/* test_text.c - UTF-8 policy, NFKC and case folding, digit masking, mark
 * stripping, UAX #29 word segmentation, options as provenance.
 *
 * Outside references: the Unicode Consortium's own test files for the Unicode
 * version of utf8proc, from Debian's unicode-data package:
 * auxiliary/WordBreakTest.txt (UAX #29) and NormalizationTest.txt.bz2 (UAX #15,
 * NFKC column). Hand-written expectations cite the standard section they
 * follow. */
#include "harness.h"

#include <isthmus/text.h>

#include <utf8proc.h>

#include "text_int.h"

static const char *
unicode_dir(void)
{
    const char *d = getenv("ISTHMUS_UNICODE_DIR");
    return d && *d ? d : "/usr/share/unicode";
}

static char *
unicode_file(const char *rel)
{
    char *p = harness_path(unicode_dir(), rel);
    if (access(p, R_OK) != 0) {
        free(p);
        return NULL;
    }
    return p;
}

/* Normalise a NUL-terminated string with the options; returns a copy. */
static char *
norm(const ist_text_opts *o, const char *in, size_t len, uint64_t *replaced)
{
    ist_normalizer *nz;
    const char *out;
    size_t out_len;
    ist_error err;

    assert_int_equal(ist_normalizer_new(o, &nz, &err), IST_OK);
    assert_int_equal(ist_normalize(nz, in, len, &out, &out_len, &err), IST_OK);
    assert_int_equal(strlen(out), out_len);
    char *copy = strdup(out);
    if (replaced)
        *replaced = ist_normalizer_replaced(nz);
    ist_normalizer_free(nz);
    return copy;
}

static void
check_norm(const ist_text_opts *o, const char *in, const char *want)
{
    char *got = norm(o, in, strlen(in), NULL);
    assert_string_equal(got, want);
    free(got);
}

static void
defaults_fold_and_nfkc(void **state)
{
    ist_text_opts o;

    (void)state;
    ist_text_opts_init(&o);
    assert_true(o.nfkc && o.casefold);
    assert_false(o.strip_marks || o.mask_digits || o.strict_utf8);
    check_norm(&o, "Tillwick MUG 500ml", "tillwick mug 500ml");          /* ASCII fast path */
    check_norm(&o, "Stra\xc3\x9f" "e", "strasse");        /* CaseFolding.txt: 00DF -> 0073 0073 */
    check_norm(&o, "\xef\xac\x81ne", "fine");             /* U+FB01 LATIN SMALL LIGATURE FI, NFKC */
    check_norm(&o, "\xef\xbc\xa1\xef\xbc\xa2", "ab");    /* fullwidth A B: NFKC then fold */
    check_norm(&o, "Cafe\xcc\x81", "caf\xc3\xa9");       /* e + U+0301 composes to U+00E9 */
    check_norm(&o, "\xc3\x89T\xc3\x89", "\xc3\xa9t\xc3\xa9");
    ist_text_opts_init(&o);
    o.casefold = false;
    check_norm(&o, "Caf\xc3\xa9 MUG", "Caf\xc3\xa9 MUG");
    o.nfkc = false;
    check_norm(&o, "\xef\xac\x81", "\xef\xac\x81");      /* nothing asked, nothing changed */
}

static void
strip_marks_and_mask_digits(void **state)
{
    ist_text_opts o;

    (void)state;
    ist_text_opts_init(&o);
    o.strip_marks = true;
    check_norm(&o, "Caf\xc3\xa9 a\xc3\xb1o ni\xc3\xb1" "o", "cafe ano nino");
    ist_text_opts_init(&o);
    o.mask_digits = true;
    check_norm(&o, "Order 4711 at 12:30", "order 0000 at 00:00");
    /* U+0663 ARABIC-INDIC DIGIT THREE is Nd (UnicodeData.txt) */
    check_norm(&o, "\xd9\xa3 caf\xc3\xa9s", "0 caf\xc3\xa9s");
    /* U+FF17 FULLWIDTH DIGIT SEVEN: NFKC gives '7', then masked */
    check_norm(&o, "\xef\xbc\x97", "0");
}

static void
invalid_utf8_replaced_and_counted(void **state)
{
    ist_text_opts o;
    uint64_t n;
    char *got;

    (void)state;
    ist_text_opts_init(&o);
    got = norm(&o, "a\xff" "b", 3, &n);
    assert_string_equal(got, "a\xef\xbf\xbd" "b");
    assert_int_equal(n, 1);
    free(got);
    /* Unicode 15.0 ch. 3, "U+FFFD Substitution of Maximal Subparts": E1 80 41 is one
     * maximal subpart then 'A'; F0 80 80 41 is three single bytes then 'A'. */
    got = norm(&o, "\xe1\x80" "A", 3, &n);
    assert_string_equal(got, "\xef\xbf\xbd" "a");
    assert_int_equal(n, 1);
    free(got);
    got = norm(&o, "\xf0\x80\x80" "A", 4, &n);
    assert_string_equal(got, "\xef\xbf\xbd\xef\xbf\xbd\xef\xbf\xbd" "a");
    assert_int_equal(n, 3);
    free(got);
    got = norm(&o, "\xed\xa0\x80", 3, &n);          /* an encoded surrogate is ill-formed */
    assert_int_equal(n, 3);
    free(got);
    got = norm(&o, "caf\xc3", 4, &n);               /* truncated at the end */
    assert_string_equal(got, "caf\xef\xbf\xbd");
    assert_int_equal(n, 1);
    free(got);
}

static void
strict_utf8_reports_offset(void **state)
{
    ist_text_opts o;
    ist_normalizer *nz;
    const char *out;
    size_t len;
    ist_error err;

    (void)state;
    ist_text_opts_init(&o);
    o.strict_utf8 = true;
    assert_int_equal(ist_normalizer_new(&o, &nz, &err), IST_OK);
    assert_int_equal(ist_normalize(nz, "ni\xc3\xb1o \xc3(", 8, &out, &len, &err), IST_ERR_FORMAT);
    assert_true(err.has_offset);
    assert_int_equal(err.offset, 6);
    assert_non_null(strstr(err.msg, "invalid UTF-8"));
    assert_int_equal(ist_normalize(nz, NULL, 0, &out, &len, &err), IST_OK);
    assert_string_equal(out, "");
    assert_int_equal(ist_normalize(nz, "ni\xc3\xb1o", 5, &out, &len, &err), IST_OK);
    assert_string_equal(out, "ni\xc3\xb1o");
    assert_int_equal(ist_normalizer_replaced(nz), 0);
    ist_normalizer_free(nz);
    ist_normalizer_free(NULL);
}

/* The piecewise fast path must equal utf8proc run over the whole string (utf8proc's
 * own utf8proc_map is the reference) on random mixes of ASCII, combining marks,
 * compatibility characters, case pairs and Hangul jamo. */
static void
piecewise_equals_whole_string(void **state)
{
    static const char *const alphabet[] = {
        "a", "e", "E", "i", "I", " ", "1", "-", "\xcc\x81", "\xcc\x88", "\xcc\xa3", "\xc3\xa9",
        "\xc3\x89", "\xc3\x9f", "\xef\xac\x81", "\xef\xbc\xab", "\xc4\xb0", "\xed\x95\x9c",
        "\xe1\x84\x80", "\xe1\x85\xa1", "\xe1\x86\xa8", "\xd9\xa3", "\xe2\x84\xab", "\xe2\x91\xa0",
    };
    const size_t n_alpha = sizeof alphabet / sizeof alphabet[0];
    const utf8proc_option_t flag_sets[4] = {
        UTF8PROC_STABLE | UTF8PROC_COMPOSE | UTF8PROC_COMPAT | UTF8PROC_CASEFOLD,
        UTF8PROC_STABLE | UTF8PROC_COMPOSE | UTF8PROC_COMPAT,
        UTF8PROC_STABLE | UTF8PROC_COMPOSE | UTF8PROC_COMPAT | UTF8PROC_CASEFOLD
            | UTF8PROC_STRIPMARK,
        UTF8PROC_CASEFOLD,
    };
    uint64_t seed = 12345;
    char text[256];

    (void)state;
    for (int f = 0; f < 4; f++) {
        ist_text_opts o;
        ist_normalizer *nz;
        ist_text_opts_init(&o);
        o.casefold = (flag_sets[f] & UTF8PROC_CASEFOLD) != 0;
        o.nfkc = (flag_sets[f] & UTF8PROC_COMPAT) != 0;
        o.strip_marks = (flag_sets[f] & UTF8PROC_STRIPMARK) != 0;
        assert_int_equal(ist_normalizer_new(&o, &nz, NULL), IST_OK);
        for (int t = 0; t < 3000; t++) {
            size_t len = 0, k = 1 + harness_rand(&seed) % 12;
            for (size_t i = 0; i < k; i++) {
                const char *piece = alphabet[harness_rand(&seed) % n_alpha];
                memcpy(text + len, piece, strlen(piece));
                len += strlen(piece);
            }
            text[len] = '\0';
            utf8proc_uint8_t *want = NULL;
            assert_true(utf8proc_map((const utf8proc_uint8_t *)text, (utf8proc_ssize_t)len,
                                     &want, flag_sets[f]) >= 0);
            const char *got;
            size_t got_len;
            assert_int_equal(ist_normalize(nz, text, len, &got, &got_len, NULL), IST_OK);
            assert_string_equal(got, (const char *)want);
            free(want);
        }
        ist_normalizer_free(nz);
    }
}

typedef struct cover {
    size_t next;
    bool contiguous;
} cover;

static int
check_cover(void *ctx, size_t start, size_t len, bool wordlike)
{
    cover *c = ctx;
    (void)wordlike;
    c->contiguous = c->contiguous && start == c->next && len > 0;
    c->next = start + len;
    return 0;
}

/* Random bytes (mostly ill-formed) and random well-formed text: normalising
 * never fails by default, gives well-formed UTF-8, and the segments of the
 * result tile it exactly. */
static void
random_input_properties(void **state)
{
    uint64_t seed = 777;
    unsigned char in[200];
    ist_text_opts o;
    ist_normalizer *nz;

    (void)state;
    ist_text_opts_init(&o);
    o.mask_digits = true;
    assert_int_equal(ist_normalizer_new(&o, &nz, NULL), IST_OK);
    for (int t = 0; t < 20000; t++) {
        size_t len = harness_rand(&seed) % sizeof in;
        for (size_t i = 0; i < len; i++) {
            uint64_t r = harness_rand(&seed);
            if (t % 2) {
                in[i] = (unsigned char)r;                  /* any byte */
            } else if (i + 4 <= len && r % 3 == 0) {      /* any scalar value, encoded */
                uint32_t cp = (uint32_t)((r >> 8) % 0x110000);
                if (cp >= 0xd800 && cp <= 0xdfff)
                    cp = 'x';
                i += ist_utf8_encode(cp, in + i) - 1;
            } else {
                in[i] = (unsigned char)(' ' + r % 95);
            }
        }
        const char *out;
        size_t out_len, pos = 0;
        uint32_t cp;
        assert_int_equal(ist_normalize(nz, (const char *)in, len, &out, &out_len, NULL), IST_OK);
        while (pos < out_len) {
            size_t k = ist_utf8_decode((const unsigned char *)out + pos, out_len - pos, &cp);
            assert_true(k > 0);
            pos += k;
        }
        cover c = {0, true};
        assert_int_equal(ist_segment_all(out, out_len, check_cover, &c, NULL), IST_OK);
        assert_true(c.contiguous);
        assert_int_equal(c.next, out_len);
    }
    assert_true(ist_normalizer_replaced(nz) > 10000);
    ist_normalizer_free(nz);
}

typedef struct bounds {
    size_t at[256];
    size_t n;
} bounds;

static int
record_bound(void *ctx, size_t start, size_t len, bool wordlike)
{
    bounds *b = ctx;
    (void)wordlike;
    if (b->n < 256)
        b->at[b->n++] = start + len;
    return 0;
}

/* The ASCII fast paths of the segmenter must give the boundaries of the plain
 * rules on text dense in the characters the rules treat specially. */
static void
fast_segmenter_equals_rules(void **state)
{
    static const char *const alphabet[] = {
        "a", "Z", "7", " ", "  ", ".", ",", ":", ";", "'", "\"", "_", "-", "!", "\r", "\n",
        "\r\n", "\t", "\xd7\x90", "\xcc\x81", "\xe2\x80\x8d", "\xf0\x9f\x91\x8d",
        "\xe3\x82\xab", "\xf0\x9f\x87\xaa", "\xc2\xa0", "\xe2\x80\x99",
    };
    const size_t n_alpha = sizeof alphabet / sizeof alphabet[0];
    uint64_t seed = 4242;
    char text[256];

    (void)state;
    for (int t = 0; t < 50000; t++) {
        size_t len = 0, k = 1 + harness_rand(&seed) % 16;
        for (size_t i = 0; i < k; i++) {
            const char *piece = alphabet[harness_rand(&seed) % n_alpha];
            memcpy(text + len, piece, strlen(piece));
            len += strlen(piece);
        }
        bounds fast = {{0}, 0}, plain = {{0}, 0};
        assert_int_equal(ist_segment_all(text, len, record_bound, &fast, NULL), IST_OK);
        assert_int_equal(ist_segment_all_reference(text, len, record_bound, &plain, NULL),
                         IST_OK);
        assert_int_equal(fast.n, plain.n);
        assert_memory_equal(fast.at, plain.at, fast.n * sizeof fast.at[0]);
    }
}

typedef struct words {
    char buf[1024];
    size_t len;
    int n;
} words;

static int
collect(void *ctx, const char *w, size_t len)
{
    words *ws = ctx;
    if (ws->n++)
        ws->buf[ws->len++] = '|';
    memcpy(ws->buf + ws->len, w, len);
    ws->len += len;
    ws->buf[ws->len] = '\0';
    return 0;
}

static void
check_words(const char *text, const char *want)
{
    words ws = {{0}, 0, 0};
    ist_error err;

    assert_int_equal(ist_segment_words(text, strlen(text), collect, &ws, &err), IST_OK);
    assert_string_equal(ws.buf, want);
}

/* Expectations follow UAX #29 section 4.1 rule by rule (the rule is named). */
static void
segment_words_keeps_words(void **state)
{
    (void)state;
    check_words("Hello, world!  don't stop", "Hello|world|don't|stop");   /* WB6/7 */
    check_words("pi is 3.14, not 3,15; 1.000.000", "pi|is|3.14|not|3,15|1.000.000"); /* WB11/12 */
    check_words("model 500ml e.g. x_y", "model|500ml|e.g|x_y");    /* WB9/10, WB13a/b */
    check_words("--- !!! ... ***", "");
    /* ideographs break one by one (WB999), katakana stay together (WB13) */
    check_words("\xe6\x97\xa5\xe6\x9c\xac\xe3\x81\xae"
                "\xe3\x83\x86\xe3\x82\xad\xe3\x82\xb9\xe3\x83\x88",
                "\xe6\x97\xa5|\xe6\x9c\xac|\xe3\x81\xae|"
                "\xe3\x83\x86\xe3\x82\xad\xe3\x82\xb9\xe3\x83\x88");
    /* emoji with a skin-tone modifier (Extend, WB4) and a ZWJ sequence (WB3c) */
    check_words("tea \xf0\x9f\x91\x8d\xf0\x9f\x8f\xbd ok "
                "\xf0\x9f\x91\xa9\xe2\x80\x8d\xf0\x9f\x92\xbb",
                "tea|\xf0\x9f\x91\x8d\xf0\x9f\x8f\xbd|ok|"
                "\xf0\x9f\x91\xa9\xe2\x80\x8d\xf0\x9f\x92\xbb");
    /* two flags: regional indicators pair up (WB15/16) */
    check_words("\xf0\x9f\x87\xaa\xf0\x9f\x87\xb8\xf0\x9f\x87\xac\xf0\x9f\x87\xa7",
                "\xf0\x9f\x87\xaa\xf0\x9f\x87\xb8|\xf0\x9f\x87\xac\xf0\x9f\x87\xa7");
    check_words("", "");
}

static int
stop_after_one(void *ctx, const char *w, size_t len)
{
    (void)w;
    (void)len;
    (*(int *)ctx)++;
    return 1;
}

/* The tailoring of ist_segment_words(): letters, one hyphen, a word that starts
 * with a digit are one word (model codes); nothing else changes. */
static void
segment_words_keeps_codes_whole(void **state)
{
    (void)state;
    check_words("model TW-4410 or tw4410", "model|TW-4410|or|tw4410");
    check_words("TK-500ml fits", "TK-500ml|fits");
    check_words("r\xc3\xa9" "f\xe2\x80\x91" "12 ok", "r\xc3\xa9" "f\xe2\x80\x91" "12|ok");   /* U+2011 */
    /* no join: digits first, a space, two hyphens, a letter after the hyphen, letters
     * and digits on the left */
    check_words("4410-tw", "4410|tw");
    check_words("tw - 4410", "tw|4410");
    check_words("tw--4410", "tw|4410");
    check_words("well-known", "well|known");
    check_words("a4-20", "a4|20");
    /* a held word is still reported at the end, and stopping early still stops */
    check_words("tw-", "tw");
    check_words("tw", "tw");
    int n = 0;
    ist_error err;
    assert_int_equal(ist_segment_words("ab-cd ef", 8, stop_after_one, &n, &err), IST_OK);
    assert_int_equal(n, 1);
}

static void
word_shapes_classify(void **state)
{
    (void)state;
    static const struct { const char *w; ist_word_shape s; } cases[] = {
        {"kettle", IST_SHAPE_WORD}, {"don't", IST_SHAPE_WORD}, {"", IST_SHAPE_WORD},
        {"6", IST_SHAPE_NUMBER}, {"6.39", IST_SHAPE_NUMBER}, {"7,00", IST_SHAPE_NUMBER},
        {"1.000.000", IST_SHAPE_NUMBER}, {"40cm", IST_SHAPE_NUMBER},
        {"1st", IST_SHAPE_NUMBER}, {"\xd9\xa3\xd9\xa4", IST_SHAPE_NUMBER}, /* Arabic-Indic */
        {"tw-4410", IST_SHAPE_CODE}, {"tw4410", IST_SHAPE_CODE}, {"fh8381", IST_SHAPE_CODE},
        {"a4", IST_SHAPE_CODE}, {"3m8", IST_SHAPE_CODE}, {"\xc3\xa9t\xc3\xa9" "3", IST_SHAPE_CODE},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        ist_word_shape got = ist_word_shape_of(cases[i].w, strlen(cases[i].w));
        if (got != cases[i].s)
            printf("# %s: %s, expected %s\n", cases[i].w, ist_word_shape_name(got),
                   ist_word_shape_name(cases[i].s));
        assert_int_equal(got, cases[i].s);
    }
    ist_numbers_policy p;
    assert_true(ist_numbers_policy_parse("drop", &p));
    assert_int_equal(p, IST_NUMBERS_DROP);
    assert_true(ist_numbers_policy_parse("mask", &p));
    assert_int_equal(p, IST_NUMBERS_MASK);
    assert_true(ist_numbers_policy_parse("keep", &p));
    assert_int_equal(p, IST_NUMBERS_KEEP);
    assert_false(ist_numbers_policy_parse("Keep", &p));
    assert_false(ist_numbers_policy_parse(NULL, &p));
    assert_string_equal(ist_numbers_policy_name(IST_NUMBERS_MASK), "mask");
}

static void
check_policy(ist_numbers_policy pol, const char *text, const char *want)
{
    words ws = {{0}, 0, 0};
    ist_text_opts o;
    ist_error err;

    ist_text_opts_init(&o);
    o.numbers = pol;
    assert_int_equal(ist_segment_words_opts(text, strlen(text), &o, collect, &ws, &err), IST_OK);
    assert_string_equal(ws.buf, want);
}

static void
numbers_policy_applies_to_numbers_only(void **state)
{
    static const char text[] = "kettle 6.39 tw-4410 40cm fh8381 \xd9\xa3\xd9\xa4 x";
    char longnum[400], masked[400];
    (void)state;
    check_policy(IST_NUMBERS_KEEP, text, "kettle|6.39|tw-4410|40cm|fh8381|\xd9\xa3\xd9\xa4|x");
    check_policy(IST_NUMBERS_MASK, text, "kettle|0.00|tw-4410|00cm|fh8381|00|x");
    check_policy(IST_NUMBERS_DROP, text, "kettle|tw-4410|fh8381|x");
    /* a number longer than the segmenter's small buffer */
    memset(longnum, '7', 300);
    longnum[300] = '\0';
    memset(masked, '0', 300);
    masked[300] = '\0';
    check_policy(IST_NUMBERS_MASK, longnum, masked);
    words ws = {{0}, 0, 0};
    ist_error err;
    assert_int_equal(ist_segment_words_opts("a 1 b", 5, NULL, collect, &ws, &err), IST_OK);
    assert_string_equal(ws.buf, IST_NUMBERS_DEFAULT == IST_NUMBERS_DROP ? "a|b"
                                : IST_NUMBERS_DEFAULT == IST_NUMBERS_MASK ? "a|0|b" : "a|1|b");
}

static void
segment_words_stops_and_rejects(void **state)
{
    int n = 0;
    ist_error err;

    (void)state;
    assert_int_equal(ist_segment_words("one two three", 13, stop_after_one, &n, &err), IST_OK);
    assert_int_equal(n, 1);
    assert_int_equal(ist_segment_words("ab\xff", 3, stop_after_one, &n, &err), IST_ERR_INVALID);
    assert_int_equal(err.offset, 2);
}

static void
opts_json_round_trip(void **state)
{
    ist_text_opts o, back;
    char *json, prov[512];
    ist_error err;

    (void)state;
    ist_text_opts_init(&o);
    o.casefold = false;
    o.mask_digits = true;
    o.numbers = IST_NUMBERS_DROP;
    assert_int_equal(ist_text_opts_to_json(&o, &json, &err), IST_OK);
    assert_non_null(strstr(json, "\"casefold\":false"));
    assert_non_null(strstr(json, "\"numbers\":\"drop\""));
    assert_non_null(strstr(json, "\"unicode\":\"15.0.0\""));
    memset(&back, 0xff, sizeof back);
    ist_text_opts_init(&back);
    assert_int_equal(ist_text_opts_from_provenance(json, &back, &err), IST_OK);
    assert_memory_equal(&o, &back, sizeof o);
    snprintf(prov, sizeof prov, "{\"tool\":\"isthmus\",\"corpus\":{\"text\":%s}}", json);
    ist_text_opts_init(&back);
    assert_int_equal(ist_text_opts_from_provenance(prov, &back, &err), IST_OK);
    assert_memory_equal(&o, &back, sizeof o);
    ist_text_free(json);
    assert_int_equal(ist_text_opts_from_provenance("{\"tool\":\"x\"}", &back, &err),
                     IST_ERR_FORMAT);
    assert_int_equal(ist_text_opts_from_provenance("{not json", &back, &err), IST_ERR_FORMAT);
    assert_int_equal(ist_text_opts_from_provenance(NULL, &back, &err), IST_ERR_FORMAT);
    /* a file from before the policy kept every number; an unknown policy is refused and
     * leaves the options as they were */
    ist_text_opts_init(&back);
    back.numbers = IST_NUMBERS_MASK;
    assert_int_equal(ist_text_opts_from_provenance("{\"nfkc\":true,\"casefold\":true}", &back,
                                                   &err), IST_OK);
    assert_int_equal(back.numbers, IST_NUMBERS_KEEP);
    back.numbers = IST_NUMBERS_MASK;
    assert_int_equal(ist_text_opts_from_provenance(
                         "{\"nfkc\":false,\"casefold\":true,\"numbers\":\"hide\"}", &back, &err),
                     IST_ERR_FORMAT);
    assert_non_null(strstr(err.msg, "'hide'"));
    assert_int_equal(back.numbers, IST_NUMBERS_MASK);
    assert_true(back.nfkc);
}

static void
tables_match_utf8proc_version(void **state)
{
    (void)state;
    /* the generated table and utf8proc must describe the same Unicode version */
    assert_string_equal(ist_wordbreak_unicode_version(), ist_text_unicode_version());
}

/* ---- Unicode's own test files ---------------------------------------------- */

/* Parse hex code points separated by spaces into UTF-8; returns false when a
 * field is not a scalar value. */
static bool
hex_to_utf8(const char *s, char *out, size_t cap, size_t *len)
{
    size_t o = 0;
    char *end;

    while (*s) {
        while (*s == ' ')
            s++;
        if (!*s)
            break;
        unsigned long cp = strtoul(s, &end, 16);
        if (end == s || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff) || o + 4 >= cap)
            return false;
        o += ist_utf8_encode((uint32_t)cp, (unsigned char *)out + o);
        s = end;
    }
    out[o] = '\0';
    *len = o;
    return true;
}

/* One line of WordBreakTest.txt: "÷ 0001 × 0308 ÷ 0020 ÷ # comment". */
static int
word_break_case(char *line, bool *ok)
{
    bounds want = {{0}, 0}, got = {{0}, 0};
    char text[1024];
    size_t len = 0;
    char *hash = strchr(line, '#');

    if (hash)
        *hash = '\0';
    for (char *tok = strtok(line, " \t\n"); tok; tok = strtok(NULL, " \t\n")) {
        if (strcmp(tok, "\xc3\xb7") == 0) {            /* ÷ */
            if (len > 0)
                want.at[want.n++] = len;
        } else if (strcmp(tok, "\xc3\x97") == 0) {     /* × */
            continue;
        } else {
            size_t n;
            if (!hex_to_utf8(tok, text + len, sizeof text - len, &n))
                return -1;
            len += n;
        }
    }
    if (len == 0)
        return 0;
    if (ist_segment_all(text, len, record_bound, &got, NULL) != IST_OK)
        return -1;
    *ok = got.n == want.n && memcmp(got.at, want.at, want.n * sizeof want.at[0]) == 0;
    return 1;
}

static void
word_break_test_file(void **state)
{
    char *path = unicode_file("auxiliary/WordBreakTest.txt");
    char line[4096];
    int cases = 0, pass = 0, skipped = 0;
    uint64_t lineno = 0;

    (void)state;
    assert_non_null(path);
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    while (fgets(line, sizeof line, f)) {
        bool ok = false;
        char copy[4096];
        lineno++;
        memcpy(copy, line, sizeof copy);
        int r = word_break_case(line, &ok);
        if (r < 0) {
            skipped++;
            printf("# skipped WordBreakTest.txt:%llu: not encodable as UTF-8\n",
                   (unsigned long long)lineno);
        } else if (r > 0) {
            cases++;
            pass += ok;
            if (!ok)
                printf("# FAIL WordBreakTest.txt:%llu: %s", (unsigned long long)lineno, copy);
        }
    }
    fclose(f);
    printf("# WordBreakTest.txt (Unicode %s, UAX #29): %d of %d cases pass, %d skipped\n",
           ist_wordbreak_unicode_version(), pass, cases, skipped);
    free(path);
    assert_true(cases > 1800);
    assert_int_equal(pass, cases);
    assert_int_equal(skipped, 0);
}

/* NormalizationTest.txt: c4 == toNFKC(c1) == toNFKC(c2) == toNFKC(c3) ==
 * toNFKC(c4) == toNFKC(c5) (the file's own header states these invariants). */
static void
normalization_test_file_nfkc(void **state)
{
    char *path = unicode_file("NormalizationTest.txt.bz2");
    char cmd[1024], line[4096], col[5][512];
    int cases = 0, pass = 0;
    uint64_t lineno = 0;
    ist_text_opts o;
    ist_normalizer *nz;

    (void)state;
    assert_non_null(path);
    snprintf(cmd, sizeof cmd, "bzip2 -dc '%s'", path);
    FILE *p = popen(cmd, "r");
    assert_non_null(p);
    ist_text_opts_init(&o);
    o.casefold = false;
    assert_int_equal(ist_normalizer_new(&o, &nz, NULL), IST_OK);
    while (fgets(line, sizeof line, p)) {
        size_t clen[5];
        char *s = line, *semi;
        int k;
        lineno++;
        if (line[0] == '#' || line[0] == '@' || line[0] == '\n')
            continue;
        for (k = 0; k < 5 && (semi = strchr(s, ';')); k++) {
            *semi = '\0';
            assert_true(hex_to_utf8(s, col[k], sizeof col[k], &clen[k]));
            s = semi + 1;
        }
        assert_int_equal(k, 5);
        cases++;
        bool ok = true;
        for (k = 0; k < 5; k++) {
            const char *out;
            size_t n;
            assert_int_equal(ist_normalize(nz, col[k], clen[k], &out, &n, NULL), IST_OK);
            if (n != clen[3] || memcmp(out, col[3], n) != 0)
                ok = false;
        }
        pass += ok;
        if (!ok)
            printf("# FAIL NormalizationTest.txt:%llu (NFKC)\n", (unsigned long long)lineno);
    }
    assert_int_equal(pclose(p), 0);
    ist_normalizer_free(nz);
    printf("# NormalizationTest.txt (Unicode %s, UAX #15), NFKC column: %d of %d cases pass\n",
           ist_text_unicode_version(), pass, cases);
    free(path);
    assert_true(cases > 19000);
    assert_int_equal(pass, cases);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(defaults_fold_and_nfkc),
        cmocka_unit_test(strip_marks_and_mask_digits),
        cmocka_unit_test(invalid_utf8_replaced_and_counted),
        cmocka_unit_test(strict_utf8_reports_offset),
        cmocka_unit_test(piecewise_equals_whole_string),
        cmocka_unit_test(random_input_properties),
        cmocka_unit_test(fast_segmenter_equals_rules),
        cmocka_unit_test(segment_words_keeps_words),
        cmocka_unit_test(segment_words_stops_and_rejects),
        cmocka_unit_test(segment_words_keeps_codes_whole),
        cmocka_unit_test(word_shapes_classify),
        cmocka_unit_test(numbers_policy_applies_to_numbers_only),
        cmocka_unit_test(opts_json_round_trip),
        cmocka_unit_test(tables_match_utf8proc_version),
        cmocka_unit_test(word_break_test_file),
        cmocka_unit_test(normalization_test_file_nfkc),
    };
    char *wb = unicode_file("auxiliary/WordBreakTest.txt");
    char *nt = unicode_file("NormalizationTest.txt.bz2");
    if (!wb || !nt) {
        printf("1..0 # SKIP Unicode test files missing under %s (Debian package unicode-data)\n",
               unicode_dir());
        free(wb);
        free(nt);
        return 77;
    }
    free(wb);
    free(nt);
    HARNESS_RUN("text", tests);
}
