/* test_csv.c: the two-column CSV/TSV reader (src/csvread.c).
 *
 * Sources:
 * - The five ATR spectra of ../shared/ir-reference/ (override with
 *   IRRECON_REFDIR; MANIFEST.tsv and README.md there): header
 *   "wavenumber_cm-1,absorbance", ascending, 1798 points from 650.4205 to
 *   3999.4335 cm-1, values written with 4 and 6 decimals.
 * - Small exports written here in the layouts spreadsheet and instrument
 *   software produce (comma, semicolon, tab, blank separated; decimal
 *   commas; '#' comments): common practice. Their expected values are the
 *   numbers written into them.
 * - Definitions: wavenumber (cm-1) = 1e4 / wavelength (micrometres).
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "unit/refdata.h"

#include "irrecon/spectrum.h"

static irr_spectrum *read_text(const char *text, const irr_read_options *o)
{
	irr_spectrum *s = NULL;
	irr_error err;
	irr_error_clear(&err);
	if (irr_spectrum_read_memory(&s, text, strlen(text), "test.csv", o, &err) != IRR_OK)
		fail_msg("%s (line %ld)", err.message, err.line);
	return s;
}

static void expect_error(const char *text, const irr_read_options *o, int code, long line,
                         const char *words)
{
	irr_spectrum *s = (irr_spectrum *)&s;
	irr_error err;
	int rc;
	irr_error_clear(&err);
	rc = irr_spectrum_read_memory(&s, text, strlen(text), "bad.csv", o, &err);
	if (rc != code)
		fail_msg("expected status %d, got %d (%s)", code, rc, err.message);
	assert_null(s);
	assert_string_equal(err.file, "bad.csv");
	if (line >= 0 && err.line != line)
		fail_msg("expected line %ld, got %ld: %s", line, err.line, err.message);
	if (words && !strstr(err.message, words))
		fail_msg("message '%s' lacks '%s'", err.message, words);
}

static void shared_atr_files_decode(void **state)
{
	static const char *files[] = {"toluene-atr.csv", "isopropanol-atr.csv", "heptanes-atr.csv",
	                              "polystyrene-atr.csv", "paper-atr.csv"};
	char path[1200];
	(void)state;
	snprintf(path, sizeof path, "%s/MANIFEST.tsv", refdir());
	if (access(path, R_OK) != 0) {
		print_message("skipped: reference spectra folder %s not found (set IRRECON_REFDIR)\n",
		              refdir());
		skip();
	}
	for (size_t i = 0; i < sizeof files / sizeof files[0]; i++) {
		irr_spectrum *s = NULL;
		irr_error err;
		snprintf(path, sizeof path, "%s/%s", refdir(), files[i]);
		irr_error_clear(&err);
		assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
		assert_string_equal(irr_spectrum_source_format(s), "csv");
		assert_int_equal(irr_spectrum_points(s), 1798);
		assert_true(irr_spectrum_first_x(s) == 650.4205);
		assert_true(irr_spectrum_last_x(s) == 3999.4335);
		assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_ABSORBANCE);
		assert_int_equal(irr_spectrum_warning_count(s), 0);
		irr_spectrum_free(s);
	}
	/* toluene-atr.csv line 2 is "650.4205,0.011155". */
	{
		irr_spectrum *s = NULL;
		irr_error err;
		snprintf(path, sizeof path, "%s/toluene-atr.csv", refdir());
		assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
		assert_true(irr_spectrum_y(s)[0] == 0.011155);
		irr_spectrum_free(s);
	}
}

/* The same four points in every delimiter, with and without a header. */
static void delimiters_and_headers(void **state)
{
	static const char *texts[] = {
	    "wavenumber_cm-1,absorbance\n1000,0.10\n1500,0.25\n2000,0.05\n3000,0.30\n",
	    "cm-1;A\r\n1000;0.10\r\n1500;0.25\r\n2000;0.05\r\n3000;0.30\r\n",
	    "wavenumber\tabsorbance\n1000\t0.10\n1500\t0.25\n2000\t0.05\n3000\t0.30\n",
	    "# exported by a Larkspur Process Chemistry bench instrument\n"
	    "# sample LPC-0412\n1000   0.10\n1500 0.25\n\n2000\t 0.05\n3000 0.30\n",
	    "\"wavenumber (cm-1)\",\"absorbance\"\n\"1000\",\"0.10\"\n1500,0.25\n2000,0.05,\n3000,0.30\n",
	};
	const double x[4] = {1000, 1500, 2000, 3000}, y[4] = {0.10, 0.25, 0.05, 0.30};
	(void)state;
	for (size_t t = 0; t < sizeof texts / sizeof texts[0]; t++) {
		irr_spectrum *s = read_text(texts[t], NULL);
		assert_int_equal(irr_spectrum_points(s), 4);
		for (int i = 0; i < 4; i++) {
			assert_true(irr_spectrum_x(s)[i] == x[i]);
			assert_true(irr_spectrum_y(s)[i] == y[i]);
		}
		/* Units: stated by the first, second, third and fifth header. */
		assert_int_equal(irr_spectrum_source_y_units(s), t == 3 ? IRR_Y_UNKNOWN : IRR_Y_ABSORBANCE);
		irr_spectrum_free(s);
	}
}

