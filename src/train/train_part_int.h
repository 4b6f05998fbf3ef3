/* train_part_int.h - where a thread's or a rank's part of a prepared id stream begins. */
#ifndef ISTHMUS_TRAIN_PART_INT_H
#define ISTHMUS_TRAIN_PART_INT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <isthmus/corpus.h>

/* Part t of T of the stream ids[0..n) starts after the first line end at or past t * n / T
 * (part 0 at 0, part T at n). whole_lines: never cut a line (the PPMI counts take windows
 * within lines), so with no line end left the part starts at n. Otherwise look at most
 * 100,000 ids ahead and cut at t * n / T when no line ends there (a skip-gram window that
 * crosses the cut costs little). */
static inline size_t
ist_train_part_start(const uint32_t *ids, size_t n, size_t t, size_t T, bool whole_lines)
{
    if (t == 0)
        return 0;
    if (t >= T)
        return n;
    size_t p = (size_t)((double)n * (double)t / (double)T), q = p;
    size_t ahead = whole_lines ? n - p : 100000;
    while (q < n && ids[q] != IST_CORPUS_EOL && q - p < ahead)
        q++;
    if (q < n && ids[q] == IST_CORPUS_EOL)
        return q + 1;
    return whole_lines ? n : p;
}

#endif
