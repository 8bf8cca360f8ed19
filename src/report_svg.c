/* report_svg.c: the SVG plot of a check. The measured spectrum is drawn
 * with wavenumber decreasing to the right, as infrared spectra are printed;
 * over it the five region guides, every expected window shaded by its
 * status, every significant observed peak marked by its status, short labels
 * on the key bands placed greedily so they never overlap, a legend, and the
 * sample, structure and verdict. Status is told by pattern, dash and marker
 * shape as well as by colour, so the plot reads in grey print. Output is
 * deterministic: fixed decimals, no dates, no random ids. */
#include "irrecon/report.h"
#include "buf.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---- Text buffer: irr_buf (buf.h); every %f-style number goes
 * through num(), so irr_buf__printf takes strings and integers only. */

/* Coordinates with one decimal, locale-independent; a ring of buffers so a
 * few can appear in one sb_printf call. */
static const char *num(double v)
{
	static _Thread_local char ring[16][32];
	static _Thread_local unsigned k;
	char *s = ring[k++ % 16];
	irr_format_double(s, 32, fabs(v) < 0.05 ? 0.0 : v, 1);
	{
		size_t n = strlen(s);
		if (n > 2 && s[n - 1] == '0' && s[n - 2] == '.')
			s[n - 2] = '\0';
	}
	return s;
}

/* ---- Text: UTF-8 cleaning, XML escaping, width estimates ---- */

/* Copies s into a fresh string with invalid UTF-8 bytes and control
 * characters replaced by '?' or dropped, so the SVG is always well-formed
 * XML (XML 1.0 forbids most C0 controls even as references). */
static char *clean_utf8(const char *s)
{
	size_t n = s ? strlen(s) : 0, k = 0;
	char *o = malloc(n + 1);
	const unsigned char *p = (const unsigned char *)(s ? s : "");
	if (!o)
		return NULL;
	while (*p) {
		unsigned c = *p;
		size_t len = c < 0x80 ? 1 : (c & 0xE0) == 0xC0 ? 2 : (c & 0xF0) == 0xE0 ? 3
		           : (c & 0xF8) == 0xF0 ? 4 : 0;
		int ok = len > 0;
		for (size_t i = 1; ok && i < len; i++)
			if ((p[i] & 0xC0) != 0x80)
				ok = 0;
		if (ok && len == 2 && c < 0xC2)
			ok = 0; /* overlong */
		if (ok && len == 3 && ((c == 0xE0 && p[1] < 0xA0) || (c == 0xED && p[1] >= 0xA0)))
			ok = 0; /* overlong, or a UTF-16 surrogate */
		if (ok && len == 4 && ((c == 0xF0 && p[1] < 0x90) || c > 0xF4 || (c == 0xF4 && p[1] >= 0x90)))
			ok = 0;
		if (!ok) {
			o[k++] = '?';
			p++;
			continue;
		}
		if (len == 1 && c < 0x20) {
			o[k++] = ' ';
			p++;
			continue;
		}
		if (len == 1 && c == 0x7F) {
			p++;
			continue;
		}
		memcpy(o + k, p, len);
		k += len;
		p += len;
	}
	o[k] = '\0';
	return o;
}

static void sb_xml(irr_buf *b, const char *s)
{
	for (; *s; s++) {
		switch (*s) {
		case '&': irr_buf__str(b, "&amp;"); break;
		case '<': irr_buf__str(b, "&lt;"); break;
		case '>': irr_buf__str(b, "&gt;"); break;
		case '"': irr_buf__str(b, "&quot;"); break;
		case '\'': irr_buf__str(b, "&#39;"); break;
		default: irr_buf__add(b, s, 1);
		}
	}
}

/* Advance widths in em for a sans-serif face, rounded up from DejaVu Sans
 * (the widest of the usual sans faces) so estimates err on the large side:
 * the layout must never let text run off the canvas. */
static double char_em(unsigned c)
{
	if (c >= 0x80)
		return 1.0;
	if (strchr("il.,:;'|!`", (int)c))
		return 0.36;
	if (c == ' ')
		return 0.34;
	if (strchr("fjrt()[]{}-/\\\"", (int)c))
		return 0.46;
	if (c >= '0' && c <= '9')
		return 0.66;
	if (strchr("mw", (int)c))
		return 0.98;
	if (strchr("MW@%", (int)c))
		return 1.02;
	if (c >= 'A' && c <= 'Z')
		return 0.80;
	if (c >= 'a' && c <= 'z')
		return 0.64;
	return 0.86; /* = # + * ? and other symbols */
}

/* Estimated width in px of UTF-8 text at `size` px (bold adds 10 %). */
static double text_width(const char *s, double size, int bold)
{
	double em = 0.0;
	const unsigned char *p = (const unsigned char *)s;
	while (*p) {
		if ((*p & 0xC0) != 0x80)
			em += char_em(*p);
		p++;
	}
	return em * size * (bold ? 1.1 : 1.0);
}

/* The longest prefix of s (whole UTF-8 characters) that with "..." fits
 * `width`; s itself when it fits. Caller frees. */
static char *fit_text(const char *s, double size, int bold, double width)
{
	size_t n = strlen(s);
	char *o;
	if (text_width(s, size, bold) <= width)
		return strdup(s);
	o = malloc(n + 4);
	if (!o)
		return NULL;
	while (n > 0) {
		do
			n--;
		while (n > 0 && ((unsigned char)s[n] & 0xC0) == 0x80);
		memcpy(o, s, n);
		memcpy(o + n, "...", 4);
		if (text_width(o, size, bold) <= width)
			return o;
	}
	strcpy(o, text_width("...", size, bold) <= width ? "..." : "");
	return o;
}

/* One <text> element. anchor: 's' start, 'm' middle, 'e' end. */
static void put_text(irr_buf *b, double x, double y, double size, int bold,
                     char anchor, const char *fill, const char *extra,
                     const char *text)
{
	irr_buf__printf(b, "<text x=\"%s\" y=\"%s\" font-size=\"%s\"%s%s fill=\"%s\"%s>",
	          num(x), num(y), num(size), bold ? " font-weight=\"bold\"" : "",
	          anchor == 'm' ? " text-anchor=\"middle\"" : anchor == 'e' ? " text-anchor=\"end\"" : "",
	          fill, extra ? extra : "");
	sb_xml(b, text);
	irr_buf__str(b, "</text>\n");
}

/* ---- The plot model: what is drawn, independent of where it came from ---- */

typedef struct pwin {
	double low, high;
	irr_band_status status;
	double weight;
	char label[48];     /* short label, e.g. "C=O" */
	int lane;
} pwin;

typedef struct ppeak {
	double pos, height;  /* cm-1; height in plot Y units at the apex */
	irr_peak_status status;
	double weight;
	char label[80];      /* "" = no label wanted */
	int prio;            /* label priority, lower first */
} ppeak;

