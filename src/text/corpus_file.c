/* corpus_file.c - the prepared-corpus file: save atomically, open with the id
 * stream memory-mapped. Layout (little-endian) in docs/formats.md, section
 * "Prepared corpus"; a CRC-32 over everything before the trailer guards it. */
#include <isthmus/corpus.h>
#include <isthmus/filekind.h>

#include <errno.h>
#include <fcntl.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include <zlib.h>

#include "alloc_int.h"
#include "corpus_int.h"
#include "error_int.h"
#include "json_int.h"
#include "ofile_int.h"

#define MAGIC "ISTPREP\x1a"
#define TRAILER "PEND"
#define VERSION 1u
#define HEADER_BYTES 128u
#define TRAILER_BYTES 8u

typedef struct header {
    uint64_t n_ids, n_words, ids_off, words_off, words_bytes, meta_off, meta_bytes, file_bytes;
} header;

static void
put_u32(unsigned char *p, uint32_t v)
{
    for (int i = 0; i < 4; i++)
        p[i] = (unsigned char)(v >> (8 * i));
}

static void
put_u64(unsigned char *p, uint64_t v)
{
    for (int i = 0; i < 8; i++)
        p[i] = (unsigned char)(v >> (8 * i));
}

static uint32_t
get_u32(const unsigned char *p)
{
    return (uint32_t)p[0] | (uint32_t)p[1] << 8 | (uint32_t)p[2] << 16 | (uint32_t)p[3] << 24;
}

static uint64_t
get_u64(const unsigned char *p)
{
    return (uint64_t)get_u32(p) | (uint64_t)get_u32(p + 4) << 32;
}

static bool
little_endian(void)
{
    const uint16_t one = 1;
    unsigned char b;
    memcpy(&b, &one, 1);
    return b == 1;
}

static uint64_t
pad8(uint64_t x)
{
    return (x + 7) & ~(uint64_t)7;
}

/* Writes that also feed the running checksum. */
typedef struct sink {
    ist_ofile *f;
    uLong crc;
} sink;

static ist_status
emit(sink *s, const void *buf, size_t n, ist_error *err)
{
    s->crc = crc32_z(s->crc, buf, n);
    return ist_ofile_write(s->f, buf, n, err);
}

static ist_status
emit_zeros(sink *s, size_t n, ist_error *err)
{
    static const unsigned char zeros[8];
    return n ? emit(s, zeros, n, err) : IST_OK;
}

static ist_status
emit_ids(void *ctx, const uint32_t *ids, size_t n, ist_error *err)
{
    return n ? emit(ctx, ids, n * sizeof *ids, err) : IST_OK;
}

static ist_status
write_body(sink *s, const ist_corpus *c, const header *h, const char *meta, ist_error *err)
{
    unsigned char hb[HEADER_BYTES];
    ist_status rc;
    size_t n_words = ist_vocab_size(c->vocab);

    memset(hb, 0, sizeof hb);
    memcpy(hb, MAGIC, 8);
    put_u32(hb + 8, VERSION);
    put_u32(hb + 12, HEADER_BYTES);
    put_u64(hb + 16, h->n_ids);
    put_u64(hb + 24, h->n_words);
    put_u64(hb + 32, h->ids_off);
    put_u64(hb + 40, h->words_off);
    put_u64(hb + 48, h->words_bytes);
    put_u64(hb + 56, h->meta_off);
    put_u64(hb + 64, h->meta_bytes);
    put_u64(hb + 72, h->file_bytes);
    rc = emit(s, hb, sizeof hb, err);
    if (rc == IST_OK && c->n_ids && c->spill_fd >= 0)
        rc = ist_corpus_spill_replay(c, emit_ids, s, err);
    else if (rc == IST_OK && c->n_ids)
        rc = emit(s, c->view, c->n_ids * sizeof *c->view, err);   /* host is little-endian */
    if (rc == IST_OK)
        rc = emit_zeros(s, (size_t)(h->words_off - h->ids_off - 4 * h->n_ids), err);
    for (size_t i = 0; i < n_words && rc == IST_OK; i++) {
        unsigned char wb[12];
        size_t len = ist_vocab_word_len(c->vocab, (uint32_t)i);
        put_u64(wb, ist_vocab_count(c->vocab, (uint32_t)i));
        put_u32(wb + 8, (uint32_t)len);
        rc = emit(s, wb, sizeof wb, err);
        if (rc == IST_OK)
            rc = emit(s, ist_vocab_word(c->vocab, (uint32_t)i), len, err);
    }
    if (rc == IST_OK)
        rc = emit_zeros(s, (size_t)(h->meta_off - h->words_off - h->words_bytes), err);
    if (rc == IST_OK)
        rc = emit(s, meta, (size_t)h->meta_bytes, err);
    if (rc == IST_OK)
        rc = emit_zeros(s, (size_t)(h->file_bytes - TRAILER_BYTES - h->meta_off - h->meta_bytes),
                        err);
    return rc;
}

