/* irrecon/reconcile.h: the "reconcile" stage, the main job. A check object
 * holds one sample's inputs (proposed structure, spectrum or peak list,
 * starting materials, reagents, solvents, options), matches the observed
 * peaks to the expected bands by optimal assignment, attributes the extra
 * bands, and keeps the verdict with its reasons for the reports.
 *
 * The built-in library of common lab solvents and reagents that --solvent
 * NAME looks up is in solvents.h.
 *
 * Ownership: objects returned through `T **out` belong to the caller;
 * pointers returned by accessors are borrowed from the check and valid until
 * it is freed or run again. */
#ifndef IRRECON_RECONCILE_H
#define IRRECON_RECONCILE_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"
#include "irrecon/peaks.h"
#include "irrecon/structure.h"
#include "irrecon/perceive.h"
#include "irrecon/tables.h"
#include "irrecon/predict.h"
#include "irrecon/solvents.h"
#include "irrecon/structcache.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- Verdicts and the other enumerations (static names, as in JSON) ---- */

typedef enum irr_verdict {
	IRR_VERDICT_CONSISTENT = 0,   /* "consistent" */
	IRR_VERDICT_CONSISTENT_IMPURE,/* "consistent_impure" */
	IRR_VERDICT_INCONSISTENT,     /* "inconsistent" */
	IRR_VERDICT_INCONCLUSIVE      /* "inconclusive" */
} irr_verdict;
const char *irr_verdict_name(irr_verdict v);

/* What the user names besides the product. */
typedef enum irr_other_kind {
	IRR_OTHER_STARTING_MATERIAL = 0, /* "starting_material" */
	IRR_OTHER_REAGENT,               /* "reagent" */
	IRR_OTHER_SOLVENT                /* "solvent" */
} irr_other_kind;
const char *irr_other_kind_name(irr_other_kind k);

/* Where an attributed band comes from. The first three equal irr_other_kind. */
typedef enum irr_source_kind {
	IRR_SOURCE_STARTING_MATERIAL = 0, /* "starting_material" */
	IRR_SOURCE_REAGENT,               /* "reagent" */
	IRR_SOURCE_SOLVENT,               /* "solvent" */
	IRR_SOURCE_ATMOSPHERE,            /* "atmosphere": CO2, water vapour lines */
	IRR_SOURCE_WATER,                 /* "water": moisture in the sample */
	IRR_SOURCE_NONE                   /* not attributed */
} irr_source_kind;
const char *irr_source_kind_name(irr_source_kind k);

typedef enum irr_band_status {
	IRR_BAND_FOUND = 0,      /* "found": a peak in its window */
	IRR_BAND_SATURATED,      /* "saturated": window meets a saturated region */
	IRR_BAND_MISSING,        /* "missing" */
	IRR_BAND_UNOBSERVABLE    /* "unobservable": outside the range, or hidden */
} irr_band_status;
const char *irr_band_status_name(irr_band_status s);

typedef enum irr_peak_status {
	IRR_PEAK_EXPLAINED = 0,  /* "explained" by the product's bands */
	IRR_PEAK_ATTRIBUTED,     /* "attributed" to something named or to the air */
	IRR_PEAK_UNEXPLAINED     /* "unexplained" */
} irr_peak_status;
const char *irr_peak_status_name(irr_peak_status s);

typedef enum irr_presence {
	IRR_PRESENCE_ABSENT = 0,    /* "absent": markers observable, none found */
	IRR_PRESENCE_LIKELY_PRESENT,/* "likely_present": marker bands found */
	IRR_PRESENCE_CANNOT_TELL    /* "cannot_tell": no observable marker band */
} irr_presence;
const char *irr_presence_name(irr_presence p);

/* ---- Options ---- */

