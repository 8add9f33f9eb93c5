/* select.c - integrator selection by search and confirmation (see select.h).
 * The search runs on one axis of "fineness" x and keeps every run's outcome
 * (memo), so no setting runs twice. Its answers are those of plain
 * bisection whenever the error is monotone in x: the points it tests lie on
 * the tree of settings bisection would test, and it stops only at a leaf
 * of that tree whose coarser end fails and finer end passes; the observed
 * order merely chooses which leaf to test first. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/study/select.h"
#include "bench/study/select_state.h"
#include "bench/measure/harness.h"

#define SELECT_MAX_SPO 1048576     /* 2^20 steps per orbit */
#define SELECT_STOP_FACTOR 2.0     /* stop when the order projects past 2x the last rung */
#define SELECT_MAX_JUMP 3          /* rungs the ladder may skip at once */
#define SELECT_MAX_MISSES 4        /* predictions that miss before plain bisection */
/* The answer's timing pass: at least 3 repeats and this much CPU time, and
 * no calibration kernel (select_spec). How far an answer's ns per step
 * moves from run to run, (max - min) / median over 6 warm selects of leo-j2
 * at 1 m, median over the 22 answers, this build against 6a7c272's (0.02 s
 * with the kernel), alternating (scripts/select-timing-spread.py): 0.32-0.35
 * against 0.27-0.44 on a busy machine, 0.04-0.07 against 0.03-0.04 on a
 * quiet one; the largest 0.20-0.70 against 0.49-0.61. The machine's load
 * sets the spread more than the repeats do, and the longer pass was most of
 * a warm select's CPU. */
#define SELECT_TIMING_MIN_CPU_S 0.002
#define SELECT_CAPPED (-2)         /* select_try: the run would pass the round's cap */
#define SELECT_FULL (-3)           /* select_try: the memo has no room for another setting */

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

static int memo_find(const select_state *st, double x)
{
    for (int i = 0; i < st->mm->n; i++)
        if (st->mm->x[i] == x)
            return i;
    return -1;
}

static void select_fill(pb_select_answer *a, const pb_case_result *r)
{
    memset(a, 0, sizeof *a);
    a->steps = r->steps;
    a->evals = r->evals;
    a->pos_err_max = r->pos_err_max;
    a->vel_err_max = r->vel_err_max;
    pb_requirement_components(r, &a->radial_max, &a->along_max, &a->cross_max);
    a->energy_rel_max = r->energy_rel_max;
    a->angmom_rel_max = r->angmom_rel_max;
    a->truth_floor_max = r->truth_floor_max;
    a->below_floor = r->below_floor;
    a->ns_per_step = r->ns_per_step;
    a->step_s = r->h;
    snprintf(a->fingerprint, sizeof a->fingerprint, "%s", r->fingerprint);
}

static void select_keep(select_state *st, double x, const pb_case_result *r)
{
    select_fill(&st->out->confirmed, r);
    st->mm->timed_x = x;
}

/* The case of setting x; timed: with the answer's timing pass. */
static pb_case_spec select_spec(const select_state *st, double x, int timed)
{
    pb_case_spec s = *st->base;
    s.method = st->m;
    s.repeats = 0; /* the search's trial runs need errors, not timings */
    if (timed) {
        pb_case_spec d;
        pb_case_spec_default(&d);
        s.repeats = st->base->repeats > 0 ? st->base->repeats : d.repeats;
        /* a ranking needs ns per step to a few per cent, not a sweep's
         * 0.2 s of repeats per case: that was 5.6 s of a 28-method select */
        s.timing_min_cpu_s = SELECT_TIMING_MIN_CPU_S;
        /* select states ns per step, never kernel units: no kernel after
         * each repeat (it took about 0.15 s of a 0.77 s warm select) */
        s.timing_uncalibrated = 1;
    }
    if (st->ax->fixed)
        s.steps_per_orbit = (int)x;
    else
        s.tolerance = select_tol(x);
    return s;
}

/* Run setting x (once: later calls answer from the memo); 1 pass, 0 fail,
 * -1 could not run, SELECT_CAPPED when its forecast evaluations pass the
 * cap (not run). timed: run it with a timing pass and keep it as the
 * answer's candidate (the answer's projected cost needs its ns per step). */
