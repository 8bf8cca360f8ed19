/* request.c: one check described as data: the JSON request of the
 * notebook-workflow step ("irrecon.request/1") and the setters that fill it
 * for embedding programs and batch rows. Running it is in request_run.c. */
#include "irrecon/request.h"
#include "irrecon/sha256.h"
#include "request_internal.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <cJSON.h>

#define REQUEST_MAX_BYTES ((size_t)256 * 1024 * 1024)

static char *dup_str(const char *s)
{
	size_t n;
	char *d;
	if (!s)
		return NULL;
	n = strlen(s);
	d = malloc(n + 1);
	if (d)
		memcpy(d, s, n + 1);
	return d;
}

static int set_str(char **slot, const char *s)
{
	char *d = NULL;
	if (s && !(d = dup_str(s)))
		return IRR_ENOMEM;
	free(*slot);
	*slot = d;
	return IRR_OK;
}

static int list_add(irr_strlist *l, const char *s)
{
	char *d;
	if (!s)
		return IRR_EINPUT;
	if (l->n == l->cap) {
		size_t cap = l->cap ? 2 * l->cap : 4;
		char **v = realloc(l->v, cap * sizeof *v);
		if (!v)
			return IRR_ENOMEM;
		l->v = v;
		l->cap = cap;
	}
	if (!(d = dup_str(s)))
		return IRR_ENOMEM;
	l->v[l->n++] = d;
	return IRR_OK;
}

static void list_clear(irr_strlist *l)
{
	for (size_t i = 0; i < l->n; i++)
		free(l->v[i]);
	free(l->v);
	memset(l, 0, sizeof *l);
}

static int list_copy(irr_strlist *dst, const irr_strlist *src)
{
	for (size_t i = 0; i < src->n; i++)
		if (list_add(dst, src->v[i]) != IRR_OK)
			return IRR_ENOMEM;
	return IRR_OK;
}

int irr_request_create(irr_request **out, irr_error *err)
{
	irr_request *r;
	*out = NULL;
	r = calloc(1, sizeof *r);
	if (!r)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	r->phase = IRR_PHASE_CONDENSED;
	r->sampling = IRR_SAMPLING_ATR;
	irr_read_options_init(&r->read);
	irr_peak_options_init(&r->peak);
	*out = r;
	return IRR_OK;
}

void irr_request_free(irr_request *r)
{
	if (!r)
		return;
	free(r->sample);
	free(r->structure);
	free(r->spectrum_file);
	free(r->x);
	free(r->y);
	free(r->peaks_file);
	free(r->peaks_text);
	free(r->base_dir);
	free(r->tables_dir);
	free(r->name);
	list_clear(&r->starting_materials);
	list_clear(&r->reagents);
	list_clear(&r->solvents);
	list_clear(&r->extra_tables);
	free(r);
}

