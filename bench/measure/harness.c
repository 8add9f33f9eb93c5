/* harness.c - one case: a metric pass and a separate timing pass.
 * Invariant of the metric pass: the observer sees every accepted step, keeps
 * running maxima of the invariant errors (global and since the last sample)
 * and stops the integration when the orbit leaves the region it started in;
 * metrics against truth are computed only at the planned sample times. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/measure/harness.h"
#include "bench/measure/force_counter.h"
#include "bench/measure/fingerprint.h"
#include "bench/measure/growth.h"
#include "bench/measure/metrics.h"
#include "bench/measure/sampler.h"
#include "bench/measure/segments.h"
#include "bench/measure/timing.h"
#include "problems/summary.h"
#include "problems/truth.h"

/* An orbit this many times farther out than where it started has escaped:
 * reported as diverged, with the time. */
#define HARNESS_ESCAPE_FACTOR 1e3
/* A relative energy error above this ends the case as diverged. */
#define HARNESS_ENERGY_DIVERGED 1.0

typedef struct harness_watch {
    const pb_problem *p;
    double E0, E_scale, H0, H_scale, r_limit;
    double E_diverged;        /* |E - E0| past which the case has diverged */
    double r2_limit;          /* r_limit squared: the escape test on |r|^2 */
    /* running maxima of |E - E0| and |H - H0|, unscaled: dividing by a positive
     * scale is monotonic in correctly rounded arithmetic, so the scaled maximum
     * is the maximum scaled, and the division is made once, at a sample */
    double de_win, dh_win;    /* since the last sample */
    double de_fit, dh_fit;    /* since the last log-grid sample: the fits' windows */
    double e_max, h_max;      /* scaled, over the samples' windows so far */
    double t_escape;
    const char *why;          /* which divergence test stopped the run */
    /* sampling: after every step, the samples inside it from dense output */
    const pb_method_type *m;
    void *ws;
    const pb_sample_plan *plan;
    const pb_truth *truth;
    pb_case_result *res;
    double horizon;
    int k;                    /* next sample */
    double ap_raw, ap_unwrapped;
    int ap_have;
    const pb_force_counter *counter;
    long dense_evals;         /* evaluations spent inside dense output */
    const pb_case_spec *spec; /* its progress callback, if any */
    long nstep;
} harness_watch;

static int harness_take_samples(harness_watch *w, double t);

/* After every step: no square root and no division (the bounds are
 * squared or scaled once, in harness_watch_init). */
static int harness_observe(void *ctx, double t, const double *r, const double *v)
{
    harness_watch *w = ctx;
    const pb_problem *p = w->p;
    double de = 0;
    if (w->spec && w->spec->progress && !(++w->nstep & 0xFFFF))
        w->spec->progress(w->spec->progress_ctx, (t - p->t0) / w->horizon, w->nstep);
    /* a fixed-step method's last step may end past the horizon: that state
     * is not part of the case (the horizon's own sample, on dense output, is) */
    int inside = !w->plan || w->plan->n < 1 || t <= w->plan->t[w->plan->n - 1];
    /* where the force itself changes the invariants, their errors exist only
     * against the truth, at the samples (harness_take_samples) */
    int own = !p->invariants_from_truth;
    if (own && p->energy) {
        de = fabs(p->energy(p, t, r, v) - w->E0);
        if (inside && de > w->de_win) w->de_win = de;
        if (inside && de > w->de_fit) w->de_fit = de;
    }
    if (own && p->angmom) {
        double dh = fabs(p->angmom(p, r, v) - w->H0);
        if (inside && dh > w->dh_win) w->dh_win = dh;
        if (inside && dh > w->dh_fit) w->dh_fit = dh;
    }
    /* an energy error of 100% means the orbit is no longer the problem's
     * (a bound orbit has become unbound, or the reverse) */
    if (own && p->energy && !(de <= w->E_diverged)) {
        w->t_escape = t;
        w->why = "relative energy error passed 100%";
        return PB_EDIVERGED;
    }
    double r2 = 0;
    for (int i = 0; i < p->dim; i++)
        r2 += r[i] * r[i];
    if (!(r2 <= w->r2_limit)) {
        w->t_escape = t;
        w->why = "the orbit escaped to 1000 times its initial size";
        return PB_EDIVERGED;
    }
    return w->plan ? harness_take_samples(w, t) : 0;
}

