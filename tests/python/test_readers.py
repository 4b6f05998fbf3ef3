#!/usr/bin/python3
"""The Python readers (tools/python/isthmus) against the C library and the isthmus program,
printed as TAP. Skipped (exit 77) when numpy is missing.

usage: test_readers.py ISTHMUS DUMP_VECTORS SOURCE_ROOT WORKDIR

The spaces are synthetic: a random source table and a target that is a known random rotation
of it plus noise, so the map is far from the identity and precision is not perfect; the
figures checked here are the ones the program printed in the same run, never constants."""
import os
import re
import shutil
import subprocess
import sys

try:
    import numpy as np
except ImportError:
    print("1..0 # SKIP numpy is missing (Debian package python3-numpy)")
    sys.exit(77)

isthmus_exe, dump_exe, root, work = [os.path.abspath(a) for a in sys.argv[1:5]]
sys.dont_write_bytecode = True          # leave no __pycache__ in the source tree
sys.path.insert(0, os.path.join(root, "tools", "python"))
import isthmus  # noqa: E402

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
from tap import Tap  # noqa: E402
tap = Tap("python-readers")
check = tap.check


def run(*args, ok=(0,)):
    p = subprocess.run([isthmus_exe] + list(args), cwd=work, capture_output=True, text=True)
    if p.returncode not in ok:
        sys.exit("isthmus %s: exit %d\n%s" % (" ".join(args), p.returncode, p.stderr))
    return p


def c_message(args):
    """The message the program prints for a failing command, without 'isthmus CMD: '."""
    p = subprocess.run([isthmus_exe] + args, cwd=work, capture_output=True, text=True)
    first = p.stderr.splitlines()[0] if p.stderr else ""
    return p.returncode, re.sub(r"^isthmus [a-z-]+: ", "", first)


def py_message(fn, *args, **kw):
    try:
        fn(*args, **kw)
    except isthmus.IsthmusError as e:
        return str(e)
    return "(no error raised)"


def dump(path):
    """What the C reader holds: fingerprint, words, counts, float bits."""
    p = subprocess.run([dump_exe, path], capture_output=True, text=True, cwd=work)
    if p.returncode != 0:
        sys.exit("dump_vectors %s: %s" % (path, p.stderr))
    lines = p.stdout.splitlines()
    fp = int(lines[0].split()[1], 16)
    words, counts, bits = [], [], []
    for line in lines[1:]:
        f = line.split(" ")
        words.append(f[0])
        counts.append(int(f[1]))
        bits.append([int(x, 16) for x in f[2:]])
    return fp, words, np.array(counts, dtype=np.uint64), np.array(bits, dtype=np.uint32)


def same_as_c(v, path):
    fp, words, counts, bits = dump(path)
    got = np.ascontiguousarray(v.matrix).view(np.uint32)
    return (fp == v.fingerprint and words == v.words and np.array_equal(counts, v.counts)
            and got.shape == bits.shape and np.array_equal(got, bits))


# --- synthetic spaces -----------------------------------------------------------------
shutil.rmtree(work, ignore_errors=True)
os.makedirs(work)
os.chdir(work)
rng = np.random.default_rng(20261202)
rows, dim = 600, 24
src = rng.standard_normal((rows, dim)).astype(np.float32)
src[:, 0] += 0.5                                  # a common direction, so centring matters
q, _ = np.linalg.qr(rng.standard_normal((dim, dim)))
tgt = (src @ q + 1.4 * rng.standard_normal((rows, dim))).astype(np.float32)
src_words = ["s%03d" % i for i in range(rows)]
tgt_words = ["t%03d" % i for i in range(rows)]
src_words[7] = "té"                               # a word beyond ASCII
isthmus.write_text(os.path.join(work, "src.txt"), src_words, src)
isthmus.write_text(os.path.join(work, "tgt.txt"), tgt_words, tgt, header=True, compress=True)
with open(os.path.join(work, "seeds.pairs"), "w") as f:
    for i in range(0, 200):
        f.write("%s\t%s\n" % (src_words[i], tgt_words[i]))
