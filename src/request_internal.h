/* request_internal.h: the layout of a request and the helpers that
 * request.c shares with batch.c (manifest rows become requests). Not
 * installed. */
#ifndef IRRECON_REQUEST_INTERNAL_H
#define IRRECON_REQUEST_INTERNAL_H

#include <stddef.h>
#include <cJSON.h>
#include "irrecon/request.h"

typedef struct irr_strlist {
	char **v;
	size_t n, cap;
} irr_strlist;

struct irr_request {
	char *name;              /* request file or name, for messages */
	char *base_dir;          /* relative paths resolve against it */
	char *sample;
	char *structure;
	char *spectrum_file;
	double *x, *y;           /* inline spectrum */
	size_t n;
	irr_yunits units;
	char *peaks_file;
	char *peaks_text;        /* inline peak list (JSON text) */
	size_t peaks_len;
	irr_strlist starting_materials, reagents, solvents;
	irr_phase phase;
	irr_sampling sampling;
	irr_read_options read;
	irr_peak_options peak;
	char *tables_dir;
	irr_strlist extra_tables;
	const irr_solvent_library *solvents_lib; /* borrowed; NULL: each run loads it */
	irr_structure_cache *structures;         /* borrowed; NULL: each run perceives its own */
};

/* Appends the ';'-separated, trimmed, non-empty items of s. */
int irr_request__add_split(irr_strlist *l, const char *s);
int irr_request__set_name(irr_request *r, const char *name);
int irr_request__set_tables_dir(irr_request *r, const char *dir);
int irr_request__add_extra_table(irr_request *r, const char *path);
/* Parses JSON text; on failure the error names `name` and the line
 * (counted from first_line). Caller owns *out (cJSON_Delete). */
int irr_request__parse_json(cJSON **out, const char *json, size_t len,
                            const char *name, long first_line, irr_error *err);
/* Fills r from a parsed request object; json/len locate keys for messages. */
int irr_request__from_json(irr_request *r, const cJSON *root, const char *json,
                           size_t len, const char *name, irr_error *err);
/* Whole file into a NUL-terminated malloc'd buffer (caller frees). */
int irr_request__slurp(char **out, size_t *len, const char *path,
                       size_t max_bytes, irr_error *err);
/* The folder part of a path ("." when none). Caller frees *out. */
int irr_request__dirname(char **out, const char *path);

/* irr_request_run that also reports the seconds spent reading the input. */
int irr_request__run_timed(irr_check **out, const irr_request *r,
                           const irr_tables *t, double *read_seconds,
                           irr_error *err);

#endif
