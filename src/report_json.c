/* report_json.c: the JSON result of a check, schema "irrecon.check/1"
 * (docs/check-result-schema.md). Built with cJSON; numbers are rounded
 * before printing so that the same input gives byte-identical output. */
#include "irrecon/report.h"
#include "irrecon/sha256.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

static double round_to(double v, int decimals)
{
	double f = pow(10.0, decimals);
	double r = floor(v * f + 0.5) / f;
	return r == 0.0 ? 0.0 : r; /* no "-0" */
}

/* Adds a number rounded to `decimals`; returns 0 on allocation failure. */
static int add_num(cJSON *o, const char *k, double v, int decimals)
{
	return cJSON_AddNumberToObject(o, k, round_to(v, decimals)) != NULL;
}

static int add_str(cJSON *o, const char *k, const char *v)
{
	return (v ? cJSON_AddStringToObject(o, k, v) : cJSON_AddNullToObject(o, k)) != NULL;
}

static cJSON *window(double lo, double hi)
{
	cJSON *a = cJSON_CreateArray();
	if (!a)
		return NULL;
	cJSON_AddItemToArray(a, cJSON_CreateNumber(round_to(lo, 1)));
	cJSON_AddItemToArray(a, cJSON_CreateNumber(round_to(hi, 1)));
	return cJSON_GetArraySize(a) == 2 ? a : (cJSON_Delete(a), NULL);
}

static cJSON *other_json(const irr_check *c, const irr_other *r)
{
	cJSON *o = cJSON_CreateObject(), *mk;
	int ok = o != NULL;
	ok = ok && add_str(o, "given", r->given) && add_str(o, "name", r->name) &&
	     add_str(o, "smiles", r->smiles) && add_str(o, "formula", r->formula) &&
	     add_str(o, "status", irr_presence_name(r->presence));
	ok = ok && cJSON_AddNumberToObject(o, "attributed_bands", (double)r->nattributed);
	ok = ok && (mk = cJSON_AddArrayToObject(o, "marker_bands"));
	for (size_t i = 0; ok && i < r->nmarkers; i++) {
		const irr_marker *m = &r->markers[i];
		cJSON *j = cJSON_CreateObject();
		ok = j && (cJSON_AddItemToArray(mk, j), 1);
		ok = ok && add_str(j, "label", m->label) &&
		     cJSON_AddItemToObject(j, "window", window(m->low, m->high)) &&
		     add_num(j, "typical", m->typical, 1) &&
		     add_str(j, "intensity", irr_intensity_name(m->intensity)) &&
		     cJSON_AddBoolToObject(j, "observable", m->observable) &&
		     cJSON_AddBoolToObject(j, "found", m->peak >= 0);
		if (ok && m->peak >= 0) {
			const irr_observed *ob = irr_check_observed(c, (size_t)m->peak);
			ok = add_num(j, "peak", ob->peak->position, 1) &&
			     add_num(j, "relative_strength", m->rel_strength, 3);
		} else if (ok) {
			ok = cJSON_AddNullToObject(j, "peak") && cJSON_AddNullToObject(j, "relative_strength");
		}
	}
	if (!ok) {
		cJSON_Delete(o);
		return NULL;
	}
	return o;
}

