"""The heavy parts through the C library: fit a map, score it, look words up.

Optional: the readers of this package need only numpy. These calls load libisthmus with
ctypes and do what `isthmus align`, `isthmus score` and `isthmus lookup` do, with the same
defaults, so they give the figures and candidates the program prints.

    from isthmus import native
    lib = native.load()                      # or native.load("build/src/libisthmus.so")
    m = lib.align("en.isv", "es.isv", "demo-seed.pairs", output="shop.map")
    result = lib.score("en.isv", "es.isv", m, "demo-test.pairs")
    lib.lookup("en.isv", "es.isv", m, ["kettle", "blue"], top=3)

The library is found, in this order, at the path given to load(), at the path in the
environment variable ISTHMUS_LIBRARY, or by ctypes.util.find_library("isthmus") (an
installed library the system's linker knows). Errors of the library are raised as this
package's exceptions, worded as the program prints them after "isthmus CMD: ":

    IST_ERR_FORMAT   FormatError       a file's content is not what its format allows
    IST_ERR_INVALID  MismatchError     files or options that do not fit each other
    anything else    IsthmusError      (IST_ERR_IO: a file could not be opened, read, written)

Every such exception has .status, the library's name of the code ("format", "invalid
argument", "i/o", "out of memory", "numeric", "cancelled", "internal"), and str() gives
the library's own wording (ist_error_format: "FILE:LINE: MESSAGE (system reason)").

Only functions the library exports (src/libisthmus.symbols) are called; the option
structures below mirror include/isthmus/*.h, and every *_opts_init() call is checked not
to write past the mirror, so a header that grew is caught instead of corrupting memory.
"""

import ctypes
import ctypes.util
import json
import os
import tempfile
import threading
import weakref

import numpy as np

from .errors import FormatError, IsthmusError, LibraryNotFound, MismatchError
from .maps import read_map
from .records import result_from_json

ENV_VAR = "ISTHMUS_LIBRARY"

# ist_status (include/isthmus/error.h)
IST_OK, IST_ERR_FORMAT, IST_ERR_INVALID, IST_ERR_CANCELLED = 0, 3, 4, 6
_CLASS_OF = {IST_ERR_FORMAT: FormatError, IST_ERR_INVALID: MismatchError}

_size, _u64, _bool, _int, _uint = (ctypes.c_size_t, ctypes.c_uint64, ctypes.c_bool,
                                   ctypes.c_int, ctypes.c_uint)
_cstr, _ptr = ctypes.c_char_p, ctypes.c_void_p


class _Error(ctypes.Structure):                 # ist_error
    _fields_ = [("code", _int), ("sys_errno", _int), ("file", ctypes.c_char * 256),
                ("line", _u64), ("offset", _u64), ("has_offset", _int),
                ("msg", ctypes.c_char * 512)]


class _CMatView(ctypes.Structure):              # ist_cmatview
    _fields_ = [("data", ctypes.POINTER(ctypes.c_float)), ("rows", _size), ("cols", _size),
                ("stride", _size)]


class _StoreOpts(ctypes.Structure):             # ist_store_opts
    _fields_ = [("max_rows", _size), ("verify", _bool), ("max_dim", _size),
                ("max_line", _size)]


class _RetrieveOpts(ctypes.Structure):          # ist_retrieve_opts
    _fields_ = [("budget", _size), ("threads", _uint)]


class _SearchOpts(ctypes.Structure):            # ist_search_opts
    _fields_ = [("csls_k", _size), ("retrieve", _RetrieveOpts)]


class _Round(ctypes.Structure):                 # ist_align_round
    _fields_ = [("round", _size), ("pairs", _size), ("mean_csls", ctypes.c_double),
                ("seed_cos", ctypes.c_double), ("orth_error", ctypes.c_double),
                ("kept", _bool)]


_ROUND_FN = ctypes.CFUNCTYPE(None, ctypes.POINTER(_Round), _ptr)


class _AlignOpts(ctypes.Structure):             # ist_align_opts
    _fields_ = [("source_norm", _cstr), ("target_norm", _cstr), ("refine_rounds", _size),
                ("refine_vocab", _size), ("refine_keep_seeds", _bool),
                ("min_gain", ctypes.c_double), ("min_seed_pairs", _size), ("search", _SearchOpts), ("on_round", _ROUND_FN),
                ("ctx", _ptr)]


