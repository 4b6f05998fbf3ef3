/* store_text.c - the plain-text vector table: word, then dim numbers, per line;
 * an optional first line "rows dim". Plain or gzip. */
#include <isthmus/store.h>

#include <stdio.h>
#include <string.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "error_int.h"
#include "floatparse_int.h"
#include "ofile_int.h"
#include "reader_int.h"
#include "store_int.h"

static bool
is_sep(char c)
{
    return c == ' ' || c == '\t';
}

static bool
all_digits(const char *p, size_t n)
{
    if (n == 0 || n > 18)
        return false;
    for (size_t i = 0; i < n; i++)
        if (p[i] < '0' || p[i] > '9')
            return false;
    return true;
}

/* "rows dim" first line: exactly two whole numbers. */
static bool
parse_header(const char *line, size_t len, uint64_t *rows, uint64_t *dim)
{
    const char *p = line, *end = line + len;
    const char *a, *b;
    size_t na, nb;

    while (p < end && is_sep(*p))
        p++;
    a = p;
    while (p < end && !is_sep(*p))
        p++;
    na = (size_t)(p - a);
    while (p < end && is_sep(*p))
        p++;
    b = p;
    while (p < end && !is_sep(*p))
        p++;
    nb = (size_t)(p - b);
    while (p < end && is_sep(*p))
        p++;
    if (p != end || !all_digits(a, na) || !all_digits(b, nb))
        return false;
    *rows = 0;
    for (size_t i = 0; i < na; i++)
        *rows = *rows * 10 + (uint64_t)(a[i] - '0');
    *dim = 0;
    for (size_t i = 0; i < nb; i++)
        *dim = *dim * 10 + (uint64_t)(b[i] - '0');
    return true;
}

static size_t
count_fields(const char *p, const char *end)
{
    size_t n = 0;
    while (p < end) {
        while (p < end && is_sep(*p))
            p++;
        if (p == end)
            break;
        n++;
        while (p < end && !is_sep(*p))
            p++;
    }
    return n;
}

static ist_status
grow_rows(ist_store *s, ist_error *err)
{
    size_t nc = s->cap_rows * 2, bytes;
    if (ist_mul_size(nc, s->stride * sizeof(float), &bytes))
        return ist_error_set(err, IST_ERR_NOMEM, "vector table too large");
    float *nd = ist_aligned_alloc(bytes);
    uint64_t *nw = ist_realloc(s->own_woff, nc * sizeof *nw);
    if (nw)
        s->own_woff = nw;
    uint32_t *nl = ist_realloc(s->wlen, nc * sizeof *nl);
    if (nl)
        s->wlen = nl;
    uint64_t *ncnt = ist_realloc(s->own_counts, nc * sizeof *ncnt);
    if (ncnt)
        s->own_counts = ncnt;
    s->woff = s->own_woff;
    s->counts = s->own_counts;
    if (!nd || !nw || !nl || !ncnt) {
        ist_aligned_free(nd);
        return ist_error_set(err, IST_ERR_NOMEM, "out of memory for %zu vectors of %zu numbers",
                             nc, s->dim);
    }
    memcpy(nd, s->data, s->cap_rows * s->stride * sizeof(float));
    memset(nd + s->cap_rows * s->stride, 0, (nc - s->cap_rows) * s->stride * sizeof(float));
    ist_aligned_free(s->data);
    s->data = nd;
    memset(s->wlen + s->cap_rows, 0xff, (nc - s->cap_rows) * sizeof *s->wlen);
    s->cap_rows = nc;
    return IST_OK;
}

typedef struct text_ctx {
    const char *path;
    const ist_store_opts *o;
    ist_reader *r;
    ist_store *s;
    uint64_t *lines;      /* line of each row, for duplicate messages */
    size_t lines_cap;
} text_ctx;

#define AT(ctx, ...) ist_error_at(err, IST_ERR_FORMAT, (ctx)->path, ist_reader_lineno((ctx)->r), __VA_ARGS__)

