/* cmd_synth.c: `irrecon synth`, writes the spectrum a structure or a
 * mixture of structures should give, as JCAMP-DX or CSV. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <errno.h>

#include "cli/cli.h"
#include "irrecon/perceive.h"
#include "irrecon/spectrum_write.h"
#include "irrecon/structure.h"
#include "irrecon/synth.h"
#include "irrecon/tables.h"

#define CMD "synth"
#define MAX_COMPONENTS 64

/* One table drives getopt_long (abbreviations and --name=value stay
 * accepted), --help and the man page. Entries without help are headings. */
static const cli_opt opts[] = {
	{"Structures:", NULL, NULL},
	{"--structure", "SMILES", "the main compound; it takes the share the\n"
	                          "components leave (1 - their sum)"},
	{"--structure-file", "FILE", "the same, read from FILE (first SMILES in it)"},
	{"--component", "SMILES:SHARE", "another compound and its share (0..1); repeatable.\n"
	                                "Without --structure the shares are rescaled to 1"},
	{"Output:", NULL, NULL},
	{"-o, --output", "FILE", "where to write (default '-', standard output)"},
	{"--format", "jcamp|jcamp-affn|csv", "\ndefault from the file name (.csv gives csv),\n"
	                                     "else JCAMP-DX 4.24 with DIF/DUP compression"},
	{"--units", "absorbance|transmittance", "  (default absorbance)"},
	{"--title", "TEXT", "##TITLE of the JCAMP-DX file"},
	{"--owner", "TEXT", "##OWNER of the JCAMP-DX file"},
	{"Spectrum:", NULL, NULL},
	{"--range", "LOW:HIGH", "cm-1 (default 400:4000)"},
	{"--spacing", "CM", "cm-1 between points (default 1)"},
	{"--sampling", "atr|transmission", "  (default atr: bands weaken as 1/wavenumber)"},
	{"--phase", "condensed|solution|gas", "(default condensed)"},
	{"--max-absorbance", "A", "height of the strongest band (default 0.8)"},
	{"--baseline", "LOW:HIGH", "baseline absorbance at the low and high\n"
	                           "wavenumber ends (default 0:0)"},
	{"--co2", "A", "atmospheric CO2: the 2360/2340 pair at A, 667 at 0.6 A"},
	{"--noise", "RMS", "white Gaussian noise, absorbance (default 0)"},
	{"--seed", "N", "noise seed (default 1); same seed, same file"},
	{"--tables", "DIR", "group-frequency tables (default: built in)"},
	{NULL, NULL, NULL}
};
#define N_OPTS (sizeof opts / sizeof opts[0])

static void help(void)
{
	printf("usage: irrecon synth --structure SMILES [--component SMILES:SHARE]... [OPTIONS]\n"
	       "       irrecon synth --component SMILES:SHARE [--component SMILES:SHARE]... [OPTIONS]\n\n"
	       "Writes the infrared spectrum a structure, or a mixture, should give: each\n"
	       "predicted band drawn as a Lorentzian line at its typical position, its width\n"
	       "from its shape class and its height from its intensity class.\n\n");
	cli_opt_help(opts, 25);
	printf("\nA synthetic spectrum is a sketch from group-frequency tables, not a\n"
	       "measurement: use it to see what to expect, never as reference data.\n");
}

/* getopt_long's view of the table: long options get the values 256, 257,
 * ... in table order, a leading short form ("-o, --output") its letter;
 * --help and -h are implied. */
static void getopt_table(struct option *lo, const cli_opt **by_index, char *shorts)
{
	int code = 256;
	size_t n = 0;
	char *sp = shorts;
	for (const cli_opt *d = opts; d->name; d++) {
		if (!d->help)
			continue;
		lo[n].name = cli_opt_long(d) + 2;
		lo[n].has_arg = d->arg ? required_argument : no_argument;
		lo[n].flag = NULL;
		if (d->name[1] != '-') {
			lo[n].val = d->name[1];
			*sp++ = d->name[1];
			if (d->arg)
				*sp++ = ':';
		} else {
			lo[n].val = code++;
		}
		by_index[n++] = d;
	}
	lo[n].name = "help";
	lo[n].has_arg = no_argument;
	lo[n].flag = NULL;
	lo[n].val = code;
	by_index[n++] = NULL;
	memset(&lo[n], 0, sizeof lo[n]);
	*sp++ = 'h';
	*sp = '\0';
}

static int parse_num(const char *s, double *v)
{
	char *end;
	if (irr_parse_double(s, &end, v) != IRR_OK || *end)
		return -1;
	return 0;
}

static int parse_pair(const char *s, double *a, double *b)
{
	const char *colon = strchr(s, ':');
	char first[64];
	size_t n;
	if (!colon || (n = (size_t)(colon - s)) == 0 || n >= sizeof first)
		return -1;
	memcpy(first, s, n);
	first[n] = '\0';
	return parse_num(first, a) < 0 || parse_num(colon + 1, b) < 0 ? -1 : 0;
}