_MAX_BANDS = 8                                  # IST_METRICS_MAX_BANDS


class _EvalOpts(ctypes.Structure):              # ist_eval_opts
    _fields_ = [("method", _int), ("band_edges", _size * (_MAX_BANDS - 1)), ("nedges", _size),
                ("bands_auto", _bool), ("keep_queries", _bool), ("search", _SearchOpts)]


class _DiagOpts(ctypes.Structure):              # ist_diag_opts
    _fields_ = [("k", _size), ("queries", _size), ("top_hubs", _size),
                ("hub_numbers", ctypes.c_bool),
                ("isometry_words", _size), ("isometry_k", _size), ("worst_misses", _size),
                ("random_pairs", _size), ("seed", _u64), ("search", _SearchOpts)]


class _CiOpts(ctypes.Structure):                # ist_ci_opts
    _fields_ = [("level", ctypes.c_double), ("resamples", _size), ("seed", _u64)]


class _EvaluateOpts(ctypes.Structure):          # ist_evaluate_opts
    _fields_ = [("eval", _EvalOpts), ("methods", _uint), ("stages", _uint),
                ("record_stages", _bool), ("allow_overlap", _bool), ("diagnostics", _bool),
                ("diag", _DiagOpts), ("ci", _CiOpts), ("command", _cstr), ("name", _cstr),
                ("source_path", _cstr), ("target_path", _cstr), ("map_path", _cstr),
                ("seeds_path", _cstr), ("seeds_label", _cstr), ("fit", _ptr),
                ("refined_xs", _ptr), ("refined_zt", _ptr)]


class _Coverage(ctypes.Structure):              # ist_pairs_coverage
    _fields_ = [(n, _size) for n in ("read", "kept", "duplicates", "missing_source",
                                     "missing_target", "missing_both", "sources_read",
                                     "sources_kept")] + [("source_exact", _bool),
                                                         ("target_exact", _bool)]


class _WordFilter(ctypes.Structure):            # ist_word_filter
    _fields_ = [("numbers", _bool), ("min_score", ctypes.c_float),
                ("stop_share", ctypes.c_double), ("variants", _bool)]


# IST_RESULT_COSINE / CSLS, IST_STAGE_SEED / REFINED, ist_retrieval, IST_FILTER_SHAPE
_METHODS = {"cosine": 1, "csls": 2, "both": 3}
_STAGES = {"refined": 2, "seed": 1, "both": 3}
_RETRIEVAL = {"cosine": 0, "csls": 1}
_FILTER_SHAPE, _SHAPE_WORD = 2, 0

# what tests/python/struct_layout.c checks against the headers
MIRRORS = {"ist_error": _Error, "ist_cmatview": _CMatView, "ist_store_opts": _StoreOpts,
           "ist_retrieve_opts": _RetrieveOpts, "ist_search_opts": _SearchOpts,
           "ist_align_opts": _AlignOpts, "ist_align_round": _Round, "ist_eval_opts": _EvalOpts,
           "ist_diag_opts": _DiagOpts, "ist_ci_opts": _CiOpts,
           "ist_evaluate_opts": _EvaluateOpts, "ist_pairs_coverage": _Coverage,
           "ist_word_filter": _WordFilter}
CONSTANTS = {"IST_OK": IST_OK, "IST_ERR_FORMAT": IST_ERR_FORMAT,
             "IST_ERR_INVALID": IST_ERR_INVALID, "IST_ERR_CANCELLED": IST_ERR_CANCELLED, "IST_METRICS_MAX_BANDS": _MAX_BANDS,
             "IST_FILTER_SHAPE": _FILTER_SHAPE, "IST_SHAPE_WORD": _SHAPE_WORD,
             "IST_RESULT_COSINE": _METHODS["cosine"], "IST_RESULT_CSLS": _METHODS["csls"],
             "IST_STAGE_SEED": _STAGES["seed"], "IST_STAGE_REFINED": _STAGES["refined"],
             "IST_RETRIEVAL_COSINE": _RETRIEVAL["cosine"],
             "IST_RETRIEVAL_CSLS": _RETRIEVAL["csls"]}

