/* corpus_int.h - the prepared corpus, shared by building (corpus.c) and the
 * file layout (corpus_file.c). */
#ifndef ISTHMUS_CORPUS_INT_H
#define ISTHMUS_CORPUS_INT_H

#include <isthmus/corpus.h>

struct ist_corpus {
    ist_vocab *vocab;            /* frequency order after pruning */
    uint32_t *ids;               /* owned stream (built), NULL when mapped */
    size_t n_ids, ids_cap;
    const uint32_t *view;        /* what ist_corpus_ids returns */
    void *map;                   /* whole file when opened */
    size_t map_len;
    ist_text_opts text;
    ist_corpus_stats st;
    uint64_t min_count;          /* pruning that made the vocabulary */
    size_t max_vocab;
    char *sources_json;          /* never NULL once built or opened */
    ist_corpus_source *src;      /* paths owned (ist_strdup) */
    size_t n_src, src_cap;
    /* spilled stream (ist_corpus_opts.spill_dir): the ids as first numbered, in an unlinked
     * temporary file, and the map from those ids to the final ones (UINT32_MAX: pruned) */
    int spill_fd;                /* -1: none */
    char *spill_dir;
    uint64_t spill_n;            /* ids in the spill file, line ends included */
    uint32_t *remap;
    size_t n_remap;
};

/* Spilled corpora: the final stream in order, chunk by chunk; fn returns non-OK to stop. */
ist_status ist_corpus_spill_replay(const ist_corpus *c,
                                   ist_status (*fn)(void *ctx, const uint32_t *ids, size_t n,
                                                    ist_error *err),
                                   void *ctx, ist_error *err);

/* An empty corpus with a vocabulary and "[]" as sources. */
ist_status ist_corpus_alloc(ist_corpus **out, ist_error *err);

/* Provenance of the preparation as JSON: {"text":..,"prune":..,"stats":..,"sources":..}.
 * Release with ist_free. */
/* Append a source (path copied). */
ist_status ist_corpus_add_source(ist_corpus *c, const ist_corpus_source *s, ist_error *err);

/* Unmap a file mapped by ist_corpus_open. */
void ist_corpus_unmap(void *map, size_t len);

ist_status ist_corpus_meta_json(const ist_corpus *c, char **json, ist_error *err);

#endif
