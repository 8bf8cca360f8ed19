/* tables.c: loads the group-frequency tables (JSON files under
 * group-tables/, format "irrecon.group-table/1", described in
 * group-tables/README.md) into memory, checks every field, and indexes the
 * groups by perception key and by id so that prediction does no file I/O or
 * JSON work per molecule. */
#include "irrecon/tables.h"
#include "irrecon/keys.h"
#include "irrecon/sha256.h"
#include "irrecon/structure.h"

#include <cjson/cJSON.h>
#include <dirent.h>
#include <errno.h>
#include <limits.h>
#include <math.h>
#include <pthread.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#ifndef IRR_SOURCE_TABLES_DIR
#define IRR_SOURCE_TABLES_DIR "group-tables"
#endif
#ifndef IRR_INSTALL_TABLES_DIR
#define IRR_INSTALL_TABLES_DIR "/usr/local/share/irrecon/group-tables"
#endif

#define TABLE_FORMAT "irrecon.group-table/1"
/* A table is hand-written text; anything this large is not one. */
#define TABLE_MAX_BYTES (8L * 1024 * 1024)
/* Wavenumber range a band window may take (mid-IR and a little beyond). */
#define WN_MIN 50.0
#define WN_MAX 5000.0

/* Perception keys from perceive.h. A table keyed on anything else would
 * never match, so a misspelt key is an error rather than a silent no-op. */
/* Attributes a context rule may test (perceive.h irr_group_attrs, the
 * measuring conditions, and the instance count). */
static const char *const rule_attrs[] = {
	"conjugated", "ring_size", "n_h", "aryl", "hbond_intra", "count",
	"pattern", "phase", "sampling", NULL
};
static const char *const patterns[] = {
	"mono", "ortho", "meta", "para", "1,2,3", "1,2,4", "1,3,5", "penta_hexa",
	"other", "vinyl", "vinylidene", "cis", "trans", "trisubstituted",
	"tetrasubstituted", "unknown", "unsubstituted", "imidazole", "pyrazole",
	"triazole", "tetrazole", "oxazole", "isoxazole", "oxadiazole", "thiazole",
	"isothiazole", "thiadiazole", "azole", "pyridazine", "pyrimidine", "pyrazine",
	"1,3,5-triazine", "triazine", "tetrazine", "azine", "", NULL
};

/* --- arena: every string and array of a table set lives here ----------- */

typedef struct chunk {
	struct chunk *next;
	size_t used, cap;
	_Alignas(16) unsigned char data[];
} chunk;

typedef struct key_entry {
	const char *key;
	size_t group;
} key_entry;

struct irr_tables {
	irr_table_group *groups;
	size_t ngroups, capgroups;
	key_entry *by_key;   /* sorted by key, then load order */
	size_t nby_key;
	size_t *by_id;       /* group indices sorted by id */
	chunk *arena;
	irr_sha256 sha;
	char digest[65];
};

static void *arena_alloc(irr_tables *t, size_t n)
{
	chunk *c = t->arena;
	n = (n + 15) & ~(size_t)15;
	if (!n)
		n = 16;
	if (!c || c->cap - c->used < n) {
		size_t cap = n > 65536 ? n : 65536;
		c = malloc(sizeof *c + cap);
		if (!c)
			return NULL;
		c->cap = cap;
		c->used = 0;
		c->next = t->arena;
		t->arena = c;
	}
	void *p = c->data + c->used;
	c->used += n;
	return p;
}

static char *arena_strdup(irr_tables *t, const char *s)
{
	size_t n = strlen(s) + 1;
	char *p = arena_alloc(t, n);
	if (p)
		memcpy(p, s, n);
	return p;
}

void irr_tables_free(irr_tables *t)
{
	if (!t)
		return;
	for (chunk *c = t->arena, *next; c; c = next) {
		next = c->next;
		free(c);
	}
	free(t->groups);
	free(t->by_key);
	free(t->by_id);
	free(t);
}

/* --- default directory --------------------------------------------------- */

static int is_dir(const char *p)
{
	struct stat st;
	return p && *p && stat(p, &st) == 0 && S_ISDIR(st.st_mode);
}

static char default_dir[PATH_MAX + 64];
static pthread_once_t default_once = PTHREAD_ONCE_INIT;

