/* isthmus/combine.h - one vector space from several spaces over the same words.
 *
 * Owns nothing between calls. Concatenation of normalised blocks (meta-embeddings by
 * concatenation: Yin & Schütze 2016, "Learning word meta-embeddings", ACL): every block's
 * rows are scaled to unit length, the block's mean row is subtracted, and the block is
 * multiplied by its weight; the combined row is the blocks side by side. Rows that are zero
 * in a block (a word the block has no vector for) stay zero there. The result is an
 * ordinary vector space: alignment, scoring and proposals read it like any other.
 */
#ifndef ISTHMUS_COMBINE_H
#define ISTHMUS_COMBINE_H

#include <stddef.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Concatenate n >= 1 blocks with the same number of rows; weights[i] > 0 (NULL: all 1).
 *  Row r of block i is read from blocks[i].data + map[i][r] * stride when map[i] is given
 *  (a row permutation that lines up the words), else from row r.
 *  Success: *out is a new rows x (sum of cols) matrix owned by the caller.
 *  Errors: IST_ERR_INVALID for no blocks, unequal row counts, a weight <= 0 or not finite,
 *  or a total dimension above 100000; IST_ERR_NOMEM. */
IST_API ist_status ist_combine_concat(const ist_cmatview *blocks, const size_t *const *map,
                                      const double *weights, size_t n, ist_matrix **out,
                                      ist_error *err);

/** Provenance of a combined space, a JSON object
 *  {"producer":"isthmus <version>","command":<command>,"method":"concatenation",
 *   "normalisation":"unit,centre","blocks":[{"weight":..,"source":<label or null>,
 *   "provenance":<block provenance or null>},...]}.
 *  provs[i] is inserted as it is when it is valid JSON (else as a string); labels may be
 *  NULL. *json is owned by the caller: release with ist_combine_free(). */
IST_API ist_status ist_combine_provenance_json(const char *command, const char *const *provs,
                                               const char *const *labels,
                                               const double *weights, size_t n, char **json,
                                               ist_error *err);

/** Release memory returned by this module. NULL: no-op. */
IST_API void ist_combine_free(void *p);

#ifdef __cplusplus
}
#endif
#endif
