/* isthmus.c - the isthmus program: global options, then a subcommand. */
#include <fcntl.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"
#include "commands.h"

static const cli_command *const commands[] = {
    /* in the order of the job: text -> vectors -> map -> figures; then file tools */
    &cmd_prepare,
    &cmd_train,
    &cmd_stack,
    &cmd_align,
    &cmd_score,
    &cmd_lookup,
    &cmd_gate,
    &cmd_propose,
    &cmd_merge_pairs,
    &cmd_report,
    &cmd_inspect,
    &cmd_convert,
    NULL,
};

static void
help_help(FILE *out)
{
    fputs("Usage: isthmus help [COMMAND]\n"
          "Explain a command: its arguments, every option with its default, and an example.\n"
          "Without COMMAND, list the commands and the global options.\n"
          "\n"
          "Arguments:\n"
          "  COMMAND                 a command name, as listed by 'isthmus help'\n"
          "\n"
          "'isthmus COMMAND --help' prints the same text.\n"
          "\n"
          "Example:\n"
          "  isthmus help align\n",
          out);
}

static void
usage(FILE *out)
{
    fprintf(out,
            "Usage: isthmus [-q|-v] [--progress=WHEN] COMMAND [OPTIONS] [ARGS]\n"
            "Train word vectors for a new language, map them onto a home language's vectors,\n"
            "measure how well the two line up, and gate a release on the figures.\n"
            "\n"
            "Commands:\n");
    for (int i = 0; commands[i]; i++)
        fprintf(out, "  %-12s %s\n", commands[i]->name, commands[i]->summary);
    fprintf(out,
            "  %-12s %s\n"
            "\n"
            "Global options:\n"
            "  -q, --quiet             no progress and no diagnostics but errors\n"
            "  -v, --verbose           more diagnostics\n"
            "      --progress=WHEN     auto (stderr is a terminal), always or never [default: auto]\n"
            "  -h, --help              show this help and exit\n"
            "      --version           show the version and exit\n"
            "The options -q, -v and --progress may also follow the command.\n"
            "\n"
            "'isthmus help COMMAND' or 'isthmus COMMAND --help' explains one command.\n"
            "Exit status: 0 ok, 1 error (bad input, I/O, numeric failure), 2 bad usage,\n"
            "3 a check or gate rule failed.\n",
            "help", "explain a command");
}

static const cli_command *
find_command(const char *name)
{
    for (int i = 0; commands[i]; i++)
        if (strcmp(commands[i]->name, name) == 0)
            return commands[i];
    return NULL;
}

/* "no command named 'algin'; did you mean align?" */
static int
no_command(const char *name)
{
    const char *names[sizeof commands / sizeof commands[0] + 1];
    size_t n = 0;

    for (int i = 0; commands[i]; i++)
        names[n++] = commands[i]->name;
    names[n++] = "help";
    names[n] = NULL;
    return cli_unknown_name(NULL, "command", name, names);
}

static int
dispatch(int argc, char **argv)
{
    static const struct option opts[] = {
        {"quiet", no_argument, NULL, 'q'},
        {"verbose", no_argument, NULL, 'v'},
        {"progress", required_argument, NULL, CLI_OPT_PROGRESS},
        {"help", no_argument, NULL, 'h'},
        {"version", no_argument, NULL, 'V'},
        {NULL, 0, NULL, 0},
    };
    const cli_command *cmd;
    int c;

    opterr = 0;
    while ((c = getopt_long(argc, argv, "+qvh", opts, NULL)) != -1) {
        switch (c) {
        case 'h': usage(stdout); return CLI_EXIT_OK;
        case 'V': printf("isthmus %s\n", ist_version()); return CLI_EXIT_OK;
        default:
            if (!cli_other_option(NULL, c, opts, argv))   /* -q, -v, --progress or a mistake */
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (optind >= argc) {
        usage(stderr);
        return CLI_EXIT_USAGE;
    }
    if (strcmp(argv[optind], "help") == 0) {
        if (optind + 1 >= argc) {
            usage(stdout);
            return CLI_EXIT_OK;
        }
        if (optind + 2 < argc)
            return cli_usage_error(NULL, "help: expected one COMMAND, got %d", argc - optind - 1);
        if (strcmp(argv[optind + 1], "help") == 0) {
            help_help(stdout);
            return CLI_EXIT_OK;
        }
        cmd = find_command(argv[optind + 1]);
        if (!cmd)
            return no_command(argv[optind + 1]);
        cmd->help(stdout);
        return CLI_EXIT_OK;
    }
    cmd = find_command(argv[optind]);
    if (!cmd)
        return no_command(argv[optind]);
    cli_g.help = cmd->help;
    cli_install_signals();
    ist_output_hold();   /* every output of the command is committed as one group */
    argv += optind;
    argc -= optind;
    optind = 0;   /* reset getopt for the subcommand (GNU: 0 re-initialises) */
    opterr = 0;
    return cli_finish(cmd->name, cmd->run(argc, argv));
}

/* In a job of several ranks (mpirun) only rank 0 speaks: the others print their
 * data nowhere, show no progress and hold their diagnostics back. A rank that
 * failed alone (rank 0 succeeded, or is stuck waiting for it) passes its own on. */
static FILE *held;
static int real_stderr = -1;

static void
hold_back_output(void)
{
    int null = open("/dev/null", O_WRONLY);

    cli_g.verbosity = -1;
    cli_g.progress = CLI_PROGRESS_NEVER;
    fflush(stdout);
    if (null >= 0) {
        dup2(null, STDOUT_FILENO);
        close(null);
    }
    held = tmpfile();
    real_stderr = dup(STDERR_FILENO);
    if (held && real_stderr >= 0)
        dup2(fileno(held), STDERR_FILENO);
}

static void
pass_on_held(void)
{
    char line[1024];

    if (!held || real_stderr < 0)
        return;
    fflush(stderr);
    rewind(held);
    while (fgets(line, sizeof line, held))
        dprintf(real_stderr, "rank %u of %u: %s", ist_cluster_rank(), ist_cluster_size(), line);
}

int
main(int argc, char **argv)
{
    char buf[1024];
    ist_error err;
    int rc, first;

    if (ist_cluster_init(&argc, &argv, &err) != IST_OK) {
        fprintf(stderr, "isthmus: %s\n", ist_error_format(&err, buf, sizeof buf));
        return CLI_EXIT_ERROR;
    }
    if (ist_cluster_rank() > 0)
        hold_back_output();
    rc = dispatch(argc, argv);
    fflush(stdout);
    if (!ist_cluster_finish(rc, 10.0, &first)) {
        pass_on_held();
        ist_cluster_abort(rc ? rc : CLI_EXIT_ERROR);
    }
    if (rc != 0 && first == 0)
        pass_on_held();
    ist_cluster_finalize();
    return rc;
}
