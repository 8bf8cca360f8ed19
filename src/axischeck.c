/* axischeck.c: the wavenumber-axis check against a polystyrene film
 * (European Pharmacopoeia 2.2.24 / Japanese Pharmacopoeia reference bands):
 * picks the bands of the spectrum, matches each reference band to the
 * nearest resolved maximum and judges its deviation. */
#include "irrecon/axischeck.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "peakpick.h"

/* European Pharmacopoeia 2.2.24 (Absorption spectrophotometry, infrared),
 * "Verification of the wavenumber scale", and the Japanese Pharmacopoeia
 * general test on infrared spectrophotometry: polystyrene film bands and
 * permitted tolerances, cm-1. */
static const struct {
	double pos, tol;
} reference[] = {
	{3060.0, 1.5}, {2849.5, 1.5}, {1942.9, 1.5}, {1601.2, 1.0},
	{1583.0, 1.0}, {1154.5, 1.0}, {1028.3, 1.0},
};
#define NREF (sizeof reference / sizeof reference[0])

struct irr_axis_report {
	irr_axis_band band[NREF];
};

const char *irr_axis_status_name(irr_axis_status s)
{
	switch (s) {
	case IRR_AXIS_WITHIN: return "within";
	case IRR_AXIS_OUTSIDE: return "outside";
	case IRR_AXIS_NOT_FOUND: return "not_found";
	}
	return "unknown";
}

void irr_axis_options_init(irr_axis_options *o)
{
	if (!o)
		return;
	/* Wider than any tolerance, so an axis 2-5 cm-1 off shows as
	 * "outside" rather than "not found", and narrower than the gap to the
	 * nearest other polystyrene band (1583/1601: 18 cm-1). */
	o->search_cm = 6.0;
	o->min_snr = 5.0;
}

int irr_axis_check(irr_axis_report **out, const irr_spectrum *s,
                   const irr_axis_options *opt, irr_error *err)
{
	irr_axis_options defo;
	irr_peak_options po;
	irr_peaklist *pl = NULL;
	irr_axis_report *r;
	const char *name;
	double *sat = NULL, lo, hi;
	size_t nsat;
	int rc;

	if (out)
		*out = NULL;
	if (!out || !s)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no spectrum");
	name = irr_spectrum_name(s);
	if (!opt) {
		irr_axis_options_init(&defo);
		opt = &defo;
	}
	if (!(opt->search_cm > 0.0 && opt->search_cm <= 50.0))
		return irr_error_set(err, IRR_EINPUT, name, 0, "search window must be within 0-50 cm-1");
	if (!(opt->min_snr >= 0.0) || !isfinite(opt->min_snr))
		return irr_error_set(err, IRR_EINPUT, name, 0, "minimum signal-to-noise must be >= 0");
	if (!irr_spectrum_is_normalised(s))
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "spectrum is not normalised (call irr_spectrum_normalise first)");

	/* Positions come from the raw trace: the smallest Savitzky-Golay
	 * window (3 points, which leaves the data as they are) and the
	 * three-point interpolation of the picker. No relative floor: 1942.9
	 * is an overtone, weak in any film. */
	irr_peak_options_init(&po);
	po.smooth_cm = 1e-6;
	po.min_snr = opt->min_snr;
	po.min_rel_height = 0.0;
	nsat = irr_spectrum_saturated_count(s);
	if (nsat) {
		sat = malloc(2 * nsat * sizeof *sat);
		if (!sat)
			return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		for (size_t k = 0; k < nsat; k++)
			irr_spectrum_saturated_range(s, k, &sat[2 * k], &sat[2 * k + 1]);
	}
	rc = irr_peaks__pick_xy(&pl, irr_spectrum_x(s), irr_spectrum_y(s), irr_spectrum_points(s),
	                        sat, nsat, &po, name, err);
	free(sat);
	if (rc != IRR_OK)
		return rc;
	r = calloc(1, sizeof *r);
	if (!r) {
		irr_peaklist_free(pl);
		return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	irr_spectrum_range(s, &lo, &hi);
	for (size_t k = 0; k < NREF; k++) {
		irr_axis_band *b = &r->band[k];
		const irr_peak *best = NULL;
		int shoulder = 0, saturated = 0;
		b->reference = reference[k].pos;
		b->tolerance = reference[k].tol;
		b->status = IRR_AXIS_NOT_FOUND;
		b->reason = "";
		for (size_t i = 0; i < irr_peaklist_count(pl); i++) {
			const irr_peak *p = irr_peaklist_get(pl, i);
			if (p->saturated) {
				if (b->reference >= p->low - opt->search_cm && b->reference <= p->high + opt->search_cm)
					saturated = 1;
				continue;
			}
			if (fabs(p->position - b->reference) > opt->search_cm)
				continue;
			if (p->shoulder) {
				shoulder = 1;
				continue;
			}
			if (!best || fabs(p->position - b->reference) < fabs(best->position - b->reference))
				best = p;
		}
		if (best && !saturated) {
			/* Reported, as the references are given, to 0.1 cm-1, and
			 * judged on that value (tolerance inclusive). */
			b->found = floor(best->position * 10.0 + 0.5) / 10.0;
			b->deviation = floor((b->found - b->reference) * 10.0 + 0.5) / 10.0;
			b->status = fabs(b->deviation) <= b->tolerance + 1e-9 ? IRR_AXIS_WITHIN : IRR_AXIS_OUTSIDE;
		} else if (b->reference < lo || b->reference > hi) {
			b->reason = "outside measured range";
		} else if (saturated) {
			b->reason = "saturated band";
		} else if (shoulder) {
			b->reason = "only a shoulder";
		} else {
			b->reason = "no band above noise";
		}
	}
	irr_peaklist_free(pl);
	*out = r;
	return IRR_OK;
}

void irr_axis_report_free(irr_axis_report *r)
{
	free(r);
}

size_t irr_axis_report_count(const irr_axis_report *r)
{
	return r ? NREF : 0;
}

const irr_axis_band *irr_axis_report_band(const irr_axis_report *r, size_t i)
{
	return (r && i < NREF) ? &r->band[i] : NULL;
}

size_t irr_axis_report_resolved(const irr_axis_report *r)
{
	size_t n = 0;
	for (size_t i = 0; r && i < NREF; i++)
		n += r->band[i].status != IRR_AXIS_NOT_FOUND;
	return n;
}

size_t irr_axis_report_outside(const irr_axis_report *r)
{
	size_t n = 0;
	for (size_t i = 0; r && i < NREF; i++)
		n += r->band[i].status == IRR_AXIS_OUTSIDE;
	return n;
}

int irr_axis_report_passed(const irr_axis_report *r)
{
	return r && irr_axis_report_resolved(r) > 0 && irr_axis_report_outside(r) == 0;
}
