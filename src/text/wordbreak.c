/* wordbreak.c - word boundaries by the default rules of Unicode Standard
 * Annex #29 ("Unicode Text Segmentation", section 4.1, rules WB1-WB999).
 *
 * One pass over the text with the state the rules need: the raw previous
 * property (WB3-WB4), the two previous properties with Extend/Format/ZWJ
 * skipped (WB4's "X (Extend | Format | ZWJ)* -> X"), the length of the run of
 * Regional_Indicator before the position (WB15/16), and a look-ahead past the
 * next character for WB6, WB7b and WB12. Properties come from the table that
 * tools/dev/gen-wordbreak.py generates at build time. */
#include <isthmus/text.h>

#include <utf8proc.h>

#include "error_int.h"
#include "text_int.h"
#include "wordbreak_table.h"

#define NONE 0xffu   /* no character (start or end of text) */

typedef struct wb_state {
    unsigned raw;    /* property of the previous character, NONE at the start */
    unsigned p1;     /* previous character with WB4 applied */
    unsigned p0;     /* the one before p1 */
    size_t ri;       /* Regional_Indicator run ending at p1 */
} wb_state;

static inline bool
ahletter(unsigned p)
{
    return p == IST_WB_ALETTER || p == IST_WB_HEBREW_LETTER;
}

static inline bool
midnumletq(unsigned p)
{
    return p == IST_WB_MIDNUMLET || p == IST_WB_SINGLE_QUOTE;
}

static inline bool
ignorable(unsigned p)
{
    return p == IST_WB_EXTEND || p == IST_WB_FORMAT || p == IST_WB_ZWJ;
}

static inline bool
newline(unsigned p)
{
    return p == IST_WB_CR || p == IST_WB_LF || p == IST_WB_NEWLINE;
}

static inline unsigned
prop_at(const unsigned char *s, size_t n, size_t *adv, uint32_t *cp)
{
    if (s[0] < 0x80) {
        *cp = s[0];
        *adv = 1;
    } else {
        *adv = ist_utf8_decode(s, n, cp);
        if (*adv == 0)
            return NONE;
    }
    return ist_wb_prop(*cp);
}

/* Property of the first character after s[pos] that WB4 does not absorb. */
static unsigned
next_effective(const unsigned char *s, size_t len, size_t pos)
{
    while (pos < len) {
        size_t adv;
        uint32_t cp;
        unsigned p = prop_at(s + pos, len - pos, &adv, &cp);
        if (p == NONE)
            return NONE;
        p &= IST_WB_MASK;
        if (!ignorable(p))
            return p;
        pos += adv;
    }
    return NONE;
}

/* Is there a boundary before the character of property `prop` at s[pos]
 * (whose encoding is `adv` bytes long)? Not called for the first character. */
static bool
breaks_before(const wb_state *st, unsigned prop, const unsigned char *s, size_t len, size_t pos,
              size_t adv)
{
    unsigned c = prop & IST_WB_MASK, p1 = st->p1, p0 = st->p0;

    if (st->raw == IST_WB_CR && c == IST_WB_LF)
        return false;                                            /* WB3 */
    if (newline(st->raw) || newline(c))
        return true;                                             /* WB3a, WB3b */
    if (st->raw == IST_WB_ZWJ && (prop & IST_WB_EXTPICT))
        return false;                                            /* WB3c */
    if (st->raw == IST_WB_WSEGSPACE && c == IST_WB_WSEGSPACE)
        return false;                                            /* WB3d */
    if (ignorable(c))
        return false;                                            /* WB4 */
    if (ahletter(p1) && ahletter(c))
        return false;                                            /* WB5 */
    if (ahletter(p1) && (c == IST_WB_MIDLETTER || midnumletq(c))
        && ahletter(next_effective(s, len, pos + adv)))
        return false;                                            /* WB6 */
    if (ahletter(p0) && (p1 == IST_WB_MIDLETTER || midnumletq(p1)) && ahletter(c))
        return false;                                            /* WB7 */
    if (p1 == IST_WB_HEBREW_LETTER && c == IST_WB_SINGLE_QUOTE)
        return false;                                            /* WB7a */
    if (p1 == IST_WB_HEBREW_LETTER && c == IST_WB_DOUBLE_QUOTE
        && next_effective(s, len, pos + adv) == IST_WB_HEBREW_LETTER)
        return false;                                            /* WB7b */
    if (p0 == IST_WB_HEBREW_LETTER && p1 == IST_WB_DOUBLE_QUOTE && c == IST_WB_HEBREW_LETTER)
        return false;                                            /* WB7c */
    if ((p1 == IST_WB_NUMERIC || ahletter(p1)) && c == IST_WB_NUMERIC)
        return false;                                            /* WB8, WB9 */
    if (p1 == IST_WB_NUMERIC && ahletter(c))
        return false;                                            /* WB10 */
    if (p0 == IST_WB_NUMERIC && (p1 == IST_WB_MIDNUM || midnumletq(p1)) && c == IST_WB_NUMERIC)
        return false;                                            /* WB11 */
    if (p1 == IST_WB_NUMERIC && (c == IST_WB_MIDNUM || midnumletq(c))
        && next_effective(s, len, pos + adv) == IST_WB_NUMERIC)
        return false;                                            /* WB12 */
    if (p1 == IST_WB_KATAKANA && c == IST_WB_KATAKANA)
        return false;                                            /* WB13 */
    if ((ahletter(p1) || p1 == IST_WB_NUMERIC || p1 == IST_WB_KATAKANA
         || p1 == IST_WB_EXTENDNUMLET) && c == IST_WB_EXTENDNUMLET)
        return false;                                            /* WB13a */
    if (p1 == IST_WB_EXTENDNUMLET
        && (ahletter(c) || c == IST_WB_NUMERIC || c == IST_WB_KATAKANA))
        return false;                                            /* WB13b */
    if (p1 == IST_WB_REGIONAL_INDICATOR && c == IST_WB_REGIONAL_INDICATOR && (st->ri & 1))
        return false;                                            /* WB15, WB16 */
    return true;                                                 /* WB999 */
}