typedef struct plot {
	/* Spectrum (ascending cm-1, plot Y units) or NULL for a peak list. */
	const double *x;
	double *y;
	size_t n;
	int transmittance;   /* Y axis %T (bands point down) instead of absorbance */
	int sticks;          /* peak list: draw peaks as sticks */
	double xlo, xhi;     /* cm-1 shown */
	double ylo, yhi;     /* Y range shown */
	size_t nsat;
	double *sat;         /* saturated ranges, pairs */
	pwin *win;
	size_t nwin;
	ppeak *pk;
	size_t npk;
	char *title, *structure, *verdict, *score;
	int verdict_code;
	char *footer;
} plot;

/* ---- Layout ---- */

typedef struct layout {
	double W, H;
	double left, right, top, bottom;   /* plot area */
	double header_h;
	double regions_top;
	double lanes_top, lane_h;
	int nlanes;
	double legend_top;
	double footer_y;
} layout;

#define FONT_FAMILY "DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif"
#define MAX_LANES 6
#define MAX_LABELS 14

/* Palette (our own): ink for text and the spectrum, and one hue per status,
 * chosen to stay apart in lightness when printed in grey. */
#define INK "#1b2430"
#define INK_SOFT "#5b6573"
#define GRID "#dde2e8"
#define C_FOUND "#2f7f6f"       /* green-teal */
#define C_SATURATED "#b07d1a"   /* ochre */
#define C_MISSING "#b8324a"     /* crimson */
#define C_UNOBS "#7d8796"       /* slate */
#define C_EXPLAINED "#2f7f6f"
#define C_ATTRIBUTED "#5c4b9b"  /* violet */
#define C_UNEXPLAINED "#b8324a"

static double px_x(const layout *L, const plot *p, double wn)
{
	/* High wavenumber on the left. */
	return L->left + (p->xhi - wn) / (p->xhi - p->xlo) * (L->right - L->left);
}

static double px_y(const layout *L, const plot *p, double v)
{
	return L->bottom - (v - p->ylo) / (p->yhi - p->ylo) * (L->bottom - L->top);
}

static const char *win_colour(irr_band_status s)
{
	switch (s) {
	case IRR_BAND_FOUND: return C_FOUND;
	case IRR_BAND_SATURATED: return C_SATURATED;
	case IRR_BAND_MISSING: return C_MISSING;
	default: return C_UNOBS;
	}
}

static const char *win_pattern(irr_band_status s)
{
	switch (s) {
	case IRR_BAND_FOUND: return "url(#irr-pat-found)";
	case IRR_BAND_SATURATED: return "url(#irr-pat-saturated)";
	case IRR_BAND_MISSING: return "url(#irr-pat-missing)";
	default: return "url(#irr-pat-unobservable)";
	}
}

static const char *win_dash(irr_band_status s)
{
	switch (s) {
	case IRR_BAND_FOUND: return "";
	case IRR_BAND_SATURATED: return " stroke-dasharray=\"6 2 1 2\"";
	case IRR_BAND_MISSING: return " stroke-dasharray=\"4 2\"";
	default: return " stroke-dasharray=\"1 2\"";
	}
}

static const char *status_word_band(irr_band_status s)
{
	return irr_band_status_name(s);
}

static void put_defs(irr_buf *b, const layout *L)
{
	irr_buf__str(b, "<defs>\n");
	/* found: light solid tint; saturated: cross-hatch; missing: dense
	 * diagonal hatch; unobservable: sparse dots. */
	irr_buf__printf(b, "<pattern id=\"irr-pat-found\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\">"
	             "<rect width=\"6\" height=\"6\" fill=\"%s\" fill-opacity=\"0.16\"/></pattern>\n", C_FOUND);
	irr_buf__printf(b, "<pattern id=\"irr-pat-saturated\" width=\"8\" height=\"8\" patternUnits=\"userSpaceOnUse\">"
	             "<rect width=\"8\" height=\"8\" fill=\"%s\" fill-opacity=\"0.07\"/>"
	             "<path d=\"M0 4H8M4 0V8\" stroke=\"%s\" stroke-opacity=\"0.32\" stroke-width=\"0.7\"/></pattern>\n",
	          C_SATURATED, C_SATURATED);
	irr_buf__printf(b, "<pattern id=\"irr-pat-missing\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" patternTransform=\"rotate(45)\">"
	             "<rect width=\"6\" height=\"6\" fill=\"%s\" fill-opacity=\"0.08\"/>"
	             "<path d=\"M0 0V6\" stroke=\"%s\" stroke-opacity=\"0.55\" stroke-width=\"1.4\"/></pattern>\n",
	          C_MISSING, C_MISSING);
	irr_buf__printf(b, "<pattern id=\"irr-pat-unobservable\" width=\"7\" height=\"7\" patternUnits=\"userSpaceOnUse\">"
	             "<circle cx=\"3.5\" cy=\"3.5\" r=\"1\" fill=\"%s\" fill-opacity=\"0.6\"/></pattern>\n", C_UNOBS);
	irr_buf__printf(b, "<clipPath id=\"irr-clip-plot\"><rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\"/></clipPath>\n",
	          num(L->left), num(L->top), num(L->right - L->left), num(L->bottom - L->top));
	irr_buf__str(b, "</defs>\n");
}

/* Marker shapes: explained = filled circle, attributed = open diamond,
 * unexplained = filled triangle pointing at the band. `dir` is -1 when the
 * band points up (absorbance), +1 when it points down (%T). */
static void put_marker(irr_buf *b, irr_peak_status st, double x, double y, int dir)
{
	switch (st) {
	case IRR_PEAK_EXPLAINED:
		irr_buf__printf(b, "<circle cx=\"%s\" cy=\"%s\" r=\"3.6\" fill=\"%s\" stroke=\"%s\" stroke-width=\"0.8\"/>\n",
		          num(x), num(y), C_EXPLAINED, INK);
		break;
	case IRR_PEAK_ATTRIBUTED:
		irr_buf__printf(b, "<path d=\"M%s %sL%s %sL%s %sL%s %sZ\" fill=\"#ffffff\" stroke=\"%s\" stroke-width=\"1.6\"/>\n",
		          num(x), num(y - 4.6), num(x + 4.6), num(y), num(x), num(y + 4.6), num(x - 4.6), num(y),
		          C_ATTRIBUTED);
		break;
	default: {
		/* The apex of the triangle points along -dir (towards the band). */
		double tip = y - dir * 5.0, base = y + dir * 4.0;
		irr_buf__printf(b, "<path d=\"M%s %sL%s %sL%s %sZ\" fill=\"%s\" stroke=\"%s\" stroke-width=\"0.8\"/>\n",
		          num(x), num(tip), num(x + 5.2), num(base), num(x - 5.2), num(base),
		          C_UNEXPLAINED, INK);
		break;
	}
	}
}

