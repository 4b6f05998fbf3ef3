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

#ifdef __cplusplus
extern "C" {
#endif

/** Read the result JSON at result_path (docs/formats.md "Result JSON") and,
 *  when verdict_path is not NULL, the gate verdict JSON, and write the HTML
 *  report to out_path atomically ("-": standard output). A file that is not
 *  valid JSON or not of the expected kind is IST_ERR_FORMAT naming the file
 *  and line; on any failure no output file is left. */
IST_API ist_status ist_report_write(const char *result_path, const char *verdict_path,
                                    const char *out_path, ist_error *err);

#ifdef __cplusplus
}
#endif
#endif
