#!/usr/bin/env python3
"""Second real domain, technical documentation (suite 'slow'): English and German vectors
trained by isthmus with its default settings (one thread, seed 1) on Debian's manual pages
installed in both languages (packages manpages, manpages-de), word pairs
from the FreeDict English-German and German-English dictionaries (dict-freedict-eng-deu,
dict-freedict-deu-eng), extracted by tests/fetch-doc-data.sh. The pairs whose words are both
in the vectors are split by source word, one third test (split seed 1); isthmus align fits
Procrustes on the rest, refines, and scores with CSLS.

Skips (exit 77) when the extraction script or the Debian packages are missing.
Usage: doc_align.py ISTHMUS SOURCE-DIR WORK-DIR
"""
import os
import subprocess
import sys

import trained
from trained import run, skip

# Floors, measured 2026-12-02 with tools/dev/measure-defaults.py (docs/defaults.md,
# "Count-based and combined vectors"): default settings (skip-gram + PPMI side by side), one
# training thread, seed 1 (one seed only: the shared machine allowed no more), CSLS P@1 on
# 450 en->de and 242 de->en test words:
#   en->de  Procrustes 13.3, refined 28.4      de->en  Procrustes 7.4, refined 33.1
# (skip-gram alone, the former default: refined 21.1 / 22.6). On the Bible check three seeds
# moved refined P@1 by at most 1.4 points; the floors sit 5 points below the refined figures
# and about 4 below the Procrustes ones, so other seeds, processors and ISTHMUS_SIMD settings
# pass while losing the gain over the former default would not.
FLOORS = {
    "en-de": {"seed": 9.0, "refined": 23.0},
    "de-en": {"seed": 3.0, "refined": 28.0},
}


def main():
    isthmus, src, work = sys.argv[1:4]
    fetch = os.path.join(src, "tests", "fetch-doc-data.sh")
    if subprocess.run(["sh", fetch, "--check"], capture_output=True).returncode != 0:
        skip("Debian manual pages / FreeDict eng-deu packages not installed")
    data = os.path.join(work, "doc-data")
    trained.extract(fetch, data, "documentation data")
    for lang in ("en", "de"):
        vec = os.path.join(work, lang + "-doc.isv")
        if not os.path.exists(vec):
            run([isthmus, "-q", "train", "--threads", "1", "--seed", "1", "-o", vec,
                 os.path.join(data, lang + ".txt")])
    checks = []
    for s, t in (("en", "de"), ("de", "en")):
        name = s + "-" + t
        res = trained.align_held_out(
            isthmus, os.path.join(work, s + "-doc.isv"), os.path.join(work, t + "-doc.isv"),
            os.path.join(data, name + ".pairs"), os.path.join(work, name + "-doc.map"),
            os.path.join(work, name + "-doc.json"), "--threads=1")
        csls = [x for x in res["runs"] if x["retrieval"] == "csls"]
        for x in csls:
            print("# %s %-10s queries %d  P@1 %.1f  P@10 %.1f" % (
                name, x["label"], x["queries"], 100 * x["precision"]["p@1"],
                100 * x["precision"]["p@10"]))
        proc, refined = 100 * csls[0]["precision"]["p@1"], 100 * csls[-1]["precision"]["p@1"]
        for label, got in (("seed", proc), ("refined", refined)):
            floor = FLOORS[name][label]
            checks.append(("%s CSLS P@1 %s %.1f >= %.1f" % (name, label, got, floor),
                           got >= floor))
        checks.append(trained.no_overlap(name, res, 200))
    return trained.report("doc-align", checks)


if __name__ == "__main__":
    sys.exit(main())
