#!/usr/bin/env python3
"""Check isthmus's orthogonal Procrustes and singular values against the reference
implementations scipy.linalg.orthogonal_procrustes and numpy.linalg.svd (Debian
python3-scipy, python3-numpy). Exit 77 (skip) when they are not installed."""
import os
import subprocess
import sys
import tempfile

try:
    import numpy as np
    from scipy.linalg import orthogonal_procrustes
except ImportError:
    print("1..0 # SKIP numpy/scipy not installed")
    sys.exit(77)   # the test runs with protocol exitcode: 77 = skipped

TOL = 1e-5


def main():
    prog = sys.argv[1]
    failed = 0
    with tempfile.TemporaryDirectory(prefix="isthmus-ref-") as d:
        subprocess.run([prog, d], check=True)
        cases = [line.split() for line in open(os.path.join(d, "index.txt"))]
        print("1..%d" % (2 * len(cases)))
        t = 0
        for c, n, dim, orth in cases:
            n, dim = int(n), int(dim)
            x = np.fromfile(os.path.join(d, "x%s.f32" % c), np.float32).reshape(n, dim)
            z = np.fromfile(os.path.join(d, "z%s.f32" % c), np.float32).reshape(n, dim)
            w = np.fromfile(os.path.join(d, "w%s.f32" % c), np.float32).reshape(dim, dim)
            s = np.fromfile(os.path.join(d, "s%s.f64" % c), np.float64)
            x64, z64 = x.astype(np.float64), z.astype(np.float64)
            ref_w, _ = orthogonal_procrustes(x64, z64)
            t += 1
            if n >= dim:
                err = np.abs(w.astype(np.float64) - ref_w).max()
            else:
                # fewer rows than dimensions: W is fixed only on the row space of X^T Z;
                # compare what is determined, the mapped rows X W
                err = np.abs(x64 @ w.astype(np.float64) - x64 @ ref_w).max() / max(
                    1.0, np.abs(x64 @ ref_w).max())
            ok = err <= TOL
            failed += not ok
            print("%s %d - procrustes %dx%d: max |W - scipy| = %.3g (orth error %s)"
                  % ("ok" if ok else "not ok", t, n, dim, err, orth))
            ref_s = np.linalg.svd(x64, compute_uv=False)
            serr = np.abs(s - ref_s).max() / ref_s.max()
            t += 1
            ok = serr <= TOL
            failed += not ok
            print("%s %d - singular values %dx%d: max relative diff = %.3g"
                  % ("ok" if ok else "not ok", t, n, dim, serr))
    print("# ref-linalg: %d passed, %d failed" % (t - failed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
