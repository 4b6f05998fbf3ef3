/* corpus_par.c - segmentation on several threads while a corpus is built (corpus.c).
 *
 * The reading thread cuts the text into chunks of whole lines; worker threads normalise and
 * segment each chunk (each with its own normaliser) and number its words in a table of the
 * chunk's own, so that the text of a word is hashed and compared on a worker, once a token.
 * The reading thread then takes the chunks back in order and does what depends on order:
 * de-duplication, the corpus-wide number of each of the chunk's words at its first kept
 * occurrence (one lookup a distinct word of the chunk, not a token), the id stream, the line
 * ends, and the counts, added once a chunk. Ids are given in first-seen order and the counts
 * are the same sums, so the ids, the counts and the prepared file are the same as on one
 * thread. */

#include "corpus_build_int.h"

#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "corpus_int.h"
#include "error_int.h"
#include "hash_int.h"
#include "wordtab_int.h"

#define PAR_CHUNK_BYTES ((size_t)1 << 20)
#define PAR_CHUNK_LINES 16384
#define PAR_MAX_WORKERS 64

typedef struct pline {
    uint64_t lineno, offset;       /* in the file, for messages */
    size_t text_off, text_len;     /* the raw line in the chunk's text */
    size_t ids_off;                /* its words in the chunk's id list */
    uint32_t n_ids;
    bool empty;                    /* normalised to nothing */
    uint64_t hash;                 /* of the normalised line, when de-duplicating */
} pline;

typedef struct chunk {
    char *text;
    size_t text_len, text_cap;
    pline *lines;
    size_t n_lines, lines_cap;
    ist_wordtab local;             /* the chunk's distinct words, numbered from 0 */
    bool local_ready;
    uint32_t *ids;                 /* the chunk's tokens as numbers of `local` */
    size_t ids_len, ids_cap;
    uint64_t replaced;
    ist_status rc;                 /* failure at line err_line (lines before it are fine) */
    size_t err_line;
    ist_error err;
    int state;                     /* 0 free, 1 waiting, 2 taken, 3 done */
} chunk;

typedef struct worker_arg {
    struct pool *pl;
    size_t k;
} worker_arg;

typedef struct pool {
    const build *b;
    const char *path;              /* of the file being read */
    pthread_mutex_t lock;
    pthread_cond_t work, done;
    chunk *ring;
    size_t n_ring, n_workers;
    uint64_t next_take, next_submit;
    bool quit;
    pthread_t th[PAR_MAX_WORKERS];
    ist_normalizer *nz[PAR_MAX_WORKERS];
    worker_arg args[PAR_MAX_WORKERS];
    size_t started;
    uint32_t *gid;                 /* merging: a chunk word's corpus id, or NO_ID */
    uint64_t *cnt;                 /* merging: its kept occurrences in the chunk */
    size_t map_cap;
} pool;

#define NO_ID UINT32_MAX

static bool
grow(void **p, size_t *cap, size_t need, size_t elem)
{
    if (need <= *cap)
        return true;
    size_t nc = *cap ? *cap : 64;
    while (nc < need)
        nc *= 2;
    void *np = ist_realloc(*p, nc * elem);
    if (!np)
        return false;
    *p = np;
    *cap = nc;
    return true;
}

typedef struct wctx {
    chunk *ch;
    ist_status rc;
    ist_error *err;
} wctx;

static int
collect_word(void *ctx, const char *word, size_t len)
{
    wctx *x = ctx;
    chunk *ch = x->ch;
    uint32_t l;

    if (len > IST_WORD_MAX_BYTES)
        return 0;   /* no vector file could hold it (vocab.h): not a word, as on one thread */
    if (!grow((void **)&ch->ids, &ch->ids_cap, ch->ids_len + 1, sizeof *ch->ids)) {
        x->rc = ist_error_nomem(x->err);
        return 1;
    }
    x->rc = ist_wordtab_add_n(&ch->local, word, len, 0, &l, x->err);
    if (x->rc != IST_OK)
        return 1;
    ch->ids[ch->ids_len++] = l;
    return 0;
}

