/* cmd_prepare.c - isthmus prepare: raw text to a prepared corpus file. */
#include <errno.h>
#include <getopt.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

static void
help(FILE *out)
{
    fputs("Usage: isthmus prepare [OPTIONS] -o OUT FILE...\n"
          "Normalise and segment raw text into words, count them, prune the vocabulary and save\n"
          "the vocabulary with the token-id stream, so several training runs can share it.\n"
          "\n"
          "Arguments:\n"
          "  FILE...                 UTF-8 text, one sentence or document per line; plain or gzip\n"
          "                          (recognised by its first bytes, not by its name)\n"
          "\n"
          "Options:\n"
          "  -o, --output=OUT        prepared corpus to write (required)\n"
          "      --min-freq=N        keep words seen at least N times [default: 5]\n"
          "      --vocab-limit=N     keep at most the N most frequent words; 0 = no limit\n"
          "                          [default: 0]\n"
          "      --max-line-bytes=N  longest line accepted, in bytes [default: 1048576]\n"
          "      --no-nfkc           do not apply Unicode NFKC normalisation [default: applied]\n"
          "      --no-casefold       keep letter case [default: full case folding]\n"
          "      --strip-marks       remove combining marks (accents): cafe = caf\xc3\xa9\n"
          "                          [default: kept]\n"
          "      --mask-digits       write every decimal digit as 0, in every word (codes too)\n"
          "                          [default: kept]\n"
          "      --numbers=POLICY    number-shaped words (prices, order numbers, sizes such\n"
          "                          as 40cm): keep, mask (digits as 0: 6.39 -> 0.00) or drop\n"
          "                          (left out of the vocabulary); codes such as tw-4410\n"
          "                          are always kept [default: keep]\n"
          "      --strict-utf8       stop at invalid UTF-8 with file, line and byte offset\n"
          "                          [default: replace it with U+FFFD and count it]\n"
          "      --dedup-lines       drop exact repeats of a normalised line [default: kept]\n"
          CLI_HELP_THREADS
          "                          (they normalise and segment; the output is the same)\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "A summary goes to standard output: lines, duplicates removed, tokens, word types\n"
          "before and after pruning, invalid UTF-8 replaced in each file and the reading rate.\n"
          "The output is written to a temporary file and renamed into place when complete.\n"
          "Memory holds the vocabulary, not the text or its tokens: while the text is read the\n"
          "token stream goes to an unnamed temporary file in OUT's directory (4 bytes a token,\n"
          "on top of the output's own size), then is renumbered into the output.\n"
          "\n"
          "Example:\n"
          "  isthmus prepare --min-freq 3 --dedup-lines -o tillwick-es.prep \\\n"
          "      data-samples/tillwick-es.txt.gz\n",
          out);
}

static void
on_progress(void *ctx, uint64_t done, uint64_t total)
{
    double t0 = *(const double *)ctx, dt = cli_now() - t0;

    /* bytes of the files as stored (gzip compressed or not), as in the summary's headline */
    cli_progress_update("prepare: %5.1f%% of %.1f MB read, %.1f MB/s",
                        total ? 100.0 * (double)done / (double)total : 100.0, total / 1e6,
                        dt > 0 ? done / 1e6 / dt : 0.0);
}

static double
percent(uint64_t part, uint64_t whole)
{
    return whole ? 100.0 * (double)part / (double)whole : 0.0;
}

static void
summary(const ist_corpus *c, const char *out, double secs)
{
    ist_corpus_stats st;
    uint64_t disk_bytes = 0;
    size_t n = ist_corpus_n_sources(c), types = ist_vocab_size(ist_corpus_vocab(c));

    ist_corpus_stats_get(c, &st);
    for (size_t i = 0; i < n; i++) {
        ist_corpus_source s;
        if (ist_corpus_source_get(c, i, &s, NULL) == IST_OK)
            disk_bytes += s.bytes;
    }
    /* one size throughout: the files as stored, which the progress line counts too; the text
     * each gzip file unpacks to is on its own line below */
    printf("prepared %zu file%s in %.2f s (%.1f MB read, %.1f MB/s)\n", n,
           n == 1 ? "" : "s", secs, disk_bytes / 1e6, secs > 0 ? disk_bytes / 1e6 / secs : 0.0);
    printf("  lines               %llu read, %llu duplicates removed\n",
           (unsigned long long)st.lines, (unsigned long long)st.lines_dropped_dup);
    printf("  tokens              %llu segmented, %llu kept (%.1f%%)\n",
           (unsigned long long)st.tokens_in, (unsigned long long)st.tokens_kept,
           percent(st.tokens_kept, st.tokens_in));
    printf("  word types          %llu before pruning, %zu kept\n",
           (unsigned long long)st.types_before_prune, types);
    printf("  invalid UTF-8       %llu sequences replaced\n",
           (unsigned long long)st.replaced_utf8);
    cli_wrote(out, "prepared corpus, %zu words, %llu tokens", types,
              (unsigned long long)st.tokens_kept);
    for (size_t i = 0; i < n; i++) {
        ist_corpus_source s;
        if (ist_corpus_source_get(c, i, &s, NULL) != IST_OK)
            continue;
        if (s.gzip)
            printf("    %-40s %llu lines, %llu replaced (gzip, %.1f MB of text)\n", s.path,
                   (unsigned long long)s.lines, (unsigned long long)s.replaced_utf8,
                   s.text_bytes / 1e6);
        else
            printf("    %-40s %llu lines, %llu replaced\n", s.path, (unsigned long long)s.lines,
                   (unsigned long long)s.replaced_utf8);
    }
}

