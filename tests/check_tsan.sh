#!/bin/sh
# The commands that start threads, in a ThreadSanitizer build (suite 'tsan', defined only
# when the build is configured with -Db_sanitize=thread; run it with --setup=tsan, which
# names the suppressions file and keeps OpenBLAS to one thread). train with 2 threads on
# demo text (the fast kernel, the same on 4-float portable vectors, the reference kernel),
# then align and score with 2 threads. Prints TAP; a race report fails its case.
# usage: check_tsan.sh ISTHMUS SOURCE_ROOT WORK_DIR
set -u
I=$1 top=$2 work=$3
rm -rf "$work" && mkdir -p "$work" || exit 1
n=0 failed=0
check() {   # description, command...
    desc=$1; shift
    n=$((n + 1))
    if "$@" >"$work/out-$n" 2>&1; then echo "ok $n - $desc"; else
        echo "not ok $n - $desc"
        grep -A25 'WARNING: ThreadSanitizer' "$work/out-$n" | head -40 | sed 's/^/# /'
        tail -5 "$work/out-$n" | sed 's/^/# /'
        failed=$((failed + 1))
    fi
}
echo "1..5"
gzip -dc "$top/data-samples/tillwick-en.txt.gz" | head -c 500000 > "$work/en.txt"
gzip -dc "$top/data-samples/tillwick-es.txt.gz" | head -c 500000 > "$work/es.txt"
check "train with 2 threads" sh -c "'$I' -q train --dimension=16 --passes=2 --threads=2 \
    --min-freq=2 -o '$work/en.isv' '$work/en.txt' && '$I' -q train --dimension=16 --passes=2 \
    --threads=2 --min-freq=2 -o '$work/es.isv' '$work/es.txt'"
# the reference kernel updates the shared vectors with scalar code, which TSan sees: its
# intended races are reported without tests/tsan.supp and must all be suppressed with it
# (the AVX2 kernel's 32-byte vector accesses are wider than TSan instruments, so the fast
# kernel is also run with its 16-byte portable vectors)
check "train with 2 threads, reference kernel" "$I" -q train --kernel=reference --dimension=16 \
    --passes=2 --threads=2 --min-freq=2 -o "$work/ref.isv" "$work/en.txt"
check "train with 2 threads, fast kernel on 4-float vectors (ISTHMUS_SIMD=portable)" \
    env ISTHMUS_SIMD=portable "$I" -q train --dimension=16 --passes=2 --threads=2 --min-freq=2 \
    -o "$work/port.isv" "$work/en.txt"
check "align with 2 threads" "$I" -q align "$work/en.isv" "$work/es.isv" \
    --seeds="$top/data-samples/demo-seed.pairs" --threads=2 -o "$work/m.map"
check "score with 2 threads" "$I" -q score "$work/en.isv" "$work/es.isv" --map="$work/m.map" \
    --test="$top/data-samples/demo-test.pairs" --threads=2 --json-out="$work/r.json"
echo "# tsan: $((n - failed)) passed, $failed failed"
[ $failed -eq 0 ]
