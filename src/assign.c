/* assign.c: exact minimum-cost assignment for the reconciler.
 *
 * The Hungarian method (Kuhn 1955, Munkres 1957) in its shortest augmenting
 * path form with row and column potentials (as in Jonker & Volgenant 1987,
 * without their initialisation heuristics): rows are added one at a time and
 * each is routed along a shortest alternating path found with Dijkstra's
 * method on reduced costs. O(n^2 m) time, O(m) extra memory besides the
 * result. Works on rectangular n x m matrices with n <= m. */
#include "assign.h"

#include <float.h>
#include <stdlib.h>

#include "irrecon/common.h"

int irr_assign__solve(const double *cost, size_t n, size_t m, int *row_to_col,
                      double *total)
{
	/* 1-based arrays as in the textbook statement; index 0 is the virtual
	 * column the new row starts from. */
	double *u = NULL, *v = NULL, *minv = NULL;
	size_t *p = NULL, *way = NULL;
	char *used = NULL;
	int rc = IRR_ENOMEM;
	if (n > m)
		return IRR_EINPUT;
	if (n == 0) {
		if (total)
			*total = 0.0;
		return IRR_OK;
	}
	u = calloc(n + 1, sizeof *u);
	v = calloc(m + 1, sizeof *v);
	minv = malloc((m + 1) * sizeof *minv);
	p = calloc(m + 1, sizeof *p);
	way = calloc(m + 1, sizeof *way);
	used = malloc(m + 1);
	if (!u || !v || !minv || !p || !way || !used)
		goto done;

	for (size_t i = 1; i <= n; i++) {
		size_t j0 = 0;
		p[0] = i;
		for (size_t j = 0; j <= m; j++) {
			minv[j] = DBL_MAX;
			used[j] = 0;
		}
		do {
			size_t i0 = p[j0], j1 = 0;
			double delta = DBL_MAX;
			const double *row = cost + (i0 - 1) * m;
			used[j0] = 1;
			for (size_t j = 1; j <= m; j++) {
				if (used[j])
					continue;
				double cur = row[j - 1] - u[i0] - v[j];
				if (cur < minv[j]) {
					minv[j] = cur;
					way[j] = j0;
				}
				if (minv[j] < delta) {
					delta = minv[j];
					j1 = j;
				}
			}
			for (size_t j = 0; j <= m; j++) {
				if (used[j]) {
					u[p[j]] += delta;
					v[j] -= delta;
				} else {
					minv[j] -= delta;
				}
			}
			j0 = j1;
		} while (p[j0] != 0);
		/* Flip the alternating path back to the start. */
		do {
			size_t j1 = way[j0];
			p[j0] = p[j1];
			j0 = j1;
		} while (j0 != 0);
	}
	for (size_t j = 1; j <= m; j++)
		if (p[j])
			row_to_col[p[j] - 1] = (int)(j - 1);
	if (total) {
		double t = 0.0;
		for (size_t i = 0; i < n; i++)
			t += cost[i * m + (size_t)row_to_col[i]];
		*total = t;
	}
	rc = IRR_OK;
done:
	free(u);
	free(v);
	free(minv);
	free(p);
	free(way);
	free(used);
	return rc;
}
