#!/bin/sh
# TAP test (suite 'slow'): on the open real-data check, a job of 2 and of 3 MPI ranks gives
# byte for byte the output of one process.
#   check_cluster_real.sh ISTHMUS MPIRUN SOURCE-ROOT WORK-DIR BUILT-WITH-MPI(yes|no)
# The data: English and Spanish Bible texts (Debian sword-text-kjv, sword-text-sparv) and
# FreeDict word pairs (dict-freedict-eng-spa), extracted by tests/fetch-real-data.sh. Vectors
# are trained once by one process (one thread, fixed seed); then align (hold-out split,
# refinement by mutual CSLS neighbours), score (default tiles and 1 MiB of tiles), propose
# and lookup run as 1, 2 and 3 ranks on copies of the same files. Retrieval splits the
# target rows among the ranks and merges the k best lists exactly (docs/cluster.md), so no
# output may change by a bit. Skipped (TAP plan 1..0) without MPI or without the data.
set -u
isthmus=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
mpirun=$2
src=$3
work=$4
if [ "${5:-no}" != yes ] || [ -z "$mpirun" ]; then
    echo "1..0 # SKIP isthmus built without MPI, or no mpirun"
    exit 0
fi
mkdir -p "$work" || exit 1
cd "$work" || exit 1
if ! sh "$src/tests/fetch-real-data.sh" "$work/real-data" >fetch.log 2>&1; then
    echo "1..0 # SKIP real data not available: $(tail -n 1 fetch.log)"
    exit 0
fi
data=$work/real-data
. "$src/tests/tap.sh"
mpi_local
rm -rf one np2 np3
mkdir -p one || exit 1
for l in en es; do
    "$isthmus" -q train --method=skip-gram --dimension=64 --passes=3 --threads=1 --seed=1 \
        -o one/$l.isv "$data/$l.txt" || exit 1
done
job() {   # directory, launcher words...: the whole measuring job in that directory
    d=$1; shift
    if [ "$d" != one ]; then mkdir -p "$d" && cp one/en.isv one/es.isv "$d"/ || return 1; fi
    cd "$d" || return 1
    "$@" "$isthmus" align en.isv es.isv --seeds="$data/en-es.pairs" --hold-out=0.3333 \
        --split-seed=1 --write-test=test.pairs -o bible.map >align.out 2>align.err
    "$@" "$isthmus" score en.isv es.isv --map=bible.map --test=test.pairs \
        --json-out=result.json >score.out 2>score.err
    "$@" "$isthmus" score en.isv es.isv --map=bible.map --test=test.pairs \
        --memory=1 --threads=1 --json-out=small.json >small.out 2>small.err
    "$@" "$isthmus" propose en.isv es.isv --map=bible.map --exclude="$data/en-es.pairs" \
        --candidates=3 -o cand.tsv >propose.out 2>propose.err
    "$@" "$isthmus" lookup en.isv es.isv --map=bible.map --top=10 lord water king bread \
        >lookup.out 2>lookup.err
    grep -v ' in [0-9.]* s$' align.err > rounds.txt
    cd ..
}
job one
echo "1..17"
check "one process: a map, a test list, a result, candidates and neighbours" \
    sh -c 'for f in bible.map test.pairs result.json small.json cand.tsv lookup.out; do
               test -s one/$f || exit 1; done'
for np in 2 3; do
    job np$np mpi -np $np
    check "align, $np ranks: map byte-identical" same one/bible.map np$np/bible.map
    check "align, $np ranks: the same held-out test list" same one/test.pairs np$np/test.pairs
    check "align, $np ranks: refinement rounds printed as by one process (timings aside)" \
        same one/rounds.txt np$np/rounds.txt
    check "score, $np ranks: result JSON byte-identical" same one/result.json np$np/result.json
    check "score, $np ranks: table byte-identical" same one/score.out np$np/score.out
    check "score, $np ranks, 1 MiB of tiles: result JSON byte-identical" \
        same one/small.json np$np/small.json
    check "propose, $np ranks: candidate list byte-identical" same one/cand.tsv np$np/cand.tsv
    check "lookup, $np ranks: neighbours byte-identical" same one/lookup.out np$np/lookup.out
done
tap_end cluster-real
