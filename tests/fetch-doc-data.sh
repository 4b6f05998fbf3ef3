#!/bin/sh
# Produce the documentation check sets into a directory (a build-tree directory):
#   en.txt, de.txt            Debian's manual pages installed in both English and German
#                             (packages manpages, manpages-de and the pages' own packages),
#                             rendered by groff, one paragraph per line
#   en-de.pairs, de-en.pairs  single-word pairs (Debian dict-freedict-eng-deu, -deu-eng)
# Needs: groff (groff-base), manpages, manpages-de, dict-freedict-eng-deu,
#        dict-freedict-deu-eng, python3.
# ISTHMUS_MAN_SECTIONS=1,8 keeps only those manual sections (default: all).
# Idempotent: a file that exists and is newer than this script and its tools is left alone
# (and was made with the same sections).
set -eu

if [ $# -ne 1 ]; then
    echo "usage: $0 OUTPUT-DIRECTORY | --check" >&2
    exit 2
fi
out=$1
tools=$(cd "$(dirname "$0")/../tools/dev" && pwd)
dictd=/usr/share/dictd

missing=""
command -v python3 >/dev/null 2>&1 || missing="$missing python3"
command -v groff >/dev/null 2>&1 || missing="$missing groff-base"
[ -f /usr/share/man/man1/intro.1.gz ] || missing="$missing manpages"
[ -d /usr/share/man/de/man1 ] || missing="$missing manpages-de"
[ -f "$dictd/freedict-eng-deu.index" ] || missing="$missing dict-freedict-eng-deu"
[ -f "$dictd/freedict-deu-eng.index" ] || missing="$missing dict-freedict-deu-eng"
if [ -n "$missing" ]; then
    echo "$0: missing Debian packages:$missing" >&2
    echo "$0: install them with: apt-get install$missing" >&2
    exit 1
fi
[ "$out" = "--check" ] && exit 0

mkdir -p "$out"

# fresh TARGET TOOL: TARGET exists and is not older than this script or TOOL
fresh() {
    [ -s "$1" ] && [ ! "$0" -nt "$1" ] && [ ! "$tools/$2" -nt "$1" ]
}

sections=${ISTHMUS_MAN_SECTIONS:-}
if ! fresh "$out/de.txt" extract-manpages.py || ! fresh "$out/en.txt" extract-manpages.py ||
   [ "$(cat "$out/sections" 2>/dev/null)" != "sections=$sections" ]; then
    python3 "$tools/extract-manpages.py" "$out" ${sections:+--sections "$sections"} --stats
    echo "sections=$sections" > "$out/sections"
fi
for d in eng-deu:en-de deu-eng:de-en; do
    name=${d%%:*}
    pairs=${d##*:}
    if ! fresh "$out/$pairs.pairs" extract-freedict.py; then
        python3 "$tools/extract-freedict.py" "$name" "$out/$pairs.pairs" --dir "$dictd" --stats
    fi
done
