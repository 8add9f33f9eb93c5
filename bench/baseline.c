/* baseline.c - baseline documents and the regression comparison (see
 * baseline.h for the rules). Values are copied from summary.json as jansson
 * reals, which round-trip exactly, so a baseline compares equal to the run
 * it was made from bit for bit. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include "baseline.h"
#include "../problems/catalogue.h"

const char *const pb_check_metrics[] = {
    "energy_rel_max", "energy_rel_final", "angmom_rel_max", "angmom_rel_final",
    "pos_err_max", "pos_err_final", "vel_err_max", "vel_err_final", "ecc_drift_max", NULL};
static const char *const baseline_classes[] = {"growth_class_energy", "growth_class_pos", NULL};
/* kept for people reading the baseline; not compared */
static const char *const baseline_info[] = {"growth_exponent_energy", "growth_exponent_pos",
                                            "below_reference_floor", NULL};
static const char *const baseline_counts[] = {"steps", "evals", "rejected", "startup_steps", NULL};
static const char *const baseline_timing[] = {"ns_per_step", "ns_per_eval", NULL};
static const char *const baseline_settings[] = {"problem", "method", "steps_per_orbit", "step",
                                                "tolerance", "orbits", "horizon_s", "compensated",
                                                NULL};

/* ---- loading and validation ------------------------------------------ */