static ist_status
parse_row(text_ctx *c, char *line, size_t len, ist_error *err)
{
    ist_store *s = c->s;
    const char *p = line, *end = line + len, *w;
    size_t wl, bad, row = s->rows;
    const char *problem;
    ist_status rc;

    while (p < end && is_sep(*p))
        p++;
    if (p == end)
        return AT(c, "empty line, expected a word and %zu numbers", s->dim);
    w = p;
    while (p < end && !is_sep(*p))
        p++;
    wl = (size_t)(p - w);
    problem = ist_store_word_problem(w, wl, &bad);
    if (problem)
        return AT(c, "%s (byte %zu of the line)", problem, (size_t)(w - line) + bad + 1);
    if (row == s->cap_rows) {
        rc = grow_rows(s, err);
        if (rc != IST_OK)
            return rc;
    }
    float *dst = s->data + row * s->stride;
    size_t k = 0;
    for (;;) {
        while (p < end && is_sep(*p))
            p++;
        if (p == end)
            break;
        if (k == s->dim)
            return AT(c, "expected %zu numbers after '%.*s', found %zu", s->dim, (int)wl, w,
                      k + count_fields(p, end));
        const char *q;
        ist_fparse fr = ist_parse_float(p, &q, &dst[k]);
        if (fr == IST_FPARSE_OK && q < end && !is_sep(*q))
            fr = IST_FPARSE_NOT_NUMBER;
        if (fr != IST_FPARSE_OK) {
            const char *t = p;
            while (t < end && !is_sep(*t))
                t++;
            memset(dst, 0, s->stride * sizeof(float));
            return AT(c, "component %zu of '%.*s' is %s: '%.*s'", k + 1, (int)wl, w,
                      fr == IST_FPARSE_NOT_FINITE ? "not a finite float32" : "not a number",
                      (int)(t - p > 40 ? 40 : t - p), p);
        }
        p = q;
        k++;
    }
    if (k != s->dim) {
        memset(dst, 0, s->stride * sizeof(float));
        return AT(c, "expected %zu numbers after '%.*s', found %zu", s->dim, (int)wl, w, k);
    }
    ptrdiff_t other = ist_index_find(&s->ix, w, wl, ist_store_word_of, s);
    if (other >= 0) {
        memset(dst, 0, s->stride * sizeof(float));
        return AT(c, "duplicate word '%.*s' (first on line %llu)", (int)wl, w,
                  (unsigned long long)c->lines[other]);
    }
    if (row == c->lines_cap) {
        size_t nc = c->lines_cap ? c->lines_cap * 2 : 4096;
        uint64_t *nl = ist_realloc(c->lines, nc * sizeof *nl);
        if (!nl)
            return ist_error_nomem(err);
        c->lines = nl;
        c->lines_cap = nc;
    }
    c->lines[row] = ist_reader_lineno(c->r);
    rc = ist_store_push_word(s, row, w, wl, 0, err);
    if (rc != IST_OK)
        return rc;
    s->rows++;
    return IST_OK;
}

/* Are most fields after the first not numbers (as in raw text)? */
static bool
mostly_words(const char *line, size_t len)
{
    const char *p = line, *end = line + len;
    size_t fields = 0, numbers = 0;
    float v;

    while (p < end) {
        while (p < end && is_sep(*p))
            p++;
        if (p == end)
            break;
        const char *q;
        bool num = ist_parse_float(p, &q, &v) != IST_FPARSE_NOT_NUMBER && (q == end || is_sep(*q));
        while (p < end && !is_sep(*p))
            p++;
        if (fields++ > 0)
            numbers += num;
    }
    return fields > 1 && numbers * 2 < fields - 1;
}

