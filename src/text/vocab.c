/* vocab.c - word <-> id table with counts; strings in one growing pool. */
#include <isthmus/vocab.h>

#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "hash_int.h"
#include "vocab_int.h"

/* ---- the index ------------------------------------------------------- */

ist_status
ist_index_init(ist_index *ix, size_t expect, ist_error *err)
{
    size_t cap = 64;

    while (cap < expect * 2)
        cap *= 2;
    memset(ix, 0, sizeof *ix);
    ix->slots = ist_calloc(cap, sizeof *ix->slots);
    ix->tags = ist_calloc(cap, sizeof *ix->tags);
    if (!ix->slots || !ix->tags) {
        ist_index_free(ix);
        return ist_error_nomem(err);
    }
    ix->cap = cap;
    return IST_OK;
}

void
ist_index_free(ist_index *ix)
{
    ist_free(ix->slots);
    ist_free(ix->tags);
    memset(ix, 0, sizeof *ix);
}

ptrdiff_t
ist_index_find(const ist_index *ix, const char *w, size_t len, ist_index_word_fn fn,
               const void *ctx)
{
    uint64_t h = ist_hash_bytes(w, len);
    uint32_t tag = (uint32_t)(h >> 32);
    size_t mask = ix->cap - 1;

    for (size_t i = (size_t)h & mask;; i = (i + 1) & mask) {
        uint32_t s = ix->slots[i];
        if (s == 0)
            return -1;
        if (ix->tags[i] == tag) {
            size_t l;
            const char *cand = fn(ctx, s - 1, &l);
            if (l == len && memcmp(cand, w, len) == 0)
                return (ptrdiff_t)(s - 1);
        }
    }
}

static ist_status
grow(ist_index *ix, ist_index_word_fn fn, const void *ctx, ist_error *err)
{
    ist_index bigger;
    ist_status rc = ist_index_init(&bigger, ix->cap, err);

    if (rc != IST_OK)
        return rc;
    for (size_t i = 0; i < ix->cap; i++) {
        if (!ix->slots[i])
            continue;
        size_t l;
        const char *w = fn(ctx, ix->slots[i] - 1, &l);
        uint64_t h = ist_hash_bytes(w, l);
        size_t j = (size_t)h & (bigger.cap - 1);
        while (bigger.slots[j])
            j = (j + 1) & (bigger.cap - 1);
        bigger.slots[j] = ix->slots[i];
        bigger.tags[j] = ix->tags[i];
    }
    bigger.used = ix->used;
    ist_index_free(ix);
    *ix = bigger;
    return IST_OK;
}

ist_status
ist_index_insert(ist_index *ix, const char *w, size_t len, uint32_t id, ist_index_word_fn fn,
                 const void *ctx, ist_error *err)
{
    if ((ix->used + 1) * 2 > ix->cap) {
        ist_status rc = grow(ix, fn, ctx, err);
        if (rc != IST_OK)
            return rc;
    }
    uint64_t h = ist_hash_bytes(w, len);
    size_t mask = ix->cap - 1, i = (size_t)h & mask;
    while (ix->slots[i])
        i = (i + 1) & mask;
    ix->slots[i] = id + 1;
    ix->tags[i] = (uint32_t)(h >> 32);
    ix->used++;
    return IST_OK;
}

/* ---- the table ------------------------------------------------------- */

typedef struct entry {
    uint64_t off;      /* into pool */
    uint32_t len;
    uint64_t count;
} entry;

struct ist_vocab {
    entry *e;
    size_t n, cap;
    char *pool;
    size_t pool_used, pool_cap;
    uint64_t total;
    ist_index ix;
};

static const char *
word_of(const void *ctx, uint32_t id, size_t *len)
{
    const ist_vocab *v = ctx;
    *len = v->e[id].len;
    return v->pool + v->e[id].off;
}

ist_status
ist_vocab_new(ist_vocab **out, ist_error *err)
{
    ist_vocab *v;
    ist_status rc;

    *out = NULL;
    v = ist_calloc(1, sizeof *v);
    if (!v)
        return ist_error_nomem(err);
    rc = ist_index_init(&v->ix, 1024, err);
    if (rc != IST_OK) {
        ist_free(v);
        return rc;
    }
    *out = v;
    return IST_OK;
}

void
ist_vocab_free(ist_vocab *v)
{
    if (!v)
        return;
    ist_index_free(&v->ix);
    ist_free(v->e);
    ist_free(v->pool);
    ist_free(v);
}

size_t
ist_vocab_size(const ist_vocab *v)
{
    return v->n;
}

