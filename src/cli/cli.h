/* cli.h: what the command files of the irrecon program share. The program
 * only parses options, calls the library and owns streams and exit codes. */
#ifndef IRRECON_CLI_H
#define IRRECON_CLI_H

#include <stdio.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"

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

/* `v` with `decimals` decimals into buf (irr_format_double: '.' always);
 * returns buf, for use inside printf arguments. */
const char *cli_fmt(char *buf, size_t size, double v, int decimals);

/* Creates an empty file beside `path` named path + ".tmp.XXXXXX", with
 * the mode a new file would get (0666 & ~umask). *tmp holds its name
 * (caller frees) from just before the file exists, so that a signal handler
 * reading *tmp can remove it. Returns the open descriptor, or -1 with err
 * filled and *tmp NULL. */
int cli_temp_beside(const char *path, char **tmp, irr_error *err);

/* First SMILES in a structure file: the first token of the first line that
 * is not blank and not a '#' comment; the rest of that line, trimmed, is the
 * compound's name (*name may be ""; pass NULL when not wanted); *line_no
 * (may be NULL) gets its line. Caller frees *out and *name. */
int cli_read_structure_file(char **out, char **name, long *line_no, const char *path,
                            irr_error *err);

/* Writes `data` to `path` atomically (temp file in the same folder, then
 * rename), so an error never leaves a half-written or clobbered file.
 * "-" writes to stdout. Returns IRR_OK or fills err. */
int cli_write_file_atomic(const char *path, const char *data, size_t len,
                          irr_error *err);

/* ---- Option tables (opts.c) ---- */

struct cJSON;

/* One option of a command. One table per command (ended by a NULL name)
 * drives its argv loop, its --help list and so the man page. */
typedef struct cli_opt {
	const char *name;  /* "--json"; a short form may lead: "-o, --output" */
	const char *arg;   /* value name for --help ("FILE"); NULL: a flag */
	const char *help;  /* '\n' continues under the first line; a leading
	                    * '\n' starts it on the next line. NULL: `name` is
	                    * a section heading of --help, not an option */
} cli_opt;

/* The option's long name: "--output" for "-o, --output". */
const char *cli_opt_long(const cli_opt *opt);
/* The option whose long name is `name` in `opts`, or NULL. */
const cli_opt *cli_opt_find(const cli_opt *opts, const char *name);
/* Prints the table for --help: "  NAME ARG" padded to `width` columns, a
 * blank, the help text; a heading after a blank line (none before the
 * first entry). */
void cli_opt_help(const cli_opt *opts, int width);
/* 1 when opt is the option with the long name `name`. */
int cli_opt_is(const cli_opt *opt, const char *name);

/* Flags of cli_args. */
enum {
	CLI_ARGS_OPERANDS = 1,    /* words not starting with '-' (and "-") are operands */
	CLI_ARGS_DASH_H = 2,      /* "-h" is "--help" */
	CLI_ARGS_NEEDS_VALUE = 4, /* a missing value reads "X needs a value", else "X needs ARG" */
	CLI_ARGS_DASHDASH = 8     /* "--" is reported as CLI_ARGS_DASHDASH_SEEN */
};
/* Returns of cli_opt_next (and CLI_ERROR). */
enum { CLI_ARGS_END = 0, CLI_ARGS_NEXT = 1, CLI_ARGS_DASHDASH_SEEN = 3 };

/* Walks argv[1..argc-1]; i is the next argument (start at 1). */
typedef struct cli_args {
	const char *cmd;             /* command name, for messages */
	const cli_opt *opts;
	int argc;
	char **argv;
	int i;
	unsigned flags;
	const char *const *aliases;  /* NULL, or pairs {"--other", "--name", ..., NULL} */
} cli_args;

/* The next argument: CLI_ARGS_NEXT with *opt and its *value (NULL for a
 * flag), or with *opt NULL and the operand in *value; CLI_ARGS_END after
 * the last; CLI_ERROR after printing "unknown option" or "needs a value". */
int cli_opt_next(cli_args *p, const cli_opt **opt, const char **value);

/* A whole number >= 1 for --block, --max-bytes, --max-points: 0 or -1. */
int cli_parse_count(const char *opt, const char *v, size_t *out);
/* --block (at most 100000), --max-bytes, --max-points into ro, with
 * cli_parse_count; CLI_OK or the usage error "X needs a whole number >= 1". */
int cli_count_option(const char *cmd, const char *opt, const char *v, irr_read_options *ro);
/* A number (locale-independent); CLI_OK or the usage error "X needs a number". */
int cli_number_option(const char *cmd, const char *opt, const char *v, double *out);
/* The reading options of the single-file commands (peaks, axis):
 * --decimal-comma, --micrometres, --y-units, --block (at most 1e6),
 * --max-bytes, --max-points. CLI_OK, CLI_ERROR after a usage error, or -1
 * when `opt` is none of them. */
int cli_read_option(const char *cmd, const char *opt, const char *v, irr_read_options *ro);

/* Prints `root` as JSON plus a final newline and deletes it (root may be
 * NULL). Caller frees the text; NULL when out of memory. */
char *cli_json_text(struct cJSON *root);

/* Subcommands, one file each (cmd_<name>.c); listed in main.c. */
int cmd_check(int argc, char **argv);
int cmd_rank(int argc, char **argv);
int cmd_predict(int argc, char **argv);
int cmd_peaks(int argc, char **argv);
int cmd_axis(int argc, char **argv);
int cmd_synth(int argc, char **argv);
int cmd_batch(int argc, char **argv);

#endif
