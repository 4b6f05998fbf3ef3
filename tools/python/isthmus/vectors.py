"""Vector files: the native memory-mapped file and the plain-text table (docs/formats.md).

open_vectors() reads either kind, told apart by the first bytes as the C library does. A
native file is mapped with numpy.memmap: the matrix is a read-only view into the mapping,
nothing of it is copied. Its header, word and provenance checksum is checked on open; the
matrix checksum and the finiteness of every number when verify=True (or by verify()).
"""

import fractions
import json
import re
import struct
import zlib

import numpy as np

from ._files import read_bytes, write_atomic
from .errors import FormatError, IsthmusError

NATIVE_MAGIC = b"ISTHMUSV"
NATIVE_VERSION = 1
HEADER = 128
MAX_DIM = 100000
FLAG_COUNTS = 1

# header field offsets (docs/formats.md, "Native vector file")
H_VERSION, H_FLAGS, H_ROWS, H_DIM, H_STRIDE = 8, 12, 16, 24, 32
H_MATRIX_OFF, H_WORDS_OFF, H_WORDS_SIZE, H_PROV_OFF, H_PROV_SIZE = 40, 48, 56, 64, 72
H_FILE_SIZE, H_MATRIX_CRC, H_META_CRC, H_WORDS_CRC = 80, 88, 92, 96


def stride_for(dim):
    """Row stride in floats: the dimension rounded up to a multiple of 16 (64-byte rows)."""
    return (dim + 15) // 16 * 16


class Vectors:
    """A table of word vectors.

    words       list of str, one per row, in file order (descending frequency for trained
                vectors)
    counts      numpy uint64 array of corpus counts (zeros when the file carries none)
    matrix      numpy float32 array rows x dim; for a native file a read-only view into the
                memory mapping
    provenance  the provenance JSON as a dict ({} when there is none)
    fingerprint (matrix CRC << 32) | words CRC, as maps and results name their inputs
    """

    def __init__(self, path, words, counts, matrix, provenance_text, fingerprint, native,
                 mapping=None):
        self.path = path
        self.words = words
        self.counts = counts
        self.matrix = matrix
        self.provenance_text = provenance_text
        self.fingerprint = fingerprint
        self.native = native
        self._mapping = mapping
        self._index = None

    @property
    def rows(self):
        return self.matrix.shape[0]

    @property
    def dim(self):
        return self.matrix.shape[1]

    @property
    def provenance(self):
        if not self.provenance_text:
            return {}
        return json.loads(self.provenance_text)

    def row(self, word):
        """Row of a word (as stored, byte for byte); KeyError when absent."""
        if self._index is None:
            self._index = {w: i for i, w in enumerate(self.words)}
        return self._index[word]

    def __getitem__(self, word):
        return self.matrix[self.row(word)]

    def __contains__(self, word):
        try:
            self.row(word)
        except KeyError:
            return False
        return True

    def __len__(self):
        return self.rows

    def verify(self):
        """Check the matrix checksum and that every number is finite (as 'isthmus inspect'
        does); raise FormatError otherwise. A text table was checked when read."""
        if not self.native:
            return
        m = self._mapping
        rows, stride = self.rows, stride_for(self.dim)
        want = struct.unpack_from("<I", m, H_MATRIX_CRC)[0]
        if zlib.crc32(m[HEADER:HEADER + rows * stride * 4]) != want:
            raise FormatError("matrix checksum mismatch: the file is damaged", self.path)
        bad = ~np.isfinite(self.matrix)
        if bad.any():
            r, c = np.argwhere(bad)[0]
            raise FormatError("row %d ('%s') component %d is not a finite number"
                              % (r, self.words[r], c + 1), self.path)

    def __repr__(self):
        return "<isthmus.Vectors %s: %d words x %d>" % (self.path, self.rows, self.dim)


def _word_problem(raw):
    """What is wrong with a word's bytes, and where, or None (the C reader's rules)."""
    if not raw:
        return "empty word", 0
    for i, c in enumerate(raw):
        if c < 0x80 and (c <= 0x20 or c == 0x7f):
            if c in (0x20, 0x09):
                return "word contains a space or tab", i
            return "word contains a control character", i
    try:
        raw.decode("utf-8")
    except UnicodeDecodeError as e:
        return "invalid UTF-8 in word", e.start
    return None


