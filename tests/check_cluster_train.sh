#!/bin/sh
# TAP test: data-parallel training as a job of 2 MPI ranks (docs/cluster.md).
#   check_cluster_train.sh ISTHMUS MPIRUN SOURCE-ROOT WORK-DIR BUILT-WITH-MPI(yes|no)
# Rank 0 writes one vector file whose provenance records the rank count and the exchange
# interval; the summary counts the exchanges (passes x exchanges per pass); a rank stopped
# on its own (SIGINT to rank 1 only) stops the whole job with a message naming that rank,
# and no vector file or temporary file is left. Skipped (TAP plan 1..0) without MPI.
set -u
isthmus=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
mpirun=$2
src=$3
work=$4
if [ "${5:-no}" != yes ] || [ -z "$mpirun" ]; then
    echo "1..0 # SKIP isthmus built without MPI, or no mpirun"
    exit 0
fi
. "$src/tests/tap.sh"
mpi_local
rm -rf "$work"
mkdir -p "$work" && cd "$work" || exit 1
echo "1..9"
gzip -dc "$src/data-samples/tillwick-en.txt.gz" | head -c 300000 > en.txt
"$isthmus" -q prepare -o en.prep en.txt >/dev/null 2>&1 || exit 1
mpi -np 2 "$isthmus" train --dimension=16 --passes=3 --exchanges=5 --threads=1 \
    --seed=7 -o two.isv en.prep >train.out 2>train.err
trc=$?
check "2 ranks: training succeeds (exit $trc) and writes the vectors" \
    sh -c "test $trc -eq 0 && test -s two.isv"

check "... the summary names 2 ranks and 15 exchanges (3 passes x 5)" \
    grep -q '2 ranks, 15 exchanges' train.err
"$isthmus" inspect two.isv >inspect.out 2>&1
check "... the provenance records the ranks, the exchanges per pass and the merge" \
    grep -q '"ranks":2,"exchanges_per_pass":5,"merge":"changes"' inspect.out
check "... a whole file: its checksums hold" grep -q 'checksums: *intact' inspect.out
check "... only rank 0 spoke: one summary line" \
    sh -c 'test "$(grep -c "tokens seen" train.err)" -eq 1'
check "... with no --method: skip-gram alone, and one warning says it is not the one-process default" \
    sh -c 'test "$(grep -c "warning: under mpirun the vectors are skip-gram alone" train.err)" -eq 1'

# A job far too long to finish (100000 passes of 50,000 tokens: hours on any machine, far
# beyond the test's timeout), then SIGINT to rank 1 alone. The signal goes only once rank 1
# has installed its SIGINT handler (the SigCgt mask of /proc/PID/status): from then on the
# stop flag is sticky and the trainer polls it at its start and throughout, so the outcome
# does not depend on how fast the machine is or how loaded. No sleep decides anything here;
# the deadline (120 s) only ends a wait for a rank that never appears.
ASAN_OPTIONS="${ASAN_OPTIONS:-}:detect_leaks=0" "$mpirun" -np 2 "$isthmus" train \
    --dimension=16 --passes=100000 --exchanges=2 --threads=1 -o stopped.isv en.prep \
    >stop.out 2>stop.err &
job=$!
catches_sigint() {   # pid: 0 when the process has its own SIGINT handler installed
    mask=$(sed -n 's/^SigCgt:[[:space:]]*//p' "/proc/$1/status" 2>/dev/null)
    last=${mask#"${mask%?}"}   # the last hex digit holds signals 1-4; SIGINT (2) is its 2
    [ -n "$last" ] && [ $(( 0x$last & 2 )) -ne 0 ]
}
victim=
deadline=$(( $(date +%s) + 120 ))
while [ -z "$victim" ] && [ "$(date +%s)" -lt "$deadline" ] && kill -0 "$job" 2>/dev/null; do
    # rank 1 of this job: our program writing stopped.isv in this directory
    for p in $(pgrep -f "train .*-o stopped.isv" 2>/dev/null); do
        [ "$(readlink /proc/$p/cwd 2>/dev/null)" = "$(pwd -P)" ] || continue
        [ "$(readlink /proc/$p/exe 2>/dev/null)" = "$(readlink -f "$isthmus")" ] || continue
        tr '\0' '\n' < /proc/$p/environ 2>/dev/null | grep -qx 'OMPI_COMM_WORLD_RANK=1' ||
            continue
        catches_sigint "$p" && victim=$p
    done
    [ -n "$victim" ] || sleep 0.05
done
if [ -n "$victim" ]; then kill -INT "$victim"; else
    echo "# rank 1 never installed its handler within 120 s; stopping mpirun"
    kill -TERM "$job"
fi
wait $job
rc=$?
check "a rank stopped alone: the job stops with the status of a stop, 130 ($rc)" test $rc -eq 130
check "... the message names rank 1" grep -q 'rank 1 of 2' stop.err
check "... no vector file and no temporary file left" \
    sh -c 'test ! -e stopped.isv && ! ls -a | grep -q "\.tmp-"'
tap_end cluster-train
