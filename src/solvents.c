/* solvents.c: the built-in library of common lab solvents and reagents
 * (group-tables/solvents/solvents.json): names, aliases, SMILES and their
 * strongest tabulated bands, plus the atmospheric CO2, water vapour and
 * moisture bands every check considers. Loaded with cJSON. */
#include "irrecon/solvents.h"
#include "irrecon/tables.h"
#include "solvents.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

#define SOLVENTS_FORMAT "irrecon.solvents/1"
#define MAX_FILE (8u << 20)

struct irr_solvent_library {
	char *path;
	cJSON *root;             /* owns every string below */
	size_t n;
	irr_solvent *items;
	irr_solvent_band *bands; /* all bands, items point into it */
	const char **aliases;
	irr_solvents__air air;
	double (*clusters)[2];
};

static char *read_all(const char *path, size_t *len, irr_error *err)
{
	FILE *f = fopen(path, "rb");
	char *buf = NULL;
	size_t cap = 0, n = 0;
	if (!f) {
		irr_error_set(err, IRR_EIO, path, 0, "cannot open the solvent library");
		return NULL;
	}
	for (;;) {
		if (n + 4096 + 1 > cap) {
			size_t nc = cap ? cap * 2 : 65536;
			char *nb = realloc(buf, nc);
			if (!nb || nc > MAX_FILE) {
				free(nb ? nb : buf);
				fclose(f);
				irr_error_set(err, nb ? IRR_ELIMIT : IRR_ENOMEM, path, 0,
				              nb ? "solvent library larger than 8 MiB" : "out of memory");
				return NULL;
			}
			buf = nb, cap = nc;
		}
		size_t r = fread(buf + n, 1, cap - n - 1, f);
		n += r;
		if (r == 0)
			break;
	}
	if (ferror(f)) {
		free(buf);
		fclose(f);
		irr_error_set(err, IRR_EIO, path, 0, "read error");
		return NULL;
	}
	fclose(f);
	buf[n] = '\0';
	*len = n;
	return buf;
}

static long line_of(const char *text, size_t off)
{
	long line = 1;
	for (size_t i = 0; i < off && text[i]; i++)
		if (text[i] == '\n')
			line++;
	return line;
}

/* Line of the first occurrence of `"name": "<value>"`-ish text, for errors. */
static long line_of_string(const char *text, const char *s)
{
	const char *at = s ? strstr(text, s) : NULL;
	return at ? line_of(text, (size_t)(at - text)) : 0;
}

static int parse_band(const cJSON *jb, irr_solvent_band *b)
{
	const cJSON *label = cJSON_GetObjectItemCaseSensitive(jb, "label");
	const cJSON *win = cJSON_GetObjectItemCaseSensitive(jb, "window");
	const cJSON *typ = cJSON_GetObjectItemCaseSensitive(jb, "typical");
	const cJSON *in = cJSON_GetObjectItemCaseSensitive(jb, "intensity");
	const cJSON *sh = cJSON_GetObjectItemCaseSensitive(jb, "shape");
	const cJSON *src = cJSON_GetObjectItemCaseSensitive(jb, "source");
	if (!cJSON_IsString(label) || !cJSON_IsArray(win) || cJSON_GetArraySize(win) != 2 ||
	    !cJSON_IsNumber(win->child) || !cJSON_IsNumber(win->child->next) ||
	    !cJSON_IsString(in) || !cJSON_IsString(src))
		return -100;
	b->label = label->valuestring;
	b->low = win->child->valuedouble;
	b->high = win->child->next->valuedouble;
	b->typical = cJSON_IsNumber(typ) ? typ->valuedouble : 0.5 * (b->low + b->high);
	b->source = src->valuestring;
	if (!(b->low > 0 && b->high > b->low && b->high < 10000) ||
	    !(b->typical >= b->low && b->typical <= b->high))
		return -101;
	if (irr_intensity_parse(in->valuestring, &b->intensity))
		return -102;
	b->shape = IRR_SHAPE_SHARP;
	if (sh && (!cJSON_IsString(sh) || irr_shape_parse(sh->valuestring, &b->shape)))
		return -103;
	return 0;
}

static const char *band_problem(int code)
{
	switch (code) {
	case -101: return "window must be [low, high] within 0-10000 cm-1 holding 'typical'";
	case -102: return "unknown intensity class";
	case -103: return "unknown shape class";
	default: return "a band needs 'label', 'window' [low, high], 'intensity' and 'source'";
	}
}

static int count_bands(const cJSON *arr)
{
	return cJSON_IsArray(arr) ? cJSON_GetArraySize(arr) : -1;
}