/* "SMILES:SHARE": the share follows the last ':' (SMILES may hold ':' in
 * aromatic bonds and atom maps, never a plain number at its end). */
static int parse_component(char *s, irr_synth_component *c)
{
	char *colon = strrchr(s, ':');
	double v;
	if (!colon || colon == s || parse_num(colon + 1, &v) < 0)
		return -1;
	*colon = '\0';
	c->smiles = s;
	c->fraction = v;
	c->name = NULL;
	return 0;
}

static int ends_with(const char *s, const char *suffix)
{
	size_t a = strlen(s), b = strlen(suffix);
	return a >= b && !strcasecmp(s + a - b, suffix);
}

/* The safety cautions of the structures (azide, diazo, peroxide, ...), on
 * stderr: a predicted spectrum is no verdict, but the compound is no less
 * hazardous for it. Each text once. */
static void print_cautions(const irr_synth_component *c, size_t n, const irr_tables *t)
{
	const char *seen[64];
	size_t nseen = 0;
	for (size_t i = 0; i < n; i++) {
		irr_molecule *m = NULL;
		irr_inventory *inv = NULL;
		irr_error err;
		if (irr_molecule_from_smiles(&m, c[i].smiles, "SMILES", &err) == IRR_OK &&
		    irr_perceive(&inv, m, t, &err) == IRR_OK) {
			for (size_t k = 0; k < irr_inventory_caution_count(inv); k++) {
				const char *text = irr_inventory_caution(inv, k);
				size_t j;
				for (j = 0; j < nseen && strcmp(seen[j], text); j++)
					;
				if (j < nseen)
					continue;
				if (nseen < sizeof seen / sizeof seen[0])
					seen[nseen++] = text; /* static texts (perceive.h) */
				fprintf(stderr, "irrecon: caution: %s\n", text);
			}
		}
		irr_inventory_free(inv);
		irr_molecule_free(m);
	}
}