const char *pb_case_status_name(int status)
{
    /* "diverged" covers every way the numbers went wrong (non-finite, escape,
     * step collapse, no convergence); status_detail says which. A failure of
     * the set-up or of memory is not a numerical outcome: "crashed". */
    switch (status) {
    case PB_OK: return "ok";
    case PB_EMAXSTEPS: return "max_steps";
    case PB_EINVAL:
    case PB_ENOMEM: return "crashed";
    default: return "diverged";
    }
}

static void harness_config(const pb_case_spec *spec, double horizon, pb_method_config *cfg)
{
    memset(cfg, 0, sizeof *cfg);
    cfg->time_scale = pb_case_scale(spec);
    cfg->mu = pb_problem_kepler_mu(&spec->problem);
    cfg->compensated = spec->compensated;
    if (spec->method->flags & PB_KIND_FIXED) {
        cfg->h = pb_case_step(spec);
        /* 5% over the grid's count: a method stepping in a fictitious time
         * (leapfrog-tt, gauss-jackson8-s, a regularised formulation) takes
         * N steps per Kepler orbit of its start, not exactly horizon / h */
        double grid = ceil(1.05 * horizon / cfg->h) + 16;
        cfg->max_steps = spec->max_steps > 0 ? spec->max_steps
                         : grid < 0x1p62 ? (long)grid : 1L << 62;  /* no float-cast overflow */
    } else {
        /* rtol = atol = tolerance: the weighted norm is then relative for the
         * O(1)-and-larger state components of both unit systems */
        cfg->rtol = spec->tolerance;
        cfg->atol = spec->tolerance;
        /* the horizon bounds it too: a near-escape ellipse's period can be
         * 1e20 times a short horizon, and a floor above the horizon would
         * end the case before its first step */
        cfg->min_step = 1e-13 * fmin(cfg->time_scale, horizon);
        cfg->max_steps = spec->max_steps > 0 ? spec->max_steps : 50000000L;
    }
}

/* The initial distance |r0| and the osculating semi-major axis of a bound
 * Keplerian orbit (0 otherwise), from the problem's own facts (summary.c). */
static double harness_orbit_size(const pb_problem *p, double *a)
{
    double r2 = 0;
    for (int i = 0; i < p->dim; i++)
        r2 += p->r0[i] * p->r0[i];
    pb_problem_facts f;
    *a = (pb_problem_summary(p, &f) == PB_OK && f.a > 0) ? f.a : 0;
    return sqrt(r2);
}

/* Size of the orbit: the larger of |r0| and the semi-major axis. */
static double harness_length_scale(const pb_problem *p)
{
    double a, r = harness_orbit_size(p, &a);
    return fmax(r, a);
}

