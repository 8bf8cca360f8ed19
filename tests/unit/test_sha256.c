/* test_sha256.c: the two compression paths of src/sha256.c (x86 SHA
 * extensions, portable FIPS 180-4 code) give the same digests.
 * Sources: the SHA-256 examples of FIPS 180-2, Appendix B ("abc", the
 * 448-bit two-block message), run on each path; GNU coreutils sha256sum
 * (Debian package coreutils) as an independent implementation for a
 * 1 MiB pseudo-random buffer. Buffers of every length 0..300 cover each
 * padding case (FIPS 180-4, 5.1.1: the length field in the same block or
 * spilling into the next) and lengths around the 64-byte block. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "irrecon/sha256.h"
#include "sha256_impl.h"

/* xorshift64 (G. Marsaglia, J. Stat. Softw. 8 (2003) 14): repeatable bytes. */
static void fill_random(unsigned char *p, size_t n, uint64_t seed)
{
	uint64_t x = seed;
	for (size_t i = 0; i < n; i++) {
		x ^= x << 13;
		x ^= x >> 7;
		x ^= x << 17;
		p[i] = (unsigned char)(x >> 24);
	}
}

/* Digest of p in pieces of `step` bytes (0: one piece). */
static void digest(const unsigned char *p, size_t n, size_t step, int portable, char hex[65])
{
	irr_sha256 s;
	unsigned char dg[32];
	irr_sha256__force_portable(portable);
	irr_sha256_init(&s);
	if (step == 0)
		step = n ? n : 1;
	for (size_t i = 0; i < n; i += step)
		irr_sha256_update(&s, p + i, n - i < step ? n - i : step);
	irr_sha256_final(&s, dg);
	irr_sha256_hex(dg, hex);
	irr_sha256__force_portable(0);
}

static void fips_examples_on_both_paths(void **state)
{
	char hex[65];
	const char *two = "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq";
	(void)state;
	for (int portable = 0; portable <= 1; portable++) {
		/* FIPS 180-2, Appendix B.1 */
		digest((const unsigned char *)"abc", 3, 0, portable, hex);
		assert_string_equal(hex, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
		/* FIPS 180-2, Appendix B.2 */
		digest((const unsigned char *)two, strlen(two), 0, portable, hex);
		assert_string_equal(hex, "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
	}
}

static void fast_and_portable_agree(void **state)
{
	unsigned char buf[300];
	char a[65], b[65];
	(void)state;
	if (!irr_sha256__fast_available())
		skip(); /* this processor has no SHA extensions: only one path exists */
	for (size_t n = 0; n <= sizeof buf; n++) {
		fill_random(buf, n, 0x9e3779b97f4a7c15ULL + n);
		digest(buf, n, 0, 1, a);
		digest(buf, n, 0, 0, b);
		assert_string_equal(a, b);
		/* Uneven pieces: partial blocks carried between updates. */
		digest(buf, n, 7, 0, b);
		assert_string_equal(a, b);
	}
}

static void large_buffer_matches_sha256sum(void **state)
{
	size_t n = (1u << 20) + 37;
	unsigned char *buf = malloc(n);
	char a[65], b[65], ref[65] = "", path[] = "/tmp/irrecon-sha256-XXXXXX", cmd[128];
	FILE *f;
	int fd;
	(void)state;
	assert_non_null(buf);
	fill_random(buf, n, 12345);
	digest(buf, n, 0, 1, a);
	digest(buf, n, 0, 0, b);
	assert_string_equal(a, b);
	digest(buf, n, 4099, 0, b);
	assert_string_equal(a, b);
	fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, buf, n), (ssize_t)n);
	close(fd);
	free(buf);
	snprintf(cmd, sizeof cmd, "sha256sum %s 2>/dev/null", path);
	f = popen(cmd, "r");
	if (f) {
		if (fscanf(f, "%64s", ref) != 1)
			ref[0] = '\0';
		pclose(f);
	}
	unlink(path);
	if (strlen(ref) != 64)
		skip(); /* coreutils sha256sum not available */
	assert_string_equal(a, ref);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(fips_examples_on_both_paths),
		cmocka_unit_test(fast_and_portable_agree),
		cmocka_unit_test(large_buffer_matches_sha256sum),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
