/* isthmus/report.h - one self-contained HTML page for people: the gate's answer
 * first, the figures of a result with their intervals, its diagnostics and how
 * both vector files were made.
 *
 * Owns nothing. The page needs no network: styles are inline, charts are
 * inline SVG drawn here, there are no scripts, fonts or images. Every text
 * taken from the inputs is escaped. Parts the inputs do not hold (older result
 * files, no verdict, no diagnostics) leave their section out or say so. */
#ifndef ISTHMUS_REPORT_H
#define ISTHMUS_REPORT_H

#include <isthmus/error.h>
#include <isthmus/gate.h>
#include <isthmus/result.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Choices of the page. */
typedef struct ist_report_opts {
    const char *source_language;  /* name of the source vectors' language for people
                                     ("English"), or NULL: the page says it was not given */
    const char *target_language;  /* the same for the target vectors */
} ist_report_opts;

IST_API void ist_report_opts_init(ist_report_opts *opts);

/** Write the HTML report of a result (ist_result_load() or ist_evaluate()) and, when
 *  verdict is not NULL, of the gate's verdict on it (ist_gate_evaluate() or
 *  ist_verdict_load()), to out_path atomically ("-": standard output). opts may be
 *  NULL (the defaults). On any failure no output file is left. */
IST_API ist_status ist_report_write(const ist_result *result, const ist_verdict *verdict,
                                    const ist_report_opts *opts, const char *out_path,
                                    ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
