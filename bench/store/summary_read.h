/* summary_read.h - summary.json read back and checked, next to its writer
 * (case_json.c): the keys every finished case carries, and the JSON document
 * checks that summaries and baselines share. */
#ifndef PB_SUMMARY_READ_H
#define PB_SUMMARY_READ_H

#include <stddef.h>
#include <jansson.h>

/* Keys every finished case (any status but "crashed") carries, as
 * pb_case_to_json writes them; NULL-terminated. The accuracy metrics (larger
 * is worse, numbers or null), the growth classes (strings) and the counts
 * (integers). The gate compares exactly these. */
extern const char *const pb_summary_metric_keys[];
extern const char *const pb_summary_class_keys[];
extern const char *const pb_summary_count_keys[];

/* Read a JSON document (duplicate keys refused). NULL with a message naming
 * path in err: cannot open (errno's words), a folder, corrupt JSON (line and
 * column). Owner: the caller. */
json_t *pb_json_doc_read(const char *path, char *err, size_t errlen);

/* 0 when d's integer "format" is want; -1 with a message naming path and
 * what ("run summary", "baseline") when it is missing, older or newer. */
int pb_json_doc_format_ok(const char *path, const json_t *d, int want, const char *what,
                          char *err, size_t errlen);

/* The --methods/--problems filters of the verbs that read a run: 1 when
 * name is an item of the comma-separated list (a NULL list takes any name,
 * a NULL name none). */
int pb_summary_listed(const char *list, const char *name);
/* The first item of list that no case of cases has as its string field key
 * ("method", "problem"), with its length in *len; NULL when every item
 * names one. */
const char *pb_summary_list_unmatched(const json_t *cases, const char *list, const char *key,
                                      size_t *len);

/* Counts (steps, evaluations) above this are refused: 2^62 is far beyond
 * any run, and the difference of two such counts fits a long long. */
#define PB_SUMMARY_COUNT_MAX (1LL << 62)

/* Why the metrics m (numbers >= 0, or null) or counts n (integers in
 * 0..PB_SUMMARY_COUNT_MAX, or null) are bad; NULL if fine. */
const char *pb_summary_numbers_bad(const json_t *m, const json_t *n);

/* The first compared key missing from metrics m or counts n (group is set
 * to mname or nname, whichever holds it), or NULL. */
const char *pb_summary_key_missing(const json_t *m, const json_t *n, const char **group,
                                   const char *mname, const char *nname);

/* Why case c is not a case (no string id, no string status, an id already
 * in seen); NULL if fine. Adds nothing to seen. */
const char *pb_summary_case_why(const json_t *c, const json_t *seen);

/* One case's own checks, after pb_doc_cases_check has made sure it is an
 * object with a new string id and a string status. 0, or -1 with the
 * message (naming path and the case) in err. */
typedef int (*pb_case_check_fn)(const char *path, size_t i, const json_t *c, void *ctx,
                                char *err, size_t errlen);

/* Walk d's "cases" array (which must be one): each case must pass
 * pb_summary_case_why, then check. Stops at the first failure. 0, or -1
 * with the message in err. Shared by run summaries and baselines. */
int pb_doc_cases_check(const char *path, const json_t *d, pb_case_check_fn check, void *ctx,
                       char *err, size_t errlen);

/* Why a case's "scales" (or a baseline's "scale") object is bad: each of
 * "length" and "speed" must be a positive finite number (the gate's floor
 * unit; 0 would remove the floor). 0, or -1 with text naming key in why. */
int pb_summary_scales_ok(const json_t *c, const char *key, char *why, size_t len);

/* Read and validate a run's summary.json (format 1) into *out (caller owns).
 * 0, or -1 with a message naming path in err. */
int pb_summary_load(const char *path, json_t **out, char *err, size_t errlen);

/* Whether every finished case of a loaded summary has every key the
 * comparison reads (metrics, growth classes, counts, fingerprint, scales).
 * For baseline, check, merge and report, which must not skip a value
 * silently. 0, or -1 with a message naming path, the case id and the key. */
int pb_summary_complete(const char *path, const json_t *doc, char *err, size_t errlen);

#endif
