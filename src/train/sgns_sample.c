/* sgns_sample.c - skip-gram's samplers: which occurrences subsampling keeps, and the noise
 * words drawn in proportion to count^0.75 (formulas in include/isthmus/sgns.h). */
#include <math.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "sgns_int.h"

double
ist_sgns_keep_prob(uint64_t count, uint64_t total, double t)
{
    if (t <= 0.0 || count == 0 || total == 0)
        return 1.0;
    double f = (double)count / (double)total;
    double p = sqrt(t / f);
    return p < 1.0 ? p : 1.0;
}

ist_status
ist_sgns_keep_table(const uint64_t *counts, size_t n, double t, uint32_t **out, ist_error *err)
{
    uint64_t total = 0;
    uint32_t *thr;

    *out = NULL;
    thr = ist_malloc((n ? n : 1) * sizeof *thr);
    if (!thr)
        return ist_error_nomem(err);
    for (size_t i = 0; i < n; i++)
        total += counts[i];
    for (size_t i = 0; i < n; i++) {
        double p = ist_sgns_keep_prob(counts[i], total, t);
        thr[i] = p >= 1.0 ? UINT32_MAX : (uint32_t)(p * 4294967296.0);
    }
    *out = thr;
    return IST_OK;
}

ist_status
ist_sgns_noise_build(const uint64_t *counts, size_t n, double power, ist_sgns_noise *out,
                     ist_error *err)
{
    double *p = NULL, sum = 0.0;
    uint32_t *small = NULL, *large = NULL;
    size_t ns = 0, nl = 0;

    memset(out, 0, sizeof *out);
    if (n == 0 || n >= UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "noise distribution over %zu words", n);
    for (size_t i = 0; i < n; i++)
        sum += pow((double)counts[i], power);
    if (!(sum > 0.0))
        return ist_error_set(err, IST_ERR_INVALID, "every word count is zero");
    p = ist_malloc(n * sizeof *p);
    small = ist_malloc(n * sizeof *small);
    large = ist_malloc(n * sizeof *large);
    out->cells = ist_malloc(n * sizeof *out->cells);
    if (!p || !small || !large || !out->cells) {
        ist_free(p), ist_free(small), ist_free(large), ist_free(out->cells);
        out->cells = NULL;
        return ist_error_nomem(err);
    }
    out->n = (uint32_t)n;
    /* Vose's method: scale to mean 1, pair each under-full cell with an over-full one. */
    for (size_t i = 0; i < n; i++) {
        p[i] = pow((double)counts[i], power) * (double)n / sum;
        if (p[i] < 1.0)
            small[ns++] = (uint32_t)i;
        else
            large[nl++] = (uint32_t)i;
    }
    while (ns > 0 && nl > 0) {
        uint32_t s = small[--ns], l = large[nl - 1];
        out->cells[s].keep = (uint32_t)(p[s] * 4294967296.0);
        out->cells[s].alias = l;
        p[l] -= 1.0 - p[s];
        if (p[l] < 1.0) {
            nl--;
            small[ns++] = l;
        }
    }
    while (nl > 0) {             /* what rounding left: full cells */
        uint32_t l = large[--nl];
        out->cells[l].keep = UINT32_MAX;
        out->cells[l].alias = l;
    }
    while (ns > 0) {
        uint32_t s = small[--ns];
        out->cells[s].keep = UINT32_MAX;
        out->cells[s].alias = s;
    }
    ist_free(p), ist_free(small), ist_free(large);
    return IST_OK;
}

void
ist_sgns_noise_free(ist_sgns_noise *z)
{
    if (z) {
        ist_free(z->cells);
        z->cells = NULL;
        z->n = 0;
    }
}
