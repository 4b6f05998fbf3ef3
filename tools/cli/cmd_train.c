/* cmd_train.c - isthmus train: skip-gram vectors from a prepared corpus or raw text. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

static void
help(FILE *out)
{
    fputs("Usage: isthmus train [OPTIONS] -o OUT INPUT...\n"
          "Train word vectors with skip-gram and negative sampling and write them as a native\n"
          "vector file (with provenance: corpus checksums, every option, the seed).\n"
          "\n"
          "Arguments:\n"
          "  INPUT...                one prepared corpus (from 'isthmus prepare'), or raw UTF-8\n"
          "                          text files, plain or gzip, one sentence or document a line\n"
          "\n"
          "Training options:\n"
          "  -o, --output=OUT        vector file to write (required)\n"
          "      --dimension=N       vector components [default: 100]\n"
          "      --context=N         largest window radius in words; each position draws its\n"
          "                          radius uniformly from 1..N [default: 10]\n"
          "      --noise-samples=N   noise words per positive pair [default: 5]\n"
          "      --passes=N          passes over the corpus; 'auto' = 16M / tokens, kept\n"
          "                          within 5..20 [default: auto]\n"
          "      --rate=X            start learning rate, decays linearly to 1e-4 of it\n"
          "                          [default: 0.025]\n"
          "      --subsample=T       frequent-word threshold t: a word of frequency f is kept\n"
          "                          with probability min(1, sqrt(t/f)); 0 = off [default: 1e-4]\n"
          "      --threads=N         training threads; only 1 gives bit-identical reruns\n"
          "                          [default: the number of processors]\n"
          "      --seed=N            random seed [default: 1]\n"
          "      --kernel=K          fast (shared noise words per window, vector kernels) or\n"
          "                          reference (plain per-pair loop) [default: fast]\n"
          "      --keep-context=FILE also write the output (context) vectors to FILE\n"
          "      --text-copy=FILE    also write the vectors as a text table (gzip if FILE ends\n"
          "                          in .gz)\n"
          "\n"
          "Raw-text options (only when INPUT is raw text; see 'isthmus prepare --help'):\n"
          "      --min-freq=N        keep words seen at least N times [default: 5]\n"
          "      --vocab-limit=N     keep at most the N most frequent words [default: 0 = all]\n"
          "      --max-line-bytes=N  longest line accepted, in bytes [default: 1048576]\n"
          "      --no-nfkc, --no-casefold, --strip-marks, --mask-digits, --numbers=POLICY,\n"
          "      --strict-utf8, --dedup-lines\n"
          "                          as for 'isthmus prepare'\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "Progress (percent, words/s, learning rate, recent loss, time left) is shown on a\n"
          "terminal; a summary line goes to standard error unless -q. Ctrl-C stops the training\n"
          "and leaves no output file. The environment variable ISTHMUS_SIMD=portable forces the\n"
          "portable kernels.\n"
          "\n"
          "Example:\n"
          "  isthmus train --dimension 50 -o tillwick-en.isv data-samples/tillwick-en.txt.gz\n",
          out);
}

typedef struct train_args {
    ist_sgns_opts so;
    ist_corpus_opts co;
    bool passes_auto, text_opts_given;
    const char *out, *ctx_out, *text_out;
} train_args;

static int
on_progress(void *ctx, const ist_sgns_progress *p)
{
    (void)ctx;
    int eta = (int)(p->eta_sec + 0.5);
    cli_progress_update("train: %5.1f%%  %6.0fk words/s  rate %.5f  loss %.3f  left %d:%02d",
                        100.0 * p->fraction, p->words_per_sec / 1000.0, p->lr, p->loss, eta / 60,
                        eta % 60);
    return 0;
}

static void
on_build_progress(void *ctx, uint64_t done, uint64_t total)
{
    (void)ctx;
    cli_progress_update("reading text: %5.1f%% of %.1f MB",
                        total ? 100.0 * (double)done / (double)total : 100.0, total / 1e6);
}

/* Parse argv into a; returns -1 to go on, else the exit status. */
static int
parse(int argc, char **argv, train_args *a)
{
    static const struct option opts[] = {
        {"output", required_argument, NULL, 'o'},
        {"dimension", required_argument, NULL, 'd'},
        {"context", required_argument, NULL, 'c'},
        {"noise-samples", required_argument, NULL, 'n'},
        {"passes", required_argument, NULL, 'p'},
        {"rate", required_argument, NULL, 'r'},
        {"subsample", required_argument, NULL, 's'},
        {"threads", required_argument, NULL, 't'},
        {"seed", required_argument, NULL, 'S'},
        {"kernel", required_argument, NULL, 'k'},
        {"keep-context", required_argument, NULL, 'K'},
        {"text-copy", required_argument, NULL, 'T'},
        {"min-freq", required_argument, NULL, 'm'},
        {"vocab-limit", required_argument, NULL, 'V'},
        {"max-line-bytes", required_argument, NULL, 'L'},
        {"no-nfkc", no_argument, NULL, 'N'},
        {"no-casefold", no_argument, NULL, 'C'},
        {"strip-marks", no_argument, NULL, 'M'},
        {"mask-digits", no_argument, NULL, 'D'},
        {"numbers", required_argument, NULL, 'B'},
        {"strict-utf8", no_argument, NULL, 'U'},
        {"dedup-lines", no_argument, NULL, 'u'},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    static const char *const kernels[] = {"fast", "reference", NULL};
    const char *cmd = "train";
    int c, k;
    long ncpu = sysconf(_SC_NPROCESSORS_ONLN);

    ist_sgns_opts_init(&a->so);
    ist_corpus_opts_init(&a->co);
    a->so.threads = ncpu > 0 ? (size_t)(ncpu < 64 ? ncpu : 64) : 1;
    a->passes_auto = true;
    while ((c = getopt_long(argc, argv, "ho:", opts, NULL)) != -1) {
        bool ok = true;
        switch (c) {
        case 'o': a->out = optarg; break;
        case 'd': ok = cli_parse_size(cmd, "--dimension", optarg, 1, 10000, &a->so.dim); break;
        case 'c': ok = cli_parse_size(cmd, "--context", optarg, 1, 1000, &a->so.window); break;
        case 'n':
            ok = cli_parse_size(cmd, "--noise-samples", optarg, 1, 1000, &a->so.negatives);
            break;
        case 'p':
            a->passes_auto = strcmp(optarg, "auto") == 0;
            if (!a->passes_auto)
                ok = cli_parse_size(cmd, "--passes", optarg, 1, 100000, &a->so.epochs);
            break;
        case 'r': ok = cli_parse_double(cmd, "--rate", optarg, 1e-9, 10, &a->so.lr0); break;
        case 's': ok = cli_parse_double(cmd, "--subsample", optarg, 0, 1, &a->so.subsample); break;
        case 't': ok = cli_parse_size(cmd, "--threads", optarg, 1, 256, &a->so.threads); break;
        case 'S': ok = cli_parse_u64(cmd, "--seed", optarg, 0, UINT64_MAX, &a->so.seed); break;
        case 'k':
            ok = cli_parse_choice(cmd, "--kernel", optarg, kernels, &k);
            a->so.kernel = k == 1 ? IST_SGNS_REFERENCE : IST_SGNS_FAST;
            break;
        case 'K': a->ctx_out = optarg; a->so.keep_context = true; break;
        case 'T': a->text_out = optarg; break;
        case 'm':
            ok = cli_parse_u64(cmd, "--min-freq", optarg, 1, UINT64_MAX, &a->co.min_count);
            a->text_opts_given = true;
            break;
        case 'V':
            ok = cli_parse_size(cmd, "--vocab-limit", optarg, 0, UINT32_MAX - 2, &a->co.max_vocab);
            a->text_opts_given = true;
            break;
        case 'L':
            ok = cli_parse_size(cmd, "--max-line-bytes", optarg, 1, (size_t)1 << 30,
                                &a->co.max_line);
            a->text_opts_given = true;
            break;
        case 'N': a->co.text.nfkc = false; a->text_opts_given = true; break;
        case 'C': a->co.text.casefold = false; a->text_opts_given = true; break;
        case 'M': a->co.text.strip_marks = true; a->text_opts_given = true; break;
        case 'D': a->co.text.mask_digits = true; a->text_opts_given = true; break;
        case 'B':
            ok = ist_numbers_policy_parse(optarg, &a->co.text.numbers);
            if (!ok)
                cli_usage_error(cmd, "--numbers: expected keep, mask or drop, found '%s'",
                                optarg);
            a->text_opts_given = true;
            break;
        case 'U': a->co.text.strict_utf8 = true; a->text_opts_given = true; break;
        case 'u': a->co.dedup_lines = true; a->text_opts_given = true; break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default: return cli_usage_error(cmd, "unknown option '%s'", argv[optind - 1]);
        }
        if (!ok)
            return CLI_EXIT_USAGE;
    }
    if (!a->out)
        return cli_usage_error(cmd, "expected --output OUT");
    if (strcmp(a->out, "-") == 0)
        return cli_usage_error(cmd, "the native vector file is binary; give a file name to "
                                    "--output, not '-' (use --text-copy for a text table)");
    if (optind >= argc)
        return cli_usage_error(cmd, "expected a prepared corpus or at least one text file");
    for (int i = optind; i < argc; i++)
        if (strcmp(argv[i], a->out) == 0 || (a->ctx_out && strcmp(argv[i], a->ctx_out) == 0) ||
            (a->text_out && strcmp(argv[i], a->text_out) == 0))
            return cli_usage_error(cmd, "input '%s' is also an output", argv[i]);
    if ((a->ctx_out && strcmp(a->ctx_out, a->out) == 0) ||
        (a->text_out && strcmp(a->text_out, a->out) == 0))
        return cli_usage_error(cmd, "two outputs share the name '%s'", a->out);
    return -1;
}

/* A prepared corpus starts with these bytes (written by ist_corpus_save). */
static bool
is_prepared(const char *path)
{
    static const char magic[8] = "ISTPREP\x1a";
    char head[8];
    FILE *f = fopen(path, "rb");
    bool yes = f && fread(head, 1, 8, f) == 8 && memcmp(head, magic, 8) == 0;
    if (f)
        fclose(f);
    return yes;
}

/* Copy the trained rows into a store named by the vocabulary and save it. */
static ist_status
save_vectors(const ist_matrix *m, const ist_vocab *v, const char *prov, const char *path,
             const ist_store_save_opts *sv, ist_error *err)
{
    ist_cmatview mv = ist_matrix_cview(m);
    ist_store *s;
    ist_status rc = ist_store_new(mv.rows, mv.cols, &s, err);
    if (rc != IST_OK)
        return rc;
    for (size_t r = 0; r < mv.rows && rc == IST_OK; r++) {
        memcpy(ist_store_row_mut(s, r), mv.data + r * mv.stride, mv.cols * sizeof(float));
        rc = ist_store_set_word(s, r, ist_vocab_word(v, (uint32_t)r),
                                ist_vocab_count(v, (uint32_t)r), err);
    }
    if (rc == IST_OK)
        rc = ist_store_set_provenance(s, prov, err);
    if (rc == IST_OK)
        rc = ist_store_save(s, path, sv, err);
    ist_store_free(s);
    return rc;
}

static ist_status
load_corpus(int n, char **paths, train_args *a, ist_corpus **out, ist_error *err)
{
    if (n == 1 && is_prepared(paths[0]))
        return ist_corpus_open(paths[0], out, err);
    a->co.progress = on_build_progress;
    ist_status rc = ist_corpus_build((const char *const *)paths, (size_t)n, &a->co, out, err);
    cli_progress_done();
    return rc;
}

/* A prepared corpus must come alone and without raw-text options. */
static int
check_inputs(int n, char **paths, const train_args *a)
{
    for (int i = 0; i < n; i++) {
        if (!is_prepared(paths[i]))
            continue;
        if (n > 1)
            return cli_usage_error("train", "'%s' is a prepared corpus: it must be the only "
                                            "input", paths[i]);
        if (a->text_opts_given)
            return cli_usage_error("train", "'%s' is a prepared corpus: its text options were "
                                            "fixed by 'isthmus prepare', raw-text options do "
                                            "not apply", paths[i]);
    }
    return -1;
}

static int
run(int argc, char **argv)
{
    train_args a;
    memset(&a, 0, sizeof a);
    int st = parse(argc, argv, &a);
    if (st >= 0)
        return st;
    if ((st = check_inputs(argc - optind, argv + optind, &a)) >= 0)
        return st;
    /* refuse an output that cannot be written before spending the training time */
    if (!cli_output_dir_ok("train", a.out) ||
        (a.ctx_out && !cli_output_dir_ok("train", a.ctx_out)) ||
        (a.text_out && !cli_output_dir_ok("train", a.text_out)))
        return CLI_EXIT_ERROR;

    ist_corpus *corpus = NULL;
    ist_matrix *in = NULL, *ctx = NULL;
    ist_sgns_result res;
    ist_error err;
    char *text_json = NULL, *prov = NULL;
    double t0 = cli_now();
    ist_status rc = load_corpus(argc - optind, argv + optind, &a, &corpus, &err);
    if (rc != IST_OK)
        return cli_report("train", &err);
    size_t n_ids;
    const uint32_t *ids = ist_corpus_ids(corpus, &n_ids);
    const ist_vocab *v = ist_corpus_vocab(corpus);
    size_t types = ist_vocab_size(v);
    uint64_t tokens = ist_vocab_total(v);
    if (types == 0) {
        fprintf(stderr, "isthmus train: %s%s: no word to train on (a raw-text input keeps words "
                "seen at least %llu times, --min-freq)\n", argv[optind],
                argc - optind > 1 ? " ..." : "", (unsigned long long)a.co.min_count);
        ist_corpus_free(corpus);
        return CLI_EXIT_ERROR;
    }
    uint64_t *counts = calloc(types ? types : 1, sizeof *counts);
    if (!counts) {
        ist_corpus_free(corpus);
        fprintf(stderr, "isthmus train: out of memory\n");
        return CLI_EXIT_ERROR;
    }
    for (size_t i = 0; i < types; i++)
        counts[i] = ist_vocab_count(v, (uint32_t)i);
    if (a.passes_auto) {
        double p = tokens ? 16e6 / (double)tokens : 20;
        a.so.epochs = p < 5 ? 5 : p > 20 ? 20 : (size_t)(p + 0.5);
    }
    if (cli_progress_enabled())
        a.so.progress = on_progress;
    cli_info("isthmus train: %llu tokens, %zu words, %zu pass%s, dimension %zu, %zu thread%s, "
             "%s kernel (%s)\n", (unsigned long long)tokens, types, a.so.epochs,
             a.so.epochs == 1 ? "" : "es", a.so.dim, a.so.threads, a.so.threads == 1 ? "" : "s",
             a.so.kernel == IST_SGNS_FAST ? "fast" : "reference", ist_sgns_simd_name());
    rc = ist_sgns_train(ids, n_ids, counts, types, &a.so, &in, a.so.keep_context ? &ctx : NULL,
                        &res, &err);
    cli_progress_done();
    if (rc == IST_OK)
        rc = ist_text_opts_to_json(ist_corpus_text_opts(corpus), &text_json, &err);
    if (rc == IST_OK)
        rc = ist_sgns_provenance_json(&a.so, &res, text_json, ist_corpus_sources_json(corpus),
                                      tokens, types, &prov, &err);
    if (rc == IST_OK)
        rc = save_vectors(in, v, prov, a.out, NULL, &err);
    if (rc == IST_OK && a.ctx_out)
        rc = save_vectors(ctx, v, prov, a.ctx_out, NULL, &err);
    if (rc == IST_OK && a.text_out) {
        ist_store_save_opts sv;
        ist_store_save_opts_init(&sv);
        sv.format = IST_STORE_TEXT;
        rc = save_vectors(in, v, prov, a.text_out, &sv, &err);
    }
    ist_matrix_free(in);
    ist_matrix_free(ctx);
    ist_text_free(text_json);
    ist_sgns_free(prov);
    free(counts);
    ist_corpus_free(corpus);
    if (rc != IST_OK) {
        if (rc == IST_ERR_CANCELLED)
            fprintf(stderr, "isthmus train: interrupted after %.1f s\n", cli_now() - t0);
        return cli_report("train", &err);
    }
    cli_info("isthmus train: %llu words seen (%llu trained after subsampling) in %.2f s, "
             "%.0f words/s; %zu x %zu vectors -> %s\n", (unsigned long long)res.words_seen,
             (unsigned long long)res.words_trained, res.seconds, res.words_per_sec, types,
             a.so.dim, a.out);
    return CLI_EXIT_OK;
}

const cli_command cmd_train = {"train", "train skip-gram word vectors", run, help};
