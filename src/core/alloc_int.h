/* alloc_int.h - every allocation of the library goes through here, so a test
 * build can make the Nth call fail (meson option fault_injection). */
#ifndef ISTHMUS_ALLOC_INT_H
#define ISTHMUS_ALLOC_INT_H

#include <stddef.h>

void *ist_malloc(size_t n);
void *ist_calloc(size_t count, size_t size);
void *ist_realloc(void *p, size_t n);
void ist_free(void *p);

/* 64-byte aligned block; release with ist_aligned_free(). */
void *ist_aligned_alloc(size_t n);
void ist_aligned_free(void *p);

/* a * b without overflow: returns 0 and sets *out, or -1 on overflow. */
int ist_mul_size(size_t a, size_t b, size_t *out);

/* Duplicate a string through ist_malloc; NULL on failure. */
char *ist_strdup(const char *s);

#endif
