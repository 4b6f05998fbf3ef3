/* store.c - the word-vector table: accessors, building, format dispatch. */
#include <isthmus/store.h>
#include <isthmus/filekind.h>

#include <errno.h>
#include <fcntl.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include <utf8proc.h>
#include <zlib.h>

#include "alloc_int.h"
#include "error_int.h"
#include "store_int.h"

void
ist_store_opts_init(ist_store_opts *opts)
{
    memset(opts, 0, sizeof *opts);
    opts->verify = false;
    opts->max_dim = IST_STORE_MAX_DIM_DEFAULT;
    opts->max_line = IST_STORE_MAX_LINE_DEFAULT;
}

void
ist_store_save_opts_init(ist_store_save_opts *opts)
{
    memset(opts, 0, sizeof *opts);
}

const char *
ist_store_word_of(const void *ctx, uint32_t id, size_t *len)
{
    const ist_store *s = ctx;
    *len = s->wlen[id];
    return s->wbase + s->woff[id];
}

ist_status
ist_store_alloc(size_t rows, size_t dim, size_t cap_rows, ist_store **out, ist_error *err)
{
    ist_store *s;
    ist_status rc;
    size_t stride = ist_matrix_stride_for(dim), n, bytes;

    *out = NULL;
    if (cap_rows < rows)
        cap_rows = rows;
    if (cap_rows == 0)
        cap_rows = 1;
    if (ist_mul_size(cap_rows, stride, &n) || ist_mul_size(n, sizeof(float), &bytes))
        return ist_error_set(err, IST_ERR_INVALID, "a %zu x %zu matrix is too large", rows, dim);
    s = ist_calloc(1, sizeof *s);
    if (!s)
        return ist_error_nomem(err);
    s->rows = rows;
    s->dim = dim;
    s->stride = stride;
    s->cap_rows = cap_rows;
    s->data = ist_aligned_alloc(bytes);
    s->owns_data = true;
    s->own_woff = ist_calloc(cap_rows, sizeof *s->own_woff);
    s->wlen = ist_malloc(cap_rows * sizeof *s->wlen);
    s->own_counts = ist_calloc(cap_rows, sizeof *s->own_counts);
    if (!s->data || !s->own_woff || !s->wlen || !s->own_counts) {
        rc = ist_error_set(err, IST_ERR_NOMEM, "out of memory for %zu vectors of %zu numbers",
                           cap_rows, dim);
        goto fail;
    }
    memset(s->data, 0, bytes);
    memset(s->wlen, 0xff, cap_rows * sizeof *s->wlen);
    s->woff = s->own_woff;
    s->counts = s->own_counts;
    rc = ist_index_init(&s->ix, rows ? rows : 1024, err);
    if (rc != IST_OK)
        goto fail;
    *out = s;
    return IST_OK;
fail:
    ist_store_free(s);
    return rc;
}

ist_status
ist_store_new(size_t rows, size_t dim, ist_store **out, ist_error *err)
{
    if (rows == 0 || dim == 0)
        return ist_error_set(err, IST_ERR_INVALID, "a vector store needs rows and dim > 0, got %zu x %zu",
                             rows, dim);
    return ist_store_alloc(rows, dim, rows, out, err);
}

void
ist_store_free(ist_store *s)
{
    if (!s)
        return;
    if (s->owns_data)
        ist_aligned_free(s->data);
    if (s->map)
        munmap(s->map, s->map_len);
    ist_free(s->own_woff);
    ist_free(s->wlen);
    ist_free(s->own_counts);
    ist_free(s->blob);
    ist_free(s->prov);
    ist_index_free(&s->ix);
    ist_free(s);
}

#define WORD_STR2(x) #x
#define WORD_STR(x) WORD_STR2(x)

const char *
ist_store_word_problem(const char *w, size_t len, size_t *bad_at)
{
    size_t i = 0;

    *bad_at = 0;
    if (len == 0)
        return "empty word";
    if (len > IST_WORD_MAX_BYTES) {
        *bad_at = IST_WORD_MAX_BYTES;
        return "word longer than the limit of " WORD_STR(IST_WORD_MAX_BYTES) " bytes";
    }
    while (i < len) {
        unsigned char c = (unsigned char)w[i];
        if (c < 0x80) {
            if (c <= 0x20 || c == 0x7f) {
                *bad_at = i;
                return c == ' ' || c == '\t' ? "word contains a space or tab"
                                             : "word contains a control character";
            }
            i++;
            continue;
        }
        utf8proc_int32_t cp;
        utf8proc_ssize_t n = utf8proc_iterate((const utf8proc_uint8_t *)w + i,
                                              (utf8proc_ssize_t)(len - i), &cp);
        if (n <= 0) {
            *bad_at = i;
            return "invalid UTF-8 in word";
        }
        i += (size_t)n;
    }
    return NULL;
}

