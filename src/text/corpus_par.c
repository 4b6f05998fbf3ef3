/* corpus_par.c - segmentation on several threads while a corpus is built (corpus.c).
 *
 * The reading thread cuts the text into chunks of whole lines; worker threads normalise and
 * segment each chunk into a list of words (each with its own normaliser); the reading thread
 * then takes the chunks back in order and does what depends on order: de-duplication,
 * counting and numbering (ist_corpus_on_word), the line ends. The ids, the counts and so the
 * prepared file are the same as on one thread. */

#include "corpus_build_int.h"

#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/cancel.h>

#include "alloc_int.h"
#include "corpus_int.h"
#include "error_int.h"
#include "hash_int.h"

#define PAR_CHUNK_BYTES ((size_t)1 << 20)
#define PAR_CHUNK_LINES 16384
#define PAR_MAX_WORKERS 64

typedef struct pline {
    uint64_t lineno, offset;       /* in the file, for messages */
    size_t text_off, text_len;     /* the raw line in the chunk's text */
    size_t words_off;              /* its words in the chunk's word list */
    uint32_t n_words;
    bool empty;                    /* normalised to nothing */
    uint64_t hash;                 /* of the normalised line, when de-duplicating */
} pline;

typedef struct chunk {
    char *text;
    size_t text_len, text_cap;
    pline *lines;
    size_t n_lines, lines_cap;
    unsigned char *words;          /* u32 length + bytes, word after word */
    size_t words_len, words_cap;
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
} pool;

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
    bool nomem;
} wctx;

static int
collect_word(void *ctx, const char *word, size_t len)
{
    wctx *x = ctx;
    chunk *ch = x->ch;
    uint32_t l = (uint32_t)len;
    if (!grow((void **)&ch->words, &ch->words_cap, ch->words_len + 4 + len, 1)) {
        x->nomem = true;
        return 1;
    }
    memcpy(ch->words + ch->words_len, &l, 4);
    memcpy(ch->words + ch->words_len + 4, word, len);
    ch->words_len += 4 + len;
    return 0;
}

/* Normalise and segment every line of the chunk (a worker thread). */
static void
chunk_segment(const pool *pl, ist_normalizer *nz, chunk *ch)
{
    uint64_t repl0 = ist_normalizer_replaced(nz);
    ch->words_len = 0;
    ch->rc = IST_OK;
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
        ln->words_off = ch->words_len;
        size_t before = ch->words_len;
        wctx x = {ch, false};
        rc = ist_segment_words_opts(norm, nlen, &pl->b->o->text, collect_word, &x, err);
        if (rc == IST_OK && x.nomem)
            rc = ist_error_nomem(err);
        if (rc != IST_OK) {
            ist_error_prefix(err, "%s:%llu", pl->path, (unsigned long long)ln->lineno);
            ch->rc = rc;
            ch->err_line = i;
            break;
        }
        uint32_t n = 0;
        for (size_t q = before; q < ch->words_len; n++) {
            uint32_t l;
            memcpy(&l, ch->words + q, 4);
            q += 4 + l;
        }
        ln->n_words = n;
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
        ist_free(pl->ring[i].words);
    }
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

/* In order: the chunk's lines through de-duplication, counting and numbering. */
static ist_status
chunk_merge(build *b, chunk *ch, ist_error *err)
{
    size_t upto = ch->rc == IST_OK ? ch->n_lines : ch->err_line;
    ist_status rc = IST_OK;

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
        const unsigned char *w = ch->words + ln->words_off;
        b->cb_rc = IST_OK;
        for (uint32_t k = 0; k < ln->n_words; k++) {
            uint32_t len;
            memcpy(&len, w, 4);
            if (ist_corpus_on_word(b, (const char *)w + 4, len) != 0)
                break;
            w += 4 + len;
        }
        rc = b->cb_rc;
        if (rc != IST_OK) {
            ist_error_prefix(err, "%s:%llu", b->pool->path, (unsigned long long)ln->lineno);
            break;
        }
        rc = ist_corpus_push_id(b, IST_CORPUS_EOL, err);
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