typedef struct irr_check_options {
	irr_phase phase;            /* default condensed */
	irr_sampling sampling;      /* default ATR */
	irr_peak_options peaks;     /* used by irr_check_set_spectrum */
	const char *sample_id;      /* NULL = none; copied by set_options */
	const char *input_name;     /* spectrum/peak file for provenance; copied */
	const char *input_sha256;   /* its SHA-256 (hex); NULL = unknown; copied */
	const char *solvents_file;  /* solvent library; NULL = solvents.json in
	                               irr_tables_default_dir(); copied */
} irr_check_options;

/* Defaults: condensed, ATR, irr_peak_options_init, no ids. */
void irr_check_options_init(irr_check_options *o);

/* ---- The check object ---- */

typedef struct irr_check irr_check;

/* New empty check using tables `t` (borrowed: keep it alive while the check
 * lives). Caller owns *out (irr_check_free). */
int irr_check_create(irr_check **out, const irr_tables *t, irr_error *err);
void irr_check_free(irr_check *c);

/* A new check sharing `src`'s spectrum/peak list (read-only, reference
 * counted), options and other substances, with no structure set: for
 * ranking several candidate structures against one spectrum. Caller owns
 * *out. */
int irr_check_clone_inputs(irr_check **out, const irr_check *src, irr_error *err);

/* Copies the option values and strings. Call before set_spectrum so that
 * the peak options apply. A different solvents_file takes effect only
 * while no substance has been added. */
void irr_check_set_options(irr_check *c, const irr_check_options *o);

/* The proposed structure. Parses and perceives at once: a bad SMILES is
 * IRR_EINPUT naming `name` (NULL: "SMILES"). Replaces an earlier one. */
int irr_check_set_structure(irr_check *c, const char *smiles, irr_error *err);
int irr_check_set_structure_named(irr_check *c, const char *smiles,
                                  const char *name, irr_error *err);

/* A starting material, reagent or solvent. `what` is a SMILES, or for any
 * kind a name from the solvent library ("ethyl acetate", "THF", "DMSO";
 * case-insensitive), which brings its tabulated bands too. Unknown names
 * that are not valid SMILES are IRR_EINPUT. */
int irr_check_add_other(irr_check *c, irr_other_kind kind, const char *what,
                        irr_error *err);

/* Takes structures (the product's and every other substance's) from `sc`
 * (borrowed: keep it alive while the check and its clones live; NULL: read
 * and perceive each one here), so that a run meeting the same SMILES many
 * times parses it once. The result is the same either way; a cache made
 * with other tables than the check's is not used. Call before
 * irr_check_set_structure and irr_check_add_other. */
void irr_check_use_structure_cache(irr_check *c, irr_structure_cache *sc);

/* Uses an already loaded solvent library (borrowed: keep it alive while
 * the check and its clones live) instead of loading one per check; for
 * batches. Call before irr_check_add_other. */
int irr_check_use_solvents(irr_check *c, const irr_solvent_library *lib,
                           irr_error *err);

/* Takes ownership of `s` (also on failure): normalises it and picks peaks
 * with the options' peak settings. */
int irr_check_set_spectrum(irr_check *c, irr_spectrum *s, irr_error *err);
/* Takes ownership of `pl` (also on failure): a peak list instead of a
 * spectrum. */
int irr_check_set_peaks(irr_check *c, irr_peaklist *pl, irr_error *err);

/* Predicts, assigns, attributes and decides. Needs a structure and a
 * spectrum or peak list. May be run again after changing inputs. */
int irr_check_run(irr_check *c, irr_error *err);

/* ---- Result ---- */

irr_verdict irr_check_verdict(const irr_check *c);
double irr_check_score(const irr_check *c);   /* 0..1, higher agrees better */

/* A reason, most important first. `code` is a stable token:
 *   missing_band, unexplained_band, saturated_unexplained, rule,
 *   other_present, other_absent, other_cannot_tell, unobservable, noisy,
 *   no_bands, bands_found, attributed_band, moisture, atmosphere.
 * Decisive reasons come first. */
