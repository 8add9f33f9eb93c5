/* context.c - problem definitions, run facts, select answers and the
 * summary page's picks (see context.h). Built-in problems are rebuilt from
 * the catalogue by name; a problem-file case says where its definition is. */
#include <dirent.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/context.h"
#include "integrators/method.h"
#include "problems/catalogue.h"
#include "problems/forces.h"
#include "problems/twobody.h"

static void kv_add(pb_report_kv *kv, int *n, int max, const char *key, const char *fmt, ...)
{
    if (*n >= max)
        return;
    snprintf(kv[*n].key, sizeof kv[*n].key, "%s", key);
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(kv[*n].val, sizeof kv[*n].val, fmt, ap);
    va_end(ap);
    (*n)++;
}

static double ctx_deg(double rad)
{
    double d = fmod(rad * 180.0 / M_PI, 360.0);
    if (d < 0) d += 360.0;
    return fabs(d) < 1e-9 || fabs(d - 360.0) < 1e-9 ? 0.0 : d;
}

/* The largest reference floor among the problem's cases: the truth's own
 * error, below which no case's error can be told apart. */
static double ctx_floor(const pb_report_run *run, const pb_report_problem *p)
{
    double fl = 0;
    for (int i = 0; i < p->n; i++)
        if (run->cases[p->first + i].floor_max > fl)
            fl = run->cases[p->first + i].floor_max;
    return fl;
}

/* The facts the catalogue (or a problem-file case's "problem_def", with
 * its force text in force_text) gives: constants, forces, elements, state,
 * epoch. */
static void ctx_builtin(const pb_problem *q, const char *force_text, const char *L, pb_report_kv *kv,
                        int *n, int max)
{
    const char *T = q->units == PB_UNITS_KM_S ? "s" : "TU";
    kv_add(kv, n, max, "description", "%s", q->description);
    kv_add(kv, n, max, "units", "%s", q->units == PB_UNITS_KM_S ? "km, s, km^3/s^2" : "normalized (mu = 1: DU, TU)");
    kv_add(kv, n, max, q->force == PB_FORCE_CR3BP ? "mass ratio" : "mu", "%.10g", q->mu);
    if (q->body_radius > 0)
        kv_add(kv, n, max, "body radius", "%.10g %s", q->body_radius, L);
    char force[256];
    if (force_text)
        snprintf(force, sizeof force, "%s", force_text);
    else if (q->force == PB_FORCE_CR3BP)
        snprintf(force, sizeof force, "CR3BP, rotating frame");
    else
        pb_forces_describe(&q->forces, force, sizeof force);
    kv_add(kv, n, max, "force terms", "%s", force);
    if (q->forces.jn[2] != 0)
        kv_add(kv, n, max, "J2", "%.9g", q->forces.jn[2]);
    pb_elements el;
    if (q->keplerian && pb_elements_from_state(q->mu, q->r0, q->v0, &el) == PB_OK)
        kv_add(kv, n, max, "elements (osculating at t0)",
               "a = %.10g %s, e = %.10g, i = %.6g deg, RAAN = %.6g deg, argp = %.6g deg, nu = %.6g deg",
               el.a, L, el.e < 1e-12 ? 0.0 : el.e, ctx_deg(el.i), ctx_deg(el.raan), ctx_deg(el.argp),
               ctx_deg(el.nu));
    kv_add(kv, n, max, "initial state", "r0 = (%.15g, %.15g, %.15g) %s, v0 = (%.15g, %.15g, %.15g) %s/%s",
           q->r0[0] + 0.0, q->r0[1] + 0.0, q->r0[2] + 0.0, L, q->v0[0] + 0.0, q->v0[1] + 0.0,
           q->v0[2] + 0.0, L, T);
    if (q->period > 0)
        kv_add(kv, n, max, "period", "%.10g %s", q->period, T);
    if (q->forces.has_epoch)
        kv_add(kv, n, max, "epoch", "t0 = %g %s = J2000.0 + %.10g d TT", q->t0, T, q->forces.epoch_days);
    else
        kv_add(kv, n, max, "epoch", "t0 = %g %s (no calendar epoch: the force does not depend on it)", q->t0, T);
    if (!force_text)
        kv_add(kv, n, max, "truth", "%s", q->exact ? "closed form" :
               "reference trajectory integrated by propbench (see the floor)");
}

/* A problem-file case's stored definition into q (what ctx_builtin reads);
 * 0, or -1 when a field is missing. */