def open_vectors(path, verify=False):
    """Open a native vector file or a text table (told apart by the first bytes).

    verify: also check the matrix checksum and finiteness of a native file.
    Raises FormatError (or IsthmusError for I/O) with the C library's message."""
    try:
        with open(path, "rb") as f:
            head = f.read(8)
    except IsADirectoryError:
        raise IsthmusError("is a directory, expected a vector file", path) from None
    except OSError as e:
        raise IsthmusError("cannot open for reading (%s)" % e.strerror, path) from None
    if head == NATIVE_MAGIC:
        v = _open_native(path)
        if verify:
            v.verify()
        return v
    if len(head) >= 7 and head[:7] == NATIVE_MAGIC[:7]:
        raise FormatError("not a native vector file this build knows: magic '%s', expected "
                          "'%s'" % (head.decode("latin-1"), NATIVE_MAGIC.decode()), path,
                          offset=0)
    return read_text(path)


def _open_native(path):
    import os
    size = os.path.getsize(path)

    def bad(offset, message):
        return FormatError(message, path, offset=offset)

    if size < HEADER:
        raise bad(size, "file is truncated: %d bytes, shorter than the %d-byte header"
                  % (size, HEADER))
    m = np.memmap(path, dtype=np.uint8, mode="r")
    h = bytes(m[:HEADER])
    u64 = lambda off: struct.unpack_from("<Q", h, off)[0]
    u32 = lambda off: struct.unpack_from("<I", h, off)[0]
    version = u32(H_VERSION)
    rows, dim, stride = u64(H_ROWS), u64(H_DIM), u64(H_STRIDE)
    moff, woff, wsize = u64(H_MATRIX_OFF), u64(H_WORDS_OFF), u64(H_WORDS_SIZE)
    poff, psize, fsize = u64(H_PROV_OFF), u64(H_PROV_SIZE), u64(H_FILE_SIZE)
    if version != NATIVE_VERSION:
        raise bad(H_VERSION, "native vector file version %d, this build reads version %d"
                  % (version, NATIVE_VERSION))
    if fsize != size:
        raise bad(H_FILE_SIZE, "file is %s: header says %d bytes, found %d"
                  % ("truncated" if size < fsize else "longer than its header says",
                     fsize, size))
    if dim == 0 or dim > MAX_DIM:
        raise bad(H_DIM, "dimension %d is outside 1..%d" % (dim, MAX_DIM))
    if rows == 0:
        raise bad(H_ROWS, "file holds no vectors")
    if stride != stride_for(dim):
        raise bad(H_STRIDE, "row stride %d does not fit dimension %d" % (stride, dim))
    if rows > size // 4 // stride:
        raise bad(H_ROWS, "header claims %d rows of %d numbers, more than the file holds"
                  % (rows, dim))
    mbytes = rows * stride * 4
    if moff != HEADER or moff + mbytes > size:
        raise bad(H_MATRIX_OFF, "matrix section lies outside the file")
    if woff != moff + mbytes or wsize > size - woff or wsize < 16 * rows + 8:
        raise bad(H_WORDS_OFF, "word section lies outside the file or is too small")
    if poff != woff + wsize or psize > size - poff or poff + psize != size:
        raise bad(H_PROV_OFF, "provenance section does not end the file")
    zeroed = h[:H_META_CRC] + b"\0\0\0\0" + h[H_META_CRC + 4:]
    crc = zlib.crc32(zeroed)
    crc = zlib.crc32(m[woff:woff + wsize], crc)
    crc = zlib.crc32(m[poff:poff + psize], crc)
    if crc != u32(H_META_CRC):
        raise FormatError("checksum mismatch in header, words or provenance: the file is "
                          "damaged", path)
    counts = m[woff:woff + 8 * rows].view("<u8")
    offs = np.asarray(m[woff + 8 * rows:woff + 16 * rows + 8].view("<u8"), dtype=np.uint64)
    pool_off = woff + 16 * rows + 8
    pool = bytes(m[pool_off:woff + wsize])
    words, seen = [], {}
    for i in range(rows):
        a, b = int(offs[i]), int(offs[i + 1])
        if b <= a or b > len(pool) or (i == 0 and a != 0) or pool[b - 1] != 0:
            raise bad(woff + 8 * rows + 8 * i, "word offsets of row %d are inconsistent" % i)
        raw = pool[a:b - 1]
        problem = _word_problem(raw)
        if problem:
            raise bad(pool_off + a + problem[1], "row %d: %s" % (i, problem[0]))
        w = raw.decode("utf-8")
        if w in seen:
            raise bad(pool_off + a, "duplicate word '%s' in rows %d and %d" % (w, seen[w], i))
        seen[w] = i
        words.append(w)
    matrix = m[HEADER:HEADER + mbytes].view("<f4").reshape(rows, stride)[:, :dim]
    prov = bytes(m[poff:poff + psize]).decode("utf-8", errors="replace")
    fp = u32(H_MATRIX_CRC) << 32 | u32(H_WORDS_CRC)
    v = Vectors(path, words, counts, matrix, prov, fp, True, mapping=m)
    v._index = seen
    return v


