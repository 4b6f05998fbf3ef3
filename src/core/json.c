/* json.c - compact JSON writer and a small tree parser (RFC 8259). */
#include "json_int.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "reader_int.h"

/* ---- writer ----------------------------------------------------------- */

void
ist_jw_init(ist_jw *w, bool pretty)
{
    memset(w, 0, sizeof *w);
    w->pretty = pretty;
}

static void
put(ist_jw *w, const char *s, size_t n)
{
    if (w->failed)
        return;
    if (w->len + n + 1 > w->cap) {
        size_t nc = w->cap ? w->cap : 256;
        while (nc < w->len + n + 1)
            nc *= 2;
        char *nb = ist_realloc(w->buf, nc);
        if (!nb) {
            w->failed = true;
            return;
        }
        w->buf = nb;
        w->cap = nc;
    }
    memcpy(w->buf + w->len, s, n);
    w->len += n;
    w->buf[w->len] = '\0';
}

static void
puts_(ist_jw *w, const char *s)
{
    put(w, s, strlen(s));
}

static void
newline(ist_jw *w)
{
    if (!w->pretty)
        return;
    put(w, "\n", 1);
    for (int i = 0; i < w->depth; i++)
        put(w, "  ", 2);
}

static void
quoted(ist_jw *w, const char *s, size_t n)
{
    static const char hex[] = "0123456789abcdef";
    size_t run = 0;

    put(w, "\"", 1);
    for (size_t i = 0; i < n; i++) {
        unsigned char c = (unsigned char)s[i];
        if (c >= 0x20 && c != '"' && c != '\\')
            continue;
        put(w, s + run, i - run);
        run = i + 1;
        switch (c) {
        case '"': put(w, "\\\"", 2); break;
        case '\\': put(w, "\\\\", 2); break;
        case '\n': put(w, "\\n", 2); break;
        case '\t': put(w, "\\t", 2); break;
        case '\r': put(w, "\\r", 2); break;
        default: {
            char e[6] = {'\\', 'u', '0', '0', hex[c >> 4], hex[c & 15]};
            put(w, e, 6);
        }
        }
    }
    put(w, s + run, n - run);
    put(w, "\"", 1);
}

static void
key(ist_jw *w, const char *k)
{
    if (w->depth > 0 && w->depth <= 64) {
        if (w->need_comma[w->depth - 1])
            put(w, ",", 1);
        w->need_comma[w->depth - 1] = true;
        newline(w);
    }
    if (k) {
        quoted(w, k, strlen(k));
        put(w, w->pretty ? ": " : ":", w->pretty ? 2 : 1);
    }
}

static void
open_(ist_jw *w, const char *k, const char *c)
{
    key(w, k);
    puts_(w, c);
    if (w->depth < 64)
        w->need_comma[w->depth] = false;
    w->depth++;
}

static void
close_(ist_jw *w, const char *c)
{
    bool had = w->depth > 0 && w->depth <= 64 && w->need_comma[w->depth - 1];
    w->depth--;
    if (had)
        newline(w);
    puts_(w, c);
}

void ist_jw_obj_begin(ist_jw *w, const char *k) { open_(w, k, "{"); }
void ist_jw_obj_end(ist_jw *w) { close_(w, "}"); }
void ist_jw_arr_begin(ist_jw *w, const char *k) { open_(w, k, "["); }
void ist_jw_arr_end(ist_jw *w) { close_(w, "]"); }

void
ist_jw_strn(ist_jw *w, const char *k, const char *val, size_t n)
{
    key(w, k);
    quoted(w, val, n);
}

void
ist_jw_str(ist_jw *w, const char *k, const char *val)
{
    if (!val) {
        ist_jw_null(w, k);
        return;
    }
    ist_jw_strn(w, k, val, strlen(val));
}

void
ist_jw_num(ist_jw *w, const char *k, double val)
{
    char b[40];

    if (!isfinite(val)) {
        ist_jw_null(w, k);
        return;
    }
    /* the shortest of %.15g .. %.17g that reads back exactly */
    for (int prec = 15; prec <= 17; prec++) {
        snprintf(b, sizeof b, "%.*g", prec, val);
        if (strtod(b, NULL) == val)
            break;
    }
    key(w, k);
    puts_(w, b);
}

void
ist_jw_int(ist_jw *w, const char *k, int64_t val)
{
    char b[32];
    snprintf(b, sizeof b, "%lld", (long long)val);
    key(w, k);
    puts_(w, b);
}

