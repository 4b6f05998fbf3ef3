#!/usr/bin/env python3
"""Generate the demo data of the invented shop Tillwick Goods (English and Spanish).

The shop sells home and kitchen goods from one catalogue in two markets. The generator
builds that catalogue from the bilingual concept table in demo_lexicon.py (items,
materials, colours, sizes, actions, faults), gives each item its own profile of likely
materials, colours, uses, actions and faults, and then writes, for each language
separately, product listings, order notes, support messages and reviews. The two
corpora share the concept distribution and the catalogue (brand names and model codes
such as TW-4410, sizes such as 500ml), but not their documents: each language draws its
own documents with its own templates, word order, agreement, synonyms and popularity, so
no line is a translation of another. The text is deliberately messy: typos, casing,
dropped accents, punctuation, prices, dates and order numbers.

Outputs (into --out, gzip written with mtime 0, so the same seed gives the same bytes):
  tillwick-en.txt.gz, tillwick-es.txt.gz   the corpora, one document per line
  demo-seed.pairs, demo-test.pairs          English->Spanish word lists, disjoint sources
  tiny-en.txt                               a small vector table (rows dim header)

Usage: make-demo.py [--seed N] [--out DIR] [--docs N]
"""

import argparse
import gzip
import io
import math
import os
import random
import re
import sys
import unicodedata

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import demo_lexicon as lex  # noqa: E402
from demo_docs import (en_listing, en_note, en_review, en_support,  # noqa: E402
                       es_listing, es_note, es_review, es_support)
from demo_world import English, Lexicon, Spanish, build_catalogue  # noqa: E402


# ---------------------------------------------------------------------------------------
# Mess: typos, casing, dropped accents, spacing

KEYS_NEAR = {
    "a": "sq", "b": "vn", "c": "xv", "d": "sf", "e": "wr", "f": "dg", "g": "fh", "h": "gj",
    "i": "uo", "j": "hk", "k": "jl", "l": "k", "m": "n", "n": "bm", "o": "ip", "p": "o",
    "q": "w", "r": "et", "s": "ad", "t": "ry", "u": "yi", "v": "cb", "w": "qe", "x": "zc",
    "y": "tu", "z": "x",
}
WORD_RE = re.compile(r"[^\W\d_]{4,}")


def typo(rng, w):
    i = rng.randrange(1, len(w))
    op = rng.random()
    if op < 0.3:
        return w[:i - 1] + w[i] + w[i - 1] + w[i + 1:]
    if op < 0.55:
        return w[:i] + w[i + 1:]
    if op < 0.75:
        return w[:i] + w[i] + w[i:]
    near = KEYS_NEAR.get(w[i].lower())
    if near:
        return w[:i] + rng.choice(near) + w[i + 1:]
    return w


def strip_accents(text, keep_enye):
    out = []
    for ch in text:
        if ch in "ñÑ" and keep_enye:
            out.append(ch)
            continue
        d = unicodedata.normalize("NFD", ch)
        out.append(d[0] if d[0].isascii() else ch)
    return "".join(out)


def mess(lg, text, kind, rate):
    rng = lg.rng
    text = WORD_RE.sub(lambda m: typo(rng, m.group(0)) if rng.random() < rate else m.group(0),
                       text)
    informal = kind in ("support", "note", "review")
    if informal and lg.name == "es" and rng.random() < 0.3:
        text = strip_accents(text, keep_enye=rng.random() < 0.7)
        if rng.random() < 0.6:
            text = text.replace("¿", "").replace("¡", "")
    if informal and rng.random() < 0.1:
        text = text.lower()
    elif informal and rng.random() < 0.05:
        words = text.split(" ")
        j = rng.randrange(len(words))
        words[j] = words[j].upper()
        text = " ".join(words)
    if informal and rng.random() < 0.15:
        text = re.sub(r"[.!?]$", rng.choice(["", "!!", "...", " :(", " :)", "??"]), text)
    if rng.random() < 0.03:
        text = text.replace(", ", " ,", 1)
    if rng.random() < 0.03:
        text = text.replace(" ", "  ", 1)
    return text


# ---------------------------------------------------------------------------------------
# Word lists and the tiny vector table

