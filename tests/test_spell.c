/* test_spell.c - the spelling distance behind the program's "did you mean" hints. */
#include "harness.h"

#include "spell.h"

static void
test_worked_examples(void **state)
{
    (void)state;
    /* worked by hand from the definition (spell.h): */
    assert_int_equal(spell_distance("align", "align", 5), 0);
    assert_int_equal(spell_distance("algin", "align", 5), 1);      /* one swap */
    assert_int_equal(spell_distance("aling", "align", 5), 1);      /* ng -> gn */
    assert_int_equal(spell_distance("alnig", "align", 5), 2);      /* n moved two places */
    assert_int_equal(spell_distance("", "gate", 9), 4);
    assert_int_equal(spell_distance("score", "", 9), 5);
    assert_int_equal(spell_distance("scroe", "score", 5), 1);
    assert_int_equal(spell_distance("kettle", "kettles", 5), 1);
    /* the textbook Levenshtein pair: k->s, e->i, insert g (no swap helps) */
    assert_int_equal(spell_distance("kitten", "sitting", 5), 3);
    /* the case where this distance and the unrestricted one part: "ca" -> "ac" -> "abc"
     * edits the swapped pair again, which the alignment distance does not allow, so it
     * is 3 here (delete c, keep a, insert b, insert c), against 2 unrestricted */
    assert_int_equal(spell_distance("ca", "abc", 5), 3);
}

static void
test_code_points(void **state)
{
    (void)state;
    assert_int_equal(spell_distance("cañón", "canon", 5), 2);      /* two letters, not bytes */
    assert_int_equal(spell_distance("año", "ano", 5), 1);
    assert_int_equal(spell_distance("größe", "grösse", 5), 2);     /* ß -> s, insert s */
    assert_int_equal(spell_distance("ñé", "éñ", 5), 1);            /* a swap of two letters */
    /* bytes that are no UTF-8 count one each and never equal a letter */
    assert_int_equal(spell_distance("a\xff", "a\xfe", 5), 1);
    assert_int_equal(spell_distance("\xc3", "\xc3\xb1", 5), 1);    /* cut short vs ñ */
}

static void
test_limit(void **state)
{
    (void)state;
    assert_int_equal(spell_distance("kitten", "sitting", 2), 3);   /* limit + 1 */
    assert_int_equal(spell_distance("kitten", "sitting", 3), 3);
    assert_int_equal(spell_distance("a", "abcdef", 2), 3);         /* lengths alone decide */
    assert_int_equal(spell_distance("abc", "xyz", 0), 1);
    assert_int_equal(spell_limit("gate"), 1);
    assert_int_equal(spell_limit("algin"), 2);
    assert_int_equal(spell_limit("dimension"), 3);
    assert_int_equal(spell_limit("año"), 1);                        /* counted in letters */
    /* past SPELL_MAX_CHARS only equality is seen */
    char longa[100], longb[100];
    memset(longa, 'a', 80);
    longa[80] = '\0';
    memcpy(longb, longa, 81);
    assert_int_equal(spell_distance(longa, longb, 3), 0);
    longb[5] = 'b';
    assert_int_equal(spell_distance(longa, longb, 3), 4);
}

/* An independent reference: the fewest single edits (insert, delete, substitute, swap of
 * neighbours) by breadth-first search over all strings. It may re-edit a substring, so
 * it is a lower bound of the alignment distance, and plain Levenshtein distance (the
 * same search without swaps) is an upper bound; the two agree on every pair below
 * except where a swapped pair is edited again. */
#define ALPHA "abc"
#define MAXLEN 5

