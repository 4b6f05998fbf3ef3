"""Small helpers shared by the readers: whole-file reads, gzip detection, atomic writes."""

import gzip
import os
import tempfile

from .errors import IsthmusError

GZIP_MAGIC = b"\x1f\x8b"


def read_bytes(path, what, gunzip=True):
    """The whole file, decompressed when it starts with the gzip magic bytes (and gunzip)."""
    try:
        with open(path, "rb") as f:
            data = f.read()
    except IsADirectoryError:
        raise IsthmusError("is a directory, expected %s" % what, path) from None
    except OSError as e:
        raise IsthmusError("cannot open for reading (%s)" % e.strerror, path) from None
    if gunzip and data[:2] == GZIP_MAGIC:
        try:
            data = gzip.decompress(data)
        except (OSError, EOFError) as e:
            raise IsthmusError("damaged gzip data (%s)" % e, path) from None
    return data


def write_atomic(path, data, compress=False):
    """Write data (bytes) to a temporary name beside path, then rename it into place, so a
    failure leaves path untouched (docs/formats.md, first paragraph)."""
    if compress:
        data = gzip.compress(data, mtime=0)
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix="." + os.path.basename(path) + ".tmp-", dir=folder)
    try:
        with os.fdopen(fd, "wb") as f:
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


def _umask():
    mask = os.umask(0)
    os.umask(mask)
    return mask