static void put_swatch(irr_buf *b, irr_band_status s, double x, double y, double w, double h)
{
	irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"%s\" stroke=\"%s\" stroke-width=\"1.2\"%s/>\n",
	          num(x), num(y), num(w), num(h), win_pattern(s), win_colour(s), win_dash(s));
}

/* ---- Greedy label placement ---- */

typedef struct box {
	double x0, y0, x1, y1;
} box;

static int overlaps(const box *a, const box *c)
{
	return a->x0 < c->x1 && c->x0 < a->x1 && a->y0 < c->y1 && c->y0 < a->y1;
}

typedef struct label_req {
	double ax, ay;      /* anchor (marker) in px */
	int dir;            /* -1 place upwards, +1 downwards */
	const char *text;
	int prio;
	double order;       /* tie-break: position */
	const char *colour;
} label_req;

static int cmp_label(const void *a, const void *b)
{
	const label_req *p = a, *q = b;
	if (p->prio != q->prio)
		return p->prio < q->prio ? -1 : 1;
	if (p->order != q->order)
		return p->order > q->order ? -1 : 1;
	return strcmp(p->text, q->text);
}

/* Column extent of the curve (px): for every pixel column the topmost and
 * bottommost y the spectrum reaches, so labels can keep off the line. */
typedef struct curve_cols {
	int x0, n;
	double *top, *bot;
} curve_cols;

static int curve_clear(const curve_cols *cc, const box *bx)
{
	int a, z;
	if (!cc->n)
		return 1;
	a = (int)floor(bx->x0) - cc->x0;
	z = (int)ceil(bx->x1) - cc->x0;
	if (a < 0)
		a = 0;
	if (z > cc->n - 1)
		z = cc->n - 1;
	for (int i = a; i <= z; i++) {
		if (cc->top[i] > cc->bot[i])
			continue; /* nothing drawn in this column */
		if (bx->y0 < cc->bot[i] + 2.0 && bx->y1 > cc->top[i] - 2.0)
			return 0;
	}
	return 1;
}

static void place_labels(irr_buf *b, const layout *L, label_req *req, size_t nreq,
                         const box *fixed, size_t nfixed, const curve_cols *cc)
{
	box placed[MAX_LABELS + 1];
	size_t nplaced = 0;
	const double fs = 11.0, lh = 14.0;

	qsort(req, nreq, sizeof *req, cmp_label);
	for (size_t r = 0; r < nreq && nplaced < MAX_LABELS; r++) {
		double w = text_width(req[r].text, fs, 0) + 4.0;
		int done = 0;
		/* Try steps away from the marker in its direction, then the other
		 * way; at each height try centred, then shifted left and right by
		 * less than half the label, so it always stands over its marker. */
		for (int pass = 0; pass < 2 && !done; pass++) {
			int dir = pass == 0 ? req[r].dir : -req[r].dir;
			for (int k = 0; k < 24 && !done; k++) {
				static const double shift[] = {0.0, -0.4, 0.4};
				for (size_t sidx = 0; sidx < sizeof shift / sizeof shift[0] && !done; sidx++) {
					box bx;
					double cy = req[r].ay + dir * (9.0 + lh * 0.5 + k * lh * 0.75);
					double cx = req[r].ax + shift[sidx] * w;
					int ok = 1;
					bx.x0 = cx - w / 2;
					bx.x1 = cx + w / 2;
					bx.y0 = cy - lh / 2;
					bx.y1 = cy + lh / 2;
					if (bx.x0 < L->left + 1 || bx.x1 > L->right - 1 ||
					    bx.y0 < L->top + 1 || bx.y1 > L->bottom - 1)
						continue;
					for (size_t i = 0; i < nplaced && ok; i++)
						if (overlaps(&bx, &placed[i]))
							ok = 0;
					for (size_t i = 0; i < nfixed && ok; i++)
						if (overlaps(&bx, &fixed[i]))
							ok = 0;
					if (ok && !curve_clear(cc, &bx))
						ok = 0;
					if (!ok)
						continue;
					placed[nplaced++] = bx;
					done = 1;
					/* A leader line when the label sits away from its marker. */
					if (k > 0 || sidx > 0) {
						double ly = dir < 0 ? bx.y1 : bx.y0;
						double lx = fmin(fmax(req[r].ax, bx.x0 + 2), bx.x1 - 2);
						irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"%s\" stroke-width=\"0.7\"/>\n",
						          num(req[r].ax), num(req[r].ay + dir * 6.0), num(lx), num(ly), INK_SOFT);
					}
					put_text(b, bx.x0 + 2.0, cy + fs * 0.36, fs, 0, 's', req[r].colour,
					         " class=\"irr-label\" stroke=\"#ffffff\" stroke-width=\"3\" stroke-linejoin=\"round\" paint-order=\"stroke\"",
					         req[r].text);
				}
			}
		}
	}
}

/* ---- Drawing ---- */

static void draw_header(irr_buf *b, const layout *L, const plot *p)
{
	double badge_w, x = 24.0;
	char *t;
	const char *vfill, *vtext;
	int dash;

	/* Verdict badge, top right. In grey print the four verdicts differ
	 * by fill (solid dark, outlined, dashed outline). */
	badge_w = fmax(text_width(p->verdict, 17.0, 1), text_width(p->score, 12.0, 0)) + 24.0;
	switch (p->verdict_code) {
	case IRR_VERDICT_CONSISTENT: vfill = C_FOUND; vtext = "#ffffff"; dash = 0; break;
	case IRR_VERDICT_INCONSISTENT: vfill = C_MISSING; vtext = "#ffffff"; dash = 0; break;
	case IRR_VERDICT_CONSISTENT_IMPURE: vfill = "#ffffff"; vtext = INK; dash = 0; break;
	default: vfill = "#ffffff"; vtext = INK; dash = 1; break;
	}
	irr_buf__printf(b, "<rect x=\"%s\" y=\"12\" width=\"%s\" height=\"46\" rx=\"6\" fill=\"%s\" stroke=\"%s\" stroke-width=\"2\"%s/>\n",
	          num(L->W - 24.0 - badge_w), num(badge_w), vfill, INK, dash ? " stroke-dasharray=\"5 3\"" : "");
	put_text(b, L->W - 24.0 - badge_w / 2, 34.0, 17.0, 1, 'm', vtext, NULL, p->verdict);
	put_text(b, L->W - 24.0 - badge_w / 2, 51.0, 12.0, 0, 'm', vtext, NULL, p->score);

	t = fit_text(p->title, 18.0, 1, L->W - 24.0 - badge_w - 16.0 - x);
	if (t)
		put_text(b, x, 32.0, 18.0, 1, 's', INK, NULL, t);
	free(t);
	t = fit_text(p->structure, 12.5, 0, L->W - 24.0 - badge_w - 16.0 - x);
	if (t)
		put_text(b, x, 52.0, 12.5, 0, 's', INK_SOFT, NULL, t);
	free(t);
}