static int select_try(select_state *st, double x, int timed)
{
    int i = memo_find(st, x);
    if (i >= 0 && (!timed || st->mm->timed_x == x))
        return st->mm->ok[i];
    if (i < 0 && st->mm->n == PB_SELECT_MEMO)
        return SELECT_FULL;
    if (i < 0 && !timed && st->cap > 0 && pb_select_forecast(st, x, 0) > st->cap)
        return SELECT_CAPPED;
    pb_case_spec s = select_spec(st, x, timed);
    pb_case_result r;
    st->mm->runs++;
    if (pb_case_run(&s, &r))
        return -1;
    double q = pb_requirement_ratio(st->req, &r);
    if (i < 0) {
        i = st->mm->n++;
        st->mm->x[i] = x;
        st->mm->q[i] = q;
        st->mm->ok[i] = q <= 1;
        st->mm->usable[i] = r.status == PB_OK && !r.saturated && !r.below_floor && isfinite(q) && q > 0;
        st->mm->done[i] = r.status == PB_OK;
        select_fill(&st->mm->ans[i], &r);
        st->mm->steps_done[i] = r.steps + r.startup_steps;
    }
    if (timed)
        select_keep(st, x, &r);
    pb_case_result_free(&r);
    return st->mm->ok[i];
}

/* The observed order between settings x1 < x2 (memo entries i, j): the
 * slope of -log q against log x; NaN when either ratio is not an error. */
static double select_order(const select_state *st, int i, int j)
{
    if (i < 0 || j < 0 || !st->mm->usable[i] || !st->mm->usable[j] || st->mm->x[i] == st->mm->x[j])
        return NAN;
    return -log(st->mm->q[j] / st->mm->q[i]) / log(st->mm->x[j] / st->mm->x[i]);
}

/* Where the ratio reaches 1 by the order between entries i and j, from j. */
static double select_predict(const select_state *st, int i, int j, double *order)
{
    double p = select_order(st, i, j);
    *order = p;
    if (!(p > 0.25))
        return NAN;
    return st->mm->x[j] * pow(st->mm->q[j], 1.0 / p);
}

/* The rungs of the ladder: first * grow^k for k = 0 .. count - 1 (by
 * repeated products, as the settings were always made). */
static double select_rung(const select_axis *ax, int k)
{
    double x = ax->first;
    while (k-- > 0)
        x *= ax->grow;
    return x;
}

static int select_rungs(const select_axis *ax)
{
    int n = 0;
    for (double x = ax->first; x <= ax->last * (1 + 1e-9); x *= ax->grow)
        n++;
    return n;
}

/* After rung k failed: the rung to try next, or -1 when the observed order
 * (over the last two usable failing rungs, not rising against the pair
 * before) projects the answer past SELECT_STOP_FACTOR x the last rung. */
static int select_next_rung(select_state *st, const int *at, int k, int nr)
{
    int j1 = -1, j2 = -1;
    for (int j = k - 1; j >= 0 && j2 < 0; j--)
        if (at[j] >= 0 && st->mm->usable[at[j]]) {
            if (j1 < 0) j1 = j; else j2 = j;
        }
    double p, xs = j1 >= 0 ? select_predict(st, at[j1], at[k], &p) : (double)NAN;
    if (!isfinite(xs)) /* an error that says nothing (saturated, failed): two rungs on */
        return st->mm->usable[at[k]] || k + 2 > nr - 1 ? k + 1 : k + 2;
    double p_old = j2 >= 0 ? select_order(st, at[j2], at[j1]) : (double)NAN;
    double top = select_rung(st->ax, nr - 1);
    /* only a step budget stops the search: an adaptive method's error
     * against its tolerance wanders too much to project (rkn12's slope is
     * 0.5 at loose tolerances and near 1 at tight ones) */
    if (st->ax->fixed && xs > SELECT_STOP_FACTOR * top && p <= 1.05 * p_old) {
        st->out->order = p;
        st->out->reason = "order_projection";
        snprintf(st->out->note, sizeof st->out->note, "observed order %.2f projects %.3g steps per "
                 "orbit, past the last rung the step budget allows (%.0f)", p, xs, top);
        return -1;
    }
    int kj = k + 1;
    while (kj < nr - 1 && kj < k + SELECT_MAX_JUMP && select_rung(st->ax, kj) < xs * (1 - 1e-9))
        kj++;
    return kj;
}

