/* store_native.c - the native vector file: memory-mapped reading, writing.
 * Byte layout in docs/formats.md. All integers little-endian. */
#include <isthmus/store.h>

#include <math.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/stat.h>

#include <zlib.h>

#include "alloc_int.h"
#include "error_int.h"
#include "ofile_int.h"
#include "store_int.h"

/* header field offsets */
enum {
    H_MAGIC = 0, H_VERSION = 8, H_FLAGS = 12, H_ROWS = 16, H_DIM = 24, H_STRIDE = 32,
    H_MATRIX_OFF = 40, H_WORDS_OFF = 48, H_WORDS_SIZE = 56, H_PROV_OFF = 64, H_PROV_SIZE = 72,
    H_FILE_SIZE = 80, H_MATRIX_CRC = 88, H_META_CRC = 92, H_WORDS_CRC = 96,
};
#define FLAG_COUNTS 1u

static uint64_t
get64(const unsigned char *p)
{
    uint64_t v = 0;
    for (int i = 7; i >= 0; i--)
        v = v << 8 | p[i];
    return v;
}

static uint32_t
get32(const unsigned char *p)
{
    return (uint32_t)p[0] | (uint32_t)p[1] << 8 | (uint32_t)p[2] << 16 | (uint32_t)p[3] << 24;
}

static void
put64(unsigned char *p, uint64_t v)
{
    for (int i = 0; i < 8; i++, v >>= 8)
        p[i] = (unsigned char)v;
}

static void
put32(unsigned char *p, uint32_t v)
{
    for (int i = 0; i < 4; i++, v >>= 8)
        p[i] = (unsigned char)v;
}

static int
little_endian_host(void)
{
    const uint16_t one = 1;
    return *(const unsigned char *)&one == 1;
}

static uint32_t
meta_crc(const unsigned char *header, const unsigned char *words, size_t words_size,
         const unsigned char *prov, size_t prov_size)
{
    unsigned char h[IST_NATIVE_HEADER];
    uLong crc = crc32(0L, Z_NULL, 0);

    memcpy(h, header, sizeof h);
    memset(h + H_META_CRC, 0, 4);
    crc = crc32(crc, h, sizeof h);
    crc = crc32(crc, words, (uInt)words_size);
    crc = crc32(crc, prov, (uInt)prov_size);
    return (uint32_t)crc;
}

#define BAD(...) ist_error_at_offset(err, IST_ERR_FORMAT, path, __VA_ARGS__)

static ist_status
check_header(const char *path, const unsigned char *h, uint64_t actual, const ist_store_opts *o,
             ist_error *err)
{
    uint64_t rows = get64(h + H_ROWS), dim = get64(h + H_DIM), stride = get64(h + H_STRIDE);
    uint64_t moff = get64(h + H_MATRIX_OFF), woff = get64(h + H_WORDS_OFF);
    uint64_t wsize = get64(h + H_WORDS_SIZE), poff = get64(h + H_PROV_OFF);
    uint64_t psize = get64(h + H_PROV_SIZE), fsize = get64(h + H_FILE_SIZE);
    uint32_t version = get32(h + H_VERSION);
    size_t mbytes;

    if (version != IST_NATIVE_VERSION)
        return BAD(H_VERSION, "native vector file version %u, this build reads version %u",
                   version, IST_NATIVE_VERSION);
    if (fsize != actual)
        return BAD(H_FILE_SIZE, "file is %s: header says %llu bytes, found %llu",
                   actual < fsize ? "truncated" : "longer than its header says",
                   (unsigned long long)fsize, (unsigned long long)actual);
    if (dim == 0 || dim > o->max_dim)
        return BAD(H_DIM, "dimension %llu is outside 1..%zu", (unsigned long long)dim, o->max_dim);
    if (rows == 0)
        return BAD(H_ROWS, "file holds no vectors");
    if (stride != ist_matrix_stride_for((size_t)dim))
        return BAD(H_STRIDE, "row stride %llu does not fit dimension %llu",
                   (unsigned long long)stride, (unsigned long long)dim);
    if (rows > actual / 4 / stride || ist_mul_size((size_t)rows, (size_t)stride * 4, &mbytes))
        return BAD(H_ROWS, "header claims %llu rows of %llu numbers, more than the file holds",
                   (unsigned long long)rows, (unsigned long long)dim);
    if (moff != IST_NATIVE_HEADER || moff + mbytes > actual)
        return BAD(H_MATRIX_OFF, "matrix section lies outside the file");
    if (woff != moff + mbytes || wsize > actual - woff || wsize < 16 * rows + 8)
        return BAD(H_WORDS_OFF, "word section lies outside the file or is too small");
    if (poff != woff + wsize || psize > actual - poff || poff + psize != actual)
        return BAD(H_PROV_OFF, "provenance section does not end the file");
    return IST_OK;
}

