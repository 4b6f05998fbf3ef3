#!/usr/bin/env python3
"""Check isthmus's PPMI + randomized truncated SVD against scipy.sparse.linalg.svds (Debian
python3-scipy) on the demo's English text: the PPMI matrix is rebuilt here from the token-id
stream with numpy/scipy.sparse (the formula of include/isthmus/ppmi.h: windowed counts that
stop at line ends, context counts raised to alpha, log shift subtracted, clipped at zero);
the singular values must agree to 1e-4 (relative) and the spans of the singular vectors must
agree (every principal angle's cosine >= 0.9999). Exit 77 (skip) without numpy/scipy.
usage: compare_ppmi.py REF_PPMI TEXT"""
import os
import subprocess
import sys
import tempfile

try:
    import numpy as np
    import scipy.sparse as sp
    from scipy.sparse.linalg import svds
except ImportError:
    print("1..0 # SKIP numpy/scipy not installed")
    sys.exit(77)   # the test runs with protocol exitcode: 77 = skipped

EOL = 0xFFFFFFFF
SV_TOL = 1e-4
COS_TOL = 1e-4


def ppmi(ids, V, window, flat, alpha, shift):
    ids = ids.astype(np.int64)
    rows, cols, vals = [], [], []
    for d in range(1, window + 1):
        a, b = ids[:-d], ids[d:]
        # a pair counts only if no line end lies between: both ends and all between are words
        ok = (a != EOL) & (b != EOL)
        eol = (ids == EOL).astype(np.int64)
        csum = np.concatenate([[0], np.cumsum(eol)])
        between = csum[d:len(ids)] - csum[1:len(ids) - d + 1]   # line ends in (t, t+d)
        ok &= between == 0
        w = 1.0 if flat else (window - d + 1) / window
        rows += [a[ok], b[ok]]
        cols += [b[ok], a[ok]]
        vals += [np.full(ok.sum(), w), np.full(ok.sum(), w)]
    r, c, v = np.concatenate(rows), np.concatenate(cols), np.concatenate(vals)
    C = sp.coo_matrix((v, (r, c)), shape=(V, V)).tocsr()
    C.sum_duplicates()
    rs = np.asarray(C.sum(axis=1)).ravel()
    z = np.sum(rs[rs > 0] ** alpha)
    C = C.tocoo()
    pmi = np.log(C.data * z / (rs[C.row] * rs[C.col] ** alpha)) - np.log(shift)
    keep = pmi > 0
    return sp.csr_matrix((pmi[keep], (C.row[keep], C.col[keep])), shape=(V, V))


def main():
    prog, text = sys.argv[1], sys.argv[2]
    failed = 0
    with tempfile.TemporaryDirectory(prefix="isthmus-ref-") as d:
        subprocess.run([prog, text, d], check=True)
        ids = np.fromfile(os.path.join(d, "ids.u32"), np.uint32)
        cases = [line.split() for line in open(os.path.join(d, "index.txt"))]
        print("1..%d" % (2 * len(cases)))
        t = 0
        for c, V, w, weighting, alpha, shift, k, p, q in cases:
            V, w, k = int(V), int(w), int(k)
            A = ppmi(ids, V, w, weighting == "flat", float(alpha), float(shift))
            U_ref, s_ref, _ = svds(A, k=k, tol=0, random_state=1)
            order = np.argsort(-s_ref)
            s_ref, U_ref = s_ref[order], U_ref[:, order]
            s = np.fromfile(os.path.join(d, "s%s.f64" % c), np.float64)
            U = np.fromfile(os.path.join(d, "u%s.f32" % c), np.float32).reshape(V, k)
            U = U.astype(np.float64)
            label = "window %d %s, alpha %s, shift %s, k %d, oversample %s, %s iterations" % (
                w, weighting, alpha, shift, k, p, q)
            t += 1
            serr = np.max(np.abs(s - s_ref) / s_ref)
            ok = serr <= SV_TOL
            failed += not ok
            print("%s %d - %s: max relative singular-value error %.2g (%d x %d, %d nonzeros)"
                  % ("ok" if ok else "not ok", t, label, serr, V, V, A.nnz))
            t += 1
            # principal angles between the two k-dimensional spans
            qa, _ = np.linalg.qr(U)
            cos = np.linalg.svd(qa.T @ U_ref, compute_uv=False)
            ok = 1.0 - cos.min() <= COS_TOL
            failed += not ok
            print("%s %d - %s: smallest principal-angle cosine %.6f"
                  % ("ok" if ok else "not ok", t, label, cos.min()))
    print("# ref-ppmi: %d passed, %d failed" % (t - failed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
