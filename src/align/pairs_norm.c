/* pairs_norm.c - normalise pair-list words as the vocabulary of a vector file was. */
#include "pairs_int.h"

#include <string.h>

#include <utf8proc.h>

#include <isthmus/text.h>

#include "alloc_int.h"
#include "error_int.h"
#include "text_int.h"

struct ist_pairs_norm {
    ist_normalizer *nz;
    ist_numbers_policy numbers;   /* number-shaped words are masked as the corpus's were */
    char *masked;
    size_t masked_cap;
};

ist_status
ist_pairs_norm_open(const ist_store *s, ist_pairs_norm **out, bool *exact, ist_error *err)
{
    ist_text_opts o;
    ist_pairs_norm *p;
    ist_status rc;

    *out = NULL;
    *exact = true;
    ist_text_opts_init(&o);
    /* no text options in the provenance (e.g. a table from elsewhere): exact match */
    if (ist_text_opts_from_provenance(ist_store_provenance(s), &o, NULL) != IST_OK)
        return IST_OK;
    p = ist_calloc(1, sizeof *p);
    if (!p)
        return ist_error_nomem(err);
    rc = ist_normalizer_new(&o, &p->nz, err);
    if (rc != IST_OK) {
        ist_free(p);
        return rc;
    }
    p->numbers = o.numbers;
    *exact = false;
    *out = p;
    return IST_OK;
}

ist_status
ist_pairs_norm_word(ist_pairs_norm *p, const char *in, size_t len, const char **out,
                    size_t *out_len, ist_error *err)
{
    if (!p) {
        *out = in;
        *out_len = len;
        return IST_OK;
    }
    ist_status rc = ist_normalize(p->nz, in, len, out, out_len, err);
    if (rc != IST_OK || p->numbers != IST_NUMBERS_MASK ||
        ist_word_shape_of(*out, *out_len) != IST_SHAPE_NUMBER)
        return rc;
    if (*out_len + 1 > p->masked_cap) {
        char *nb = ist_realloc(p->masked, *out_len + 1);
        if (!nb)
            return ist_error_nomem(err);
        p->masked = nb;
        p->masked_cap = *out_len + 1;
    }
    *out_len = ist_word_mask_digits(*out, *out_len, p->masked);
    *out = p->masked;
    return IST_OK;
}

void
ist_pairs_norm_close(ist_pairs_norm *p)
{
    if (!p)
        return;
    ist_normalizer_free(p->nz);
    ist_free(p->masked);
    ist_free(p);
}

/* Marked: a letter and a digit (a model code such as tw-4410, a size such as
 * 500ml), or an upper-case letter (in a vocabulary that kept case). A bare
 * number (a price, an order number) is not marked: 17.99 in one market and 16,99
 * in the other are not translations. */
bool
ist_pairs_word_marked(const char *w)
{
    const utf8proc_uint8_t *p = (const utf8proc_uint8_t *)w;
    utf8proc_ssize_t len = (utf8proc_ssize_t)strlen(w);
    bool digit = false, letter = false;

    while (len > 0) {
        utf8proc_int32_t cp;
        utf8proc_ssize_t n = utf8proc_iterate(p, len, &cp);
        if (n <= 0)
            return false;
        utf8proc_category_t c = utf8proc_category(cp);
        if (c == UTF8PROC_CATEGORY_LU || c == UTF8PROC_CATEGORY_LT)
            return true;
        if (c == UTF8PROC_CATEGORY_ND)
            digit = true;
        else if (c >= UTF8PROC_CATEGORY_LL && c <= UTF8PROC_CATEGORY_LO)
            letter = true;
        p += n;
        len -= n;
    }
    return digit && letter;
}
