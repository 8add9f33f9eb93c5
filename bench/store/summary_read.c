/* summary_read.c - summary.json read back and checked (see summary_read.h).
 * A value skipped here would silently drop out of a comparison, so a
 * finished case must carry every compared key. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include "bench/store/summary_read.h"
#include "bench/store/case_json.h"
#include "problems/files.h"

const char *const pb_summary_metric_keys[] = {
    "energy_rel_max", "energy_rel_final", "angmom_rel_max", "angmom_rel_final",
    "pos_err_max", "pos_err_final", "vel_err_max", "vel_err_final", "ecc_drift_max", NULL};
const char *const pb_summary_class_keys[] = {"growth_class_energy", "growth_class_pos", NULL};
const char *const pb_summary_count_keys[] = {"steps", "evals", "rejected", "startup_steps", NULL};

json_t *pb_json_doc_read(const char *path, char *err, size_t errlen)
{
    const char *why;
    FILE *f = pb_open_input(path, "rb", &why);
    if (!f) {
        snprintf(err, errlen, "%s: cannot open: %s", path, why);
        return NULL;
    }
    json_error_t e;
    json_t *d = json_loadf(f, JSON_REJECT_DUPLICATES, &e);
    fclose(f);
    if (!d)
        snprintf(err, errlen, "%s: corrupt or truncated JSON (line %d, column %d): %s", path,
                 e.line, e.column, e.text);
    return d;
}

/* "format" must be our version; a larger one was written by a newer propbench. */
int pb_json_doc_format_ok(const char *path, const json_t *d, int want, const char *what,
                          char *err, size_t errlen)
{
    json_t *f = json_object_get(d, "format");
    if (!json_is_integer(f)) {
        snprintf(err, errlen, "%s: not a %s: no integer key 'format'", path, what);
        return -1;
    }
    json_int_t v = json_integer_value(f);
    if (v > want) {
        snprintf(err, errlen, "%s: %s format %lld is newer than this propbench reads (%d); "
                 "use a newer propbench or regenerate the file", path, what, (long long)v, want);
        return -1;
    }
    if (v != want) {
        snprintf(err, errlen, "%s: unsupported %s format %lld (this propbench reads %d)", path,
                 what, (long long)v, want);
        return -1;
    }
    return 0;
}

const char *pb_summary_numbers_bad(const json_t *m, const json_t *n)
{
    for (const char *const *k = pb_summary_metric_keys; *k; k++) {
        json_t *v = json_object_get(m, *k);
        if (v && !json_is_number(v) && !json_is_null(v))
            return "has a metric that is not a number";
        /* every metric is a size (an error, a drift): a negative one was
         * compared as a regression against itself */
        if (v && json_is_number(v) && !(json_number_value(v) >= 0))
            return "has a negative metric";
    }
    for (const char *const *k = pb_summary_count_keys; *k; k++) {
        json_t *v = json_object_get(n, *k);
        if (v && !json_is_integer(v) && !json_is_null(v)) /* null: not known (score) */
            return "has a count that is not an integer";
        /* counts are differenced in a comparison: a bound keeps that
         * difference within a long long (-9223372036854775807 overflowed it) */
        if (v && json_is_integer(v) &&
            (json_integer_value(v) < 0 || json_integer_value(v) > PB_SUMMARY_COUNT_MAX))
            return "has a count that is negative or above 2^62";
    }
    return NULL;
}

/* pb_case_to_json writes every metric (null when not finite or not
 * meaningful), both growth classes, the counts and the fingerprint whatever
 * the status (ok, diverged, max_steps); a crashed case has only its settings. */
const char *pb_summary_key_missing(const json_t *m, const json_t *n, const char **group,
                                   const char *mname, const char *nname)
{
    *group = mname;
    for (const char *const *k = pb_summary_metric_keys; *k; k++)
        if (!json_object_get(m, *k))
            return *k;
    for (const char *const *k = pb_summary_class_keys; *k; k++)
        if (!json_is_string(json_object_get(m, *k)))
            return *k;
    *group = nname;
    for (const char *const *k = pb_summary_count_keys; *k; k++)
        if (!json_object_get(n, *k))
            return *k;
    return NULL;
}

const char *pb_summary_case_why(const json_t *c, const json_t *seen)
{
    const char *id = json_string_value(json_object_get(c, "id"));
    if (!json_is_object(c) || !id)
        return "has no string 'id'";
    if (!json_is_string(json_object_get(c, "status")))
        return "has no string 'status'";
    if (json_object_get(seen, id))
        return "repeats an id";
    return NULL;
}

int pb_summary_scales_ok(const json_t *c, const char *key, char *why, size_t len)
{
    const json_t *sc = json_object_get(c, key);
    if (!json_is_object(sc)) {
        snprintf(why, len, "key '%s' missing", key);
        return -1;
    }
    static const char *const keys[] = {"length", "speed"};
    for (int i = 0; i < 2; i++) {
        const json_t *v = json_object_get(sc, keys[i]);
        if (!json_is_number(v) || !isfinite(json_number_value(v)) || json_number_value(v) <= 0) {
            char got[48] = "missing";
            if (json_is_number(v))
                snprintf(got, sizeof got, "%g", json_number_value(v));
            snprintf(why, len, "key '%s.%s' must be a positive finite number, got %s", key,
                     keys[i], got);
            return -1;
        }
    }
    return 0;
}

