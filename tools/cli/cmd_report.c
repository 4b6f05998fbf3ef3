/* cmd_report.c - isthmus report: one self-contained HTML page from a result file. */
#include <getopt.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"

#define CMD "report"

static void
help(FILE *out)
{
    fputs("Usage: isthmus report [OPTIONS] RESULT.json -o REPORT.html\n"
          "Turn a result file (and a gate verdict) into one self-contained HTML page: the\n"
          "answer to 'can we ship these vectors?' first, the figures with their intervals,\n"
          "charts of precision by band, similarity and hubness, the worst misses and how both\n"
          "vector files were made; no network, scripts, fonts or images are needed to view\n"
          "or print it.\n"
          "\n"
          "Arguments:\n"
          "  RESULT.json             written by 'isthmus score --json-out' or\n"
          "                          'isthmus align --test ... --json-out'\n"
          "\n"
          "Options:\n"
          "  -o, --output=FILE       HTML file to write ('-': standard output) (required)\n"
          "      --verdict=FILE      the gate's verdict JSON on this result, to answer\n"
          "                          'can we ship?' [default: none]\n"
          "      --source-language=NAME, --target-language=NAME\n"
          "                          the languages' names for people, shown in the title\n"
          "                          and the provenance table [default: not named]\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "Example:\n"
          "  isthmus score en.isv es.isv --map=shop.map --test=data-samples/demo-test.pairs \\\n"
          "      --json-out=result.json\n"
          "  isthmus report result.json --source-language=English --target-language=Spanish \\\n"
          "      -o report.html\n",
          out);
}

enum { OPT_VERDICT = 1, OPT_SOURCE_LANGUAGE, OPT_TARGET_LANGUAGE };

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        CLI_OPT_OUTPUT,
        {"verdict", required_argument, NULL, OPT_VERDICT},
        {"source-language", required_argument, NULL, OPT_SOURCE_LANGUAGE},
        {"target-language", required_argument, NULL, OPT_TARGET_LANGUAGE},
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    const char *out = NULL, *verdict = NULL;
    ist_report_opts ro;
    ist_error err;
    int c;

    ist_report_opts_init(&ro);

    while ((c = getopt_long(argc, argv, "o:h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (c) {
        case 'o': out = optarg; break;
        case OPT_VERDICT: verdict = optarg; break;
        case OPT_SOURCE_LANGUAGE: ro.source_language = optarg; break;
        case OPT_TARGET_LANGUAGE: ro.target_language = optarg; break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (!cli_other_option(CMD, c, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind != 1)
        return cli_usage_error(CMD, "expected one RESULT.json, got %d arguments", argc - optind);
    if (!out)
        return cli_usage_error(CMD, "expected -o REPORT.html");
    const char *ins[] = {argv[optind], verdict};
    if ((c = cli_check_files(CMD, ins, 2, &out, 1)) != 0)
        return c;
    ist_result *res = NULL;
    ist_verdict *v = NULL;
    if (ist_result_load(argv[optind], &res, &err) != IST_OK ||
        (verdict && ist_verdict_load(verdict, res, &v, &err) != IST_OK) ||
        ist_report_write(res, v, &ro, out, &err) != IST_OK) {
        ist_verdict_free(v);
        ist_result_free(res);
        return cli_report(CMD, &err);
    }
    ist_verdict_free(v);
    ist_result_free(res);
    cli_wrote(out, "HTML report");
    return CLI_EXIT_OK;
}

const cli_command cmd_report = {"report", "write a self-contained HTML report of a result", run,
                                help};
