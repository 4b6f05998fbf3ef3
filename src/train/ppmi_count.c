/* ppmi_count.c - the windowed co-occurrence counts of a token stream in bounded memory:
 * per-thread open-addressing tables, flushed by a radix sort into sorted lists of distinct
 * pairs and merged (docs/methods.md, "PPMI vectors"). */
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "ppmi_int.h"
#include "train_part_int.h"

#define EMPTY_KEY UINT64_MAX
#define PROGRESS_EVERY 65536     /* stream positions between updates of the shared counter */

/* ---- sorted pair lists ------------------------------------------------------------------- */

void
ist_ppmi_radix_sort(uint64_t *key, uint64_t *val, uint64_t *tk, uint64_t *tv, size_t n,
                    uint64_t max_key)
{
    int bits = 0;
    while (bits < 64 && (max_key >> bits) != 0)
        bits++;
    size_t cnt[2048];
    for (int shift = 0; shift < bits; shift += 11) {
        memset(cnt, 0, sizeof cnt);
        for (size_t i = 0; i < n; i++)
            cnt[(key[i] >> shift) & 2047]++;
        size_t sum = 0;
        for (size_t b = 0; b < 2048; b++) {
            size_t c = cnt[b];
            cnt[b] = sum;
            sum += c;
        }
        for (size_t i = 0; i < n; i++) {
            size_t p = cnt[(key[i] >> shift) & 2047]++;
            tk[p] = key[i];
            tv[p] = val[i];
        }
        memcpy(key, tk, n * sizeof *key);
        memcpy(val, tv, n * sizeof *val);
    }
}

/* Merge the sorted distinct list (bk, bv, bn) into the sorted distinct list *ak, *av, *an,
 * summing the values of equal keys. The first list grows in place and is merged from its
 * end, so no second copy of it is needed. */
ist_status
ist_ppmi_merge(uint64_t **ak, uint64_t **av, size_t *an, size_t *acap, const uint64_t *bk,
               const uint64_t *bv, size_t bn, ist_error *err)
{
    size_t need = *an + bn;
    if (need > *acap) {
        size_t cap = *acap ? *acap : 1024;
        while (cap < need)
            cap = cap + cap / 2 + 1024;
        uint64_t *k = ist_realloc(*ak, cap * sizeof *k);
        if (!k)
            return ist_error_nomem(err);
        *ak = k;
        uint64_t *v = ist_realloc(*av, cap * sizeof *v);
        if (!v)
            return ist_error_nomem(err);
        *av = v;
        *acap = cap;
    }
    uint64_t *k = *ak, *v = *av;
    size_t i = *an, j = bn, w = need;
    while (j > 0) {
        if (i > 0 && k[i - 1] > bk[j - 1]) {
            w--, i--;
            k[w] = k[i], v[w] = v[i];
        } else if (i > 0 && k[i - 1] == bk[j - 1]) {
            w--, i--, j--;
            k[w] = k[i], v[w] = v[i] + bv[j];
        } else {
            w--, j--;
            k[w] = bk[j], v[w] = bv[j];
        }
    }
    /* the rest of the first list is already in place when w == i */
    if (w > i) {
        memmove(k + i, k + w, (need - w) * sizeof *k);
        memmove(v + i, v + w, (need - w) * sizeof *v);
    }
    *an = i + (need - w);
    return IST_OK;
}

/* ---- counting ---------------------------------------------------------------------------- */

typedef struct count_shared {
    const uint32_t *ids;
    size_t n_ids;
    uint64_t vocab;
    size_t window;
    bool linear;
    atomic_int stop;
    atomic_ullong done;             /* stream positions done, all threads */
} count_shared;

typedef struct counter {
    count_shared *sh;
    size_t begin, end;
    uint64_t *hk, *hv;              /* open-addressing table, EMPTY_KEY = free */
    size_t hcap, hused, hlimit;
    int hbits;
    uint64_t *tk, *tv;              /* sort scratch */
    uint64_t *ak, *av;              /* sorted distinct pairs so far */
    size_t an, acap;
    ist_status rc;
    ist_error err;
    pthread_t thread;
    bool started;
    atomic_int finished;
} counter;

