/* propose_merge.c - reviewed candidate lists back into a pair file: decisions,
 * duplicates, conflicts, and the new file with the seed lines first. */
#include <isthmus/propose.h>
#include <isthmus/filekind.h>

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "hash_int.h"
#include "ofile_int.h"
#include "reader_int.h"
#include "text_int.h"
#include "pairs_int.h"

#define MAX_LINE ((size_t)1 << 20)

typedef enum state { ST_SEED, ST_ACCEPTED, ST_REJECTED } state;

/* A pair seen so far: in the seed list, accepted or rejected. */
typedef struct record {
    char *src, *tgt;
    state st;
    bool dropped;          /* left out after a conflict */
    size_t file;           /* index into the file names; SIZE_MAX: seed list */
    uint64_t line;
} record;

/* Open addressing: slots hold record index + 1 (0 empty). */
typedef struct table {
    size_t *slot;
    size_t cap, used;
} table;

typedef struct merger {
    record *rec;
    size_t n, cap;
    table pairs;           /* (src, tgt) -> record */
    table sources;         /* src -> first record giving it a target (seed or accepted) */
    const char *seed_path;
    const char *const *files;
    const ist_merge_opts *o;
    ist_merge_summary *sum;
    ist_error first;       /* the first conflict */
    ist_pairs_norm *tnorm; /* normalises "use WORD" like the target vocabulary, NULL: exact */
} merger;

static uint64_t
key_hash(const char *s, const char *t)
{
    uint64_t h = ist_hash_bytes(s, strlen(s));
    return t ? h ^ (ist_hash_bytes(t, strlen(t)) * 0x9e3779b97f4a7c15ull) : h;
}

static bool
rec_match(const record *r, const char *s, const char *t)
{
    return strcmp(r->src, s) == 0 && (!t || strcmp(r->tgt, t) == 0);
}

/* Index (SIZE_MAX: none) of the record for (s, t), or for s when t is NULL. */
static size_t
table_find(const merger *m, const table *tb, const char *s, const char *t, size_t *pos)
{
    if (tb->cap == 0) {
        *pos = 0;
        return SIZE_MAX;
    }
    size_t i = (size_t)key_hash(s, t) & (tb->cap - 1);
    while (tb->slot[i]) {
        if (rec_match(&m->rec[tb->slot[i] - 1], s, t)) {
            *pos = i;
            return tb->slot[i] - 1;
        }
        i = (i + 1) & (tb->cap - 1);
    }
    *pos = i;
    return SIZE_MAX;
}

static ist_status
table_grow(merger *m, table *tb, bool by_pair, ist_error *err)
{
    size_t ncap = tb->cap ? tb->cap * 2 : 64;
    size_t *ns = ist_calloc(ncap, sizeof *ns);
    if (!ns)
        return ist_error_nomem(err);
    for (size_t i = 0; i < tb->cap; i++) {
        if (!tb->slot[i])
            continue;
        const record *r = &m->rec[tb->slot[i] - 1];
        size_t j = (size_t)key_hash(r->src, by_pair ? r->tgt : NULL) & (ncap - 1);
        while (ns[j])
            j = (j + 1) & (ncap - 1);
        ns[j] = tb->slot[i];
    }
    ist_free(tb->slot);
    tb->slot = ns;
    tb->cap = ncap;
    return IST_OK;
}

static ist_status
table_put(merger *m, table *tb, bool by_pair, size_t idx, ist_error *err)
{
    size_t pos;
    ist_status rc;
    if (2 * (tb->used + 1) > tb->cap)
        if ((rc = table_grow(m, tb, by_pair, err)) != IST_OK)
            return rc;
    const record *r = &m->rec[idx];
    if (table_find(m, tb, r->src, by_pair ? r->tgt : NULL, &pos) == SIZE_MAX) {
        tb->slot[pos] = idx + 1;
        tb->used++;
    }
    return IST_OK;
}

static ist_status
add_record(merger *m, const char *s, const char *t, state st, size_t file, uint64_t line,
           size_t *idx, ist_error *err)
{
    ist_status rc;
    if (m->n == m->cap) {
        size_t nc = m->cap ? 2 * m->cap : 64;
        record *nr = ist_realloc(m->rec, nc * sizeof *nr);
        if (!nr)
            return ist_error_nomem(err);
        m->rec = nr;
        m->cap = nc;
    }
    record *r = &m->rec[m->n];
    r->src = ist_strdup(s);
    r->tgt = ist_strdup(t);
    if (!r->src || !r->tgt) {
        ist_free(r->src);
        ist_free(r->tgt);
        return ist_error_nomem(err);
    }
    r->st = st;
    r->dropped = false;
    r->file = file;
    r->line = line;
    *idx = m->n++;
    if ((rc = table_put(m, &m->pairs, true, *idx, err)) != IST_OK)
        return rc;
    if (st != ST_REJECTED)
        rc = table_put(m, &m->sources, false, *idx, err);
    return rc;
}