with open(os.path.join(work, "test.pairs"), "w") as f:
    for i in range(200, 320):
        f.write("%s %s\n" % (src_words[i], tgt_words[i]))
    f.write("absent t001\n")
run("convert", "src.txt", "src.isv")
run("convert", "tgt.txt", "tgt.isv")
run("align", "src.isv", "tgt.isv", "--seeds=seeds.pairs", "-o", "syn.map",
    "--mapped-out=mapped.isv")

# --- vectors --------------------------------------------------------------------------
p = os.path.join(work, "src.isv")
v = isthmus.open_vectors(p, verify=True)
check(same_as_c(v, p), "a native file read in Python equals the C reader bit for bit "
      "(words, counts, every float, fingerprint)")
mm = v.matrix
while mm is not None and not isinstance(mm, np.memmap):
    mm = mm.base
check(isinstance(mm, np.memmap) and not v.matrix.flags.owndata and not v.matrix.flags.writeable,
      "the matrix is a read-only view into a numpy.memmap (nothing copied)")
t = isthmus.open_vectors(os.path.join(work, "src.txt"))
check(same_as_c(t, os.path.join(work, "src.txt")),
      "a text table read in Python equals the C reader bit for bit, fingerprint included")
tz = isthmus.open_vectors(os.path.join(work, "tgt.txt"))
check(same_as_c(tz, os.path.join(work, "tgt.txt")) and tz.rows == rows,
      "a gzip text table with a 'ROWS DIM' header: the same")
check(np.array_equal(t.matrix, src) and t.words == src_words,
      "write_text then the C reader gives back the very float32 bits written")
check(v["té"].tolist() == src[7].tolist() and "té" in v and "nope" not in v,
      "words look up their rows")

run("prepare", "--min-freq=1", "-o", "tiny.prep", os.path.join(root, "data-samples", "tiny-en.txt"))
run("train", "--method=skip-gram", "--dimension=8", "--threads=1", "--passes=2", "-o",
    "tiny.isv", "tiny.prep")
tv = isthmus.open_vectors(os.path.join(work, "tiny.isv"), verify=True)
check(same_as_c(tv, os.path.join(work, "tiny.isv")) and tv.counts.sum() > 0,
      "trained vectors: words, corpus counts and matrix equal the C reader's")
prov = tv.provenance
check(prov.get("command") == "train" and prov["training"]["dimension"] == 8,
      "the provenance of trained vectors parses as JSON with the training options",
      tv.provenance_text[:200])

# --- map ------------------------------------------------------------------------------
m = isthmus.read_map(os.path.join(work, "syn.map"))
mapped = isthmus.open_vectors(os.path.join(work, "mapped.isv"))
ours = m.apply(v)
diff = float(np.abs(ours - mapped.matrix).max())
check(diff <= 1e-6, "the map applied in Python equals 'align --mapped-out' to 1e-6 "
      "(largest difference %.2g)" % diff)
check(m.source.spec == "length,mean,length" and len(m.source.steps) == 3 and
      m.source.steps[1][1].shape == (dim,),
      "the map's recorded standardisation steps and the centring mean are read")
check(m.source.fingerprint == v.fingerprint and m.target.fingerprint ==
      isthmus.open_vectors(os.path.join(work, "tgt.isv")).fingerprint and
      mapped.provenance.get("source_fingerprint") == "%016x" % v.fingerprint,
      "the map names its inputs by fingerprint, as the vector files compute it")
orth = float(np.abs(m.W.T @ m.W - np.eye(dim)).max())
check(orth < 1e-5 and len(m.seeds) == 200, "W is orthogonal (%.1g) and the 200 seed pairs "
      "are listed" % orth)