ist_status
ist_vocab_add(ist_vocab *v, const char *word, size_t len, uint64_t count, uint32_t *id,
              ist_error *err)
{
    ptrdiff_t found = ist_index_find(&v->ix, word, len, word_of, v);
    ist_status rc;

    if (found >= 0) {
        v->e[found].count += count;
        v->total += count;
        if (id)
            *id = (uint32_t)found;
        return IST_OK;
    }
    if (v->n >= UINT32_MAX - 1 || len > UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "vocabulary is full");
    if (v->n == v->cap) {
        size_t nc = v->cap ? v->cap * 2 : 1024;
        entry *ne = ist_realloc(v->e, nc * sizeof *ne);
        if (!ne)
            return ist_error_nomem(err);
        v->e = ne;
        v->cap = nc;
    }
    if (v->pool_used + len + 1 > v->pool_cap) {
        size_t nc = v->pool_cap ? v->pool_cap : 1 << 16;
        while (nc < v->pool_used + len + 1)
            nc *= 2;
        char *np = ist_realloc(v->pool, nc);
        if (!np)
            return ist_error_nomem(err);
        v->pool = np;
        v->pool_cap = nc;
    }
    memcpy(v->pool + v->pool_used, word, len);
    v->pool[v->pool_used + len] = '\0';
    v->e[v->n].off = v->pool_used;
    v->e[v->n].len = (uint32_t)len;
    v->e[v->n].count = count;
    v->pool_used += len + 1;
    rc = ist_index_insert(&v->ix, word, len, (uint32_t)v->n, word_of, v, err);
    if (rc != IST_OK) {
        v->pool_used -= len + 1;
        return rc;
    }
    v->total += count;
    if (id)
        *id = (uint32_t)v->n;
    v->n++;
    return IST_OK;
}

ptrdiff_t
ist_vocab_find(const ist_vocab *v, const char *word, size_t len)
{
    return ist_index_find(&v->ix, word, len, word_of, v);
}

const char *
ist_vocab_word(const ist_vocab *v, uint32_t id)
{
    return v->pool + v->e[id].off;
}

size_t
ist_vocab_word_len(const ist_vocab *v, uint32_t id)
{
    return v->e[id].len;
}

uint64_t
ist_vocab_count(const ist_vocab *v, uint32_t id)
{
    return v->e[id].count;
}

uint64_t
ist_vocab_total(const ist_vocab *v)
{
    return v->total;
}

typedef struct sort_item {
    uint64_t count;
    uint32_t old;
    const char *w;
    uint32_t len;
} sort_item;

static int
cmp_item(const void *a, const void *b)
{
    const sort_item *x = a, *y = b;
    if (x->count != y->count)
        return x->count > y->count ? -1 : 1;
    size_t l = x->len < y->len ? x->len : y->len;
    int c = memcmp(x->w, y->w, l);
    if (c)
        return c;
    return x->len < y->len ? -1 : x->len > y->len;
}

ist_status
ist_vocab_sort_prune(ist_vocab *v, uint64_t min_count, size_t max_size, uint32_t *remap,
                     ist_error *err)
{
    sort_item *items = NULL;
    entry *ne = NULL;
    char *np = NULL;
    ist_index nix;
    size_t keep = 0, pool = 0;
    ist_status rc;

    items = ist_malloc((v->n ? v->n : 1) * sizeof *items);
    if (!items)
        return ist_error_nomem(err);
    for (size_t i = 0; i < v->n; i++) {
        items[i].count = v->e[i].count;
        items[i].old = (uint32_t)i;
        items[i].w = v->pool + v->e[i].off;
        items[i].len = v->e[i].len;
    }
    qsort(items, v->n, sizeof *items, cmp_item);
    while (keep < v->n && items[keep].count >= min_count && (max_size == 0 || keep < max_size)) {
        pool += items[keep].len + 1;
        keep++;
    }
    ne = ist_malloc((keep ? keep : 1) * sizeof *ne);
    np = ist_malloc(pool ? pool : 1);
    if (!ne || !np) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    rc = ist_index_init(&nix, keep, err);
    if (rc != IST_OK)
        goto fail;
    if (remap)
        for (size_t i = 0; i < v->n; i++)
            remap[i] = UINT32_MAX;
    pool = 0;
    uint64_t total = 0;
    for (size_t i = 0; i < keep; i++) {
        memcpy(np + pool, items[i].w, items[i].len + 1);
        ne[i].off = pool;
        ne[i].len = items[i].len;
        ne[i].count = items[i].count;
        total += items[i].count;
        if (remap)
            remap[items[i].old] = (uint32_t)i;
        pool += items[i].len + 1;
    }
    ist_free(items);
    ist_free(v->e);
    ist_free(v->pool);
    ist_index_free(&v->ix);
    v->e = ne;
    v->n = keep;
    v->cap = keep ? keep : 1;
    v->pool = np;
    v->pool_used = pool;
    v->pool_cap = pool ? pool : 1;
    v->total = total;
    v->ix = nix;
    /* index filled after the swap, since it reads words through v */
    for (size_t i = 0; i < keep; i++) {
        size_t slot = (size_t)ist_hash_bytes(v->pool + v->e[i].off, v->e[i].len) & (v->ix.cap - 1);
        while (v->ix.slots[slot])
            slot = (slot + 1) & (v->ix.cap - 1);
        v->ix.slots[slot] = (uint32_t)i + 1;
        v->ix.tags[slot] =
            (uint32_t)(ist_hash_bytes(v->pool + v->e[i].off, v->e[i].len) >> 32);
        v->ix.used++;
    }
    return IST_OK;
fail:
    ist_free(items);
    ist_free(ne);
    ist_free(np);
    return rc;
}
