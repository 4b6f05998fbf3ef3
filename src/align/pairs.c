/* pairs.c - bilingual word lists: parse, resolve against two stores, split, overlap. */
#include <isthmus/pairs.h>
#include <isthmus/filekind.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "hash_int.h"
#include "ofile_int.h"
#include "pairs_int.h"
#include "reader_int.h"

#define PAIRS_MAX_LINE (64u << 10)

typedef struct pair {
    size_t s_off, t_off;    /* into pool */
    uint64_t line;
    ptrdiff_t srow, trow;   /* -1: not kept */
} pair;

struct ist_pairs {
    pair *v;
    size_t n, cap;
    char *pool;
    size_t used, pcap;
    bool resolved;
    char *path;             /* the file read, or NULL */
    char *label;            /* for people: the path or how the list was made */
    bool has_list_ck;       /* list_ck describes the pairs as they came in */
    uint64_t list_ck;
};

ist_status
ist_pairs_new(ist_pairs **out, ist_error *err)
{
    *out = ist_calloc(1, sizeof **out);
    return *out ? IST_OK : ist_error_nomem(err);
}

void
ist_pairs_free(ist_pairs *p)
{
    if (!p)
        return;
    ist_free(p->v);
    ist_free(p->pool);
    ist_free(p->path);
    ist_free(p->label);
    ist_free(p);
}

static ist_status
pool_put(ist_pairs *p, const char *s, size_t len, size_t *off, ist_error *err)
{
    if (p->used + len + 1 > p->pcap) {
        size_t nc = p->pcap ? p->pcap : 4096;
        while (nc < p->used + len + 1)
            nc *= 2;
        char *np = ist_realloc(p->pool, nc);
        if (!np)
            return ist_error_nomem(err);
        p->pool = np;
        p->pcap = nc;
    }
    memcpy(p->pool + p->used, s, len);
    p->pool[p->used + len] = '\0';
    *off = p->used;
    p->used += len + 1;
    return IST_OK;
}

static ist_status
push(ist_pairs *p, const char *s, size_t sl, const char *t, size_t tl, uint64_t line,
     ist_error *err)
{
    pair e = {0, 0, line, -1, -1};
    ist_status rc;

    if (p->n == p->cap) {
        size_t nc = p->cap ? 2 * p->cap : 256;
        pair *nv = ist_realloc(p->v, nc * sizeof *nv);
        if (!nv)
            return ist_error_nomem(err);
        p->v = nv;
        p->cap = nc;
    }
    if ((rc = pool_put(p, s, sl, &e.s_off, err)) != IST_OK ||
        (rc = pool_put(p, t, tl, &e.t_off, err)) != IST_OK)
        return rc;
    p->v[p->n++] = e;
    return IST_OK;
}

ist_status
ist_pairs_add(ist_pairs *p, const char *src, const char *tgt, ist_error *err)
{
    p->has_list_ck = false;   /* no longer the list as it came in */
    return push(p, src, strlen(src), tgt, strlen(tgt), 0, err);
}

/* Offset of the first invalid UTF-8 sequence, or len when valid. */
static size_t
utf8_bad_at(const unsigned char *s, size_t len)
{
    size_t i = 0;
    while (i < len) {
        unsigned c = s[i];
        size_t n;
        unsigned min;
        if (c < 0x80) {
            i++;
            continue;
        }
        if (c >= 0xc2 && c <= 0xdf)
            n = 1, min = 0x80;
        else if (c >= 0xe0 && c <= 0xef)
            n = 2, min = 0x800;
        else if (c >= 0xf0 && c <= 0xf4)
            n = 3, min = 0x10000;
        else
            return i;
        unsigned cp = c & (0x3f >> n);
        for (size_t k = 1; k <= n; k++) {
            if (i + k >= len || (s[i + k] & 0xc0) != 0x80)
                return i;
            cp = (cp << 6) | (s[i + k] & 0x3f);
        }
        if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff))
            return i;
        i += n + 1;
    }
    return len;
}

