/* reader_int.h - line-at-a-time reading of plain or gzip text.
 *
 * gzip is detected by its magic bytes, never by name. Lines are returned
 * without their "\n" (and without a "\r" before it); a line longer than the
 * limit is an error naming the line. Tracks the 1-based line number and the
 * byte offset (in the uncompressed stream) of the current line. */
#ifndef ISTHMUS_READER_INT_H
#define ISTHMUS_READER_INT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <isthmus/error.h>

typedef struct ist_reader ist_reader;

ist_status ist_reader_open(const char *path, size_t max_line, ist_reader **out, ist_error *err);

/* Next line. At end of input *eof is set and *line is NULL. The line is
 * borrowed until the next call; it is NUL-terminated (the terminator replaces
 * the newline). */
ist_status ist_reader_next(ist_reader *r, char **line, size_t *len, bool *eof, ist_error *err);

uint64_t ist_reader_lineno(const ist_reader *r);   /* of the line last returned */
uint64_t ist_reader_offset(const ist_reader *r);   /* its first byte */
uint64_t ist_reader_bytes(const ist_reader *r);    /* uncompressed bytes consumed */
bool ist_reader_is_gzip(const ist_reader *r);
const char *ist_reader_path(const ist_reader *r);
/* Size of the file on disk (compressed size for gzip). */
uint64_t ist_reader_file_size(const ist_reader *r);
/* Compressed bytes read so far (for progress); equals ist_reader_bytes for plain. */
uint64_t ist_reader_raw_pos(const ist_reader *r);

void ist_reader_close(ist_reader *r);   /* NULL: no-op */

#endif
