/* compare.c - the case-by-case comparison of a run with a baseline; the
 * rules are stated above pb_check_compare in compare.h. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/gate/baseline.h"
#include "bench/gate/compare.h"
#include "bench/store/summary_read.h"

/* ---- options ---------------------------------------------------------- */

void pb_check_options_default(pb_check_options *o)
{
    memset(o, 0, sizeof *o);
    o->tolerance = PB_CHECK_TOLERANCE;
    o->floor = PB_CHECK_FLOOR;
    o->timing_ratio = PB_CHECK_TIMING_RATIO;
}

/* The REL of option opt's NAME=REL (text: what follows '='): a relative
 * tolerance from 0 to PB_CHECK_TOLERANCE_MAX; 0, or -1 with the reason. */
static int check_rel_value(const char *opt, const char *name, const char *text, double *t, char *err,
                           size_t errlen)
{
    char *end;
    errno = 0;
    *t = strtod(text, &end);
    if (end == text || *end || errno || !isfinite(*t) || *t < 0 || *t > PB_CHECK_TOLERANCE_MAX) {
        snprintf(err, errlen, "%s %s: expects a relative tolerance from 0 to %g, got '%s'", opt, name,
                 PB_CHECK_TOLERANCE_MAX, text);
        return -1;
    }
    return 0;
}

int pb_check_options_metric(pb_check_options *o, const char *arg, char *err, size_t errlen)
{
    const char *eq = strchr(arg, '=');
    size_t len = eq ? (size_t)(eq - arg) : 0;
    const char *const *k = pb_summary_metric_keys;
    for (; eq && *k; k++)
        if (strlen(*k) == len && !strncmp(*k, arg, len))
            break;
    if (!eq || !*k) {
        int n = snprintf(err, errlen, "--metric-tolerance expects NAME=REL with NAME one of");
        for (k = pb_summary_metric_keys; *k && n > 0 && (size_t)n < errlen; k++)
            n += snprintf(err + n, errlen - (size_t)n, " %s", *k);
        if (n > 0 && (size_t)n < errlen)
            snprintf(err + n, errlen - (size_t)n, "; got '%s'", arg);
        return -1;
    }
    double t;
    if (check_rel_value("--metric-tolerance", *k, eq + 1, &t, err, errlen))
        return -1;
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

int pb_check_options_counts(pb_check_options *o, const char *arg, char *err, size_t errlen)
{
    const char *p = arg;
    while (*p) {
        size_t len = strcspn(p, ",");
        char item[64];
        snprintf(item, sizeof item, "%.*s", (int)(len < sizeof item ? len : sizeof item - 1), p);
        char *eq = strchr(item, '=');
        const char *const *k = pb_summary_count_keys;
        for (; eq && *k; k++)
            if (strlen(*k) == (size_t)(eq - item) && !strncmp(*k, item, (size_t)(eq - item)))
                break;
        if (!eq || !*k || len >= sizeof item) {
            snprintf(err, errlen, "--count-tolerance expects NAME=REL[,NAME=REL...] with NAME one "
                     "of steps, evals, rejected, startup_steps; got '%.*s'", (int)len, p);
            return -1;
        }
        double t;
        if (check_rel_value("--count-tolerance", *k, eq + 1, &t, err, errlen))
            return -1;
        int i = 0;
        while (i < o->n_count && strcmp(o->count_name[i], *k))
            i++;
        snprintf(o->count_name[i], sizeof o->count_name[i], "%s", *k);
        o->count_tol[i] = t;
        if (i == o->n_count)
            o->n_count++;
        p += len + (p[len] == ',');
        if (p[-1] == ',' && !*p) {
            snprintf(err, errlen, "--count-tolerance '%s': ends with a comma", arg);
            return -1;
        }
    }
    if (!*arg) {
        snprintf(err, errlen, "--count-tolerance: an empty list");
        return -1;
    }
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
    case PB_CHECK_UNMET: return "UNMET";
    }
    return "?";
}

