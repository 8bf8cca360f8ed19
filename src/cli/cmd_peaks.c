/* cmd_peaks.c: `irrecon peaks FILE`: reads a spectrum (or a peak list),
 * picks the bands and prints them as an 80-column table or as JSON
 * ("irrecon.peaks/1"). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

#include "cli/cli.h"
#include "irrecon/common.h"
#include "irrecon/peaks.h"
#include "irrecon/spectrum.h"

static const cli_opt opts[] = {
	{"--json", NULL, "print JSON (schema irrecon.peaks/1) instead of the table"},
	{"--output", "FILE", "write to FILE (replaced atomically) instead of stdout"},
	{"--block", "N", "compound JCAMP-DX: block N (default: the infrared one)"},
	{"--list-blocks", NULL, "list the blocks of a JCAMP-DX file and stop"},
	{"--peak-list", NULL, "FILE is a peak list (CSV or JSON), not a spectrum"},
	{"--decimal-comma", NULL, "CSV: ',' is the decimal separator"},
	{"--max-bytes", "N", "refuse files larger than N bytes (default 256 MiB)"},
	{"--max-points", "N", "refuse spectra of more than N points (default 1,000,000)"},
	{"--y-units", "UNITS", "CSV without a units header: absorbance, transmittance,\n"
	                       "percent_transmittance, reflectance, kubelka_munk"},
	{"--micrometres", NULL, "CSV: X is wavelength in micrometres"},
	{"--smooth", "CM", "Savitzky-Golay window, cm-1 (default: auto, 7 cm-1)"},
	{"--min-snr", "X", "minimum prominence in noise units (default 5)"},
	{"--min-rel", "F", "drop bands below F x strongest unclipped (default 0.01)"},
	{"--strong", "F", "relative height for 'strong' (default 0.33)"},
	{"--medium", "F", "relative height for 'medium' (default 0.10)"},
	{"--broad", "CM", "FWHM at or above which a band is broad (default 75)"},
	{"--no-shoulders", NULL, "do not look for shoulders"},
	{"--shoulder-factor", "X", "shoulders need X x the maxima's S/N (default 1.6)"},
	{"--shoulder-depth", "F", "and a lobe F as deep as the nearest maximum's (0.10)"},
	{"--no-baseline", NULL, "do not subtract a baseline"},
	{"--help", NULL, "show this help"},
	{NULL, NULL, NULL}
};

static void help(void)
{
	printf("usage: irrecon peaks FILE [OPTIONS]\n\n"
	       "Picks the bands of an infrared spectrum (JCAMP-DX or two-column CSV/TSV),\n"
	       "after converting it to absorbance on an ascending wavenumber axis.\n\n"
	       "Options:\n");
	cli_opt_help(opts, 20);
	printf("\nTable columns: band position (cm-1), height and area above the baseline\n"
	       "(absorbance; absorbance x cm-1), full width at half height (cm-1), class\n"
	       "relative to the strongest band, flags. A saturated band is certainly there\n"
	       "and strong, but its position is only the centre of the clipped range.\n\n"
	       "Exit status: 0 success, 2 error.\n");
}

/* Rounds for JSON so the output does not carry noise digits. */
static double rnd(double v, double step)
{
	double r = step * (double)(long long)(v / step + (v >= 0 ? 0.5 : -0.5));
	return r == 0.0 ? 0.0 : r;
}

