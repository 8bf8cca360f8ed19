/* report_text.c: the text report of a check, for an 80-column terminal.
 * Layout: a verdict banner, the reasons (decisive ones marked), then the
 * expected bands by status, the observed bands that are not the product's,
 * the other substances, and the cautions. Long lines wrap with a hanging
 * indent; nothing passes column 80. */
#include "irrecon/report.h"
#include "buf.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define WIDTH 80


/* Writes `prefix` then `text` word-wrapped to WIDTH, continuation lines
 * indented by `indent` spaces. Words longer than a line are cut. */
static void sb_wrap(irr_buf *b, const char *prefix, const char *text, size_t indent)
{
	size_t col = strlen(prefix);
	const char *p = text;
	int first = 1;
	irr_buf__add(b, prefix, col);
	for (;;) {
		size_t w;
		while (*p == ' ')
			p++;
		w = strcspn(p, " ");
		if (!w)
			break;
		if (!first && col + 1 + w > WIDTH) {
			irr_buf__add(b, "\n", 1);
			for (size_t i = 0; i < indent; i++)
				irr_buf__add(b, " ", 1);
			col = indent;
		} else if (!first) {
			irr_buf__add(b, " ", 1);
			col++;
		}
		first = 0;
		while (col + w > WIDTH) {
			size_t part = WIDTH > col ? WIDTH - col : 1;
			irr_buf__add(b, p, part);
			p += part, w -= part;
			irr_buf__add(b, "\n", 1);
			for (size_t i = 0; i < indent; i++)
				irr_buf__add(b, " ", 1);
			col = indent;
		}
		irr_buf__add(b, p, w);
		col += w;
		p += w;
	}
	irr_buf__add(b, "\n", 1);
}

static const char *num(char *buf, size_t n, double v)
{
	irr_format_double(buf, n, v, 0);
	return buf;
}

static void rule(irr_buf *b, const char *title)
{
	size_t n = strlen(title);
	irr_buf__printf(b, "\n-- %s ", title);
	for (size_t i = n + 4; i < WIDTH; i++)
		irr_buf__add(b, "-", 1);
	irr_buf__add(b, "\n", 1);
}

/* "ketone, open-chain: C=O stretch" cut to fit `w` columns. */
static void band_name(char *out, size_t w, const irr_band *bd)
{
	snprintf(out, w + 1, "%s: %s", bd->group_name, bd->label);
}

static void expected_section(irr_buf *b, const irr_check *c, irr_band_status st,
                             const char *title)
{
	size_t n = irr_check_expected_count(c), shown = 0;
	char name[41], w1[16], w2[16], w3[40], w4[16];
	for (size_t i = 0; i < n; i++) {
		const irr_expected *e = irr_check_expected(c, i);
		if (e->status != st)
			continue;
		if (!shown++) {
			rule(b, title);
			irr_buf__printf(b, "  %-40s %-11s %-8s %s\n", "band", "window", "class",
			          st == IRR_BAND_FOUND ? "peak (shift)" : "note");
		}
		band_name(name, 40, e->band);
		snprintf(w3, sizeof w3, "%s-%s", num(w1, sizeof w1, e->band->low),
		         num(w2, sizeof w2, e->band->high));
		if (st == IRR_BAND_FOUND) {
			const irr_observed *o = irr_check_observed(c, (size_t)e->peak);
			char dev[16];
			irr_format_double(dev, sizeof dev, e->deviation, 0);
			irr_buf__printf(b, "  %-40s %-11s %-8s %s (%s%s)%s\n", name, w3,
			          irr_intensity_name(e->band->intensity),
			          num(w4, sizeof w4, o->peak->position),
			          e->deviation > 0.5 ? "+" : "", dev, e->shared ? " shared" : "");
		} else {
			char line[200];
			snprintf(line, sizeof line, "  %-40s %-11s %-8s", name, w3,
			         irr_intensity_name(e->band->intensity));
			if (e->note)
				sb_wrap(b, line, e->note, 65);
			else
				irr_buf__printf(b, "%s\n", line);
		}
	}
}

