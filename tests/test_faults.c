/* test_faults.c - every allocation of the library can fail: the call then reports
 * IST_ERR_NOMEM, leaks nothing (checked by LeakSanitizer in the sanitizer build) and
 * leaves no output file. Needs a -Dfault_injection=true build (the sanitizer build of
 * tools/run-tests); elsewhere it reports itself skipped. */
#include "harness.h"

#include <isthmus/store.h>
#include <isthmus/testing.h>

#include "alloc_int.h"
#include "json_int.h"

static char *dir;

typedef ist_status (*op_fn)(void);

static const char *text_path, *native_path, *out_path;

static ist_status
op_open_text(void)
{
    ist_store *s;
    ist_status rc = ist_store_open(text_path, NULL, &s, NULL);
    ist_store_free(s);
    return rc;
}

static ist_status
op_open_native(void)
{
    ist_store_opts o;
    ist_store *s;
    ist_store_opts_init(&o);
    o.verify = true;
    ist_status rc = ist_store_open(native_path, &o, &s, NULL);
    ist_store_free(s);
    return rc;
}

static ist_status
op_convert(void)
{
    ist_store *s;
    ist_status rc = ist_store_open(text_path, NULL, &s, NULL);
    if (rc == IST_OK)
        rc = ist_store_save(s, out_path, NULL, NULL);
    ist_store_free(s);
    return rc;
}

static ist_status
op_json(void)
{
    static const char t[] = "{\"a\":[1,2,{\"b\":\"c\\u00e9\"}],\"d\":true}";
    ist_jv *v;
    ist_status rc = ist_json_parse(t, sizeof t - 1, NULL, &v, NULL);
    ist_jv_free(v);
    if (rc != IST_OK)
        return rc;
    ist_jw w;
    char *out;
    ist_jw_init(&w, true);
    ist_jw_obj_begin(&w, NULL);
    for (int i = 0; i < 100; i++)
        ist_jw_str(&w, "key", "a value long enough to make the buffer grow");
    ist_jw_obj_end(&w);
    rc = ist_jw_finish(&w, &out, NULL);
    ist_free(out);
    return rc;
}

/* Fail allocation k for k = 0, 1, ... until the operation succeeds. */
static void
every_failure_point(op_fn op, const char *name)
{
    int k;
    for (k = 0; k < 100000; k++) {
        ist_testing_fail_alloc_after(k);
        ist_status rc = op();
        ist_testing_fail_alloc_after(-1);
        if (rc == IST_OK)
            break;
        if (rc != IST_ERR_NOMEM)
            fail_msg("%s: allocation %d failing gave status %d, expected out of memory", name, k,
                     (int)rc);
        if (out_path && access(out_path, F_OK) == 0)
            fail_msg("%s: output left behind after allocation %d failed", name, k);
        assert_int_equal(harness_count_entries(dir), 2);   /* only the two inputs */
    }
    assert_true(k > 0);         /* the operation allocates, so some point was tried */
    assert_true(k < 100000);
    unlink(out_path);
}

static void
store_and_json_survive_every_failed_allocation(void **state)
{
    (void)state;
    if (!ist_testing_fault_injection_enabled())
        skip();
    every_failure_point(op_open_text, "open text");
    every_failure_point(op_open_native, "open native");
    every_failure_point(op_convert, "convert");
    every_failure_point(op_json, "json");
}

int
main(void)
{
    if (!ist_testing_fault_injection_enabled()) {
        printf("1..0 # SKIP built without -Dfault_injection=true\n");
        return 0;   /* TAP: a plan of 0 with SKIP is how a skipped binary reports */
    }
    dir = harness_tmpdir();
    char *t = harness_path(dir, "v.txt"), *n = harness_path(dir, "v.isv");
    char *o = harness_path(dir, "out.isv");
    const char *table = "3 2\ncup 1 2\nmug 3 4\nt\xc3\xa9 5 6\n";
    harness_write(t, table, strlen(table));
    ist_store *s;
    assert_int_equal(ist_store_open(t, NULL, &s, NULL), IST_OK);
    assert_int_equal(ist_store_save(s, n, NULL, NULL), IST_OK);
    ist_store_free(s);
    text_path = t;
    native_path = n;
    out_path = o;
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(store_and_json_survive_every_failed_allocation),
    };
    cmocka_set_message_output(CM_OUTPUT_TAP);
    int failed = cmocka_run_group_tests_name("faults", tests, NULL, NULL);
    printf("# faults: %d passed, %d failed\n", 1 - failed, failed);
    harness_rmdir(dir);
    free(t);
    free(n);
    free(o);
    return failed ? 1 : 0;
}