static ist_status
parse_line(ist_pairs *p, const char *path, char *line, size_t len, uint64_t lineno,
           ist_error *err)
{
    const char *f[3];
    size_t fl[3], nf = 0, i = 0, bad;

    /* a byte order mark is skipped at the start of any line, not only the first: lists
     * joined with cat(1) carry one per part, and a source word never starts with one
     * (so a saved list reads back the same) */
    for (;;) {
        if (i < len && (line[i] == ' ' || line[i] == '\t'))
            i++;
        else if (len - i >= 3 && memcmp(line + i, "\xef\xbb\xbf", 3) == 0)
            i += 3;
        else
            break;
    }
    if (i == len || line[i] == '#')
        return IST_OK;
    bad = utf8_bad_at((const unsigned char *)line, len);
    if (bad < len)
        return ist_error_at(err, IST_ERR_FORMAT, path, lineno,
                            "invalid UTF-8 at byte %zu of the line", bad + 1);
    for (size_t k = 0; k < len; k++)   /* a NUL would cut a word short; none is a word */
        if ((unsigned char)line[k] < 0x20 && line[k] != '\t')
            return ist_error_at(err, IST_ERR_FORMAT, path, lineno,
                                "control character 0x%02x at byte %zu of the line",
                                (unsigned)(unsigned char)line[k], k + 1);
    while (i < len) {
        size_t st = i;
        while (i < len && line[i] != ' ' && line[i] != '\t')
            i++;
        if (nf < 3) {
            f[nf] = line + st;
            fl[nf] = i - st;
        }
        nf++;
        while (i < len && (line[i] == ' ' || line[i] == '\t'))
            i++;
    }
    if (nf != 2)
        return ist_error_at(err, IST_ERR_FORMAT, path, lineno,
                            "expected a source and a target word separated by a tab or space, "
                            "found %zu word%s", nf, nf == 1 ? "" : "s");
    for (size_t k = 0; k < 2; k++)
        if (fl[k] > IST_WORD_MAX_BYTES)
            return ist_error_at(err, IST_ERR_FORMAT, path, lineno,
                                "%s word of %zu bytes, longer than the limit of %d bytes",
                                k ? "target" : "source", fl[k], IST_WORD_MAX_BYTES);
    return push(p, f[0], fl[0], f[1], fl[1], lineno, err);
}

/* Remember where the list came from and the checksum of its pairs as they are now (for a
 * list just read: as read, before any vocabulary was consulted). */
static ist_status
record_origin(ist_pairs *p, const char *path, const char *label, ist_error *err)
{
    ist_status rc = ist_pairs_checksum(p, &p->list_ck, err);
    if (rc != IST_OK)
        return rc;
    p->has_list_ck = true;
    if ((path && !(p->path = ist_strdup(path))) || !(p->label = ist_strdup(label ? label : path)))
        return ist_error_nomem(err);
    return IST_OK;
}

ist_status
ist_pairs_read(const char *path, ist_pairs **out, ist_error *err)
{
    ist_reader *r = NULL;
    ist_pairs *p = NULL;
    ist_status rc;
    bool eof = false;

    *out = NULL;
    if ((rc = ist_file_expect(path, IST_FILE_ANY_TEXT, 1, "a pair list",
                              err)) != IST_OK)
        return rc;
    rc = ist_reader_open(path, PAIRS_MAX_LINE, &r, err);
    if (rc != IST_OK)
        return rc;
    rc = ist_pairs_new(&p, err);
    while (rc == IST_OK) {
        char *line;
        size_t len;
        rc = ist_reader_next(r, &line, &len, &eof, err);
        if (rc != IST_OK || eof)
            break;
        rc = parse_line(p, path, line, len, ist_reader_lineno(r), err);
    }
    ist_reader_close(r);
    if (rc == IST_OK)
        rc = record_origin(p, path, NULL, err);
    if (rc != IST_OK) {
        ist_pairs_free(p);
        return rc;
    }
    *out = p;
    return IST_OK;
}

const char *
ist_pairs_path(const ist_pairs *p)
{
    return p->path;
}

const char *
ist_pairs_label(const ist_pairs *p)
{
    return p->label;
}

bool
ist_pairs_list_checksum(const ist_pairs *p, uint64_t *out)
{
    *out = p->has_list_ck ? p->list_ck : 0;
    return p->has_list_ck;
}

size_t
ist_pairs_count(const ist_pairs *p)
{
    return p->n;
}

const char *
ist_pairs_source(const ist_pairs *p, size_t i)
{
    return p->pool + p->v[i].s_off;
}

const char *
ist_pairs_target(const ist_pairs *p, size_t i)
{
    return p->pool + p->v[i].t_off;
}