static void harness_summarise(const pb_case_spec *spec, pb_case_result *res)
{
    int n = res->nsamples;
    double *t = malloc((size_t)(n > 0 ? n : 1) * sizeof(double));
    double *y = malloc((size_t)(n > 0 ? n : 1) * sizeof(double));
    double scale = pb_case_scale(spec);
    double t_fit = spec->problem.period > 0 ? 10.0 * scale : 0.0;
    /* with no sample there is no error to report: NaN (null in JSON), never 0 */
    double none = n > 0 ? 0 : NAN;
    res->pos_err_max = res->vel_err_max = res->ecc_drift_max = none;
    res->energy_rel_final = res->angmom_rel_final = res->pos_err_final = res->vel_err_final = NAN;
    res->radial_final = res->along_final = res->cross_final = res->apsidal_rate = NAN;
    res->truth_floor_max = 0;
    int below = 0;
    int nm = 0;
    for (int k = 0; k < n; k++) {
        pb_sample *s = &res->samples[k];
        /* maxima over the metric grid only: --samples adds plotted points */
        if (!s->in_metrics)
            continue;
        nm++;
        res->pos_err_max = fmax(res->pos_err_max, s->pos_err);
        res->vel_err_max = fmax(res->vel_err_max, s->vel_err);
        if (isfinite(s->ecc_drift))
            res->ecc_drift_max = fmax(res->ecc_drift_max, s->ecc_drift);
        res->truth_floor_max = fmax(res->truth_floor_max, s->truth_floor);
        if (s->truth_floor > 0 && s->pos_err < 10 * s->truth_floor)
            below++;
    }
    res->below_floor = nm > 0 && below == nm;
    res->saturated = n > 0 && res->pos_err_max > 0.1 * harness_length_scale(&spec->problem);
    int kl = n - 1;
    while (kl > 0 && !res->samples[kl].in_metrics)
        kl--; /* final values at the last metric-grid sample reached */
    if (n > 0) {
        pb_sample *last = &res->samples[kl];
        res->t_final = last->t;
        res->energy_rel_final = last->energy_rel;
        res->angmom_rel_final = last->angmom_rel;
        res->pos_err_final = last->pos_err;
        res->vel_err_final = last->vel_err;
        res->radial_final = last->radial;
        res->along_final = last->along;
        res->cross_final = last->cross;
        res->apsidal_rate = last->orbits > 0 ? last->apsis_angle / last->orbits : (double)NAN;
    }
    if (!t || !y)
        goto done;
    /* fits use the log-spaced samples only, so each decade weighs the same */
    int m = 0;
    for (int k = 0; k < n; k++)
        if (res->samples[k].on_log_grid)
            t[m++] = res->samples[k].t - spec->problem.t0;
    /* once a position error reaches a tenth of the orbit's size the phase
     * error has saturated and a power law fitted through it means nothing */
    double ceiling = 0.1 * harness_length_scale(&spec->problem);
#define HARNESS_FIT(field, dest, absval, cap)                                   \
    do {                                                                        \
        int j = 0;                                                              \
        for (int k = 0; k < n; k++)                                             \
            if (res->samples[k].on_log_grid) {                                  \
                double x = res->samples[k].field;                               \
                x = (absval) ? fabs(x) : x;                                     \
                y[j++] = ((cap) > 0 && x > (cap)) ? (double)NAN : x;                    \
            }                                                                   \
        dest = pb_growth_fit(t, y, m, t_fit);                                   \
        if (dest.npoints < 3 && t_fit > scale)                                  \
            dest = pb_growth_fit(t, y, m, scale);                               \
    } while (0)
    HARNESS_FIT(pos_err, res->g_pos, 0, ceiling);
    HARNESS_FIT(along, res->g_along, 1, ceiling);
    HARNESS_FIT(energy_rel_fitwin, res->g_energy, 0, 0.0);
    HARNESS_FIT(angmom_rel_fitwin, res->g_angmom, 0, 0.0);
#undef HARNESS_FIT
done:
    free(t);
    free(y);
}

