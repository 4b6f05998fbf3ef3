/* cmd_convert.c - isthmus convert: between the text table and the native file. */
#include <getopt.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"

static void
help(FILE *out)
{
    fputs("Usage: isthmus convert [OPTIONS] IN OUT\n"
          "Convert a vector file between the plain-text table (plain or gzip) and the native\n"
          "memory-mappable file. Numbers are carried bit for bit in both directions.\n"
          "\n"
          "Arguments:\n"
          "  IN                      any vector file isthmus reads (format detected from its bytes)\n"
          "  OUT                     output path; '-' writes a text table to standard output\n"
          "\n"
          "Options:\n"
          "      --to=FORMAT         native or text [default: from OUT: .isv native; .txt, .gz\n"
          "                          or '-' text; another ending is refused]\n"
          "      --gzip              compress a text table [default: when OUT ends in .gz]\n"
          "      --rows-line         begin a text table with a line 'ROWS DIM'\n"
          "      --max-rows=N        keep only the first N rows [default: all]\n"
          "  -h, --help              show this help and exit\n"
          "\n"
          "The output is written to a temporary file and renamed into place when complete.\n"
          "\n"
          "Example:\n"
          "  isthmus convert data-samples/tiny-en.txt tiny-en.isv\n",
          out);
}

static int
run(int argc, char **argv)
{
    static const struct option opts[] = {
        {"to", required_argument, NULL, 't'},
        {"gzip", no_argument, NULL, 'z'},
        {"rows-line", no_argument, NULL, 'r'},
        {"max-rows", required_argument, NULL, 'm'},
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    static const char *const formats[] = {"native", "text", NULL};
    ist_store_save_opts sv;
    ist_store_opts so;
    int c, f;

    ist_store_save_opts_init(&sv);
    ist_store_opts_init(&so);
    so.verify = true;   /* never pass damage on */
    while ((c = getopt_long(argc, argv, "h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (c) {
        case 't':
            if (!cli_parse_choice("convert", "--to", optarg, formats, &f))
                return CLI_EXIT_USAGE;
            sv.format = f == 0 ? IST_STORE_NATIVE : IST_STORE_TEXT;
            break;
        case 'z': sv.gzip = true; break;
        case 'r': sv.text_header = true; break;
        case 'm':
            if (!cli_parse_size("convert", "--max-rows", optarg, 1, (size_t)-1 / 2, &so.max_rows))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (!cli_other_option("convert", c, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind != 2)
        return cli_usage_error("convert", "expected IN and OUT, got %d argument%s", argc - optind,
                               argc - optind == 1 ? "" : "s");
    const char *in = argv[optind], *out = argv[optind + 1];
    if (strcmp(out, "-") == 0 && sv.format == IST_STORE_NATIVE)
        return cli_usage_error("convert", "the native format is not written to standard output");
    if (strcmp(out, "-") == 0 && sv.gzip && isatty(STDOUT_FILENO))
        return cli_usage_error("convert", "refusing to write gzip data to a terminal");
    if (sv.format == IST_STORE_AUTO && !sv.gzip &&
        !cli_vector_format("convert", "OUT", out, "--to=native or --to=text", &sv.format))
        return CLI_EXIT_USAGE;
    if (strcmp(in, out) == 0)
        return cli_usage_error("convert", "IN and OUT are the same file");
    int fc = cli_check_files("convert", &in, 1, &out, 1);
    if (fc != 0)
        return fc;
    if (sv.gzip && sv.format == IST_STORE_AUTO)
        sv.format = IST_STORE_TEXT;
    if (sv.gzip && sv.format == IST_STORE_NATIVE)
        return cli_usage_error("convert", "--gzip applies to text tables; native files are "
                                          "memory-mapped and stay uncompressed");

    ist_store *s;
    ist_error err;
    double t0 = cli_now();
    if (ist_store_open(in, &so, &s, &err) != IST_OK)
        return cli_report("convert", &err);
    if (ist_store_save(s, out, &sv, &err) != IST_OK) {
        ist_store_free(s);
        return cli_report("convert", &err);
    }
    cli_wrote(out, "%zu x %zu vectors from %s in %.2f s", ist_store_rows(s), ist_store_dim(s),
              in, cli_now() - t0);
    ist_store_free(s);
    return CLI_EXIT_OK;
}

const cli_command cmd_convert = {"convert", "convert between text and native vector files", run, help};
