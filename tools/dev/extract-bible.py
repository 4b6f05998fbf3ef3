#!/usr/bin/env python3
"""Extract one verse per line of plain text from an installed SWORD Bible module.

Runs `mod2imp MODULE` (Debian package libsword-utils) and strips the OSIS markup:

- entries whose verse number is 0 (book and chapter headings) and the module and
  testament headings are dropped;
- <note>...</note> (footnotes, cross references) is dropped with its content, and
  so is every <title> that is not marked canonical="true" (editorial headings such
  as the letter headings of Psalm 119); canonical psalm titles are kept as text;
- word-level tags (w, transChange, divineName, seg, foreign, q, name) are removed
  without inserting a space, because they sometimes sit inside a word;
- every other tag becomes a space;
- stray `\\nd`-style markers and pilcrows are dropped; whitespace is collapsed.

Verses that are empty after stripping are dropped (the Spanish module has a few).
Output is in the module's canonical verse order. With --keys, the verse keys
(`Book C:V`, exactly as mod2imp prints them) are written to a second file, line for
line, so that verses can be paired across two modules with the same versification.

Usage: extract-bible.py MODULE OUT.txt [--keys OUT.keys] [--stats]
"""

import argparse
import os
import re
import subprocess
import sys

KEY_RE = re.compile(r"^\$\$\$(.+) (\d+):(\d+)$")
NOTE_RE = re.compile(r"<note\b[^>]*?(?:/>|>.*?</note>)", re.S)
TITLE_RE = re.compile(r"<title\b([^>]*?)(?:/>|>(.*?)</title>)", re.S)
WORD_TAG_RE = re.compile(r"</?(?:w|transChange|divineName|seg|foreign|q|name)\b[^>]*>")
OTHER_TAG_RE = re.compile(r"<[^>]*>")
MARKER_RE = re.compile(r"\\\+?[A-Za-z]+\*?")
SPACE_RE = re.compile(r"\s+")
TOKEN_RE = re.compile(r"\w+(?:['\u2019]\w+)*")
ENTITIES = {"&amp;": "&", "&lt;": "<", "&gt;": ">", "&quot;": '"', "&apos;": "'"}
ENTITY_RE = re.compile(r"&(?:amp|lt|gt|quot|apos);")


def drop_title(match):
    attrs, body = match.group(1), match.group(2)
    if 'canonical="true"' in attrs and body is not None:
        return " " + body + " "
    return " "


def clean(markup):
    text = NOTE_RE.sub(" ", markup)
    text = TITLE_RE.sub(drop_title, text)
    text = WORD_TAG_RE.sub("", text)
    text = OTHER_TAG_RE.sub(" ", text)
    text = MARKER_RE.sub(" ", text)
    text = text.replace("\u00b6", " ")
    text = ENTITY_RE.sub(lambda m: ENTITIES[m.group(0)], text)
    return SPACE_RE.sub(" ", text).strip()


def read_module(module):
    try:
        proc = subprocess.run(["mod2imp", module], stdout=subprocess.PIPE,
                              stderr=subprocess.PIPE, check=False)
    except FileNotFoundError:
        sys.exit("extract-bible: mod2imp not found (install the Debian package libsword-utils)")
    if proc.returncode != 0 or not proc.stdout:
        msg = proc.stderr.decode("utf-8", "replace").strip()
        sys.exit("extract-bible: mod2imp %s failed (is the module installed? %s)" % (module, msg))
    return proc.stdout.decode("utf-8")


def verses(raw):
    """Yield (key, markup) for every entry with a real verse number, in order."""
    key, body = None, []
    for line in raw.split("\n"):
        if line.startswith("$$$"):
            if key is not None:
                yield key, "\n".join(body)
            m = KEY_RE.match(line)
            key = line[3:] if m and int(m.group(3)) != 0 else None
            body = []
        elif key is not None:
            body.append(line)
    if key is not None:
        yield key, "\n".join(body)


def write_atomic(path, lines):
    tmp = path + ".tmp%d" % os.getpid()
    with open(tmp, "w", encoding="utf-8", newline="\n") as f:
        for line in lines:
            f.write(line)
            f.write("\n")
    os.replace(tmp, path)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("module", help="SWORD module name, e.g. engKJV2006eb or spaRV1909eb")
    ap.add_argument("output", help="text file to write, one verse per line")
    ap.add_argument("--keys", metavar="FILE", help="also write the verse keys, line for line")
    ap.add_argument("--stats", action="store_true",
                    help="print verse, token and type counts to stderr (lower-cased runs of word "
                         "characters, joined across an apostrophe inside a word)")
    args = ap.parse_args()

    keys, texts = [], []
    for key, markup in verses(read_module(args.module)):
        text = clean(markup)
        if text:
            keys.append(key)
            texts.append(text)
    if not texts:
        sys.exit("extract-bible: module %s gave no verses" % args.module)
    write_atomic(args.output, texts)
    if args.keys:
        write_atomic(args.keys, keys)
    if args.stats:
        counts = {}
        for t in texts:
            for w in TOKEN_RE.findall(t.lower()):
                counts[w] = counts.get(w, 0) + 1
        print("%s: %d verses, %d tokens, %d types, %d types with count >= 5" % (
            args.module, len(texts), sum(counts.values()), len(counts),
            sum(1 for c in counts.values() if c >= 5)), file=sys.stderr)


if __name__ == "__main__":
    main()
