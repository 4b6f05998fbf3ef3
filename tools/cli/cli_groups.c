/* cli_groups.c - option groups that commands outside the search and scoring ones share
 * (eval_cli.c has those): preparing a corpus (prepare, train) and block weights (train,
 * stack). Each row is in cli.h once; its value is read here once. */
#include <math.h>
#include <stdlib.h>

#include "cli.h"

bool
cli_corpus_option(const char *cmd, int c, const char *arg, ist_corpus_opts *o, bool *ok)
{
    *ok = true;
    switch (c) {
    case 'm': *ok = cli_parse_u64(cmd, "--min-freq", arg, 1, UINT64_MAX, &o->min_count); break;
    case 'V':
        *ok = cli_parse_size(cmd, "--vocab-limit", arg, 0, UINT32_MAX - 2, &o->max_vocab);
        break;
    case 'L':
        *ok = cli_parse_size(cmd, "--max-line-bytes", arg, 1, (size_t)1 << 30, &o->max_line);
        break;
    case 'N': o->text.nfkc = false; break;
    case 'C': o->text.casefold = false; break;
    case 'D': o->text.mask_digits = true; break;
    case CLI_OPT_STRIP_MARKS: o->text.strip_marks = true; break;
    case CLI_OPT_NUMBERS:
        if (!ist_numbers_policy_parse(arg, &o->text.numbers)) {
            cli_usage_error(cmd, "--numbers: expected keep, mask or drop, found '%s'", arg);
            *ok = false;
        }
        break;
    case CLI_OPT_STRICT_UTF8: o->text.strict_utf8 = true; break;
    case CLI_OPT_DEDUP_LINES: o->dedup_lines = true; break;
    default: return false;
    }
    return true;
}

bool
cli_parse_weights(const char *cmd, const char *s, double *w, size_t n, const char *expected)
{
    const char *p = s;
    for (size_t i = 0; i < n; i++) {
        char *end;
        w[i] = strtod(p, &end);
        if (end == p || !(isfinite(w[i]) && w[i] > 0.0 && w[i] <= 1e3) ||
            (i + 1 < n ? *end != ',' : *end != '\0')) {
            cli_usage_error(cmd, "--block-weights: %s, found '%s'", expected, s);
            return false;
        }
        p = end + 1;
    }
    return true;
}
