/* cmd_gate.c - isthmus gate: check a result against a thresholds file (and a baseline). */
#include <getopt.h>
#include <stdlib.h>
#include <string.h>

#include "eval_cli.h"

#define CMD "gate"

static void
help(FILE *out)
{
    fputs("Usage: isthmus gate [OPTIONS] --thresholds=FILE RESULT.json\n"
          "       isthmus gate [OPTIONS] --thresholds=FILE --map=MAP --test=FILE SRC TGT\n"
          "Check the figures of a result against the rules of a thresholds file, and against a\n"
          "baseline result; print a verdict per rule and overall. Exit 0 when every rule\n"
          "passes, 3 when one fails.\n"
          "\n"
          "Arguments:\n"
          "  RESULT.json             a result written by 'isthmus score' or 'isthmus align'\n"
          "  SRC, TGT                with --map and --test: score these vector files first,\n"
          "                          as 'isthmus score' does, and check that result\n"
          "\n"
          "Options:\n"
          "      --thresholds=FILE   the rules, one a line (docs/formats.md) (required)\n"
          "      --baseline=FILE     an earlier result on the same test list, for the\n"
          "                          'max drop' rules (skipped without one)\n"
          "      --verdict-out=FILE  write the verdict as JSON ('-': standard output)\n"
          "      --junit-out=FILE    write the verdict as a JUnit XML report, one test case\n"
          "                          per rule, for CI servers ('-': standard output)\n"
          "      --resamples=N       bootstrap resamples for intervals [default: 1000]\n"
          "      --seed=N            bootstrap random seed [default: 20261201]\n"
          "      --map=MAP           map file, to score SRC and TGT\n"
          "      --test=FILE         test pairs, to score SRC and TGT\n",
          out);
    ev_common_help(out, EV_HELP_SEARCH | EV_HELP_RANK | EV_HELP_SCORING, "both");
    fputs("  -h, --help              show this help and exit\n"
          "\n"
          "A 'max drop' rule fails only when the whole 95% interval of the change in\n"
          "precision (paired bootstrap over the test words) lies below minus the bound.\n"
          "A baseline scored on another test list is refused (exit 1).\n"
          "\n"
          "Example:\n"
          "  isthmus score en.isv es.isv --map=shop.map --test=data-samples/demo-test.pairs \\\n"
          "      --json-out=new.json\n"
          "  isthmus gate --thresholds=data-samples/demo-gate.thresholds --baseline=old.json \\\n"
          "      --verdict-out=verdict.json new.json\n",
          out);
}

enum { OPT_THRESHOLDS = 1, OPT_BASELINE, OPT_VERDICT, OPT_RESAMPLES, OPT_MAP, OPT_TEST,
       OPT_JUNIT };

typedef struct args {
    const char *thresholds, *baseline, *verdict, *junit, *map, *test;
    ist_gate_opts gate;
    ev_common c;
} args;

