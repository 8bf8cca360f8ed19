/* cli.h: what the command files of the irrecon program share. The program
 * only parses options, calls the library and owns streams and exit codes. */
#ifndef IRRECON_CLI_H
#define IRRECON_CLI_H

#include <stdio.h>
#include "irrecon/common.h"

/* Exit statuses, like diff and grep: 0 good, 1 "not consistent", 2 error. */
enum { CLI_OK = 0, CLI_NOT_CONSISTENT = 1, CLI_ERROR = 2 };

typedef int (*cli_command_fn)(int argc, char **argv);

/* One subcommand; argv[0] is the command name when fn is called. */
typedef struct cli_command {
	const char *name;
	cli_command_fn fn;
	const char *summary;
} cli_command;

/* Prints "irrecon: file:line: message" on stderr and returns CLI_ERROR. */
int cli_fail(const irr_error *err);
/* Prints "irrecon: <cmd>: message" (usage problems) and returns CLI_ERROR. */
int cli_usage_error(const char *cmd, const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 2, 3)))
#endif
	;

/* Writes `data` to `path` atomically (temp file in the same folder, then
 * rename), so an error never leaves a half-written or clobbered file.
 * "-" writes to stdout. Returns IRR_OK or fills err. */
int cli_write_file_atomic(const char *path, const char *data, size_t len,
                          irr_error *err);

/* Subcommands, one file each (cmd_<name>.c); listed in main.c. */
int cmd_predict(int argc, char **argv);

#endif
