/* cmd_score.c - isthmus score: precision@k of a map on a test word list. */
#include <getopt.h>
#include <stdlib.h>
#include <string.h>

#include "eval_cli.h"

#define CMD "score"

static void
help(FILE *out)
{
    fputs("Usage: isthmus score [OPTIONS] SRC TGT --map=MAP --test=FILE\n"
          "Measure how well a map translates: precision@1, @5 and @10 of the test list's source\n"
          "words against the whole target vocabulary, with coverage, by frequency band.\n"
          "\n"
          "Arguments:\n"
          "  SRC, TGT                the vector files the map was fitted on\n"
          "\n"
          "Options:\n"
          "      --map=MAP           map file written by 'isthmus align' (required)\n"
          "      --test=FILE         test pairs: 'source target' per line (required)\n"
          "      --stage=WHICH       refined (the map after refinement; a map without\n"
          "                          refinement rounds has only its seed stage), seed (the map\n"
          "                          fitted on the seed pairs alone) or both [default: refined]\n",
          out);
    ev_common_help(out, EV_HELP_SEARCH | EV_HELP_RANK | EV_HELP_SCORING | EV_HELP_DIAG, "both");
    fputs("  -h, --help              show this help and exit\n"
          "\n"
          "With -v, every test pair that is not scored is listed on standard error with its\n"
          "line and the word the vectors lack.\n"
          "Test source words that are also seed source words (recorded in the map) make the\n"
          "figures meaningless; score refuses such a list unless --allow-overlap is given.\n"
          "\n"
          "Example:\n"
          "  isthmus score en.isv es.isv --map=shop.map --test=data-samples/demo-test.pairs \\\n"
          "      --json-out=result.json\n",
          out);
}

enum { OPT_MAP = 1, OPT_TEST, OPT_STAGE };

/* With -v: every test pair that counts for nothing, with its line and which word the
 * vectors lack, on standard error. */
static void
list_uncovered(const ist_pairs *test, const ist_store *s, const ist_store *t, const char *spath,
               const char *tpath)
{
    size_t n = ist_pairs_count(test), shown = 0;

    for (size_t i = 0; i < n; i++) {
        ptrdiff_t rs, rt;
        ist_error err;
        const char *a = ist_pairs_source(test, i), *b = ist_pairs_target(test, i);
        if (ist_pairs_source_row(test, i) >= 0)
            continue;
        if (ist_pairs_find_word(s, a, &rs, &err) != IST_OK ||
            ist_pairs_find_word(t, b, &rt, &err) != IST_OK)
            continue;
        if (rs >= 0 && rt >= 0)
            continue;   /* a duplicate: the first copy counts */
        if (shown++ == 0)
            fprintf(stderr, "test pairs not covered (not scored):\n");
        fprintf(stderr, "  %s:%llu  %s  %s  (%s%s%s%s%s)\n", ist_pairs_path(test),
                (unsigned long long)ist_pairs_line(test, i), a, b,
                rs < 0 ? "source word not in " : "", rs < 0 ? spath : "",
                rs < 0 && rt < 0 ? ", " : "", rt < 0 ? "target word not in " : "",
                rt < 0 ? tpath : "");
    }
    if (shown == 0)
        fprintf(stderr, "test pairs not covered: none\n");
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        EV_OPT_MAP_ROW(OPT_MAP),
        EV_OPT_TEST_ROW(OPT_TEST),
        {"stage", required_argument, NULL, OPT_STAGE},
        EV_OPTS_SEARCH,
        EV_OPTS_RANK,
        EV_OPTS_SCORING,
        EV_OPTS_DIAG,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    static const char *const stages[] = {"refined", "seed", "both", NULL};
    const char *mpath = NULL, *tpath = NULL;
    ist_store *s = NULL, *t = NULL;
    ist_map *map = NULL;
    ist_pairs *test = NULL;
    ist_pairs_coverage cov;
    ist_result *res = NULL;
    ist_evaluate_opts eo;
    size_t shared = 0;
    ist_error err;
    ev_common c;
    int rc, stage = 0;

    ev_common_init(&c, EV_BOTH);
    while ((rc = getopt_long(argc, argv, "h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (rc) {
        case OPT_MAP: mpath = optarg; break;
        case OPT_TEST: tpath = optarg; break;
        case OPT_STAGE:
            if (strcmp(optarg, "final") == 0)
                return cli_usage_error(CMD, "--stage: 'final' is now called 'refined'");
            if (!cli_parse_choice(CMD, "--stage", optarg, stages, &stage))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (rc >= 1000) {
                if (!ev_common_option(CMD, &c, rc, optarg))
                    return CLI_EXIT_USAGE;
                break;
            }
            if (!cli_other_option(CMD, rc, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind != 2)
        return cli_usage_error(CMD, "expected SRC and TGT vector files, got %d argument%s",
                               argc - optind, argc - optind == 1 ? "" : "s");
    if (!mpath || !tpath)
        return cli_usage_error(CMD, "expected --map=MAP and --test=FILE");
    const char *ins[] = {argv[optind], argv[optind + 1], mpath, tpath};
    if ((rc = cli_check_files(CMD, ins, 4, &c.json_out, 1)) != 0)
        return rc;
    if (ist_map_load(mpath, &map, &err) != IST_OK)
        return cli_report(CMD, &err);
    if ((rc = ev_open_stores(CMD, argv[optind], argv[optind + 1], &s, &t)) != 0)
        goto done;
    if (ist_map_check(map, s, t, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    if ((rc = ev_read_pairs(CMD, "test", tpath, s, t, &test, &cov)) != 0)
        goto done;
    if (cli_g.verbosity > 0)
        list_uncovered(test, s, t, argv[optind], argv[optind + 1]);
    if ((rc = ev_check_overlap(CMD, ist_map_seeds(map), test, c.allow_overlap, &shared)) != 0)
        goto done;
    ev_evaluate_opts(&c, &eo);
    eo.command = CMD;
    eo.stages = stage == 0 ? IST_STAGE_REFINED : stage == 1 ? IST_STAGE_SEED
                                                             : IST_STAGE_SEED | IST_STAGE_REFINED;
    eo.source_path = argv[optind];
    eo.target_path = argv[optind + 1];
    eo.map_path = mpath;
    if ((rc = ev_evaluate(CMD, map, s, t, test, &cov, &eo, &res)) != 0)
        goto done;
    if (c.json_out && ist_result_write(res, c.json_out, &err) != IST_OK)
        rc = cli_report(CMD, &err);
    else if (c.json_out)
        cli_wrote(c.json_out, "result JSON");
done:
    ist_result_free(res);
    ist_map_free(map);
    ist_pairs_free(test);
    ist_store_free(s);
    ist_store_free(t);
    return rc;
}

const cli_command cmd_score = {"score", "measure precision@k of a map on a test word list", run,
                               help};
