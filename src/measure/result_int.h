/* result_int.h - what the result module's files share: the option names and the
 * diagnostics object of the result JSON (result_diag.c). Internal to the library. */
#ifndef ISTHMUS_RESULT_INT_H
#define ISTHMUS_RESULT_INT_H

#include <isthmus/result.h>

#include "json_int.h"

/* "both", "csls" or "cosine" for a set of IST_RESULT_ methods. */
const char *ist_result_methods_name(unsigned methods);
/* "both", "seed" or "refined" for a set of IST_STAGE_ stages. */
const char *ist_result_stages_name(unsigned stages);

/* A reader of one result document: the first failure stays in rc (IST_ERR_FORMAT naming
 * the file and line), and later calls do nothing. */
typedef struct ist_rd {
    const char *name;
    ist_error *err;
    ist_status rc;
} ist_rd;

ist_status ist_rd_fail(ist_rd *r, const ist_jv *at, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
/* Member key of obj when it has type want; NULL when absent or null (a failure when
 * required) or of another type (a failure). where names obj in messages. */
const ist_jv *ist_rd_get(ist_rd *r, const ist_jv *obj, const char *key, ist_jtype want,
                         bool required, const char *where);
/* Typed members; false when absent or refused. */
bool ist_rd_size(ist_rd *r, const ist_jv *obj, const char *key, bool required,
                 const char *where, size_t *out);
bool ist_rd_frac(ist_rd *r, const ist_jv *obj, const char *key, bool required,
                 const char *where, double *out);
bool ist_rd_bool(ist_rd *r, const ist_jv *obj, const char *key, bool required,
                 const char *where, bool *out);
char *ist_rd_str(ist_rd *r, const ist_jv *obj, const char *key, bool required,
                 const char *where);

/* Read the "diagnostics" object of a result (name and its lines for messages) into a
 * new ist_diag holding the figures the file records (no per-target arrays). */
ist_status ist_result_read_diag(const ist_jv *obj, const char *name, ist_diag **out,
                                ist_error *err);

#endif
