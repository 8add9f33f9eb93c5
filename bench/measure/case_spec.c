/* case_spec.c - what a case asks for, before it runs: its horizon, time
 * scale and step, the checks that it can run, and its identifier. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/measure/harness.h"
#include "integrators/formulation.h"
#include "problems/force_terms.h"
#include "problems/reference_cache.h"

double pb_case_horizon(const pb_case_spec *spec)
{
    if (spec->orbits > 0 && spec->problem.period > 0)
        return spec->orbits * spec->problem.period;
    return spec->horizon_s;
}

double pb_case_scale(const pb_case_spec *spec)
{
    return spec->problem.period > 0 ? spec->problem.period : pb_case_horizon(spec);
}

double pb_case_step(const pb_case_spec *spec)
{
    if (spec->step_s > 0)
        return spec->step_s;
    if (spec->steps_per_orbit > 0)
        return pb_case_scale(spec) / spec->steps_per_orbit;
    return 0;
}

double pb_case_fixed_steps(const pb_case_spec *spec)
{
    double h = pb_case_step(spec);
    if (!spec->method || !(spec->method->flags & PB_KIND_FIXED) || !(h > 0))
        return 0;
    double n = pb_case_horizon(spec) / h;
    return spec->max_steps > 0 && spec->max_steps < n ? (double)spec->max_steps : n;
}

const pb_method_type *pb_case_method(const pb_case_spec *spec)
{
    if (spec->problem.formulation == PB_FORMULATION_CARTESIAN)
        return spec->method;
    return pb_formulation_record(spec->method);
}

void *pb_case_alloc(const pb_case_spec *spec)
{
    const pb_problem *p = &spec->problem;
    if (p->formulation == PB_FORMULATION_CARTESIAN)
        return spec->method->alloc(p->dim);
    return pb_formulation_alloc(spec->method, p->formulation, p->dim);
}

/* A regularised formulation needs a central GM, a bound start (its Kepler
 * period sets the s-step) and a method that integrates y' = f(s, y). */
static int case_validate_formulation(const pb_case_spec *spec, char *err, size_t errlen)
{
    const pb_problem *p = &spec->problem;
    const char *name = pb_formulation_name(p->formulation);
    if (p->formulation == PB_FORMULATION_CARTESIAN)
        return 0;
    if (p->formulation < 0 || p->formulation >= PB_FORMULATION_COUNT) {
        snprintf(err, errlen, "unknown formulation %d", (int)p->formulation);
        return -1;
    }
    if (!(pb_problem_kepler_mu(p) > 0)) {
        snprintf(err, errlen, "formulation '%s' needs a central body's GM, and problem '%s' "
                 "has none (the CR3BP is integrated in its own rotating frame)", name, p->name);
        return -1;
    }
    const char *why = pb_formulation_refusal(spec->method, p->formulation);
    if (why) {
        snprintf(err, errlen, "method '%s' cannot take formulation '%s': %s", spec->method->name,
                 name, why);
        return -1;
    }
    pb_form_eqs eq = {.form = p->formulation, .dim = p->dim, .mu = pb_problem_kepler_mu(p)};
    double T, S;
    if (pb_form_orbit(&eq, p->r0, p->v0, &T, &S)) {
        snprintf(err, errlen, "formulation '%s' needs a bound initial orbit (its Kepler period "
                 "sets the step in s), and problem '%s' starts on an unbound one", name, p->name);
        return -1;
    }
    return 0;
}

void pb_case_spec_default(pb_case_spec *spec)
{
    memset(spec, 0, sizeof *spec);
    spec->repeats = 3;
    spec->linear_samples = 100;
    spec->cache_dir = pb_cache_dir_default();
}

/* A horizon of more than PB_CASE_PERIODS_MAX periods is refused, as
 * --orbits is: --horizon-s 1e300 would build its reference for ever. */
static int case_validate_horizon(const pb_case_spec *spec, double hz, char *err, size_t errlen)
{
    const pb_problem *p = &spec->problem;
    double r = 0, v = 0;
    for (int i = 0; i < p->dim && i < PB_DIM_MAX; i++)
        r += p->r0[i] * p->r0[i], v += p->v0[i] * p->v0[i];
    double per = p->period > 0 ? p->period : v > 0 ? sqrt(r / v) : 0;
    if (per > 0 && hz / per > PB_CASE_PERIODS_MAX) {
        snprintf(err, errlen, "the horizon %.6g is %.3g times the problem's %s %.6g; at most %g "
                 "(as --orbits)", hz, hz / per, p->period > 0 ? "period" : "time scale |r0|/|v0|",
                 per, PB_CASE_PERIODS_MAX);
        return -1;
    }
    return 0;
}