ist_status
ist_store_push_word(ist_store *s, size_t row, const char *w, size_t len, uint64_t count,
                    ist_error *err)
{
    if (len >= UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "word too long");
    if (s->blob_used + len + 1 > s->blob_cap) {
        size_t nc = s->blob_cap ? s->blob_cap : 1 << 16;
        while (nc < s->blob_used + len + 1)
            nc *= 2;
        char *nb = ist_realloc(s->blob, nc);
        if (!nb)
            return ist_error_nomem(err);
        s->blob = nb;
        s->blob_cap = nc;
        s->wbase = nb;
    }
    memcpy(s->blob + s->blob_used, w, len);
    s->blob[s->blob_used + len] = '\0';
    s->own_woff[row] = s->blob_used;
    s->wlen[row] = (uint32_t)len;
    s->own_counts[row] = count;
    s->blob_used += len + 1;
    return ist_index_insert(&s->ix, w, len, (uint32_t)row, ist_store_word_of, s, err);
}

ist_status
ist_store_set_word(ist_store *s, size_t row, const char *word, uint64_t count, ist_error *err)
{
    size_t len = strlen(word), bad;
    const char *problem;

    if (!s->owns_data || s->map || s->src_format != IST_STORE_AUTO)
        return ist_error_set(err, IST_ERR_INVALID, "words of an opened vector file are fixed");
    if (row >= s->rows)
        return ist_error_set(err, IST_ERR_INVALID, "row %zu out of range (%zu rows)", row,
                             s->rows);
    if (s->wlen[row] != UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "row %zu already has a word", row);
    problem = ist_store_word_problem(word, len, &bad);
    if (problem)
        return ist_error_set(err, IST_ERR_INVALID, "%s at byte %zu: '%s'", problem, bad, word);
    ptrdiff_t other = ist_index_find(&s->ix, word, len, ist_store_word_of, s);
    if (other >= 0)
        return ist_error_set(err, IST_ERR_INVALID, "word '%s' already names row %td", word,
                             other);
    s->have_fp = false;
    return ist_store_push_word(s, row, word, len, count, err);
}

size_t
ist_store_rows(const ist_store *s)
{
    return s->rows;
}

size_t
ist_store_dim(const ist_store *s)
{
    return s->dim;
}

ptrdiff_t
ist_store_find(const ist_store *s, const char *word)
{
    ptrdiff_t r = ist_index_find(&s->ix, word, strlen(word), ist_store_word_of, s);
    return r >= 0 && (size_t)r < s->rows ? r : -1;
}

const float *
ist_store_row(const ist_store *s, size_t row)
{
    return s->data + row * s->stride;
}

const char *
ist_store_word(const ist_store *s, size_t row)
{
    return s->wlen[row] == UINT32_MAX ? "" : s->wbase + s->woff[row];
}

uint64_t
ist_store_count(const ist_store *s, size_t row)
{
    return s->counts[row];
}

ist_cmatview
ist_store_view(const ist_store *s)
{
    ist_cmatview v = {s->data, s->rows, s->dim, s->stride};
    return v;
}

static bool
mutable_store(const ist_store *s)
{
    return s->owns_data && s->src_format == IST_STORE_AUTO;
}

float *
ist_store_row_mut(ist_store *s, size_t row)
{
    if (!mutable_store(s))
        return NULL;
    s->have_fp = false;
    return s->data + row * s->stride;
}

ist_matview
ist_store_view_mut(ist_store *s)
{
    ist_matview v = {NULL, 0, 0, 0};
    if (!mutable_store(s))
        return v;
    s->have_fp = false;
    v.data = s->data;
    v.rows = s->rows;
    v.cols = s->dim;
    v.stride = s->stride;
    return v;
}

const char *
ist_store_provenance(const ist_store *s)
{
    return s->prov ? s->prov : "";
}

ist_status
ist_store_set_provenance(ist_store *s, const char *json, ist_error *err)
{
    char *copy = ist_strdup(json ? json : "");
    if (!copy)
        return ist_error_nomem(err);
    ist_free(s->prov);
    s->prov = copy;
    return IST_OK;
}

ist_store_format
ist_store_source_format(const ist_store *s)
{
    return s->src_format;
}

bool
ist_store_source_gzip(const ist_store *s)
{
    return s->src_gzip;
}

bool
ist_store_source_header(const ist_store *s)
{
    return s->src_header;
}