TOKEN_RE = re.compile(r"\w+(?:['\u2019]\w+)*")


def count_tokens(lines):
    counts = {}
    for line in lines:
        for w in TOKEN_RE.findall(line.lower()):
            counts[w] = counts.get(w, 0) + 1
    return counts


def concept_pairs(c):
    """(english word, [spanish words]) pairs a concept gives, in all its forms."""
    out = []
    if c.kind in ("item",) or c.kind in lex.NOUNS:
        es_sg = [f["sg"] for f in c.es]
        es_pl = [f["pl"] for f in c.es if f["pl"]]
        for e in c.en:
            out.append((e["sg"], es_sg))
            if e["pl"] and e["pl"] != e["sg"]:
                out.append((e["pl"], es_pl or es_sg))
    elif c.kind in ("colour", "adj", "faulty"):
        forms = []
        for f in c.es:
            forms += [x for x in f["forms"] if x not in forms]
        for e in c.en:
            out.append((e["w"], forms))
    elif c.kind == "material":
        for e in c.en:
            out.append((e["w"], [f["w"] for f in c.es]))
    elif c.kind == "verb":
        e, s = c.en[0], c.es[0]
        out.append((e["base"], [s["inf"], s["imp"], s["p1"]]))
        out.append((e["p3"], [s["p3"]]))
        if e["past"] != e["base"]:
            out.append((e["past"], [s["pret1"], s["pret3"], s["part"]]))
    else:
        out.append((c.en[0]["w"], [c.es[0]["w"]]))
    return out


def word_lists(L, en_counts, es_counts, rng, min_count):
    """Split concepts into seed and test so that no English word is on both sides."""
    concepts = L.all_concepts()
    # Concepts that share an English word go together (e.g. glass the item and glass
    # the material), so a source word never lands on both sides.
    parent = list(range(len(concepts)))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    owner = {}
    cpairs = [concept_pairs(c) for c in concepts]
    for i, pairs in enumerate(cpairs):
        for en, _ in pairs:
            if en in owner:
                parent[find(i)] = find(owner[en])
            else:
                owner[en] = i
    groups = {}
    for i in range(len(concepts)):
        groups.setdefault(find(i), []).append(i)
    roots = sorted(groups)
    rng.shuffle(roots)
    order = []
    for root in roots:
        merged = {}
        for i in groups[root]:
            for en, es in cpairs[i]:
                if " " in en or en_counts.get(en, 0) < min_count:
                    continue
                targets = [t for t in es if es_counts.get(t, 0) >= min_count and " " not in t]
                if not targets:
                    continue
                lst = merged.setdefault(en, [])
                for t in targets:       # 'fácil' is both the masculine and feminine form
                    if t not in lst:
                        lst.append(t)
        if merged:
            order.append(merged)
    seed, test = [], []
    for k, merged in enumerate(order):
        # Two in five groups seed the map, the rest are held out for testing.
        (seed if k % 5 < 2 else test).append(merged)
    return seed, test


def write_pairs(path, groups, header):
    lines = ["# " + h for h in header]
    n = 0
    for merged in groups:
        for en in sorted(merged):
            for es in merged[en]:
                lines.append("%s\t%s" % (en, es))
                n += 1
    write_text(path, "\n".join(lines) + "\n")
    return n


def tiny_table(L, rng):
    """A few dozen shop words with 8 components: one direction per kind plus noise."""
    kinds = ["cookware", "tableware", "textiles", "garden", "colour", "material"]
    centre = {}
    for k in kinds:
        v = [rng.gauss(0, 1) for _ in range(8)]
        n = math.sqrt(sum(x * x for x in v))
        centre[k] = [x / n for x in v]
    rows = []
    seen = set()
    for k in kinds:
        if k == "colour":
            words = [c.en[0]["w"] for c in list(L.colours.values())[:6]]
        elif k == "material":
            words = [c.en[0]["w"] for c in list(L.materials.values())[:6]]
        else:
            words = [c.en[0]["sg"] for c in L.items if c.cat == k][:6]
        for w in words:
            v = [x + rng.gauss(0, 0.25) for x in centre[k]]
            if w in seen:    # 'glass' is an item and a material: one row per word
                continue
            seen.add(w)
            rows.append((w, v))
    lines = ["%d 8" % len(rows)]
    for w, v in rows:
        lines.append(w + " " + " ".join("%.4f" % x for x in v))
    return "\n".join(lines) + "\n"


