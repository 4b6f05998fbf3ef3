#!/bin/sh
# TAP test: a small demo run under valgrind memcheck is clean: no invalid access, no use of
# uninitialised values, no leak (definite, indirect or possible) in train, align and score.
#   check_valgrind.sh ISTHMUS SOURCE-ROOT WORK-DIR
# Exit 77 (skip) when valgrind is not installed. The build should be an ordinary one (not a
# sanitizer build: ASan and valgrind do not mix).
set -u
isthmus=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
src=$2
work=$3
data="$src/data-samples"
command -v valgrind >/dev/null 2>&1 || { echo "1..0 # SKIP valgrind is not installed"; exit 77; }
rm -rf "$work"
mkdir -p "$work" && cd "$work" || exit 1
# one BLAS thread: the checks are about our code, and valgrind serialises threads anyway
export OPENBLAS_NUM_THREADS=1
vg="valgrind --error-exitcode=99 --leak-check=full --show-leak-kinds=definite,indirect,possible \
--errors-for-leak-kinds=definite,indirect,possible --track-origins=yes --quiet"
n=0 failed=0
run() {   # description, isthmus arguments...
    desc=$1; shift
    n=$((n + 1))
    $vg --log-file="vg-$n.log" "$isthmus" "$@" >"out-$n.txt" 2>"err-$n.txt"
    rc=$?
    if [ $rc -eq 0 ] && [ ! -s "vg-$n.log" ]; then echo "ok $n - $desc"; else
        echo "not ok $n - $desc (exit $rc)"
        sed 's/^/# /' "vg-$n.log" | head -40
        sed 's/^/# /' "err-$n.txt" | head -10
        failed=$((failed + 1))
    fi
}
echo "1..6"
# 300 KB of each demo corpus (data-samples/), 1 pass, both blocks of the default method at
# dimension 16 (a 300-component SVD under memcheck would take most of the suite's time)
gzip -dc "$data/tillwick-en.txt.gz" | head -c 300000 > en.txt
gzip -dc "$data/tillwick-es.txt.gz" | head -c 300000 > es.txt
run "prepare en" -q prepare --min-freq=2 -o en.prep en.txt
run "train en (prepared corpus, 2 threads)" -q train --dimension=16 --ppmi-dimension=16 \
    --passes=1 --threads=2 \
    -o en.isv en.prep
run "train es (raw text, 1 thread, text copy)" -q train --dimension=16 --ppmi-dimension=16 \
    --passes=1 --threads=1 \
    --min-freq=2 --text-copy=es.txt.gz -o es.isv es.txt
run "align with 2 threads" -q align en.isv es.isv --seeds="$data/demo-seed.pairs" \
    --refine-rounds=2 --threads=2 -o m.map
run "score with a result file" -q score en.isv es.isv --map=m.map \
    --test="$data/demo-test.pairs" --threads=2 --json-out=r.json
run "convert the gzip text copy to native" -q convert es.txt.gz es2.isv
echo "# valgrind: $((n - failed)) passed, $failed failed"
[ $failed -eq 0 ]
