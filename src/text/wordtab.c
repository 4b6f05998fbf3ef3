/* wordtab.c - the counting table of corpus building (see wordtab_int.h). */
#include "wordtab_int.h"

#include "alloc_int.h"
#include "error_int.h"

static inline uint64_t
mix(uint64_t h)
{
    h ^= h >> 33;
    h *= 0xff51afd7ed558ccdull;
    h ^= h >> 33;
    return h;
}

/* Eight bytes at a time; the tail is read with (overlapping) fixed-size loads,
 * never a variable-length copy, which would stall on store forwarding. The
 * length is mixed in, so overlapping reads of different lengths differ. */
static inline uint64_t
fast_hash(const char *p, size_t n)
{
    uint64_t h = (uint64_t)n * 0x9e3779b97f4a7c15ull, w;
    const unsigned char *u = (const unsigned char *)p;

    for (; n >= 8; u += 8, n -= 8) {
        memcpy(&w, u, 8);
        h = (h ^ w) * 0xc4ceb9fe1a85ec53ull;
        h ^= h >> 29;
    }
    if (n >= 4) {
        uint32_t a, b;
        memcpy(&a, u, 4);
        memcpy(&b, u + n - 4, 4);
        w = (uint64_t)a | (uint64_t)b << 32;
    } else if (n > 0) {
        w = (uint64_t)u[0] | (uint64_t)u[n / 2] << 8 | (uint64_t)u[n - 1] << 16;
    } else {
        w = 0;
    }
    h = (h ^ w) * 0xc4ceb9fe1a85ec53ull;
    return mix(h);
}

ist_status
ist_wordtab_init(ist_wordtab *t, ist_error *err)
{
    memset(t, 0, sizeof *t);
    t->cap = 1u << 14;
    t->slot = ist_calloc(t->cap, sizeof *t->slot);
    if (!t->slot)
        return ist_error_nomem(err);
    return IST_OK;
}

void
ist_wordtab_free(ist_wordtab *t)
{
    ist_free(t->slot);
    ist_free(t->off);
    ist_free(t->pool);
    memset(t, 0, sizeof *t);
}

static ist_status
grow_slots(ist_wordtab *t, ist_error *err)
{
    size_t nc = t->cap * 2, mask = nc - 1;
    ist_wslot *ns = ist_calloc(nc, sizeof *ns);

    if (!ns)
        return ist_error_nomem(err);
    for (size_t i = 0; i < t->cap; i++) {
        if (!t->slot[i].id_plus1)
            continue;
        uint32_t id = t->slot[i].id_plus1 - 1;
        size_t j = (size_t)fast_hash(t->pool + t->off[id], t->slot[i].len) & mask;
        while (ns[j].id_plus1)
            j = (j + 1) & mask;
        ns[j] = t->slot[i];
    }
    ist_free(t->slot);
    t->slot = ns;
    t->cap = nc;
    return IST_OK;
}

static ist_status
store_word(ist_wordtab *t, const char *w, size_t len, ist_error *err)
{
    if (t->n == t->meta_cap) {
        size_t nc = t->meta_cap ? 2 * t->meta_cap : 4096;
        uint64_t *o = ist_realloc(t->off, nc * sizeof *o);
        if (!o)
            return ist_error_nomem(err);
        t->off = o;
        t->meta_cap = nc;
    }
    if (t->pool_used + len + 1 > t->pool_cap) {
        size_t nc = t->pool_cap ? t->pool_cap : (size_t)1 << 16;
        while (nc < t->pool_used + len + 1)
            nc *= 2;
        char *np = ist_realloc(t->pool, nc);
        if (!np)
            return ist_error_nomem(err);
        t->pool = np;
        t->pool_cap = nc;
    }
    memcpy(t->pool + t->pool_used, w, len);
    t->pool[t->pool_used + len] = '\0';
    t->off[t->n] = t->pool_used;
    t->pool_used += len + 1;
    return IST_OK;
}

ist_status
ist_wordtab_add(ist_wordtab *t, const char *w, size_t len, uint32_t *id, ist_error *err)
{
    return ist_wordtab_add_n(t, w, len, 1, id, err);
}

void
ist_wordtab_reset(ist_wordtab *t)
{
    memset(t->slot, 0, t->cap * sizeof *t->slot);
    t->n = 0;
    t->pool_used = 0;
}

ist_status
ist_wordtab_add_n(ist_wordtab *t, const char *w, size_t len, uint64_t n, uint32_t *id,
                  ist_error *err)
{
    uint64_t h = fast_hash(w, len);
    uint32_t tag = (uint32_t)(h >> 32);
    size_t mask = t->cap - 1, i = (size_t)h & mask;
    ist_status rc;

    for (;; i = (i + 1) & mask) {
        ist_wslot *s = &t->slot[i];
        if (!s->id_plus1)
            break;
        if (s->tag != tag || s->len != len)
            continue;
        const char *cand = len <= IST_WORDTAB_INLINE ? s->w : t->pool + t->off[s->id_plus1 - 1];
        if (memcmp(cand, w, len) == 0) {
            *id = s->id_plus1 - 1;
            s->count += n;
            return IST_OK;
        }
    }
    if (t->n >= UINT32_MAX - 2 || len > UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "too many distinct words, expected fewer "
                                                   "than 2^32 - 2");
    rc = store_word(t, w, len, err);
    if (rc != IST_OK)
        return rc;
    ist_wslot *s = &t->slot[i];
    s->count = n;
    s->tag = tag;
    s->id_plus1 = (uint32_t)t->n + 1;
    s->len = (uint32_t)len;
    if (len <= IST_WORDTAB_INLINE)
        memcpy(s->w, w, len);
    *id = (uint32_t)t->n++;
    if ((t->n + 1) * 2 > t->cap)
        return grow_slots(t, err);
    return IST_OK;
}

void
ist_wordtab_counts(const ist_wordtab *t, uint64_t *out)
{
    for (size_t i = 0; i < t->cap; i++)
        if (t->slot[i].id_plus1)
            out[t->slot[i].id_plus1 - 1] = t->slot[i].count;
}
