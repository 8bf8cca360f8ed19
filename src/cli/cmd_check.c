/* cmd_check.c: `irrecon check`: one sample's spectrum (or peak list)
 * against its proposed structure, with optional starting materials,
 * reagents and solvents; prints the text report or the JSON result, writes
 * the SVG plot, and exits 0 only for a consistent verdict. Also runs a JSON
 * request (`--request FILE`, see docs/request-schema.md). */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "cli/cli.h"
#include "cli/cmd_check.h"
#include "irrecon/peaks.h"
#include "irrecon/reconcile.h"
#include "irrecon/report.h"
#include "irrecon/request.h"
#include "irrecon/sha256.h"
#include "irrecon/spectrum.h"
#include "irrecon/tables.h"

static const cli_opt opts[] = {
	{"--structure", "SMILES", "the proposed structure"},
	{"--structure-file", "FILE", "read the structure from FILE (first SMILES in it)"},
	{"--spectrum", "FILE", "the measured spectrum (JCAMP-DX or CSV/TSV)"},
	{"--peaks", "FILE", "a peak list (CSV or JSON) instead of a spectrum"},
	{"--starting-material", "S", "a starting material (SMILES or library name); repeatable"},
	{"--reagent", "S", "a reagent (SMILES or library name); repeatable"},
	{"--solvent", "S", "a solvent (library name such as \"ethyl acetate\", or SMILES);\n"
	                   "repeatable"},
	{"--sample", "ID", "the sample id, carried into the reports"},
	{"--phase", "P", "condensed (default), solution or gas"},
	{"--sampling", "S", "atr (default) or transmission"},
	{"--json", NULL, "print the JSON result (schema irrecon.check/1)"},
	{"--output", "FILE", "write the report to FILE (replaced atomically)"},
	{"--svg", "FILE", "also write the annotated plot to FILE (replaced atomically)"},
	{"--block", "N", "compound JCAMP-DX file: use block N (1-based; default: the infrared one)"},
	{"--max-bytes", "N", "refuse input files larger than N bytes (default 256 MiB)"},
	{"--max-points", "N", "refuse spectra of more than N points (default 1,000,000)"},
	{"--tables", "DIR", "group tables folder (default: the installed tables)"},
	{"--add-table", "FILE", "an extra group table; repeatable"},
	{"--request", "FILE", "run a JSON request (irrecon.request/1; '-' = stdin) and\n"
	                      "print its JSON result"},
	{"--list-solvents", NULL, "list the solvent and reagent library and stop"},
	{"--help", NULL, "show this help"},
	{NULL, NULL, NULL}
};

static void help(void)
{
	printf("usage: irrecon check --structure SMILES --spectrum FILE [OPTIONS]\n"
	       "       irrecon check --structure-file FILE --peaks FILE [OPTIONS]\n"
	       "       irrecon check --request FILE\n\n"
	       "Checks a measured infrared spectrum against a proposed structure: predicts\n"
	       "the expected bands, matches them to the observed peaks by optimal\n"
	       "assignment, attributes extra bands to the starting materials, reagents and\n"
	       "solvents given (and to CO2, water vapour and moisture), and reports a\n"
	       "verdict: consistent, consistent_impure, inconsistent or inconclusive.\n\n"
	       "Options:\n");
	cli_opt_help(opts, 23);
	printf("\nA verdict is evidence, never proof of identity or purity; follow your\n"
	       "lab's approved procedures and local safety rules.\n\n"
	       "Exit status: 0 consistent, 1 any other verdict, 2 error.\n");
}

/* ---- Shared with rank ---- */

int cli_load_tables(irr_tables **out, const char *dir, char **extra, size_t nextra,
                    char **solvents_file, irr_error *err)
{
	int rc = irr_tables_load(out, dir, (const char *const *)extra, nextra, err);
	*solvents_file = NULL;
	if (rc == IRR_OK && dir) {
		struct stat st;
		size_t n = strlen(dir) + 32;
		char *p = malloc(n);
		if (!p)
			return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
		snprintf(p, n, "%s/solvents/solvents.json", dir);
		if (stat(p, &st) == 0)
			*solvents_file = p;
		else
			free(p);
	}
	return rc;
}