static int ctx_from_def(const json_t *d, pb_problem *q)
{
    memset(q, 0, sizeof *q);
    const json_t *r = json_object_get(d, "r0"), *v = json_object_get(d, "v0");
    if (json_array_size(r) != 3 || json_array_size(v) != 3 || !json_is_number(json_object_get(d, "mu")))
        return -1;
    snprintf(q->description, sizeof q->description, "%s", json_string_value(json_object_get(d, "description"))
             ? json_string_value(json_object_get(d, "description")) : "");
    const char *u = json_string_value(json_object_get(d, "units"));
    q->units = u && !strcmp(u, "km-s") ? PB_UNITS_KM_S : PB_UNITS_NORMALIZED;
    q->mu = json_number_value(json_object_get(d, "mu"));
    q->body_radius = json_number_value(json_object_get(d, "body_radius"));
    q->period = json_number_value(json_object_get(d, "period"));
    q->t0 = json_number_value(json_object_get(d, "t0"));
    q->keplerian = json_is_true(json_object_get(d, "keplerian"));
    const json_t *ep = json_object_get(d, "epoch_days");
    q->forces.has_epoch = json_is_number(ep);
    q->forces.epoch_days = json_number_value(ep);
    for (int i = 0; i < 3; i++) {
        q->r0[i] = json_number_value(json_array_get(r, (size_t)i));
        q->v0[i] = json_number_value(json_array_get(v, (size_t)i));
    }
    return 0;
}

int pb_report_problem_def(const pb_report_run *run, const pb_report_problem *p,
                          pb_report_kv *kv, int max)
{
    int n = 0;
    pb_problem q;
    const json_t *def = NULL;
    for (int i = 0; i < p->n && !def; i++)
        def = run->cases[p->first + i].def;
    if (pb_problem_lookup(p->name, &q) == PB_OK)
        ctx_builtin(&q, NULL, p->len_unit, kv, &n, max);
    else if (def && ctx_from_def(def, &q) == 0)
        ctx_builtin(&q, json_string_value(json_object_get(def, "forces")), p->len_unit, kv, &n, max);
    else
        kv_add(kv, &n, max, "definition", "a problem-file case (not a built-in problem) whose summary "
               "does not carry its definition: see the problem file in the command");
    if (p->orbits_max > 0)
        kv_add(kv, &n, max, "horizon", "%g orbits = %.6g %s", p->orbits_max, p->horizon_max, p->time_unit);
    else
        kv_add(kv, &n, max, "horizon", "%.6g %s", p->horizon_max, p->time_unit);
    double fl = ctx_floor(run, p);
    if (fl > 0)
        kv_add(kv, &n, max, "reference floor", "%.3e %s (largest over the run; smaller errors "
               "cannot be told apart from the reference's own)", fl, p->len_unit);
    else
        kv_add(kv, &n, max, "reference floor", "0 (closed-form truth: errors down to round-off are measured)");
    return n;
}

static const char *ctx_str(const json_t *o, const char *k)
{
    const char *s = json_string_value(json_object_get(o, k));
    return s ? s : "not recorded";
}

int pb_report_run_facts(const pb_report_run *run, const char *title, pb_report_kv *kv, int max)
{
    const json_t *doc = run->doc, *m = json_object_get(doc, "machine"), *b = json_object_get(doc, "build");
    int n = 0;
    kv_add(kv, &n, max, "run", "%s", title);
    const json_t *cmd = json_object_get(doc, "command");
    if (json_is_string(cmd))
        kv_add(kv, &n, max, "command", "%s", json_string_value(cmd));
    else
        kv_add(kv, &n, max, "command", "not recorded (a summary.json written before propbench "
               "recorded its command)");
    kv_add(kv, &n, max, "tool version", "%s", ctx_str(doc, "tool"));
    kv_add(kv, &n, max, "cases", "%d on %d problem%s", run->ncases, run->nproblems, run->nproblems == 1 ? "" : "s");
    kv_add(kv, &n, max, "machine", "%s %s %s, %s, %lld cores", ctx_str(m, "system"), ctx_str(m, "release"),
           ctx_str(m, "arch"), ctx_str(m, "cpu"), (long long)json_integer_value(json_object_get(m, "cores")));
    kv_add(kv, &n, max, "compiler", "%s", ctx_str(b, "compiler"));
    kv_add(kv, &n, max, "build flags", "%s", ctx_str(b, "flags"));
    const json_t *cal = json_object_get(doc, "calibration");
    if (json_is_number(json_object_get(cal, "ns")))
        kv_add(kv, &n, max, "timing", "%s clock; calibration kernel %s took %.4g ns (median)",
               ctx_str(cal, "clock"), ctx_str(cal, "kernel"), json_number_value(json_object_get(cal, "ns")));
    return n;
}

