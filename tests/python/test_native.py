#!/usr/bin/python3
"""isthmus.native (the C library through ctypes) against the isthmus program, printed as TAP.

usage: test_native.py ISTHMUS STRUCT_LAYOUT SOURCE_ROOT WORKDIR
with ISTHMUS_LIBRARY naming the built libisthmus (tests/meson.build sets it).

On the demo corpora (data-samples/, the invented shop) it trains small vectors once with the
program (skip-gram, dimension 24, one thread, a fixed seed: about two seconds), then checks
that align, score and lookup through ctypes give what the program gives: the same map file
byte for byte, the same result record, the same candidates; and that damaged inputs raise
the package's exceptions with the very message the program prints. Every figure compared
is one the program printed or wrote in the same run, never a constant.

Skipped (exit 77) without numpy. Under AddressSanitizer the sanitizer runtime must be the
first library of the process, which /usr/bin/python3 is not built with: the test then runs
itself again with the runtimes the library links preloaded (LD_PRELOAD). The leak checker
stays on (as the environment sets it), with two frames kept per allocation so that
tests/python/lsan-python.supp can pass over what the interpreter and numpy hold at exit by
the allocating module alone: a handle of the library that the package forgets to release
is still a leak. When the runtime cannot be preloaded the test is skipped (exit 77)."""
import _thread
import ctypes
import os
import re
import shutil
import subprocess
import sys
import time

try:
    import numpy as np
except ImportError:
    print("1..0 # SKIP numpy is missing (Debian package python3-numpy)")
    sys.exit(77)

isthmus_exe, layout_exe, root, work = [os.path.abspath(a) for a in sys.argv[1:5]]
lib_path = os.environ.get("ISTHMUS_LIBRARY", "")
if not lib_path:
    print("1..0 # SKIP ISTHMUS_LIBRARY is not set (run through meson test)")
    sys.exit(77)


def sanitizer_runtimes(path):
    """The sanitizer runtimes the library was linked with, as ldd resolves them."""
    p = subprocess.run(["ldd", path], capture_output=True, text=True)
    return [m.group(1) for m in re.finditer(r"lib(?:a|ub)san\.so[.\d]* => (\S+)", p.stdout)]


runtimes = sanitizer_runtimes(lib_path)
if runtimes and os.environ.get("ISTHMUS_NATIVE_PRELOADED") != "1":
    supp = os.path.join(os.path.dirname(os.path.abspath(__file__)), "lsan-python.supp")
    saved = {"ISTHMUS_NATIVE_SAVED_" + k: os.environ.get(k, "(unset)")
             for k in ("LD_PRELOAD", "ASAN_OPTIONS", "LSAN_OPTIONS")}
    env = dict(os.environ, ISTHMUS_NATIVE_PRELOADED="1", **saved,
               LD_PRELOAD=" ".join(runtimes + [os.environ.get("LD_PRELOAD", "")]).strip(),
               ASAN_OPTIONS=os.environ.get("ASAN_OPTIONS", "") + ":malloc_context_size=2",
               LSAN_OPTIONS=os.environ.get("LSAN_OPTIONS", "") + ":suppressions=" + supp)
    os.execve(sys.executable, [sys.executable] + sys.argv, env)


def program_env():
    """The environment the program runs in: this process's, without the runtimes preloaded
    and the sanitizer options changed for Python above, so that the program runs as the cli
    suite runs it (a preloaded runtime made LeakSanitizer report, now and then, a block of
    glibc's pthread_getattr_np in the program)."""
    env = dict(os.environ)
    for k in ("LD_PRELOAD", "ASAN_OPTIONS", "LSAN_OPTIONS"):
        v = env.pop("ISTHMUS_NATIVE_SAVED_" + k, None)
        if v is None:
            continue
        if v == "(unset)":
            env.pop(k, None)
        else:
            env[k] = v
    return env


if runtimes:
    with open("/proc/self/maps") as f:
        if "asan" not in f.read():
            print("1..0 # SKIP the library is built with AddressSanitizer and its runtime "
                  "could not be preloaded into %s" % sys.executable)
            sys.exit(77)

sys.dont_write_bytecode = True          # leave no __pycache__ in the source tree
sys.path.insert(0, os.path.join(root, "tools", "python"))
import isthmus  # noqa: E402
from isthmus import native  # noqa: E402

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
from tap import Tap  # noqa: E402
tap = Tap("python-native")
check = tap.check


