#!/bin/sh
# Compare two builds (or two settings) of the trainer on the open real-data check: for each
# seed, train English and Spanish vectors with each build, align en->es on two thirds of the
# FreeDict pairs (split seed 1, so both builds are tested on the same held-out words), score,
# and compare the second build against the first with `isthmus gate` (paired bootstrap over
# the test words, 1000 resamples). Prints refined CSLS P@1 per seed and build, the change with
# its 95% interval, and the means over seeds.
# usage: tools/dev/compare-training.sh A_ISTHMUS B_ISTHMUS DATA_DIR WORK_DIR [SEED...]
#   DATA_DIR from tests/fetch-real-data.sh; TRAIN_A / TRAIN_B: extra `train` options of each
#   side (default "--threads 2"); ENV_B: environment settings for side B's training only.
set -eu
a=$1 b=$2 data=$3 work=$4
shift 4
seeds=${*:-1 2 3}
mkdir -p "$work"
printf 'max drop p@1 csls refined 0.05\n' > "$work/drop.thresholds"
for lang in en es; do
    [ -s "$work/$lang.prep" ] || "$a" -q prepare -o "$work/$lang.prep" "$data/$lang.txt" > /dev/null
done
for s in $seeds; do
    for side in A B; do
        if [ $side = A ]; then bin=$a opts=${TRAIN_A:---threads 2} envs=""
        else bin=$b opts=${TRAIN_B:---threads 2} envs=${ENV_B:-}; fi
        for lang in en es; do
            # shellcheck disable=SC2086
            env $envs "$bin" -q train $opts --seed "$s" -o "$work/$side-$s-$lang.isv" \
                "$work/$lang.prep" > /dev/null
        done
        "$bin" -q align "$work/$side-$s-en.isv" "$work/$side-$s-es.isv" \
            --seeds="$data/en-es.pairs" --hold-out=0.3333 --split-seed=1 \
            --write-test="$work/test-$side-$s.pairs" -o "$work/$side-$s.map" > /dev/null
        "$bin" -q score "$work/$side-$s-en.isv" "$work/$side-$s-es.isv" --map="$work/$side-$s.map" \
            --test="$work/test-$side-$s.pairs" --no-diagnostics \
            --json-out="$work/$side-$s.json" > /dev/null
    done
    cmp -s "$work/test-A-$s.pairs" "$work/test-B-$s.pairs" || echo "seed $s: test lists differ" >&2
    "$b" gate --thresholds="$work/drop.thresholds" --baseline="$work/A-$s.json" \
        --verdict-out="$work/verdict-$s.json" "$work/B-$s.json" > /dev/null || true
    python3 - "$work/verdict-$s.json" "$s" <<'PY'
import json, sys
v = json.load(open(sys.argv[1]))
r = v["rules"][0]
lo, hi = r["interval"]
print("seed %s: en->es refined CSLS P@1  A %.1f  B %.1f  change %+.1f [%+.1f, %+.1f] (95%%, paired)"
      % (sys.argv[2], 100 * r["baseline"], 100 * r["new"], 100 * r["figure"], 100 * lo, 100 * hi))
PY
done | tee "$work/summary.txt"
python3 - "$work/summary.txt" <<'PY'
import re, statistics, sys
rows = [re.findall(r"[-+]?\d+\.\d", l) for l in open(sys.argv[1]) if l.startswith("seed")]
if rows:
    A = [float(r[0]) for r in rows]; B = [float(r[1]) for r in rows]
    d = [b - a for a, b in zip(A, B)]
    sd = statistics.stdev(d) if len(d) > 1 else float("nan")
    print("mean over %d seeds: A %.1f  B %.1f  change %+.1f (sd of the change %.1f)"
          % (len(rows), statistics.mean(A), statistics.mean(B), statistics.mean(d), sd))
PY