/* One select document for problem: its requirement and first-ranked method. */
static int ctx_select_doc(const char *path, const char *problem, pb_report_select *out)
{
    json_t *d = json_load_file(path, 0, NULL);
    if (!d)
        return 0;
    int hit = 0;
    const char *pr = json_string_value(json_object_get(d, "problem"));
    const json_t *rk = json_object_get(d, "ranking"), *e;
    size_t i;
    if (pr && !strcmp(pr, problem)) {
        const json_t *req = json_object_get(json_object_get(d, "requirement"), "max_pos_err");
        out->max_pos_err = json_is_number(req) ? json_number_value(req) : (double)NAN;
        snprintf(out->answer, sizeof out->answer, "no method met the requirement");
        json_array_foreach(rk, i, e) {
            if (!json_is_true(json_object_get(e, "meets_requirement")))
                continue;
            const json_t *spo = json_object_get(e, "steps_per_orbit"), *tol = json_object_get(e, "tolerance");
            char set[64] = "";
            if (json_is_integer(spo))
                snprintf(set, sizeof set, " n=%lld", (long long)json_integer_value(spo));
            else if (json_is_number(tol))
                snprintf(set, sizeof set, " tol=%.0e", json_number_value(tol));
            const json_t *orb = json_object_get(d, "orbits");
            char hz[64];
            if (json_is_number(orb))
                snprintf(hz, sizeof hz, "%g orbits", json_number_value(orb));
            else
                snprintf(hz, sizeof hz, "%g time units", json_number_value(json_object_get(d, "horizon_s")));
            /* select's own horizon: it may differ from this run's */
            snprintf(out->answer, sizeof out->answer, "%s%s: %lld evaluations, largest position error %.3e "
                     "over %s (%s)", ctx_str(e, "method"), set,
                     (long long)json_integer_value(json_object_get(e, "evals")),
                     json_number_value(json_object_get(e, "pos_err_max")), hz, ctx_str(e, "run_command"));
            break;
        }
        hit = 1;
    }
    json_decref(d);
    return hit;
}

void pb_report_select_find(const char *run_dir, const char *problem, pb_report_select *out)
{
    memset(out, 0, sizeof *out);
    out->max_pos_err = NAN;
    DIR *d = opendir(run_dir);
    if (!d)
        return;
    for (struct dirent *e; (e = readdir(d)) && !out->found;) {
        size_t l = strlen(e->d_name);
        if (strncmp(e->d_name, "select-", 7) || l < 12 || strcmp(e->d_name + l - 5, ".json"))
            continue;
        char path[4400];
        snprintf(path, sizeof path, "%s/%s", run_dir, e->d_name);
        out->found = ctx_select_doc(path, problem, out);
    }
    closedir(d);
}

void pb_report_levels(const pb_report_problem *p, double lv[PB_REPORT_NLEVELS], const char *names[PB_REPORT_NLEVELS])
{
    int km = !strcmp(p->len_unit, "km");
    static const double kml[] = {1.0, 1e-3, 1e-6}, dul[] = {1e-2, 1e-5, 1e-8};
    static const char *const kmn[] = {"1 km", "1 m", "1 mm"}, *const dun[] = {"1e-2 DU", "1e-5 DU", "1e-8 DU"};
    for (int i = 0; i < PB_REPORT_NLEVELS; i++) {
        lv[i] = km ? kml[i] : dul[i];
        names[i] = km ? kmn[i] : dun[i];
    }
}

int pb_report_cheapest(const pb_report_run *run, const pb_report_problem *p, double level)
{
    int best = -1;
    for (int i = p->first; i < p->first + p->n; i++) {
        const pb_report_case *c = &run->cases[i];
        if (!pb_report_case_plain_ok(c) || !(c->pos_max <= level) || c->evals < 0)
            continue;
        if (best < 0 || c->evals < run->cases[best].evals)
            best = i;
    }
    return best;
}

int pb_report_growth_case(const pb_report_run *run, const pb_report_problem *p, int m)
{
    int plain = -1, done = -1;
    /* cases are sorted coarse to fine within a method: the last one wins */
    for (int i = p->first; i < p->first + p->n; i++) {
        const pb_report_case *c = &run->cases[i];
        if (c->method_slot != m)
            continue;
        if (pb_report_case_plain_ok(c))
            plain = i;
        if (!strcmp(c->status, "ok"))
            done = i;
    }
    return plain >= 0 ? plain : done;
}

int pb_report_exact_by_construction(const char *method, const char *problem)
{
    const pb_method_type *m = pb_method_find(method);
    pb_problem p;
    return m && pb_problem_lookup(problem, &p) == PB_OK && pb_method_exact_on(m, &p);
}
