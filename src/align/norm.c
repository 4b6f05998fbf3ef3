/* norm.c - standardisation plans: unit length and mean centring, recorded and replayed. */
#include <isthmus/norm.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"

#define NORM_MAX_STEPS 128
#define NORM_ITER_DEFAULT 5

struct ist_norm {
    size_t dim, nsteps;
    ist_norm_kind kinds[NORM_MAX_STEPS];
    double *means[NORM_MAX_STEPS];   /* own, dim values, centring steps only */
    char spec[256];
};

void
ist_norm_free(ist_norm *p)
{
    if (!p)
        return;
    for (size_t i = 0; i < p->nsteps; i++)
        ist_free(p->means[i]);
    ist_free(p);
}

/* Unit length, scaled in double: for a tiny legal row such as (1e-40, 0, 0, 0) the
 * factor 1/|x| is far beyond float range although every result is at most 1. A zero
 * row stays zero (it is nobody's neighbour: every cosine with it is 0). The sum of
 * squares is the pass that finds a non-finite number: *bad gets its row, else stays. */
static void
unit_rows(ist_matview m, size_t *bad)
{
    for (size_t r = 0; r < m.rows; r++) {
        float *row = m.data + r * m.stride;
        double q = 0;
        for (size_t j = 0; j < m.cols; j++)
            q += (double)row[j] * row[j];
        if (!isfinite(q)) {
            if (*bad == (size_t)-1)
                *bad = r;
            continue;
        }
        if (q > 0) {
            double s = 1.0 / sqrt(q);
            for (size_t j = 0; j < m.cols; j++)
                row[j] = (float)(row[j] * s);
        }
    }
}

static ist_status
non_finite(size_t row, ist_error *err)
{
    return ist_error_set(err, IST_ERR_NUMERIC, "row %zu holds a number that is not finite (or "
                         "so large that its square overflows)", row);
}

static void
column_mean(ist_cmatview m, double *mean)
{
    memset(mean, 0, m.cols * sizeof *mean);
    for (size_t r = 0; r < m.rows; r++)
        for (size_t j = 0; j < m.cols; j++)
            mean[j] += m.data[r * m.stride + j];
    for (size_t j = 0; j < m.cols; j++)
        mean[j] = m.rows ? mean[j] / (double)m.rows : 0;
}

static void
subtract_mean(ist_matview m, const double *mean)
{
    for (size_t r = 0; r < m.rows; r++)
        for (size_t j = 0; j < m.cols; j++)
            m.data[r * m.stride + j] = (float)(m.data[r * m.stride + j] - mean[j]);
}

/* Expand spec into kinds; *n gets the count. */
static ist_status
parse_spec(const char *spec, ist_norm_kind *kinds, size_t *n, ist_error *err)
{
    char word[64];
    const char *p = spec;

    *n = 0;
    if (strcmp(spec, "none") == 0 || spec[0] == '\0')
        return IST_OK;
    while (*p) {
        size_t len = strcspn(p, ",");
        if (len == 0 || len >= sizeof word)
            return ist_error_set(err, IST_ERR_INVALID,
                                 "standardisation: expected length, mean, alternate[=N] or none, "
                                 "found '%.*s'", (int)(len < 60 ? len : 60), p);
        memcpy(word, p, len);
        word[len] = '\0';
        size_t reps = 0, add = 0;
        ist_norm_kind seq[2];
        if (strcmp(word, "length") == 0) {
            seq[0] = IST_NORM_UNIT;
            add = 1, reps = 1;
        } else if (strcmp(word, "mean") == 0) {
            seq[0] = IST_NORM_CENTRE;
            add = 1, reps = 1;
        } else if (strncmp(word, "alternate", 9) == 0 && (word[9] == '\0' || word[9] == '=')) {
            char *end;
            long it = word[9] ? strtol(word + 10, &end, 10) : NORM_ITER_DEFAULT;
            if (word[9] && (end == word + 10 || *end || it < 1 || it > 50))
                return ist_error_set(err, IST_ERR_INVALID,
                                     "standardisation: alternate=N: expected N from 1 to 50, "
                                     "found '%s'", word + 10);
            seq[0] = IST_NORM_UNIT;
            seq[1] = IST_NORM_CENTRE;
            add = 2, reps = (size_t)it;
        } else {
            return ist_error_set(err, IST_ERR_INVALID,
                                 "standardisation: expected length, mean, alternate[=N] or none, "
                                 "found '%s'", word);
        }
        for (size_t r = 0; r < reps; r++)
            for (size_t k = 0; k < add; k++) {
                if (*n + 2 > NORM_MAX_STEPS)
                    return ist_error_set(err, IST_ERR_INVALID, "standardisation: too many steps");
                kinds[(*n)++] = seq[k];
            }
        if (add == 2)
            kinds[(*n)++] = IST_NORM_UNIT;   /* iterative ends on unit length */
        p += len;
        if (*p == ',')
            p++;
    }
    return IST_OK;
}