def run(*args, ok=(0,)):
    p = subprocess.run([isthmus_exe] + list(args), cwd=work, capture_output=True, text=True,
                       env=program_env())
    if p.returncode not in ok:
        sys.exit("isthmus %s: exit %d\n%s" % (" ".join(args), p.returncode, p.stderr))
    return p


def c_message(*args):
    """Exit status and the first message of a failing command, without 'isthmus CMD: '."""
    p = subprocess.run([isthmus_exe] + list(args), cwd=work, capture_output=True, text=True,
                       env=program_env())
    lines = [ln for ln in p.stderr.splitlines() if ln.startswith("isthmus ")]
    return p.returncode, re.sub(r"^isthmus [a-z-]+: ", "", lines[0] if lines else "")


def raised(fn, *args, **kw):
    try:
        fn(*args, **kw)
    except isthmus.IsthmusError as e:
        return e
    return None


shutil.rmtree(work, ignore_errors=True)
os.makedirs(work)
os.chdir(work)
data = os.path.join(root, "data-samples")
seeds = os.path.join(data, "demo-seed.pairs")
test = os.path.join(data, "demo-test.pairs")

# --- the library is optional ------------------------------------------------------------
saved, saved_find = os.environ.pop("ISTHMUS_LIBRARY"), native.ctypes.util.find_library
native.ctypes.util.find_library = lambda name: None
e = raised(native.load)
native.ctypes.util.find_library = saved_find
os.environ["ISTHMUS_LIBRARY"] = saved
check(isinstance(e, isthmus.LibraryNotFound) and "ISTHMUS_LIBRARY" in str(e) and
      "native.load(PATH)" in str(e),
      "without a library the heavy calls say how to point at it", e)
e = raised(native.load, os.path.join(work, "no-such-libisthmus.so"))
check(isinstance(e, isthmus.LibraryNotFound) and "no-such-libisthmus.so" in str(e) and
      "ISTHMUS_LIBRARY" in str(e), "a wrong path names itself and the way out", e)
probe = ("import sys; sys.path.insert(0, sys.argv[1]); from isthmus import native; "
         "print(native.load().version)")
env = {k: v for k, v in os.environ.items() if k != "ISTHMUS_LIBRARY"}
env["LD_LIBRARY_PATH"] = os.path.dirname(lib_path)
p = subprocess.run([sys.executable, "-c", probe, os.path.join(root, "tools", "python")],
                   capture_output=True, text=True, env=env)
check(p.returncode == 0 and re.fullmatch(r"\d+\.\d+\.\d+\n", p.stdout),
      "without ISTHMUS_LIBRARY the library is found by name where the linker looks "
      "(ctypes.util.find_library, here through LD_LIBRARY_PATH)", p.stdout + p.stderr)
lib = native.load()
check(lib.path == lib_path and re.fullmatch(r"\d+\.\d+\.\d+", lib.version),
      "the library is found through ISTHMUS_LIBRARY (%s)" % lib)

# --- the mirrors of the option structures against the compiler's layout -------------------
layout = dict(ln.rsplit(" ", 1) for ln in subprocess.run(
    [layout_exe], capture_output=True, text=True, check=True).stdout.splitlines())
wrong = []
for cname, mirror in native.MIRRORS.items():
    if int(layout.pop("%s size" % cname)) != ctypes.sizeof(mirror):
        wrong.append("%s: size %d in C" % (cname, ctypes.sizeof(mirror)))
    for fname, _ in mirror._fields_:
        key = "%s.%s" % (cname, fname)
        if key in layout and int(layout.pop(key)) != getattr(mirror, fname).offset:
            wrong.append(key)
for name, value in native.CONSTANTS.items():
    if int(layout.pop(name)) != value:
        wrong.append(name)
members = [k for k in layout if "." in k]
check(not wrong and not members, "every mirrored structure has the size and member offsets "
      "of include/isthmus/*.h, the status codes and flags their values", wrong + members)

# --- demo vectors, trained once ------------------------------------------------------------
for lang in ("en", "es"):
    run("prepare", "-o", lang + ".prep", os.path.join(data, "tillwick-%s.txt.gz" % lang))
    run("train", "--method=skip-gram", "--dimension=24", "--passes=5", "--threads=1",
        "--seed=7", "-o", lang + ".isv", lang + ".prep")

# the readers need no library
check(isthmus.open_vectors("en.isv", verify=True).dim == 24, "the readers keep working "
      "beside the native calls")

