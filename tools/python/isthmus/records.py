"""Result, verdict and candidate files as plain Python objects (docs/formats.md, "Result
JSON", "Verdict JSON", "Candidate list").

Readers tolerate absent keys as the C readers do (a result written before intervals or
per-query outcomes existed has none); every object keeps the parsed JSON in .data.
"""

import json
from dataclasses import dataclass, field
from typing import Dict, List, Optional, Tuple

from ._files import read_bytes
from .errors import FormatError

KS = (1, 5, 10)


def _load_json(path, what):
    raw = read_bytes(path, what)
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as e:
        raise FormatError("invalid UTF-8 at byte %d, expected %s" % (e.start, what),
                          path) from None
    try:
        return json.loads(text)
    except json.JSONDecodeError as e:
        raise FormatError("expected %s, found text that is not JSON (%s)" % (what, e.msg),
                          path, line=e.lineno) from None


def _figures(obj, prefix):
    """{1: x, 5: y, 10: z} from {"p@1": x, ...} (prefix "p@") or {"@1": n, ...} ("@")."""
    obj = obj or {}
    return {k: obj[prefix + str(k)] for k in KS if prefix + str(k) in obj}


@dataclass
class Interval:
    """Percentile bootstrap intervals of precision@k: bounds[k] = (lo, hi), fractions."""
    level: Optional[float]
    resamples: Optional[int]
    seed: Optional[int]
    bounds: Dict[int, Tuple[float, float]]

    @classmethod
    def from_json(cls, obj):
        if not isinstance(obj, dict):
            return None
        return cls(obj.get("level"), obj.get("resamples"), obj.get("seed"),
                   {k: tuple(v) for k, v in _figures(obj, "p@").items()})


@dataclass
class Band:
    rank_from: int
    rank_to: Optional[int]           # None: no upper end
    queries: int
    precision: Dict[int, float]
    hits: Dict[int, int]
    ci: Optional[Interval]


@dataclass
class Query:
    source: str
    rank: int                        # place of the best gold target in the top 10, 0 = none
    band: int
    frequency_rank: int


@dataclass
class Run:
    """One (map, retrieval) run of a result; precision[k] is a fraction."""
    label: str                       # "seed" or "refined" ("procrustes" in old files reads as "seed")
    retrieval: str                   # "cosine" or "csls"
    neighbourhood: int
    sources: int
    queries: int
    coverage: float
    precision: Dict[int, float]
    hits: Dict[int, int]
    bands: List[Band]
    ci: Optional[Interval]
    per_query: List[Query]

    @property
    def name(self):
        return "%s %s" % (self.label, self.retrieval)


@dataclass
class Result:
    path: str
    command: str                     # "align" or "score"
    inputs: dict
    test: dict
    options: dict
    map: dict
    runs: List[Run]
    diagnostics: Optional[dict]
    data: dict = field(repr=False)

    def run(self, retrieval, label=None):
        """The run with this retrieval method (and map label); without a label the last such
        run, the one a gate rule without a label checks. KeyError when there is none."""
        found = [r for r in self.runs
                 if r.retrieval == retrieval and (label is None or r.label == label)]
        if not found:
            raise KeyError("no %s run%s in %s" % (retrieval, " " + label if label else "",
                                                 self.path))
        return found[-1]


def _run(obj):
    bands = [Band(b.get("rank_from"), b.get("rank_to"), b.get("queries"),
                  _figures(b.get("precision"), "p@"), _figures(b.get("hits"), "@"),
                  Interval.from_json(b.get("ci"))) for b in obj.get("bands", [])]
    per_query = [Query(q.get("source"), q.get("rank"), q.get("band"), q.get("frequency_rank"))
                 for q in obj.get("per_query", [])]
    label = obj.get("label")
    return Run("seed" if label == "procrustes" else label, obj.get("retrieval"), obj.get("neighbourhood"),
               obj.get("sources"), obj.get("queries"), obj.get("coverage"),
               _figures(obj.get("precision"), "p@"), _figures(obj.get("hits"), "@"), bands,
               Interval.from_json(obj.get("ci")), per_query)


