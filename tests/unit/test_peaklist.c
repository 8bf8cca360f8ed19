/* test_peaklist.c: reading peak lists (src/peaklist.c), CSV/TSV and JSON,
 * good and bad.
 *
 * Sources: the lists under tests/data/peaks/ hold polystyrene band positions
 * as stated in ../shared/ir-reference/README.md (698, 757, 1452, 1493,
 * 1601, 2923, 3025 cm-1), heights and widths picked by irrecon from
 * ../shared/ir-reference/polystyrene-film.jdx, and the European
 * Pharmacopoeia 2.2.24 polystyrene reference positions (3060.0, 2849.5,
 * 1942.9, 1601.2, 1583.0, 1154.5, 1028.3 cm-1). The expected values are
 * what those files say; the class thresholds are those documented in
 * include/irrecon/peaks.h (strong >= 0.33, medium >= 0.10 of the strongest;
 * common practice, our choice). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "irrecon/peaks.h"

#define DATA "tests/data/peaks/"

static irr_peaklist *read_ok(const char *file)
{
	irr_peaklist *pl = NULL;
	irr_error err;
	irr_error_clear(&err);
	if (irr_peaklist_read_file(&pl, file, &err) != IRR_OK)
		fprintf(stderr, "%s:%ld: %s\n", err.file, err.line, err.message);
	assert_non_null(pl);
	return pl;
}

static void read_bad(const char *file, long line, const char *words)
{
	irr_peaklist *pl = NULL;
	irr_error err;
	irr_error_clear(&err);
	assert_int_equal(irr_peaklist_read_file(&pl, file, &err), IRR_EINPUT);
	assert_null(pl);
	if (err.line != line || !strstr(err.message, words))
		fprintf(stderr, "%s: got line %ld '%s'\n", file, err.line, err.message);
	assert_string_equal(err.file, file);
	assert_int_equal(err.line, line);
	assert_non_null(strstr(err.message, words));
	assert_null(strchr(err.message, '\n'));
}

static void csv_with_classes_header_and_range(void **state)
{
	(void)state;
	irr_peaklist *pl = read_ok(DATA "polystyrene-classes.csv");
	double lo, hi;
	assert_int_equal(irr_peaklist_count(pl), 7);
	irr_peaklist_range(pl, &lo, &hi);
	assert_true(lo == 450.0 && hi == 4000.0);
	/* Highest wavenumber first. */
	assert_true(irr_peaklist_get(pl, 0)->position == 3025.0);
	assert_true(irr_peaklist_get(pl, 6)->position == 698.0);
	assert_int_equal(irr_peaklist_get(pl, 6)->intensity, IRR_INT_STRONG);
	assert_int_equal(irr_peaklist_get(pl, 2)->intensity, IRR_INT_MEDIUM); /* 1601,m */
	/* Width given: FWHM and extent; broad from the default 75 cm-1. */
	assert_true(irr_peaklist_get(pl, 1)->fwhm == 36.0);
	assert_true(fabs(irr_peaklist_get(pl, 1)->low - 2905.0) < 1e-9);
	assert_false(irr_peaklist_get(pl, 1)->broad);
	assert_true(irr_peaklist_get(pl, 0)->fwhm == 0.0);
	assert_true(irr_peaklist_noise(pl) == 0.0);
	assert_int_equal(irr_peaklist_saturated_count(pl), 0);
	irr_peaklist_free(pl);
}

static void tsv_with_numeric_heights(void **state)
{
	(void)state;
	irr_peaklist *pl = read_ok(DATA "polystyrene-heights.tsv");
	double lo, hi;
	assert_int_equal(irr_peaklist_count(pl), 6);
	irr_peaklist_range(pl, &lo, &hi);
	assert_true(lo == 400.0 && hi == 4000.0); /* default, peaks.h */
	/* Relative to the strongest, 698 at 0.465: 1493 0.146 -> 0.314 medium;
	 * 1601 0.056 -> 0.120 medium; 757 0.108 -> 0.232 medium. */
	for (size_t i = 0; i < irr_peaklist_count(pl); i++) {
		const irr_peak *p = irr_peaklist_get(pl, i);
		if (p->position == 698.0) {
			assert_int_equal(p->intensity, IRR_INT_STRONG);
			assert_true(fabs(p->rel_height - 1.0) < 1e-12);
		}
		if (p->position == 1493.0) {
			assert_int_equal(p->intensity, IRR_INT_MEDIUM);
			assert_true(fabs(p->rel_height - 0.146 / 0.465) < 1e-12);
		}
		if (p->position == 1601.0)
			assert_int_equal(p->intensity, IRR_INT_MEDIUM);
	}
	irr_peaklist_free(pl);
}

