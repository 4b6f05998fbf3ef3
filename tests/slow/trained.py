"""What every slow check on trained vectors shares, so that its figures do not depend on the
machine's thread scheduling: one training thread and a fixed seed (ISTHMUS_CHECK_SEED, default
1), and a work directory per kernel family (ISTHMUS_SIMD, default native) and seed, so the native
and the portable runs of the suite never reuse each other's vectors.

Thread count: only 1-thread training is bit-identical from run to run (docs/reliability.md,
"Determinism"); across machines even 1-thread vectors differ in the last bits where the kernels
use FMA or another summation order, so the checks judge figures against floors set below the
spread measured over 5 seeds and both kernel families (tools/dev/slow-spread.py), never exact
values.

It also holds what the checks do alike: skipping, running a command, extracting the Debian data,
aligning with a held-out third, and printing the checks as TAP."""
import json
import os
import subprocess
import sys


def skip(why):
    print("1..0 # SKIP " + why)
    sys.exit(77)   # the checks run with protocol exitcode: 77 = skipped


def run(cmd, **kw):
    """Run a command (echoed as a TAP comment); a failure raises."""
    print("# " + " ".join(cmd))
    return subprocess.run(cmd, check=True, **kw)


def extract(script, dest, what):
    """Run an extraction script of tests/ into dest; skip, saying why, when it fails."""
    r = subprocess.run(["sh", script, dest], capture_output=True, text=True)
    if r.returncode != 0:
        skip(what + " not available: " + r.stderr.strip().replace("\n", " "))


def real_data(isthmus, src, work, need_train=True):
    """The Bible data of tests/fetch-real-data.sh extracted under work, and this run's work
    directory (workdir); skips, saying why, when the script, the data or (need_train) the
    train command is missing."""
    fetch = os.path.join(src, "tests", "fetch-real-data.sh")
    if not os.path.exists(fetch):
        skip("tests/fetch-real-data.sh is not in this tree")
    if need_train and subprocess.run([isthmus, "help", "train"],
                                     capture_output=True).returncode != 0:
        skip("this isthmus has no train command")
    data = os.path.join(work, "real-data")
    extract(fetch, data, "real data")
    return data, workdir(work)


def train_each(isthmus, data, tw, tag, *options):
    """English and Spanish vectors tw/LANG-TAG.isv trained from data/LANG.txt with the
    checks' flags and the options, unless a file of that name is there already; their paths
    by language."""
    vec = {}
    for lang in ("en", "es"):
        vec[lang] = os.path.join(tw, "%s-%s.isv" % (lang, tag))
        if not os.path.exists(vec[lang]):
            run([isthmus, "-q", "train", *train_flags(), *options, "-o", vec[lang],
                 os.path.join(data, lang + ".txt")])
    return vec


def align_held_out(isthmus, src_vec, tgt_vec, pairs, map_out, json_out, *extra):
    """isthmus align on a pair list split by source word, one third test (split seed 1);
    returns the result JSON."""
    run([isthmus, "-q", "align", src_vec, tgt_vec, "--seeds=" + pairs, "--hold-out=0.3333",
         "--split-seed=1", *extra, "-o", map_out, "--json-out=" + json_out],
        stdout=subprocess.DEVNULL)
    with open(json_out) as f:
        return json.load(f)


def no_overlap(name, res, least):
    """The check that the split kept seed and test apart and the test list is recorded."""
    test = res["test"]
    return ("%s no overlap, %d test words" % (name, test["source_words"]),
            test["overlap_with_seeds"] == 0 and test["source_words"] > least)


def report(label, checks):
    """Print (description, passed) pairs as TAP with the closing line; the exit status."""
    print("1..%d" % len(checks))
    failed = 0
    for i, (what, ok) in enumerate(checks, 1):
        print("%s %d - %s" % ("ok" if ok else "not ok", i, what))
        failed += not ok
    print("# %s: %d passed, %d failed" % (label, len(checks) - failed, failed))
    return 1 if failed else 0


def kernel():
    return os.environ.get("ISTHMUS_SIMD") or "native"


def seed():
    return os.environ.get("ISTHMUS_CHECK_SEED") or "1"


def workdir(base):
    path = os.path.join(base, "%s-seed%s" % (kernel(), seed()))
    os.makedirs(path, exist_ok=True)
    return path


def train_flags():
    """Options every slow check adds to 'isthmus train'."""
    return ["--threads", "1", "--seed", seed()]


def figure(name, value):
    """One measured figure on a line of its own, collected by tools/dev/slow-spread.py."""
    print("# figure %s %.2f" % (name, value))
