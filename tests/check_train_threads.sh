#!/bin/sh
# TAP test: 'isthmus train' on raw text prepares it on --threads threads, as
# 'isthmus prepare --threads' would.
#   check_train_threads.sh ISTHMUS THREAD-COUNT-MODULE SOURCE-ROOT WORK-DIR
# The module (tests/thread_count.c, preloaded) counts the threads each run creates. Training
# raw text is preparing it and then training the prepared corpus, so going from 1 to 3
# threads must add to 'train RAW' exactly what it adds to 'prepare RAW' plus what it adds to
# 'train PREPARED'. Counts, not times: the check holds on any machine, loaded or idle.
set -u
isthmus=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
module=$(cd "$(dirname "$2")" && pwd)/$(basename "$2")
src=$3
work=$4
rm -rf "$work"
mkdir -p "$work" && cd "$work" || exit 1
. "$src/tests/tap.sh"
# a sanitizer runtime wants to come first; the module only forwards pthread_create
export ASAN_OPTIONS="${ASAN_OPTIONS:-}:verify_asan_link_order=0"
export OPENBLAS_NUM_THREADS=1
counted() {   # name, command...: run it with the module, keep its thread count in name.count
    name=$1; shift
    rm -f "$name.count"
    LD_PRELOAD="$module" ISTHMUS_THREAD_COUNT_FILE="$PWD/$name.count" "$@" \
        >"$name.out" 2>"$name.err"
    echo "# $name: exit $?, $(cat "$name.count" 2>/dev/null || echo no) threads created"
}
count() { cat "$1.count" 2>/dev/null || echo x; }
echo "1..4"
gzip -dc "$src/data-samples/tillwick-en.txt.gz" | head -c 400000 > en.txt
"$isthmus" -q prepare --threads=1 -o en.prep en.txt >/dev/null 2>&1 || exit 1
for t in 1 3; do
    counted "prepare$t" "$isthmus" -q prepare --threads=$t -o "p$t.prep" en.txt
    counted "trainprep$t" "$isthmus" -q train --method=skip-gram --dimension=8 --passes=1 \
        --threads=$t -o "tp$t.isv" en.prep
    counted "trainraw$t" "$isthmus" -q train --method=skip-gram --dimension=8 --passes=1 \
        --threads=$t -o "tr$t.isv" en.txt
done
all_counted=yes
for f in prepare1 prepare3 trainprep1 trainprep3 trainraw1 trainraw3; do
    [ -s "$f.count" ] || all_counted=no
done
check "every run finished and reported its thread count" \
    sh -c "test $all_counted = yes && test -s tr3.isv && test -s tp3.isv && test -s p3.prep"
check "prepare --threads=3 starts more threads than --threads=1 (the check can fail)" \
    test "$(count prepare3)" -gt "$(count prepare1)" 2>/dev/null
check "prepare writes the same bytes on 1 and 3 threads" cmp p1.prep p3.prep
check "train RAW --threads=3 adds the threads of prepare and of train PREPARED" \
    test $(( $(count trainraw3) - $(count trainraw1) )) -eq \
         $(( $(count prepare3) - $(count prepare1) + $(count trainprep3) - $(count trainprep1) ))
tap_end train-threads