void
ist_jw_uint(ist_jw *w, const char *k, uint64_t val)
{
    char b[32];
    snprintf(b, sizeof b, "%llu", (unsigned long long)val);
    key(w, k);
    puts_(w, b);
}

void
ist_jw_bool(ist_jw *w, const char *k, bool val)
{
    key(w, k);
    puts_(w, val ? "true" : "false");
}

void
ist_jw_null(ist_jw *w, const char *k)
{
    key(w, k);
    puts_(w, "null");
}

void
ist_jw_raw(ist_jw *w, const char *k, const char *json)
{
    key(w, k);
    puts_(w, json && *json ? json : "null");
}

ist_status
ist_jw_finish(ist_jw *w, char **out, ist_error *err)
{
    *out = NULL;
    if (w->failed || w->depth != 0) {
        bool nomem = w->failed;
        ist_jw_discard(w);
        return nomem ? ist_error_nomem(err)
                     : ist_error_set(err, IST_ERR_INTERNAL, "unbalanced JSON writer");
    }
    if (!w->buf)
        put(w, "", 0);
    if (w->failed)
        return ist_error_nomem(err);
    *out = w->buf;
    memset(w, 0, sizeof *w);
    return IST_OK;
}

void
ist_jw_discard(ist_jw *w)
{
    ist_free(w->buf);
    memset(w, 0, sizeof *w);
}

/* ---- reader ----------------------------------------------------------- */

struct ist_jv {
    ist_jtype type;
    uint64_t line;
    double num;
    bool b;
    char *str;            /* string value */
    char **keys;          /* object member names */
    ist_jv **items;       /* array elements or object values */
    size_t n, cap;
};

typedef struct parser {
    const char *p, *end, *path;
    uint64_t line;
    ist_error *err;
    int depth;
} parser;

static ist_status
perr(parser *ps, const char *what)
{
    if (ps->p >= ps->end)
        return ist_error_at(ps->err, IST_ERR_FORMAT, ps->path ? ps->path : "<json>", ps->line,
                            "invalid JSON: expected %s, found the end of the text", what);
    return ist_error_at(ps->err, IST_ERR_FORMAT, ps->path ? ps->path : "<json>", ps->line,
                        "invalid JSON: expected %s, found '%c'", what, *ps->p);
}

static void
skip_ws(parser *ps)
{
    while (ps->p < ps->end) {
        char c = *ps->p;
        if (c == '\n')
            ps->line++;
        else if (c != ' ' && c != '\t' && c != '\r')
            break;
        ps->p++;
    }
}

void
ist_jv_free(ist_jv *v)
{
    if (!v)
        return;
    for (size_t i = 0; i < v->n; i++) {
        ist_jv_free(v->items[i]);
        if (v->keys)
            ist_free(v->keys[i]);
    }
    ist_free(v->items);
    ist_free(v->keys);
    ist_free(v->str);
    ist_free(v);
}

static int
hexval(char c)
{
    if (c >= '0' && c <= '9')
        return c - '0';
    if (c >= 'a' && c <= 'f')
        return c - 'a' + 10;
    if (c >= 'A' && c <= 'F')
        return c - 'A' + 10;
    return -1;
}

static size_t
utf8_put(char *o, uint32_t cp)
{
    if (cp < 0x80) {
        o[0] = (char)cp;
        return 1;
    }
    if (cp < 0x800) {
        o[0] = (char)(0xc0 | cp >> 6);
        o[1] = (char)(0x80 | (cp & 0x3f));
        return 2;
    }
    if (cp < 0x10000) {
        o[0] = (char)(0xe0 | cp >> 12);
        o[1] = (char)(0x80 | ((cp >> 6) & 0x3f));
        o[2] = (char)(0x80 | (cp & 0x3f));
        return 3;
    }
    o[0] = (char)(0xf0 | cp >> 18);
    o[1] = (char)(0x80 | ((cp >> 12) & 0x3f));
    o[2] = (char)(0x80 | ((cp >> 6) & 0x3f));
    o[3] = (char)(0x80 | (cp & 0x3f));
    return 4;
}

static ist_status
parse_u4(parser *ps, uint32_t *cp)
{
    if (ps->end - ps->p < 4)
        return perr(ps, "four hex digits");
    *cp = 0;
    for (int i = 0; i < 4; i++) {
        int h = hexval(ps->p[i]);
        if (h < 0)
            return perr(ps, "four hex digits");
        *cp = *cp << 4 | (uint32_t)h;
    }
    ps->p += 4;
    return IST_OK;
}

