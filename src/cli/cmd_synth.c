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

static void help(FILE *f)
{
	fprintf(f,
	"usage: irrecon synth --structure SMILES [--component SMILES:SHARE]... [OPTIONS]\n"
	"       irrecon synth --component SMILES:SHARE [--component SMILES:SHARE]... [OPTIONS]\n\n"
	"Writes the infrared spectrum a structure, or a mixture, should give: each\n"
	"predicted band drawn as a Lorentzian line at its typical position, its width\n"
	"from its shape class and its height from its intensity class.\n\n"
	"Structures:\n"
	"  --structure SMILES        the main compound; it takes the share the\n"
	"                            components leave (1 - their sum)\n"
	"  --structure-file FILE     the same, read from FILE (first SMILES in it)\n"
	"  --component SMILES:SHARE  another compound and its share (0..1); repeatable.\n"
	"                            Without --structure the shares are rescaled to 1\n\n"
	"Output:\n"
	"  -o, --output FILE         where to write (default '-', standard output)\n"
	"  --format jcamp|jcamp-affn|csv\n"
	"                            default from the file name (.csv gives csv),\n"
	"                            else JCAMP-DX 4.24 with DIF/DUP compression\n"
	"  --units absorbance|transmittance   (default absorbance)\n"
	"  --title TEXT              ##TITLE of the JCAMP-DX file\n"
	"  --owner TEXT              ##OWNER of the JCAMP-DX file\n\n"
	"Spectrum:\n"
	"  --range LOW:HIGH          cm-1 (default 400:4000)\n"
	"  --spacing CM              cm-1 between points (default 1)\n"
	"  --sampling atr|transmission   (default atr: bands weaken as 1/wavenumber)\n"
	"  --phase condensed|solution|gas (default condensed)\n"
	"  --max-absorbance A        height of the strongest band (default 0.8)\n"
	"  --baseline LOW:HIGH       baseline absorbance at the low and high\n"
	"                            wavenumber ends (default 0:0)\n"
	"  --co2 A                   atmospheric CO2: the 2360/2340 pair at A, 667 at 0.6 A\n"
	"  --noise RMS               white Gaussian noise, absorbance (default 0)\n"
	"  --seed N                  noise seed (default 1); same seed, same file\n"
	"  --tables DIR              group-frequency tables (default: built in)\n\n"
	"A synthetic spectrum is a sketch from group-frequency tables, not a\n"
	"measurement: use it to see what to expect, never as reference data.\n");
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

/* --structure-file: the first non-blank line that is not a '#' comment;
 * its first word. --structure: the argument itself. */
static int structure_arg(const char *arg, int is_file, char **smiles, irr_error *err)
{
	FILE *f;
	char line[8192];
	long ln = 0;
	*smiles = NULL;
	if (!is_file) {
		*smiles = strdup(arg);
		return *smiles ? IRR_OK : irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	f = fopen(arg, "r");
	if (!f)
		return irr_error_set(err, IRR_EIO, arg, 0, "cannot open: %s", strerror(errno));
	while (fgets(line, sizeof line, f)) {
		char *p = line, *e;
		ln++;
		if (!strchr(line, '\n') && !feof(f)) {
			fclose(f);
			return irr_error_set(err, IRR_EINPUT, arg, ln, "line too long for a SMILES");
		}
		while (*p == ' ' || *p == '\t')
			p++;
		if (!*p || *p == '\n' || *p == '\r' || *p == '#')
			continue;
		e = p + strcspn(p, " \t\r\n");
		*e = '\0';
		fclose(f);
		*smiles = strdup(p);
		return *smiles ? IRR_OK : irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	fclose(f);
	return irr_error_set(err, IRR_EINPUT, arg, ln, "no SMILES in the file");
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

enum { O_STRUCTURE = 256, O_STRUCTURE_FILE, O_COMPONENT, O_FORMAT, O_UNITS, O_TITLE, O_OWNER,
       O_RANGE, O_SPACING, O_SAMPLING, O_PHASE, O_MAXABS, O_BASELINE, O_CO2,
       O_NOISE, O_SEED, O_TABLES, O_HELP };

int cmd_synth(int argc, char **argv)
{
	static const struct option longopts[] = {
		{"structure", required_argument, NULL, O_STRUCTURE},
		{"structure-file", required_argument, NULL, O_STRUCTURE_FILE},
		{"component", required_argument, NULL, O_COMPONENT},
		{"output", required_argument, NULL, 'o'},
		{"format", required_argument, NULL, O_FORMAT},
		{"units", required_argument, NULL, O_UNITS},
		{"title", required_argument, NULL, O_TITLE},
		{"owner", required_argument, NULL, O_OWNER},
		{"range", required_argument, NULL, O_RANGE},
		{"spacing", required_argument, NULL, O_SPACING},
		{"sampling", required_argument, NULL, O_SAMPLING},
		{"phase", required_argument, NULL, O_PHASE},
		{"max-absorbance", required_argument, NULL, O_MAXABS},
		{"baseline", required_argument, NULL, O_BASELINE},
		{"co2", required_argument, NULL, O_CO2},
		{"noise", required_argument, NULL, O_NOISE},
		{"seed", required_argument, NULL, O_SEED},
		{"tables", required_argument, NULL, O_TABLES},
		{"help", no_argument, NULL, O_HELP},
		{NULL, 0, NULL, 0}
	};
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
	optind = 1;
	opterr = 0;
	while ((opt = getopt_long(argc, argv, "o:h", longopts, NULL)) != -1) {
		double a, b;
		switch (opt) {
		case O_STRUCTURE:
		case O_STRUCTURE_FILE:
			if (structure)
				return cli_usage_error(CMD, "give --structure or --structure-file once");
			structure = optarg;
			structure_is_file = opt == O_STRUCTURE_FILE;
			break;
		case O_COMPONENT:
			if (ncomp >= MAX_COMPONENTS)
				return cli_usage_error(CMD, "at most %d components", MAX_COMPONENTS);
			if (parse_component(optarg, &comp[ncomp]) < 0)
				return cli_usage_error(CMD, "--component wants SMILES:SHARE, got '%s'", optarg);
			ncomp++;
			break;
		case 'o':
			output = optarg;
			break;
		case O_FORMAT:
			if (strcmp(optarg, "jcamp") && strcmp(optarg, "jcamp-affn") && strcmp(optarg, "csv"))
				return cli_usage_error(CMD, "--format is jcamp, jcamp-affn or csv, not '%s'", optarg);
			format = optarg;
			break;
		case O_UNITS:
			if (!strcmp(optarg, "absorbance"))
				so.y_units = IRR_Y_ABSORBANCE;
			else if (!strcmp(optarg, "transmittance"))
				so.y_units = IRR_Y_TRANSMITTANCE;
			else
				return cli_usage_error(CMD, "--units is absorbance or transmittance, not '%s'", optarg);
			break;
		case O_TITLE:
			wo.title = optarg;
			break;
		case O_OWNER:
			wo.owner = optarg;
			break;
		case O_RANGE:
			if (parse_pair(optarg, &a, &b) < 0 || !(a > 0) || !(b > a))
				return cli_usage_error(CMD, "--range wants LOW:HIGH in cm-1, got '%s'", optarg);
			so.low = a;
			so.high = b;
			break;
		case O_SPACING:
			if (parse_num(optarg, &so.spacing) < 0 || !(so.spacing > 0))
				return cli_usage_error(CMD, "--spacing wants a number > 0, got '%s'", optarg);
			break;
		case O_SAMPLING:
			if (irr_sampling_parse(optarg, &so.sampling) != IRR_OK)
				return cli_usage_error(CMD, "--sampling is atr or transmission, not '%s'", optarg);
			break;
		case O_PHASE:
			if (irr_phase_parse(optarg, &so.phase) != IRR_OK)
				return cli_usage_error(CMD, "--phase is condensed, solution or gas, not '%s'", optarg);
			break;
		case O_MAXABS:
			if (parse_num(optarg, &so.max_absorbance) < 0)
				return cli_usage_error(CMD, "--max-absorbance wants a number, got '%s'", optarg);
			break;
		case O_BASELINE:
			if (parse_pair(optarg, &so.baseline_low, &so.baseline_high) < 0)
				return cli_usage_error(CMD, "--baseline wants LOW:HIGH absorbances, got '%s'", optarg);
			break;
		case O_CO2:
			if (parse_num(optarg, &so.co2) < 0 || so.co2 < 0)
				return cli_usage_error(CMD, "--co2 wants an absorbance >= 0, got '%s'", optarg);
			break;
		case O_NOISE:
			if (parse_num(optarg, &so.noise) < 0 || so.noise < 0)
				return cli_usage_error(CMD, "--noise wants an absorbance >= 0, got '%s'", optarg);
			break;
		case O_SEED: {
			char *end;
			unsigned long long v = strtoull(optarg, &end, 10);
			if (!*optarg || *end || optarg[0] == '-')
				return cli_usage_error(CMD, "--seed wants a whole number >= 0, got '%s'", optarg);
			so.seed = (uint64_t)v;
			break;
		}
		case O_TABLES:
			tables_dir = optarg;
			break;
		case O_HELP:
		case 'h':
			help(stdout);
			return CLI_OK;
		default:
			if (optopt)
				return cli_usage_error(CMD, "option -%c is unknown or lacks its value", optopt);
			return cli_usage_error(CMD, "unknown option or missing value: '%s'", argv[optind - 1]);
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
		if (structure_arg(structure, structure_is_file, &smiles, &err) < 0)
			return cli_fail(&err);
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
