/* sgns_kern_tmpl.h - the three kernels of the FAST skip-gram path, written once and
 * included by sgns_kern.c for each instruction set with these macros defined:
 *   KFN(name)     function name for this set        KTARGET   target attribute (or nothing)
 *   V, VW         vector type and its float lanes   VZERO     all-zero vector
 *   VLOAD(p)      load VW floats                    VSTORE(p, v)  store them
 *   VBCAST(x)     x in every lane                   VFMA(a, b, c) a * b + c
 *   VSUM(v)       sum of the lanes
 * Lengths are multiples of 16 floats, so of VW. Register tiles: 3 x 3 for the dot products
 * (6 loads per 9 multiply-adds), 3 x 3 for the accumulations (rows past a multiple of 3 go
 * one by one). */

KTARGET static void
KFN(dots)(const float *const *x, size_t m, const float *const *y, size_t n, size_t len, float *s)
{
    for (size_t j = 0; j < m; j += 3) {
        const float *x0 = x[j], *x1 = x[j + 1 < m ? j + 1 : j], *x2 = x[j + 2 < m ? j + 2 : j];
        for (size_t k = 0; k < n; k += 3) {
            const float *y0 = y[k], *y1 = y[k + 1 < n ? k + 1 : k], *y2 = y[k + 2 < n ? k + 2 : k];
            V a00 = VZERO, a01 = VZERO, a02 = VZERO, a10 = VZERO, a11 = VZERO, a12 = VZERO;
            V a20 = VZERO, a21 = VZERO, a22 = VZERO;
            for (size_t d = 0; d < len; d += VW) {
                V p = VLOAD(x0 + d), q = VLOAD(x1 + d), t = VLOAD(x2 + d);
                V b = VLOAD(y0 + d);
                a00 = VFMA(p, b, a00);
                a10 = VFMA(q, b, a10);
                a20 = VFMA(t, b, a20);
                b = VLOAD(y1 + d);
                a01 = VFMA(p, b, a01);
                a11 = VFMA(q, b, a11);
                a21 = VFMA(t, b, a21);
                b = VLOAD(y2 + d);
                a02 = VFMA(p, b, a02);
                a12 = VFMA(q, b, a12);
                a22 = VFMA(t, b, a22);
            }
            V acc[3][3] = {{a00, a01, a02}, {a10, a11, a12}, {a20, a21, a22}};
            for (size_t jj = 0; jj < 3 && j + jj < m; jj++)
                for (size_t kk = 0; kk < 3 && k + kk < n; kk++)
                    s[(j + jj) * n + k + kk] = VSUM(acc[jj][kk]);
        }
    }
}

/* One output row: out += sum_b c[b] in_b. */
KTARGET static void
KFN(acc1)(float *out, const float *const *in, size_t nb, const float *c, size_t len)
{
    for (size_t b = 0; b < nb; b += 3) {
        const float *i0 = in[b], *i1 = in[b + 1 < nb ? b + 1 : b], *i2 = in[b + 2 < nb ? b + 2 : b];
        V c0 = VBCAST(c[b]), c1 = VBCAST(b + 1 < nb ? c[b + 1] : 0.0f);
        V c2 = VBCAST(b + 2 < nb ? c[b + 2] : 0.0f);
        for (size_t d = 0; d < len; d += VW) {
            V o = VLOAD(out + d);
            o = VFMA(c0, VLOAD(i0 + d), o);
            o = VFMA(c1, VLOAD(i1 + d), o);
            o = VFMA(c2, VLOAD(i2 + d), o);
            VSTORE(out + d, o);
        }
    }
}

KTARGET static void
KFN(acc)(float *const *out, size_t na, const float *const *in, size_t nb, const float *c,
         size_t len)
{
    size_t a = 0;
    for (; a + 2 < na; a += 3) {
        float *o0 = out[a], *o1 = out[a + 1], *o2 = out[a + 2];
        const float *ca = c + a * nb, *cb = ca + nb, *cc = cb + nb;
        for (size_t b = 0; b < nb; b += 3) {
            const float *i0 = in[b], *i1 = in[b + 1 < nb ? b + 1 : b];
            const float *i2 = in[b + 2 < nb ? b + 2 : b];
            bool h1 = b + 1 < nb, h2 = b + 2 < nb;
            V c00 = VBCAST(ca[b]), c10 = VBCAST(cb[b]), c20 = VBCAST(cc[b]);
            V c01 = VBCAST(h1 ? ca[b + 1] : 0.0f), c11 = VBCAST(h1 ? cb[b + 1] : 0.0f);
            V c21 = VBCAST(h1 ? cc[b + 1] : 0.0f);
            V c02 = VBCAST(h2 ? ca[b + 2] : 0.0f), c12 = VBCAST(h2 ? cb[b + 2] : 0.0f);
            V c22 = VBCAST(h2 ? cc[b + 2] : 0.0f);
            for (size_t d = 0; d < len; d += VW) {
                V p = VLOAD(o0 + d), q = VLOAD(o1 + d), r = VLOAD(o2 + d);
                V v = VLOAD(i0 + d);
                p = VFMA(c00, v, p);
                q = VFMA(c10, v, q);
                r = VFMA(c20, v, r);
                v = VLOAD(i1 + d);
                p = VFMA(c01, v, p);
                q = VFMA(c11, v, q);
                r = VFMA(c21, v, r);
                v = VLOAD(i2 + d);
                p = VFMA(c02, v, p);
                q = VFMA(c12, v, q);
                r = VFMA(c22, v, r);
                VSTORE(o0 + d, p);
                VSTORE(o1 + d, q);
                VSTORE(o2 + d, r);
            }
        }
    }
    for (; a < na; a++)
        KFN(acc1)(out[a], in, nb, c + a * nb, len);
}

KTARGET static void
KFN(add)(float *y, const float *x, size_t len)
{
    for (size_t d = 0; d < len; d += VW)
        VSTORE(y + d, VLOAD(y + d) + VLOAD(x + d));
}