def fingerprint(words, matrix):
    """The fingerprint a vector table gets: CRC-32 of the matrix rows padded with zeros to the
    native stride, shifted left 32, or the CRC-32 of the words each followed by a NUL."""
    matrix = np.asarray(matrix, dtype="<f4")
    rows, dim = matrix.shape
    padded = np.zeros((rows, stride_for(dim)), dtype="<f4")
    padded[:, :dim] = matrix
    wcrc = zlib.crc32(b"".join(w.encode("utf-8") + b"\0" for w in words))
    return zlib.crc32(padded.tobytes()) << 32 | wcrc


# --- plain-text table -----------------------------------------------------------------

def _is_header(fields):
    return (len(fields) == 2 and all(f.isdigit() and f.isascii() and 0 < len(f) <= 18
                                     for f in fields))


def _split(line):
    return line.replace(b"\t", b" ").split(b" ")


def read_text(path, max_dim=MAX_DIM):
    """Read a plain-text vector table (plain or gzip): a word and its numbers per line, an
    optional 'ROWS DIM' first line. Errors name the file and line as the C reader does.

    Numbers are parsed as binary64 and then rounded to binary32; for a number printed from a
    float32 (9 significant digits) this gives the same bits as the C reader, which rounds
    once, directly to binary32."""
    data = read_bytes(path, "a vector file")
    if not data:
        raise FormatError("empty file, expected a vector table", path)
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    lines = data.split(b"\n")
    if lines and lines[-1] == b"":
        lines.pop()
    words, rows, first_line = [], [], {}
    dim = None
    header_rows = None
    for n, line in enumerate(lines, 1):
        if line.endswith(b"\r"):
            line = line[:-1]
        fields = [f for f in _split(line) if f]

        def bad(message):
            return FormatError(message, path, line=n)

        if n == 1 and _is_header(fields):
            header_rows, hdim = int(fields[0]), int(fields[1])
            if hdim == 0 or hdim > max_dim:
                raise bad("header gives dimension %d, expected 1..%d" % (hdim, max_dim))
            if header_rows == 0:
                raise bad("header declares 0 rows: the table holds no vectors")
            dim = hdim
            continue
        if not fields:
            if dim is None:
                raise bad("empty line, expected a word and its numbers")
            raise bad("empty line, expected a word and %d numbers" % dim)
        raw = fields[0]
        problem = _word_problem(raw)
        if problem:
            raise bad("%s (byte %d of the line)" % (problem[0],
                                                   line.index(raw) + problem[1] + 1))
        word = raw.decode("utf-8")
        if dim is None:
            if len(fields) == 1:
                raise bad("a word with no numbers: dimension 0")
            dim = len(fields) - 1
            if dim > max_dim:
                raise bad("dimension %d exceeds the limit of %d" % (dim, max_dim))
        if header_rows is not None and len(words) == header_rows:
            raise bad("header declares %d rows, but the table goes on" % header_rows)
        nums = fields[1:]
        if len(nums) > dim:
            raise bad("expected %d numbers after '%s', found %d" % (dim, word, len(nums)))
        values = np.empty(len(nums), dtype=np.float32)
        for k, tok in enumerate(nums):
            status, f = parse_float32(tok)
            if status:
                raise bad("component %d of '%s' is %s: '%s'"
                          % (k + 1, word, status, tok[:40].decode("utf-8", "replace")))
            values[k] = f
        if len(nums) < dim:
            raise bad("expected %d numbers after '%s', found %d" % (dim, word, len(nums)))
        if word in first_line:
            raise bad("duplicate word '%s' (first on line %d)" % (word, first_line[word]))
        first_line[word] = n
        words.append(word)
        rows.append(values)
    if header_rows is not None and len(words) != header_rows:
        if not words:
            raise FormatError("header declares %d rows, found none" % header_rows, path,
                              line=1)
        raise FormatError("header declares %d rows, found %d" % (header_rows, len(words)),
                          path, line=len(lines))
    if not words:
        raise FormatError("empty file, expected a vector table", path)
    matrix = np.vstack(rows)
    v = Vectors(path, words, np.zeros(len(words), dtype=np.uint64), matrix, "",
                fingerprint(words, matrix), False)
    v._index = {w: i for i, w in enumerate(words)}
    return v