static const char *
rec_file(const merger *m, const record *r)
{
    return r->file == SIZE_MAX ? m->seed_path : m->files[r->file];
}

/* Record a conflict between row (file, line) and an earlier record. */
static void
conflict(merger *m, size_t file, uint64_t line, record *earlier, const char *fmt, ...)
{
    char what[300], msg[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(what, sizeof what, fmt, ap);
    va_end(ap);
    snprintf(msg, sizeof msg, "%s:%llu: conflict: %s (%s:%llu)", m->files[file],
             (unsigned long long)line, what, rec_file(m, earlier),
             (unsigned long long)earlier->line);
    if (m->sum->conflicts++ == 0)
        ist_error_at(&m->first, IST_ERR_INVALID, m->files[file], line, "conflict: %s (%s:%llu)",
                     what, rec_file(m, earlier), (unsigned long long)earlier->line);
    if (earlier->st != ST_SEED)
        earlier->dropped = true;
    if (m->o->on_conflict)
        m->o->on_conflict(msg, m->o->ctx);
}

static ist_status
take_accept(merger *m, const char *s, const char *t, size_t file, uint64_t line, ist_error *err)
{
    size_t pos, idx = table_find(m, &m->pairs, s, t, &pos);
    if (idx != SIZE_MAX) {
        record *r = &m->rec[idx];
        if (r->st == ST_REJECTED)
            conflict(m, file, line, r, "'%s' -> '%s' accepted here but rejected", s, t);
        else
            m->sum->duplicates++;
        return IST_OK;
    }
    if (m->o->one_target && (idx = table_find(m, &m->sources, s, NULL, &pos)) != SIZE_MAX) {
        record *r = &m->rec[idx];
        conflict(m, file, line, r, "'%s' given '%s' here but '%s' (one target per word)", s, t,
                 r->tgt);
        return IST_OK;
    }
    ist_status rc = add_record(m, s, t, ST_ACCEPTED, file, line, &idx, err);
    return rc;
}

static ist_status
take_reject(merger *m, const char *s, const char *t, size_t file, uint64_t line, ist_error *err)
{
    size_t pos, idx = table_find(m, &m->pairs, s, t, &pos);
    if (idx != SIZE_MAX) {
        record *r = &m->rec[idx];
        if (r->st != ST_REJECTED)
            conflict(m, file, line, r, "'%s' -> '%s' rejected here but %s", s, t,
                     r->st == ST_SEED ? "in the seed list" : "accepted");
        return IST_OK;
    }
    return add_record(m, s, t, ST_REJECTED, file, line, &idx, err);
}

/* Split a line at tabs in place; returns the number of fields (at most cap). */
static size_t
split_tabs(char *line, char **field, size_t cap)
{
    size_t n = 0;
    char *p = line;
    while (n < cap) {
        field[n++] = p;
        char *tab = strchr(p, '\t');
        if (!tab)
            break;
        *tab = '\0';
        p = tab + 1;
    }
    return n;
}

/* Trim spaces (and a pair of surrounding double quotes a spreadsheet may add). */
static char *
trim(char *s)
{
    size_t len;
    while (*s == ' ')
        s++;
    len = strlen(s);
    while (len > 0 && s[len - 1] == ' ')
        s[--len] = '\0';
    if (len >= 2 && s[0] == '"' && s[len - 1] == '"') {
        s[len - 1] = '\0';
        s++;
    }
    return s;
}

static bool
word_ok(const char *w)
{
    return *w && !strpbrk(w, " \t\r");
}

/* Offset of a U+FEFF inside the line (after any leading one was skipped), or SIZE_MAX. */
static size_t
bom_at(const char *line)
{
    const char *p = strstr(line, "\xef\xbb\xbf");
    return p ? (size_t)(p - line) : SIZE_MAX;
}

/* Offset of the first control character other than a tab, or SIZE_MAX. */
static size_t
control_at(const char *line)
{
    for (size_t k = 0; line[k]; k++)
        if ((unsigned char)line[k] < 0x20 && line[k] != '\t')
            return k;
    return SIZE_MAX;
}

/* Offset of the first byte that is not well-formed UTF-8, or len. */
static size_t
utf8_bad_at(const char *s, size_t len)
{
    size_t i = 0;
    while (i < len) {
        uint32_t cp;
        size_t n = ist_utf8_decode((const unsigned char *)s + i, len - i, &cp);
        if (n == 0)
            return i;
        i += n;
    }
    return len;
}

#define MAX_FIELDS 64

static char
lower(char c)
{
    return c >= 'A' && c <= 'Z' ? (char)(c - 'A' + 'a') : c;
}

/* ASCII case-insensitive equality with a lower-case keyword. */
static bool
same_word(const char *s, const char *kw)
{
    while (*s && lower(*s) == *kw) {
        s++;
        kw++;
    }
    return *s == '\0' && *kw == '\0';
}

static bool
starts_use(const char *s)
{
    return lower(s[0]) == 'u' && lower(s[1]) == 's' && lower(s[2]) == 'e' && s[3] == ' ';
}

typedef struct columns {
    size_t decision, source, candidate, block;   /* block: SIZE_MAX when absent */
} columns;

static ist_status
parse_header(char **f, size_t nf, const char *path, uint64_t line, columns *c, ist_error *err)
{
    c->decision = c->source = c->candidate = c->block = SIZE_MAX;
    for (size_t i = 0; i < nf; i++) {
        const char *name = trim(f[i]);
        if (strcmp(name, "decision") == 0)
            c->decision = i;
        else if (strcmp(name, "source") == 0)
            c->source = i;
        else if (strcmp(name, "candidate") == 0)
            c->candidate = i;
        else if (strcmp(name, "block") == 0)
            c->block = i;
    }
    if (c->decision == SIZE_MAX || c->source == SIZE_MAX || c->candidate == SIZE_MAX)
        return ist_error_at(err, IST_ERR_FORMAT, path, line,
                            "expected a header line naming the columns decision, source and "
                            "candidate, found '%s'", f[0]);
    return IST_OK;
}

/* One candidate row: decide and record. */
/* The word of a "use WORD" correction must be a word of the target vectors when they
 * are given (a typo would otherwise become a seed pair no vector file has). */
static ist_status
check_use_word(merger *m, const char *w, const char *path, uint64_t line, ist_error *err)
{
    const ist_store *t = m->o->target_vectors;
    const char *nw = w;
    size_t nl = strlen(w);
    char buf[IST_WORD_MAX_BYTES * 4 + 1];

    if (!t) {
        m->sum->unchecked++;
        return IST_OK;
    }
    if (m->tnorm) {
        ist_status rc = ist_pairs_norm_word(m->tnorm, w, strlen(w), &nw, &nl, err);
        if (rc != IST_OK)
            return rc;
    }
    if (nl >= sizeof buf)
        nl = sizeof buf - 1;
    memcpy(buf, nw, nl);
    buf[nl] = '\0';
    if (ist_store_find(t, buf) < 0)
        return ist_error_at(err, IST_ERR_FORMAT, path, line,
                            "decision: 'use %s': the word is not in the target vectors", w);
    return IST_OK;
}

static ist_status
take_row(merger *m, char **f, size_t nf, const columns *c, size_t file, uint64_t line,
         ist_error *err)
{
    const char *path = m->files[file];
    /* a spreadsheet may drop empty fields at the end of a row: a missing
     * decision field is an empty decision */
    const char *dec = c->decision < nf ? trim(f[c->decision]) : "";
    if (c->source >= nf || c->candidate >= nf)
        return ist_error_at(err, IST_ERR_FORMAT, path, line,
                            "expected the source and candidate columns, found %zu field%s", nf,
                            nf == 1 ? "" : "s");
    const char *s = trim(f[c->source]), *t = trim(f[c->candidate]);
    if (strlen(s) > IST_WORD_MAX_BYTES || strlen(t) > IST_WORD_MAX_BYTES)
        return ist_error_at(err, IST_ERR_FORMAT, path, line,
                            "%s word of %zu bytes, longer than the limit of %d bytes",
                            strlen(s) > IST_WORD_MAX_BYTES ? "source" : "candidate",
                            strlen(s) > IST_WORD_MAX_BYTES ? strlen(s) : strlen(t),
                            IST_WORD_MAX_BYTES);
    if (!word_ok(s) || !word_ok(t))
        return ist_error_at(err, IST_ERR_FORMAT, path, line,
                            "expected one word each in source and candidate, found '%s' and '%s'",
                            s, t);
    if (s[0] == '#')
        return ist_error_at(err, IST_ERR_FORMAT, path, line,
                            "source word '%s' starts with '#', which a pair file reads as a "
                            "comment", s);
    m->sum->rows++;
    /* the same-spelling block accepted in bulk: its undecided rows count as accepted */
    if (*dec == '\0' && m->o->accept_same_spelling && c->block < nf &&
        strcmp(trim(f[c->block]), "same-spelling") == 0) {
        m->sum->accepted++;
        m->sum->bulk_accepted++;
        return take_accept(m, s, t, file, line, err);
    }
    if (*dec == '\0') {
        m->sum->undecided++;
        return IST_OK;
    }
    if (same_word(dec, "accept")) {
        m->sum->accepted++;
        return take_accept(m, s, t, file, line, err);
    }
    if (same_word(dec, "reject")) {
        m->sum->rejected++;
        return take_reject(m, s, t, file, line, err);
    }
    if (starts_use(dec)) {
        const char *w = dec + 4;
        while (*w == ' ')
            w++;
        if (!word_ok(w))
            return ist_error_at(err, IST_ERR_FORMAT, path, line,
                                "decision: expected 'use WORD' with one word, found '%s'", dec);
        if (strlen(w) > IST_WORD_MAX_BYTES)
            return ist_error_at(err, IST_ERR_FORMAT, path, line,
                                "decision: 'use WORD' with a word of %zu bytes, longer than the "
                                "limit of %d bytes", strlen(w), IST_WORD_MAX_BYTES);
        if (strcmp(w, t) != 0) {
            ist_status rc = check_use_word(m, w, path, line, err);
            if (rc != IST_OK)
                return rc;
        }
        if (strcmp(w, t) == 0)
            m->sum->accepted++;
        else
            m->sum->corrected++;
        return take_accept(m, s, w, file, line, err);
    }
    return ist_error_at(err, IST_ERR_FORMAT, path, line,
                        "decision: expected accept, reject, 'use WORD' or nothing, found '%s'",
                        dec);
}

static ist_status
read_reviewed(merger *m, size_t file, ist_error *err)
{
    const char *path = m->files[file];
    ist_reader *r = NULL;
    ist_status rc = ist_file_expect(path, IST_FILE_BIT(IST_FILE_CANDIDATES) | IST_FILE_ANY_TEXT, 1,
                                    "a reviewed candidate list", err);
    if (rc == IST_OK)
        rc = ist_reader_open(path, MAX_LINE, &r, err);
    bool header = false, eof;
    char *line, *f[MAX_FIELDS];
    size_t len;
    columns c = {0, 0, 0, SIZE_MAX};

    while (rc == IST_OK && (rc = ist_reader_next(r, &line, &len, &eof, err)) == IST_OK && !eof) {
        uint64_t no = ist_reader_lineno(r);
        char *start = line;
        size_t bad;
        if (no == 1 && len >= 3 && memcmp(line, "\xef\xbb\xbf", 3) == 0)
            line += 3;
        if (strlen(line) != len - (size_t)(line - start))
            rc = ist_error_at(err, IST_ERR_FORMAT, path, no, "expected text, found a NUL byte");
        else if ((bad = utf8_bad_at(line, strlen(line))) < strlen(line))
            rc = ist_error_at(err, IST_ERR_FORMAT, path, no,
                              "invalid UTF-8 at byte %zu of the line", bad + 1);
        else if ((bad = bom_at(line)) != SIZE_MAX)
            /* pair lists skip a mark at the start of any line: a word cannot begin with one */
            rc = ist_error_at(err, IST_ERR_FORMAT, path, no,
                              "byte order mark (U+FEFF) at byte %zu of the line", bad + 1);
        else if ((bad = control_at(line)) != SIZE_MAX)
            /* the pair-list reader refuses these too: a merged file must read back */
            rc = ist_error_at(err, IST_ERR_FORMAT, path, no,
                              "control character 0x%02x at byte %zu of the line",
                              (unsigned)(unsigned char)line[bad], bad + 1);
        if (rc != IST_OK || line[0] == '#' || line[strspn(line, " \t")] == '\0')
            continue;
        size_t nf = split_tabs(line, f, MAX_FIELDS);
        if (!header) {
            rc = parse_header(f, nf, path, no, &c, err);
            header = true;
        } else {
            rc = take_row(m, f, nf, &c, file, no, err);
        }
    }
    if (rc == IST_OK && !header)
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0,
                          "expected a header line naming the columns decision, source and "
                          "candidate, found none");
    ist_reader_close(r);
    return rc;
}