/* The ladder jumped to rung k, past the cap: the finest rung it skipped
 * that the cap allows is run instead, so that a method costlier than the
 * cheapest answer meets a failing run that says so. The search later
 * reads it from the memo only where it would have run it itself (a rung
 * the ladder steps back to), so it changes no decision. */
static void select_probe(select_state *st, const int *at, int k)
{
    int j = k - 1;
    while (j > 0 && at[j] < 0 && memo_find(st, select_rung(st->ax, j)) < 0 &&
           pb_select_forecast(st, select_rung(st->ax, j), 0) > st->cap)
        j--;
    if (j > 0 && at[j] < 0 && memo_find(st, select_rung(st->ax, j)) < 0)
        select_try(st, select_rung(st->ax, j), 0);
}

/* The coarse ladder: *lo the finest rung known to fail (0: none), *hi the
 * coarsest known to pass (0: none), adjacent rungs when both are set.
 * -1 when a case could not be run, SELECT_CAPPED at the cap, 1 when it
 * stopped on the order. */
static int select_ladder(select_state *st, double *lo, double *hi)
{
    int nr = select_rungs(st->ax), at[64];
    *lo = *hi = 0;
    if (nr > 64)
        nr = 64;
    for (int j = 0; j < nr; j++)
        at[j] = -1;
    int k = 0;
    while (k >= 0 && k < nr) {
        double x = select_rung(st->ax, k);
        int ok = select_try(st, x, 0);
        if (ok == SELECT_CAPPED)
            select_probe(st, at, k);
        if (ok < 0)
            return ok;
        at[k] = memo_find(st, x);
        if (ok) {
            *hi = x;
            if (k == 0 || (at[k - 1] >= 0 && !st->mm->ok[at[k - 1]])) {
                *lo = k > 0 ? select_rung(st->ax, k - 1) : 0;
                return 0;
            }
            k--; /* past the answer's rung: step back */
            continue;
        }
        *lo = x;
        if (k + 1 < nr && at[k + 1] >= 0) {
            *hi = select_rung(st->ax, k + 1);
            return 0;
        }
        if (k == nr - 1)
            return 0;
        if ((k = select_next_rung(st, at, k, nr)) < 0)
            return 1;
    }
    return 0;
}

/* Descend the tree of settings bisection of (L, H) would test, taking a
 * tested node by its outcome and an untested one by the prediction xs
 * (passes when >= xs). probe: stop at the first untested node and return
 * it (0 when the leaf is reached). The leaf is (*a, *b). */
static double select_descend(const select_state *st, double L, double H, double xs, int probe,
                             double *a, double *b)
{
    const select_axis *ax = st->ax;
    double lo = L, hi = H;
    while (hi > ax->close * lo) {
        double mid = select_snap(ax, sqrt(lo * hi));
        if (!(mid > lo && mid < hi))
            break;
        int i = memo_find(st, mid);
        if (i < 0 && probe) {
            *a = lo;
            *b = hi;
            return mid;
        }
        int pass = i >= 0 ? st->mm->ok[i] : mid >= xs;
        if (pass) hi = mid; else lo = mid;
    }
    *a = lo;
    *b = hi;
    return 0;
}

/* The tightest bracket the runs in [L, H] give: *ia the finest failing run
 * below *ib, the coarsest passing one (memo indices, -1: none). */
static void select_bracket(const select_state *st, double L, double H, int *ia, int *ib)
{
    *ia = *ib = -1;
    for (int i = 0; i < st->mm->n; i++)
        if (st->mm->ok[i] && st->mm->x[i] >= L && st->mm->x[i] <= H && (*ib < 0 || st->mm->x[i] < st->mm->x[*ib]))
            *ib = i;
    for (int i = 0; i < st->mm->n && *ib >= 0; i++)
        if (!st->mm->ok[i] && st->mm->x[i] >= L && st->mm->x[i] < st->mm->x[*ib] && (*ia < 0 || st->mm->x[i] > st->mm->x[*ia]))
            *ia = i;
}

/* The secant's prediction over the bracket (ia, ib); when the same end
 * has moved twice running, the other (stale) end's log ratio is halved
 * (the Illinois rule), which keeps regula falsi from creeping. */