typedef struct irr_reason {
	const char *code;
	const char *text;       /* plain words, one line */
	int decisive;           /* this reason alone sets the verdict */
	long expected;          /* index of the expected band concerned, or -1 */
	long observed;          /* index of the observed peak concerned, or -1 */
} irr_reason;
size_t irr_check_reason_count(const irr_check *c);
const irr_reason *irr_check_reason(const irr_check *c, size_t i);

/* Expected bands of the product (highest wavenumber first). */
typedef struct irr_expected {
	const irr_band *band;     /* borrowed from the prediction */
	irr_band_status status;
	long peak;                /* index of its observed peak, or -1 */
	double deviation;         /* peak position - typical, cm-1 (found) */
	double weight;            /* diagnostic weight as counted (band weight x
	                             intensity and region factors) */
	int shared;               /* found on a peak another band also claims */
	const char *note;         /* why unobservable/missing, or NULL */
} irr_expected;
size_t irr_check_expected_count(const irr_check *c);
const irr_expected *irr_check_expected(const irr_check *c, size_t i);

/* Observed peaks, in peak-list order (highest wavenumber first). */
typedef struct irr_observed {
	const irr_peak *peak;     /* borrowed from the peak list */
	int significant;          /* counts in verdict and reports */
	irr_peak_status status;
	long expected;            /* explaining expected band, or -1 */
	double weight;            /* how much it counts when unexplained */
	irr_source_kind attributed_kind; /* IRR_SOURCE_NONE unless attributed */
	const char *attributed_name;     /* "carbon dioxide", "ethyl acetate", SMILES */
	const char *attributed_smiles;   /* or NULL */
	const char *attributed_label;    /* the band it was matched to, or NULL */
	size_t ncandidates;       /* group names that could explain it */
	const char *const *candidates;
} irr_observed;
size_t irr_check_observed_count(const irr_check *c);
const irr_observed *irr_check_observed(const irr_check *c, size_t i);

/* Marker band of another substance: one the product cannot explain. */
typedef struct irr_marker {
	const char *label;        /* e.g. "O-H stretch (alcohol, secondary)" */
	double low, high, typical;
	irr_intensity intensity;  /* expected */
	int observable;
	long peak;                /* observed peak found in it, or -1 */
	double rel_strength;      /* found peak height / median height of the
	                             product's found strong and medium bands */
} irr_marker;

typedef struct irr_other {
	irr_other_kind kind;
	const char *given;        /* as the user wrote it */
	const char *name;         /* library name, or NULL */
	const char *smiles;       /* SMILES (from the library for names) */
	const char *formula;
	irr_presence presence;
	size_t nmarkers;
	const irr_marker *markers;
	size_t nattributed;       /* observed peaks attributed to it */
} irr_other;
size_t irr_check_other_count(const irr_check *c);
const irr_other *irr_check_other(const irr_check *c, size_t i);

/* Cautions: the evidence-not-proof caution always, safety cautions of the
 * product's and the others' groups, input warnings. */
size_t irr_check_caution_count(const irr_check *c);
const char *irr_check_caution(const irr_check *c, size_t i);

/* Borrowed inputs and intermediate results for reports and plots. The
 * spectrum is NULL when a peak list was given. */
const irr_check_options *irr_check_get_options(const irr_check *c);
const char *irr_check_structure_smiles(const irr_check *c);
const char *irr_check_structure_formula(const irr_check *c);
const irr_molecule *irr_check_molecule(const irr_check *c);
const irr_inventory *irr_check_inventory(const irr_check *c);
const irr_prediction *irr_check_prediction(const irr_check *c);
const irr_spectrum *irr_check_spectrum(const irr_check *c);
const irr_peaklist *irr_check_peaklist(const irr_check *c);
const irr_tables *irr_check_tables(const irr_check *c);

/* Seconds spent per stage in this check (for make bench). */
typedef struct irr_check_timing {
	double peaks, perceive, predict, reconcile;
} irr_check_timing;
void irr_check_get_timing(const irr_check *c, irr_check_timing *out);

#ifdef __cplusplus
}
#endif
#endif
