/* cmd_train.c - isthmus train: skip-gram, PPMI-SVD or combined vectors from a prepared corpus
 * or raw text. */
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
          "Train word vectors and write them as a native vector file (with provenance: corpus\n"
          "checksums, every option, the seed). Three methods: skip-gram with negative sampling,\n"
          "PPMI of windowed co-occurrence counts reduced by a truncated SVD, or both side by\n"
          "side (each block unit-normalised and centred, see 'isthmus stack').\n"
          "\n"
          "Arguments:\n"
          "  INPUT...                one prepared corpus (from 'isthmus prepare'), or raw UTF-8\n"
          "                          text files, plain or gzip, one sentence or document a line\n"
          "\n"
          "Training options:\n"
          "  -o, --output=OUT        vector file to write (required): .isv native, .txt or\n"
          "                          .gz a text table\n"
          "      --method=M          skip-gram, ppmi, or skip-gram+ppmi (the two blocks side by\n"
          "                          side) [default: skip-gram+ppmi, measured best on both\n"
          "                          real-data checks: docs/defaults.md; under mpirun\n"
          "                          skip-gram, the one method trained across ranks]\n"
          "      --block-weights=A,B weights of the skip-gram and PPMI blocks in skip-gram+ppmi\n"
          "                          [default: 1,1]\n"
          "\n"
          "Skip-gram options:\n"
          "      --dimension=N       vector components [default: 100]\n"
          "      --context=N         largest window radius in words; each position draws its\n"
          "                          radius uniformly from 1..N [default: 10]\n"
          "      --noise-samples=N   noise words per positive pair [default: 5]\n"
          "      --passes=N          passes over the corpus; 'auto' = 16M / tokens, at most\n"
          "                          20, at least 20 below 4M tokens and 80M / tokens above\n"
          "                          (never under 5) [default: auto]\n"
          "      --rate=X            start learning rate, decays linearly to --rate-floor\n"
          "                          times itself [default: 0.025]\n"
          "      --rate-floor=F      the learning rate never falls below F times the start\n"
          "                          rate [default: 1e-4]\n"
          "      --subsample=T       frequent-word threshold t: a word of frequency f is kept\n"
          "                          with probability min(1, sqrt(t/f)); 0 = off [default: 1e-4]\n"
          CLI_HELP_THREADS
          "      --thread-vectors=HOW  copies (each thread trains a copy of its own; the\n"
          "                          copies are combined --exchanges times a pass, in thread\n"
          "                          order, so reruns with the same seed and thread count\n"
          "                          are bit-identical), shared (all threads update one copy\n"
          "                          without locks; reruns differ) or auto (copies while they\n"
          "                          fit in 1 GiB, else shared); used from 2 threads on\n"
          "                          [default: auto]\n"
          "      --seed=N            random seed [default: 1]\n"
          "      --exchanges=N       times per pass the threads' copies are combined, and\n"
          "                          under mpirun the ranks' vectors, 1..1000\n"
          "                          (docs/cluster.md) [default: 4]\n"
          "      --merge=HOW         how they are combined: changes (add up every copy's\n"
          "                          changes since the last exchange) or mean (average the\n"
          "                          vectors) [default: changes]\n"
          "      --kernel=K          fast (shared noise words per window, vector kernels) or\n"
          "                          reference (plain per-pair loop) [default: fast]\n"
          "      --keep-context=FILE also write the output (context) vectors to FILE\n"
          "                          (skip-gram only)\n"
          "\n",
          out);
    fputs("PPMI options:\n"
          "      --ppmi-dimension=N  components kept by the truncated SVD; past the vocabulary\n"
          "                          size they are zero, the width stays N [default: 300]\n"
          "      --ppmi-context=N    words counted on each side [default: 10]\n"
          "      --ppmi-weighting=W  linear (weight (N-d+1)/N at distance d) or flat\n"
          "                          [default: linear]\n"
          "      --smoothing=A       context counts raised to A in the PMI [default: 0.75]\n"
          "      --ppmi-shift=S      log S subtracted from every PMI, S >= 1 [default: 1]\n"
          "      --singular-power=P  rows are U S^P [default: 0.5]\n"
          "      --power-iterations=Q  power iterations of the randomized SVD [default: 4]\n"
          "      --oversample=N      extra columns of its random test matrix [default: 20]\n"
          "      --pair-buffer=MIB   memory for gathering co-occurrence pairs [default: 256]\n"
          "      (--threads and --seed apply to both methods; PPMI reruns are bit-identical for\n"
          "      any thread count)\n"
          "      --text-copy=FILE    also write the vectors as a text table (gzip if FILE ends\n"
          "                          in .gz)\n"
          "\n"
          "Raw-text options (only when INPUT is raw text; see 'isthmus prepare --help'):\n"
          "      --min-freq=N        keep words seen at least N times [default: 5]\n"
          "      --vocab-limit=N     keep at most the N most frequent words [default: 0 = all]\n"
          "      --max-line-bytes=N  longest line accepted, in bytes [default: 1048576]\n"
          "      --no-nfkc, --no-casefold, --strip-marks, --mask-digits, --strict-utf8,\n"
          "      --dedup-lines       as for 'isthmus prepare'\n"
          "      --numbers=POLICY    number-shaped words: keep, mask or drop, as for 'isthmus\n"
          "                          prepare' [default: keep]\n"
          "      (--threads also sets the threads that prepare raw text; the prepared text is\n"
          "      the same for any count)\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "Progress is shown on a terminal: the pass and the number of passes, the share done,\n"
          "the recent loss, the step size (learning rate) now, tokens a second and the time to\n"
          "go (for PPMI the stage, the share done and the time to go). A summary line goes to\n"
          "standard error unless -q. Ctrl-C stops the training and leaves no output file.\n"
          "The environment variable ISTHMUS_SIMD=portable forces the portable kernels.\n"
          "\n"
          "Example:\n"
          "  isthmus train --dimension 50 -o tillwick-en.isv data-samples/tillwick-en.txt.gz\n"
          "  isthmus train --method=skip-gram+ppmi --ppmi-dimension 100 -o tillwick-en.isv \\\n"
          "      data-samples/tillwick-en.txt.gz\n",
          out);
}