static void find_default_dir(void)
{
	char exe[PATH_MAX];
	ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
	/* An installed program finds the tables beside it first, so a stale
	 * source tree never shadows the installed data; a program run from
	 * the build tree has no ../share and falls through to the source. */
	if (n > 0) {
		exe[n] = '\0';
		char *slash = strrchr(exe, '/');
		if (slash) {
			*slash = '\0';
			snprintf(default_dir, sizeof default_dir,
			         "%s/../share/irrecon/group-tables", exe);
			if (is_dir(default_dir))
				return;
		}
	}
	if (is_dir(IRR_SOURCE_TABLES_DIR))
		snprintf(default_dir, sizeof default_dir, "%s", IRR_SOURCE_TABLES_DIR);
	else
		snprintf(default_dir, sizeof default_dir, "%s", IRR_INSTALL_TABLES_DIR);
}

const char *irr_tables_default_dir(void)
{
	const char *env = getenv("IRRECON_TABLES");
	if (env && *env)
		return env;
	pthread_once(&default_once, find_default_dir);
	return default_dir;
}

/* --- reading and locating ------------------------------------------------ */

static int read_file(const char *path, char **out, size_t *len, irr_error *err)
{
	FILE *f = fopen(path, "rb");
	char *buf = NULL;
	size_t n = 0, cap = 0;
	if (!f)
		return irr_error_set(err, IRR_EIO, path, 0, "cannot open table: %s", strerror(errno));
	for (;;) {
		if (cap - n < 4096) {
			size_t ncap = cap ? cap * 2 : 16384;
			char *nb;
			if ((long)ncap > TABLE_MAX_BYTES + 8192) {
				free(buf);
				fclose(f);
				return irr_error_set(err, IRR_ELIMIT, path, 0,
				                     "table file larger than %ld bytes", TABLE_MAX_BYTES);
			}
			nb = realloc(buf, ncap + 1);
			if (!nb) {
				free(buf);
				fclose(f);
				return irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
			}
			buf = nb, cap = ncap;
		}
		size_t r = fread(buf + n, 1, cap - n, f);
		n += r;
		if (r == 0)
			break;
	}
	if (ferror(f)) {
		int e = errno;
		free(buf);
		fclose(f);
		return irr_error_set(err, IRR_EIO, path, 0, "read error: %s", strerror(e));
	}
	fclose(f);
	buf[n] = '\0';
	*out = buf;
	*len = n;
	return IRR_OK;
}

static long line_of(const char *buf, size_t off)
{
	long line = 1;
	for (size_t i = 0; i < off && buf[i]; i++)
		if (buf[i] == '\n')
			line++;
	return line;
}

/* Line of `"id": "<id>"` in the text, searching from *from (groups come in
 * text order, so a repeated id is found at its second place): cJSON keeps
 * no positions, and a chemist fixing a table wants the line of the group. */
static long line_of_id(const char *buf, const char **from, const char *id)
{
	size_t idlen = strlen(id);
	for (const char *p = strstr(*from, "\"id\""); p; p = strstr(p + 1, "\"id\"")) {
		const char *q = p + 4;
		while (*q == ' ' || *q == '\t' || *q == '\r' || *q == '\n')
			q++;
		if (*q++ != ':')
			continue;
		while (*q == ' ' || *q == '\t' || *q == '\r' || *q == '\n')
			q++;
		if (*q == '"' && !strncmp(q + 1, id, idlen) && q[1 + idlen] == '"') {
			*from = q + 1;
			return line_of(buf, (size_t)(p - buf));
		}
	}
	return 0;
}

/* --- field checking ------------------------------------------------------ */

typedef struct ctx {
	irr_tables *t;
	const char *path;
	const char *text;
	const char *cursor;     /* where the search for the next group id starts */
	const cJSON *sources;   /* the file's "sources" abbreviations, or NULL */
	const char *gid;        /* group being read ("" before its id is known) */
	long gline;
	int gindex;
	irr_error *err;
} ctx;

static int fail(ctx *c, const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 2, 3)))
#endif
	;

static int fail(ctx *c, const char *fmt, ...)
{
	char msg[900];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(msg, sizeof msg, fmt, ap);
	va_end(ap);
	if (c->gid && *c->gid)
		return irr_error_set(c->err, IRR_EINPUT, c->path, c->gline, "group '%s': %s", c->gid, msg);
	if (c->gindex >= 0)
		return irr_error_set(c->err, IRR_EINPUT, c->path, c->gline, "groups[%d]: %s", c->gindex, msg);
	return irr_error_set(c->err, IRR_EINPUT, c->path, c->gline, "%s", msg);
}

static int in_list(const char *s, const char *const *list)
{
	for (size_t i = 0; list[i]; i++)
		if (!strcmp(s, list[i]))
			return 1;
	return 0;
}