static void units_from_header_and_options(void **state)
{
	irr_spectrum *s;
	irr_read_options o;
	irr_error err;
	(void)state;
	s = read_text("wavenumber,%T\n4000,95.0\n3000,50.0\n2000,10.0\n", NULL);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_PERCENT_T);
	/* Descending X stays as read until normalisation. */
	assert_true(irr_spectrum_first_x(s) == 4000 && irr_spectrum_last_x(s) == 2000);
	assert_int_equal(irr_spectrum_normalise(s, &err), IRR_OK);
	assert_true(irr_spectrum_x(s)[0] == 2000);
	/* A = -log10(0.10) = 1 (definition of absorbance). */
	assert_true(fabs(irr_spectrum_y(s)[0] - 1.0) < 1e-12);
	irr_spectrum_free(s);

	s = read_text("wavenumber_cm-1,transmittance\n1000,0.5\n2000,0.9\n", NULL);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_TRANSMITTANCE);
	irr_spectrum_free(s);

	/* Micrometres from the header: 1e4 / 2.5 um = 4000 cm-1. */
	s = read_text("wavelength_um,absorbance\n2.5,0.1\n5,0.2\n10,0.3\n", NULL);
	assert_int_equal(irr_spectrum_normalise(s, &err), IRR_OK);
	assert_true(fabs(irr_spectrum_x(s)[0] - 1000) < 1e-9);
	assert_true(fabs(irr_spectrum_x(s)[2] - 4000) < 1e-9);
	assert_true(irr_spectrum_y(s)[0] == 0.3);
	irr_spectrum_free(s);

	/* "spectrum" holds "um" but is not a unit. */
	s = read_text("spectrum_x,absorbance\n1000,0.1\n2000,0.2\n", NULL);
	assert_int_equal(irr_spectrum_normalise(s, &err), IRR_OK);
	assert_true(irr_spectrum_x(s)[1] == 2000);
	irr_spectrum_free(s);

	/* Options: units for a file without a header; override with a warning. */
	irr_read_options_init(&o);
	o.y_units = IRR_Y_PERCENT_T;
	s = read_text("1000 50\n2000 90\n", &o);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_PERCENT_T);
	assert_int_equal(irr_spectrum_warning_count(s), 0);
	irr_spectrum_free(s);
	s = read_text("x,absorbance\n1000,50\n2000,90\n", &o);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_PERCENT_T);
	assert_int_equal(irr_spectrum_warning_count(s), 1);
	irr_spectrum_free(s);
	o.y_units = IRR_Y_UNKNOWN;
	o.x_micrometers = 1;
	s = read_text("2.5 0.1\n10 0.3\n", &o);
	assert_int_equal(irr_spectrum_normalise(s, &err), IRR_OK);
	assert_true(fabs(irr_spectrum_x(s)[1] - 4000) < 1e-9);
	irr_spectrum_free(s);
}

/* Instrument exports put a few metadata lines above the column names
 * (common practice); the last line before the data names the columns. */
static void metadata_lines_before_the_data(void **state)
{
	irr_spectrum *s;
	char *text;
	size_t n = 0;
	(void)state;
	s = read_text("Sample: LPC-0412 crude ester (Larkspur Process Chemistry)\n"
	              "Detector: DTGS; source cut-off below 350 nm\n"
	              "Resolution: 4 cm-1, 16 scans\n"
	              "wavenumber (cm-1);%T\n4000;95\n3000;50\n", NULL);
	assert_int_equal(irr_spectrum_points(s), 2);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_PERCENT_T);
	irr_spectrum_free(s);
	/* Text without numbers: refused after 100 lines, not read to its end. */
	text = malloc(200 * 40);
	assert_non_null(text);
	for (int i = 0; i < 200; i++)
		n += (size_t)sprintf(text + n, "just words on line %d, no data\n", i + 1);
	expect_error(text, NULL, IRR_EINPUT, 101, "first 100 lines");
	free(text);
}

