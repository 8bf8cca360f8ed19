/* bench_read.c: times the input half of a check on given files (SHA-256 of
 * the bytes, reading, normalising, peak picking), and with --dump prints
 * everything those stages produce at full precision, so that a speed change
 * can be shown to leave the results as they were (diff two dumps).
 *
 *   cc -O2 -std=c11 -D_GNU_SOURCE -Iinclude -Isrc tools/bench_read.c \
 *      build/libirrecon.a $(pkg-config --libs openbabel-3 libcjson) -lstdc++ -lm \
 *      -o build/bench_read
 *   build/bench_read N FILE...        N rounds over the files, microseconds per stage
 *   build/bench_read --dump FILE...   digests, spectrum, warnings and peaks
 *
 * Under `valgrind --tool=callgrind` the instruction counts are repeatable on
 * a busy machine, unlike the times. Valgrind has no AVX-512 (and SHA-256
 * takes its portable path there), so it counts the SSE2/AVX paths of the
 * filter and the picker; the times show the AVX-512 paths where the
 * processor has them. The dump is the same either way. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "irrecon.h"
#include "irrecon/sha256.h"

static char *slurp(const char *path, size_t *len)
{
	FILE *f = fopen(path, "rb");
	char *buf = NULL;
	size_t cap = 0, n = 0;
	if (!f)
		return NULL;
	for (;;) {
		if (n == cap) {
			cap = cap ? 2 * cap : 1 << 16;
			char *nb = realloc(buf, cap);
			if (!nb) {
				free(buf);
				fclose(f);
				return NULL;
			}
			buf = nb;
		}
		size_t got = fread(buf + n, 1, cap - n, f);
		if (got == 0)
			break;
		n += got;
	}
	fclose(f);
	*len = n;
	return buf;
}

static double now_us(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return ts.tv_sec * 1e6 + ts.tv_nsec / 1e3;
}

static void fail(const char *what, irr_error *err)
{
	char msg[2200];
	irr_error_format(err, msg, sizeof msg);
	fprintf(stderr, "bench_read: %s: %s\n", what, msg);
	exit(2);
}

static void dump_error(const char *stage, irr_error *err)
{
	char msg[2200];
	irr_error_format(err, msg, sizeof msg);
	printf("%s error: %s\n", stage, msg);
}

static void dump(const char *path)
{
	irr_spectrum *s;
	irr_peaklist *pl;
	irr_error err;
	size_t len;
	char hex[65];
	char *data = slurp(path, &len);
	if (!data) {
		fprintf(stderr, "bench_read: cannot read %s\n", path);
		exit(2);
	}
	irr_error_clear(&err);
	irr_sha256_data_hex(data, len, hex);
	printf("file %s\nsha256 %s\n", path, hex);
	if (irr_spectrum_read_memory(&s, data, len, path, NULL, &err) != IRR_OK) {
		dump_error("read", &err);
		free(data);
		return;
	}
	size_t n = irr_spectrum_points(s);
	irr_sha256_data_hex(irr_spectrum_x(s), n * sizeof(double), hex);
	printf("read points %zu units %s x %s", n, irr_yunits_name(irr_spectrum_y_units(s)), hex);
	irr_sha256_data_hex(irr_spectrum_y(s), n * sizeof(double), hex);
	printf(" y %s first %.17g last %.17g\n", hex, irr_spectrum_first_x(s),
	       irr_spectrum_last_x(s));
	if (irr_spectrum_normalise(s, &err) != IRR_OK) {
		dump_error("normalise", &err);
		goto out;
	}
	n = irr_spectrum_points(s);
	irr_sha256_data_hex(irr_spectrum_x(s), n * sizeof(double), hex);
	printf("normalised points %zu x %s", n, hex);
	irr_sha256_data_hex(irr_spectrum_y(s), n * sizeof(double), hex);
	printf(" y %s\n", hex);
	for (size_t i = 0; i < irr_spectrum_warning_count(s); i++)
		printf("warning %s\n", irr_spectrum_warning(s, i));
	for (size_t i = 0; i < irr_spectrum_saturated_count(s); i++) {
		double lo, hi;
		irr_spectrum_saturated_range(s, i, &lo, &hi);
		printf("saturated %.17g %.17g\n", lo, hi);
	}
	if (irr_peaks_pick(&pl, s, NULL, &err) != IRR_OK) {
		dump_error("peaks", &err);
		goto out;
	}
	printf("noise %.17g smoothing %.17g\n", irr_peaklist_noise(pl), irr_peaklist_smoothing(pl));
	for (size_t i = 0; i < irr_peaklist_count(pl); i++) {
		const irr_peak *p = irr_peaklist_get(pl, i);
		printf("peak %.17g h %.17g rel %.17g prom %.17g a %.17g w %.17g lo %.17g hi %.17g"
		       " i %d b %d s %d sat %d\n",
		       p->position, p->height, p->rel_height, p->prominence, p->area, p->fwhm,
		       p->low, p->high, (int)p->intensity, p->broad, p->shoulder, p->saturated);
	}
	irr_peaklist_free(pl);
out:
	irr_spectrum_free(s);
	free(data);
}

int main(int argc, char **argv)
{
	if (argc >= 3 && strcmp(argv[1], "--dump") == 0) {
		for (int i = 2; i < argc; i++)
			dump(argv[i]);
		return 0;
	}
	if (argc < 3) {
		fprintf(stderr, "usage: bench_read N FILE... | bench_read --dump FILE...\n");
		return 2;
	}
	long rounds = strtol(argv[1], NULL, 10);
	int nf = argc - 2;
	char **data = calloc((size_t)nf, sizeof *data);
	size_t *len = calloc((size_t)nf, sizeof *len);
	double t_sha = 0, t_read = 0, t_norm = 0, t_pick = 0;
	long count = 0;
	for (int i = 0; i < nf; i++)
		if (!(data[i] = slurp(argv[i + 2], &len[i]))) {
			fprintf(stderr, "bench_read: cannot read %s\n", argv[i + 2]);
			return 2;
		}
	for (long r = 0; r < rounds; r++)
		for (int i = 0; i < nf; i++) {
			irr_spectrum *s;
			irr_peaklist *pl;
			irr_error err;
			char hex[65];
			irr_error_clear(&err);
			double t0 = now_us();
			irr_sha256_data_hex(data[i], len[i], hex);
			double t1 = now_us();
			if (irr_spectrum_read_memory(&s, data[i], len[i], argv[i + 2], NULL, &err) != IRR_OK)
				fail(argv[i + 2], &err);
			double t2 = now_us();
			if (irr_spectrum_normalise(s, &err) != IRR_OK)
				fail(argv[i + 2], &err);
			double t3 = now_us();
			if (irr_peaks_pick(&pl, s, NULL, &err) != IRR_OK)
				fail(argv[i + 2], &err);
			double t4 = now_us();
			t_sha += t1 - t0, t_read += t2 - t1, t_norm += t3 - t2, t_pick += t4 - t3;
			count++;
			irr_peaklist_free(pl);
			irr_spectrum_free(s);
		}
	printf("%ld spectra: microseconds each: sha256 %.1f  read %.1f  normalise %.1f  peaks %.1f"
	       "  total %.1f  (%.0f spectra/s)\n",
	       count, t_sha / count, t_read / count, t_norm / count, t_pick / count,
	       (t_sha + t_read + t_norm + t_pick) / count,
	       count * 1e6 / (t_sha + t_read + t_norm + t_pick));
	for (int i = 0; i < nf; i++)
		free(data[i]);
	free(data);
	free(len);
	return 0;
}
