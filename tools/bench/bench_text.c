/* bench-text.c - speed of text preparation, phase by phase, in one run.
 *
 * Usage: bench-text [FILE...]   (plain UTF-8 text; without files a synthetic
 * English/Spanish-like text of about 20 MB is generated from a fixed seed)
 *
 * Prints MB/s for: normalisation with the ASCII fast path and piecewise
 * utf8proc (what the library does) against utf8proc over every whole line;
 * UAX #29 segmentation; counting words with the corpus counting table against
 * the general vocabulary table; and the whole ist_corpus_build. Each figure is
 * the best of three repetitions; ratios compare figures of the same run. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <utf8proc.h>

#include <isthmus/corpus.h>
#include <isthmus/text.h>
#include <isthmus/vocab.h>

#include "wordtab_int.h"

typedef struct text {
    char *buf;
    size_t len;
    size_t *line;      /* start of each line; line[n] = len */
    size_t n;
} text;

static double
now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + ts.tv_nsec * 1e-9;
}

static void
die(const char *what)
{
    fprintf(stderr, "bench-text: %s\n", what);
    exit(1);
}

static void
append(text *t, size_t *cap, const char *s, size_t n)
{
    if (t->len + n + 1 > *cap) {
        while (t->len + n + 1 > *cap)
            *cap = *cap ? 2 * *cap : 1 << 20;
        t->buf = realloc(t->buf, *cap);
        if (!t->buf)
            die("out of memory");
    }
    memcpy(t->buf + t->len, s, n);
    t->len += n;
}

static void
synthetic(text *t, size_t *cap)
{
    static const char *const w[] = {
        "the", "blue", "mug", "ships", "today", "Tillwick", "lid", "is", "fine", "order",
        "500ml", "taza", "azul", "env\xc3\xad" "o", "ma\xc3\xb1" "ana", "cami\xc3\xb3n", "r\xc3\xa1pido",
        "devoluci\xc3\xb3n", "tama\xc3\xb1o", "pa\xc3\xads", "caf\xc3\xa9", "and", "of", "with", "Order",
        "NOTE", "x-200", "can't", "3.5", "2,000", "good", "bad", "color", "se\xc3\xb1or",
    };
    uint64_t s = 88172645463325252ull;
    while (t->len < 20u << 20) {
        int k = 5 + (int)(s % 20);
        for (int i = 0; i < k; i++) {
            s ^= s << 13;
            s ^= s >> 7;
            s ^= s << 17;
            /* a skewed choice so some words are much more frequent */
            size_t j = (size_t)((s % 1000) * (s % 1000) / 1000 * (sizeof w / sizeof w[0]) / 1000);
            append(t, cap, w[j], strlen(w[j]));
            append(t, cap, i + 1 < k ? " " : ".\n", i + 1 < k ? 1 : 2);
        }
    }
}

static void
load(text *t, int argc, char **argv)
{
    size_t cap = 0;
    char chunk[1 << 16];

    memset(t, 0, sizeof *t);
    if (argc < 2) {
        synthetic(t, &cap);
    } else {
        for (int i = 1; i < argc; i++) {
            FILE *f = fopen(argv[i], "rb");
            size_t n;
            if (!f)
                die("cannot open an input file");
            while ((n = fread(chunk, 1, sizeof chunk, f)) > 0)
                append(t, &cap, chunk, n);
            fclose(f);
        }
    }
    size_t lcap = 1024;
    t->line = malloc(lcap * sizeof *t->line);
    t->line[t->n++] = 0;
    for (size_t i = 0; i < t->len; i++) {
        if (t->buf[i] != '\n')
            continue;
        if (t->n + 1 >= lcap) {
            lcap *= 2;
            t->line = realloc(t->line, lcap * sizeof *t->line);
        }
        t->line[t->n++] = i + 1;
    }
    if (t->line[t->n - 1] != t->len)
        t->line[t->n++] = t->len;
    t->n--;   /* number of lines */
}

