/* text.c - UTF-8 policy, NFKC (UAX #15), case folding, mark stripping and
 * digit masking through utf8proc; the options as provenance JSON.
 *
 * Lines that are pure ASCII skip utf8proc: NFKC leaves ASCII unchanged, full
 * case folding of ASCII is tolower, and ASCII has no combining marks. */
#include <isthmus/text.h>

#include <stdio.h>
#include <string.h>

#include <utf8proc.h>

#include "alloc_int.h"
#include "error_int.h"
#include "json_int.h"
#include "text_int.h"

struct ist_normalizer {
    ist_text_opts o;
    utf8proc_option_t flags;     /* 0: no utf8proc pass at all */
    uint64_t replaced;
    unsigned char *clean;        /* input with ill-formed parts replaced */
    size_t clean_cap;
    utf8proc_int32_t *cps;       /* utf8proc's decomposition */
    size_t cps_cap;
    unsigned char *out;          /* the result, NUL-terminated */
    size_t out_cap;
};

void
ist_text_opts_init(ist_text_opts *o)
{
    memset(o, 0, sizeof *o);
    o->nfkc = true;
    o->casefold = true;
    o->numbers = IST_NUMBERS_DEFAULT;
}

const char *
ist_text_unicode_version(void)
{
    return utf8proc_unicode_version();
}

ist_status
ist_normalizer_new(const ist_text_opts *o, ist_normalizer **out, ist_error *err)
{
    ist_normalizer *nz;

    *out = NULL;
    if (!o)
        return ist_error_set(err, IST_ERR_INVALID, "expected text options, found NULL");
    nz = ist_calloc(1, sizeof *nz);
    if (!nz)
        return ist_error_nomem(err);
    nz->o = *o;
    if (o->nfkc || o->strip_marks)
        nz->flags |= UTF8PROC_COMPOSE | UTF8PROC_STABLE;
    if (o->nfkc)
        nz->flags |= UTF8PROC_COMPAT;
    if (o->strip_marks)
        nz->flags |= UTF8PROC_STRIPMARK;
    if (o->casefold)
        nz->flags |= UTF8PROC_CASEFOLD;
    *out = nz;
    return IST_OK;
}

void
ist_normalizer_free(ist_normalizer *nz)
{
    if (!nz)
        return;
    ist_free(nz->clean);
    ist_free(nz->cps);
    ist_free(nz->out);
    ist_free(nz);
}

uint64_t
ist_normalizer_replaced(const ist_normalizer *nz)
{
    return nz->replaced;
}

static bool
reserve(void **buf, size_t *cap, size_t need, size_t elem)
{
    if (need <= *cap)
        return true;
    size_t nc = *cap ? *cap : 256, bytes;
    while (nc < need)
        nc *= 2;
    if (ist_mul_size(nc, elem, &bytes) != 0)
        return false;
    void *p = ist_realloc(*buf, bytes);
    if (!p)
        return false;
    *buf = p;
    *cap = nc;
    return true;
}

static bool
is_ascii(const unsigned char *s, size_t n)
{
    size_t i = 0;
    uint64_t acc = 0;

    for (; i + 8 <= n; i += 8) {
        uint64_t w;
        memcpy(&w, s + i, 8);
        acc |= w;
    }
    for (; i < n; i++)
        acc |= s[i];
    return (acc & 0x8080808080808080ull) == 0;
}

/* ASCII in, ASCII out: lower case and '0' for digits as the options say. */
static void
ascii_pass(const ist_text_opts *o, const unsigned char *in, size_t n, unsigned char *out)
{
    /* branch-free so that the compiler can vectorise the loop */
    const unsigned fold = o->casefold ? 0x20u : 0u, mask = o->mask_digits ? 0xffu : 0u;

    if (!fold && !mask) {
        memcpy(out, in, n);
        return;
    }
    for (size_t i = 0; i < n; i++) {
        unsigned c = in[i];
        unsigned upper = (unsigned char)(c - 'A') < 26u;
        unsigned digit = (unsigned char)(c - '0') < 10u;
        c |= upper * fold;
        c -= (digit * mask) & (c - '0');
        out[i] = (unsigned char)c;
    }
}

/* Copy in to nz->clean with each maximal ill-formed subpart replaced by
 * U+FFFD, or fail at the first one when strict. *src points at the clean
 * text (in itself when nothing was wrong). */