/* Fields starting with '_' or named "comment" are free notes for readers. */
static int check_fields(ctx *c, const cJSON *obj, const char *where, const char *const *allowed)
{
	for (const cJSON *it = obj->child; it; it = it->next) {
		const char *k = it->string ? it->string : "";
		if (k[0] == '_' || !strcmp(k, "comment") || in_list(k, allowed))
			continue;
		return fail(c, "%s: unknown field '%s'", where, k);
	}
	return IRR_OK;
}

static int get_string(ctx *c, const cJSON *obj, const char *where, const char *field,
                      int required, const char **out)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(obj, field);
	*out = NULL;
	if (!v) {
		if (required)
			return fail(c, "%s: missing field '%s'", where, field);
		return IRR_OK;
	}
	if (!cJSON_IsString(v) || !v->valuestring)
		return fail(c, "%s: field '%s' must be a string", where, field);
	*out = v->valuestring;
	return IRR_OK;
}

static int get_number(ctx *c, const cJSON *obj, const char *where, const char *field,
                      int required, int *present, double *out)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(obj, field);
	if (present)
		*present = v != NULL;
	if (!v) {
		if (required)
			return fail(c, "%s: missing field '%s'", where, field);
		return IRR_OK;
	}
	if (!cJSON_IsNumber(v) || !isfinite(v->valuedouble))
		return fail(c, "%s: field '%s' must be a number", where, field);
	*out = v->valuedouble;
	return IRR_OK;
}

static int get_bool(ctx *c, const cJSON *obj, const char *where, const char *field, int *out)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(obj, field);
	if (!v)
		return IRR_OK;
	if (!cJSON_IsBool(v))
		return fail(c, "%s: field '%s' must be true or false", where, field);
	*out = cJSON_IsTrue(v) ? 1 : 0;
	return IRR_OK;
}

static int get_window(ctx *c, const cJSON *obj, const char *where, int required,
                      int *present, double *lo, double *hi)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(obj, "window");
	*present = v != NULL;
	if (!v) {
		if (required)
			return fail(c, "%s: missing field 'window'", where);
		return IRR_OK;
	}
	if (!cJSON_IsArray(v) || cJSON_GetArraySize(v) != 2 ||
	    !cJSON_IsNumber(v->child) || !cJSON_IsNumber(v->child->next))
		return fail(c, "%s: field 'window' must be [low, high] in cm-1", where);
	*lo = v->child->valuedouble;
	*hi = v->child->next->valuedouble;
	if (!(*lo >= WN_MIN && *hi <= WN_MAX && *lo < *hi))
		return fail(c, "%s: window [%g, %g] must have %g <= low < high <= %g cm-1",
		            where, *lo, *hi, WN_MIN, WN_MAX);
	return IRR_OK;
}

/* Expands a source abbreviation defined in the file's "sources" object. */
static const char *expand_source(ctx *c, const char *s)
{
	if (s && c->sources) {
		const cJSON *v = cJSON_GetObjectItemCaseSensitive(c->sources, s);
		if (cJSON_IsString(v) && v->valuestring)
			return v->valuestring;
	}
	return s;
}

static int check_window(ctx *c, const char *where, double lo, double hi, double typ)
{
	if (!(lo <= typ && typ <= hi))
		return fail(c, "%s: typical %g lies outside the window [%g, %g]", where, typ, lo, hi);
	return IRR_OK;
}

/* A rule's value: a number (compared as an integer), true/false, or text,
 * optionally prefixed with '!' (not), '>=' or '<='. */
