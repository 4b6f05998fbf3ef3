#!/usr/bin/env python3
"""Extract single-word translation pairs from an installed FreeDict dictd dictionary.

Reads NAME.index and NAME.dict.dz (Debian packages dict-freedict-eng-spa and
dict-freedict-spa-eng put them under /usr/share/dictd). The index has one line per
entry: headword, offset and length, the last two as base-64 numbers into the
uncompressed .dict text (the .dict.dz file is ordinary gzip to a reader). An entry
is a headword line `word /phonetic/` followed by translation lines, either numbered
(`1. a, b`) or plain (`a, b`). Entries whose headword starts with 00database are
metadata and skipped.

Damaged entries: in eng-spa several hundred multiword entries kept only the first
word of their headword (`a /ədei/` -> `aldía`, which was "a day"). They are found
because another entry with the same headword has a phonetic that is a proper prefix
of theirs (stress marks ˈ and ˌ ignored), and dropped.

A pair is kept when source and target are each a single word: one run of word
characters, optionally joined across an apostrophe inside the word. Both sides are
lower-cased; duplicates are written once, in dictionary order. Output lines are
`source<TAB>target`.

Usage: extract-freedict.py NAME OUT.pairs [--dir /usr/share/dictd] [--keep-damaged]
"""

import argparse
import gzip
import os
import re
import sys

B64 = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/"
HEAD_RE = re.compile(r"^(.*?)\s*/(.*)/\s*$")
NUMBER_RE = re.compile(r"^\d+\.\s+")
WORD_RE = re.compile(r"\w+(?:['\u2019]\w+)*")


def b64_number(text, where):
    n = 0
    for ch in text:
        digit = B64.find(ch)
        if digit < 0:
            sys.exit("extract-freedict: %s: expected a base-64 number, found %r" % (where, text))
        n = n * 64 + digit
    return n


def read_entries(directory, name):
    """Yield (headword, phonetic or None, [translations]) in index order."""
    index_path = os.path.join(directory, "freedict-%s.index" % name)
    dict_path = os.path.join(directory, "freedict-%s.dict.dz" % name)
    for path in (index_path, dict_path):
        if not os.path.exists(path):
            sys.exit("extract-freedict: %s not found (install the Debian package dict-freedict-%s)"
                     % (path, name))
    with gzip.open(dict_path) as f:
        data = f.read()
    with open(index_path, encoding="utf-8") as f:
        for lineno, line in enumerate(f, 1):
            where = "%s:%d" % (index_path, lineno)
            fields = line.rstrip("\n").split("\t")
            if len(fields) != 3:
                sys.exit("extract-freedict: %s: expected 3 tab-separated fields, found %d"
                         % (where, len(fields)))
            if fields[0].startswith("00database"):
                continue
            offset, length = b64_number(fields[1], where), b64_number(fields[2], where)
            if offset + length > len(data):
                sys.exit("extract-freedict: %s: entry runs past the end of %s" % (where, dict_path))
            lines = data[offset:offset + length].decode("utf-8").split("\n")
            m = HEAD_RE.match(lines[0])
            headword, phonetic = (m.group(1), m.group(2)) if m else (lines[0].strip(), None)
            translations = []
            for text in lines[1:]:
                text = NUMBER_RE.sub("", text.strip())
                translations.extend(t.strip() for t in text.split(",") if t.strip())
            yield headword, phonetic, translations


def strip_stress(phonetic):
    return phonetic.replace("\u02c8", "").replace("\u02cc", "")


def damaged(entries):
    """Indices of entries whose phonetic extends another same-headword entry's phonetic."""
    by_head = {}
    for i, (head, phon, _) in enumerate(entries):
        if phon:
            by_head.setdefault(head, []).append(strip_stress(phon))
    bad = set()
    for i, (head, phon, _) in enumerate(entries):
        if not phon:
            continue
        p = strip_stress(phon)
        if any(q and q != p and p.startswith(q) for q in by_head[head]):
            bad.add(i)
    return bad


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("name", help="dictionary name: eng-spa or spa-eng")
    ap.add_argument("output", help="pair file to write, source<TAB>target per line")
    ap.add_argument("--dir", default="/usr/share/dictd", help="where the dictd files are")
    ap.add_argument("--keep-damaged", action="store_true",
                    help="do not drop the damaged multiword entries")
    ap.add_argument("--stats", action="store_true", help="print counts to stderr")
    args = ap.parse_args()

    entries = list(read_entries(args.dir, args.name))
    bad = set() if args.keep_damaged else damaged(entries)
    seen, pairs = set(), []
    for i, (head, _, translations) in enumerate(entries):
        if i in bad:
            continue
        src = head.lower()
        if not WORD_RE.fullmatch(src):
            continue
        for t in translations:
            dst = t.lower()
            if WORD_RE.fullmatch(dst) and (src, dst) not in seen:
                seen.add((src, dst))
                pairs.append((src, dst))
    if not pairs:
        sys.exit("extract-freedict: no single-word pairs found in %s" % args.name)
    tmp = args.output + ".tmp%d" % os.getpid()
    with open(tmp, "w", encoding="utf-8", newline="\n") as f:
        for src, dst in pairs:
            f.write("%s\t%s\n" % (src, dst))
    os.replace(tmp, args.output)
    if args.stats:
        print("%s: %d entries, %d damaged dropped, %d pairs, %d source words" % (
            args.name, len(entries), len(bad), len(pairs), len({s for s, _ in pairs})),
            file=sys.stderr)


if __name__ == "__main__":
    main()
