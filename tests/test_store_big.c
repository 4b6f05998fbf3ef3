/* test_store_big.c - a 200,000 x 300 table survives text -> native -> text bit for bit
 * (suite slow: about 1.6 GB of temporary files). */
#include "harness.h"

#include <isthmus/store.h>

static void
big_round_trip_is_lossless(void **state)
{
    const size_t rows = 200000, dim = 300;
    char *dir = harness_tmpdir();
    char *txt = harness_path(dir, "big.txt"), *nat = harness_path(dir, "big.isv");
    char *back = harness_path(dir, "back.txt");
    uint64_t seed = 42;
    ist_store *s, *t, *n, *b;
    char w[32];

    (void)state;
    assert_int_equal(ist_store_new(rows, dim, &s, NULL), IST_OK);
    for (size_t i = 0; i < rows; i++) {
        float *r = ist_store_row_mut(s, i);
        for (size_t j = 0; j < dim; j++) {
            uint32_t bits;
            do {   /* any finite float32 bit pattern, not only "nice" values */
                bits = (uint32_t)harness_rand(&seed);
            } while ((bits & 0x7f800000u) == 0x7f800000u);
            memcpy(&r[j], &bits, sizeof bits);
        }
        snprintf(w, sizeof w, "w%zu", i);
        assert_int_equal(ist_store_set_word(s, i, w, 0, NULL), IST_OK);
    }
    assert_int_equal(ist_store_save(s, txt, NULL, NULL), IST_OK);
    assert_int_equal(ist_store_open(txt, NULL, &t, NULL), IST_OK);
    assert_int_equal(ist_store_save(t, nat, NULL, NULL), IST_OK);
    ist_store_opts o;
    ist_store_opts_init(&o);
    o.verify = true;
    assert_int_equal(ist_store_open(nat, &o, &n, NULL), IST_OK);
    assert_int_equal(ist_store_save(n, back, NULL, NULL), IST_OK);
    assert_int_equal(ist_store_open(back, NULL, &b, NULL), IST_OK);
    assert_int_equal(ist_store_rows(b), rows);
    for (size_t i = 0; i < rows; i++) {
        assert_memory_equal(ist_store_row(s, i), ist_store_row(n, i), dim * sizeof(float));
        assert_memory_equal(ist_store_row(s, i), ist_store_row(b, i), dim * sizeof(float));
    }
    assert_true(ist_store_fingerprint(s) == ist_store_fingerprint(b));
    ist_store_free(s);
    ist_store_free(t);
    ist_store_free(n);
    ist_store_free(b);
    free(txt);
    free(nat);
    free(back);
    harness_rmdir(dir);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(big_round_trip_is_lossless),
    };
    HARNESS_RUN("store_big", tests);
}
