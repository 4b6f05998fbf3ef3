#!/usr/bin/env python3
"""Quality of data-parallel training on the open real-data check (Debian Bible texts and
FreeDict pairs, extracted by tests/fetch-real-data.sh): for each seed, train English and
Spanish vectors once with one process (1 thread) and once as RANKS MPI ranks of 1 thread
each, with the same options and the same total passes; align en->es on two thirds of the
pairs (split by source word, split seed 1), score both maps on the same held-out third,
and let `isthmus gate --baseline` give the change in CSLS P@1 of the ranks' vectors against
the single process with its paired-bootstrap 95% interval (Koehn 2004).

usage: cluster-quality.py ISTHMUS DATA_DIR WORK_DIR [--ranks N] [--seeds 1,2,3]
                          [--train="OPTIONS"]
Both runs train skip-gram alone (--method=skip-gram), the only method trained across ranks.
Open MPI runs on this machine only (shared memory; the launcher on loopback).
"""
import argparse
import json
import os
import re
import shlex
import subprocess
import time

MPI_ENV = {
    "OMPI_ALLOW_RUN_AS_ROOT": "1", "OMPI_ALLOW_RUN_AS_ROOT_CONFIRM": "1",
    "OMPI_MCA_btl": "self,vader", "OMPI_MCA_oob_tcp_if_include": "lo",
    "OMPI_MCA_btl_vader_single_copy_mechanism": "none",
    "OMPI_MCA_rmaps_base_oversubscribe": "1", "OMPI_MCA_hwloc_base_binding_policy": "none",
    "OMPI_MCA_mpi_yield_when_idle": "1",
}
RULES = "max drop p@1 csls refined 1.0\n"   # never fails: we read the interval


def run(cmd, env=None):
    return subprocess.run(cmd, check=True, env=env, stdout=subprocess.PIPE,
                          stderr=subprocess.PIPE, text=True)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("isthmus")
    ap.add_argument("data")
    ap.add_argument("work")
    ap.add_argument("--ranks", type=int, default=2)
    ap.add_argument("--seeds", default="1,2,3")
    ap.add_argument("--train", default="")
    a = ap.parse_args()
    os.makedirs(a.work, exist_ok=True)
    env = dict(os.environ, **MPI_ENV)
    rules = os.path.join(a.work, "any.thresholds")
    open(rules, "w").write(RULES)
    print("uptime:", run(["uptime"]).stdout.strip())
    print("%-5s %-9s %8s %8s | %s" % ("seed", "training", "train s", "tok/s", "en->es"))
    deltas = []
    for seed in a.seeds.split(","):
        res = {}
        for label, launch in (("1 rank", []), ("%d ranks" % a.ranks,
                                                ["mpirun", "-np", str(a.ranks)])):
            tag = "s%s-r%d" % (seed, 1 if not launch else a.ranks)
            vec = {}
            for lang in ("en", "es"):
                vec[lang] = os.path.join(a.work, "%s-%s.isv" % (tag, lang))
                t0 = time.time()
                if not launch and os.path.exists(vec[lang]):
                    print("%-5s %-9s %8s %8s | %s (kept from an earlier run: one thread is "
                          "deterministic)" % (seed, label, "-", "-", lang), flush=True)
                    continue
                # skip-gram alone in both: under mpirun it is the only method trained across
                # ranks, while one process would otherwise train the default combination
                p = run(launch + [a.isthmus, "train", "--method=skip-gram", "--threads=1",
                                  "--seed=" + seed,
                                  *shlex.split(a.train), "-o", vec[lang],
                                  os.path.join(a.data, lang + ".txt")], env=env)
                rate = re.search(r"([0-9]+) tokens/s", p.stderr)
                print("%-5s %-9s %8.1f %8s | %s" % (seed, label, time.time() - t0,
                                                    rate.group(1) if rate else "?", lang),
                      flush=True)
            mp = os.path.join(a.work, tag + ".map")
            test = os.path.join(a.work, "test-s%s.pairs" % seed)
            run([a.isthmus, "-q", "align", vec["en"], vec["es"],
                 "--seeds=" + os.path.join(a.data, "en-es.pairs"), "--hold-out=0.3333",
                 "--split-seed=1", "--write-test=" + test, "-o", mp])
            out = os.path.join(a.work, tag + ".json")
            run([a.isthmus, "-q", "score", vec["en"], vec["es"], "--map=" + mp,
                 "--test=" + test, "--json-out=" + out])
            res[label] = out
        one, many = res["1 rank"], res["%d ranks" % a.ranks]
        g = subprocess.run([a.isthmus, "gate", "--thresholds=" + rules, "--baseline=" + one,
                            many], stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True)
        p1 = {}
        for lab, path in (("1", one), ("n", many)):
            runs = json.load(open(path))["runs"]
            p1[lab] = [100 * r["precision"]["p@1"] for r in runs
                       if r["retrieval"] == "csls" and r.get("label") == "refined"][0]
        line = [l for l in g.stdout.splitlines() if "drop" in l or "change" in l]
        print("seed %s: CSLS P@1 refined, 1 rank %.1f, %d ranks %.1f; gate: %s" % (
            seed, p1["1"], a.ranks, p1["n"], line[0].strip() if line else g.stdout.strip()),
              flush=True)
        deltas.append(p1["n"] - p1["1"])
    print("mean change in CSLS P@1 over %d seeds: %+.1f points (per seed: %s)" % (
        len(deltas), sum(deltas) / len(deltas), ", ".join("%+.1f" % d for d in deltas)))


if __name__ == "__main__":
    main()
