/* cmd_check.h: what `check` and `rank` share: reading the structure file,
 * loading tables, reading and hashing the measured input. */
#ifndef IRRECON_CMD_CHECK_H
#define IRRECON_CMD_CHECK_H

#include "irrecon/reconcile.h"

/* First SMILES in a file: the first token of the first line that is not
 * blank and not a '#' comment; *line_no (may be NULL) gets its line.
 * Caller frees *out. */
int cli_read_structure_file(char **out, long *line_no, const char *path, irr_error *err);

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

int cmd_check(int argc, char **argv);
int cmd_rank(int argc, char **argv);

#endif