/* The invariants' starting values and the escape bound of the watch. */
static void harness_watch_init(harness_watch *w, const pb_problem *p, double horizon,
                               pb_case_result *res)
{
    memset(w, 0, sizeof *w);
    w->p = p;
    w->E0 = p->energy ? p->energy(p, p->t0, p->r0, p->v0) : (double)NAN;
    w->E_scale = p->energy ? pb_energy_scale(p, w->E0) : (double)NAN;
    res->energy_rel_to_parts = p->energy && w->E_scale != fabs(w->E0);
    w->H0 = p->angmom ? p->angmom(p, p->r0, p->v0) : (double)NAN;
    w->H_scale = p->angmom ? pb_angmom_scale(p, w->H0) : (double)NAN;
    if (!(w->H_scale > 0))
        w->H_scale = 1;
    double a, r0n = harness_orbit_size(p, &a);
    if (!p->exact)
        a = 0; /* the escape bound uses the apoapsis only where it is fixed: where the
                * flow is a conic, which is where a closed form exists */
    w->r_limit = HARNESS_ESCAPE_FACTOR * fmax(fmax(r0n, 2 * a), 1e-300);
    /* a hyperbolic orbit recedes by itself: allow for its speed over the horizon */
    if (p->energy && w->E0 >= 0)
        w->r_limit += HARNESS_ESCAPE_FACTOR * horizon * sqrt(2 * fabs(w->E0) + 2 * p->mu / r0n);
    /* the same tests as e <= 1 and |r| <= r_limit but for the last bit of the
     * bound's rounding, a factor 1e3 from anything a run meets */
    w->E_diverged = HARNESS_ENERGY_DIVERGED * w->E_scale;
    w->r2_limit = w->r_limit * w->r_limit;
}

/* The apsidal angle accumulates: unwrap it from sample to sample so a
 * precession past +-pi keeps its sign and size (samples are close enough
 * that the angle moves by less than pi between them). */
static void harness_unwrap(harness_watch *w, pb_sample *smp)
{
    if (!isfinite(smp->apsis_angle))
        return;
    double raw = smp->apsis_angle;
    if (w->ap_have)
        smp->apsis_angle = w->ap_unwrapped + remainder(raw - w->ap_raw, 2 * M_PI);
    w->ap_raw = raw;
    w->ap_unwrapped = smp->apsis_angle;
    w->ap_have = 1;
}

/* Close the invariant window at sample smp: the sample itself belongs to
 * the window it closes. */
static void harness_close_window(harness_watch *w, const pb_problem *p, pb_sample *smp)
{
    double e_win = p->energy ? w->de_win / w->E_scale : 0, h_win = w->dh_win / w->H_scale;
    smp->energy_rel_window = fmax(e_win, isfinite(smp->energy_rel) ? smp->energy_rel : 0);
    smp->angmom_rel_window = fmax(h_win, isfinite(smp->angmom_rel) ? smp->angmom_rel : 0);
    if (!p->energy) smp->energy_rel_window = NAN;
    if (!p->angmom) smp->angmom_rel_window = NAN;
    /* the running maxima cover every step and every metric-grid sample (a
     * sample on dense output lies between steps), so a maximum is never below
     * a final; plot-only samples stay out, as everywhere */
    w->e_max = fmax(w->e_max, e_win);
    w->h_max = fmax(w->h_max, h_win);
    if (smp->in_metrics && isfinite(smp->energy_rel))
        w->e_max = fmax(w->e_max, smp->energy_rel);
    if (smp->in_metrics && isfinite(smp->angmom_rel))
        w->h_max = fmax(w->h_max, smp->angmom_rel);
    w->de_win = w->dh_win = 0;
    /* the fits' windows run from one log-grid sample to the next over every
     * step, so extra plot samples cannot change a growth class */
    smp->energy_rel_fitwin = smp->angmom_rel_fitwin = NAN;
    if (smp->on_log_grid) {
        if (p->energy)
            smp->energy_rel_fitwin =
                fmax(w->de_fit / w->E_scale, isfinite(smp->energy_rel) ? smp->energy_rel : 0);
        if (p->angmom)
            smp->angmom_rel_fitwin =
                fmax(w->dh_fit / w->H_scale, isfinite(smp->angmom_rel) ? smp->angmom_rel : 0);
        w->de_fit = w->dh_fit = 0;
    }
}

/* Every sample time up to t (the end of the step just taken), measured on
 * the method's dense output: sample times never shorten a step, so the
 * integration is the same whatever the samples. */
