/* bench_retrieve.c - speed of retrieval against the machine's own sgemm rate.
 *
 * Scores 1,500 queries against 200,000 targets at dimension 300 keeping the
 * top 10, and runs one CSLS neighbourhood pass (k = 10) over 50,000 x 50,000,
 * then prints seconds, GFLOP/s and the rate as a fraction of plain cblas_sgemm
 * measured in the same run just before and after each task (the machine is
 * shared, so the two are averaged). Peak resident memory growth is printed
 * beside the tile budget. Sizes can be scaled down with a first argument
 * (e.g. 0.1) for a quick run. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>
#include <unistd.h>

#include <cblas.h>

#include <isthmus/isthmus.h>

#define DIM 300
#define BUDGET ((size_t)128 << 20)

static double
now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* CPU seconds of the whole process (all threads): less sensitive than wall time
 * to other jobs on a shared machine. */
static double
cpu_now(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return (double)ru.ru_utime.tv_sec + 1e-6 * (double)ru.ru_utime.tv_usec +
           (double)ru.ru_stime.tv_sec + 1e-6 * (double)ru.ru_stime.tv_usec;
}

static long
peak_kib(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return ru.ru_maxrss;
}

static float *
random_unit_rows(size_t n, size_t d, uint64_t seed)
{
    float *m = malloc(n * d * sizeof *m);
    uint64_t s = seed * 2654435761u + 1;
    if (!m) {
        fprintf(stderr, "bench_retrieve: out of memory\n");
        exit(1);
    }
    for (size_t i = 0; i < n; i++) {
        double q = 0;
        for (size_t j = 0; j < d; j++) {
            s ^= s << 13;
            s ^= s >> 7;
            s ^= s << 17;
            float v = (float)((double)(s >> 11) / 9007199254740992.0 - 0.5);
            m[i * d + j] = v;
            q += (double)v * v;
        }
        for (size_t j = 0; j < d; j++)
            m[i * d + j] /= (float)sqrt(q);
    }
    return m;
}

/* Plain sgemm on 1,024 x 8,192 x 300 products with all BLAS threads, repeated
 * until about `flops` were done: returns seconds and adds the flops done. */
static double
sgemm_run(const float *a, const float *b, float *c, double flops, double *done, double *cpu)
{
    const int m = 1024, n = 8192, k = DIM;
    double one = 2.0 * m * n * k, t0;
    int reps = (int)ceil(flops / one);
    openblas_set_num_threads((int)sysconf(_SC_NPROCESSORS_ONLN));
    double c0 = cpu_now();
    t0 = now();
    for (int r = 0; r < (reps < 1 ? 1 : reps); r++)
        cblas_sgemm(CblasRowMajor, CblasNoTrans, CblasTrans, m, n, k, 1.0f, a, k, b, k, 0.0f, c,
                    n);
    *done += one * (reps < 1 ? 1 : reps);
    *cpu += cpu_now() - c0;
    return now() - t0;
}

/* The machine is shared: the reference sgemm runs for half the task's work just
 * before and half just after it, so both see the same load on average. */
static void
report(const char *what, double secs, double cpu, double flops, double ref_secs, double ref_cpu,
       double ref_flops)
{
    double g = flops / secs / 1e9, ref = ref_flops / ref_secs / 1e9;
    printf("%-36s %7.2f s %6.1f GFLOP/s | sgemm %6.1f GFLOP/s | ratio %.2f\n", what, secs, g,
           ref, g / ref);
    printf("%-36s per CPU second: %6.1f vs sgemm %6.1f GFLOP/s | ratio %.2f\n", "",
           flops / cpu / 1e9, ref_flops / ref_cpu / 1e9, (flops / cpu) / (ref_flops / ref_cpu));
}

int
main(int argc, char **argv)
{
    double scale = argc > 1 ? atof(argv[1]) : 1.0;
    if (!(scale > 0 && scale <= 1))
        scale = 1.0;
    size_t nq = (size_t)(1500 * scale), nt = (size_t)(200000 * scale);
    size_t nc = (size_t)(50000 * scale);
    unsigned threads = (unsigned)sysconf(_SC_NPROCESSORS_ONLN);
    ist_retrieve_opts ro;
    ist_error err;
    ist_topk *tk;

    printf("retrieval benchmark: dimension %d, %u threads, tile budget %zu MiB%s\n", DIM,
           threads, BUDGET >> 20, scale < 1 ? " (scaled down)" : "");
    float *q = random_unit_rows(nq, DIM, 1), *t = random_unit_rows(nt, DIM, 2);
    float *a = random_unit_rows(nc, DIM, 3), *b = random_unit_rows(nc, DIM, 4);
    float *ra = random_unit_rows(1024, DIM, 5), *rb = random_unit_rows(8192, DIM, 6);
    float *rc = calloc((size_t)1024 * 8192, sizeof *rc);
    float *r = malloc(nc * sizeof *r);
    if (!rc || !r)
        return 1;
    ist_retrieve_opts_init(&ro);
    ro.budget = BUDGET;
    ist_cmatview qv = {q, nq, DIM, DIM}, tv = {t, nt, DIM, DIM};
    ist_cmatview av = {a, nc, DIM, DIM}, bv = {b, nc, DIM, DIM};
    double fs = 2.0 * nq * nt * DIM, fc = 2.0 * nc * nc * DIM, rf = 0, rt = 0, rcpu = 0;

    rt += sgemm_run(ra, rb, rc, fs / 2, &rf, &rcpu);
    long rss0 = peak_kib();
    double c0 = cpu_now();
    double t0 = now();
    if (ist_retrieve_topk(qv, tv, 10, 1.0f, NULL, NULL, &ro, &tk, &err) != IST_OK) {
        fprintf(stderr, "bench_retrieve: %s\n", err.msg);
        return 1;
    }
    double t_score = now() - t0, c_score = cpu_now() - c0;
    ist_topk_free(tk);
    rt += sgemm_run(ra, rb, rc, fs / 2, &rf, &rcpu);
    char label[96];
    snprintf(label, sizeof label, "scoring %zu x %zu, top-10", nq, nt);
    report(label, t_score, c_score, fs, rt, rcpu, rf);

    rf = rt = rcpu = 0;
    rt += sgemm_run(ra, rb, rc, fc / 2, &rf, &rcpu);
    c0 = cpu_now();
    t0 = now();
    if (ist_retrieve_neighbourhood(av, bv, 10, &ro, r, &err) != IST_OK) {
        fprintf(stderr, "bench_retrieve: %s\n", err.msg);
        return 1;
    }
    double t_csls = now() - t0, c_csls = cpu_now() - c0;
    long rss1 = peak_kib();
    rt += sgemm_run(ra, rb, rc, fc / 2, &rf, &rcpu);
    snprintf(label, sizeof label, "CSLS neighbourhood %zu x %zu, k=10", nc, nc);
    report(label, t_csls, c_csls, fc, rt, rcpu, rf);
    printf("peak memory growth over both: %.1f MiB (tile budget %zu MiB, top-k heaps %.1f MiB;"
           " inputs %.0f MiB)\n",
           (rss1 - rss0) / 1024.0, BUDGET >> 20, threads * (double)nc * 10 * 8 / 1048576.0,
           (double)(nq + nt + 2 * nc) * DIM * 4 / 1048576.0);
    double mean = 0;
    for (size_t i = 0; i < nc; i++)
        mean += r[i];
    printf("(mean neighbourhood cosine %.4f; random unit vectors in 300 dimensions)\n",
           mean / (double)nc);
    free(q), free(t), free(a), free(b), free(ra), free(rb), free(rc), free(r);
    return 0;
}
