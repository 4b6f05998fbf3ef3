/* bench_sgns.c - speed and memory of skip-gram training, fast path against the per-pair
 * reference loop, in one run on one machine (docs/performance.md, section "Training").
 *
 * Usage: bench-sgns [--corpus PREPARED | --text FILE] [--tokens N] [--repeat R]
 *                   [--only fast|reference DIM THREADS] [--parallel copies|shared]
 *                   [--designs] [--fast-only]
 *   --corpus F    a prepared corpus (isthmus prepare; $ISTHMUS_BENCH_CORPUS), e.g. the English
 *                 Bible from tools/dev/extract-bible.py; its stream is repeated to N tokens
 *   --text FILE   words separated by spaces, one line per sentence, vocabulary pruned at
 *                 count 5 ($ISTHMUS_BENCH_TEXT). Without either, a synthetic Zipfian stream.
 *   --tokens N    stream length [default 10000000]
 *   --repeat R    interleaved repetitions; medians are printed [default 1]
 *   --parallel P  how the threads share the work in every row (default: the library's
 *                 default, which is own copies of the vectors on 2 threads here)
 *   --designs     also, for the fast kernel on 2 threads: lock-free updates of the shared
 *                 rows, the same with private copies of the 1024 hottest rows merged every
 *                 100,000 words, and the control: two independent one-thread runs at the
 *                 same time (what the machine gives two processes that share nothing)
 *   --fast-only   leave out the reference kernel's rows
 * The load average (/proc/loadavg) is printed before every repetition and at the end.
 * Prints words/s (stream words, counted before subsampling), the useful flop rate against
 * this machine's single-precision GEMM rate measured here with cblas_sgemm, and peak resident
 * memory against the floor 2 x vocabulary x dim x 4 bytes + the id stream. */
#include <cblas.h>
#include <stdio.h>
#include <sys/resource.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <unistd.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <isthmus/isthmus.h>

#include "sgns_int.h"     /* the fast path's kernels, for their in-cache ceiling */

static double
now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

/* CPU seconds of the whole process (all threads, user + system): on a machine shared with
 * other work, rates per CPU-second are what the code achieves while it runs. */
static double
cpu_seconds(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return (double)ru.ru_utime.tv_sec + (double)ru.ru_utime.tv_usec * 1e-6 +
           (double)ru.ru_stime.tv_sec + (double)ru.ru_stime.tv_usec * 1e-6;
}

typedef struct stream {
    uint32_t *ids;
    size_t n, cap;
    uint64_t *counts;
    size_t vocab;
    const char *what;
} stream;

static void
push(stream *s, uint32_t id)
{
    if (s->n == s->cap) {
        s->cap = s->cap ? 2 * s->cap : 1 << 20;
        s->ids = realloc(s->ids, s->cap * sizeof *s->ids);
        if (!s->ids) {
            perror("bench-sgns");
            exit(1);
        }
    }
    s->ids[s->n++] = id;
}

