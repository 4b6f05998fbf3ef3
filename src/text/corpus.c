/* corpus.c - raw text to a vocabulary and a token-id stream, one line at a
 * time: read (plain or gzip), normalise, drop repeated lines, segment, count;
 * then prune and renumber the stream in place. Memory holds the vocabulary,
 * the dedup hashes and the id stream, never the text; with a spill directory
 * the id stream goes to an unnamed temporary file there instead and is
 * renumbered while it is saved (corpus_file.c). Segmenting on several threads is in
 * corpus_par.c. */
#include <isthmus/corpus.h>
#include <isthmus/filekind.h>

#include <errno.h>
#include <fcntl.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <zlib.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "corpus_build_int.h"
#include "corpus_int.h"
#include "error_int.h"
#include "hash_int.h"
#include "json_int.h"
#include "reader_int.h"
#include "wordtab_int.h"

#define POLL_LINES 1024
#define SPILL_IDS ((size_t)1 << 18)    /* ids buffered before a write to the spill file (1 MiB) */

void
ist_corpus_opts_init(ist_corpus_opts *o)
{
    memset(o, 0, sizeof *o);
    ist_text_opts_init(&o->text);
    o->min_count = 5;
    o->max_vocab = 0;
    o->max_line = (size_t)1 << 20;
    o->threads = 1;
}

ist_status
ist_corpus_alloc(ist_corpus **out, ist_error *err)
{
    ist_corpus *c = ist_calloc(1, sizeof *c);
    ist_status rc;

    *out = NULL;
    if (!c)
        return ist_error_nomem(err);
    rc = ist_vocab_new(&c->vocab, err);
    if (rc != IST_OK) {
        ist_free(c);
        return rc;
    }
    c->sources_json = ist_strdup("[]");
    if (!c->sources_json) {
        ist_corpus_free(c);
        return ist_error_nomem(err);
    }
    ist_text_opts_init(&c->text);
    c->spill_fd = -1;
    *out = c;
    return IST_OK;
}

/* ---- set of line hashes for de-duplication -------------------------------- */

/* Insert h; *fresh tells whether it was new. */
ist_status
ist_corpus_seen_add(hashset *hs, uint64_t h, bool *fresh, ist_error *err)
{
    if ((hs->used + 1) * 2 > hs->cap) {
        size_t nc = hs->cap ? hs->cap * 2 : 4096;
        uint64_t *ns = ist_calloc(nc, sizeof *ns);
        if (!ns)
            return ist_error_nomem(err);
        for (size_t i = 0; i < hs->cap; i++) {
            if (!hs->slot[i])
                continue;
            size_t j = (size_t)hs->slot[i] & (nc - 1);
            while (ns[j])
                j = (j + 1) & (nc - 1);
            ns[j] = hs->slot[i];
        }
        ist_free(hs->slot);
        hs->slot = ns;
        hs->cap = nc;
    }
    if (h == 0)
        h = 1;
    size_t mask = hs->cap - 1, i = (size_t)h & mask;
    while (hs->slot[i]) {
        if (hs->slot[i] == h) {
            *fresh = false;
            return IST_OK;
        }
        i = (i + 1) & mask;
    }
    hs->slot[i] = h;
    hs->used++;
    *fresh = true;
    return IST_OK;
}

/* ---- the spilled stream ------------------------------------------------------------------- */

/* An unnamed temporary file in dir: created, then unlinked at once, so that it disappears
 * with the process whatever happens. */
static ist_status
spill_open(ist_corpus *c, const char *dir, ist_error *err)
{
    size_t n = strlen(dir) + 32;
    char *path = ist_malloc(n);

    if (!path)
        return ist_error_nomem(err);
    snprintf(path, n, "%s/.isthmus-ids-XXXXXX", dir);
    int fd = mkstemp(path);
    if (fd < 0) {
        ist_status rc = ist_error_sys(err, IST_ERR_IO, dir,
                                      "cannot create a temporary file for the token stream");
        ist_free(path);
        return rc;
    }
    unlink(path);
    ist_free(path);
    c->spill_dir = ist_strdup(dir);
    if (!c->spill_dir) {
        close(fd);
        return ist_error_nomem(err);
    }
    c->spill_fd = fd;
    return IST_OK;
}