enum { METHOD_SGNS = 0, METHOD_PPMI = 1, METHOD_BOTH = 2 };

typedef struct train_args {
    ist_sgns_opts so;
    ist_ppmi_opts po;
    int method;
    bool method_given;
    double weights[2];
    ist_corpus_opts co;
    bool passes_auto, text_opts_given;
    const char *out, *ctx_out, *text_out;
} train_args;

/* "h:mm:ss" or "m:ss" of a count of seconds. */
static void
clock_text(double sec, char *buf, size_t cap)
{
    long t = sec > 0 && sec < 1e7 ? (long)(sec + 0.5) : 0;
    if (t >= 3600)
        snprintf(buf, cap, "%ld:%02ld:%02ld", t / 3600, t / 60 % 60, t % 60);
    else
        snprintf(buf, cap, "%ld:%02ld", t / 60, t % 60);
}

/* The training line: which pass of how many, the share of all passes done, the recent
 * loss, the step size (learning rate) now, whole tokens a second and the time to go. */
static int
on_progress(void *ctx, const ist_sgns_progress *p)
{
    size_t passes = *(const size_t *)ctx, pass = (size_t)(p->fraction * (double)passes) + 1;
    char togo[24];
    if (pass > passes)
        pass = passes;
    clock_text(p->eta_sec, togo, sizeof togo);
    cli_progress_update("train: pass %zu/%zu, %.1f%% done, loss %.3f, step %.5f, %.0f tokens/s, "
                        "%s to go", pass, passes, 100.0 * p->fraction, p->loss, p->lr,
                        p->words_per_sec, togo);
    return 0;
}

static int
on_ppmi_progress(void *ctx, const ist_ppmi_progress *p)
{
    (void)ctx;
    static const char *const stages[] = {"counting pairs", "weighting", "factoring"};
    char togo[24];
    clock_text(p->eta_sec, togo, sizeof togo);
    cli_progress_update("train (PPMI): %s, %.1f%% done, %s to go", stages[p->stage],
                        100.0 * p->fraction, togo);
    return 0;
}

static void
on_build_progress(void *ctx, uint64_t done, uint64_t total)
{
    (void)ctx;
    cli_progress_update("reading text: %5.1f%% of %.1f MB",
                        total ? 100.0 * (double)done / (double)total : 100.0, total / 1e6);
}

