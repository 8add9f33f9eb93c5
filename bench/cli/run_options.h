/* run_options.h - the options that describe one case, shared by run, select
 * and sweep: parsing (getopt_long) and turning them into a pb_case_spec. */
#ifndef PB_RUN_OPTIONS_H
#define PB_RUN_OPTIONS_H

#include <stdio.h>
#include "bench/measure/case.h"

typedef struct pb_run_options {
    const char *problem, *problem_file, *case_name, *method, *out;
    long steps_per_orbit;
    double step, tolerance, orbits, horizon_s, eval_cost_us;
    long repeats, samples, max_steps;
    int compensated, quiet;
    int have_steps, have_step, have_tol, have_orbits, have_horizon;
    const char *ephemeris_out, *truth_out; /* run: OEM files of the states */
    int series_states;                     /* run: states in the series CSV */
    int formulation;                       /* -1: the problem's own */
} pb_run_options;

/* Parse argv. Returns -1 to go on, or an exit status to return at once
 * (0 after --help, 2 after an error, which it has printed). */
int pb_run_options_parse(const char *verb, int argc, char **argv, pb_run_options *o,
                         void (*help)(FILE *));
void pb_run_options_help(FILE *f);

/* Build the case; prints the error and returns -1 on bad input. */
int pb_run_options_spec(const char *verb, const pb_run_options *o, pb_case_spec *spec);

#endif
