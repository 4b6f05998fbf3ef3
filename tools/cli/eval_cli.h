/* eval_cli.h - what the commands that read two vector files share (align, score,
 * gate, lookup, propose): retrieval options, opening the files, reading pair lists,
 * evaluating a map and printing its tables. */
#ifndef ISTHMUS_EVAL_CLI_H
#define ISTHMUS_EVAL_CLI_H

#include "cli.h"

/* Options the commands share (long option values 1000 and up). */
enum {
    EV_OPT_RANK_BY = 1000,
    EV_OPT_CSLS_K,
    EV_OPT_MEMORY,
    EV_OPT_THREADS,
    EV_OPT_BANDS,
    EV_OPT_ALLOW_OVERLAP,
    EV_OPT_JSON_OUT,
    EV_OPT_NO_DIAG,
    EV_OPT_DIAG_WORDS,
    EV_OPT_ISO_WORDS,
    EV_OPT_HUB_NUMBERS,
    EV_OPT_WITH_NUMBERS,
    EV_OPT_WITH_VARIANTS,
    EV_OPT_STOP_SHARE,
    EV_OPT_MIN_SCORE,
};

/* The rows of the shared options, one fragment per group, written once: a command's
 * getopt table lists the groups it takes, and ev_common_option() handles them.
 *   EV_OPTS_SEARCH   the neighbour search (align, score, gate, lookup, propose)
 *   EV_OPTS_RANK     the ranking method (align, score, gate, lookup)
 *   EV_OPTS_SCORING  scoring a test list (align, score, gate)
 *   EV_OPTS_DIAG     diagnostics in the JSON result (align, score)
 *   EV_OPTS_FILTER   the review filters of candidate words (lookup, propose) */
/* The map and test-list rows, with the command's own option value. */
#define EV_OPT_MAP_ROW(val) {"map", required_argument, NULL, val}
#define EV_OPT_TEST_ROW(val) {"test", required_argument, NULL, val}
#define EV_OPTS_SEARCH                                                                            \
    {"csls-k", required_argument, NULL, EV_OPT_CSLS_K},                                           \
    {"memory", required_argument, NULL, EV_OPT_MEMORY},                                           \
    {"threads", required_argument, NULL, EV_OPT_THREADS}
#define EV_OPTS_RANK {"rank-by", required_argument, NULL, EV_OPT_RANK_BY}
#define EV_OPTS_SCORING                                                                           \
    {"bands", required_argument, NULL, EV_OPT_BANDS},                                             \
    {"allow-overlap", no_argument, NULL, EV_OPT_ALLOW_OVERLAP},                                   \
    {"json-out", required_argument, NULL, EV_OPT_JSON_OUT}
#define EV_OPTS_DIAG                                                                              \
    {"no-diagnostics", no_argument, NULL, EV_OPT_NO_DIAG},                                        \
    {"diagnostics-words", required_argument, NULL, EV_OPT_DIAG_WORDS},                            \
    {"isometry-words", required_argument, NULL, EV_OPT_ISO_WORDS},                                \
    {"hubs-with-numbers", no_argument, NULL, EV_OPT_HUB_NUMBERS}
#define EV_OPTS_FILTER                                                                            \
    {"with-numbers", no_argument, NULL, EV_OPT_WITH_NUMBERS},                                     \
    {"with-variants", no_argument, NULL, EV_OPT_WITH_VARIANTS},                                   \
    {"stop-share", required_argument, NULL, EV_OPT_STOP_SHARE},                                   \
    {"min-score", required_argument, NULL, EV_OPT_MIN_SCORE}

/* Groups for ev_common_help(). */
enum { EV_HELP_SEARCH = 1, EV_HELP_RANK = 2, EV_HELP_SCORING = 4, EV_HELP_DIAG = 8 };

/* Which retrieval methods to score with. */
typedef enum ev_methods { EV_COSINE = 1, EV_CSLS = 2, EV_BOTH = 3 } ev_methods;

typedef struct ev_common {
    ev_methods methods;
    ist_search_opts search;       /* CSLS k, tile memory and threads: the one copy */
    ist_eval_opts eval;           /* bands (its search group is set from `search`) */
    bool allow_overlap;
    const char *json_out;
    bool diagnostics;             /* compute them for the JSON result [true] */
    ist_diag_opts diag;
    ist_word_filter filter;       /* the review filters (EV_OPTS_FILTER) */
} ev_common;

void ev_common_init(ev_common *c, ev_methods dflt);
/* Handle one of the shared options; false after a usage error was printed. */
bool ev_common_option(const char *cmd, ev_common *c, int opt, const char *arg);
/* Help lines of the shared option groups (EV_HELP_* bits); rank_default names the
 * default of --rank-by. */
void ev_common_help(FILE *out, unsigned groups, const char *rank_default);

/* Open two vector files; on failure prints the error and returns the exit status. */
int ev_open_stores(const char *cmd, const char *src, const char *tgt, ist_store **s,
                   ist_store **t);

/* Read a pair list and resolve it; prints its coverage line. */
int ev_read_pairs(const char *cmd, const char *what, const char *path, const ist_store *s,
                  const ist_store *t, ist_pairs **out, ist_pairs_coverage *cov);
/* When the pair list at path keeps far more pairs with s and t exchanged than the
 * `kept` it keeps now, say "did you swap SRC and TGT?" on stderr. */
void ev_swap_hint(const char *cmd, const char *path, const ist_store *s, const ist_store *t,
                  size_t kept);
void ev_print_coverage(FILE *out, const char *what, const char *path,
                       const ist_pairs_coverage *c);

/* Refuse (exit 1) when test source words are also seed source words, unless
 * allowed; prints the first few. *shared gets the count. Returns 0 to go on. */
int ev_check_overlap(const char *cmd, const ist_pairs *seeds, const ist_pairs *test, bool allow,
                     size_t *shared);

/* Print the precision tables and intervals of a result's runs. */
void ev_print_runs(const ist_result *res);

/* The evaluation options the shared options ask for (diagnostics only with a JSON
 * output, where they are recorded). */
void ev_evaluate_opts(const ev_common *c, ist_evaluate_opts *o);

/* ist_evaluate(), then print the runs and a diagnostics summary line. Returns 0 or the
 * exit status after printing the error. */
int ev_evaluate(const char *cmd, const ist_map *map, const ist_store *s, const ist_store *t,
                const ist_pairs *test, const ist_pairs_coverage *cov, const ist_evaluate_opts *o,
                ist_result **out);

#endif
