/* ref_linalg.c - writes random matrices with isthmus's Procrustes map and
 * singular values for compare_linalg.py, which checks them against
 * scipy.linalg.orthogonal_procrustes and numpy.linalg.svd. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include <isthmus/isthmus.h>

static uint64_t state = 88172645463325252ull;

static float
randf(void)
{
    state ^= state << 13;
    state ^= state >> 7;
    state ^= state << 17;
    return (float)((double)(state >> 11) / 9007199254740992.0 * 2.0 - 1.0);
}

static int
write_f32(const char *dir, const char *name, int c, const float *v, size_t n)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/%s%d.f32", dir, name, c);
    FILE *f = fopen(path, "wb");
    if (!f || fwrite(v, sizeof *v, n, f) != n || fclose(f) != 0)
        return -1;
    return 0;
}

static int
write_f64(const char *dir, const char *name, int c, const double *v, size_t n)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/%s%d.f64", dir, name, c);
    FILE *f = fopen(path, "wb");
    if (!f || fwrite(v, sizeof *v, n, f) != n || fclose(f) != 0)
        return -1;
    return 0;
}

int
main(int argc, char **argv)
{
    /* rows x dim: more rows than dimensions (the usual case), square, and fewer
     * rows than dimensions (X^T Z then has rank n) */
    static const size_t shapes[][2] = {{50, 5}, {400, 30}, {3000, 100}, {64, 64}, {20, 48},
                                       {1000, 300}};
    char index[1024];
    ist_error err;

    if (argc != 2) {
        fprintf(stderr, "usage: ref_linalg DIR\n");
        return 2;
    }
    snprintf(index, sizeof index, "%s/index.txt", argv[1]);
    FILE *ix = fopen(index, "w");
    if (!ix)
        return 1;
    for (int c = 0; c < (int)(sizeof shapes / sizeof shapes[0]); c++) {
        size_t n = shapes[c][0], d = shapes[c][1], k = n < d ? n : d;
        float *x = malloc(n * d * sizeof *x), *z = malloc(n * d * sizeof *z);
        float *w = malloc(d * d * sizeof *w);
        double *s = malloc(k * sizeof *s);
        for (size_t i = 0; i < n * d; i++) {
            x[i] = randf();
            z[i] = randf() + 0.5f * x[i];
        }
        ist_cmatview xv = {x, n, d, d}, zv = {z, n, d, d};
        ist_matview wv = {w, d, d, d};
        ist_procrustes_info info;
        if (ist_linalg_procrustes(xv, zv, wv, &info, &err) != IST_OK ||
            ist_linalg_singular_values(xv, s, &err) != IST_OK) {
            fprintf(stderr, "case %d: %s\n", c, err.msg);
            return 1;
        }
        if (write_f32(argv[1], "x", c, x, n * d) || write_f32(argv[1], "z", c, z, n * d) ||
            write_f32(argv[1], "w", c, w, d * d) || write_f64(argv[1], "s", c, s, k))
            return 1;
        fprintf(ix, "%d %zu %zu %.17g\n", c, n, d, info.orth_error);
        free(x), free(z), free(w), free(s);
    }
    return fclose(ix) == 0 ? 0 : 1;
}
