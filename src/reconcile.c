/* reconcile.c: the main job. Matches the observed peaks of a spectrum to the
 * bands expected for a proposed structure by minimum-cost assignment
 * (Hungarian method, Kuhn 1955 / Munkres 1957; src/assign.c), attributes
 * the remaining bands to named starting materials, reagents, solvents, the
 * atmosphere or moisture, works out marker bands of the other substances,
 * and decides a verdict with a score and reasons.
 *
 * The rules (thresholds, costs, weights) are documented in
 * docs/check-result-schema.md, section "How the verdict is reached"; the
 * constants below carry the same names. */
#include "irrecon/reconcile.h"
#include "assign.h"
#include "solvents.h"
#include "structcache_internal.h"

#include <ctype.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

/* ---- Tunable rules (documented in docs/check-result-schema.md) ---- */
#define SIGNIFICANT_REL   0.05  /* peaks below this fraction of the strongest are minor */
#define MISSING_COST      1.5   /* cost of leaving an expected band without a peak */
#define MARGIN_FRAC       0.25  /* a peak may sit this fraction of the window outside it */
#define MARGIN_MAX        15.0  /* ... but at most this many cm-1 */
#define MARGIN_MIN        5.0
#define FINGERPRINT_FACTOR 0.5  /* weight of expected bands below 1500 cm-1 */
#define FINGERPRINT_PEAK  0.4   /* weight of unexplained peaks below 1500 cm-1 */
#define DECISIVE_WEIGHT   0.5   /* table weight from which a missing band decides */
#define FINGERPRINT_DECISIVE_WEIGHT 0.8
#define DECISIVE_REL      0.4   /* an unexplained peak this strong (>= 1500 cm-1) decides */
#define SPIKE_FWHM        6.0   /* narrower unexplained peaks never decide alone */
#define CO_REGION_LOW     1660.0 /* C=O stretch region for carbonyl_where_none */
#define CO_REGION_HIGH    1870.0
#define CO_REGION_REL     0.05  /* ... relative height, weak bands included */
#define CO_REGION_REL_ARENE 0.25 /* ... with an aromatic ring in the structure */
#define HBOND_FWHM        150.0 /* an O-H/N-H band this wide is hydrogen-bonded */
#define NH2_PAIR_REF      0.02  /* an NH2 stretch pair decides at this fraction of it */
#define NH2_PAIR_TOL      15.0  /* cm-1 off the Bellamy-Williams relation */
#define NH2_MIN_FWHM      20.0  /* cm-1: condensed-phase N-H stretches are no narrower */
#define OH_WHERE_NONE_REF  0.10 /* ... and decides, without O-H/N-H in the structure,
                                   at this fraction of the product's typical band */
#define MAX_CANDIDATES    4
#define MAX_LISTED        5     /* non-decisive unexplained bands named in reasons */
#define NOISY_FRAC        0.08  /* noise above this fraction of the strongest peak */

static const char CAUTION_EVIDENCE[] =
	"A verdict is evidence, never proof of identity or purity: do not release "
	"material on it alone; follow your lab's approved procedures and local "
	"safety rules.";

/* ---- Names ---- */

const char *irr_verdict_name(irr_verdict v)
{
	static const char *const n[] = {"consistent", "consistent_impure", "inconsistent", "inconclusive"};
	return (unsigned)v < 4 ? n[v] : "unknown";
}
const char *irr_other_kind_name(irr_other_kind k)
{
	static const char *const n[] = {"starting_material", "reagent", "solvent"};
	return (unsigned)k < 3 ? n[k] : "unknown";
}
const char *irr_source_kind_name(irr_source_kind k)
{
	static const char *const n[] = {"starting_material", "reagent", "solvent", "atmosphere", "water", "none"};
	return (unsigned)k < 6 ? n[k] : "unknown";
}
const char *irr_band_status_name(irr_band_status s)
{
	static const char *const n[] = {"found", "saturated", "missing", "unobservable"};
	return (unsigned)s < 4 ? n[s] : "unknown";
}
const char *irr_peak_status_name(irr_peak_status s)
{
	static const char *const n[] = {"explained", "attributed", "unexplained"};
	return (unsigned)s < 3 ? n[s] : "unknown";
}
const char *irr_presence_name(irr_presence p)
{
	static const char *const n[] = {"absent", "likely_present", "cannot_tell"};
	return (unsigned)p < 3 ? n[p] : "unknown";
}

/* ---- Objects ---- */

/* The measured input, shared read-only between a check and its clones. */
typedef struct shared_input {
	int refs;
	irr_spectrum *spectrum;
	irr_peaklist *peaks;
	double peaks_seconds;
} shared_input;

typedef struct shared_lib {
	int refs;
	int borrowed;            /* the caller's library: never freed here */
	irr_solvent_library *lib;
} shared_lib;

/* One band another substance may show (predicted or from the library). */
typedef struct other_band {
	const char *label;
	double low, high, typical;
	irr_intensity intensity;
	irr_shape shape;
	double weight;
	int overtone;
} other_band;

typedef struct other_in {
	irr_other_kind kind;
	char *given;
	char *smiles;
	const irr_solvent *solvent;  /* borrowed from the library */
	irr_molecule *mol;           /* owned, or the cached entry's */
	irr_inventory *inv;
	irr_sc_entry *cached;        /* the structure cache's entry, or NULL */
	irr_prediction *pred;        /* made in run, or the cached entry's */
	int pred_borrowed;
	other_band *bands;
	size_t nbands;
	irr_marker *markers;
	size_t nmarkers;
} other_in;

struct irr_check {
	const irr_tables *t;
	irr_check_options opt;
	char *sample_id, *input_name, *input_sha256, *solvents_file;

	shared_input *in;
	shared_lib *sl;

	char *smiles;
	irr_molecule *mol;           /* owned, or the cached entry's */
	irr_inventory *inv;
	irr_sc_entry *cached;        /* the structure cache's entry, or NULL */
	irr_structure_cache *sc;     /* borrowed, or NULL */

	other_in *others;
	size_t nothers;

	/* result */
	int ran;
	irr_prediction *pred;
	irr_expected *exp;
	int *eclass;                 /* effective expected class per band */
	size_t nexp;
	irr_observed *obs;
	size_t nobs;
	const char **cands;          /* candidate names, all peaks, borrowed from t */
	irr_other *ores;
	irr_reason *reasons;
	size_t nreasons, capreasons;
	char **cautions;             /* owned copies */
	size_t ncautions, capcautions;
	irr_verdict verdict;
	double score;
	int pred_borrowed;           /* pred is the cached entry's */
	double product_ref;          /* median height of the product's found medium/strong bands */
	irr_check_timing timing;
};

