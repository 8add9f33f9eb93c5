/* table.h - the per-problem summary table shared by the HTML and
 * Markdown writers: its columns, cell text, and which cell is best. */
#ifndef PB_REPORT_TABLE_H
#define PB_REPORT_TABLE_H

#include <stddef.h>
#include "bench/report/report_data.h"

enum { PB_RT_METHOD, PB_RT_SETTING, PB_RT_STATUS, PB_RT_ENERGY, PB_RT_POS, PB_RT_POS_M,
       PB_RT_GROWTH, PB_RT_EVALS, PB_RT_CPU, PB_RT_NS, PB_RT_NCOLS };

#define PB_RT_CELL 96
#define PB_RT_STATUS_CELL PB_RT_CELL

/* Mark best[i] = 1 for every i whose v[i] equals the smallest finite value
 * among the rows with ok[i] (ties all marked); others 0. Returns how many
 * were marked (0 when no row qualifies). */
int pb_report_best(const double *v, const int *ok, int n, int *best);

/* Mark front[i] = 1 for every row with ok[i] that no other ok row beats on
 * both: cost no higher and error lower, or cost lower and error no higher
 * (the work-precision front: cost at accuracy). Returns how many. */
int pb_report_front(const double *cost, const double *err, const int *ok, int n, int *front);

/* 1 when column col is shown for problem p (metres only where lengths are km). */
int pb_report_table_shown(int col, const pb_report_problem *p);

/* Column heading; the position column names the problem's length unit. */
void pb_report_table_heading(int col, const pb_report_problem *p, char *buf, size_t len);

/* Cells of one case (plain text; writers escape them). */
void pb_report_table_cells(const pb_report_case *c, char cells[PB_RT_NCOLS][PB_RT_CELL]);

/* best[r * PB_RT_NCOLS + col] for the n cases of problem p, among cases
 * that ended plain "ok" (pb_report_case_plain_ok) only: lowest energy and
 * position error, and on evaluations and CPU time the cases on the front of
 * cost against position error. No mark on growth or time per step alone.
 * Caller frees; NULL on out of memory. */
int *pb_report_table_best(const pb_report_run *run, const pb_report_problem *p);

/* The sentence under each table saying what the marks mean. */
extern const char pb_report_table_marks[];

#endif
