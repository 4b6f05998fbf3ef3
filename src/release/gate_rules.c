/* gate_rules.c - the thresholds file: one rule a line (docs/formats.md "Thresholds file"). */
#include <isthmus/gate.h>
#include <isthmus/filekind.h>

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "gate_int.h"
#include "reader_int.h"

#define MAX_WORDS 12
#define MAX_LINE 4096

static const char figure_help[] = "p@1, p@5, p@10, coverage or drop";
static const char selector_help[] = "cosine, csls, seed, refined, band or the bound";

void
ist_thresholds_free(ist_thresholds *t)
{
    if (!t)
        return;
    for (size_t i = 0; i < t->n; i++)
        ist_free((char *)t->rules[i].text);
    ist_free(t->rules);
    ist_free(t->name);
    ist_free(t);
}

size_t
ist_thresholds_count(const ist_thresholds *t)
{
    return t->n;
}

const ist_gate_rule *
ist_thresholds_rule(const ist_thresholds *t, size_t i)
{
    return i < t->n ? &t->rules[i] : NULL;
}

/* "p@K" (the spelling of the tables, the JSON and the report) with K one of the reported
 * k; "precision@K", the spelling of files written before 2026-12-03, is read too. 0 when
 * word is neither. */
static size_t
precision_k(const char *word)
{
    static const char *const pre[] = {"p@", "precision@"};
    for (size_t i = 0; i < sizeof pre / sizeof pre[0]; i++) {
        size_t len = strlen(pre[i]);
        if (strncmp(word, pre[i], len) != 0)
            continue;
        for (size_t j = 0; j < IST_METRICS_NK; j++) {
            char buf[24];
            snprintf(buf, sizeof buf, "%zu", ist_metrics_k(j));
            if (strcmp(word + len, buf) == 0)
                return ist_metrics_k(j);
        }
    }
    return 0;
}

/* A fraction in [0, 1], or a percentage "60%". */
static bool
parse_bound(const char *word, double *out)
{
    char *end;
    /* plain decimals only: strtod would also take hex floats, "inf" and "nan" */
    if (word[strspn(word, "0123456789.eE+-%")] != '\0' || !strpbrk(word, "0123456789"))
        return false;
    errno = 0;
    double v = strtod(word, &end);
    if (end == word || errno != 0)
        return false;
    if (*end == '%') {
        v /= 100;
        end++;
    }
    if (*end != '\0' || !(v >= 0 && v <= 1))
        return false;
    *out = v;
    return true;
}

/* "A-B" or "A+" with 1 <= A (<= B). */
static bool
parse_band(const char *word, size_t *from, size_t *to)
{
    char *end;
    if (word[0] < '0' || word[0] > '9')
        return false;
    errno = 0;
    unsigned long long a = strtoull(word, &end, 10), b = 0;
    if (errno != 0 || a == 0)
        return false;
    if (*end == '+' && end[1] == '\0') {
        *from = (size_t)a;
        *to = 0;
        return true;
    }
    if (*end != '-' || end[1] < '0' || end[1] > '9')
        return false;
    b = strtoull(end + 1, &end, 10);
    if (errno != 0 || *end != '\0' || b < a)
        return false;
    *from = (size_t)a;
    *to = (size_t)b;
    return true;
}

typedef struct ctx {
    const char *name;
    size_t line;
    ist_error *err;
} ctx;

/* found with every byte that is not printable ASCII shown as \xHH (an invalid or
 * invisible byte echoed raw would make the message unreadable), cut at ~120 bytes. */
static void
escape_word(const char *w, char *buf, size_t cap)
{
    size_t o = 0;
    for (const unsigned char *p = (const unsigned char *)w; *p && o + 5 < cap; p++) {
        if (o > 120) {
            memcpy(buf + o, "...", 3);
            o += 3;
            break;
        }
        if (*p >= 0x20 && *p < 0x7f)
            buf[o++] = (char)*p;
        else
            o += (size_t)snprintf(buf + o, cap - o, "\\x%02x", *p);
    }
    buf[o] = '\0';
}

static ist_status
bad(const ctx *c, const char *expected, const char *found)
{
    char shown[160];
    if (found) {
        escape_word(found, shown, sizeof shown);
        return ist_error_at(c->err, IST_ERR_FORMAT, c->name, c->line, "expected %s, found '%s'",
                            expected, shown);
    }
    return ist_error_at(c->err, IST_ERR_FORMAT, c->name, c->line, "expected %s, found the end "
                        "of the line", expected);
}

