#!/usr/bin/env python3
"""Candidates on the demo data (suite 'slow'): English and Spanish vectors trained by isthmus on
data-samples/tillwick-{en,es}.txt.gz, a map fitted on data-samples/demo-seed.pairs, then
isthmus propose over the whole source vocabulary with nothing excluded but the map's seeds.
The words of data-samples/demo-test.pairs are held out (not excluded), so the candidate list
can be checked against them: the share of their first candidates that are gold targets, the
share with a gold target among the candidates, and whether the flags and the 'certain' order
put right candidates first. Finally the gold test pairs are accepted in the candidate list and
merged back into the seed list.

The share of right first candidates must equal the CSLS P@1 that isthmus score reports for the
same map and test list (the same retrieval, so the same answers).

Skips (exit 77) when this isthmus has no train command.
Usage: propose_demo.py ISTHMUS SOURCE-DIR WORK-DIR
"""
import csv
import json
import re
import os
import subprocess
import sys

import trained
from trained import run, skip

# Floors, measured 2026-12-01 on a 2-core machine (d100, defaults otherwise, 1 training thread):
# first candidate gold for 360 of 441 test words (81.6%, equal to score's CSLS P@1), a gold
# target among the first 3 for 90.0%; right first candidates: 93.4% of the 350 mutual ones,
# 36.3% of the 91 others; first half of the test words in 'certain' order 97.7% right, second
# half 65.6%. The floors sit about 5 points below (441 words: a 95% interval is about +-4).
FLOOR_TOP1 = 75.0
FLOOR_TOP3 = 85.0


def read_gold(path):
    gold = {}
    with open(path, encoding="utf-8") as f:
        for line in f:
            if not line.strip() or line.startswith("#"):
                continue
            s, t = line.split()
            gold.setdefault(s.lower(), set()).add(t.lower())
    return gold


def read_candidates(path):
    with open(path, encoding="utf-8", newline="") as f:
        lines = [l for l in f if not l.startswith("#")]
    return list(csv.DictReader(lines, delimiter="\t", quoting=csv.QUOTE_NONE))