def read_result(path):
    """A result JSON written by 'isthmus score' or 'isthmus align --json-out'."""
    return result_from_json(_load_json(path, "an isthmus result JSON"), path)


def result_from_json(d, path):
    """A Result from the parsed result JSON d; path names it in messages."""
    fmt = d.get("format") if isinstance(d, dict) else None
    if fmt != "isthmus result":
        raise FormatError('expected "format": "isthmus result", found %s'
                          % ('"%s"' % fmt if isinstance(fmt, str) else "none"), path, line=1)
    if not isinstance(d.get("runs", []), list):
        raise FormatError('runs: expected an array', path)
    if d.get("version", 1) != 1:
        raise FormatError("result version %s, this reader knows version 1" % d.get("version"),
                          path)
    return Result(path, d.get("command"), d.get("inputs", {}), d.get("test", {}),
                  d.get("options", {}), d.get("map", {}), [_run(r) for r in d.get("runs", [])],
                  d.get("diagnostics"), d)


@dataclass
class Check:
    """The verdict on one rule of the thresholds file."""
    line: int
    rule: str
    figure_name: str
    run: Optional[str]
    band: Optional[dict]
    bound_kind: str
    bound: float
    figure: Optional[float]          # None when skipped
    interval: Optional[Tuple[float, float]]
    outcome: str                     # "pass", "fail" or "skip"
    note: str
    new: Optional[float] = None      # drop rules: the two precisions and the limit
    baseline: Optional[float] = None
    limit: Optional[float] = None


@dataclass
class Verdict:
    path: str
    verdict: str                     # "pass" or "fail"
    rules_passed: int
    rules_failed: int
    rules_skipped: int
    thresholds: str
    result: str
    baseline: Optional[str]
    rules: List[Check]
    data: dict = field(repr=False)

    @property
    def passed(self):
        return self.verdict == "pass"


def read_verdict(path):
    """A verdict JSON written by 'isthmus gate --verdict-out'."""
    d = _load_json(path, "an isthmus verdict JSON")
    fmt = d.get("format") if isinstance(d, dict) else None
    if fmt != "isthmus verdict" or not isinstance(d.get("rules"), list):
        raise FormatError('expected an isthmus verdict JSON (format "isthmus verdict" with '
                          '"rules"), found %s' % (fmt if isinstance(fmt, str)
                                                  else "another document"), path)
    checks = [Check(r.get("line"), r.get("rule"), r.get("figure_name"), r.get("run"),
                    r.get("band"), r.get("bound_kind"), r.get("bound"), r.get("figure"),
                    tuple(r["interval"]) if r.get("interval") else None, r.get("outcome"),
                    r.get("note", ""), r.get("new"), r.get("baseline"), r.get("limit"))
              for r in d["rules"]]
    return Verdict(path, d.get("verdict"), d.get("rules_passed"), d.get("rules_failed"),
                   d.get("rules_skipped"), d.get("thresholds"), d.get("result"),
                   d.get("baseline"), checks, d)


@dataclass
class Candidate:
    """One row of a candidate list. Numbers are None where a spreadsheet dropped the column;
    margin is float('inf') when the target vectors hold a single word."""
    line: int
    decision: str
    source: str
    candidate: str
    place: Optional[int] = None
    score: Optional[float] = None
    margin: Optional[float] = None
    mutual: Optional[bool] = None
    source_count: Optional[int] = None
    target_count: Optional[int] = None
    priority: Optional[int] = None


@dataclass
class CandidateList:
    path: str
    caution: str                     # the first comment line, without "# "
    inputs: dict                     # source, source_fingerprint, target, ..., exclude: [..]
    rows: List[Candidate]


def _trim(s):
    s = s.strip(" ")
    if len(s) >= 2 and s[0] == '"' and s[-1] == '"':
        s = s[1:-1]
    return s