static int parse_rule_if(ctx *c, const cJSON *cond, const char *where, irr_table_rule *r)
{
	char val[sizeof r->value];
	const char *bare;
	if (!cJSON_IsObject(cond) || !cond->child || cond->child->next)
		return fail(c, "%s: 'if' must be an object with exactly one attribute, e.g. {\"conjugated\": 1}", where);
	const cJSON *v = cond->child;
	if (!in_list(v->string, rule_attrs))
		return fail(c, "%s: unknown attribute '%s' in 'if' (known: conjugated, ring_size, n_h, aryl, "
		               "hbond_intra, count, pattern, phase, sampling)", where, v->string);
	snprintf(r->attr, sizeof r->attr, "%s", v->string);
	if (cJSON_IsNumber(v)) {
		if (v->valuedouble != floor(v->valuedouble) || fabs(v->valuedouble) > 1000)
			return fail(c, "%s: value of '%s' must be a whole number", where, v->string);
		snprintf(val, sizeof val, "%d", (int)v->valuedouble);
	} else if (cJSON_IsBool(v)) {
		snprintf(val, sizeof val, "%d", cJSON_IsTrue(v) ? 1 : 0);
	} else if (cJSON_IsString(v) && v->valuestring) {
		if (strlen(v->valuestring) >= sizeof r->value)
			return fail(c, "%s: value '%s' too long", where, v->valuestring);
		memcpy(val, v->valuestring, strlen(v->valuestring) + 1);
	} else {
		return fail(c, "%s: value of '%s' must be a number, true/false or text", where, v->string);
	}
	snprintf(r->value, sizeof r->value, "%s", val);
	bare = val;
	if (bare[0] == '!')
		bare++;
	else if ((bare[0] == '>' || bare[0] == '<') && bare[1] == '=')
		bare += 2;
	if (!strcmp(r->attr, "pattern")) {
		if (!in_list(bare, patterns))
			return fail(c, "%s: unknown substitution pattern '%s'", where, bare);
	} else if (!strcmp(r->attr, "phase")) {
		if (irr_phase_parse(bare, NULL) != IRR_OK)
			return fail(c, "%s: unknown phase '%s' (condensed, solution, gas)", where, bare);
	} else if (!strcmp(r->attr, "sampling")) {
		if (irr_sampling_parse(bare, NULL) != IRR_OK)
			return fail(c, "%s: unknown sampling '%s' (atr, transmission)", where, bare);
	} else {
		char *end;
		(void)strtol(bare, &end, 10);
		if (!*bare || *end)
			return fail(c, "%s: value of '%s' must be a whole number", where, r->attr);
	}
	if ((val[0] == '>' || val[0] == '<') && (!strcmp(r->attr, "pattern") ||
	    !strcmp(r->attr, "phase") || !strcmp(r->attr, "sampling")))
		return fail(c, "%s: '>=' and '<=' apply to numbers only", where);
	return IRR_OK;
}

static const char *const rule_fields[] = {"if", "shift", "window", "typical", "omit",
                                          "intensity", "note", NULL};

static int parse_rule(ctx *c, const cJSON *jr, const char *bwhere, int ri,
                      const irr_table_band *b, irr_table_rule *r)
{
	char where[200];
	const char *s;
	int rc, has_shift = 0, has_typ = 0;
	snprintf(where, sizeof where, "%s, context[%d]", bwhere, ri);
	memset(r, 0, sizeof *r);
	if (!cJSON_IsObject(jr))
		return fail(c, "%s: must be an object", where);
	if ((rc = check_fields(c, jr, where, rule_fields)))
		return rc;
	const cJSON *cond = cJSON_GetObjectItemCaseSensitive(jr, "if");
	if (!cond)
		return fail(c, "%s: missing field 'if'", where);
	if ((rc = parse_rule_if(c, cond, where, r)))
		return rc;
	if ((rc = get_number(c, jr, where, "shift", 0, &has_shift, &r->shift)))
		return rc;
	if (has_shift && fabs(r->shift) > 1000)
		return fail(c, "%s: shift %g cm-1 is implausible", where, r->shift);
	if ((rc = get_window(c, jr, where, 0, &r->set_window, &r->low, &r->high)))
		return rc;
	if ((rc = get_number(c, jr, where, "typical", 0, &has_typ, &r->typical)))
		return rc;
	if (r->set_window && !has_typ)
		return fail(c, "%s: a 'window' needs its 'typical' too", where);
	if (has_typ && !r->set_window)
		return fail(c, "%s: 'typical' needs a 'window' (use 'shift' to move the band)", where);
	if (r->set_window && (rc = check_window(c, where, r->low, r->high, r->typical)))
		return rc;
	if ((rc = get_bool(c, jr, where, "omit", &r->omit)))
		return rc;
	if ((rc = get_string(c, jr, where, "intensity", 0, &s)))
		return rc;
	r->intensity = IRR_INT_NONE;
	if (s && (irr_intensity_parse(s, &r->intensity) != IRR_OK || r->intensity == IRR_INT_NONE))
		return fail(c, "%s: unknown intensity '%s' (strong, medium, weak, variable)", where, s);
	if ((rc = get_string(c, jr, where, "note", 0, &s)))
		return rc;
	if (s && !(r->note = arena_strdup(c->t, s)))
		return irr_error_set(c->err, IRR_ENOMEM, c->path, 0, "out of memory");
	if (!has_shift && !r->set_window && !r->omit && r->intensity == IRR_INT_NONE && !r->note)
		return fail(c, "%s: the rule changes nothing (give shift, window, omit, intensity or note)", where);
	if (has_shift && !r->set_window) {
		/* A shifted band must stay a sensible window. */
		if (b->low + r->shift < WN_MIN || b->high + r->shift > WN_MAX)
			return fail(c, "%s: shift %g moves the band out of range", where, r->shift);
	}
	return IRR_OK;
}

