/* report_json.c: the JSON result of a check, schema "irrecon.check/1"
 * (docs/check-result-schema.md), as a cJSON tree or as compact text
 * written directly; numbers are rounded before printing so that the same
 * input gives byte-identical output. */
#include "irrecon/report.h"
#include "irrecon/sha256.h"
#include "json_write.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

static double round_to(double v, int decimals)
{
	/* The same values pow(10, d) gives (powers of ten up to 1e22 are exact
	 * doubles), without its cost on every number written. */
	static const double p10[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9};
	double f = decimals >= 0 && decimals < 10 ? p10[decimals] : pow(10.0, decimals);
	double r = floor(v * f + 0.5) / f;
	return r == 0.0 ? 0.0 : r; /* no "-0" */
}

/* One description of the result, two outputs: a cJSON tree (for callers
 * that embed the result in a larger document, and the indented print) or
 * compact text written directly (the batch's JSON Lines, several times
 * faster than printing a tree). Both give the same document. */
typedef struct em {
	irr_jw *w;                              /* text when set, else tree */
	cJSON *stack[IRR_JW_MAX_DEPTH];
	cJSON *root;
	int depth;
	int ok;
} em;

static void e_add(em *e, const char *k, cJSON *item)
{
	if (!item) {
		e->ok = 0;
		return;
	}
	if (e->depth == 0) {
		if (e->root) {
			cJSON_Delete(item);
			e->ok = 0;
			return;
		}
		e->root = item;
	} else if (k) {
		cJSON_AddItemToObject(e->stack[e->depth - 1], k, item);
	} else {
		cJSON_AddItemToArray(e->stack[e->depth - 1], item);
	}
}

static void e_open(em *e, const char *k, int array)
{
	cJSON *item;
	if (!e->ok)
		return;
	if (e->w) {
		(array ? irr_jw__begin_array : irr_jw__begin_object)(e->w, k);
		return;
	}
	if (e->depth >= IRR_JW_MAX_DEPTH) {
		e->ok = 0;
		return;
	}
	item = array ? cJSON_CreateArray() : cJSON_CreateObject();
	e_add(e, k, item);
	if (e->ok)
		e->stack[e->depth++] = item;
}

static void e_obj(em *e, const char *k) { e_open(e, k, 0); }
static void e_arr(em *e, const char *k) { e_open(e, k, 1); }

static void e_end(em *e)
{
	if (!e->ok)
		return;
	if (e->w)
		irr_jw__end(e->w);
	else if (e->depth > 0)
		e->depth--;
}

/* A NULL string is null. */
static void e_str(em *e, const char *k, const char *v)
{
	if (!e->ok)
		return;
	if (e->w)
		irr_jw__string(e->w, k, v);
	else
		e_add(e, k, v ? cJSON_CreateString(v) : cJSON_CreateNull());
}

/* Array members: a NULL string is a fault, as cJSON_CreateString(NULL). */
static void e_item(em *e, const char *v)
{
	if (!v)
		e->ok = 0;
	else
		e_str(e, NULL, v);
}

static void e_num(em *e, const char *k, double v)
{
	if (!e->ok)
		return;
	if (e->w)
		irr_jw__number(e->w, k, v);
	else
		e_add(e, k, cJSON_CreateNumber(v));
}

/* A number rounded to `decimals`. */
static void e_round(em *e, const char *k, double v, int decimals)
{
	e_num(e, k, round_to(v, decimals));
}

static void e_bool(em *e, const char *k, int v)
{
	if (!e->ok)
		return;
	if (e->w)
		irr_jw__bool(e->w, k, v);
	else
		e_add(e, k, cJSON_CreateBool(v));
}

static void e_null(em *e, const char *k)
{
	if (!e->ok)
		return;
	if (e->w)
		irr_jw__null(e->w, k);
	else
		e_add(e, k, cJSON_CreateNull());
}

static void e_window(em *e, const char *k, double lo, double hi)
{
	e_arr(e, k);
	e_round(e, NULL, lo, 1);
	e_round(e, NULL, hi, 1);
	e_end(e);
}