static double now_seconds(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static char *dupstr(const char *s)
{
	return s ? strdup(s) : NULL;
}

void irr_check_options_init(irr_check_options *o)
{
	if (!o)
		return;
	memset(o, 0, sizeof *o);
	o->phase = IRR_PHASE_CONDENSED;
	o->sampling = IRR_SAMPLING_ATR;
	irr_peak_options_init(&o->peaks);
}

static void input_release(shared_input *in)
{
	if (in && --in->refs == 0) {
		irr_peaklist_free(in->peaks);
		irr_spectrum_free(in->spectrum);
		free(in);
	}
}

static void lib_release(shared_lib *sl)
{
	if (sl && --sl->refs == 0) {
		if (!sl->borrowed)
			irr_solvents_free(sl->lib);
		free(sl);
	}
}

static void clear_result(irr_check *c)
{
	if (!c->pred_borrowed)
		irr_prediction_free(c->pred);
	c->pred = NULL;
	c->pred_borrowed = 0;
	free(c->exp);
	c->exp = NULL;
	free(c->eclass);
	c->eclass = NULL;
	c->nexp = 0;
	free(c->obs);
	c->obs = NULL;
	c->nobs = 0;
	free(c->cands);
	c->cands = NULL;
	free(c->ores);
	c->ores = NULL;
	for (size_t i = 0; i < c->nreasons; i++)
		free((char *)c->reasons[i].text);
	free(c->reasons);
	c->reasons = NULL;
	c->nreasons = c->capreasons = 0;
	for (size_t i = 0; i < c->ncautions; i++)
		free(c->cautions[i]);
	free(c->cautions);
	c->cautions = NULL;
	c->ncautions = c->capcautions = 0;
	for (size_t i = 0; i < c->nothers; i++) {
		other_in *o = &c->others[i];
		if (!o->pred_borrowed)
			irr_prediction_free(o->pred);
		o->pred = NULL;
		o->pred_borrowed = 0;
		free(o->bands);
		o->bands = NULL;
		o->nbands = 0;
		free(o->markers);
		o->markers = NULL;
		o->nmarkers = 0;
	}
	c->ran = 0;
}

int irr_check_create(irr_check **out, const irr_tables *t, irr_error *err)
{
	irr_check *c;
	*out = NULL;
	if (!t)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no group tables given");
	c = calloc(1, sizeof *c);
	if (!c)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	c->t = t;
	irr_check_options_init(&c->opt);
	*out = c;
	return IRR_OK;
}

/* A molecule and its inventory: read and perceived now (cached NULL), or
 * borrowed from the structure cache with one reference held. */
static int structure_get(irr_check *c, const char *smiles, const char *name,
                         irr_molecule **m, irr_inventory **inv, irr_sc_entry **cached,
                         int *perceive_failed, irr_error *err)
{
	int rc;
	*m = NULL, *inv = NULL, *cached = NULL;
	*perceive_failed = 0;
	/* Inventories depend on the tables: a cache made with others is not
	 * asked (a request run with tables of its own). */
	if (c->sc && irr_structure_cache__tables(c->sc) == c->t) {
		if ((rc = irr_structure_cache__get(c->sc, smiles, name, cached, perceive_failed,
		                                   err)) != IRR_OK)
			return rc;
		/* Never changed through these: every reader takes them const. */
		*m = (*cached)->mol;
		*inv = (*cached)->inv;
		return IRR_OK;
	}
	if ((rc = irr_molecule_from_smiles(m, smiles, name, err)) != IRR_OK)
		return rc;
	if ((rc = irr_perceive(inv, *m, c->t, err)) != IRR_OK) {
		irr_molecule_free(*m);
		*m = NULL;
		*perceive_failed = 1;
	}
	return rc;
}

static void structure_release(irr_molecule *m, irr_inventory *inv, irr_sc_entry *cached)
{
	if (cached) {
		irr_sc_entry__release(cached);
		return;
	}
	irr_inventory_free(inv);
	irr_molecule_free(m);
}

void irr_check_free(irr_check *c)
{
	if (!c)
		return;
	clear_result(c);
	for (size_t i = 0; i < c->nothers; i++) {
		free(c->others[i].given);
		free(c->others[i].smiles);
		structure_release(c->others[i].mol, c->others[i].inv, c->others[i].cached);
	}
	free(c->others);
	structure_release(c->mol, c->inv, c->cached);
	free(c->smiles);
	input_release(c->in);
	lib_release(c->sl);
	free(c->sample_id);
	free(c->input_name);
	free(c->input_sha256);
	free(c->solvents_file);
	free(c);
}

void irr_check_set_options(irr_check *c, const irr_check_options *o)
{
	char *a, *b, *d, *e;
	if (!c || !o)
		return;
	/* Copy first: o's strings may be our own (set_options(c, get_options(c))). */
	a = dupstr(o->sample_id);
	b = dupstr(o->input_name);
	d = dupstr(o->input_sha256);
	e = dupstr(o->solvents_file);
	free(c->sample_id);
	free(c->input_name);
	free(c->input_sha256);
	/* A new library only while no substance borrows from the old one. */
	if (!c->nothers && (c->solvents_file || e) &&
	    (!e || !c->solvents_file || strcmp(e, c->solvents_file))) {
		lib_release(c->sl);
		c->sl = NULL;
	}
	free(c->solvents_file);
	c->opt = *o;
	c->opt.sample_id = c->sample_id = a;
	c->opt.input_name = c->input_name = b;
	c->opt.input_sha256 = c->input_sha256 = d;
	c->opt.solvents_file = c->solvents_file = e;
	c->ran = 0;
}

const irr_check_options *irr_check_get_options(const irr_check *c)
{
	return c ? &c->opt : NULL;
}

static int ensure_lib(irr_check *c, irr_error *err)
{
	int rc;
	if (c->sl)
		return IRR_OK;
	c->sl = calloc(1, sizeof *c->sl);
	if (!c->sl)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	c->sl->refs = 1;
	rc = irr_solvents_load(&c->sl->lib, c->solvents_file, err);
	if (rc) {
		free(c->sl);
		c->sl = NULL;
	}
	return rc;
}

void irr_check_use_structure_cache(irr_check *c, irr_structure_cache *sc)
{
	if (c)
		c->sc = sc;
}

int irr_check_use_solvents(irr_check *c, const irr_solvent_library *lib, irr_error *err)
{
	shared_lib *sl;
	if (!c || !lib)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no solvent library given");
	if (c->nothers)
		return irr_error_set(err, IRR_EINPUT, "", 0,
		                     "set the solvent library before adding substances");
	if (!(sl = calloc(1, sizeof *sl)))
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	sl->refs = 1;
	sl->borrowed = 1;
	sl->lib = (irr_solvent_library *)lib;
	lib_release(c->sl);
	c->sl = sl;
	return IRR_OK;
}

int irr_check_set_structure_named(irr_check *c, const char *smiles,
                                  const char *name, irr_error *err)
{
	irr_molecule *m = NULL;
	irr_inventory *inv = NULL;
	irr_sc_entry *cached = NULL;
	char *s;
	double t0 = now_seconds();
	int rc, perceive_failed;
	if (!smiles || !*smiles)
		return irr_error_set(err, IRR_EINPUT, name ? name : "SMILES", 0, "empty structure");
	if ((rc = structure_get(c, smiles, name ? name : "SMILES", &m, &inv, &cached,
	                        &perceive_failed, err)))
		return rc;
	if (!(s = strdup(smiles))) {
		structure_release(m, inv, cached);
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	clear_result(c);
	structure_release(c->mol, c->inv, c->cached);
	free(c->smiles);
	c->mol = m;
	c->inv = inv;
	c->cached = cached;
	c->smiles = s;
	c->timing.perceive = now_seconds() - t0;
	return IRR_OK;
}

int irr_check_set_structure(irr_check *c, const char *smiles, irr_error *err)
{
	return irr_check_set_structure_named(c, smiles, NULL, err);
}

/* SMILES never hold spaces; library names often do. A string that names a
 * library entry is taken as that entry even when it would parse as SMILES
 * too ("CO" is methanol either way; "DMF" would not parse). */
int irr_check_add_other(irr_check *c, irr_other_kind kind, const char *what,
                        irr_error *err)
{
	other_in o;
	other_in *grown;
	int rc;
	if (!c || !what || !*what)
		return irr_error_set(err, IRR_EINPUT, "", 0, "empty %s",
		                     irr_other_kind_name(kind));
	if ((unsigned)kind > IRR_OTHER_SOLVENT)
		return irr_error_set(err, IRR_EINPUT, "", 0, "unknown kind of substance");
	memset(&o, 0, sizeof o);
	o.kind = kind;
	if ((rc = ensure_lib(c, err)))
		return rc;
	o.solvent = irr_solvents_find(c->sl->lib, what);
	/* The same SMILES as a library entry brings its tabulated bands too. */
	for (size_t i = 0; !o.solvent && i < irr_solvents_count(c->sl->lib); i++)
		if (!strcmp(irr_solvents_get(c->sl->lib, i)->smiles, what))
			o.solvent = irr_solvents_get(c->sl->lib, i);
	o.smiles = strdup(o.solvent ? o.solvent->smiles : what);
	o.given = strdup(what);
	if (!o.smiles || !o.given) {
		rc = irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
		goto fail;
	}
	{
		irr_error perr;
		irr_error_clear(&perr);
		int perceive_failed = 0;
		rc = structure_get(c, o.smiles, "SMILES", &o.mol, &o.inv, &o.cached,
		                   &perceive_failed, &perr);
		/* A structure that reads but cannot be perceived: the
		 * perception's own error. */
		if (rc && perceive_failed) {
			if (err)
				*err = perr;
			goto fail;
		}
		if (rc) {
			if (o.solvent)
				irr_error_set(err, rc, o.solvent->name, 0, "library SMILES '%s': %s",
				              o.smiles, perr.message);
			else
				irr_error_set(err, IRR_EINPUT, irr_other_kind_name(kind), 0,
				              "'%s' is neither a name in the solvent library nor valid SMILES (%s)",
				              what, perr.message[0] ? perr.message : "not parsed");
			goto fail;
		}
	}
	clear_result(c); /* before the array moves: it frees per-substance results */
	grown = realloc(c->others, (c->nothers + 1) * sizeof *grown);
	if (!grown) {
		rc = irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
		goto fail;
	}
	c->others = grown;
	c->others[c->nothers++] = o;
	return IRR_OK;
fail:
	structure_release(o.mol, o.inv, o.cached);
	free(o.smiles);
	free(o.given);
	return rc;
}

static int new_input(irr_check *c, irr_error *err)
{
	shared_input *in = calloc(1, sizeof *in);
	if (!in)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	in->refs = 1;
	clear_result(c);
	input_release(c->in);
	c->in = in;
	return IRR_OK;
}

int irr_check_set_spectrum(irr_check *c, irr_spectrum *s, irr_error *err)
{
	irr_peaklist *pl = NULL;
	double t0 = now_seconds();
	int rc;
	if (!s)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no spectrum given");
	if ((rc = irr_spectrum_normalise(s, err)) ||
	    (rc = irr_peaks_pick(&pl, s, &c->opt.peaks, err)) ||
	    (rc = new_input(c, err))) {
		irr_peaklist_free(pl);
		irr_spectrum_free(s);
		return rc;
	}
	c->in->spectrum = s;
	c->in->peaks = pl;
	c->in->peaks_seconds = now_seconds() - t0;
	return IRR_OK;
}

int irr_check_set_peaks(irr_check *c, irr_peaklist *pl, irr_error *err)
{
	int rc;
	if (!pl)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no peak list given");
	if ((rc = new_input(c, err))) {
		irr_peaklist_free(pl);
		return rc;
	}
	c->in->peaks = pl;
	return IRR_OK;
}

int irr_check_clone_inputs(irr_check **out, const irr_check *src, irr_error *err)
{
	irr_check *c;
	int rc;
	*out = NULL;
	if ((rc = irr_check_create(&c, src->t, err)))
		return rc;
	irr_check_set_options(c, &src->opt);
	c->sc = src->sc;
	if (src->in) {
		c->in = src->in;
		c->in->refs++;
	}
	if (src->sl) {
		c->sl = src->sl;
		c->sl->refs++;
	}
	for (size_t i = 0; i < src->nothers; i++)
		if ((rc = irr_check_add_other(c, src->others[i].kind, src->others[i].given, err))) {
			irr_check_free(c);
			return rc;
		}
	*out = c;
	return IRR_OK;
}

/* ---- Helpers of the run ---- */

static int add_reason(irr_check *c, const char *code, int decisive, long e, long o,
                      const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 6, 7)))
#endif
	;
static int add_reason(irr_check *c, const char *code, int decisive, long e, long o,
                      const char *fmt, ...)
{
	char buf[600];
	va_list ap;
	char *t;
	if (c->nreasons == c->capreasons) {
		size_t n = c->capreasons ? 2 * c->capreasons : 16;
		irr_reason *r = realloc(c->reasons, n * sizeof *r);
		if (!r)
			return IRR_ENOMEM;
		c->reasons = r, c->capreasons = n;
	}
	va_start(ap, fmt);
	vsnprintf(buf, sizeof buf, fmt, ap);
	va_end(ap);
	if (!(t = strdup(buf)))
		return IRR_ENOMEM;
	c->reasons[c->nreasons].code = code;
	c->reasons[c->nreasons].text = t;
	c->reasons[c->nreasons].decisive = decisive;
	c->reasons[c->nreasons].expected = e;
	c->reasons[c->nreasons].observed = o;
	c->nreasons++;
	return IRR_OK;
}

static int add_caution(irr_check *c, const char *text)
{
	for (size_t i = 0; i < c->ncautions; i++)
		if (!strcmp(c->cautions[i], text))
			return IRR_OK;
	if (c->ncautions == c->capcautions) {
		size_t n = c->capcautions ? 2 * c->capcautions : 8;
		char **r = realloc(c->cautions, n * sizeof *r);
		if (!r)
			return IRR_ENOMEM;
		c->cautions = r, c->capcautions = n;
	}
	if (!(c->cautions[c->ncautions] = strdup(text)))
		return IRR_ENOMEM;
	c->ncautions++;
	return IRR_OK;
}

/* Numeric class of an intensity (weak 1, medium 2, strong 3). */
static int iclass(irr_intensity v)
{
	switch (v) {
	case IRR_INT_WEAK: return 1;
	case IRR_INT_MEDIUM: return 2;
	case IRR_INT_STRONG: return 3;
	default: return 0;
	}
}

static int peak_class(const irr_peak *p)
{
	if (p->saturated)
		return 3;
	int k = iclass(p->intensity);
	return k ? k : 1;
}

static int is_broad_shape(irr_shape s)
{
	return s == IRR_SHAPE_BROAD || s == IRR_SHAPE_VERY_BROAD;
}

/* "C-H stretch (CH3, asym)" -> compares "c-h stretch": the kind of a band
 * for the sharing rule. */
static int same_kind(const char *a, const char *b)
{
	size_t la = strcspn(a, "(,"), lb = strcspn(b, "(,");
	while (la && a[la - 1] == ' ')
		la--;
	while (lb && b[lb - 1] == ' ')
		lb--;
	return la == lb && !strncasecmp(a, b, la);
}

static double margin_of(double low, double high)
{
	double m = MARGIN_FRAC * (high - low);
	return m < MARGIN_MIN ? MARGIN_MIN : m > MARGIN_MAX ? MARGIN_MAX : m;
}

static int overlaps(double a0, double a1, double b0, double b1)
{
	return a0 <= b1 && b0 <= a1;
}

