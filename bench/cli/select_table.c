/* select_table.c - `propbench select`'s ranking table: a row a method, a
 * column for each bound asked beyond position and energy, and the notes
 * under it (see select_table.h). */
#include <math.h>
#include <stdio.h>
#include "bench/cli/select_table.h"

/* The columns beyond position and energy error: the other bounds asked for. */
typedef struct select_cols {
    int n, km;
    const char *head[6];
    int which[6];   /* 0 vel, 1 radial, 2 along, 3 cross, 4 angmom */
} select_cols;

static void select_columns(const pb_requirement *req, int km, select_cols *c)
{
    c->n = 0;
    c->km = km;
    const double b[5] = {req->max_vel_err, req->max_radial, req->max_along, req->max_cross, req->max_angmom_rel};
    const char *h[5] = {km ? "vel [m/s]" : "vel err", km ? "radial [m]" : "radial err",
                        km ? "along [m]" : "along err", km ? "cross [m]" : "cross err", "angmom err"};
    for (int k = 0; k < 5; k++)
        if (b[k] > 0) {
            c->head[c->n] = h[k];
            c->which[c->n++] = k;
        }
}

static double select_col_value(const select_cols *c, int k, const pb_select_answer *r)
{
    double u = c->km ? 1e3 : 1, v[5] = {u * r->vel_err_max, u * r->radial_max, u * r->along_max,
                                        u * r->cross_max, r->angmom_rel_max};
    if (r->below_floor && c->which[k] >= 1 && c->which[k] <= 3)
        return NAN;
    return v[c->which[k]];
}

/* The ranking table: one row a method, found ones ranked first. */
static void select_print_rows(const pb_selection *sel, int m, const select_cols *c)
{
    int km = c->km;
    printf("%4s %-16s %-18s %10s %10s %12s", "rank", "method", "setting", km ? "step [s]" : "step",
           "evals", km ? "pos err [m]" : "pos err");
    for (int k = 0; k < c->n; k++)
        printf(" %12s", c->head[k]);
    printf(" %12s %10s %12s\n", "energy err", "ns/step", "projected s");
    int rank = 0;
    for (int i = 0; i < m; i++) {
        const pb_selection *s = &sel[i];
        char setting[40], step[24] = "-";
        if (!s->found) {
            printf("   - %-16s %s\n", s->method->name, s->note[0] ? s->note : "requirement not met");
            continue;
        }
        const pb_select_answer *r = &s->confirmed;
        if (s->method->flags & PB_KIND_FIXED) {
            snprintf(setting, sizeof setting, "%d steps/orbit", s->steps_per_orbit);
            snprintf(step, sizeof step, "%.4g", r->step_s);
        } else {
            snprintf(setting, sizeof setting, "tol %.3g", s->tolerance);
        }
        double pe = r->below_floor ? (double)NAN : (km ? 1e3 * r->pos_err_max : r->pos_err_max);
        char mname[40];
        snprintf(mname, sizeof mname, "%s%s", s->method->name, (s->method->flags & PB_FROM_GSL) ? "*" : "");
        printf("%4d %-16s %-18s %10s %10ld %12.3e", ++rank, mname, setting, step, r->evals, pe);
        for (int k = 0; k < c->n; k++)
            printf(" %12.3e", select_col_value(c, k, r));
        printf(" %12.3e %10.1f %12.4g\n", r->energy_rel_max, r->ns_per_step, s->projected_s);
    }
}

/* The notes under the table: GSL marks, the verdict. */
static void select_print_notes(const pb_selection *sel, int m, int found, int by_cost, double K)
{
    int gsl_shown = 0, pruned = 0;
    for (int i = 0; i < m; i++) {
        gsl_shown |= sel[i].found && (sel[i].method->flags & PB_FROM_GSL);
        pruned += pb_selection_pruned(&sel[i]);
    }
    if (gsl_shown)
        printf("(* GSL's stepper)\n");
    if (pruned)
        printf("%d method%s not searched to the end (over %g x the fewest evaluations of any answer):\n"
               "the ranks past that are not the full order; --prune-factor 0 searches every one\n",
               pruned, pruned > 1 ? "s" : "", K);
    if (!found)
        printf("NO METHOD meets the requirement over this horizon.\n");
    if (found && by_cost)
        /* the spread of an answer's ns per step from run to run on the
         * 2-core machine of the README's select section
         * (scripts/select-timing-spread.py) */
        printf("ns/step is measured here and now: an answer's moved by up to 1.7x from run to\n"
               "run on a 2-core test machine, so treat projected costs within 2x as ties and\n"
               "time the finalists with `propbench run` on the machine that will run them\n");
    if (found)
        printf("cheapest by %s: %s; reproduce it with\n  %s\n"
               "Benchmarks on idealised problems do not validate an operational propagator;\n"
               "confirm with the mission's own verification.\n",
               by_cost ? "projected cost" : "evaluations", sel[0].method->name, sel[0].command);
}

void pb_select_print_table(const pb_selection *sel, int m, const pb_requirement *req, int km,
                           int found, int by_cost, double K)
{
    select_cols c;
    select_columns(req, km, &c);
    select_print_rows(sel, m, &c);
    select_print_notes(sel, m, found, by_cost, K);
}