static ist_status
parse_string(parser *ps, char **out)
{
    const char *s = ++ps->p;   /* past the quote */
    size_t cap = 16, n = 0;
    char *o;

    while (ps->p < ps->end && *ps->p != '"') {
        if (*ps->p == '\\')
            ps->p++;
        ps->p++;
    }
    if (ps->p >= ps->end)
        return perr(ps, "a closing '\"'");
    cap = (size_t)(ps->p - s) + 1;
    o = ist_malloc(cap);
    if (!o)
        return ist_error_nomem(ps->err);
    ps->p = s;
    while (*ps->p != '"') {
        unsigned char c = (unsigned char)*ps->p;
        if (c < 0x20) {
            ist_free(o);
            return perr(ps, "no control character inside a string");
        }
        if (c != '\\') {
            o[n++] = (char)c;
            ps->p++;
            continue;
        }
        ps->p++;
        char e = *ps->p++;
        uint32_t cp;
        switch (e) {
        case '"': o[n++] = '"'; break;
        case '\\': o[n++] = '\\'; break;
        case '/': o[n++] = '/'; break;
        case 'b': o[n++] = '\b'; break;
        case 'f': o[n++] = '\f'; break;
        case 'n': o[n++] = '\n'; break;
        case 'r': o[n++] = '\r'; break;
        case 't': o[n++] = '\t'; break;
        case 'u':
            if (parse_u4(ps, &cp) != IST_OK)
                goto bad;
            if (cp >= 0xd800 && cp < 0xdc00 && ps->end - ps->p >= 6 && ps->p[0] == '\\' &&
                ps->p[1] == 'u') {
                uint32_t lo;
                ps->p += 2;
                if (parse_u4(ps, &lo) != IST_OK)
                    goto bad;
                if (lo < 0xdc00 || lo > 0xdfff)
                    goto bad_escape;
                cp = 0x10000 + ((cp - 0xd800) << 10) + (lo - 0xdc00);
            } else if (cp >= 0xd800 && cp <= 0xdfff) {
                goto bad_escape;
            }
            if (cp == 0)
                goto bad_escape;
            /* a \u escape is 6 bytes and produces at most 4 */
            n += utf8_put(o + n, cp);
            break;
        default:
            goto bad_escape;
        }
    }
    ps->p++;
    o[n] = '\0';
    *out = o;
    return IST_OK;
bad_escape:
    ps->p--;
    perr(ps, "a valid escape");
bad:
    ist_free(o);
    return IST_ERR_FORMAT;
}

static ist_status parse_value(parser *ps, ist_jv **out);

static ist_status
push(parser *ps, ist_jv *parent, char *k, ist_jv *child)
{
    if (parent->n == parent->cap) {
        size_t nc = parent->cap ? parent->cap * 2 : 4;
        ist_jv **ni = ist_realloc(parent->items, nc * sizeof *ni);
        if (!ni)
            return ist_error_nomem(ps->err);
        parent->items = ni;
        if (parent->type == IST_JOBJ) {
            char **nk = ist_realloc(parent->keys, nc * sizeof *nk);
            if (!nk)
                return ist_error_nomem(ps->err);
            parent->keys = nk;
        }
        parent->cap = nc;
    }
    parent->items[parent->n] = child;
    if (parent->type == IST_JOBJ)
        parent->keys[parent->n] = k;
    parent->n++;
    return IST_OK;
}

/* Refuse a member name the object already holds. */
static ist_status
unique_key(parser *ps, const ist_jv *obj, const char *k)
{
    for (size_t i = 0; i < obj->n; i++)
        if (strcmp(obj->keys[i], k) == 0)
            return ist_error_at(ps->err, IST_ERR_FORMAT, ps->path ? ps->path : "<json>",
                                ps->line, "duplicate member \"%s\" (first on line %llu)", k,
                                (unsigned long long)obj->items[i]->line);
    return IST_OK;
}