ist_store_check
ist_store_checked(const ist_store *s)
{
    return s->checked;
}

uint32_t
ist_store_matrix_crc(const float *data, size_t rows, size_t stride)
{
    const unsigned char *p = (const unsigned char *)data;
    size_t left = rows * stride * sizeof(float);
    uLong crc = crc32(0L, Z_NULL, 0);

    while (left > 0) {
        uInt chunk = left > (1u << 30) ? (1u << 30) : (uInt)left;
        crc = crc32(crc, p, chunk);
        p += chunk;
        left -= chunk;
    }
    return (uint32_t)crc;
}

uint32_t
ist_store_words_crc(const ist_store *s)
{
    uLong crc = crc32(0L, Z_NULL, 0);

    for (size_t i = 0; i < s->rows; i++) {
        const char *w = ist_store_word(s, i);
        crc = crc32(crc, (const Bytef *)w, (uInt)strlen(w) + 1);
    }
    return (uint32_t)crc;
}

uint64_t
ist_store_fingerprint(const ist_store *s)
{
    if (s->have_fp)
        return s->fp;
    return (uint64_t)ist_store_matrix_crc(s->data, s->rows, s->stride) << 32 |
           ist_store_words_crc(s);
}

ist_status
ist_store_open(const char *path, const ist_store_opts *opts, ist_store **out, ist_error *err)
{
    ist_store_opts defaults;
    char magic[8];
    struct stat st;
    ist_status rc;
    int fd;

    *out = NULL;
    if (!opts) {
        ist_store_opts_init(&defaults);
        opts = &defaults;
    }
    fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot open for reading");
    if (fstat(fd, &st) != 0) {
        rc = ist_error_sys(err, IST_ERR_IO, path, "cannot examine");
        close(fd);
        return rc;
    }
    if (S_ISDIR(st.st_mode)) {
        close(fd);
        return ist_error_at(err, IST_ERR_IO, path, 0, "is a directory, expected a vector file");
    }
    if (S_ISREG(st.st_mode) && st.st_size == 0) {
        close(fd);
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "empty file, expected a vector table or a native vector file");
    }
    ssize_t got = pread(fd, magic, sizeof magic, 0);
    if (got < 0) {
        rc = ist_error_sys(err, IST_ERR_IO, path, "cannot read");
        close(fd);
        return rc;
    }
    if (got == (ssize_t)sizeof magic && memcmp(magic, IST_NATIVE_MAGIC, 8) == 0) {
        rc = ist_store_open_native(path, fd, opts, out, err);
        close(fd);
        return rc;
    }
    close(fd);
    if ((rc = ist_file_expect(path, IST_FILE_ANY_TEXT | IST_FILE_BIT(IST_FILE_OWN_BINARY), 1,
                              "a vector file",
                              err)) != IST_OK)
        return rc;
    if (got >= 7 && memcmp(magic, IST_NATIVE_MAGIC, 7) == 0)
        return ist_error_at_offset(err, IST_ERR_FORMAT, path, 0,
                                   "not a native vector file this build knows: magic '%.8s', "
                                   "expected '%s'", magic, IST_NATIVE_MAGIC);
    return ist_store_open_text(path, opts, out, err);
}

static bool
ends_with(const char *s, const char *tail)
{
    size_t n = strlen(s), m = strlen(tail);
    return n >= m && strcmp(s + n - m, tail) == 0;
}

ist_status
ist_store_save(const ist_store *s, const char *path, const ist_store_save_opts *opts,
               ist_error *err)
{
    ist_store_save_opts o;

    if (opts)
        o = *opts;
    else
        ist_store_save_opts_init(&o);
    for (size_t i = 0; i < s->rows; i++)
        if (s->wlen[i] == UINT32_MAX)
            return ist_error_set(err, IST_ERR_INVALID, "row %zu has no word; cannot save", i);
    bool gz = ends_with(path, ".gz");
    if (o.format == IST_STORE_AUTO)
        o.format = gz || ends_with(path, ".txt") || strcmp(path, "-") == 0 ? IST_STORE_TEXT
                                                                          : IST_STORE_NATIVE;
    if (gz && o.format == IST_STORE_TEXT)
        o.gzip = true;   /* a text table named .gz is compressed, whoever chose the format */
    if (o.format == IST_STORE_NATIVE) {
        if (strcmp(path, "-") == 0)
            return ist_error_set(err, IST_ERR_INVALID,
                                 "the native format is written to a file, not to standard output");
        return ist_store_save_native(s, path, err);
    }
    return ist_store_save_text(s, path, &o, err);
}