/* Words of the text, vocabulary pruned at count 5 (frequency order), repeated to `tokens`. */
static int
load_text(const char *path, size_t tokens, stream *s)
{
    FILE *f = fopen(path, "r");
    ist_vocab *v;
    ist_error err;
    char *line = NULL;
    size_t cap = 0;
    stream once = {0};
    if (!f) {
        perror(path);
        return -1;
    }
    ist_vocab_new(&v, &err);
    while (getline(&line, &cap, f) > 0) {
        for (char *tok = strtok(line, " \t\r\n"); tok; tok = strtok(NULL, " \t\r\n")) {
            uint32_t id;
            if (ist_vocab_add(v, tok, strlen(tok), 1, &id, &err) != IST_OK) {
                fprintf(stderr, "bench-sgns: %s\n", err.msg);
                return -1;
            }
            push(&once, id);
        }
        push(&once, IST_CORPUS_EOL);
    }
    free(line);
    fclose(f);
    size_t n0 = ist_vocab_size(v);
    uint32_t *remap = malloc(n0 * sizeof *remap);
    if (ist_vocab_sort_prune(v, 5, 0, remap, &err) != IST_OK) {
        fprintf(stderr, "bench-sgns: %s\n", err.msg);
        return -1;
    }
    s->vocab = ist_vocab_size(v);
    s->counts = calloc(s->vocab, sizeof *s->counts);
    size_t words = 0;
    for (size_t i = 0; i < once.n; i++)
        if (once.ids[i] != IST_CORPUS_EOL && remap[once.ids[i]] != UINT32_MAX)
            words++;
    while (s->n < tokens) {
        size_t kept = 0;
        for (size_t i = 0; i < once.n; i++) {
            uint32_t id = once.ids[i];
            if (id == IST_CORPUS_EOL) {
                push(s, id);
                continue;
            }
            if ((id = remap[id]) == UINT32_MAX)
                continue;
            push(s, id);
            s->counts[id]++;
            kept++;
        }
        if (kept == 0)
            break;
    }
    fprintf(stdout, "stream: %s, %zu words of text (%zu types, %zu with count >= 5), repeated "
                    "to %zu ids\n", path, words, n0, s->vocab, s->n);
    s->what = path;
    free(remap);
    free(once.ids);
    ist_vocab_free(v);
    return 0;
}

/* A prepared corpus (isthmus prepare), its id stream repeated to `tokens`. */
static int
load_prepared(const char *path, size_t tokens, stream *s)
{
    ist_corpus *c;
    ist_error err;
    size_t n;
    if (ist_corpus_open(path, &c, &err) != IST_OK) {
        char buf[1024];
        fprintf(stderr, "bench-sgns: %s\n", ist_error_format(&err, buf, sizeof buf));
        return -1;
    }
    const uint32_t *ids = ist_corpus_ids(c, &n);
    const ist_vocab *v = ist_corpus_vocab(c);
    s->vocab = ist_vocab_size(v);
    s->counts = calloc(s->vocab ? s->vocab : 1, sizeof *s->counts);
    size_t words = 0;
    for (size_t i = 0; i < n; i++)
        words += ids[i] != IST_CORPUS_EOL;
    while (s->n < tokens && words > 0)
        for (size_t i = 0; i < n; i++) {
            push(s, ids[i]);
            if (ids[i] != IST_CORPUS_EOL)
                s->counts[ids[i]]++;
        }
    printf("stream: prepared corpus %s, %zu words (%zu types), repeated to %zu ids\n", path, words,
           s->vocab, s->n);
    s->what = path;
    ist_corpus_free(c);
    return 0;
}

/* Zipf(1) over 20,000 ids, lines of 25 words. */
static void
synthetic(size_t tokens, stream *s)
{
    size_t V = 20000;
    double *cum = malloc(V * sizeof *cum), tot = 0;
    uint64_t r = 12345;
    for (size_t v = 0; v < V; v++)
        cum[v] = (tot += 1.0 / (double)(v + 1));
    s->vocab = V;
    s->counts = calloc(V, sizeof *s->counts);
    for (size_t i = 0; i < tokens; i++) {
        r ^= r << 13, r ^= r >> 7, r ^= r << 17;
        double u = (double)(r >> 11) / 9007199254740992.0 * tot;
        size_t lo = 0, hi = V - 1;
        while (lo < hi) {
            size_t mid = (lo + hi) / 2;
            if (cum[mid] < u)
                lo = mid + 1;
            else
                hi = mid;
        }
        push(s, (uint32_t)lo);
        s->counts[lo]++;
        if (i % 25 == 24)
            push(s, IST_CORPUS_EOL);
    }
    free(cum);
    s->what = "synthetic Zipf(1) ids, 20000 types";
    printf("stream: %s, %zu ids\n", s->what, s->n);
}

/* Best of three n x n x n single-precision products: flop/s of wall time, and *cpu_rate
 * flop/s per CPU-second (per thread). */
