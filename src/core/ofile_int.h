/* ofile_int.h - output files written atomically.
 *
 * Bytes go to a temporary file in the target's directory (".NAME.tmp-XXXXXX"),
 * optionally through gzip; ist_ofile_commit() flushes, fsyncs and renames it
 * into place; ist_ofile_abort() (or any failed write) removes it, so a failed
 * or cancelled run never leaves a partial output. "-" means standard output,
 * written directly. Writes poll ist_cancel_requested(). */
#ifndef ISTHMUS_OFILE_INT_H
#define ISTHMUS_OFILE_INT_H

#include <stdbool.h>
#include <stddef.h>

#include <isthmus/error.h>

typedef struct ist_ofile ist_ofile;

/* Start writing path (gzip when gz). Fails when the directory is missing or
 * not writable. */
ist_status ist_ofile_open(const char *path, bool gz, ist_ofile **out, ist_error *err);

ist_status ist_ofile_write(ist_ofile *f, const void *buf, size_t n, ist_error *err);
ist_status ist_ofile_puts(ist_ofile *f, const char *s, ist_error *err);
ist_status ist_ofile_printf(ist_ofile *f, ist_error *err, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

/* Bytes handed to ist_ofile_write so far (before compression). */
unsigned long long ist_ofile_tell(const ist_ofile *f);

/* True when the destination is a terminal (only possible for "-"). */
bool ist_ofile_is_tty(const ist_ofile *f);

/* Finish: flush, fsync, rename into place. Frees f whatever the outcome; on
 * failure the temporary file is removed. */
ist_status ist_ofile_commit(ist_ofile *f, ist_error *err);

/* Give up: remove the temporary file and free f. NULL: no-op. */
void ist_ofile_abort(ist_ofile *f);

/* Write a whole buffer to path atomically (plain). */
ist_status ist_ofile_write_all(const char *path, const void *buf, size_t n, ist_error *err);

/* Write a text and one closing newline to path atomically (plain): a JSON document. */
ist_status ist_ofile_write_text(const char *path, const char *text, ist_error *err);

#endif
