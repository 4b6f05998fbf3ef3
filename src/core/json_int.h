/* json_int.h - the small JSON writer and reader used for provenance, results,
 * maps and verdicts (RFC 8259). Internal to the library. */
#ifndef ISTHMUS_JSON_INT_H
#define ISTHMUS_JSON_INT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <isthmus/error.h>

/* ---- writer: builds compact or indented text in a growing buffer -------- */

typedef struct ist_jw {
    char *buf;
    size_t len, cap;
    int depth;
    bool need_comma[64];
    bool pretty;         /* newline + two spaces per level */
    bool failed;         /* an allocation failed; ist_jw_finish reports it */
} ist_jw;

void ist_jw_init(ist_jw *w, bool pretty);
/* Inside an object pass the key; inside an array or at top level pass NULL. */
void ist_jw_obj_begin(ist_jw *w, const char *key);
void ist_jw_obj_end(ist_jw *w);
void ist_jw_arr_begin(ist_jw *w, const char *key);
void ist_jw_arr_end(ist_jw *w);
void ist_jw_str(ist_jw *w, const char *key, const char *val);          /* NULL -> null */
void ist_jw_strn(ist_jw *w, const char *key, const char *val, size_t n);
void ist_jw_num(ist_jw *w, const char *key, double val);  /* shortest round-trip; NaN/Inf -> null */
void ist_jw_int(ist_jw *w, const char *key, int64_t val);
void ist_jw_uint(ist_jw *w, const char *key, uint64_t val);
void ist_jw_bool(ist_jw *w, const char *key, bool val);
void ist_jw_null(ist_jw *w, const char *key);
/* Insert already-valid JSON text as a value. */
void ist_jw_raw(ist_jw *w, const char *key, const char *json);
/* Take the text (NUL-terminated, release with ist_free). Resets w. */
ist_status ist_jw_finish(ist_jw *w, char **out, ist_error *err);
void ist_jw_discard(ist_jw *w);

/* ---- reader: parses a whole text into a tree ------------------------------ */

typedef enum ist_jtype { IST_JNULL, IST_JBOOL, IST_JNUM, IST_JSTR, IST_JARR, IST_JOBJ } ist_jtype;

typedef struct ist_jv ist_jv;   /* a node; the tree is owned by its root */

/* Parse text (len bytes, UTF-8). On a syntax error err names path (may be
 * NULL), line and what was expected. Depth is limited to 64; numbers must be
 * finite; an object naming one member twice is refused (readers differ on which
 * value such a document means). Release the root with ist_jv_free(). */
ist_status ist_json_parse(const char *text, size_t len, const char *path, ist_jv **out,
                          ist_error *err);
/* Read and parse a whole file (plain or gzip). */
ist_status ist_json_parse_file(const char *path, ist_jv **out, ist_error *err);
void ist_jv_free(ist_jv *root);

ist_jtype ist_jv_type(const ist_jv *v);
/* Member of an object, or NULL (also when v is NULL or not an object). */
const ist_jv *ist_jv_get(const ist_jv *v, const char *key);
/* Array or object length, 0 for others; element/member i (NULL out of range). */
size_t ist_jv_len(const ist_jv *v);
const ist_jv *ist_jv_at(const ist_jv *v, size_t i);
/* Key of object member i (NULL out of range). */
const char *ist_jv_key(const ist_jv *v, size_t i);
/* Values; the defaults are returned when v is NULL or of another type. */
double ist_jv_num(const ist_jv *v, double dflt);
const char *ist_jv_str(const ist_jv *v, const char *dflt);   /* borrowed from the tree */
bool ist_jv_bool(const ist_jv *v, bool dflt);
/* Line (1-based) where the value starts in the parsed text. */
uint64_t ist_jv_line(const ist_jv *v);
/* Write the value v under key into w (a subtree read back as it was). */
void ist_jw_value(ist_jw *w, const char *key, const ist_jv *v);
/* v as compact JSON text (NUL-terminated; release with ist_free). */
ist_status ist_json_text(const ist_jv *v, char **out, ist_error *err);

#endif