static double
gemm_rate(int threads, double *cpu_rate)
{
    const int n = 1536;
    float *a = malloc(sizeof(float) * n * n), *b = malloc(sizeof(float) * n * n);
    float *c = malloc(sizeof(float) * n * n);
    for (int i = 0; i < n * n; i++)
        a[i] = (float)(i % 7) * 0.1f, b[i] = (float)(i % 5) * 0.2f, c[i] = 0;
    openblas_set_num_threads(threads);
    double best = 1e30, best_cpu = 1e30;
    for (int rep = 0; rep < 4; rep++) {
        double t = now(), u = cpu_seconds();
        cblas_sgemm(CblasRowMajor, CblasNoTrans, CblasTrans, n, n, n, 1.0f, a, n, b, n, 0.0f, c,
                    n);
        t = now() - t;
        u = cpu_seconds() - u;
        if (rep > 0 && t < best)     /* the first call warms up */
            best = t;
        if (rep > 0 && u < best_cpu)
            best_cpu = u;
    }
    free(a), free(b), free(c);
    *cpu_rate = 2.0 * n * (double)n * n / best_cpu;
    return 2.0 * n * (double)n * n / best;
}

/* The fast path's arithmetic alone: one window's products (m = 6 contexts, 1 + 5 outputs)
 * on rows that stay in the L1 cache, repeated for about 0.5 s; flop per CPU-second. */
static double
kernel_ceiling(size_t dim)
{
    const ist_sgns_simd *k = ist_sgns_simd_pick(getenv("ISTHMUS_SIMD"));
    size_t len = (dim + 15) & ~(size_t)15, m = 6, n = 6;
    float *buf = calloc((2 * m + n) * len + 64, sizeof(float)), s[36], g[36];
    const float *xr[6], *yr[6];
    float *xw[6], *yw[6], *dx[6];
    for (size_t i = 0; i < (2 * m + n) * len; i++)
        buf[i] = 1e-3f * (float)(i % 17);
    for (size_t i = 0; i < 6; i++) {
        xw[i] = buf + i * len, xr[i] = xw[i];
        yw[i] = buf + (m + i) * len, yr[i] = yw[i];
        dx[i] = buf + (m + n + i) * len;
    }
    for (int i = 0; i < 36; i++)
        g[i] = 1e-6f * (float)(i - 18);
    double u0 = cpu_seconds(), u;
    long reps = 0;
    do {
        for (int r = 0; r < 1000; r++) {
            k->dots(xr, m, yr, n, len, s);
            for (size_t j = 0; j < m; j++)
                memset(dx[j], 0, len * sizeof(float));
            k->acc(dx, m, yr, n, g, len);
            k->acc(yw, n, xr, m, g, len);
            for (size_t j = 0; j < m; j++)
                k->add(xw[j], dx[j], len);
        }
        reps += 1000;
        u = cpu_seconds() - u0;
    } while (u < 0.5);
    free(buf);
    return (double)reps * (double)(m * n) * 6.0 * (double)dim / u;
}

#define MAX_REPEAT 9

typedef struct row {
    int fast;
    size_t dim, threads;
    int procs;                               /* 2: the control, two one-thread processes */
    long hot;                                /* ist_sgns_opts.hot_rows, -1: default */
    long merge;                              /* ist_sgns_opts.hot_merge, 0: default */
    ist_sgns_parallel parallel;
    int n;                                   /* repetitions done */
    double wps[MAX_REPEAT], cpu_wps[MAX_REPEAT], flops[MAX_REPEAT], cpu_flops[MAX_REPEAT];
    double peak, added, floor_;
} row;

static int
cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double
median(const double *v, int n)
{
    double t[MAX_REPEAT];
    memcpy(t, v, (size_t)n * sizeof *t);
    qsort(t, (size_t)n, sizeof *t, cmp_double);
    return n % 2 ? t[n / 2] : 0.5 * (t[n / 2 - 1] + t[n / 2]);
}

