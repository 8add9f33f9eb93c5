/* print_case.c - the short human-readable table of one case. Every number
 * carries its unit; what was not measured reads "n/a", never 0 or nan. */
#include <math.h>
#include <stdio.h>
#include "bench/cli/cli.h"
#include "bench/measure/harness.h"

/* A number with its unit, or n/a. */
static void print_num(const char *fmt, double x, const char *unit)
{
    if (isfinite(x)) {
        printf(fmt, x);
        if (unit && *unit)
            printf(" %s", unit);
    } else {
        printf("n/a");
    }
}

static void print_growth(const char *what, const pb_growth *g, double period)
{
    printf("  %-22s ", what);
    if (!isfinite(g->k)) {
        printf("not enough samples to fit\n");
        return;
    }
    printf("k = %5.2f +- %.2f  (%s, %d samples", g->k, g->k_err, g->cls, g->npoints);
    if (period > 0)
        printf(" from orbit %.0f%s", g->from / period,
               g->from / period < 9.5 ? ": short horizon, fewer than 3 after 10" : "");
    printf(")\n");
}

static void print_err(const char *label, double x, const char *unit, int below)
{
    printf("  %-22s ", label);
    if (below)
        printf("below the reference floor");
    else
        print_num("%.3e", x, unit);
    printf("\n");
}

static void print_invariant(const char *label, double mx, double fin)
{
    printf("  %-22s max ", label);
    print_num("%.3e", mx, NULL);
    printf("   final ");
    print_num("%.3e", fin, NULL);
    printf("   (relative)\n");
}

/* The unit names of a problem's length, time and speed. */
typedef struct print_units {
    int km;
    const char *L, *T, *V;
} print_units;

static print_units print_units_of(const pb_problem *p)
{
    int km = p->units == PB_UNITS_KM_S;
    print_units u = {km, km ? "km" : "DU", km ? "s" : "TU", km ? "km/s" : "DU/TU"};
    return u;
}

/* What was run: problem, method, its setting, horizon, and how it ended. */
static void print_setup(const pb_case_spec *spec, const pb_case_result *res, const print_units *u)
{
    const pb_problem *p = &spec->problem;
    printf("case %s\n", res->id);
    printf("  %-22s %s (%s units)\n", "problem", p->name, u->km ? "km-s" : "normalized");
    printf("  %-22s %s%s, order %d\n", "method", spec->method->name,
           (spec->method->flags & PB_FROM_GSL) ? " (GSL's)" : "", spec->method->order);
    if (p->formulation == PB_FORMULATION_SUNDMAN)
        printf("  %-22s sundman: (r, t) in s, dt = c r ds (c: 2 pi of s per Kepler orbit)\n",
               "formulation");
    else if (p->formulation == PB_FORMULATION_KS)
        printf("  %-22s ks: Kustaanheimo-Stiefel (u, t, h) in s, dt = r ds\n", "formulation");
    if (spec->method->flags & PB_KIND_FIXED) {
        printf("  %-22s h = %.6g %s", "step", res->h, u->T);
        if (p->period > 0)
            printf(" (%.6g steps per orbit)", p->period / res->h);
        printf("%s\n", spec->compensated ? ", compensated" : "");
    } else {
        printf("  %-22s %.3g (relative = absolute)\n", "tolerance", spec->tolerance);
    }
    double hz = pb_case_horizon(spec);
    if (p->period > 0)
        printf("  %-22s %.6g %s (%.4g orbits)\n", "horizon", hz, u->T, hz / p->period);
    else
        printf("  %-22s %.6g %s\n", "horizon", hz, u->T);
    if (res->status)
        printf("  %-22s %s at t = %.9g %s: %s\n", "status", res->status_name, res->diverged_at, u->T,
               res->status_detail ? res->status_detail : pb_strerror(res->status));
    else
        printf("  %-22s ok\n", "status");
    if (res->status && res->nsamples > 0)
        printf("  %-22s at t = %.9g %s, the last metric sample before the run stopped\n",
               "final values", res->t_final, u->T);
    if (res->saturated)
        printf("  %-22s the position error exceeds a tenth of the orbit's size: this run\n"
               "  %-22s follows another orbit, and its growth law and drifts mean little\n",
               "WARNING", "");
}