static ist_status
read_seeds(merger *m, const char *path, ist_error *err)
{
    ist_pairs *p;
    ist_status rc = ist_pairs_read(path, &p, err);
    if (rc != IST_OK)
        return rc;
    m->sum->seed_pairs = ist_pairs_count(p);
    for (size_t i = 0; rc == IST_OK && i < ist_pairs_count(p); i++) {
        size_t pos, idx;
        const char *s = ist_pairs_source(p, i), *t = ist_pairs_target(p, i);
        if (table_find(m, &m->pairs, s, t, &pos) == SIZE_MAX)
            rc = add_record(m, s, t, ST_SEED, SIZE_MAX, ist_pairs_line(p, i), &idx, err);
    }
    ist_pairs_free(p);
    return rc;
}

/* The seed file's lines as they were (without a byte order mark, LF ends),
 * then the added pairs. */
static ist_status
write_out(const merger *m, const char *out_path, size_t nfiles, ist_error *err)
{
    ist_reader *r = NULL;
    ist_ofile *f = NULL;
    ist_status rc;
    bool eof;
    char *line;
    size_t len;

    if ((rc = ist_reader_open(m->seed_path, MAX_LINE, &r, err)) != IST_OK ||
        (rc = ist_ofile_open(out_path, false, &f, err)) != IST_OK)
        goto done;
    while ((rc = ist_reader_next(r, &line, &len, &eof, err)) == IST_OK && !eof) {
        if (ist_reader_lineno(r) == 1 && len >= 3 && memcmp(line, "\xef\xbb\xbf", 3) == 0) {
            line += 3;
            len -= 3;
        }
        if ((rc = ist_ofile_write(f, line, len, err)) != IST_OK ||
            (rc = ist_ofile_puts(f, "\n", err)) != IST_OK)
            goto done;
    }
    if (rc != IST_OK)
        goto done;
    if (m->sum->added > 0) {
        rc = ist_ofile_puts(f, "# added after review (isthmus merge-pairs) from:", err);
        for (size_t i = 0; rc == IST_OK && i < nfiles; i++)
            rc = ist_ofile_printf(f, err, " %s", m->files[i]);
        if (rc == IST_OK)
            rc = ist_ofile_puts(f, "\n", err);
    }
    for (size_t i = 0; rc == IST_OK && i < m->n; i++) {
        const record *x = &m->rec[i];
        if (x->st == ST_ACCEPTED && !x->dropped)
            rc = ist_ofile_printf(f, err, "%s\t%s\n", x->src, x->tgt);
    }
    if (rc == IST_OK) {
        rc = ist_ofile_commit(f, err);
        f = NULL;
    }
done:
    if (f)
        ist_ofile_abort(f);
    ist_reader_close(r);
    return rc;
}

