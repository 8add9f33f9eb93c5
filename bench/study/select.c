/* select.c - integrator selection by search and confirmation (see select.h).
 * Invariant of the search: lo is a setting known to fail (or none), hi one
 * known to pass; bisection narrows (lo, hi) in log space and the answer is
 * hi, which is then re-run with timing and checked against a neighbour. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/study/select.h"
#include "bench/study/suites.h"
#include "bench/store/case_json.h"
#include "bench/measure/harness.h"

#define SELECT_MAX_SPO 1048576     /* 2^20 steps per orbit */

int pb_requirement_met(const pb_requirement *req, const pb_case_result *res)
{
    if (res->status != PB_OK)
        return 0;
    /* below the reference floor the error is known only to be under 10x the
     * floor: that meets a requirement at or above it, and no finer one */
    if (req->max_pos_err > 0) {
        if (res->below_floor ? !(req->max_pos_err >= 10 * res->truth_floor_max)
                             : !(res->pos_err_max <= req->max_pos_err))
            return 0;
    }
    if (req->max_energy_rel > 0 && !(res->energy_rel_max <= req->max_energy_rel))
        return 0;
    return 1;
}

/* The search runs on one axis for both kinds of method: "fineness" x grows
 * as the setting gets more accurate and more costly. Fixed-step methods:
 * x is the (whole) number of steps per orbit; adaptive ones: x = 1/tolerance. */
typedef struct select_axis {
    int fixed;
    double first, grow, last;   /* coarse ladder: first, first*grow, ... <= last */
    double close;               /* bisection stops once hi <= close * lo */
    double jump;                /* past a non-monotone dip: next try at jump * neighbour */
} select_axis;

/* The tolerance of fineness x, as a number a person can type back in: 1/x
 * rounded down to 3 digits and read back, so what runs is what is printed. */
static double select_tol(double x)
{
    double tol = 1.0 / x, q = pow(10.0, floor(log10(tol)) - 2);
    double shown = floor(tol / q * (1 + 1e-9)) * q;
    char buf[32];
    snprintf(buf, sizeof buf, "%.3g", shown);
    sscanf(buf, "%lf", &shown);
    return shown;
}

static double select_snap(const select_axis *ax, double x)
{
    return ax->fixed ? ceil(x - 1e-9) : 1.0 / select_tol(x);
}

/* Run one setting; 1 pass, 0 fail, -1 could not run. keep: hold the
 * result (with a timing pass) as the confirmed answer. */
static int select_try(const pb_case_spec *base, const pb_method_type *m, const select_axis *ax,
                      double x, const pb_requirement *req, pb_selection *out, int keep)
{
    pb_case_spec s = *base;
    s.method = m;
    s.repeats = 0; /* the search's trial runs need errors, not timings */
    if (keep) {
        /* the answer's projected cost needs its ns per step, so it is timed
         * even when base asked for no timing pass */
        pb_case_spec d;
        pb_case_spec_default(&d);
        s.repeats = base->repeats > 0 ? base->repeats : d.repeats;
    }
    if (ax->fixed)
        s.steps_per_orbit = (int)x;
    else
        s.tolerance = select_tol(x);
    pb_case_result r;
    out->runs++;
    if (pb_case_run(&s, &r))
        return -1;
    int ok = pb_requirement_met(req, &r);
    if (keep) {
        pb_case_result_free(&out->confirmed);
        out->confirmed = r;
    } else {
        pb_case_result_free(&r);
    }
    return ok;
}

static int select_search(const pb_case_spec *base, const pb_method_type *m, const select_axis *ax,
                         const pb_requirement *req, pb_selection *out)
{
    double lo = 0, hi = 0; /* lo: coarser and failing (0: none), hi: passing */
    int ok;
    for (double x = ax->first; x <= ax->last * (1 + 1e-9); x *= ax->grow) {
        if ((ok = select_try(base, m, ax, x, req, out, 0)) < 0)
            return -1;
        if (ok) {
            hi = x;
            break;
        }
        lo = x;
    }
    if (!(hi > 0)) {
        if (!(lo > 0))
            snprintf(out->note, sizeof out->note, "the horizon is too long for the step budget "
                     "(%.0g steps a case)", PB_SELECT_MAX_STEPS);
        else if (ax->fixed)
            snprintf(out->note, sizeof out->note, "no step up to %.0f per orbit meets it", lo);
        else
            snprintf(out->note, sizeof out->note, "no tolerance down to %.0e meets it", select_tol(lo));
        return 0;
    }
    int confirmed = 0;
    for (int round = 0; round < 4 && !confirmed; round++) {
        while (lo > 0 && hi > ax->close * lo) {
            double mid = select_snap(ax, sqrt(lo * hi));
            if (!(mid > lo && mid < hi))
                break;
            if ((ok = select_try(base, m, ax, mid, req, out, 0)) < 0)
                return -1;
            if (ok) hi = mid; else lo = mid;
        }
        /* confirm: a 10% finer setting must pass too, else move past the dip */
        double nb = select_snap(ax, 1.1 * hi);
        if ((ok = select_try(base, m, ax, nb, req, out, 0)) < 0)
            return -1;
        if (ok) {
            confirmed = 1;
            break;
        }
        lo = nb;
        hi = select_snap(ax, fmin(ax->jump * nb, ax->last)); /* within the budget */
        if (!(hi > lo))
            break;
        if ((ok = select_try(base, m, ax, hi, req, out, 0)) <= 0) {
            snprintf(out->note, sizeof out->note, "errors are not monotone in the %s near %.3g",
                     ax->fixed ? "step" : "tolerance", ax->fixed ? nb : 1.0 / nb);
            return ok;
        }
    }
    if (!confirmed) {
        snprintf(out->note, sizeof out->note, "no answer whose 10%%-finer neighbour also passes "
                 "(errors not monotone in the %s)", ax->fixed ? "step" : "tolerance");
        return 0;
    }
    if ((ok = select_try(base, m, ax, hi, req, out, 1)) < 0)
        return -1;
    if (!ok) {
        snprintf(out->note, sizeof out->note, "the answer failed its confirming run");
        return 0;
    }
    out->found = 1;
    if (ax->fixed)
        out->steps_per_orbit = (int)hi;
    else
        out->tolerance = select_tol(hi);
    return 0;
}