ist_status
ist_corpus_save(const ist_corpus *c, const char *path, ist_error *err)
{
    header h;
    char *meta = NULL;
    sink s = {NULL, crc32(0L, Z_NULL, 0)};
    unsigned char tb[TRAILER_BYTES];
    ist_status rc;

    if (!little_endian())
        return ist_error_set(err, IST_ERR_INVALID, "prepared corpora need a little-endian host");
    rc = ist_corpus_meta_json(c, &meta, err);
    if (rc != IST_OK)
        return rc;
    memset(&h, 0, sizeof h);
    h.n_ids = c->n_ids;
    h.n_words = ist_vocab_size(c->vocab);
    h.ids_off = HEADER_BYTES;
    h.words_off = pad8(h.ids_off + 4 * h.n_ids);
    for (size_t i = 0; i < h.n_words; i++)
        h.words_bytes += 12 + ist_vocab_word_len(c->vocab, (uint32_t)i);
    h.meta_off = pad8(h.words_off + h.words_bytes);
    h.meta_bytes = strlen(meta);
    h.file_bytes = pad8(h.meta_off + h.meta_bytes) + TRAILER_BYTES;
    rc = ist_ofile_open(path, false, &s.f, err);
    if (rc == IST_OK)
        rc = write_body(&s, c, &h, meta, err);
    ist_free(meta);
    if (rc == IST_OK) {
        put_u32(tb, (uint32_t)s.crc);
        memcpy(tb + 4, TRAILER, 4);
        rc = ist_ofile_write(s.f, tb, sizeof tb, err);
    }
    if (rc != IST_OK) {
        ist_ofile_abort(s.f);
        return rc;
    }
    return ist_ofile_commit(s.f, err);
}

void
ist_corpus_unmap(void *map, size_t len)
{
    munmap(map, len);
}

/* Check magic, version, sizes, offsets and the checksum of the mapped file. */
static ist_status
check_layout(const unsigned char *p, size_t size, const char *path, header *h, ist_error *err)
{
    if (size < HEADER_BYTES + TRAILER_BYTES || memcmp(p, MAGIC, 8) != 0)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "not a prepared corpus (expected the magic bytes of one)");
    if (get_u32(p + 8) != VERSION || get_u32(p + 12) != HEADER_BYTES)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "prepared corpus version %u, expected %u", get_u32(p + 8), VERSION);
    h->n_ids = get_u64(p + 16);
    h->n_words = get_u64(p + 24);
    h->ids_off = get_u64(p + 32);
    h->words_off = get_u64(p + 40);
    h->words_bytes = get_u64(p + 48);
    h->meta_off = get_u64(p + 56);
    h->meta_bytes = get_u64(p + 64);
    h->file_bytes = get_u64(p + 72);
    if (h->file_bytes != size)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "truncated or padded: header says %llu bytes, found %zu",
                            (unsigned long long)h->file_bytes, size);
    if (memcmp(p + size - 4, TRAILER, 4) != 0)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0, "trailer missing, expected \"%s\"",
                            TRAILER);
    uLong crc = crc32_z(crc32(0L, Z_NULL, 0), p, size - TRAILER_BYTES);
    if ((uint32_t)crc != get_u32(p + size - TRAILER_BYTES))
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "checksum mismatch: expected %08x, found %08x (file damaged)",
                            get_u32(p + size - TRAILER_BYTES), (unsigned)crc);
    if (h->ids_off != HEADER_BYTES || h->n_ids > (size - HEADER_BYTES) / 4
        || h->words_off < h->ids_off + 4 * h->n_ids || h->words_off > size
        || h->words_bytes > size - h->words_off || h->meta_off < h->words_off + h->words_bytes
        || h->meta_off > size || h->meta_bytes > size - TRAILER_BYTES - h->meta_off
        || h->n_words >= UINT32_MAX)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0, "section offsets out of range");
    return IST_OK;
}

