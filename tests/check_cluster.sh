#!/bin/sh
# TAP test: a job of 2 and of 3 MPI ranks gives byte for byte the output of one process.
#   check_cluster.sh ISTHMUS CLUSTER-RETRIEVE MPIRUN SOURCE-ROOT WORK-DIR BUILT-WITH-MPI(yes|no)
# Retrieval splits the target rows among the ranks and merges the k best lists exactly
# (docs/cluster.md), so the map of 'align' (refinement by mutual CSLS neighbours), the
# result JSON and table of 'score', the list of 'propose' and the lines of 'lookup' must not
# change by a bit. Each run sits in its own directory under the same file names, since
# the outputs record the names of their inputs. Skipped (TAP plan 1..0) without MPI.
# Open MPI runs on this machine only: shared memory between the ranks, the launcher's own
# traffic on the loopback interface; as root it needs the allow-run-as-root switches.
set -u
isthmus=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
probe=$(cd "$(dirname "$2")" && pwd)/$(basename "$2")
mpirun=$3
src=$4
work=$5
data="$src/data-samples"
if [ "${6:-no}" != yes ] || [ -z "$mpirun" ]; then
    echo "1..0 # SKIP isthmus built without MPI, or no mpirun"
    exit 0   # TAP's own skip (meson reads a TAP exit status of 77 as an error)
fi
. "$src/tests/tap.sh"
mpi_local
rm -rf "$work"
mkdir -p "$work/one" && cd "$work" || exit 1
# small vectors from 300 KB of each demo corpus, as in check_determinism.sh
gzip -dc "$data/tillwick-en.txt.gz" | head -c 300000 > one/en.txt
gzip -dc "$data/tillwick-es.txt.gz" | head -c 300000 > one/es.txt
for l in en es; do
    (cd one && "$isthmus" -q train --dimension=16 --passes=2 --threads=1 --min-freq=2 \
        --seed=7 -o $l.isv $l.txt) || exit 1
done
job() {   # directory, launcher words...: the whole measuring job in that directory
    d=$1; shift
    if [ "$d" != one ]; then mkdir -p "$d" && cp one/en.isv one/es.isv "$d"/ || return 1; fi
    cd "$d" || return 1
    "$@" "$isthmus" align en.isv es.isv --seeds="$data/demo-seed.pairs" -o shop.map \
        >align.out 2>align.err
    "$@" "$isthmus" score en.isv es.isv --map=shop.map --test="$data/demo-test.pairs" \
        --json-out=result.json >score.out 2>score.err
    "$@" "$isthmus" score en.isv es.isv --map=shop.map --test="$data/demo-test.pairs" \
        --memory=1 --threads=1 --json-out=small.json >small.out 2>small.err
    "$@" "$isthmus" propose en.isv es.isv --map=shop.map --exclude="$data/demo-test.pairs" \
        --candidates=3 -o cand.tsv >propose.out 2>propose.err
    "$@" "$isthmus" lookup en.isv es.isv --map=shop.map --top=5 kettle blue rusty \
        >lookup.out 2>lookup.err
    cd ..
}
job one
echo "1..19"
for np in 2 3; do
    job np$np mpi -np $np
    check "align, $np ranks: map byte-identical" same one/shop.map np$np/shop.map
    grep -v ' in [0-9.]* s$' one/align.err > one/rounds.txt
    grep -v ' in [0-9.]* s$' np$np/align.err > np$np/rounds.txt
    check "align, $np ranks: refinement rounds printed as by one process (timings aside)" \
        same one/rounds.txt np$np/rounds.txt
    check "score, $np ranks: result JSON byte-identical" same one/result.json np$np/result.json
    check "score, $np ranks: table byte-identical" same one/score.out np$np/score.out
    check "score, $np ranks, 1 MiB of tiles (several target blocks per rank): JSON identical" \
        same one/small.json np$np/small.json
    check "propose, $np ranks: candidate list byte-identical" same one/cand.tsv np$np/cand.tsv
    check "lookup, $np ranks: neighbours byte-identical" same one/lookup.out np$np/lookup.out
done
# synthetic spaces: dozens of target blocks per rank, equal scores on different ranks
"$probe" alone.bin >/dev/null 2>&1
for np in 2 3; do
    mpi -np $np "$probe" ranks$np.bin $np >/dev/null 2>&1
    check "synthetic ties, $np ranks: cosine and CSLS top-10 and neighbourhood terms identical" \
        same alone.bin ranks$np.bin
done
check "synthetic ties: the lists hold equal scores (the tie rule is exercised)" \
    python3 -c "import struct,sys; d=open('alone.bin','rb').read(); f=struct.unpack('<%df'%(len(d)//4),d); sys.exit(0 if len(set(f[10:20]))<10 or any(len(set(f[i*20+10:i*20+20]))<10 for i in range(257)) else 1)"
# a bad input is reported once (by rank 0), with the usual exit status, and no output
mpi -np 2 "$isthmus" score one/en.isv one/es.isv --map=missing.map \
    --test="$data/demo-test.pairs" --json-out=bad.json >bad.out 2>bad.err
rc=$?
check "a missing map under 2 ranks: exit 1" test $rc -eq 1
check "... one message naming the file, no result file" \
    sh -c 'test "$(grep -c "missing.map" bad.err)" -eq 1 && test ! -e bad.json'
tap_end cluster
