#!/usr/bin/env python3
"""A count-based yardstick for the demo data: how well can the demo be aligned at all?

Independent of the library, with numpy only: PPMI with context-distribution smoothing
(alpha 0.75, window 5, words seen at least 5 times), truncated SVD to 100 dimensions,
vectors U*sqrt(S); unit length, mean-centring, unit length; orthogonal Procrustes on the
seed list; precision@1 and @5 on the test list by cosine and CSLS (k = 10); then two
rounds of refinement by mutual nearest neighbours among the 2,000 most frequent words.
Prints one line per setting. Takes about a minute on two cores.

Usage: demo-yardstick.py [DATA-DIR]   (default data-samples)
"""

import gzip
import re
import sys

try:
    import numpy as np
except ImportError:
    sys.exit("demo-yardstick: needs numpy (Debian package python3-numpy)")

WORD = re.compile(r"\w+(?:['\u2019]\w+)*")


def read_corpus(path):
    with gzip.open(path, "rt", encoding="utf-8") as f:
        return [WORD.findall(line.lower()) for line in f]


def count_vectors(sentences, dim=100, window=5, min_count=5):
    freq = {}
    for s in sentences:
        for w in s:
            freq[w] = freq.get(w, 0) + 1
    words = sorted((w for w in freq if freq[w] >= min_count), key=lambda w: (-freq[w], w))
    index = {w: i for i, w in enumerate(words)}
    n = len(words)
    cooc = np.zeros((n, n))
    for s in sentences:
        ids = [index[w] for w in s if w in index]
        for i, a in enumerate(ids):
            for j in range(max(0, i - window), min(len(ids), i + window + 1)):
                if j != i:
                    cooc[a, ids[j]] += 1
    total = cooc.sum()
    p_word = cooc.sum(1) / total
    p_ctx = cooc.sum(0) ** 0.75
    p_ctx /= p_ctx.sum()
    with np.errstate(divide="ignore", invalid="ignore"):
        pmi = np.log(cooc / total / np.outer(p_word, p_ctx))
    pmi[~np.isfinite(pmi)] = 0
    ppmi = np.maximum(pmi, 0)
    u, s, _ = np.linalg.svd(ppmi, full_matrices=False)
    x = u[:, :dim] * np.sqrt(s[:dim])
    x /= np.linalg.norm(x, axis=1, keepdims=True)
    x -= x.mean(0)
    x /= np.linalg.norm(x, axis=1, keepdims=True)
    return words, index, x


def read_pairs(path):
    pairs = {}
    for line in open(path, encoding="utf-8"):
        if line.strip() and not line.startswith("#"):
            a, b = line.split()
            pairs.setdefault(a, []).append(b)
    return pairs


def procrustes(a, b):
    u, _, vt = np.linalg.svd(a.T @ b)
    return u @ vt


def main():
    d = sys.argv[1] if len(sys.argv) > 1 else "data-samples"
    _, en_index, en = count_vectors(read_corpus(d + "/tillwick-en.txt.gz"))
    es_words, es_index, es = count_vectors(read_corpus(d + "/tillwick-es.txt.gz"))
    seed = read_pairs(d + "/demo-seed.pairs")
    test = read_pairs(d + "/demo-test.pairs")
    seed_ids = [(en_index[a], es_index[b]) for a, bs in seed.items() for b in bs
                if a in en_index and b in es_index]
    queries = [a for a in test if a in en_index]

    def report(w, label):
        mapped = en @ w
        q = mapped[[en_index[a] for a in queries]]
        cos = q @ es.T
        r_target = np.sort(cos, axis=1)[:, -10:].mean(1)
        r_source = np.sort(es @ mapped.T, axis=1)[:, -10:].mean(1)
        csls = 2 * cos - r_target[:, None] - r_source[None, :]
        for name, score in (("cosine", cos), ("CSLS", csls)):
            top = np.argsort(-score, axis=1)[:, :5]
            p1 = np.mean([es_words[top[i, 0]] in test[a] for i, a in enumerate(queries)])
            p5 = np.mean([any(es_words[t] in test[a] for t in top[i])
                          for i, a in enumerate(queries)])
            print("%-22s %-6s P@1 %5.1f  P@5 %5.1f  (%d of %d test words covered)" % (
                label, name, 100 * p1, 100 * p5, len(queries), len(test)))

    w = procrustes(en[[i for i, _ in seed_ids]], es[[j for _, j in seed_ids]])
    report(w, "Procrustes")
    for rnd in (1, 2):
        n = 2000
        sim = (en[:n] @ w) @ es[:n].T
        fwd, back = sim.argmax(1), sim.argmax(0)
        mutual = [(i, fwd[i]) for i in range(n) if back[fwd[i]] == i] + seed_ids
        w = procrustes(en[[i for i, _ in mutual]], es[[j for _, j in mutual]])
        report(w, "refinement round %d" % rnd)


if __name__ == "__main__":
    main()
