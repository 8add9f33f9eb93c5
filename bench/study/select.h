/* select.h - the cheapest method and step (or tolerance) that meets an
 * accuracy requirement over a horizon: the search for one method, the
 * requirement it must meet, the ranking and the selection's JSON. */
#ifndef PB_SELECT_H
#define PB_SELECT_H

#include <jansson.h>
#include "bench/measure/case.h"

/* The most steps one case of the search may take (its budget). */
#define PB_SELECT_MAX_STEPS 2e7

/* Bounds in problem units (length, length/time); 0: not required. Several
 * may be given; a run meets the requirement when it meets every one, each
 * divided by 1 + margin. */
typedef struct pb_requirement {
    double max_pos_err;      /* largest |dr| */
    double max_vel_err;      /* largest |dv| */
    double max_radial, max_along, max_cross;  /* largest |dr| component in the true RIC frame */
    double max_energy_rel;   /* largest relative energy error */
    double max_angmom_rel;   /* largest relative angular-momentum error */
    double margin;           /* F >= 0 */
} pb_requirement;

/* What the selection keeps of a run (plain data: it crosses a pipe from the
 * worker process that searched). */
typedef struct pb_select_answer {
    long steps, evals;
    double pos_err_max, vel_err_max, radial_max, along_max, cross_max;
    double energy_rel_max, angmom_rel_max, truth_floor_max;
    int below_floor;
    double ns_per_step;
    double step_s;           /* fixed-step methods: the step (period / steps per orbit) */
    char fingerprint[40];
} pb_select_answer;

/* One method's search so far: every setting run and its outcome. Plain
 * data (it crosses a pipe to and from the worker that searches), so a
 * search stopped at a round's cost cap resumes where it stopped and makes
 * the same decisions, run for run, as one never stopped. */
#define PB_SELECT_MEMO 128
typedef struct pb_select_memo {
    int n, runs;               /* settings run; cases run (timing passes included) */
    double x[PB_SELECT_MEMO], q[PB_SELECT_MEMO];  /* fineness; requirement ratio */
    signed char ok[PB_SELECT_MEMO], usable[PB_SELECT_MEMO]; /* usable: q measures the error */
    signed char done[PB_SELECT_MEMO];  /* the run reached the horizon (status ok) */
    pb_select_answer ans[PB_SELECT_MEMO];  /* each run's figures, untimed */
    long steps_done[PB_SELECT_MEMO];       /* its steps and start-up steps */
    double timed_x;            /* the setting the answer's timing pass ran (0: none) */
} pb_select_memo;

typedef struct pb_selection {
    const pb_method_type *method;
    int index;               /* place in the list searched (ties rank in this order) */
    int found;               /* 1: a setting meets the requirement */
    int steps_per_orbit;     /* fixed-step answer */
    double tolerance;        /* adaptive answer */
    int runs;                /* cases run in the search */
    double order;            /* observed order (log error / log fineness) near the answer, NaN: none */
    pb_select_answer confirmed;  /* the confirming run (valid when found) */
    double projected_s;      /* evals x eval cost + steps x measured ns per step */
    const char *reason;      /* no answer: "not_met", "budget", "order_projection",
                              * "not_monotone", "costlier", "refused", "could_not_run" */
    int deferred;            /* 1: the search stopped at its round's cost cap (not final) */
    long est_evals;          /* the answer's evaluations estimated from below, from the
                              * finest failing setting coarser than every passing run
                              * (select_cost.c; 0: none) */
    char note[300];
    char command[768];       /* the `propbench run` that reproduces the answer */
} pb_selection;

/* 1 when res meets req (status ok and every given bound, divided by 1 +
 * margin, met). */
int pb_requirement_met(const pb_requirement *req, const pb_case_result *res);

/* The largest |radial|, |along-track| and |cross-track| position error over
 * res's metric samples (NaN when any is undefined). */
void pb_requirement_components(const pb_case_result *res, double *rad, double *alo, double *crs);

/* How far res is from meeting req: the largest ratio of a value to its
 * bound (divided by 1 + margin); <= 1 meets it, +inf when the run failed. */
double pb_requirement_ratio(const pb_requirement *req, const pb_case_result *res);

/* Search for method m on base (problem, horizon, eval cost). A coarse ladder
 * (doubling steps per orbit from 4, or tolerances 1e-3 .. 1e-14) that jumps
 * to the rung the observed order predicts and stops once that order projects
 * past the step budget; inside the bracketing rungs, the setting a secant in
 * log error against log fineness predicts, tested with its coarser
 * neighbour on the bisection grid (falling back to bisection when a
 * prediction misses twice); then confirmation: the answer and a 10% finer
 * neighbour must both pass, since errors need not be monotone in the step.
 * memo: the search so far (all zero to start one). cap_evals > 0: a setting
 * not yet run whose evaluations are forecast past it is not run; the search
 * stops there with out->deferred set, and a later call with the same memo
 * goes on from there. Returns 0, or -1 when a case could not be run. */
int pb_select_method(const pb_case_spec *base, const pb_method_type *m,
                     const pb_requirement *req, double cap_evals, pb_select_memo *memo,
                     pb_selection *out);
void pb_selection_free(pb_selection *s);

/* How pb_select_all searches: worker processes; prune_factor K >= 1: a
 * method whose answer is estimated (from its failing runs) to take more
 * than K times the evaluations of the answer with the fewest is not
 * searched to the end (reason "costlier"); 0 searches every method to its
 * answer. Evaluations, not projected seconds: those include measured time,
 * and which methods are pruned must not depend on the machine's load. */
typedef struct pb_select_plan {
    int jobs;
    double prune_factor;
} pb_select_plan;

/* The prune factor when none is given and every method is searched. */
#define PB_SELECT_PRUNE_DEFAULT 10.0

/* Search every method of list into sel[0..n): in rounds, the first with each
 * run's evaluations capped, so the cheap answers are known before any
 * method spends more than K times them; a method's search is done by one
 * worker process at a time, up to plan->jobs at once; the same answers
 * for every jobs. progress (may be NULL) is called as each method ends
 * with how many have. */
void pb_select_all(const pb_case_spec *base, const pb_requirement *req,
                   const pb_method_type *const *list, int n, const pb_select_plan *plan,
                   pb_selection *sel, void (*progress)(void *ctx, int done, const char *name),
                   void *ctx);

/* 1 when s was left before its answer: its estimate passed K x the fewest
 * evaluations of any answer (reason "costlier"). */
int pb_selection_pruned(const pb_selection *s);

/* Order sel: methods with an answer first, by projected cost when by_cost,
 * else by evaluations; ties and the rest in list order. */
void pb_selection_rank(pb_selection *sel, int n, int by_cost);

/* The selections as JSON, in the order given, with the prune factor the
 * search used (0: none); new reference. */
json_t *pb_selection_json(const pb_case_spec *base, const pb_requirement *req,
                          const pb_selection *sel, int n, int by_cost, double prune_factor);

#endif