/* Options into *o and *out; returns -1 to go on, else the exit status. */
static int
parse_args(int argc, char **argv, ist_corpus_opts *o, const char **out)
{
    static const struct option opts[] = {
        CLI_OPT_OUTPUT,
        CLI_OPTS_CORPUS,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    int c;
    unsigned threads = 0;

    while ((c = getopt_long(argc, argv, "ho:" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (c) {
        case 'o': *out = optarg; break;
        case 't':
            if (!cli_parse_threads("prepare", optarg, &threads))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default: {
            bool ok;
            if (!cli_corpus_option("prepare", c, optarg, o, &ok))
                ok = cli_other_option("prepare", c, opts, argv);
            if (!ok)
                return CLI_EXIT_USAGE;
            break;
        }
        }
    }
    o->threads = threads ? threads : cli_processors();
    if (!*out)
        return cli_usage_error("prepare", "expected --output OUT");
    if (strcmp(*out, "-") == 0)
        return cli_usage_error("prepare", "a prepared corpus is binary; give a file name to "
                                          "--output, not '-'");
    if (optind >= argc)
        return cli_usage_error("prepare", "expected at least one input FILE");
    for (int i = optind; i < argc; i++)
        if (strcmp(argv[i], *out) == 0)
            return cli_usage_error("prepare", "input '%s' is also the output", *out);
    return -1;
}

/* Where the token stream waits while the text is read: beside the output (the same disk
 * the output goes to), or $TMPDIR / /tmp for standard output. */
static const char *
spill_dir_for(const char *out, char *dir, size_t cap)
{
    const char *slash = strrchr(out, '/'), *t = getenv("TMPDIR");

    if (strcmp(out, "-") == 0)
        return t && *t ? t : "/tmp";
    if (!slash)
        return ".";
    if (slash == out)
        return "/";
    if ((size_t)(slash - out) >= cap)
        return NULL;
    memcpy(dir, out, (size_t)(slash - out));
    dir[slash - out] = '\0';
    return dir;
}

static int
run(int argc, char **argv)
{
    char spill[4096];
    ist_corpus_opts o;
    const char *out = NULL;
    ist_corpus *corpus;
    ist_error err;
    int status;

    ist_corpus_opts_init(&o);
    status = parse_args(argc, argv, &o, &out);
    if (status >= 0)
        return status;
    status = cli_check_files("prepare", (const char *const *)argv + optind,
                             (size_t)(argc - optind), &out, 1);
    if (status != 0)
        return status;
    double t0 = cli_now();
    o.progress = on_progress;
    o.progress_ctx = &t0;
    o.spill_dir = spill_dir_for(out, spill, sizeof spill);
    ist_status rc = ist_corpus_build((const char *const *)argv + optind, (size_t)(argc - optind),
                                     &o, &corpus, &err);
    cli_progress_done();
    if (rc != IST_OK)
        return cli_report("prepare", &err);
    double secs = cli_now() - t0;
    if (ist_vocab_size(ist_corpus_vocab(corpus)) == 0) {
        fprintf(stderr, "isthmus prepare: %s%s: no word seen at least %llu times (--min-freq); "
                "nothing written\n", argv[optind], argc - optind > 1 ? " ..." : "",
                (unsigned long long)o.min_count);
        ist_corpus_free(corpus);
        return CLI_EXIT_ERROR;
    }
    if (ist_corpus_save(corpus, out, &err) != IST_OK) {
        ist_corpus_free(corpus);
        return cli_report("prepare", &err);
    }
    summary(corpus, out, secs);     /* the result of the command: printed also with -q */
    ist_corpus_free(corpus);
    return CLI_EXIT_OK;
}

const cli_command cmd_prepare = {"prepare", "turn raw text into a prepared corpus", run, help};