static const char *const band_fields[] = {"label", "window", "typical", "intensity", "shape",
                                          "weight", "overtone", "note", "source", "context", NULL};

static int parse_band(ctx *c, const cJSON *jb, int bi, const char *group_source, irr_table_band *b)
{
	char where[160];
	const char *s;
	int rc, present;
	snprintf(where, sizeof where, "bands[%d]", bi);
	memset(b, 0, sizeof *b);
	if (!cJSON_IsObject(jb))
		return fail(c, "%s: must be an object", where);
	if ((rc = check_fields(c, jb, where, band_fields)))
		return rc;
	if ((rc = get_string(c, jb, where, "label", 1, &s)))
		return rc;
	if (!*s)
		return fail(c, "%s: empty 'label'", where);
	if (!(b->label = arena_strdup(c->t, s)))
		goto nomem;
	snprintf(where, sizeof where, "bands[%d] '%s'", bi, s);
	if ((rc = get_window(c, jb, where, 1, &present, &b->low, &b->high)))
		return rc;
	if ((rc = get_number(c, jb, where, "typical", 1, NULL, &b->typical)))
		return rc;
	if ((rc = check_window(c, where, b->low, b->high, b->typical)))
		return rc;
	if ((rc = get_string(c, jb, where, "intensity", 1, &s)))
		return rc;
	if (irr_intensity_parse(s, &b->intensity) != IRR_OK || b->intensity == IRR_INT_NONE)
		return fail(c, "%s: unknown intensity '%s' (strong, medium, weak, variable)", where, s);
	if ((rc = get_string(c, jb, where, "shape", 1, &s)))
		return rc;
	if (irr_shape_parse(s, &b->shape) != IRR_OK)
		return fail(c, "%s: unknown shape '%s' (sharp, broad, very_broad, doublet)", where, s);
	if ((rc = get_number(c, jb, where, "weight", 1, NULL, &b->weight)))
		return rc;
	if (!(b->weight >= 0.0 && b->weight <= 1.0))
		return fail(c, "%s: weight %g must lie in 0..1", where, b->weight);
	if ((rc = get_bool(c, jb, where, "overtone", &b->overtone)))
		return rc;
	if ((rc = get_string(c, jb, where, "note", 0, &s)))
		return rc;
	if (s && !(b->note = arena_strdup(c->t, s)))
		goto nomem;
	if ((rc = get_string(c, jb, where, "source", 0, &s)))
		return rc;
	if (!s)
		s = group_source;
	if (!s || !*s)
		return fail(c, "%s: no 'source' (on the band or its group): name the handbook", where);
	if (!(b->source = arena_strdup(c->t, expand_source(c, s))))
		goto nomem;
	const cJSON *ctxs = cJSON_GetObjectItemCaseSensitive(jb, "context");
	if (ctxs) {
		if (!cJSON_IsArray(ctxs))
			return fail(c, "%s: field 'context' must be an array of rules", where);
		int n = cJSON_GetArraySize(ctxs);
		irr_table_rule *rules = n ? arena_alloc(c->t, (size_t)n * sizeof *rules) : NULL;
		if (n && !rules)
			goto nomem;
		int ri = 0;
		for (const cJSON *jr = ctxs->child; jr; jr = jr->next, ri++)
			if ((rc = parse_rule(c, jr, where, ri, b, &rules[ri])))
				return rc;
		b->rules = rules;
		b->nrules = (size_t)n;
	}
	return IRR_OK;
nomem:
	return irr_error_set(c->err, IRR_ENOMEM, c->path, 0, "out of memory");
}

static int valid_id(const char *s)
{
	size_t n = strlen(s);
	if (!n || n >= 40) /* must fit irr_group.id[40] (perceive.h) */
		return 0;
	for (; *s; s++)
		if (!((*s >= 'a' && *s <= 'z') || (*s >= 'A' && *s <= 'Z') ||
		      (*s >= '0' && *s <= '9') || *s == '_' || *s == '-' || *s == '.'))
			return 0;
	return 1;
}

static const char *const group_fields[] = {"id", "name", "key", "smarts", "source", "note",
                                           "bands", NULL};