static void other_json(em *e, const irr_check *c, const irr_other *r)
{
	e_obj(e, NULL);
	e_str(e, "given", r->given);
	e_str(e, "name", r->name);
	e_str(e, "smiles", r->smiles);
	e_str(e, "formula", r->formula);
	e_str(e, "status", irr_presence_name(r->presence));
	e_num(e, "attributed_bands", (double)r->nattributed);
	e_arr(e, "marker_bands");
	for (size_t i = 0; e->ok && i < r->nmarkers; i++) {
		const irr_marker *m = &r->markers[i];
		e_obj(e, NULL);
		e_str(e, "label", m->label);
		e_window(e, "window", m->low, m->high);
		e_round(e, "typical", m->typical, 1);
		e_str(e, "intensity", irr_intensity_name(m->intensity));
		e_bool(e, "observable", m->observable);
		e_bool(e, "found", m->peak >= 0);
		if (m->peak >= 0) {
			const irr_observed *ob = irr_check_observed(c, (size_t)m->peak);
			e_round(e, "peak", ob->peak->position, 1);
			e_round(e, "relative_strength", m->rel_strength, 3);
		} else {
			e_null(e, "peak");
			e_null(e, "relative_strength");
		}
		e_end(e);
	}
	e_end(e);
	e_end(e);
}

