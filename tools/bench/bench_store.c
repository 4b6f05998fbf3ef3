/* bench_store.c - how fast vector files load, and what they cost in memory.
 *
 * Builds a random rows x dim table, writes it as a text table and as a native
 * file, then measures each load in a fresh child process (so peak memory is
 * that load's alone): text parse rate, native open with and without the full
 * checksum pass, and the ratio text / native. Also checks that the text ->
 * native -> text round trip is bit-exact on this table. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include <isthmus/isthmus.h>

typedef struct sample {
    double seconds;
    long rss_before_kb, rss_peak_kb;
    int ok;
} sample;

static double
now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static long
peak_kb(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return ru.ru_maxrss;
}

/* Load path in a child; touch = also read every number once. */
static sample
measure(const char *path, bool verify, bool touch)
{
    int fds[2];
    sample s = {0, 0, 0, 0};

    if (pipe(fds) != 0)
        return s;
    pid_t pid = fork();
    if (pid == 0) {
        ist_store_opts o;
        ist_store *st;
        ist_error e;
        sample r = {0, peak_kb(), 0, 0};
        ist_store_opts_init(&o);
        o.verify = verify;
        double t0 = now();
        if (ist_store_open(path, &o, &st, &e) == IST_OK) {
            if (touch) {
                volatile float sink = 0;
                for (size_t i = 0; i < ist_store_rows(st); i++)
                    sink += ist_store_row(st, i)[0] + ist_store_row(st, i)[ist_store_dim(st) - 1];
                (void)sink;
            }
            r.seconds = now() - t0;
            r.ok = 1;
            r.rss_peak_kb = peak_kb();
            ist_store_free(st);
        }
        if (write(fds[1], &r, sizeof r) != (ssize_t)sizeof r)
            _exit(1);
        _exit(0);
    }
    close(fds[1]);
    if (read(fds[0], &s, sizeof s) != (ssize_t)sizeof s)
        s.ok = 0;
    close(fds[0]);
    waitpid(pid, NULL, 0);
    return s;
}

static int
cmp_d(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return x < y ? -1 : x > y;
}

static sample
median_of(const char *path, bool verify, bool touch, int reps)
{
    double t[16];
    sample last = {0, 0, 0, 0};
    for (int i = 0; i < reps; i++) {
        last = measure(path, verify, touch);
        t[i] = last.seconds;
    }
    qsort(t, (size_t)reps, sizeof t[0], cmp_d);
    last.seconds = t[reps / 2];
    return last;
}

static int
files_equal(const char *a, const char *b)
{
    FILE *x = fopen(a, "rb"), *y = fopen(b, "rb");
    int eq = x && y;
    char bx[1 << 16], by[1 << 16];
    while (eq) {
        size_t nx = fread(bx, 1, sizeof bx, x), ny = fread(by, 1, sizeof by, y);
        if (nx != ny || memcmp(bx, by, nx) != 0)
            eq = 0;
        if (nx == 0)
            break;
    }
    if (x)
        fclose(x);
    if (y)
        fclose(y);
    return eq;
}