static ist_status
parse_selectors(const ctx *c, char **w, size_t n, ist_gate_rule *r)
{
    for (size_t i = 0; i < n; i++) {
        if (strcmp(w[i], "cosine") == 0 || strcmp(w[i], "csls") == 0) {
            if (r->retrieval >= 0)
                return bad(c, "one retrieval method", w[i]);
            r->retrieval = strcmp(w[i], "csls") == 0 ? IST_RETRIEVAL_CSLS : IST_RETRIEVAL_COSINE;
        } else if (strcmp(w[i], "procrustes") == 0) {
            return ist_error_at(c->err, IST_ERR_FORMAT, c->name, c->line,
                                "the map stage 'procrustes' is now called 'seed'");
        } else if (strcmp(w[i], "seed") == 0 || strcmp(w[i], "refined") == 0) {
            if (r->label)
                return bad(c, "one map stage", w[i]);
            r->label = strcmp(w[i], "refined") == 0 ? "refined" : "seed";
        } else if (strcmp(w[i], "band") == 0) {
            if (r->has_band)
                return bad(c, "one band", w[i]);
            if (i + 1 >= n)
                return bad(c, "a band of frequency ranks such as 1-5000 or 20001+ after 'band'",
                           NULL);
            if (!parse_band(w[i + 1], &r->band_from, &r->band_to))
                return bad(c, "a band of frequency ranks such as 1-5000 or 20001+", w[i + 1]);
            r->has_band = true;
            i++;
        } else {
            return bad(c, selector_help, w[i]);
        }
    }
    return IST_OK;
}

static ist_status
check_rule(const ctx *c, const ist_gate_rule *r)
{
    if (r->figure != IST_GATE_COVERAGE && r->retrieval < 0)
        return ist_error_at(c->err, IST_ERR_FORMAT, c->name, c->line,
                            "expected the retrieval method (cosine or csls) of p@%zu",
                            r->k);
    if (r->figure != IST_GATE_PRECISION && r->has_band)
        return ist_error_at(c->err, IST_ERR_FORMAT, c->name, c->line,
                            "expected no band: only precision rules take one");
    return IST_OK;
}

static ist_status join_words(const ctx *c, char **w, size_t n, ist_gate_rule *r,
                             bool *has_rule);

/* Parse one line (modified in place). *has_rule false for blank and comment lines. */
static ist_status
parse_line(const ctx *c, char *line, ist_gate_rule *r, bool *has_rule)
{
    char *w[MAX_WORDS], *save = NULL;
    size_t n = 0, at = 1;
    ist_status rc;

    *has_rule = false;
    char *hash = strchr(line, '#');
    if (hash)
        *hash = '\0';
    for (char *t = strtok_r(line, " \t\r\f\v", &save); t; t = strtok_r(NULL, " \t\r\f\v", &save)) {
        if (n == MAX_WORDS)
            return bad(c, "a rule of at most 12 words", t);
        w[n++] = t;
    }
    if (n == 0)
        return IST_OK;
    memset(r, 0, sizeof *r);
    r->line = c->line;
    r->retrieval = -1;
    if (strcmp(w[0], "refuse") == 0) {
        /* a condition of the verdict made a failure: at most 0 leaked or unchecked */
        if (n < 2 || n > 2 || (strcmp(w[1], "leakage") != 0 && strcmp(w[1], "unchecked") != 0))
            return bad(c, "'refuse leakage' or 'refuse unchecked'", n < 2 ? NULL : w[n - 1]);
        r->figure = strcmp(w[1], "leakage") == 0 ? IST_GATE_LEAKAGE : IST_GATE_UNCHECKED;
        r->bound_kind = IST_GATE_MAX;
        return join_words(c, w, n, r, has_rule);
    }
    if (strcmp(w[0], "min") == 0)
        r->bound_kind = IST_GATE_MIN;
    else if (strcmp(w[0], "max") == 0)
        r->bound_kind = IST_GATE_MAX;
    else
        return bad(c, "'min', 'max' or 'refuse' at the start of a rule", w[0]);
    if (n < 2)
        return bad(c, figure_help, NULL);
    if ((r->k = precision_k(w[1])) != 0) {
        r->figure = IST_GATE_PRECISION;
    } else if (strcmp(w[1], "coverage") == 0) {
        r->figure = IST_GATE_COVERAGE;
    } else if (strcmp(w[1], "drop") == 0) {
        r->figure = IST_GATE_DROP;
        if (r->bound_kind != IST_GATE_MAX)
            return bad(c, "'max drop' (a drop rule bounds the largest drop)", "min drop");
        if (n < 3 || (r->k = precision_k(w[2])) == 0)
            return bad(c, "p@1, p@5 or p@10 after 'drop'",
                       n < 3 ? NULL : w[2]);
        at = 2;
    } else {
        return bad(c, figure_help, w[1]);
    }
    at++;
    if (n <= at || !parse_bound(w[n - 1], &r->bound))
        return bad(c, "a bound from 0% to 100% (or a fraction from 0 to 1) at the end of the rule",
                   n <= at ? NULL : w[n - 1]);
    if ((rc = parse_selectors(c, w + at, n - 1 - at, r)) != IST_OK)
        return rc;
    if ((rc = check_rule(c, r)) != IST_OK)
        return rc;
    return join_words(c, w, n, r, has_rule);
}

