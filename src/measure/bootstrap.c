/* bootstrap.c - confidence intervals of precision@k. Percentile bootstrap: Efron &
 * Tibshirani 1993, "An Introduction to the Bootstrap", ch. 13; paired resampling of two
 * runs on one list: Koehn 2004, "Statistical significance tests for machine translation
 * evaluation". */
#include <isthmus/bootstrap.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "error_int.h"

void
ist_ci_opts_init(ist_ci_opts *o)
{
    o->level = 0.95;
    o->resamples = IST_CI_RESAMPLES_DEFAULT;
    o->seed = IST_CI_SEED_DEFAULT;
}

/* SplitMix64: a 64-bit counter passed through a bijective mixer; small state, full
 * period 2^64, good enough to draw resample indices. */
static uint64_t
next_u64(uint64_t *state)
{
    uint64_t z = (*state += 0x9e3779b97f4a7c15u);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

/* Uniform in [0, n), n > 0, by rejection (no modulo bias). */
static size_t
draw(uint64_t *state, size_t n)
{
    uint64_t limit = UINT64_MAX - UINT64_MAX % (uint64_t)n, x;
    do
        x = next_u64(state);
    while (x >= limit);
    return (size_t)(x % (uint64_t)n);
}

static int
cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static ist_status
check_opts(const ist_ci_opts *o, ist_error *err)
{
    if (!(o->level > 0 && o->level < 1))
        return ist_error_set(err, IST_ERR_INVALID,
                             "bootstrap: expected a level between 0 and 1, found %g", o->level);
    if (o->resamples == 0)
        return ist_error_set(err, IST_ERR_INVALID, "bootstrap: expected at least one resample");
    return IST_OK;
}

/* Sort the B values and pick the percentile interval. */
static void
percentile(double *v, size_t b, double level, double *lo, double *hi)
{
    size_t k = (size_t)floor((double)(b + 1) * (1 - level) / 2);
    if (k < 1)
        k = 1;
    if (k > b)
        k = b;
    qsort(v, b, sizeof *v, cmp_double);
    *lo = v[k - 1];
    *hi = v[b - k];
}

static double
ratio(size_t hits, size_t n)
{
    return n ? (double)hits / (double)n : 0;
}

ist_status
ist_ci_precision(const uint8_t *place, size_t n, const ist_ci_opts *opts,
                 double lo[IST_METRICS_NK], double hi[IST_METRICS_NK], ist_error *err)
{
    ist_ci_opts d;
    size_t covered = 0, b;
    double *v;
    ist_status rc;

    if (!opts) {
        ist_ci_opts_init(&d);
        opts = &d;
    }
    if ((rc = check_opts(opts, err)) != IST_OK)
        return rc;
    for (size_t j = 0; j < IST_METRICS_NK; j++)
        lo[j] = hi[j] = 0;
    for (size_t i = 0; i < n; i++)
        covered += place[i] != IST_CI_UNCOVERED;
    if (covered == 0)
        return IST_OK;
    b = opts->resamples;
    size_t bytes;
    if (ist_mul_size(b, IST_METRICS_NK * sizeof *v, &bytes) != 0 || !(v = ist_malloc(bytes)))
        return ist_error_nomem(err);
    uint64_t state = opts->seed;
    for (size_t r = 0; r < b; r++) {
        size_t hits[IST_METRICS_NK] = {0}, cov = 0;
        if (ist_cancel_requested()) {
            ist_free(v);
            return ist_error_set(err, IST_ERR_CANCELLED, "bootstrap: cancelled");
        }
        for (size_t i = 0; i < n; i++) {
            uint8_t p = place[draw(&state, n)];
            if (p == IST_CI_UNCOVERED)
                continue;
            cov++;
            for (size_t j = 0; j < IST_METRICS_NK; j++)
                hits[j] += p < ist_metrics_k(j);
        }
        for (size_t j = 0; j < IST_METRICS_NK; j++)
            v[j * b + r] = ratio(hits[j], cov);
    }
    for (size_t j = 0; j < IST_METRICS_NK; j++)
        percentile(v + j * b, b, opts->level, &lo[j], &hi[j]);
    ist_free(v);
    return IST_OK;
}

ist_status
ist_ci_paired(const uint8_t *a, const uint8_t *b, size_t n, size_t k, const ist_ci_opts *opts,
              double *diff, double *lo, double *hi, ist_error *err)
{
    ist_ci_opts d;
    size_t ha = 0, hb = 0, ca = 0, cb = 0;
    double *v;
    ist_status rc;

    if (!opts) {
        ist_ci_opts_init(&d);
        opts = &d;
    }
    if ((rc = check_opts(opts, err)) != IST_OK)
        return rc;
    for (size_t i = 0; i < n; i++) {
        ca += a[i] != IST_CI_UNCOVERED;
        cb += b[i] != IST_CI_UNCOVERED;
        ha += a[i] != IST_CI_UNCOVERED && a[i] < k;
        hb += b[i] != IST_CI_UNCOVERED && b[i] < k;
    }
    *diff = ratio(ha, ca) - ratio(hb, cb);
    *lo = *hi = *diff;
    if (n == 0)
        return IST_OK;
    if (!(v = ist_malloc(opts->resamples * sizeof *v)))
        return ist_error_nomem(err);
    uint64_t state = opts->seed;
    for (size_t r = 0; r < opts->resamples; r++) {
        if (ist_cancel_requested()) {
            ist_free(v);
            return ist_error_set(err, IST_ERR_CANCELLED, "bootstrap: cancelled");
        }
        ha = hb = ca = cb = 0;
        for (size_t i = 0; i < n; i++) {
            size_t q = draw(&state, n);
            ca += a[q] != IST_CI_UNCOVERED;
            cb += b[q] != IST_CI_UNCOVERED;
            ha += a[q] != IST_CI_UNCOVERED && a[q] < k;
            hb += b[q] != IST_CI_UNCOVERED && b[q] < k;
        }
        v[r] = ratio(ha, ca) - ratio(hb, cb);
    }
    percentile(v, opts->resamples, opts->level, lo, hi);
    ist_free(v);
    return IST_OK;
}

size_t
ist_metrics_band_of(const ist_metrics *m, size_t rank)
{
    for (size_t i = 0; i < m->nbands; i++)
        if (rank >= m->band[i].lo && (m->band[i].hi == 0 || rank <= m->band[i].hi))
            return i;
    return m->nbands ? m->nbands - 1 : 0;
}

/* A band's stream: the seed moved by the band's index, so bands do not share draws. */
static ist_ci_opts
band_opts(const ist_ci_opts *o, size_t band)
{
    ist_ci_opts r;
    if (o)
        r = *o;
    else
        ist_ci_opts_init(&r);
    r.seed += 0x632be59bd9b4e019u * (uint64_t)(band + 1);
    return r;
}

/* The outcomes of band b's queries (band SIZE_MAX: all) into buf; returns their count. */
static size_t
gather(const ist_metrics *m, size_t b, uint8_t *buf)
{
    size_t n = 0;
    for (size_t i = 0; i < m->queries; i++)
        if (b == SIZE_MAX || ist_metrics_band_of(m, m->query_row[i] + 1) == b)
            buf[n++] = m->query_place[i];
    return n;
}

static ist_status
band_ci(const ist_metrics *m, size_t b, const ist_ci_opts *opts, uint8_t *buf, double *lo,
        double *hi, ist_error *err)
{
    size_t n = gather(m, b, buf);
    ist_ci_opts o = band_opts(opts, b);
    return ist_ci_precision(buf, n, b == SIZE_MAX ? opts : &o, lo, hi, err);
}

ist_status
ist_metrics_ci_compute(const ist_metrics *m, const ist_ci_opts *opts, ist_metrics_ci *out,
                       ist_error *err)
{
    ist_status rc;
    uint8_t *buf;

    memset(out, 0, sizeof *out);
    if (!m->query_row || !m->query_place)
        return ist_error_set(err, IST_ERR_INVALID,
                             "bootstrap: the scored run kept no per-query outcomes");
    if (!(buf = ist_malloc(m->queries + 1)))
        return ist_error_nomem(err);
    rc = band_ci(m, SIZE_MAX, opts, buf, out->lo, out->hi, err);
    for (size_t b = 0; rc == IST_OK && b < m->nbands; b++)
        rc = band_ci(m, b, opts, buf, out->band_lo[b], out->band_hi[b], err);
    ist_free(buf);
    return rc;
}