uint64_t
ist_pairs_line(const ist_pairs *p, size_t i)
{
    return p->v[i].line;
}

ptrdiff_t
ist_pairs_source_row(const ist_pairs *p, size_t i)
{
    return p->v[i].srow;
}

ptrdiff_t
ist_pairs_target_row(const ist_pairs *p, size_t i)
{
    return p->v[i].trow;
}

static bool
is_kept(const ist_pairs *p, size_t i)
{
    return !p->resolved || p->v[i].srow >= 0;
}

size_t
ist_pairs_kept(const ist_pairs *p)
{
    size_t n = 0;
    for (size_t i = 0; i < p->n; i++)
        n += is_kept(p, i);
    return n;
}

/* ---- sorting helpers (qsort has no context argument) -------------------- */

typedef struct keyed {
    uint64_t key;
    const char *word;
    size_t idx;
} keyed;

static int
cmp_keyed(const void *a, const void *b)
{
    const keyed *x = a, *y = b;
    if (x->key != y->key)
        return x->key < y->key ? -1 : 1;
    int c = strcmp(x->word, y->word);
    if (c)
        return c;
    return x->idx < y->idx ? -1 : x->idx > y->idx;
}

static int
cmp_word(const void *a, const void *b)
{
    const keyed *x = a, *y = b;
    int c = strcmp(x->word, y->word);
    if (c)
        return c;
    return x->idx < y->idx ? -1 : x->idx > y->idx;
}

/* Distinct words of the pairs (source side, kept only when kept_only) sorted
 * by cmp_word; *n gets how many entries (with repeats) were collected. */
static keyed *
collect_sources(const ist_pairs *p, bool kept_only, size_t *n)
{
    keyed *k = ist_malloc((p->n + 1) * sizeof *k);
    if (!k)
        return NULL;
    *n = 0;
    for (size_t i = 0; i < p->n; i++)
        if (!kept_only || is_kept(p, i))
            k[(*n)++] = (keyed){0, ist_pairs_source(p, i), i};
    qsort(k, *n, sizeof *k, cmp_word);
    return k;
}

static size_t
count_distinct(const keyed *k, size_t n)
{
    size_t d = 0;
    for (size_t i = 0; i < n; i++)
        d += i == 0 || strcmp(k[i].word, k[i - 1].word) != 0;
    return d;
}

typedef struct rowpair {
    ptrdiff_t s, t;
    size_t idx;
} rowpair;

static int
cmp_rowpair(const void *a, const void *b)
{
    const rowpair *x = a, *y = b;
    if (x->s != y->s)
        return x->s < y->s ? -1 : 1;
    if (x->t != y->t)
        return x->t < y->t ? -1 : 1;
    return x->idx < y->idx ? -1 : x->idx > y->idx;
}

/* Normalise every word of one side in place (new strings in the pool). */
static ist_status
normalise_side(ist_pairs *p, const ist_store *s, bool source, bool *exact, ist_error *err)
{
    ist_pairs_norm *nz = NULL;
    ist_status rc = ist_pairs_norm_open(s, &nz, exact, err);

    for (size_t i = 0; rc == IST_OK && i < p->n && !*exact; i++) {
        size_t off = source ? p->v[i].s_off : p->v[i].t_off, len, noff = 0;
        const char *w;
        rc = ist_pairs_norm_word(nz, p->pool + off, strlen(p->pool + off), &w, &len, err);
        if (rc != IST_OK) {
            ist_error_prefix(err, "line %llu: '%s'", (unsigned long long)p->v[i].line,
                             p->pool + off);
            break;
        }
        if (strlen(p->pool + off) == len && memcmp(p->pool + off, w, len) == 0)
            continue;
        rc = pool_put(p, w, len, &noff, err);
        if (source)
            p->v[i].s_off = noff;
        else
            p->v[i].t_off = noff;
    }
    ist_pairs_norm_close(nz);
    return rc;
}