pb_check_row *pb_check_add_row(pb_check_report *r, const char *id, const char *item,
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
    if (v == PB_CHECK_UNMET)
        r->unmet++;
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
    for (const char *const *k = pb_summary_metric_keys; *k; k++) {
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
        pb_check_row *w = pb_check_add_row(r, id, *k, v);
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
    for (int i = 0; pb_summary_class_keys[i]; i++) {
        const char *b = json_string_value(json_object_get(bm, pb_summary_class_keys[i]));
        const char *x = json_string_value(json_object_get(rm, pb_summary_class_keys[i]));
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
        pb_check_row *w = pb_check_add_row(r, id, pb_summary_class_keys[i], v);
        if (!w)
            return -1;
        snprintf(w->base, sizeof w->base, "%s", b);
        snprintf(w->run, sizeof w->run, "%s", x ? x : "-");
        if (rx != rb)
            snprintf(w->change, sizeof w->change, "%s", rx > rb ? "worse class" : "better class");
    }
    return 0;
}

/* A count's tolerance: o's, or -1 (must be equal). */
static double check_count_tolerance(const pb_check_options *o, const char *key)
{
    for (int i = 0; i < o->n_count; i++)
        if (!strcmp(o->count_name[i], key))
            return o->count_tol[i];
    return -1;
}

static int check_counts(pb_check_report *r, const char *id, const json_t *bc, const json_t *rc,
                        const pb_check_options *o)
{
    const json_t *bn = json_object_get(bc, "counts"), *rn = json_object_get(rc, "counts");
    for (const char *const *k = pb_summary_count_keys; *k; k++) {
        json_t *b = json_object_get(bn, *k), *x = json_object_get(rn, *k);
        if (!b)
            continue;
        int ints = json_is_integer(x) && json_is_integer(b);
        int same = (ints && json_integer_value(x) == json_integer_value(b)) ||
                   (json_is_null(x) && json_is_null(b)); /* both unknown (score) */
        double t = check_count_tolerance(o, *k);
        double bv = ints ? (double)json_integer_value(b) : 0, xv = ints ? (double)json_integer_value(x) : 0;
        pb_check_verdict v = same ? PB_CHECK_SAME : PB_CHECK_REGRESSED;
        if (!same && ints && t >= 0)
            v = xv > (1 + t) * bv ? PB_CHECK_REGRESSED
                : bv > (1 + t) * xv ? PB_CHECK_IMPROVED : PB_CHECK_SAME;
        pb_check_row *w = pb_check_add_row(r, id, *k, v);
        if (!w)
            return -1;
        check_text(b, w->base, sizeof w->base);
        check_text(x, w->run, sizeof w->run);
        if (!same && ints && bv > 0) {
            w->rel = (xv - bv) / bv;
            snprintf(w->change, sizeof w->change, "%+lld (%+.1f%%)",
                     (long long)(json_integer_value(x) - json_integer_value(b)), 100 * w->rel);
        } else if (!same && ints) {
            w->rel = xv > bv ? INFINITY : -INFINITY;
            snprintf(w->change, sizeof w->change, "%+lld",
                     (long long)(json_integer_value(x) - json_integer_value(b)));
        } else if (!same)
            w->rel = INFINITY;
    }
    return 0;
}

/* A step's time in calibration-kernel chunks (timing.h) when both sides
 * have it, which a loaded or slower machine moves far less than it moves
 * nanoseconds; otherwise (a baseline made before the kernel) raw CPU time. */
static int check_timing(pb_check_report *r, const char *id, const json_t *bc, const json_t *rc,
                        const pb_check_options *o)
{
    const json_t *bt = json_object_get(bc, "timing"), *rt = json_object_get(rc, "timing");
    json_t *b = json_object_get(bt, "ns_per_step"), *x = json_object_get(rt, "ns_per_step");
    json_t *bk = json_object_get(bt, "step_kernel_ratio"), *xk = json_object_get(rt, "step_kernel_ratio");
    if (!json_is_number(b) || !json_is_number(x) || json_number_value(b) <= 0)
        return 0;
    int cal = json_is_number(bk) && json_is_number(xk) && json_number_value(bk) > 0;
    double ratio = cal ? json_number_value(xk) / json_number_value(bk)
                       : json_number_value(x) / json_number_value(b);
    pb_check_verdict v = ratio > o->timing_ratio ? PB_CHECK_REGRESSED
                         : ratio < 1 / o->timing_ratio ? PB_CHECK_IMPROVED : PB_CHECK_SAME;
    pb_check_row *w = pb_check_add_row(r, id, "ns_per_step", v);
    if (!w)
        return -1;
    snprintf(w->base, sizeof w->base, "%.1f", json_number_value(b));
    snprintf(w->run, sizeof w->run, "%.1f", json_number_value(x));
    snprintf(w->change, sizeof w->change, "x%.2f%s", ratio, cal ? " calibrated" : " raw CPU");
    w->rel = ratio - 1;
    if (!cal)
        r->timing_raw++;
    return 0;
}

static int check_case(pb_check_report *r, const json_t *bc, const json_t *rc,
                      const pb_check_options *o)
{
    const char *id = json_string_value(json_object_get(bc, "id"));
    const char *bs = json_string_value(json_object_get(bc, "status"));
    const char *rs = json_string_value(json_object_get(rc, "status"));
    pb_check_row *w = pb_check_add_row(r, id, "status", strcmp(bs, rs) ? PB_CHECK_REGRESSED : PB_CHECK_SAME);
    if (!w)
        return -1;
    snprintf(w->base, sizeof w->base, "%s", bs);
    snprintf(w->run, sizeof w->run, "%s", rs);

    const json_t *bset = json_object_get(bc, "settings"), *rset = json_object_get(rc, "settings");
    const char *diff = NULL;
    for (const char *const *k = pb_baseline_settings; *k && !diff; k++) {
        json_t *b = json_object_get(bset, *k), *x = json_object_get(rset, *k);
        if ((b || x) && !(b && x && json_equal(b, x)))
            diff = *k;
    }
    w = pb_check_add_row(r, id, "settings", diff ? PB_CHECK_REGRESSED : PB_CHECK_SAME);
    if (!w)
        return -1;
    if (diff) {
        snprintf(w->change, sizeof w->change, "%s differs", diff);
        check_text(json_object_get(bset, diff), w->base, sizeof w->base);
        check_text(json_object_get(rset, diff), w->run, sizeof w->run);
    }
    if (check_metrics(r, id, bc, rc, o) || check_classes(r, id, bc, rc, o) ||
        check_counts(r, id, bc, rc, o) || (o->timing && check_timing(r, id, bc, rc, o)))
        return -1;

    const char *bf = json_string_value(json_object_get(bc, "fingerprint"));
    const char *rf = json_string_value(json_object_get(rc, "fingerprint"));
    int same = rf && !strcmp(bf, rf);
    w = pb_check_add_row(r, id, "fingerprint",
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
    r->compared = 1;
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
            pb_check_row *w = pb_check_add_row(r, id, "case", PB_CHECK_MISSING);
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
        pb_check_row *w = pb_check_add_row(r, id, "case", PB_CHECK_NEW);
        if (!w) {
            rc = -1;
            break;
        }
        r->added++;
        snprintf(w->run, sizeof w->run, "present");
        snprintf(w->change, sizeof w->change, "not in the baseline");
    }
    json_decref(by_id);
    if (r->timing_raw && r->n_warnings < 8)
        snprintf(r->warnings[r->n_warnings++], sizeof r->warnings[0],
                 "%ld cases compared on raw CPU time: the baseline (or the run) has no "
                 "calibration kernel timing; make the baseline again", r->timing_raw);
    return rc;
}

int pb_check_failed(const pb_check_report *r, const pb_check_options *o)
{
    (void)o; /* --strict already turned fingerprint changes into regressions */
    return r->regressions > 0 || r->unmet > 0;
}

void pb_check_report_free(pb_check_report *r)
{
    if (!r)
        return;
    free(r->rows);
    r->rows = NULL;
    r->n = r->cap = 0;
}