static int parse_group(ctx *c, const cJSON *jg, irr_table_group *g)
{
	const char *s, *gsource;
	int rc;
	memset(g, 0, sizeof *g);
	c->gid = "";
	c->gline = 0;
	if (!cJSON_IsObject(jg))
		return fail(c, "must be an object");
	if ((rc = get_string(c, jg, "group", "id", 1, &s)))
		return rc;
	c->gline = line_of_id(c->text, &c->cursor, s);
	if (!valid_id(s))
		return fail(c, "id '%s' must be 1-39 characters of letters, digits, '_', '-', '.'", s);
	if (!(g->id = arena_strdup(c->t, s)))
		goto nomem;
	c->gid = g->id;
	if ((rc = check_fields(c, jg, "group", group_fields)))
		return rc;
	if ((rc = get_string(c, jg, "group", "name", 1, &s)))
		return rc;
	if (!(g->name = arena_strdup(c->t, s)))
		goto nomem;
	if ((rc = get_string(c, jg, "group", "key", 0, &s)))
		return rc;
	if (s) {
		if (!irr_key_name(s))
			return fail(c, "unknown perception key '%s' (see include/irrecon/perceive.h; "
			               "use \"smarts\" for a group of your own)", s);
		if (!(g->key = arena_strdup(c->t, s)))
			goto nomem;
	}
	if ((rc = get_string(c, jg, "group", "smarts", 0, &s)))
		return rc;
	if (s) {
		irr_smarts *pat = NULL;
		irr_error e2;
		if (!*s)
			return fail(c, "empty 'smarts'");
		/* Compiled once here only to check it, so that a bad pattern is
		 * reported with its file and line, not later by perception. */
		irr_error_clear(&e2);
		if (irr_smarts_compile(&pat, s, &e2) != IRR_OK)
			return fail(c, "%s", e2.message);
		irr_smarts_free(pat);
		if (!(g->smarts = arena_strdup(c->t, s)))
			goto nomem;
	}
	if (!g->key == !g->smarts)
		return fail(c, "give exactly one of 'key' (a perception key) and 'smarts'");
	/* A SMARTS group is reported under its id, which must not read as a key. */
	if (g->smarts && irr_key_name(g->id))
		return fail(c, "a SMARTS group's id must not be a perception key; choose another id");
	if ((rc = get_string(c, jg, "group", "source", 0, &gsource)))
		return rc;
	const cJSON *bands = cJSON_GetObjectItemCaseSensitive(jg, "bands");
	if (!bands)
		return fail(c, "missing field 'bands'");
	if (!cJSON_IsArray(bands) || cJSON_GetArraySize(bands) == 0)
		return fail(c, "field 'bands' must be a non-empty array");
	int n = cJSON_GetArraySize(bands), bi = 0;
	irr_table_band *bs = arena_alloc(c->t, (size_t)n * sizeof *bs);
	if (!bs)
		goto nomem;
	for (const cJSON *jb = bands->child; jb; jb = jb->next, bi++)
		if ((rc = parse_band(c, jb, bi, gsource, &bs[bi])))
			return rc;
	g->bands = bs;
	g->nbands = (size_t)n;
	if (!(g->file = arena_strdup(c->t, c->path)))
		goto nomem;
	return IRR_OK;
nomem:
	return irr_error_set(c->err, IRR_ENOMEM, c->path, 0, "out of memory");
}

static long find_group(const irr_tables *t, const char *id)
{
	for (size_t i = 0; i < t->ngroups; i++)
		if (!strcmp(t->groups[i].id, id))
			return (long)i;
	return -1;
}

/* Reads one table file. `replace`: a group whose id exists already replaces
 * it (user tables); otherwise a repeated id is an error. */