int irr_solvents_load(irr_solvent_library **out, const char *path, irr_error *err)
{
	irr_solvent_library *lib = NULL;
	char *text = NULL, defpath[4096];
	size_t len = 0, nb = 0, na = 0, bi = 0, ai = 0;
	const cJSON *subs, *air, *it;
	int rc = IRR_ENOMEM;
	*out = NULL;
	if (!path) {
		snprintf(defpath, sizeof defpath, "%s/solvents/solvents.json", irr_tables_default_dir());
		path = defpath;
	}
	if (!(text = read_all(path, &len, err)))
		return err ? err->code : IRR_EIO;
	if (!(lib = calloc(1, sizeof *lib)) || !(lib->path = strdup(path)))
		goto nomem;
	{
		const char *end = NULL;
		lib->root = cJSON_ParseWithOpts(text, &end, 1);
		if (!lib->root) {
			rc = irr_error_set(err, IRR_EINPUT, path,
			                   end ? line_of(text, (size_t)(end - text)) : 0,
			                   "not valid JSON");
			goto fail;
		}
	}
	{
		const cJSON *fmt = cJSON_GetObjectItemCaseSensitive(lib->root, "format");
		if (!cJSON_IsString(fmt) || strcmp(fmt->valuestring, SOLVENTS_FORMAT)) {
			rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, "\"format\""),
			                   "'format' must be \"%s\"", SOLVENTS_FORMAT);
			goto fail;
		}
	}
	subs = cJSON_GetObjectItemCaseSensitive(lib->root, "substances");
	air = cJSON_GetObjectItemCaseSensitive(lib->root, "atmosphere");
	if (!cJSON_IsArray(subs) || !cJSON_IsObject(air)) {
		rc = irr_error_set(err, IRR_EINPUT, path, 0, "needs a 'substances' array and an 'atmosphere' object");
		goto fail;
	}
	/* Count first so that every array is allocated once. */
	lib->n = (size_t)cJSON_GetArraySize(subs);
	cJSON_ArrayForEach(it, subs) {
		int k = count_bands(cJSON_GetObjectItemCaseSensitive(it, "bands"));
		const cJSON *al = cJSON_GetObjectItemCaseSensitive(it, "aliases");
		if (k < 0) {
			const cJSON *nm = cJSON_GetObjectItemCaseSensitive(it, "name");
			rc = irr_error_set(err, IRR_EINPUT, path,
			                   cJSON_IsString(nm) ? line_of_string(text, nm->valuestring) : 0,
			                   "every substance needs a 'bands' array");
			goto fail;
		}
		nb += (size_t)k;
		na += cJSON_IsArray(al) ? (size_t)cJSON_GetArraySize(al) : 0;
	}
	const cJSON *co2 = cJSON_GetObjectItemCaseSensitive(air, "carbon_dioxide");
	const cJSON *vap = cJSON_GetObjectItemCaseSensitive(air, "water_vapour");
	const cJSON *moi = cJSON_GetObjectItemCaseSensitive(air, "moisture");
	int nco2 = count_bands(cJSON_GetObjectItemCaseSensitive(co2, "bands"));
	int nmoi = count_bands(cJSON_GetObjectItemCaseSensitive(moi, "bands"));
	const cJSON *cl = cJSON_GetObjectItemCaseSensitive(vap, "clusters");
	if (nco2 < 1 || nmoi < 1 || !cJSON_IsArray(cl)) {
		rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, "\"atmosphere\""),
		                   "'atmosphere' needs carbon_dioxide.bands, moisture.bands and water_vapour.clusters");
		goto fail;
	}
	nb += (size_t)nco2 + (size_t)nmoi;
	lib->items = calloc(lib->n ? lib->n : 1, sizeof *lib->items);
	lib->bands = calloc(nb ? nb : 1, sizeof *lib->bands);
	lib->aliases = calloc(na ? na : 1, sizeof *lib->aliases);
	lib->clusters = calloc((size_t)cJSON_GetArraySize(cl) + 1, sizeof *lib->clusters);
	if (!lib->items || !lib->bands || !lib->aliases || !lib->clusters)
		goto nomem;
	{
		size_t i = 0;
		cJSON_ArrayForEach(it, subs) {
			irr_solvent *s = &lib->items[i++];
			const cJSON *nm = cJSON_GetObjectItemCaseSensitive(it, "name");
			const cJSON *sm = cJSON_GetObjectItemCaseSensitive(it, "smiles");
			const cJSON *al = cJSON_GetObjectItemCaseSensitive(it, "aliases");
			const cJSON *jb;
			if (!cJSON_IsString(nm) || !cJSON_IsString(sm) || !nm->valuestring[0]) {
				rc = irr_error_set(err, IRR_EINPUT, path, 0,
				                   "substance %zu needs a 'name' and a 'smiles'", i);
				goto fail;
			}
			s->name = nm->valuestring;
			s->smiles = sm->valuestring;
			s->aliases = lib->aliases + ai;
			if (cJSON_IsArray(al))
				cJSON_ArrayForEach(jb, al) {
					if (!cJSON_IsString(jb)) {
						rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, s->name),
						                   "%s: aliases must be strings", s->name);
						goto fail;
					}
					lib->aliases[ai++] = jb->valuestring;
					s->naliases++;
				}
			s->bands = lib->bands + bi;
			cJSON_ArrayForEach(jb, cJSON_GetObjectItemCaseSensitive(it, "bands")) {
				int e = parse_band(jb, &lib->bands[bi]);
				if (e) {
					rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, s->name),
					                   "%s: %s", s->name, band_problem(e));
					goto fail;
				}
				bi++;
				s->nbands++;
			}
		}
	}
	{
		const cJSON *jb;
		irr_solvents__air *a = &lib->air;
		a->co2 = lib->bands + bi;
		cJSON_ArrayForEach(jb, cJSON_GetObjectItemCaseSensitive(co2, "bands")) {
			int e = parse_band(jb, &lib->bands[bi]);
			if (e) {
				rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, "carbon_dioxide"),
				                   "carbon_dioxide: %s", band_problem(e));
				goto fail;
			}
			bi++, a->nco2++;
		}
		a->moist = lib->bands + bi;
		cJSON_ArrayForEach(jb, cJSON_GetObjectItemCaseSensitive(moi, "bands")) {
			int e = parse_band(jb, &lib->bands[bi]);
			if (e) {
				rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, "moisture"),
				                   "moisture: %s", band_problem(e));
				goto fail;
			}
			bi++, a->nmoist++;
		}
		cJSON_ArrayForEach(jb, cl) {
			if (!cJSON_IsArray(jb) || cJSON_GetArraySize(jb) != 2 ||
			    !cJSON_IsNumber(jb->child) || !cJSON_IsNumber(jb->child->next) ||
			    !(jb->child->valuedouble < jb->child->next->valuedouble)) {
				rc = irr_error_set(err, IRR_EINPUT, path, line_of_string(text, "\"clusters\""),
				                   "water_vapour.clusters must hold [low, high] pairs");
				goto fail;
			}
			lib->clusters[a->nclusters][0] = jb->child->valuedouble;
			lib->clusters[a->nclusters][1] = jb->child->next->valuedouble;
			a->nclusters++;
		}
		a->clusters = (const double (*)[2])lib->clusters;
		const cJSON *ml = cJSON_GetObjectItemCaseSensitive(vap, "min_lines");
		const cJSON *mf = cJSON_GetObjectItemCaseSensitive(vap, "max_fwhm");
		const cJSON *mr = cJSON_GetObjectItemCaseSensitive(moi, "max_rel_height");
		a->vapour_min_lines = cJSON_IsNumber(ml) ? (int)ml->valuedouble : 3;
		a->vapour_max_fwhm = cJSON_IsNumber(mf) ? mf->valuedouble : 12.0;
		a->moist_max_rel = cJSON_IsNumber(mr) ? mr->valuedouble : 0.3;
	}
	free(text);
	*out = lib;
	return IRR_OK;
