/* test_output.c - a command's output files are committed as one group: all of them or
 * none, whatever stops the run (a stop request, a failed write, a failed rename). */
#include <dirent.h>
#include <sys/stat.h>
#include <unistd.h>

#include <isthmus/cancel.h>
#include <isthmus/output.h>

#include "harness.h"
#include "ofile_int.h"

static char *dir;

static int
setup(void **state)
{
    (void)state;
    dir = harness_tmpdir();
    return 0;
}

static int
teardown(void **state)
{
    (void)state;
    ist_output_discard();
    ist_cancel_reset();
    harness_rmdir(dir);
    return 0;
}

static bool
exists(const char *p)
{
    struct stat st;
    return stat(p, &st) == 0;
}

/* Entries of d other than . and .. */
static int
entries(const char *d)
{
    DIR *h = opendir(d);
    struct dirent *e;
    int n = 0;

    assert_non_null(h);
    while ((e = readdir(h)))
        n += strcmp(e->d_name, ".") != 0 && strcmp(e->d_name, "..") != 0;
    closedir(h);
    return n;
}

static void
write_one(const char *path, const char *text)
{
    ist_ofile *f;
    ist_error err;

    assert_int_equal(ist_ofile_open(path, false, &f, &err), IST_OK);
    assert_int_equal(ist_ofile_puts(f, text, &err), IST_OK);
    assert_int_equal(ist_ofile_commit(f, &err), IST_OK);
}

/* Held files wait as complete temporaries and appear together on release. */
static void
group_commit_all_at_once(void **state)
{
    (void)state;
    char *a = harness_path(dir, "a.map"), *b = harness_path(dir, "b.isv");
    size_t done = 99;
    ist_error err;

    ist_output_hold();
    write_one(a, "first\n");
    write_one(b, "second\n");
    assert_false(exists(a));
    assert_false(exists(b));
    assert_int_equal(ist_output_waiting(), 2);
    assert_string_equal(ist_output_waiting_name(0), a);
    assert_string_equal(ist_output_waiting_name(1), b);
    assert_int_equal(entries(dir), 2);            /* the two temporaries */
    assert_int_equal(ist_output_release(&done, &err), IST_OK);
    assert_int_equal(done, 2);
    assert_true(exists(a));
    assert_true(exists(b));
    assert_int_equal(entries(dir), 2);            /* no temporary left */
    assert_int_equal(ist_output_waiting(), 0);
    /* not holding any more: the next commit renames at once */
    char *c = harness_path(dir, "c.txt");
    write_one(c, "third\n");
    assert_true(exists(c));
    free(a);
    free(b);
    free(c);
}

/* A stop requested after the first file was finished (the signal of item 4 of the
 * reliability table) leaves no file of the run in place. */
static void
group_commit_stopped_writes_nothing(void **state)
{
    (void)state;
    char *a = harness_path(dir, "a.isv"), *b = harness_path(dir, "a.txt");
    size_t done = 99;
    ist_error err;

    ist_output_hold();
    write_one(a, "vectors\n");
    write_one(b, "text copy\n");
    ist_cancel_request();                           /* the signal arrives before the renames */
    assert_int_equal(ist_output_release(&done, &err), IST_ERR_CANCELLED);
    assert_int_equal(done, 0);
    assert_false(exists(a));
    assert_false(exists(b));
    assert_int_equal(entries(dir), 0);
    free(a);
    free(b);
}

/* A failed run discards what it finished. */
static void
group_commit_discard(void **state)
{
    (void)state;
    char *a = harness_path(dir, "a.map");

    ist_output_hold();
    write_one(a, "map\n");
    ist_output_discard();
    assert_false(exists(a));
    assert_int_equal(entries(dir), 0);
    free(a);
}

/* A rename that fails says which file; the files before it are in place, the ones
 * from it on are removed. */
static void
group_commit_rename_failure(void **state)
{
    (void)state;
    char *sub = harness_path(dir, "sub");
    char *a = harness_path(dir, "a.map"), *b = harness_path(sub, "b.json");
    char *c = harness_path(dir, "c.json");
    size_t done = 99;
    ist_error err;

    assert_int_equal(mkdir(sub, 0777), 0);
    ist_output_hold();
    write_one(a, "1\n");
    write_one(b, "2\n");
    write_one(c, "3\n");
    /* a directory where b's temporary should be renamed: rename(2) refuses */
    assert_int_equal(mkdir(b, 0777), 0);
    assert_int_equal(ist_output_release(&done, &err), IST_ERR_IO);
    assert_int_equal(done, 1);
    assert_string_equal(err.file, b);
    assert_true(exists(a));
    assert_false(exists(c));
    assert_int_equal(entries(sub), 1);              /* b's directory, no temporary */
    assert_int_equal(rmdir(b), 0);
    assert_int_equal(rmdir(sub), 0);
    free(sub);
    free(a);
    free(b);
    free(c);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_setup_teardown(group_commit_all_at_once, setup, teardown),
        cmocka_unit_test_setup_teardown(group_commit_stopped_writes_nothing, setup, teardown),
        cmocka_unit_test_setup_teardown(group_commit_discard, setup, teardown),
        cmocka_unit_test_setup_teardown(group_commit_rename_failure, setup, teardown),
    };
    HARNESS_RUN("output", tests);
}
