/* test_json.c - the JSON writer and reader (RFC 8259 grammar). */
#include "harness.h"

#include <math.h>

#include "alloc_int.h"
#include "json_int.h"

static void
write_then_read(void **state)
{
    ist_jw w;
    char *text;
    ist_jv *root;

    (void)state;
    ist_jw_init(&w, true);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "word", "caf\xc3\xa9 \"mug\"\n");
    ist_jw_num(&w, "p1", 0.1);
    ist_jw_int(&w, "n", -42);
    ist_jw_bool(&w, "ok", true);
    ist_jw_num(&w, "bad", NAN);
    ist_jw_arr_begin(&w, "list");
    ist_jw_uint(&w, NULL, 18446744073709551615ull);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_obj_end(&w);
    ist_jw_arr_end(&w);
    ist_jw_obj_end(&w);
    assert_int_equal(ist_jw_finish(&w, &text, NULL), IST_OK);
    assert_int_equal(ist_json_parse(text, strlen(text), "t.json", &root, NULL), IST_OK);
    assert_string_equal(ist_jv_str(ist_jv_get(root, "word"), ""), "caf\xc3\xa9 \"mug\"\n");
    assert_true(ist_jv_num(ist_jv_get(root, "p1"), 0) == 0.1);   /* shortest round trip */
    assert_true(ist_jv_num(ist_jv_get(root, "n"), 0) == -42);
    assert_true(ist_jv_bool(ist_jv_get(root, "ok"), false));
    assert_int_equal(ist_jv_type(ist_jv_get(root, "bad")), IST_JNULL);
    assert_int_equal(ist_jv_len(ist_jv_get(root, "list")), 2);
    assert_int_equal(ist_jv_type(ist_jv_at(ist_jv_get(root, "list"), 1)), IST_JOBJ);
    assert_null(ist_jv_get(root, "absent"));
    ist_jv_free(root);
    ist_free(text);
}

static void
escapes_and_surrogates(void **state)
{
    const char *t = "[\"\\u00e9\\ud83d\\ude00\\/\\t\"]";
    ist_jv *root;

    (void)state;
    assert_int_equal(ist_json_parse(t, strlen(t), NULL, &root, NULL), IST_OK);
    assert_string_equal(ist_jv_str(ist_jv_at(root, 0), ""), "\xc3\xa9\xf0\x9f\x98\x80/\t");
    ist_jv_free(root);
}

static void
syntax_errors_name_the_line(void **state)
{
    static const char *const bad[] = {
        "{\"a\": 1,\n\"b\": }", "[1, 2", "{\"a\" 1}", "01", "1.", "\"\\x\"", "[1] 2", "",
        "\"\\ud800\"", "1e999", "{\"a\":\"\x01\"}",
    };
    ist_error e;
    ist_jv *root;
    char buf[600];

    (void)state;
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        assert_int_equal(ist_json_parse(bad[i], strlen(bad[i]), "r.json", &root, &e),
                         IST_ERR_FORMAT);
        assert_null(root);
        assert_string_equal(e.file, "r.json");
    }
    ist_json_parse(bad[0], strlen(bad[0]), "r.json", &root, &e);
    assert_string_equal(ist_error_format(&e, buf, sizeof buf),
                        "r.json:2: invalid JSON: expected a value, found '}'");
}

static void
depth_is_limited(void **state)
{
    char deep[200];
    ist_jv *root;
    ist_error e;

    (void)state;
    memset(deep, '[', sizeof deep);
    assert_int_equal(ist_json_parse(deep, sizeof deep, NULL, &root, &e), IST_ERR_FORMAT);
    assert_non_null(strstr(e.msg, "deeper than 64"));
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(write_then_read),
        cmocka_unit_test(escapes_and_surrogates),
        cmocka_unit_test(syntax_errors_name_the_line),
        cmocka_unit_test(depth_is_limited),
    };
    HARNESS_RUN("json", tests);
}
