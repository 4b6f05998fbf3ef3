/* text_int.h - pieces of the text module shared by its files and the tests. */
#ifndef ISTHMUS_TEXT_INT_H
#define ISTHMUS_TEXT_INT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <isthmus/error.h>

/* Decode one well-formed UTF-8 sequence (Unicode 15.0 ch. 3, table 3-7: no
 * overlongs, no surrogates, nothing above U+10FFFF) at s[0..n). Returns its
 * length and sets *cp, or returns 0 when the bytes there are not well formed;
 * then *cp is the length of the maximal ill-formed subpart (at least 1), the
 * unit replaced by one U+FFFD. */
static inline size_t
ist_utf8_decode(const unsigned char *s, size_t n, uint32_t *cp)
{
    unsigned c = s[0];
    size_t need;
    uint32_t v, lo = 0x80, hi = 0xbf;

    if (c < 0x80) {
        *cp = c;
        return 1;
    }
    if (c >= 0xc2 && c <= 0xdf) {
        need = 1;
        v = c & 0x1f;
    } else if (c >= 0xe0 && c <= 0xef) {
        need = 2;
        v = c & 0x0f;
        if (c == 0xe0)
            lo = 0xa0;
        else if (c == 0xed)
            hi = 0x9f;
    } else if (c >= 0xf0 && c <= 0xf4) {
        need = 3;
        v = c & 0x07;
        if (c == 0xf0)
            lo = 0x90;
        else if (c == 0xf4)
            hi = 0x8f;
    } else {
        *cp = 1;
        return 0;
    }
    for (size_t i = 1; i <= need; i++) {
        unsigned b = i < n ? s[i] : 0;
        if (i >= n || b < lo || b > hi) {
            *cp = (uint32_t)i;
            return 0;
        }
        v = (v << 6) | (b & 0x3f);
        lo = 0x80;
        hi = 0xbf;
    }
    *cp = v;
    return need + 1;
}

/* Encode a scalar value; returns the number of bytes written (1..4) to out. */
static inline size_t
ist_utf8_encode(uint32_t cp, unsigned char *out)
{
    if (cp < 0x80) {
        out[0] = (unsigned char)cp;
        return 1;
    }
    if (cp < 0x800) {
        out[0] = (unsigned char)(0xc0 | (cp >> 6));
        out[1] = (unsigned char)(0x80 | (cp & 0x3f));
        return 2;
    }
    if (cp < 0x10000) {
        out[0] = (unsigned char)(0xe0 | (cp >> 12));
        out[1] = (unsigned char)(0x80 | ((cp >> 6) & 0x3f));
        out[2] = (unsigned char)(0x80 | (cp & 0x3f));
        return 3;
    }
    out[0] = (unsigned char)(0xf0 | (cp >> 18));
    out[1] = (unsigned char)(0x80 | ((cp >> 12) & 0x3f));
    out[2] = (unsigned char)(0x80 | ((cp >> 6) & 0x3f));
    out[3] = (unsigned char)(0x80 | (cp & 0x3f));
    return 4;
}

/* Every segment between two UAX #29 word boundaries, word-like or not:
 * fn(ctx, start, len, wordlike) with byte offsets into text. Return non-zero
 * from fn to stop. IST_ERR_INVALID on ill-formed UTF-8. */
typedef int (*ist_segment_fn)(void *ctx, size_t start, size_t len, bool wordlike);
ist_status ist_segment_all(const char *text, size_t len, ist_segment_fn fn, void *ctx,
                           ist_error *err);

/* The same without the ASCII fast paths: the rules alone, for tests. */
ist_status ist_segment_all_reference(const char *text, size_t len, ist_segment_fn fn, void *ctx,
                                     ist_error *err);

/* Copy word[0..len) to out with every decimal digit (Nd) written as '0';
 * out has room for len + 1 bytes. Returns the length written (NUL added). */
size_t ist_word_mask_digits(const char *word, size_t len, char *out);

/* Unicode version of the generated word-break table, e.g. "15.0.0". */
const char *ist_wordbreak_unicode_version(void);

#endif