static ist_status
spill_flush(build *b, ist_error *err)
{
    ist_corpus *c = b->c;
    const char *p = (const char *)b->spill_buf;
    size_t left = b->spill_used * sizeof *b->spill_buf;

    while (left > 0) {
        ssize_t k = write(c->spill_fd, p, left);
        if (k < 0 && errno == EINTR)
            continue;
        if (k <= 0)
            return ist_error_sys(err, IST_ERR_IO, c->spill_dir,
                                 "cannot write the token stream to a temporary file here");
        p += k;
        left -= (size_t)k;
    }
    c->spill_n += b->spill_used;
    b->spill_used = 0;
    return IST_OK;
}

ist_status
ist_corpus_spill_replay(const ist_corpus *c,
                        ist_status (*fn)(void *ctx, const uint32_t *ids, size_t n,
                                         ist_error *err),
                        void *ctx, ist_error *err)
{
    uint32_t *buf = ist_malloc(SPILL_IDS * sizeof *buf);
    uint64_t done = 0, kept = 0;
    ist_status rc = IST_OK;

    if (!buf)
        return ist_error_nomem(err);
#ifdef POSIX_FADV_SEQUENTIAL
    posix_fadvise(c->spill_fd, 0, 0, POSIX_FADV_SEQUENTIAL);
#endif
    while (done < c->spill_n && rc == IST_OK) {
        size_t want = c->spill_n - done < SPILL_IDS ? (size_t)(c->spill_n - done) : SPILL_IDS;
        size_t got = 0;
        while (got < want * sizeof *buf) {
            ssize_t k = pread(c->spill_fd, (char *)buf + got, want * sizeof *buf - got,
                              (off_t)(done * sizeof *buf + got));
            if (k < 0 && errno == EINTR)
                continue;
            if (k <= 0) {
                rc = ist_error_sys(err, IST_ERR_IO, c->spill_dir,
                                   "cannot read back the token stream from its temporary file");
                break;
            }
            got += (size_t)k;
        }
        if (rc != IST_OK)
            break;
        size_t k = 0;
        for (size_t i = 0; i < want; i++) {
            uint32_t id = buf[i];
            if (id != IST_CORPUS_EOL && (id >= c->n_remap || (id = c->remap[id]) == UINT32_MAX))
                continue;
            buf[k++] = id;
        }
        kept += k;
        if (kept > c->n_ids) {
            rc = ist_error_set(err, IST_ERR_INTERNAL, "spilled stream longer than counted");
            break;
        }
        rc = fn(ctx, buf, k, err);
#ifdef POSIX_FADV_DONTNEED
        posix_fadvise(c->spill_fd, (off_t)(done * sizeof *buf), (off_t)(want * sizeof *buf),
                      POSIX_FADV_DONTNEED);
#endif
        done += want;
    }
    if (rc == IST_OK && kept != c->n_ids)
        rc = ist_error_set(err, IST_ERR_INTERNAL, "spilled stream has %llu ids, counted %zu",
                           (unsigned long long)kept, c->n_ids);
    ist_free(buf);
    return rc;
}

ist_status
ist_corpus_push_id(build *b, uint32_t id, ist_error *err)
{
    ist_corpus *c = b->c;
    if (c->spill_fd >= 0) {
        b->spill_buf[b->spill_used++] = id;
        b->spill_eols += id == IST_CORPUS_EOL;
        return b->spill_used == SPILL_IDS ? spill_flush(b, err) : IST_OK;
    }
    if (c->n_ids == c->ids_cap) {
        size_t nc = c->ids_cap ? c->ids_cap * 2 : (size_t)1 << 16, bytes;
        if (ist_mul_size(nc, sizeof *c->ids, &bytes) != 0)
            return ist_error_nomem(err);
        uint32_t *ni = ist_realloc(c->ids, bytes);
        if (!ni)
            return ist_error_nomem(err);
        c->ids = ni;
        c->ids_cap = nc;
    }
    c->ids[c->n_ids++] = id;
    return IST_OK;
}

int
ist_corpus_on_word(void *ctx, const char *word, size_t len)
{
    build *b = ctx;
    uint32_t id;

    if (len > IST_WORD_MAX_BYTES)
        return 0;   /* no vector file could hold it (vocab.h): not a word */
    b->cb_rc = ist_wordtab_add(&b->words, word, len, &id, b->err);
    if (b->cb_rc == IST_OK)
        b->cb_rc = ist_corpus_push_id(b, id, b->err);
    if (b->cb_rc != IST_OK)
        return 1;
    b->c->st.tokens_in++;
    return 0;
}