# name: (result type, argument types); every one is in src/libisthmus.symbols
_P = ctypes.POINTER
_SIGNATURES = {
    "ist_version": (_cstr, []),
    "ist_cancel_request": (None, []),
    "ist_cancel_reset": (None, []),
    "ist_status_name": (_cstr, [_int]),
    "ist_error_format": (_cstr, [_P(_Error), ctypes.c_char_p, _size]),
    "ist_store_opts_init": (None, [_ptr]),
    "ist_store_open": (_int, [_cstr, _P(_StoreOpts), _P(_ptr), _P(_Error)]),
    "ist_store_free": (None, [_ptr]),
    "ist_store_dim": (_size, [_ptr]),
    "ist_store_rows": (_size, [_ptr]),
    "ist_store_word": (_cstr, [_ptr, _size]),
    "ist_pairs_read": (_int, [_cstr, _P(_ptr), _P(_Error)]),
    "ist_pairs_new": (_int, [_P(_ptr), _P(_Error)]),
    "ist_pairs_add": (_int, [_ptr, _cstr, _cstr, _P(_Error)]),
    "ist_pairs_resolve": (_int, [_ptr, _ptr, _ptr, _P(_Coverage), _P(_Error)]),
    "ist_pairs_free": (None, [_ptr]),
    "ist_pairs_find_word": (_int, [_ptr, _cstr, _P(ctypes.c_ssize_t), _P(_Error)]),
    "ist_search_opts_init": (None, [_ptr]),
    "ist_align_opts_init": (None, [_ptr]),
    "ist_align_fit": (_int, [_ptr, _ptr, _ptr, _P(_AlignOpts), _P(_ptr), _P(_Error)]),
    "ist_map_load": (_int, [_cstr, _P(_ptr), _P(_Error)]),
    "ist_map_save": (_int, [_ptr, _cstr, _P(_Error)]),
    "ist_map_free": (None, [_ptr]),
    "ist_map_dim": (_size, [_ptr]),
    "ist_map_check": (_int, [_ptr, _ptr, _ptr, _P(_Error)]),
    "ist_map_apply": (_int, [_ptr, _ptr, _ptr, _P(_ptr), _P(_ptr), _P(_Error)]),
    "ist_map_save_mapped": (_int, [_ptr, _ptr, _ptr, _cstr, _P(_Error)]),
    "ist_matrix_new": (_int, [_size, _size, _P(_ptr), _P(_Error)]),
    "ist_matrix_free": (None, [_ptr]),
    "ist_matrix_cview": (_CMatView, [_ptr]),
    "ist_evaluate_opts_init": (None, [_ptr]),
    "ist_evaluate": (_int, [_ptr, _ptr, _ptr, _ptr, _P(_Coverage), _P(_EvaluateOpts),
                            _P(_ptr), _P(_Error)]),
    "ist_result_render": (_int, [_ptr, _P(ctypes.c_void_p), _P(_Error)]),
    "ist_result_free_text": (None, [ctypes.c_void_p]),
    "ist_result_write": (_int, [_ptr, _cstr, _P(_Error)]),
    "ist_result_free": (None, [_ptr]),
    "ist_retrieve_rank": (_int, [_CMatView, _CMatView, _CMatView, _int, _size, _size,
                                 _P(_RetrieveOpts), _P(_ptr), _P(_Error)]),
    "ist_topk_free": (None, [_ptr]),
    "ist_topk_index": (_P(ctypes.c_uint32), [_ptr, _size]),
    "ist_topk_score": (_P(ctypes.c_float), [_ptr, _size]),
    "ist_word_filter_init": (None, [_ptr]),
    "ist_word_filter_mark": (_int, [_P(_WordFilter), _ptr, _P(ctypes.c_ubyte), _uint, _ptr,
                                    _P(_Error)]),
    "ist_word_shape_of": (_int, [_cstr, _size]),
}

# the calls that may run long enough to be interrupted (they poll the library's stop flag)
_LONG = {"ist_store_open", "ist_align_fit", "ist_map_apply", "ist_evaluate",
         "ist_retrieve_rank", "ist_map_save", "ist_map_save_mapped", "ist_result_write"}

_HOW_TO_POINT = ("pass its path to isthmus.native.load(PATH), set %s=/path/to/libisthmus.so, "
                 "or install it where the system's linker finds it (meson install, then "
                 "ldconfig); a build tree has it at build/src/libisthmus.so" % ENV_VAR)


def _fs(path):
    return None if path is None else os.fsencode(path)


def _text(b):
    return b.decode("utf-8", "replace")