ist_status
ist_pairs_resolve(ist_pairs *p, const ist_store *src, const ist_store *tgt,
                  ist_pairs_coverage *cov, ist_error *err)
{
    ist_pairs_coverage c;
    rowpair *rp = NULL;
    keyed *k = NULL;
    size_t nrp = 0, nk;
    ist_status rc;

    memset(&c, 0, sizeof c);
    rc = normalise_side(p, src, true, &c.source_exact, err);
    if (rc == IST_OK)
        rc = normalise_side(p, tgt, false, &c.target_exact, err);
    if (rc != IST_OK)
        return rc;
    rp = ist_malloc((p->n + 1) * sizeof *rp);
    if (!rp)
        return ist_error_nomem(err);
    c.read = p->n;
    for (size_t i = 0; i < p->n; i++) {
        ptrdiff_t s = ist_store_find(src, ist_pairs_source(p, i));
        ptrdiff_t t = ist_store_find(tgt, ist_pairs_target(p, i));
        p->v[i].srow = p->v[i].trow = -1;
        if (s < 0 && t < 0)
            c.missing_both++;
        else if (s < 0)
            c.missing_source++;
        else if (t < 0)
            c.missing_target++;
        else
            rp[nrp++] = (rowpair){s, t, i};
    }
    qsort(rp, nrp, sizeof *rp, cmp_rowpair);
    for (size_t a = 0; a < nrp; a++) {
        if (a > 0 && rp[a].s == rp[a - 1].s && rp[a].t == rp[a - 1].t) {
            c.duplicates++;
            continue;
        }
        p->v[rp[a].idx].srow = rp[a].s;
        p->v[rp[a].idx].trow = rp[a].t;
        c.kept++;
    }
    ist_free(rp);
    p->resolved = true;
    k = collect_sources(p, false, &nk);
    if (!k)
        return ist_error_nomem(err);
    c.sources_read = count_distinct(k, nk);
    ist_free(k);
    k = collect_sources(p, true, &nk);
    if (!k)
        return ist_error_nomem(err);
    c.sources_kept = count_distinct(k, nk);
    ist_free(k);
    if (cov)
        *cov = c;
    return IST_OK;
}

static ist_status
copy_pair(ist_pairs *dst, const ist_pairs *src, size_t i, ist_error *err)
{
    const char *s = ist_pairs_source(src, i), *t = ist_pairs_target(src, i);
    ist_status rc = push(dst, s, strlen(s), t, strlen(t), src->v[i].line, err);
    if (rc == IST_OK) {
        dst->v[dst->n - 1].srow = src->v[i].srow;
        dst->v[dst->n - 1].trow = src->v[i].trow;
        dst->resolved = src->resolved;
    }
    return rc;
}

/* The parts of a split: each records the checksum of the pairs it received, so a test
 * part scored now and the same part saved and read back carry one list checksum. */
static ist_status
label_parts(const ist_pairs *whole, ist_pairs *seeds, ist_pairs *test, ist_error *err)
{
    const char *from = whole->label ? whole->label : "a list made in memory";
    size_t n = strlen(from) + 32;
    char *ls = ist_malloc(n), *lt = ist_malloc(n);
    ist_status rc = IST_OK;

    if (!ls || !lt)
        rc = ist_error_nomem(err);
    if (rc == IST_OK) {
        snprintf(ls, n, "kept as seeds from %s", from);
        snprintf(lt, n, "held out from %s", from);
        rc = record_origin(seeds, NULL, ls, err);
    }
    if (rc == IST_OK)
        rc = record_origin(test, NULL, lt, err);
    ist_free(ls);
    ist_free(lt);
    return rc;
}

