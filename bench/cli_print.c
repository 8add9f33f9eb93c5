/* cli_print.c - the short human-readable table of one case. */
#include <math.h>
#include <stdio.h>
#include "cli.h"
#include "harness.h"

static void print_growth(const char *what, const pb_growth *g)
{
    if (isfinite(g->k))
        printf("  %-22s k = %5.2f +- %.2f  (%s, %d samples)\n", what, g->k, g->k_err, g->cls, g->npoints);
    else
        printf("  %-22s not enough samples after 10 periods to fit\n", what);
}

static void print_err(const char *label, double x, const char *unit, int below)
{
    if (below)
        printf("  %-22s below the reference floor\n", label);
    else if (isfinite(x))
        printf("  %-22s %.3e %s\n", label, x, unit);
    else
        printf("  %-22s n/a\n", label);
}

static void print_invariant(const char *label, double mx, double fin)
{
    printf("  %-22s max %.3e   final ", label, mx);
    if (isfinite(fin))
        printf("%.3e\n", fin);
    else
        printf("n/a\n");
}

void pb_cli_print_case(const pb_case_spec *spec, const pb_case_result *res)
{
    const pb_problem *p = &spec->problem;
    int km = p->units == PB_UNITS_KM_S;
    const char *L = km ? "km" : "DU";
    printf("case %s\n", res->id);
    printf("  %-22s %s (%s units)\n", "problem", p->name, km ? "km-s" : "normalized");
    printf("  %-22s %s%s, order %d\n", "method", spec->method->name,
           (spec->method->flags & PB_FROM_GSL) ? " (GSL's)" : "", spec->method->order);
    if ((spec->method->flags & PB_KIND_FIXED) && p->period > 0)
        printf("  %-22s h = %.6g (%.6g steps per orbit)%s\n", "step", res->h, p->period / res->h,
               spec->compensated ? ", compensated" : "");
    else if (spec->method->flags & PB_KIND_FIXED)
        printf("  %-22s h = %.6g%s\n", "step", res->h, spec->compensated ? ", compensated" : "");
    else
        printf("  %-22s %.3g\n", "tolerance", spec->tolerance);
    if (p->period > 0 && spec->orbits > 0)
        printf("  %-22s %g orbits (%.6g time units)\n", "horizon", spec->orbits, pb_case_horizon(spec));
    else if (p->period > 0)
        printf("  %-22s %.6g time units (%.4g orbits)\n", "horizon", pb_case_horizon(spec),
               pb_case_horizon(spec) / p->period);
    else
        printf("  %-22s %.6g time units\n", "horizon", pb_case_horizon(spec));
    if (res->status)
        printf("  %-22s %s: %s at t = %.9g%s\n", "status", res->status_name, pb_strerror(res->status),
               res->diverged_at, p->period > 0 ? "" : "");
    else
        printf("  %-22s ok\n", "status");
    if (p->energy)
        print_invariant(p->energy_label ? p->energy_label : "energy", res->energy_rel_max,
                        res->energy_rel_final);
    if (p->angmom)
        print_invariant(p->angmom_label ? p->angmom_label : "angular momentum", res->angmom_rel_max,
                        res->angmom_rel_final);
    print_err("position error, max", res->pos_err_max, L, res->below_floor);
    print_err("position error, final", res->pos_err_final, L, res->below_floor);
    if (km && !res->below_floor)
        printf("  %-22s %.3f m (max %.3f m)\n", "  in metres", 1e3 * res->pos_err_final, 1e3 * res->pos_err_max);
    printf("  %-22s radial %+.3e  along %+.3e  cross %+.3e %s\n", "final RIC error",
           res->radial_final, res->along_final, res->cross_final, L);
    print_err("velocity error, final", res->vel_err_final, km ? "km/s" : "DU/TU", 0);
    if (p->keplerian) {
        printf("  %-22s %.3e\n", "ecc-vector drift, max", res->ecc_drift_max);
        if (isfinite(res->apsidal_rate))
            printf("  %-22s %+.3e rad/orbit\n", "apsidal precession", res->apsidal_rate);
    }
    print_growth("growth: position", &res->g_pos);
    print_growth("growth: along-track", &res->g_along);
    if (p->energy)
        print_growth("growth: energy", &res->g_energy);
    printf("  %-22s %ld steps, %ld evaluations, %ld rejected", "cost", res->steps, res->evals, res->rejected);
    if (res->startup_steps)
        printf(", %ld start-up", res->startup_steps);
    printf("\n");
    if (isfinite(res->ns_per_step))
        printf("  %-22s %.1f ns/step, %.1f ns/evaluation\n", "timing (median)", res->ns_per_step, res->ns_per_eval);
    if (res->projected_s > 0)
        printf("  %-22s %.3g s at %.3g us per evaluation\n", "projected cost", res->projected_s, spec->eval_cost_us);
    printf("  %-22s %s\n", "fingerprint", res->fingerprint);
}