/* Does the character make its segment a word: a letter (ideographs and kana
 * included), a number, an Extended_Pictographic or a regional indicator. */
static inline bool
wordlike_char(uint32_t cp, unsigned prop)
{
    if (cp < 0x80)
        return (cp >= '0' && cp <= '9') || ((cp | 0x20) >= 'a' && (cp | 0x20) <= 'z');
    if (prop & IST_WB_EXTPICT || (prop & IST_WB_MASK) == IST_WB_REGIONAL_INDICATOR)
        return true;
    utf8proc_category_t cat = utf8proc_category((utf8proc_int32_t)cp);
    return (cat >= UTF8PROC_CATEGORY_LU && cat <= UTF8PROC_CATEGORY_LO)
           || (cat >= UTF8PROC_CATEGORY_ND && cat <= UTF8PROC_CATEGORY_NO);
}

static ist_status
segment(const char *text, size_t len, ist_segment_fn fn, void *ctx, bool fast, ist_error *err)
{
    const unsigned char *s = (const unsigned char *)text;
    wb_state st = {NONE, NONE, NONE, 0};
    size_t pos = 0, start = 0;
    bool word = false, prev_ascii = false;

    while (pos < len) {
        size_t adv;
        uint32_t cp;
        /* Fast path between two ASCII characters (never ignorable, never
         * Extended_Pictographic). A letter or digit after one never breaks
         * (WB5, WB8-WB10, and no earlier rule applies); before any other
         * character or after one without a rule (Other, WSegSpace, a line
         * end) the only rule left is WB3d; the rest takes the general path. */
        if (fast && s[pos] < 0x80 && prev_ascii) {
            unsigned a = ist_wb_prop(s[pos]);
            bool alnum = a == IST_WB_ALETTER || a == IST_WB_NUMERIC;
            bool plain = a == IST_WB_OTHER || a == IST_WB_WSEGSPACE;
            bool brk;
            if (alnum && (st.raw == IST_WB_ALETTER || st.raw == IST_WB_NUMERIC))
                brk = false;
            else if (plain)
                brk = !(st.raw == IST_WB_WSEGSPACE && a == IST_WB_WSEGSPACE);
            else if (alnum && (st.raw == IST_WB_OTHER || st.raw == IST_WB_WSEGSPACE
                               || newline(st.raw)))
                brk = true;
            else
                goto general;
            if (brk) {
                if (fn(ctx, start, pos - start, word))
                    return IST_OK;
                start = pos;
                word = false;
            }
            word = word || alnum;
            st.p0 = st.p1;
            st.p1 = st.raw = a;
            st.ri = 0;
            pos++;
            continue;
        }
general:;
        unsigned prop = prop_at(s + pos, len - pos, &adv, &cp);
        if (prop == NONE)
            return ist_error_at_offset(err, IST_ERR_INVALID, NULL, pos,
                                       "expected valid UTF-8 text, found byte 0x%02x", s[pos]);
        unsigned c = prop & IST_WB_MASK;
        if (pos > 0 && breaks_before(&st, prop, s, len, pos, adv)) {
            if (fn(ctx, start, pos - start, word))
                return IST_OK;
            start = pos;
            word = false;
        }
        word = word || wordlike_char(cp, prop);
        if (pos == 0 || !ignorable(c) || newline(st.raw)) {
            st.ri = c == IST_WB_REGIONAL_INDICATOR ? st.ri + 1 : 0;
            st.p0 = st.p1;
            st.p1 = c;
        }
        st.raw = c;
        prev_ascii = cp < 0x80;
        pos += adv;
    }
    if (len > 0)
        fn(ctx, start, len - start, word);
    return IST_OK;
}