ist_status
ist_pairs_split(const ist_pairs *p, double test_fraction, uint64_t seed, ist_pairs **seeds,
                ist_pairs **test, ist_error *err)
{
    ist_pairs *a = NULL, *b = NULL;
    keyed *k = NULL, *d = NULL;
    size_t nk, nd = 0, ntest;
    ist_status rc;

    *seeds = *test = NULL;
    if (!(test_fraction >= 0 && test_fraction <= 1))
        return ist_error_set(err, IST_ERR_INVALID,
                             "split: expected a test fraction from 0 to 1, found %g",
                             test_fraction);
    k = collect_sources(p, true, &nk);
    d = ist_malloc((nk + 1) * sizeof *d);
    if (!k || !d) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    for (size_t i = 0; i < nk; i++) {
        if (i > 0 && strcmp(k[i].word, k[i - 1].word) == 0)
            continue;
        uint64_t h = ist_hash_bytes(k[i].word, strlen(k[i].word));
        h ^= seed * 0x9e3779b97f4a7c15ull;
        h = ist_hash_bytes(&h, sizeof h);
        d[nd++] = (keyed){h, k[i].word, 0};
    }
    qsort(d, nd, sizeof *d, cmp_keyed);
    ntest = (size_t)llround(test_fraction * (double)nd);
    /* in test: the first ntest of d; mark them by word, looked up in sorted k */
    for (size_t i = 0; i < nd; i++)
        d[i].idx = i < ntest;
    qsort(d, nd, sizeof *d, cmp_word);
    if ((rc = ist_pairs_new(&a, err)) != IST_OK || (rc = ist_pairs_new(&b, err)) != IST_OK)
        goto fail;
    for (size_t i = 0; i < p->n && rc == IST_OK; i++) {
        if (!is_kept(p, i))
            continue;
        keyed key = {0, ist_pairs_source(p, i), 0};
        size_t lo = 0, hi = nd;
        while (lo < hi) {
            size_t mid = (lo + hi) / 2;
            if (strcmp(d[mid].word, key.word) < 0)
                lo = mid + 1;
            else
                hi = mid;
        }
        rc = copy_pair(lo < nd && d[lo].idx ? b : a, p, i, err);
    }
    if (rc == IST_OK)
        rc = label_parts(p, a, b, err);
    if (rc != IST_OK)
        goto fail;
    ist_free(k);
    ist_free(d);
    *seeds = a;
    *test = b;
    return IST_OK;
fail:
    ist_free(k);
    ist_free(d);
    ist_pairs_free(a);
    ist_pairs_free(b);
    return rc;
}

ist_status
ist_pairs_overlap(const ist_pairs *a, const ist_pairs *b, const char **first, size_t cap,
                  size_t *shared_out, ist_error *err)
{
    size_t na, nb, shared = 0, listed = 0;
    keyed *ka = collect_sources(a, true, &na);
    keyed *kb = collect_sources(b, true, &nb);

    *shared_out = 0;
    if (!ka || !kb) {
        ist_free(ka);
        ist_free(kb);
        return ist_error_nomem(err);
    }
    /* kb sorted by word: walk distinct words, binary-search them in ka */
    for (size_t i = 0; i < nb; i++) {
        if (i > 0 && strcmp(kb[i].word, kb[i - 1].word) == 0)
            continue;
        size_t lo = 0, hi = na;
        while (lo < hi) {
            size_t mid = (lo + hi) / 2;
            if (strcmp(ka[mid].word, kb[i].word) < 0)
                lo = mid + 1;
            else
                hi = mid;
        }
        if (lo < na && strcmp(ka[lo].word, kb[i].word) == 0) {
            shared++;
            kb[i].key = 1;
        }
    }
    /* list in b's order: the first occurrence of each shared word (kb is sorted by
     * word then index, so the group's first entry is its first occurrence) */
    size_t ns = 0;
    for (size_t i = 0; i < nb; i++)
        if (kb[i].key == 1)
            kb[ns++] = kb[i];
    for (size_t i = 0; i < ns; i++)
        kb[i].key = kb[i].idx;
    qsort(kb, ns, sizeof *kb, cmp_keyed);
    for (size_t i = 0; i < ns && listed < cap; i++)
        first[listed++] = kb[i].word;
    ist_free(ka);
    ist_free(kb);
    *shared_out = shared;
    return IST_OK;
}

ist_status
ist_pairs_identical(const ist_store *src, const ist_store *tgt, uint64_t min_count,
                    bool marked_only, ist_pairs **out, ist_error *err)
{
    ist_pairs *p;
    ist_status rc;
    size_t ns = ist_store_rows(src);
    bool src_counts = ns > 0 && ist_store_count(src, 0) > 0;
    bool tgt_counts = ist_store_rows(tgt) > 0 && ist_store_count(tgt, 0) > 0;

    *out = NULL;
    if ((rc = ist_pairs_new(&p, err)) != IST_OK)
        return rc;
    p->resolved = true;
    for (size_t i = 0; i < ns; i++) {
        const char *w = ist_store_word(src, i);
        if (src_counts && ist_store_count(src, i) < min_count)
            continue;
        ptrdiff_t t = ist_store_find(tgt, w);
        if (t < 0 || (tgt_counts && ist_store_count(tgt, (size_t)t) < min_count))
            continue;
        if (marked_only && !ist_pairs_word_marked(w))
            continue;
        size_t len = strlen(w);
        if ((rc = push(p, w, len, w, len, 0, err)) != IST_OK) {
            ist_pairs_free(p);
            return rc;
        }
        p->v[p->n - 1].srow = (ptrdiff_t)i;
        p->v[p->n - 1].trow = t;
    }
    *out = p;
    return IST_OK;
}