/* Score SRC and TGT with the map on the test list, as 'score' does, into *out. */
static int
compute(const args *a, char **argv, ist_result **out)
{
    ist_store *s = NULL, *t = NULL;
    ist_map *map = NULL;
    ist_pairs *test = NULL;
    ist_pairs_coverage cov;
    ist_evaluate_opts eo;
    size_t shared = 0;
    ist_error err;
    int rc;

    if (ist_map_load(a->map, &map, &err) != IST_OK)
        return cli_report(CMD, &err);
    if ((rc = ev_open_stores(CMD, argv[0], argv[1], &s, &t)) != 0)
        goto done;
    if (ist_map_check(map, s, t, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    if ((rc = ev_read_pairs(CMD, "test", a->test, s, t, &test, &cov)) != 0 ||
        (rc = ev_check_overlap(CMD, ist_map_seeds(map), test, a->c.allow_overlap, &shared)) != 0)
        goto done;
    ev_evaluate_opts(&a->c, &eo);
    eo.command = "score";
    eo.name = "(scored now)";
    eo.ci = a->gate.ci;
    eo.source_path = argv[0];
    eo.target_path = argv[1];
    eo.map_path = a->map;
    if ((rc = ev_evaluate(CMD, map, s, t, test, &cov, &eo, out)) != 0)
        goto done;
    if (a->c.json_out && ist_result_write(*out, a->c.json_out, &err) != IST_OK)
        rc = cli_report(CMD, &err);
    else if (a->c.json_out)
        cli_wrote(a->c.json_out, "result JSON");
done:
    ist_map_free(map);
    ist_pairs_free(test);
    ist_store_free(s);
    ist_store_free(t);
    return rc;
}

static int
parse_args(int argc, char **argv, args *a)
{
    static const struct option opts[] = {
        {"thresholds", required_argument, NULL, OPT_THRESHOLDS},
        {"baseline", required_argument, NULL, OPT_BASELINE},
        {"verdict-out", required_argument, NULL, OPT_VERDICT},
        {"junit-out", required_argument, NULL, OPT_JUNIT},
        {"resamples", required_argument, NULL, OPT_RESAMPLES},
        CLI_OPT_SEED_ROW,
        EV_OPT_MAP_ROW(OPT_MAP),
        EV_OPT_TEST_ROW(OPT_TEST),
        EV_OPTS_SEARCH,
        EV_OPTS_RANK,
        EV_OPTS_SCORING,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    int o;

    while ((o = getopt_long(argc, argv, "h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (o) {
        case OPT_THRESHOLDS: a->thresholds = optarg; break;
        case OPT_BASELINE: a->baseline = optarg; break;
        case OPT_VERDICT: a->verdict = optarg; break;
        case OPT_JUNIT: a->junit = optarg; break;
        case OPT_MAP: a->map = optarg; break;
        case OPT_TEST: a->test = optarg; break;
        case OPT_RESAMPLES:
            if (!cli_parse_size(CMD, "--resamples", optarg, 1, 1000000, &a->gate.ci.resamples))
                return CLI_EXIT_USAGE;
            break;
        case CLI_OPT_SEED:
            if (!cli_parse_u64(CMD, "--seed", optarg, 0, UINT64_MAX, &a->gate.ci.seed))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (o >= 1000 && ev_common_option(CMD, &a->c, o, optarg))
                break;
            if (o >= 1000)
                return CLI_EXIT_USAGE;
            if (!cli_other_option(CMD, o, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (!a->thresholds)
        return cli_usage_error(CMD, "expected --thresholds=FILE");
    if (!a->map != !a->test)
        return cli_usage_error(CMD, "expected both --map and --test to score vectors, or neither");
    int want = a->map ? 2 : 1;
    if (argc - optind != want)
        return cli_usage_error(CMD, "expected %s, got %d argument%s",
                               a->map ? "SRC and TGT vector files" : "one RESULT.json",
                               argc - optind, argc - optind == 1 ? "" : "s");
    return CLI_GO_ON;
}

static int
report(const args *a, const ist_verdict *v)
{
    char line[1024];
    ist_error err;

    for (size_t i = 0; i < ist_verdict_count(v); i++) {
        ist_verdict_line(v, i, line, sizeof line);
        printf("%s\n", line);
    }
    bool ok = ist_verdict_passed(v);
    const char *cond = ist_verdict_condition(v, 0);
    size_t n = ist_verdict_count(v);
    printf("gate: %s%s (%zu rule%s: %zu passed, %zu failed, %zu not checked", ok ? "PASS" : "FAIL",
           ok && cond ? " with conditions" : "", n, n == 1 ? "" : "s",
           ist_verdict_tally(v, IST_GATE_PASS),
           ist_verdict_tally(v, IST_GATE_FAIL), ist_verdict_tally(v, IST_GATE_SKIP));
    printf(")\n");
    for (size_t i = 0; (cond = ist_verdict_condition(v, i)) != NULL; i++)
        printf("gate: condition: %s\n", cond);
    fflush(stdout);
    if (a->verdict && ist_verdict_write(v, a->verdict, &err) != IST_OK)
        return cli_report(CMD, &err);
    if (a->junit && ist_verdict_write_junit(v, a->junit, &err) != IST_OK)
        return cli_report(CMD, &err);
    if (a->verdict)
        cli_wrote(a->verdict, "verdict JSON");
    if (a->junit)
        cli_wrote(a->junit, "JUnit report");
    return ok ? CLI_EXIT_OK : CLI_EXIT_GATE;
}

static int
run(int argc, char **argv)
{
    ist_thresholds *rules = NULL;
    ist_result *res = NULL, *base = NULL;
    ist_verdict *v = NULL;
    ist_error err;
    args a;
    int rc;

    memset(&a, 0, sizeof a);
    ist_gate_opts_init(&a.gate);
    ev_common_init(&a.c, EV_BOTH);
    if ((rc = parse_args(argc, argv, &a)) != CLI_GO_ON)
        return rc;
    const char *ins[] = {a.thresholds, a.baseline, a.map, a.test, argv[optind],
                         a.map ? argv[optind + 1] : NULL};
    const char *outs[] = {a.verdict, a.c.json_out, a.junit};
    if ((rc = cli_check_files(CMD, ins, 6, outs, 3)) != 0)
        return rc;
    if (ist_thresholds_read(a.thresholds, &rules, &err) != IST_OK)
        return cli_report(CMD, &err);
    if (a.baseline && ist_result_load(a.baseline, &base, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    if (a.map)
        rc = compute(&a, argv + optind, &res);
    else if (ist_result_load(argv[optind], &res, &err) != IST_OK)
        rc = cli_report(CMD, &err);
    if (rc != 0)
        goto done;
    cli_progress_start("gate: judging the rules (bootstrap of the change)");
    ist_status judged = ist_gate_evaluate(rules, res, base, &a.gate, &v, &err);
    cli_progress_stop();
    if (judged != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    rc = report(&a, v);
done:
    ist_verdict_free(v);
    ist_result_free(res);
    ist_result_free(base);
    ist_thresholds_free(rules);
    return rc;
}

const cli_command cmd_gate = {"gate", "check a result against thresholds and a baseline", run,
                              help};