nomem:
	rc = irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
fail:
	free(text);
	irr_solvents_free(lib);
	return rc;
}

void irr_solvents_free(irr_solvent_library *lib)
{
	if (!lib)
		return;
	cJSON_Delete(lib->root);
	free(lib->items);
	free(lib->bands);
	free(lib->aliases);
	free(lib->clusters);
	free(lib->path);
	free(lib);
}

size_t irr_solvents_count(const irr_solvent_library *lib)
{
	return lib ? lib->n : 0;
}

const irr_solvent *irr_solvents_get(const irr_solvent_library *lib, size_t i)
{
	return lib && i < lib->n ? &lib->items[i] : NULL;
}

/* Compares names ignoring case, spaces, '-', '_' and ','. */
static int name_eq(const char *a, const char *b)
{
	for (;;) {
		while (*a == ' ' || *a == '-' || *a == '_' || *a == ',')
			a++;
		while (*b == ' ' || *b == '-' || *b == '_' || *b == ',')
			b++;
		if (!*a || !*b)
			return !*a && !*b;
		if (tolower((unsigned char)*a) != tolower((unsigned char)*b))
			return 0;
		a++, b++;
	}
}

const irr_solvent *irr_solvents_find(const irr_solvent_library *lib, const char *name)
{
	if (!lib || !name)
		return NULL;
	for (size_t i = 0; i < lib->n; i++) {
		const irr_solvent *s = &lib->items[i];
		if (name_eq(s->name, name))
			return s;
		for (size_t k = 0; k < s->naliases; k++)
			if (name_eq(s->aliases[k], name))
				return s;
	}
	return NULL;
}

const irr_solvents__air *irr_solvents__atmosphere(const irr_solvent_library *lib)
{
	return lib ? &lib->air : NULL;
}

const char *irr_solvents__path(const irr_solvent_library *lib)
{
	return lib ? lib->path : NULL;
}
