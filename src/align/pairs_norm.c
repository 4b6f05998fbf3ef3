/* pairs_norm.c - normalise pair-list words as the vocabulary of a vector file was. */
#include "pairs_int.h"

#include <string.h>

#include <utf8proc.h>

#include <isthmus/text.h>

#include "alloc_int.h"
#include "error_int.h"

struct ist_pairs_norm {
    ist_normalizer *nz;
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
    return ist_normalize(p->nz, in, len, out, out_len, err);
}

void
ist_pairs_norm_close(ist_pairs_norm *p)
{
    if (!p)
        return;
    ist_normalizer_free(p->nz);
    ist_free(p);
}

bool
ist_pairs_word_marked(const char *w)
{
    const utf8proc_uint8_t *p = (const utf8proc_uint8_t *)w;
    utf8proc_ssize_t len = (utf8proc_ssize_t)strlen(w);

    while (len > 0) {
        utf8proc_int32_t cp;
        utf8proc_ssize_t n = utf8proc_iterate(p, len, &cp);
        if (n <= 0)
            return false;
        if ((cp >= '0' && cp <= '9') || utf8proc_category(cp) == UTF8PROC_CATEGORY_ND ||
            utf8proc_isupper(cp))
            return true;
        p += n;
        len -= n;
    }
    return false;
}
