/* combine.c - concatenation of normalised vector blocks (include/isthmus/combine.h). */
#include <isthmus/combine.h>

#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <string.h>

#include <isthmus/isthmus.h>

#include "alloc_int.h"
#include "error_int.h"
#include "json_int.h"

#define MAX_TOTAL_DIM 100000

ist_status
ist_combine_concat(const ist_cmatview *blocks, const size_t *const *map, const double *weights,
                   size_t n, ist_matrix **out, ist_error *err)
{
    size_t rows, total = 0, off = 0;
    ist_matrix *m = NULL;
    double *mean = NULL;
    ist_status rc;

    *out = NULL;
    if (n == 0)
        return ist_error_set(err, IST_ERR_INVALID, "no vector blocks to combine");
    rows = blocks[0].rows;
    for (size_t b = 0; b < n; b++) {
        if (blocks[b].rows != rows)
            return ist_error_set(err, IST_ERR_INVALID, "block %zu has %zu rows, block 1 has %zu",
                                 b + 1, blocks[b].rows, rows);
        if (blocks[b].cols == 0)
            return ist_error_set(err, IST_ERR_INVALID, "block %zu has no columns", b + 1);
        if (weights && !(isfinite(weights[b]) && weights[b] > 0.0))
            return ist_error_set(err, IST_ERR_INVALID, "block %zu: weight %g, expected a "
                                 "positive number", b + 1, weights[b]);
        total += blocks[b].cols;
        if (total > MAX_TOTAL_DIM)
            return ist_error_set(err, IST_ERR_INVALID, "combined dimension above %d",
                                 MAX_TOTAL_DIM);
    }
    if (rows == 0)
        return ist_error_set(err, IST_ERR_INVALID, "the blocks have no rows");
    if ((rc = ist_matrix_new(rows, total, &m, err)) != IST_OK)
        return rc;
    ist_matview v = ist_matrix_view(m);
    for (size_t b = 0; b < n; b++) {
        const ist_cmatview *blk = &blocks[b];
        size_t d = blk->cols, nonzero = 0;
        double w = weights ? weights[b] : 1.0;
        ist_free(mean);
        mean = ist_calloc(d, sizeof *mean);
        if (!mean) {
            ist_matrix_free(m);
            return ist_error_nomem(err);
        }
        /* unit rows (in double), written into place, and their mean */
        for (size_t r = 0; r < rows; r++) {
            size_t src = map && map[b] ? map[b][r] : r;
            const float *x = blk->data + src * blk->stride;
            float *y = v.data + r * v.stride + off;
            double ss = 0.0;
            for (size_t c = 0; c < d; c++)
                ss += (double)x[c] * x[c];
            if (ss == 0.0) {
                memset(y, 0, d * sizeof *y);
                continue;
            }
            double inv = 1.0 / sqrt(ss);
            nonzero++;
            for (size_t c = 0; c < d; c++) {
                double u = x[c] * inv;
                y[c] = (float)u;
                mean[c] += u;
            }
        }
        for (size_t c = 0; c < d; c++)
            mean[c] = nonzero ? mean[c] / (double)nonzero : 0.0;
        for (size_t r = 0; r < rows; r++) {
            float *y = v.data + r * v.stride + off;
            bool zero = true;
            for (size_t c = 0; c < d && zero; c++)
                zero = y[c] == 0.0f;
            if (zero)
                continue;
            for (size_t c = 0; c < d; c++)
                y[c] = (float)((y[c] - mean[c]) * w);
        }
        off += d;
    }
    ist_free(mean);
    *out = m;
    return IST_OK;
}

ist_status
ist_combine_provenance_json(const char *command, const char *const *provs,
                            const char *const *labels, const double *weights, size_t n,
                            char **json, ist_error *err)
{
    ist_jw w;
    char producer[64];

    *json = NULL;
    snprintf(producer, sizeof producer, "isthmus %s", ist_version());
    ist_jw_init(&w, false);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "producer", producer);
    ist_jw_str(&w, "command", command);
    ist_jw_str(&w, "method", "concatenation");
    ist_jw_str(&w, "normalisation", "unit,centre");
    ist_jw_arr_begin(&w, "blocks");
    for (size_t i = 0; i < n; i++) {
        ist_jw_obj_begin(&w, NULL);
        ist_jw_num(&w, "weight", weights ? weights[i] : 1.0);
        ist_jw_str(&w, "source", labels ? labels[i] : NULL);
        const char *p = provs ? provs[i] : NULL;
        ist_jv *tree = NULL;
        ist_error perr;
        if (!p)
            ist_jw_null(&w, "provenance");
        else if (ist_json_parse(p, strlen(p), NULL, &tree, &perr) == IST_OK)
            ist_jw_raw(&w, "provenance", p);
        else
            ist_jw_str(&w, "provenance", p);
        ist_jv_free(tree);
        ist_jw_obj_end(&w);
    }
    ist_jw_arr_end(&w);
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, json, err);
}

void
ist_combine_free(void *p)
{
    ist_free(p);
}