static ist_status
parse_container(parser *ps, ist_jv *v)
{
    char close = v->type == IST_JOBJ ? '}' : ']';
    ist_status rc;

    if (++ps->depth > 64)
        return ist_error_at(ps->err, IST_ERR_FORMAT, ps->path ? ps->path : "<json>", ps->line,
                            "JSON nested deeper than 64 levels");
    ps->p++;
    skip_ws(ps);
    if (ps->p < ps->end && *ps->p == close) {
        ps->p++;
        ps->depth--;
        return IST_OK;
    }
    for (;;) {
        char *k = NULL;
        ist_jv *child = NULL;
        skip_ws(ps);
        if (v->type == IST_JOBJ) {
            if (ps->p >= ps->end || *ps->p != '"')
                return perr(ps, "a member name in quotes");
            if ((rc = parse_string(ps, &k)) != IST_OK)
                return rc;
            skip_ws(ps);
            if (ps->p >= ps->end || *ps->p != ':') {
                ist_free(k);
                return perr(ps, "':'");
            }
            ps->p++;
        }
        if (k && (rc = unique_key(ps, v, k)) != IST_OK) {
            ist_free(k);
            return rc;
        }
        rc = parse_value(ps, &child);
        if (rc == IST_OK)
            rc = push(ps, v, k, child);
        if (rc != IST_OK) {
            ist_free(k);
            ist_jv_free(child);
            return rc;
        }
        skip_ws(ps);
        if (ps->p < ps->end && *ps->p == ',') {
            ps->p++;
            continue;
        }
        if (ps->p < ps->end && *ps->p == close) {
            ps->p++;
            ps->depth--;
            return IST_OK;
        }
        return perr(ps, close == '}' ? "',' or '}'" : "',' or ']'");
    }
}

static bool
literal(parser *ps, const char *word)
{
    size_t n = strlen(word);
    if ((size_t)(ps->end - ps->p) >= n && memcmp(ps->p, word, n) == 0) {
        ps->p += n;
        return true;
    }
    return false;
}

static ist_status
parse_number(parser *ps, ist_jv *v)
{
    const char *s = ps->p;
    char buf[64];

    if (ps->p < ps->end && *ps->p == '-')
        ps->p++;
    if (ps->p >= ps->end || *ps->p < '0' || *ps->p > '9')
        return perr(ps, "a value");
    if (*ps->p == '0')
        ps->p++;
    else
        while (ps->p < ps->end && *ps->p >= '0' && *ps->p <= '9')
            ps->p++;
    if (ps->p < ps->end && *ps->p == '.') {
        ps->p++;
        if (ps->p >= ps->end || *ps->p < '0' || *ps->p > '9')
            return perr(ps, "a digit after '.'");
        while (ps->p < ps->end && *ps->p >= '0' && *ps->p <= '9')
            ps->p++;
    }
    if (ps->p < ps->end && (*ps->p == 'e' || *ps->p == 'E')) {
        ps->p++;
        if (ps->p < ps->end && (*ps->p == '+' || *ps->p == '-'))
            ps->p++;
        if (ps->p >= ps->end || *ps->p < '0' || *ps->p > '9')
            return perr(ps, "a digit in the exponent");
        while (ps->p < ps->end && *ps->p >= '0' && *ps->p <= '9')
            ps->p++;
    }
    size_t n = (size_t)(ps->p - s);
    if (n >= sizeof buf)
        return ist_error_at(ps->err, IST_ERR_FORMAT, ps->path ? ps->path : "<json>", ps->line,
                            "number too long");
    memcpy(buf, s, n);
    buf[n] = '\0';
    v->num = strtod(buf, NULL);
    if (!isfinite(v->num))
        return ist_error_at(ps->err, IST_ERR_FORMAT, ps->path ? ps->path : "<json>", ps->line,
                            "number out of range: %s", buf);
    return IST_OK;
}

static ist_status
parse_value(parser *ps, ist_jv **out)
{
    ist_jv *v;
    ist_status rc = IST_OK;

    *out = NULL;
    skip_ws(ps);
    if (ps->p >= ps->end)
        return perr(ps, "a value");
    v = ist_calloc(1, sizeof *v);
    if (!v)
        return ist_error_nomem(ps->err);
    v->line = ps->line;
    switch (*ps->p) {
    case '{': v->type = IST_JOBJ; rc = parse_container(ps, v); break;
    case '[': v->type = IST_JARR; rc = parse_container(ps, v); break;
    case '"': v->type = IST_JSTR; rc = parse_string(ps, &v->str); break;
    case 't':
    case 'f':
    case 'n':
        if (literal(ps, "true")) {
            v->type = IST_JBOOL;
            v->b = true;
        } else if (literal(ps, "false")) {
            v->type = IST_JBOOL;
        } else if (literal(ps, "null")) {
            v->type = IST_JNULL;
        } else {
            rc = perr(ps, "a value");
        }
        break;
    default: v->type = IST_JNUM; rc = parse_number(ps, v); break;
    }
    if (rc != IST_OK) {
        ist_jv_free(v);
        return rc;
    }
    *out = v;
    return IST_OK;
}

