#!/usr/bin/env python3
"""TAP test of the real-data extractors on hand-written inputs (no Debian packages needed).

The markup cases follow the facts listed in ../shared/yardsticks.md about the OSIS text
that mod2imp prints; the dictd layout (base-64 offsets, headword line with a phonetic in
slashes) is the one of the FreeDict files in Debian's dict-freedict-* packages.
Usage: check_extract.py SOURCE-ROOT
"""
import importlib.util
import os
import sys
import tempfile
import gzip

root = sys.argv[1]


def load(name):
    spec = importlib.util.spec_from_file_location(name.replace("-", "_"),
                                                  os.path.join(root, "tools", "dev", name + ".py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


bible = load("extract-bible")
fd = load("extract-freedict")

cases = [
    # A word-level tag inside a word leaves no space.
    ('y <w lemma="strong:H1">haber</w><transChange type="added">lo</transChange> visto',
     "y haberlo visto"),
    # A footnote is dropped with its content; the tag is replaced by nothing visible.
    ('the light.<note placement="foot"><reference>1.4 </reference>Heb. between</note>',
     "the light."),
    # A non-canonical heading goes, a canonical psalm title stays as text.
    ('<title><foreign>A ALEPH.</foreign></title> Blessed', "Blessed"),
    ('<title canonical="true" type="psalm">A <w>Psalm</w> of David.</title> LORD, how',
     "A Psalm of David. LORD, how"),
    # Other tags become a space; pilcrows and \\nd markers go.
    ('<div type="x-p"/>\u00b6 And God said<lb/>Let', "And God said Let"),
    ('my name \\nd <w>JEHOVAH</w></divineName> was', "my name JEHOVAH was"),
    ('Jesus said, <q marker="" who="Jesus">Follow me</q>.', "Jesus said, Follow me."),
    ('a &amp; b', "a & b"),
]
print("1..%d" % (len(cases) + 4))
n = 0
for markup, want in cases:
    n += 1
    got = bible.clean(markup)
    print("%s %d - clean(%r) = %r" % ("ok" if got == want else "not ok", n, markup[:40], got))
    if got != want:
        print("# expected %r" % want)

raw = "$$$[ Module Heading ]\nx\n$$$Genesis 0:0\nhead\n$$$Genesis 1:0\nch\n" \
      "$$$Genesis 1:1\nIn the beginning\n$$$I Kings 2:10\nSo David\n"
got = [(k, bible.clean(m)) for k, m in bible.verses(raw)]
n += 1
want = [("Genesis 1:1", "In the beginning"), ("I Kings 2:10", "So David")]
print("%s %d - verse 0 entries and headings are dropped, keys kept" % (
    "ok" if got == want else "not ok", n))

n += 1
got = fd.b64_number("BG", "test")
print("%s %d - dictd base-64 number BG = %d (1*64 + 6 = 70)" % ("ok" if got == 70 else "not ok",
                                                               n, got))

# A small dictd pair of files: one metadata entry, a word, a damaged multiword entry
# (its phonetic extends the word's), and a numbered entry.
entries = [("00databaseinfo", "00-database-info\nabout\n"),
           ("a", "a /ə/\n1. un, una\n2. en\n"),
           ("a", "a /ˈədei/\naldía\n"),
           ("able", "able /eibl/\ncapaz, hábil, muy capaz\n"),
           ("Brazil", "Brazil /brəzil/\nBrasil\n")]
with tempfile.TemporaryDirectory() as d:
    body, index = b"", []
    for head, text in entries:
        data = text.encode("utf-8")
        index.append((head, len(body), len(data)))
        body += data

    def b64(v):
        s = ""
        while True:
            s = fd.B64[v % 64] + s
            v //= 64
            if not v:
                return s
    with gzip.open(os.path.join(d, "freedict-xx-yy.dict.dz"), "wb") as f:
        f.write(body)
    with open(os.path.join(d, "freedict-xx-yy.index"), "w", encoding="utf-8") as f:
        for head, off, ln in index:
            f.write("%s\t%s\t%s\n" % (head, b64(off), b64(ln)))
    got = list(fd.read_entries(d, "xx-yy"))
    bad = fd.damaged(got)
    n += 1
    ok = len(got) == 4 and bad == {1} and got[0][2] == ["un", "una", "en"]
    print("%s %d - entries parsed, the damaged multiword entry found: %r" % (
        "ok" if ok else "not ok", n, sorted(bad)))
    out = os.path.join(d, "out.pairs")
    import subprocess
    subprocess.run([sys.executable, os.path.join(root, "tools", "dev", "extract-freedict.py"),
                    "xx-yy", out, "--dir", d], check=False)
    pairs = open(out, encoding="utf-8").read().splitlines() if os.path.exists(out) else []
    want = ["a\tun", "a\tuna", "a\ten", "able\tcapaz", "able\thábil", "brazil\tbrasil"]
    n += 1
    print("%s %d - single-word, lower-cased, de-duplicated pairs: %r" % (
        "ok" if pairs == want else "not ok", n, pairs))
