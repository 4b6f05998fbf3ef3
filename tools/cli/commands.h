/* commands.h - the subcommands of isthmus, one cmd_<name>.c each. */
#ifndef ISTHMUS_COMMANDS_H
#define ISTHMUS_COMMANDS_H

#include "cli.h"

extern const cli_command cmd_inspect;
extern const cli_command cmd_convert;
extern const cli_command cmd_align;
extern const cli_command cmd_score;
extern const cli_command cmd_lookup;
extern const cli_command cmd_prepare;
extern const cli_command cmd_report;
extern const cli_command cmd_train;
extern const cli_command cmd_stack;
extern const cli_command cmd_gate;
extern const cli_command cmd_propose;
extern const cli_command cmd_merge_pairs;

#endif
