/* irrecon/batch.h: batch manifests. Reads a manifest (CSV or JSON Lines,
 * one sample a row) into sample descriptions, resolves the files a row names
 * against the manifest's folder (refusing paths that leave it unless asked),
 * and turns each row into a request (request.h) that runs like one `check`.
 *
 * A manifest that cannot be read as a whole (missing file, no header, an
 * unknown column) is an error of the call. A row that is malformed on its own
 * (a bad JSON line, a wrong field count) is kept as a sample with an error, so
 * that the batch can report it and go on. */
#ifndef IRRECON_BATCH_H
#define IRRECON_BATCH_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/request.h"
#include "irrecon/reconcile.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum irr_manifest_format {
	IRR_MANIFEST_AUTO = 0, /* from the extension (.csv, .jsonl, .ndjson), else the content */
	IRR_MANIFEST_CSV,
	IRR_MANIFEST_JSONL
} irr_manifest_format;

/* One row. Every pointer is borrowed from the manifest and lives as long as
 * it. Absent text fields are NULL; absent lists have count 0. Paths are as
 * written in the manifest (not yet resolved). */
typedef struct irr_manifest_sample {
	size_t index;              /* 0-based position among the samples */
	long line;                 /* 1-based line of the row in the manifest */
	const char *sample;        /* sample id */
	const char *structure;     /* SMILES */
	const char *spectrum;      /* spectrum file (JCAMP-DX, CSV) */
	const char *peaks;         /* peak-list file (CSV, JSON) */
	size_t n_starting_materials;
	const char *const *starting_materials; /* SMILES */
	size_t n_reagents;
	const char *const *reagents;           /* SMILES */
	size_t n_solvents;
	const char *const *solvents;           /* library name or SMILES */
	const char *phase;         /* "condensed", "solution", "gas" */
	const char *sampling;      /* "atr", "transmission" */
	int failed;                /* the row itself is malformed: see `error` */
	const irr_error *error;    /* why (failed rows only; else NULL) */
} irr_manifest_sample;

typedef struct irr_manifest irr_manifest;

/* Reads the manifest file at `path`. Caller owns *out (irr_manifest_free).
 * IRR_EIO when it cannot be read, IRR_EINPUT (file and line named) when it
 * cannot be parsed as a whole, IRR_ELIMIT past max_bytes (0: 256 MiB). */
int irr_manifest_read_file(irr_manifest **out, const char *path,
                           irr_manifest_format format, size_t max_bytes,
                           irr_error *err);
/* Same from memory. `name` is used in messages; `base_dir` is the folder the
 * rows' paths are relative to (NULL: the current directory). The buffer is
 * not kept. Caller owns *out. */
int irr_manifest_read_memory(irr_manifest **out, const char *data, size_t len,
                             const char *name, const char *base_dir,
                             irr_manifest_format format, irr_error *err);
void irr_manifest_free(irr_manifest *m);

size_t irr_manifest_count(const irr_manifest *m);
/* Borrowed; NULL when i is out of range. */
const irr_manifest_sample *irr_manifest_get(const irr_manifest *m, size_t i);
/* The manifest path or name given, and the folder paths resolve against.
 * Borrowed strings. */
const char *irr_manifest_name(const irr_manifest *m);
const char *irr_manifest_base_dir(const irr_manifest *m);
/* IRR_MANIFEST_CSV or IRR_MANIFEST_JSONL: what the content was read as. */
irr_manifest_format irr_manifest_detected_format(const irr_manifest *m);

/* Resolves a path written in a manifest row against `base_dir`. Unless
 * `allow_outside`, an absolute path, a ".." component, or a file whose real
 * location (symbolic links followed) is not inside base_dir is refused with
 * IRR_EINPUT naming the manifest and line. Caller owns *out (free()). The
 * manifest remembers the last folder it resolved, so calls on one manifest
 * must not run in parallel threads. */
int irr_manifest_resolve_path(char **out, const irr_manifest *m, long line,
                              const char *path, int allow_outside,
                              irr_error *err);

/* Builds the request of sample i: its fields, paths resolved as above, and
 * the defaults in `base` (options such as tables, thresholds; may be NULL).
 * A row that failed to parse gives its own error back. Caller owns *out. */
int irr_manifest_sample_request(irr_request **out, const irr_manifest *m,
                                size_t i, const irr_request *base,
                                int allow_outside, irr_error *err);

/* Seconds spent per stage, summed over the samples run (for make bench and
 * `batch --timing`). read: reading and parsing the spectrum file; peaks,
 * perceive (SMILES parsing included), predict, reconcile: as the check
 * reports them; write: building the JSON line; total: the whole run of the
 * sample after its row was resolved. */
typedef struct irr_batch_timing {
	double read, peaks, perceive, predict, reconcile, write, total;
	size_t samples;
} irr_batch_timing;

#define IRR_BATCH_ERROR_SCHEMA "irrecon.error/1"

/* Runs sample i: builds its request (over `base`), runs the check with
 * tables `t` and renders the result as one line of compact JSON (schema
 * "irrecon.check/1", the same object as `check --json`), without a newline.
 * On success *json_out is malloc'd (caller frees) and *verdict (may be NULL)
 * is set. On failure *json_out is NULL and err says why, naming the file and
 * line (a row's own faults name the manifest and the row's line). `timing`
 * (may be NULL) is added to. */
int irr_batch_run_sample(char **json_out, irr_verdict *verdict,
                         const irr_manifest *m, size_t i,
                         const irr_request *base, const irr_tables *t,
                         int allow_outside, irr_batch_timing *timing,
                         irr_error *err);

/* The error record of sample i as one line of compact JSON:
 * {"schema":"irrecon.error/1","sample":ID|null,"manifest":PATH,
 *  "manifest_line":N,"error":{"message":..,"file":..|null,"line":N|null}}.
 * Caller owns *out (free()). Returns IRR_OK or IRR_ENOMEM. */
int irr_batch_error_record(char **out, const irr_manifest *m, size_t i,
                           const irr_error *e);

#ifdef __cplusplus
}
#endif
#endif
