#!/usr/bin/env python3
"""Measure training settings on the open real-data check (Debian Bible texts + FreeDict
pairs, extracted by tests/fetch-real-data.sh): for each setting, train English and Spanish
vectors with isthmus, align both directions on two thirds of the pairs (split by source word,
split seed 1), and print CSLS and cosine precision@1 on the held-out third, before and after
refinement. This is the measurement that chose the training defaults (docs/defaults.md).

usage: tune-real.py ISTHMUS DATA_DIR WORK_DIR [NAME=OPTIONS ...]
  e.g. tune-real.py build/tools/isthmus /tmp/rd /tmp/tune "d300w10=--dimension 300 --context 10"
"""
import json
import os
import shlex
import subprocess
import sys
import time

DEFAULT_SETTINGS = [
    ("defaults", ""),
    ("d300-w10-p20", "--dimension 300 --context 10 --passes 20"),
]


def main():
    isthmus, data, work = sys.argv[1:4]
    settings = [tuple(a.split("=", 1)) for a in sys.argv[4:]] or DEFAULT_SETTINGS
    os.makedirs(work, exist_ok=True)
    print("%-22s %6s %8s | %s" % ("setting", "lang", "train s", "P@1 CSLS seed/refined, cosine refined"))
    for name, opts in settings:
        vec = {}
        for lang in ("en", "es"):
            vec[lang] = os.path.join(work, "%s-%s.isv" % (name, lang))
            t0 = time.time()
            if not os.path.exists(vec[lang]):
                subprocess.run([isthmus, "-q", "train", *shlex.split(opts), "-o", vec[lang],
                                os.path.join(data, lang + ".txt")], check=True)
            print("%-22s %6s %8.1f |" % (name, lang, time.time() - t0), flush=True)
        for s, t in (("en", "es"), ("es", "en")):
            out = os.path.join(work, "%s-%s-%s.json" % (name, s, t))
            subprocess.run([isthmus, "-q", "align", vec[s], vec[t],
                            "--seeds=" + os.path.join(data, "%s-%s.pairs" % (s, t)),
                            "--hold-out=0.3333", "--split-seed=1",
                            "-o", os.path.join(work, "%s-%s-%s.map" % (name, s, t)),
                            "--json-out=" + out], check=True, stdout=subprocess.DEVNULL)
            runs = {(r["label"], r["retrieval"]): r for r in json.load(open(out))["runs"]}
            p = lambda l, m: 100 * runs[(l, m)]["precision"]["p@1"]
            print("%-22s %6s %8s | csls %5.1f / %5.1f   cosine %5.1f   (queries %d)" % (
                name, s + "->" + t, "", p("seed", "csls"), p("refined", "csls"),
                p("refined", "cosine"), runs[("refined", "csls")]["queries"]), flush=True)


if __name__ == "__main__":
    main()
