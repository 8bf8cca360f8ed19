/* irrecon/predict.h: the "predict bands" stage. From a group inventory and
 * the tables, the expected bands of the structure under the given phase and
 * sampling, context rules applied, highest wavenumber first. */
#ifndef IRRECON_PREDICT_H
#define IRRECON_PREDICT_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/perceive.h"
#include "irrecon/tables.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_band {
	const char *group_id;    /* table group id */
	const char *group_name;  /* trade name */
	const char *label;
	double low, high, typical;
	irr_intensity intensity;
	irr_shape shape;
	double weight;           /* diagnostic weight 0..1 */
	int overtone;
	int group_count;         /* instances of the group in the structure */
	size_t group_index;      /* index in the inventory */
	const char *source;
	const char *note;        /* band note plus notes of applied rules */
} irr_band;

typedef struct irr_predict_options {
	irr_phase phase;
	irr_sampling sampling;
} irr_predict_options;

void irr_predict_options_init(irr_predict_options *o); /* condensed, ATR */

typedef struct irr_prediction irr_prediction;

/* Caller owns *out. Strings in bands are borrowed from `t` and the
 * prediction; keep `t` alive while the prediction is used. */
int irr_predict(irr_prediction **out, const irr_inventory *inv,
                const irr_tables *t, const irr_predict_options *o,
                irr_error *err);
/* The same from an array of group entries (e.g. copied from an inventory,
 * or built by hand in tests and by programs with their own perception).
 * Caller owns *out; `groups` is not kept. */
int irr_predict_groups(irr_prediction **out, const irr_group *groups, size_t ngroups,
                       const irr_tables *t, const irr_predict_options *o,
                       irr_error *err);
void irr_prediction_free(irr_prediction *p);
size_t irr_prediction_count(const irr_prediction *p);
const irr_band *irr_prediction_band(const irr_prediction *p, size_t i);

/* The five spectral regions used to group bands in reports: 0 = above 3000,
 * 1 = 3000-2500, 2 = 2500-2000, 3 = 2000-1500, 4 = fingerprint (< 1500). */
int irr_region_of(double wavenumber);
const char *irr_region_name(int region);

#ifdef __cplusplus
}
#endif
#endif