rc, cmsg = c_message(["score", "tgt.isv", "src.isv", "--map=syn.map", "--test=test.pairs"])
tg = isthmus.open_vectors(os.path.join(work, "tgt.isv"))
# the program says it about both sides at once only for the side that differs first
pmsg = py_message(m.check, tg, v)
check(rc == 1 and cmsg.endswith(pmsg), "vectors the map was not fitted on: the same error "
      "as the program", "C: %s\nPython: %s" % (cmsg, pmsg))

# --- result ---------------------------------------------------------------------------
out = run("score", "src.isv", "tgt.isv", "--map=syn.map", "--test=test.pairs", "--stage=both",
          "--json-out=result.json").stdout
res = isthmus.read_result(os.path.join(work, "result.json"))
table = []
for line in out.splitlines():
    f = line.split()
    # map, retrieval, queries, coverage, then each p@k as "86.6% [83.2, 90.0]"
    if len(f) == 13 and f[0] in ("seed", "refined") and f[3].endswith("%"):
        table.append(f)
check(len(table) == len(res.runs) == 4, "one printed line per run (%d)" % len(table))
agree = True
for f, r in zip(table, res.runs):
    want = (f[0], f[1], int(f[2]), f[3]) + tuple(" ".join(f[i:i + 3]) for i in (4, 7, 10))
    have = (r.label, r.retrieval, r.queries, "%.1f%%" % (100 * r.coverage)) + tuple(
        "%.1f%% [%.1f, %.1f]" % (100 * r.precision[k], 100 * r.ci.bounds[k][0],
                                 100 * r.ci.bounds[k][1]) for k in (1, 5, 10))
    if want != have:
        agree = False
        print("# printed %s, read %s" % (want, have))
check(agree, "a result read in Python has the figures the program printed")
csls = res.run("csls")
check(csls.label == "refined" and 0 < csls.precision[1] < 1 and
      csls.ci.bounds[1][0] <= csls.precision[1] <= csls.ci.bounds[1][1] and
      len(csls.per_query) == csls.queries,
      "the last CSLS run, its interval and per-query outcomes (P@1 %.3f)" % csls.precision[1])
hits = sum(1 for qy in csls.per_query if qy.rank == 1)
check(hits == csls.hits[1], "per-query places add up to the hits at 1 (%d)" % hits)

# --- verdict --------------------------------------------------------------------------
with open(os.path.join(work, "syn.thresholds"), "w") as f:
    f.write("min p@1 csls refined 0.10\nmin coverage 0.5\n"
            "min p@10 cosine 0.999\nmax drop p@1 csls 0.02\n")
g = run("gate", "--thresholds=syn.thresholds", "--verdict-out=verdict.json", "result.json",
        ok=(3,)).stdout
ver = isthmus.read_verdict(os.path.join(work, "verdict.json"))
printed = [ln.split()[0].lower() for ln in g.splitlines() if re.match(r"(pass|FAIL|skip) ", ln)]
check(not ver.passed and [c.outcome for c in ver.rules] == printed == ["pass", "pass", "fail",
                                                                       "skip"],
      "a verdict read in Python has the outcomes the program printed", printed)

# --- JUnit report, read back with the standard library's XML parser ---------------------
import xml.etree.ElementTree as ET  # noqa: E402
run("gate", "--thresholds=syn.thresholds", "--junit-out=gate.xml", "result.json", ok=(3,))
xroot = ET.parse("gate.xml").getroot()
suites = xroot.findall("testsuite")
cases_xml = suites[0].findall("testcase") if len(suites) == 1 else []
check(xroot.tag == "testsuites" and len(suites) == 1 and len(cases_xml) == len(ver.rules),
      "the JUnit report parses: one testsuite, one testcase per rule (%d)" % len(cases_xml))
kinds = []
for c in cases_xml:
    kinds.append("fail" if c.find("failure") is not None else
                 "skip" if c.find("skipped") is not None else "pass")
