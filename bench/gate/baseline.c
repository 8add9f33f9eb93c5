/* baseline.c - the baseline document (our own format, see baseline.h): made
 * from a run's summary.json, read back and checked. Values are copied as
 * jansson reals, which round-trip exactly, so a baseline compares equal to
 * the run it was made from bit for bit. */
#include <stdio.h>
#include <string.h>
#include "bench/gate/baseline.h"
#include "bench/store/summary_read.h"

/* kept for people reading the baseline; not compared */
static const char *const baseline_info[] = {"growth_exponent_energy", "growth_exponent_pos",
                                            "below_reference_floor", NULL};
static const char *const baseline_timing[] = {"ns_per_step", "ns_per_eval", "calib_ns",
                                              "step_kernel_ratio", NULL};
const char *const pb_baseline_settings[] = {"problem", "method", "steps_per_orbit", "step",
                                           "tolerance", "orbits", "horizon_s", "compensated",
                                           "formulation", NULL};

/* Why a baseline case is bad (settings, metrics, counts, fingerprint, a
 * finished case's compared keys, its scale); 0, or -1 with the message. */
static int baseline_case_ok(const char *path, size_t i, const json_t *c, void *unused,
                            char *err, size_t errlen)
{
    (void)unused;
    const char *id = json_string_value(json_object_get(c, "id"));
    const char *why = NULL;
    if (!json_is_object(json_object_get(c, "metrics")) ||
        !json_is_object(json_object_get(c, "counts")) ||
        !json_is_object(json_object_get(c, "settings")) ||
        !json_is_string(json_object_get(c, "fingerprint")))
        why = "lacks 'settings', 'metrics', 'counts' or 'fingerprint'";
    if (!why)
        why = pb_summary_numbers_bad(json_object_get(c, "metrics"), json_object_get(c, "counts"));
    if (why) {
        snprintf(err, errlen, "%s: corrupt: cases[%zu] (%s) %s", path, i, id, why);
        return -1;
    }
    const char *group = NULL, *key = NULL;
    if (strcmp(json_string_value(json_object_get(c, "status")), "crashed"))
        key = pb_summary_key_missing(json_object_get(c, "metrics"), json_object_get(c, "counts"),
                                     &group, "metrics", "counts");
    if (key) {
        snprintf(err, errlen, "%s: case %s: key '%s' missing from '%s' (every '%s' case has it)",
                 path, id, key, group, json_string_value(json_object_get(c, "status")));
        return -1;
    }
    char sw[160];
    if (pb_summary_scales_ok(c, "scale", sw, sizeof sw)) {
        snprintf(err, errlen, "%s: case %s: %s", path, id, sw);
        return -1;
    }
    return 0;
}

int pb_baseline_load(const char *path, json_t **out, char *err, size_t errlen)
{
    *out = NULL;
    json_t *d = pb_json_doc_read(path, err, errlen);
    if (!d)
        return -1;
    const char *kind = json_string_value(json_object_get(d, "kind"));
    if (!json_is_object(d) || !kind || strcmp(kind, PB_BASELINE_KIND)) {
        snprintf(err, errlen, "%s: not a propbench baseline (no \"kind\": \"%s\"); "
                 "make one with 'propbench baseline RUN_DIR --out FILE'", path, PB_BASELINE_KIND);
        json_decref(d);
        return -1;
    }
    if (pb_json_doc_format_ok(path, d, PB_BASELINE_FORMAT, "baseline", err, errlen) ||
        pb_doc_cases_check(path, d, baseline_case_ok, NULL, err, errlen)) {
        json_decref(d);
        return -1;
    }
    /* a gate that compares nothing would pass every run */
    if (json_array_size(json_object_get(d, "cases")) == 0) {
        snprintf(err, errlen, "%s has no cases: nothing to compare", path);
        json_decref(d);
        return -1;
    }
    *out = d;
    return 0;
}

static void baseline_copy_keys(json_t *dst, const json_t *src, const char *const *keys)
{
    for (const char *const *k = keys; *k; k++) {
        json_t *v = json_object_get(src, *k);
        if (v)
            json_object_set_new(dst, *k, json_deep_copy(v));
    }
}

json_t *pb_baseline_from_summary(const json_t *summary)
{
    json_t *b = json_object();
    json_object_set_new(b, "format", json_integer(PB_BASELINE_FORMAT));
    json_object_set_new(b, "kind", json_string(PB_BASELINE_KIND));
    static const char *const top[] = {"tool", "sweep", "machine", "build", "calibration", NULL};
    baseline_copy_keys(b, summary, top);
    json_t *cases = json_array();
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(summary, "cases"), i, c) {
        json_t *o = json_object(), *st = json_object(), *m = json_object(), *n = json_object(),
               *t = json_object();
        json_t *cm = json_object_get(c, "metrics"), *cc = json_object_get(c, "cost");
        const char *fp = json_string_value(json_object_get(c, "fingerprint"));
        json_object_set_new(o, "id", json_deep_copy(json_object_get(c, "id")));
        json_object_set_new(o, "status", json_deep_copy(json_object_get(c, "status")));
        baseline_copy_keys(st, c, pb_baseline_settings);
        json_object_set_new(o, "settings", st);
        /* the floor of positions and velocities scales with the orbit: the
         * case's own |r0| and |v0|, whatever problem (built-in or file) it is */
        json_object_set_new(o, "scale", json_deep_copy(json_object_get(c, "scales")));
        baseline_copy_keys(m, cm, pb_summary_metric_keys);
        baseline_copy_keys(m, cm, pb_summary_class_keys);
        baseline_copy_keys(m, cm, baseline_info);
        json_object_set_new(o, "metrics", m);
        baseline_copy_keys(n, cc, pb_summary_count_keys);
        json_object_set_new(o, "counts", n);
        baseline_copy_keys(t, cc, baseline_timing);
        json_object_set_new(o, "timing", t);
        json_object_set_new(o, "fingerprint", json_string(fp ? fp : ""));
        json_array_append_new(cases, o);
    }
    json_object_set_new(b, "cases", cases);
    return b;
}
