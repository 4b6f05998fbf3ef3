#!/bin/sh
# Each public header compiles alone, as C11 with -pedantic -Werror and as C++, and every
# symbol the shared library exports starts with ist_. Prints TAP.
# usage: check_headers.sh CC CXX INCLUDE_DIR SHARED_LIB
cc=$1 cxx=$2 inc=$3 lib=$4
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
n=0 failed=0
ok() { n=$((n + 1)); echo "ok $n - $1"; }
bad() { n=$((n + 1)); failed=$((failed + 1)); echo "not ok $n - $1"; sed 's/^/# /' "$tmp/log"; }
headers=$(cd "$inc/isthmus" && ls *.h)
total=$(( $(echo "$headers" | wc -w) * 2 + 1 ))
[ -n "$cxx" ] && command -v "$cxx" >/dev/null 2>&1 || total=$(( $(echo "$headers" | wc -w) + 1 ))
echo "1..$total"
for h in $headers; do
    printf '#include <isthmus/%s>\n#include <isthmus/%s>\nint isthmus_header_probe;\n' "$h" "$h" > "$tmp/t.c"
    if $cc -std=c11 -pedantic -Wall -Wextra -Werror -I"$inc" -c "$tmp/t.c" -o "$tmp/t.o" >"$tmp/log" 2>&1
    then ok "$h alone as C11 (-pedantic -Werror, included twice)"; else bad "$h alone as C11"; fi
    if [ -n "$cxx" ] && command -v "$cxx" >/dev/null 2>&1; then
        cp "$tmp/t.c" "$tmp/t.cc"
        if $cxx -std=c++11 -pedantic -Wall -Wextra -Werror -I"$inc" -c "$tmp/t.cc" -o "$tmp/t.o" >"$tmp/log" 2>&1
        then ok "$h as C++11"; else bad "$h as C++11"; fi
    fi
done
nm -D --defined-only "$lib" | awk '$2 ~ /^[TDBR]$/ {print $3}' | grep -v '^ist_' | grep -v '^_' > "$tmp/log"
if [ -s "$tmp/log" ]; then bad "every exported symbol starts with ist_"; else ok "every exported symbol starts with ist_"; fi
echo "# headers: $((n - failed)) passed, $failed failed"
[ $failed -eq 0 ]