/* ---- CRC-32 and size of each file as stored (corpus_build_int.h) ----------------- */

static ist_status
crc_open(crc_follow *cf, const char *path, ist_error *err)
{
    memset(cf, 0, sizeof *cf);
    cf->crc = crc32(0L, Z_NULL, 0);
    cf->f = fopen(path, "rb");
    if (!cf->f)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot open for reading");
    cf->buf = ist_malloc(CRC_CHUNK);
    if (!cf->buf) {
        fclose(cf->f);
        cf->f = NULL;
        return ist_error_nomem(err);
    }
    return IST_OK;
}

/* Checksum up to byte `upto` of the file (UINT64_MAX: to its end). */
ist_status
ist_corpus_crc_advance(crc_follow *cf, uint64_t upto, const char *path, ist_error *err)
{
    while (cf->done < upto) {
        uint64_t want = upto - cf->done;
        size_t n = fread(cf->buf, 1, want < CRC_CHUNK ? (size_t)want : CRC_CHUNK, cf->f);
        if (n == 0) {
            if (ferror(cf->f))
                return ist_error_sys(err, IST_ERR_IO, path, "cannot read");
            break;
        }
        cf->crc = crc32_z(cf->crc, cf->buf, n);
        cf->done += n;
    }
    return IST_OK;
}

static void
crc_close(crc_follow *cf)
{
    if (cf->f)
        fclose(cf->f);
    ist_free(cf->buf);
}

static uint64_t
replaced_total(const build *b)
{
    return ist_normalizer_replaced(b->nz) + b->replaced_par;
}

/* One normalised line: dedup, segment, end with EOL. */
static ist_status
take_line(build *b, ist_reader *r, const char *line, size_t len, ist_error *err)
{
    const char *norm;
    size_t nlen;
    ist_status rc;

    rc = ist_normalize(b->nz, line, len, &norm, &nlen, err);
    if (rc != IST_OK) {
        if (rc == IST_ERR_FORMAT && err && err->has_offset) {
            uint64_t col = err->offset;
            char msg[IST_ERROR_MSG_CAP];
            snprintf(msg, sizeof msg, "%s", err->msg);
            ist_error_at(err, IST_ERR_FORMAT, ist_reader_path(r), ist_reader_lineno(r),
                         "%s (byte offset %llu in the line, %llu in the text)", msg,
                         (unsigned long long)col,
                         (unsigned long long)(ist_reader_offset(r) + col));
            err->offset = ist_reader_offset(r) + col;
            err->has_offset = 1;
        }
        return rc;
    }
    b->c->st.lines++;
    if (b->o->dedup_lines && nlen > 0) {
        bool fresh;
        rc = ist_corpus_seen_add(&b->seen, ist_hash_bytes(norm, nlen), &fresh, err);
        if (rc != IST_OK)
            return rc;
        if (!fresh) {
            b->c->st.lines_dropped_dup++;
            return IST_OK;
        }
    }
    b->cb_rc = IST_OK;
    rc = ist_segment_words_opts(norm, nlen, &b->o->text, ist_corpus_on_word, b, err);
    if (rc == IST_OK)
        rc = b->cb_rc;
    if (rc != IST_OK) {
        ist_error_prefix(err, "%s:%llu", ist_reader_path(r),
                         (unsigned long long)ist_reader_lineno(r));
        return rc;
    }
    return ist_corpus_push_id(b, IST_CORPUS_EOL, err);
}