_NUMBER = re.compile(rb"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?")


def parse_float32(tok):
    """(None, value) for a decimal number as the C reader accepts it ([+-]digits[.digits]
    [e[+-]digits], no nan, inf or hex), rounded once to the nearest binary32; else
    ("not a number", None) or ("not a finite float32", None)."""
    if not _NUMBER.fullmatch(tok):
        return "not a number", None
    d = float(tok)
    with np.errstate(over="ignore"):
        f = np.float32(d)
    if not np.isfinite(f):
        return "not a finite float32", None
    if d != 0.0 and _on_float32_midpoint(d):
        # the binary64 value sits exactly between two binary32 values: the second rounding
        # may go the wrong way, so decide with the exact decimal value
        exact = fractions.Fraction(tok.decode("ascii"))
        below = np.float32(d)
        other = np.nextafter(below, np.float32(np.inf) if float(below) < d
                             else np.float32(-np.inf))
        lo, hi = sorted((below, other), key=float)
        mid = (fractions.Fraction(float(lo)) + fractions.Fraction(float(hi))) / 2
        if exact != mid:
            f = hi if exact > mid else lo
    return None, f


def _on_float32_midpoint(d):
    bits = struct.unpack("<Q", struct.pack("<d", d))[0]
    exp = bits >> 52 & 0x7ff
    # normal binary32 range: the 29 low mantissa bits of a midpoint are 1 followed by zeros
    if exp >= 1023 - 126:
        return bits & 0x1fffffff == 0x10000000
    # subnormal binary32: fall back to the exact comparison whenever it could matter
    return True


def format_float(x):
    """A float32 as the C library writes it: 9 significant digits, which read back to the
    same bits (FLT_DECIMAL_DIG, C11 5.2.4.2.2)."""
    return "%.9g" % float(x)


def write_text(path, words, matrix, header=False, compress=False):
    """Write a text table atomically: one 'word x1 x2 ...' line per row, numbers as the C
    library prints them; header=True adds the 'ROWS DIM' first line; compress=True gzips."""
    matrix = np.asarray(matrix, dtype=np.float32)
    if matrix.ndim != 2 or matrix.shape[0] != len(words) or matrix.shape[1] == 0:
        raise IsthmusError("expected one row of at least one number per word, found %s for "
                           "%d words" % (matrix.shape, len(words)))
    if not np.isfinite(matrix).all():
        raise IsthmusError("the matrix holds a number that is not finite")
    out = []
    if header:
        out.append("%d %d\n" % matrix.shape)
    seen = set()
    for i, w in enumerate(words):
        problem = _word_problem(w.encode("utf-8"))
        if problem:
            raise IsthmusError("%s at byte %d: '%s'" % (problem[0], problem[1], w))
        if w in seen:
            raise IsthmusError("word '%s' appears twice" % w)
        seen.add(w)
        out.append(w + " " + " ".join(format_float(x) for x in matrix[i]) + "\n")
    write_atomic(path, "".join(out).encode("utf-8"), compress=compress)
