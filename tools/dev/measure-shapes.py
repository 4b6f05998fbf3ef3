#!/usr/bin/env python3
"""Measure the word-shape policy of preparation (isthmus prepare --numbers=keep|mask|drop)
by CSLS precision@1 after refinement, on the demo and on the open real-data check, for
several training seeds with one training thread (bit-reproducible runs). This is the
measurement that chose the default policy (docs/defaults.md, "Number-shaped words").

  demo: data-samples/ corpora, fitted on demo-seed.pairs, scored on demo-test.pairs (en->es)
  real: the Bible texts and FreeDict pairs of tests/fetch-real-data.sh, a third of the pairs
        held out by source word (split seed 1), both directions

usage: measure-shapes.py ISTHMUS SOURCE_ROOT REAL_DATA_DIR WORK_DIR [SEEDS] [POLICIES]
  e.g. measure-shapes.py build/tools/isthmus . /tmp/rd /tmp/shapes 1,2,3 keep,mask,drop
REAL_DATA_DIR may be '-' to measure the demo only. Prints one row per run, then a table of
means with the spread over seeds and the mean of the runs' 95% bootstrap intervals.
"""
import json
import os
import statistics
import subprocess
import sys


def run(*cmd):
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL)


def p_at_1(path):
    res = json.load(open(path))
    for r in res["runs"]:
        if r["label"] == "refined" and r["retrieval"] == "csls":
            ci = r.get("ci", {}).get("p@1", [float("nan")] * 2)
            return 100 * r["precision"]["p@1"], 100 * ci[0], 100 * ci[1], r["queries"]
    raise SystemExit("%s: no refined CSLS run" % path)


def rows_of(isthmus, vec):
    out = subprocess.run([isthmus, "inspect", vec], check=True, capture_output=True,
                         text=True).stdout
    for line in out.splitlines():
        if line.strip().startswith("rows"):
            return int(line.split()[1])
    return -1


def train(isthmus, work, name, text, policy, seed):
    vec = os.path.join(work, "%s-%s-s%s.isv" % (name, policy, seed))
    if not os.path.exists(vec):
        run(isthmus, "-q", "train", "--threads=1", "--seed=" + seed, "--numbers=" + policy,
            "-o", vec, text)
    return vec


def demo(isthmus, root, work, policy, seed):
    d = os.path.join(root, "data-samples")
    en = train(isthmus, work, "demo-en", os.path.join(d, "tillwick-en.txt.gz"), policy, seed)
    es = train(isthmus, work, "demo-es", os.path.join(d, "tillwick-es.txt.gz"), policy, seed)
    base = os.path.join(work, "demo-%s-s%s" % (policy, seed))
    run(isthmus, "-q", "align", en, es, "--seeds=" + os.path.join(d, "demo-seed.pairs"),
        "-o", base + ".map")
    run(isthmus, "-q", "score", en, es, "--map=" + base + ".map",
        "--test=" + os.path.join(d, "demo-test.pairs"), "--json-out=" + base + ".json")
    return [("demo en->es", p_at_1(base + ".json"), rows_of(isthmus, en))]


def real(isthmus, data, work, policy, seed):
    vec = {l: train(isthmus, work, "real-" + l, os.path.join(data, l + ".txt"), policy, seed)
           for l in ("en", "es")}
    out = []
    for s, t in (("en", "es"), ("es", "en")):
        base = os.path.join(work, "real-%s-%s-%s-s%s" % (s, t, policy, seed))
        run(isthmus, "-q", "align", vec[s], vec[t],
            "--seeds=" + os.path.join(data, "%s-%s.pairs" % (s, t)), "--hold-out=0.3333",
            "--split-seed=1", "-o", base + ".map", "--json-out=" + base + ".json")
        out.append(("real %s->%s" % (s, t), p_at_1(base + ".json"), rows_of(isthmus, vec[s])))
    return out


def main():
    if len(sys.argv) < 5:
        raise SystemExit(__doc__)
    isthmus, root, data, work = sys.argv[1:5]
    seeds = (sys.argv[5] if len(sys.argv) > 5 else "1,2,3").split(",")
    policies = (sys.argv[6] if len(sys.argv) > 6 else "keep,mask,drop").split(",")
    os.makedirs(work, exist_ok=True)
    got = {}
    print("%-6s %-14s %4s %6s %16s %7s %6s" % ("policy", "check", "seed", "P@1", "95% interval",
                                               "queries", "rows"))
    for policy in policies:
        for seed in seeds:
            rows = demo(isthmus, root, work, policy, seed)
            if data != "-":
                rows += real(isthmus, data, work, policy, seed)
            for check, (p, lo, hi, q), nrows in rows:
                got.setdefault((check, policy), []).append((p, lo, hi))
                print("%-6s %-14s %4s %6.1f %7.1f - %6.1f %7d %6d" % (policy, check, seed, p, lo,
                                                                     hi, q, nrows), flush=True)
    print("\nmean CSLS P@1 after refinement over seeds %s (min-max over seeds; mean 95%% "
          "interval of a run)" % ",".join(seeds))
    checks = sorted({c for c, _ in got})
    print("| policy | " + " | ".join(checks) + " |")
    print("| --- |" + " --- |" * len(checks))
    for policy in policies:
        cells = []
        for c in checks:
            v = got[(c, policy)]
            ps = [x[0] for x in v]
            cells.append("%.1f (%.1f-%.1f; [%.1f, %.1f])" % (
                statistics.mean(ps), min(ps), max(ps), statistics.mean(x[1] for x in v),
                statistics.mean(x[2] for x in v)))
        print("| %s | %s |" % (policy, " | ".join(cells)))


if __name__ == "__main__":
    main()