void *irr_report_json_object(const irr_check *c)
{
	cJSON *root, *a, *o;
	const irr_check_options *opt;
	const irr_peaklist *pl;
	int ok;
	size_t n;
	if (!c || !irr_check_prediction(c))
		return NULL;
	opt = irr_check_get_options(c);
	pl = irr_check_peaklist(c);
	root = cJSON_CreateObject();
	ok = root != NULL;
	ok = ok && add_str(root, "schema", IRR_CHECK_SCHEMA) &&
	     add_str(root, "sample", opt->sample_id) &&
	     add_str(root, "verdict", irr_verdict_name(irr_check_verdict(c))) &&
	     add_num(root, "score", irr_check_score(c), 3);

	ok = ok && (a = cJSON_AddArrayToObject(root, "reasons"));
	n = irr_check_reason_count(c);
	for (size_t i = 0; ok && i < n; i++) {
		const irr_reason *r = irr_check_reason(c, i);
		o = cJSON_CreateObject();
		ok = o && (cJSON_AddItemToArray(a, o), 1) && add_str(o, "code", r->code) &&
		     add_str(o, "text", r->text) && cJSON_AddBoolToObject(o, "decisive", r->decisive);
	}

	ok = ok && (o = cJSON_AddObjectToObject(root, "structure"));
	ok = ok && add_str(o, "smiles", irr_check_structure_smiles(c)) &&
	     add_str(o, "formula", irr_check_structure_formula(c));
	if (ok) {
		const irr_inventory *inv = irr_check_inventory(c);
		cJSON *g = cJSON_AddArrayToObject(o, "groups");
		ok = g != NULL;
		for (size_t i = 0; ok && i < irr_inventory_group_count(inv); i++) {
			const irr_group *gr = irr_inventory_group(inv, i);
			cJSON *s = cJSON_CreateObject();
			ok = s && (cJSON_AddItemToArray(g, s), 1) && add_str(s, "id", gr->id) &&
			     cJSON_AddNumberToObject(s, "count", gr->count);
		}
	}

	ok = ok && (a = cJSON_AddArrayToObject(root, "expected"));
	n = irr_check_expected_count(c);
	for (size_t i = 0; ok && i < n; i++) {
		const irr_expected *e = irr_check_expected(c, i);
		const irr_band *b = e->band;
		o = cJSON_CreateObject();
		ok = o && (cJSON_AddItemToArray(a, o), 1) && add_str(o, "group", b->group_id) &&
		     add_str(o, "group_name", b->group_name) && add_str(o, "label", b->label) &&
		     cJSON_AddItemToObject(o, "window", window(b->low, b->high)) &&
		     add_num(o, "typical", b->typical, 1) &&
		     add_str(o, "intensity", irr_intensity_name(b->intensity)) &&
		     add_str(o, "shape", irr_shape_name(b->shape)) &&
		     add_num(o, "weight", e->weight, 3) &&
		     cJSON_AddBoolToObject(o, "overtone", b->overtone) &&
		     add_str(o, "status", irr_band_status_name(e->status));
		if (ok && e->peak >= 0) {
			ok = add_num(o, "peak", irr_check_observed(c, (size_t)e->peak)->peak->position, 1) &&
			     add_num(o, "deviation", e->deviation, 1);
		} else if (ok) {
			ok = cJSON_AddNullToObject(o, "peak") && cJSON_AddNullToObject(o, "deviation");
		}
		ok = ok && cJSON_AddBoolToObject(o, "shared", e->shared) && add_str(o, "note", e->note) &&
		     add_str(o, "source", b->source);
	}

	ok = ok && (a = cJSON_AddArrayToObject(root, "observed"));
	n = irr_check_observed_count(c);
	for (size_t i = 0; ok && i < n; i++) {
		const irr_observed *ob = irr_check_observed(c, i);
		const irr_peak *p = ob->peak;
		cJSON *cd;
		o = cJSON_CreateObject();
		ok = o && (cJSON_AddItemToArray(a, o), 1) && add_num(o, "position", p->position, 1) &&
		     add_num(o, "height", p->height, 4) && add_num(o, "relative_height", p->rel_height, 3) &&
		     add_num(o, "fwhm", p->fwhm, 1) &&
		     add_str(o, "intensity", irr_intensity_name(p->intensity)) &&
		     cJSON_AddBoolToObject(o, "broad", p->broad) &&
		     cJSON_AddBoolToObject(o, "saturated", p->saturated) &&
		     cJSON_AddBoolToObject(o, "significant", ob->significant) &&
		     add_str(o, "status", irr_peak_status_name(ob->status));
		if (ok && ob->expected >= 0)
			ok = cJSON_AddNumberToObject(o, "explained_by", (double)ob->expected) != NULL;
		else if (ok)
			ok = cJSON_AddNullToObject(o, "explained_by") != NULL;
		if (ok && ob->status == IRR_PEAK_ATTRIBUTED) {
			cJSON *at = cJSON_AddObjectToObject(o, "attributed_to");
			ok = at && add_str(at, "kind", irr_source_kind_name(ob->attributed_kind)) &&
			     add_str(at, "name", ob->attributed_name) &&
			     add_str(at, "smiles", ob->attributed_smiles) &&
			     add_str(at, "band", ob->attributed_label);
		} else if (ok) {
			ok = cJSON_AddNullToObject(o, "attributed_to") != NULL;
		}
		ok = ok && (cd = cJSON_AddArrayToObject(o, "candidates"));
		for (size_t k = 0; ok && k < ob->ncandidates; k++) {
			cJSON *s = cJSON_CreateString(ob->candidates[k]);
			ok = s && (cJSON_AddItemToArray(cd, s), 1);
		}
	}

	{
		static const char *const keys[] = {"starting_materials", "reagents", "solvents"};
		for (int kind = 0; ok && kind < 3; kind++) {
			ok = (a = cJSON_AddArrayToObject(root, keys[kind])) != NULL;
			for (size_t i = 0; ok && i < irr_check_other_count(c); i++) {
				const irr_other *r = irr_check_other(c, i);
				if ((int)r->kind != kind)
					continue;
				o = other_json(c, r);
				ok = o && (cJSON_AddItemToArray(a, o), 1);
			}
		}
	}

	ok = ok && (a = cJSON_AddArrayToObject(root, "cautions"));
	for (size_t i = 0; ok && i < irr_check_caution_count(c); i++) {
		cJSON *s = cJSON_CreateString(irr_check_caution(c, i));
		ok = s && (cJSON_AddItemToArray(a, s), 1);
	}

	ok = ok && (o = cJSON_AddObjectToObject(root, "provenance"));
	if (ok) {
		const irr_spectrum *s = irr_check_spectrum(c);
		cJSON *in, *op, *pk;
		double lo = 0, hi = 0;
		ok = add_str(o, "tool", "irrecon") && add_str(o, "version", irr_version()) &&
		     add_str(o, "tables_digest", irr_tables_digest(irr_check_tables(c)));
		ok = ok && (in = cJSON_AddObjectToObject(o, "input"));
		ok = ok && add_str(in, "name", opt->input_name) && add_str(in, "sha256", opt->input_sha256) &&
		     add_str(in, "kind", s ? "spectrum" : "peak_list") &&
		     add_str(in, "format", s ? irr_spectrum_source_format(s) : NULL);
		if (ok) {
			irr_peaklist_range(pl, &lo, &hi);
			ok = cJSON_AddItemToObject(in, "range", window(lo, hi)) &&
			     cJSON_AddNumberToObject(in, "peaks", (double)irr_peaklist_count(pl));
		}
		ok = ok && (op = cJSON_AddObjectToObject(o, "options"));
		ok = ok && add_str(op, "phase", irr_phase_name(opt->phase)) &&
		     add_str(op, "sampling", irr_sampling_name(opt->sampling));
		ok = ok && (pk = cJSON_AddObjectToObject(op, "peaks"));
		ok = ok && add_num(pk, "smooth_cm", opt->peaks.smooth_cm, 3) &&
		     add_num(pk, "min_snr", opt->peaks.min_snr, 3) &&
		     add_num(pk, "min_rel_height", opt->peaks.min_rel_height, 4) &&
		     add_num(pk, "strong_frac", opt->peaks.strong_frac, 3) &&
		     add_num(pk, "medium_frac", opt->peaks.medium_frac, 3) &&
		     add_num(pk, "broad_cm", opt->peaks.broad_cm, 2) &&
		     cJSON_AddBoolToObject(pk, "shoulders", opt->peaks.shoulders) &&
		     cJSON_AddBoolToObject(pk, "baseline", opt->peaks.baseline);
	}
	if (!ok) {
		cJSON_Delete(root);
		return NULL;
	}
	return root;
}

int irr_report_json(char **out, const irr_check *c)
{
	cJSON *root;
	char *txt;
	size_t n;
	*out = NULL;
	if (!c || !irr_check_prediction(c))
		return IRR_EINPUT;
	root = irr_report_json_object(c);
	if (!root)
		return IRR_ENOMEM;
	txt = cJSON_Print(root);
	cJSON_Delete(root);
	if (!txt)
		return IRR_ENOMEM;
	n = strlen(txt);
	*out = malloc(n + 2);
	if (!*out) {
		cJSON_free(txt);
		return IRR_ENOMEM;
	}
	memcpy(*out, txt, n);
	(*out)[n] = '\n';
	(*out)[n + 1] = '\0';
	cJSON_free(txt);
	return IRR_OK;
}