static void describe(em *e, const irr_check *c)
{
	const irr_check_options *opt = irr_check_get_options(c);
	const irr_peaklist *pl = irr_check_peaklist(c);
	size_t n;

	e_obj(e, NULL);
	e_str(e, "schema", IRR_CHECK_SCHEMA);
	e_str(e, "sample", opt->sample_id);
	e_str(e, "verdict", irr_verdict_name(irr_check_verdict(c)));
	e_round(e, "score", irr_check_score(c), 3);

	e_arr(e, "reasons");
	n = irr_check_reason_count(c);
	for (size_t i = 0; e->ok && i < n; i++) {
		const irr_reason *r = irr_check_reason(c, i);
		e_obj(e, NULL);
		e_str(e, "code", r->code);
		e_str(e, "text", r->text);
		e_bool(e, "decisive", r->decisive);
		e_end(e);
	}
	e_end(e);

	e_obj(e, "structure");
	e_str(e, "smiles", irr_check_structure_smiles(c));
	e_str(e, "formula", irr_check_structure_formula(c));
	{
		const irr_inventory *inv = irr_check_inventory(c);
		e_arr(e, "groups");
		for (size_t i = 0; e->ok && i < irr_inventory_group_count(inv); i++) {
			const irr_group *gr = irr_inventory_group(inv, i);
			e_obj(e, NULL);
			e_str(e, "id", gr->id);
			e_num(e, "count", gr->count);
			e_end(e);
		}
		e_end(e);
	}
	e_end(e);

	e_arr(e, "expected");
	n = irr_check_expected_count(c);
	for (size_t i = 0; e->ok && i < n; i++) {
		const irr_expected *x = irr_check_expected(c, i);
		const irr_band *b = x->band;
		e_obj(e, NULL);
		e_str(e, "group", b->group_id);
		e_str(e, "group_name", b->group_name);
		e_str(e, "label", b->label);
		e_window(e, "window", b->low, b->high);
		e_round(e, "typical", b->typical, 1);
		e_str(e, "intensity", irr_intensity_name(b->intensity));
		e_str(e, "shape", irr_shape_name(b->shape));
		e_round(e, "weight", x->weight, 3);
		e_bool(e, "overtone", b->overtone);
		e_str(e, "status", irr_band_status_name(x->status));
		if (x->peak >= 0) {
			e_round(e, "peak", irr_check_observed(c, (size_t)x->peak)->peak->position, 1);
			e_round(e, "deviation", x->deviation, 1);
		} else {
			e_null(e, "peak");
			e_null(e, "deviation");
		}
		e_bool(e, "shared", x->shared);
		e_str(e, "note", x->note);
		e_str(e, "source", b->source);
		e_end(e);
	}
	e_end(e);

	e_arr(e, "observed");
	n = irr_check_observed_count(c);
	for (size_t i = 0; e->ok && i < n; i++) {
		const irr_observed *ob = irr_check_observed(c, i);
		const irr_peak *p = ob->peak;
		e_obj(e, NULL);
		e_round(e, "position", p->position, 1);
		e_round(e, "height", p->height, 4);
		e_round(e, "relative_height", p->rel_height, 3);
		e_round(e, "fwhm", p->fwhm, 1);
		e_str(e, "intensity", irr_intensity_name(p->intensity));
		e_bool(e, "broad", p->broad);
		e_bool(e, "saturated", p->saturated);
		e_bool(e, "significant", ob->significant);
		e_str(e, "status", irr_peak_status_name(ob->status));
		if (ob->expected >= 0)
			e_num(e, "explained_by", (double)ob->expected);
		else
			e_null(e, "explained_by");
		if (ob->status == IRR_PEAK_ATTRIBUTED) {
			e_obj(e, "attributed_to");
			e_str(e, "kind", irr_source_kind_name(ob->attributed_kind));
			e_str(e, "name", ob->attributed_name);
			e_str(e, "smiles", ob->attributed_smiles);
			e_str(e, "band", ob->attributed_label);
			e_end(e);
		} else {
			e_null(e, "attributed_to");
		}
		e_arr(e, "candidates");
		for (size_t k = 0; e->ok && k < ob->ncandidates; k++)
			e_item(e, ob->candidates[k]);
		e_end(e);
		e_end(e);
	}
	e_end(e);

	{
		static const char *const keys[] = {"starting_materials", "reagents", "solvents"};
		for (int kind = 0; e->ok && kind < 3; kind++) {
			e_arr(e, keys[kind]);
			for (size_t i = 0; e->ok && i < irr_check_other_count(c); i++) {
				const irr_other *r = irr_check_other(c, i);
				if ((int)r->kind == kind)
					other_json(e, c, r);
			}
			e_end(e);
		}
	}

	e_arr(e, "cautions");
	for (size_t i = 0; e->ok && i < irr_check_caution_count(c); i++)
		e_item(e, irr_check_caution(c, i));
	e_end(e);

	e_obj(e, "provenance");
	{
		const irr_spectrum *s = irr_check_spectrum(c);
		double lo = 0, hi = 0;
		e_str(e, "tool", "irrecon");
		e_str(e, "version", irr_version());
		e_str(e, "tables_digest", irr_tables_digest(irr_check_tables(c)));
		e_obj(e, "input");
		e_str(e, "name", opt->input_name);
		e_str(e, "sha256", opt->input_sha256);
		e_str(e, "kind", s ? "spectrum" : "peak_list");
		e_str(e, "format", s ? irr_spectrum_source_format(s) : NULL);
		irr_peaklist_range(pl, &lo, &hi);
		e_window(e, "range", lo, hi);
		e_num(e, "peaks", (double)irr_peaklist_count(pl));
		e_end(e);
		e_obj(e, "options");
		e_str(e, "phase", irr_phase_name(opt->phase));
		e_str(e, "sampling", irr_sampling_name(opt->sampling));
		e_obj(e, "peaks");
		e_round(e, "smooth_cm", opt->peaks.smooth_cm, 3);
		e_round(e, "min_snr", opt->peaks.min_snr, 3);
		e_round(e, "min_rel_height", opt->peaks.min_rel_height, 4);
		e_round(e, "strong_frac", opt->peaks.strong_frac, 3);
		e_round(e, "medium_frac", opt->peaks.medium_frac, 3);
		e_round(e, "broad_cm", opt->peaks.broad_cm, 2);
		e_bool(e, "shoulders", opt->peaks.shoulders);
		e_bool(e, "baseline", opt->peaks.baseline);
		e_end(e);
		e_end(e);
	}
	e_end(e);
	e_end(e);
}

void *irr_report_json_object(const irr_check *c)
{
	em e;
	if (!c || !irr_check_prediction(c))
		return NULL;
	memset(&e, 0, sizeof e);
	e.ok = 1;
	describe(&e, c);
	if (!e.ok || e.depth != 0) {
		cJSON_Delete(e.root);
		return NULL;
	}
	return e.root;
}

int irr_report__json_line(char **out, const irr_check *c)
{
	irr_jw w;
	em e;
	*out = NULL;
	if (!c || !irr_check_prediction(c))
		return IRR_EINPUT;
	memset(&w, 0, sizeof w);
	memset(&e, 0, sizeof e);
	e.w = &w;
	e.ok = 1;
	describe(&e, c);
	if (!e.ok || w.bad || w.out.oom || w.depth != 0 || !w.out.p) {
		free(w.out.p);
		return w.bad ? IRR_EINPUT : IRR_ENOMEM;
	}
	*out = w.out.p;
	return IRR_OK;
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
