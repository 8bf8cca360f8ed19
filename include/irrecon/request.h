/* irrecon/request.h: one check described as data. A request holds what a
 * `check` command line would say (structure, spectrum file or inline x/y
 * arrays or a peak list, starting materials, reagents, solvents, phase,
 * sampling, reading and peak-picking options), read from a JSON document
 * (schema "irrecon.request/1", see docs/request-schema.md) or filled by
 * setters, and runs it into a check (reconcile.h).
 *
 * Paths in a request are relative to its base folder: the folder of the
 * request file, or the one given to irr_request_parse (NULL: the current
 * directory). */
#ifndef IRRECON_REQUEST_H
#define IRRECON_REQUEST_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"
#include "irrecon/peaks.h"
#include "irrecon/tables.h"
#include "irrecon/reconcile.h"

#ifdef __cplusplus
extern "C" {
#endif

#define IRR_REQUEST_SCHEMA "irrecon.request/1"

typedef struct irr_request irr_request;

/* An empty request (no structure, no spectrum; condensed phase, ATR).
 * Caller owns *out. */
int irr_request_create(irr_request **out, irr_error *err);
/* Parses a JSON request. `name` is used in messages ("<stdin>", a path);
 * `base_dir` as above. Unknown keys and wrong types are IRR_EINPUT naming
 * the key and its line. The buffer is not kept. Caller owns *out. */
int irr_request_parse(irr_request **out, const char *json, size_t len,
                      const char *name, const char *base_dir, irr_error *err);
/* Reads and parses a request file (at most 256 MiB). Caller owns *out. */
int irr_request_read_file(irr_request **out, const char *path, irr_error *err);
/* A deep copy. Caller owns *out. */
int irr_request_clone(irr_request **out, const irr_request *r, irr_error *err);
void irr_request_free(irr_request *r);

/* Setters copy their strings; NULL clears a text field. Each returns IRR_OK,
 * IRR_ENOMEM, or IRR_EINPUT for a value out of its domain. */
int irr_request_set_sample(irr_request *r, const char *sample_id);
int irr_request_set_structure(irr_request *r, const char *smiles);
/* A spectrum file, relative to the base folder. Clears inline arrays. */
int irr_request_set_spectrum_file(irr_request *r, const char *path);
/* Inline arrays (copied): n points, Y in `units` (IRR_Y_UNKNOWN: detect).
 * Clears a spectrum file. */
int irr_request_set_spectrum_xy(irr_request *r, const double *x,
                                const double *y, size_t n, irr_yunits units);
/* A peak list file instead of a spectrum. */
int irr_request_set_peaks_file(irr_request *r, const char *path);
/* An inline peak list, in a format irr_peaklist_read_memory reads. */
int irr_request_set_peaks_text(irr_request *r, const char *text, size_t len);
int irr_request_add_starting_material(irr_request *r, const char *smiles);
int irr_request_add_reagent(irr_request *r, const char *smiles);
/* A solvent by library name ("ethyl acetate", "THF") or SMILES. */
int irr_request_add_solvent(irr_request *r, const char *name_or_smiles);
int irr_request_set_phase(irr_request *r, irr_phase phase);
int irr_request_set_sampling(irr_request *r, irr_sampling sampling);
/* Runs share this already loaded solvent library (borrowed: keep it alive
 * while the request and its clones run) instead of loading it each time;
 * a batch loads it once for all samples. NULL goes back to loading. */
int irr_request_use_solvents(irr_request *r, const irr_solvent_library *lib);
/* Runs take their structures from this cache (borrowed: keep it alive while
 * the request, its clones and the checks they made live); a batch keeps
 * one for all samples. NULL: each run reads and perceives its own. */
int irr_request_use_structure_cache(irr_request *r, irr_structure_cache *sc);
/* The folder relative paths resolve against (NULL: current directory). */
int irr_request_set_base_dir(irr_request *r, const char *dir);

/* Read-only views. Strings are borrowed from r (NULL when not set). */
const char *irr_request_sample(const irr_request *r);
const char *irr_request_structure(const irr_request *r);
const char *irr_request_spectrum_file(const irr_request *r);
const char *irr_request_peaks_file(const irr_request *r);
const char *irr_request_base_dir(const irr_request *r);
/* Inline spectrum: point count (0 when none) and borrowed arrays. */
size_t irr_request_spectrum_xy(const irr_request *r, const double **x,
                               const double **y, irr_yunits *units);
size_t irr_request_starting_material_count(const irr_request *r);
const char *irr_request_starting_material(const irr_request *r, size_t i);
size_t irr_request_reagent_count(const irr_request *r);
const char *irr_request_reagent(const irr_request *r, size_t i);
size_t irr_request_solvent_count(const irr_request *r);
const char *irr_request_solvent(const irr_request *r, size_t i);
irr_phase irr_request_phase(const irr_request *r);
irr_sampling irr_request_sampling(const irr_request *r);
/* Reading and peak options as the request sets them (defaults otherwise).
 * Borrowed; the caller may change them through the non-const pointers. */
irr_read_options *irr_request_read_options(irr_request *r);
irr_peak_options *irr_request_peak_options(irr_request *r);
/* Table options: a table folder (NULL: the default) and extra table files,
 * relative to the base folder. The caller loads the tables (irr_tables_load)
 * once and passes them to irr_request_run; a batch shares one set. */
const char *irr_request_tables_dir(const irr_request *r);
size_t irr_request_extra_table_count(const irr_request *r);
const char *irr_request_extra_table(const irr_request *r, size_t i);

/* Joins `path` (as written in the request) to the base folder unless it is
 * absolute or there is no base folder. Caller owns *out (free()). */
int irr_request_resolve(char **out, const irr_request *r, const char *path,
                        irr_error *err);

/* Runs the request: reads its spectrum or peak list (and hashes the file
 * for the provenance), sets structure, other substances and options on a
 * new check using tables `t` (borrowed; keep it alive while the check
 * lives) and runs it. A verdict of any kind is success (IRR_OK); an input
 * that cannot be used is an error naming its file and line. Caller owns
 * *out (irr_check_free); *out is NULL on failure. */
int irr_request_run(irr_check **out, const irr_request *r, const irr_tables *t,
                    irr_error *err);

#ifdef __cplusplus
}
#endif
#endif