int cli_sha256_file(const char *path, size_t max_bytes, char hex[65], irr_error *err)
{
	unsigned char buf[65536], d[32];
	irr_sha256 s;
	size_t n, total = 0;
	FILE *f = fopen(path, "rb");
	if (!f)
		return irr_error_set(err, IRR_EIO, path, 0, "cannot open: %s", strerror(errno));
	irr_sha256_init(&s);
	while ((n = fread(buf, 1, sizeof buf, f)) > 0) {
		total += n;
		/* A file that grew, or a device without end: never hash forever. */
		if (max_bytes && total > max_bytes) {
			fclose(f);
			return irr_error_set(err, IRR_ELIMIT, path, 0,
			                     "larger than the limit of %zu bytes", max_bytes);
		}
		irr_sha256_update(&s, buf, n);
	}
	if (ferror(f)) {
		fclose(f);
		return irr_error_set(err, IRR_EIO, path, 0, "read error");
	}
	fclose(f);
	irr_sha256_final(&s, d);
	irr_sha256_hex(d, hex);
	return IRR_OK;
}

int cli_check_set_input(irr_check *c, irr_check_options *o, const char *spectrum,
                        const char *peaks, const irr_read_options *ro, irr_error *err)
{
	char hex[65];
	const char *path = spectrum ? spectrum : peaks;
	irr_spectrum *s = NULL;
	irr_peaklist *pl = NULL;
	size_t limit = ro && ro->max_bytes ? ro->max_bytes : ((size_t)256 << 20);
	int rc;
	/* Read first: the reader refuses what is not a spectrum (and devices
	 * without end) quickly; only then hash the bytes it accepted. */
	if (spectrum)
		rc = irr_spectrum_read_file(&s, spectrum, ro, err);
	else
		rc = irr_peaklist_read_file(&pl, peaks, err);
	if (rc)
		return rc;
	if ((rc = cli_sha256_file(path, limit, hex, err))) {
		irr_spectrum_free(s);
		irr_peaklist_free(pl);
		return rc;
	}
	o->input_name = path;
	o->input_sha256 = hex;
	irr_check_set_options(c, o); /* copies the strings */
	o->input_name = NULL;
	o->input_sha256 = NULL;
	if (s) {
		rc = irr_check_set_spectrum(c, s, err);
		if (rc && err && !err->file[0])
			irr_error_set(err, rc, spectrum, 0, "%s", err->message);
		return rc;
	}
	return irr_check_set_peaks(c, pl, err);
}

int cli_check_args_init(cli_check_args *ca, int argc)
{
	memset(ca, 0, sizeof *ca);
	irr_check_options_init(&ca->o);
	irr_read_options_init(&ca->ro);
	ca->extra = calloc((size_t)argc + 1, sizeof *ca->extra);
	ca->others = calloc((size_t)argc + 1, sizeof *ca->others);
	return ca->extra && ca->others ? 0 : -1;
}

void cli_check_args_free(cli_check_args *ca)
{
	free(ca->extra);
	free(ca->others);
	ca->extra = NULL;
	ca->others = NULL;
}

int cli_check_option(const char *cmd, const char *a, const char *v, cli_check_args *ca)
{
	static const struct { const char *opt; irr_other_kind kind; } other[] = {
		{"--starting-material", IRR_OTHER_STARTING_MATERIAL},
		{"--reagent", IRR_OTHER_REAGENT},
		{"--solvent", IRR_OTHER_SOLVENT},
	};
	for (size_t k = 0; k < sizeof other / sizeof other[0]; k++)
		if (!strcmp(a, other[k].opt)) {
			ca->others[ca->nothers].kind = other[k].kind;
			ca->others[ca->nothers++].what = v;
			return 1;
		}
	if (!strcmp(a, "--spectrum")) ca->spectrum = v;
	else if (!strcmp(a, "--peaks")) ca->peaks = v;
	else if (!strcmp(a, "--sample")) ca->sample = v;
	else if (!strcmp(a, "--json")) ca->json = 1;
	else if (!strcmp(a, "--output")) ca->output = v;
	else if (!strcmp(a, "--tables")) ca->tables_dir = v;
	else if (!strcmp(a, "--add-table")) ca->extra[ca->nextra++] = (char *)v;
	else if (!strcmp(a, "--phase")) {
		if (irr_phase_parse(v, &ca->o.phase))
			return cli_usage_error(cmd, "--phase must be condensed, solution or gas, not '%s'", v);
	} else if (!strcmp(a, "--sampling")) {
		if (irr_sampling_parse(v, &ca->o.sampling))
			return cli_usage_error(cmd, "--sampling must be atr or transmission, not '%s'", v);
	} else if (!strcmp(a, "--block") || !strcmp(a, "--max-bytes") || !strcmp(a, "--max-points")) {
		if (cli_count_option(cmd, a, v, &ca->ro))
			return CLI_ERROR;
	} else {
		return 0;
	}
	return 1;
}

