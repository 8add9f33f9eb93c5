/* case_json.h - a case (settings, metrics, cost, fingerprint) as a JSON object,
 * and the summary.json document around a list of them (format 1). */
#ifndef PB_CASE_JSON_H
#define PB_CASE_JSON_H

#include <jansson.h>
#include "bench/measure/case.h"
#include "propbench/propbench.h"

/* summary.json's "tool": "propbench " PB_VERSION */
#define PB_TOOL_NAME "propbench " PB_VERSION

#define PB_SUMMARY_FORMAT 1

/* New reference: the case object with the fixed keys of DESIGN.md. */
json_t *pb_case_to_json(const pb_case_spec *spec, const pb_case_result *res);

/* A case that could not be run to an outcome (worker died): status "crashed". */
json_t *pb_case_crashed_json(const pb_case_spec *spec, const char *why);

/* New reference: {"format", "tool", "machine", "build", "cases": cases}.
 * Steals the reference to cases. */
json_t *pb_summary_new(json_t *cases);

/* A number, or null when it is not finite (JSON has no NaN). */
json_t *pb_json_real(double x);

#endif