/* Splits "3000-2500 cm-1: C-H and acid O-H stretches" into the range and
 * up to two lines of description, fitted to `width`. */
static void draw_region_label(irr_buf *b, double cx, double y, double width, const char *name)
{
	const char *colon = strchr(name, ':');
	char head[48], rest[160], line1[160];
	size_t hn;
	char *fit;

	hn = colon ? (size_t)(colon - name) : strlen(name);
	if (hn >= sizeof head)
		hn = sizeof head - 1;
	memcpy(head, name, hn);
	head[hn] = '\0';
	fit = fit_text(head, 10.5, 1, width);
	if (fit)
		put_text(b, cx, y, 10.5, 1, 'm', INK, NULL, fit);
	free(fit);
	if (!colon)
		return;
	snprintf(rest, sizeof rest, "%s", colon + 1 + strspn(colon + 1, " "));
	/* Greedy word wrap into the first line; the remainder, fitted, below. */
	{
		size_t cut = 0, i = 0;
		line1[0] = '\0';
		while (rest[i]) {
			size_t j = i;
			while (rest[j] && rest[j] != ' ')
				j++;
			memcpy(line1, rest, j);
			line1[j] = '\0';
			if (text_width(line1, 9.5, 0) > width) {
				line1[cut ? cut : j] = '\0';
				break;
			}
			cut = j;
			i = rest[j] ? j + 1 : j;
		}
		if (!cut)
			cut = strlen(line1);
		line1[cut] = '\0';
		fit = fit_text(line1, 9.5, 0, width);
		if (fit)
			put_text(b, cx, y + 12.0, 9.5, 0, 'm', INK_SOFT, NULL, fit);
		free(fit);
		if (rest[cut]) {
			fit = fit_text(rest + cut + strspn(rest + cut, " "), 9.5, 0, width);
			if (fit && fit[0])
				put_text(b, cx, y + 23.0, 9.5, 0, 'm', INK_SOFT, NULL, fit);
			free(fit);
		}
	}
}

static void draw_regions(irr_buf *b, const layout *L, const plot *p)
{
	static const double edges[] = {1e9, 3000.0, 2500.0, 2000.0, 1500.0, 0.0};
	for (int r = 0; r < 5; r++) {
		double hi = fmin(edges[r], p->xhi), lo = fmax(edges[r + 1], p->xlo);
		double x0, x1;
		if (hi <= lo)
			continue;
		x0 = px_x(L, p, hi);
		x1 = px_x(L, p, lo);
		/* Alternate faint tints so each region reads as one strip. */
		irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"%s\"/>\n",
		          num(x0), num(L->top), num(x1 - x0), num(L->bottom - L->top),
		          r % 2 ? "#f3f5f8" : "#ffffff");
		if (x1 - x0 > 24.0)
			draw_region_label(b, 0.5 * (x0 + x1), L->regions_top + 10.0, x1 - x0 - 6.0,
			                  irr_region_name(r));
		if (r > 0 && edges[r] < p->xhi && edges[r] > p->xlo)
			irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"%s\" stroke-width=\"1\" stroke-dasharray=\"6 4\"/>\n",
			          num(x0), num(L->regions_top), num(x0), num(L->bottom), INK_SOFT);
	}
}

static double nice_step(double span, int target)
{
	double raw = span / target, mag = pow(10.0, floor(log10(raw))), f = raw / mag;
	return (f < 1.5 ? 1.0 : f < 3.5 ? 2.0 : f < 7.5 ? 5.0 : 10.0) * mag;
}

static void draw_axes(irr_buf *b, const layout *L, const plot *p)
{
	double step, v;
	char buf[32];
	/* X ticks: labelled every 500 cm-1 on a full spectrum, closer on a
	 * narrow range; five short ticks per labelled step. */
	double span = p->xhi - p->xlo;
	double major_step = span > 2000.0 ? 500.0 : span > 800.0 ? 200.0 : span > 300.0 ? 100.0 : 50.0;
	double minor_step = major_step / 5.0;
	for (v = ceil(p->xlo / minor_step) * minor_step; v <= p->xhi + 1e-9; v += minor_step) {
		double x = px_x(L, p, v);
		int major = fabs(fmod(v, major_step)) < 1e-6;
		irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"%s\" stroke-width=\"1\"/>\n",
		          num(x), num(L->bottom), num(x), num(L->bottom + (major ? 6.0 : 3.0)), INK);
		if (major) {
			double w;
			snprintf(buf, sizeof buf, "%d", (int)v);
			w = text_width(buf, 11.0, 0);
			if (x - w / 2 >= 2.0 && x + w / 2 <= L->W - 2.0)
				put_text(b, x, L->bottom + 18.0, 11.0, 0, 'm', INK, NULL, buf);
		}
	}
	put_text(b, 0.5 * (L->left + L->right), L->bottom + 34.0, 12.0, 0, 'm', INK, NULL,
	         "wavenumber (cm\xe2\x81\xbb\xc2\xb9)");
	/* Y ticks and light grid lines. */
	step = nice_step(p->yhi - p->ylo, 5);
	for (v = ceil(p->ylo / step) * step; v <= p->yhi + 1e-9; v += step) {
		double y = px_y(L, p, v);
		int dec = step >= 1.0 ? 0 : step >= 0.1 ? 1 : 2;
		irr_format_double(buf, sizeof buf, v, dec);
		irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"%s\" stroke-width=\"0.8\"/>\n",
		          num(L->left), num(y), num(L->right), num(y), GRID);
		irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"%s\" stroke-width=\"1\"/>\n",
		          num(L->left - 5.0), num(y), num(L->left), num(y), INK);
		put_text(b, L->left - 8.0, y + 4.0, 11.0, 0, 'e', INK, NULL, buf);
	}
	{
		const char *yl = p->sticks ? "relative intensity" : p->transmittance ? "transmittance (%)" : "absorbance";
		double cy = 0.5 * (L->top + L->bottom);
		irr_buf__printf(b, "<text x=\"16\" y=\"%s\" font-size=\"12\" fill=\"%s\" text-anchor=\"middle\" transform=\"rotate(-90 16 %s)\">",
		          num(cy), INK, num(cy));
		sb_xml(b, yl);
		irr_buf__str(b, "</text>\n");
	}
	irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"none\" stroke=\"%s\" stroke-width=\"1.2\"/>\n",
	          num(L->left), num(L->top), num(L->right - L->left), num(L->bottom - L->top), INK);
}

/* Windows: a faint full-height shade in the plot, and a bar in the lanes
 * under the axis, outlined with the status's dash. */
