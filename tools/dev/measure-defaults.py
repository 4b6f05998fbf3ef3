#!/usr/bin/env python3
"""Compare training settings on a real-data check, as docs/defaults.md records them: for each
setting and each training seed, train source- and target-language vectors with one thread,
align both directions on two thirds of the dictionary pairs (split by source word, split seed
1), and keep the refined map's CSLS outcome of every held-out source word. Per setting and
direction it prints the mean precision@1 over the seeds with a 95% bootstrap interval over
the test words, and the paired difference against the first setting (or --base) (the same test words,
each word's hit rate averaged over the seeds, resampled together), with training time and
peak memory of one language.

usage: measure-defaults.py ISTHMUS DATA_DIR WORK_DIR [--langs=en,es] [--seeds=1,2,3]
                           [--resamples=2000] [--base=NAME] NAME=SPEC ...
  SPEC is either training options for 'isthmus train' (given --threads 1 --seed S), or
  'stack:A,B[:WA,WB]' to set the vectors of settings A and B side by side with
  'isthmus stack' (no training). A NAME that starts with '_' is trained (an ingredient of a
  stack) but not aligned or scored.
  e.g. measure-defaults.py build/tools/isthmus /tmp/rd /tmp/md \\
          "today=--method=skip-gram" "ppmi=--method=ppmi" "both=stack:today,ppmi"
DATA_DIR holds L1.txt, L2.txt, L1-L2.pairs, L2-L1.pairs (tests/fetch-real-data.sh writes the
Bible set; tools/dev/extract-manpages.py the documentation set). Vectors and results are kept
in WORK_DIR and reused when present, so a setting can be added to an earlier run.
"""
import json
import os
import random
import shlex
import subprocess
import sys


def run_timed(cmd, log):
    """Run cmd under /usr/bin/time; return (seconds, peak MiB)."""
    tf = log + ".time"
    with open(log, "w") as f:
        subprocess.run(["/usr/bin/time", "-f", "%e %M", "-o", tf] + cmd, check=True, stdout=f,
                       stderr=subprocess.STDOUT)
    sec, kib = open(tf).read().split()[-2:]
    return float(sec), int(kib) / 1024.0


def train(isthmus, data, work, name, spec, lang, seed, settings):
    out = os.path.join(work, "%s-s%d-%s.isv" % (name, seed, lang))
    meta = out + ".json"
    if os.path.exists(out) and os.path.exists(meta):
        return out, json.load(open(meta))
    if spec.startswith("stack:"):
        parts = spec[6:].split(":")
        names = parts[0].split(",")
        made = [train(isthmus, data, work, n, settings[n], lang, seed, settings) for n in names]
        ins = [m[0] for m in made]
        cmd = [isthmus, "-q", "stack", "-o", out] + ins
        if len(parts) > 1:
            cmd.insert(3, "--block-weights=" + parts[1])
    else:
        cmd = [isthmus, "-q", "train", "--threads", "1", "--seed", str(seed),
               *shlex.split(spec), "-o", out, os.path.join(data, lang + ".txt")]
    sec, mib = run_timed(cmd, out + ".log")
    if spec.startswith("stack:"):    # the cost of the combination includes its ingredients
        sec += sum(m[1]["seconds"] for m in made)
        mib = max([mib] + [m[1]["peak_mib"] for m in made])
    info = {"seconds": sec, "peak_mib": mib}
    json.dump(info, open(meta, "w"))
    return out, info


def outcomes(isthmus, data, work, name, seed, src, tgt, vs, vt):
    res = os.path.join(work, "%s-s%d-%s-%s.json" % (name, seed, src, tgt))
    if not os.path.exists(res):
        subprocess.run([isthmus, "-q", "align", vs, vt,
                        "--seeds=" + os.path.join(data, "%s-%s.pairs" % (src, tgt)),
                        "--hold-out=0.3333", "--split-seed=1", "--threads=1",
                        "-o", os.path.join(work, "%s-s%d-%s-%s.map" % (name, seed, src, tgt)),
                        "--json-out=" + res], check=True, stdout=subprocess.DEVNULL)
    runs = json.load(open(res))["runs"]
    csls = [r for r in runs if r["retrieval"] == "csls"]
    first, last = csls[0], csls[-1]   # Procrustes on the seeds, then the refined map
    hits = {q["source"]: 1.0 if q["rank"] == 1 else 0.0 for q in last["per_query"]}
    return hits, 100 * first["precision"]["p@1"], 100 * last["precision"]["p@1"]


