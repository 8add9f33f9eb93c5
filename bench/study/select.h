/* select.h - the cheapest method and step (or tolerance) that meets an
 * accuracy requirement over a horizon. */
#ifndef PB_SELECT_H
#define PB_SELECT_H

#include <jansson.h>
#include "bench/measure/case.h"

/* The most steps one case of the search may take (its budget). */
#define PB_SELECT_MAX_STEPS 2e7

typedef struct pb_requirement {
    double max_pos_err;     /* problem length units; 0: not required */
    double max_energy_rel;  /* 0: not required */
} pb_requirement;

typedef struct pb_selection {
    const pb_method_type *method;
    int found;               /* 1: a setting meets the requirement */
    int steps_per_orbit;     /* fixed-step answer */
    double tolerance;        /* adaptive answer */
    int runs;                /* cases run in the search */
    pb_case_result confirmed;  /* the confirming run (owned; valid when found) */
    double projected_s;      /* evals x eval cost + steps x measured ns per step */
    char note[160];
    char command[768];       /* the `propbench run` that reproduces the answer */
} pb_selection;

/* 1 when res meets req (status ok and every given bound met). */
int pb_requirement_met(const pb_requirement *req, const pb_case_result *res);

/* Search for method m on base (problem, horizon, eval cost): a coarse sweep
 * (doubling steps per orbit from 4, or tolerances 1e-3 .. 1e-14), then
 * bisection in log space between the last failing and first passing setting,
 * then confirmation: the answer and a 10% finer neighbour (step or
 * tolerance) must both pass,
 * since errors need not be monotone in the step. */
int pb_select_method(const pb_case_spec *base, const pb_method_type *m,
                     const pb_requirement *req, pb_selection *out);
void pb_selection_free(pb_selection *s);

/* The selections as JSON (ranked by evaluations); new reference. */
json_t *pb_selection_json(const pb_case_spec *base, const pb_requirement *req,
                          pb_selection *sel, int n);

#endif
