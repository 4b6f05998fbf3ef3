/* corpus_build_int.h - the state of building a prepared corpus, shared by corpus.c (reading,
 * counting, numbering, pruning) and corpus_par.c (segmenting on several threads). */
#ifndef ISTHMUS_CORPUS_BUILD_INT_H
#define ISTHMUS_CORPUS_BUILD_INT_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>

#include <zlib.h>

#include <isthmus/corpus.h>
#include <isthmus/text.h>

#include "json_int.h"
#include "reader_int.h"
#include "wordtab_int.h"

/* Set of line hashes for de-duplication. */
typedef struct hashset {
    uint64_t *slot;     /* 0 = empty; a hash of 0 is stored as 1 */
    size_t cap, used;
} hashset;

typedef struct build {
    const ist_corpus_opts *o;
    ist_corpus *c;
    ist_normalizer *nz;
    hashset seen;
    ist_wordtab words;
    ist_jw sources;
    uint64_t bytes_total, bytes_before;   /* on disk, for progress */
    ist_status cb_rc;                     /* failure inside the word callback */
    ist_error *err;
    uint64_t replaced_par;                /* invalid UTF-8 replaced by the segmenting threads */
    struct pool *pool;                    /* segmenting threads, or NULL: all on this thread */
    uint32_t *spill_buf;                  /* spilling: ids not yet written */
    size_t spill_used;
    uint64_t spill_eols;
} build;

/* CRC-32 and size of the file as stored (what provenance records), read by a
 * second handle that follows the line reader a little ahead, so both read the
 * same pages while they are in the page cache: a file larger than memory is
 * read from disk once. */
typedef struct crc_follow {
    FILE *f;
    unsigned char *buf;
    uLong crc;
    uint64_t done;
} crc_follow;

#define CRC_CHUNK ((size_t)1 << 20)

/* corpus.c */
/* Insert h; *fresh tells whether it was new. */
ist_status ist_corpus_seen_add(hashset *hs, uint64_t h, bool *fresh, ist_error *err);
/* Append an id to the stream (or the spill buffer). */
ist_status ist_corpus_push_id(build *b, uint32_t id, ist_error *err);
/* Word callback (ctx: the build): count and number one word; non-zero stops, b->cb_rc says why. */
int ist_corpus_on_word(void *ctx, const char *word, size_t len);
/* Read the file's stored bytes up to raw offset upto into the CRC. */
ist_status ist_corpus_crc_advance(crc_follow *cf, uint64_t upto, const char *path, ist_error *err);

/* corpus_par.c */
/* Start workers segmenting threads (each with its own normaliser). */
ist_status ist_corpus_pool_start(build *b, size_t workers, struct pool **out, ist_error *err);
void ist_corpus_pool_stop(struct pool *pl);   /* NULL: no-op */
/* Read one file through b->pool: the same ids and counts as on one thread. */
ist_status ist_corpus_read_parallel(build *b, ist_reader *r, crc_follow *cf, const char *path,
                                    ist_error *err);

#endif