static void json_object_and_array(void **state)
{
	(void)state;
	irr_peaklist *pl = read_ok(DATA "polystyrene.json");
	double lo, hi;
	assert_int_equal(irr_peaklist_count(pl), 4);
	irr_peaklist_range(pl, &lo, &hi);
	assert_true(lo == 450.0 && hi == 4000.0);
	assert_true(irr_peaklist_get(pl, 0)->position == 3025.0);
	assert_int_equal(irr_peaklist_get(pl, 0)->intensity, IRR_INT_MEDIUM);
	assert_true(irr_peaklist_get(pl, 0)->fwhm == 15.0);
	assert_int_equal(irr_peaklist_get(pl, 3)->intensity, IRR_INT_STRONG); /* 698 "s" */
	/* A bare number has no intensity: unknown (IRR_INT_NONE), peaks.h. */
	assert_int_equal(irr_peaklist_get(pl, 2)->intensity, IRR_INT_NONE);
	irr_peaklist_free(pl);

	pl = read_ok(DATA "ep-polystyrene-array.json");
	assert_int_equal(irr_peaklist_count(pl), 7);
	assert_true(irr_peaklist_get(pl, 0)->position == 3060.0);
	assert_true(irr_peaklist_get(pl, 6)->position == 1028.3);
	irr_peaklist_free(pl);
}

static void from_memory_and_round_trip_forms(void **state)
{
	(void)state;
	irr_peaklist *pl = NULL;
	irr_error err;
	/* Semicolons and blanks as separators, CRLF, a "range" line, class
	 * spellings, irrecon's own JSON output shape. */
	const char *a = "range;450;4000\r\n1601;vs\r\n1493;W\r\n";
	const char *b = "1601 strong 11\n1493 0.5\n";
	const char *c = "{\"schema\":\"irrecon.peaks/1\",\"spectrum\":{\"measured_range\":[450,4000],"
	                "\"saturated_ranges\":[[690,700]]},\"peaks\":[{\"position\":1601,\"height\":0.056,"
	                "\"fwhm\":11.4,\"intensity\":\"medium\",\"shoulder\":false,\"saturated\":false},"
	                "{\"position\":695,\"height\":0,\"intensity\":\"strong\",\"saturated\":true,"
	                "\"low\":690,\"high\":700}]}";
	assert_int_equal(irr_peaklist_read_memory(&pl, a, strlen(a), "a", &err), IRR_OK);
	assert_int_equal(irr_peaklist_get(pl, 0)->intensity, IRR_INT_STRONG);
	assert_int_equal(irr_peaklist_get(pl, 1)->intensity, IRR_INT_WEAK);
	irr_peaklist_free(pl);
	assert_int_equal(irr_peaklist_read_memory(&pl, b, strlen(b), "b", &err), IRR_OK);
	assert_int_equal(irr_peaklist_count(pl), 2);
	assert_true(irr_peaklist_get(pl, 0)->fwhm == 11.0);
	irr_peaklist_free(pl);
	assert_int_equal(irr_peaklist_read_memory(&pl, c, strlen(c), "c", &err), IRR_OK);
	assert_int_equal(irr_peaklist_count(pl), 2);
	assert_int_equal(irr_peaklist_saturated_count(pl), 1);
	assert_true(irr_peaklist_get(pl, 1)->saturated);
	assert_true(irr_peaklist_get(pl, 1)->low == 690.0);
	irr_peaklist_free(pl);
}