int pb_case_validate(const pb_case_spec *spec, char *err, size_t errlen)
{
    const pb_method_type *m = spec->method;
    const pb_problem *p = &spec->problem;
    if (!m) {
        snprintf(err, errlen, "no method given");
        return -1;
    }
    /* a record from outside (a user's method) may be built against other headers */
    if (pb_method_check(m, err, errlen))
        return -1;
    if (pb_method_fit_error(m, p, err, errlen))
        return -1;
    if (case_validate_formulation(spec, err, errlen))
        return -1;
    if (!p->exact_q && !pb_forces_have_quad(p)) {
        snprintf(err, errlen, "problem '%s' has a force with no extended-precision form, so "
                 "there is no reference to measure it against", p->name);
        return -1;
    }
    double hz = pb_case_horizon(spec);
    if (!(hz > 0) || !isfinite(hz)) {
        snprintf(err, errlen, "horizon must be positive (problem '%s' %s)", p->name,
                 p->period > 0 ? "takes --orbits" : "has no period: give --horizon-s");
        return -1;
    }
    if (case_validate_horizon(spec, hz, err, errlen))
        return -1;
    if (m->flags & PB_KIND_FIXED) {
        double h = pb_case_step(spec);
        if (!(h > 0) || !isfinite(h)) {
            snprintf(err, errlen, "fixed-step method '%s' needs a positive --steps-per-orbit "
                     "or --step", m->name);
            return -1;
        }
        if (h > hz * (1 + 1e-9)) {
            snprintf(err, errlen, "the step %.6g is longer than the horizon %.6g", h, hz);
            return -1;
        }
        if (hz / h > 1e11) {
            snprintf(err, errlen, "%.3g steps are too many for one case", hz / h);
            return -1;
        }
    } else if (!(spec->tolerance >= PB_CASE_TOLERANCE_MIN) || !(spec->tolerance < 1)) {
        snprintf(err, errlen, "adaptive method '%s' needs --tolerance in [%g, 1) (%g given; "
                 "tighter than %g asks double precision for less than its round-off)", m->name,
                 PB_CASE_TOLERANCE_MIN, spec->tolerance, PB_CASE_TOLERANCE_MIN);
        return -1;
    }
    if (spec->compensated && !(m->flags & PB_KIND_COMPENSABLE)) {
        snprintf(err, errlen, "method '%s' has no compensated-summation variant", m->name);
        return -1;
    }
    return 0;
}

static void case_tag(double x, char *out, size_t n)
{
    /* the shortest %g that reads back as x: ids stay short and file-name
     * safe ("1e-08") yet two different values never share one */
    for (int prec = 6; prec <= 17; prec++) {
        snprintf(out, n, "%.*g", prec, x);
        if (strtod(out, NULL) == x)
            return;
    }
}

void pb_case_id(const pb_case_spec *spec, char *out, size_t outlen)
{
    char tag[48];
    if (spec->method && !(spec->method->flags & PB_KIND_FIXED)) {
        case_tag(spec->tolerance, tag, sizeof tag);
        snprintf(out, outlen, "%s__%s__tol%s", spec->problem.name,
                 spec->method ? spec->method->name : "none", tag);
    } else if (spec->step_s > 0) {
        case_tag(spec->step_s, tag, sizeof tag);
        snprintf(out, outlen, "%s__%s__h%s", spec->problem.name,
                 spec->method ? spec->method->name : "none", tag);
    } else {
        snprintf(out, outlen, "%s__%s__n%d", spec->problem.name,
                 spec->method ? spec->method->name : "none", spec->steps_per_orbit);
    }
    if (spec->compensated) {
        size_t l = strlen(out);
        snprintf(out + l, outlen - l, "__comp");
    }
    if (spec->problem.formulation != PB_FORMULATION_CARTESIAN) {
        size_t l = strlen(out);
        snprintf(out + l, outlen - l, "__%s", pb_formulation_name(spec->problem.formulation));
    }
    if (spec->orbits > 0 && spec->problem.period > 0) {
        case_tag(spec->orbits, tag, sizeof tag);
        size_t l = strlen(out);
        snprintf(out + l, outlen - l, "__o%s", tag);
    } else {
        case_tag(spec->horizon_s, tag, sizeof tag);
        size_t l = strlen(out);
        snprintf(out + l, outlen - l, "__s%s", tag);
    }
}