static ist_status
load_words(ist_corpus *c, const unsigned char *p, const header *h, const char *path,
           ist_error *err)
{
    const unsigned char *w = p + h->words_off, *end = w + h->words_bytes;
    ist_status rc;

    for (uint64_t i = 0; i < h->n_words; i++) {
        uint32_t id;
        if (end - w < 12 || (uint64_t)(end - w - 12) < get_u32(w + 8))
            return ist_error_at_offset(err, IST_ERR_FORMAT, path, (uint64_t)(w - p),
                                       "word %llu runs past the word section",
                                       (unsigned long long)i);
        uint32_t len = get_u32(w + 8);
        rc = ist_vocab_add(c->vocab, (const char *)w + 12, len, get_u64(w), &id, err);
        if (rc != IST_OK)
            return rc;
        if (id != i)
            return ist_error_at_offset(err, IST_ERR_FORMAT, path, (uint64_t)(w - p),
                                       "word %llu repeats word %u", (unsigned long long)i, id);
        w += 12 + len;
    }
    for (size_t i = 0; i < c->n_ids; i++)
        if (c->view[i] != IST_CORPUS_EOL && c->view[i] >= h->n_words)
            return ist_error_at_offset(err, IST_ERR_FORMAT, path, h->ids_off + 4 * i,
                                       "token id %u out of range, expected below %llu",
                                       c->view[i], (unsigned long long)h->n_words);
    return IST_OK;
}

/* A count from the provenance: absent is 0; anything but a whole number in
 * 0 .. 2^53 (exact in a double) makes *ok false. */
static uint64_t
count_of(const ist_jv *obj, const char *key, bool *ok)
{
    const ist_jv *v = ist_jv_get(obj, key);
    if (!v)
        return 0;
    double d = ist_jv_num(v, -1.0);
    if (ist_jv_type(v) != IST_JNUM || !(d >= 0.0 && d <= 9007199254740992.0)
        || d != (double)(uint64_t)d) {
        *ok = false;
        return 0;
    }
    return (uint64_t)d;
}

/* Write a parsed JSON value back as text (the sources list of the file). */
static void
rewrite_json(ist_jw *w, const char *key, const ist_jv *v)
{
    switch (ist_jv_type(v)) {
    case IST_JNULL: ist_jw_null(w, key); break;
    case IST_JBOOL: ist_jw_bool(w, key, ist_jv_bool(v, false)); break;
    case IST_JNUM: ist_jw_num(w, key, ist_jv_num(v, 0)); break;
    case IST_JSTR: ist_jw_str(w, key, ist_jv_str(v, "")); break;
    case IST_JARR:
        ist_jw_arr_begin(w, key);
        for (size_t i = 0; i < ist_jv_len(v); i++)
            rewrite_json(w, NULL, ist_jv_at(v, i));
        ist_jw_arr_end(w);
        break;
    case IST_JOBJ:
        ist_jw_obj_begin(w, key);
        for (size_t i = 0; i < ist_jv_len(v); i++)
            rewrite_json(w, ist_jv_key(v, i), ist_jv_at(v, i));
        ist_jw_obj_end(w);
        break;
    }
}

/* The sources list: kept as JSON text and as ist_corpus_source records. */
static ist_status
load_sources(ist_corpus *c, const ist_jv *src, bool *okp, ist_error *err)
{
    ist_status rc;
    bool ok = true;
    ist_jw w;
    char *json = NULL;

    ist_jw_init(&w, false);
    rewrite_json(&w, NULL, src);
    rc = ist_jw_finish(&w, &json, err);
    if (rc == IST_OK) {
        ist_free(c->sources_json);
        c->sources_json = json;
    }
    for (size_t i = 0; i < ist_jv_len(src) && rc == IST_OK; i++) {
        const ist_jv *e = ist_jv_at(src, i);
        ist_corpus_source s = {
            ist_jv_str(ist_jv_get(e, "path"), ""),
            count_of(e, "bytes", &ok),
            count_of(e, "text_bytes", &ok),
            (uint32_t)strtoul(ist_jv_str(ist_jv_get(e, "crc32"), "0"), NULL, 16),
            ist_jv_bool(ist_jv_get(e, "gzip"), false),
            count_of(e, "lines", &ok),
            count_of(e, "replaced_utf8", &ok),
        };
        rc = ist_corpus_add_source(c, &s, err);
    }
    if (!ok)
        *okp = false;
    return rc;
}