static ist_status
counter_flush(counter *c)
{
    size_t n = 0;
    for (size_t i = 0; i < c->hcap; i++)
        if (c->hk[i] != EMPTY_KEY) {
            c->tk[n] = c->hk[i];
            c->tv[n] = c->hv[i];
            n++;
        }
    /* sort the gathered entries, using the table as scratch */
    memcpy(c->hk, c->tk, n * sizeof *c->hk);
    memcpy(c->hv, c->tv, n * sizeof *c->hv);
    ist_ppmi_radix_sort(c->hk, c->hv, c->tk, c->tv, n, c->sh->vocab * c->sh->vocab);
    ist_status rc = ist_ppmi_merge(&c->ak, &c->av, &c->an, &c->acap, c->hk, c->hv, n, &c->err);
    for (size_t i = 0; i < c->hcap; i++)
        c->hk[i] = EMPTY_KEY;
    c->hused = 0;
    return rc;
}

static inline ist_status
counter_add(counter *c, uint64_t key, uint64_t w)
{
    size_t mask = c->hcap - 1;
    size_t h = (size_t)((key * 0x9e3779b97f4a7c15u) >> (64 - c->hbits));
    for (;;) {
        if (c->hk[h] == key) {
            c->hv[h] += w;
            return IST_OK;
        }
        if (c->hk[h] == EMPTY_KEY)
            break;
        h = (h + 1) & mask;
    }
    c->hk[h] = key;
    c->hv[h] = w;
    if (++c->hused >= c->hlimit)
        return counter_flush(c);
    return IST_OK;
}

static void *
counter_main(void *arg)
{
    counter *c = arg;
    const count_shared *sh = c->sh;
    const uint32_t *ids = sh->ids;
    size_t W = sh->window, since = 0;
    ist_status rc = IST_OK;

    for (size_t t = c->begin; t < c->end && rc == IST_OK; t++) {
        if (++since == PROGRESS_EVERY) {
            atomic_fetch_add(&c->sh->done, since);
            since = 0;
            if (atomic_load(&c->sh->stop))
                break;
        }
        uint32_t a = ids[t];
        if (a == IST_CORPUS_EOL)
            continue;
        for (size_t d = 1; d <= W && t + d < sh->n_ids && rc == IST_OK; d++) {
            uint32_t b = ids[t + d];
            if (b == IST_CORPUS_EOL)
                break;
            uint64_t w = sh->linear ? (uint64_t)(W - d + 1) : 1;
            uint64_t lo = a < b ? a : b, hi = a < b ? b : a;
            rc = counter_add(c, lo * sh->vocab + hi, a == b ? 2 * w : w);
        }
    }
    if (rc == IST_OK && !atomic_load(&c->sh->stop))
        rc = counter_flush(c);
    atomic_fetch_add(&c->sh->done, since);
    c->rc = rc;
    atomic_store(&c->finished, 1);
    return NULL;
}

static void
counter_free(counter *c)
{
    ist_free(c->hk), ist_free(c->hv), ist_free(c->tk), ist_free(c->tv);
    ist_free(c->ak), ist_free(c->av);
}


/* Count the co-occurrences of the stream into the sorted distinct list of half pairs
 * (lo <= hi, key lo * vocab + hi). */