static int harness_take_samples(harness_watch *w, double t)
{
    const pb_problem *p = w->p;
    const pb_sample_plan *plan = w->plan;
    for (; w->k < plan->n && plan->t[w->k] <= t; w->k++) {
        int k = w->k;
        double r[PB_DIM_MAX] = {0}, v[PB_DIM_MAX] = {0}, ts = plan->t[k];
        /* a dense output may evaluate the force (dop853's extra stages):
         * those evaluations serve the samples, not the integration, and the
         * timing pass never makes them, so they stay out of the cost */
        long before = w->counter ? w->counter->evals : 0;
        int s = w->m->dense(w->ws, ts, r, v);
        if (w->counter)
            w->dense_evals += w->counter->evals - before;
        if (s)
            return s;
        long double rt[PB_DIM_MAX], vt[PB_DIM_MAX];
        pb_truth_state(w->truth, k, rt, vt);
        pb_sample *smp = &w->res->samples[k];
        pb_metrics_sample(p, ts, r, v, rt, vt, w->E0, w->E_scale, w->H0, smp);
        harness_unwrap(w, smp);
        smp->orbits = p->period > 0 ? (ts - p->t0) / p->period : (ts - p->t0) / w->horizon;
        smp->on_log_grid = plan->on_log_grid[k];
        smp->in_metrics = plan->in_metrics[k];
        smp->truth_floor = pb_truth_floor(w->truth, k);
        for (int i = 0; i < PB_DIM_MAX; i++)
            smp->r[i] = r[i], smp->v[i] = v[i], smp->rt[i] = (double)rt[i], smp->vt[i] = (double)vt[i];
        harness_close_window(w, p, smp);
        /* where the force changes the energy, the per-step test against E0
         * is off; the truth's own energy at the samples stands in */
        if (p->invariants_from_truth && p->energy && !(smp->energy_rel <= HARNESS_ENERGY_DIVERGED)) {
            w->k++;
            w->t_escape = ts;
            w->why = "relative energy error against the truth's passed 100%";
            return PB_EDIVERGED;
        }
    }
    return 0;
}

/* Where the integration ends: the horizon for an adaptive method (it clamps
 * its last step); for a fixed-step one the first grid time at or past it,
 * the horizon itself then being reached by dense output. */
static double harness_integration_end(const pb_case_spec *spec, double horizon, double h)
{
    double t0 = spec->problem.t0;
    if (!(spec->method->flags & PB_KIND_FIXED) || !(h > 0))
        return t0 + horizon;
    /* with a manoeuvre on the way the last segment's step is cut to land on
     * the horizon (segments.h) */
    const pb_forces *f = &spec->problem.forces;
    for (int k = 0; k < f->n_manoeuvres; k++)
        if (f->manoeuvres[k].t > t0 && f->manoeuvres[k].t < t0 + horizon)
            return t0 + horizon;
    /* a horizon on the grid (to within the rounding the method itself
     * allows, pb_grid_index) is that grid time; else the next one */
    long n = pb_grid_index(t0, h, t0 + horizon);
    return t0 + (n >= 0 ? (double)n : ceil(horizon / h)) * h;
}

/* The metric pass: one advance to the integration's end; the observer
 * measures every sample on the way. Returns the integration's status;
 * res->nsamples is how many samples were reached. */
static int harness_metric_pass(const pb_case_spec *spec, const pb_method_config *cfg,
                               const pb_force *f, const pb_sample_plan *plan,
                               const pb_truth *truth, void *ws, harness_watch *w,
                               double horizon, double t_int_end, pb_method_stats *st,
                               int *first_start, pb_case_result *res)
{
    w->m = pb_case_method(spec);
    w->ws = ws;
    w->plan = plan;
    w->truth = truth;
    w->res = res;
    w->horizon = horizon;
    w->k = 0;
    int s = pb_case_integrate(spec, cfg, ws, f, t_int_end, harness_observe, w, st, first_start);
    res->nsamples = w->k;
    /* a run that reached its end has measured every sample: never a silent gap */
    if (s == PB_OK && w->k < plan->n)
        s = PB_EINVAL;
    return s;
}

/* How the integration ended (status s), the invariant maxima, the final
 * state and its fingerprint, and the counts. */