/* Normalise and segment every line of the chunk (a worker thread). */
static void
chunk_segment(const pool *pl, ist_normalizer *nz, chunk *ch)
{
    uint64_t repl0 = ist_normalizer_replaced(nz);
    ch->ids_len = 0;
    ch->rc = IST_OK;
    if (ch->local_ready) {
        ist_wordtab_reset(&ch->local);
    } else if ((ch->rc = ist_wordtab_init(&ch->local, &ch->err)) == IST_OK) {
        ch->local_ready = true;
    } else {
        ch->err_line = 0;
        return;
    }
    for (size_t i = 0; i < ch->n_lines; i++) {
        pline *ln = &ch->lines[i];
        const char *norm;
        size_t nlen;
        ist_error *err = &ch->err;
        ist_status rc = ist_normalize(nz, ch->text + ln->text_off, ln->text_len, &norm, &nlen,
                                      err);
        if (rc != IST_OK) {
            if (rc == IST_ERR_FORMAT && err->has_offset) {
                uint64_t col = err->offset;
                char msg[IST_ERROR_MSG_CAP];
                snprintf(msg, sizeof msg, "%s", err->msg);
                ist_error_at(err, IST_ERR_FORMAT, pl->path, ln->lineno,
                             "%s (byte offset %llu in the line, %llu in the text)", msg,
                             (unsigned long long)col, (unsigned long long)(ln->offset + col));
                err->offset = ln->offset + col;
                err->has_offset = 1;
            }
            ch->rc = rc;
            ch->err_line = i;
            break;
        }
        ln->empty = nlen == 0;
        ln->hash = pl->b->o->dedup_lines && nlen > 0 ? ist_hash_bytes(norm, nlen) : 0;
        ln->ids_off = ch->ids_len;
        wctx x = {ch, IST_OK, err};
        rc = ist_segment_words_opts(norm, nlen, &pl->b->o->text, collect_word, &x, err);
        if (rc == IST_OK)
            rc = x.rc;
        if (rc != IST_OK) {
            ist_error_prefix(err, "%s:%llu", pl->path, (unsigned long long)ln->lineno);
            ch->rc = rc;
            ch->err_line = i;
            break;
        }
        ln->n_ids = (uint32_t)(ch->ids_len - ln->ids_off);
    }
    ch->replaced = ist_normalizer_replaced(nz) - repl0;
}

static void *
segment_worker(void *arg)
{
    pool *pl = ((worker_arg *)arg)->pl;
    ist_normalizer *nz = pl->nz[((worker_arg *)arg)->k];
    pthread_mutex_lock(&pl->lock);
    for (;;) {
        while (!pl->quit && pl->next_take == pl->next_submit)
            pthread_cond_wait(&pl->work, &pl->lock);
        if (pl->next_take == pl->next_submit && pl->quit)
            break;
        chunk *ch = &pl->ring[pl->next_take++ % pl->n_ring];
        ch->state = 2;
        pthread_mutex_unlock(&pl->lock);
        chunk_segment(pl, nz, ch);
        pthread_mutex_lock(&pl->lock);
        ch->state = 3;
        pthread_cond_broadcast(&pl->done);
    }
    pthread_mutex_unlock(&pl->lock);
    return NULL;
}

void
ist_corpus_pool_stop(pool *pl)
{
    if (!pl)
        return;
    pthread_mutex_lock(&pl->lock);
    pl->quit = true;
    pthread_cond_broadcast(&pl->work);
    pthread_mutex_unlock(&pl->lock);
    for (size_t k = 0; k < pl->started; k++)
        pthread_join(pl->th[k], NULL);
    for (size_t k = 0; k < pl->n_workers; k++)
        ist_normalizer_free(pl->nz[k]);
    for (size_t i = 0; pl->ring && i < pl->n_ring; i++) {
        ist_free(pl->ring[i].text);
        ist_free(pl->ring[i].lines);
        ist_free(pl->ring[i].ids);
        if (pl->ring[i].local_ready)
            ist_wordtab_free(&pl->ring[i].local);
    }
    ist_free(pl->gid);
    ist_free(pl->cnt);
    ist_free(pl->ring);
    pthread_mutex_destroy(&pl->lock);
    pthread_cond_destroy(&pl->work);
    pthread_cond_destroy(&pl->done);
    ist_free(pl);
}

