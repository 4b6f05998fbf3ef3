/* propose_filter.c - the review filters shared by propose, lookup and the
 * diagnostics: number shapes and codes, a stop list of very frequent words
 * (by share of the counted tokens), a minimum score. */
#include <isthmus/propose.h>

#include <math.h>
#include <string.h>

#include <isthmus/text.h>

#include "error_int.h"
#include "text_int.h"

void
ist_word_filter_init(ist_word_filter *f)
{
    memset(f, 0, sizeof *f);
    f->numbers = false;
    f->min_score = IST_PROPOSE_MIN_SCORE_DEFAULT;
    f->stop_share = IST_PROPOSE_STOP_SHARE_DEFAULT;
    f->variants = true;
}

/* The code points of the UTF-8 word w (n bytes) into cp[0..cap); an ill-formed sequence
 * counts as one unit. Returns their number, or cap + 1 when the word has more. */
static size_t
code_points(const char *w, size_t n, uint32_t *cp, size_t cap)
{
    size_t k = 0;
    for (size_t i = 0; i < n; k++) {
        if (k == cap)
            return cap + 1;
        size_t len = ist_utf8_decode((const unsigned char *)w + i, n - i, &cp[k]);
        if (len == 0) {            /* cp[k] holds the length of the ill-formed unit */
            len = cp[k];
            cp[k] = 0xfffd;
        }
        i += len;
    }
    return k;
}

#define EDIT_MAX_CHARS 64   /* longer words are not compared */

/* One edit apart, as ist_word_filter.variants says: a (la bytes) is the rare word. The
 * edit is one character, not one byte, so a swap with an accented letter (áfcil, fácil)
 * or its loss (fcil) counts as one. */
static bool
one_edit(const char *a, size_t la, const char *b, size_t lb)
{
    uint32_t x[EDIT_MAX_CHARS], y[EDIT_MAX_CHARS];
    if (la < 4)
        return false;
    size_t nx = code_points(a, la, x, EDIT_MAX_CHARS), ny = code_points(b, lb, y,
                                                                         EDIT_MAX_CHARS);
    if (nx > EDIT_MAX_CHARS || ny > EDIT_MAX_CHARS || (nx > ny ? nx - ny : ny - nx) > 1)
        return false;
    size_t i = 0;
    while (i < nx && i < ny && x[i] == y[i])
        i++;
    if (nx == ny) {
        if (i == nx)
            return false;                               /* the same word */
        if (i + 1 < nx && x[i] == y[i + 1] && x[i + 1] == y[i] &&
            memcmp(x + i + 2, y + i + 2, (nx - i - 2) * sizeof *x) == 0)
            return true;                                /* two neighbours swapped */
        return memcmp(x + i + 1, y + i + 1, (nx - i - 1) * sizeof *x) == 0;  /* one changed */
    }
    if (nx > ny)   /* a character added to b */
        return memcmp(x + i + 1, y + i, (ny - i) * sizeof *x) == 0;
    return memcmp(x + i, y + i + 1, (nx - i) * sizeof *x) == 0;   /* a character removed */
}

/* Is row r a likely misspelling of a more frequent row? Rows are in frequency order,
 * so the candidates are a prefix. */
static bool
is_variant(const ist_store *s, size_t r, size_t prefix_end)
{
    uint64_t c = ist_store_count(s, r);
    const char *w = ist_store_word(s, r);
    size_t lw = strlen(w);
    if (c == 0 || lw < 4)
        return false;
    for (size_t j = 0; j < prefix_end && j < r; j++) {
        uint64_t cj = ist_store_count(s, j);
        if (cj / IST_FILTER_VARIANT_RATIO < c)
            break;
        const char *v = ist_store_word(s, j);
        if (one_edit(w, lw, v, strlen(v)))
            return true;
    }
    return false;
}

ist_status
ist_word_filter_mark(const ist_word_filter *f, const ist_store *s, unsigned char *flags,
                     unsigned shift, size_t n[3], ist_error *err)
{
    size_t rows = ist_store_rows(s), cnt[3] = {0, 0, 0};
    uint64_t total = 0;

    if (isnan(f->stop_share) || isnan(f->min_score))
        return ist_error_set(err, IST_ERR_INVALID,
                             "word filter: expected a stop-list share and a minimum score, "
                             "found NaN");
    for (size_t r = 0; r < rows; r++)
        total += ist_store_count(s, r);
    bool use_stop = total > 0 && f->stop_share > 0 && f->stop_share < 1;
    double limit = use_stop ? f->stop_share * (double)total : INFINITY;
    size_t vrows = rows < IST_FILTER_VARIANT_ROWS ? rows : IST_FILTER_VARIANT_ROWS;
    for (size_t r = 0; r < rows; r++) {
        const char *w = ist_store_word(s, r);
        unsigned bit = 0;
        if (use_stop && (double)ist_store_count(s, r) > limit)
            bit = IST_FILTER_STOP;
        else if (!f->numbers && ist_word_shape_of(w, strlen(w)) != IST_SHAPE_WORD)
            bit = IST_FILTER_SHAPE;
        else if (f->variants && total > 0 && r < vrows && is_variant(s, r, vrows))
            bit = IST_FILTER_VARIANT;
        if (bit) {
            cnt[bit == IST_FILTER_STOP ? 0 : bit == IST_FILTER_SHAPE ? 1 : 2]++;
            flags[r] |= (unsigned char)(bit << shift);
        }
    }
    if (n)
        memcpy(n, cnt, sizeof cnt);
    return IST_OK;
}