def _inputs(comment):
    """The key=value words of the second comment line; the two fingerprints are told apart
    by the side they follow, exclusions are gathered as (path, checksum)."""
    out, side, excl = {}, None, []
    for word in comment.split(" "):
        if "=" not in word:
            continue
        k, v = word.split("=", 1)
        if k in ("source", "target"):
            side = k
            out[k] = v
        elif k == "fingerprint" and side:
            out[side + "_fingerprint"] = v
        elif k == "exclude":
            excl.append([v, None])
        elif k == "checksum" and excl:
            excl[-1][1] = v
        else:
            out[k] = v
    out["exclude"] = [tuple(e) for e in excl]
    return out


def _num(cast, text, path, line, name):
    if text is None or text == "":
        return None
    try:
        return cast(text)
    except ValueError:
        raise FormatError("column %s: expected a number, found '%s'" % (name, text), path,
                          line=line) from None


def read_candidates(path):
    """A candidate list written by 'isthmus propose', as a reviewer may have edited it: the
    columns found by name, fields trimmed of spaces and one pair of double quotes. Decisions
    are checked as 'isthmus merge-pairs' checks them (accept, reject, 'use WORD' or empty,
    in any case); a bad one is a FormatError naming the line."""
    raw = read_bytes(path, "a candidate list")
    if raw.startswith(b"\xef\xbb\xbf"):
        raw = raw[3:]
    comments, rows, cols = [], [], None
    for n, bline in enumerate(raw.split(b"\n"), 1):
        if bline.endswith(b"\r"):
            bline = bline[:-1]
        if b"\0" in bline:
            raise FormatError("NUL byte in the line", path, line=n)
        try:
            line = bline.decode("utf-8")
        except UnicodeDecodeError as e:
            raise FormatError("invalid UTF-8 at byte %d of the line" % (e.start + 1), path,
                              line=n) from None
        if line.startswith("#"):
            comments.append(line[1:].lstrip(" "))
            continue
        if not line.strip(" \t"):
            continue
        f = line.split("\t")
        if cols is None:
            names = [_trim(x) for x in f]
            if not all(c in names for c in ("decision", "source", "candidate")):
                raise FormatError("expected a header line naming the columns decision, "
                                  "source and candidate, found '%s'" % f[0], path, line=n)
            cols = {name: i for i, name in reversed(list(enumerate(names)))}
            continue
        get = lambda name: _trim(f[cols[name]]) if name in cols and cols[name] < len(f) \
            else None
        src, cand, dec = get("source"), get("candidate"), get("decision") or ""
        if src is None or cand is None:
            raise FormatError("expected the source and candidate columns, found %d field%s"
                              % (len(f), "" if len(f) == 1 else "s"), path, line=n)
        if not src or not cand or any(c in src + cand for c in " \t"):
            raise FormatError("expected one word each in source and candidate, found '%s' "
                              "and '%s'" % (src, cand), path, line=n)
        low = dec.lower()
        if low not in ("", "accept", "reject") and not (
                low.startswith("use ") and len(dec[4:].strip(" ").split()) == 1):
            if low.startswith("use "):
                raise FormatError("decision: expected 'use WORD' with one word, found '%s'"
                                  % dec, path, line=n)
            raise FormatError("decision: expected accept, reject, 'use WORD' or nothing, "
                              "found '%s'" % dec, path, line=n)
        mutual = get("mutual")
        rows.append(Candidate(
            n, dec, src, cand, _num(int, get("place"), path, n, "place"),
            _num(float, get("score"), path, n, "score"),
            _num(float, get("margin"), path, n, "margin"),
            None if mutual in (None, "") else mutual == "yes",
            _num(int, get("source_count"), path, n, "source_count"),
            _num(int, get("target_count"), path, n, "target_count"),
            _num(int, get("priority"), path, n, "priority")))
    if cols is None:
        raise FormatError("expected a header line naming the columns decision, source and "
                          "candidate, found none", path)
    caution = comments[0] if comments else ""
    inputs = _inputs(comments[1]) if len(comments) > 1 else {"exclude": []}
    return CandidateList(path, caution, inputs, rows)
