/* cmd_propose.c - isthmus propose: candidate pairs for the word list, for review. */
#include <getopt.h>
#include <stdlib.h>
#include <string.h>

#include "eval_cli.h"

#define CMD "propose"
#define MAX_LISTS 64

static void
help(FILE *out)
{
    fputs("Usage: isthmus propose [OPTIONS] SRC TGT --map=MAP -o CANDIDATES\n"
          "Propose new word pairs for review: for frequent source words in no list yet, the\n"
          "best target words under the map (CSLS), ranked for a reviewer, as an editable TSV.\n"
          "\n"
          "Arguments:\n"
          "  SRC, TGT                the vector files the map was fitted on\n"
          "\n"
          "Options:\n"
          "      --map=MAP           map file written by 'isthmus align' (required)\n"
          "  -o, --output=FILE       candidate list to write, '-' for standard output (required)\n"
          "      --exclude=FILE      a pair file whose source words are not proposed (seed,\n"
          "                          test or reviewed lists); repeatable; the map's own seed\n"
          "                          pairs are always excluded\n"
          "      --top-sources=N     look at the N most frequent source words, 0 = all\n"
          "                          [default: 5000]\n"
          "      --candidates=N      target candidates per source word, 1..100 [default: 3]\n"
          "      --order=ORDER       informative (least certain frequent words first) or\n"
          "                          certain (mutual neighbours, widest margin first)\n"
          "                          [default: informative]\n"
          "      --skip-gold-targets leave out candidates that are already a gold target of a\n"
          "                          listed source word [default: keep them]\n"
          "\n"
          "What a reviewer is spared (the same filters as in 'lookup'):\n"
          "      --with-numbers      also propose number-shaped words (prices, order numbers,\n"
          "                          sizes such as 40cm) and codes, and offer them as\n"
          "                          candidates [default: left out; a code such as tw-4410\n"
          "                          is offered only with its own spelling]\n"
          "      --stop-share=PCT    stop list: words above PCT percent of the counted tokens\n"
          "                          of their file (the, de, en) are neither proposed nor\n"
          "                          offered as candidates; 0 = no stop list [default: 0.5]\n"
          "      --min-score=X       leave out candidates whose CSLS score (-4 to 4) is below X;\n"
          "                          a word left with none is not proposed [default: 0]\n"
          "      --with-variants     also propose likely misspellings: words one edit from a\n"
          "                          word at least 50 times as frequent (ewll, tilwlick)\n"
          "                          [default: left out]\n"
          "      --mixed-order       keep pairs spelt the same on both sides in the review\n"
          "                          order [default: a block of their own at the end, most\n"
          "                          frequent first, to accept in bulk]\n",
          out);
    ev_common_help(out, EV_HELP_SEARCH, "csls");
    fputs("  -h, --help              show this help and exit\n"
          "\n"
          "Write accept, reject or 'use WORD' in the decision column, then merge the file\n"
          "with 'isthmus merge-pairs' ('--accept-same-spelling' accepts the undecided rows\n"
          "of the same-spelling block). The candidates are statistical suggestions; have a\n"
          "speaker of the language review them before they drive anything customer-facing.\n"
          "\n"
          "Example:\n"
          "  isthmus propose en.isv es.isv --map=shop.map \\\n"
          "      --exclude=data-samples/demo-test.pairs -o candidates.tsv\n",
          out);
}

enum { OPT_MAP = 1, OPT_EXCLUDE, OPT_TOP_SOURCES, OPT_CANDIDATES, OPT_ORDER, OPT_SKIP_GOLD,
       OPT_MIXED };

typedef struct args {
    const char *map, *out, *src, *tgt;
    const char *lists[MAX_LISTS];
    size_t nlists;
    ist_propose_opts po;
} args;