static void draw_windows(irr_buf *b, const layout *L, const plot *p)
{
	irr_buf__str(b, "<g clip-path=\"url(#irr-clip-plot)\" opacity=\"0.75\">\n");
	for (size_t i = 0; i < p->nwin; i++) {
		const pwin *w = &p->win[i];
		double x0 = px_x(L, p, fmin(w->high, p->xhi)), x1 = px_x(L, p, fmax(w->low, p->xlo));
		if (x1 - x0 < 1.5) {
			double c = 0.5 * (x0 + x1);
			x0 = c - 0.75;
			x1 = c + 0.75;
		}
		if (w->high < p->xlo || w->low > p->xhi)
			continue;
		irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"%s\"/>\n",
		          num(x0), num(L->top), num(x1 - x0), num(L->bottom - L->top), win_pattern(w->status));
	}
	irr_buf__str(b, "</g>\n");
	if (p->nwin)
		put_text(b, L->left - 8.0, L->lanes_top + 9.0, 10.0, 0, 'e', INK_SOFT, NULL, "expected");
	for (size_t i = 0; i < p->nwin; i++) {
		const pwin *w = &p->win[i];
		double lo = fmax(w->low, p->xlo), hi = fmin(w->high, p->xhi);
		double x0, x1, y = L->lanes_top + w->lane * L->lane_h;
		if (hi < lo || w->lane < 0)
			continue; /* wholly outside the shown range */
		x0 = px_x(L, p, hi);
		x1 = px_x(L, p, lo);
		if (x1 - x0 < 3.0) {
			double c = 0.5 * (x0 + x1);
			x0 = c - 1.5;
			x1 = c + 1.5;
		}
		irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"%s\" stroke=\"%s\" stroke-width=\"1.1\"%s>"
		             "<title>", num(x0), num(y), num(x1 - x0), num(L->lane_h - 3.0),
		          win_pattern(w->status), win_colour(w->status), win_dash(w->status));
		sb_xml(b, w->label);
		irr_buf__str(b, ": ");
		irr_buf__str(b, status_word_band(w->status));
		irr_buf__str(b, "</title></rect>\n");
	}
}

static void draw_spectrum(irr_buf *b, const layout *L, const plot *p, curve_cols *cc)
{
	int cols = (int)ceil(L->right - L->left) + 1;
	if (p->sticks) {
		double y0 = px_y(L, p, fmax(p->ylo, 0.0));
		irr_buf__printf(b, "<g stroke=\"%s\" stroke-width=\"1.4\">\n", INK);
		for (size_t i = 0; i < p->npk; i++) {
			double x = px_x(L, p, p->pk[i].pos), y1 = px_y(L, p, p->pk[i].height);
			irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\"/>\n", num(x), num(y0), num(x), num(y1));
		}
		irr_buf__str(b, "</g>\n");
		return;
	}
	if (!p->n)
		return;
	cc->x0 = (int)floor(L->left);
	cc->n = cols;
	cc->top = malloc((size_t)cols * sizeof *cc->top);
	cc->bot = malloc((size_t)cols * sizeof *cc->bot);
	if (!cc->top || !cc->bot) {
		free(cc->top);
		free(cc->bot);
		cc->top = cc->bot = NULL;
		cc->n = 0;
	}
	for (int i = 0; i < cc->n; i++) {
		cc->top[i] = 1e9;
		cc->bot[i] = -1e9;
	}
	/* One polyline; points that fall in the same pixel column are reduced
	 * to their first, lowest, highest and last, which draws the same line
	 * with a few thousand points at most. */
	irr_buf__printf(b, "<polyline clip-path=\"url(#irr-clip-plot)\" fill=\"none\" stroke=\"%s\" stroke-width=\"1.3\" stroke-linejoin=\"round\" points=\"", INK);
	{
		size_t i = p->n;
		int count = 0;
		while (i > 0) {
			/* From high to low wavenumber = left to right. */
			size_t j = i - 1, first = j, lo = j, hi = j, last = j;
			int col = (int)floor(px_x(L, p, p->x[j]));
			while (j > 0 && (int)floor(px_x(L, p, p->x[j - 1])) == col) {
				j--;
				if (p->y[j] < p->y[lo])
					lo = j;
				if (p->y[j] > p->y[hi])
					hi = j;
				last = j;
			}
			{
				size_t pts[4] = {first, lo < hi ? hi : lo, lo < hi ? lo : hi, last};
				/* In drawing order (descending index) without repeats. */
				size_t prev = (size_t)-1;
				if (pts[1] < pts[2]) {
					size_t t = pts[1];
					pts[1] = pts[2];
					pts[2] = t;
				}
				for (int k = 0; k < 4; k++) {
					double x, y;
					if (pts[k] == prev)
						continue;
					prev = pts[k];
					x = px_x(L, p, p->x[pts[k]]);
					y = px_y(L, p, p->y[pts[k]]);
					y = fmin(fmax(y, L->top - 2.0), L->bottom + 2.0);
					irr_buf__printf(b, "%s%s,%s", count++ ? " " : "", num(x), num(y));
					if (cc->n) {
						int c = (int)floor(x) - cc->x0;
						if (c >= 0 && c < cc->n) {
							if (y < cc->top[c])
								cc->top[c] = y;
							if (y > cc->bot[c])
								cc->bot[c] = y;
						}
					}
				}
			}
			i = j;
		}
	}
	irr_buf__str(b, "\"/>\n");
	/* Fill the columns between drawn points so the line is continuous for
	 * the label test too (a steep segment spans the y range between). */
	for (int c = 1; c < cc->n; c++) {
		if (cc->top[c] > cc->bot[c] || cc->top[c - 1] > cc->bot[c - 1])
			continue;
		if (cc->top[c] > cc->bot[c - 1])
			cc->top[c] = cc->bot[c - 1];
		if (cc->bot[c] < cc->top[c - 1])
			cc->bot[c] = cc->top[c - 1];
	}
	/* Saturated ranges: a heavy bar along the plot top. */
	for (size_t s = 0; s < p->nsat; s++) {
		double x0 = px_x(L, p, fmin(p->sat[2 * s + 1], p->xhi)), x1 = px_x(L, p, fmax(p->sat[2 * s], p->xlo));
		if (x1 <= x0)
			continue;
		irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"4\" fill=\"%s\"><title>saturated</title></rect>\n",
		          num(x0), num(L->top), num(fmax(x1 - x0, 1.0)), INK);
	}
}