int cmd_synth(int argc, char **argv)
{
	struct option longopts[N_OPTS + 1];
	const cli_opt *by_index[N_OPTS + 1];
	char shorts[2 * N_OPTS + 2];
	irr_synth_options so;
	irr_write_options wo;
	irr_synth_component comp[MAX_COMPONENTS + 1];
	char comp_names[MAX_COMPONENTS][24];
	size_t ncomp = 0;
	const char *structure = NULL, *output = "-", *format = NULL, *tables_dir = NULL;
	char *smiles = NULL, *text = NULL;
	irr_tables *t = NULL;
	irr_spectrum *s = NULL;
	irr_error err;
	size_t len = 0;
	int opt, rc = CLI_ERROR, structure_is_file = 0;
	double sum = 0.0;

	irr_error_clear(&err);
	irr_synth_options_init(&so);
	irr_write_options_init(&wo);
	wo.origin = "irrecon synth (predicted from group-frequency tables)";
	getopt_table(longopts, by_index, shorts);
	optind = 1;
	opterr = 0;
	while ((opt = getopt_long(argc, argv, shorts, longopts, NULL)) != -1) {
		const cli_opt *d = NULL;
		int known = 0;
		double a, b;
		for (size_t k = 0; longopts[k].name; k++)
			if (longopts[k].val == opt) {
				d = by_index[k];
				known = 1;
			}
		if (!known && opt != 'h') {
			if (optopt)
				return cli_usage_error(CMD, "option -%c is unknown or lacks its value", optopt);
			return cli_usage_error(CMD, "unknown option or missing value: '%s'", argv[optind - 1]);
		}
		if (!d) {
			help();
			return CLI_OK;
		} else if (cli_opt_is(d, "--structure") || cli_opt_is(d, "--structure-file")) {
			if (structure)
				return cli_usage_error(CMD, "give --structure or --structure-file once");
			structure = optarg;
			structure_is_file = cli_opt_is(d, "--structure-file");
		} else if (cli_opt_is(d, "--component")) {
			if (ncomp >= MAX_COMPONENTS)
				return cli_usage_error(CMD, "at most %d components", MAX_COMPONENTS);
			if (parse_component(optarg, &comp[ncomp]) < 0)
				return cli_usage_error(CMD, "--component wants SMILES:SHARE, got '%s'", optarg);
			ncomp++;
		} else if (cli_opt_is(d, "--output")) {
			output = optarg;
		} else if (cli_opt_is(d, "--format")) {
			if (strcmp(optarg, "jcamp") && strcmp(optarg, "jcamp-affn") && strcmp(optarg, "csv"))
				return cli_usage_error(CMD, "--format is jcamp, jcamp-affn or csv, not '%s'", optarg);
			format = optarg;
		} else if (cli_opt_is(d, "--units")) {
			if (!strcmp(optarg, "absorbance"))
				so.y_units = IRR_Y_ABSORBANCE;
			else if (!strcmp(optarg, "transmittance"))
				so.y_units = IRR_Y_TRANSMITTANCE;
			else
				return cli_usage_error(CMD, "--units is absorbance or transmittance, not '%s'", optarg);
		} else if (cli_opt_is(d, "--title")) {
			wo.title = optarg;
		} else if (cli_opt_is(d, "--owner")) {
			wo.owner = optarg;
		} else if (cli_opt_is(d, "--range")) {
			if (parse_pair(optarg, &a, &b) < 0 || !(a > 0) || !(b > a))
				return cli_usage_error(CMD, "--range wants LOW:HIGH in cm-1, got '%s'", optarg);
			so.low = a;
			so.high = b;
		} else if (cli_opt_is(d, "--spacing")) {
			if (parse_num(optarg, &so.spacing) < 0 || !(so.spacing > 0))
				return cli_usage_error(CMD, "--spacing wants a number > 0, got '%s'", optarg);
		} else if (cli_opt_is(d, "--sampling")) {
			if (irr_sampling_parse(optarg, &so.sampling) != IRR_OK)
				return cli_usage_error(CMD, "--sampling is atr or transmission, not '%s'", optarg);
		} else if (cli_opt_is(d, "--phase")) {
			if (irr_phase_parse(optarg, &so.phase) != IRR_OK)
				return cli_usage_error(CMD, "--phase is condensed, solution or gas, not '%s'", optarg);
		} else if (cli_opt_is(d, "--max-absorbance")) {
			if (parse_num(optarg, &so.max_absorbance) < 0)
				return cli_usage_error(CMD, "--max-absorbance wants a number, got '%s'", optarg);
		} else if (cli_opt_is(d, "--baseline")) {
			if (parse_pair(optarg, &so.baseline_low, &so.baseline_high) < 0)
				return cli_usage_error(CMD, "--baseline wants LOW:HIGH absorbances, got '%s'", optarg);
		} else if (cli_opt_is(d, "--co2")) {
			if (parse_num(optarg, &so.co2) < 0 || so.co2 < 0)
				return cli_usage_error(CMD, "--co2 wants an absorbance >= 0, got '%s'", optarg);
		} else if (cli_opt_is(d, "--noise")) {
			if (parse_num(optarg, &so.noise) < 0 || so.noise < 0)
				return cli_usage_error(CMD, "--noise wants an absorbance >= 0, got '%s'", optarg);
		} else if (cli_opt_is(d, "--seed")) {
			char *end;
			unsigned long long v = strtoull(optarg, &end, 10);
			if (!*optarg || *end || optarg[0] == '-')
				return cli_usage_error(CMD, "--seed wants a whole number >= 0, got '%s'", optarg);
			so.seed = (uint64_t)v;
		} else if (cli_opt_is(d, "--tables")) {
			tables_dir = optarg;
		}
	}
	if (optind < argc)
		return cli_usage_error(CMD, "unexpected argument '%s'", argv[optind]);
	if (!structure && ncomp == 0)
		return cli_usage_error(CMD, "give --structure or at least one --component");
	for (size_t i = 0; i < ncomp; i++) {
		snprintf(comp_names[i], sizeof comp_names[i], "--component %zu", i + 1);
		comp[i].name = comp_names[i];
		sum += comp[i].fraction;
	}
	if (structure) {
		if (sum >= 1.0)
			return cli_usage_error(CMD, "the component shares sum to %g: nothing left for --structure", sum);
		if (structure_is_file) {
			if (cli_read_structure_file(&smiles, NULL, NULL, structure, &err) < 0)
				return cli_fail(&err);
		} else if (!(smiles = strdup(structure))) {
			return cli_usage_error(CMD, "out of memory");
		}
		/* The main compound first, so its name leads error messages. */
		memmove(comp + 1, comp, ncomp * sizeof *comp);
		comp[0].smiles = smiles;
		comp[0].fraction = 1.0 - sum;
		comp[0].name = structure_is_file ? structure : "--structure";
		ncomp++;
	}
	if (!format)
		format = ends_with(output, ".csv") ? "csv" : "jcamp";
	if (!strcmp(format, "jcamp-affn"))
		wo.form = IRR_JCAMP_AFFN;
	wo.y_units = so.y_units;
	if (!wo.title)
		wo.title = comp[0].smiles;

	if (irr_tables_load(&t, tables_dir, NULL, 0, &err) < 0 ||
	    irr_synth_mixture(&s, comp, ncomp, t, &so, "synthetic", &err) < 0) {
		rc = cli_fail(&err);
		goto done;
	}
	{
		char comment[72];
		snprintf(comment, sizeof comment, "synthetic spectrum from group-frequency tables, seed %llu",
		         (unsigned long long)so.seed);
		wo.comment = comment;
		if ((!strcmp(format, "csv") ? irr_spectrum_write_csv(&text, &len, s, &wo, &err)
		                            : irr_spectrum_write_jcamp(&text, &len, s, &wo, &err)) < 0 ||
		    cli_write_file_atomic(output, text, len, &err) < 0) {
			rc = cli_fail(&err);
			goto done;
		}
	}
	print_cautions(comp, ncomp, t);
	rc = CLI_OK;
done:
	free(text);
	irr_spectrum_free(s);
	irr_tables_free(t);
	free(smiles);
	return rc;
}