class Lookup:
    """The best target words of one source word: query (as asked), word (as the source
    vocabulary has it, normalised), rank (1-based frequency rank), retrieval ("csls" or
    "cosine"), candidates: a list of (target word, score) pairs, best first."""

    def __init__(self, query, word, rank, retrieval, candidates):
        self.query, self.word, self.rank = query, word, rank
        self.retrieval, self.candidates = retrieval, candidates

    def __repr__(self):
        return "<isthmus.Lookup %s (rank %d, %s): %s>" % (
            self.word, self.rank, self.retrieval,
            ", ".join("%s %.4f" % c for c in self.candidates[:5]))


class Library:
    """libisthmus loaded through ctypes. Build one with load()."""

    def __init__(self, path):
        try:
            self._lib = ctypes.CDLL(path)
        except OSError as e:
            raise LibraryNotFound("cannot load the isthmus C library %s (%s); %s"
                                  % (path, e, _HOW_TO_POINT)) from None
        self.path = path
        for name, (res, args) in _SIGNATURES.items():
            try:
                fn = getattr(self._lib, name)
            except AttributeError:
                raise LibraryNotFound("%s does not export %s: it is not a libisthmus this "
                                      "package knows; %s" % (path, name, _HOW_TO_POINT)) from None
            fn.restype, fn.argtypes = res, args
        self.version = _text(self._lib.ist_version())

    def __repr__(self):
        return "<isthmus.native.Library %s %s>" % (self.version, self.path)

    # --- plumbing -----------------------------------------------------------------------
    def _raise(self, err):
        buf = ctypes.create_string_buffer(1024)
        self._lib.ist_error_format(ctypes.byref(err), buf, len(buf))
        cls = _CLASS_OF.get(err.code, IsthmusError)
        path = _text(err.file) if err.file else None
        e = cls(_text(err.msg) or _text(self._lib.ist_status_name(err.code)), path,
                line=err.line or None, offset=err.offset if err.has_offset else None)
        e.status = _text(self._lib.ist_status_name(err.code))
        e.text = _text(buf.value)
        raise e

    def _call(self, name, *args):
        err = _Error()
        fn = getattr(self._lib, name)
        if name in _LONG and threading.current_thread() is threading.main_thread():
            status = self._interruptible(fn, args + (ctypes.byref(err),))
        else:
            status = fn(*args, ctypes.byref(err))
        if status != IST_OK:
            self._raise(err)

    def _interruptible(self, fn, args):
        """fn(*args) in a worker thread, so that Ctrl-C (KeyboardInterrupt, which Python
        raises only in the main thread and only between its own steps) reaches the main
        thread while the library works: it then asks the library to stop (the library's
        process-wide stop flag), waits for it to clean up, and raises KeyboardInterrupt."""
        box, done = [], threading.Event()

        def work():
            try:
                box.append((True, fn(*args)))
            except BaseException as e:          # a ctypes argument error, say
                box.append((False, e))
            done.set()

        self._lib.ist_cancel_reset()
        threading.Thread(target=work, daemon=True).start()
        try:
            while not done.wait(0.05):
                pass
        except KeyboardInterrupt:
            self._lib.ist_cancel_request()
            # the handles the call uses are released after it, so wait for it whatever
            # else is pressed meanwhile
            while True:
                try:
                    if done.wait(0.05):
                        break
                except KeyboardInterrupt:
                    pass
            self._lib.ist_cancel_reset()
            if box[0] == (True, IST_ERR_CANCELLED):
                raise KeyboardInterrupt("isthmus: the library stopped and removed the "
                                        "file it was writing, if any") from None
            raise
        ok, value = box[0]
        if not ok:
            raise value
        return value

    def _init(self, struct, name):
        """struct() filled by the library's NAME(); refused when the library writes past
        the end of the mirror (its header changed)."""
        pad = 256
        raw = (ctypes.c_ubyte * (ctypes.sizeof(struct) + pad))()
        ctypes.memset(raw, 0xA5, len(raw))
        getattr(self._lib, name)(raw)
        if any(b != 0xA5 for b in bytes(raw)[ctypes.sizeof(struct):]):
            raise LibraryNotFound("%s: %s fills more than the %d bytes this package expects; "
                                  "the library and the package are from different versions"
                                  % (self.path, name, ctypes.sizeof(struct)))
        return struct.from_buffer_copy(raw)

    def _stores(self, own, src, tgt):
        """Open both vector files as the program does (matrix checksum and finiteness
        checked), refuse different dimensions."""
        so = self._init(_StoreOpts, "ist_store_opts_init")
        so.verify = True
        handles = []
        for path in (src, tgt):
            h = _ptr()
            self._call("ist_store_open", _fs(path), ctypes.byref(so), ctypes.byref(h))
            own.append((self._lib.ist_store_free, h))
            handles.append(h)
        ds, dt = (self._lib.ist_store_dim(h) for h in handles)
        if ds != dt:
            raise MismatchError("%s has dimension %d but %s has %d" % (src, ds, tgt, dt))
        return handles

    def _pairs(self, own, what, pairs, s, t):
        """A pair list (a file, or (source, target) words) resolved against both stores,
        with its coverage; refused when no pair has both words."""
        p, cov = _ptr(), _Coverage()
        if isinstance(pairs, (str, bytes, os.PathLike)):
            self._call("ist_pairs_read", _fs(pairs), ctypes.byref(p))
            own.append((self._lib.ist_pairs_free, p))
            path = os.fsdecode(pairs)
        else:
            self._call("ist_pairs_new", ctypes.byref(p))
            own.append((self._lib.ist_pairs_free, p))
            for a, b in pairs:
                self._call("ist_pairs_add", p, a.encode(), b.encode())
            path = None
        self._call("ist_pairs_resolve", p, s, t, ctypes.byref(cov))
        if cov.kept == 0:
            if cov.read == 0:
                raise FormatError("the %s list holds no pair (only blank or comment lines)"
                                  % what, path)
            raise MismatchError("none of its %d pairs has both words in the vectors (%d "
                                "source, %d target and %d both words missing)"
                                % (cov.read, cov.missing_source, cov.missing_target,
                                   cov.missing_both), path)
        return p, cov, path

    def _map(self, own, m):
        """A map handle from a Map (the one align() returned keeps its own) or a path."""
        handle = getattr(m, "_native", None)
        if handle is not None and handle[0] is self:
            return handle[1], m.path
        path = m.path if hasattr(m, "W") else m
        h = _ptr()
        self._call("ist_map_load", _fs(path), ctypes.byref(h))
        own.append((self._lib.ist_map_free, h))
        return h, os.fsdecode(path)

    @staticmethod
    def _search(opts, csls_k, threads, memory_mib):
        if csls_k is not None:
            opts.csls_k = csls_k
        if threads is not None:
            opts.retrieve.threads = threads
        if memory_mib is not None:
            opts.retrieve.budget = memory_mib << 20

    @staticmethod
    def _free(own):
        for fn, h in reversed(own):
            fn(h)

    # --- the three jobs -----------------------------------------------------------------
    def align(self, src, tgt, seeds, output=None, mapped_out=None, standardise=None,
              refine_rounds=None, refine_vocab=None, refine_keep_seeds=False, min_seeds=None,
              csls_k=None, threads=None, memory_mib=None, on_round=None):
        """Fit a map from src onto tgt (vector files) on seed pairs (a pair file or a list
        of (source, target) words), refined as `isthmus align` refines it by default.
        output: write the map file there (atomically); mapped_out: also the mapped source
        vectors. Returns the Map (isthmus.read_map's object); its matrices are the ones
        the library fitted, bit for bit, and score()/lookup() take it as it is.
        on_round(dict) is called after each refinement round with the keys the map
        records for it (round, pairs, mean_csls, mean_cosine, orthogonality_error, kept);
        an exception it raises is printed and ignored, as ctypes does with callbacks."""
        own = []
        try:
            s, t = self._stores(own, src, tgt)
            p, _, _ = self._pairs(own, "seeds", seeds, s, t)
            ao = self._init(_AlignOpts, "ist_align_opts_init")
            if standardise is not None:
                ao.source_norm = ao.target_norm = standardise.encode()
            if refine_rounds is not None:
                ao.refine_rounds = refine_rounds
            if refine_vocab is not None:
                ao.refine_vocab = refine_vocab
            ao.refine_keep_seeds = refine_keep_seeds
            if min_seeds is not None:
                ao.min_seed_pairs = min_seeds
            self._search(ao.search, csls_k, threads, memory_mib)
            if on_round is not None:
                def report(r, _ctx):
                    r = r.contents
                    def num(x):
                        return None if x != x else x    # NaN: refit not run, as in the map
                    on_round({"round": r.round, "pairs": r.pairs, "mean_csls": r.mean_csls,
                              "mean_cosine": num(r.seed_cos),
                              "orthogonality_error": num(r.orth_error), "kept": r.kept})
                ao.on_round = _ROUND_FN(report)     # kept alive by ao until the call ends
            h = _ptr()
            self._call("ist_align_fit", s, t, p, ctypes.byref(ao), ctypes.byref(h))
            keep = [(self._lib.ist_map_free, h)]
            own.append(keep[0])
            if mapped_out is not None:
                xs = _ptr()
                self._call("ist_map_apply", h, s, t, ctypes.byref(xs), None)
                own.append((self._lib.ist_matrix_free, xs))
            if output is not None:
                self._call("ist_map_save", h, _fs(output))
                m = read_map(output)
            else:   # read back through a file of our own, then forget it
                with tempfile.TemporaryDirectory(prefix="isthmus-") as d:
                    tmp = os.path.join(d, "fitted.map")
                    self._call("ist_map_save", h, _fs(tmp))
                    m = read_map(tmp)
                m.path = None
            if mapped_out is not None:
                self._call("ist_map_save_mapped", h, s, xs, _fs(mapped_out))
            own.remove(keep[0])            # the Map owns the handle from here on
            m._native = (self, h)
            weakref.finalize(m, self._lib.ist_map_free, h)
            return m
        finally:
            self._free(own)

    def score(self, src, tgt, map, test, stage="refined", rank_by="both", csls_k=None,
              threads=None, memory_mib=None, bands=None, allow_overlap=False,
              diagnostics=False, json_out=None):
        """Precision@1/5/10 of the map on a test list (a pair file or (source, target)
        words), as `isthmus score` measures it: returns a Result (isthmus.read_result's
        object) with one run per stage and retrieval. stage: refined, seed or both;
        rank_by: cosine, csls or both; bands: upper frequency ranks (default: the first
        tenth and third of the source rows); diagnostics: also hubness, isometry and the
        rest (the program computes them only for --json-out); json_out: also write the
        result JSON there."""
        if stage == "final":
            raise ValueError("stage: 'final' is now called 'refined'")
        if stage not in _STAGES or rank_by not in _METHODS:
            raise ValueError("stage: refined, seed or both; rank_by: cosine, csls or both")
        own = []
        try:
            h, mpath = self._map(own, map)
            s, t = self._stores(own, src, tgt)
            self._call("ist_map_check", h, s, t)
            p, cov, tpath = self._pairs(own, "test", test, s, t)
            eo = self._init(_EvaluateOpts, "ist_evaluate_opts_init")
            self._search(eo.eval.search, csls_k, threads, memory_mib)
            if bands is not None:
                if len(bands) > _MAX_BANDS - 1 or list(bands) != sorted(set(bands)) or \
                        min(bands, default=1) < 1:
                    raise ValueError("bands: at most %d increasing ranks from 1"
                                     % (_MAX_BANDS - 1))
                eo.eval.bands_auto = False
                eo.eval.nedges = len(bands)
                for i, b in enumerate(bands):
                    eo.eval.band_edges[i] = b
            eo.methods = _METHODS[rank_by]
            eo.allow_overlap = allow_overlap
            eo.diagnostics = diagnostics
            eo.command = b"score"
            eo.stages = _STAGES[stage]
            eo.source_path, eo.target_path = _fs(src), _fs(tgt)
            eo.map_path = _fs(mpath)
            res = _ptr()
            self._call("ist_evaluate", h, s, t, p, ctypes.byref(cov), ctypes.byref(eo),
                       ctypes.byref(res))
            own.append((self._lib.ist_result_free, res))
            if json_out is not None:
                self._call("ist_result_write", res, _fs(json_out))
            text = ctypes.c_void_p()
            self._call("ist_result_render", res, ctypes.byref(text))
            try:
                data = ctypes.string_at(text.value).decode("utf-8")
            finally:
                self._lib.ist_result_free_text(text)
            return result_from_json(json.loads(data), json_out or tpath or "(score)")
        finally:
            self._free(own)

    def lookup(self, src, tgt, map, words, top=10, rank_by="csls", numbers=False,
               variants=True, stop_share=None, min_score=None, csls_k=None, threads=None,
               memory_mib=None):
        """The best target words of each source word under the map, as `isthmus lookup`
        shows them (the same review filters: numbers and codes, likely misspellings,
        frequent function words and scores below 0 left out by default; stop_share is a
        fraction, 0.005 for the program's 0.5%). A word not in the source vectors raises
        MismatchError. Returns one Lookup per word, in order."""
        if isinstance(words, str):
            words = [words]
        if rank_by not in _RETRIEVAL:
            raise ValueError("rank_by: cosine or csls")
        if not 1 <= top <= 1000:
            raise ValueError("top: 1..1000")
        own = []
        try:
            h, _ = self._map(own, map)
            s, t = self._stores(own, src, tgt)
            self._call("ist_map_check", h, s, t)
            wf = self._init(_WordFilter, "ist_word_filter_init")
            wf.numbers, wf.variants = numbers, variants
            if stop_share is not None:
                wf.stop_share = stop_share
            if min_score is not None:
                wf.min_score = min_score
            nt = self._lib.ist_store_rows(t)
            hide = (ctypes.c_ubyte * (nt + 1))()
            self._call("ist_word_filter_mark", ctypes.byref(wf), t, hide, 0, None)
            rows = []
            for w in words:
                r = ctypes.c_ssize_t()
                self._call("ist_pairs_find_word", s, w.encode(), ctypes.byref(r))
                if r.value < 0:
                    raise MismatchError("'%s' is not in the source vectors" % w)
                rows.append(r.value)
            if not rows:
                return []
            xs, zt, q = _ptr(), _ptr(), _ptr()
            self._call("ist_map_apply", h, s, t, ctypes.byref(xs), ctypes.byref(zt))
            own += [(self._lib.ist_matrix_free, xs), (self._lib.ist_matrix_free, zt)]
            dim = self._lib.ist_map_dim(h)
            self._call("ist_matrix_new", len(rows), dim, ctypes.byref(q))
            own.append((self._lib.ist_matrix_free, q))
            xv, qv = self._lib.ist_matrix_cview(xs), self._lib.ist_matrix_cview(q)
            xa = np.ctypeslib.as_array(xv.data, (xv.rows, xv.stride))
            qa = np.ctypeslib.as_array(qv.data, (qv.rows, qv.stride))
            qa[:, :dim] = xa[rows, :dim]
            # the search group of the program: its defaults, then the options given
            search = self._init(_SearchOpts, "ist_search_opts_init")
            self._search(search, csls_k, threads, memory_mib)
            depth = min(top + 64, nt)
            tk = _ptr()
            self._call("ist_retrieve_rank", qv, xv, self._lib.ist_matrix_cview(zt),
                       _RETRIEVAL[rank_by], depth, search.csls_k, ctypes.byref(search.retrieve),
                       ctypes.byref(tk))
            own.append((self._lib.ist_topk_free, tk))
            out = []
            for k, (w, r) in enumerate(zip(words, rows)):
                qw = self._lib.ist_store_word(s, r)
                # a number or a code asked for gets numbers and codes as candidates
                skip = 0xFF if self._lib.ist_word_shape_of(qw, len(qw)) == _SHAPE_WORD else \
                    0xFF & ~_FILTER_SHAPE
                ix, sc = self._lib.ist_topk_index(tk, k), self._lib.ist_topk_score(tk, k)
                cands = []
                for a in range(depth):
                    if len(cands) >= top or ix[a] == 0xFFFFFFFF or sc[a] < wf.min_score:
                        break
                    cw = self._lib.ist_store_word(t, ix[a])
                    if hide[ix[a]] & skip and cw != qw:
                        continue
                    cands.append((_text(cw), sc[a]))
                out.append(Lookup(w, _text(qw), r + 1, rank_by, cands))
            return out
        finally:
            self._free(own)


def find_library(path=None):
    """Where the library is: path, else $ISTHMUS_LIBRARY, else ctypes.util.find_library;
    LibraryNotFound saying how to point at it when none is given or found."""
    if path:
        return os.fspath(path)
    if os.environ.get(ENV_VAR):
        return os.environ[ENV_VAR]
    found = ctypes.util.find_library("isthmus")
    if found:
        return found
    raise LibraryNotFound("the isthmus C library was not found; " + _HOW_TO_POINT)


_loaded = {}


def load(path=None):
    """The Library at find_library(path), loaded once per path."""
    where = find_library(path)
    if where not in _loaded:
        _loaded[where] = Library(where)
    return _loaded[where]