static void harness_ending(const pb_case_spec *spec, void *ws, const harness_watch *w,
                           const pb_force_counter *counter, const pb_method_stats *stp, int s,
                           pb_case_result *res)
{
    const pb_problem *p = &spec->problem;
    const pb_method_type *m = pb_case_method(spec);
    double r[PB_DIM_MAX] = {0}, v[PB_DIM_MAX] = {0}, t;
    res->status = s;
    res->status_name = pb_case_status_name(s);
    m->get_state(ws, &t, r, v);
    res->t_end = t;
    pb_method_stats st = *stp;
    if (s) {
        /* a step budget ends the case where the last step left it */
        res->diverged_at = s == PB_EDIVERGED ? w->t_escape
                         : s == PB_EMAXSTEPS ? t
                         : counter->saw_nonfinite ? counter->t_nonfinite : st.t_fail;
        res->status_detail = s == PB_EDIVERGED && w->why ? w->why
                           : counter->saw_nonfinite ? "the force became non-finite"
                           : pb_strerror(s);
    } else {
        res->status_detail = "ok";
    }
    res->energy_rel_max = p->energy ? fmax(w->e_max, w->de_win / w->E_scale) : (double)NAN;
    res->angmom_rel_max = p->angmom ? fmax(w->h_max, w->dh_win / w->H_scale) : (double)NAN;
    memcpy(res->final_r, r, sizeof r);
    memcpy(res->final_v, v, sizeof v);
    pb_fingerprint_state(t, r, v, p->dim, res->fingerprint, sizeof res->fingerprint);
    res->steps = st.steps;
    res->rejected = st.rejected;
    res->output_cut = st.output_cut;
    res->startup_steps = st.startup_steps;
    res->evals = counter->evals - w->dense_evals;
    res->projected_s = spec->eval_cost_us > 0 ? 1e-6 * spec->eval_cost_us * (double)res->evals : 0;
}

static int harness_reach_obs(void *ctx, double t, const double *r, const double *v)
{
    (void)r;
    (void)v;
    *(double *)ctx = t;
    return 0;
}

/* With the user's step budget (--max-steps) the method may stop far short of
 * the horizon, yet the truth was built for all of it (a stiff problem file:
 * 12.6 s of reference for a 10-step run). A first pass without samples,
 * bounded by that budget, finds where the method stops; the plan keeps the
 * samples up to there. The method is deterministic and the metric pass
 * stops at the same step or, on an escape, earlier. */
static void harness_bound_plan(const pb_case_spec *spec, const pb_method_config *cfg, void *ws,
                               double t_int_end, pb_sample_plan *plan)
{
    if (spec->max_steps <= 0)
        return;
    pb_force_counter counter;
    pb_force f;
    pb_force_counter_init(&counter, &spec->problem, &f);
    pb_method_stats st;
    double t = spec->problem.t0;
    if (pb_case_integrate(spec, cfg, ws, &f, t_int_end, harness_reach_obs, &t, &st, NULL) == PB_OK)
        return;
    while (plan->n > 0 && plan->t[plan->n - 1] > t)
        plan->n--;
}

/* The planned grid, or the caller's times; 0 or -1. */
static int harness_plan(const pb_case_spec *spec, double horizon, pb_sample_plan *plan)
{
    if (!spec->sample_times)
        return pb_sample_plan_make(spec->problem.t0, horizon, pb_case_scale(spec), 0,
                                   spec->linear_samples, plan);
    return pb_sample_plan_given(spec->sample_times, spec->nsample_times, spec->problem.t0,
                                horizon, pb_case_scale(spec), plan);
}

void pb_case_truth_warm(const pb_case_spec *spec)
{
    pb_sample_plan plan;
    pb_truth *truth = NULL;
    if (!spec->problem.exact_q || spec->max_steps > 0 ||
        harness_plan(spec, pb_case_horizon(spec), &plan))
        return;
    if (pb_truth_build(&spec->problem, plan.t, plan.n, NULL, &truth) == PB_OK)
        pb_truth_free(truth);
    pb_sample_plan_free(&plan);
}