static void decimal_commas_only_when_asked(void **state)
{
	static const char text[] = "Wellenzahl;Extinktion\n4000,5;0,012\n3900,5;0,250\n3800,5;0,013\n";
	irr_read_options o;
	irr_spectrum *s;
	(void)state;
	expect_error(text, NULL, IRR_EINPUT, 2, "--decimal-comma");
	irr_read_options_init(&o);
	o.decimal_comma = 1;
	s = read_text(text, &o);
	assert_int_equal(irr_spectrum_points(s), 3);
	assert_true(irr_spectrum_x(s)[0] == 4000.5);
	assert_true(irr_spectrum_y(s)[1] == 0.25);
	irr_spectrum_free(s);
	/* Blank-separated decimal commas. */
	s = read_text("4000,5 0,012\n3900,5 0,250\n", &o);
	assert_true(irr_spectrum_x(s)[1] == 3900.5 && irr_spectrum_y(s)[1] == 0.25);
	irr_spectrum_free(s);
	/* Comma-separated decimal commas cannot be told from four columns: the
	 * first two are read, with a warning that says what else it may be. */
	s = read_text("4000,5,0,012\n3900,5,0,250\n", NULL);
	assert_int_equal(irr_spectrum_warning_count(s), 1);
	assert_non_null(strstr(irr_spectrum_warning(s, 0), "--decimal-comma"));
	irr_spectrum_free(s);
	/* Without the option a blank-separated decimal comma is refused too. */
	expect_error("4000,5 0,012\n3900,5 0,250\n", NULL, IRR_EINPUT, 1, "decimal");
}

static void bad_csv(void **state)
{
	irr_read_options o;
	(void)state;
	expect_error("", NULL, IRR_EINPUT, -1, "empty");
	expect_error("wavenumber_cm-1,absorbance\n", NULL, IRR_EINPUT, -1, "no data points");
	expect_error("# only comments\n# here\n", NULL, IRR_EINPUT, -1, "no data points");
	expect_error("x,y\n1000,0.1\n1100,nan\n", NULL, IRR_EINPUT, 3, "NaN");
	expect_error("x,y\n1000,0.1\n-Infinity,0.2\n", NULL, IRR_EINPUT, 3, "infinity");
	expect_error("x,y\n1000,0.1\n1100,1e999\n", NULL, IRR_EINPUT, 3, "1e999");
	expect_error("x,y\n1000,0.1\n1100,0.2\n1050,0.3\n", NULL, IRR_EINPUT, 4, "monotonic");
	expect_error("x,y\n1000,0.1\n1000,0.2\n", NULL, IRR_EINPUT, 3, "monotonic");
	expect_error("x,y\n1000,0.1\n1100\n", NULL, IRR_EINPUT, 3, "two columns");
	expect_error("x,y\n1000,0.1\n1100,zero\n", NULL, IRR_EINPUT, 3, "zero");
	expect_error("x,y\n-1000,0.1\n-900,0.2\n", NULL, IRR_EINPUT, 2, "negative");
	expect_error("x,y\n1000,0.1\n", NULL, IRR_EINPUT, -1, "at least 2");
	expect_error("wavelength_nm,absorbance\n400,0.1\n500,0.2\n", NULL, IRR_EINPUT, 1, "nanometres");
	/* Binary garbage (with a NUL byte: given with its length). */
	{
		static const char bin[] = "x,y\n1000,0.1\n\x01\x02\x03\x00garbage\n";
		irr_spectrum *s = NULL;
		irr_error err;
		assert_int_equal(irr_spectrum_read_memory(&s, bin, sizeof bin - 1, "bin.csv", NULL, &err),
		                 IRR_EINPUT);
		assert_null(s);
		assert_int_equal(err.line, 3);
		assert_non_null(strstr(err.message, "binary"));
	}
	/* UTF-16 (what some Windows software calls "Unicode"). */
	{
		static const char u16[] = "\xff\xfe" "1\0" "0\0" ",\0" "1\0" "\n\0";
		irr_spectrum *s = NULL;
		irr_error err;
		assert_int_equal(irr_spectrum_read_memory(&s, u16, sizeof u16 - 1, "u16.csv", NULL, &err),
		                 IRR_EINPUT);
		assert_non_null(strstr(err.message, "UTF-16"));
	}
	/* NULs everywhere are binary data, not UTF-16. */
	{
		static const char zeros[64];
		irr_spectrum *s = NULL;
		irr_error err;
		assert_int_equal(irr_spectrum_read_memory(&s, zeros, sizeof zeros, "z.csv", NULL, &err),
		                 IRR_EINPUT);
		assert_non_null(strstr(err.message, "NUL"));
	}
	/* Limits. */
	irr_read_options_init(&o);
	o.max_points = 3;
	expect_error("1 1\n2 2\n3 3\n4 4\n", &o, IRR_ELIMIT, 4, "limit");
	o.max_points = 0;
	o.max_bytes = 10;
	expect_error("1 1\n2 2\n3 3\n4 4\n", &o, IRR_ELIMIT, -1, "limit");
}