int pb_select_method(const pb_case_spec *base, const pb_method_type *m,
                     const pb_requirement *req, pb_selection *out)
{
    memset(out, 0, sizeof *out);
    out->method = m;
    int rc;
    if (m->flags & PB_KIND_FIXED) {
        /* doubling from 4 steps per orbit, within a budget of steps per case */
        double T = base->problem.period > 0 ? base->problem.period : pb_case_horizon(base);
        double last = fmin(SELECT_MAX_SPO, floor(PB_SELECT_MAX_STEPS * T / pb_case_horizon(base)));
        select_axis ax = {1, 4, 2, last, 1.0, 2}; /* bisect to adjacent whole numbers */
        rc = select_search(base, m, &ax, req, out);
    } else {
        select_axis ax = {0, 1e3, 10, 1e14, 1.1, 10};
        rc = select_search(base, m, &ax, req, out);
    }
    if (out->found) {
        const pb_case_result *r = &out->confirmed;
        double ns = isfinite(r->ns_per_step) ? r->ns_per_step : 0;
        out->projected_s = 1e-6 * base->eval_cost_us * (double)r->evals + 1e-9 * ns * (double)r->steps;
    }
    return rc;
}

void pb_selection_free(pb_selection *s)
{
    pb_case_result_free(&s->confirmed);
}

json_t *pb_selection_json(const pb_case_spec *base, const pb_requirement *req,
                          pb_selection *sel, int n)
{
    json_t *o = json_object();
    json_object_set_new(o, "format", json_integer(PB_SUMMARY_FORMAT));
    json_object_set_new(o, "tool", json_string(PB_TOOL_NAME));
    json_object_set_new(o, "problem", json_string(base->problem.name));
    json_object_set_new(o, "horizon_s", json_real(pb_case_horizon(base)));
    if (base->orbits > 0)
        json_object_set_new(o, "orbits", json_real(base->orbits));
    json_t *rq = json_object();
    if (req->max_pos_err > 0)
        json_object_set_new(rq, "max_pos_err", json_real(req->max_pos_err));
    if (req->max_energy_rel > 0)
        json_object_set_new(rq, "max_energy_rel", json_real(req->max_energy_rel));
    json_object_set_new(o, "requirement", rq);
    json_object_set_new(o, "eval_cost_us", json_real(base->eval_cost_us));
    json_t *arr = json_array();
    int rank = 0;
    for (int i = 0; i < n; i++) {
        pb_selection *s = &sel[i];
        json_t *e = json_object();
        json_object_set_new(e, "method", json_string(s->method->name));
        json_object_set_new(e, "from_gsl", json_boolean(s->method->flags & PB_FROM_GSL));
        json_object_set_new(e, "meets_requirement", json_boolean(s->found));
        json_object_set_new(e, "runs", json_integer(s->runs));
        if (s->found) {
            const pb_case_result *r = &s->confirmed;
            json_object_set_new(e, "rank", json_integer(++rank));
            if (s->method->flags & PB_KIND_FIXED)
                json_object_set_new(e, "steps_per_orbit", json_integer(s->steps_per_orbit));
            else
                json_object_set_new(e, "tolerance", json_real(s->tolerance));
            json_object_set_new(e, "evals", json_integer(r->evals));
            json_object_set_new(e, "steps", json_integer(r->steps));
            json_object_set_new(e, "pos_err_max", pb_json_real(r->below_floor ? (double)NAN : r->pos_err_max));
            json_object_set_new(e, "energy_rel_max", pb_json_real(r->energy_rel_max));
            json_object_set_new(e, "ns_per_step", pb_json_real(r->ns_per_step));
            json_object_set_new(e, "projected_s", pb_json_real(s->projected_s));
            json_object_set_new(e, "fingerprint", json_string(r->fingerprint));
            if (s->command[0])
                json_object_set_new(e, "run_command", json_string(s->command));
        } else {
            json_object_set_new(e, "note", json_string(s->note));
        }
        json_array_append_new(arr, e);
    }
    json_object_set_new(o, "ranking", arr);
    json_object_set_new(o, "caution", json_string(
        "Benchmarks on idealised problems do not validate an operational propagator; "
        "defer to the mission's own verification and flight-dynamics practice."));
    return o;
}