static ist_status
read_words(ist_store *s, const char *path, const unsigned char *base, uint64_t woff,
           uint64_t wsize, ist_error *err)
{
    const uint64_t *offs = (const uint64_t *)(base + woff + 8 * s->rows);
    uint64_t blob_off = woff + 16 * s->rows + 8;
    uint64_t blob_size = wsize - 16 * s->rows - 8;
    ist_status rc;

    s->counts = (const uint64_t *)(base + woff);
    s->woff = offs;
    s->wbase = (const char *)(base + blob_off);
    s->wlen = ist_malloc(s->rows * sizeof *s->wlen);
    if (!s->wlen)
        return ist_error_nomem(err);
    rc = ist_index_init(&s->ix, s->rows, err);
    if (rc != IST_OK)
        return rc;
    for (size_t i = 0; i < s->rows; i++) {
        uint64_t a = offs[i], b = offs[i + 1];
        size_t bad;
        if (b <= a || b > blob_size || (i == 0 && a != 0) || s->wbase[b - 1] != '\0')
            return BAD(woff + 8 * s->rows + 8 * i, "word offsets of row %zu are inconsistent", i);
        size_t len = (size_t)(b - a - 1);
        const char *w = s->wbase + a;
        const char *problem = ist_store_word_problem(w, len, &bad);
        if (problem)
            return BAD(blob_off + a + bad, "row %zu: %s", i, problem);
        s->wlen[i] = (uint32_t)len;
        ptrdiff_t other = ist_index_find(&s->ix, w, len, ist_store_word_of, s);
        if (other >= 0)
            return BAD(blob_off + a, "duplicate word '%.*s' in rows %td and %zu", (int)len, w,
                       other, i);
        rc = ist_index_insert(&s->ix, w, len, (uint32_t)i, ist_store_word_of, s, err);
        if (rc != IST_OK)
            return rc;
    }
    return IST_OK;
}

/* One pass: the checksum and the finiteness of every component, row by row
 * while the row is in cache. */
static ist_status
verify_matrix(const ist_store *s, const char *path, uint32_t want, ist_error *err)
{
    const size_t row_bytes = s->stride * sizeof(float);
    uLong crc = crc32(0L, Z_NULL, 0);
    size_t bad_row = (size_t)-1, bad_col = 0;

    for (size_t i = 0; i < s->file_rows; i++) {
        const float *r = s->data + i * s->stride;
        crc = crc32(crc, (const Bytef *)r, (uInt)row_bytes);
        if (bad_row == (size_t)-1) {
            unsigned all = 0;
            for (size_t j = 0; j < s->dim; j++) {
                uint32_t bits;
                memcpy(&bits, &r[j], sizeof bits);
                all |= (bits & 0x7f800000u) == 0x7f800000u;
            }
            if (all) {
                bad_row = i;
                while (isfinite(r[bad_col]))
                    bad_col++;
            }
        }
    }
    if (bad_row != (size_t)-1)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "row %zu ('%s') component %zu is not a finite number%s", bad_row,
                            ist_store_word(s, bad_row), bad_col + 1,
                            (uint32_t)crc != want ? " (and the matrix checksum does not match: "
                                                    "the file is damaged)" : "");
    if ((uint32_t)crc != want)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "matrix checksum mismatch: the file is damaged");
    return IST_OK;
}

ist_status
ist_store_open_native(const char *path, int fd, const ist_store_opts *opts, ist_store **out,
                      ist_error *err)
{
    struct stat st;
    ist_store *s = NULL;
    ist_status rc;
    unsigned char *base;

    if (!little_endian_host())
        return ist_error_set(err, IST_ERR_INVALID, "native vector files need a little-endian host");
    if (fstat(fd, &st) != 0)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot examine");
    if ((uint64_t)st.st_size < IST_NATIVE_HEADER)
        return BAD((uint64_t)st.st_size, "file is truncated: %lld bytes, shorter than the %u-byte header",
                   (long long)st.st_size, IST_NATIVE_HEADER);
    base = mmap(NULL, (size_t)st.st_size, PROT_READ, MAP_PRIVATE, fd, 0);
    if (base == MAP_FAILED)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot map into memory");
    s = ist_calloc(1, sizeof *s);
    if (!s) {
        munmap(base, (size_t)st.st_size);
        return ist_error_nomem(err);
    }
    s->map = base;
    s->map_len = (size_t)st.st_size;
    s->src_format = IST_STORE_NATIVE;
    rc = check_header(path, base, (uint64_t)st.st_size, opts, err);
    if (rc != IST_OK)
        goto fail;
    uint64_t woff = get64(base + H_WORDS_OFF), wsize = get64(base + H_WORDS_SIZE);
    uint64_t poff = get64(base + H_PROV_OFF), psize = get64(base + H_PROV_SIZE);
    if (meta_crc(base, base + woff, wsize, base + poff, psize) != get32(base + H_META_CRC)) {
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0,
                          "checksum mismatch in header, words or provenance: the file is damaged");
        goto fail;
    }
    s->rows = s->file_rows = (size_t)get64(base + H_ROWS);
    s->dim = (size_t)get64(base + H_DIM);
    s->stride = (size_t)get64(base + H_STRIDE);
    s->data = (float *)(base + IST_NATIVE_HEADER);
    rc = read_words(s, path, base, woff, wsize, err);
    if (rc != IST_OK)
        goto fail;
    s->prov = ist_malloc((size_t)psize + 1);
    if (!s->prov) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    memcpy(s->prov, base + poff, (size_t)psize);
    s->prov[psize] = '\0';
    s->fp = (uint64_t)get32(base + H_MATRIX_CRC) << 32 | get32(base + H_WORDS_CRC);
    s->have_fp = true;
    s->checked = IST_STORE_CHECK_META;
    if (opts->verify) {
        rc = verify_matrix(s, path, get32(base + H_MATRIX_CRC), err);
        if (rc != IST_OK)
            goto fail;
        s->checked = IST_STORE_CHECK_FULL;
    }
    if (opts->max_rows && opts->max_rows < s->rows) {
        s->rows = opts->max_rows;
        s->have_fp = false;
    }
    *out = s;
    return IST_OK;
