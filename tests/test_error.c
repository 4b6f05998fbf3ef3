/* test_error.c - error records: formatting, prefixing, first cause kept. */
#include "harness.h"

#include <errno.h>
#include <stdlib.h>
#include <unistd.h>

#include <isthmus/error.h>
#include <isthmus/filekind.h>

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

#define CLASSIFY(lit) ist_file_classify((const unsigned char *)(lit), sizeof(lit) - 1)

/* The project's own signatures, its JSON kinds and binary bytes are told apart
 * from the first bytes alone. */
static void
file_kinds_by_first_bytes(void **state)
{
    (void)state;
    assert_int_equal(CLASSIFY("ISTHMUSV\x01\0\0\0"), IST_FILE_VECTORS);
    assert_int_equal(CLASSIFY("ISTHMUSM\x01\0\0\0"), IST_FILE_MAP);
    assert_int_equal(CLASSIFY("ISTPREP\x1a\x01\0"), IST_FILE_PREPARED);
    assert_int_equal(CLASSIFY("ISTHMUSQ\0\0"), IST_FILE_OWN_BINARY);
    assert_int_equal(CLASSIFY("{\n  \"format\": \"isthmus result\",\n"), IST_FILE_RESULT);
    assert_int_equal(CLASSIFY("{\"format\":\"isthmus verdict\"}"), IST_FILE_VERDICT);
    assert_int_equal(CLASSIFY("{\"format\":\"isthmus resultant\"}"), IST_FILE_JSON);
    assert_int_equal(CLASSIFY("{\"runs\": []}"), IST_FILE_JSON);
    assert_int_equal(CLASSIFY("# isthmus candidate list: ...\n"), IST_FILE_CANDIDATES);
    assert_int_equal(CLASSIFY("kettle\thervidor\n"), IST_FILE_TEXT);
    /* a text line that begins with a signature's letters stays text (a word list
     * whose first source word is ISTHMUSM, found by fuzzing); the signature alone,
     * cut short, is still the binary kind for its reader to call truncated */
    assert_int_equal(CLASSIFY("ISTHMUSM\tmu\n"), IST_FILE_TEXT);
    assert_int_equal(CLASSIFY("ISTHMUSV x\n"), IST_FILE_TEXT);
    assert_int_equal(CLASSIFY("ISTPREP\x1a\tsol\n"), IST_FILE_TEXT);
    assert_int_equal(CLASSIFY("ISTHMUSV"), IST_FILE_VECTORS);
    assert_int_equal(CLASSIFY("caf\xc3\xa9 caf\xc3\xa9\n"), IST_FILE_TEXT);
    assert_int_equal(CLASSIFY("\xef\xbb\xbfkettle\thervidor\n"), IST_FILE_TEXT);
    /* binary: at least 8 bytes that text never holds, and at least 1 in 20 */
    assert_int_equal(CLASSIFY("ab\0\0\0\0\0\0\0\0cd"), IST_FILE_BINARY);
    assert_int_equal(CLASSIFY("\x01\x02\x03\x04\xff\xfe\xfd\x80 text"), IST_FILE_BINARY);
    /* a stray NUL or a Latin-1 word stays text, for the reader to name its line */
    assert_int_equal(CLASSIFY("kettle\ttetera\n\0up taza\n"), IST_FILE_TEXT);
    assert_int_equal(CLASSIFY("uno one\ncaf\xe9 coffee\n"), IST_FILE_TEXT);
    assert_int_equal(CLASSIFY(""), IST_FILE_UNKNOWN);
}

/* ist_file_expect names what it found, who reads it, and what was wanted. */
static void
file_expect_names_kind_and_reader(void **state)
{
    char path[] = "/tmp/isthmus-kind-XXXXXX";
    ist_error e;
    int fd;

    (void)state;
    fd = mkstemp(path);
    assert_true(fd >= 0);
    assert_int_equal(write(fd, "ISTHMUSM\x01\0\0\0rest", 15), 15);
    close(fd);
    assert_int_equal(ist_file_expect(path, IST_FILE_ANY_TEXT, 1, "a pair list", &e),
                     IST_ERR_FORMAT);
    assert_string_equal(e.file, path);
    assert_non_null(strstr(e.msg, "this is a map file (written by 'isthmus align'; read with "
                                  "--map by score, lookup, propose and gate), not a pair list"));
    assert_int_equal(ist_file_expect(path, IST_FILE_BIT(IST_FILE_MAP), 0, "a map", &e), IST_OK);
    unlink(path);
    /* a missing file is left to the reader to report */
    assert_int_equal(ist_file_expect(path, IST_FILE_ANY_TEXT, 1, "a pair list", &e), IST_OK);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(formats_file_line_and_errno),
        cmocka_unit_test(prefix_keeps_cause),
        cmocka_unit_test(null_record_is_fine),
        cmocka_unit_test(format_truncates_safely),
        cmocka_unit_test(file_kinds_by_first_bytes),
        cmocka_unit_test(file_expect_names_kind_and_reader),
    };
    HARNESS_RUN("error", tests);
}
