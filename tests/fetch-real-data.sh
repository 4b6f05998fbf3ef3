#!/bin/sh
# Produce the open real-data check sets into a directory (a build-tree directory):
#   en.txt, es.txt          one verse per line (Debian sword-text-kjv, sword-text-sparv)
#   en.keys, es.keys        the verse key of each line, to pair verses across languages
#   en-es.pairs, es-en.pairs single-word pairs (Debian dict-freedict-eng-spa, -spa-eng)
# Needs: libsword-utils (mod2imp), sword-text-kjv, sword-text-sparv,
#        dict-freedict-eng-spa, dict-freedict-spa-eng, python3.
# Idempotent: a file that exists and is newer than its source data is left alone.
set -eu

# With --check, only report whether the packages are installed (exit 0 or 1).
if [ $# -ne 1 ]; then
    echo "usage: $0 OUTPUT-DIRECTORY | --check" >&2
    exit 2
fi
out=$1
tools=$(cd "$(dirname "$0")/../tools/dev" && pwd)
sword=/usr/share/sword/modules/texts/ztext
dictd=/usr/share/dictd

missing=""
command -v python3 >/dev/null 2>&1 || missing="$missing python3"
command -v mod2imp >/dev/null 2>&1 || missing="$missing libsword-utils"
[ -d "$sword/engKJV2006eb" ] || missing="$missing sword-text-kjv"
[ -d "$sword/spaRV1909eb" ] || missing="$missing sword-text-sparv"
[ -f "$dictd/freedict-eng-spa.index" ] || missing="$missing dict-freedict-eng-spa"
[ -f "$dictd/freedict-spa-eng.index" ] || missing="$missing dict-freedict-spa-eng"
if [ -n "$missing" ]; then
    echo "$0: missing Debian packages:$missing" >&2
    echo "$0: install them with: apt-get install$missing" >&2
    exit 1
fi
[ "$out" = "--check" ] && exit 0

mkdir -p "$out"

# fresh TARGET SOURCE: true when TARGET exists and is not older than SOURCE and this script
fresh() {
    [ -s "$1" ] && [ ! "$2" -nt "$1" ] && [ ! "$0" -nt "$1" ] && [ ! "$tools/$3" -nt "$1" ]
}

bible() {  # MODULE NAME
    if fresh "$out/$2.txt" "$sword/$1" extract-bible.py && [ -s "$out/$2.keys" ]; then
        return 0
    fi
    python3 "$tools/extract-bible.py" "$1" "$out/$2.txt" --keys "$out/$2.keys" --stats
}

dict() {  # NAME OUT
    if fresh "$out/$2.pairs" "$dictd/freedict-$1.index" extract-freedict.py; then
        return 0
    fi
    python3 "$tools/extract-freedict.py" "$1" "$out/$2.pairs" --dir "$dictd" --stats
}

bible engKJV2006eb en
bible spaRV1909eb es
dict eng-spa en-es
dict spa-eng es-en
