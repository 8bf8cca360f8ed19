/* test_assign.c: the minimum-cost assignment (src/assign.c) against an
 * independent reference: exhaustive enumeration of every injective map of
 * rows to columns (brute force) on small random matrices, square and
 * rectangular, with and without forbidden pairs. Sources: the definition of
 * the linear assignment problem (Kuhn 1955; Munkres 1957); the 3 x 3 case
 * below is worked by hand. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <cmocka.h>

#include "assign.h"
#include "irrecon/common.h"

static double brute_best;

static void brute(const double *c, size_t n, size_t m, size_t row, int *used, double acc)
{
	if (row == n) {
		if (acc < brute_best)
			brute_best = acc;
		return;
	}
	for (size_t j = 0; j < m; j++) {
		if (used[j])
			continue;
		used[j] = 1;
		brute(c, n, m, row + 1, used, acc + c[row * m + j]);
		used[j] = 0;
	}
}

/* Small deterministic generator (xorshift32) so failures reproduce. */
static uint32_t rng_state = 2463534242u;
static uint32_t rnd(void)
{
	rng_state ^= rng_state << 13;
	rng_state ^= rng_state >> 17;
	rng_state ^= rng_state << 5;
	return rng_state;
}

static void hand_worked_3x3(void **state)
{
	(void)state;
	/* Rows pick columns 1, 0, 2 for 1 + 2 + 2 = 5; every other
	 * permutation costs more (all six summed by hand below). */
	const double c[9] = {4, 1, 3,
	                     2, 0, 5,
	                     3, 2, 2};
	/* permutations: (0,1,2)=4+0+2=6 (0,2,1)=4+5+2=11 (1,0,2)=1+2+2=5
	 * (1,2,0)=1+5+3=9 (2,0,1)=3+2+2=7 (2,1,0)=3+0+3=6 */
	int r[3];
	double t;
	assert_int_equal(irr_assign__solve(c, 3, 3, r, &t), IRR_OK);
	assert_int_equal(r[0], 1);
	assert_int_equal(r[1], 0);
	assert_int_equal(r[2], 2);
	assert_true(t == 5.0);
}

static void check_random(size_t n, size_t m, int with_forbidden, int integer)
{
	double c[8 * 10];
	int r[8], used[10] = {0};
	double t;
	for (size_t i = 0; i < n; i++)
		for (size_t j = 0; j < m; j++) {
			double v = integer ? (double)(rnd() % 10) : (double)(rnd() % 100000) / 997.0;
			if (with_forbidden && rnd() % 3 == 0 && j != i) /* column i stays allowed */
				v = IRR_ASSIGN_FORBIDDEN;
			c[i * m + j] = v;
		}
	brute_best = 1e300;
	brute(c, n, m, 0, used, 0.0);
	assert_int_equal(irr_assign__solve(c, n, m, r, &t), IRR_OK);
	/* distinct columns */
	for (size_t i = 0; i < n; i++)
		for (size_t k = i + 1; k < n; k++)
			assert_int_not_equal(r[i], r[k]);
	assert_true(t <= brute_best + 1e-9 * (1.0 + brute_best));
	assert_true(t >= brute_best - 1e-9 * (1.0 + brute_best));
}

static void random_against_brute_force(void **state)
{
	(void)state;
	for (int rep = 0; rep < 300; rep++) {
		size_t n = 1 + rnd() % 6;
		size_t m = n + rnd() % (9 - n);
		check_random(n, m, 0, rep % 2);
		check_random(n, m, 1, rep % 2);
	}
}

static void ties_and_degenerate(void **state)
{
	(void)state;
	double zeros[16] = {0};
	int r[4];
	double t = -1;
	assert_int_equal(irr_assign__solve(zeros, 4, 4, r, &t), IRR_OK);
	assert_true(t == 0.0);
	assert_int_equal(irr_assign__solve(zeros, 0, 4, r, &t), IRR_OK);
	assert_int_equal(irr_assign__solve(zeros, 4, 3, r, &t), IRR_EINPUT);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(hand_worked_3x3),
		cmocka_unit_test(random_against_brute_force),
		cmocka_unit_test(ties_and_degenerate),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
