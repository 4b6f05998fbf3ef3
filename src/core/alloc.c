/* alloc.c - allocation shim with optional fault injection. */
#include "alloc_int.h"

#include <stdlib.h>
#include <string.h>

#include <isthmus/testing.h>

#ifdef IST_FAULT_INJECTION
#include <stdatomic.h>
static atomic_long fail_countdown = -1; /* -1: never fail */

void
ist_testing_fail_alloc_after(long n)
{
    atomic_store(&fail_countdown, n);
}

static int
should_fail(void)
{
    long v = atomic_load(&fail_countdown);
    while (v >= 0) {
        if (atomic_compare_exchange_weak(&fail_countdown, &v, v - 1))
            return v == 0;
    }
    return 0;
}
#else
void
ist_testing_fail_alloc_after(long n)
{
    (void)n;
}

static int
should_fail(void)
{
    return 0;
}
#endif

int
ist_testing_fault_injection_enabled(void)
{
#ifdef IST_FAULT_INJECTION
    return 1;
#else
    return 0;
#endif
}

void *
ist_malloc(size_t n)
{
    if (should_fail())
        return NULL;
    return malloc(n ? n : 1);
}

void *
ist_calloc(size_t count, size_t size)
{
    if (should_fail())
        return NULL;
    if (count == 0 || size == 0)
        return calloc(1, 1);
    return calloc(count, size);
}

void *
ist_realloc(void *p, size_t n)
{
    if (should_fail())
        return NULL;
    return realloc(p, n ? n : 1);
}

void
ist_free(void *p)
{
    free(p);
}

void *
ist_aligned_alloc(size_t n)
{
    void *p = NULL;

    if (should_fail())
        return NULL;
    if (posix_memalign(&p, 64, n ? n : 64) != 0)
        return NULL;
    return p;
}

void
ist_aligned_free(void *p)
{
    free(p);
}

int
ist_mul_size(size_t a, size_t b, size_t *out)
{
    if (a && b > (size_t)-1 / a)
        return -1;
    *out = a * b;
    return 0;
}

char *
ist_strdup(const char *s)
{
    size_t n = strlen(s) + 1;
    char *d = ist_malloc(n);

    if (d)
        memcpy(d, s, n);
    return d;
}