/* Cost of explaining peak p by band b (without the band weight), or
 * IRR_ASSIGN_FORBIDDEN. Position inside the window, intensity class and
 * shape each add; see the schema document for the numbers. */
static double pair_cost(const irr_band *b, int ec, const irr_peak *p, const irr_check *c)
{
	double lo = b->low, hi = b->high, m = margin_of(lo, hi);
	double pos = p->position, cost = 0.0;
	double half = 0.5 * (hi - lo);
	int oc = peak_class(p);
	if (half < 5.0)
		half = 5.0;
	if (p->saturated) {
		/* A saturated peak stands for its whole range. */
		if (!overlaps(lo - m, hi + m, p->low, p->high))
			return IRR_ASSIGN_FORBIDDEN;
		pos = p->position < lo ? (p->high < lo ? p->high : lo)
		    : p->position > hi ? (p->low > hi ? p->low : hi) : p->position;
	}
	if (pos < lo - m || pos > hi + m)
		return IRR_ASSIGN_FORBIDDEN;
	{
		double d = fabs(pos - b->typical) / half;
		if (d > 1.0)
			d = 1.0;
		cost += 0.5 * d * d;
		if (pos < lo)
			cost += 0.6 * (lo - pos) / m;
		else if (pos > hi)
			cost += 0.6 * (pos - hi) / m;
	}
	/* ATR weakens bands above 3000 cm-1 (and less so down to 2500): allow
	 * one class weaker there. Common practice. */
	if (c->opt.sampling == IRR_SAMPLING_ATR && b->typical > 2500 && ec > 1)
		ec--;
	if (ec) {
		if (ec == 3 && oc == 1)
			return IRR_ASSIGN_FORBIDDEN;  /* a strong band is never a trace */
		if (ec == 1 && oc == 3 && (b->overtone || b->weight < 0.3))
			return IRR_ASSIGN_FORBIDDEN;  /* nor a weak overtone the strongest band */
		cost += 0.3 * abs(ec - oc);
	}
	/* Shape: a broad O-H is not a sharp N-H. A broad band never takes a
	 * peak narrower than half the broad threshold, and a strong broad band
	 * only a broad peak or a strong one. */
	if (!p->saturated) {
		if (is_broad_shape(b->shape)) {
			if (!p->broad) {
				if (p->fwhm > 0 && p->fwhm < 0.5 * c->opt.peaks.broad_cm)
					return IRR_ASSIGN_FORBIDDEN;
				if (p->fwhm > 0 && iclass(b->intensity) >= 3 && oc < 3)
					return IRR_ASSIGN_FORBIDDEN;
				cost += p->fwhm > 0 ? 0.6 : 0.2;
			}
		} else if (p->broad) {
			cost += p->fwhm > 3.0 * c->opt.peaks.broad_cm ? 0.9 : 0.4;
		}
	}
	/* A band's maximum is a better witness than a shoulder on it. */
	if (p->shoulder)
		cost += 0.15;
	return cost;
}

/* Expected class of a band in this molecule. The tables class alkyl C-H
 * stretches as strong, which holds when sp3 C-H bonds are plentiful; in a
 * molecule with few of them (an acetyl group on an aromatic ketone) they
 * are weak beside the polar bands. Common practice. */
static int eff_class(const irr_check *c, const irr_band *b)
{
	int ec = iclass(b->intensity);
	const irr_group *g = irr_inventory_group(c->inv, b->group_index);
	if (ec && g && b->typical > 2800 && b->typical < 3000 &&
	    (!strcmp(g->id, "methyl") || !strcmp(g->id, "methylene") || !strcmp(g->id, "methine"))) {
		const irr_counts *k = irr_inventory_counts(c->inv);
		double ratio = k->heavy_atoms ? (double)k->c_h_sp3 / k->heavy_atoms : 0;
		int cap = ratio >= 1.2 ? 3 : ratio >= 0.8 ? 2 : 1;
		if (ec > cap)
			ec = cap;
	}
	return ec;
}

static double band_weight_eff(const irr_band *b, int ec)
{
	static const double f[] = {0.5, 0.3, 0.7, 1.0};
	double w = b->weight * f[ec >= 0 && ec <= 3 ? ec : 0];
	if (irr_region_of(b->typical) == 4)
		w *= FINGERPRINT_FACTOR;
	if (b->overtone)
		w *= 0.2;
	return w;
}

static double peak_weight(const irr_peak *p)
{
	double w = p->saturated ? 1.0 : p->rel_height;
	if (w > 1.0)
		w = 1.0;
	if (p->position < 1500)
		w *= FINGERPRINT_PEAK;
	return w;
}

static int range_saturated(const irr_peaklist *pl, double lo, double hi)
{
	size_t n = irr_peaklist_saturated_count(pl);
	for (size_t i = 0; i < n; i++) {
		double a, b;
		irr_peaklist_saturated_range(pl, i, &a, &b);
		if (overlaps(lo, hi, a, b))
			return 1;
	}
	return 0;
}

static const char *fmtw(char *buf, size_t n, double v)
{
	irr_format_double(buf, n, v, 0);
	return buf;
}

/* Candidate groups for a peak, looked up backwards in the tables: groups
 * with a band whose window holds the position, nearest typical first,
 * classes too weak for the peak last. */
typedef struct cand {
	const char *name;
	double score;
} cand;

static int cand_cmp(const void *a, const void *b)
{
	const cand *x = a, *y = b;
	if (x->score != y->score)
		return x->score < y->score ? -1 : 1;
	return strcmp(x->name, y->name);
}

static size_t find_candidates(const irr_tables *t, const irr_peak *p, const char **out)
{
	cand best[64];
	size_t nb = 0, ng = irr_tables_group_count(t), nout = 0;
	int oc = peak_class(p);
	for (size_t g = 0; g < ng; g++) {
		const irr_table_group *tg = irr_tables_group(t, g);
		double gbest = 1e9;
		for (size_t k = 0; k < tg->nbands; k++) {
			const irr_table_band *tb = &tg->bands[k];
			double half = 0.5 * (tb->high - tb->low), s;
			if (tb->overtone || p->position < tb->low - 3 || p->position > tb->high + 3)
				continue;
			if (half < 5)
				half = 5;
			s = fabs(p->position - tb->typical) / half;
			/* Strong peaks are rarely a weak table band; broad ones rarely
			 * a sharp band. */
			if (iclass(tb->intensity) && iclass(tb->intensity) + 1 < oc)
				s += 1.0;
			if (p->broad && !is_broad_shape(tb->shape))
				s += 0.5;
			if (!p->broad && p->fwhm > 0 && tb->shape == IRR_SHAPE_VERY_BROAD)
				s += 0.8;
			s -= 0.3 * tb->weight;
			if (s < gbest)
				gbest = s;
		}
		if (gbest < 1e9) {
			/* One entry per trade name (several table ids may share it). */
			size_t i;
			for (i = 0; i < nb; i++)
				if (!strcmp(best[i].name, tg->name))
					break;
			if (i < nb) {
				if (gbest < best[i].score)
					best[i].score = gbest;
			} else if (nb < sizeof best / sizeof best[0]) {
				best[nb].name = tg->name;
				best[nb].score = gbest;
				nb++;
			}
		}
	}
	qsort(best, nb, sizeof best[0], cand_cmp);
	for (size_t i = 0; i < nb && nout < MAX_CANDIDATES; i++)
		out[nout++] = best[i].name;
	return nout;
}

/* Bands of another substance: the same predictor plus, for library
 * entries, the tabulated strong bands (which come first: they are measured
 * positions of that very compound). */
/* The bands of a structure: the cached entry's (predicted by the first
 * check that needed them) when the options match, else predicted here.
 * *borrowed says which. */
static int predict_for(irr_check *c, const irr_inventory *inv, irr_sc_entry *cached,
                       const irr_predict_options *po, irr_prediction **out,
                       int *borrowed, irr_error *err)
{
	int rc;
	*borrowed = 0;
	if (cached) {
		if (!cached->pred) {
			if ((rc = irr_predict(&cached->pred, inv, c->t, po, err)) != IRR_OK)
				return rc;
			cached->pred_opt = *po;
		}
		if (cached->pred_opt.phase == po->phase && cached->pred_opt.sampling == po->sampling) {
			*out = cached->pred;
			*borrowed = 1;
			return IRR_OK;
		}
	}
	return irr_predict(out, inv, c->t, po, err);
}

static int other_bands(irr_check *c, other_in *o, const irr_predict_options *po,
                       irr_error *err)
{
	size_t np, nl, n = 0;
	int rc = predict_for(c, o->inv, o->cached, po, &o->pred, &o->pred_borrowed, err);
	if (rc)
		return rc;
	np = irr_prediction_count(o->pred);
	nl = o->solvent ? o->solvent->nbands : 0;
	o->bands = calloc(np + nl + 1, sizeof *o->bands);
	if (!o->bands)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	for (size_t i = 0; i < nl; i++) {
		const irr_solvent_band *sb = &o->solvent->bands[i];
		other_band *b = &o->bands[n++];
		b->label = sb->label;
		b->low = sb->low, b->high = sb->high, b->typical = sb->typical;
		b->intensity = sb->intensity;
		b->shape = sb->shape;
		b->weight = 1.0;
	}
	for (size_t i = 0; i < np; i++) {
		const irr_band *pb = irr_prediction_band(o->pred, i);
		other_band *b = &o->bands[n++];
		b->label = pb->label;
		b->low = pb->low, b->high = pb->high, b->typical = pb->typical;
		b->intensity = pb->intensity;
		b->shape = pb->shape;
		b->weight = pb->weight;
		b->overtone = pb->overtone;
	}
	o->nbands = n;
	return IRR_OK;
}

static int peak_in(const irr_peak *p, double lo, double hi, double margin)
{
	if (p->saturated)
		return overlaps(lo - margin, hi + margin, p->low, p->high);
	return p->position >= lo - margin && p->position <= hi + margin;
}

/* Whether a missing band alone makes the structure inconsistent:
 *   - an expected strong band of weight >= 0.5;
 *   - any band of weight >= 0.8;
 *   - a medium band of weight >= 0.5 when its group as a whole is poorly
 *     supported (less than half its observable weight found);
 *   - an X-H stretch of weight >= 0.5 above 1500 cm-1 whose group has
 *     another X-H stretch of the same kind found: one N-H stretch where a
 *     primary amine needs two (common practice). */
static int missing_decides(const irr_check *c, size_t i)
{
	const irr_band *b = c->exp[i].band;
	int ec = c->eclass[i];
	double gf = 0, gt = 0;
	int pair = 0;
	if (b->overtone)
		return 0;
	if (b->weight >= 0.8)
		return 1;
	if (b->weight < DECISIVE_WEIGHT)
		return 0;
	if (ec >= 3)
		return 1;
	for (size_t k = 0; k < c->nexp; k++) {
		const irr_expected *o = &c->exp[k];
		if (o->band->group_index != b->group_index || o->band->overtone ||
		    o->status == IRR_BAND_UNOBSERVABLE)
			continue;
		gt += o->band->weight;
		if (o->status == IRR_BAND_FOUND || o->status == IRR_BAND_SATURATED) {
			gf += o->band->weight;
			if (k != i && same_kind(o->band->label, b->label) && strstr(b->label, "-H stretch"))
				pair = 1;
		}
	}
	if (pair && b->typical >= 1500)
		return 1;
	return ec >= 2 && gt > 0 && gf < 0.5 * gt;
}