static int
cmp_u64(const void *a, const void *b)
{
    uint64_t x = *(const uint64_t *)a, y = *(const uint64_t *)b;
    return x < y ? -1 : x > y;
}

/* Hash of a sorted array of hashes, serialised little-endian. */
static uint64_t
hash_sorted(uint64_t *h, size_t n)
{
    uint64_t acc = ist_hash_bytes("isthmus-pairs", 13);
    qsort(h, n, sizeof *h, cmp_u64);
    for (size_t i = 0; i < n; i++) {
        unsigned char b[16];
        for (int k = 0; k < 8; k++) {
            b[k] = (unsigned char)(acc >> (8 * k));
            b[8 + k] = (unsigned char)(h[i] >> (8 * k));
        }
        acc = ist_hash_bytes(b, sizeof b);
    }
    return acc ^ (uint64_t)n;
}

ist_status
ist_pairs_checksum(const ist_pairs *p, uint64_t *out, ist_error *err)
{
    uint64_t *h = ist_malloc((p->n + 1) * sizeof *h);
    size_t n = 0;
    *out = 0;
    if (!h)
        return ist_error_nomem(err);
    for (size_t i = 0; i < p->n; i++) {
        if (!is_kept(p, i))
            continue;
        const char *s = ist_pairs_source(p, i), *t = ist_pairs_target(p, i);
        uint64_t hs = ist_hash_bytes(s, strlen(s)), ht = ist_hash_bytes(t, strlen(t));
        unsigned char b[16];
        for (int q = 0; q < 8; q++) {
            b[q] = (unsigned char)(hs >> (8 * q));
            b[8 + q] = (unsigned char)(ht >> (8 * q));
        }
        h[n++] = ist_hash_bytes(b, sizeof b);
    }
    *out = hash_sorted(h, n);
    ist_free(h);
    return IST_OK;
}

ist_status
ist_pairs_sources_hash(const ist_pairs *p, uint64_t *out, ist_error *err)
{
    size_t nk = 0, n = 0;
    keyed *k = collect_sources(p, true, &nk);
    uint64_t *h = ist_malloc((nk + 1) * sizeof *h);
    *out = 0;
    if (!k || !h) {
        ist_free(k);
        ist_free(h);
        return ist_error_nomem(err);
    }
    for (size_t i = 0; i < nk; i++)
        if (i == 0 || strcmp(k[i].word, k[i - 1].word) != 0)
            h[n++] = ist_hash_bytes(k[i].word, strlen(k[i].word));
    *out = hash_sorted(h, n);
    ist_free(k);
    ist_free(h);
    return IST_OK;
}

ist_status
ist_pairs_find_word(const ist_store *s, const char *word, ptrdiff_t *row, ist_error *err)
{
    ist_pairs_norm *nz = NULL;
    bool exact;
    const char *w = word;
    size_t len = strlen(word);
    ist_status rc = ist_pairs_norm_open(s, &nz, &exact, err);

    *row = -1;
    if (rc == IST_OK && !exact)
        rc = ist_pairs_norm_word(nz, word, len, &w, &len, err);
    if (rc == IST_OK)
        *row = ist_store_find(s, w);
    ist_pairs_norm_close(nz);
    return rc;
}

ist_status
ist_pairs_save(const ist_pairs *p, const char *path, ist_error *err)
{
    ist_ofile *f;
    ist_status rc = ist_ofile_open(path, false, &f, err);

    if (rc != IST_OK)
        return rc;
    /* A list whose first word opens with '{' would be taken for a JSON file when read
     * back; a comment line first keeps it a pair list (the reader skips comments). */
    for (size_t i = 0; i < p->n; i++)
        if (is_kept(p, i)) {
            if (ist_pairs_source(p, i)[0] == '{')
                rc = ist_ofile_printf(f, err, "# pair list: source<TAB>target\n");
            break;
        }
    for (size_t i = 0; rc == IST_OK && i < p->n; i++)
        if (is_kept(p, i))
            rc = ist_ofile_printf(f, err, "%s\t%s\n", ist_pairs_source(p, i),
                                  ist_pairs_target(p, i));
    if (rc != IST_OK) {
        ist_ofile_abort(f);
        return rc;
    }
    return ist_ofile_commit(f, err);
}