static int load_file(irr_tables *t, const char *path, int replace, irr_error *err)
{
	char *text = NULL;
	size_t len = 0;
	cJSON *root = NULL;
	ctx c = {t, path, NULL, NULL, NULL, "", 0, -1, err};
	int rc = read_file(path, &text, &len, err);
	if (rc)
		return rc;
	c.text = text;
	c.cursor = text;
	irr_sha256_update(&t->sha, text, len);
	if (len == 0) {
		rc = irr_error_set(err, IRR_EINPUT, path, 0, "empty table file");
		goto done;
	}
	if (memchr(text, '\0', len)) {
		rc = irr_error_set(err, IRR_EINPUT, path, line_of(text, len),
		                   "table contains a NUL byte (not a text file)");
		goto done;
	}
	{
		const char *end = NULL;
		root = cJSON_ParseWithOpts(text, &end, 1);
		if (!root) {
			size_t off = end && end >= text && end <= text + len ? (size_t)(end - text) : 0;
			long line = line_of(text, off);
			size_t bol = off;
			while (bol > 0 && text[bol - 1] != '\n')
				bol--;
			rc = irr_error_set(err, IRR_EINPUT, path, line,
			                   "not valid JSON (column %zu)", off - bol + 1);
			goto done;
		}
	}
	if (!cJSON_IsObject(root)) {
		rc = irr_error_set(err, IRR_EINPUT, path, 1, "a table must be a JSON object");
		goto done;
	}
	{
		static const char *const top_fields[] = {"format", "title", "sources", "groups", NULL};
		const char *fmt;
		if ((rc = check_fields(&c, root, "table", top_fields)))
			goto done;
		if ((rc = get_string(&c, root, "table", "format", 1, &fmt)))
			goto done;
		if (strcmp(fmt, TABLE_FORMAT)) {
			const char *at = strstr(text, "\"format\"");
			rc = irr_error_set(err, IRR_EINPUT, path, at ? line_of(text, (size_t)(at - text)) : 0,
			                   "format '%s' is not '%s'", fmt, TABLE_FORMAT);
			goto done;
		}
	}
	c.sources = cJSON_GetObjectItemCaseSensitive(root, "sources");
	if (c.sources && !cJSON_IsObject(c.sources)) {
		rc = irr_error_set(err, IRR_EINPUT, path, 0, "'sources' must be an object of abbreviations");
		goto done;
	}
	for (const cJSON *s = c.sources ? c.sources->child : NULL; s; s = s->next)
		if (!cJSON_IsString(s)) {
			rc = irr_error_set(err, IRR_EINPUT, path, 0, "sources: '%s' must be a string", s->string);
			goto done;
		}
	{
		const cJSON *groups = cJSON_GetObjectItemCaseSensitive(root, "groups");
		if (!cJSON_IsArray(groups)) {
			rc = irr_error_set(err, IRR_EINPUT, path, 0, "missing array 'groups'");
			goto done;
		}
		int gi = 0;
		for (const cJSON *jg = groups->child; jg; jg = jg->next, gi++) {
			irr_table_group g;
			c.gindex = gi;
			if ((rc = parse_group(&c, jg, &g)))
				goto done;
			long at = find_group(t, g.id);
			if (at >= 0 && (!replace || !strcmp(t->groups[at].file, path))) {
				rc = fail(&c, "id already defined in %s", t->groups[at].file);
				goto done;
			}
			if (at >= 0) {
				t->groups[at] = g;
				continue;
			}
			if (t->ngroups == t->capgroups) {
				size_t ncap = t->capgroups ? t->capgroups * 2 : 128;
				irr_table_group *ng = realloc(t->groups, ncap * sizeof *ng);
				if (!ng) {
					rc = irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
					goto done;
				}
				t->groups = ng, t->capgroups = ncap;
			}
			t->groups[t->ngroups++] = g;
		}
	}
	rc = IRR_OK;
done:
	cJSON_Delete(root);
	free(text);
	return rc;
}

static int cmp_name(const void *a, const void *b)
{
	return strcmp(*(const char *const *)a, *(const char *const *)b);
}

static int load_dir(irr_tables *t, const char *dir, irr_error *err)
{
	DIR *d = opendir(dir);
	char **names = NULL;
	size_t n = 0, cap = 0;
	int rc = IRR_OK;
	struct dirent *e;
	if (!d)
		return irr_error_set(err, errno == ENOENT ? IRR_ENOTFOUND : IRR_EIO, dir, 0,
		                     "cannot open the group-table folder: %s "
		                     "(set IRRECON_TABLES or give --tables DIR)", strerror(errno));
	while ((e = readdir(d))) {
		size_t len = strlen(e->d_name);
		if (e->d_name[0] == '.' || len < 6 || strcmp(e->d_name + len - 5, ".json"))
			continue;
		if (n == cap) {
			size_t ncap = cap ? cap * 2 : 16;
			char **nn = realloc(names, ncap * sizeof *nn);
			if (!nn) {
				rc = irr_error_set(err, IRR_ENOMEM, dir, 0, "out of memory");
				goto done;
			}
			names = nn, cap = ncap;
		}
		if (!(names[n] = malloc(strlen(dir) + len + 2))) {
			rc = irr_error_set(err, IRR_ENOMEM, dir, 0, "out of memory");
			goto done;
		}
		sprintf(names[n], "%s/%s", dir, e->d_name);
		n++;
	}
	if (n == 0) {
		rc = irr_error_set(err, IRR_ENOTFOUND, dir, 0, "no *.json group tables in this folder");
		goto done;
	}
	/* Sorted, so the digest and the id clash messages do not depend on
	 * the order the file system lists the folder in. */
	qsort(names, n, sizeof *names, cmp_name);
	for (size_t i = 0; i < n && rc == IRR_OK; i++)
		rc = load_file(t, names[i], 0, err);
done:
	for (size_t i = 0; i < n; i++)
		free(names[i]);
	free(names);
	closedir(d);
	return rc;
}