/* VmRSS now, bytes. */
static double
rss_now(void)
{
    FILE *f = fopen("/proc/self/status", "r");
    char line[256];
    double kb = 0;
    while (f && fgets(line, sizeof line, f))
        if (strncmp(line, "VmRSS:", 6) == 0)
            kb = atof(line + 6);
    if (f)
        fclose(f);
    return kb * 1024.0;
}

typedef struct outcome {
    int ok;
    double wps, cpu_wps, flops, cpu_flops, base;
} outcome;

/* The child's side: train once, send the outcome down the pipe. */
static void
child_train(const stream *s, const row *r, int fd)
{
    ist_sgns_opts o;
    ist_sgns_result res;
    ist_matrix *m = NULL;
    ist_error err;
    outcome out = {0};
    ist_sgns_opts_init(&o);
    if (r->hot >= 0)
        o.hot_rows = (size_t)r->hot;
    if (r->merge > 0)
        o.hot_merge = (size_t)r->merge;
    o.dim = r->dim;
    o.threads = r->threads;
    o.epochs = 1;
    o.kernel = r->fast ? IST_SGNS_FAST : IST_SGNS_REFERENCE;
    o.parallel = r->parallel;
    out.base = rss_now();
    double u0 = cpu_seconds();
    if (ist_sgns_train(s->ids, s->n, s->counts, s->vocab, &o, &m, NULL, &res, &err) == IST_OK) {
        double cpu = cpu_seconds() - u0;
        out.ok = 1;
        out.wps = res.words_per_sec;
        out.cpu_wps = (double)res.words_seen / cpu;
        /* per pair: dot product, output-row update, input-gradient update: 3 x 2 dim */
        out.flops = (double)res.pairs * 6.0 * (double)o.dim / res.seconds;
        out.cpu_flops = (double)res.pairs * 6.0 * (double)o.dim / cpu;
    } else {
        fprintf(stderr, "bench-sgns: %s\n", err.msg);
    }
    if (write(fd, &out, sizeof out) != (ssize_t)sizeof out)
        _exit(1);
    _exit(0);
}

/* Each training runs in a child process so that its peak resident memory is its own:
 * the child starts with the parent's pages (the id stream) and ru_maxrss is its peak. The
 * control row starts two children at once and adds their rates. */
static int
run_one(const stream *s, row *r, int rep)
{
    int fd[2][2], np = r->procs > 1 ? 2 : 1;
    pid_t pid[2];
    outcome out[2];
    double peak = 0, added = 0;
    fflush(stdout);
    for (int c = 0; c < np; c++) {
        if (pipe(fd[c]) != 0) {
            perror("bench-sgns: pipe");
            return -1;
        }
        pid[c] = fork();
        if (pid[c] < 0) {
            perror("bench-sgns: fork");
            return -1;
        }
        if (pid[c] == 0) {
            close(fd[c][0]);
            child_train(s, r, fd[c][1]);
        }
        close(fd[c][1]);
    }
    int bad = 0;
    for (int c = 0; c < np; c++) {
        memset(&out[c], 0, sizeof out[c]);
        ssize_t got = read(fd[c][0], &out[c], sizeof out[c]);
        close(fd[c][0]);
        struct rusage ru;
        int status;
        if (wait4(pid[c], &status, 0, &ru) < 0 || got != (ssize_t)sizeof out[c] || !out[c].ok)
            bad = 1;
        double pk = (double)ru.ru_maxrss * 1024.0;
        if (pk > peak)
            peak = pk;
        if (pk - out[c].base > added)
            added = pk - out[c].base;
    }
    if (bad)
        return -1;
    r->wps[rep] = r->cpu_wps[rep] = r->flops[rep] = r->cpu_flops[rep] = 0;
    for (int c = 0; c < np; c++) {
        r->wps[rep] += out[c].wps;
        r->flops[rep] += out[c].flops;
        r->cpu_wps[rep] += out[c].cpu_wps / np;
        r->cpu_flops[rep] += out[c].cpu_flops / np;
    }
    if (rep == 0 || peak > r->peak)
        r->peak = peak;
    if (rep == 0 || added > r->added)
        r->added = added;
    r->floor_ = 2.0 * (double)s->vocab * (double)r->dim * 4 + (double)s->n * 4;
    r->n = rep + 1;
    return 0;
}

