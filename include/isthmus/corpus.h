/* isthmus/corpus.h - a prepared corpus: the vocabulary and the token-id stream.
 *
 * Owns reading raw text (one or many files, plain or gzip detected by magic
 * bytes), optional exact de-duplication of normalised lines, counting words,
 * pruning the vocabulary by minimum count and maximum size (ids in frequency
 * order) and the compact stream of ids that training reads. The stream can be
 * saved to a checksummed file (layout in docs/formats.md, "Prepared corpus")
 * and memory-mapped back, so several training runs share one preparation. */
#ifndef ISTHMUS_CORPUS_H
#define ISTHMUS_CORPUS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/text.h>
#include <isthmus/vocab.h>

#ifdef __cplusplus
extern "C" {
#endif

#define IST_CORPUS_EOL UINT32_MAX     /* separates lines in the id stream */

/* Options; fill with ist_corpus_opts_init(), then edit. */
typedef struct ist_corpus_opts {
    ist_text_opts text;
    bool dedup_lines;        /* drop exact repeats of a normalised line [default false] */
    uint64_t min_count;      /* [default 5] */
    size_t max_vocab;        /* 0 = unlimited [default 0] */
    size_t max_line;         /* bytes [default 1 MiB]; longer lines are an error with file:line */
    void (*progress)(void *ctx, uint64_t bytes_done, uint64_t bytes_total);  /* may be NULL */
    void *progress_ctx;
    /* NULL [default]: the id stream is held in memory. A directory: the stream is written to
     * an unnamed temporary file there while the text is read, and renumbered from it when the
     * corpus is saved, so memory holds only the vocabulary (ist_corpus_ids then gives no
     * stream; ist_corpus_save writes the same bytes as from memory). */
    const char *spill_dir;
    /* Threads that normalise and segment [default 1: all on the calling thread]; the reading
     * thread keeps the counting in line order, so the result is the same for every value. */
    size_t threads;
} ist_corpus_opts;

/** Fill o with the defaults above. */
IST_API void ist_corpus_opts_init(ist_corpus_opts *o);

typedef struct ist_corpus ist_corpus;   /* vocabulary (frequency order, pruned) + token-id stream */

/** Read the files in order (plain or gzip by magic bytes), normalise, segment,
 *  count, prune, and turn into ids. Words pruned away are dropped from the stream;
 *  each input line (also an empty one, but not a dropped duplicate) ends with
 *  IST_CORPUS_EOL. Streams: memory ~ vocabulary + id stream, never the whole text.
 *  progress (if set) is called with bytes on disk read so far over all files.
 *  Polls ist_cancel_requested() (IST_ERR_CANCELLED).
 *  Errors: IST_ERR_IO (missing or unreadable file), IST_ERR_FORMAT (line over
 *  max_line, invalid UTF-8 in strict mode: err names file, line and byte offset
 *  in the file), IST_ERR_INVALID (no paths, max_line 0, or more than 2^32-2 types).
 *  Success: *out owns the corpus; release with ist_corpus_free(). */
IST_API ist_status ist_corpus_build(const char *const *paths, size_t n_paths,
                                    const ist_corpus_opts *o, ist_corpus **out, ist_error *err);
IST_API void ist_corpus_free(ist_corpus *c);   /* NULL: no-op */

/** The id stream, *n entries (IST_CORPUS_EOL between lines). Borrowed until
 *  ist_corpus_free(). */
IST_API const uint32_t *ist_corpus_ids(const ist_corpus *c, size_t *n);
/** The vocabulary: ids 0..size-1, most frequent first. Borrowed. */
IST_API const ist_vocab *ist_corpus_vocab(const ist_corpus *c);
/** The text options the corpus was prepared with. Borrowed. */
IST_API const ist_text_opts *ist_corpus_text_opts(const ist_corpus *c);

typedef struct ist_corpus_stats {
    uint64_t lines;               /* input lines read (duplicates included) */
    uint64_t lines_dropped_dup;   /* lines dropped as exact repeats */
    uint64_t tokens_in;           /* words segmented in kept lines */
    uint64_t tokens_kept;         /* words left in the stream after pruning */
    uint64_t replaced_utf8;       /* invalid sequences replaced, all files */
    uint64_t types_before_prune;  /* distinct words before pruning */
} ist_corpus_stats;

/** Copy the figures of the preparation into *st. */
IST_API void ist_corpus_stats_get(const ist_corpus *c, ist_corpus_stats *st);

/** Per-input-file facts for provenance, a JSON array
 *  [{"path":..,"bytes":..,"crc32":"hex","lines":..,"replaced_utf8":..}]
 *  (also "text_bytes" and "gzip", as in ist_corpus_source)
 *  (bytes and crc32 of the file as stored on disk). Borrowed; never NULL. */
IST_API const char *ist_corpus_sources_json(const ist_corpus *c);

/* Facts about one input file (see ist_corpus_source_get). */
typedef struct ist_corpus_source {
    const char *path;             /* as given to ist_corpus_build; borrowed */
    uint64_t bytes;               /* size on disk */
    uint64_t text_bytes;          /* bytes of text after gzip decompression */
    uint32_t crc32;               /* CRC-32 (ISO 3309, as zlib) of the file on disk */
    bool gzip;
    uint64_t lines;
    uint64_t replaced_utf8;       /* invalid sequences replaced by U+FFFD */
} ist_corpus_source;

/** Number of input files the corpus was prepared from. */
IST_API size_t ist_corpus_n_sources(const ist_corpus *c);
/** Facts about input file i (0-based) into *out; IST_ERR_INVALID when i is out of
 *  range. out->path is borrowed until ist_corpus_free(). */
IST_API ist_status ist_corpus_source_get(const ist_corpus *c, size_t i, ist_corpus_source *out,
                                         ist_error *err);

/** Save the prepared corpus (layout in docs/formats.md, "Prepared corpus",
 *  checksummed). Atomic: on failure path is untouched. */
IST_API ist_status ist_corpus_save(const ist_corpus *c, const char *path, ist_error *err);

/** Open a file written by ist_corpus_save(); the id stream is memory-mapped.
 *  A wrong magic, version, size or checksum is IST_ERR_FORMAT naming the file.
 *  Success: *out owns the corpus; release with ist_corpus_free(). */
IST_API ist_status ist_corpus_open(const char *path, ist_corpus **out, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