static ist_status
read_file(build *b, const char *path, ist_error *err)
{
    ist_reader *r = NULL;
    uint64_t lines0 = b->c->st.lines, repl0 = replaced_total(b), bytes;
    crc_follow cf;
    char hex[9];
    ist_status rc;

    rc = ist_file_expect(path, IST_FILE_ANY_TEXT | IST_FILE_BIT(IST_FILE_JSON), 1,
                         "raw text", err);
    if (rc != IST_OK)
        return rc;
    rc = crc_open(&cf, path, err);
    if (rc != IST_OK)
        return rc;
    rc = ist_reader_open(path, b->o->max_line, &r, err);
    if (rc != IST_OK) {
        crc_close(&cf);
        return rc;
    }
    if (b->pool)
        rc = ist_corpus_read_parallel(b, r, &cf, path, err);
    else
    for (uint64_t k = 1;; k++) {
        char *line;
        size_t len;
        bool eof;
        rc = ist_reader_next(r, &line, &len, &eof, err);
        if (rc != IST_OK || eof)
            break;
        rc = take_line(b, r, line, len, err);
        if (rc != IST_OK)
            break;
        if (k % POLL_LINES == 0) {
            if (ist_cancel_requested()) {
                rc = ist_error_set(err, IST_ERR_CANCELLED, "preparation cancelled");
                break;
            }
            rc = ist_corpus_crc_advance(&cf, ist_reader_raw_pos(r) + CRC_CHUNK, path, err);
            if (rc != IST_OK)
                break;
            if (b->o->progress)
                b->o->progress(b->o->progress_ctx, b->bytes_before + ist_reader_raw_pos(r),
                               b->bytes_total);
        }
    }
    if (rc == IST_OK)
        rc = ist_corpus_crc_advance(&cf, UINT64_MAX, path, err);
    bytes = cf.done;
    uint32_t crc = (uint32_t)cf.crc;
    crc_close(&cf);
    ist_corpus_source src = {path, 0, ist_reader_bytes(r), crc, ist_reader_is_gzip(r),
                             b->c->st.lines - lines0, replaced_total(b) - repl0};
    ist_reader_close(r);
    if (rc != IST_OK)
        return rc;
    src.bytes = bytes;
    rc = ist_corpus_add_source(b->c, &src, err);
    if (rc != IST_OK)
        return rc;
    b->bytes_before += bytes;
    if (b->o->progress)
        b->o->progress(b->o->progress_ctx, b->bytes_before, b->bytes_total);
    snprintf(hex, sizeof hex, "%08x", (unsigned)crc);
    ist_jw_obj_begin(&b->sources, NULL);
    ist_jw_str(&b->sources, "path", path);
    ist_jw_uint(&b->sources, "bytes", bytes);
    ist_jw_str(&b->sources, "crc32", hex);
    ist_jw_uint(&b->sources, "text_bytes", src.text_bytes);
    ist_jw_bool(&b->sources, "gzip", src.gzip);
    ist_jw_uint(&b->sources, "lines", src.lines);
    ist_jw_uint(&b->sources, "replaced_utf8", src.replaced_utf8);
    ist_jw_obj_end(&b->sources);
    return IST_OK;
}

/* Hand the counted words to the vocabulary in id order, so ids stay the same. */
static ist_status
to_vocab(const ist_wordtab *t, ist_vocab *v, ist_error *err)
{
    uint64_t *count = ist_malloc((t->n ? t->n : 1) * sizeof *count);
    ist_status rc = IST_OK;

    if (!count)
        return ist_error_nomem(err);
    ist_wordtab_counts(t, count);
    for (size_t i = 0; i < t->n && rc == IST_OK; i++) {
        const char *w = ist_wordtab_word(t, (uint32_t)i);
        size_t len = (i + 1 < t->n ? t->off[i + 1] : t->pool_used) - t->off[i] - 1;
        uint32_t id;
        rc = ist_vocab_add(v, w, len, count[i], &id, err);
        if (rc == IST_OK && id != i)
            rc = ist_error_set(err, IST_ERR_INTERNAL, "vocabulary id %u for word %zu", id, i);
    }
    ist_free(count);
    return rc;
}

