/* wordshape.c - the shape of a word (plain word, number, code) and the
 * preparation policy for number-shaped words: keep, mask the digits, or leave
 * the word out (docs/text.md, "Word shapes"; the default is measured in
 * docs/defaults.md). */
#include <isthmus/text.h>

#include <string.h>

#include <utf8proc.h>

#include "alloc_int.h"
#include "error_int.h"
#include "text_int.h"

static bool
is_digit_cp(uint32_t cp)
{
    if (cp < 0x80)
        return cp >= '0' && cp <= '9';
    return utf8proc_category((utf8proc_int32_t)cp) == UTF8PROC_CATEGORY_ND;
}

static bool
is_letter_cp(uint32_t cp)
{
    if (cp < 0x80)
        return (cp | 0x20) >= 'a' && (cp | 0x20) <= 'z';
    utf8proc_category_t c = utf8proc_category((utf8proc_int32_t)cp);
    return c >= UTF8PROC_CATEGORY_LU && c <= UTF8PROC_CATEGORY_LO;
}

ist_word_shape
ist_word_shape_of(const char *word, size_t len)
{
    const unsigned char *s = (const unsigned char *)word;
    bool digit = false, letter = false;

    for (size_t i = 0; i < len;) {
        uint32_t cp;
        size_t k = ist_utf8_decode(s + i, len - i, &cp);
        if (k == 0) {
            i += cp;
            continue;
        }
        i += k;
        if (is_digit_cp(cp)) {
            if (letter)
                return IST_SHAPE_CODE;
            digit = true;
        } else if (is_letter_cp(cp)) {
            letter = true;
        }
    }
    return digit ? IST_SHAPE_NUMBER : IST_SHAPE_WORD;
}

const char *
ist_word_shape_name(ist_word_shape s)
{
    switch (s) {
    case IST_SHAPE_NUMBER: return "number";
    case IST_SHAPE_CODE: return "code";
    default: return "word";
    }
}

const char *
ist_numbers_policy_name(ist_numbers_policy p)
{
    switch (p) {
    case IST_NUMBERS_MASK: return "mask";
    case IST_NUMBERS_DROP: return "drop";
    default: return "keep";
    }
}

bool
ist_numbers_policy_parse(const char *s, ist_numbers_policy *out)
{
    static const ist_numbers_policy all[] = {IST_NUMBERS_KEEP, IST_NUMBERS_MASK,
                                             IST_NUMBERS_DROP};
    for (size_t i = 0; s && i < sizeof all / sizeof all[0]; i++)
        if (strcmp(s, ist_numbers_policy_name(all[i])) == 0) {
            *out = all[i];
            return true;
        }
    return false;
}

size_t
ist_word_mask_digits(const char *word, size_t len, char *out)
{
    const unsigned char *s = (const unsigned char *)word;
    size_t o = 0;

    for (size_t i = 0; i < len;) {
        uint32_t cp;
        size_t k = ist_utf8_decode(s + i, len - i, &cp);
        if (k == 0) {          /* not expected in segmenter output: copy the byte */
            out[o++] = (char)s[i++];
            continue;
        }
        if (is_digit_cp(cp))
            out[o++] = '0';
        else {
            memcpy(out + o, s + i, k);
            o += k;
        }
        i += k;
    }
    out[o] = '\0';
    return o;
}

typedef struct shaped {
    ist_numbers_policy policy;
    ist_word_fn fn;
    void *ctx;
    char small[128];
    char *big;
    size_t big_cap;
    bool nomem;
} shaped;

static int
shape_word(void *ctx, const char *w, size_t len)
{
    shaped *sh = ctx;

    if (sh->policy == IST_NUMBERS_KEEP || ist_word_shape_of(w, len) != IST_SHAPE_NUMBER)
        return sh->fn(sh->ctx, w, len);
    if (sh->policy == IST_NUMBERS_DROP)
        return 0;
    char *buf = sh->small;
    if (len + 1 > sizeof sh->small) {
        if (len + 1 > sh->big_cap) {
            char *nb = ist_realloc(sh->big, len + 1);
            if (!nb) {
                sh->nomem = true;
                return 1;
            }
            sh->big = nb;
            sh->big_cap = len + 1;
        }
        buf = sh->big;
    }
    size_t n = ist_word_mask_digits(w, len, buf);
    return sh->fn(sh->ctx, buf, n);
}

ist_status
ist_segment_words_opts(const char *text, size_t len, const ist_text_opts *o, ist_word_fn fn,
                       void *ctx, ist_error *err)
{
    ist_numbers_policy policy = o ? o->numbers : IST_NUMBERS_DEFAULT;
    if (policy == IST_NUMBERS_KEEP)
        return ist_segment_words(text, len, fn, ctx, err);
    shaped sh = {.policy = policy, .fn = fn, .ctx = ctx};
    ist_status rc = ist_segment_words(text, len, shape_word, &sh, err);
    ist_free(sh.big);
    if (rc == IST_OK && sh.nomem)
        rc = ist_error_nomem(err);
    return rc;
}
