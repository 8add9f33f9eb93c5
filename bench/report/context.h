/* context.h - what a reader needs around the tables: each problem's
 * definition (built-in problems rebuilt from the catalogue), the run's
 * command, tool, machine and build, the select answers found beside the
 * run, and the summary page's recommendations (cheapest plain-ok case per
 * error level, growth classes per method). */
#ifndef PB_REPORT_CONTEXT_H
#define PB_REPORT_CONTEXT_H

#include <stddef.h>
#include "bench/report/report_data.h"

#define PB_KV_MAX 24

typedef struct pb_report_kv {
    char key[48];
    char val[512];
} pb_report_kv;

/* The definition of problem p as key/value lines: description, units,
 * constants, force terms, elements, state, period, epoch, the run's horizon
 * and the reference's floor. Returns how many lines (at most max). */
int pb_report_problem_def(const pb_report_run *run, const pb_report_problem *p,
                          pb_report_kv *kv, int max);

/* The run: command(s), tool version, machine, compiler and flags. */
int pb_report_run_facts(const pb_report_run *run, const char *title, pb_report_kv *kv, int max);

/* A select answer for one problem (select-<problem>.json beside the run's
 * summary or in the run folder). found = 0 when there is none. */
typedef struct pb_report_select {
    int found;
    double max_pos_err;           /* the requirement; NaN when not given */
    char answer[400];             /* "yoshida6-tt n=84: 58800 evaluations, error 9.47e-07" */
} pb_report_select;

void pb_report_select_find(const char *run_dir, const char *problem, pb_report_select *out);

/* The error levels the summary page asks about, in p's length unit
 * (1 km, 1 m, 1 mm for km problems; 1e-2, 1e-5, 1e-8 DU otherwise). */
#define PB_REPORT_NLEVELS 3
void pb_report_levels(const pb_report_problem *p, double lv[PB_REPORT_NLEVELS], const char *names[PB_REPORT_NLEVELS]);

/* Index into run->cases of the plain-ok case of p with the fewest
 * evaluations whose largest position error is at most level; -1 if none. */
int pb_report_cheapest(const pb_report_run *run, const pb_report_problem *p, double level);

/* 1 when the named method's map is the named built-in problem's exact
 * flow (pb_method_exact_on: a Kepler-flow splitting map on a pure two-body
 * problem), so that its error is round-off whatever its step and the
 * standard suite runs it at one step; the summaries say so beside it. */
int pb_report_exact_by_construction(const char *method, const char *problem);

/* Per method slot m of p: the case whose growth classes represent it (its
 * finest plain-ok case, else its finest finished one); -1 if none. */
int pb_report_growth_case(const pb_report_run *run, const pb_report_problem *p, int m);

#endif
