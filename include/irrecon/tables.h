/* irrecon/tables.h: group-frequency tables. Loads the JSON files under
 * group-tables/ (and any extra user files) into memory: for each group its
 * bands with windows, intensity, shape, diagnostic weight, context rules and
 * the handbook they come from. Also answers the reverse question: which
 * groups have a band at this position? */
#ifndef IRRECON_TABLES_H
#define IRRECON_TABLES_H

#include <stddef.h>
#include "irrecon/common.h"

#ifdef __cplusplus
extern "C" {
#endif

/* A context rule: when the group's attribute (or the sampling condition)
 * matches, the band is shifted, replaced, re-classed or dropped. */
typedef struct irr_table_rule {
	char attr[24];      /* conjugated, ring_size, n_h, aryl, hbond_intra, pattern,
	                       phase, sampling */
	char value[24];     /* value to compare, as text ("1", "5", "para", "gas") */
	double shift;       /* added to low, high, typical */
	double low, high, typical; /* when set_window: replaces the window */
	int set_window;
	int omit;           /* band not expected under this context */
	irr_intensity intensity; /* IRR_INT_NONE = unchanged */
	const char *note;
} irr_table_rule;

typedef struct irr_table_band {
	const char *label;      /* e.g. "C=O stretch" */
	double low, high, typical;
	irr_intensity intensity;
	irr_shape shape;
	double weight;          /* 0..1: how much its absence counts against the structure */
	int overtone;           /* an overtone/combination band (weak, never diagnostic alone) */
	const char *note;
	const char *source;     /* handbook, table, "from memory" where so */
	size_t nrules;
	const irr_table_rule *rules;
} irr_table_band;

typedef struct irr_table_group {
	const char *id;         /* unique table id */
	const char *name;       /* trade name, e.g. "ketone, cyclopentanone" */
	const char *key;        /* perception key (perceive.h) or NULL */
	const char *smarts;     /* SMARTS for user groups, or NULL */
	const char *file;       /* table file it came from */
	size_t nbands;
	const irr_table_band *bands;
} irr_table_group;

typedef struct irr_tables irr_tables;

/* Loads every *.json under `dir` (NULL: irr_tables_default_dir(); "": no
 * folder, only the extra files), sorted by name, and then the `n_extra` user files, which may add groups or
 * replace groups of the same id. A broken file is IRR_EINPUT naming the file
 * and line. Caller owns *out. */
int irr_tables_load(irr_tables **out, const char *dir,
                    const char *const *extra, size_t n_extra, irr_error *err);
void irr_tables_free(irr_tables *t);

/* The directory used by irr_tables_load(NULL,...): static or env string. */
const char *irr_tables_default_dir(void);

size_t irr_tables_group_count(const irr_tables *t);
const irr_table_group *irr_tables_group(const irr_tables *t, size_t i);
/* Groups whose key is `key` (several tables may refine one key), in load
 * order, stored into found[0..max-1] (borrowed). Returns the number stored;
 * with found == NULL, the number there are. */
size_t irr_tables_find_key(const irr_tables *t, const char *key,
                           const irr_table_group **found, size_t max);
const irr_table_group *irr_tables_find_id(const irr_tables *t, const char *id);
/* SHA-256 (hex) over the bytes of all files loaded, in load order. */
const char *irr_tables_digest(const irr_tables *t);

#ifdef __cplusplus
}
#endif
#endif