fail:
    ist_store_free(s);
    return rc;
}

ist_status
ist_store_verify(ist_store *s, ist_error *err)
{
    if (s->src_format != IST_STORE_NATIVE || s->checked == IST_STORE_CHECK_FULL)
        return IST_OK;
    uint32_t want = get32((const unsigned char *)s->map + H_MATRIX_CRC);
    ist_status rc = verify_matrix(s, "native vector file", want, err);
    if (rc == IST_OK)
        s->checked = IST_STORE_CHECK_FULL;
    return rc;
}

ist_status
ist_store_save_native(const ist_store *s, const char *path, ist_error *err)
{
    unsigned char h[IST_NATIVE_HEADER];
    size_t rows = s->rows, blob = 0, mbytes = rows * s->stride * sizeof(float);
    unsigned char *words = NULL;
    const char *prov = ist_store_provenance(s);
    size_t psize = strlen(prov), wsize;
    ist_ofile *f = NULL;
    ist_status rc;

    for (size_t i = 0; i < rows; i++)
        blob += s->wlen[i] + 1;
    size_t blob_padded = (blob + 7) & ~(size_t)7;
    wsize = 16 * rows + 8 + blob_padded;
    words = ist_calloc(1, wsize);
    if (!words)
        return ist_error_nomem(err);
    uint64_t at = 0;
    for (size_t i = 0; i < rows; i++) {
        put64(words + 8 * i, s->counts[i]);
        put64(words + 8 * rows + 8 * i, at);
        memcpy(words + 16 * rows + 8 + at, ist_store_word(s, i), s->wlen[i]);
        at += s->wlen[i] + 1;
    }
    put64(words + 8 * rows + 8 * rows, at);
    memset(h, 0, sizeof h);
    memcpy(h + H_MAGIC, IST_NATIVE_MAGIC, 8);
    put32(h + H_VERSION, IST_NATIVE_VERSION);
    put32(h + H_FLAGS, FLAG_COUNTS);
    put64(h + H_ROWS, rows);
    put64(h + H_DIM, s->dim);
    put64(h + H_STRIDE, s->stride);
    put64(h + H_MATRIX_OFF, IST_NATIVE_HEADER);
    put64(h + H_WORDS_OFF, IST_NATIVE_HEADER + mbytes);
    put64(h + H_WORDS_SIZE, wsize);
    put64(h + H_PROV_OFF, IST_NATIVE_HEADER + mbytes + wsize);
    put64(h + H_PROV_SIZE, psize);
    put64(h + H_FILE_SIZE, IST_NATIVE_HEADER + mbytes + wsize + psize);
    put32(h + H_MATRIX_CRC, ist_store_matrix_crc(s->data, rows, s->stride));
    put32(h + H_WORDS_CRC, ist_store_words_crc(s));
    put32(h + H_META_CRC, meta_crc(h, words, wsize, (const unsigned char *)prov, psize));
    rc = ist_ofile_open(path, false, &f, err);
    if (rc != IST_OK)
        goto done;
    if ((rc = ist_ofile_write(f, h, sizeof h, err)) != IST_OK ||
        (rc = ist_ofile_write(f, s->data, mbytes, err)) != IST_OK ||
        (rc = ist_ofile_write(f, words, wsize, err)) != IST_OK ||
        (rc = ist_ofile_write(f, prov, psize, err)) != IST_OK) {
        ist_ofile_abort(f);
        goto done;
    }
    rc = ist_ofile_commit(f, err);
done:
    ist_free(words);
    return rc;
}