static void
print_load(const char *when)
{
    char buf[128] = "?";
    FILE *f = fopen("/proc/loadavg", "r");
    if (f) {
        if (!fgets(buf, sizeof buf, f))
            strcpy(buf, "?\n");
        fclose(f);
    }
    printf("load average %s: %s", when, buf);
}

/* The processor's model name (first "model name" of /proc/cpuinfo) and the processors online. */
static void
print_cpu(void)
{
    char line[256], model[256] = "?";
    FILE *f = fopen("/proc/cpuinfo", "r");
    if (f) {
        while (fgets(line, sizeof line, f))
            if (strncmp(line, "model name", 10) == 0) {
                const char *c = strchr(line, ':');
                if (c) {
                    snprintf(model, sizeof model, "%s", c + 1 + (c[1] == ' '));
                    model[strcspn(model, "\n")] = '\0';
                }
                break;
            }
        fclose(f);
    }
    printf("cpu: %s, %ld processors online\n", model, sysconf(_SC_NPROCESSORS_ONLN));
}

static const char *
row_label(const row *r, char *buf, size_t cap)
{
    if (r->procs > 1)
        snprintf(buf, cap, "control: 2 one-thread processes");
    else if (r->threads < 2)
        snprintf(buf, cap, "-");
    else if (r->hot > 0)
        snprintf(buf, cap, "shared rows, %ld private hot rows merged /%ldk words", r->hot,
                 10 * (r->merge > 0 ? r->merge : 1));
    else if (r->parallel == IST_SGNS_PARALLEL_SHARED)
        snprintf(buf, cap, "shared rows, lock-free");
    else
        snprintf(buf, cap, "own copies, combined 4 times a pass%s",
                 r->parallel == IST_SGNS_PARALLEL_AUTO ? " (default)" : "");
    return buf;
}