/* Invariant drifts and the errors against the truth. */
static void print_accuracy(const pb_case_spec *spec, const pb_case_result *res, const print_units *u)
{
    const pb_problem *p = &spec->problem;
    if (p->energy)
        print_invariant(p->energy_label ? p->energy_label : "energy", res->energy_rel_max,
                        res->energy_rel_final);
    if (p->invariants_from_truth && (p->energy || p->angmom))
        printf("  %-22s invariants against the truth's own values at the same time: the force\n"
               "  %-22s (drag, third bodies, radiation pressure, manoeuvres) changes them\n", "", "");
    else if (res->energy_rel_to_parts)
        printf("  %-22s relative to v0^2/2 + mu/|r0|, not |E0|: the start is nearly parabolic\n"
               "  %-22s (|E0| under 1e-6 of it), so most of |E0| is cancellation\n", "", "");
    if (p->angmom)
        print_invariant(p->angmom_label ? p->angmom_label : "angular momentum", res->angmom_rel_max,
                        res->angmom_rel_final);
    print_err("position error, max", res->pos_err_max, u->L, res->below_floor);
    print_err("position error, final", res->pos_err_final, u->L, res->below_floor);
    if (u->km && !res->below_floor && isfinite(res->pos_err_max)) {
        printf("  %-22s ", "  in metres");
        print_num("%.3f", 1e3 * res->pos_err_final, "m");
        printf(" (max ");
        print_num("%.3f", 1e3 * res->pos_err_max, "m");
        printf(")\n");
    }
    printf("  %-22s radial ", "final RIC error");
    print_num("%+.3e", res->radial_final, NULL);
    printf("  along ");
    print_num("%+.3e", res->along_final, NULL);
    printf("  cross ");
    print_num("%+.3e", res->cross_final, u->L);
    printf("\n");
    print_err("velocity error, final", res->vel_err_final, u->V, 0);
    if (p->keplerian) {
        print_err("ecc-vector drift, max", res->ecc_drift_max, "", 0);
        if (isfinite(res->apsidal_rate)) {
            /* against the true orbit's own apsides: the error's precession */
            printf("  %-22s %+.3e rad/orbit\n", "apsidal drift (error)", res->apsidal_rate);
        }
    }
}

/* Growth laws, then what the run cost and its fingerprint. */
static void print_cost(const pb_case_spec *spec, const pb_case_result *res)
{
    const pb_problem *p = &spec->problem;
    print_growth("growth: position", &res->g_pos, p->period);
    print_growth("growth: along-track", &res->g_along, p->period);
    if (p->energy)
        print_growth("growth: energy", &res->g_energy, p->period);
    printf("  %-22s %ld steps, %ld evaluations, %ld rejected", "cost", res->steps, res->evals, res->rejected);
    if (res->startup_steps)
        printf(", %ld start-up", res->startup_steps);
    printf("\n");
    if ((spec->method->flags & PB_KIND_ADAPTIVE) && res->output_cut > 0)
        printf("  %-22s the last step was shortened to end on the horizon (samples never\n"
               "  %-22s shorten a step: they are taken on the method's dense output)\n",
               "last step", "");
    if (isfinite(res->ns_per_step) && res->timing_repeats > 0)
        printf("  %-22s %.1f ns/step, %.1f ns/evaluation (thread CPU time; %d repeats,\n"
               "  %-22s spread %.1f%%: interquartile range over median)\n", "timing (median)",
               res->ns_per_step, res->ns_per_eval, res->timing_repeats, "",
               100 * res->ns_per_step_spread);
    if (res->projected_s > 0)
        printf("  %-22s %.3g s at %.3g us per evaluation\n", "projected cost", res->projected_s, spec->eval_cost_us);
    printf("  %-22s %s\n", "fingerprint", res->fingerprint);
}

void pb_cli_print_case(const pb_case_spec *spec, const pb_case_result *res)
{
    print_units u = print_units_of(&spec->problem);
    print_setup(spec, res, &u);
    print_accuracy(spec, res, &u);
    print_cost(spec, res);
}