ist_status
ist_json_parse(const char *text, size_t len, const char *path, ist_jv **out, ist_error *err)
{
    parser ps = {text, text + len, path, 1, err, 0};
    ist_status rc;

    *out = NULL;
    if (len >= 3 && memcmp(text, "\xEF\xBB\xBF", 3) == 0)
        ps.p += 3;
    rc = parse_value(&ps, out);
    if (rc != IST_OK)
        return rc;
    skip_ws(&ps);
    if (ps.p != ps.end) {
        ist_jv_free(*out);
        *out = NULL;
        return perr(&ps, "the end of the text");
    }
    return IST_OK;
}

ist_status
ist_json_parse_file(const char *path, ist_jv **out, ist_error *err)
{
    ist_reader *r;
    char *line, *all = NULL;
    size_t len, n = 0, cap = 0;
    bool eof;
    ist_status rc;

    *out = NULL;
    rc = ist_reader_open(path, 64u << 20, &r, err);
    if (rc != IST_OK)
        return rc;
    for (;;) {
        rc = ist_reader_next(r, &line, &len, &eof, err);
        if (rc != IST_OK || eof)
            break;
        if (n + len + 2 > cap) {
            size_t nc = cap ? cap * 2 : 4096;
            while (nc < n + len + 2)
                nc *= 2;
            char *na = ist_realloc(all, nc);
            if (!na) {
                rc = ist_error_nomem(err);
                break;
            }
            all = na;
            cap = nc;
        }
        memcpy(all + n, line, len);
        n += len;
        all[n++] = '\n';
    }
    ist_reader_close(r);
    if (rc == IST_OK && n == 0)
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0, "empty file, expected JSON");
    if (rc == IST_OK)
        rc = ist_json_parse(all, n, path, out, err);
    ist_free(all);
    return rc;
}

ist_jtype
ist_jv_type(const ist_jv *v)
{
    return v ? v->type : IST_JNULL;
}

const ist_jv *
ist_jv_get(const ist_jv *v, const char *k)
{
    if (!v || v->type != IST_JOBJ)
        return NULL;
    for (size_t i = 0; i < v->n; i++)
        if (strcmp(v->keys[i], k) == 0)
            return v->items[i];
    return NULL;
}

size_t
ist_jv_len(const ist_jv *v)
{
    return v && (v->type == IST_JOBJ || v->type == IST_JARR) ? v->n : 0;
}

const ist_jv *
ist_jv_at(const ist_jv *v, size_t i)
{
    return i < ist_jv_len(v) ? v->items[i] : NULL;
}

const char *
ist_jv_key(const ist_jv *v, size_t i)
{
    return v && v->type == IST_JOBJ && i < v->n ? v->keys[i] : NULL;
}

double
ist_jv_num(const ist_jv *v, double dflt)
{
    return v && v->type == IST_JNUM ? v->num : dflt;
}

const char *
ist_jv_str(const ist_jv *v, const char *dflt)
{
    return v && v->type == IST_JSTR ? v->str : dflt;
}

bool
ist_jv_bool(const ist_jv *v, bool dflt)
{
    return v && v->type == IST_JBOOL ? v->b : dflt;
}

uint64_t
ist_jv_line(const ist_jv *v)
{
    return v ? v->line : 0;
}

void
ist_jw_value(ist_jw *w, const char *k, const ist_jv *v)
{
    switch (ist_jv_type(v)) {
    case IST_JNULL: ist_jw_null(w, k); break;
    case IST_JBOOL: ist_jw_bool(w, k, v->b); break;
    case IST_JNUM: ist_jw_num(w, k, v->num); break;
    case IST_JSTR: ist_jw_str(w, k, v->str); break;
    case IST_JARR:
        ist_jw_arr_begin(w, k);
        for (size_t i = 0; i < v->n; i++)
            ist_jw_value(w, NULL, v->items[i]);
        ist_jw_arr_end(w);
        break;
    case IST_JOBJ:
        ist_jw_obj_begin(w, k);
        for (size_t i = 0; i < v->n; i++)
            ist_jw_value(w, v->keys[i], v->items[i]);
        ist_jw_obj_end(w);
        break;
    }
}

ist_status
ist_json_text(const ist_jv *v, char **out, ist_error *err)
{
    ist_jw w;
    ist_jw_init(&w, false);
    ist_jw_value(&w, NULL, v);
    return ist_jw_finish(&w, out, err);
}