int cli_check_begin(irr_check **c, irr_tables **t, char **solv_file, cli_check_args *ca,
                    irr_error *err)
{
	int rc = cli_load_tables(t, ca->tables_dir, ca->extra, ca->nextra, solv_file, err);
	if (rc || (rc = irr_check_create(c, *t, err)))
		return rc;
	ca->o.sample_id = ca->sample;
	ca->o.solvents_file = *solv_file;
	irr_check_set_options(*c, &ca->o);
	return IRR_OK;
}

int cli_check_finish_inputs(irr_check *c, cli_check_args *ca, irr_error *err)
{
	int rc;
	for (size_t k = 0; k < ca->nothers; k++)
		if ((rc = irr_check_add_other(c, ca->others[k].kind, ca->others[k].what, err)))
			return rc;
	return cli_check_set_input(c, &ca->o, ca->spectrum, ca->peaks, &ca->ro, err);
}

/* ---- check ---- */

static int exit_for(irr_verdict v)
{
	return v == IRR_VERDICT_CONSISTENT ? CLI_OK : CLI_NOT_CONSISTENT;
}

static int run_request(const char *path, const char *output)
{
	irr_request *r = NULL;
	irr_tables *t = NULL;
	irr_check *c = NULL;
	irr_error err;
	char *json = NULL, *extra[64];
	size_t nextra;
	int rc, status = CLI_ERROR;
	irr_error_clear(&err);
	if (!strcmp(path, "-")) {
		/* stdin: read it whole, relative paths against the current folder */
		size_t cap = 65536, n = 0, k;
		char *buf = malloc(cap);
		while (buf && (k = fread(buf + n, 1, cap - n, stdin)) > 0) {
			n += k;
			if (n == cap) {
				char *nb = cap < ((size_t)256 << 20) ? realloc(buf, cap * 2) : NULL;
				if (!nb) {
					free(buf);
					buf = NULL;
					break;
				}
				buf = nb, cap *= 2;
			}
		}
		if (!buf) {
			irr_error_set(&err, IRR_ELIMIT, "<stdin>", 0, "request too large or out of memory");
			return cli_fail(&err);
		}
		rc = irr_request_parse(&r, buf, n, "<stdin>", NULL, &err);
		free(buf);
	} else {
		rc = irr_request_read_file(&r, path, &err);
	}
	if (rc)
		return cli_fail(&err);
	nextra = irr_request_extra_table_count(r);
	if (nextra > 64) {
		irr_error_set(&err, IRR_ELIMIT, path, 0, "more than 64 extra tables");
		goto done;
	}
	for (size_t i = 0; i < nextra; i++)
		extra[i] = NULL;
	for (size_t i = 0; i < nextra; i++)
		if (irr_request_resolve(&extra[i], r, irr_request_extra_table(r, i), &err))
			goto done_extra;
	{
		char *tdir = NULL, *solv = NULL;
		if (irr_request_tables_dir(r) &&
		    irr_request_resolve(&tdir, r, irr_request_tables_dir(r), &err))
			goto done_extra;
		rc = cli_load_tables(&t, tdir, extra, nextra, &solv, &err);
		free(tdir);
		free(solv); /* the request's run uses the default library */
		if (rc)
			goto done_extra;
	}
	if (irr_request_run(&c, r, t, &err))
		goto done_extra;
	if (irr_report_json(&json, c)) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "cannot build the JSON result");
		goto done_extra;
	}
	if (cli_write_file_atomic(output ? output : "-", json, strlen(json), &err))
		goto done_extra;
	status = exit_for(irr_check_verdict(c));
done_extra:
	for (size_t i = 0; i < nextra; i++)
		free(extra[i]);
done:
	if (status == CLI_ERROR)
		cli_fail(&err);
	free(json);
	irr_check_free(c);
	irr_tables_free(t);
	irr_request_free(r);
	return status;
}

