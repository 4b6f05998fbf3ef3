/* cmd_merge_pairs.c - isthmus merge-pairs: reviewed candidate lists into a pair file. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define CMD "merge-pairs"

static void
help(FILE *out)
{
    fputs("Usage: isthmus merge-pairs [OPTIONS] SEEDS REVIEWED... -o OUT\n"
          "Add the accepted rows of reviewed candidate lists to a pair file, checking for\n"
          "duplicates and conflicts.\n"
          "\n"
          "Arguments:\n"
          "  SEEDS                   the pair file to grow; its lines come first in OUT\n"
          "  REVIEWED...             candidate lists from 'isthmus propose' with the decision\n"
          "                          column filled: accept, reject, 'use WORD' (take WORD as\n"
          "                          the target instead) or empty (undecided)\n"
          "\n"
          "Options:\n"
          "  -o, --output=OUT        pair file to write (required; may not be SEEDS)\n"
          "      --one-target        a source word may have only one target: two different\n"
          "                          targets for one word are a conflict [default: several]\n"
          "      --accept-same-spelling\n"
          "                          take the undecided rows of the same-spelling block\n"
          "                          (brands, model codes, sizes) as accepted; a decision\n"
          "                          written in a row still counts [default: undecided]\n"
          "      --skip-conflicts    leave conflicting pairs out and write the rest\n"
          "                          [default: write nothing and exit 1]\n"
          "      --target-vectors=FILE  refuse a 'use WORD' whose WORD is not a word of\n"
          "                          this target vector file [default: unchecked, with a\n"
          "                          warning]\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "A pair already in the list is a duplicate: counted and skipped. A pair accepted in\n"
          "one place and rejected in another (or rejected but in SEEDS) is a conflict; each is\n"
          "reported with both file:line places. Words are compared byte for byte.\n"
          "\n"
          "Example:\n"
          "  isthmus merge-pairs data-samples/demo-seed.pairs reviewed.tsv -o seed-v2.pairs\n",
          out);
}

enum { OPT_ONE_TARGET = 1, OPT_SKIP_CONFLICTS, OPT_TARGET_VECTORS, OPT_ACCEPT_SAME };

static void
print_conflict(const char *msg, void *ctx)
{
    (void)ctx;
    fprintf(stderr, "isthmus %s: %s\n", CMD, msg);
}

static void
print_summary(const ist_merge_summary *s)
{
    printf("rows %zu: accepted %zu, corrected %zu, rejected %zu, undecided %zu\n", s->rows,
           s->accepted, s->corrected, s->rejected, s->undecided);
    if (s->bulk_accepted)
        printf("of the accepted, %zu same-spelling rows accepted in bulk\n", s->bulk_accepted);
    printf("duplicates %zu, conflicts %zu; %zu pair%s added to the %zu of the seed list\n",
           s->duplicates, s->conflicts, s->added, s->added == 1 ? "" : "s", s->seed_pairs);
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        CLI_OPT_OUTPUT,
        {"one-target", no_argument, NULL, OPT_ONE_TARGET},
        {"accept-same-spelling", no_argument, NULL, OPT_ACCEPT_SAME},
        {"skip-conflicts", no_argument, NULL, OPT_SKIP_CONFLICTS},
        {"target-vectors", required_argument, NULL, OPT_TARGET_VECTORS},
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    const char *out = NULL, *tpath = NULL;
    ist_store *tv = NULL;
    ist_merge_opts mo;
    ist_merge_summary sum;
    ist_error err;
    int o;

    ist_merge_opts_init(&mo);
    mo.on_conflict = print_conflict;
    while ((o = getopt_long(argc, argv, "ho:" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (o) {
        case 'o': out = optarg; break;
        case OPT_ONE_TARGET: mo.one_target = true; break;
        case OPT_ACCEPT_SAME: mo.accept_same_spelling = true; break;
        case OPT_SKIP_CONFLICTS: mo.skip_conflicts = true; break;
        case OPT_TARGET_VECTORS: tpath = optarg; break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (!cli_other_option(CMD, o, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind < 2)
        return cli_usage_error(CMD, "expected SEEDS and at least one REVIEWED file");
    if (!out)
        return cli_usage_error(CMD, "expected -o OUT, the pair file to write");
    if (strcmp(out, argv[optind]) == 0)
        return cli_usage_error(CMD, "-o: expected a file other than SEEDS");
    const char *seeds = argv[optind];
    if ((o = cli_check_files(CMD, (const char *const *)argv + optind, (size_t)(argc - optind),
                             &out, 1)) != 0 ||
        (tpath && (o = cli_check_files(CMD, &tpath, 1, &out, 1)) != 0))
        return o;
    if (tpath && ist_store_open(tpath, NULL, &tv, &err) != IST_OK)
        return cli_report(CMD, &err);
    mo.target_vectors = tv;
    const char *const *reviewed = (const char *const *)argv + optind + 1;
    size_t n = (size_t)(argc - optind - 1);
    ist_status mr = ist_propose_merge(seeds, reviewed, n, &mo, out, &sum, &err);
    ist_store_free(tv);
    if (mr != IST_OK) {
        if (err.code != IST_ERR_INVALID || sum.conflicts == 0)
            return cli_report(CMD, &err);
        /* each conflict was printed as it was found */
        fprintf(stderr, "isthmus %s: %zu conflict%s, nothing written; settle %s or pass "
                "--skip-conflicts\n", CMD, sum.conflicts, sum.conflicts == 1 ? "" : "s",
                sum.conflicts == 1 ? "it" : "them");
        return CLI_EXIT_ERROR;
    }
    print_summary(&sum);
    if (sum.unchecked > 0)
        fprintf(stderr, "isthmus %s: warning: %zu 'use WORD' correction%s not checked against "
                "a vocabulary; give --target-vectors=TGT to refuse words the vectors lack\n", CMD,
                sum.unchecked, sum.unchecked == 1 ? " was" : "s were");
    cli_wrote(out, "%zu seed pairs", sum.seed_pairs + sum.added);
    return CLI_EXIT_OK;
}

const cli_command cmd_merge_pairs = {"merge-pairs",
                                     "add accepted candidates to a pair file, with checks", run,
                                     help};
