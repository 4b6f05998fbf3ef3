#!/bin/sh
# TAP test: the same inputs and seed give byte-identical outputs, end to end through the CLI.
#   check_determinism.sh ISTHMUS SOURCE-ROOT WORK-DIR
# Single-threaded training (vectors and their provenance), alignment (the map file) with 1
# and 2 threads, and scoring (the result JSON) with 1 and 2 threads. The one field of the
# result that legitimately differs between the two thread counts is the recorded option
# "threads" (docs/reliability.md, "Determinism"); it is removed before comparing. Nothing
# in the outputs depends on the time or the host: runs at different times compare equal.
set -u
isthmus=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
src=$2
work=$3
data="$src/data-samples"
rm -rf "$work"
mkdir -p "$work" && cd "$work" || exit 1
. "$src/tests/tap.sh"
echo "1..10"
# 300 KB of each demo corpus: a few thousand words, trained in well under a second
gzip -dc "$data/tillwick-en.txt.gz" | head -c 300000 > en.txt
gzip -dc "$data/tillwick-es.txt.gz" | head -c 300000 > es.txt
train() {   # lang, out
    "$isthmus" -q train --dimension=16 --passes=2 --threads=1 --min-freq=2 --seed=7 \
        --text-copy="$2.txt" -o "$2" "$1.txt"
}
train en en1.isv && train en en2.isv && train es es1.isv
sleep 1   # a second apart: a timestamp anywhere would show
train es es2.isv
check "train, 1 thread: native vectors byte-identical" same en1.isv en2.isv
check "train, 1 thread: text copy byte-identical" same es1.isv.txt es2.isv.txt
for t in 1 2; do
    "$isthmus" -q align en1.isv es1.isv --seeds="$data/demo-seed.pairs" --threads=$t \
        -o m$t.map >/dev/null 2>&1
done
"$isthmus" -q align en1.isv es1.isv --seeds="$data/demo-seed.pairs" --threads=1 -o m1b.map \
    >/dev/null 2>&1
check "align: map byte-identical on a rerun" same m1.map m1b.map
check "align: map byte-identical with 1 and 2 threads" same m1.map m2.map
for t in 1 2; do
    "$isthmus" -q score en1.isv es1.isv --map=m1.map --test="$data/demo-test.pairs" \
        --threads=$t --json-out=r$t.json >s$t.out 2>&1
done
"$isthmus" -q score en1.isv es1.isv --map=m1.map --test="$data/demo-test.pairs" \
    --threads=1 --json-out=r1b.json >/dev/null 2>&1
check "score: result JSON byte-identical on a rerun" same r1.json r1b.json
test -s r1.json && sed 's/"threads": *[0-9]*,//' r1.json > r1.masked
test -s r2.json && sed 's/"threads": *[0-9]*,//' r2.json > r2.masked
check "score: result JSON identical with 1 and 2 threads (but the recorded thread count)" \
    same r1.masked r2.masked
check "score: the printed table identical with 1 and 2 threads" same s1.out s2.out
"$isthmus" -q gate --thresholds="$data/demo-gate.thresholds" --verdict-out=v1.json r1.json \
    >/dev/null 2>&1
"$isthmus" -q gate --thresholds="$data/demo-gate.thresholds" --verdict-out=v1b.json r1.json \
    >/dev/null 2>&1
check "gate: verdict JSON byte-identical on a rerun" same v1.json v1b.json
"$isthmus" -q report r1.json --verdict=v1.json -o p1.html >/dev/null 2>&1
"$isthmus" -q report r1.json --verdict=v1.json -o p1b.html >/dev/null 2>&1
check "report: HTML byte-identical on a rerun (no timestamp in the page)" same p1.html p1b.html
for t in 1 2; do
    "$isthmus" -q propose en1.isv es1.isv --map=m1.map --threads=$t -o c$t.tsv >/dev/null 2>&1
done
check "propose: candidate list identical with 1 and 2 threads" same c1.tsv c2.tsv
tap_end determinism