static void reading_a_file_and_missing_files(void **state)
{
	char path[] = "/tmp/irrecon-test-csv-XXXXXX";
	static const char text[] = "wavenumber_cm-1,absorbance\n1000,0.1\n2000,0.2\n";
	irr_spectrum *s = NULL;
	irr_read_options o;
	irr_error err;
	int fd = mkstemp(path);
	(void)state;
	assert_true(fd >= 0);
	assert_int_equal(write(fd, text, sizeof text - 1), (ssize_t)(sizeof text - 1));
	close(fd);
	assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
	assert_string_equal(irr_spectrum_name(s), path);
	irr_spectrum_free(s);
	/* The size limit is checked before reading. */
	irr_read_options_init(&o);
	o.max_bytes = 20;
	assert_int_equal(irr_spectrum_read_file(&s, path, &o, &err), IRR_ELIMIT);
	assert_string_equal(err.file, path);
	unlink(path);
	assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_EIO);
	assert_null(s);
	assert_string_equal(err.file, path);
	irr_spectrum_free(NULL);
}

/* The library reads and writes numbers with '.', whatever locale the
 * embedding program chose (setlocale in a German desktop program). */
static void numbers_ignore_the_locale(void **state)
{
	irr_spectrum *s;
	char dir[512], cmd[2048], probe[16];
	const char *build = getenv("BUILD");
	(void)state;
	if (!setlocale(LC_ALL, "de_DE.UTF-8")) {
		/* Not installed: build it once into the build folder (glibc's
		 * localedef, found through LOCPATH), leaving the machine's
		 * locales alone. */
		snprintf(dir, sizeof dir, "%s/test-locale", build && *build ? build : "build");
		snprintf(cmd, sizeof cmd,
		         "[ -f %s/de_DE.UTF-8/LC_NUMERIC ] || { mkdir -p %s && "
		         "localedef -i de_DE -f UTF-8 %s/de_DE.UTF-8; } >/dev/null 2>&1",
		         dir, dir, dir);
		if (system(cmd) != -1) {
			setenv("LOCPATH", dir, 1);
			setlocale(LC_ALL, "de_DE.UTF-8");
		}
	}
	snprintf(probe, sizeof probe, "%.2f", 3.25);
	if (strcmp(probe, "3,25") != 0) {
		setlocale(LC_ALL, "C");
		print_message("skipped: no decimal-comma locale (de_DE.UTF-8) available\n");
		skip();
	}
	s = read_text("x,y\n1000.5,0.25\n2000.5,0.5\n", NULL);
	assert_true(irr_spectrum_x(s)[0] == 1000.5 && irr_spectrum_y(s)[0] == 0.25);
	irr_spectrum_free(s);
	expect_error("x,y\n1000.5,0.1\n900.25,0.2\n1100.75,0.3\n", NULL, IRR_EINPUT, 4,
	             "900.25 is followed by 1100.75");
	setlocale(LC_ALL, "C");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(shared_atr_files_decode),
		cmocka_unit_test(delimiters_and_headers),
		cmocka_unit_test(units_from_header_and_options),
		cmocka_unit_test(metadata_lines_before_the_data),
		cmocka_unit_test(decimal_commas_only_when_asked),
		cmocka_unit_test(bad_csv),
		cmocka_unit_test(reading_a_file_and_missing_files),
		cmocka_unit_test(numbers_ignore_the_locale),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
