/* cli.h - what every subcommand shares: usage errors, numbers, progress, signals.
 * Tools parse options, call the library and print; no numeric or parsing logic
 * of the trade lives here. */
#ifndef ISTHMUS_CLI_H
#define ISTHMUS_CLI_H

#include <getopt.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include <isthmus/isthmus.h>

enum {
    CLI_EXIT_OK = 0,
    CLI_EXIT_ERROR = 1,    /* bad input, I/O, numeric failure */
    CLI_EXIT_USAGE = 2,
    CLI_EXIT_GATE = 3      /* a check or gate rule failed */
};

/* Every command's parse() returns CLI_GO_ON when the command should run, or the exit
 * status to return at once (CLI_EXIT_OK after --help, CLI_EXIT_USAGE after a usage
 * error). */
#define CLI_GO_ON (-1)

typedef enum cli_progress_mode { CLI_PROGRESS_AUTO, CLI_PROGRESS_ALWAYS, CLI_PROGRESS_NEVER } cli_progress_mode;

/* Global settings, given before the subcommand name or among its options. */
typedef struct cli_globals {
    int verbosity;                 /* -q: -1, default 0, -v: 1.. */
    cli_progress_mode progress;
    void (*help)(FILE *out);       /* the running command's help, read for hints */
} cli_globals;

extern cli_globals cli_g;

typedef struct cli_command {
    const char *name;
    const char *summary;
    int (*run)(int argc, char **argv);     /* argv[0] is the command name */
    void (*help)(FILE *out);               /* full help text */
} cli_command;

/* The global options (-q, -v, --progress) are taken after the command name too: a
 * command's getopt table lists CLI_OPTS_GLOBAL among its rows and CLI_SHORT_GLOBAL among
 * its short options, and hands every value it does not handle itself to
 * cli_other_option(). */
#define CLI_OPT_PROGRESS 900
#define CLI_SHORT_GLOBAL "qv"
#define CLI_OPTS_GLOBAL                                                                           \
    {"quiet", no_argument, NULL, 'q'},                                                            \
    {"verbose", no_argument, NULL, 'v'},                                                          \
    {"progress", required_argument, NULL, CLI_OPT_PROGRESS}

/* Rows that several getopt tables share, each written once here. */
#define CLI_OPT_HELP {"help", no_argument, NULL, 'h'}
#define CLI_OPT_OUTPUT {"output", required_argument, NULL, 'o'}
/* Preparing a corpus from raw text (prepare, train); cli_corpus_option() handles every row
 * but --threads (each command keeps its thread count). */
enum { CLI_OPT_STRIP_MARKS = 910, CLI_OPT_NUMBERS, CLI_OPT_STRICT_UTF8, CLI_OPT_DEDUP_LINES,
       CLI_OPT_SEED, CLI_OPT_BLOCK_WEIGHTS };
#define CLI_OPTS_CORPUS                                                                           \
    {"min-freq", required_argument, NULL, 'm'},                                                   \
    {"vocab-limit", required_argument, NULL, 'V'},                                                \
    {"max-line-bytes", required_argument, NULL, 'L'},                                             \
    {"no-nfkc", no_argument, NULL, 'N'},                                                          \
    {"no-casefold", no_argument, NULL, 'C'},                                                      \
    {"mask-digits", no_argument, NULL, 'D'},                                                      \
    {"strip-marks", no_argument, NULL, CLI_OPT_STRIP_MARKS},                                      \
    {"numbers", required_argument, NULL, CLI_OPT_NUMBERS},                                        \
    {"strict-utf8", no_argument, NULL, CLI_OPT_STRICT_UTF8},                                      \
    {"dedup-lines", no_argument, NULL, CLI_OPT_DEDUP_LINES},                                      \
    {"threads", required_argument, NULL, 't'}
/* A random generator's seed (train: the training run; gate: the bootstrap), parsed by
 * cli_parse_u64(cmd, "--seed", ...), any 64-bit value. */
#define CLI_OPT_SEED_ROW {"seed", required_argument, NULL, CLI_OPT_SEED}
/* Weights of the blocks of combined vectors (train: skip-gram and PPMI; stack: one per
 * input), read by cli_parse_weights(). */
#define CLI_OPT_BLOCK_WEIGHTS_ROW {"block-weights", required_argument, NULL, CLI_OPT_BLOCK_WEIGHTS}

/* When c is one of the corpus rows other than --threads, apply arg to *o, set *ok (false
 * after a usage error was printed) and return true; else return false. */
bool cli_corpus_option(const char *cmd, int c, const char *arg, ist_corpus_opts *o, bool *ok);

/* "W1,W2,...": exactly n positive weights up to 1000 into w. False after the usage error
 * "--block-weights: EXPECTED, found 'S'" was printed (expected: what the command takes). */
bool cli_parse_weights(const char *cmd, const char *s, double *w, size_t n,
                       const char *expected);

/* Apply a global option (c is 'q', 'v' or CLI_OPT_PROGRESS); false after a usage error. */
bool cli_global_option(const char *cmd, int c, const char *arg);

