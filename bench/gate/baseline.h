/* baseline.h - the regression baseline (our own format: "format": 1,
 * "kind": "propbench-baseline") made from a run's summary.json: each case's
 * settings, status, accuracy metrics, counts, timing, fingerprint and scale.
 * The comparison against it is in compare.h. */
#ifndef PB_BASELINE_H
#define PB_BASELINE_H

#include <stddef.h>
#include <jansson.h>

#define PB_BASELINE_FORMAT 1
#define PB_BASELINE_KIND "propbench-baseline"

/* The settings a baseline case keeps (NULL-terminated); any change of one
 * is a regression. */
extern const char *const pb_baseline_settings[];

/* New reference: the baseline document of a loaded summary (each case's
 * settings, status, accuracy metrics, counts, timing, fingerprint and
 * scale; the summary's machine and build). NULL when out of memory. */
json_t *pb_baseline_from_summary(const json_t *summary);

/* Read and validate a baseline file into *out (caller owns). 0, or -1 with a
 * message naming path in err: unreadable, corrupt or truncated JSON, not a
 * baseline, a format newer than this build understands, malformed cases, no
 * cases at all (a gate that compares nothing would pass any run). */
int pb_baseline_load(const char *path, json_t **out, char *err, size_t errlen);

#endif