int irr_report_text(char **out, const irr_check *c)
{
	irr_buf b = {0};
	char w1[32], w2[32];
	const irr_check_options *opt;
	size_t n;
	*out = NULL;
	if (!c || !irr_check_prediction(c))
		return IRR_EINPUT;
	opt = irr_check_get_options(c);

	{
		char up[32];
		const char *v = irr_verdict_name(irr_check_verdict(c));
		size_t i;
		for (i = 0; v[i] && i + 1 < sizeof up; i++)
			up[i] = (char)(v[i] == '_' ? ' ' : (v[i] >= 'a' && v[i] <= 'z' ? v[i] - 32 : v[i]));
		up[i] = '\0';
		irr_format_double(w1, sizeof w1, irr_check_score(c), 2);
		irr_buf__printf(&b, "== %s == score %s", up, w1);
		if (opt->sample_id)
			irr_buf__printf(&b, " == sample %.40s", opt->sample_id);
		irr_buf__add(&b, "\n", 1);
	}
	{
		char pre[64];
		snprintf(pre, sizeof pre, "structure  ");
		char line[1200];
		snprintf(line, sizeof line, "%s (%s)", irr_check_structure_smiles(c),
		         irr_check_structure_formula(c) ? irr_check_structure_formula(c) : "?");
		sb_wrap(&b, pre, line, 11);
		if (opt->input_name) {
			snprintf(line, sizeof line, "%s%s%.12s%s", opt->input_name,
			         opt->input_sha256 ? " (sha256 " : "",
			         opt->input_sha256 ? opt->input_sha256 : "",
			         opt->input_sha256 ? "...)" : "");
			sb_wrap(&b, "input      ", line, 11);
		}
		snprintf(line, sizeof line, "%s, %s", irr_phase_name(opt->phase),
		         irr_sampling_name(opt->sampling));
		sb_wrap(&b, "conditions ", line, 11);
	}

	rule(&b, "why");
	n = irr_check_reason_count(c);
	for (size_t i = 0; i < n; i++) {
		const irr_reason *r = irr_check_reason(c, i);
		sb_wrap(&b, r->decisive ? "  ! " : "  - ", r->text, 4);
	}

	expected_section(&b, c, IRR_BAND_MISSING, "expected bands missing");
	expected_section(&b, c, IRR_BAND_FOUND, "expected bands found");
	expected_section(&b, c, IRR_BAND_SATURATED, "expected bands in saturated regions");
	expected_section(&b, c, IRR_BAND_UNOBSERVABLE, "expected bands not observable");

	/* Observed bands that are not the product's. */
	for (int pass = 0; pass < 2; pass++) {
		size_t shown = 0;
		irr_peak_status st = pass == 0 ? IRR_PEAK_UNEXPLAINED : IRR_PEAK_ATTRIBUTED;
		n = irr_check_observed_count(c);
		for (size_t i = 0; i < n; i++) {
			const irr_observed *o = irr_check_observed(c, i);
			char pre[64], text[600];
			if (o->status != st || !o->significant)
				continue;
			if (!shown++)
				rule(&b, pass == 0 ? "observed bands nothing given explains"
				                   : "observed bands attributed to something else");
			snprintf(pre, sizeof pre, "  %6s  %-8s %-6s ", num(w1, sizeof w1, o->peak->position),
			         o->peak->saturated ? "saturated" : irr_intensity_name(o->peak->intensity),
			         o->peak->broad ? "broad" : "");
			if (pass == 0) {
				size_t k = 0;
				text[0] = '\0';
				if (o->ncandidates) {
					k = (size_t)snprintf(text, sizeof text, "could be:");
					for (size_t q = 0; q < o->ncandidates && k < sizeof text; q++)
						k += (size_t)snprintf(text + k, sizeof text - k, "%s %s",
						                      q ? ";" : "", o->candidates[q]);
				} else {
					snprintf(text, sizeof text, "no group in the tables has a band here");
				}
			} else {
				snprintf(text, sizeof text, "%s (%s): %s", o->attributed_name,
				         irr_source_kind_name(o->attributed_kind),
				         o->attributed_label ? o->attributed_label : "");
			}
			sb_wrap(&b, pre, text, 28);
		}
	}

	n = irr_check_other_count(c);
	if (n)
		rule(&b, "starting materials, reagents, solvents");
	for (size_t i = 0; i < n; i++) {
		const irr_other *r = irr_check_other(c, i);
		char text[600];
		snprintf(text, sizeof text, "%s %s%s%s%s: %s", irr_other_kind_name(r->kind),
		         r->name ? r->name : r->smiles, r->name ? " (" : "", r->name ? r->smiles : "",
		         r->name ? ")" : "", irr_presence_name(r->presence));
		sb_wrap(&b, "  ", text, 4);
		for (size_t k = 0; k < r->nmarkers; k++) {
			const irr_marker *m = &r->markers[k];
			char line[300];
			snprintf(line, sizeof line, "marker %s %s-%s: %s", m->label,
			         num(w1, sizeof w1, m->low), num(w2, sizeof w2, m->high),
			         m->observable ? "not found" : "not observable");
			if (m->peak >= 0) {
				char pos[32], rel[32];
				irr_format_double(pos, sizeof pos, irr_check_observed(c, (size_t)m->peak)->peak->position, 0);
				irr_format_double(rel, sizeof rel, m->rel_strength, 2);
				snprintf(line, sizeof line, "marker %s %s-%s: found at %s, %s x the product's bands",
				         m->label, num(w1, sizeof w1, m->low), num(w2, sizeof w2, m->high), pos, rel);
			}
			sb_wrap(&b, "      ", line, 8);
		}
		if (!r->nmarkers)
			sb_wrap(&b, "      ", "no marker band: every band it should show, the product shows too", 8);
	}

	rule(&b, "cautions");
	for (size_t i = 0; i < irr_check_caution_count(c); i++)
		sb_wrap(&b, "  * ", irr_check_caution(c, i), 4);

	if (b.oom) {
		free(b.p);
		return IRR_ENOMEM;
	}
	*out = b.p;
	return IRR_OK;
}