/* The rule's words, single-spaced, as its text. */
static ist_status
join_words(const ctx *c, char **w, size_t n, ist_gate_rule *r, bool *has_rule)
{
    size_t len = 0;
    for (size_t i = 0; i < n; i++)
        len += strlen(w[i]) + 1;
    char *text = ist_malloc(len);
    if (!text)
        return ist_error_nomem(c->err);
    text[0] = '\0';
    for (size_t i = 0; i < n; i++) {
        if (i)
            strcat(text, " ");
        strcat(text, w[i]);
    }
    r->text = text;
    *has_rule = true;
    return IST_OK;
}

static ist_status
add_rule(ist_thresholds *t, const ist_gate_rule *r, ist_error *err)
{
    if (t->n == t->cap) {
        size_t cap = t->cap ? 2 * t->cap : 8;
        ist_gate_rule *p = ist_realloc(t->rules, cap * sizeof *p);
        if (!p)
            return ist_error_nomem(err);
        t->rules = p;
        t->cap = cap;
    }
    t->rules[t->n++] = *r;
    return IST_OK;
}

static ist_status
new_thresholds(const char *name, ist_thresholds **out, ist_error *err)
{
    ist_thresholds *t = ist_calloc(1, sizeof *t);
    if (!t || !(t->name = ist_strdup(name ? name : "(thresholds)"))) {
        ist_free(t);
        return ist_error_nomem(err);
    }
    *out = t;
    return IST_OK;
}

/* Parse one line and keep its rule; line is modified. */
static ist_status
take_line(ist_thresholds *t, size_t lineno, char *line, ist_error *err)
{
    ctx c = {t->name, lineno, err};
    ist_gate_rule r;
    bool has;
    ist_status rc = parse_line(&c, line, &r, &has);
    if (rc == IST_OK && has && (rc = add_rule(t, &r, err)) != IST_OK)
        ist_free((char *)r.text);
    return rc;
}

static ist_status
finish(ist_thresholds *t, ist_thresholds **out, ist_error *err)
{
    if (t->n == 0) {
        ist_status rc = ist_error_at(err, IST_ERR_FORMAT, t->name, 0,
                                     "expected at least one rule, found none");
        ist_thresholds_free(t);
        return rc;
    }
    *out = t;
    return IST_OK;
}

ist_status
ist_thresholds_parse(const char *text, size_t len, const char *name, ist_thresholds **out,
                     ist_error *err)
{
    ist_thresholds *t = NULL;
    char buf[MAX_LINE + 1];
    size_t lineno = 0;
    ist_status rc;

    *out = NULL;
    if ((rc = new_thresholds(name, &t, err)) != IST_OK)
        return rc;
    for (size_t at = 0; at < len;) {
        const char *nl = memchr(text + at, '\n', len - at);
        size_t n = nl ? (size_t)(nl - (text + at)) : len - at;
        lineno++;
        if (lineno == 1 && n >= 3 && memcmp(text, "\xef\xbb\xbf", 3) == 0) {
            at += 3;   /* a byte order mark, as every other text format accepts */
            n -= 3;
        }
        if (n > MAX_LINE || memchr(text + at, '\0', n)) {
            ist_thresholds_free(t);
            return ist_error_at(err, IST_ERR_FORMAT, name, lineno,
                                "expected a text line of at most %d bytes", MAX_LINE);
        }
        memcpy(buf, text + at, n);
        buf[n] = '\0';
        if ((rc = take_line(t, lineno, buf, err)) != IST_OK) {
            ist_thresholds_free(t);
            return rc;
        }
        at += n + 1;
    }
    return finish(t, out, err);
}

ist_status
ist_thresholds_read(const char *path, ist_thresholds **out, ist_error *err)
{
    ist_thresholds *t = NULL;
    ist_reader *rd = NULL;
    ist_status rc;
    bool eof = false;

    *out = NULL;
    if ((rc = ist_file_expect(path, IST_FILE_ANY_TEXT, 1, "a thresholds file",
                              err)) != IST_OK)
        return rc;
    if ((rc = new_thresholds(path, &t, err)) != IST_OK)
        return rc;
    if ((rc = ist_reader_open(path, MAX_LINE, &rd, err)) != IST_OK)
        goto fail;
    for (;;) {
        char *line;
        size_t len;
        if ((rc = ist_reader_next(rd, &line, &len, &eof, err)) != IST_OK)
            goto fail;
        if (eof)
            break;
        size_t no = (size_t)ist_reader_lineno(rd);
        if (no == 1 && len >= 3 && memcmp(line, "\xef\xbb\xbf", 3) == 0) {
            line += 3;   /* a byte order mark, as every other text format accepts */
            len -= 3;
        }
        if (strlen(line) != len) {
            rc = ist_error_at(err, IST_ERR_FORMAT, path, no,
                              "expected text, found a NUL byte at byte %zu of the line",
                              strlen(line) + 1);
            goto fail;
        }
        if ((rc = take_line(t, no, line, err)) != IST_OK)
            goto fail;
    }
    ist_reader_close(rd);
    return finish(t, out, err);
fail:
    ist_reader_close(rd);
    ist_thresholds_free(t);
    return rc;
}
