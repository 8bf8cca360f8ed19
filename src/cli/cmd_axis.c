/* cmd_axis.c: `irrecon axis FILE`: checks the wavenumber axis of an
 * instrument with a measured polystyrene film spectrum (reference bands of
 * the European / Japanese Pharmacopoeia) and says whether it can be
 * trusted. Exit 0 when every resolved band is within tolerance, 1 when one
 * is not (or none is resolved), 2 on error. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

#include "cli/cli.h"
#include "irrecon/axischeck.h"
#include "irrecon/common.h"
#include "irrecon/spectrum.h"

static const cli_opt opts[] = {
	{"--json", NULL, "print JSON (schema irrecon.axis/1) instead of the table"},
	{"--output", "FILE", "write to FILE (replaced atomically) instead of stdout"},
	{"--block", "N", "compound JCAMP-DX file: use block N"},
	{"--decimal-comma", NULL, "CSV: ',' is the decimal separator"},
	{"--max-bytes", "N", "refuse files larger than N bytes (default 256 MiB)"},
	{"--max-points", "N", "refuse spectra of more than N points (default 1,000,000)"},
	{"--y-units", "UNITS", "CSV without units header: absorbance, transmittance, ..."},
	{"--search", "CM", "look for each band within +-CM cm-1 (default 6)"},
	{"--min-snr", "X", "a band must stand X noise sd above its valleys (5)"},
	{"--help", NULL, "show this help"},
	{NULL, NULL, NULL}
};

static void help(void)
{
	printf("usage: irrecon axis FILE [OPTIONS]\n\n"
	       "Checks the wavenumber axis of a spectrometer with a spectrum of a\n"
	       "polystyrene film: finds the reference bands of the European Pharmacopoeia\n"
	       "2.2.24 / Japanese Pharmacopoeia (3060.0, 2849.5, 1942.9 cm-1 within\n"
	       "+-1.5; 1601.2, 1583.0, 1154.5, 1028.3 cm-1 within +-1.0) and reports each\n"
	       "deviation. A band the file does not resolve is 'not found': it neither\n"
	       "passes nor fails. The axis passes when every resolved band is within its\n"
	       "tolerance. Use a transmission film: ATR shifts strong bands to lower\n"
	       "wavenumber, so an ATR spectrum can fail with a good axis. This check is\n"
	       "evidence for the lab's own qualification procedure, not a replacement.\n\n"
	       "Options:\n");
	cli_opt_help(opts, 20);
	printf("\nExit status: 0 axis within tolerance, 1 not (or no band resolved), 2 error.\n");
}

static char *render_table(const irr_axis_report *r, const char *path)
{
	char *buf = NULL;
	size_t len = 0, nres = irr_axis_report_resolved(r), nout = irr_axis_report_outside(r);
	size_t nall = irr_axis_report_count(r);
	FILE *f = open_memstream(&buf, &len);
	char a[32], b[32], c[32], d[40];
	if (!f)
		return NULL;
	fprintf(f, "Wavenumber axis against polystyrene (EP 2.2.24 / JP bands)\n%s\n\n", path);
	fprintf(f, "  %9s  %9s  %9s  %9s  %s\n", "reference", "tolerance", "found", "deviation", "result");
	for (size_t i = 0; i < nall; i++) {
		const irr_axis_band *x = irr_axis_report_band(r, i);
		char tol[40];
		snprintf(tol, sizeof tol, "+-%s", cli_fmt(b, sizeof b, x->tolerance, 1));
		if (x->status == IRR_AXIS_NOT_FOUND) {
			fprintf(f, "  %9s  %9s  %9s  %9s  not found (%s)\n", cli_fmt(a, sizeof a, x->reference, 1),
			        tol, "-", "-", x->reason);
		} else {
			snprintf(d, sizeof d, "%s%s", x->deviation > 0 ? "+" : "",
			         cli_fmt(c, sizeof c, x->deviation, 1));
			fprintf(f, "  %9s  %9s  %9s  %9s  %s\n", cli_fmt(a, sizeof a, x->reference, 1), tol,
			        cli_fmt(c, sizeof c, x->found, 1), d,
			        x->status == IRR_AXIS_WITHIN ? "within" : "OUTSIDE");
		}
	}
	fprintf(f, "\n");
	if (nres == 0)
		fprintf(f, "Axis NOT CONFIRMED: none of the %zu reference bands is resolved.\n", nall);
	else if (nout == 0)
		fprintf(f, "Axis within tolerance: %zu of %zu bands resolved, all within;\n"
		           "%zu not resolved.\n", nres, nall, nall - nres);
	else
		fprintf(f, "Axis OUT OF TOLERANCE: %zu of %zu resolved bands outside;\n"
		           "%zu not resolved.\n", nout, nres, nall - nres);
	if (nres > 0 && nres < nall)
		fprintf(f, "Bands not resolved were not checked; a full check needs a film\n"
		           "spectrum that shows them.\n");
	if (fclose(f) != 0) {
		free(buf);
		return NULL;
	}
	return buf;
}

static char *render_json(const irr_axis_report *r, const irr_spectrum *s, const char *path)
{
	cJSON *root = cJSON_CreateObject(), *arr;
	if (!root)
		return NULL;
	cJSON_AddStringToObject(root, "schema", "irrecon.axis/1");
	cJSON_AddStringToObject(root, "file", path);
	cJSON_AddStringToObject(root, "source_format", irr_spectrum_source_format(s));
	cJSON_AddStringToObject(root, "reference", "European Pharmacopoeia 2.2.24 / Japanese Pharmacopoeia, polystyrene film");
	arr = cJSON_AddArrayToObject(root, "bands");
	for (size_t i = 0; i < irr_axis_report_count(r); i++) {
		const irr_axis_band *x = irr_axis_report_band(r, i);
		cJSON *o = cJSON_CreateObject();
		cJSON_AddNumberToObject(o, "reference", x->reference);
		cJSON_AddNumberToObject(o, "tolerance", x->tolerance);
		if (x->status == IRR_AXIS_NOT_FOUND) {
			cJSON_AddNullToObject(o, "found");
			cJSON_AddNullToObject(o, "deviation");
		} else {
			cJSON_AddNumberToObject(o, "found", x->found);
			cJSON_AddNumberToObject(o, "deviation", x->deviation);
		}
		cJSON_AddStringToObject(o, "status", irr_axis_status_name(x->status));
		if (x->reason[0])
			cJSON_AddStringToObject(o, "reason", x->reason);
		cJSON_AddItemToArray(arr, o);
	}
	cJSON_AddNumberToObject(root, "resolved", (double)irr_axis_report_resolved(r));
	cJSON_AddNumberToObject(root, "not_resolved",
	                        (double)(irr_axis_report_count(r) - irr_axis_report_resolved(r)));
	cJSON_AddNumberToObject(root, "outside", (double)irr_axis_report_outside(r));
	cJSON_AddBoolToObject(root, "passed", irr_axis_report_passed(r));
	return cli_json_text(root);
}

int cmd_axis(int argc, char **argv)
{
	irr_read_options ro;
	irr_axis_options ao;
	irr_error err;
	const char *path = NULL, *output = "-";
	int json = 0, rc = CLI_ERROR;
	irr_spectrum *s = NULL;
	irr_axis_report *r = NULL;
	char *text = NULL;

	irr_read_options_init(&ro);
	irr_axis_options_init(&ao);
	irr_error_clear(&err);
	cli_args args = {"axis", opts, argc, argv, 1,
	                 CLI_ARGS_OPERANDS | CLI_ARGS_DASH_H | CLI_ARGS_NEEDS_VALUE, NULL};
	const cli_opt *d;
	const char *v;
	int next, read_rc;
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		if (next == CLI_ERROR)
			return CLI_ERROR;
		if (!d) {
			if (path)
				return cli_usage_error("axis", "one FILE only ('%s' and '%s')", path, v);
			path = v;
		} else if (cli_opt_is(d, "--help")) {
			help();
			return CLI_OK;
		} else if (cli_opt_is(d, "--json")) {
			json = 1;
		} else if (cli_opt_is(d, "--output")) {
			output = v;
		} else if ((read_rc = cli_read_option("axis", d->name, v, &ro)) >= 0) {
			if (read_rc != CLI_OK)
				return CLI_ERROR;
		} else if (cli_opt_is(d, "--search")) {
			if (cli_number_option("axis", d->name, v, &ao.search_cm))
				return CLI_ERROR;
		} else if (cli_opt_is(d, "--min-snr")) {
			if (cli_number_option("axis", d->name, v, &ao.min_snr))
				return CLI_ERROR;
		}
	}
	if (!path)
		return cli_usage_error("axis", "no FILE given");
	if (irr_spectrum_read_file(&s, path, &ro, &err) != IRR_OK ||
	    irr_spectrum_normalise(s, &err) != IRR_OK || irr_axis_check(&r, s, &ao, &err) != IRR_OK) {
		rc = cli_fail(&err);
		goto done;
	}
	text = json ? render_json(r, s, path) : render_table(r, path);
	if (!text) {
		irr_error_set(&err, IRR_ENOMEM, path, 0, "out of memory while formatting");
		rc = cli_fail(&err);
		goto done;
	}
	if (cli_write_file_atomic(output, text, strlen(text), &err) != IRR_OK) {
		rc = cli_fail(&err);
		goto done;
	}
	rc = irr_axis_report_passed(r) ? CLI_OK : CLI_NOT_CONSISTENT;
done:
	free(text);
	irr_axis_report_free(r);
	irr_spectrum_free(s);
	return rc;
}