static double apex_y(const plot *p, double pos, double fallback)
{
	size_t lo = 0, hi;
	if (p->sticks || !p->n)
		return fallback;
	hi = p->n - 1;
	if (pos <= p->x[0])
		return p->y[0];
	if (pos >= p->x[hi])
		return p->y[hi];
	while (hi - lo > 1) {
		size_t mid = (lo + hi) / 2;
		if (p->x[mid] <= pos)
			lo = mid;
		else
			hi = mid;
	}
	/* The extreme of the neighbouring samples, so the marker clears the
	 * drawn apex even when the peak sits between two points. */
	{
		double best = p->y[lo];
		size_t a = lo >= 2 ? lo - 2 : 0, z = hi + 2 < p->n ? hi + 2 : p->n - 1;
		for (size_t i = a; i <= z; i++)
			if (p->transmittance ? p->y[i] < best : p->y[i] > best)
				best = p->y[i];
		return best;
	}
}

static void draw_peaks(irr_buf *b, const layout *L, const plot *p, const curve_cols *cc)
{
	label_req req[256];
	box fixed[256 + 8];
	size_t nreq = 0, nfixed = 0;
	int dir = p->transmittance ? 1 : -1;

	for (size_t i = 0; i < p->npk; i++) {
		const ppeak *k = &p->pk[i];
		double x, y;
		if (k->pos < p->xlo || k->pos > p->xhi)
			continue;
		x = px_x(L, p, k->pos);
		y = px_y(L, p, apex_y(p, k->pos, k->height)) + dir * 7.0;
		y = fmin(fmax(y, L->top + 6.0), L->bottom - 6.0);
		put_marker(b, k->status, x, y, dir);
		if (nfixed < sizeof fixed / sizeof fixed[0]) {
			fixed[nfixed].x0 = x - 6;
			fixed[nfixed].x1 = x + 6;
			fixed[nfixed].y0 = y - 6;
			fixed[nfixed].y1 = y + 6;
			nfixed++;
		}
		if (k->label[0] && nreq < sizeof req / sizeof req[0]) {
			req[nreq].ax = x;
			req[nreq].ay = y;
			req[nreq].dir = dir;
			req[nreq].text = k->label;
			req[nreq].prio = k->prio;
			req[nreq].order = k->weight;
			req[nreq].colour = k->status == IRR_PEAK_UNEXPLAINED ? C_UNEXPLAINED
			                 : k->status == IRR_PEAK_ATTRIBUTED ? C_ATTRIBUTED : INK;
			nreq++;
		}
	}
	/* Missing windows get a label of their own near the plot edge the
	 * bands grow from, where the missing band would have been. */
	for (size_t i = 0; i < p->nwin && nreq < sizeof req / sizeof req[0]; i++) {
		const pwin *w = &p->win[i];
		static _Thread_local char text[256][64];
		if (w->status != IRR_BAND_MISSING || w->weight < 0.3 || !w->label[0])
			continue;
		if (w->high < p->xlo || w->low > p->xhi)
			continue;
		snprintf(text[nreq], sizeof text[nreq], "no %s", w->label);
		req[nreq].ax = px_x(L, p, 0.5 * (fmax(w->low, p->xlo) + fmin(w->high, p->xhi)));
		req[nreq].ay = dir < 0 ? L->bottom - 4.0 : L->top + 4.0;
		/* From the baseline side, the label climbs towards the bands. */
		req[nreq].dir = -dir;
		req[nreq].text = text[nreq];
		req[nreq].prio = 1;
		req[nreq].order = w->weight;
		req[nreq].colour = C_MISSING;
		nreq++;
	}
	place_labels(b, L, req, nreq, fixed, nfixed, cc);
}

static void draw_legend(irr_buf *b, const layout *L)
{
	static const irr_band_status ws[] = {IRR_BAND_FOUND, IRR_BAND_SATURATED, IRR_BAND_MISSING, IRR_BAND_UNOBSERVABLE};
	static const irr_peak_status ps[] = {IRR_PEAK_EXPLAINED, IRR_PEAK_ATTRIBUTED, IRR_PEAK_UNEXPLAINED};
	double x = L->left, y = L->legend_top, lim = L->W - 24.0;
	const double fs = 11.5;

	put_text(b, x, y + 10.0, fs, 1, 's', INK, NULL, "Expected window:");
	x += text_width("Expected window:", fs, 1) + 12.0;
	for (size_t i = 0; i < 4; i++) {
		const char *w = irr_band_status_name(ws[i]);
		double need = 26.0 + text_width(w, fs, 0) + 16.0;
		if (x + need > lim) {
			x = L->left + 20.0;
			y += 18.0;
		}
		put_swatch(b, ws[i], x, y, 20.0, 12.0);
		put_text(b, x + 26.0, y + 10.0, fs, 0, 's', INK, NULL, w);
		x += need;
	}
	x = L->left;
	y += 22.0;
	put_text(b, x, y + 10.0, fs, 1, 's', INK, NULL, "Observed peak:");
	x += text_width("Expected window:", fs, 1) + 12.0;
	for (size_t i = 0; i < 3; i++) {
		const char *w = irr_peak_status_name(ps[i]);
		double need = 20.0 + text_width(w, fs, 0) + 16.0;
		if (x + need > lim) {
			x = L->left + 20.0;
			y += 18.0;
		}
		put_marker(b, ps[i], x + 7.0, y + 6.0, -1);
		put_text(b, x + 20.0, y + 10.0, fs, 0, 's', INK, NULL, w);
		x += need;
	}
	if (x + 150.0 <= lim) {
		irr_buf__printf(b, "<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"%s\" stroke-width=\"1.3\"/>\n",
		          num(x), num(y + 6.0), num(x + 22.0), num(y + 6.0), INK);
		put_text(b, x + 28.0, y + 10.0, fs, 0, 's', INK, NULL, "measured");
		x += 28.0 + text_width("measured", fs, 0) + 16.0;
		if (x + 160.0 <= lim) {
			irr_buf__printf(b, "<rect x=\"%s\" y=\"%s\" width=\"22\" height=\"4\" fill=\"%s\"/>\n", num(x), num(y + 4.0), INK);
			put_text(b, x + 28.0, y + 10.0, fs, 0, 's', INK, NULL, "saturated range");
		}
	}
}

/* Assigns windows to lanes (first-fit by left edge, interval packing) so
 * bars in one lane never overlap; returns the lanes used. */