void
ist_merge_opts_init(ist_merge_opts *o)
{
    memset(o, 0, sizeof *o);
}

ist_status
ist_propose_merge(const char *seed_path, const char *const *reviewed, size_t nreviewed,
                  const ist_merge_opts *opts, const char *out_path, ist_merge_summary *sum,
                  ist_error *err)
{
    ist_merge_opts o;
    ist_merge_summary local;
    merger m;
    ist_status rc = IST_OK;

    if (opts)
        o = *opts;
    else
        ist_merge_opts_init(&o);
    if (!sum)
        sum = &local;
    memset(sum, 0, sizeof *sum);
    memset(&m, 0, sizeof m);
    m.seed_path = seed_path;
    m.files = reviewed;
    m.o = &o;
    m.sum = sum;
    if (o.target_vectors) {
        bool exact;
        rc = ist_pairs_norm_open(o.target_vectors, &m.tnorm, &exact, err);
    }
    if (rc == IST_OK)
        rc = read_seeds(&m, seed_path, err);
    for (size_t i = 0; rc == IST_OK && i < nreviewed; i++)
        rc = read_reviewed(&m, i, err);
    if (rc == IST_OK && sum->conflicts > 0 && !o.skip_conflicts) {
        if (err) {
            *err = m.first;
            if (sum->conflicts > 1) {
                size_t l = strlen(err->msg);
                snprintf(err->msg + l, sizeof err->msg - l, "; %zu conflicts in all",
                         sum->conflicts);
            }
        }
        rc = IST_ERR_INVALID;
    }
    if (rc == IST_OK) {
        for (size_t i = 0; i < m.n; i++)
            sum->added += m.rec[i].st == ST_ACCEPTED && !m.rec[i].dropped;
        rc = write_out(&m, out_path, nreviewed, err);
    }
    for (size_t i = 0; i < m.n; i++) {
        ist_free(m.rec[i].src);
        ist_free(m.rec[i].tgt);
    }
    ist_free(m.rec);
    ist_pairs_norm_close(m.tnorm);
    ist_free(m.pairs.slot);
    ist_free(m.sources.slot);
    return rc;
}