static const irr_tables *sort_ctx;
static int cmp_key(const void *a, const void *b)
{
	const key_entry *x = a, *y = b;
	int c = strcmp(x->key, y->key);
	return c ? c : (x->group > y->group) - (x->group < y->group);
}
static int cmp_id(const void *a, const void *b)
{
	size_t x = *(const size_t *)a, y = *(const size_t *)b;
	return strcmp(sort_ctx->groups[x].id, sort_ctx->groups[y].id);
}

static int build_index(irr_tables *t, irr_error *err)
{
	size_t nk = 0;
	t->by_key = malloc((t->ngroups ? t->ngroups : 1) * sizeof *t->by_key);
	t->by_id = malloc((t->ngroups ? t->ngroups : 1) * sizeof *t->by_id);
	if (!t->by_key || !t->by_id)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	for (size_t i = 0; i < t->ngroups; i++) {
		t->by_id[i] = i;
		if (t->groups[i].key) {
			t->by_key[nk].key = t->groups[i].key;
			t->by_key[nk].group = i;
			nk++;
		}
	}
	t->nby_key = nk;
	qsort(t->by_key, nk, sizeof *t->by_key, cmp_key);
	/* qsort has no context argument in C11; loading is not a hot path, and
	 * the sort finishes before the pointer could be used by another load. */
	{
		static pthread_mutex_t mu = PTHREAD_MUTEX_INITIALIZER;
		pthread_mutex_lock(&mu);
		sort_ctx = t;
		qsort(t->by_id, t->ngroups, sizeof *t->by_id, cmp_id);
		sort_ctx = NULL;
		pthread_mutex_unlock(&mu);
	}
	return IRR_OK;
}

int irr_tables_load(irr_tables **out, const char *dir,
                    const char *const *extra, size_t n_extra, irr_error *err)
{
	irr_tables *t;
	int rc;
	unsigned char dg[32];
	if (!out)
		return irr_error_set(err, IRR_ERROR, "", 0, "irr_tables_load: out is NULL");
	*out = NULL;
	if (!(t = calloc(1, sizeof *t)))
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	irr_sha256_init(&t->sha);
	if (!dir)
		dir = irr_tables_default_dir();
	/* "" loads no folder: only the extra files (used by tests and by
	 * chemists trying a table on its own). */
	if (*dir && (rc = load_dir(t, dir, err)))
		goto fail;
	for (size_t i = 0; i < n_extra; i++)
		if (extra[i] && (rc = load_file(t, extra[i], 1, err)))
			goto fail;
	if (t->ngroups == 0) {
		rc = irr_error_set(err, IRR_ENOTFOUND, dir, 0, "no group tables loaded");
		goto fail;
	}
	if ((rc = build_index(t, err)))
		goto fail;
	irr_sha256_final(&t->sha, dg);
	irr_sha256_hex(dg, t->digest);
	*out = t;
	return IRR_OK;
fail:
	irr_tables_free(t);
	return rc;
}

size_t irr_tables_group_count(const irr_tables *t)
{
	return t ? t->ngroups : 0;
}

const irr_table_group *irr_tables_group(const irr_tables *t, size_t i)
{
	return t && i < t->ngroups ? &t->groups[i] : NULL;
}

size_t irr_tables_find_key(const irr_tables *t, const char *key,
                           const irr_table_group **found, size_t max)
{
	size_t lo = 0, hi, n = 0;
	if (!t || !key)
		return 0;
	hi = t->nby_key;
	while (lo < hi) { /* lower bound */
		size_t mid = lo + (hi - lo) / 2;
		if (strcmp(t->by_key[mid].key, key) < 0)
			lo = mid + 1;
		else
			hi = mid;
	}
	for (size_t i = lo; i < t->nby_key && !strcmp(t->by_key[i].key, key); i++, n++)
		if (found && n < max)
			found[n] = &t->groups[t->by_key[i].group];
	/* With `found`, the number stored; without, how many there are. */
	return found && n > max ? max : n;
}

const irr_table_group *irr_tables_find_id(const irr_tables *t, const char *id)
{
	size_t lo = 0, hi;
	if (!t || !id)
		return NULL;
	hi = t->ngroups;
	while (lo < hi) {
		size_t mid = lo + (hi - lo) / 2;
		int c = strcmp(t->groups[t->by_id[mid]].id, id);
		if (c == 0)
			return &t->groups[t->by_id[mid]];
		if (c < 0)
			lo = mid + 1;
		else
			hi = mid;
	}
	return NULL;
}

const char *irr_tables_digest(const irr_tables *t)
{
	return t ? t->digest : "";
}
