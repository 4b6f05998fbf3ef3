/* propose_filter.c - the review filters shared by propose, lookup and the
 * diagnostics: number shapes and codes, a stop list of very frequent words
 * (by share of the counted tokens), a minimum score. */
#include <isthmus/propose.h>

#include <math.h>
#include <string.h>

#include <isthmus/text.h>

#include "error_int.h"

void
ist_word_filter_init(ist_word_filter *f)
{
    memset(f, 0, sizeof *f);
    f->numbers = false;
    f->min_score = IST_PROPOSE_MIN_SCORE_DEFAULT;
    f->stop_share = IST_PROPOSE_STOP_SHARE_DEFAULT;
    f->variants = true;
}

/* One edit apart, as ist_word_filter.variants says: a (la bytes) is the rare word. */
static bool
one_edit(const char *a, size_t la, const char *b, size_t lb)
{
    size_t i = 0;
    if (la < 4 || (la > lb ? la - lb : lb - la) > 1)
        return false;
    while (i < la && i < lb && a[i] == b[i])
        i++;
    if (la == lb) {
        if (i == la)
            return false;                               /* the same word */
        if (i + 1 < la && a[i] == b[i + 1] && a[i + 1] == b[i] &&
            memcmp(a + i + 2, b + i + 2, la - i - 2) == 0)
            return true;                                /* two neighbours swapped */
        return memcmp(a + i + 1, b + i + 1, la - i - 1) == 0;   /* one byte changed */
    }
    if (la > lb)   /* a byte added to b */
        return memcmp(a + i + 1, b + i, lb - i) == 0;
    return memcmp(a + i, b + i + 1, la - i) == 0;   /* a byte removed */
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