int
main(int argc, char **argv)
{
    size_t rows = 200000, dim = 300;
    int reps = 3;
    const char *tmp = "/tmp";
    static const struct option opts[] = {
        {"rows", required_argument, NULL, 'r'}, {"dim", required_argument, NULL, 'd'},
        {"repeat", required_argument, NULL, 'n'}, {"dir", required_argument, NULL, 't'},
        {NULL, 0, NULL, 0},
    };
    int c;
    while ((c = getopt_long(argc, argv, "", opts, NULL)) != -1) {
        if (c == 'r')
            rows = strtoul(optarg, NULL, 10);
        else if (c == 'd')
            dim = strtoul(optarg, NULL, 10);
        else if (c == 'n')
            reps = (int)strtol(optarg, NULL, 10);
        else if (c == 't')
            tmp = optarg;
        else {
            fprintf(stderr, "usage: bench-store [--rows N] [--dim D] [--repeat K] [--dir DIR]\n");
            return 2;
        }
    }
    if (reps < 1 || reps > 15 || rows == 0 || dim == 0)
        return 2;
    char dir[512], txt[600], nat[600], back[600], nat2[600];
    snprintf(dir, sizeof dir, "%s/isthmus-bench-XXXXXX", tmp);
    if (!mkdtemp(dir)) {
        perror("mkdtemp");
        return 1;
    }
    snprintf(txt, sizeof txt, "%s/v.txt", dir);
    snprintf(nat, sizeof nat, "%s/v.isv", dir);
    snprintf(back, sizeof back, "%s/back.txt", dir);
    snprintf(nat2, sizeof nat2, "%s/v2.isv", dir);

    const char *ct = getenv("OPENBLAS_CORETYPE"), *l2 = getenv("OPENBLAS_L2_SIZE");
    printf("bench-store: %zu rows x %zu dims, median of %d loads each, one child process per load\n",
           rows, dim, reps);
    printf("environment: OPENBLAS_CORETYPE=%s OPENBLAS_L2_SIZE=%s\n", ct ? ct : "(unset)",
           l2 ? l2 : "(unset)");

    ist_store *s;
    ist_error e;
    char msg[700];
    uint64_t seed = 0x2545f4914f6cdd1dull;
    if (ist_store_new(rows, dim, &s, &e) != IST_OK)
        goto fail;
    for (size_t i = 0; i < rows; i++) {
        float *r = ist_store_row_mut(s, i);
        char w[32];
        for (size_t j = 0; j < dim; j++) {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            r[j] = (float)((double)(seed >> 11) / 9007199254740992.0 * 0.2 - 0.1);
        }
        snprintf(w, sizeof w, "word%zu", i);
        if (ist_store_set_word(s, i, w, rows - i, &e) != IST_OK)
            goto fail;
    }
    double t0 = now();
    if (ist_store_save(s, txt, NULL, &e) != IST_OK)
        goto fail;
    double t_write_text = now() - t0;
    t0 = now();
    if (ist_store_save(s, nat, NULL, &e) != IST_OK)
        goto fail;
    double t_write_nat = now() - t0;
    ist_store_free(s);

    struct stat st;
    stat(txt, &st);
    double text_mb = (double)st.st_size / 1e6;
    stat(nat, &st);
    double nat_mb = (double)st.st_size / 1e6;
    double matrix_mb = (double)rows * (double)dim * 4 / 1e6;
    printf("written: text %.0f MB in %.2f s, native %.0f MB in %.2f s\n", text_mb, t_write_text,
           nat_mb, t_write_nat);

    sample tx = median_of(txt, true, false, reps);
    sample nv = median_of(nat, true, false, reps);
    sample nn = median_of(nat, false, false, reps);
    sample nt = median_of(nat, false, true, reps);
    if (!tx.ok || !nv.ok || !nn.ok || !nt.ok) {
        fprintf(stderr, "bench-store: a load failed\n");
        return 1;
    }
    printf("\n%-44s %10s %12s %14s\n", "load", "seconds", "rate MB/s", "peak RSS +MB");
    printf("%-44s %10.3f %12.1f %14.1f\n", "text table (parse)", tx.seconds,
           text_mb / tx.seconds, (double)(tx.rss_peak_kb - tx.rss_before_kb) / 1024);
    printf("%-44s %10.4f %12.1f %14.1f\n", "native, matrix checksum verified too", nv.seconds,
           nat_mb / nv.seconds, (double)(nv.rss_peak_kb - nv.rss_before_kb) / 1024);
    printf("%-44s %10.4f %12.1f %14.1f\n", "native, default open (matrix mapped)", nn.seconds,
           nat_mb / nn.seconds, (double)(nn.rss_peak_kb - nn.rss_before_kb) / 1024);
    printf("%-44s %10.4f %12.1f %14.1f\n", "native, mapped + first touch of every row", nt.seconds,
           nat_mb / nt.seconds, (double)(nt.rss_peak_kb - nt.rss_before_kb) / 1024);
    printf("\nratio text / native, default open:          %8.1fx   (target >= 50x)\n",
           tx.seconds / nn.seconds);
    printf("ratio text / native, with matrix checksum:  %8.1fx\n", tx.seconds / nv.seconds);
    printf("matrix size %.1f MB; native open without touching adds %.1f MB resident "
           "(target: no copy of the matrix)\n",
           matrix_mb, (double)(nn.rss_peak_kb - nn.rss_before_kb) / 1024);

    /* text -> native -> text must give back the same bytes */
    ist_store *a;
    if (ist_store_open(txt, NULL, &a, &e) != IST_OK || ist_store_save(a, nat2, NULL, &e) != IST_OK)
        goto fail;
    ist_store_free(a);
    if (ist_store_open(nat2, NULL, &a, &e) != IST_OK || ist_store_save(a, back, NULL, &e) != IST_OK)
        goto fail;
    ist_store_free(a);
    int same = files_equal(txt, back);
    printf("round trip text -> native -> text: %s\n", same ? "identical bytes" : "DIFFERENT");
    char cmd[700];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    if (system(cmd) != 0)
        fprintf(stderr, "bench-store: could not remove %s\n", dir);
    return same ? 0 : 1;
fail:
    fprintf(stderr, "bench-store: %s\n", ist_error_format(&e, msg, sizeof msg));
    return 1;
}
