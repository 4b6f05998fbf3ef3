/* ref_ppmi.c - writes what tests/ref/compare_ppmi.py checks against scipy: the token-id
 * stream of the demo's English text (prepared with the library's defaults) and, for a few
 * option sets, the singular values and the rows U (exponent 0) that ist_ppmi_train gives.
 * usage: ref_ppmi TEXT OUTDIR */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/isthmus.h>

static int
write_raw(const char *dir, const char *name, const void *p, size_t size, size_t n)
{
    char path[4096];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "wb");
    if (!f || fwrite(p, size, n, f) != n || fclose(f) != 0) {
        fprintf(stderr, "ref_ppmi: cannot write %s\n", path);
        return 1;
    }
    return 0;
}

int
main(int argc, char **argv)
{
    if (argc != 3) {
        fprintf(stderr, "usage: ref_ppmi TEXT OUTDIR\n");
        return 2;
    }
    const char *paths[1] = {argv[1]};
    ist_corpus_opts co;
    ist_corpus *c;
    ist_error err;
    ist_corpus_opts_init(&co);
    if (ist_corpus_build(paths, 1, &co, &c, &err) != IST_OK) {
        fprintf(stderr, "ref_ppmi: %s\n", err.msg);
        return 1;
    }
    size_t n;
    const uint32_t *ids = ist_corpus_ids(c, &n);
    size_t V = ist_vocab_size(ist_corpus_vocab(c));
    if (write_raw(argv[2], "ids.u32", ids, sizeof *ids, n))
        return 1;
    /* case: window, weighting (0 linear, 1 flat), alpha, shift, dim, oversample, iterations */
    static const struct { size_t w; int flat; double alpha, shift; size_t k, p, q; } cases[] = {
        /* PPMI spectra decay slowly: the error of the range finder falls as
         * (s_{k+l+1} / s_k)^(2q+1) (Halko et al. 2011, section 10), so the check runs enough
         * power iterations to converge; the library's default of 4 leaves ~1e-2 on these */
        {5, 0, 0.75, 1.0, 20, 20, 30},
        {10, 0, 0.75, 1.0, 50, 50, 30},
        {2, 1, 1.0, 2.0, 10, 10, 30},
    };
    char index[4096];
    snprintf(index, sizeof index, "%s/index.txt", argv[2]);
    FILE *ix = fopen(index, "w");
    if (!ix)
        return 1;
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        ist_ppmi_opts o;
        ist_ppmi_opts_init(&o);
        o.window = cases[i].w;
        o.weighting = cases[i].flat ? IST_PPMI_FLAT : IST_PPMI_LINEAR;
        o.alpha = cases[i].alpha;
        o.shift = cases[i].shift;
        o.dim = cases[i].k;
        o.oversample = cases[i].p;
        o.power_iters = cases[i].q;
        o.power = 0.0;
        ist_matrix *m;
        double *sv;
        if (ist_ppmi_train(ids, n, V, &o, &m, &sv, NULL, &err) != IST_OK) {
            fprintf(stderr, "ref_ppmi: %s\n", err.msg);
            return 1;
        }
        ist_cmatview v = ist_matrix_cview(m);
        float *u = malloc(V * o.dim * sizeof *u);
        for (size_t r = 0; r < V; r++)
            memcpy(u + r * o.dim, v.data + r * v.stride, o.dim * sizeof *u);
        char name[64];
        snprintf(name, sizeof name, "u%zu.f32", i);
        int bad = write_raw(argv[2], name, u, sizeof *u, V * o.dim);
        snprintf(name, sizeof name, "s%zu.f64", i);
        bad |= write_raw(argv[2], name, sv, sizeof *sv, o.dim);
        if (bad)
            return 1;
        fprintf(ix, "%zu %zu %zu %s %.17g %.17g %zu %zu %zu\n", i, V, o.window,
                cases[i].flat ? "flat" : "linear", o.alpha, o.shift, o.dim, o.oversample,
                o.power_iters);
        free(u);
        ist_ppmi_free(sv);
        ist_matrix_free(m);
    }
    fclose(ix);
    ist_corpus_free(c);
    return 0;
}