# --- align ---------------------------------------------------------------------------------
run("align", "en.isv", "es.isv", "--seeds=" + seeds, "-o", "cli.map", "--mapped-out=cli.isv")
m = lib.align("en.isv", "es.isv", seeds, output="py.map", mapped_out="py.isv")
cli_map = isthmus.read_map("cli.map")
same_file = open("py.map", "rb").read() == open("cli.map", "rb").read()
check(same_file and np.array_equal(m.W, cli_map.W) and np.array_equal(m.W0, cli_map.W0),
      "align through ctypes writes the map 'isthmus align' writes, byte for byte "
      "(W and the seed-only W0 bitwise equal)")
check(len(m.rounds) == len(cli_map.rounds) > 0 and m.rounds == cli_map.rounds,
      "with the program's default refinement (%d rounds recorded)" % len(m.rounds))
a, b = isthmus.open_vectors("py.isv"), isthmus.open_vectors("cli.isv")
check(np.array_equal(a.matrix, b.matrix) and a.words == b.words,
      "the mapped source vectors equal those of 'align --mapped-out' bitwise")
mem = lib.align("en.isv", "es.isv", seeds)
check(mem.path is None and np.array_equal(mem.W, cli_map.W),
      "a map fitted in memory (no output file) is the same map")
with open(seeds, encoding="utf-8") as f:
    listed = [tuple(ln.split()) for ln in f if ln.strip() and not ln.startswith("#")]
fromlist = lib.align("en.isv", "es.isv", listed)
check(np.array_equal(fromlist.W, cli_map.W), "seed pairs given as a Python list give the "
      "same map as the file (%d pairs)" % len(listed))
seen = []
lib.align("en.isv", "es.isv", seeds, on_round=seen.append)
check(seen == cli_map.rounds, "on_round reports each refinement round as the map records "
      "it (%d rounds)" % len(seen), "%s\n%s" % (seen, cli_map.rounds))
one, two = (lib.align("en.isv", "es.isv", seeds, threads=n) for n in (1, 2))
check(np.array_equal(one.W, two.W) and np.array_equal(one.W, cli_map.W),
      "threads=1 and threads=2 fit the same map bitwise")


def stop_after_first_round(r):
    """Ctrl-C while the library refines: then wait until the main thread has passed the
    stop on to the library, so that the next round's search sees it."""
    seen.append(r)
    if len(seen) == 1:
        _thread.interrupt_main()
        for _ in range(3000):
            if lib._lib.ist_cancel_requested():
                break
            time.sleep(0.01)


seen = []
try:
    lib.align("en.isv", "es.isv", seeds, output="stopped.map", mapped_out="stopped.isv",
              on_round=stop_after_first_round)
    stopped = "no KeyboardInterrupt"
except KeyboardInterrupt as e:
    stopped = str(e)
left = [f for f in os.listdir(".") if f.startswith((".stopped", "stopped"))]
check("the library stopped" in stopped and len(seen) == 1 and not left,
      "Ctrl-C during align reaches the library: it stops after the round under way, "
      "KeyboardInterrupt, no file and no temporary left", "%s; rounds %d; %s"
      % (stopped, len(seen), left))
check(not lib._lib.ist_cancel_requested() and
      np.array_equal(lib.align("en.isv", "es.isv", seeds).W, cli_map.W),
      "the stop is cleared: the next call fits the whole map again")
r1 = lib.align("en.isv", "es.isv", seeds, refine_rounds=0)
run("align", "en.isv", "es.isv", "--seeds=" + seeds, "--refine-rounds=0", "-o", "cli0.map")
check(np.array_equal(r1.W, isthmus.read_map("cli0.map").W) and not r1.rounds,
      "refine_rounds=0 is --refine-rounds=0: Procrustes alone")

# --- score ---------------------------------------------------------------------------------
out = run("score", "en.isv", "es.isv", "--map=cli.map", "--test=" + test, "--stage=both",
          "--json-out=cli-result.json").stdout
# a row: map, retrieval, queries, coverage, then each p@k in percent with its interval beside
table = [f for f in (ln.split() for ln in out.splitlines())
         if len(f) == 13 and f[0] in ("seed", "refined") and f[3].endswith("%")]
res = lib.score("en.isv", "es.isv", "cli.map", test, stage="both", diagnostics=True,
                json_out="py-result.json")
have = []
for r in res.runs:
    row = [r.label, r.retrieval, str(r.queries), "%.1f%%" % (100 * r.coverage)]
    for k in (1, 5, 10):
        lo, hi = r.ci.bounds[k]
        row += ["%.1f%%" % (100 * r.precision[k]), "[%.1f," % (100 * lo), "%.1f]" % (100 * hi)]
    have.append(row)