ist_status
ist_corpus_pool_start(build *b, size_t workers, pool **out, ist_error *err)
{
    pool *pl = ist_calloc(1, sizeof *pl);
    ist_status rc = IST_OK;

    *out = NULL;
    if (!pl)
        return ist_error_nomem(err);
    pthread_mutex_init(&pl->lock, NULL);
    pthread_cond_init(&pl->work, NULL);
    pthread_cond_init(&pl->done, NULL);
    pl->b = b;
    pl->n_workers = workers > PAR_MAX_WORKERS ? PAR_MAX_WORKERS : workers;
    pl->n_ring = 2 * pl->n_workers + 2;
    pl->ring = ist_calloc(pl->n_ring, sizeof *pl->ring);
    if (!pl->ring)
        rc = ist_error_nomem(err);
    for (size_t k = 0; k < pl->n_workers && rc == IST_OK; k++)
        rc = ist_normalizer_new(&b->o->text, &pl->nz[k], err);
    for (size_t k = 0; k < pl->n_workers && rc == IST_OK; k++) {
        pl->args[k].pl = pl;
        pl->args[k].k = k;
        if (pthread_create(&pl->th[k], NULL, segment_worker, &pl->args[k]) != 0)
            rc = ist_error_sys(err, IST_ERR_NOMEM, NULL, "cannot start segmenting thread %zu",
                               k + 1);
        else
            pl->started++;
    }
    if (rc != IST_OK) {
        ist_corpus_pool_stop(pl);
        return rc;
    }
    *out = pl;
    return IST_OK;
}

/* The corpus id of the chunk's word l, given at its first kept occurrence. */
static ist_status
merge_word(build *b, pool *pl, const chunk *ch, uint32_t l, ist_error *err)
{
    if (pl->gid[l] != NO_ID)
        return IST_OK;
    return ist_wordtab_add_n(&b->words, ist_wordtab_word(&ch->local, l),
                             ist_wordtab_len(&ch->local, l), 0, &pl->gid[l], err);
}

/* In order: the chunk's lines through de-duplication, numbering and counting. */
static ist_status
chunk_merge(build *b, chunk *ch, ist_error *err)
{
    pool *pl = b->pool;
    size_t upto = ch->rc == IST_OK ? ch->n_lines : ch->err_line;
    size_t n_local = ch->local_ready ? ch->local.n : 0;
    ist_status rc = IST_OK;

    if (n_local > pl->map_cap) {
        size_t nc = pl->map_cap ? pl->map_cap : 4096;
        while (nc < n_local)
            nc *= 2;
        uint32_t *g = ist_realloc(pl->gid, nc * sizeof *g);
        if (g)
            pl->gid = g;
        uint64_t *c = ist_realloc(pl->cnt, nc * sizeof *c);
        if (c)
            pl->cnt = c;
        if (!g || !c)
            return ist_error_nomem(err);
        pl->map_cap = nc;
    }
    for (size_t l = 0; l < n_local; l++) {
        pl->gid[l] = NO_ID;
        pl->cnt[l] = 0;
    }
    b->replaced_par += ch->replaced;
    for (size_t i = 0; i < upto && rc == IST_OK; i++) {
        const pline *ln = &ch->lines[i];
        b->c->st.lines++;
        if (b->o->dedup_lines && !ln->empty) {
            bool fresh;
            rc = ist_corpus_seen_add(&b->seen, ln->hash, &fresh, err);
            if (rc != IST_OK)
                break;
            if (!fresh) {
                b->c->st.lines_dropped_dup++;
                continue;
            }
        }
        const uint32_t *ids = ch->ids + ln->ids_off;
        for (uint32_t k = 0; k < ln->n_ids && rc == IST_OK; k++) {
            uint32_t l = ids[k];
            rc = merge_word(b, pl, ch, l, err);
            if (rc == IST_OK)
                rc = ist_corpus_push_id(b, pl->gid[l], err);
            pl->cnt[l]++;
        }
        if (rc != IST_OK) {
            ist_error_prefix(err, "%s:%llu", pl->path, (unsigned long long)ln->lineno);
            break;
        }
        b->c->st.tokens_in += ln->n_ids;
        rc = ist_corpus_push_id(b, IST_CORPUS_EOL, err);
    }
    for (size_t l = 0; l < n_local && rc == IST_OK; l++) {
        if (pl->cnt[l] > 0) {
            uint32_t id;
            rc = ist_wordtab_add_n(&b->words, ist_wordtab_word(&ch->local, l),
                                   ist_wordtab_len(&ch->local, l), pl->cnt[l], &id, err);
        }
    }
    if (rc == IST_OK && ch->rc != IST_OK) {
        if (err)
            *err = ch->err;
        rc = ch->rc;
    }
    return rc;
}

