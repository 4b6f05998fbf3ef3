"""isthmus: read and use the files of the isthmus toolkit from Python (numpy only).

    import isthmus
    en = isthmus.open_vectors("en.isv")          # memory-mapped, header checksum checked
    m = isthmus.read_map("shop.map")
    mapped = m.apply(en)                          # standardisation steps, then x W
    result = isthmus.read_result("result.json")
    result.run("csls").precision[1]

    lib = isthmus.native.load()                   # optional: the C library through ctypes
    m = lib.align("en.isv", "es.isv", "seed.pairs", output="shop.map")

Formats: docs/formats.md; a walk through the demo: docs/python.md. Translations and scores
are statistical suggestions, to be reviewed by a speaker of the language before they drive
anything customer-facing or financial.
"""

from . import native
from .errors import FormatError, IsthmusError, LibraryNotFound, MismatchError
from .maps import Map, Side, hash_bytes, read_map
from .records import (Band, Candidate, CandidateList, Check, Interval, Query, Result, Run,
                      Verdict, read_candidates, read_result, read_verdict)
from .vectors import Vectors, fingerprint, open_vectors, read_text, write_text

__version__ = "0.1.0"

__all__ = [
    "IsthmusError", "FormatError", "MismatchError", "LibraryNotFound", "native",
    "Vectors", "open_vectors", "read_text", "write_text", "fingerprint",
    "Map", "Side", "read_map", "hash_bytes",
    "Result", "Run", "Band", "Query", "Interval", "read_result",
    "Verdict", "Check", "read_verdict",
    "CandidateList", "Candidate", "read_candidates",
]