static int
parse(int argc, char **argv, args *a)
{
    static const struct option opts[] = {
        EV_OPT_MAP_ROW(OPT_MAP),
        CLI_OPT_OUTPUT,
        {"exclude", required_argument, NULL, OPT_EXCLUDE},
        {"top-sources", required_argument, NULL, OPT_TOP_SOURCES},
        {"candidates", required_argument, NULL, OPT_CANDIDATES},
        {"order", required_argument, NULL, OPT_ORDER},
        {"skip-gold-targets", no_argument, NULL, OPT_SKIP_GOLD},
        {"mixed-order", no_argument, NULL, OPT_MIXED},
        EV_OPTS_FILTER,
        EV_OPTS_SEARCH,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    static const char *const orders[] = {"informative", "certain", NULL};
    ev_common c;
    int o, ord;

    ev_common_init(&c, EV_CSLS);
    ist_propose_opts_init(&a->po);
    while ((o = getopt_long(argc, argv, "ho:" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (o) {
        case OPT_MAP: a->map = optarg; break;
        case 'o': a->out = optarg; break;
        case OPT_EXCLUDE:
            if (a->nlists == MAX_LISTS)
                return cli_usage_error(CMD, "--exclude: at most %d files", MAX_LISTS);
            a->lists[a->nlists++] = optarg;
            break;
        case OPT_TOP_SOURCES:
            if (!cli_parse_size(CMD, "--top-sources", optarg, 0, (size_t)1 << 40,
                                &a->po.top_sources))
                return CLI_EXIT_USAGE;
            break;
        case OPT_CANDIDATES:
            if (!cli_parse_size(CMD, "--candidates", optarg, 1, IST_PROPOSE_MAX_CANDIDATES,
                                &a->po.candidates))
                return CLI_EXIT_USAGE;
            break;
        case OPT_ORDER:
            if (!cli_parse_choice(CMD, "--order", optarg, orders, &ord))
                return CLI_EXIT_USAGE;
            a->po.order = ord == 1 ? IST_PROPOSE_CERTAIN : IST_PROPOSE_INFORMATIVE;
            break;
        case OPT_SKIP_GOLD: a->po.skip_gold_targets = true; break;
        case OPT_MIXED: a->po.same_block = false; break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (o >= 1000) {
                if (!ev_common_option(CMD, &c, o, optarg))
                    return CLI_EXIT_USAGE;
                break;
            }
            if (!cli_other_option(CMD, o, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind != 2)
        return cli_usage_error(CMD, "expected SRC and TGT vector files");
    if (!a->map)
        return cli_usage_error(CMD, "expected --map=MAP");
    if (!a->out)
        return cli_usage_error(CMD, "expected -o CANDIDATES, the candidate list to write");
    a->src = argv[optind];
    a->tgt = argv[optind + 1];
    a->po.search = c.search;
    a->po.filter = c.filter;
    return CLI_GO_ON;
}

static int
propose(const args *a, const ist_map *map, const ist_store *s, const ist_store *t,
        ist_pairs **lists)
{
    uint64_t sums[MAX_LISTS];
    ist_proposals *p = NULL;
    ist_error err;

    for (size_t i = 0; i < a->nlists; i++)
        if (ist_pairs_checksum(lists[i], &sums[i], &err) != IST_OK)
            return cli_report(CMD, &err);
    cli_progress_start("propose: ranking candidates for the source words");
    ist_status ran = ist_propose_run(map, s, t, (const ist_pairs *const *)lists, a->nlists,
                                     &a->po, &p, &err);
    cli_progress_stop();
    if (ran != IST_OK)
        return cli_report(CMD, &err);
    ist_propose_inputs in = {a->src, a->tgt, a->map, ist_map_seed_checksum(map),
                             a->lists, sums, a->nlists};
    if (ist_proposals_write(p, s, t, &in, a->out, &err) != IST_OK) {
        ist_proposals_free(p);
        return cli_report(CMD, &err);
    }
    ist_propose_stats st = ist_proposals_stats(p);
    cli_info("%zu most frequent source words: %zu already listed, %zu proposed, %zu rows\n",
             st.considered, st.listed, st.proposed, st.rows);
    cli_wrote(a->out, "%zu candidate rows for review", st.rows);
    cli_info("left out: %zu number-shaped words and codes, %zu stop-list words, %zu likely "
             "misspellings, %zu words with no candidate scoring %g or more; %zu candidates "
             "passed over as numbers, codes, stop-list words or misspellings\n",
             st.left_numbers, st.left_stop, st.left_variants, st.left_low,
             (double)a->po.filter.min_score, st.filtered_targets);
    if (a->po.same_block)
        cli_info("%zu words spelt the same on both sides are in a block of their own at the "
                 "end\n", st.same_spelling);
    if (a->po.skip_gold_targets)
        cli_info("%zu candidates left out as gold targets of listed words\n", st.skipped_targets);
    ist_proposals_free(p);
    return 0;
}

static int
run(int argc, char **argv)
{
    ist_pairs *lists[MAX_LISTS] = {0};
    ist_store *s = NULL, *t = NULL;
    ist_map *map = NULL;
    ist_error err;
    args a;
    int rc;

    memset(&a, 0, sizeof a);
    if ((rc = parse(argc, argv, &a)) != CLI_GO_ON)
        return rc;
    const char *ins[MAX_LISTS + 3] = {a.src, a.tgt, a.map};
    for (size_t i = 0; i < a.nlists; i++)
        ins[3 + i] = a.lists[i];
    if ((rc = cli_check_files(CMD, ins, 3 + a.nlists, &a.out, 1)) != 0)
        return rc;
    for (size_t i = 0; i < a.nlists; i++)
        if (ist_pairs_read(a.lists[i], &lists[i], &err) != IST_OK) {
            rc = cli_report(CMD, &err);
            goto done;
        }
    if (ist_map_load(a.map, &map, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    if ((rc = ev_open_stores(CMD, a.src, a.tgt, &s, &t)) != 0)
        goto done;
    rc = propose(&a, map, s, t, lists);
done:
    for (size_t i = 0; i < a.nlists; i++)
        ist_pairs_free(lists[i]);
    ist_map_free(map);
    ist_store_free(s);
    ist_store_free(t);
    return rc;
}

const cli_command cmd_propose = {"propose", "propose new word pairs for review, as a TSV", run,
                                 help};