def main():
    isthmus, src, work = sys.argv[1:4]
    if subprocess.run([isthmus, "help", "train"], capture_output=True).returncode != 0:
        skip("this isthmus has no train command")
    work = trained.workdir(work)
    data = os.path.join(src, "data-samples")
    vec = {}
    for lang in ("en", "es"):
        vec[lang] = os.path.join(work, lang + ".isv")
        if not os.path.exists(vec[lang]):
            run([isthmus, "-q", "train", "--dimension", "100", *trained.train_flags(), "-o", vec[lang],
                 os.path.join(data, "tillwick-%s.txt.gz" % lang)])
    seeds, test = os.path.join(data, "demo-seed.pairs"), os.path.join(data, "demo-test.pairs")
    mp, res = os.path.join(work, "shop.map"), os.path.join(work, "score.json")
    run([isthmus, "-q", "align", vec["en"], vec["es"], "--seeds=" + seeds, "-o", mp],
        stdout=subprocess.DEVNULL)
    run([isthmus, "-q", "score", vec["en"], vec["es"], "--map=" + mp, "--test=" + test,
         "--rank-by=csls", "--json-out=" + res], stdout=subprocess.DEVNULL)
    p1 = 100 * json.load(open(res))["runs"][0]["precision"]["p@1"]
    gold = read_gold(test)
    checks = []
    # the informative run has the review filters off, so that its first candidates are
    # exactly the answers score counts; the certain run keeps the defaults
    no_filters = ["--with-numbers", "--with-variants", "--stop-share=0", "--min-score=-4",
                  "--mixed-order"]
    for order in ("informative", "certain"):
        cand = os.path.join(work, "candidates-%s.tsv" % order)
        run([isthmus, "-q", "propose", vec["en"], vec["es"], "--map=" + mp, "--top-sources=0",
             "--order=" + order, "-o", cand] + (no_filters if order == "informative" else []))
        rows = read_candidates(cand)
        firsts = [r for r in rows if r["place"] == "1" and r["source"] in gold]
        right = [r["candidate"] in gold[r["source"]] for r in firsts]
        any3 = {r["source"] for r in rows if r["source"] in gold and r["candidate"] in gold[r["source"]]}
        n = len(firsts)
        top1, top3 = 100.0 * sum(right) / n, 100.0 * len(any3) / n
        trained.figure("%s:top1" % order, top1)
        trained.figure("%s:top3" % order, top3)
        print("# %s: %d test words proposed; first candidate gold %d (%.1f%%), a gold target "
              "among the candidates %.1f%%" % (order, n, sum(right), top1, top3))
        if order == "informative":
            checks.append(("first candidate gold %.1f%% >= %.1f%%" % (top1, FLOOR_TOP1),
                           top1 >= FLOOR_TOP1))
            checks.append(("a gold target among 3 candidates %.1f%% >= %.1f%%" % (top3, FLOOR_TOP3),
                           top3 >= FLOOR_TOP3))
            checks.append(("first candidates right %.1f%% = score's CSLS P@1 %.1f%%" % (top1, p1),
                           abs(top1 - p1) < 0.05))
            mut = [ok for r, ok in zip(firsts, right) if r["mutual"] == "yes"]
            non = [ok for r, ok in zip(firsts, right) if r["mutual"] != "yes"]
            pm, pn = 100.0 * sum(mut) / len(mut), 100.0 * sum(non) / max(1, len(non))
            trained.figure("mutual-right", pm)
            trained.figure("other-right", pn)
            print("# mutual first candidates: %d, %.1f%% right; others %d, %.1f%% right"
                  % (len(mut), pm, len(non), pn))
            checks.append(("mutual candidates more often right: %.1f%% > %.1f%%" % (pm, pn),
                           pm > pn))
        else:
            half = n // 2
            a, b = 100.0 * sum(right[:half]) / half, 100.0 * sum(right[half:]) / (n - half)
            trained.figure("certain:first-half", a)
            trained.figure("certain:second-half", b)
            print("# certain order: first half %.1f%% right, second half %.1f%%" % (a, b))
            checks.append(("certain order puts right candidates first: %.1f%% > %.1f%%" % (a, b),
                           a > b))
            # the default filters: no number-shaped source word outside the same-spelling
            # block, which comes last
            blocks = [r.get("block", "") for r in rows]
            numeric = [r["source"] for r in rows if r.get("block") == "review"
                       and re.match(r"^[0-9]", r["source"])]
            last_review = max((i for i, b in enumerate(blocks) if b == "review"), default=-1)
            first_same = min((i for i, b in enumerate(blocks) if b == "same-spelling"),
                             default=len(rows))
            checks.append(("default list: no number-shaped word to review (%d), the %d "
                           "same-spelling rows last" % (len(numeric), len(rows) - first_same),
                           not numeric and last_review < first_same))
            # accept the gold first candidates and merge them into the seed list
            reviewed = os.path.join(work, "reviewed.tsv")
            with open(cand, encoding="utf-8") as f, open(reviewed, "w", encoding="utf-8") as o:
                for line in f:
                    fld = line.rstrip("\n").split("\t")
                    if (len(fld) > 3 and fld[3] == "1" and fld[1] in gold
                            and fld[2] in gold[fld[1]]):
                        fld[0] = "accept"
                    o.write("\t".join(fld) + "\n")
            out = os.path.join(work, "seed-grown.pairs")
            r = run([isthmus, "merge-pairs", seeds, reviewed, "-o", out], capture_output=True,
                    text=True)
            print("# " + r.stdout.strip().replace("\n", "\n# "))
            added = sum(1 for l in open(out, encoding="utf-8")) - sum(1 for l in open(seeds))
            checks.append(("merge added the %d accepted pairs (+1 comment line)" % sum(right),
                           added == sum(right) + 1))
    # excluded lists: normalised like the vocabulary ("Kitchen" excludes kitchen), and with
    # the test list excluded none of its words is proposed
    ex = os.path.join(work, "exclude.pairs")
    with open(ex, "w", encoding="utf-8") as f:
        f.write("Kitchen\tcocina\n")
    cand = os.path.join(work, "candidates-excluded.tsv")
    run([isthmus, "-q", "propose", vec["en"], vec["es"], "--map=" + mp, "--top-sources=0",
         "--exclude=" + ex, "--exclude=" + test, "-o", cand])
    srcs = {r["source"] for r in read_candidates(cand)}
    before = {r["source"] for r in read_candidates(os.path.join(work, "candidates-certain.tsv"))}
    checks.append(("'Kitchen' in an excluded list keeps kitchen out",
                   "kitchen" in before and "kitchen" not in srcs))
    checks.append(("no word of the excluded test list is proposed (%d were before)"
                   % len(before & set(gold)), not (srcs & set(gold)) and before & set(gold)))
    return trained.report("propose-demo", checks)


if __name__ == "__main__":
    sys.exit(main())