/* After getopt_long() returned c, which the command does not handle: apply a global
 * option and return true, or print what was wrong with argv[optind - 1] (unknown,
 * ambiguous, missing or unwanted value) with the nearest option names by spelling
 * or else the options whose help mentions the word, and return false (exit 2). */
bool cli_other_option(const char *cmd, int c, const struct option *opts, char **argv);

/* "no command named 'X'" with the nearest command names; names ends with NULL.
 * Returns CLI_EXIT_USAGE. */
int cli_unknown_name(const char *cmd, const char *what, const char *name,
                     const char *const *names);

/* Print "isthmus CMD: message" and the hint to stderr; returns CLI_EXIT_USAGE. */
int cli_usage_error(const char *cmd, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* Print the formatted error as "isthmus CMD: file:line: message"; returns the
 * exit status for it (CLI_EXIT_ERROR, or 130 when cancelled). */
int cli_report(const char *cmd, const ist_error *err);

/* Whole-string numbers with range checks; on failure they print a usage error
 * naming the option and return false. */
bool cli_parse_size(const char *cmd, const char *opt, const char *s, size_t lo, size_t hi,
                    size_t *out);
bool cli_parse_u64(const char *cmd, const char *opt, const char *s, uint64_t lo, uint64_t hi,
                   uint64_t *out);
bool cli_parse_double(const char *cmd, const char *opt, const char *s, double lo, double hi,
                      double *out);
/* --threads=N, one meaning in every command: 0..IST_THREADS_MAX, 0 = one per
 * processor. CLI_HELP_THREADS is its help line. */
bool cli_parse_threads(const char *cmd, const char *s, unsigned *out);
#define CLI_HELP_THREADS "      --threads=N         worker threads, 0 = one per processor [default: 0]\n"
/* The thread count that 0 stands for: the online processors, within 1..IST_THREADS_MAX. */
unsigned cli_processors(void);

/* One of a fixed set of words; *out gets its index. */
bool cli_parse_choice(const char *cmd, const char *opt, const char *s,
                      const char *const *choices, int *out);

/* The vector format an output's name asks for: ".isv" the native file; ".txt", ".gz" or
 * "-" a text table; an existing device, pipe or directory the native file (the writer
 * speaks of it). Any other ending is refused with a usage error naming opt, the endings
 * that exist and, when choose is not NULL, the option that chooses instead (false). */
bool cli_vector_format(const char *cmd, const char *opt, const char *path, const char *choose,
                       ist_store_format *out);

/* Ctrl-C and SIGTERM ask the library to stop (ist_cancel_request); a second
 * Ctrl-C exits at once. */
void cli_install_signals(void);

/* Before long work: can a file be created next to path (in its directory)? If not, print
 * "isthmus CMD: PATH: cannot write in its directory (REASON)" and return false. Devices
 * such as /dev/full are written in place and pass. */
bool cli_output_dir_ok(const char *cmd, const char *path);

/* Before any work, with every file the command reads and writes (NULL entries and "-"
 * skipped): refuse an output that is one of the inputs, compared by device and inode
 * however the paths are spelt ("isthmus CMD: output 'A' is the input 'B' ..."), and two
 * outputs naming one file (exit 2); refuse an output whose directory cannot be written
 * (cli_output_dir_ok, exit 1). Devices such as /dev/null pass. Returns 0 to go on. */
int cli_check_files(const char *cmd, const char *const *inputs, size_t nin,
                    const char *const *outputs, size_t nout);

/* After the command returned rc (main calls it once): check that standard output took
 * every byte, then move the command's finished output files into place as one group
 * (exit 0 or 3) or remove them (any other status), saying exactly what was written
 * when that is not all or nothing. Returns the final exit status. */
int cli_finish(const char *cmd, int rc);

/* Progress on stderr: one "\r" line, at most 4 updates a second, cleared by
 * cli_progress_done(). Shown only when stderr is a terminal (or
 * --progress=always) and not -q. */
bool cli_progress_enabled(void);
void cli_progress_update(const char *fmt, ...) __attribute__((format(printf, 1, 2)));
void cli_progress_done(void);

/* Progress of work the library does in one call (a search, a fit, a bootstrap): the
 * line "LABEL, N s" is drawn at once and redrawn by a helper thread until
 * cli_progress_stop(), which clears it. The same display and the same rule as above
 * (a terminal or --progress=always, not -q); nothing else may print in between. */
void cli_progress_start(const char *label);
/* A new label for the running line (from any thread; e.g. a per-round callback). */
void cli_progress_relabel(const char *fmt, ...) __attribute__((format(printf, 1, 2)));
void cli_progress_stop(void);

/* Every command that writes a file says so in one form, on standard error, unless -q:
 * "isthmus CMD: wrote PATH (WHAT)". cli_wrote() records the line when the file is done;
 * cli_finish() prints the lines once the files are in place (nothing when they were not).
 * PATH "-" (standard output) is not reported. */
void cli_wrote(const char *path, const char *what_fmt, ...) __attribute__((format(printf, 2, 3)));

/* Diagnostics to stderr unless -q. */
void cli_info(const char *fmt, ...) __attribute__((format(printf, 1, 2)));

/* Seconds on a monotonic clock. */
double cli_now(void);

/* Help helpers: the standard option lines every command prints. */

#endif
