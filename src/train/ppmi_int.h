/* ppmi_int.h - pieces of the count-based trainer that tests reach directly. */
#ifndef ISTHMUS_PPMI_INT_H
#define ISTHMUS_PPMI_INT_H

#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>

/* Sort key[n] ascending, carrying val along (LSD radix, 11 bits a pass up to the bits of
 * max_key); tk, tv: scratch of n entries each. */
void ist_ppmi_radix_sort(uint64_t *key, uint64_t *val, uint64_t *tk, uint64_t *tv, size_t n,
                         uint64_t max_key);

/* Merge the sorted list of distinct keys (bk, bv, bn) into *ak and *av (*an entries, room for
 * *acap), summing the values of equal keys; grows both with ist_realloc. */
ist_status ist_ppmi_merge(uint64_t **ak, uint64_t **av, size_t *an, size_t *acap,
                          const uint64_t *bk, const uint64_t *bv, size_t bn, ist_error *err);

#endif