/* Sort and prune the vocabulary, renumber the stream and drop pruned words. */
static ist_status
prune(ist_corpus *c, uint64_t min_count, size_t max_vocab, uint64_t eols, ist_error *err)
{
    size_t n = ist_vocab_size(c->vocab), bytes, k = 0;
    uint32_t *remap;
    ist_status rc;

    c->st.types_before_prune = n;
    if (ist_mul_size(n ? n : 1, sizeof *remap, &bytes) != 0)
        return ist_error_nomem(err);
    remap = ist_malloc(bytes);
    if (!remap)
        return ist_error_nomem(err);
    rc = ist_vocab_sort_prune(c->vocab, min_count, max_vocab, remap, err);
    if (rc != IST_OK) {
        ist_free(remap);
        return rc;
    }
    if (c->spill_fd >= 0) {      /* renumbered while saved: count what will be kept */
        size_t kept = ist_vocab_size(c->vocab);
        for (size_t i = 0; i < kept; i++)
            c->st.tokens_kept += ist_vocab_count(c->vocab, (uint32_t)i);
        c->n_ids = (size_t)(c->st.tokens_kept + eols);
        c->remap = remap;
        c->n_remap = n;
        c->view = NULL;
        return IST_OK;
    }
    for (size_t i = 0; i < c->n_ids; i++) {
        uint32_t id = c->ids[i];
        if (id != IST_CORPUS_EOL) {
            id = remap[id];
            if (id == UINT32_MAX)
                continue;
            c->st.tokens_kept++;
        }
        c->ids[k++] = id;
    }
    ist_free(remap);
    c->n_ids = k;
    if (k < c->ids_cap) {
        uint32_t *shrunk = ist_realloc(c->ids, (k ? k : 1) * sizeof *c->ids);
        if (shrunk) {
            c->ids = shrunk;
            c->ids_cap = k ? k : 1;
        }
    }
    c->view = c->ids;
    return IST_OK;
}

static ist_status
check_opts(const char *const *paths, size_t n_paths, const ist_corpus_opts *o, ist_error *err)
{
    if (!o)
        return ist_error_set(err, IST_ERR_INVALID, "expected corpus options, found NULL");
    if (n_paths == 0 || !paths)
        return ist_error_set(err, IST_ERR_INVALID, "expected at least one input file, found none");
    if (o->max_line == 0)
        return ist_error_set(err, IST_ERR_INVALID, "line limit must be positive, found 0");
    for (size_t i = 0; i < n_paths; i++)
        if (!paths[i])
            return ist_error_set(err, IST_ERR_INVALID, "input file %zu is NULL", i + 1);
    return IST_OK;
}

ist_status
ist_corpus_build(const char *const *paths, size_t n_paths, const ist_corpus_opts *o,
                 ist_corpus **out, ist_error *err)
{
    build b;
    ist_status rc;

    *out = NULL;
    rc = check_opts(paths, n_paths, o, err);
    if (rc != IST_OK)
        return rc;
    memset(&b, 0, sizeof b);
    b.o = o;
    b.err = err;
    ist_jw_init(&b.sources, false);
    rc = ist_corpus_alloc(&b.c, err);
    if (rc == IST_OK)
        rc = ist_normalizer_new(&o->text, &b.nz, err);
    if (rc == IST_OK)
        rc = ist_wordtab_init(&b.words, err);
    if (rc != IST_OK)
        goto done;
    b.c->text = o->text;
    b.c->min_count = o->min_count;
    b.c->max_vocab = o->max_vocab;
    if (o->threads > 1 && (rc = ist_corpus_pool_start(&b, o->threads, &b.pool, err)) != IST_OK)
        goto done;
    if (o->spill_dir) {
        b.spill_buf = ist_malloc(SPILL_IDS * sizeof *b.spill_buf);
        if (!b.spill_buf) {
            rc = ist_error_nomem(err);
            goto done;
        }
        if ((rc = spill_open(b.c, o->spill_dir, err)) != IST_OK)
            goto done;
    }
    for (size_t i = 0; i < n_paths; i++) {
        FILE *f = fopen(paths[i], "rb");
        if (!f) {
            rc = ist_error_sys(err, IST_ERR_IO, paths[i], "cannot open for reading");
            goto done;
        }
        if (fseek(f, 0, SEEK_END) == 0 && ftell(f) > 0)
            b.bytes_total += (uint64_t)ftell(f);
        fclose(f);
    }
    ist_jw_arr_begin(&b.sources, NULL);
    for (size_t i = 0; i < n_paths && rc == IST_OK; i++)
        rc = read_file(&b, paths[i], err);
    if (rc == IST_OK && b.c->spill_fd >= 0)
        rc = spill_flush(&b, err);
    if (rc != IST_OK)
        goto done;
    ist_jw_arr_end(&b.sources);
    ist_free(b.c->sources_json);
    b.c->sources_json = NULL;
    rc = ist_jw_finish(&b.sources, &b.c->sources_json, err);
    if (rc != IST_OK)
        goto done;
    b.c->st.replaced_utf8 = replaced_total(&b);
    rc = to_vocab(&b.words, b.c->vocab, err);
    if (rc == IST_OK)
        rc = prune(b.c, o->min_count, o->max_vocab, b.spill_eols, err);
done:
    ist_corpus_pool_stop(b.pool);
    ist_free(b.spill_buf);
    ist_jw_discard(&b.sources);
    ist_free(b.seen.slot);
    ist_wordtab_free(&b.words);
    ist_normalizer_free(b.nz);
    if (rc != IST_OK) {
        ist_corpus_free(b.c);
        return rc;
    }
    *out = b.c;
    return IST_OK;
}