static int pack_lanes(const layout *L, plot *p)
{
	double end[MAX_LANES] = {0};
	size_t *order;
	int used = 0;
	if (!p->nwin)
		return 0;
	order = malloc(p->nwin * sizeof *order);
	if (!order) {
		for (size_t i = 0; i < p->nwin; i++)
			p->win[i].lane = 0;
		return 1;
	}
	for (size_t i = 0; i < p->nwin; i++)
		order[i] = i;
	/* Insertion sort by high edge, descending (left to right on the plot);
	 * ties by low edge so the result never depends on qsort's order. */
	for (size_t i = 1; i < p->nwin; i++) {
		size_t v = order[i], j = i;
		while (j > 0 && (p->win[order[j - 1]].high < p->win[v].high ||
		                 (p->win[order[j - 1]].high == p->win[v].high &&
		                  p->win[order[j - 1]].low < p->win[v].low))) {
			order[j] = order[j - 1];
			j--;
		}
		order[j] = v;
	}
	for (size_t k = 0; k < p->nwin; k++) {
		pwin *w = &p->win[order[k]];
		double x0 = px_x(L, p, fmin(w->high, p->xhi)), x1 = px_x(L, p, fmax(w->low, p->xlo));
		int lane = -1;
		if (w->high < p->xlo || w->low > p->xhi) {
			w->lane = -1; /* outside the shown range: no bar */
			continue;
		}
		if (x1 - x0 < 3.0)
			x1 = x0 + 3.0;
		for (int l = 0; l < used; l++)
			if (end[l] + 1.0 <= x0) {
				lane = l;
				break;
			}
		if (lane < 0 && used < MAX_LANES)
			lane = used++;
		if (lane < 0) {
			/* Out of lanes: the one that frees first. */
			lane = 0;
			for (int l = 1; l < used; l++)
				if (end[l] < end[lane])
					lane = l;
		}
		if (lane == used - 1 && end[lane] == 0.0)
			end[lane] = x1;
		w->lane = lane;
		end[lane] = fmax(end[lane], x1);
	}
	free(order);
	return used;
}

