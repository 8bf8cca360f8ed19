/* cmd_check.h: what `check` and `rank` share: loading tables, reading and
 * hashing the measured input. */
#ifndef IRRECON_CMD_CHECK_H
#define IRRECON_CMD_CHECK_H

#include "irrecon/reconcile.h"

/* Loads tables from `dir` (NULL: default) plus extra files. When `dir` has
 * solvents/solvents.json, *solvents_file is set to it (caller frees). */
int cli_load_tables(irr_tables **out, const char *dir, char **extra, size_t nextra,
                    char **solvents_file, irr_error *err);

/* SHA-256 (hex) of a file; more than max_bytes (0 = no limit) is an
 * IRR_ELIMIT error. */
int cli_sha256_file(const char *path, size_t max_bytes, char hex[65], irr_error *err);

/* Reads the spectrum (with read options `ro`, may be NULL) or peak list and
 * hands it to the check, with the file name and its SHA-256 in the options.
 * Exactly one of spectrum/peaks. */
int cli_check_set_input(irr_check *c, irr_check_options *o, const char *spectrum,
                        const char *peaks, const irr_read_options *ro, irr_error *err);

/* What check and rank both take from the command line. */
typedef struct cli_check_args {
	const char *spectrum, *peaks, *output, *tables_dir, *sample;
	int json;
	char **extra;                  /* --add-table files */
	size_t nextra;
	struct cli_other {
		irr_other_kind kind;
		const char *what;
	} *others;                     /* --starting-material, --reagent, --solvent */
	size_t nothers;
	irr_check_options o;           /* --phase, --sampling */
	irr_read_options ro;           /* --block, --max-bytes, --max-points */
} cli_check_args;

/* Room for every option of argc arguments; -1 when out of memory.
 * cli_check_args_free releases it (also after a failed init). */
int cli_check_args_init(cli_check_args *ca, int argc);
void cli_check_args_free(cli_check_args *ca);
/* Takes `opt` (a long name) with its value `v` when it is one of the
 * shared options: 1 taken, 0 not shared, CLI_ERROR after a usage error. */
int cli_check_option(const char *cmd, const char *opt, const char *v, cli_check_args *ca);
/* Loads the tables (*t; *solv_file as cli_load_tables) and creates *c with
 * the sample id, conditions and solvent library set. */
int cli_check_begin(irr_check **c, irr_tables **t, char **solv_file, cli_check_args *ca,
                    irr_error *err);
/* Adds the other compounds, then reads and sets the spectrum or peaks. */
int cli_check_finish_inputs(irr_check *c, cli_check_args *ca, irr_error *err);

int cmd_check(int argc, char **argv);
int cmd_rank(int argc, char **argv);

#endif