/* Strength of an unexplained peak for the decisive test: its height
 * relative to the strongest, raised by half above 2500 cm-1 under ATR,
 * which weakens bands there (common practice), and more for a wide O-H/N-H
 * band when the structure has neither. */
/* A band in the C=O stretch region (1660-1870 cm-1), even a weak one (0.05
 * of the strongest), explained by nothing, when the structure has no C=O at all: that
 * region is empty for a compound without a carbonyl, so such a band means a
 * carbonyl impurity or a different structure. Common practice. The bounds
 * keep the H-O-H bend of water (~1640) out; an aromatic ring's combination
 * bands lie there too and reach medium strength in thick films
 * (polystyrene-film.jdx, 1745-1870), so with a ring the band must be
 * stronger. */
static int carbonyl_where_none(const irr_check *c, const irr_peak *p)
{
	const irr_counts *k = irr_inventory_counts(c->inv);
	double need = k->aromatic_rings ? CO_REGION_REL_ARENE : CO_REGION_REL;
	return k->c_o_double == 0 && p->position >= CO_REGION_LOW &&
	       p->position <= CO_REGION_HIGH && p->rel_height >= need;
}

/* A wide hydrogen-bonded O-H band (3100-3600 cm-1, FWHM >= 150 cm-1) that
 * nothing given explains, in a structure with neither O-H nor N-H: the
 * most recognisable band of an infrared spectrum, and one the structure
 * cannot have (common practice). Moisture, a weak broad band with its
 * H-O-H bend near 1640 cm-1, is attributed before this is asked. Its
 * strength is measured against the product's own bands (the median height
 * of its found medium and strong bands), not against the strongest band:
 * a strong band clipped at the instrument's ceiling (toluene-atr.csv, A =
 * 5) would otherwise hide an alcohol's O-H band a fifth as strong as the
 * product's C-H stretches. A tenth of the product's typical band decides
 * (under ATR, which weakens bands there, a fifteenth); the weak broad band
 * near 3334 cm-1 of dichloromethane-d2.jdx is 0.03 of its bands. */
static int oh_where_none(const irr_check *c, const irr_peak *p)
{
	const irr_counts *k = irr_inventory_counts(c->inv);
	double need = OH_WHERE_NONE_REF * c->product_ref;
	if (c->opt.sampling == IRR_SAMPLING_ATR)
		need /= 1.5;
	return k->o_h == 0 && k->n_h == 0 && !p->saturated && p->broad &&
	       p->fwhm >= HBOND_FWHM && p->position >= 3100 && p->position <= 3600 &&
	       c->product_ref > 0 && p->height >= need;
}

/* A peak that could be one N-H stretch of an NH2 pair (see 9c): explained
 * by nothing, in 3250-3550 cm-1, a fiftieth of the product's typical band
 * at least, not broad, and not narrow either: N-H stretches of liquids and
 * solids are some tens of cm-1 wide (aniline.jdx: 42 and 49 cm-1), while
 * toluene-atr.csv has two faint bumps 6 and 16 cm-1 wide at 3523 and 3439
 * cm-1 that happen to fit the relation (common practice; widths from the
 * shared spectra). */
static int nh2_candidate(const irr_check *c, size_t j)
{
	const irr_peak *p = c->obs[j].peak;
	return c->obs[j].status == IRR_PEAK_UNEXPLAINED && !p->broad && !p->shoulder &&
	       !p->saturated && p->fwhm >= NH2_MIN_FWHM && p->position >= 3250 &&
	       p->position <= 3550 && p->height >= NH2_PAIR_REF * c->product_ref;
}

static double decisive_strength(const irr_check *c, const irr_peak *p)
{
	double s = p->rel_height;
	const irr_counts *k = irr_inventory_counts(c->inv);
	if (c->opt.sampling == IRR_SAMPLING_ATR && p->position > 2500)
		s *= 1.5;
	/* A wide H-bonded O-H/N-H band where the structure has no O-H or N-H
	 * at all: its area makes it a major band even when its height is
	 * modest. */
	if (p->broad && p->fwhm >= HBOND_FWHM && p->position >= 3100 && p->position <= 3600 &&
	    k->o_h == 0 && k->n_h == 0)
		s *= 2.5;
	return s;
}

static int reason_rank(const irr_check *c, const irr_reason *r)
{
	if (r->decisive)
		return 0;
	if (c->verdict == IRR_VERDICT_INCONSISTENT)
		return 4;
	if (!strcmp(r->code, "bands_found") || !strcmp(r->code, "unobservable") ||
	    !strcmp(r->code, "noisy") || !strcmp(r->code, "no_bands"))
		return 1;
	if (!strcmp(r->code, "other_present") || !strcmp(r->code, "rule"))
		return 2;
	return 4;
}

/* ---- The run ---- */