ist_status
ist_corpus_add_source(ist_corpus *c, const ist_corpus_source *s, ist_error *err)
{
    if (c->n_src == c->src_cap) {
        size_t nc = c->src_cap ? 2 * c->src_cap : 4;
        ist_corpus_source *ns = ist_realloc(c->src, nc * sizeof *ns);
        if (!ns)
            return ist_error_nomem(err);
        c->src = ns;
        c->src_cap = nc;
    }
    c->src[c->n_src] = *s;
    c->src[c->n_src].path = ist_strdup(s->path ? s->path : "");
    if (!c->src[c->n_src].path)
        return ist_error_nomem(err);
    c->n_src++;
    return IST_OK;
}

size_t
ist_corpus_n_sources(const ist_corpus *c)
{
    return c->n_src;
}

ist_status
ist_corpus_source_get(const ist_corpus *c, size_t i, ist_corpus_source *out, ist_error *err)
{
    if (i >= c->n_src)
        return ist_error_set(err, IST_ERR_INVALID, "source %zu out of range, expected below %zu",
                             i, c->n_src);
    *out = c->src[i];
    return IST_OK;
}

void
ist_corpus_free(ist_corpus *c)
{
    if (!c)
        return;
    for (size_t i = 0; i < c->n_src; i++)
        ist_free((void *)c->src[i].path);
    ist_free(c->src);
    ist_vocab_free(c->vocab);
    ist_free(c->ids);
    if (c->spill_fd >= 0)
        close(c->spill_fd);
    ist_free(c->spill_dir);
    ist_free(c->remap);
    if (c->map)
        ist_corpus_unmap(c->map, c->map_len);
    ist_free(c->sources_json);
    ist_free(c);
}

const uint32_t *
ist_corpus_ids(const ist_corpus *c, size_t *n)
{
    *n = c->view ? c->n_ids : 0;
    return c->view;
}

const ist_vocab *
ist_corpus_vocab(const ist_corpus *c)
{
    return c->vocab;
}

const ist_text_opts *
ist_corpus_text_opts(const ist_corpus *c)
{
    return &c->text;
}

void
ist_corpus_stats_get(const ist_corpus *c, ist_corpus_stats *st)
{
    *st = c->st;
}

const char *
ist_corpus_sources_json(const ist_corpus *c)
{
    return c->sources_json;
}

ist_status
ist_corpus_meta_json(const ist_corpus *c, char **json, ist_error *err)
{
    char *text = NULL;
    ist_status rc;
    ist_jw w;

    *json = NULL;
    rc = ist_text_opts_to_json(&c->text, &text, err);
    if (rc != IST_OK)
        return rc;
    ist_jw_init(&w, false);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "kind", "isthmus prepared corpus");
    ist_jw_raw(&w, "text", text);
    ist_jw_obj_begin(&w, "prune");
    ist_jw_uint(&w, "min-freq", c->min_count);        /* the option names of prepare */
    ist_jw_uint(&w, "vocab-limit", c->max_vocab);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "stats");
    ist_jw_uint(&w, "lines", c->st.lines);
    ist_jw_uint(&w, "lines_dropped_dup", c->st.lines_dropped_dup);
    ist_jw_uint(&w, "tokens_in", c->st.tokens_in);
    ist_jw_uint(&w, "tokens_kept", c->st.tokens_kept);
    ist_jw_uint(&w, "replaced_utf8", c->st.replaced_utf8);
    ist_jw_uint(&w, "types_before_prune", c->st.types_before_prune);
    ist_jw_obj_end(&w);
    ist_jw_raw(&w, "sources", c->sources_json);
    ist_jw_obj_end(&w);
    ist_free(text);
    return ist_jw_finish(&w, json, err);
}
