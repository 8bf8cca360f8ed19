/* assign.h: library-internal minimum-cost assignment (used by reconcile.c
 * and tested by tests/unit/test_assign.c). Not installed. */
#ifndef IRRECON_ASSIGN_H
#define IRRECON_ASSIGN_H

#include <stddef.h>

/* Cost of a pair that must never be chosen. Each row must have at least one
 * allowed column (the reconciler adds a "missing" column per row). */
#define IRR_ASSIGN_FORBIDDEN 1e12

/* Minimum-cost assignment of n rows to distinct columns of an n x m cost
 * matrix (row-major, n <= m). Writes the chosen column of each row to
 * row_to_col[n] and the total cost to *total (may be NULL). Returns 0, or
 * IRR_ENOMEM, or IRR_EINPUT when n > m. */
int irr_assign__solve(const double *cost, size_t n, size_t m, int *row_to_col,
                      double *total);

#endif
