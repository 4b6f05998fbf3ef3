/* isthmus/store.h - a table of word vectors: open, look up, build, save.
 *
 * Owns a rows x dim float32 matrix (64-byte aligned rows), one UTF-8 word and
 * one count per row, a word index, and a provenance text (JSON) saying what
 * produced the vectors. Native files (docs/formats.md) are memory-mapped
 * read-only: opening one copies no part of the matrix. Plain-text tables, plain
 * or gzip, are parsed with a locale-independent float reader. */
#ifndef ISTHMUS_STORE_H
#define ISTHMUS_STORE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>
#include <isthmus/vocab.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct ist_store ist_store;     /* opaque, one owner */

typedef enum ist_store_format {
    IST_STORE_AUTO = 0,   /* open: from the first bytes; save: from the file name */
    IST_STORE_NATIVE,
    IST_STORE_TEXT
} ist_store_format;

#define IST_STORE_MAX_DIM_DEFAULT 100000u
#define IST_STORE_MAX_LINE_DEFAULT (4u << 20)

typedef struct ist_store_opts {
    size_t max_rows;     /* keep the first max_rows rows; 0 = all [default 0] */
    bool verify;         /* native: also check the matrix checksum and that every number is
                            finite, one pass over the matrix [default false: the header, word
                            table and provenance are always checked; the matrix is mapped
                            untouched, see ist_store_verify()] */
    size_t max_dim;      /* refuse a larger dimension [default 100000] */
    size_t max_line;     /* text: longest accepted line, bytes [default 4 MiB] */
} ist_store_opts;

IST_API void ist_store_opts_init(ist_store_opts *opts);

/** Open a vector file; the format is read from its first bytes (native magic,
 *  gzip magic, else plain text). opts may be NULL for the defaults.
 *  Success: *out owns the store; release with ist_store_free().
 *  Failure: *out is NULL; err names the file, the line or byte offset, and
 *  what was wrong (dimension mismatch, bad number, duplicate word, ...). */
IST_API ist_status ist_store_open(const char *path, const ist_store_opts *opts,
                                  ist_store **out, ist_error *err);

/** A new in-memory store of rows x dim zeros with no words yet: give every row
 *  a word with ist_store_set_word() before saving. */
IST_API ist_status ist_store_new(size_t rows, size_t dim, ist_store **out, ist_error *err);

IST_API void ist_store_free(ist_store *store);           /* NULL: no-op */

IST_API size_t ist_store_rows(const ist_store *store);
IST_API size_t ist_store_dim(const ist_store *store);

/** Row of a word (exact bytes), or -1 when absent. */
IST_API ptrdiff_t ist_store_find(const ist_store *store, const char *word);

/** Borrowed; valid until ist_store_free(). */
IST_API const float *ist_store_row(const ist_store *store, size_t row);
IST_API const char *ist_store_word(const ist_store *store, size_t row);
/** Corpus count of the row's word; 0 when the file carried none. */
IST_API uint64_t ist_store_count(const ist_store *store, size_t row);
/** The whole matrix, read-only; valid until ist_store_free(). */
IST_API ist_cmatview ist_store_view(const ist_store *store);

/** Writable row of a store made by ist_store_new(); NULL for an opened file. */
IST_API float *ist_store_row_mut(ist_store *store, size_t row);
/** Writable matrix of a store made by ist_store_new(); data NULL otherwise. */
IST_API ist_matview ist_store_view_mut(ist_store *store);

/** Name row `row` (a valid UTF-8 word without spaces, tabs or line breaks, not
 *  used by another row) and set its count. Only for stores made by
 *  ist_store_new(). */
IST_API ist_status ist_store_set_word(ist_store *store, size_t row, const char *word,
                                      uint64_t count, ist_error *err);

/** Provenance text (JSON object) or "" when the file carried none. Borrowed. */
IST_API const char *ist_store_provenance(const ist_store *store);
/** Replace the provenance text (copied). */
IST_API ist_status ist_store_set_provenance(ist_store *store, const char *json, ist_error *err);

/** The format the store was read from; IST_STORE_AUTO for an in-memory store. */
IST_API ist_store_format ist_store_source_format(const ist_store *store);
/** True when the file was gzip-compressed. */
IST_API bool ist_store_source_gzip(const ist_store *store);
/** Text table: whether the first line was a "rows dim" header. */
IST_API bool ist_store_source_header(const ist_store *store);

/** Checksum state of an opened native file. */
typedef enum ist_store_check {
    IST_STORE_CHECK_NONE = 0,     /* not a native file: nothing to check */
    IST_STORE_CHECK_META,         /* header, words and provenance checked; matrix not */
    IST_STORE_CHECK_FULL          /* everything checked and found intact */
} ist_store_check;
IST_API ist_store_check ist_store_checked(const ist_store *store);

/** Check the matrix checksum of an opened native file now (when it was opened
 *  with verify = false). IST_ERR_FORMAT on mismatch. */
IST_API ist_status ist_store_verify(ist_store *store, ist_error *err);

/** A 64-bit fingerprint of the content (matrix values and words), the same for
 *  a text table and its native conversion. Cheap for opened native files;
 *  computed (one pass over the matrix) for the others. */
IST_API uint64_t ist_store_fingerprint(const ist_store *store);

typedef struct ist_store_save_opts {
    ist_store_format format;   /* AUTO: text when the name ends .txt or .gz, else native */
    bool gzip;                 /* text: compress [default: when the name ends .gz] */
    bool text_header;          /* text: first line "rows dim" [default false] */
} ist_store_save_opts;

IST_API void ist_store_save_opts_init(ist_store_save_opts *opts);

/** Write the store to path: a temporary file in the same directory, renamed
 *  into place when complete; on failure path is untouched. "-" writes a text
 *  table to standard output. opts may be NULL for the defaults. */
IST_API ist_status ist_store_save(const ist_store *store, const char *path,
                                  const ist_store_save_opts *opts, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