static char *render_json(const irr_spectrum *s, const irr_peaklist *pl, const char *path,
                         const irr_peak_options *po)
{
	cJSON *root = cJSON_CreateObject(), *sp, *arr, *pk;
	double lo, hi;
	if (!root)
		return NULL;
	cJSON_AddStringToObject(root, "schema", "irrecon.peaks/1");
	sp = cJSON_AddObjectToObject(root, "spectrum");
	cJSON_AddStringToObject(sp, "file", path);
	if (s) {
		cJSON_AddNumberToObject(sp, "points", (double)irr_spectrum_points(s));
		cJSON_AddNumberToObject(sp, "first_x", irr_spectrum_first_x(s));
		cJSON_AddNumberToObject(sp, "last_x", irr_spectrum_last_x(s));
		cJSON_AddStringToObject(sp, "y_units", irr_yunits_name(irr_spectrum_source_y_units(s)));
		cJSON_AddStringToObject(sp, "source_format", irr_spectrum_source_format(s));
		cJSON_AddStringToObject(sp, "title", irr_spectrum_title(s));
	} else {
		cJSON_AddNumberToObject(sp, "points", 0);
		cJSON_AddNullToObject(sp, "first_x");
		cJSON_AddNullToObject(sp, "last_x");
		cJSON_AddStringToObject(sp, "y_units", "unknown");
		cJSON_AddStringToObject(sp, "source_format", "peak-list");
	}
	irr_peaklist_range(pl, &lo, &hi);
	arr = cJSON_AddArrayToObject(sp, "measured_range");
	cJSON_AddItemToArray(arr, cJSON_CreateNumber(rnd(lo, 1e-3)));
	cJSON_AddItemToArray(arr, cJSON_CreateNumber(rnd(hi, 1e-3)));
	arr = cJSON_AddArrayToObject(sp, "warnings");
	if (s)
		for (size_t i = 0; i < irr_spectrum_warning_count(s); i++)
			cJSON_AddItemToArray(arr, cJSON_CreateString(irr_spectrum_warning(s, i)));
	arr = cJSON_AddArrayToObject(sp, "saturated_ranges");
	for (size_t i = 0; i < irr_peaklist_saturated_count(pl); i++) {
		double a, b;
		cJSON *r = cJSON_CreateArray();
		irr_peaklist_saturated_range(pl, i, &a, &b);
		cJSON_AddItemToArray(r, cJSON_CreateNumber(rnd(a, 1e-2)));
		cJSON_AddItemToArray(r, cJSON_CreateNumber(rnd(b, 1e-2)));
		cJSON_AddItemToArray(arr, r);
	}
	cJSON_AddNumberToObject(sp, "noise", irr_peaklist_noise(pl));
	if (s) {
		/* The thresholds used, so a result can be reproduced. */
		cJSON *st = cJSON_AddObjectToObject(root, "settings");
		cJSON_AddNumberToObject(st, "smooth_cm", rnd(irr_peaklist_smoothing(pl), 1e-3));
		cJSON_AddNumberToObject(st, "min_snr", po->min_snr);
		cJSON_AddNumberToObject(st, "min_rel_height", po->min_rel_height);
		cJSON_AddNumberToObject(st, "strong_frac", po->strong_frac);
		cJSON_AddNumberToObject(st, "medium_frac", po->medium_frac);
		cJSON_AddNumberToObject(st, "broad_cm", po->broad_cm);
		cJSON_AddBoolToObject(st, "shoulders", po->shoulders);
		cJSON_AddNumberToObject(st, "shoulder_factor", po->shoulder_factor);
		cJSON_AddNumberToObject(st, "shoulder_depth", po->shoulder_depth);
		cJSON_AddBoolToObject(st, "baseline", po->baseline);
	}
	arr = cJSON_AddArrayToObject(root, "peaks");
	for (size_t i = 0; i < irr_peaklist_count(pl); i++) {
		const irr_peak *p = irr_peaklist_get(pl, i);
		pk = cJSON_CreateObject();
		cJSON_AddNumberToObject(pk, "position", rnd(p->position, 1e-2));
		cJSON_AddNumberToObject(pk, "height", rnd(p->height, 1e-5));
		cJSON_AddNumberToObject(pk, "area", rnd(p->area, 1e-4));
		cJSON_AddNumberToObject(pk, "fwhm", rnd(p->fwhm, 1e-2));
		cJSON_AddNumberToObject(pk, "rel_height", rnd(p->rel_height, 1e-4));
		cJSON_AddNumberToObject(pk, "low", rnd(p->low, 1e-2));
		cJSON_AddNumberToObject(pk, "high", rnd(p->high, 1e-2));
		cJSON_AddStringToObject(pk, "intensity", irr_intensity_name(p->intensity));
		cJSON_AddBoolToObject(pk, "broad", p->broad);
		cJSON_AddBoolToObject(pk, "shoulder", p->shoulder);
		cJSON_AddBoolToObject(pk, "saturated", p->saturated);
		cJSON_AddItemToArray(arr, pk);
	}
	return cli_json_text(root);
}

