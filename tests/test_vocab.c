/* test_vocab.c - word table: add, find, counts, frequency order, pruning. */
#include "harness.h"

#include <isthmus/vocab.h>

static void
add_find_count(void **state)
{
    ist_vocab *v;
    uint32_t id;

    (void)state;
    assert_int_equal(ist_vocab_new(&v, NULL), IST_OK);
    assert_int_equal(ist_vocab_add(v, "mug", 3, 2, &id, NULL), IST_OK);
    assert_int_equal(id, 0);
    assert_int_equal(ist_vocab_add(v, "lid", 3, 1, &id, NULL), IST_OK);
    assert_int_equal(id, 1);
    assert_int_equal(ist_vocab_add(v, "mug", 3, 5, &id, NULL), IST_OK);
    assert_int_equal(id, 0);
    assert_int_equal(ist_vocab_count(v, 0), 7);
    assert_int_equal(ist_vocab_total(v), 8);
    assert_int_equal(ist_vocab_find(v, "lid", 3), 1);
    assert_int_equal(ist_vocab_find(v, "li", 2), -1);
    assert_string_equal(ist_vocab_word(v, 1), "lid");
    ist_vocab_free(v);
    ist_vocab_free(NULL);
}

static void
many_words_survive_growth(void **state)
{
    ist_vocab *v;
    char w[32];

    (void)state;
    assert_int_equal(ist_vocab_new(&v, NULL), IST_OK);
    for (int i = 0; i < 50000; i++) {
        int n = snprintf(w, sizeof w, "w%d", i);
        assert_int_equal(ist_vocab_add(v, w, (size_t)n, (uint64_t)i + 1, NULL, NULL), IST_OK);
    }
    assert_int_equal(ist_vocab_size(v), 50000);
    for (int i = 0; i < 50000; i += 997) {
        int n = snprintf(w, sizeof w, "w%d", i);
        assert_int_equal(ist_vocab_find(v, w, (size_t)n), i);
    }
    ist_vocab_free(v);
}

static void
sort_and_prune(void **state)
{
    ist_vocab *v;
    uint32_t remap[5];

    (void)state;
    assert_int_equal(ist_vocab_new(&v, NULL), IST_OK);
    ist_vocab_add(v, "c", 1, 3, NULL, NULL);
    ist_vocab_add(v, "a", 1, 9, NULL, NULL);
    ist_vocab_add(v, "b", 1, 3, NULL, NULL);   /* tie with c: byte order puts b first */
    ist_vocab_add(v, "rare", 4, 1, NULL, NULL);
    ist_vocab_add(v, "d", 1, 2, NULL, NULL);
    assert_int_equal(ist_vocab_sort_prune(v, 2, 3, remap, NULL), IST_OK);
    assert_int_equal(ist_vocab_size(v), 3);
    assert_string_equal(ist_vocab_word(v, 0), "a");
    assert_string_equal(ist_vocab_word(v, 1), "b");
    assert_string_equal(ist_vocab_word(v, 2), "c");
    assert_int_equal(remap[0], 2);          /* c */
    assert_int_equal(remap[1], 0);          /* a */
    assert_int_equal(remap[3], UINT32_MAX); /* rare: below min count */
    assert_int_equal(remap[4], UINT32_MAX); /* d: beyond max size */
    assert_int_equal(ist_vocab_find(v, "c", 1), 2);
    assert_int_equal(ist_vocab_find(v, "d", 1), -1);
    assert_int_equal(ist_vocab_total(v), 15);
    ist_vocab_free(v);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(add_find_count),
        cmocka_unit_test(many_words_survive_growth),
        cmocka_unit_test(sort_and_prune),
    };
    HARNESS_RUN("vocab", tests);
}