static ist_status
load_meta(ist_corpus *c, const unsigned char *p, const header *h, const char *path,
          ist_error *err)
{
    ist_jv *root = NULL;
    const ist_jv *st, *pr, *src;
    char *text = NULL;
    ist_status rc;

    rc = ist_json_parse((const char *)p + h->meta_off, (size_t)h->meta_bytes, path, &root, err);
    if (rc != IST_OK)
        return rc;
    text = ist_malloc((size_t)h->meta_bytes + 1);
    if (!text) {
        ist_jv_free(root);
        return ist_error_nomem(err);
    }
    memcpy(text, p + h->meta_off, (size_t)h->meta_bytes);
    text[h->meta_bytes] = '\0';
    rc = ist_text_opts_from_provenance(text, &c->text, err);
    ist_free(text);
    st = ist_jv_get(root, "stats");
    pr = ist_jv_get(root, "prune");
    src = ist_jv_get(root, "sources");
    bool ok = true;
    c->st.lines = count_of(st, "lines", &ok);
    c->st.lines_dropped_dup = count_of(st, "lines_dropped_dup", &ok);
    c->st.tokens_in = count_of(st, "tokens_in", &ok);
    c->st.tokens_kept = count_of(st, "tokens_kept", &ok);
    c->st.replaced_utf8 = count_of(st, "replaced_utf8", &ok);
    c->st.types_before_prune = count_of(st, "types_before_prune", &ok);
    /* files written before the keys took the option names spell them min_count, max_vocab */
    c->min_count = count_of(pr, ist_jv_get(pr, "min-freq") ? "min-freq" : "min_count", &ok);
    c->max_vocab = (size_t)count_of(pr, ist_jv_get(pr, "vocab-limit") ? "vocab-limit"
                                                                       : "max_vocab", &ok);
    if (rc == IST_OK && ist_jv_type(src) == IST_JARR)
        rc = load_sources(c, src, &ok, err);
    ist_jv_free(root);
    if (rc == IST_OK && !ok)
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0,
                          "provenance: a count is not a whole number in range");
    else if (rc != IST_OK)
        ist_error_prefix(err, "%s", path);
    return rc;
}

ist_status
ist_corpus_open(const char *path, ist_corpus **out, ist_error *err)
{
    ist_corpus *c = NULL;
    struct stat sb;
    header h = {0};
    void *map;
    ist_status rc;
    int fd;

    *out = NULL;
    if (!little_endian())
        return ist_error_set(err, IST_ERR_INVALID, "prepared corpora need a little-endian host");
    if ((rc = ist_file_expect(path, IST_FILE_BIT(IST_FILE_PREPARED) | IST_FILE_BIT(IST_FILE_UNKNOWN),
                              0, "a prepared corpus", err)) != IST_OK)
        return rc;
    fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot open for reading");
    if (fstat(fd, &sb) != 0 || !S_ISREG(sb.st_mode)) {
        rc = ist_error_sys(err, IST_ERR_IO, path, "cannot examine, expected a regular file");
        close(fd);
        return rc;
    }
    if ((uint64_t)sb.st_size < HEADER_BYTES + TRAILER_BYTES) {
        close(fd);
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "too short for a prepared corpus: %lld bytes",
                            (long long)sb.st_size);
    }
    map = mmap(NULL, (size_t)sb.st_size, PROT_READ, MAP_PRIVATE, fd, 0);
    close(fd);
    if (map == MAP_FAILED)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot map into memory");
    /* The checks and then training read the stream front to back (each training thread its
     * own part): ask for large read-ahead, and let pages already read go first when memory
     * is short, so that a corpus larger than memory streams from disk. Advice only. */
    madvise(map, (size_t)sb.st_size, MADV_SEQUENTIAL);
    rc = check_layout(map, (size_t)sb.st_size, path, &h, err);
    if (rc == IST_OK)
        rc = ist_corpus_alloc(&c, err);
    if (rc != IST_OK) {
        munmap(map, (size_t)sb.st_size);
        return rc;
    }
    c->map = map;
    c->map_len = (size_t)sb.st_size;
    c->view = (const uint32_t *)((const unsigned char *)map + h.ids_off);
    c->n_ids = (size_t)h.n_ids;
    rc = load_words(c, map, &h, path, err);
    if (rc == IST_OK)
        rc = load_meta(c, map, &h, path, err);
    if (rc != IST_OK) {
        ist_corpus_free(c);
        return rc;
    }
    *out = c;
    return IST_OK;
}