/* The first compared key a finished summary case lacks, or NULL. */
static const char *summary_key_missing(const json_t *c, const char **group)
{
    const char *key = pb_summary_key_missing(json_object_get(c, "metrics"),
                                             json_object_get(c, "cost"), group, "metrics", "cost");
    if (key)
        return key;
    *group = NULL;
    if (!json_is_string(json_object_get(c, "fingerprint")))
        return "fingerprint";
    if (!json_object_get(c, "scales"))
        return "scales";
    return NULL;
}

int pb_doc_cases_check(const char *path, const json_t *d, pb_case_check_fn check, void *ctx,
                       char *err, size_t errlen)
{
    json_t *cs = json_object_get(d, "cases");
    if (!json_is_array(cs)) {
        snprintf(err, errlen, "%s: corrupt: no array 'cases'", path);
        return -1;
    }
    json_t *seen = json_object();
    size_t i;
    json_t *c;
    int rc = 0;
    json_array_foreach(cs, i, c) {
        const char *why = pb_summary_case_why(c, seen);
        if (why) {
            const char *id = json_string_value(json_object_get(c, "id"));
            snprintf(err, errlen, "%s: corrupt: cases[%zu]%s%s%s %s", path, i, id ? " (" : "",
                     id ? id : "", id ? ")" : "", why);
            rc = -1;
            break;
        }
        if ((rc = check(path, i, c, ctx, err, errlen)))
            break;
        json_object_set_new(seen, json_string_value(json_object_get(c, "id")), json_true());
    }
    json_decref(seen);
    return rc;
}

/* A summary case: numbers where numbers belong; with *complete, every
 * finished case with every compared key. */
static int summary_case_ok(const char *path, size_t i, const json_t *c, void *complete_p,
                           char *err, size_t errlen)
{
    int complete = *(const int *)complete_p;
    const char *id = json_string_value(json_object_get(c, "id"));
    const char *why = NULL;
    int finished = strcmp(json_string_value(json_object_get(c, "status")), "crashed") != 0;
    if (finished) {
        json_t *m = json_object_get(c, "metrics"), *n = json_object_get(c, "cost");
        why = (!json_is_object(m) || !json_is_object(n)) ? "lacks the objects 'metrics' or 'cost'"
                                                         : pb_summary_numbers_bad(m, n);
    }
    if (why) {
        snprintf(err, errlen, "%s: corrupt: cases[%zu] (%s) %s", path, i, id, why);
        return -1;
    }
    const char *group = NULL, *key = finished && complete ? summary_key_missing(c, &group) : NULL;
    if (key) {
        snprintf(err, errlen, "%s: case %s: key '%s' missing%s%s%s (every '%s' case has it)",
                 path, id, key, group ? " from '" : "", group ? group : "", group ? "'" : "",
                 json_string_value(json_object_get(c, "status")));
        return -1;
    }
    char sw[160];
    if (finished && complete && pb_summary_scales_ok(c, "scales", sw, sizeof sw)) {
        snprintf(err, errlen, "%s: case %s: %s", path, id, sw);
        return -1;
    }
    return 0;
}

static int summary_cases_ok(const char *path, const json_t *d, int complete, char *err,
                            size_t errlen)
{
    return pb_doc_cases_check(path, d, summary_case_ok, &complete, err, errlen);
}

int pb_summary_complete(const char *path, const json_t *doc, char *err, size_t errlen)
{
    return summary_cases_ok(path, doc, 1, err, errlen);
}

int pb_summary_load(const char *path, json_t **out, char *err, size_t errlen)
{
    *out = NULL;
    json_t *d = pb_json_doc_read(path, err, errlen);
    if (!d)
        return -1;
    if (!json_is_object(d)) {
        snprintf(err, errlen, "%s: not a run summary (not a JSON object)", path);
        json_decref(d);
        return -1;
    }
    if (pb_json_doc_format_ok(path, d, PB_SUMMARY_FORMAT, "run summary", err, errlen) ||
        summary_cases_ok(path, d, 0, err, errlen)) {
        json_decref(d);
        return -1;
    }
    *out = d;
    return 0;
}

int pb_summary_listed(const char *list, const char *name)
{
    if (!list)
        return 1;
    if (!name)
        return 0;
    size_t n = strlen(name);
    for (const char *p = list; *p;) {
        size_t len = strcspn(p, ",");
        if (len == n && !strncmp(p, name, n))
            return 1;
        p += len + (p[len] == ',');
    }
    return 0;
}

const char *pb_summary_list_unmatched(const json_t *cases, const char *list, const char *key,
                                      size_t *len)
{
    for (const char *p = list; p && *p;) {
        size_t n = strcspn(p, ","), i;
        const json_t *c;
        int found = 0;
        json_array_foreach(cases, i, c) {
            const char *v = json_string_value(json_object_get(c, key));
            found |= v && strlen(v) == n && !strncmp(v, p, n);
        }
        if (!found) {
            *len = n;
            return p;
        }
        p += n + (p[n] == ',');
    }
    return NULL;
}

