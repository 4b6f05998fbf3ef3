/* test_floatparse.c - the locale-free float reader against the C library.
 * Reference: strtof, which C11 7.22.1.3 and glibc make correctly rounded. */
#include "harness.h"

#include <math.h>

#include "floatparse_int.h"

static void
reads_back_what_it_writes(void **state)
{
    uint64_t seed = 0x9e3779b97f4a7c15ull;
    char buf[32];

    (void)state;
    for (int i = 0; i < 1000000; i++) {
        uint32_t bits = (uint32_t)harness_rand(&seed);
        float f, g;
        memcpy(&f, &bits, sizeof f);
        if (!isfinite(f))
            continue;
        ist_format_float(f, buf);
        const char *end;
        assert_int_equal(ist_parse_float(buf, &end, &g), IST_FPARSE_OK);
        assert_int_equal(*end, '\0');
        uint32_t back;
        memcpy(&back, &g, sizeof back);
        if (back != bits)
            fail_msg("'%s' read back as %08x, wrote %08x", buf, back, bits);
    }
}

static void
matches_strtof_on_short_decimals(void **state)
{
    uint64_t seed = 12345;
    char buf[64];

    (void)state;
    for (int i = 0; i < 500000; i++) {
        uint64_t r = harness_rand(&seed);
        int digits = 1 + (int)(r % 12);
        int exp = (int)((r >> 8) % 40) - 20;
        uint64_t m = harness_rand(&seed) % 1000000000000ull;
        snprintf(buf, sizeof buf, "%s%.*llue%d", (r >> 20) & 1 ? "-" : "", digits,
                 (unsigned long long)(m % (uint64_t)pow(10, digits)), exp);
        float want = strtof(buf, NULL), got;
        const char *end;
        assert_int_equal(ist_parse_float(buf, &end, &got), IST_FPARSE_OK);
        if (memcmp(&want, &got, sizeof got) != 0)
            fail_msg("'%s': strtof %a, ours %a", buf, (double)want, (double)got);
    }
}

static void
midpoints_round_to_even(void **state)
{
    /* 16777217 = 2^24 + 1 lies half-way between the floats 16777216 and
     * 16777218; ties go to the even mantissa (IEEE 754-2008 4.3.1). */
    const char *end;
    float v;

    (void)state;
    assert_int_equal(ist_parse_float("16777217", &end, &v), IST_FPARSE_OK);
    assert_true(v == 16777216.0f);
    assert_int_equal(ist_parse_float("16777219", &end, &v), IST_FPARSE_OK);
    assert_true(v == 16777220.0f);
    assert_int_equal(ist_parse_float("16777217.000000001", &end, &v), IST_FPARSE_OK);
    assert_true(v == 16777218.0f);
    assert_int_equal(ist_parse_float("-16777217", &end, &v), IST_FPARSE_OK);
    assert_true(v == -16777216.0f);
}

static void
refuses_what_is_not_a_finite_number(void **state)
{
    static const char *const not_num[] = {"", "abc", ".", "-", "e5", "1e", "1e+", "nan", "inf",
                                          "0x1p3"};
    const char *end;
    float v;

    (void)state;
    for (size_t i = 0; i < sizeof not_num / sizeof not_num[0]; i++) {
        ist_fparse r = ist_parse_float(not_num[i], &end, &v);
        /* "0x1p3" reads as 0 followed by 'x': the caller sees the stray byte */
        if (r == IST_FPARSE_OK)
            assert_true(*end != '\0');
    }
    assert_int_equal(ist_parse_float("3.5e38", &end, &v), IST_FPARSE_NOT_FINITE);
    assert_int_equal(ist_parse_float("-1e39", &end, &v), IST_FPARSE_NOT_FINITE);
    assert_int_equal(ist_parse_float("1e-50", &end, &v), IST_FPARSE_OK);
    assert_true(v == 0.0f);
    assert_int_equal(ist_parse_float(".5", &end, &v), IST_FPARSE_OK);
    assert_true(v == 0.5f);
    assert_int_equal(ist_parse_float("+2.", &end, &v), IST_FPARSE_OK);
    assert_true(v == 2.0f);
    assert_int_equal(ist_parse_float("0.000000000000000000000000000000000000000001", &end, &v),
                     IST_FPARSE_OK);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(reads_back_what_it_writes),
        cmocka_unit_test(matches_strtof_on_short_decimals),
        cmocka_unit_test(midpoints_round_to_even),
        cmocka_unit_test(refuses_what_is_not_a_finite_number),
    };
    HARNESS_RUN("floatparse", tests);
}
