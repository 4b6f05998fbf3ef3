#!/usr/bin/env python3
"""Real text (suite 'slow'): vectors trained by isthmus with its DEFAULT settings on the
public-domain Bible texts of Debian's sword-text-kjv (English) and sword-text-sparv (Spanish),
extracted by tests/fetch-real-data.sh, put obvious neighbour pairs in each other's top 10 by
cosine, in both directions.

The pairs were chosen as obvious for these texts (compass points, times of day, numbers, herd
animals, metals, the animals and vehicles of the narratives) and checked on 2026-12-01 with
the defaults (dimension 100, context 10, 20 passes) and with dimension 300. Training uses one
thread and a fixed seed (tests/slow/trained.py); the figures are judged against floors. Family words were tried and are NOT here:
'son'/'daughter' ranked 366 and 194 (the genealogies put 'son' among names), 'father'/'mother'
2 and 20 at dimension 300.

Skips (exit 77) without numpy, the extraction script or the Debian packages.
Usage: real_neighbours.py ISTHMUS SOURCE-DIR WORK-DIR
"""
import os
import subprocess
import sys

import trained
from trained import skip

PAIRS = {
    "en": [("north", "south"), ("east", "west"), ("morning", "evening"), ("hundred", "thousand"),
           ("two", "three"), ("sheep", "oxen"), ("bullocks", "rams"), ("lambs", "goats"),
           ("silver", "gold"), ("horses", "chariots"), ("camels", "asses")],
    "es": [("norte", "mediodía"), ("oriente", "occidente"), ("mañana", "tarde"), ("dos", "tres"),
           ("ovejas", "vacas"), ("becerros", "carneros"), ("corderos", "machos"),
           ("oro", "plata"), ("caballos", "carros"), ("camellos", "asnos")],
}

# Judged over all pairs, not pair by pair: a hard top-10 cut on each of 21 pairs failed on one
# machine for a borderline pair. Measured 2026-12-02 with tools/dev/slow-spread.py over seeds
# 1-5 x {native (avx2), portable} kernels, 1 training thread (docs/defaults.md, "Spread of the
# slow checks"): pairs within the top 10 both ways 19-20 of 21 (mean 19.8); mean reciprocal
# rank of the worse side 0.55-0.64; the worst single rank 28 (oro/plata, seed 5), then 16
# (silver/gold) and 15 (dos/tres). The two kernel families gave the same ranks for every seed.
FLOOR_TOP10 = 18     # pairs whose worse rank is 10 or better: one pair below the lowest run
FLOOR_MRR = 0.45     # mean over pairs of 1 / worse rank: 0.10 below the lowest run
LOOSE = 100          # every single pair: worse rank at most this (3.5x the worst seen)


def load(path, np):
    words, rows = [], []
    with open(path, encoding="utf-8") as f:
        for line in f:
            t = line.split()
            if len(t) == 2:
                continue
            words.append(t[0])
            rows.append([float(x) for x in t[1:]])
    m = np.array(rows, dtype=np.float64)
    m /= np.linalg.norm(m, axis=1, keepdims=True) + 1e-12
    return {w: i for i, w in enumerate(words)}, m


def main():
    try:
        import numpy as np
    except ImportError:
        skip("numpy is not installed")
    isthmus, src, work = sys.argv[1:4]
    data, tw = trained.real_data(isthmus, src, work, need_train=False)
    checks = []
    close, total, rr = 0, 0, 0.0
    for lang, pairs in PAIRS.items():
        vec = os.path.join(tw, lang + "-default.isv")
        txt = os.path.join(tw, lang + "-default.txt")
        if not os.path.exists(txt):
            # the skip-gram trainer these floors were measured on (the default method is
            # now skip-gram+ppmi, checked by doc_align.py)
            subprocess.run([isthmus, "-q", "train", *trained.train_flags(), "--method=skip-gram",
                            "-o", vec, "--text-copy", txt, os.path.join(data, lang + ".txt")],
                           check=True)
        ix, m = load(txt, np)

        def rank(a, b):
            s = m @ m[ix[a]]
            s[ix[a]] = -2.0
            return int((s > s[ix[b]]).sum()) + 1

        for a, b in pairs:
            if a not in ix or b not in ix:
                checks.append((f"{lang}: '{a}' and '{b}' are in the vocabulary", False))
                continue
            ra, rb = rank(a, b), rank(b, a)
            worst = max(ra, rb)
            trained.figure(f"{lang}:{a}/{b}", worst)
            total += 1
            close += worst <= 10
            rr += 1.0 / worst
            checks.append((f"{lang}: {b} is #{ra} of {a}'s neighbours, {a} #{rb} of {b}'s "
                           f"(within the first {LOOSE} both ways)", worst <= LOOSE))
    trained.figure("pairs-top10", close)
    trained.figure("mean-reciprocal-rank", rr / max(1, total))
    checks.append((f"{close} of {total} pairs within the top 10 both ways (at least {FLOOR_TOP10})",
                   close >= FLOOR_TOP10))
    checks.append((f"mean reciprocal rank of the worse side {rr / max(1, total):.3f} "
                   f"(at least {FLOOR_MRR})", rr / max(1, total) >= FLOOR_MRR))
    return trained.report("real-neighbours", checks)


if __name__ == "__main__":
    sys.exit(main())
