/* isthmus/norm.h - the normalisation steps applied to vector spaces before they
 * are aligned, recorded as a plan that can be replayed.
 *
 * Owns the recorded plans (ist_norm).
 *
 * Steps: unit length and mean centring (Artetxe et al. 2016, "Learning
 * principled bilingual mappings of word embeddings while preserving monolingual
 * invariance"; Artetxe et al. 2018, AAAI) and iterative normalisation, which
 * alternates the two until both hold (Zhang et al. 2019, "Are girls neko or
 * shojo? Cross-lingual alignment of non-isomorphic embeddings with iterative
 * normalization", ACL). A plan records each step and the means it subtracted, so the
 * same transform can be replayed exactly on use. */
#ifndef ISTHMUS_NORM_H
#define ISTHMUS_NORM_H

#include <stddef.h>
#include <isthmus/error.h>
#include <isthmus/matrix.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_norm_kind {
    IST_NORM_UNIT = 1,    /* scale every row to length 1 (zero rows stay zero) */
    IST_NORM_CENTRE = 2   /* subtract the recorded mean row */
} ist_norm_kind;

typedef struct ist_norm ist_norm;   /* opaque: a recorded sequence of steps */

/** Default specification: the combination that measured best (docs/methods.md). */
#define IST_NORM_DEFAULT "length,mean,length"

/** Parse a specification, a comma-separated list of "length" (unit length),
 *  "mean" (subtract the mean), "alternate" (5 rounds of length + mean, then
 *  length: iterative normalisation) or "alternate=N", or "none"; apply it to m in place (rows x dim) and record
 *  the steps with the means each centring subtracted.
 *  Success: *out owns the plan; release with ist_norm_free(). IST_ERR_INVALID
 *  names the bad word. */
IST_API ist_status ist_norm_fit(const char *spec, ist_matview m, ist_norm **out, ist_error *err);

/** Check a specification without applying it. */
IST_API ist_status ist_norm_check(const char *spec, ist_error *err);

/** Replay a recorded plan on m (same dim), e.g. on the rows a query needs. */
IST_API ist_status ist_norm_apply(const ist_norm *plan, ist_matview m, ist_error *err);

/** A plan made from recorded steps (as read from a map file): kinds[i] for
 *  i < nsteps; means holds dim values for each IST_NORM_CENTRE step, in order. */
IST_API ist_status ist_norm_from_steps(size_t dim, const ist_norm_kind *kinds, size_t nsteps,
                                       const double *means, ist_norm **out, ist_error *err);

IST_API void ist_norm_free(ist_norm *plan);          /* NULL: no-op */

IST_API size_t ist_norm_dim(const ist_norm *plan);
IST_API size_t ist_norm_steps(const ist_norm *plan);
IST_API ist_norm_kind ist_norm_step_kind(const ist_norm *plan, size_t i);
/** Mean row subtracted by centring step i (dim values); NULL for other steps.
 *  Borrowed; valid until ist_norm_free(). */
IST_API const double *ist_norm_step_mean(const ist_norm *plan, size_t i);
/** The specification the plan was made from ("length,mean,length"), or the list
 *  of its steps when made from recorded steps. Borrowed. */
IST_API const char *ist_norm_spec(const ist_norm *plan);

#ifdef __cplusplus
}
#endif
#endif
