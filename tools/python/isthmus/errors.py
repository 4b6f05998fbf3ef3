"""Errors raised by the isthmus readers.

Each error carries the file, the 1-based line or the byte offset where known, and a message
worded as the C library words it, so that str(error) reads like the message the isthmus
program prints after its command name ("en.isv: byte 8: native vector file version 2, ...").
"""


class IsthmusError(Exception):
    """A file could not be read or written, or an argument does not fit."""

    # status: the C library's name of the failure ("format", "io", ...) when it came from
    # the library (isthmus.native), else None; text: the library's own wording of the whole
    # message, file and errno text included, which str() then gives as it is
    status = None
    text = None

    def __init__(self, message, path=None, line=None, offset=None):
        super().__init__(message)
        self.message = message
        self.path = path
        self.line = line
        self.offset = offset

    def __str__(self):
        if self.text is not None:
            return self.text
        if self.path is None:
            return self.message
        if self.line:
            return "%s:%d: %s" % (self.path, self.line, self.message)
        if self.offset is not None:
            return "%s: byte %d: %s" % (self.path, self.offset, self.message)
        return "%s: %s" % (self.path, self.message)


class FormatError(IsthmusError):
    """The bytes of a file are not what its format says (the library's IST_ERR_FORMAT)."""


class MismatchError(IsthmusError):
    """Files that do not belong together, such as a map and vectors it was not fitted on
    (the library's IST_ERR_INVALID)."""


class LibraryNotFound(IsthmusError):
    """isthmus.native could not find or load the C library, or found one it does not fit;
    the message says how to point at it (ISTHMUS_LIBRARY)."""