static double
mbps(size_t bytes, double secs)
{
    return secs > 0 ? bytes / 1e6 / secs : 0.0;
}

/* ---- the phases ------------------------------------------------------- */

static size_t sink;

static double
run_normalize(const text *t, ist_normalizer *nz)
{
    double t0 = now();
    for (size_t i = 0; i < t->n; i++) {
        const char *out;
        size_t n;
        size_t len = t->line[i + 1] - t->line[i] - 1;
        if (ist_normalize(nz, t->buf + t->line[i], len, &out, &n, NULL) != IST_OK)
            die("normalisation failed");
        sink += n;
    }
    return now() - t0;
}

static double
run_utf8proc_whole(const text *t)
{
    const utf8proc_option_t f = UTF8PROC_STABLE | UTF8PROC_COMPOSE | UTF8PROC_COMPAT
                                | UTF8PROC_CASEFOLD;
    double t0 = now();
    for (size_t i = 0; i < t->n; i++) {
        utf8proc_uint8_t *out = NULL;
        size_t len = t->line[i + 1] - t->line[i] - 1;
        utf8proc_ssize_t n = utf8proc_map((const utf8proc_uint8_t *)t->buf + t->line[i],
                                          (utf8proc_ssize_t)len, &out, f);
        if (n < 0)
            die("utf8proc_map failed (is the input valid UTF-8?)");
        sink += (size_t)n;
        free(out);
    }
    return now() - t0;
}

typedef struct count_ctx {
    ist_wordtab *tab;
    ist_vocab *voc;
    size_t words;
} count_ctx;

static int
just_count(void *ctx, const char *w, size_t len)
{
    count_ctx *c = ctx;
    (void)w;
    c->words += len > 0;
    return 0;
}

static int
into_tab(void *ctx, const char *w, size_t len)
{
    count_ctx *c = ctx;
    uint32_t id;
    if (ist_wordtab_add(c->tab, w, len, &id, NULL) != IST_OK)
        die("counting table failed");
    return 0;
}

static int
into_vocab(void *ctx, const char *w, size_t len)
{
    count_ctx *c = ctx;
    uint32_t id;
    if (ist_vocab_add(c->voc, w, len, 1, &id, NULL) != IST_OK)
        die("vocabulary failed");
    return 0;
}

/* Segment the normalised text (nt) and hand each word to fn. */
static double
run_segment(const text *nt, ist_word_fn fn, void *ctx)
{
    double t0 = now();
    for (size_t i = 0; i < nt->n; i++) {
        size_t len = nt->line[i + 1] - nt->line[i] - 1;
        if (ist_segment_words(nt->buf + nt->line[i], len, fn, ctx, NULL) != IST_OK)
            die("segmentation failed");
    }
    return now() - t0;
}

static double
best3(double a, double b, double c)
{
    double m = a < b ? a : b;
    return m < c ? m : c;
}

/* The normalised text, line by line, for the segmentation phases. */
static void
normalised_copy(const text *t, text *nt)
{
    ist_text_opts o;
    ist_normalizer *nz;
    size_t cap = 0, lcap = t->n + 2;

    ist_text_opts_init(&o);
    if (ist_normalizer_new(&o, &nz, NULL) != IST_OK)
        die("normaliser");
    memset(nt, 0, sizeof *nt);
    nt->line = malloc(lcap * sizeof *nt->line);
    for (size_t i = 0; i < t->n; i++) {
        const char *out;
        size_t n, len = t->line[i + 1] - t->line[i] - 1;
        if (ist_normalize(nz, t->buf + t->line[i], len, &out, &n, NULL) != IST_OK)
            die("normalisation failed");
        nt->line[nt->n++] = nt->len;
        append(nt, &cap, out, n);
        append(nt, &cap, "\n", 1);
    }
    nt->line[nt->n] = nt->len;
    ist_normalizer_free(nz);
}