ist_status
ist_norm_check(const char *spec, ist_error *err)
{
    ist_norm_kind kinds[NORM_MAX_STEPS];
    size_t n;
    return parse_spec(spec, kinds, &n, err);
}

ist_status
ist_norm_fit(const char *spec, ist_matview m, ist_norm **out, ist_error *err)
{
    ist_norm *p;
    ist_status rc;

    *out = NULL;
    p = ist_calloc(1, sizeof *p);
    if (!p)
        return ist_error_nomem(err);
    p->dim = m.cols;
    snprintf(p->spec, sizeof p->spec, "%s", spec[0] ? spec : "none");
    rc = parse_spec(spec, p->kinds, &p->nsteps, err);
    if (rc != IST_OK)
        goto fail;
    for (size_t i = 0; i < p->nsteps; i++) {
        if (p->kinds[i] == IST_NORM_UNIT) {
            size_t bad = (size_t)-1;
            unit_rows(m, &bad);
            if (bad != (size_t)-1) {
                rc = non_finite(bad, err);
                goto fail;
            }
            continue;
        }
        p->means[i] = ist_malloc(m.cols * sizeof(double) + 1);
        if (!p->means[i]) {
            rc = ist_error_nomem(err);
            goto fail;
        }
        column_mean(ist_matview_const(m), p->means[i]);
        subtract_mean(m, p->means[i]);
    }
    *out = p;
    return IST_OK;
fail:
    ist_norm_free(p);
    return rc;
}

ist_status
ist_norm_apply(const ist_norm *p, ist_matview m, ist_error *err)
{
    if (m.cols != p->dim)
        return ist_error_set(err, IST_ERR_INVALID,
                             "standardisation: expected vectors of dimension %zu, found %zu",
                             p->dim, m.cols);
    for (size_t i = 0; i < p->nsteps; i++) {
        size_t bad = (size_t)-1;
        if (p->kinds[i] == IST_NORM_UNIT)
            unit_rows(m, &bad);
        else
            subtract_mean(m, p->means[i]);
        if (bad != (size_t)-1)
            return non_finite(bad, err);
    }
    return IST_OK;
}

ist_status
ist_norm_from_steps(size_t dim, const ist_norm_kind *kinds, size_t nsteps, const double *means,
                    ist_norm **out, ist_error *err)
{
    ist_norm *p;
    size_t used = 0, at = 0;

    *out = NULL;
    if (nsteps > NORM_MAX_STEPS)
        return ist_error_set(err, IST_ERR_INVALID, "standardisation: %zu steps, at most %d",
                             nsteps, NORM_MAX_STEPS);
    p = ist_calloc(1, sizeof *p);
    if (!p)
        return ist_error_nomem(err);
    p->dim = dim;
    p->nsteps = nsteps;
    for (size_t i = 0; i < nsteps; i++) {
        p->kinds[i] = kinds[i];
        if (kinds[i] != IST_NORM_UNIT && kinds[i] != IST_NORM_CENTRE) {
            ist_norm_free(p);
            return ist_error_set(err, IST_ERR_INVALID, "standardisation: unknown step %d",
                                 (int)kinds[i]);
        }
        at += (size_t)snprintf(p->spec + at, at < sizeof p->spec ? sizeof p->spec - at : 0,
                               "%s%s", i ? "," : "", kinds[i] == IST_NORM_UNIT ? "length" : "mean");
        if (at >= sizeof p->spec)
            at = sizeof p->spec - 1;
        if (kinds[i] == IST_NORM_CENTRE) {
            p->means[i] = ist_malloc(dim * sizeof(double) + 1);
            if (!p->means[i]) {
                ist_norm_free(p);
                return ist_error_nomem(err);
            }
            memcpy(p->means[i], means + used * dim, dim * sizeof(double));
            used++;
        }
    }
    if (nsteps == 0)
        snprintf(p->spec, sizeof p->spec, "none");
    *out = p;
    return IST_OK;
}

size_t
ist_norm_dim(const ist_norm *p)
{
    return p->dim;
}

size_t
ist_norm_steps(const ist_norm *p)
{
    return p->nsteps;
}

ist_norm_kind
ist_norm_step_kind(const ist_norm *p, size_t i)
{
    return p->kinds[i];
}

const double *
ist_norm_step_mean(const ist_norm *p, size_t i)
{
    return i < p->nsteps ? p->means[i] : NULL;
}

const char *
ist_norm_spec(const ist_norm *p)
{
    return p->spec;
}