static char *render_table(const irr_spectrum *s, const irr_peaklist *pl, const char *path)
{
	char *buf = NULL;
	size_t len = 0;
	FILE *f = open_memstream(&buf, &len);
	char a[64], b[64], c[64], d[64];
	size_t n = irr_peaklist_count(pl), nsh = 0, nsat = 0, nbr = 0;
	double lo, hi;
	if (!f)
		return NULL;
	for (size_t i = 0; i < n; i++) {
		const irr_peak *p = irr_peaklist_get(pl, i);
		nsh += p->shoulder != 0;
		nsat += p->saturated != 0;
		nbr += p->broad != 0;
	}
	irr_peaklist_range(pl, &lo, &hi);
	fprintf(f, "%s\n", path);
	if (s && irr_spectrum_title(s)[0])
		fprintf(f, "  title: %.70s\n", irr_spectrum_title(s));
	if (s) {
		fprintf(f, "  %zu points, %s-%s cm-1, %s, %s as absorbance\n",
		        irr_spectrum_points(s), cli_fmt(a, sizeof a, lo, 1), cli_fmt(b, sizeof b, hi, 1),
		        irr_spectrum_source_format(s), irr_yunits_name(irr_spectrum_source_y_units(s)));
		for (size_t i = 0; i < irr_spectrum_warning_count(s); i++)
			fprintf(f, "  warning: %s\n", irr_spectrum_warning(s, i));
		fprintf(f, "  noise %s A; ", cli_fmt(a, sizeof a, irr_peaklist_noise(pl), 5));
	} else {
		fprintf(f, "  peak list, range %s to %s cm-1; ", cli_fmt(a, sizeof a, lo, 1), cli_fmt(b, sizeof b, hi, 1));
	}
	fprintf(f, "%zu band%s (%zu shoulder%s, %zu broad, %zu saturated)\n\n", n, n == 1 ? "" : "s",
	        nsh, nsh == 1 ? "" : "s", nbr, nsat);
	if (n == 0) {
		fprintf(f, "  no bands above the thresholds\n");
	} else {
		fprintf(f, "  %9s %9s %9s %7s  %-7s %s\n", "cm-1", "height", "area", "fwhm", "class", "notes");
		for (size_t i = 0; i < n; i++) {
			const irr_peak *p = irr_peaklist_get(pl, i);
			char notes[200] = "";
			if (p->saturated)
				snprintf(notes, sizeof notes, "saturated %s-%s", cli_fmt(c, sizeof c, p->low, 0),
				         cli_fmt(d, sizeof d, p->high, 0));
			if (p->shoulder)
				snprintf(notes + strlen(notes), sizeof notes - strlen(notes), "%sshoulder",
				         notes[0] ? ", " : "");
			if (p->broad)
				snprintf(notes + strlen(notes), sizeof notes - strlen(notes), "%sbroad",
				         notes[0] ? ", " : "");
			fprintf(f, "  %9s %9s %9s %7s  %-7s %s\n", cli_fmt(a, sizeof a, p->position, 1),
			        p->height > 0 ? cli_fmt(b, sizeof b, p->height, 4) : "-",
			        p->area > 0 ? cli_fmt(c, sizeof c, p->area, 3) : "-",
			        p->fwhm > 0 ? cli_fmt(d, sizeof d, p->fwhm, 1) : "-",
			        irr_intensity_name(p->intensity), notes);
		}
	}
	if (fclose(f) != 0) {
		free(buf);
		return NULL;
	}
	return buf;
}