ist_status
ist_store_open_text(const char *path, const ist_store_opts *o, ist_store **out, ist_error *err)
{
    text_ctx c = {path, o, NULL, NULL, NULL, 0};
    uint64_t hrows = 0, hdim = 0;
    bool header = false, eof;
    char *line;
    size_t len;
    ist_status rc;

    *out = NULL;
    rc = ist_reader_open(path, o->max_line, &c.r, err);
    if (rc != IST_OK)
        return rc;
    rc = ist_reader_next(c.r, &line, &len, &eof, err);
    if (rc != IST_OK)
        goto fail;
    if (eof) {
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0, "empty file, expected a vector table");
        goto fail;
    }
    if (len >= 3 && memcmp(line, "\xEF\xBB\xBF", 3) == 0) {   /* tolerate a BOM */
        line += 3;
        len -= 3;
    }
    header = parse_header(line, len, &hrows, &hdim);
    size_t dim;
    if (header) {
        if (hdim == 0 || hdim > o->max_dim) {
            rc = AT(&c, "header gives dimension %llu, expected 1..%zu", (unsigned long long)hdim,
                    o->max_dim);
            goto fail;
        }
        if (hrows == 0) {
            rc = AT(&c, "header declares 0 rows: the table holds no vectors");
            goto fail;
        }
        dim = (size_t)hdim;
        rc = ist_reader_next(c.r, &line, &len, &eof, err);
        if (rc != IST_OK)
            goto fail;
        if (eof) {
            rc = ist_error_at(err, IST_ERR_FORMAT, path, 1,
                              "header declares %llu rows, found none", (unsigned long long)hrows);
            goto fail;
        }
    } else {
        size_t fields = count_fields(line, line + len);
        if (fields < 2) {
            rc = AT(&c, fields ? "a word with no numbers: dimension 0"
                               : "empty line, expected a word and its numbers");
            goto fail;
        }
        dim = fields - 1;
        if (dim > o->max_dim) {
            rc = AT(&c, "dimension %zu exceeds the limit of %zu", dim, o->max_dim);
            goto fail;
        }
    }
    /* room for the rows: from the header, or for a plain file from its size
     * and the first line's length, so that a large table is not copied while
     * it grows */
    size_t cap = 4096;
    if (header)
        cap = (size_t)hrows;
    else if (!ist_reader_is_gzip(c.r) && len > 0)
        cap = (size_t)(ist_reader_file_size(c.r) / (len + 1) * 11 / 10) + 16;
    size_t plausible = (size_t)(ist_reader_file_size(c.r) / (2 * dim)) + 16;
    if (!ist_reader_is_gzip(c.r) && cap > plausible)
        cap = plausible;       /* every number takes at least 2 bytes */
    if (cap > (1u << 20))
        cap = 1u << 20;
    if (o->max_rows && cap > o->max_rows)
        cap = o->max_rows;
    rc = ist_store_alloc(0, dim, cap, &c.s, err);
    if (rc != IST_OK)
        goto fail;
    c.s->src_format = IST_STORE_TEXT;
    c.s->src_gzip = ist_reader_is_gzip(c.r);
    c.s->src_header = header;
    for (;;) {
        if (header && c.s->rows == hrows) {
            rc = AT(&c, "header declares %llu rows, but the table goes on",
                    (unsigned long long)hrows);
            goto fail;
        }
        rc = parse_row(&c, line, len, err);
        if (rc == IST_ERR_FORMAT && c.s->rows == 0 && mostly_words(line, len)) {
            /* the first row is mostly words, not numbers: not a vector table at all */
            size_t at = strlen(err->msg);
            snprintf(err->msg + at, sizeof err->msg - at,
                     "; this does not look like a vector table ('WORD x1 x2 ...' a line): raw "
                     "text is read by 'isthmus prepare' and 'isthmus train'");
        }
        if (rc != IST_OK)
            goto fail;
        if (o->max_rows && c.s->rows == o->max_rows)
            break;
        if ((c.s->rows & 4095) == 0 && ist_cancel_requested()) {
            rc = ist_error_set(err, IST_ERR_CANCELLED, "stopped on request while reading %s", path);
            goto fail;
        }
        rc = ist_reader_next(c.r, &line, &len, &eof, err);
        if (rc != IST_OK)
            goto fail;
        if (eof)
            break;
    }
    if (header && !o->max_rows && c.s->rows != hrows) {
        rc = ist_error_at(err, IST_ERR_FORMAT, path, ist_reader_lineno(c.r),
                          "header declares %llu rows, found %zu", (unsigned long long)hrows,
                          c.s->rows);
        goto fail;
    }
    ist_reader_close(c.r);
    ist_free(c.lines);
    c.s->fp = ist_store_fingerprint(c.s);
    c.s->have_fp = true;
    *out = c.s;
    return IST_OK;
fail:
    ist_reader_close(c.r);
    ist_free(c.lines);
    ist_store_free(c.s);
    return rc;
}

ist_status
ist_store_save_text(const ist_store *s, const char *path, const ist_store_save_opts *o,
                    ist_error *err)
{
    ist_ofile *f;
    ist_status rc;
    char *line = NULL;
    size_t cap = 0;

    rc = ist_ofile_open(path, o->gzip, &f, err);
    if (rc != IST_OK)
        return rc;
    if (o->gzip && ist_ofile_is_tty(f)) {
        ist_ofile_abort(f);
        return ist_error_set(err, IST_ERR_INVALID, "refusing to write gzip data to a terminal");
    }
    if (o->text_header) {
        rc = ist_ofile_printf(f, err, "%zu %zu\n", s->rows, s->dim);
        if (rc != IST_OK)
            goto fail;
    }
    for (size_t i = 0; i < s->rows; i++) {
        size_t wl = s->wlen[i];
        size_t need = wl + s->dim * 17 + 2;
        if (need > cap) {
            char *nl = ist_realloc(line, need);
            if (!nl) {
                rc = ist_error_nomem(err);
                goto fail;
            }
            line = nl;
            cap = need;
        }
        memcpy(line, ist_store_word(s, i), wl);
        size_t n = wl;
        const float *r = ist_store_row(s, i);
        for (size_t j = 0; j < s->dim; j++) {
            line[n++] = ' ';
            n += (size_t)ist_format_float(r[j], line + n);
        }
        line[n++] = '\n';
        rc = ist_ofile_write(f, line, n, err);
        if (rc != IST_OK)
            goto fail;
    }
    ist_free(line);
    return ist_ofile_commit(f, err);
fail:
    ist_free(line);
    ist_ofile_abort(f);
    return rc;
}