int irr_check_run(irr_check *c, irr_error *err)
{
	const irr_peaklist *pl;
	irr_predict_options po;
	double rlo, rhi, t0 = now_seconds(), t1;
	size_t np, ne, nrows = 0, *rows = NULL;
	double *cost = NULL;
	int *assign = NULL, rc;
	size_t *order = NULL;
	char w1[32], w2[32], w3[32];
	double found_w = 0, missing_w = 0, unexpl_w = 0;
	int decisive = 0, impure = 0;

	if (!c)
		return IRR_EINPUT;
	if (!c->mol)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no structure given");
	if (!c->in || !c->in->peaks)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no spectrum or peak list given");
	if ((rc = ensure_lib(c, err)))
		return rc;
	clear_result(c);
	pl = c->in->peaks;
	irr_peaklist_range(pl, &rlo, &rhi);
	np = irr_peaklist_count(pl);

	irr_predict_options_init(&po);
	po.phase = c->opt.phase;
	po.sampling = c->opt.sampling;
	if ((rc = predict_for(c, c->inv, c->cached, &po, &c->pred, &c->pred_borrowed, err)))
		goto done;
	t1 = now_seconds();
	c->timing.predict = t1 - t0;
	t0 = t1;
	c->timing.peaks = c->in->peaks_seconds;
	ne = irr_prediction_count(c->pred);

	c->exp = calloc(ne + 1, sizeof *c->exp);
	c->eclass = calloc(ne + 1, sizeof *c->eclass);
	c->obs = calloc(np + 1, sizeof *c->obs);
	c->cands = calloc(np * MAX_CANDIDATES + 1, sizeof *c->cands);
	c->ores = calloc(c->nothers + 1, sizeof *c->ores);
	rows = calloc(ne + 1, sizeof *rows);
	if (!c->exp || !c->eclass || !c->obs || !c->cands || !c->ores || !rows)
		goto nomem;
	c->nexp = ne;
	c->nobs = np;

	for (size_t j = 0; j < np; j++) {
		irr_observed *o = &c->obs[j];
		o->peak = irr_peaklist_get(pl, j);
		o->significant = o->peak->saturated || o->peak->rel_height >= SIGNIFICANT_REL;
		o->status = IRR_PEAK_UNEXPLAINED;
		o->expected = -1;
		o->weight = peak_weight(o->peak);
		o->attributed_kind = IRR_SOURCE_NONE;
		o->candidates = c->cands + j * MAX_CANDIDATES;
	}

	/* 1. Observability: outside the measured range, or under saturation. */
	for (size_t i = 0; i < ne; i++) {
		irr_expected *e = &c->exp[i];
		const irr_band *b = irr_prediction_band(c->pred, i);
		double in_lo = b->low > rlo ? b->low : rlo, in_hi = b->high < rhi ? b->high : rhi;
		e->band = b;
		e->peak = -1;
		c->eclass[i] = eff_class(c, b);
		e->weight = band_weight_eff(b, c->eclass[i]);
		if (in_hi <= in_lo || b->typical < rlo - 1 || b->typical > rhi + 1) {
			e->status = IRR_BAND_UNOBSERVABLE;
			e->note = "outside the measured range";
		} else if (range_saturated(pl, b->low, b->high)) {
			e->status = IRR_BAND_SATURATED;
			e->note = "window meets a saturated region";
		} else {
			e->status = IRR_BAND_MISSING;
			rows[nrows++] = i;
		}
	}

	/* 2. Optimal assignment: rows are the observable bands, columns the
	 * peaks plus one "missing" column per row. Costs are scaled by the
	 * band's importance so that a contested peak goes to the band whose
	 * absence would cost more. */
	if (nrows) {
		size_t m = np + nrows;
		cost = malloc(nrows * m * sizeof *cost);
		assign = malloc(nrows * sizeof *assign);
		if (!cost || !assign)
			goto nomem;
		for (size_t r = 0; r < nrows; r++) {
			const irr_band *b = c->exp[rows[r]].band;
			double scale = 0.2 + b->weight;
			double *row = cost + r * m;
			for (size_t j = 0; j < np; j++) {
				double k = pair_cost(b, c->eclass[rows[r]], c->obs[j].peak, c);
				row[j] = k >= IRR_ASSIGN_FORBIDDEN ? k : k * scale;
			}
			for (size_t k = 0; k < nrows; k++)
				row[np + k] = k == r ? MISSING_COST * scale : IRR_ASSIGN_FORBIDDEN;
		}
		if ((rc = irr_assign__solve(cost, nrows, m, assign, NULL)))
			goto done;
		for (size_t r = 0; r < nrows; r++) {
			size_t j = (size_t)assign[r];
			if (j < np) {
				irr_expected *e = &c->exp[rows[r]];
				e->status = IRR_BAND_FOUND;
				e->peak = (long)j;
				e->deviation = c->obs[j].peak->position - e->band->typical;
				c->obs[j].status = IRR_PEAK_EXPLAINED;
				c->obs[j].expected = (long)rows[r];
			}
		}
	}

	/* 3. Sharing: a band left without a peak may share the peak of a band
	 * of the same kind from another group (CH3 and CH2 stretches, two
	 * carbonyls), when that peak would have suited it too; in the crowded
	 * fingerprint region (below 1500 cm-1) a band of weight 0.5 or less may
	 * share with a band of any kind. Two bands of one group never share: a
	 * primary amine needs both N-H stretches. */
	for (size_t r = 0; r < nrows; r++) {
		irr_expected *e = &c->exp[rows[r]];
		double best = MISSING_COST;
		long bj = -1;
		if (e->status != IRR_BAND_MISSING)
			continue;
		for (size_t j = 0; j < np; j++) {
			const irr_expected *o;
			double k;
			if (c->obs[j].expected < 0)
				continue;
			o = &c->exp[c->obs[j].expected];
			if (o->band->group_index == e->band->group_index ||
			    (!same_kind(o->band->label, e->band->label) &&
			     !(c->obs[j].peak->position < 1500 && e->band->weight <= 0.5)))
				continue;
			k = pair_cost(e->band, c->eclass[rows[r]], c->obs[j].peak, c);
			if (k < best)
				best = k, bj = (long)j;
		}
		if (bj >= 0) {
			e->status = IRR_BAND_FOUND;
			e->peak = bj;
			e->shared = 1;
			e->deviation = c->obs[bj].peak->position - e->band->typical;
		}
	}

	/* 4. Hidden: a weak or medium band under a stronger band of another
	 * group cannot be seen; strong bands are never hidden this way. */
	for (size_t i = 0; i < ne; i++) {
		irr_expected *e = &c->exp[i];
		int ec = c->eclass[i];
		if (e->status != IRR_BAND_MISSING || ec >= 3)
			continue;
		for (size_t j = 0; j < np; j++) {
			const irr_peak *p = c->obs[j].peak;
			double lo = p->low, hi = p->high;
			/* Only under a band the product explains: an unexplained
			 * peak there may be this very band, shifted. */
			if (c->obs[j].expected < 0 ||
			    c->exp[c->obs[j].expected].band->group_index == e->band->group_index)
				continue;
			if (hi <= lo) {
				double h = p->fwhm > 0 ? 0.5 * p->fwhm : 8.0;
				lo = p->position - h, hi = p->position + h;
			}
			if (peak_class(p) > (ec ? ec : 1) && overlaps(lo, hi, e->band->low, e->band->high) &&
			    (p->broad || (e->band->typical >= lo && e->band->typical <= hi))) {
				e->status = IRR_BAND_UNOBSERVABLE;
				e->note = "hidden under a stronger band of another group";
				break;
			}
		}
	}

	/* 4b. Below the noise: a missing band whose class would put it under
	 * the picker's detection limit (min_snr x noise, relative to the
	 * strongest peak) could not have been seen. */
	{
		double noise = irr_peaklist_noise(pl), top = 0;
		for (size_t j = 0; j < np; j++)
			if (c->obs[j].peak->height > top)
				top = c->obs[j].peak->height;
		if (noise > 0) {
			double limit = top > 0 ? c->opt.peaks.min_snr * noise / top : 1e9;
			for (size_t i = 0; i < ne; i++) {
				irr_expected *e = &c->exp[i];
				int ec = c->eclass[i];
				double least = ec >= 3 ? c->opt.peaks.strong_frac
				             : ec == 2 ? c->opt.peaks.medium_frac
				             : c->opt.peaks.min_rel_height;
				if (e->status == IRR_BAND_MISSING && limit > least) {
					e->status = IRR_BAND_UNOBSERVABLE;
					e->note = "weaker than the noise allows to see";
				}
			}
		}
	}

	/* 5. Peaks not assigned: extra structure of the product's own bands. A
	 * second peak inside a window is the product's when it is weak, in the
	 * fingerprint or C-H stretching region, or the group occurs several
	 * times; a medium or strong second maximum in the diagnostic region is
	 * not (one N-H band for a secondary amine, one O-H band for a phenol). */
	for (size_t j = 0; j < np; j++) {
		irr_observed *o = &c->obs[j];
		const irr_peak *p = o->peak;
		long best = -1;
		double bestd = 1e9;
		if (o->status == IRR_PEAK_EXPLAINED)
			continue;
		/* A shoulder or split top inside the half-height span of a
		 * stronger assigned peak is part of that band. */
		long shoulder = -1;
		for (size_t k = 0; k < np && shoulder < 0; k++) {
			const irr_peak *q = c->obs[k].peak;
			if (k == j || c->obs[k].expected < 0 || c->exp[c->obs[k].expected].shared ||
			    c->exp[c->obs[k].expected].peak != (long)k)
				continue;
			if (q->high > q->low && p->position > q->low && p->position < q->high &&
			    (q->saturated || p->height < q->height))
				shoulder = c->obs[k].expected;
			/* the band went to a shoulder of this very maximum */
			else if (q->shoulder && p->high > p->low && q->position > p->low &&
			         q->position < p->high)
				shoulder = c->obs[k].expected;
		}
		for (size_t i = 0; i < ne && shoulder < 0; i++) {
			const irr_expected *e = &c->exp[i];
			const irr_band *b = e->band;
			double d;
			int ok;
			if (e->status == IRR_BAND_UNOBSERVABLE && e->note && e->note[0] == 'o')
				continue;
			/* A band the spectrum lacks explains nothing: a sharp C-H
			 * peak inside the window of a missing acid O-H envelope is
			 * not evidence of the acid. */
			if (e->status == IRR_BAND_MISSING)
				continue;
			if (!peak_in(p, b->low, b->high, 0.5 * margin_of(b->low, b->high)))
				continue;
			if (b->overtone && peak_class(p) > 1)
				continue;
			ok = peak_class(p) == 1 || p->position < 1500 ||
			     (p->position > 2800 && p->position < 3120 && !p->broad) ||
			     b->group_count > 1;
			if (!ok && e->status == IRR_BAND_FOUND && e->peak >= 0) {
				const irr_peak *q = c->obs[e->peak].peak;
				ok = !q->saturated ? p->height < 0.5 * q->height : 1;
			}
			if (!ok && e->status == IRR_BAND_SATURATED)
				ok = 1;
			if (!ok)
				continue;
			d = fabs(p->position - b->typical);
			if (d < bestd)
				bestd = d, best = (long)i;
		}
		/* A wide band in the X-H region whose span holds an O-H or N-H
		 * stretch the product explains is the hydrogen-bonded envelope of
		 * that stretch. Common practice. */
		if (shoulder < 0 && p->broad && p->high > p->low && p->position >= 3000 &&
		    p->position <= 3600) {
			for (size_t k = 0; k < np && shoulder < 0; k++) {
				const irr_observed *q = &c->obs[k];
				const irr_band *qb;
				if (q->expected < 0 || c->exp[q->expected].peak != (long)k)
					continue;
				qb = c->exp[q->expected].band;
				if ((strstr(qb->label, "O-H stretch") || strstr(qb->label, "N-H stretch")) &&
				    q->peak->position >= p->low - 20 && q->peak->position <= p->high + 20)
					shoulder = q->expected;
			}
		}
		if (shoulder >= 0)
			best = shoulder;
		/* Alkyl C-H stretching gives more peaks than the tables list
		 * (Fermi resonance with bending overtones, rotamers): an extra
		 * sharp peak at 2800-3000 cm-1 is the product's when it has alkyl
		 * C-H stretches. Common practice. */
		if (best < 0 && !p->broad && p->position >= 2800 && p->position <= 3000) {
			bestd = 1e9;
			for (size_t i = 0; i < ne; i++) {
				const irr_band *b = c->exp[i].band;
				const irr_group *g = irr_inventory_group(c->inv, b->group_index);
				if (!g || b->typical < 2800 || b->typical > 3000 ||
				    (strcmp(g->id, "methyl") && strcmp(g->id, "methylene") && strcmp(g->id, "methine")))
					continue;
				if (fabs(p->position - b->typical) < bestd)
					bestd = fabs(p->position - b->typical), best = (long)i;
			}
		}
		if (best >= 0) {
			o->status = IRR_PEAK_EXPLAINED;
			o->expected = best;
		}
	}

	/* 5b. A band still missing may take a peak that nothing explains just
	 * beyond its window (up to twice the usual margin): real positions
	 * stray past handbook windows more often than a wrong group happens to
	 * fall there. */
	for (size_t r = 0; r < nrows; r++) {
		size_t i = rows[r];
		irr_expected *e = &c->exp[i];
		irr_band wide;
		double best = MISSING_COST, m;
		long bj = -1;
		if (e->status != IRR_BAND_MISSING)
			continue;
		wide = *e->band;
		m = margin_of(wide.low, wide.high);
		wide.low -= m;
		wide.high += m;
		for (size_t j = 0; j < np; j++) {
			double k;
			if (c->obs[j].status != IRR_PEAK_UNEXPLAINED || !c->obs[j].significant)
				continue;
			k = pair_cost(&wide, c->eclass[i], c->obs[j].peak, c) + 0.3;
			if (k < best)
				best = k, bj = (long)j;
		}
		if (bj >= 0) {
			e->status = IRR_BAND_FOUND;
			e->peak = bj;
			e->deviation = c->obs[bj].peak->position - e->band->typical;
			e->note = "found just outside its window";
			c->obs[bj].status = IRR_PEAK_EXPLAINED;
			c->obs[bj].expected = (long)i;
		}
	}

	/* 6. Attribution: atmosphere, then the named substances, then a little
	 * moisture. */
	{
		const irr_solvents__air *air = irr_solvents__atmosphere(c->sl->lib);
		int vapour_lines[8] = {0};
		for (size_t j = 0; j < np; j++) {
			irr_observed *o = &c->obs[j];
			const irr_peak *p = o->peak;
			if (o->status != IRR_PEAK_UNEXPLAINED)
				continue;
			for (size_t k = 0; k < air->nco2; k++)
				if (peak_in(p, air->co2[k].low, air->co2[k].high, 0) && !p->broad) {
					o->status = IRR_PEAK_ATTRIBUTED;
					o->attributed_kind = IRR_SOURCE_ATMOSPHERE;
					o->attributed_name = "carbon dioxide";
					o->attributed_smiles = "O=C=O";
					o->attributed_label = air->co2[k].label;
					break;
				}
			if (o->status != IRR_PEAK_UNEXPLAINED)
				continue;
			for (size_t k = 0; k < air->nclusters && k < 8; k++)
				if (p->position >= air->clusters[k][0] && p->position <= air->clusters[k][1] &&
				    !p->broad && !p->saturated && p->intensity != IRR_INT_STRONG &&
				    (p->fwhm <= 0 || p->fwhm <= air->vapour_max_fwhm))
					vapour_lines[k]++;
		}
		for (size_t j = 0; j < np; j++) {
			irr_observed *o = &c->obs[j];
			const irr_peak *p = o->peak;
			if (o->status != IRR_PEAK_UNEXPLAINED)
				continue;
			for (size_t k = 0; k < air->nclusters && k < 8; k++)
				if (vapour_lines[k] >= air->vapour_min_lines &&
				    p->position >= air->clusters[k][0] && p->position <= air->clusters[k][1] &&
				    !p->broad && !p->saturated && p->intensity != IRR_INT_STRONG &&
				    (p->fwhm <= 0 || p->fwhm <= air->vapour_max_fwhm)) {
					o->status = IRR_PEAK_ATTRIBUTED;
					o->attributed_kind = IRR_SOURCE_ATMOSPHERE;
					o->attributed_name = "water vapour";
					o->attributed_smiles = "O";
					o->attributed_label = "rotation-vibration line";
					break;
				}
		}
	}
	for (size_t k = 0; k < c->nothers; k++)
		if ((rc = other_bands(c, &c->others[k], &po, err)))
			goto done;
	for (size_t j = 0; j < np; j++) {
		irr_observed *o = &c->obs[j];
		const irr_peak *p = o->peak;
		double bestd = 1e9;
		if (o->status != IRR_PEAK_UNEXPLAINED)
			continue;
		for (size_t k = 0; k < c->nothers; k++) {
			other_in *oi = &c->others[k];
			for (size_t b = 0; b < oi->nbands; b++) {
				const other_band *ob = &oi->bands[b];
				double half = 0.5 * (ob->high - ob->low), d;
				if (!peak_in(p, ob->low, ob->high, 0.5 * margin_of(ob->low, ob->high)))
					continue;
				if (ob->shape == IRR_SHAPE_VERY_BROAD && !p->broad && p->fwhm > 0 &&
				    p->fwhm < 0.5 * c->opt.peaks.broad_cm)
					continue;
				d = fabs(p->position - ob->typical) / (half < 5 ? 5 : half) + 0.01 * (double)k;
				if (d < bestd) {
					bestd = d;
					o->status = IRR_PEAK_ATTRIBUTED;
					o->attributed_kind = (irr_source_kind)oi->kind;
					o->attributed_name = oi->solvent ? oi->solvent->name : oi->given;
					o->attributed_smiles = oi->smiles;
					o->attributed_label = ob->label;
				}
			}
		}
	}
	{
		/* Moisture: a weak broad O-H band with a weak H-O-H bend, both
		 * weak against the product's own bands. */
		const irr_solvents__air *air = irr_solvents__atmosphere(c->sl->lib);
		long oh = -1;
		for (size_t j = 0; j < np && air->nmoist; j++) {
			const irr_peak *p = c->obs[j].peak;
			if (c->obs[j].status == IRR_PEAK_UNEXPLAINED && p->broad && !p->saturated &&
			    p->rel_height <= air->moist_max_rel &&
			    peak_in(p, air->moist[0].low, air->moist[0].high, 0))
				oh = (long)j;
		}
		/* ... and only with its H-O-H bend beside it. */
		if (oh >= 0 && air->nmoist > 1) {
			int bend = 0;
			for (size_t j = 0; j < np; j++) {
				const irr_peak *p = c->obs[j].peak;
				if (c->obs[j].status == IRR_PEAK_UNEXPLAINED && !p->saturated &&
				    p->height <= c->obs[oh].peak->height &&
				    peak_in(p, air->moist[1].low, air->moist[1].high, 0))
					bend = 1;
			}
			if (!bend)
				oh = -1;
		}
		if (oh >= 0) {
			for (size_t j = 0; j < np; j++) {
				irr_observed *o = &c->obs[j];
				const irr_peak *p = o->peak;
				for (size_t k = 0; k < air->nmoist; k++)
					if ((long)j == oh ||
					    (k > 0 && o->status == IRR_PEAK_UNEXPLAINED && !p->saturated &&
					     p->rel_height <= air->moist_max_rel &&
					     peak_in(p, air->moist[k].low, air->moist[k].high, 0))) {
						o->status = IRR_PEAK_ATTRIBUTED;
						o->attributed_kind = IRR_SOURCE_WATER;
						o->attributed_name = "water (moisture)";
						o->attributed_smiles = "O";
						o->attributed_label = air->moist[(long)j == oh ? 0 : k].label;
						break;
					}
			}
		}
	}

	/* 8. Marker bands of the other substances. */
	{
		double heights[256];
		size_t nh = 0;
		double ref = 0;
		for (size_t i = 0; i < ne && nh < 256; i++)
			if (c->exp[i].status == IRR_BAND_FOUND && !c->exp[i].shared &&
			    iclass(c->exp[i].band->intensity) >= 2)
				heights[nh++] = c->obs[c->exp[i].peak].peak->height;
		/* median of the product's found medium and strong bands */
		for (size_t a = 1; a < nh; a++)
			for (size_t b = a; b > 0 && heights[b - 1] > heights[b]; b--) {
				double t = heights[b];
				heights[b] = heights[b - 1], heights[b - 1] = t;
			}
		ref = nh ? heights[nh / 2] : 0;
		c->product_ref = ref;
		for (size_t k = 0; k < c->nothers; k++) {
			other_in *oi = &c->others[k];
			irr_other *r = &c->ores[k];
			size_t found = 0, observable = 0;
			int top_class = 0;
			oi->markers = calloc(oi->nbands + 1, sizeof *oi->markers);
			if (!oi->markers)
				goto nomem;
			for (size_t b = 0; b < oi->nbands; b++) {
				const other_band *ob = &oi->bands[b];
				irr_marker *mk;
				int dup = 0;
				/* Bands it must show: strong ones, or medium ones the
				 * tables count as diagnostic. */
				if (ob->overtone || iclass(ob->intensity) < 2 ||
				    (iclass(ob->intensity) < 3 && ob->weight < 0.3))
					continue;
				/* its strongest class in range, also of bands the product
				 * hides (below) */
				if (ob->high > rlo && ob->low < rhi && iclass(ob->intensity) > top_class)
					top_class = iclass(ob->intensity);
				/* The product explains it when one of its own bands, not
				 * an overtone and not two classes weaker, holds its
				 * typical position (within 5 cm-1). */
				for (size_t i = 0; i < ne && !dup; i++) {
					const irr_band *pb = c->exp[i].band;
					if (!pb->overtone && pb->weight > 0 &&
					    c->eclass[i] + 1 >= iclass(ob->intensity) &&
					    ob->typical >= pb->low - 5 && ob->typical <= pb->high + 5)
						dup = 1;
				}
				/* A library band and a predicted band for one vibration:
				 * keep the first (the library's, measured). */
				for (size_t q = 0; q < oi->nmarkers && !dup; q++)
					if (overlaps(ob->low, ob->high, oi->markers[q].low, oi->markers[q].high))
						dup = 1;
				if (dup)
					continue;
				mk = &oi->markers[oi->nmarkers++];
				mk->label = ob->label;
				mk->low = ob->low, mk->high = ob->high, mk->typical = ob->typical;
				mk->intensity = ob->intensity;
				mk->peak = -1;
				mk->observable = ob->high > rlo && ob->low < rhi &&
				                 !range_saturated(pl, ob->low, ob->high);
				if (!mk->observable)
					continue;
				observable++;
				for (size_t j = 0; j < np; j++) {
					const irr_peak *p = c->obs[j].peak;
					/* Traces count here: any picked peak, not only the
					 * significant ones. */
					if (c->obs[j].status == IRR_PEAK_EXPLAINED ||
					    c->obs[j].attributed_kind == IRR_SOURCE_ATMOSPHERE ||
					    !(peak_in(p, ob->low, ob->high, margin_of(ob->low, ob->high)) ||
					      (p->broad && p->high > p->low && ob->typical > p->low &&
					       ob->typical < p->high)))
						continue;
					/* a broad marker (an H-bonded O-H) only in a peak
					 * known to be broad: not in a shoulder, whose width
					 * is unknown (cyclohexene.jdx has faint shoulders
					 * near 3300 cm-1 that are no alcohol's O-H) */
					if (is_broad_shape(ob->shape) && !p->broad)
						continue;
					if (mk->peak < 0 || p->height > c->obs[mk->peak].peak->height)
						mk->peak = (long)j;
				}
				if (mk->peak >= 0) {
					irr_observed *o = &c->obs[mk->peak];
					found++;
					mk->rel_strength = ref > 0 ? o->peak->height / ref : 0;
					/* The marker decides whom the band belongs to. */
					o->status = IRR_PEAK_ATTRIBUTED;
					o->attributed_kind = (irr_source_kind)oi->kind;
					o->attributed_name = oi->solvent ? oi->solvent->name : oi->given;
					o->attributed_smiles = oi->smiles;
					o->attributed_label = ob->label;
					o->ncandidates = 0;
				}
			}
			r->kind = oi->kind;
			r->given = oi->given;
			r->name = oi->solvent ? oi->solvent->name : NULL;
			r->smiles = oi->smiles;
			r->formula = irr_molecule_formula(oi->mol);
			r->markers = oi->markers;
			r->nmarkers = oi->nmarkers;
			/* A single fingerprint coincidence does not outweigh an
			 * observable marker in the diagnostic region that is not
			 * there (a trace that shows its C-O band shows its O-H). */
			{
				size_t diag_found = 0, diag_missing = 0, fp_found = 0;
				int fp_class = 0;
				for (size_t q = 0; q < oi->nmarkers; q++) {
					const irr_marker *mk = &oi->markers[q];
					int again = 0;
					/* one peak found for two markers is one coincidence */
					for (size_t q2 = 0; q2 < q; q2++)
						if (oi->markers[q2].peak == mk->peak && oi->markers[q2].observable &&
						    oi->markers[q2].typical < 1500)
							again = 1;
					if (mk->observable && mk->typical < 1500 && mk->peak >= 0 && !again) {
						fp_found++;
						if (iclass(mk->intensity) > fp_class)
							fp_class = iclass(mk->intensity);
					}
				}
				/* only a missing marker at least as strong as the found
				 * fingerprint one speaks against it */
				for (size_t q = 0; q < oi->nmarkers; q++) {
					const irr_marker *mk = &oi->markers[q];
					if (!mk->observable || mk->typical < 1500)
						continue;
					if (mk->peak >= 0)
						diag_found++;
					else if (iclass(mk->intensity) >= fp_class)
						diag_missing++;
				}
				/* One fingerprint coincidence alone speaks only when it is
				 * of the substance's strongest class: a salt whose strong
				 * band lies under the product's and whose medium one meets
				 * a band of the product's (K2CO3 beside n-hexane: 886 cm-1
				 * at 0.03 x; beside indene: 861) is no evidence. */
				if (diag_found || (fp_found && !diag_missing && fp_class >= top_class) ||
				    fp_found >= 2)
					r->presence = IRR_PRESENCE_LIKELY_PRESENT;
				else if (observable)
					r->presence = IRR_PRESENCE_ABSENT;
				else
					r->presence = IRR_PRESENCE_CANNOT_TELL;
				(void)found;
			}
		}
		/* A substance whose markers are there to see and missing does not
		 * take the blame for other bands either. */
		for (size_t j = 0; j < np; j++) {
			irr_observed *o = &c->obs[j];
			if (o->status != IRR_PEAK_ATTRIBUTED || o->attributed_kind > IRR_SOURCE_SOLVENT)
				continue;
			for (size_t k = 0; k < c->nothers; k++)
				if (o->attributed_smiles == c->others[k].smiles) {
					if (c->ores[k].presence == IRR_PRESENCE_ABSENT) {
						o->status = IRR_PEAK_UNEXPLAINED;
						o->attributed_kind = IRR_SOURCE_NONE;
						o->attributed_name = o->attributed_smiles = o->attributed_label = NULL;
					} else {
						c->ores[k].nattributed++;
					}
					break;
				}
		}
	}

	/* 7. Candidates for what is still unexplained. */
	for (size_t j = 0; j < np; j++)
		if (c->obs[j].status == IRR_PEAK_UNEXPLAINED && c->obs[j].significant)
			c->obs[j].ncandidates = find_candidates(c->t, c->obs[j].peak,
			                                        c->cands + j * MAX_CANDIDATES);

	/* 9. Verdict, score and reasons, most important first. */
	{
		double key_total = 0, key_seen = 0;
		size_t nfound = 0, nobservable = 0, nsig = 0;
		int moisture = 0, co2 = 0, vapour = 0;
		/* 9a. Missing diagnostic bands decide, heaviest first. */
		size_t no = 0;
		order = malloc((ne + np + 1) * sizeof *order);
		if (!order)
			goto nomem;
		for (size_t i = 0; i < ne; i++) {
			const irr_expected *e = &c->exp[i];
			const irr_band *b = e->band;
			int ec = c->eclass[i];
			int key = !b->overtone && b->weight >= DECISIVE_WEIGHT && ec >= 2;
			if (key) {
				key_total += b->weight;
				if (e->status != IRR_BAND_UNOBSERVABLE)
					key_seen += b->weight;
			}
			if (e->status == IRR_BAND_FOUND || e->status == IRR_BAND_SATURATED) {
				found_w += e->weight;
				nfound++, nobservable++;
			} else if (e->status == IRR_BAND_MISSING) {
				missing_w += e->weight;
				nobservable++;
				if (!b->overtone && missing_decides(c, i) &&
				    (irr_region_of(b->typical) < 4 || b->weight >= FINGERPRINT_DECISIVE_WEIGHT))
					order[no++] = i;
			}
		}
		for (size_t a = 1; a < no; a++)
			for (size_t b = a; b > 0 && c->exp[order[b - 1]].band->weight < c->exp[order[b]].band->weight; b--) {
				size_t t = order[b];
				order[b] = order[b - 1], order[b - 1] = t;
			}
		for (size_t a = 0; a < no; a++) {
			const irr_band *b = c->exp[order[a]].band;
			decisive = 1;
			if (add_reason(c, "missing_band", 1, (long)order[a], -1,
			               "no band for the %s of the %s (expected %s, %s-%s cm-1)",
			               b->label, b->group_name, irr_intensity_name(b->intensity),
			               fmtw(w1, sizeof w1, b->low), fmtw(w2, sizeof w2, b->high)))
				goto nomem;
		}
		/* 9b. Strong unexplained bands, strongest first. */
		no = 0;
		for (size_t j = 0; j < np; j++) {
			irr_observed *o = &c->obs[j];
			if (o->status == IRR_PEAK_UNEXPLAINED && oh_where_none(c, o->peak))
				o->significant = 1;
			if (!o->significant)
				continue;
			nsig++;
			if (o->status == IRR_PEAK_ATTRIBUTED) {
				if (o->attributed_kind == IRR_SOURCE_WATER)
					moisture = 1;
				else if (o->attributed_kind == IRR_SOURCE_ATMOSPHERE)
				{
					if (o->attributed_smiles[1] == '=')
						co2 = 1;
					else
						vapour = 1;
				}
				else
					impure = 1;
			}
			if (o->status == IRR_PEAK_UNEXPLAINED) {
				unexpl_w += o->weight;
				order[no++] = j;
			}
		}
		for (size_t a = 1; a < no; a++)
			for (size_t b = a; b > 0 && c->obs[order[b - 1]].peak->rel_height < c->obs[order[b]].peak->rel_height; b--) {
				size_t t = order[b];
				order[b] = order[b - 1], order[b - 1] = t;
			}
		size_t listed = 0, unlisted = 0;
		for (size_t pass = 0; pass < 2; pass++)
			for (size_t a = 0; a < no; a++) {
				const irr_observed *o = &c->obs[order[a]];
				const irr_peak *p = o->peak;
				char cl[200] = "";
				int dec = p->saturated ? p->position >= 1500
				        : (p->fwhm <= 0 || p->fwhm >= SPIKE_FWHM) &&
				          ((decisive_strength(c, p) >= DECISIVE_REL && p->position >= 1500) ||
				           carbonyl_where_none(c, p) || oh_where_none(c, p));
				if ((pass == 0) != (dec != 0))
					continue;
				/* A shoulder or second top of a stronger unexplained band
				 * is listed with it, not as a reason of its own. */
				{
					int inside = 0;
					for (size_t b2 = 0; b2 < no && !inside; b2++) {
						const irr_peak *q = c->obs[order[b2]].peak;
						if (b2 != a && q->height > p->height && q->high > q->low &&
						    p->position > q->low && p->position < q->high)
							inside = 1;
					}
					if (inside)
						continue;
				}
				if (pass == 1 && p->intensity == IRR_INT_WEAK)
					continue;
				/* Non-decisive ones: the five strongest by name, the rest
				 * counted (all are in the observed list). */
				if (pass == 1 && listed >= MAX_LISTED) {
					unlisted++;
					continue;
				}
				if (o->ncandidates) {
					size_t n = strlen(cl);
					snprintf(cl + n, sizeof cl - n, " (could be: ");
					for (size_t q = 0; q < o->ncandidates; q++) {
						n = strlen(cl);
						snprintf(cl + n, sizeof cl - n, "%s%s", q ? "; " : "", o->candidates[q]);
					}
					n = strlen(cl);
					snprintf(cl + n, sizeof cl - n, ")");
				}
				if (dec)
					decisive = 1;
				if (pass == 1)
					listed++;
				if (add_reason(c, p->saturated ? "saturated_unexplained" : "unexplained_band",
				               dec, -1, (long)order[a], "%s%s band at %s cm-1 is explained by nothing given%s",
				               p->saturated ? "saturated (strong)" : irr_intensity_name(p->intensity),
				               p->broad ? " broad" : "", fmtw(w1, sizeof w1, p->position), cl))
					goto nomem;
			}
		if (unlisted && add_reason(c, "unexplained_band", 0, -1, -1,
		                           "%zu more medium or strong band%s that nothing given explains (see the observed bands)",
		                           unlisted, unlisted == 1 ? "" : "s"))
			goto nomem;
		free(order);
		order = NULL;

		/* 9c. Rules of the trade (common practice) that name a group the
		 * structure lacks. */
		{
			long broad_oh = -1, co = -1;
			for (size_t j = 0; j < np; j++) {
				const irr_observed *o = &c->obs[j];
				const irr_peak *p = o->peak;
				if (!o->significant || o->status == IRR_PEAK_ATTRIBUTED)
					continue;
				if (p->broad && p->position >= 2500 && p->position <= 3300 &&
				    p->intensity != IRR_INT_WEAK)
					broad_oh = (long)j;
				if (p->position >= 1680 && p->position <= 1780 &&
				    (p->intensity == IRR_INT_STRONG || p->saturated))
					co = (long)j;
			}
			/* Two N-H stretches where a secondary amine or amide shows
			 * one: a sharp unexplained band beside the explained N-H
			 * stretch, at least half its height. */
			for (size_t j = 0; j < np; j++) {
				const irr_observed *q = &c->obs[j];
				const irr_band *qb;
				const irr_group *g;
				if (q->expected < 0 || c->exp[q->expected].peak != (long)j)
					continue;
				qb = c->exp[q->expected].band;
				g = irr_inventory_group(c->inv, qb->group_index);
				if (!strstr(qb->label, "N-H stretch") || !g || g->attrs.n_h != 1)
					continue;
				for (size_t k = 0; k < np; k++) {
					const irr_peak *p = c->obs[k].peak;
					if (c->obs[k].status != IRR_PEAK_UNEXPLAINED || p->broad || p->shoulder ||
					    p->position < 3250 || p->position > 3550 ||
					    fabs(p->position - q->peak->position) > 150 ||
					    p->height < 0.5 * q->peak->height)
						continue;
					decisive = 1;
					if (add_reason(c, "rule", 1, q->expected, (long)k,
					               "two N-H stretches (%s and %s cm-1) where a secondary %s shows one (common practice)",
					               fmtw(w1, sizeof w1, q->peak->position),
					               fmtw(w2, sizeof w2, p->position), g->id))
						goto nomem;
					break;
				}
			}
			/* The two N-H stretches of an NH2 group (a primary amine,
			 * amide or sulfonamide) where the structure has neither N-H
			 * nor O-H: two sharp bands at 3250-3550 cm-1 whose positions
			 * obey nu_sym = 345.53 + 0.876 nu_asym (L. J. Bellamy and
			 * R. L. Williams, Spectrochim. Acta 9 (1957) 341; from memory)
			 * within 15 cm-1. Nothing else there comes in such a pair
			 * (water dissolved in the sample absorbs near 3690 and 3610,
			 * above the window), so even weak bands decide: a fiftieth of
			 * the product's typical band (ethylbenzene.jdx with 20 %
			 * aniline.jdx: 3495 and 3414 cm-1, 0.04 and 0.05 of it). */
			{
				const irr_counts *k = irr_inventory_counts(c->inv);
				for (size_t a = 0; a < np && k->n_h == 0 && k->o_h == 0 && c->product_ref > 0; a++) {
					const irr_peak *pa = c->obs[a].peak;
					size_t b;
					if (!nh2_candidate(c, a))
						continue;
					for (b = 0; b < np; b++) {
						const irr_peak *pb = c->obs[b].peak;
						if (b != a && nh2_candidate(c, b) &&
						    fabs(pb->position - (345.53 + 0.876 * pa->position)) <= NH2_PAIR_TOL)
							break;
					}
					if (b == np)
						continue;
					decisive = 1;
					c->obs[a].significant = c->obs[b].significant = 1;
					if (add_reason(c, "rule", 1, -1, (long)a,
					               "two sharp bands at %s and %s cm-1 in the ratio of the two N-H stretches of an NH2 group (a primary amine or amide), but the structure has no N-H (common practice; Bellamy & Williams 1957)",
					               fmtw(w1, sizeof w1, pa->position),
					               fmtw(w2, sizeof w2, c->obs[b].peak->position)))
						goto nomem;
					break;
				}
			}
			/* No C-H above 3000 means no sp2 or sp C-H. Not decisive on
			 * its own: aromatic C-H stretches of solids can be lost on
			 * the N-H background (4-chloroaniline). */
			{
				const irr_counts *k = irr_inventory_counts(c->inv);
				int nch = k->c_h_sp2 + k->c_h_sp, seen = 0;
				if (nch > 0 && rlo < 3000 && rhi > 3150) {
					for (size_t j = 0; j < np && !seen; j++) {
						const irr_peak *p = c->obs[j].peak;
						if ((p->position >= 3000 && p->position <= 3150) ||
						    (p->broad && p->low < 3075 && p->high > 3075))
							seen = 1;
					}
					if (!seen && add_reason(c, "rule", 0, -1, -1,
					                        "no band at 3000-3150 cm-1, where the structure's %d sp2/sp C-H should absorb: no C-H above 3000 means no sp2 or sp C-H (common practice)",
					                        nch))
						goto nomem;
				}
			}
			if (broad_oh >= 0 && co >= 0 && !irr_inventory_find(c->inv, "carboxylic_acid") &&
			    (c->obs[broad_oh].status == IRR_PEAK_UNEXPLAINED ||
			     c->obs[co].status == IRR_PEAK_UNEXPLAINED)) {
				if (add_reason(c, "rule", 0, -1, broad_oh,
				               "a broad O-H band near %s cm-1 with a C=O band at %s cm-1 points to a carboxylic acid, which the structure lacks (common practice)",
				               fmtw(w1, sizeof w1, c->obs[broad_oh].peak->position),
				               fmtw(w2, sizeof w2, c->obs[co].peak->position)))
					goto nomem;
			}
		}

		/* 9d. The other substances. */
		for (size_t k = 0; k < c->nothers; k++) {
			const irr_other *r = &c->ores[k];
			const char *who = r->name ? r->name : r->smiles;
			const char *kind = r->kind == IRR_OTHER_STARTING_MATERIAL ? "starting material"
			                 : r->kind == IRR_OTHER_REAGENT ? "reagent" : "solvent";
			if (r->presence == IRR_PRESENCE_LIKELY_PRESENT) {
				const irr_marker *best = NULL;
				size_t nf = 0;
				for (size_t q = 0; q < r->nmarkers; q++)
					if (r->markers[q].peak >= 0) {
						nf++;
						if (!best || r->markers[q].rel_strength > best->rel_strength)
							best = &r->markers[q];
					}
				impure = 1;
				if (add_reason(c, "other_present", 0, -1, best->peak,
				               "%s %s is likely present: %zu of %zu marker bands found, e.g. %s at %s cm-1 (%s x the product's bands)",
				               kind, who, nf, r->nmarkers, best->label,
				               fmtw(w1, sizeof w1, c->obs[best->peak].peak->position),
				               (irr_format_double(w3, sizeof w3, best->rel_strength, 2), w3)))
					goto nomem;
			} else if (r->presence == IRR_PRESENCE_ABSENT) {
				if (add_reason(c, "other_absent", 0, -1, -1,
				               "%s %s: none of its %zu marker bands found", kind, who, r->nmarkers))
					goto nomem;
			} else {
				if (add_reason(c, "other_cannot_tell", 0, -1, -1,
				               "%s %s: no marker band the product cannot explain is observable; cannot tell whether it is there",
				               kind, who))
					goto nomem;
			}
		}

		/* 9e. Key windows that could not be seen. */
		for (size_t i = 0; i < ne; i++) {
			const irr_expected *e = &c->exp[i];
			const irr_band *b = e->band;
			if (e->status == IRR_BAND_UNOBSERVABLE && !b->overtone && b->weight >= DECISIVE_WEIGHT &&
			    iclass(b->intensity) >= 2)
				if (add_reason(c, "unobservable", 0, (long)i, -1,
				               "the %s of the %s (%s-%s cm-1) could not be observed: %s",
				               b->label, b->group_name, fmtw(w1, sizeof w1, b->low),
				               fmtw(w2, sizeof w2, b->high), e->note))
					goto nomem;
		}

		/* 9f. Inconclusive? */
		{
			int inconclusive = 0, noisy = 0;
			if (ne == 0) {
				inconclusive = 1;
				if (add_reason(c, "no_bands", 0, -1, -1,
				               "the tables expect no band for this structure"))
					goto nomem;
			} else if (key_total > 0 && key_seen < 0.5 * key_total) {
				inconclusive = 1;
			} else if (key_total == 0 && nobservable == 0) {
				inconclusive = 1;
			}
			if (nsig < 2) {
				inconclusive = 1;
				if (add_reason(c, "noisy", 0, -1, -1, "the spectrum shows fewer than two significant bands"))
					goto nomem;
			} else if (c->in->spectrum && np) {
				double top = 0;
				for (size_t j = 0; j < np; j++)
					if (c->obs[j].peak->height > top && !c->obs[j].peak->saturated)
						top = c->obs[j].peak->height;
				if (top > 0 && irr_peaklist_noise(pl) > NOISY_FRAC * top) {
					inconclusive = 1;
					noisy = 1;
					if (add_reason(c, "noisy", 0, -1, -1,
					               "the noise is %s%% of the strongest band: too noisy to decide",
					               fmtw(w1, sizeof w1, 100 * irr_peaklist_noise(pl) / top)))
						goto nomem;
				}
			}
			/* Too noisy: nothing it shows or lacks can decide. */
			if (noisy)
				for (size_t q = 0; q < c->nreasons; q++)
					c->reasons[q].decisive = 0;
			if (decisive && !noisy)
				c->verdict = IRR_VERDICT_INCONSISTENT;
			else if (inconclusive)
				c->verdict = IRR_VERDICT_INCONCLUSIVE;
			else if (impure)
				c->verdict = IRR_VERDICT_CONSISTENT_IMPURE;
			else
				c->verdict = IRR_VERDICT_CONSISTENT;
		}

		/* 9g. Supporting facts and notes. */
		if (add_reason(c, "bands_found", 0, -1, -1, "%zu of %zu observable expected bands found%s",
		               nfound, nobservable,
		               decisive || key_seen < key_total ? "" : ", including every diagnostic one"))
			goto nomem;
		{
			size_t nattr = 0;
			for (size_t j = 0; j < np; j++)
				if (c->obs[j].significant && c->obs[j].status == IRR_PEAK_ATTRIBUTED &&
				    c->obs[j].attributed_kind <= IRR_SOURCE_SOLVENT)
					nattr++;
			if (nattr && add_reason(c, "attributed_band", 0, -1, -1,
			                        "%zu band%s attributed to the named starting materials, reagents or solvents",
			                        nattr, nattr == 1 ? "" : "s"))
				goto nomem;
		}
		if (moisture && add_reason(c, "moisture", 0, -1, -1,
		                           "a weak broad band near 3400 cm-1 (with one near 1640) suggests a little water; not counted against the structure"))
			goto nomem;
		if ((co2 || vapour) && add_reason(c, "atmosphere", 0, -1, -1, "%s%s%s in the beam path noted; not counted against the structure",
		                                  co2 ? "atmospheric CO2" : "", co2 && vapour ? " and " : "",
		                                  vapour ? "water vapour lines" : ""))
			goto nomem;
	}

	/* Score: agreement is the found share of the expected weight, reduced
	 * by half the share of the observed band weight that nothing explains. */
	{
		double sig_w = 0, den = found_w + missing_w, u;
		for (size_t j = 0; j < np; j++)
			if (c->obs[j].significant &&
			    !(c->obs[j].status == IRR_PEAK_ATTRIBUTED &&
			      c->obs[j].attributed_kind >= IRR_SOURCE_ATMOSPHERE))
				sig_w += c->obs[j].weight;
		u = sig_w > 0 ? unexpl_w / sig_w : 0.0;
		double unseen = 0, a;
		for (size_t i = 0; i < ne; i++)
			if (c->exp[i].status == IRR_BAND_UNOBSERVABLE)
				unseen += c->exp[i].weight;
		/* ... and by the share of the expected weight that could not be
		 * observed at all (out of range, hidden, below the noise). */
		a = den > 0 ? found_w / den * (1.0 - 0.5 * u) * (den / (den + unseen)) : 0.0;
		/* The verdict sets the band: consistent (also impure) 0.5-1,
		 * inconclusive 0-0.5, inconsistent 0-0.49; agreement places the
		 * score inside it, so that ranking by score keeps verdicts apart. */
		if (c->verdict == IRR_VERDICT_CONSISTENT || c->verdict == IRR_VERDICT_CONSISTENT_IMPURE)
			c->score = 0.5 + 0.5 * a;
		else if (c->verdict == IRR_VERDICT_INCONCLUSIVE)
			c->score = 0.5 * a;
		else
			c->score = 0.49 * a;
		c->score = floor(c->score * 1000.0 + 0.5) / 1000.0;
	}

	/* Most important first: decisive reasons; otherwise what supports the
	 * verdict (bands found, a substance present, rules), then the rest;
	 * each group in the order found (stable insertion sort). */
	for (size_t a = 1; a < c->nreasons; a++)
		for (size_t b = a; b > 0 && reason_rank(c, &c->reasons[b]) < reason_rank(c, &c->reasons[b - 1]); b--) {
			irr_reason t = c->reasons[b];
			c->reasons[b] = c->reasons[b - 1];
			c->reasons[b - 1] = t;
		}

	/* Cautions. */
	if (add_caution(c, CAUTION_EVIDENCE))
		goto nomem;
	for (size_t i = 0; i < irr_inventory_caution_count(c->inv); i++)
		if (add_caution(c, irr_inventory_caution(c->inv, i)))
			goto nomem;
	for (size_t k = 0; k < c->nothers; k++)
		for (size_t i = 0; i < irr_inventory_caution_count(c->others[k].inv); i++)
			if (add_caution(c, irr_inventory_caution(c->others[k].inv, i)))
				goto nomem;
	if (c->in->spectrum)
		for (size_t i = 0; i < irr_spectrum_warning_count(c->in->spectrum); i++)
			if (add_caution(c, irr_spectrum_warning(c->in->spectrum, i)))
				goto nomem;

	c->timing.reconcile = now_seconds() - t0;
	c->ran = 1;
	rc = IRR_OK;
	goto done;
nomem:
	rc = irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
done:
	free(rows);
	free(cost);
	free(assign);
	free(order);
	if (rc)
		clear_result(c);
	return rc;
}