/* Read one file through the pool: fill chunks, hand them out, take them back in order. */
ist_status
ist_corpus_read_parallel(build *b, ist_reader *r, crc_follow *cf, const char *path, ist_error *err)
{
    pool *pl = b->pool;
    uint64_t next_merge = pl->next_submit;
    bool eof = false;
    ist_status rc = IST_OK;

    pl->path = path;
    for (;;) {
        while (rc == IST_OK && !eof && pl->next_submit - next_merge < pl->n_ring) {
            chunk *ch = &pl->ring[pl->next_submit % pl->n_ring];
            ch->text_len = ch->n_lines = 0;
            while (ch->text_len < PAR_CHUNK_BYTES && ch->n_lines < PAR_CHUNK_LINES) {
                char *line;
                size_t len;
                rc = ist_reader_next(r, &line, &len, &eof, err);
                if (rc != IST_OK || eof)
                    break;
                if (!grow((void **)&ch->text, &ch->text_cap, ch->text_len + len + 1, 1) ||
                    !grow((void **)&ch->lines, &ch->lines_cap, ch->n_lines + 1,
                          sizeof *ch->lines)) {
                    rc = ist_error_nomem(err);
                    break;
                }
                pline *ln = &ch->lines[ch->n_lines++];
                memset(ln, 0, sizeof *ln);
                ln->lineno = ist_reader_lineno(r);
                ln->offset = ist_reader_offset(r);
                ln->text_off = ch->text_len;
                ln->text_len = len;
                memcpy(ch->text + ch->text_len, line, len);
                ch->text_len += len;
                ch->text[ch->text_len++] = '\0';
            }
            if (rc == IST_OK && ist_cancel_requested())
                rc = ist_error_set(err, IST_ERR_CANCELLED, "preparation cancelled");
            if (rc == IST_OK)
                rc = ist_corpus_crc_advance(cf, ist_reader_raw_pos(r) + CRC_CHUNK, path, err);
            if (rc == IST_OK && b->o->progress)
                b->o->progress(b->o->progress_ctx, b->bytes_before + ist_reader_raw_pos(r),
                               b->bytes_total);
            if (rc != IST_OK || ch->n_lines == 0)
                break;
            pthread_mutex_lock(&pl->lock);
            ch->state = 1;
            pl->next_submit++;
            pthread_cond_signal(&pl->work);
            pthread_mutex_unlock(&pl->lock);
        }
        if (next_merge == pl->next_submit)
            break;
        chunk *ch = &pl->ring[next_merge % pl->n_ring];
        pthread_mutex_lock(&pl->lock);
        while (ch->state != 3)
            pthread_cond_wait(&pl->done, &pl->lock);
        pthread_mutex_unlock(&pl->lock);
        if (rc == IST_OK)          /* after a failure, the chunks in flight are only drained */
            rc = chunk_merge(b, ch, err);
        ch->state = 0;
        next_merge++;
    }
    return rc;
}