/* Parse argv into a; CLI_GO_ON or the exit status. */
static int
parse(int argc, char **argv, train_args *a)
{
    static const struct option opts[] = {
        CLI_OPT_OUTPUT,
        {"dimension", required_argument, NULL, 'd'},
        {"context", required_argument, NULL, 'c'},
        {"noise-samples", required_argument, NULL, 'n'},
        {"passes", required_argument, NULL, 'p'},
        {"rate", required_argument, NULL, 'r'},
        {"subsample", required_argument, NULL, 's'},
        CLI_OPT_SEED_ROW,
        {"exchanges", required_argument, NULL, 'X'},
        {"thread-vectors", required_argument, NULL, 1012},
        {"merge", required_argument, NULL, 'G'},
        {"kernel", required_argument, NULL, 'k'},
        {"keep-context", required_argument, NULL, 'K'},
        {"text-copy", required_argument, NULL, 'T'},
        CLI_OPTS_CORPUS,
        {"rate-floor", required_argument, NULL, 1011},
        {"method", required_argument, NULL, 1000},
        CLI_OPT_BLOCK_WEIGHTS_ROW,
        {"ppmi-dimension", required_argument, NULL, 1002},
        {"ppmi-context", required_argument, NULL, 1003},
        {"ppmi-weighting", required_argument, NULL, 1004},
        {"smoothing", required_argument, NULL, 1005},
        {"ppmi-shift", required_argument, NULL, 1006},
        {"singular-power", required_argument, NULL, 1007},
        {"power-iterations", required_argument, NULL, 1008},
        {"oversample", required_argument, NULL, 1009},
        {"pair-buffer", required_argument, NULL, 1010},
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    static const char *const kernels[] = {"fast", "reference", NULL};
    static const char *const merges[] = {"changes", "mean", NULL};
    static const char *const sharings[] = {"auto", "copies", "shared", NULL};
    static const char *const methods[] = {"skip-gram", "ppmi", "skip-gram+ppmi", NULL};
    static const char *const weightings[] = {"linear", "flat", NULL};
    const char *cmd = "train";
    int c, k;
    unsigned threads = 0;

    ist_sgns_opts_init(&a->so);
    a->so.simd = getenv("ISTHMUS_SIMD");   /* the kernels' instruction set, for checks */
    ist_corpus_opts_init(&a->co);
    ist_ppmi_opts_init(&a->po);
    a->weights[0] = a->weights[1] = 1.0;
    a->method = METHOD_BOTH;   /* measured best: docs/defaults.md */
    a->passes_auto = true;
    while ((c = getopt_long(argc, argv, "ho:" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
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
        case 't':
            ok = cli_parse_threads(cmd, optarg, &threads);
            break;
        case CLI_OPT_SEED:
            ok = cli_parse_u64(cmd, "--seed", optarg, 0, UINT64_MAX, &a->so.seed);
            break;
        case 'X': ok = cli_parse_size(cmd, "--exchanges", optarg, 1, 1000, &a->so.exchanges); break;
        case 1012:
            ok = cli_parse_choice(cmd, "--thread-vectors", optarg, sharings, &k);
            a->so.parallel = k == 1   ? IST_SGNS_PARALLEL_COPIES
                             : k == 2 ? IST_SGNS_PARALLEL_SHARED
                                      : IST_SGNS_PARALLEL_AUTO;
            break;
        case 'G':
            ok = cli_parse_choice(cmd, "--merge", optarg, merges, &k);
            a->so.merge = k == 1 ? IST_SGNS_MERGE_MEAN : IST_SGNS_MERGE_CHANGES;
            break;
        case 'k':
            ok = cli_parse_choice(cmd, "--kernel", optarg, kernels, &k);
            a->so.kernel = k == 1 ? IST_SGNS_REFERENCE : IST_SGNS_FAST;
            break;
        case 'K': a->ctx_out = optarg; a->so.keep_context = true; break;
        case 'T': a->text_out = optarg; break;
        case 1011:
            ok = cli_parse_double(cmd, "--rate-floor", optarg, 1e-9, 1, &a->so.lr_floor);
            break;
        case 1000:
            ok = cli_parse_choice(cmd, "--method", optarg, methods, &a->method);
            a->method_given = true;
            break;
        case CLI_OPT_BLOCK_WEIGHTS:
            ok = cli_parse_weights(cmd, optarg, a->weights, 2, "expected two positive numbers "
                                   "up to 1000 separated by a comma (skip-gram,PPMI)");
            break;
        case 1002:
            ok = cli_parse_size(cmd, "--ppmi-dimension", optarg, 1, 10000, &a->po.dim);
            break;
        case 1003:
            ok = cli_parse_size(cmd, "--ppmi-context", optarg, 1, 1000, &a->po.window);
            break;
        case 1004:
            ok = cli_parse_choice(cmd, "--ppmi-weighting", optarg, weightings, &k);
            a->po.weighting = k == 1 ? IST_PPMI_FLAT : IST_PPMI_LINEAR;
            break;
        case 1005:
            ok = cli_parse_double(cmd, "--smoothing", optarg, 0.01, 1, &a->po.alpha);
            break;
        case 1006: ok = cli_parse_double(cmd, "--ppmi-shift", optarg, 1, 1e6, &a->po.shift); break;
        case 1007:
            ok = cli_parse_double(cmd, "--singular-power", optarg, 0, 1, &a->po.power);
            break;
        case 1008:
            ok = cli_parse_size(cmd, "--power-iterations", optarg, 0, 100, &a->po.power_iters);
            break;
        case 1009:
            ok = cli_parse_size(cmd, "--oversample", optarg, 0, 1000, &a->po.oversample);
            break;
        case 1010:
            ok = cli_parse_size(cmd, "--pair-buffer", optarg, 1, 1048576, &a->po.buffer_mb);
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (cli_corpus_option(cmd, c, optarg, &a->co, &ok))
                a->text_opts_given = true;
            else
                ok = cli_other_option(cmd, c, opts, argv);
            break;
        }
        if (!ok)
            return CLI_EXIT_USAGE;
    }
    a->so.threads = threads ? threads : cli_processors();
    a->co.threads = a->so.threads;   /* raw text is prepared on as many threads */
    if (!a->out)
        return cli_usage_error(cmd, "expected --output OUT");
    /* the PPMI trainer does not run across ranks: under mpirun the default is skip-gram */
    if (ist_cluster_size() > 1 && a->method != METHOD_SGNS) {
        if (a->method_given)
            return cli_usage_error(cmd, "under mpirun only --method=skip-gram is trained across "
                                        "ranks");
        a->method = METHOD_SGNS;
        if (ist_cluster_rank() == 0)   /* a warning, also with -q: the vectors differ */
            fprintf(stderr, "isthmus train: warning: under mpirun the vectors are skip-gram "
                            "alone, not the default skip-gram+ppmi of one process (the PPMI "
                            "block is not trained across ranks; docs/cluster.md)\n");
    }
    if (a->ctx_out && a->method != METHOD_SGNS)
        return cli_usage_error(cmd, "--keep-context needs --method=skip-gram (PPMI and combined "
                                    "vectors have no context vectors)");
    if (strcmp(a->out, "-") == 0)
        return cli_usage_error(cmd, "the native vector file is binary; give a file name to "
                                    "--output, not '-' (use --text-copy for a text table)");
    ist_store_format fmt;
    if (!cli_vector_format(cmd, "-o", a->out, NULL, &fmt) ||
        (a->ctx_out && !cli_vector_format(cmd, "--keep-context", a->ctx_out, NULL, &fmt)))
        return CLI_EXIT_USAGE;
    if (optind >= argc)
        return cli_usage_error(cmd, "expected a prepared corpus or at least one text file");
    for (int i = optind; i < argc; i++)
        if (strcmp(argv[i], a->out) == 0 || (a->ctx_out && strcmp(argv[i], a->ctx_out) == 0) ||
            (a->text_out && strcmp(argv[i], a->text_out) == 0))
            return cli_usage_error(cmd, "input '%s' is also an output", argv[i]);
    if ((a->ctx_out && strcmp(a->ctx_out, a->out) == 0) ||
        (a->text_out && strcmp(a->text_out, a->out) == 0))
        return cli_usage_error(cmd, "two outputs share the name '%s'", a->out);
    return CLI_GO_ON;
}

/* Is path a prepared corpus (told by its signature)? */
static bool
is_prepared(const char *path)
{
    ist_file_kind k;
    ist_error err;
    return ist_file_sniff(path, &k, NULL, &err) == IST_OK && k == IST_FILE_PREPARED;
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

/* Train the skip-gram block; *m and *prov are new on success. */
static ist_status
train_sgns(train_args *a, const ist_corpus *corpus, const uint64_t *counts, ist_matrix **m,
           ist_matrix **ctx, char **prov, ist_sgns_result *res, ist_error *err)
{
    size_t n_ids;
    const uint32_t *ids = ist_corpus_ids(corpus, &n_ids);
    const ist_vocab *v = ist_corpus_vocab(corpus);
    size_t types = ist_vocab_size(v);
    char *text_json = NULL;
    if (cli_progress_enabled()) {
        a->so.progress = on_progress;
        a->so.progress_ctx = &a->so.epochs;
    }
    cli_info("isthmus train: %llu tokens, %zu words, %zu pass%s, dimension %zu, %zu thread%s, "
             "%s kernel (%s)\n", (unsigned long long)ist_vocab_total(v), types, a->so.epochs,
             a->so.epochs == 1 ? "" : "es", a->so.dim, a->so.threads,
             a->so.threads == 1 ? "" : "s",
             a->so.kernel == IST_SGNS_FAST ? "fast" : "reference", ist_sgns_simd_name(a->so.simd));
    ist_status rc = ist_sgns_train(ids, n_ids, counts, types, &a->so, m,
                                   a->so.keep_context ? ctx : NULL, res, err);
    cli_progress_done();
    if (rc == IST_OK)
        rc = ist_text_opts_to_json(ist_corpus_text_opts(corpus), &text_json, err);
    if (rc == IST_OK)
        rc = ist_sgns_provenance_json(&a->so, res, text_json, ist_corpus_sources_json(corpus),
                                      ist_vocab_total(v), types, prov, err);
    ist_text_free(text_json);
    return rc;
}

/* Train the PPMI block; *m and *prov are new on success. */
static ist_status
train_ppmi(train_args *a, const ist_corpus *corpus, ist_matrix **m, char **prov,
           ist_error *err)
{
    size_t n_ids;
    const uint32_t *ids = ist_corpus_ids(corpus, &n_ids);
    const ist_vocab *v = ist_corpus_vocab(corpus);
    size_t types = ist_vocab_size(v);
    char *text_json = NULL;
    ist_ppmi_result res;
    a->po.threads = a->so.threads;
    a->po.seed = a->so.seed;
    /* the width stays --ppmi-dimension whatever the vocabulary, so that the vectors of two
     * small corpora can be aligned: the components past the vocabulary size are zero */
    if (a->po.dim > types)
        cli_info("isthmus train: the vocabulary has %zu words, fewer than the PPMI dimension "
                 "%zu: components %zu to %zu are zero, the width stays %zu\n", types, a->po.dim,
                 types + 1, a->po.dim, a->po.dim);
    if (cli_progress_enabled())
        a->po.progress = on_ppmi_progress;
    cli_info("isthmus train: PPMI, %llu tokens, %zu words, context %zu (%s), dimension %zu, "
             "%zu thread%s\n", (unsigned long long)ist_vocab_total(v), types, a->po.window,
             a->po.weighting == IST_PPMI_FLAT ? "flat" : "linear", a->po.dim, a->po.threads,
             a->po.threads == 1 ? "" : "s");
    ist_status rc = ist_ppmi_train(ids, n_ids, types, &a->po, m, NULL, &res, err);
    cli_progress_done();
    if (rc == IST_OK)
        rc = ist_text_opts_to_json(ist_corpus_text_opts(corpus), &text_json, err);
    if (rc == IST_OK)
        rc = ist_ppmi_provenance_json(&a->po, &res, text_json, ist_corpus_sources_json(corpus),
                                      ist_vocab_total(v), types, prov, err);
    ist_text_free(text_json);
    if (rc == IST_OK)
        cli_info("isthmus train: %llu co-occurring pairs (%llu with positive PMI) counted in "
                 "%.2f s, factored in %.2f s\n", (unsigned long long)res.nonzeros,
                 (unsigned long long)res.positive, res.count_seconds,
                 res.seconds - res.count_seconds);
    return rc;
}

static int
run(int argc, char **argv)
{
    train_args a;
    memset(&a, 0, sizeof a);
    int st = parse(argc, argv, &a);
    if (st != CLI_GO_ON)
        return st;
    if ((st = check_inputs(argc - optind, argv + optind, &a)) >= 0)
        return st;
    /* refuse an output that cannot be written before spending the training time */
    const char *outs[] = {a.out, a.ctx_out, a.text_out};
    if ((st = cli_check_files("train", (const char *const *)argv + optind,
                              (size_t)(argc - optind), outs, 3)) != 0)
        return st;

    ist_corpus *corpus = NULL;
    ist_matrix *sg = NULL, *ctx = NULL, *pm = NULL, *both = NULL;
    const ist_matrix *result = NULL;
    ist_sgns_result res;
    ist_error err;
    char *sg_prov = NULL, *pm_prov = NULL, *both_prov = NULL;
    const char *prov = NULL;
    double t0 = cli_now();
    ist_status rc = load_corpus(argc - optind, argv + optind, &a, &corpus, &err);
    if (rc != IST_OK)
        return cli_report("train", &err);
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
    if (a.passes_auto)
        a.so.epochs = ist_sgns_auto_passes(tokens);
    memset(&res, 0, sizeof res);
    if (a.method != METHOD_PPMI)
        rc = train_sgns(&a, corpus, counts, &sg, &ctx, &sg_prov, &res, &err);
    if (rc == IST_OK && a.method != METHOD_SGNS)
        rc = train_ppmi(&a, corpus, &pm, &pm_prov, &err);
    if (rc == IST_OK && a.method == METHOD_BOTH) {
        ist_cmatview blocks[2] = {ist_matrix_cview(sg), ist_matrix_cview(pm)};
        const char *provs[2] = {sg_prov, pm_prov};
        rc = ist_combine_concat(blocks, NULL, a.weights, 2, &both, &err);
        if (rc == IST_OK)
            rc = ist_combine_provenance_json("train", provs, NULL, a.weights, 2, &both_prov,
                                             &err);
        ist_matrix_free(sg);
        ist_matrix_free(pm);
        sg = pm = NULL;
    }
    result = a.method == METHOD_SGNS ? sg : a.method == METHOD_PPMI ? pm : both;
    prov = a.method == METHOD_SGNS ? sg_prov : a.method == METHOD_PPMI ? pm_prov : both_prov;
    if (rc == IST_OK)
        rc = save_vectors(result, v, prov, a.out, NULL, &err);
    if (rc == IST_OK && a.ctx_out)
        rc = save_vectors(ctx, v, prov, a.ctx_out, NULL, &err);
    if (rc == IST_OK && a.text_out) {
        ist_store_save_opts sv;
        ist_store_save_opts_init(&sv);
        sv.format = IST_STORE_TEXT;
        rc = save_vectors(result, v, prov, a.text_out, &sv, &err);
    }
    size_t dim = 0;
    if (rc == IST_OK)
        dim = ist_matrix_cview(result).cols;
    ist_matrix_free(sg);
    ist_matrix_free(ctx);
    ist_matrix_free(pm);
    ist_matrix_free(both);
    ist_sgns_free(sg_prov);
    ist_ppmi_free(pm_prov);
    ist_combine_free(both_prov);
    free(counts);
    ist_corpus_free(corpus);
    if (rc != IST_OK) {
        if (rc == IST_ERR_CANCELLED)
            fprintf(stderr, "isthmus train: interrupted after %.1f s\n", cli_now() - t0);
        return cli_report("train", &err);
    }
    const char *kind = a.method == METHOD_SGNS   ? "skip-gram"
                       : a.method == METHOD_PPMI ? "PPMI"
                                                 : "combined skip-gram + PPMI";
    if (a.method != METHOD_PPMI)
        cli_info("isthmus train: %s%llu tokens seen (%llu trained after subsampling) in %.2f s, "
                 "%.0f tokens/s\n", a.method == METHOD_BOTH ? "skip-gram block: " : "",
                 (unsigned long long)res.words_seen, (unsigned long long)res.words_trained,
                 res.seconds, res.words_per_sec);
    if (a.method != METHOD_SGNS)
        cli_info("isthmus train: %zu x %zu %s vectors in %.2f s\n", types, dim, kind,
                 cli_now() - t0);
    cli_wrote(a.out, "%zu x %zu %s vectors, native", types, dim, kind);
    if (a.ctx_out)
        cli_wrote(a.ctx_out, "%zu context vectors, native", types);
    if (a.text_out)
        cli_wrote(a.text_out, "%zu x %zu %s vectors, text table", types, dim, kind);
    if (res.thread_copies)
        cli_info("isthmus train: %zu threads trained copies of their own, combined %llu times "
                 "(%.2f s combining)\n", a.so.threads, (unsigned long long)res.exchange_count,
                 res.exchange_seconds);
    if (res.ranks > 1)
        cli_info("isthmus train: %u ranks, %llu exchanges of %.1f MB per rank, %.2f s "
                 "exchanging (%.1f ms each), %.2f s waiting for other ranks\n", res.ranks,
                 (unsigned long long)res.exchange_count, (double)res.exchange_bytes / 1e6,
                 res.exchange_seconds,
                 res.exchange_count ? 1e3 * res.exchange_seconds / (double)res.exchange_count
                                    : 0.0,
                 res.wait_seconds);
    return CLI_EXIT_OK;
}

const cli_command cmd_train = {"train", "train word vectors (skip-gram, PPMI-SVD or both)", run,
                               help};
