"""Map files (docs/formats.md, "Map file"): read one, and apply it to vectors.

A source row x, after the source standardisation steps, maps to x W; target rows get the
target steps only. apply() replays the recorded steps in float32 as the C
library does, then multiplies by W (float32), so its rows equal the rows that
'isthmus align --mapped-out' writes up to the order of the float32 sums.
"""

import json
import math
import struct

import numpy as np

from ._files import read_bytes
from .errors import FormatError, MismatchError

MAP_MAGIC = b"ISTHMUSM"
MAP_VERSION = 1
MAP_HEADER = 24
MAX_META = 16 << 20
MAX_DIM = 100000
FLOAT32_MAX = 3.4e38


def hash_bytes(data):
    """The library's 64-bit FNV-1a with a final avalanche (src/core/hash_int.h)."""
    h = 0xcbf29ce484222325
    for c in data:
        h = ((h ^ c) * 0x100000001b3) & 0xffffffffffffffff
    h ^= h >> 33
    h = (h * 0xff51afd7ed558ccd) & 0xffffffffffffffff
    h ^= h >> 33
    return h


class Side:
    """One side of a map: the fingerprint and rows of the vector file it was fitted on and
    its standardisation steps, a list of ("length", None) (scale each row to unit length)
    and ("mean", mean) (subtract the recorded column mean, a float64 array)."""

    def __init__(self, fingerprint, rows, steps):
        self.fingerprint = fingerprint
        self.rows = rows
        self.steps = steps

    @property
    def spec(self):
        return ",".join(k for k, _ in self.steps) or "none"

    def standardise(self, matrix):
        """A float32 copy of matrix with the steps replayed, as src/align/norm.c does: unit
        length with the norm summed in float64 and the float32 scale applied, the mean
        subtracted in float64 and rounded back to float32."""
        x = np.array(matrix, dtype=np.float32, copy=True)
        for kind, mean in self.steps:
            if kind == "length":
                q = np.einsum("ij,ij->i", x.astype(np.float64), x.astype(np.float64))
                scale = np.ones_like(q)
                pos = q > 0
                scale[pos] = 1.0 / np.sqrt(q[pos])
                x *= scale.astype(np.float32)[:, None]
            else:
                x = (x.astype(np.float64) - mean[None, :]).astype(np.float32)
        return x


class Map:
    """A map read from a file.

    dim, metadata (the JSON object as a dict), W (final map, float64 dim x dim), W0 (fitted
    on the seeds alone), source and target (Side), seeds (list of (source, target) words)."""

    def __init__(self, path, dim, metadata, w, w0, source, target):
        self.path = path
        self.dim = dim
        self.metadata = metadata
        self.W = w
        self.W0 = w0
        self.source = source
        self.target = target

    @property
    def seeds(self):
        return [tuple(p) for p in self.metadata.get("seeds", {}).get("list", [])]

    @property
    def seed_checksum(self):
        return int(self.metadata.get("seeds", {}).get("checksum", "0"), 16)

    @property
    def rounds(self):
        return self.metadata.get("refinement", {}).get("rounds", [])

    def check(self, src=None, tgt=None):
        """Raise MismatchError when src or tgt (Vectors) are not the files the map was
        fitted on, with the library's message."""
        for v in (src, tgt):
            if v is not None and v.dim != self.dim:
                raise MismatchError("the map is for dimension %d, the vectors have %d"
                                    % (self.dim, v.dim), v.path)
        for name, side, v in (("source", self.source, src), ("target", self.target, tgt)):
            if v is not None and v.fingerprint != side.fingerprint:
                raise MismatchError("the %s vectors are not the ones the map was fitted on: "
                                    "expected fingerprint %016x, found %016x"
                                    % (name, side.fingerprint, v.fingerprint))

    def apply(self, src, stage="refined", check=True):
        """The source vectors (Vectors or an array) standardised and mapped: float32, rows x dim.
        stage "refined" uses W (the map after refinement; the seed fit when the map has no
        refinement rounds), "seed" W0 (Procrustes on the seeds before refinement)."""
        if stage == "final":
            raise ValueError("stage: 'final' is now called 'refined'")
        if check and hasattr(src, "fingerprint"):
            self.check(src=src)
        m = src.matrix if hasattr(src, "matrix") else np.asarray(src)
        w = {"refined": self.W, "seed": self.W0}[stage].astype(np.float32)
        return self.source.standardise(m) @ w

    def standardise_target(self, tgt, check=True):
        """The target vectors with the target steps replayed (no map)."""
        if check and hasattr(tgt, "fingerprint"):
            self.check(tgt=tgt)
        return self.target.standardise(tgt.matrix if hasattr(tgt, "matrix") else tgt)

    def __repr__(self):
        return "<isthmus.Map %s: dim %d, %s -> %s>" % (self.path or "(in memory)", self.dim,
                                                      self.source.spec, self.target.spec)


