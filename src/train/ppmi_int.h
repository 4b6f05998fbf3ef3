/* ppmi_int.h - pieces of the count-based trainer shared by its files (ppmi.c: weighting,
 * SVD and the run; ppmi_count.c: the counts) and reached by the tests. */
#ifndef ISTHMUS_PPMI_INT_H
#define ISTHMUS_PPMI_INT_H

#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/ppmi.h>

/* Sort key[n] ascending, carrying val along (LSD radix, 11 bits a pass up to the bits of
 * max_key); tk, tv: scratch of n entries each. */
void ist_ppmi_radix_sort(uint64_t *key, uint64_t *val, uint64_t *tk, uint64_t *tv, size_t n,
                         uint64_t max_key);

/* Merge the sorted list of distinct keys (bk, bv, bn) into *ak and *av (*an entries, room for
 * *acap), summing the values of equal keys; grows both with ist_realloc. */
ist_status ist_ppmi_merge(uint64_t **ak, uint64_t **av, size_t *an, size_t *acap,
                          const uint64_t *bk, const uint64_t *bv, size_t bn, ist_error *err);

/* Progress, cancellation and the wait for the workers, from the calling thread. */
typedef struct ist_ppmi_watch {
    const ist_ppmi_opts *o;
    double t0;
    double base, span;               /* this stage covers fraction base .. base + span */
    ist_ppmi_stage stage;
    double last_call;
} ist_ppmi_watch;

/* Non-zero when the run is to stop (a cancel request, or the progress callback asked);
 * calls the callback at most every 0.25 s with the stage's fraction done (part, 0..1). */
int ist_ppmi_watch_tick(ist_ppmi_watch *wt, double part, uint64_t pairs);

/* Sleep 20 ms (the calling thread's wait between looks at the workers). */
void ist_ppmi_sleep_short(void);

/* Count the co-occurrences of the stream into the sorted distinct list of half pairs
 * (lo <= hi, key lo * vocab + hi) on o->threads threads; *keys, *vals: ist_free(). *peak is
 * raised to the memory held at once. */
ist_status ist_ppmi_count_pairs(const uint32_t *ids, size_t n_ids, size_t vocab,
                                const ist_ppmi_opts *o, ist_ppmi_watch *wt, uint64_t **keys,
                                uint64_t **vals, size_t *n_pairs, size_t *peak,
                                ist_error *err);

#endif