int irr_request_clone(irr_request **out, const irr_request *r, irr_error *err)
{
	irr_request *c;
	int rc = irr_request_create(&c, err);
	if (rc != IRR_OK)
		return rc;
	c->phase = r->phase;
	c->sampling = r->sampling;
	c->read = r->read;
	c->peak = r->peak;
	c->units = r->units;
	c->solvents_lib = r->solvents_lib;
	c->structures = r->structures;
	if (set_str(&c->sample, r->sample) || set_str(&c->structure, r->structure) ||
	    set_str(&c->spectrum_file, r->spectrum_file) ||
	    set_str(&c->peaks_file, r->peaks_file) || set_str(&c->base_dir, r->base_dir) ||
	    set_str(&c->tables_dir, r->tables_dir) || set_str(&c->name, r->name) ||
	    list_copy(&c->starting_materials, &r->starting_materials) ||
	    list_copy(&c->reagents, &r->reagents) || list_copy(&c->solvents, &r->solvents) ||
	    list_copy(&c->extra_tables, &r->extra_tables) ||
	    (r->n && irr_request_set_spectrum_xy(c, r->x, r->y, r->n, r->units)) ||
	    (r->peaks_text && irr_request_set_peaks_text(c, r->peaks_text, r->peaks_len))) {
		irr_request_free(c);
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	*out = c;
	return IRR_OK;
}

int irr_request_set_sample(irr_request *r, const char *s) { return set_str(&r->sample, s); }
int irr_request_set_structure(irr_request *r, const char *s) { return set_str(&r->structure, s); }
int irr_request_set_base_dir(irr_request *r, const char *s) { return set_str(&r->base_dir, s); }

int irr_request__set_name(irr_request *r, const char *s) { return set_str(&r->name, s); }
int irr_request__set_tables_dir(irr_request *r, const char *s) { return set_str(&r->tables_dir, s); }
int irr_request__add_extra_table(irr_request *r, const char *s) { return list_add(&r->extra_tables, s); }

static void clear_spectrum(irr_request *r)
{
	free(r->spectrum_file);
	free(r->x);
	free(r->y);
	free(r->peaks_file);
	free(r->peaks_text);
	r->spectrum_file = r->peaks_file = r->peaks_text = NULL;
	r->x = r->y = NULL;
	r->n = 0;
	r->peaks_len = 0;
}

/* The spectrum sources exclude each other: the last one set wins. */
int irr_request_set_spectrum_file(irr_request *r, const char *path)
{
	char *d = NULL;
	if (path && !(d = dup_str(path)))
		return IRR_ENOMEM;
	clear_spectrum(r);
	r->spectrum_file = d;
	return IRR_OK;
}

int irr_request_set_peaks_file(irr_request *r, const char *path)
{
	char *d = NULL;
	if (path && !(d = dup_str(path)))
		return IRR_ENOMEM;
	clear_spectrum(r);
	r->peaks_file = d;
	return IRR_OK;
}

int irr_request_set_peaks_text(irr_request *r, const char *text, size_t len)
{
	char *d;
	if (!text)
		return IRR_EINPUT;
	d = malloc(len + 1);
	if (!d)
		return IRR_ENOMEM;
	memcpy(d, text, len);
	d[len] = '\0';
	clear_spectrum(r);
	r->peaks_text = d;
	r->peaks_len = len;
	return IRR_OK;
}

int irr_request_set_spectrum_xy(irr_request *r, const double *x, const double *y,
                                size_t n, irr_yunits units)
{
	double *cx, *cy;
	if (!x || !y || n < 2 || units < IRR_Y_UNKNOWN || units > IRR_Y_ARBITRARY)
		return IRR_EINPUT;
	cx = malloc(n * sizeof *cx);
	cy = malloc(n * sizeof *cy);
	if (!cx || !cy) {
		free(cx);
		free(cy);
		return IRR_ENOMEM;
	}
	memcpy(cx, x, n * sizeof *cx);
	memcpy(cy, y, n * sizeof *cy);
	clear_spectrum(r);
	r->x = cx;
	r->y = cy;
	r->n = n;
	r->units = units;
	return IRR_OK;
}

int irr_request_add_starting_material(irr_request *r, const char *s) { return list_add(&r->starting_materials, s); }
int irr_request_add_reagent(irr_request *r, const char *s) { return list_add(&r->reagents, s); }
int irr_request_add_solvent(irr_request *r, const char *s) { return list_add(&r->solvents, s); }

int irr_request_set_phase(irr_request *r, irr_phase p)
{
	if (p < IRR_PHASE_CONDENSED || p > IRR_PHASE_GAS)
		return IRR_EINPUT;
	r->phase = p;
	return IRR_OK;
}

int irr_request_use_solvents(irr_request *r, const irr_solvent_library *lib)
{
	r->solvents_lib = lib;
	return IRR_OK;
}

int irr_request_use_structure_cache(irr_request *r, irr_structure_cache *sc)
{
	r->structures = sc;
	return IRR_OK;
}

int irr_request_set_sampling(irr_request *r, irr_sampling s)
{
	if (s < IRR_SAMPLING_ATR || s > IRR_SAMPLING_TRANSMISSION)
		return IRR_EINPUT;
	r->sampling = s;
	return IRR_OK;
}

const char *irr_request_sample(const irr_request *r) { return r->sample; }
const char *irr_request_structure(const irr_request *r) { return r->structure; }
const char *irr_request_spectrum_file(const irr_request *r) { return r->spectrum_file; }
const char *irr_request_peaks_file(const irr_request *r) { return r->peaks_file; }
const char *irr_request_base_dir(const irr_request *r) { return r->base_dir; }
size_t irr_request_starting_material_count(const irr_request *r) { return r->starting_materials.n; }
size_t irr_request_reagent_count(const irr_request *r) { return r->reagents.n; }
size_t irr_request_solvent_count(const irr_request *r) { return r->solvents.n; }
irr_phase irr_request_phase(const irr_request *r) { return r->phase; }
irr_sampling irr_request_sampling(const irr_request *r) { return r->sampling; }
irr_read_options *irr_request_read_options(irr_request *r) { return &r->read; }
irr_peak_options *irr_request_peak_options(irr_request *r) { return &r->peak; }
const char *irr_request_tables_dir(const irr_request *r) { return r->tables_dir; }
size_t irr_request_extra_table_count(const irr_request *r) { return r->extra_tables.n; }

const char *irr_request_starting_material(const irr_request *r, size_t i)
{
	return i < r->starting_materials.n ? r->starting_materials.v[i] : NULL;
}
const char *irr_request_reagent(const irr_request *r, size_t i)
{
	return i < r->reagents.n ? r->reagents.v[i] : NULL;
}
const char *irr_request_solvent(const irr_request *r, size_t i)
{
	return i < r->solvents.n ? r->solvents.v[i] : NULL;
}
const char *irr_request_extra_table(const irr_request *r, size_t i)
{
	return i < r->extra_tables.n ? r->extra_tables.v[i] : NULL;
}

size_t irr_request_spectrum_xy(const irr_request *r, const double **x,
                               const double **y, irr_yunits *units)
{
	if (x)
		*x = r->x;
	if (y)
		*y = r->y;
	if (units)
		*units = r->units;
	return r->n;
}

int irr_request_resolve(char **out, const irr_request *r, const char *path,
                        irr_error *err)
{
	size_t nb, np;
	char *d;
	*out = NULL;
	if (!path || !*path)
		return irr_error_set(err, IRR_EINPUT, r->name ? r->name : "", 0, "empty path");
	np = strlen(path);
	if (path[0] == '/' || !r->base_dir || !*r->base_dir || !strcmp(r->base_dir, ".")) {
		d = dup_str(path);
	} else {
		nb = strlen(r->base_dir);
		d = malloc(nb + np + 2);
		if (d) {
			memcpy(d, r->base_dir, nb);
			d[nb] = '/';
			memcpy(d + nb + 1, path, np + 1);
		}
	}
	if (!d)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	*out = d;
	return IRR_OK;
}

/* ---- JSON ---------------------------------------------------------------- */

/* cJSON keeps no positions, so a semantic error points at the first line
 * where the key is written: close enough to find it in a hand-made file. */
static long line_of_key(const char *json, size_t len, const char *key)
{
	char pat[80];
	size_t pl;
	long line = 1;
	snprintf(pat, sizeof pat, "\"%s\"", key);
	pl = strlen(pat);
	for (size_t i = 0; i + pl <= len; i++) {
		if (json[i] == '\n')
			line++;
		else if (json[i] == '"' && !memcmp(json + i, pat, pl))
			return line;
	}
	return 0;
}

typedef struct parse_ctx {
	const char *json;
	size_t len;
	const char *name;
	irr_error *err;
} parse_ctx;

static int bad(const parse_ctx *c, const char *key, const char *fmt, const char *what)
{
	return irr_error_set(c->err, IRR_EINPUT, c->name, key ? line_of_key(c->json, c->len, key) : 0,
	                     fmt, key ? key : "", what ? what : "");
}

static int get_string(const parse_ctx *c, const cJSON *item, const char **out)
{
	if (!cJSON_IsString(item) || !item->valuestring)
		return bad(c, item->string, "\"%s\" must be a string%s", NULL);
	if (!item->valuestring[0])
		return bad(c, item->string, "\"%s\" is empty%s", NULL);
	*out = item->valuestring;
	return IRR_OK;
}

/* A list of names or SMILES: an array of strings, or one string that may
 * hold several separated by ';' (the CSV manifest form). */
static int get_list(const parse_ctx *c, const cJSON *item, irr_strlist *l)
{
	const cJSON *e;
	if (cJSON_IsNull(item))
		return IRR_OK;
	if (cJSON_IsString(item))
		return irr_request__add_split(l, item->valuestring) ? bad(c, item->string, "\"%s\": out of memory%s", NULL) : IRR_OK;
	if (!cJSON_IsArray(item))
		return bad(c, item->string, "\"%s\" must be an array of strings%s", NULL);
	cJSON_ArrayForEach(e, item) {
		if (!cJSON_IsString(e) || !e->valuestring || !e->valuestring[0])
			return bad(c, item->string, "\"%s\" must hold only non-empty strings%s", NULL);
		if (list_add(l, e->valuestring) != IRR_OK)
			return irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory");
	}
	return IRR_OK;
}

int irr_request__add_split(irr_strlist *l, const char *s)
{
	const char *p = s;
	while (p && *p) {
		const char *e = strchr(p, ';');
		size_t n = e ? (size_t)(e - p) : strlen(p);
		const char *a = p, *b = p + n;
		while (a < b && (*a == ' ' || *a == '\t'))
			a++;
		while (b > a && (b[-1] == ' ' || b[-1] == '\t' || b[-1] == '\r'))
			b--;
		if (b > a) {
			char *d = malloc((size_t)(b - a) + 1);
			int rc;
			if (!d)
				return IRR_ENOMEM;
			memcpy(d, a, (size_t)(b - a));
			d[b - a] = '\0';
			rc = list_add(l, d);
			free(d);
			if (rc)
				return rc;
		}
		p = e ? e + 1 : NULL;
	}
	return IRR_OK;
}

static int get_number(const parse_ctx *c, const cJSON *item, double *out)
{
	if (!cJSON_IsNumber(item))
		return bad(c, item->string, "\"%s\" must be a number%s", NULL);
	*out = item->valuedouble;
	return IRR_OK;
}

static int get_bool(const parse_ctx *c, const cJSON *item, int *out)
{
	if (!cJSON_IsBool(item))
		return bad(c, item->string, "\"%s\" must be true or false%s", NULL);
	*out = cJSON_IsTrue(item);
	return IRR_OK;
}

static int get_array(const parse_ctx *c, const cJSON *item, const char *key,
                     double **out, size_t *n)
{
	size_t cnt = (size_t)cJSON_GetArraySize(item), i = 0;
	const cJSON *e;
	double *v;
	if (!cJSON_IsArray(item))
		return bad(c, key, "\"%s\" must be an array of numbers%s", NULL);
	v = malloc((cnt ? cnt : 1) * sizeof *v);
	if (!v)
		return irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory");
	cJSON_ArrayForEach(e, item) {
		if (!cJSON_IsNumber(e)) {
			free(v);
			return irr_error_set(c->err, IRR_EINPUT, c->name, line_of_key(c->json, c->len, key),
			                     "\"%s\"[%zu] is not a number (NaN and infinity are not JSON)", key, i);
		}
		v[i++] = e->valuedouble;
	}
	*out = v;
	*n = cnt;
	return IRR_OK;
}

static int parse_yunits(const char *s, irr_yunits *out)
{
	static const struct { const char *name; irr_yunits u; } names[] = {
		{"unknown", IRR_Y_UNKNOWN}, {"transmittance", IRR_Y_TRANSMITTANCE},
		{"percent_transmittance", IRR_Y_PERCENT_T}, {"%t", IRR_Y_PERCENT_T},
		{"absorbance", IRR_Y_ABSORBANCE}, {"reflectance", IRR_Y_REFLECTANCE},
		{"kubelka_munk", IRR_Y_KUBELKA_MUNK}, {"arbitrary", IRR_Y_ARBITRARY}};
	for (size_t i = 0; i < sizeof names / sizeof names[0]; i++)
		if (!strcasecmp(s, names[i].name)) {
			*out = names[i].u;
			return IRR_OK;
		}
	return IRR_EINPUT;
}

static int parse_spectrum(const parse_ctx *c, irr_request *r, const cJSON *item)
{
	const cJSON *e, *jx = NULL, *jy = NULL;
	const char *file = NULL;
	irr_yunits units = IRR_Y_UNKNOWN;
	double *x = NULL, *y = NULL;
	size_t nx = 0, ny = 0;
	int rc;
	if (cJSON_IsString(item)) {
		if ((rc = get_string(c, item, &file)) != IRR_OK)
			return rc;
		return irr_request_set_spectrum_file(r, file) ? irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory") : IRR_OK;
	}
	if (!cJSON_IsObject(item))
		return bad(c, "spectrum", "\"%s\" must be a file name or an object with \"file\" or \"x\" and \"y\"%s", NULL);
	cJSON_ArrayForEach(e, item) {
		const char *k = e->string;
		if (!strcmp(k, "file")) {
			if ((rc = get_string(c, e, &file)) != IRR_OK)
				return rc;
		} else if (!strcmp(k, "x")) {
			jx = e;
		} else if (!strcmp(k, "y")) {
			jy = e;
		} else if (!strcmp(k, "y_units")) {
			const char *s;
			if ((rc = get_string(c, e, &s)) != IRR_OK)
				return rc;
			if (parse_yunits(s, &units) != IRR_OK)
				return bad(c, k, "\"%s\": unknown units '%s' (absorbance, transmittance, percent_transmittance, reflectance, kubelka_munk, arbitrary)", s);
		} else if (!strcmp(k, "block")) {
			double v = 0;
			if ((rc = get_number(c, e, &v)) != IRR_OK)
				return rc;
			if (v < 0 || v > 100000 || v != (int)v)
				return bad(c, k, "\"%s\" must be a block number (1, 2, ...)%s", NULL);
			r->read.block = (int)v;
		} else {
			return bad(c, k, "unknown key \"%s\" in \"spectrum\"%s", NULL);
		}
	}
	if (file && (jx || jy))
		return bad(c, "spectrum", "\"%s\" gives both a file and inline arrays%s", NULL);
	if (file)
		return irr_request_set_spectrum_file(r, file) ? irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory") : IRR_OK;
	if (!jx || !jy)
		return bad(c, "spectrum", "\"%s\" needs \"file\", or both \"x\" and \"y\"%s", NULL);
	if ((rc = get_array(c, jx, "x", &x, &nx)) != IRR_OK)
		return rc;
	if ((rc = get_array(c, jy, "y", &y, &ny)) != IRR_OK) {
		free(x);
		return rc;
	}
	if (nx != ny || nx < 2) {
		free(x);
		free(y);
		if (nx != ny)
			return irr_error_set(c->err, IRR_EINPUT, c->name, line_of_key(c->json, c->len, "y"),
			                     "\"x\" has %zu values but \"y\" has %zu", nx, ny);
		return bad(c, "x", "\"%s\" needs at least two points%s", NULL);
	}
	rc = irr_request_set_spectrum_xy(r, x, y, nx, units);
	free(x);
	free(y);
	return rc ? irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory") : IRR_OK;
}

static int parse_peaks(const parse_ctx *c, irr_request *r, const cJSON *item)
{
	const char *file;
	char *text;
	int rc;
	if (cJSON_IsString(item)) {
		if ((rc = get_string(c, item, &file)) != IRR_OK)
			return rc;
		return irr_request_set_peaks_file(r, file) ? irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory") : IRR_OK;
	}
	if (!cJSON_IsArray(item))
		return bad(c, "peaks", "\"%s\" must be a file name or an array of peaks%s", NULL);
	/* The peak-list reader owns the format: hand it the array as JSON. */
	text = cJSON_PrintUnformatted(item);
	if (!text)
		return irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory");
	rc = irr_request_set_peaks_text(r, text, strlen(text));
	cJSON_free(text);
	return rc ? irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory") : IRR_OK;
}

static int parse_peak_options(const parse_ctx *c, irr_request *r, const cJSON *obj)
{
	const cJSON *e;
	int rc;
	if (!cJSON_IsObject(obj))
		return bad(c, "peak_options", "\"%s\" must be an object%s", NULL);
	cJSON_ArrayForEach(e, obj) {
		const char *k = e->string;
		double v = 0;
		int b = 0;
		if (!strcmp(k, "shoulders") || !strcmp(k, "baseline")) {
			if ((rc = get_bool(c, e, &b)) != IRR_OK)
				return rc;
			if (!strcmp(k, "shoulders"))
				r->peak.shoulders = b;
			else
				r->peak.baseline = b;
			continue;
		}
		if ((rc = get_number(c, e, &v)) != IRR_OK)
			return rc;
		if (v < 0)
			return bad(c, k, "\"%s\" must not be negative%s", NULL);
		if (!strcmp(k, "smooth_cm"))
			r->peak.smooth_cm = v;
		else if (!strcmp(k, "min_snr"))
			r->peak.min_snr = v;
		else if (!strcmp(k, "min_rel_height"))
			r->peak.min_rel_height = v;
		else if (!strcmp(k, "strong_frac"))
			r->peak.strong_frac = v;
		else if (!strcmp(k, "medium_frac"))
			r->peak.medium_frac = v;
		else if (!strcmp(k, "broad_cm"))
			r->peak.broad_cm = v;
		else
			return bad(c, k, "unknown key \"%s\" in \"peak_options\"%s", NULL);
	}
	return IRR_OK;
}

static int parse_options(const parse_ctx *c, irr_request *r, const cJSON *obj)
{
	const cJSON *e;
	int rc, b = 0;
	if (!cJSON_IsObject(obj))
		return bad(c, "options", "\"%s\" must be an object%s", NULL);
	cJSON_ArrayForEach(e, obj) {
		const char *k = e->string, *s;
		if (!strcmp(k, "decimal_comma")) {
			if ((rc = get_bool(c, e, &b)) != IRR_OK)
				return rc;
			r->read.decimal_comma = b;
		} else if (!strcmp(k, "x_micrometers")) {
			if ((rc = get_bool(c, e, &b)) != IRR_OK)
				return rc;
			r->read.x_micrometers = b;
		} else if (!strcmp(k, "y_units")) {
			if ((rc = get_string(c, e, &s)) != IRR_OK)
				return rc;
			if (parse_yunits(s, &r->read.y_units) != IRR_OK)
				return bad(c, k, "\"%s\": unknown units '%s'", s);
		} else if (!strcmp(k, "block")) {
			double v = 0;
			if ((rc = get_number(c, e, &v)) != IRR_OK)
				return rc;
			if (v < 0 || v > 100000 || v != (int)v)
				return bad(c, k, "\"%s\" must be a block number (1, 2, ...)%s", NULL);
			r->read.block = (int)v;
		} else if (!strcmp(k, "tables")) {
			if ((rc = get_string(c, e, &s)) != IRR_OK)
				return rc;
			if (set_str(&r->tables_dir, s))
				return irr_error_set(c->err, IRR_ENOMEM, c->name, 0, "out of memory");
		} else if (!strcmp(k, "extra_tables")) {
			if ((rc = get_list(c, e, &r->extra_tables)) != IRR_OK)
				return rc;
		} else if (!strcmp(k, "peak_options")) {
			if ((rc = parse_peak_options(c, r, e)) != IRR_OK)
				return rc;
		} else {
			return bad(c, k, "unknown key \"%s\" in \"options\"%s", NULL);
		}
	}
	return IRR_OK;
}

int irr_request__from_json(irr_request *r, const cJSON *root, const char *json,
                           size_t len, const char *name, irr_error *err)
{
	parse_ctx c = {json, len, name, err};
	const cJSON *e;
	int rc, have_spectrum = 0;
	if (!cJSON_IsObject(root))
		return irr_error_set(err, IRR_EINPUT, name, 1, "a request must be a JSON object");
	cJSON_ArrayForEach(e, root) {
		const char *k = e->string, *s;
		if (!strcmp(k, "schema")) {
			if ((rc = get_string(&c, e, &s)) != IRR_OK)
				return rc;
			if (strcmp(s, IRR_REQUEST_SCHEMA))
				return bad(&c, k, "\"%s\" is '%s'; this version reads \"" IRR_REQUEST_SCHEMA "\"", s);
		} else if (!strcmp(k, "sample")) {
			if (cJSON_IsNull(e))
				continue;
			if ((rc = get_string(&c, e, &s)) != IRR_OK)
				return rc;
			if (set_str(&r->sample, s))
				return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		} else if (!strcmp(k, "structure")) {
			if ((rc = get_string(&c, e, &s)) != IRR_OK)
				return rc;
			if (set_str(&r->structure, s))
				return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		} else if (!strcmp(k, "spectrum") || !strcmp(k, "peaks")) {
			if (have_spectrum)
				return bad(&c, k, "\"%s\": give one of \"spectrum\" and \"peaks\", not both%s", NULL);
			have_spectrum = 1;
			rc = !strcmp(k, "spectrum") ? parse_spectrum(&c, r, e) : parse_peaks(&c, r, e);
			if (rc != IRR_OK)
				return rc;
		} else if (!strcmp(k, "starting_materials")) {
			if ((rc = get_list(&c, e, &r->starting_materials)) != IRR_OK)
				return rc;
		} else if (!strcmp(k, "reagents")) {
			if ((rc = get_list(&c, e, &r->reagents)) != IRR_OK)
				return rc;
		} else if (!strcmp(k, "solvents")) {
			if ((rc = get_list(&c, e, &r->solvents)) != IRR_OK)
				return rc;
		} else if (!strcmp(k, "phase")) {
			if ((rc = get_string(&c, e, &s)) != IRR_OK)
				return rc;
			if (irr_phase_parse(s, &r->phase) != IRR_OK)
				return bad(&c, k, "\"%s\": unknown phase '%s' (condensed, solution, gas)", s);
		} else if (!strcmp(k, "sampling")) {
			if ((rc = get_string(&c, e, &s)) != IRR_OK)
				return rc;
			if (irr_sampling_parse(s, &r->sampling) != IRR_OK)
				return bad(&c, k, "\"%s\": unknown sampling '%s' (atr, transmission)", s);
		} else if (!strcmp(k, "options")) {
			if ((rc = parse_options(&c, r, e)) != IRR_OK)
				return rc;
		} else {
			return bad(&c, k, "unknown key \"%s\"%s", NULL);
		}
	}
	return IRR_OK;
}

static long line_at(const char *s, const char *end)
{
	long line = 1;
	for (; s < end; s++)
		if (*s == '\n')
			line++;
	return line;
}

int irr_request__parse_json(cJSON **out, const char *json, size_t len,
                            const char *name, long first_line, irr_error *err)
{
	const char *end = NULL;
	cJSON *root;
	*out = NULL;
	if (memchr(json, '\0', len))
		return irr_error_set(err, IRR_EINPUT, name, first_line, "binary data (a NUL byte) in JSON text");
	{
		size_t k = 0;
		while (k < len && (json[k] == ' ' || json[k] == '\n' || json[k] == '\r' || json[k] == '\t'))
			k++;
		if (k == len)
			return irr_error_set(err, IRR_EINPUT, name, first_line, "empty: no JSON object");
	}
	/* Not cJSON's own null-termination check: it fails whenever the
	 * length excludes the NUL, and manifest lines are slices. */
	root = cJSON_ParseWithLengthOpts(json, len, &end, 0);
	if (root && end) {
		const char *p = end;
		while (p < json + len && (*p == ' ' || *p == '\t' || *p == '\r' || *p == '\n'))
			p++;
		if (p < json + len) {
			cJSON_Delete(root);
			return irr_error_set(err, IRR_EINPUT, name, first_line + line_at(json, p) - 1,
			                     "text after the end of the JSON value");
		}
	}
	if (!root) {
		long line = first_line;
		if (end && end >= json && end <= json + len)
			line = first_line + line_at(json, end) - 1;
		return irr_error_set(err, IRR_EINPUT, name, line, "not valid JSON here");
	}
	*out = root;
	return IRR_OK;
}

int irr_request_parse(irr_request **out, const char *json, size_t len,
                      const char *name, const char *base_dir, irr_error *err)
{
	irr_request *r;
	cJSON *root;
	int rc;
	*out = NULL;
	if (!name)
		name = "<request>";
	if ((rc = irr_request__parse_json(&root, json, len, name, 1, err)) != IRR_OK)
		return rc;
	if ((rc = irr_request_create(&r, err)) != IRR_OK) {
		cJSON_Delete(root);
		return rc;
	}
	if (set_str(&r->name, name) || (base_dir && set_str(&r->base_dir, base_dir))) {
		rc = irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	} else {
		rc = irr_request__from_json(r, root, json, len, name, err);
	}
	cJSON_Delete(root);
	if (rc != IRR_OK) {
		irr_request_free(r);
		return rc;
	}
	*out = r;
	return IRR_OK;
}

int irr_request__slurp(char **out, size_t *len, const char *path, size_t max_bytes,
                       irr_error *err)
{
	struct stat st;
	char *buf;
	size_t n = 0;
	int fd;
	*out = NULL;
	/* Plain descriptors, not stdio: the whole file goes into one buffer of
	 * its own size, which a FILE would only copy through its own.
	 * O_NONBLOCK: a FIFO given as input is refused below instead of
	 * waiting for a writer; regular files ignore it. */
	fd = open(path, O_RDONLY | O_CLOEXEC | O_NONBLOCK);
	if (fd < 0)
		return irr_error_set(err, IRR_EIO, path, 0, "cannot open: %s", strerror(errno));
	if (fstat(fd, &st) != 0 || !S_ISREG(st.st_mode)) {
		close(fd);
		return irr_error_set(err, IRR_EIO, path, 0, "not a regular file");
	}
	if ((size_t)st.st_size > max_bytes) {
		close(fd);
		return irr_error_set(err, IRR_ELIMIT, path, 0, "file is %lld bytes, more than the limit of %zu",
		                     (long long)st.st_size, max_bytes);
	}
	buf = malloc((size_t)st.st_size + 1);
	if (!buf) {
		close(fd);
		return irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
	}
	/* What the file held when it was measured (a file that grows meanwhile
	 * is read to that size, one that shrinks to its end). */
	while (n < (size_t)st.st_size) {
		ssize_t got = read(fd, buf + n, (size_t)st.st_size - n);
		if (got < 0 && errno == EINTR)
			continue;
		if (got < 0) {
			int e = errno;
			close(fd);
			free(buf);
			return irr_error_set(err, IRR_EIO, path, 0, "read failed: %s", strerror(e));
		}
		if (got == 0)
			break;
		n += (size_t)got;
	}
	close(fd);
	buf[n] = '\0';
	*out = buf;
	*len = n;
	return IRR_OK;
}

int irr_request__dirname(char **out, const char *path)
{
	const char *slash = strrchr(path, '/');
	size_t n;
	if (!slash) {
		*out = dup_str(".");
	} else {
		n = slash == path ? 1 : (size_t)(slash - path);
		*out = malloc(n + 1);
		if (*out) {
			memcpy(*out, path, n);
			(*out)[n] = '\0';
		}
	}
	return *out ? IRR_OK : IRR_ENOMEM;
}

int irr_request_read_file(irr_request **out, const char *path, irr_error *err)
{
	char *buf, *dir;
	size_t len;
	int rc;
	*out = NULL;
	if ((rc = irr_request__slurp(&buf, &len, path, REQUEST_MAX_BYTES, err)) != IRR_OK)
		return rc;
	if (irr_request__dirname(&dir, path) != IRR_OK) {
		free(buf);
		return irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
	}
	rc = irr_request_parse(out, buf, len, path, dir, err);
	free(buf);
	free(dir);
	return rc;
}

/* ---- Running ------------------------------------------------------------- */

static int other_list(irr_check *c, irr_other_kind kind, const irr_strlist *l,
                      irr_error *err)
{
	int rc;
	for (size_t i = 0; i < l->n; i++)
		if ((rc = irr_check_add_other(c, kind, l->v[i], err)) != IRR_OK)
			return rc;
	return IRR_OK;
}

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int irr_request_run(irr_check **out, const irr_request *r, const irr_tables *t,
                    irr_error *err)
{
	return irr_request__run_timed(out, r, t, NULL, err);
}

int irr_request__run_timed(irr_check **out, const irr_request *r,
                           const irr_tables *t, double *read_seconds,
                           irr_error *err)
{
	double t0 = read_seconds ? now_s() : 0;
	irr_check *c = NULL;
	irr_check_options o;
	irr_spectrum *s = NULL;
	irr_peaklist *pl = NULL;
	char *path = NULL, *data = NULL, hex[65];
	const char *name = r->name ? r->name : "<request>";
	size_t len = 0, max = r->read.max_bytes ? r->read.max_bytes : REQUEST_MAX_BYTES;
	int rc;

	*out = NULL;
	if (!r->structure)
		return irr_error_set(err, IRR_EINPUT, name, 0, "no structure: give a SMILES in \"structure\"");
	if (!r->spectrum_file && !r->peaks_file && !r->n && !r->peaks_text)
		return irr_error_set(err, IRR_EINPUT, name, 0, "no spectrum: give \"spectrum\" (a file or x/y arrays) or \"peaks\"");

	irr_check_options_init(&o);
	o.phase = r->phase;
	o.sampling = r->sampling;
	o.peaks = r->peak;
	o.sample_id = r->sample;

	/* Read the input file once: its bytes feed both the reader and the
	 * SHA-256 in the provenance. */
	if (r->spectrum_file || r->peaks_file) {
		rc = irr_request_resolve(&path, r, r->spectrum_file ? r->spectrum_file : r->peaks_file, err);
		if (rc != IRR_OK)
			goto done;
		if ((rc = irr_request__slurp(&data, &len, path, max, err)) != IRR_OK)
			goto done;
		irr_sha256_data_hex(data, len, hex);
		o.input_name = path;
		o.input_sha256 = hex;
		if (r->spectrum_file)
			rc = irr_spectrum_read_memory(&s, data, len, path, &r->read, err);
		else
			rc = irr_peaklist_read_memory(&pl, data, len, path, err);
	} else if (r->n) {
		o.input_name = "inline x/y arrays";
		rc = irr_spectrum_from_xy(&s, r->x, r->y, r->n, r->units, name, err);
	} else {
		o.input_name = "inline peak list";
		rc = irr_peaklist_read_memory(&pl, r->peaks_text, r->peaks_len, name, err);
	}
	if (rc != IRR_OK)
		goto done;
	if (read_seconds)
		*read_seconds = now_s() - t0;

	if ((rc = irr_check_create(&c, t, err)) != IRR_OK)
		goto done;
	irr_check_set_options(c, &o);
	if (r->solvents_lib && (rc = irr_check_use_solvents(c, r->solvents_lib, err)) != IRR_OK)
		goto done;
	irr_check_use_structure_cache(c, r->structures);
	if ((rc = irr_check_set_structure_named(c, r->structure, name, err)) != IRR_OK ||
	    (rc = other_list(c, IRR_OTHER_STARTING_MATERIAL, &r->starting_materials, err)) != IRR_OK ||
	    (rc = other_list(c, IRR_OTHER_REAGENT, &r->reagents, err)) != IRR_OK ||
	    (rc = other_list(c, IRR_OTHER_SOLVENT, &r->solvents, err)) != IRR_OK)
		goto done;
	if (s) {
		rc = irr_check_set_spectrum(c, s, err);
		s = NULL;
	} else {
		rc = irr_check_set_peaks(c, pl, err);
		pl = NULL;
	}
	if (rc != IRR_OK || (rc = irr_check_run(c, err)) != IRR_OK)
		goto done;
	*out = c;
	c = NULL;
done:
	irr_check_free(c);
	irr_spectrum_free(s);
	irr_peaklist_free(pl);
	free(data);
	free(path);
	return rc;
}