int pb_case_run(const pb_case_spec *spec, pb_case_result *res)
{
    memset(res, 0, sizeof *res);
    res->status_name = "crashed";
    const pb_problem *p = &spec->problem;
    const pb_method_type *m = pb_case_method(spec);
    char err[256];
    if (pb_case_validate(spec, err, sizeof err))
        return PB_EINVAL;
    pb_case_id(spec, res->id, sizeof res->id);
    double horizon = pb_case_horizon(spec);
    pb_method_config cfg;
    harness_config(spec, horizon, &cfg);
    res->h = (m->flags & PB_KIND_FIXED) ? cfg.h : 0;

    pb_sample_plan plan;
    pb_truth *truth = NULL;
    void *ws = NULL;
    int rc = PB_ENOMEM;
    /* sample times are exact (t0 + elapsed), off any step grid: the method
     * reaches them by dense output */
    if (harness_plan(spec, horizon, &plan))
        return PB_ENOMEM;
    res->samples = calloc((size_t)plan.n, sizeof(pb_sample));
    if (!res->samples)
        goto out;
    double t_int_end = harness_integration_end(spec, horizon, res->h);
    if (!(ws = pb_case_alloc(spec)))
        goto out;
    harness_bound_plan(spec, &cfg, ws, t_int_end, &plan);
    /* the truth at the planned times, which do not depend on the step, so
     * that one cached reference serves every step size */
    if ((rc = pb_truth_build(p, plan.t, plan.n, spec->cache_dir, &truth)))
        goto out;
    /* t0 + n h may fall an ulp short of t0 + horizon: the horizon is then
     * that grid time, which the method reaches exactly; the truth follows it
     * there by a Taylor step of those few ulps */
    for (int k = plan.n - 1; k >= 0 && plan.t[k] > t_int_end; k--) {
        pb_truth_shift(truth, k, plan.t[k], t_int_end - plan.t[k], p);
        plan.t[k] = t_int_end;
    }
    harness_watch w;
    harness_watch_init(&w, p, horizon, res);
    w.spec = spec;
    pb_force_counter counter;
    pb_force f;
    pb_force_counter_init(&counter, p, &f);
    w.counter = &counter;
    pb_method_stats st;
    int started;
    int s = harness_metric_pass(spec, &cfg, &f, &plan, truth, ws, &w, horizon, t_int_end, &st,
                                &started, res);
    if ((rc = started))
        goto out;  /* the method refused its start: a set-up failure, not a result */
    harness_ending(spec, ws, &w, &counter, &st, s, res);
    double t_state = res->t_end;
    /* reached: the horizon itself (the last sample), or where the run ended */
    if (s == PB_OK && res->nsamples > 0)
        res->t_end = plan.t[res->nsamples - 1];
    harness_summarise(spec, res);
    res->ns_per_step = res->ns_per_eval = NAN;
    pb_case_time(spec, &cfg, t_state, res->steps + res->startup_steps, res);
    rc = PB_OK;
out:
    m->free(ws);
    pb_truth_free(truth);
    pb_sample_plan_free(&plan);
    if (rc) {
        free(res->samples);
        res->samples = NULL;
        res->nsamples = 0;
    }
    return rc;
}

int pb_case_time_only(const pb_case_spec *spec, long steps_done, pb_case_result *res)
{
    char err[256];
    if (pb_case_validate(spec, err, sizeof err))
        return PB_EINVAL;
    double horizon = pb_case_horizon(spec);
    pb_method_config cfg;
    harness_config(spec, horizon, &cfg);
    double h = (pb_case_method(spec)->flags & PB_KIND_FIXED) ? cfg.h : 0;
    res->ns_per_step = res->ns_per_eval = NAN;
    pb_case_time(spec, &cfg, harness_integration_end(spec, horizon, h), steps_done, res);
    return PB_OK;
}

void pb_case_result_free(pb_case_result *res)
{
    if (!res)
        return;
    free(res->samples);
    res->samples = NULL;
    res->nsamples = 0;
}