static ist_status
sanitize(ist_normalizer *nz, const unsigned char *in, size_t n, const unsigned char **src,
         size_t *src_len, ist_error *err)
{
    size_t i = 0, o = 0;
    uint32_t cp;

    while (i < n) {
        size_t k = ist_utf8_decode(in + i, n - i, &cp);
        if (k == 0)
            break;
        i += k;
    }
    if (i == n) {
        *src = in;
        *src_len = n;
        return IST_OK;
    }
    if (nz->o.strict_utf8) {
        char found[20];
        size_t used = 0;
        ist_utf8_decode(in + i, n - i, &cp);      /* cp = length of the bad part */
        for (size_t k = i; k < n && k <= i + cp && k < i + 4; k++)
            used += (size_t)snprintf(found + used, sizeof found - used, "%s%02x",
                                     used ? " " : "", in[k]);
        return ist_error_at_offset(err, IST_ERR_FORMAT, NULL, i,
                                   "invalid UTF-8: expected a well-formed sequence, found "
                                   "bytes %s", found);
    }
    if (!reserve((void **)&nz->clean, &nz->clean_cap, 3 * n + 1, 1))
        return ist_error_nomem(err);
    memcpy(nz->clean, in, i);
    o = i;
    while (i < n) {
        size_t k = ist_utf8_decode(in + i, n - i, &cp);
        if (k == 0) {
            o += ist_utf8_encode(0xfffd, nz->clean + o);
            nz->replaced++;
            i += cp;
        } else {
            memcpy(nz->clean + o, in + i, k);
            o += k;
            i += k;
        }
    }
    *src = nz->clean;
    *src_len = o;
    return IST_OK;
}

/* utf8proc decomposition (with case folding / compatibility / mark stripping
 * as flagged), then canonical composition, into nz->cps. */
static ist_status
unicode_pass(ist_normalizer *nz, const unsigned char *s, size_t n, size_t *n_cps,
             ist_error *err)
{
    utf8proc_ssize_t got;

    if (!reserve((void **)&nz->cps, &nz->cps_cap, n + 16, sizeof *nz->cps))
        return ist_error_nomem(err);
    for (;;) {
        got = utf8proc_decompose(s, (utf8proc_ssize_t)n, nz->cps, (utf8proc_ssize_t)nz->cps_cap,
                                 nz->flags);
        if (got < 0)
            return ist_error_set(err, IST_ERR_INTERNAL, "utf8proc_decompose: %s",
                                 utf8proc_errmsg(got));
        if ((size_t)got <= nz->cps_cap)
            break;
        if (!reserve((void **)&nz->cps, &nz->cps_cap, (size_t)got, sizeof *nz->cps))
            return ist_error_nomem(err);
    }
    if (nz->flags & UTF8PROC_COMPOSE) {
        got = utf8proc_normalize_utf32(nz->cps, got, nz->flags);
        if (got < 0)
            return ist_error_set(err, IST_ERR_INTERNAL, "utf8proc_normalize_utf32: %s",
                                 utf8proc_errmsg(got));
    }
    *n_cps = (size_t)got;
    return IST_OK;
}

/* Append the code points to nz->out (at *out_len, which is advanced), masking
 * decimal digits (general category Nd) when asked. */
static ist_status
encode_out(ist_normalizer *nz, size_t n_cps, size_t *out_len, ist_error *err)
{
    size_t o = *out_len;

    if (!reserve((void **)&nz->out, &nz->out_cap, o + 4 * n_cps + 1, 1))
        return ist_error_nomem(err);
    for (size_t i = 0; i < n_cps; i++) {
        uint32_t cp = (uint32_t)nz->cps[i];
        if (nz->o.mask_digits && cp >= '0'
            && (cp <= '9' || (cp >= 0x80 && utf8proc_category((utf8proc_int32_t)cp)
                                                == UTF8PROC_CATEGORY_ND)))
            cp = '0';
        o += ist_utf8_encode(cp, nz->out + o);
    }
    nz->out[o] = '\0';
    *out_len = o;
    return IST_OK;
}

/* Normalise valid UTF-8 that holds non-ASCII bytes. ASCII characters are
 * starters that nothing composes onto, so normalisation, case folding and
 * mark stripping act independently on the pieces between them: each run of
 * non-ASCII characters goes through utf8proc together with the one ASCII
 * character before it (a base that a combining mark may compose with); the
 * other ASCII characters take the ASCII pass. */
static ist_status
mixed_pass(ist_normalizer *nz, const unsigned char *s, size_t n, size_t *out_len,
           ist_error *err)
{
    size_t i = 0, o = 0, n_cps = 0;
    ist_status rc;

    if (!reserve((void **)&nz->out, &nz->out_cap, n + 1, 1))
        return ist_error_nomem(err);
    while (i < n) {
        size_t j = i;
        while (j < n && s[j] < 0x80)
            j++;
        if (j == n) {
            if (!reserve((void **)&nz->out, &nz->out_cap, o + (n - i) + 1, 1))
                return ist_error_nomem(err);
            ascii_pass(&nz->o, s + i, n - i, nz->out + o);
            o += n - i;
            break;
        }
        size_t base = j > i ? j - 1 : j, k = j;
        while (k < n && s[k] >= 0x80)
            k++;
        if (!reserve((void **)&nz->out, &nz->out_cap, o + (base - i) + 1, 1))
            return ist_error_nomem(err);
        ascii_pass(&nz->o, s + i, base - i, nz->out + o);
        o += base - i;
        rc = unicode_pass(nz, s + base, k - base, &n_cps, err);
        if (rc != IST_OK)
            return rc;
        rc = encode_out(nz, n_cps, &o, err);
        if (rc != IST_OK)
            return rc;
        i = k;
    }
    nz->out[o] = '\0';
    *out_len = o;
    return IST_OK;
}