static int list_solvents(const char *tables_dir)
{
	irr_solvent_library *lib = NULL;
	irr_error err;
	char path[4096];
	irr_error_clear(&err);
	if (tables_dir)
		snprintf(path, sizeof path, "%s/solvents/solvents.json", tables_dir);
	if (irr_solvents_load(&lib, tables_dir ? path : NULL, &err))
		return cli_fail(&err);
	printf("%-28s %-34s %s\n", "name", "SMILES", "also known as");
	for (size_t i = 0; i < irr_solvents_count(lib); i++) {
		const irr_solvent *s = irr_solvents_get(lib, i);
		char al[200] = "";
		for (size_t k = 0; k < s->naliases; k++) {
			size_t n = strlen(al);
			snprintf(al + n, sizeof al - n, "%s%s", k ? ", " : "", s->aliases[k]);
		}
		printf("%-28s %-34s %.16s\n", s->name, s->smiles, al);
	}
	irr_solvents_free(lib);
	return CLI_OK;
}

int cmd_check(int argc, char **argv)
{
	const char *structure = NULL, *structure_file = NULL, *svg = NULL, *request = NULL;
	int list = 0, status = CLI_ERROR, taken;
	char *smiles_buf = NULL, *solv_file = NULL, *report = NULL, *plot = NULL;
	long structure_line = 0;
	cli_check_args ca;
	irr_tables *t = NULL;
	irr_check *c = NULL;
	irr_error err;
	cli_args args = {"check", opts, argc, argv, 1, 0, NULL};
	const cli_opt *d;
	const char *v;
	int next;

	irr_error_clear(&err);
	if (cli_check_args_init(&ca, argc)) {
		cli_check_args_free(&ca);
		irr_error_set(&err, IRR_ENOMEM, "", 0, "out of memory");
		return cli_fail(&err);
	}
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		const char *a = d ? d->name : "";
		if (next == CLI_ERROR || (taken = cli_check_option("check", a, v, &ca)) == CLI_ERROR) {
			status = CLI_ERROR;
			goto out;
		}
		if (taken)
			continue;
		if (!strcmp(a, "--help")) {
			help();
			status = CLI_OK;
			goto out;
		} else if (!strcmp(a, "--structure")) structure = v;
		else if (!strcmp(a, "--structure-file")) structure_file = v;
		else if (!strcmp(a, "--svg")) svg = v;
		else if (!strcmp(a, "--request")) request = v;
		else if (!strcmp(a, "--list-solvents")) list = 1;
	}
	if (list) {
		status = list_solvents(ca.tables_dir);
		goto out;
	}
	if (request) {
		if (structure || structure_file || ca.spectrum || ca.peaks || ca.nothers || svg) {
			status = cli_usage_error("check", "--request carries the whole job; give no other inputs");
			goto out;
		}
		status = run_request(request, ca.output);
		goto out;
	}
	if (!!structure + !!structure_file != 1) {
		status = cli_usage_error("check", "give one of --structure or --structure-file");
		goto out;
	}
	if (!!ca.spectrum + !!ca.peaks != 1) {
		status = cli_usage_error("check", "give one of --spectrum or --peaks");
		goto out;
	}
	if (structure_file) {
		if (cli_read_structure_file(&smiles_buf, NULL, &structure_line, structure_file, &err))
			goto fail;
		structure = smiles_buf;
	}
	if (cli_check_begin(&c, &t, &solv_file, &ca, &err))
		goto fail;
	if (irr_check_set_structure_named(c, structure, structure_file ? structure_file : "--structure", &err)) {
		if (structure_file && err.line <= 0)
			err.line = structure_line;
		goto fail;
	}
	if (cli_check_finish_inputs(c, &ca, &err) || irr_check_run(c, &err))
		goto fail;
	if ((ca.json ? irr_report_json(&report, c) : irr_report_text(&report, c))) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "cannot build the report");
		goto fail;
	}
	if (svg) {
		irr_svg_options so;
		irr_svg_options_init(&so);
		if (irr_report_svg(&plot, c, &so)) {
			irr_error_set(&err, IRR_ERROR, svg, 0, "cannot draw the plot");
			goto fail;
		}
		if (cli_write_file_atomic(svg, plot, strlen(plot), &err))
			goto fail;
	}
	if (cli_write_file_atomic(ca.output ? ca.output : "-", report, strlen(report), &err))
		goto fail;
	status = exit_for(irr_check_verdict(c));
	goto out;
fail:
	status = cli_fail(&err);
out:
	free(report);
	free(plot);
	irr_check_free(c);
	irr_tables_free(t);
	free(smiles_buf);
	free(solv_file);
	cli_check_args_free(&ca);
	return status;
}