static int list_blocks(const char *path)
{
	irr_block_info *b = NULL;
	size_t nb = 0;
	irr_error err;
	irr_error_clear(&err);
	if (irr_jcamp_list_blocks(&b, &nb, path, &err) != IRR_OK)
		return cli_fail(&err);
	printf("%s: %zu block%s\n", path, nb, nb == 1 ? "" : "s");
	for (size_t i = 0; i < nb; i++)
		printf("  %3d  %-22s %-4s %s\n", b[i].index, b[i].data_type,
		       b[i].has_data ? "data" : "-", b[i].title);
	free(b);
	return CLI_OK;
}

int cmd_peaks(int argc, char **argv)
{
	irr_read_options ro;
	irr_peak_options po;
	irr_error err;
	const char *path = NULL, *output = "-";
	int json = 0, listb = 0, peaklist = 0, rc = CLI_ERROR;
	irr_spectrum *s = NULL;
	irr_peaklist *pl = NULL;
	char *text = NULL;

	irr_read_options_init(&ro);
	irr_peak_options_init(&po);
	irr_error_clear(&err);
	cli_args args = {"peaks", opts, argc, argv, 1,
	                 CLI_ARGS_OPERANDS | CLI_ARGS_DASH_H | CLI_ARGS_NEEDS_VALUE, NULL};
	const cli_opt *d;
	const char *v;
	int next;
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		const char *a = d ? d->name : NULL;
		double num = 0.0;
		int r;
		if (next == CLI_ERROR)
			return CLI_ERROR;
		if (!d) {
			if (path)
				return cli_usage_error("peaks", "one FILE only ('%s' and '%s')", path, v);
			path = v;
		} else if (!strcmp(a, "--help")) {
			help();
			return CLI_OK;
		} else if (!strcmp(a, "--json")) {
			json = 1;
		} else if (!strcmp(a, "--output")) {
			output = v;
		} else if (!strcmp(a, "--list-blocks")) {
			listb = 1;
		} else if (!strcmp(a, "--peak-list")) {
			peaklist = 1;
		} else if (!strcmp(a, "--no-shoulders")) {
			po.shoulders = 0;
		} else if (!strcmp(a, "--no-baseline")) {
			po.baseline = 0;
		} else if ((r = cli_read_option("peaks", a, v, &ro)) >= 0) {
			if (r != CLI_OK)
				return CLI_ERROR;
		} else {
			if (cli_number_option("peaks", a, v, &num))
				return CLI_ERROR;
			if (!strcmp(a, "--smooth"))
				po.smooth_cm = num;
			else if (!strcmp(a, "--min-snr"))
				po.min_snr = num;
			else if (!strcmp(a, "--min-rel"))
				po.min_rel_height = num;
			else if (!strcmp(a, "--strong"))
				po.strong_frac = num;
			else if (!strcmp(a, "--medium"))
				po.medium_frac = num;
			else if (!strcmp(a, "--broad"))
				po.broad_cm = num;
			else if (!strcmp(a, "--shoulder-factor"))
				po.shoulder_factor = num;
			else if (!strcmp(a, "--shoulder-depth"))
				po.shoulder_depth = num;
		}
	}
	if (!path)
		return cli_usage_error("peaks", "no FILE given");
	if (listb)
		return list_blocks(path);

	if (peaklist) {
		if (irr_peaklist_read_file(&pl, path, &err) != IRR_OK) {
			rc = cli_fail(&err);
			goto done;
		}
	} else {
		if (irr_spectrum_read_file(&s, path, &ro, &err) != IRR_OK ||
		    irr_spectrum_normalise(s, &err) != IRR_OK ||
		    irr_peaks_pick(&pl, s, &po, &err) != IRR_OK) {
			rc = cli_fail(&err);
			goto done;
		}
	}
	text = json ? render_json(s, pl, path, &po) : render_table(s, pl, path);
	if (!text) {
		irr_error_set(&err, IRR_ENOMEM, path, 0, "out of memory while formatting");
		rc = cli_fail(&err);
		goto done;
	}
	if (cli_write_file_atomic(output, text, strlen(text), &err) != IRR_OK) {
		rc = cli_fail(&err);
		goto done;
	}
	rc = CLI_OK;
done:
	free(text);
	irr_peaklist_free(pl);
	irr_spectrum_free(s);
	return rc;
}
