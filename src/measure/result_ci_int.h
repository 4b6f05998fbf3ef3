/* result_ci_int.h - the "ci" and "per_query" members of the result JSON, written by
 * result_ci.c into the objects result.c opens. Internal to the library. */
#ifndef ISTHMUS_RESULT_CI_INT_H
#define ISTHMUS_RESULT_CI_INT_H

#include <isthmus/metrics.h>

#include "json_int.h"

/* Inside band object b of run m: its "ci" (ci NULL: defaults). An allocation failure
 * marks w failed, so ist_jw_finish() reports it. */
void ist_result_ci_band(ist_jw *w, const ist_metrics *m, size_t b, const ist_ci_opts *ci);

/* Inside the run object of m: "ci" over all its queries and "per_query" (source words
 * from src when given). Nothing when m holds no per-query outcomes. */
void ist_result_ci_run(ist_jw *w, const ist_metrics *m, const ist_store *src,
                       const ist_ci_opts *ci);

/* Inside the "test" object: "list_checksum", the checksum of every pair of the list at
 * info->test_path as read, before the vectors are consulted (equal for two results
 * scored on one list by vectors of different vocabularies). Nothing when the path
 * cannot be read as a pair list (for example a held-out split). */
void ist_result_ci_test(ist_jw *w, const ist_result_info *info);

#endif