ist_status
ist_normalize(ist_normalizer *nz, const char *in, size_t len, const char **out, size_t *out_len,
              ist_error *err)
{
    const unsigned char *s = (const unsigned char *)in, *src = NULL;
    size_t src_len = 0;
    ist_status rc;

    *out = NULL;
    *out_len = 0;
    if (len == 0) {
        if (!reserve((void **)&nz->out, &nz->out_cap, 1, 1))
            return ist_error_nomem(err);
        nz->out[0] = '\0';
        *out = (const char *)nz->out;
        return IST_OK;
    }
    if (is_ascii(s, len)) {
        if (!reserve((void **)&nz->out, &nz->out_cap, len + 1, 1))
            return ist_error_nomem(err);
        ascii_pass(&nz->o, s, len, nz->out);
        nz->out[len] = '\0';
        *out = (const char *)nz->out;
        *out_len = len;
        return IST_OK;
    }
    rc = sanitize(nz, s, len, &src, &src_len, err);
    if (rc != IST_OK)
        return rc;
    if (nz->flags == 0 && !nz->o.mask_digits) {
        if (!reserve((void **)&nz->out, &nz->out_cap, src_len + 1, 1))
            return ist_error_nomem(err);
        memcpy(nz->out, src, src_len);
        nz->out[src_len] = '\0';
        *out_len = src_len;
    } else {
        /* with flags 0 (digit masking alone) utf8proc only decodes */
        rc = mixed_pass(nz, src, src_len, out_len, err);
        if (rc != IST_OK)
            return rc;
    }
    *out = (const char *)nz->out;
    return IST_OK;
}

/* ---- provenance ---------------------------------------------------------- */

ist_status
ist_text_opts_to_json(const ist_text_opts *o, char **json, ist_error *err)
{
    ist_jw w;

    *json = NULL;
    ist_jw_init(&w, false);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_bool(&w, "nfkc", o->nfkc);
    ist_jw_bool(&w, "casefold", o->casefold);
    ist_jw_bool(&w, "strip_marks", o->strip_marks);
    ist_jw_bool(&w, "mask_digits", o->mask_digits);
    ist_jw_bool(&w, "strict_utf8", o->strict_utf8);
    ist_jw_str(&w, "numbers", ist_numbers_policy_name(o->numbers));
    ist_jw_str(&w, "unicode", utf8proc_unicode_version());
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, json, err);
}

static bool
looks_like_opts(const ist_jv *v)
{
    return ist_jv_type(v) == IST_JOBJ && ist_jv_type(ist_jv_get(v, "nfkc")) == IST_JBOOL
           && ist_jv_type(ist_jv_get(v, "casefold")) == IST_JBOOL;
}

static const ist_jv *
find_opts(const ist_jv *root)
{
    if (looks_like_opts(root))
        return root;
    if (looks_like_opts(ist_jv_get(root, "text")))
        return ist_jv_get(root, "text");
    for (size_t i = 0; i < ist_jv_len(root) && ist_jv_type(root) == IST_JOBJ; i++) {
        const ist_jv *t = ist_jv_get(ist_jv_at(root, i), "text");
        if (looks_like_opts(t))
            return t;
    }
    return NULL;
}

ist_status
ist_text_opts_from_provenance(const char *provenance_json, ist_text_opts *o, ist_error *err)
{
    ist_jv *root = NULL;
    const ist_jv *t;
    ist_status rc;

    if (!provenance_json)
        return ist_error_set(err, IST_ERR_FORMAT, "no provenance, expected text options in it");
    rc = ist_json_parse(provenance_json, strlen(provenance_json), NULL, &root, err);
    if (rc == IST_ERR_NOMEM)
        return rc;
    if (rc != IST_OK) {
        ist_error_prefix(err, "provenance");
        if (err)
            err->code = IST_ERR_FORMAT;
        return IST_ERR_FORMAT;
    }
    t = find_opts(root);
    if (!t) {
        ist_jv_free(root);
        return ist_error_set(err, IST_ERR_FORMAT,
                             "provenance holds no text options, expected a \"text\" object");
    }
    /* files written before the policy existed kept every number */
    const char *numbers = ist_jv_str(ist_jv_get(t, "numbers"), "keep");
    ist_numbers_policy policy;
    if (!ist_numbers_policy_parse(numbers, &policy)) {
        rc = ist_error_set(err, IST_ERR_FORMAT,
                           "provenance: expected \"numbers\" to be keep, mask or drop, "
                           "found '%.40s'", numbers);
        ist_jv_free(root);
        return rc;
    }
    o->nfkc = ist_jv_bool(ist_jv_get(t, "nfkc"), true);
    o->casefold = ist_jv_bool(ist_jv_get(t, "casefold"), true);
    o->strip_marks = ist_jv_bool(ist_jv_get(t, "strip_marks"), false);
    o->mask_digits = ist_jv_bool(ist_jv_get(t, "mask_digits"), false);
    o->strict_utf8 = ist_jv_bool(ist_jv_get(t, "strict_utf8"), false);
    o->numbers = policy;
    ist_jv_free(root);
    return IST_OK;
}

void
ist_text_free(void *p)
{
    ist_free(p);
}
