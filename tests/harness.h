/* harness.h - what the unit tests share: cmocka in TAP mode, temporary files,
 * and the closing "# name: N passed, N failed" line. */
#ifndef ISTHMUS_TEST_HARNESS_H
#define ISTHMUS_TEST_HARNESS_H

#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

/* Run a cmocka group with TAP output and print the summary line. */
#define HARNESS_RUN(name, tests)                                                        \
    do {                                                                                \
        cmocka_set_message_output(CM_OUTPUT_TAP);                                       \
        int failed_ = cmocka_run_group_tests_name(name, tests, NULL, NULL);            \
        size_t n_ = sizeof(tests) / sizeof((tests)[0]);                                 \
        printf("# %s: %zu passed, %d failed\n", name, n_ - (size_t)failed_, failed_);   \
        return failed_ ? 1 : 0;                                                         \
    } while (0)

/* A fresh temporary directory for the test; removed by harness_rmdir(). */
static inline char *
harness_tmpdir(void)
{
    char tmpl[] = "/tmp/isthmus-test-XXXXXX";
    char *d = mkdtemp(tmpl);
    assert_non_null(d);
    return strdup(d);
}

static inline void
harness_rmdir(char *dir)
{
    char cmd[512];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    assert_int_equal(system(cmd), 0);
    free(dir);
}

static inline char *
harness_path(const char *dir, const char *name)
{
    size_t n = strlen(dir) + strlen(name) + 2;
    char *p = malloc(n);
    snprintf(p, n, "%s/%s", dir, name);
    return p;
}

static inline void
harness_write(const char *path, const void *data, size_t n)
{
    FILE *f = fopen(path, "wb");
    assert_non_null(f);
    assert_int_equal(fwrite(data, 1, n, f), n);
    assert_int_equal(fclose(f), 0);
}

/* Number of entries in dir (besides . and ..): used to prove no temp file is left. */
static inline int
harness_count_entries(const char *dir)
{
    char cmd[512];
    snprintf(cmd, sizeof cmd, "ls -A '%s' | wc -l", dir);
    FILE *p = popen(cmd, "r");
    int n = -1;
    assert_non_null(p);
    assert_int_equal(fscanf(p, "%d", &n), 1);
    pclose(p);
    return n;
}

/* Deterministic xorshift random numbers for test data. */
static inline uint64_t
harness_rand(uint64_t *s)
{
    *s ^= *s << 13;
    *s ^= *s >> 7;
    *s ^= *s << 17;
    return *s;
}

static inline float
harness_randf(uint64_t *s)
{
    return (float)((double)(harness_rand(s) >> 11) / 9007199254740992.0 * 2.0 - 1.0);
}

#endif
