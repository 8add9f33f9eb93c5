/* problem_json.h - the definition of a problem that the catalogue cannot
 * rebuild by name (a problem-file case), for summary.json, so that a report
 * can state the orbit it ran. */
#ifndef PB_STORE_PROBLEM_JSON_H
#define PB_STORE_PROBLEM_JSON_H

#include <jansson.h>
#include "problems/problem.h"

/* {"description", "units", "mu", "body_radius", "forces", "r0", "v0",
 * "period", "t0", "epoch_days"} for p, or NULL when p is a built-in problem
 * of that name (the reader rebuilds it from the catalogue). */
json_t *pb_problem_def_json(const pb_problem *p);

#endif
