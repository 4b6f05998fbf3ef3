/* isthmus/report.h - one self-contained HTML page for people: the figures of a
 * result file, its diagnostics and, when given, a gate verdict.
 *
 * Owns nothing. The page needs no network: styles are inline, charts are
 * inline SVG drawn here, there are no scripts, fonts or images. Every text
 * taken from the inputs is escaped. Keys absent from the inputs (older result
 * files, no verdict) leave their section out or say so. */
#ifndef ISTHMUS_REPORT_H
#define ISTHMUS_REPORT_H

#include <isthmus/error.h>
#include <isthmus/result.h>

#ifdef __cplusplus
extern "C" {
#endif

/** Write the HTML report of a result (ist_result_load() or ist_evaluate()) and, when
 *  verdict_path is not NULL, of the gate verdict JSON at that path, to out_path
 *  atomically ("-": standard output). A verdict that is not valid JSON, not a verdict,
 *  or made for another result (ist_verdict_check_file()) is IST_ERR_FORMAT naming the
 *  file and line; on any failure no output file is left. */
IST_API ist_status ist_report_write(const ist_result *result, const char *verdict_path,
                                    const char *out_path, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
