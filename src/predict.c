/* predict.c: the "predict bands" stage. For each perceived group, the table
 * groups with its key (or, for user groups, its SMARTS table id); each band's
 * context rules are applied in table order against the group's attributes
 * and the measuring conditions; the result is sorted highest wavenumber
 * first. No file I/O or JSON work happens here: the tables are indexed at
 * load time, so this runs per molecule in a batch. */
#include "irrecon/predict.h"

#include <stdlib.h>
#include <string.h>

#define MAX_TABLES_PER_KEY 16

struct irr_prediction {
	irr_band *bands;
	size_t n, cap;
	size_t *order;       /* table band order, for a stable sort */
	size_t *noteoff;     /* 1 + offset of a joined note in `notes`, or 0 */
	char *notes;         /* joined notes; bands point into it */
	size_t nnotes, capnotes;
};

void irr_predict_options_init(irr_predict_options *o)
{
	if (!o)
		return;
	o->phase = IRR_PHASE_CONDENSED;
	o->sampling = IRR_SAMPLING_ATR;
}

void irr_prediction_free(irr_prediction *p)
{
	if (!p)
		return;
	free(p->bands);
	free(p->order);
	free(p->noteoff);
	free(p->notes);
	free(p);
}

size_t irr_prediction_count(const irr_prediction *p)
{
	return p ? p->n : 0;
}

const irr_band *irr_prediction_band(const irr_prediction *p, size_t i)
{
	return p && i < p->n ? &p->bands[i] : NULL;
}

int irr_region_of(double w)
{
	if (w > 3000.0)
		return 0;
	if (w > 2500.0)
		return 1;
	if (w > 2000.0)
		return 2;
	if (w >= 1500.0)
		return 3;
	return 4;
}

const char *irr_region_name(int region)
{
	static const char *const names[] = {
		"above 3000 cm-1: O-H, N-H, =C-H and C#C-H stretches",
		"3000-2500 cm-1: C-H, S-H and acid O-H stretches",
		"2500-2000 cm-1: triple and cumulated bonds, P-H, Si-H",
		"2000-1500 cm-1: C=O, C=N, C=C, N-H bends",
		"below 1500 cm-1: fingerprint region"
	};
	return region >= 0 && region < 5 ? names[region] : "unknown region";
}

/* Compares an integer attribute with a rule value: "5", "!0", ">=7", "<=1". */
static int match_int(int v, const char *rule)
{
	if (rule[0] == '!')
		return v != atoi(rule + 1);
	if (rule[0] == '>' && rule[1] == '=')
		return v >= atoi(rule + 2);
	if (rule[0] == '<' && rule[1] == '=')
		return v <= atoi(rule + 2);
	return v == atoi(rule);
}

static int match_text(const char *v, const char *rule)
{
	if (rule[0] == '!')
		return strcmp(v, rule + 1) != 0;
	return strcmp(v, rule) == 0;
}

static int rule_matches(const irr_table_rule *r, const irr_group *g,
                        const irr_predict_options *o)
{
	const irr_group_attrs *a = &g->attrs;
	const char *attr = r->attr;
	switch (attr[0]) {
	case 'c':
		if (!strcmp(attr, "conjugated"))
			return match_int(a->conjugated, r->value);
		if (!strcmp(attr, "count"))
			return match_int(g->count, r->value);
		break;
	case 'r':
		return match_int(a->ring_size, r->value);
	case 'n':
		return match_int(a->n_h, r->value);
	case 'a':
		return match_int(a->aryl, r->value);
	case 'h':
		return match_int(a->hbond_intra, r->value);
	case 'p':
		if (!strcmp(attr, "pattern"))
			return match_text(a->pattern, r->value);
		if (!strcmp(attr, "phase")) {
			irr_phase ph;
			int neg = r->value[0] == '!';
			if (irr_phase_parse(r->value + neg, &ph) != IRR_OK)
				return 0;
			return (ph == o->phase) != neg;
		}
		break;
	case 's':
		if (!strcmp(attr, "sampling")) {
			irr_sampling sa;
			int neg = r->value[0] == '!';
			if (irr_sampling_parse(r->value + neg, &sa) != IRR_OK)
				return 0;
			return (sa == o->sampling) != neg;
		}
		break;
	}
	return 0;
}

/* Appends "a; b" notes to the prediction's note buffer; returns the offset
 * (+1, so that 0 means "no note"). Pointers are fixed up at the end because
 * the buffer may move while it grows. */
static size_t note_add(irr_prediction *p, const char *s, int join)
{
	size_t len = strlen(s), need = len + 3;
	if (p->capnotes - p->nnotes < need) {
		size_t ncap = p->capnotes ? p->capnotes * 2 : 1024;
		while (ncap - p->nnotes < need)
			ncap *= 2;
		char *nn = realloc(p->notes, ncap);
		if (!nn)
			return (size_t)-1;
		p->notes = nn, p->capnotes = ncap;
	}
	if (join) {
		/* Overwrite the previous terminator with the separator. */
		p->nnotes--;
		memcpy(p->notes + p->nnotes, "; ", 2);
		p->nnotes += 2;
	}
	size_t at = p->nnotes;
	memcpy(p->notes + p->nnotes, s, len + 1);
	p->nnotes += len + 1;
	return at;
}

static int push_band(irr_prediction *p, const irr_band *b, size_t order, size_t noteoff)
{
	if (p->n == p->cap) {
		size_t ncap = p->cap ? p->cap * 2 : 32;
		irr_band *nb = realloc(p->bands, ncap * sizeof *nb);
		if (!nb)
			return IRR_ENOMEM;
		p->bands = nb;
		size_t *no = realloc(p->order, ncap * sizeof *no);
		if (!no)
			return IRR_ENOMEM;
		p->order = no;
		size_t *nn = realloc(p->noteoff, ncap * sizeof *nn);
		if (!nn)
			return IRR_ENOMEM;
		p->noteoff = nn;
		p->cap = ncap;
	}
	p->order[p->n] = order;
	p->noteoff[p->n] = noteoff;
	p->bands[p->n++] = *b;
	return IRR_OK;
}

