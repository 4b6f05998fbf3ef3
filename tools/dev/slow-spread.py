#!/usr/bin/env python3
"""Measure how the figures of the slow checks on trained vectors spread over training seeds and
kernel families, to set their floors with a stated margin.

Runs tests/slow/{real_neighbours,real_align,real_defaults,propose_demo}.py once per seed and kernel family
(ISTHMUS_CHECK_SEED, ISTHMUS_SIMD), collects their '# figure NAME VALUE' lines and prints, per
figure, min / mean / max for each family and over all runs.

usage: tools/dev/slow-spread.py ISTHMUS WORK-DIR [--seeds 1,2,3,4,5] [--kernels native,portable]
                                [--checks real_neighbours,real_align,real_defaults,propose_demo]
"""
import argparse
import collections
import os
import subprocess
import sys
import time


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("isthmus")
    ap.add_argument("work")
    ap.add_argument("--seeds", default="1,2,3,4,5")
    ap.add_argument("--kernels", default="native,portable")
    ap.add_argument("--checks", default="real_neighbours,real_align,real_defaults,propose_demo")
    a = ap.parse_args()
    src = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    isthmus = os.path.abspath(a.isthmus)
    fig = collections.defaultdict(lambda: collections.defaultdict(list))
    for check in a.checks.split(","):
        for kern in a.kernels.split(","):
            for seed in a.seeds.split(","):
                env = dict(os.environ, ISTHMUS_CHECK_SEED=seed)
                env.pop("ISTHMUS_SIMD", None)
                if kern != "native":
                    env["ISTHMUS_SIMD"] = kern
                t0 = time.time()
                r = subprocess.run([sys.executable, os.path.join(src, "tests", "slow", check + ".py"),
                                    isthmus, src, os.path.join(a.work, check)],
                                   env=env, capture_output=True, text=True)
                for line in r.stdout.splitlines():
                    if line.startswith("# figure "):
                        _, _, name, val = line.split()
                        fig[check + " " + name][kern].append(float(val))
                print("# %s %s seed %s: exit %d, %.0f s" % (check, kern, seed, r.returncode,
                                                            time.time() - t0), flush=True)
    kerns = a.kernels.split(",")
    print("| check figure | " + " | ".join("%s min / mean / max" % k for k in kerns)
          + " | all min |")
    print("| --- |" + " --- |" * (len(kerns) + 1))
    for name in sorted(fig):
        cells, allv = [], []
        for k in kerns:
            v = fig[name][k]
            allv += v
            cells.append("%.2f / %.2f / %.2f" % (min(v), sum(v) / len(v), max(v)) if v else "-")
        print("| %s | %s | %.2f |" % (name, " | ".join(cells), min(allv)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