static double select_secant(const select_state *st, int ia, int ib, int stale_a, int stale_b, double *p)
{
    *p = NAN;
    if (ia < 0 || ib < 0 || !st->mm->usable[ia] || !st->mm->usable[ib])
        return NAN;
    double la = log(st->mm->q[ia]) / (stale_a ? 2 : 1), lb = log(st->mm->q[ib]) / (stale_b ? 2 : 1);
    double order = -(lb - la) / log(st->mm->x[ib] / st->mm->x[ia]);
    if (!(order > 0.25))
        return NAN;
    *p = order;
    return st->mm->x[ia] * exp(la / order);
}

/* Narrow (L, *hi) (L fails, *hi passes, both run) to a leaf of bisection's
 * tree whose coarser end fails and finer end passes: the leaf the secant
 * over the tightest bracket predicts is tested at its finer end, then at
 * its coarser end;
 * after SELECT_MAX_MISSES misses, plain bisection. *hi becomes the answer;
 * -1 when a case could not be run, SELECT_CAPPED at the cap. */
static int select_narrow(select_state *st, double L, double *hi)
{
    double H = *hi, a, b, p;
    int misses = 0, ia, ib, moved = 0, run = 0; /* moved: -1 the fail end, +1 the pass end */
    for (;;) {
        select_bracket(st, L, H, &ia, &ib);
        double xs = select_secant(st, ia, ib, run >= 2 && moved > 0, run >= 2 && moved < 0, &p);
        if (isfinite(p))
            st->out->order = p;
        if (misses >= SELECT_MAX_MISSES || !isfinite(xs)) {
            double mid = select_descend(st, L, H, 0, 1, &a, &b);
            if (!(mid > 0)) {
                *hi = b; /* every node on the way run: bisection's own leaf */
                return 0;
            }
            int ok = select_try(st, mid, 0);
            if (ok < 0)
                return ok;
            continue;
        }
        select_descend(st, L, H, xs, 0, &a, &b);
        /* untimed: a timing pass costs far more than a metric pass (a floor
         * of CPU time), so only the answer is timed, once it is known */
        int ok = select_try(st, b, 0);
        if (ok < 0 || (ok && (ok = select_try(st, a, 0)) < 0))
            return ok;
        int side = st->mm->ok[memo_find(st, b)] ? (ok ? +1 : 0) : -1;
        if (side == 0) {
            *hi = b; /* the coarser end fails, the finer passes */
            return 0;
        }
        run = side == moved ? run + 1 : 1;
        moved = side;
        misses++;
    }
}

/* No answer: say why in out (note and reason). */
static void select_not_met(select_state *st, double lo)
{
    pb_selection *out = st->out;
    if (out->reason)
        return;
    if (!(lo > 0)) {
        out->reason = "budget";
        snprintf(out->note, sizeof out->note, "the horizon is too long for the step budget "
                 "(%.0g steps a case)", PB_SELECT_MAX_STEPS);
    } else {
        out->reason = "not_met";
        if (st->ax->fixed)
            snprintf(out->note, sizeof out->note, "no step up to %.0f per orbit meets it", lo);
        else
            snprintf(out->note, sizeof out->note, "no tolerance down to %.0e meets it", select_tol(lo));
    }
}

/* Confirmation rounds: the answer's 10% finer neighbour must pass too; past
 * a dip, a new bracket from the neighbour to jump x it. 1 confirmed, 0 not
 * (note set), -1 a case could not be run, SELECT_CAPPED at the cap. */
static int select_confirm(select_state *st, double lo, double *hi)
{
    const select_axis *ax = st->ax;
    int ok;
    for (int round = 0; round < 4; round++) {
        if (lo > 0 && (ok = select_narrow(st, lo, hi)) < 0)
            return ok;
        double nb = select_snap(ax, 1.1 * *hi);
        if ((ok = select_try(st, nb, 0)) < 0)
            return ok;
        if (ok)
            return 1;
        lo = nb;
        *hi = select_snap(ax, fmin(ax->jump * nb, ax->last)); /* within the budget */
        if (!(*hi > lo))
            break;
        if ((ok = select_try(st, *hi, 0)) <= 0) {
            if (ok == 0) {
                st->out->reason = "not_monotone";
                snprintf(st->out->note, sizeof st->out->note, "errors are not monotone in the %s near %.3g",
                         ax->fixed ? "step" : "tolerance", ax->fixed ? nb : 1.0 / nb);
            }
            return ok;
        }
    }
    st->out->reason = "not_monotone";
    snprintf(st->out->note, sizeof st->out->note, "no answer whose 10%%-finer neighbour also passes "
             "(errors not monotone in the %s)", ax->fixed ? "step" : "tolerance");
    return 0;
}

