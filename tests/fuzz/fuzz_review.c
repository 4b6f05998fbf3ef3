/* fuzz_review.c - any bytes given as a reviewed candidate list are merged or refused with
 * a message; never a crash or a leak. A merge that succeeds writes a file that reads back
 * as a pair list holding the seed pairs and the added ones, and a refused merge writes
 * nothing. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <isthmus/pairs.h>
#include <isthmus/propose.h>

#include "fuzz_file.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static const char seed_text[] = "# seeds\nkettle\thervidor\nblue azul\n";

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char seed[FUZZ_PATH_CAP], review[FUZZ_PATH_CAP], out[FUZZ_PATH_CAP + 8];
    ist_merge_opts mo;
    ist_merge_summary sum;
    ist_error e;

    if (!fuzz_write_file(seed, sizeof seed, (const uint8_t *)seed_text, sizeof seed_text - 1))
        return 0;
    if (!fuzz_write_file(review, sizeof review, data, size)) {
        unlink(seed);
        return 0;
    }
    snprintf(out, sizeof out, "%s.out", review);
    const char *files[] = {review, review};
    ist_merge_opts_init(&mo);
    /* the first byte picks the options, so both checks are reached */
    mo.one_target = size > 0 && (data[0] & 1);
    mo.skip_conflicts = size > 0 && (data[0] & 2);
    ist_status rc = ist_propose_merge(seed, files, 1 + (size > 0 && (data[0] & 4)), &mo, out,
                                      &sum, &e);
    if (rc == IST_OK) {
        ist_pairs *p;
        if (ist_pairs_read(out, &p, &e) != IST_OK)
            abort();                  /* the merged file must read back */
        if (ist_pairs_count(p) != 2 + sum.added)
            abort();
        ist_pairs_free(p);
        if (sum.accepted + sum.corrected + sum.rejected + sum.undecided != sum.rows)
            abort();
    } else if (access(out, F_OK) == 0) {
        abort();                      /* no output on error */
    }
    unlink(out);
    unlink(review);
    unlink(seed);
    return 0;
}