int
main(int argc, char **argv)
{
    const char *text = getenv("ISTHMUS_BENCH_TEXT"), *prepared = getenv("ISTHMUS_BENCH_CORPUS");
    size_t tokens = 10000000, dims[2] = {100, 300}, nthr[2] = {1, 2};
    stream s = {0};
    row rows[16];
    int nr = 0, only_kernel = -1, repeat = 1, designs = 0, fast_only = 0;
    ist_sgns_parallel parallel = IST_SGNS_PARALLEL_AUTO;
    size_t only_dim = 0, only_threads = 0;

    for (int i = 1; i < argc; i++) {
        if (strcmp(argv[i], "--text") == 0 && i + 1 < argc)
            text = argv[++i];
        else if (strcmp(argv[i], "--corpus") == 0 && i + 1 < argc)
            prepared = argv[++i];
        else if (strcmp(argv[i], "--tokens") == 0 && i + 1 < argc)
            tokens = strtoull(argv[++i], NULL, 10);
        else if (strcmp(argv[i], "--repeat") == 0 && i + 1 < argc)
            repeat = atoi(argv[++i]);
        else if (strcmp(argv[i], "--only") == 0 && i + 3 < argc) {   /* kernel dim threads */
            only_kernel = strcmp(argv[++i], "fast") == 0 ? 0 : 1;
            only_dim = strtoull(argv[++i], NULL, 10);
            only_threads = strtoull(argv[++i], NULL, 10);
        } else if (strcmp(argv[i], "--parallel") == 0 && i + 1 < argc) {
            i++;
            parallel = strcmp(argv[i], "shared") == 0 ? IST_SGNS_PARALLEL_SHARED
                       : strcmp(argv[i], "copies") == 0 ? IST_SGNS_PARALLEL_COPIES
                                                        : IST_SGNS_PARALLEL_AUTO;
        } else if (strcmp(argv[i], "--designs") == 0) {
            designs = 1;
        } else if (strcmp(argv[i], "--fast-only") == 0) {
            fast_only = 1;
        } else {
            fprintf(stderr, "usage: bench-sgns [--corpus PREPARED | --text FILE] [--tokens N] "
                            "[--repeat R] [--only fast|reference DIM THREADS] "
                            "[--parallel copies|shared] [--designs] [--fast-only]\n");
            return 2;
        }
    }
    if (repeat < 1 || repeat > MAX_REPEAT) {
        fprintf(stderr, "bench-sgns: --repeat: expected 1 to %d\n", MAX_REPEAT);
        return 2;
    }
    if (prepared && *prepared) {
        if (load_prepared(prepared, tokens, &s) != 0)
            return 1;
    } else if (text && *text) {
        if (load_text(text, tokens, &s) != 0)
            return 1;
    } else {
        synthetic(tokens, &s);
    }
    print_cpu();
    const char *ct = getenv("OPENBLAS_CORETYPE"), *l2 = getenv("OPENBLAS_L2_SIZE");
    printf("OPENBLAS_CORETYPE=%s OPENBLAS_L2_SIZE=%s; OpenBLAS core %s; config %s\n",
           ct ? ct : "(unset)", l2 ? l2 : "(unset)", openblas_get_corename(),
           openblas_get_config());
    printf("fast-path kernels: %s\n", ist_sgns_simd_name(getenv("ISTHMUS_SIMD")));
    double c1, c2, g1 = gemm_rate(1, &c1), g2 = gemm_rate(2, &c2);
    printf("cblas_sgemm 1536^3: %.1f GFLOP/s on 1 thread, %.1f on 2 threads (wall); "
           "%.1f and %.1f GFLOP per CPU-second\n", g1 * 1e-9, g2 * 1e-9, c1 * 1e-9, c2 * 1e-9);
    openblas_set_num_threads(1);
    double k100 = kernel_ceiling(100), k300 = kernel_ceiling(300);
    printf("fast-path kernels alone, rows in L1 (6 contexts x 6 outputs a window): "
           "%.1f GFLOP per CPU-second at dim 100 (%.0f%% of GEMM), %.1f at dim 300 (%.0f%%)\n",
           k100 * 1e-9, 100 * k100 / c1, k300 * 1e-9, 100 * k300 / c1);
    printf("training: 1 epoch, window 5, 5 noise samples, subsampling 1e-4, lr 0.025; "
           "medians of %d interleaved repetition%s\n\n", repeat, repeat > 1 ? "s" : "");
    for (int di = 0; di < 2; di++)
        for (int ti = 0; ti < 2; ti++)
            for (int k = 0; k < 2; k++) {
                if (only_kernel >= 0 &&
                    (k != only_kernel || dims[di] != only_dim || nthr[ti] != only_threads))
                    continue;
                if (fast_only && k == 1)
                    continue;
                row *r = &rows[nr++];
                memset(r, 0, sizeof *r);
                r->fast = k == 0;
                r->dim = dims[di];
                r->threads = nthr[ti];
                r->procs = 1;
                r->hot = -1;
                r->parallel = parallel;
            }
    int n_main = nr, step = fast_only ? 1 : 2;   /* rows from 1 to 2 threads */
    if (designs && only_kernel < 0)
        for (int di = 0; di < 2; di++) {
            long hots[2] = {-1, 1024}, merges[2] = {0, 10};
            for (int v = 0; v < 3; v++) {
                row *r = &rows[nr++];
                memset(r, 0, sizeof *r);
                r->fast = 1;
                r->dim = dims[di];
                r->threads = v < 2 ? 2 : 1;
                r->procs = v < 2 ? 1 : 2;
                r->hot = v < 2 ? hots[v] : -1;
                r->merge = v < 2 ? merges[v] : 0;
                r->parallel = v < 2 ? IST_SGNS_PARALLEL_SHARED : IST_SGNS_PARALLEL_AUTO;
            }
        }
    print_load("at the start");
    for (int rep = 0; rep < repeat; rep++) {
        if (rep > 0)
            print_load("before the next repetition");
        for (int i = 0; i < nr; i++) {
            if (run_one(&s, &rows[i], rep) != 0)
                return 1;
            fprintf(stderr, "\rbench-sgns: repetition %d/%d, run %d/%d ", rep + 1, repeat, i + 1,
                    nr);
        }
    }
    fprintf(stderr, "\n");
    print_load("at the end");
    printf("words/s: wall clock; words/cpu-s: per CPU-second, i.e. per busy thread; %%GEMM: "
           "GFLOP per CPU-second / GEMM's\n");
    printf("peak MB: peak resident set of the training process (which holds the id stream from "
           "the start);\nadded MB: its growth during training; floor MB: 2 x vocabulary x dim x 4 "
           "bytes + id stream\n");
    printf("%-9s %4s %3s %10s %14s %12s %8s %7s %8s %8s %8s  %s\n", "kernel", "dim", "thr",
           "words/s", "words/s/thread", "words/cpu-s", "GFLOP/s", "%GEMM", "peak MB", "added MB",
           "floor MB", "design");
    for (int i = 0; i < nr; i++) {
        row *r = &rows[i];
        char lab[128];
        size_t busy = r->threads * (size_t)r->procs;
        double g = busy == 1 ? c1 : c2, w = median(r->wps, r->n);
        printf("%-9s %4zu %3zu %10.0f %14.0f %12.0f %8.2f %6.1f%% %8.1f %8.1f %8.1f  %s\n",
               r->fast ? "fast" : "reference", r->dim, busy, w, w / (double)busy,
               median(r->cpu_wps, r->n), median(r->flops, r->n) * 1e-9,
               100.0 * median(r->cpu_flops, r->n) / g, r->peak / 1048576.0, r->added / 1048576.0,
               r->floor_ / 1048576.0, row_label(r, lab, sizeof lab));
    }
    if (only_kernel >= 0)
        return 0;
    printf("\nratios of medians (same run):\n");
    for (int i = 0; i + 1 < n_main && !fast_only; i += 2)
        printf("  dim %3zu, %zu thread%s: fast / reference = %.2f (wall), %.2f (per CPU-second)\n",
               rows[i].dim, rows[i].threads, rows[i].threads > 1 ? "s" : " ",
               median(rows[i].wps, rows[i].n) / median(rows[i + 1].wps, rows[i + 1].n),
               median(rows[i].cpu_wps, rows[i].n) / median(rows[i + 1].cpu_wps, rows[i + 1].n));
    for (int i = 0; i < n_main; i++)
        if (rows[i].threads == 1 && i + step < n_main)
            printf("  %-9s dim %3zu: 2 threads / 1 thread = %.2f (wall); per CPU-second %.2f\n",
                   rows[i].fast ? "fast" : "reference", rows[i].dim,
                   median(rows[i + step].wps, rows[i + step].n) / median(rows[i].wps, rows[i].n),
                   median(rows[i + step].cpu_wps, rows[i + step].n) /
                       median(rows[i].cpu_wps, rows[i].n));
    for (int i = n_main; i < nr; i++) {
        const row *r = &rows[i], *one = &rows[r->dim == 100 ? 0 : 2 * step];
        char lab[128];
        printf("  fast      dim %3zu: %-32s / 1 thread = %.2f (wall); per CPU-second %.2f\n",
               r->dim, row_label(r, lab, sizeof lab),
               median(r->wps, r->n) / median(one->wps, one->n),
               median(r->cpu_wps, r->n) / median(one->cpu_wps, one->n));
    }
    printf("  GEMM: 2 threads / 1 thread = %.2f (wall)\n", g2 / g1);
    free(s.ids);
    free(s.counts);
    return 0;
}
