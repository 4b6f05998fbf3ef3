/* fuzz_pairs.c - any bytes given as a word-pair list (plain or gzip) are either read into
 * a list whose every word is non-empty valid text, or refused with a message; the split
 * of a read list partitions it, its checksums are computable and a saved list reads back
 * with the same pairs. Never a crash or a leak. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <isthmus/pairs.h>

#include "fuzz_file.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void
check_saved(const ist_pairs *p)
{
    char path[FUZZ_PATH_CAP];
    ist_pairs *q = NULL;
    ist_error e;

    if (!fuzz_path(path, sizeof path, "saved.pairs"))
        return;
    if (ist_pairs_save(p, path, &e) != IST_OK)
        abort();   /* a list that was read can always be written */
    if (ist_pairs_read(path, &q, &e) != IST_OK || ist_pairs_count(q) != ist_pairs_count(p))
        abort();
    for (size_t i = 0; i < ist_pairs_count(p); i++)
        if (strcmp(ist_pairs_source(p, i), ist_pairs_source(q, i)) != 0 ||
            strcmp(ist_pairs_target(p, i), ist_pairs_target(q, i)) != 0)
            abort();
    ist_pairs_free(q);
    unlink(path);
}

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[FUZZ_PATH_CAP];
    ist_pairs *p = NULL, *seeds = NULL, *test = NULL;
    ist_error e;
    uint64_t ck, sh;
    size_t shared;

    if (!fuzz_write_file(path, sizeof path, data, size))
        return 0;
    if (ist_pairs_read(path, &p, &e) != IST_OK) {
        if (e.msg[0] == '\0' || p != NULL)
            abort();   /* a refusal always says why and hands back nothing */
        unlink(path);
        return 0;
    }
    unlink(path);
    for (size_t i = 0; i < ist_pairs_count(p); i++) {
        if (ist_pairs_source(p, i)[0] == '\0' || ist_pairs_target(p, i)[0] == '\0' ||
            ist_pairs_line(p, i) == 0)
            abort();
    }
    if (ist_pairs_checksum(p, &ck, &e) != IST_OK || ist_pairs_sources_hash(p, &sh, &e) != IST_OK)
        abort();
    double frac = size ? (double)(data[0] % 101) / 100.0 : 0.5;
    if (ist_pairs_split(p, frac, size, &seeds, &test, &e) != IST_OK)
        abort();
    if (ist_pairs_count(seeds) + ist_pairs_count(test) != ist_pairs_count(p))
        abort();   /* the split is a partition */
    if (ist_pairs_overlap(seeds, test, NULL, 0, &shared, &e) != IST_OK || shared != 0)
        abort();   /* no source word on both sides */
    check_saved(p);
    ist_pairs_free(seeds);
    ist_pairs_free(test);
    ist_pairs_free(p);
    return 0;
}