names_ok = all(c.get("name") == "line %d: %s" % (r.line, r.rule)
               for c, r in zip(cases_xml, ver.rules))
check(kinds == [c.outcome for c in ver.rules] and names_ok,
      "each testcase has the rule's line and words, failure/skipped as the verdict says", kinds)
tally = [int(suites[0].get(k)) for k in ("tests", "failures", "skipped", "errors")]
check(tally == [len(ver.rules), ver.rules_failed, ver.rules_skipped, 0] and
      xroot.get("failures") == suites[0].get("failures"),
      "the testsuite counts agree with the verdict %s" % tally)
fail = [c for c in cases_xml if c.find("failure") is not None][0].find("failure")
check("99.9%" in fail.get("message") and "%.1f%%" % (100 * ver.rules[2].figure) in fail.get("message"),
      "the failure message gives the figure and the bound", fail.get("message"))

# --- the pipeline step of docs/ci.md, as printed there ---------------------------------
doc = open(os.path.join(root, "docs", "ci.md"), encoding="utf-8").read()
step = re.search(r"```sh\n(.*?)```", doc, re.S).group(1)
ci = os.path.join(work, "ci")
os.makedirs(os.path.join(ci, "release"))
for a, b in (("syn.thresholds", "release/shop.thresholds"), ("result.json",
             "release/baseline.json"), ("test.pairs", "release/test.pairs"),
             ("syn.map", "shop.map"), ("src.isv", "en.isv"), ("tgt.isv", "es.isv")):
    shutil.copy(os.path.join(work, a), os.path.join(ci, b))
p = subprocess.run(["sh", "-c", step], cwd=ci, capture_output=True, text=True,
                   env=dict(os.environ, ISTHMUS=isthmus_exe))
made = sorted(os.listdir(os.path.join(ci, "gate-out"))) if os.path.isdir(
    os.path.join(ci, "gate-out")) else []
xml_cases = len(ET.parse(os.path.join(ci, "gate-out", "gate.xml")).findall(".//testcase")) \
    if "gate.xml" in made else 0
check(p.returncode == 3 and "gate failed" in p.stdout and made == [
      "gate.xml", "report.html", "result.json", "verdict.json"] and xml_cases == 4,
      "the CI step of docs/ci.md runs as printed: exit 3 on a failed rule, with its four files",
      "exit %d\n%s\n%s\n%s" % (p.returncode, p.stdout[-500:], p.stderr[-500:], made))

# --- candidates -----------------------------------------------------------------------
# the synthetic words are code-shaped (w12) and spelt alike on both sides: the review
# filters would leave them all out
run("propose", "src.isv", "tgt.isv", "--map=syn.map", "--exclude=test.pairs",
    "--candidates=2", "--top-sources=400", "--with-numbers", "--with-variants",
    "--stop-share=0", "--min-score=-4", "--mixed-order", "-o", "cand.tsv")
cl = isthmus.read_candidates(os.path.join(work, "cand.tsv"))
with open(os.path.join(work, "cand.tsv"), encoding="utf-8") as f:
    raw = [ln.rstrip("\n").split("\t") for ln in f if not ln.startswith("#")][1:]
first = cl.rows[0]
check(len(cl.rows) == len(raw) > 0 and [first.source, first.candidate, "%.4f" % first.score,
                                        str(first.place)] == [raw[0][1], raw[0][2], raw[0][4],
                                                              raw[0][3]],
      "a candidate list read in Python has the rows the program wrote (%d)" % len(cl.rows))
check(cl.inputs["source_fingerprint"] == "%016x" % v.fingerprint and
      cl.inputs["exclude"][0][0] == "test.pairs" and "reviewed by a speaker" in cl.caution,
      "the inputs line and the caution are read")
with open(os.path.join(work, "cand.tsv"), encoding="utf-8") as f:
    text = f.read().replace("\n\t", "\nacept\t", 1)