ist_status
ist_segment_all(const char *text, size_t len, ist_segment_fn fn, void *ctx, ist_error *err)
{
    return segment(text, len, fn, ctx, true, err);
}

ist_status
ist_segment_all_reference(const char *text, size_t len, ist_segment_fn fn, void *ctx,
                          ist_error *err)
{
    return segment(text, len, fn, ctx, false, err);
}

/* The one tailoring of the word rules (UAX #29 section 4 allows tailorings):
 * letters, one hyphen, and a word that starts with a digit are one word, so a
 * model code such as "tw-4410" is not split into "tw" and "4410". The word
 * segments are held back until the next segments show whether they join. */
typedef struct word_ctx {
    const char *text;
    ist_word_fn fn;
    void *ctx;
    size_t held_start, held_len;   /* a word of letters only, not yet reported */
    bool held, hyphen;             /* ... and a hyphen segment seen right after it */
    bool stopped;
} word_ctx;

static bool
letters_only(const unsigned char *s, size_t n)
{
    for (size_t i = 0; i < n;) {
        uint32_t cp;
        size_t k = ist_utf8_decode(s + i, n - i, &cp);
        if (k == 0)
            return false;
        i += k;
        if (cp < 0x80) {
            if ((cp | 0x20) < 'a' || (cp | 0x20) > 'z')
                return false;
            continue;
        }
        utf8proc_category_t c = utf8proc_category((utf8proc_int32_t)cp);
        if (c < UTF8PROC_CATEGORY_LU || c > UTF8PROC_CATEGORY_LO)
            return false;
    }
    return n > 0;
}

static bool
is_hyphen(const unsigned char *s, size_t n)
{
    return (n == 1 && s[0] == '-') ||
           (n == 3 && s[0] == 0xe2 && s[1] == 0x80 && (s[2] == 0x90 || s[2] == 0x91));
}

static bool
starts_with_digit(const unsigned char *s, size_t n)
{
    uint32_t cp;
    if (n == 0 || ist_utf8_decode(s, n, &cp) == 0)
        return false;
    return cp < 0x80 ? cp >= '0' && cp <= '9'
                     : utf8proc_category((utf8proc_int32_t)cp) == UTF8PROC_CATEGORY_ND;
}

static int
emit(word_ctx *w, size_t start, size_t len)
{
    if (w->fn(w->ctx, w->text + start, len)) {
        w->stopped = true;
        return 1;
    }
    return 0;
}

/* Report the held word, if any. */
static int
flush_held(word_ctx *w)
{
    bool had = w->held;
    w->held = w->hyphen = false;
    return had ? emit(w, w->held_start, w->held_len) : 0;
}

static int
pass_words(void *ctx, size_t start, size_t len, bool wordlike)
{
    word_ctx *w = ctx;
    const unsigned char *s = (const unsigned char *)w->text + start;

    if (w->held && !w->hyphen && !wordlike && is_hyphen(s, len)) {
        w->hyphen = true;
        return 0;
    }
    if (w->held && w->hyphen && wordlike && starts_with_digit(s, len)) {
        size_t from = w->held_start;
        w->held = w->hyphen = false;
        return emit(w, from, start + len - from);
    }
    if (flush_held(w))
        return 1;
    if (!wordlike)
        return 0;
    if (letters_only(s, len)) {
        w->held = true;
        w->held_start = start;
        w->held_len = len;
        return 0;
    }
    return emit(w, start, len);
}

ist_status
ist_segment_words(const char *text, size_t len, ist_word_fn fn, void *ctx, ist_error *err)
{
    word_ctx w = {.text = text, .fn = fn, .ctx = ctx};
    ist_status rc = ist_segment_all(text, len, pass_words, &w, err);

    if (rc == IST_OK && !w.stopped)
        flush_held(&w);
    return rc;
}

const char *
ist_wordbreak_unicode_version(void)
{
    return ist_wb_unicode_version;
}
