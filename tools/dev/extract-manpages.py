#!/usr/bin/env python3
"""Extract the documentation check's texts: Debian's English manual pages (package manpages and
the packages of the pages themselves) and their German translations (package manpages-de),
rendered to plain text with groff, one paragraph a line.

Only pages installed in both languages are used (the same names under /usr/share/man/manN
and /usr/share/man/de/manN), so the two texts cover the same programs and files; they are
comparable, not parallel. A page that only includes another (.so) is skipped. Pages are
rendered in batches, one groff run per batch: `groff -k -man -Tutf8 -rLL=4000n -rHY=0
-P-cbou` (-k: input encoding by preconv; a long line length and no hyphenation keep each
paragraph on one output line; -P-cbou: plain characters, no overstriking). The running
header and footer lines of each page are dropped.

Usage: extract-manpages.py OUT_DIR [--man /usr/share/man] [--sections 1,5,7,8] [--stats]
(--sections keeps only those sections; all by default)
Writes OUT_DIR/en.txt and OUT_DIR/de.txt.
"""
import argparse
import gzip
import os
import re
import subprocess
import sys
import tempfile

BATCH = 60
# running header "NAME(1) ... NAME(1)" and footer "version date ... NAME(1)"
HEADER_RE = re.compile(r"^\S+\(\d\w*\)\s{2,}.*\s{2,}\S+\(\d\w*\)$|^.*\s{2,}\S+\(\d\w*\)$")


def page_text(path):
    with open(path, "rb") as f:
        data = f.read()
    if path.endswith(".gz"):
        data = gzip.decompress(data)
    return data


def render(paths, tmp):
    files = []
    for i, p in enumerate(paths):
        data = page_text(p)
        if data.lstrip().startswith(b".so "):
            continue
        name = os.path.join(tmp, "p%04d.man" % i)
        with open(name, "wb") as f:
            f.write(data)
        files.append(name)
    if not files:
        return []
    out = subprocess.run(["groff", "-k", "-man", "-Tutf8", "-rLL=4000n", "-rHY=0", "-P-cbou"]
                         + files, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL,
                         check=False).stdout.decode("utf-8", "replace")
    lines = []
    for line in out.split("\n"):
        line = line.strip()
        if not line or HEADER_RE.match(line):
            continue
        lines.append(re.sub(r"\s+", " ", line))
    return lines


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("out")
    ap.add_argument("--man", default="/usr/share/man")
    ap.add_argument("--sections", default="")
    ap.add_argument("--stats", action="store_true")
    a = ap.parse_args()
    de_root = os.path.join(a.man, "de")
    pairs = []
    for sec in sorted(os.listdir(de_root)):
        if not sec.startswith("man"):
            continue
        if a.sections and sec[3:] not in a.sections.split(","):
            continue
        for name in sorted(os.listdir(os.path.join(de_root, sec))):
            en = os.path.join(a.man, sec, name)
            if os.path.isfile(en):
                pairs.append((en, os.path.join(de_root, sec, name)))
    if not pairs:
        sys.exit("extract-manpages.py: no page is installed in both English and German under "
                 + a.man + " (install manpages and manpages-de)")
    os.makedirs(a.out, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="isthmus-man-") as tmp:
        for lang, col in (("en", 0), ("de", 1)):
            dest = os.path.join(a.out, lang + ".txt")
            n_lines = n_words = 0
            with open(dest + ".tmp", "w", encoding="utf-8") as f:
                for i in range(0, len(pairs), BATCH):
                    for line in render([p[col] for p in pairs[i:i + BATCH]], tmp):
                        f.write(line + "\n")
                        n_lines += 1
                        n_words += len(line.split())
            os.replace(dest + ".tmp", dest)
            if a.stats:
                print("%s: %d pages, %d lines, %d words" % (lang, len(pairs), n_lines, n_words))


if __name__ == "__main__":
    main()