def read_map(path):
    """Read a map file; FormatError with the library's message when it is damaged."""
    p = read_bytes(path, "a map file", gunzip=False)

    def bad(message):
        return FormatError(message, path)

    if len(p) < MAP_HEADER + 8 or p[:8] != MAP_MAGIC:
        raise bad("expected an isthmus map file (magic ISTHMUSM), found other bytes")
    ver, dim, ml = struct.unpack_from("<IIQ", p, 8)
    if ver != MAP_VERSION:
        raise bad("map file version %d, this isthmus reads version %d" % (ver, MAP_VERSION))
    if hash_bytes(p[:-8]) != struct.unpack_from("<Q", p, len(p) - 8)[0]:
        raise bad("map file checksum does not match: the file is damaged")
    pad = (8 - (MAP_HEADER + ml) % 8) % 8
    if dim == 0 or dim > MAX_DIM or ml > MAX_META or \
            MAP_HEADER + ml + pad + 2 * dim * dim * 8 + 8 > len(p):
        raise bad("map file sizes do not agree (dimension %d, %d bytes)" % (dim, len(p)))
    try:
        meta = json.loads(p[MAP_HEADER:MAP_HEADER + ml].decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as e:
        raise bad("map metadata is not JSON (%s)" % e) from None
    at = MAP_HEADER + ml + pad
    mats = np.frombuffer(p, dtype="<f8", count=2 * dim * dim, offset=at).reshape(2, dim, dim)
    if not np.isfinite(mats).all() or (np.abs(mats) > FLOAT32_MAX).any():
        raise bad("map matrix holds a number that is not finite")
    at += 2 * dim * dim * 8
    end = len(p) - 8
    sides = []
    for name in ("source", "target"):
        side = meta.get(name) if isinstance(meta, dict) else None
        steps = side.get("steps") if isinstance(side, dict) else None
        fps = side.get("fingerprint") if isinstance(side, dict) else None
        if not isinstance(steps, list) or not isinstance(fps, str) or len(steps) > 128:
            raise bad("map metadata: expected '%s' with a fingerprint and steps" % name)
        rows = side.get("rows", 0)
        if not isinstance(rows, (int, float)) or isinstance(rows, bool):
            raise bad("map metadata: rows: expected a number")
        if not (0 <= rows <= 2 ** 53) or rows != math.floor(rows):
            raise bad("map metadata: rows: expected a whole number from 0 to 2^53, found %g"
                      % rows)
        parsed = []
        for i, k in enumerate(steps):
            # maps written before the steps were renamed say "unit" and "centre"
            kind = {"length": "length", "unit": "length", "mean": "mean", "centre": "mean"}.get(
                k if isinstance(k, str) else "")
            if kind is None:
                raise bad("map metadata: %s step %d: expected length or mean, found '%s'"
                          % (name, i + 1, k if isinstance(k, str) else ""))
            parsed.append([kind, None])
        nc = sum(1 for k, _ in parsed if k == "mean")
        if end - at < nc * dim * 8:
            raise bad("map file is truncated")
        means = np.frombuffer(p, dtype="<f8", count=nc * dim, offset=at).reshape(nc, dim)
        if not np.isfinite(means).all():
            raise bad("map %s mean holds a number that is not finite" % name)
        at += nc * dim * 8
        j = 0
        for s in parsed:
            if s[0] == "mean":
                s[1] = means[j].copy()
                j += 1
        sides.append(Side(int(fps, 16), int(rows), [tuple(s) for s in parsed]))
    if at != end:
        raise bad("map file holds %d bytes more than its metadata describes" % (end - at))
    # the library keeps W as float32 after reading; so do we, as float64 values
    w = mats[0].astype(np.float32).astype(np.float64)
    w0 = mats[1].astype(np.float32).astype(np.float64)
    return Map(path, dim, meta, w, w0, sides[0], sides[1])