static json_t *baseline_read(const char *path, char *err, size_t errlen)
{
    FILE *f = fopen(path, "rb");
    if (!f) {
        snprintf(err, errlen, "%s: cannot open: %s", path, strerror(errno));
        return NULL;
    }
    struct stat st;
    if (!fstat(fileno(f), &st) && S_ISDIR(st.st_mode)) {
        fclose(f);
        snprintf(err, errlen, "%s: is a folder, not a JSON file", path);
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
static int baseline_format_ok(const char *path, const json_t *d, int want, const char *what,
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

/* Why the metrics (numbers or null) or counts (integers) are bad; NULL if fine. */
static const char *baseline_numbers_bad(const json_t *m, const json_t *n)
{
    for (const char *const *k = pb_check_metrics; *k; k++) {
        json_t *v = json_object_get(m, *k);
        if (v && !json_is_number(v) && !json_is_null(v))
            return "has a metric that is not a number";
    }
    for (const char *const *k = baseline_counts; *k; k++) {
        json_t *v = json_object_get(n, *k);
        if (v && !json_is_integer(v))
            return "has a count that is not an integer";
    }
    return NULL;
}

/* The compared key missing from a finished case (any status but "crashed"),
 * or NULL. pb_case_to_json writes every metric (null when not finite or not
 * meaningful), both growth classes, the counts and the fingerprint whatever
 * the status (ok, diverged, max_steps); a crashed case has only its
 * settings. A key skipped here would silently drop out of the comparison. */
static const char *baseline_key_missing(const json_t *m, const json_t *n, const char **group,
                                        const char *mname, const char *nname)
{
    *group = mname;
    for (const char *const *k = pb_check_metrics; *k; k++)
        if (!json_object_get(m, *k))
            return *k;
    for (const char *const *k = baseline_classes; *k; k++)
        if (!json_is_string(json_object_get(m, *k)))
            return *k;
    *group = nname;
    for (const char *const *k = baseline_counts; *k; k++)
        if (!json_object_get(n, *k))
            return *k;
    return NULL;
}

/* A baseline case's "scale" (the floor's unit) must hold a finite positive
 * length and speed: 0 would remove the floor, a missing one silently
 * tighten it. 0, or -1 with "key ..." text in why. */
static int baseline_scale_ok(const json_t *c, char *why, size_t len)
{
    const json_t *sc = json_object_get(c, "scale");
    if (!json_is_object(sc)) {
        snprintf(why, len, "key 'scale' missing");
        return -1;
    }
    static const char *const keys[] = {"length", "speed"};
    for (int i = 0; i < 2; i++) {
        const json_t *v = json_object_get(sc, keys[i]);
        if (!json_is_number(v) || !isfinite(json_number_value(v)) || json_number_value(v) <= 0) {
            char got[48] = "missing";
            if (json_is_number(v))
                snprintf(got, sizeof got, "%g", json_number_value(v));
            snprintf(why, len, "key 'scale.%s' must be a positive finite number, got %s", keys[i],
                     got);
            return -1;
        }
    }
    return 0;
}

/* What the cases of a document are checked for. */
enum { CASES_SUMMARY = 0, CASES_BASELINE = 1, CASES_SUMMARY_COMPLETE = 2 };

/* Every case an object with a unique string id and a string status; in a
 * baseline, or a summary checked for completeness, every finished case with
 * all the keys the comparison reads. */
static int baseline_cases_ok(const char *path, const json_t *d, int mode, char *err, size_t errlen)
{
    int is_baseline = mode == CASES_BASELINE;
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
        const char *id = json_string_value(json_object_get(c, "id"));
        const char *why = NULL;
        if (!json_is_object(c) || !id)
            why = "has no string 'id'";
        else if (!json_is_string(json_object_get(c, "status")))
            why = "has no string 'status'";
        else if (json_object_get(seen, id))
            why = "repeats an id";
        else if (is_baseline && (!json_is_object(json_object_get(c, "metrics")) ||
                                 !json_is_object(json_object_get(c, "counts")) ||
                                 !json_is_object(json_object_get(c, "settings")) ||
                                 !json_is_string(json_object_get(c, "fingerprint"))))
            why = "lacks 'settings', 'metrics', 'counts' or 'fingerprint'";
        if (!why && is_baseline)
            why = baseline_numbers_bad(json_object_get(c, "metrics"), json_object_get(c, "counts"));
        int finished = why == NULL &&
                       strcmp(json_string_value(json_object_get(c, "status")), "crashed") != 0;
        if (finished && !is_baseline) {
            /* a finished case of a run: metrics and cost as the writer makes them */
            json_t *m = json_object_get(c, "metrics"), *n = json_object_get(c, "cost");
            why = (!json_is_object(m) || !json_is_object(n)) ? "lacks the objects 'metrics' or 'cost'"
                                                             : baseline_numbers_bad(m, n);
        }
        if (why) {
            snprintf(err, errlen, "%s: corrupt: cases[%zu]%s%s%s %s", path, i, id ? " (" : "",
                     id ? id : "", id ? ")" : "", why);
            rc = -1;
            break;
        }
        const char *group = NULL, *key = NULL;
        if (finished && mode != CASES_SUMMARY)
            key = baseline_key_missing(json_object_get(c, "metrics"),
                                       json_object_get(c, is_baseline ? "counts" : "cost"), &group,
                                       "metrics", is_baseline ? "counts" : "cost");
        if (!key && finished && mode == CASES_SUMMARY_COMPLETE &&
            !json_is_string(json_object_get(c, "fingerprint"))) {
            key = "fingerprint";
            group = NULL;
        }
        if (key) {
            snprintf(err, errlen, "%s: case %s: key '%s' missing%s%s%s (every '%s' case has it)",
                     path, id, key, group ? " from '" : "", group ? group : "", group ? "'" : "",
                     json_string_value(json_object_get(c, "status")));
            rc = -1;
            break;
        }
        char sw[160];
        if (is_baseline && baseline_scale_ok(c, sw, sizeof sw)) {
            snprintf(err, errlen, "%s: case %s: %s", path, id, sw);
            rc = -1;
            break;
        }
        json_object_set_new(seen, id, json_true());
    }
    json_decref(seen);
    return rc;
}

int pb_summary_complete(const char *path, const json_t *doc, char *err, size_t errlen)
{
    return baseline_cases_ok(path, doc, CASES_SUMMARY_COMPLETE, err, errlen);
}

int pb_summary_load(const char *path, json_t **out, char *err, size_t errlen)
{
    *out = NULL;
    json_t *d = baseline_read(path, err, errlen);
    if (!d)
        return -1;
    if (!json_is_object(d) || baseline_format_ok(path, d, 1, "run summary", err, errlen) ||
        baseline_cases_ok(path, d, CASES_SUMMARY, err, errlen)) {
        if (!json_is_object(d))
            snprintf(err, errlen, "%s: not a run summary (not a JSON object)", path);
        json_decref(d);
        return -1;
    }
    *out = d;
    return 0;
}

int pb_baseline_load(const char *path, json_t **out, char *err, size_t errlen)
{
    *out = NULL;
    json_t *d = baseline_read(path, err, errlen);
    if (!d)
        return -1;
    const char *kind = json_string_value(json_object_get(d, "kind"));
    if (!json_is_object(d) || !kind || strcmp(kind, PB_BASELINE_KIND)) {
        snprintf(err, errlen, "%s: not a propbench baseline (no \"kind\": \"%s\"); "
                 "make one with 'propbench baseline RUN_DIR --out FILE'", path, PB_BASELINE_KIND);
        json_decref(d);
        return -1;
    }
    if (baseline_format_ok(path, d, PB_BASELINE_FORMAT, "baseline", err, errlen) ||
        baseline_cases_ok(path, d, CASES_BASELINE, err, errlen)) {
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

/* ---- making a baseline ------------------------------------------------ */

static void baseline_copy_keys(json_t *dst, const json_t *src, const char *const *keys)
{
    for (const char *const *k = keys; *k; k++) {
        json_t *v = json_object_get(src, *k);
        if (v)
            json_object_set_new(dst, *k, json_deep_copy(v));
    }
}

static double baseline_norm(const double *x, int dim)
{
    double s = 0;
    for (int i = 0; i < dim; i++)
        s += x[i] * x[i];
    return sqrt(s);
}

/* The floor of positions and velocities scales with the orbit: |r0| and
 * |v0| from the catalogue; 1 (a tighter floor) for problems it does not know. */
static json_t *baseline_scale(const char *problem)
{
    double len = 1, speed = 1;
    pb_problem p;
    if (problem && pb_problem_lookup(problem, &p) == PB_OK) {
        double l = baseline_norm(p.r0, p.dim), s = baseline_norm(p.v0, p.dim);
        if (l > 0 && isfinite(l))
            len = l;
        if (s > 0 && isfinite(s))
            speed = s;
    }
    json_t *o = json_object();
    json_object_set_new(o, "length", json_real(len));
    json_object_set_new(o, "speed", json_real(speed));
    return o;
}

json_t *pb_baseline_from_summary(const json_t *summary)
{
    json_t *b = json_object();
    json_object_set_new(b, "format", json_integer(PB_BASELINE_FORMAT));
    json_object_set_new(b, "kind", json_string(PB_BASELINE_KIND));
    static const char *const top[] = {"tool", "sweep", "machine", "build", NULL};
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
        baseline_copy_keys(st, c, baseline_settings);
        json_object_set_new(o, "settings", st);
        json_object_set_new(o, "scale", baseline_scale(json_string_value(json_object_get(c, "problem"))));
        baseline_copy_keys(m, cm, pb_check_metrics);
        baseline_copy_keys(m, cm, baseline_classes);
        baseline_copy_keys(m, cm, baseline_info);
        json_object_set_new(o, "metrics", m);
        baseline_copy_keys(n, cc, baseline_counts);
        json_object_set_new(o, "counts", n);
        baseline_copy_keys(t, cc, baseline_timing);
        json_object_set_new(o, "timing", t);
        json_object_set_new(o, "fingerprint", json_string(fp ? fp : ""));
        json_array_append_new(cases, o);
    }
    json_object_set_new(b, "cases", cases);
    return b;
}

/* ---- options ---------------------------------------------------------- */

void pb_check_options_default(pb_check_options *o)
{
    memset(o, 0, sizeof *o);
    o->tolerance = PB_CHECK_TOLERANCE;
    o->floor = PB_CHECK_FLOOR;
    o->timing_ratio = PB_CHECK_TIMING_RATIO;
}

int pb_check_options_metric(pb_check_options *o, const char *arg, char *err, size_t errlen)
{
    const char *eq = strchr(arg, '=');
    size_t len = eq ? (size_t)(eq - arg) : 0;
    const char *const *k = pb_check_metrics;
    for (; eq && *k; k++)
        if (strlen(*k) == len && !strncmp(*k, arg, len))
            break;
    if (!eq || !*k) {
        int n = snprintf(err, errlen, "--metric-tolerance expects NAME=REL with NAME one of");
        for (k = pb_check_metrics; *k && n > 0 && (size_t)n < errlen; k++)
            n += snprintf(err + n, errlen - (size_t)n, " %s", *k);
        if (n > 0 && (size_t)n < errlen)
            snprintf(err + n, errlen - (size_t)n, "; got '%s'", arg);
        return -1;
    }
    char *end;
    errno = 0;
    double t = strtod(eq + 1, &end);
    if (end == eq + 1 || *end || errno || !isfinite(t) || t < 0 || t > PB_CHECK_TOLERANCE_MAX) {
        snprintf(err, errlen, "--metric-tolerance %s: expects a relative tolerance from 0 to %g, "
                 "got '%s'", *k, PB_CHECK_TOLERANCE_MAX, eq + 1);
        return -1;
    }
    int i = 0;
    while (i < o->n_metric && strcmp(o->metric_name[i], *k))
        i++;
    if (i == PB_CHECK_METRIC_MAX) {
        snprintf(err, errlen, "--metric-tolerance: too many overrides");
        return -1;
    }
    snprintf(o->metric_name[i], sizeof o->metric_name[i], "%s", *k);
    o->metric_tol[i] = t;
    if (i == o->n_metric)
        o->n_metric++;
    return 0;
}

static double check_tolerance(const pb_check_options *o, const char *metric)
{
    for (int i = 0; i < o->n_metric; i++)
        if (!strcmp(o->metric_name[i], metric))
            return o->metric_tol[i];
    return o->tolerance;
}

/* ---- comparison ------------------------------------------------------- */

const char *pb_check_verdict_name(pb_check_verdict v)
{
    switch (v) {
    case PB_CHECK_SAME: return "ok";
    case PB_CHECK_IMPROVED: return "improved";
    case PB_CHECK_CHANGED: return "changed";
    case PB_CHECK_NEW: return "new";
    case PB_CHECK_REGRESSED: return "REGRESSION";
    case PB_CHECK_MISSING: return "MISSING";
    }
    return "?";
}

static pb_check_row *check_row(pb_check_report *r, const char *id, const char *item,
                               pb_check_verdict v)
{
    if (r->n == r->cap) {
        size_t cap = r->cap ? 2 * r->cap : 256;
        pb_check_row *rows = realloc(r->rows, cap * sizeof *rows);
        if (!rows)
            return NULL;
        r->rows = rows;
        r->cap = cap;
    }
    pb_check_row *w = &r->rows[r->n++];
    memset(w, 0, sizeof *w);
    snprintf(w->case_id, sizeof w->case_id, "%s", id);
    snprintf(w->item, sizeof w->item, "%s", item);
    w->verdict = v;
    snprintf(w->base, sizeof w->base, "-");
    snprintf(w->run, sizeof w->run, "-");
    if (v == PB_CHECK_REGRESSED || v == PB_CHECK_MISSING)
        r->regressions++;
    if (v == PB_CHECK_IMPROVED)
        r->improvements++;
    return w;
}

static void check_text(const json_t *v, char *out, size_t len)
{
    if (!v)
        snprintf(out, len, "-");
    else if (json_is_string(v))
        snprintf(out, len, "%s", json_string_value(v));
    else if (json_is_integer(v))
        snprintf(out, len, "%lld", (long long)json_integer_value(v));
    else if (json_is_real(v))
        snprintf(out, len, "%.6g", json_real_value(v));
    else if (json_is_boolean(v))
        snprintf(out, len, "%s", json_is_true(v) ? "true" : "false");
    else
        snprintf(out, len, "null");
}

enum { CHECK_BELOW = 0, CHECK_NUMBER = 1, CHECK_NONFINITE = 2 };

static int check_value(const json_t *metrics, const char *key, double *x)
{
    json_t *v = json_object_get(metrics, key);
    *x = NAN;
    if (json_is_number(v)) {
        *x = json_number_value(v);
        return CHECK_NUMBER;
    }
    if (!strncmp(key, "pos_err", 7) && json_is_true(json_object_get(metrics, "below_reference_floor")))
        return CHECK_BELOW;
    return CHECK_NONFINITE;
}

static double check_floor(const pb_check_options *o, const json_t *bc, const char *metric)
{
    const json_t *s = json_object_get(bc, "scale");
    const char *which = !strncmp(metric, "pos_err", 7) ? "length"
                        : !strncmp(metric, "vel_err", 7) ? "speed" : NULL;
    double scale = which && json_is_number(json_object_get(s, which))
                       ? json_number_value(json_object_get(s, which)) : 1.0;
    return o->floor * scale;
}

static int check_metrics(pb_check_report *r, const char *id, const json_t *bc, const json_t *rc,
                         const pb_check_options *o)
{
    const json_t *bm = json_object_get(bc, "metrics"), *rm = json_object_get(rc, "metrics");
    static const char *const cls_text[] = {"below ref floor", "", "null"};
    for (const char *const *k = pb_check_metrics; *k; k++) {
        if (!json_object_get(bm, *k))
            continue; /* not measured in the baseline (a crashed case; the loader refuses others) */
        double b, x;
        int cb = check_value(bm, *k, &b), cx = check_value(rm, *k, &x);
        double t = check_tolerance(o, *k), f = check_floor(o, bc, *k);
        pb_check_verdict v = PB_CHECK_SAME;
        if (cb != cx)
            v = cx > cb ? PB_CHECK_REGRESSED : PB_CHECK_IMPROVED;
        else if (cb == CHECK_NUMBER && x > (1 + t) * b + f)
            v = PB_CHECK_REGRESSED;
        else if (cb == CHECK_NUMBER && b > (1 + t) * x + f)
            v = PB_CHECK_IMPROVED;
        pb_check_row *w = check_row(r, id, *k, v);
        if (!w)
            return -1;
        if (cb == CHECK_NUMBER)
            snprintf(w->base, sizeof w->base, "%.3e", b);
        else
            snprintf(w->base, sizeof w->base, "%s", cls_text[cb]);
        if (cx == CHECK_NUMBER)
            snprintf(w->run, sizeof w->run, "%.3e", x);
        else
            snprintf(w->run, sizeof w->run, "%s", cls_text[cx]);
        if (cb == CHECK_NUMBER && cx == CHECK_NUMBER && b != 0) {
            w->rel = (x - b) / fabs(b);
            snprintf(w->change, sizeof w->change, "%+.1f%%", 100 * w->rel);
        } else if (cb == CHECK_NUMBER && cx == CHECK_NUMBER) {
            w->rel = x > 0 ? INFINITY : 0;
            snprintf(w->change, sizeof w->change, x > 0 ? "from 0" : "+0.0%%");
        } else {
            w->rel = cx > cb ? INFINITY : cx < cb ? -INFINITY : 0;
            snprintf(w->change, sizeof w->change, "%s", cb == cx ? "" : "kind changed");
        }
    }
    return 0;
}

static int check_class_rank(const char *s)
{
    static const char *const order[] = {"bounded", "sqrt", "linear", "quadratic", NULL};
    for (int i = 0; s && order[i]; i++)
        if (!strcmp(s, order[i]))
            return i;
    return 4; /* "other": no law fits, the worst we can say */
}

static int check_classes(pb_check_report *r, const char *id, const json_t *bc, const json_t *rc,
                         const pb_check_options *o)
{
    const json_t *bm = json_object_get(bc, "metrics"), *rm = json_object_get(rc, "metrics");
    static const char *const error_of[] = {"energy_rel_max", "pos_err_max"};
    for (int i = 0; baseline_classes[i]; i++) {
        const char *b = json_string_value(json_object_get(bm, baseline_classes[i]));
        const char *x = json_string_value(json_object_get(rm, baseline_classes[i]));
        if (!b)
            continue;
        int rb = check_class_rank(b), rx = x ? check_class_rank(x) : 5;
        pb_check_verdict v = PB_CHECK_SAME;
        if (rx > rb) {
            double e;
            int ce = check_value(rm, error_of[i], &e);
            /* a slope fitted to round-off says nothing about the method */
            v = ce == CHECK_NUMBER && e < 100 * check_floor(o, bc, error_of[i]) ? PB_CHECK_CHANGED
                                                                                : PB_CHECK_REGRESSED;
        } else if (rx < rb)
            v = PB_CHECK_IMPROVED;
        pb_check_row *w = check_row(r, id, baseline_classes[i], v);
        if (!w)
            return -1;
        snprintf(w->base, sizeof w->base, "%s", b);
        snprintf(w->run, sizeof w->run, "%s", x ? x : "-");
        if (rx != rb)
            snprintf(w->change, sizeof w->change, "%s", rx > rb ? "worse class" : "better class");
    }
    return 0;
}

static int check_counts(pb_check_report *r, const char *id, const json_t *bc, const json_t *rc)
{
    const json_t *bn = json_object_get(bc, "counts"), *rn = json_object_get(rc, "counts");
    for (const char *const *k = baseline_counts; *k; k++) {
        json_t *b = json_object_get(bn, *k), *x = json_object_get(rn, *k);
        if (!b)
            continue;
        int same = json_is_integer(x) && json_integer_value(x) == json_integer_value(b);
        pb_check_row *w = check_row(r, id, *k, same ? PB_CHECK_SAME : PB_CHECK_REGRESSED);
        if (!w)
            return -1;
        check_text(b, w->base, sizeof w->base);
        check_text(x, w->run, sizeof w->run);
        if (!same && json_is_integer(x))
            snprintf(w->change, sizeof w->change, "%+lld",
                     (long long)(json_integer_value(x) - json_integer_value(b)));
    }
    return 0;
}

static int check_timing(pb_check_report *r, const char *id, const json_t *bc, const json_t *rc,
                        const pb_check_options *o)
{
    json_t *b = json_object_get(json_object_get(bc, "timing"), "ns_per_step");
    json_t *x = json_object_get(json_object_get(rc, "timing"), "ns_per_step");
    if (!json_is_number(b) || !json_is_number(x) || json_number_value(b) <= 0)
        return 0;
    double ratio = json_number_value(x) / json_number_value(b);
    pb_check_verdict v = ratio > o->timing_ratio ? PB_CHECK_REGRESSED
                         : ratio < 1 / o->timing_ratio ? PB_CHECK_IMPROVED : PB_CHECK_SAME;
    pb_check_row *w = check_row(r, id, "ns_per_step", v);
    if (!w)
        return -1;
    snprintf(w->base, sizeof w->base, "%.1f", json_number_value(b));
    snprintf(w->run, sizeof w->run, "%.1f", json_number_value(x));
    snprintf(w->change, sizeof w->change, "x%.2f", ratio);
    return 0;
}

static int check_case(pb_check_report *r, const json_t *bc, const json_t *rc,
                      const pb_check_options *o)
{
    const char *id = json_string_value(json_object_get(bc, "id"));
    const char *bs = json_string_value(json_object_get(bc, "status"));
    const char *rs = json_string_value(json_object_get(rc, "status"));
    pb_check_row *w = check_row(r, id, "status", strcmp(bs, rs) ? PB_CHECK_REGRESSED : PB_CHECK_SAME);
    if (!w)
        return -1;
    snprintf(w->base, sizeof w->base, "%s", bs);
    snprintf(w->run, sizeof w->run, "%s", rs);

    const json_t *bset = json_object_get(bc, "settings"), *rset = json_object_get(rc, "settings");
    const char *diff = NULL;
    for (const char *const *k = baseline_settings; *k && !diff; k++) {
        json_t *b = json_object_get(bset, *k), *x = json_object_get(rset, *k);
        if ((b || x) && !(b && x && json_equal(b, x)))
            diff = *k;
    }
    w = check_row(r, id, "settings", diff ? PB_CHECK_REGRESSED : PB_CHECK_SAME);
    if (!w)
        return -1;
    if (diff) {
        snprintf(w->change, sizeof w->change, "%s differs", diff);
        check_text(json_object_get(bset, diff), w->base, sizeof w->base);
        check_text(json_object_get(rset, diff), w->run, sizeof w->run);
    }
    if (check_metrics(r, id, bc, rc, o) || check_classes(r, id, bc, rc, o) ||
        check_counts(r, id, bc, rc) || (o->timing && check_timing(r, id, bc, rc, o)))
        return -1;

    const char *bf = json_string_value(json_object_get(bc, "fingerprint"));
    const char *rf = json_string_value(json_object_get(rc, "fingerprint"));
    int same = rf && !strcmp(bf, rf);
    w = check_row(r, id, "fingerprint",
                  same ? PB_CHECK_SAME : o->strict ? PB_CHECK_REGRESSED : PB_CHECK_CHANGED);
    if (!w)
        return -1;
    snprintf(w->base, sizeof w->base, "%s", bf);
    snprintf(w->run, sizeof w->run, "%s", rf ? rf : "-");
    if (!same) {
        w->strict_fail = 1;
        r->fingerprints_changed++;
        snprintf(w->change, sizeof w->change, "bits changed");
    }
    return 0;
}

static void check_warn(pb_check_report *r, const char *what, const json_t *b, const json_t *x)
{
    if ((!b && !x) || (b && x && json_equal(b, x)) || r->n_warnings == 8)
        return;
    char tb[128], tx[128];
    check_text(b, tb, sizeof tb);
    check_text(x, tx, sizeof tx);
    snprintf(r->warnings[r->n_warnings++], sizeof r->warnings[0],
             "%s differs: baseline '%s', run '%s'", what, tb, tx);
}

static void check_environment(pb_check_report *r, const json_t *base, const json_t *run)
{
    const json_t *bb = json_object_get(base, "build"), *rb = json_object_get(run, "build");
    check_warn(r, "compiler", json_object_get(bb, "compiler"), json_object_get(rb, "compiler"));
    check_warn(r, "build flags", json_object_get(bb, "flags"), json_object_get(rb, "flags"));
    const json_t *bm = json_object_get(base, "machine"), *rm = json_object_get(run, "machine");
    const char *key;
    json_t *v;
    char what[96];
    json_object_foreach((json_t *)bm, key, v) {
        snprintf(what, sizeof what, "machine %s", key);
        check_warn(r, what, v, json_object_get(rm, key));
    }
    json_object_foreach((json_t *)rm, key, v)
        if (!json_object_get(bm, key)) {
            snprintf(what, sizeof what, "machine %s", key);
            check_warn(r, what, NULL, v);
        }
}

int pb_check_compare(const json_t *base, const json_t *run, const pb_check_options *o,
                     pb_check_report *r)
{
    memset(r, 0, sizeof *r);
    check_environment(r, base, run);
    json_t *by_id = json_object();
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(run, "cases"), i, c)
        json_object_set(by_id, json_string_value(json_object_get(c, "id")), c);
    int rc = 0;
    json_array_foreach(json_object_get(base, "cases"), i, c) {
        const char *id = json_string_value(json_object_get(c, "id"));
        json_t *x = json_object_get(by_id, id);
        if (x) {
            r->cases++;
            rc = check_case(r, c, x, o);
            json_object_del(by_id, id);
        } else {
            pb_check_row *w = check_row(r, id, "case", PB_CHECK_MISSING);
            rc = w ? 0 : -1;
            if (w) {
                r->missing++;
                snprintf(w->base, sizeof w->base, "present");
                snprintf(w->run, sizeof w->run, "absent");
                snprintf(w->change, sizeof w->change, "missing from the run");
            }
        }
        if (rc)
            break;
    }
    /* what is left was not in the baseline; keep the run's order */
    json_array_foreach(json_object_get(run, "cases"), i, c) {
        const char *id = json_string_value(json_object_get(c, "id"));
        if (rc || !json_object_get(by_id, id))
            continue;
        pb_check_row *w = check_row(r, id, "case", PB_CHECK_NEW);
        if (!w) {
            rc = -1;
            break;
        }
        r->added++;
        snprintf(w->run, sizeof w->run, "present");
        snprintf(w->change, sizeof w->change, "not in the baseline");
    }
    json_decref(by_id);
    return rc;
}

int pb_check_failed(const pb_check_report *r, const pb_check_options *o)
{
    (void)o; /* --strict already turned fingerprint changes into regressions */
    return r->regressions > 0;
}

void pb_check_report_free(pb_check_report *r)
{
    if (!r)
        return;
    free(r->rows);
    r->rows = NULL;
    r->n = r->cap = 0;
}