static int render(char **out, plot *p, int width, int height)
{
	layout L;
	irr_buf b = {0};
	curve_cols cc = {0, 0, NULL, NULL};
	int lanes;

	memset(&L, 0, sizeof L);
	L.W = width;
	L.H = height;
	L.left = 78.0;
	L.right = L.W - 28.0;
	L.header_h = 66.0;
	L.regions_top = 70.0;
	L.top = 108.0;
	L.lane_h = 11.0;
	/* Lanes are packed before the plot height is known: packing only uses x. */
	lanes = pack_lanes(&L, p);
	L.nlanes = lanes;
	L.footer_y = L.H - 10.0;
	L.legend_top = L.footer_y - 22.0 - 44.0;
	L.lanes_top = L.legend_top - 12.0 - (lanes ? lanes * L.lane_h : 0.0);
	L.bottom = L.lanes_top - 44.0;
	if (L.bottom - L.top < 120.0) {
		*out = NULL;
		return IRR_EINPUT;
	}

	irr_buf__str(&b, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
	irr_buf__printf(&b, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" height=\"%d\" viewBox=\"0 0 %d %d\" "
	              "font-family=\"" FONT_FAMILY "\">\n", width, height, width, height);
	irr_buf__str(&b, "<title>");
	sb_xml(&b, p->title);
	irr_buf__str(&b, ": ");
	sb_xml(&b, p->verdict);
	irr_buf__str(&b, "</title>\n");
	put_defs(&b, &L);
	irr_buf__printf(&b, "<rect width=\"%d\" height=\"%d\" fill=\"#ffffff\"/>\n", width, height);
	draw_header(&b, &L, p);
	draw_regions(&b, &L, p);
	draw_windows(&b, &L, p);
	draw_axes(&b, &L, p);
	draw_spectrum(&b, &L, p, &cc);
	draw_peaks(&b, &L, p, &cc);
	draw_legend(&b, &L);
	{
		char *f = fit_text(p->footer, 10.0, 0, L.W - 48.0);
		if (f)
			put_text(&b, 24.0, L.footer_y, 10.0, 0, 's', INK_SOFT, NULL, f);
		free(f);
	}
	irr_buf__str(&b, "</svg>\n");
	free(cc.top);
	free(cc.bot);
	if (b.oom) {
		free(b.p);
		*out = NULL;
		return IRR_ENOMEM;
	}
	*out = b.p;
	return IRR_OK;
}

/* ---- From a check to the plot model ---- */

/* "C=O stretch (ketone)" -> "C=O": the first word names the bond. */
static void short_label(char *dst, size_t size, const char *label)
{
	size_t n;
	if (!label) {
		dst[0] = '\0';
		return;
	}
	label += strspn(label, " ");
	n = strcspn(label, " (,;");
	if (n >= size)
		n = size - 1;
	memcpy(dst, label, n);
	dst[n] = '\0';
}

/* Whether `name` is a library name of one of the check's other
 * substances (not a SMILES the user gave). */
static int library_named(const irr_check *c, const char *name)
{
	size_t n = irr_check_other_count(c);
	if (!name)
		return 0;
	for (size_t i = 0; i < n; i++) {
		const irr_other *o = irr_check_other(c, i);
		if (o && o->name && !strcmp(o->name, name))
			return 1;
	}
	return 0;
}

static void plot_free(plot *p)
{
	free(p->y);
	free(p->sat);
	free(p->win);
	free(p->pk);
	free(p->title);
	free(p->structure);
	free(p->verdict);
	free(p->score);
	free(p->footer);
}

void irr_svg_options_init(irr_svg_options *o)
{
	o->width = 1100;
	o->height = 720;
	o->title = NULL;
}

static char *dupf(const char *fmt, const char *a, const char *c)
{
	size_t n = strlen(fmt) + (a ? strlen(a) : 0) + (c ? strlen(c) : 0) + 1;
	char *s = malloc(n), *clean;
	if (!s)
		return NULL;
	snprintf(s, n, fmt, a ? a : "", c ? c : "");
	clean = clean_utf8(s);
	free(s);
	return clean;
}

int irr_report_svg(char **out, const irr_check *c, const irr_svg_options *o)
{
	irr_svg_options def;
	const irr_check_options *co;
	const irr_spectrum *s;
	const irr_peaklist *pl;
	plot p;
	int rc = IRR_ENOMEM, width, height;
	size_t ne, no;

	*out = NULL;
	if (!c)
		return IRR_EINPUT;
	if (!o) {
		irr_svg_options_init(&def);
		o = &def;
	}
	width = o->width > 0 ? o->width : 1100;
	height = o->height > 0 ? o->height : 720;
	if (width < 640 || height < 480 || width > 10000 || height > 10000)
		return IRR_EINPUT;
	pl = irr_check_peaklist(c);
	if (!pl)
		return IRR_EINPUT; /* not run */
	memset(&p, 0, sizeof p);
	co = irr_check_get_options(c);
	s = irr_check_spectrum(c);

	/* Shown range: the measured range, widened to whole hundreds. */
	irr_peaklist_range(pl, &p.xlo, &p.xhi);
	if (!(p.xhi > p.xlo)) {
		p.xlo = 400.0;
		p.xhi = 4000.0;
	}
	p.xlo = floor(p.xlo / 100.0) * 100.0;
	p.xhi = ceil(p.xhi / 100.0) * 100.0;

	if (s && irr_spectrum_points(s) >= 2) {
		const double *y = irr_spectrum_y(s);
		double lo = 1e300, hi = -1e300;
		p.n = irr_spectrum_points(s);
		p.x = irr_spectrum_x(s);
		p.transmittance = irr_spectrum_source_y_units(s) == IRR_Y_TRANSMITTANCE ||
		                  irr_spectrum_source_y_units(s) == IRR_Y_PERCENT_T;
		if (!(p.y = malloc(p.n * sizeof *p.y)))
			goto done;
		for (size_t i = 0; i < p.n; i++) {
			/* Saturated absorbance can be huge or clipped: cap it for the
			 * scale, the plot clips anyway. */
			double a = fmin(y[i], 6.0);
			p.y[i] = p.transmittance ? 100.0 * pow(10.0, -a) : a;
			if (p.x[i] >= p.xlo && p.x[i] <= p.xhi) {
				lo = fmin(lo, p.y[i]);
				hi = fmax(hi, p.y[i]);
			}
		}
		if (p.transmittance) {
			p.ylo = fmax(0.0, floor((lo - 4.0) / 10.0) * 10.0);
			p.yhi = fmin(110.0, fmax(ceil((hi + 4.0) / 10.0) * 10.0, p.ylo + 20.0));
			/* Room under the lowest dips for markers and labels. */
			p.ylo = fmax(-10.0, p.ylo - 0.12 * (p.yhi - p.ylo));
		} else {
			p.ylo = fmin(0.0, lo);
			p.yhi = hi > p.ylo ? hi : p.ylo + 1.0;
			/* Head room above the tallest band for markers and labels. */
			p.yhi += 0.22 * (p.yhi - p.ylo);
		}
		p.nsat = irr_spectrum_saturated_count(s);
		if (p.nsat && (p.sat = malloc(2 * p.nsat * sizeof *p.sat)))
			for (size_t i = 0; i < p.nsat; i++)
				irr_spectrum_saturated_range(s, i, &p.sat[2 * i], &p.sat[2 * i + 1]);
		else
			p.nsat = 0;
	} else {
		p.sticks = 1;
		p.ylo = 0.0;
		p.yhi = 1.25;
	}

	ne = irr_check_expected_count(c);
	if (ne && !(p.win = calloc(ne, sizeof *p.win)))
		goto done;
	for (size_t i = 0; i < ne; i++) {
		const irr_expected *e = irr_check_expected(c, i);
		pwin *w = &p.win[p.nwin];
		if (!e || !e->band)
			continue;
		w->low = e->band->low;
		w->high = e->band->high;
		w->status = e->status;
		w->weight = e->weight;
		short_label(w->label, sizeof w->label, e->band->label);
		{
			char *cl = clean_utf8(w->label);
			if (cl) {
				snprintf(w->label, sizeof w->label, "%s", cl);
				free(cl);
			}
		}
		p.nwin++;
	}

	no = irr_check_observed_count(c);
	if (no && !(p.pk = calloc(no, sizeof *p.pk)))
		goto done;
	for (size_t i = 0; i < no; i++) {
		const irr_observed *ob = irr_check_observed(c, i);
		ppeak *k = &p.pk[p.npk];
		char pos[24], word[40];
		if (!ob || !ob->peak || !ob->significant)
			continue;
		k->pos = ob->peak->position;
		k->height = p.sticks ? (ob->peak->rel_height > 0 ? ob->peak->rel_height : 0.5)
		          : p.transmittance ? 100.0 * pow(10.0, -ob->peak->height) : ob->peak->height;
		k->status = ob->status;
		k->weight = ob->weight;
		irr_format_double(pos, sizeof pos, ob->peak->position, 0);
		switch (ob->status) {
		case IRR_PEAK_UNEXPLAINED:
			snprintf(k->label, sizeof k->label, "? %s", pos);
			k->prio = 0;
			break;
		case IRR_PEAK_ATTRIBUTED:
			/* A library name reads well ("ethyl acetate"); a SMILES the
			 * user typed does not, so then the kind of substance stands in. */
			if (ob->attributed_kind <= IRR_SOURCE_SOLVENT && !library_named(c, ob->attributed_name))
				snprintf(word, sizeof word, "%s",
				         ob->attributed_kind == IRR_SOURCE_STARTING_MATERIAL ? "start. mat."
				         : ob->attributed_kind == IRR_SOURCE_REAGENT ? "reagent" : "solvent");
			else
				snprintf(word, sizeof word, "%s", ob->attributed_name ? ob->attributed_name : "other");
			if (strlen(word) > 14)
				memcpy(word + 12, "..", 3);
			snprintf(k->label, sizeof k->label, "%s %s", word, pos);
			k->prio = 3;
			k->weight = ob->peak->rel_height;
			break;
		default: {
			const irr_expected *e = ob->expected >= 0 ? irr_check_expected(c, (size_t)ob->expected) : NULL;
			short_label(word, sizeof word, e && e->band ? e->band->label : NULL);
			if (e && (e->weight >= 0.25 || (e->band && e->band->weight >= 0.5)) && word[0]) {
				snprintf(k->label, sizeof k->label, "%s %s", word, pos);
				k->prio = 2;
				k->weight = e->weight;
			} else if (e && word[0] && ob->peak->rel_height >= 0.5) {
				/* The strongest bands are key to the eye even where the
				 * tables weigh them little (the crowded fingerprint). */
				snprintf(k->label, sizeof k->label, "%s %s", word, pos);
				k->prio = 4;
				k->weight = ob->peak->rel_height;
			}
			break;
		}
		}
		{
			char *cl = clean_utf8(k->label);
			if (cl) {
				snprintf(k->label, sizeof k->label, "%s", cl);
				free(cl);
			}
		}
		p.npk++;
	}

	{
		const char *sid = co && co->sample_id ? co->sample_id : NULL;
		const char *title = o->title ? o->title : sid ? sid
		                  : co && co->input_name ? co->input_name : "spectrum";
		char score[32];
		p.title = dupf(o->title || !sid ? "%s%s" : "sample %s%s", title, NULL);
		p.structure = dupf("structure %s  (%s)", irr_check_structure_smiles(c),
		                   irr_check_structure_formula(c));
		p.verdict_code = irr_check_verdict(c);
		p.verdict = dupf("%s%s", irr_verdict_name(irr_check_verdict(c)), NULL);
		irr_format_double(score, sizeof score, irr_check_score(c), 2);
		p.score = dupf("score %s%s", score, NULL);
		p.footer = dupf("irrecon %s: a verdict is evidence, never proof of identity or purity%s",
		                irr_version(), NULL);
		if (!p.title || !p.structure || !p.verdict || !p.score || !p.footer)
			goto done;
	}
	rc = render(out, &p, width, height);
done:
	plot_free(&p);
	return rc;
}