def interval(values, resamples, rng):
    n = len(values)
    means = sorted(sum(values[rng.randrange(n)] for _ in range(n)) / n
                   for _ in range(resamples))
    return means[int(0.025 * resamples)], means[int(0.975 * resamples) - 1]


def main():
    args = [a for a in sys.argv[1:] if not a.startswith("--")]
    opts = dict(a[2:].split("=", 1) for a in sys.argv[1:] if a.startswith("--"))
    isthmus, data, work = args[:3]
    langs = opts.get("langs", "en,es").split(",")
    seeds = [int(s) for s in opts.get("seeds", "1,2,3").split(",")]
    resamples = int(opts.get("resamples", "2000"))
    settings = dict(a.split("=", 1) for a in args[3:])
    order = [a.split("=", 1)[0] for a in args[3:]]
    os.makedirs(work, exist_ok=True)
    summary = {}
    for name in order:
        for seed in seeds:
            for lang in langs:
                train(isthmus, data, work, name, settings[name], lang, seed, settings)
    base = opts.get("base", order[0])
    order = [base] + [n for n in order if n != base and not n.startswith("_")]
    print("| setting | direction | P@1 mean of %d seeds [95%% interval] | per seed | "
          "difference to %s [95%% interval] | train s (%s) | peak MiB |"
          % (len(seeds), base, langs[0]))
    print("| --- | --- | --- | --- | --- | --- | --- |")
    per_word = {}
    for name in order:
        for src, tgt in ((langs[0], langs[1]), (langs[1], langs[0])):
            words, per_seed, proc = {}, [], []
            for seed in seeds:
                vs = os.path.join(work, "%s-s%d-%s.isv" % (name, seed, src))
                vt = os.path.join(work, "%s-s%d-%s.isv" % (name, seed, tgt))
                hits, p_proc, p_ref = outcomes(isthmus, data, work, name, seed, src, tgt, vs, vt)
                for w, h in hits.items():
                    words[w] = words.get(w, 0.0) + h / len(seeds)
                per_seed.append(p_ref)
                proc.append(p_proc)
            per_word[(name, src)] = words
            keys = sorted(words)
            rng = random.Random(1)
            vals = [100 * words[w] for w in keys]
            mean = sum(vals) / len(vals)
            lo, hi = interval(vals, resamples, rng)
            diff = ""
            dlo = dhi = dmean = None
            if name != base:
                b = per_word[(base, src)]
                common = [w for w in keys if w in b]
                d = [100 * (words[w] - b[w]) for w in common]
                dmean = sum(d) / len(d)
                dlo, dhi = interval(d, resamples, random.Random(2))
                diff = "%+.1f [%+.1f, %+.1f]" % (dmean, dlo, dhi)
            meta = [json.load(open(os.path.join(work, "%s-s%d-%s.isv.json" % (name, s, src))))
                    for s in seeds]
            secs = sorted(m["seconds"] for m in meta)
            mib = max(m["peak_mib"] for m in meta)
            print("| %s | %s→%s | %.1f [%.1f, %.1f] | %s | %s | %.1f | %.0f |" % (
                name, src, tgt, mean, lo, hi, " / ".join("%.1f" % p for p in per_seed), diff,
                secs[len(secs) // 2], mib), flush=True)
            summary["%s %s-%s" % (name, src, tgt)] = {
                "mean": mean, "interval": [lo, hi], "per_seed": per_seed,
                "seed_map_per_seed": proc, "difference": dmean, "difference_interval":
                [dlo, dhi], "words": len(keys), "train_seconds_median": secs[len(secs) // 2],
                "peak_mib": mib, "spec": settings[name]}
    json.dump(summary, open(os.path.join(work, "summary.json"), "w"), indent=1)


if __name__ == "__main__":
    main()
