/* require.h - absolute requirements on a run (`check --require
 * 'pos_err_max_m<=10'`): what a mission states, checked case by case with
 * or without a baseline, as rows of the same report as the comparison. */
#ifndef PB_REQUIRE_H
#define PB_REQUIRE_H

#include <stddef.h>
#include <jansson.h>
#include "bench/gate/compare.h"

/* The quantities a requirement may name (NULL-terminated): sizes that are
 * never negative, from a case's "metrics" or its "cost" counts. */
extern const char *const pb_require_names[];

/* Parse "METRIC OP VALUE" (OP one of <=, <, >=, >; spaces allowed around
 * it) into the next of o's requirements; 0, or -1 with a message in err
 * (unknown metric, listing the known ones; no operator; a value that is not
 * a finite number; too many requirements). */
int pb_require_parse(pb_check_options *o, const char *arg, char *err, size_t errlen);

/* Check every case of summary (a run's summary.json) whose method and
 * problem pass o->methods and o->problems against each requirement, adding
 * one row per case and requirement to r (verdict ok or UNMET; a value that
 * is not a number is unmet, except a position error below the reference's
 * floor, which meets any upper bound). Then the rows are grouped by case in
 * the order cases first appear. 0; -1 when out of memory; 1 with a message
 * in err when a name of o->methods or o->problems matches no case. */
int pb_require_check(const json_t *summary, const pb_check_options *o, pb_check_report *r,
                     char *err, size_t errlen);

#endif