check(len(table) == 4 and have == table,
      "score through ctypes: p@1/5/10 and their intervals by cosine and CSLS, both stages, "
      "as the program printed them", "printed %s\nctypes  %s" % (table, have))
cli_res = isthmus.read_result("cli-result.json")
check(res.data == cli_res.data and res.data["diagnostics"],
      "the whole result record equals the program's --json-out: figures, intervals, "
      "per-query places, diagnostics, inputs")
check(open("py-result.json", "rb").read() == open("cli-result.json", "rb").read(),
      "json_out writes the file the program writes, byte for byte")
check(lib.score("en.isv", "es.isv", "cli.map", test, threads=1, stage="both").runs ==
      lib.score("en.isv", "es.isv", "cli.map", test, threads=2, stage="both").runs,
      "threads=1 and threads=2 score the same, per-query places and intervals included")
csls = res.run("csls")
print("# refined csls: %d queries, p@1 %.3f, p@5 %.3f, p@10 %.3f" % (
    csls.queries, csls.precision[1], csls.precision[5], csls.precision[10]))
mine = lib.score("en.isv", "es.isv", m, test)
check([r.precision for r in mine.runs] == [r.precision for r in res.runs[2:]] and
      [r.retrieval for r in mine.runs] == ["cosine", "csls"],
      "the Map align() returned scores as its file does (stage refined by default)")
out = run("score", "en.isv", "es.isv", "--map=cli.map", "--test=" + test, "--rank-by=cosine",
          "--bands=100,1000", "--csls-k=5").stdout
bands = [f[:4] + [t for t in f[4:] if t.endswith("%")]
         for f in (ln.split() for ln in out.splitlines())
         if len(f) >= 7 and f[:2] == ["refined", "cosine"] and
         re.fullmatch(r"\d+(-\d+|\+)", f[2])]
r = lib.score("en.isv", "es.isv", "cli.map", test, rank_by="cosine", bands=[100, 1000],
              csls_k=5)
mine = [["refined", "cosine", "%d-%s" % (bd.rank_from, bd.rank_to) if bd.rank_to else
         "%d+" % bd.rank_from, str(bd.queries)] + ["%.1f%%" % (100 * bd.precision[k])
                                                   for k in (1, 5, 10)]
        for bd in r.runs[0].bands if bd.queries]
check(len(r.runs) == 1 and mine == bands and len(bands) == 3,
      "rank_by, bands and csls_k are --rank-by, --bands and --csls-k", "%s\n%s" % (bands, mine))

# --- lookup --------------------------------------------------------------------------------
en = isthmus.open_vectors("en.isv")
number = next(w for w in en.words[:300] if re.fullmatch(r"\d+", w))
words = ["kettle", "blue", "rusty", "Lamp", number]


def printed_lookup(text):
    """The program's table (query, place, candidate, score, count) as one block per query."""
    blocks = []
    for ln in text.splitlines()[1:]:
        cand = re.match(r"(\S+)\s+(\d+)  (\S+)\s+(-?\d+\.\d{4})\s+(\d+|-)$", ln)
        if not cand:
            continue
        if not blocks or blocks[-1][0] != cand.group(1) or cand.group(2) == "1":
            blocks.append((cand.group(1), []))
        blocks[-1][1].append((cand.group(3), cand.group(4)))
    return blocks


def ours(found):
    return [(x.query, [(w, "%.4f" % s) for w, s in x.candidates]) for x in found]


for extra, kw in (([], {}), (["--rank-by=cosine", "--top=7"], {"rank_by": "cosine", "top": 7}),
                  (["--with-numbers", "--with-variants", "--stop-share=0", "--min-score=-1"],
                   {"numbers": True, "variants": False, "stop_share": 0, "min_score": -1})):
    want = printed_lookup(run("lookup", "en.isv", "es.isv", "--map=cli.map", *extra,
                              *words).stdout)
    got = ours(lib.lookup("en.isv", "es.isv", "cli.map", words, **kw))
    check(want == got and len(want) == len(words) and all(b[1] for b in want),
          "lookup through ctypes gives the candidates and scores 'isthmus lookup %s' prints"
          % " ".join(extra + ["..."]), "printed %s\nctypes  %s" % (want, got))
