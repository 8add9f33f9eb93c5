/* select_state.h - internal to select: one method's search as its parts
 * share it (the axis of settings, the memo, the round's cap), and the cost
 * model that forecasts a run's evaluations and estimates an answer's. */
#ifndef PB_SELECT_STATE_H
#define PB_SELECT_STATE_H

#include "bench/measure/case.h"

/* select.h's types, by their tags: this header is included by select.c */
struct pb_requirement;
struct pb_selection;
struct pb_select_memo;

/* The search's axis: fineness x grows as the setting gets more accurate and
 * more costly. Fixed-step methods: x is the (whole) number of steps per
 * orbit; adaptive ones: x = 1/tolerance. */
typedef struct select_axis {
    int fixed;
    double first, grow, last;   /* coarse ladder: first, first*grow, ... <= last */
    double close;               /* bisection stops once hi <= close * lo */
    double jump;                /* past a non-monotone dip: next try at jump * neighbour */
} select_axis;

/* One method's search: its settings run so far and their outcomes. */
typedef struct select_state {
    const pb_case_spec *base;
    const pb_method_type *m;
    const select_axis *ax;
    const struct pb_requirement *req;
    struct pb_selection *out;
    struct pb_select_memo *mm;        /* the runs so far (out->confirmed holds mm->timed_x's) */
    double cap;                /* evaluations a new run may be forecast to take (0: any) */
} select_state;

/* The evaluations a run at x not yet made will take, from the runs so far
 * (0 before any); with lowest (fixed-step methods), at the fewest
 * evaluations a step any run showed (0: none showed it). */
double pb_select_forecast(const select_state *st, double x, int lowest);

/* The answer's evaluations estimated from below, from the finest failing
 * setting coarser than every passing run (0: none); not a bound. */
long pb_select_estimate(const select_state *st);

#endif
