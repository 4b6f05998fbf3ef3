#!/usr/bin/env python3
"""Data-parallel training on the real-data check (suite 'slow'): English and Spanish skip-gram
vectors trained on the Bible texts (Debian sword-text-kjv, sword-text-sparv, extracted by
tests/fetch-real-data.sh) once by one process and once as 2 MPI ranks, one thread each, with
the same options and the same total passes (the defaults: 20 passes over the corpus, which
the ranks share). Both pairs of vectors are aligned en->es on the same two thirds of the
FreeDict pairs (split seed 1) and scored on the same held-out third; `isthmus gate
--baseline` gives the change in refined CSLS P@1 with its paired-bootstrap 95% interval
(Koehn 2004, "Statistical significance tests for machine translation evaluation"). The check
fails when the whole interval lies below zero: a significant drop from one process.

Training is deterministic for a seed here (one thread per rank, exchanges at fixed points,
the average summed in a fixed order), so the verdict is the same on every run on one machine;
the seed is ISTHMUS_CHECK_SEED (default 1), as for the other slow checks (tests/slow/trained.py).
Skips (exit 77) without MPI, the extraction script or the Debian packages.
Usage: cluster_quality.py ISTHMUS MPIRUN SOURCE-DIR WORK-DIR BUILT-WITH-MPI(yes|no)
"""
import json
import os
import re
import subprocess
import sys

import trained

MPI_ENV = {
    # this machine only: shared memory between ranks, the launcher on loopback; as root the
    # allow-run-as-root switches; no binding, so each rank runs where the scheduler puts it
    "OMPI_ALLOW_RUN_AS_ROOT": "1", "OMPI_ALLOW_RUN_AS_ROOT_CONFIRM": "1",
    "OMPI_MCA_btl": "self,vader", "OMPI_MCA_oob_tcp_if_include": "lo",
    "OMPI_MCA_btl_tcp_if_include": "lo", "OMPI_MCA_btl_vader_single_copy_mechanism": "none",
    "OMPI_MCA_rmaps_base_oversubscribe": "1", "OMPI_MCA_hwloc_base_binding_policy": "none",
    "OMPI_MCA_mpi_yield_when_idle": "1",
}


def run(cmd, env=None):
    """trained.run, keeping the output (the summary line of train is read)."""
    return trained.run(cmd, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def main():
    isthmus, mpirun, src, work, built = sys.argv[1:6]
    if built != "yes" or not mpirun:
        trained.skip("isthmus built without MPI, or no mpirun")
    data, tw = trained.real_data(isthmus, src, work, need_train=False)
    env = dict(os.environ, **MPI_ENV)
    env["ASAN_OPTIONS"] = env.get("ASAN_OPTIONS", "") + ":detect_leaks=0"
    checks, results = [], {}
    for tag, launch in (("one", []), ("ranks2", [mpirun, "-np", "2"])):
        vec = {}
        for lang in ("en", "es"):
            vec[lang] = os.path.join(tw, "%s-%s.isv" % (tag, lang))
            p = run(launch + [isthmus, "train", "--method=skip-gram", *trained.train_flags(),
                              "-o", vec[lang], os.path.join(data, lang + ".txt")], env=env)
            if launch:
                checks.append(("2 ranks trained %s: the summary names 2 ranks" % lang,
                               re.search(r"\b2 ranks\b", p.stderr) is not None))
        mp = os.path.join(tw, tag + ".map")
        test = os.path.join(tw, tag + "-test.pairs")
        run([isthmus, "-q", "align", vec["en"], vec["es"],
             "--seeds=" + os.path.join(data, "en-es.pairs"), "--hold-out=0.3333",
             "--split-seed=1", "--write-test=" + test, "-o", mp])
        results[tag] = os.path.join(tw, tag + ".json")
        run([isthmus, "-q", "score", vec["en"], vec["es"], "--map=" + mp, "--test=" + test,
             "--json-out=" + results[tag]])
    checks.append(("both runs hold out the same test words",
                   open(os.path.join(tw, "one-test.pairs")).read() ==
                   open(os.path.join(tw, "ranks2-test.pairs")).read()))
    p1 = {}
    for tag, path in results.items():
        runs = json.load(open(path))["runs"]
        p1[tag] = [100 * x["precision"]["p@1"] for x in runs
                   if x["retrieval"] == "csls" and x.get("label") == "refined"][0]
        trained.figure("cluster:%s:refined:csls" % tag, p1[tag])
    rules = os.path.join(tw, "no-drop.thresholds")
    with open(rules, "w") as f:
        f.write("max drop precision@1 csls refined 0.0\n")
    verdict = os.path.join(tw, "no-drop.verdict.json")
    g = subprocess.run([isthmus, "gate", "--thresholds=" + rules, "--baseline=" + results["one"],
                        "--verdict-out=" + verdict, results["ranks2"]],
                       stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True)
    print("# gate (exit %d): %s" % (g.returncode, g.stdout.strip().replace("\n", " | ")))
    rule = None
    if os.path.exists(verdict):
        with open(verdict) as f:
            rule = json.load(f)["rules"][0]
        trained.figure("cluster:change:refined:csls", 100 * rule["figure"])
    checks.append(("refined CSLS P@1, 2 ranks %.1f against one process %.1f: no significant "
                   "drop (gate exit %d, change %s)" % (
                       p1["ranks2"], p1["one"], g.returncode,
                       "%+.1f [%+.1f, %+.1f] points" % (100 * rule["figure"],
                                                       100 * rule["interval"][0],
                                                       100 * rule["interval"][1])
                       if rule else "?"),
                   g.returncode == 0 and rule is not None and rule["outcome"] == "pass" and
                   rule["interval"][1] >= 0))
    return trained.report("cluster-quality", checks)

if __name__ == "__main__":
    sys.exit(main())