/* The answer x with its ns per step: its metric run is in the memo (a run
 * is deterministic, so running it again gives the same figures), and only
 * the timing pass is run; a setting not in the memo is run whole. */
static int select_time_answer(select_state *st, double x)
{
    int i = memo_find(st, x);
    if (i < 0)
        return select_try(st, x, 1);
    pb_case_spec s = select_spec(st, x, 1);
    pb_case_result r;
    memset(&r, 0, sizeof r);
    st->mm->runs++;
    if (pb_case_time_only(&s, st->mm->steps_done[i], &r))
        return -1;
    st->out->confirmed = st->mm->ans[i];
    st->out->confirmed.ns_per_step = r.ns_per_step;
    st->mm->timed_x = x;
    return st->mm->ok[i];
}

static int select_search(select_state *st)
{
    double lo, hi;
    int rc = select_ladder(st, &lo, &hi);
    if (rc < 0)
        return rc;
    if (!(hi > 0)) {
        select_not_met(st, lo);
        return 0;
    }
    if ((rc = select_confirm(st, lo, &hi)) <= 0)
        return rc;
    int ok = select_time_answer(st, hi);
    if (ok < 0)
        return -1;
    if (!ok) {
        st->out->reason = "not_monotone";
        snprintf(st->out->note, sizeof st->out->note, "the answer failed its confirming run");
        return 0;
    }
    st->out->found = 1;
    st->out->reason = NULL;
    if (st->ax->fixed)
        st->out->steps_per_orbit = (int)hi;
    else
        st->out->tolerance = select_tol(hi);
    return 0;
}

int pb_select_method(const pb_case_spec *base, const pb_method_type *m,
                     const pb_requirement *req, double cap_evals, pb_select_memo *memo,
                     pb_selection *out)
{
    int index = out->index;
    memset(out, 0, sizeof *out);
    out->method = m;
    out->index = index;
    out->order = NAN;
    select_axis ax;
    if (m->flags & PB_KIND_FIXED) {
        /* doubling from 4 steps per orbit, within a budget of steps per case */
        double last = fmin(SELECT_MAX_SPO, floor(PB_SELECT_MAX_STEPS * pb_case_scale(base) /
                                                 pb_case_horizon(base)));
        ax = (select_axis){1, 4, 2, last, 1.0, 2}; /* bisect to adjacent whole numbers */
    } else {
        ax = (select_axis){0, 1e3, 10, 1e14, 1.1, 10};
    }
    select_state st = {.base = base, .m = m, .ax = &ax, .req = req, .out = out, .mm = memo,
                       .cap = cap_evals};
    int rc = select_search(&st);
    out->runs = memo->runs;
    out->est_evals = pb_select_estimate(&st);
    if (rc == SELECT_CAPPED) {
        out->found = 0;
        out->deferred = 1;
        out->reason = "deferred";
        snprintf(out->note, sizeof out->note, "stopped at the round's cap of %.3g evaluations a run",
                 cap_evals);
        return 0;
    }
    if (rc < 0) {
        out->found = 0;
        out->reason = "could_not_run";
        snprintf(out->note, sizeof out->note, rc == SELECT_FULL ? "the search ran out of room for its "
                 "runs (%d settings)" : "the case could not be run", PB_SELECT_MEMO);
    }
    if (out->found) {
        const pb_select_answer *r = &out->confirmed;
        double ns = isfinite(r->ns_per_step) ? r->ns_per_step : 0;
        out->projected_s = 1e-6 * base->eval_cost_us * (double)r->evals + 1e-9 * ns * (double)r->steps;
    }
    return rc;
}

void pb_selection_free(pb_selection *s)
{
    (void)s; /* the selection holds no memory today; kept for its callers */
}
