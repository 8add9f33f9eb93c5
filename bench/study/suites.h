/* suites.h - named sweeps (quick, standard) and grids from the command line,
 * expanded into a list of case specs in a fixed, deterministic order. */
#ifndef PB_SUITES_H
#define PB_SUITES_H

#include <stdio.h>
#include "bench/measure/case.h"
#include "bench/measure/harness.h"  /* pb_case_spec_default */

typedef struct pb_case_list {
    int n, cap;
    pb_case_spec *cases;  /* owned */
} pb_case_list;

/* Expand the named suite into list (appending). -1 if the name is unknown. */
int pb_suite_expand(const char *name, pb_case_list *list);

/* Sweeps and suites ask for 50 plot points a case. They lie on the fixed
 * 100-point metric grid (sampler.h), so a sweep's case adds no sample time
 * and is run's case to the bit; the number stays part of the sweep identity,
 * which is why it is not changed to 100. */
#define PB_SWEEP_LINEAR_SAMPLES 50

/* Append one spec; -1 when out of memory. */
int pb_case_list_add(pb_case_list *list, const pb_case_spec *spec);
void pb_case_list_free(pb_case_list *list);

/* The suites and what they hold, for `list suites`. */
void pb_suites_print(FILE *f);

#endif
