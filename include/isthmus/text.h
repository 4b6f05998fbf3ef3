/* isthmus/text.h - turning raw UTF-8 into the words the vocabulary counts.
 *
 * Owns the text policy: UTF-8 validation (invalid sequences become U+FFFD and
 * are counted, or are an error in strict mode), Unicode normalisation form
 * NFKC (Unicode Standard Annex #15) and full case folding (through utf8proc),
 * optional removal of combining marks, optional digit masking, and word
 * segmentation by the default word-boundary rules of Unicode Standard Annex
 * #29, whose property tables are generated at build time from the Unicode
 * Character Database. The Unicode version is the one of the utf8proc the
 * library is built with. */
#ifndef ISTHMUS_TEXT_H
#define ISTHMUS_TEXT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/error.h>

#ifdef __cplusplus
extern "C" {
#endif

/** What preparation does with number-shaped words (see ist_word_shape()):
 *  prices, order numbers, sizes such as 40cm. docs/text.md, "Word shapes". */
typedef enum ist_numbers_policy {
    IST_NUMBERS_KEEP = 0,   /* counted as written */
    IST_NUMBERS_MASK,       /* every decimal digit of the word -> '0': 6.39 -> 0.00, 40cm -> 00cm */
    IST_NUMBERS_DROP        /* left out of the vocabulary and the token stream */
} ist_numbers_policy;

/* The normalisation options; fill with ist_text_opts_init(), then edit. */
typedef struct ist_text_opts {
    bool nfkc;          /* Unicode NFKC (UAX #15) [default true] */
    bool casefold;      /* full case folding [default true] */
    bool strip_marks;   /* remove combining marks (after NFKD-style decomposition) [default false] */
    bool mask_digits;   /* every decimal digit -> '0' [default false] */
    bool strict_utf8;   /* invalid UTF-8 is an error (file, line, byte offset) instead of U+FFFD
                           [default false] */
    ist_numbers_policy numbers;   /* number-shaped words [default IST_NUMBERS_DEFAULT] */
} ist_text_opts;

/* The default policy for number-shaped words, chosen by measurement (docs/defaults.md). */
#define IST_NUMBERS_DEFAULT IST_NUMBERS_KEEP

/** Fill o with the defaults above. */
IST_API void ist_text_opts_init(ist_text_opts *o);

typedef struct ist_normalizer ist_normalizer;   /* opaque; holds work buffers; one per thread */

/** Make a normaliser for the options (copied).
 *  Success: *out owns it; release with ist_normalizer_free(). Failure: *out is NULL. */
IST_API ist_status ist_normalizer_new(const ist_text_opts *o, ist_normalizer **out,
                                      ist_error *err);
IST_API void ist_normalizer_free(ist_normalizer *nz);   /* NULL: no-op */

/** Normalise one string of len bytes (need not be terminated; may hold any bytes).
 *  *out (NUL-terminated, *out_len bytes without the NUL) is borrowed until the next
 *  call on nz. Invalid UTF-8 becomes U+FFFD and is counted (see
 *  ist_normalizer_replaced) unless strict_utf8 is set, in which case the result is
 *  IST_ERR_FORMAT with err->offset = byte offset of the bad sequence inside `in`
 *  (the caller adds file and line). IST_ERR_NOMEM when a work buffer cannot grow. */
IST_API ist_status ist_normalize(ist_normalizer *nz, const char *in, size_t len,
                                 const char **out, size_t *out_len, ist_error *err);

/** Invalid sequences replaced by U+FFFD so far by this normaliser. */
IST_API uint64_t ist_normalizer_replaced(const ist_normalizer *nz);

/** Called for each word; return 0 to go on, anything else to stop (the segmenter
 *  then returns IST_OK at once). The word is borrowed for the call only. */
typedef int (*ist_word_fn)(void *ctx, const char *word, size_t len);

/** Word segmentation by the UAX #29 default word-boundary rules. Segments that
 *  hold a letter, a number, an ideograph, kana or an emoji-like word (an
 *  Extended_Pictographic character, as UAX #29 keeps them together) are reported
 *  in order; segments of only whitespace, punctuation or symbols are dropped.
 *  One tailoring (UAX #29 section 4 allows it): a word of letters only, one
 *  hyphen (U+002D, U+2010 or U+2011) and a word that starts with a digit are
 *  one word, so model codes such as tw-4410 stay whole (docs/text.md).
 *  text must be valid UTF-8 (the output of ist_normalize); otherwise
 *  IST_ERR_INVALID. */
IST_API ist_status ist_segment_words(const char *text, size_t len, ist_word_fn fn, void *ctx,
                                     ist_error *err);

/** Word shapes, by the decimal digits (general category Nd) and letters
 *  (categories L*) a word holds: */
typedef enum ist_word_shape {
    IST_SHAPE_WORD = 0,     /* no digit: kettle, don't */
    IST_SHAPE_NUMBER,       /* digits, with letters only after the last digit: 6, 6.39, 7,00,
                             * 1.000.000, 40cm, 1st */
    IST_SHAPE_CODE          /* a letter before a digit: tw-4410, tw4410, fh8381, a4, mp3 */
} ist_word_shape;

/** The shape of one word of len bytes (valid UTF-8, as the segmenter reports it). */
IST_API ist_word_shape ist_word_shape_of(const char *word, size_t len);

/** Short name of a shape or a policy: "word", "number", "code"; "keep", "mask", "drop". */
IST_API const char *ist_word_shape_name(ist_word_shape s);
IST_API const char *ist_numbers_policy_name(ist_numbers_policy p);
/** The policy named by s ("keep", "mask", "drop"); false when s names none. */
IST_API bool ist_numbers_policy_parse(const char *s, ist_numbers_policy *out);

/** Words as the vocabulary counts them: ist_segment_words(), then the policy
 *  o->numbers applied to each number-shaped word (kept, reported with its digits
 *  written as '0', or not reported). o may be NULL for the defaults. */
IST_API ist_status ist_segment_words_opts(const char *text, size_t len, const ist_text_opts *o,
                                          ist_word_fn fn, void *ctx, ist_error *err);

/** The options as a JSON object text, e.g.
 *  {"nfkc":true,"casefold":true,"strip_marks":false,"mask_digits":false,
 *   "strict_utf8":false,"numbers":"keep","unicode":"15.0.0"}.
 *  *json is owned by the caller: release with ist_text_free(). */
IST_API ist_status ist_text_opts_to_json(const ist_text_opts *o, char **json, ist_error *err);

/** Read the options back from a provenance JSON text: either the object written
 *  by ist_text_opts_to_json() itself or any object that holds it under the key
 *  "text" (at top level or one level down). IST_ERR_FORMAT if absent or not
 *  parseable; then *o is left unchanged. */
IST_API ist_status ist_text_opts_from_provenance(const char *provenance_json, ist_text_opts *o,
                                                 ist_error *err);

/** Release memory returned by this module. NULL: no-op. */
IST_API void ist_text_free(void *p);

/** Version of the Unicode Character Database the normaliser uses, e.g. "15.0.0". */
IST_API const char *ist_text_unicode_version(void);

#ifdef __cplusplus
}
#endif
#endif
