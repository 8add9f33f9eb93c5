/* table.h - the per-problem summary table shared by the HTML and
 * Markdown writers: its columns, cell text, and which cell is best. */
#ifndef PB_REPORT_TABLE_H
#define PB_REPORT_TABLE_H

#include <stddef.h>
#include "bench/report/report_data.h"

enum { PB_RT_METHOD, PB_RT_SETTING, PB_RT_STATUS, PB_RT_ENERGY, PB_RT_POS, PB_RT_GROWTH,
       PB_RT_EVALS, PB_RT_NS, PB_RT_NCOLS };

#define PB_RT_CELL 64

/* Mark best[i] = 1 for every i whose v[i] equals the smallest finite value
 * among the rows with ok[i] (ties all marked); others 0. Returns how many
 * were marked (0 when no row qualifies). */
int pb_report_best(const double *v, const int *ok, int n, int *best);

/* Column heading; the position column names the problem's length unit. */
void pb_report_table_heading(int col, const pb_report_problem *p, char *buf, size_t len);

/* Cells of one case (plain text; writers escape them). */
void pb_report_table_cells(const pb_report_case *c, char cells[PB_RT_NCOLS][PB_RT_CELL]);

/* best[r * PB_RT_NCOLS + col] for the n cases of problem p: lowest energy
 * and position error, growth exponent nearest 0, fewest evaluations and
 * least ns per step, among cases with status "ok". Caller frees; NULL on
 * out of memory. */
int *pb_report_table_best(const pb_report_run *run, const pb_report_problem *p);

#endif