static size_t
bfs_distance(const char *from, const char *to, int swaps)
{
    static char queue[200000][MAXLEN + 1];
    static unsigned char depth[200000];
    size_t head = 0, tail = 0;

    strcpy(queue[tail], from);
    depth[tail++] = 0;
    while (head < tail) {
        const char *s = queue[head];
        unsigned char d = depth[head++];
        size_t n = strlen(s);
        char next[MAXLEN + 2];
        if (strcmp(s, to) == 0)
            return d;
        for (size_t kind = 0; kind < 4; kind++)
            for (size_t i = 0; i <= n; i++)
                for (size_t a = 0; a < (kind == 0 || kind == 2 ? 3u : 1u); a++) {
                    if (kind == 0 && n < MAXLEN) {            /* insert ALPHA[a] at i */
                        memcpy(next, s, i);
                        next[i] = ALPHA[a];
                        strcpy(next + i + 1, s + i);
                    } else if (kind == 1 && i < n) {          /* delete i */
                        memcpy(next, s, i);
                        strcpy(next + i, s + i + 1);
                    } else if (kind == 2 && i < n && s[i] != ALPHA[a]) {
                        strcpy(next, s);
                        next[i] = ALPHA[a];
                    } else if (kind == 3 && swaps && i + 1 < n && s[i] != s[i + 1]) {
                        strcpy(next, s);
                        next[i] = s[i + 1];
                        next[i + 1] = s[i];
                    } else {
                        continue;
                    }
                    int seen = 0;
                    for (size_t q = 0; q < tail && !seen; q++)
                        seen = strcmp(queue[q], next) == 0;
                    if (!seen && tail < 200000) {
                        strcpy(queue[tail], next);
                        depth[tail++] = (unsigned char)(d + 1);
                    }
                }
    }
    return (size_t)-1;
}

static void
test_against_search(void **state)
{
    (void)state;
    char words[200][4];
    size_t nw = 0, differ = 0;
    /* every string of up to 3 letters over {a, b, c} */
    for (size_t len = 0; len <= 3; len++) {
        size_t count = 1;
        for (size_t k = 0; k < len; k++)
            count *= 3;
        for (size_t v = 0; v < count; v++) {
            size_t x = v;
            for (size_t k = 0; k < len; k++, x /= 3)
                words[nw][k] = ALPHA[x % 3];
            words[nw++][len] = '\0';
        }
    }
    for (size_t i = 0; i < nw; i++)
        for (size_t j = 0; j < nw; j += 3) {   /* every third target keeps it quick */
            size_t d = spell_distance(words[i], words[j], 10);
            size_t lo = bfs_distance(words[i], words[j], 1);
            size_t hi = bfs_distance(words[i], words[j], 0);
            assert_true(lo <= d);
            assert_true(d <= hi);
            differ += d != lo;
            assert_int_equal(spell_distance(words[j], words[i], 10), d);   /* symmetric */
        }
    /* the bounds are not slack everywhere: only re-edited swaps part from the search */
    assert_true(differ < nw);
}

static const char *const names[] = {"prepare", "train", "align", "score", "lookup", "gate",
                                    "propose", "report"};

static const char *
get_name(const void *ctx, size_t i)
{
    (void)ctx;
    return names[i];
}

static void
test_nearest(void **state)
{
    (void)state;
    size_t out[4];
    size_t n = spell_nearest("algin", get_name, NULL, 8, out, 4);
    assert_int_equal(n, 1);
    assert_string_equal(names[out[0]], "align");
    n = spell_nearest("scor", get_name, NULL, 8, out, 4);
    assert_int_equal(n, 1);
    assert_string_equal(names[out[0]], "score");
    /* the nearer first, whatever the table order */
    n = spell_nearest("prepose", get_name, NULL, 8, out, 4);
    assert_int_equal(n, 2);
    assert_string_equal(names[out[0]], "propose");   /* distance 1 */
    assert_string_equal(names[out[1]], "prepare");   /* distance 2 */
    /* at one distance, in table order */
    n = spell_nearest("repose", get_name, NULL, 8, out, 4);
    assert_int_equal(n, 2);
    assert_string_equal(names[out[0]], "propose");
    assert_string_equal(names[out[1]], "report");
    n = spell_nearest("window", get_name, NULL, 8, out, 4);
    assert_int_equal(n, 0);
    n = spell_nearest("gate", get_name, NULL, 8, out, 4);   /* the word itself is no hint */
    assert_int_equal(n, 0);
    n = spell_nearest("prepose", get_name, NULL, 8, out, 1);  /* cap keeps the closest */
    assert_int_equal(n, 1);
    assert_string_equal(names[out[0]], "propose");
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_worked_examples),
        cmocka_unit_test(test_code_points),
        cmocka_unit_test(test_limit),
        cmocka_unit_test(test_against_search),
        cmocka_unit_test(test_nearest),
    };
    HARNESS_RUN("spell", tests);
}
