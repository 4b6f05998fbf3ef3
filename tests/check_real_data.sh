#!/bin/sh
# TAP test: the open real-data check sets extract to the sizes measured independently.
# Source of the expected figures: ../shared/yardsticks.md (measured 2026-12-01 with an
# independent numpy pipeline on the Debian packages sword-text-kjv, sword-text-sparv,
# dict-freedict-eng-spa, dict-freedict-spa-eng). Words are counted as yardsticks counts
# them: lower-cased runs of word characters, joined across an apostrophe inside a word.
# Usage: check_real_data.sh SOURCE-ROOT OUTPUT-DIRECTORY
set -u
src=$1
out=$2
if ! "$src/tests/fetch-real-data.sh" --check 2>/dev/null; then
    echo "1..0 # SKIP Debian Bible/FreeDict packages not installed"
    exit 77
fi
echo "1..6"
if "$src/tests/fetch-real-data.sh" "$out" >/dev/null 2>&1; then
    echo "ok 1 - fetch-real-data.sh produced the files"
else
    echo "not ok 1 - fetch-real-data.sh failed"
fi
python3 - "$out" <<'PY'
import re, sys
out = sys.argv[1]
word = re.compile(r"\w+(?:['\u2019]\w+)*")
n = 2
def check(label, got, want):
    global n
    print("%s %d - %s: %s (expected %s)" % ("ok" if got == want else "not ok", n, label,
                                            got, want))
    n += 1
for lang, want in (("en", (31102, 791521, 12696)), ("es", (31084, 703820, 28400))):
    try:
        lines = open("%s/%s.txt" % (out, lang), encoding="utf-8").read().splitlines()
    except OSError as e:
        lines = []
    counts = {}
    for line in lines:
        for w in word.findall(line.lower()):
            counts[w] = counts.get(w, 0) + 1
    check("%s verses, tokens, types" % lang, (len(lines), sum(counts.values()), len(counts)),
          want)
for name, want in (("en-es", 7982), ("es-en", 7513)):
    try:
        rows = [l for l in open("%s/%s.pairs" % (out, name), encoding="utf-8")]
    except OSError:
        rows = []
    check("%s single-word pairs" % name, len(rows), want)
# The keys pair verses across languages: every Spanish key is also an English key.
try:
    en = set(open(out + "/en.keys", encoding="utf-8").read().splitlines())
    es = open(out + "/es.keys", encoding="utf-8").read().splitlines()
    missing = sum(1 for k in es if k not in en)
except OSError:
    missing = -1
check("Spanish verse keys missing from the English keys", missing, 0)
PY