# ---------------------------------------------------------------------------------------
# Output


def write_text(path, text):
    tmp = path + ".tmp"
    with open(tmp, "w", encoding="utf-8", newline="\n") as f:
        f.write(text)
    os.replace(tmp, path)


def write_gzip(path, lines):
    buf = io.BytesIO()
    with gzip.GzipFile(filename="", mode="wb", fileobj=buf, mtime=0, compresslevel=9) as gz:
        for line in lines:
            gz.write(line.encode("utf-8"))
            gz.write(b"\n")
    tmp = path + ".tmp"
    with open(tmp, "wb") as f:
        f.write(buf.getvalue())
    os.replace(tmp, path)


def generate(lg, n_docs, makers, weights, rate):
    lines = []
    for _ in range(n_docs):
        kind, fn = lg.rng.choices(makers, weights)[0]
        text = fn(lg)
        text = re.sub(r"\s+", " ", text).strip()
        lines.append(mess(lg, text, kind, rate))
    return lines


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--seed", type=int, default=7, help="random seed [default: 7]")
    ap.add_argument("--out", default="data-samples", help="output directory")
    ap.add_argument("--docs", type=int, default=75000,
                    help="English documents; Spanish gets 90%% as many [default: 75000]")
    args = ap.parse_args()

    L = Lexicon()
    rng = random.Random("%d-catalogue" % args.seed)
    products = build_catalogue(L, rng)
    en = English("en", L, products, args.seed)
    es = Spanish("es", L, products, args.seed)

    en_lines = generate(en, args.docs, [("listing", en_listing), ("support", en_support),
                                        ("note", en_note), ("review", en_review)],
                        [0.42, 0.30, 0.10, 0.18], 0.012)
    # The Spanish storefront is newer: fewer listings per product, more support text,
    # and a somewhat different mix, as two markets of one shop would have.
    es_lines = generate(es, int(args.docs * 0.9),
                        [("listing", es_listing), ("support", es_support), ("note", es_note),
                         ("review", es_review)],
                        [0.38, 0.34, 0.12, 0.16], 0.015)

    os.makedirs(args.out, exist_ok=True)
    write_gzip(os.path.join(args.out, "tillwick-en.txt.gz"), en_lines)
    write_gzip(os.path.join(args.out, "tillwick-es.txt.gz"), es_lines)

    en_counts, es_counts = count_tokens(en_lines), count_tokens(es_lines)
    seed, test = word_lists(L, en_counts, es_counts, random.Random("%d-split" % args.seed), 5)
    n_seed = write_pairs(os.path.join(args.out, "demo-seed.pairs"), seed, [
        "Tillwick Goods demo (invented): English -> Spanish seed pairs for fitting the map.",
        "Made by tools/dev/make-demo.py --seed %d; no source word here is in demo-test.pairs."
        % args.seed])
    n_test = write_pairs(os.path.join(args.out, "demo-test.pairs"), test, [
        "Tillwick Goods demo (invented): English -> Spanish test pairs; a source word may",
        "have several gold targets (agreement forms, synonyms). Made by tools/dev/make-demo.py "
        "--seed %d." % args.seed])
    write_text(os.path.join(args.out, "tiny-en.txt"),
               tiny_table(L, random.Random("%d-tiny" % args.seed)))

    def summary(name, lines, counts):
        return "%s: %d lines, %d tokens, %d types, %d types with count >= 5" % (
            name, len(lines), sum(counts.values()), len(counts),
            sum(1 for v in counts.values() if v >= 5))
    print(summary("en", en_lines, en_counts), file=sys.stderr)
    print(summary("es", es_lines, es_counts), file=sys.stderr)
    print("seed: %d pairs, %d source words; test: %d pairs, %d source words; %d concepts" % (
        n_seed, sum(len(g) for g in seed), n_test, sum(len(g) for g in test),
        len(L.all_concepts())), file=sys.stderr)


if __name__ == "__main__":
    main()
