/* pairs_norm.c - normalise pair-list words as the vocabulary of a vector file was. */
#include "pairs_int.h"

#include <string.h>

#include <utf8proc.h>

#include "alloc_int.h"
#include "error_int.h"

struct ist_pairs_norm {
    int unused;
};

ist_status
ist_pairs_norm_open(const ist_store *s, ist_pairs_norm **out, bool *exact, ist_error *err)
{
    (void)s;
    (void)err;
    /* no text options can be read yet: words are matched as they are */
    *out = NULL;
    *exact = true;
    return IST_OK;
}

ist_status
ist_pairs_norm_word(ist_pairs_norm *nz, const char *in, size_t len, const char **out,
                    size_t *out_len, ist_error *err)
{
    (void)nz;
    (void)err;
    *out = in;
    *out_len = len;
    return IST_OK;
}

void
ist_pairs_norm_close(ist_pairs_norm *nz)
{
    ist_free(nz);
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