/* ---- Accessors ---- */

irr_verdict irr_check_verdict(const irr_check *c)
{
	return c && c->ran ? c->verdict : IRR_VERDICT_INCONCLUSIVE;
}
double irr_check_score(const irr_check *c)
{
	return c && c->ran ? c->score : 0.0;
}
size_t irr_check_reason_count(const irr_check *c)
{
	return c && c->ran ? c->nreasons : 0;
}
const irr_reason *irr_check_reason(const irr_check *c, size_t i)
{
	return c && c->ran && i < c->nreasons ? &c->reasons[i] : NULL;
}
size_t irr_check_expected_count(const irr_check *c)
{
	return c && c->ran ? c->nexp : 0;
}
const irr_expected *irr_check_expected(const irr_check *c, size_t i)
{
	return c && c->ran && i < c->nexp ? &c->exp[i] : NULL;
}
size_t irr_check_observed_count(const irr_check *c)
{
	return c && c->ran ? c->nobs : 0;
}
const irr_observed *irr_check_observed(const irr_check *c, size_t i)
{
	return c && c->ran && i < c->nobs ? &c->obs[i] : NULL;
}
size_t irr_check_other_count(const irr_check *c)
{
	return c && c->ran ? c->nothers : 0;
}
const irr_other *irr_check_other(const irr_check *c, size_t i)
{
	return c && c->ran && i < c->nothers ? &c->ores[i] : NULL;
}
size_t irr_check_caution_count(const irr_check *c)
{
	return c && c->ran ? c->ncautions : 0;
}
const char *irr_check_caution(const irr_check *c, size_t i)
{
	return c && c->ran && i < c->ncautions ? c->cautions[i] : NULL;
}
const char *irr_check_structure_smiles(const irr_check *c)
{
	return c ? c->smiles : NULL;
}
const char *irr_check_structure_formula(const irr_check *c)
{
	return c && c->mol ? irr_molecule_formula(c->mol) : NULL;
}
const irr_molecule *irr_check_molecule(const irr_check *c)
{
	return c ? c->mol : NULL;
}
const irr_inventory *irr_check_inventory(const irr_check *c)
{
	return c ? c->inv : NULL;
}
const irr_prediction *irr_check_prediction(const irr_check *c)
{
	return c && c->ran ? c->pred : NULL;
}
const irr_spectrum *irr_check_spectrum(const irr_check *c)
{
	return c && c->in ? c->in->spectrum : NULL;
}
const irr_peaklist *irr_check_peaklist(const irr_check *c)
{
	return c && c->in ? c->in->peaks : NULL;
}
const irr_tables *irr_check_tables(const irr_check *c)
{
	return c ? c->t : NULL;
}
void irr_check_get_timing(const irr_check *c, irr_check_timing *out)
{
	if (!out)
		return;
	if (c)
		*out = c->timing;
	else
		memset(out, 0, sizeof *out);
}