/* The bands of one table group for one inventory entry. */
static int predict_group(irr_prediction *p, const irr_table_group *tg,
                         const irr_group *g, size_t gi,
                         const irr_predict_options *o, size_t *serial)
{
	for (size_t bi = 0; bi < tg->nbands; bi++) {
		const irr_table_band *tb = &tg->bands[bi];
		irr_band b;
		int omit = 0;
		size_t note_at = 0; /* offset + 1 into p->notes */
		b.group_id = tg->id;
		b.group_name = tg->name;
		b.label = tb->label;
		b.low = tb->low, b.high = tb->high, b.typical = tb->typical;
		b.intensity = tb->intensity;
		b.shape = tb->shape;
		b.weight = tb->weight;
		b.overtone = tb->overtone;
		b.group_count = g->count;
		b.group_index = gi;
		b.source = tb->source;
		b.note = tb->note;
		for (size_t ri = 0; ri < tb->nrules && !omit; ri++) {
			const irr_table_rule *r = &tb->rules[ri];
			if (!rule_matches(r, g, o))
				continue;
			if (r->omit) {
				omit = 1;
				break;
			}
			if (r->set_window)
				b.low = r->low, b.high = r->high, b.typical = r->typical;
			b.low += r->shift, b.high += r->shift, b.typical += r->shift;
			if (r->intensity != IRR_INT_NONE)
				b.intensity = r->intensity;
			if (r->note) {
				size_t at;
				if (!note_at && tb->note) {
					at = note_add(p, tb->note, 0);
					if (at == (size_t)-1)
						return IRR_ENOMEM;
					note_at = at + 1;
				}
				at = note_add(p, r->note, note_at != 0);
				if (at == (size_t)-1)
					return IRR_ENOMEM;
				if (!note_at)
					note_at = at + 1;
			}
		}
		(*serial)++;
		if (omit)
			continue;
		if (push_band(p, &b, *serial, note_at) != IRR_OK)
			return IRR_ENOMEM;
	}
	return IRR_OK;
}

typedef struct sort_item {
	irr_band band;
	size_t order;
} sort_item;

static int cmp_band(const void *x, const void *y)
{
	const sort_item *a = x, *b = y;
	if (a->band.typical != b->band.typical)
		return a->band.typical < b->band.typical ? 1 : -1;
	return (a->order > b->order) - (a->order < b->order);
}

int irr_predict_groups(irr_prediction **out, const irr_group *groups, size_t ngroups,
                       const irr_tables *t, const irr_predict_options *o,
                       irr_error *err)
{
	irr_prediction *p;
	irr_predict_options def;
	size_t serial = 0;
	if (!out || !t || (ngroups && !groups))
		return irr_error_set(err, IRR_ERROR, "", 0, "irr_predict: missing argument");
	*out = NULL;
	if (!o) {
		irr_predict_options_init(&def);
		o = &def;
	}
	if (!(p = calloc(1, sizeof *p)))
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	for (size_t gi = 0; gi < ngroups; gi++) {
		const irr_group *g = &groups[gi];
		const irr_table_group *found[MAX_TABLES_PER_KEY];
		size_t nf = irr_tables_find_key(t, g->id, found, MAX_TABLES_PER_KEY);
		if (nf == 0) {
			/* User groups perceived by SMARTS carry their table id. */
			const irr_table_group *tg = irr_tables_find_id(t, g->id);
			if (tg && tg->smarts)
				found[nf++] = tg;
		}
		for (size_t k = 0; k < nf; k++)
			if (predict_group(p, found[k], g, gi, o, &serial) != IRR_OK)
				goto nomem;
	}
	/* Resolve note offsets now that the buffer no longer moves. */
	for (size_t i = 0; i < p->n; i++)
		if (p->noteoff[i])
			p->bands[i].note = p->notes + p->noteoff[i] - 1;
	if (p->n > 1) {
		sort_item *items = malloc(p->n * sizeof *items);
		if (!items)
			goto nomem;
		for (size_t i = 0; i < p->n; i++)
			items[i].band = p->bands[i], items[i].order = p->order[i];
		qsort(items, p->n, sizeof *items, cmp_band);
		for (size_t i = 0; i < p->n; i++)
			p->bands[i] = items[i].band, p->order[i] = items[i].order;
		free(items);
	}
	*out = p;
	return IRR_OK;
nomem:
	irr_prediction_free(p);
	return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
}

int irr_predict(irr_prediction **out, const irr_inventory *inv,
                const irr_tables *t, const irr_predict_options *o,
                irr_error *err)
{
	size_t n;
	irr_group stack[64], *groups = stack;
	int rc;
	if (!out || !inv || !t) {
		if (out)
			*out = NULL;
		return irr_error_set(err, IRR_ERROR, "", 0, "irr_predict: missing argument");
	}
	n = irr_inventory_group_count(inv);
	/* The inventory is opaque; copy its entries (atoms stay borrowed). */
	if (n > sizeof stack / sizeof stack[0] && !(groups = malloc(n * sizeof *groups))) {
		*out = NULL;
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	for (size_t i = 0; i < n; i++)
		groups[i] = *irr_inventory_group(inv, i);
	rc = irr_predict_groups(out, groups, n, t, o, err);
	if (groups != stack)
		free(groups);
	return rc;
}