static double
time_build(const char *const *paths, size_t n)
{
    ist_corpus_opts o;
    ist_corpus *c;
    ist_error err;

    ist_corpus_opts_init(&o);
    double t0 = now();
    if (ist_corpus_build(paths, n, &o, &c, &err) != IST_OK)
        die(err.msg);
    double dt = now() - t0;
    ist_corpus_free(c);
    return dt;
}

int
main(int argc, char **argv)
{
    text t, nt;
    ist_text_opts o;
    ist_normalizer *nz;
    double d[3];
    char tmp[] = "/tmp/bench-text-XXXXXX";
    const char *const *paths = (const char *const *)argv + 1;
    size_t n_paths = (size_t)argc - 1;

    load(&t, argc, argv);
    if (argc < 2) {
        int fd = mkstemp(tmp);
        FILE *f = fd >= 0 ? fdopen(fd, "wb") : NULL;
        if (!f || fwrite(t.buf, 1, t.len, f) != t.len || fclose(f) != 0)
            die("cannot write the synthetic text");
        static const char *one[1];
        one[0] = tmp;
        paths = one;
        n_paths = 1;
    }
    printf("bench-text: %.1f MB, %zu lines (%s)\n", t.len / 1e6, t.n,
           argc < 2 ? "synthetic text" : argv[1]);

    ist_text_opts_init(&o);
    if (ist_normalizer_new(&o, &nz, NULL) != IST_OK)
        die("normaliser");
    for (int r = 0; r < 3; r++)
        d[r] = run_normalize(&t, nz);
    double fast = mbps(t.len, best3(d[0], d[1], d[2]));
    ist_normalizer_free(nz);
    for (int r = 0; r < 3; r++)
        d[r] = run_utf8proc_whole(&t);
    double whole = mbps(t.len, best3(d[0], d[1], d[2]));
    printf("  %-44s %8.1f MB/s\n", "normalise: library (ASCII fast path)", fast);
    printf("  %-44s %8.1f MB/s   library/utf8proc %.2fx\n", "normalise: utf8proc_map on whole lines",
           whole, whole > 0 ? fast / whole : 0.0);

    normalised_copy(&t, &nt);
    count_ctx cc = {NULL, NULL, 0};
    for (int r = 0; r < 3; r++)
        d[r] = run_segment(&nt, just_count, &cc);
    printf("  %-44s %8.1f MB/s   (%zu words a pass)\n", "segment (UAX #29)",
           mbps(nt.len, best3(d[0], d[1], d[2])), cc.words / 3);
    for (int r = 0; r < 3; r++) {
        ist_wordtab tab;
        if (ist_wordtab_init(&tab, NULL) != IST_OK)
            die("counting table");
        cc.tab = &tab;
        d[r] = run_segment(&nt, into_tab, &cc);
        ist_wordtab_free(&tab);
    }
    double tab_rate = mbps(nt.len, best3(d[0], d[1], d[2]));
    for (int r = 0; r < 3; r++) {
        if (ist_vocab_new(&cc.voc, NULL) != IST_OK)
            die("vocabulary");
        d[r] = run_segment(&nt, into_vocab, &cc);
        ist_vocab_free(cc.voc);
    }
    double voc_rate = mbps(nt.len, best3(d[0], d[1], d[2]));
    printf("  %-44s %8.1f MB/s\n", "segment + count: corpus counting table", tab_rate);
    printf("  %-44s %8.1f MB/s   table/vocab %.2fx\n", "segment + count: ist_vocab_add", voc_rate,
           voc_rate > 0 ? tab_rate / voc_rate : 0.0);

    for (int r = 0; r < 3; r++)
        d[r] = time_build(paths, n_paths);
    printf("  %-44s %8.1f MB/s\n", "ist_corpus_build, end to end", mbps(t.len,
                                                                        best3(d[0], d[1], d[2])));
    if (argc < 2)
        remove(tmp);
    free(t.buf);
    free(t.line);
    free(nt.buf);
    free(nt.line);
    return sink == 0;   /* keeps the work from being optimised away */
}
