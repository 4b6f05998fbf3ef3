/* thread_count.c - a preload module for tests: counts the threads a program creates.
 *
 * Loaded with LD_PRELOAD, it stands in front of pthread_create, passes every call on to
 * the real one and, when the program exits, writes the number of threads created
 * successfully to the file named by ISTHMUS_THREAD_COUNT_FILE (nothing when unset).
 * The tests compare such counts between runs of the same program; they never time
 * anything. */
#define _GNU_SOURCE
#include <dlfcn.h>
#include <pthread.h>
#include <stdatomic.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef int (*create_fn)(pthread_t *, const pthread_attr_t *, void *(*)(void *), void *);

static atomic_long created;

__attribute__((visibility("default"))) int
pthread_create(pthread_t *thread, const pthread_attr_t *attr, void *(*start)(void *), void *arg)
{
    static create_fn real;
    if (!real) {
        void *sym = dlsym(RTLD_NEXT, "pthread_create");
        if (!sym)
            return EAGAIN;   /* no thread can be made */
        memcpy(&real, &sym, sizeof real);   /* object to function pointer, as POSIX allows */
    }
    int rc = real(thread, attr, start, arg);
    if (rc == 0)
        atomic_fetch_add(&created, 1);
    return rc;
}

__attribute__((destructor)) static void
report(void)
{
    const char *path = getenv("ISTHMUS_THREAD_COUNT_FILE");
    if (!path || !*path)
        return;
    FILE *f = fopen(path, "w");
    if (!f)
        return;
    fprintf(f, "%ld\n", atomic_load(&created));
    fclose(f);
}
