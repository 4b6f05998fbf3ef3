#!/bin/sh
# TAP test of the demo generator and the shipped demo data (data-samples/).
#   check_demo_data.sh SOURCE-ROOT WORK-DIR          quick checks
#   check_demo_data.sh SOURCE-ROOT WORK-DIR --full   also regenerate the shipped files
#                                                   and compare them byte for byte
set -u
src=$1
work=$2
full=${3:-}
gen="$src/tools/dev/make-demo.py"
data="$src/data-samples"
rm -rf "$work/a" "$work/b" "$work/full"
mkdir -p "$work"

n=0
ok() { n=$((n + 1)); echo "ok $n - $1"; }
notok() { n=$((n + 1)); echo "not ok $n - $1"; }

if [ "$full" = "--full" ]; then echo "1..5"; else echo "1..4"; fi

python3 "$gen" --seed 3 --docs 1500 --out "$work/a" 2>/dev/null &&
python3 "$gen" --seed 3 --docs 1500 --out "$work/b" 2>/dev/null
same=yes
for f in tillwick-en.txt.gz tillwick-es.txt.gz demo-seed.pairs demo-test.pairs tiny-en.txt; do
    cmp -s "$work/a/$f" "$work/b/$f" || same=no
done
if [ $same = yes ]; then ok "same seed gives byte-identical files"; else
    notok "same seed gives byte-identical files"; fi

python3 "$gen" --seed 4 --docs 1500 --out "$work/b" 2>/dev/null
if cmp -s "$work/a/tillwick-en.txt.gz" "$work/b/tillwick-en.txt.gz"; then
    notok "another seed gives another corpus"; else ok "another seed gives another corpus"; fi

# The shipped lists: disjoint sources, every word frequent enough in the shipped corpora,
# no line of one corpus equal to a line of the other, tiny table shaped as its header says.
python3 - "$data" <<'PY'
import gzip, re, sys
d = sys.argv[1]
word = re.compile(r"\w+(?:['\u2019]\w+)*")
def counts(path):
    c = {}
    lines = gzip.open(path, "rt", encoding="utf-8").read().splitlines()
    for line in lines:
        for w in word.findall(line.lower()):
            c[w] = c.get(w, 0) + 1
    return c, set(lines)
en, en_lines = counts(d + "/tillwick-en.txt.gz")
es, es_lines = counts(d + "/tillwick-es.txt.gz")
def pairs(path):
    return [l.split("\t") for l in open(path, encoding="utf-8").read().splitlines()
            if l and not l.startswith("#")]
seed, test = pairs(d + "/demo-seed.pairs"), pairs(d + "/demo-test.pairs")
shared = {a for a, _ in seed} & {a for a, _ in test}
rare = [p for p in seed + test if en.get(p[0], 0) < 5 or es.get(p[1], 0) < 5]
common = len(en_lines & es_lines)
good = not shared and not rare and len(seed) >= 200 and len({a for a, _ in test}) >= 200
print("%s 3 - word lists: %d seed pairs, %d test words, %d shared sources, %d rare words, "
      "%d lines common to both corpora" % ("ok" if good and common < 50 else "not ok",
                                           len(seed), len({a for a, _ in test}), len(shared),
                                           len(rare), common))
rows = open(d + "/tiny-en.txt", encoding="utf-8").read().splitlines()
r, dim = map(int, rows[0].split())
shaped = r == len(rows) - 1 and all(len(x.split()) == dim + 1 for x in rows[1:])
print("%s 4 - tiny-en.txt has %d rows of %d components as its header says"
      % ("ok" if shaped else "not ok", r, dim))
PY
n=4

if [ "$full" = "--full" ]; then
    python3 "$gen" --seed 7 --out "$work/full" 2>/dev/null
    same=yes
    for f in tillwick-en.txt.gz tillwick-es.txt.gz demo-seed.pairs demo-test.pairs tiny-en.txt
    do
        cmp -s "$work/full/$f" "$data/$f" || { same=no; echo "# differs: $f"; }
    done
    if [ $same = yes ]; then ok "data-samples/ is what make-demo.py --seed 7 makes"; else
        notok "data-samples/ is what make-demo.py --seed 7 makes (rerun the README command)"
    fi
fi
rm -rf "$work/a" "$work/b" "$work/full"
