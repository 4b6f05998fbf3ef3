/* fuzz_text.c - any bytes through normalisation and word segmentation: the result is
 * well-formed UTF-8, its segments tile it, and strict mode fails only with an offset
 * inside the input; never a crash or a leak. The first byte picks the options. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/text.h>

#include "text_int.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

typedef struct tile {
    size_t next;
} tile;

static int
check_tile(void *ctx, size_t start, size_t len, bool wordlike)
{
    tile *t = ctx;
    (void)wordlike;
    if (start != t->next || len == 0)
        abort();
    t->next = start + len;
    return 0;
}

static int
check_word(void *ctx, const char *w, size_t len)
{
    (void)ctx;
    if (len == 0 || w == NULL)
        abort();
    return 0;
}

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    ist_text_opts o;
    ist_normalizer *nz;
    const char *out;
    size_t out_len;
    ist_error e;

    if (size == 0)
        return 0;
    ist_text_opts_init(&o);
    o.nfkc = data[0] & 1;
    o.casefold = data[0] & 2;
    o.strip_marks = data[0] & 4;
    o.mask_digits = data[0] & 8;
    o.strict_utf8 = data[0] & 16;
    if (ist_normalizer_new(&o, &nz, &e) != IST_OK)
        abort();
    ist_status rc = ist_normalize(nz, (const char *)data + 1, size - 1, &out, &out_len, &e);
    if (rc != IST_OK) {
        if (!o.strict_utf8 || rc != IST_ERR_FORMAT || !e.has_offset || e.offset >= size - 1)
            abort();
        ist_normalizer_free(nz);
        return 0;
    }
    for (size_t pos = 0; pos < out_len;) {
        uint32_t cp;
        size_t k = ist_utf8_decode((const unsigned char *)out + pos, out_len - pos, &cp);
        if (k == 0)
            abort();
        pos += k;
    }
    tile t = {0};
    if (ist_segment_all(out, out_len, check_tile, &t, &e) != IST_OK || t.next != out_len)
        abort();
    if (ist_segment_words(out, out_len, check_word, NULL, &e) != IST_OK)
        abort();
    ist_normalizer_free(nz);
    return 0;
}