ist_status
ist_ppmi_count_pairs(const uint32_t *ids, size_t n_ids, size_t vocab, const ist_ppmi_opts *o,
                     ist_ppmi_watch *wt, uint64_t **keys, uint64_t **vals, size_t *n_pairs,
                     size_t *peak, ist_error *err)
{
    size_t T = o->threads;
    count_shared sh;
    counter *cs = ist_calloc(T, sizeof *cs);
    ist_status rc = IST_OK;

    if (!cs)
        return ist_error_nomem(err);
    memset(&sh, 0, sizeof sh);
    sh.ids = ids;
    sh.n_ids = n_ids;
    sh.vocab = vocab;
    sh.window = o->window;
    sh.linear = o->weighting == IST_PPMI_LINEAR;
    atomic_init(&sh.stop, 0);
    atomic_init(&sh.done, 0);
    /* each thread's table: a power of two of 16-byte cells within its share of the buffer,
     * flushed at 70% load; the scratch arrays take as much again */
    size_t share = o->buffer_mb * ((size_t)1 << 20) / T / 2, cap = 1024;
    int bits = 10;
    while (cap * 2 * 16 <= share && bits < 40)
        cap *= 2, bits++;
    for (size_t t = 0; t < T && rc == IST_OK; t++) {
        counter *c = &cs[t];
        c->sh = &sh;
        c->begin = ist_train_part_start(ids, n_ids, t, T, true);
        c->end = ist_train_part_start(ids, n_ids, t + 1, T, true);
        c->hcap = cap;
        c->hbits = bits;
        c->hlimit = cap / 10 * 7;
        atomic_init(&c->finished, 0);
        c->hk = ist_malloc(cap * sizeof *c->hk);
        c->hv = ist_malloc(cap * sizeof *c->hv);
        c->tk = ist_malloc(cap * sizeof *c->tk);
        c->tv = ist_malloc(cap * sizeof *c->tv);
        if (!c->hk || !c->hv || !c->tk || !c->tv)
            rc = ist_error_nomem(err);
        else
            for (size_t i = 0; i < cap; i++)
                c->hk[i] = EMPTY_KEY;
    }
    for (size_t t = 0; t < T && rc == IST_OK; t++) {
        if (pthread_create(&cs[t].thread, NULL, counter_main, &cs[t]) != 0)
            rc = ist_error_sys(err, IST_ERR_NOMEM, NULL, "cannot start counting thread %zu",
                               t + 1);
        else
            cs[t].started = true;
    }
    if (rc != IST_OK)
        atomic_store(&sh.stop, 1);
    bool cancelled = false;
    for (;;) {
        size_t running = 0;
        for (size_t t = 0; t < T; t++)
            running += cs[t].started && !atomic_load(&cs[t].finished);
        if (running == 0)
            break;
        ist_ppmi_sleep_short();
        if (!cancelled && ist_ppmi_watch_tick(wt, (double)atomic_load(&sh.done) / (double)n_ids, 0)) {
            cancelled = true;
            atomic_store(&sh.stop, 1);
        }
    }
    for (size_t t = 0; t < T; t++)
        if (cs[t].started)
            pthread_join(cs[t].thread, NULL);
    if (rc == IST_OK && cancelled)
        rc = ist_error_set(err, IST_ERR_CANCELLED, "training cancelled");
    for (size_t t = 0; t < T && rc == IST_OK; t++)
        if (cs[t].rc != IST_OK) {
            rc = cs[t].rc;
            if (err)
                *err = cs[t].err;
        }
    size_t mem = 0;
    for (size_t t = 0; t < T; t++)
        mem += 4 * cs[t].hcap * sizeof(uint64_t) + 2 * cs[t].acap * sizeof(uint64_t);
    if (mem > *peak)
        *peak = mem;
    /* merge the threads' lists into the first, in thread order */
    for (size_t t = 0; t < T; t++) {
        ist_free(cs[t].hk), ist_free(cs[t].hv), ist_free(cs[t].tk), ist_free(cs[t].tv);
        cs[t].hk = cs[t].hv = cs[t].tk = cs[t].tv = NULL;
    }
    for (size_t t = 1; t < T && rc == IST_OK; t++)
        rc = ist_ppmi_merge(&cs[0].ak, &cs[0].av, &cs[0].an, &cs[0].acap, cs[t].ak, cs[t].av,
                            cs[t].an, err);
    if (rc == IST_OK) {
        *keys = cs[0].ak;
        *vals = cs[0].av;
        *n_pairs = cs[0].an;
        cs[0].ak = cs[0].av = NULL;
    }
    for (size_t t = 0; t < T; t++)
        counter_free(&cs[t]);
    ist_free(cs);
    return rc;
}