static void transmittance_column_becomes_absorbance(void **state)
{
	(void)state;
	/* A = -log10 T (Beer-Lambert; definition): 10 %T -> 1, 50 %T -> 0.301. */
	const char *a = "cm-1,%T\n1601,50\n1493,10\n";
	const char *b = "wavenumber;transmittance\n1601;0.5\n1493;0.1\n";
	const char *bad = "cm-1,%T\n1601,120\n";
	irr_peaklist *pl = NULL;
	irr_error err;
	for (int k = 0; k < 2; k++) {
		const char *t = k ? b : a;
		assert_int_equal(irr_peaklist_read_memory(&pl, t, strlen(t), "t", &err), IRR_OK);
		assert_true(fabs(irr_peaklist_get(pl, 0)->height - 0.30103) < 1e-5);
		assert_true(fabs(irr_peaklist_get(pl, 1)->height - 1.0) < 1e-12);
		assert_int_equal(irr_peaklist_get(pl, 1)->intensity, IRR_INT_STRONG);
		irr_peaklist_free(pl);
	}
	assert_int_equal(irr_peaklist_read_memory(&pl, bad, strlen(bad), "bad", &err), IRR_EINPUT);
	assert_int_equal(err.line, 2);
}

static void bad_lists_name_file_and_line(void **state)
{
	(void)state;
	read_bad(DATA "bad-number.csv", 3, "not a number");
	read_bad(DATA "bad-outside-range.csv", 3, "outside the stated range");
	read_bad(DATA "bad-fields.csv", 1, "more than 3 fields");
	read_bad(DATA "bad-empty.csv", 0, "empty");
	read_bad(DATA "bad-no-position.json", 3, "position");
	read_bad(DATA "bad-truncated.json", 2, "JSON");
	read_bad(DATA "bad-intensity-class.json", 4, "not a class");
	read_bad(DATA "bad-negative.csv", 1, "negative");
}

static void bad_memory_inputs(void **state)
{
	(void)state;
	irr_peaklist *pl = NULL;
	irr_error err;
	static const char bin[] = "1601,m\n\0\x01\x02garbage";
	assert_int_equal(irr_peaklist_read_memory(&pl, bin, sizeof bin, "bin", &err), IRR_EINPUT);
	assert_int_equal(err.line, 2);
	assert_null(pl);
	assert_int_equal(irr_peaklist_read_memory(&pl, "", 0, "empty", &err), IRR_EINPUT);
	assert_int_equal(irr_peaklist_read_memory(&pl, "1601,nan\n", 9, "nan", &err), IRR_EINPUT);
	assert_int_equal(irr_peaklist_read_memory(&pl, "inf\n", 4, "inf", &err), IRR_EINPUT);
	/* 0.0025 is a wavelength in cm, not a wavenumber. */
	assert_int_equal(irr_peaklist_read_memory(&pl, "0.0025\n", 7, "w", &err), IRR_EINPUT);
	assert_int_equal(irr_peaklist_read_memory(&pl, "[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[1]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]",
	                                          74, "deep", &err), IRR_EINPUT);
	assert_int_equal(irr_peaklist_read_memory(&pl, "{\"range\":[4000],\"peaks\":[1601]}", 31, "r", &err),
	                 IRR_EINPUT);
	/* The documented limit (peaks.h): 10,000 peaks. */
	{
		size_t cap = 10001 * 8 + 1, len = 0;
		char *big = malloc(cap);
		assert_non_null(big);
		for (int k = 0; k < 10001; k++)
			len += (size_t)snprintf(big + len, cap - len, "%d.5\n", 1000 + k % 2000);
		/* Without the last line (7 bytes): exactly the limit. */
		assert_int_equal(irr_peaklist_read_memory(&pl, big, len - 7, "10000", &err), IRR_OK);
		assert_int_equal(irr_peaklist_count(pl), 10000);
		irr_peaklist_free(pl);
		assert_int_equal(irr_peaklist_read_memory(&pl, big, len, "10001", &err), IRR_ELIMIT);
		assert_int_equal(err.line, 10001);
		assert_non_null(strstr(err.message, "limit"));
		free(big);
	}
	assert_int_equal(irr_peaklist_read_file(&pl, DATA "does-not-exist.csv", &err), IRR_EIO);
	assert_null(pl);
	irr_peaklist_free(NULL);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(csv_with_classes_header_and_range),
		cmocka_unit_test(tsv_with_numeric_heights),
		cmocka_unit_test(json_object_and_array),
		cmocka_unit_test(from_memory_and_round_trip_forms),
		cmocka_unit_test(transmittance_column_becomes_absorbance),
		cmocka_unit_test(bad_lists_name_file_and_line),
		cmocka_unit_test(bad_memory_inputs),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