print("# " + repr(lib.lookup("en.isv", "es.isv", m, ["kettle"], top=3)[0]))
# the program names the word and goes on (exit 1 only when no word was found)
rc, cmsg = c_message("lookup", "en.isv", "es.isv", "--map=cli.map", "zzqx")
e = raised(lib.lookup, "en.isv", "es.isv", "cli.map", ["kettle", "zzqx"])
check(rc == 1 and isinstance(e, isthmus.MismatchError) and cmsg.startswith(str(e) + " ("),
      "a word not in the source vectors: MismatchError, the program's words", "%s\n%s" % (e, cmsg))

# --- the library's errors as the package's exceptions -------------------------------------
good = open("en.isv", "rb").read()


def damaged(name, body):
    with open(name, "wb") as f:
        f.write(body)
    return name


flipped = bytearray(good)
flipped[300] ^= 0x40
cases = [
    ("a flipped matrix byte", damaged("flip.isv", bytes(flipped)), isthmus.FormatError, "format"),
    ("a truncated file", damaged("cut.isv", good[:-100]), isthmus.FormatError, "format"),
    ("not a number in a text table", damaged("bad.txt", b"cup 1 2\nmug 3 x\n"),
     isthmus.FormatError, "format"),
    ("a missing file", "absent.isv", isthmus.IsthmusError, "i/o"),
]
for what, name, cls, status in cases:
    rc, cmsg = c_message("align", name, "es.isv", "--seeds=" + seeds, "-o", "x.map")
    e = raised(lib.align, name, "es.isv", seeds, output="x.map")
    check(rc == 1 and type(e) is cls and e.status == status and str(e) == cmsg and
          e.path == name and not os.path.exists("x.map"),
          "corrupt vectors (%s): %s with the program's message, no map written"
          % (what, cls.__name__), "C: %s\nPython: %r %s" % (cmsg, e, e))
fe = raised(lib.align, "flip.isv", "es.isv", seeds)
check(fe.offset is not None or fe.line is not None or "checksum" in fe.message,
      "the exception keeps the file and where in it: %s" % fe)
e = raised(lib.score, "flip.isv", "es.isv", "cli.map", test)
rc, cmsg = c_message("score", "flip.isv", "es.isv", "--map=cli.map", "--test=" + test)
check(isinstance(e, isthmus.FormatError) and str(e) == cmsg, "score says the same of them")
damaged("bad.pairs", open(seeds, "rb").read() + b"lonely\n")
rc, cmsg = c_message("align", "en.isv", "es.isv", "--seeds=bad.pairs", "-o", "x.map")
e = raised(lib.align, "en.isv", "es.isv", "bad.pairs")
check(rc == 1 and isinstance(e, isthmus.FormatError) and str(e) == cmsg and e.line,
      "a pair file with a one-word line: FormatError naming the line, as the program",
      "C: %s\nPython: %s" % (cmsg, e))
cut_map = damaged("cut.map", open("cli.map", "rb").read()[:-10])
rc, cmsg = c_message("score", "en.isv", "es.isv", "--map=cut.map", "--test=" + test)
e = raised(lib.score, "en.isv", "es.isv", cut_map, test)
check(rc == 1 and isinstance(e, isthmus.FormatError) and str(e) == cmsg,
      "a damaged map file: FormatError, the program's message", "C: %s\nPython: %s" % (cmsg, e))
rc, cmsg = c_message("score", "es.isv", "en.isv", "--map=cli.map", "--test=" + test)
e = raised(lib.score, "es.isv", "en.isv", "cli.map", test)
check(rc == 1 and isinstance(e, isthmus.MismatchError) and e.status == "invalid argument" and
      str(e) == cmsg, "vectors the map was not fitted on: MismatchError, the program's "
      "message", "C: %s\nPython: %s" % (cmsg, e))
e = raised(lib.score, "en.isv", "es.isv", "cli.map", seeds)
check(isinstance(e, isthmus.MismatchError) and "seed" in str(e),
      "a test list sharing the seeds' source words is refused (MismatchError): %s" % e)
check(len(lib.score("en.isv", "es.isv", "cli.map", seeds, allow_overlap=True).runs) == 2,
      "...and scored with allow_overlap=True, as --allow-overlap")
small = isthmus.open_vectors("en.isv")
isthmus.write_text("half.txt", small.words, np.ascontiguousarray(small.matrix[:, :12]))
rc, cmsg = c_message("align", "half.txt", "es.isv", "--seeds=" + seeds, "-o", "x.map")
e = raised(lib.align, "half.txt", "es.isv", seeds)
check(rc == 1 and isinstance(e, isthmus.MismatchError) and str(e) == cmsg,
      "vectors of different dimensions: the program's message", "C: %s\nPython: %s" % (cmsg, e))

sys.exit(tap.end())
