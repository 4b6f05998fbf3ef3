/* test_error.c - error records: formatting, prefixing, first cause kept. */
#include "harness.h"

#include <errno.h>

#include <isthmus/error.h>

#include "error_int.h"

static void
formats_file_line_and_errno(void **state)
{
    ist_error e;
    char buf[600];

    (void)state;
    ist_error_clear(&e);
    ist_error_at(&e, IST_ERR_FORMAT, "vec.txt", 17, "expected %d numbers, found %d", 300, 299);
    assert_string_equal(ist_error_format(&e, buf, sizeof buf),
                        "vec.txt:17: expected 300 numbers, found 299");
    errno = ENOENT;
    ist_error_sys(&e, IST_ERR_IO, "missing.txt", "cannot open for reading");
    assert_string_equal(ist_error_format(&e, buf, sizeof buf),
                        "missing.txt: cannot open for reading (No such file or directory)");
    ist_error_at_offset(&e, IST_ERR_FORMAT, "v.isv", 88, "bad");
    assert_string_equal(ist_error_format(&e, buf, sizeof buf), "v.isv: byte 88: bad");
}

static void
prefix_keeps_cause(void **state)
{
    ist_error e;

    (void)state;
    ist_error_clear(&e);
    ist_error_prefix(&e, "ignored");        /* no error yet: nothing happens */
    assert_string_equal(e.msg, "");
    ist_error_set(&e, IST_ERR_NOMEM, "out of memory");
    ist_error_prefix(&e, "loading %s", "en");
    assert_string_equal(e.msg, "loading en: out of memory");
    assert_int_equal(e.code, IST_ERR_NOMEM);
}

static void
null_record_is_fine(void **state)
{
    (void)state;
    assert_int_equal(ist_error_set(NULL, IST_ERR_IO, "x"), IST_ERR_IO);
    ist_error_prefix(NULL, "x");
    assert_string_equal(ist_status_name(IST_ERR_FORMAT), "format");
}

static void
format_truncates_safely(void **state)
{
    ist_error e;
    char small[8];

    (void)state;
    ist_error_at(&e, IST_ERR_FORMAT, "a-long-file-name.txt", 3, "message");
    ist_error_format(&e, small, sizeof small);
    assert_int_equal(strlen(small), 7);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(formats_file_line_and_errno),
        cmocka_unit_test(prefix_keeps_cause),
        cmocka_unit_test(null_record_is_fine),
        cmocka_unit_test(format_truncates_safely),
    };
    HARNESS_RUN("error", tests);
}
