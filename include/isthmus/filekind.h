/* isthmus/filekind.h - what kind of file a path holds, told by its first bytes.
 *
 * Every reader of the library checks its input here before parsing, so a file
 * of the wrong kind is refused with its kind and the command that reads it
 * ("x.map is a map file (written by 'isthmus align'; read with --map by score,
 * lookup, propose and gate), not a pair list"), and a binary file given where
 * text is expected is refused as binary. Owns nothing. */
#ifndef ISTHMUS_FILEKIND_H
#define ISTHMUS_FILEKIND_H

#include <stddef.h>
#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_file_kind {
    IST_FILE_UNKNOWN = 0,   /* cannot be read, or empty */
    IST_FILE_TEXT,          /* UTF-8 text of no kind recognised below */
    IST_FILE_VECTORS,       /* native vector file */
    IST_FILE_MAP,           /* map file */
    IST_FILE_PREPARED,      /* prepared corpus */
    IST_FILE_RESULT,        /* result JSON */
    IST_FILE_VERDICT,       /* verdict JSON */
    IST_FILE_JSON,          /* other JSON */
    IST_FILE_CANDIDATES,    /* candidate list (TSV) */
    IST_FILE_OWN_BINARY,    /* a binary file of this project of a kind this build does not know */
    IST_FILE_BINARY,        /* any other binary file */
    IST_FILE_NKINDS
} ist_file_kind;

/* Sets of kinds for ist_file_expect(). */
#define IST_FILE_BIT(k) (1u << (k))
#define IST_FILE_ANY_TEXT                                                                        \
    (IST_FILE_BIT(IST_FILE_TEXT) | IST_FILE_BIT(IST_FILE_UNKNOWN))

/** Classify the first `n` bytes of a file. `gzip` is set when they are gzip
 *  compressed (the kind is then that of the decompressed start, when the
 *  caller passed it; ist_file_sniff() does). */
IST_API ist_file_kind ist_file_classify(const unsigned char *p, size_t n);

/** Read the start of path (through gzip) and classify it. A file that cannot be
 *  opened gives IST_FILE_UNKNOWN and IST_OK: the reader then reports the error
 *  in its own words. *gzip (may be NULL) tells whether the file is compressed. */
IST_API ist_status ist_file_sniff(const char *path, ist_file_kind *kind, int *gzip,
                                  ist_error *err);

/** "a map file", "a native vector file", ... */
IST_API const char *ist_file_kind_name(ist_file_kind kind);
/** Where such a file comes from and which command reads it, e.g.
 *  "written by 'isthmus align'; read with --map by score, lookup, propose and gate". */
IST_API const char *ist_file_kind_use(ist_file_kind kind);

/** IST_OK when path is of one of the kinds in `accept` (IST_FILE_BIT() set);
 *  otherwise IST_ERR_FORMAT with "is KIND (USE), not WANT" (want: "a pair
 *  list", "a vector file", ...). A gzip file is judged by what it holds;
 *  `gzip_ok` 0 refuses compression as such. */
IST_API ist_status ist_file_expect(const char *path, unsigned accept, int gzip_ok,
                                   const char *want, ist_error *err);

#ifdef __cplusplus
}
#endif

#endif