with open(os.path.join(work, "cand-bad.tsv"), "w", encoding="utf-8") as f:
    f.write(text)
rc, cmsg = c_message(["merge-pairs", "seeds.pairs", "cand-bad.tsv", "-o", "merged.pairs"])
pmsg = py_message(isthmus.read_candidates, "cand-bad.tsv")
check(rc == 1 and cmsg == pmsg,
      "a misspelt decision: the same error as 'merge-pairs'", "C: %s\nPython: %s" % (cmsg, pmsg))

# --- damaged files give the program's errors ------------------------------------------
good = open(os.path.join(work, "src.isv"), "rb").read()


def damaged(name, data):
    with open(os.path.join(work, name), "wb") as f:
        f.write(data)
    return name


def flip(data, at):
    b = bytearray(data)
    b[at] ^= 0x40
    return bytes(b)


cases = [
    ("truncated header", damaged("d1.isv", good[:100])),
    ("truncated file", damaged("d2.isv", good[:-5])),
    ("version", damaged("d3.isv", good[:8] + b"\x02" + good[9:])),
    ("unknown magic", damaged("d4.isv", b"ISTHMUSX" + good[8:])),
    ("a word byte", damaged("d5.isv", flip(good, len(good) - 20))),
    ("a matrix byte", damaged("d6.isv", flip(good, 200))),
    ("the row count", damaged("d7.isv", good[:16] + b"\xff" + good[17:])),
]
for what, name in cases:
    rc, cmsg = c_message(["inspect", name])
    pmsg = py_message(isthmus.open_vectors, name, verify=True)
    check(rc == 1 and cmsg == pmsg, "damaged native file (%s): %s" % (what, pmsg),
          "C: %s\nPython: %s" % (cmsg, pmsg))
text_cases = [
    ("not a number", "cup 1 x\n"),
    ("not finite", "cup 1 1e39\n"),
    ("nan", "cup nan 1\n"),
    ("too few numbers", "cup 1 2\nmug 3\n"),
    ("too many numbers", "cup 1 2\nmug 3 4 5\n"),
    ("duplicate word", "cup 1 2\nmug 3 4\ncup 5 6\n"),
    ("empty line", "cup 1 2\n\nmug 3 4\n"),
    ("header row count", "3 2\ncup 1 2\nmug 3 4\n"),
    ("control character", "c\x01up 1 2\n"),
]
for what, body in text_cases:
    name = damaged("bad-%d.txt" % text_cases.index((what, body)), body.encode())
    rc, cmsg = c_message(["inspect", name])
    pmsg = py_message(isthmus.read_text, name)
    check(rc == 1 and cmsg == pmsg, "bad text table (%s): %s" % (what, pmsg),
          "C: %s\nPython: %s" % (cmsg, pmsg))
gmap = open(os.path.join(work, "syn.map"), "rb").read()
map_cases = [
    ("a flipped byte", damaged("d1.map", flip(gmap, 40))),
    ("truncated", damaged("d2.map", gmap[:-16])),
    ("not a map", damaged("d3.map", b"hello, this is no map at all, not at all\n")),
]
for what, name in map_cases:
    rc, cmsg = c_message(["score", "src.isv", "tgt.isv", "--map=" + name, "--test=test.pairs"])
    pmsg = py_message(isthmus.read_map, name)
    check(rc == 1 and cmsg == pmsg, "damaged map (%s): %s" % (what, pmsg),
          "C: %s\nPython: %s" % (cmsg, pmsg))
rc, cmsg = c_message(["gate", "--thresholds=syn.thresholds", "verdict.json"])
pmsg = py_message(isthmus.read_result, "verdict.json")
check(rc == 1 and cmsg == pmsg, "a verdict is not taken for a result: %s" % pmsg,
      "C: %s\nPython: %s" % (cmsg, pmsg))

sys.exit(tap.end())
