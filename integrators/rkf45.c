/* rkf45.c - Runge-Kutta-Fehlberg 4(5), adaptive, first-order form y = (r, v).
 * Tableau: Fehlberg (1969), NASA TR R-315, the RKF4(5) pair. Step control: PI
 * controller (Gustafsson 1991; Hairer & Wanner, Solving ODEs II, Sec. IV.2);
 * starting step: Hairer, Norsett & Wanner, Solving ODEs I, Sec. II.4.
 * Advances with the 5th-order solution (local extrapolation, as GSL's rkf45).
 * Dense output: quintic Hermite of the step's ends, f at the new state being
 * evaluated as soon as a step is accepted (it is the next step's first stage). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/adaptive_setup.h"
#include "method.h"
#include "propbench/dense.h"

/* Which solution is propagated. Fehlberg's pair was built to advance with the
 * 4th-order weights; we advance with the 5th-order ones (local extrapolation),
 * as GSL's rkf45 and Dormand-Prince practice do. The difference of the two is
 * still an estimate of the local error of the 4th-order result, so the control
 * is conservative for the solution actually kept, the cost is the same (6
 * evaluations a step), and the answer agrees with GSL's peer step for step.
 * The estimate is O(h^5), so the controller's exponents use k = 5. */

/* Controller constants (common practice; Hairer & Wanner II, IV.2, eq. 2.43c
 * with their DOPRI5 values): h_new = h * SAFETY * err^-ALPHA * err_prev^BETA,
 * BETA = 0.04, ALPHA = 1/k - 0.75 BETA, factor bounded to [SHRINK_MIN,
 * GROW_MAX]; no growth right after a rejection. A rejected step shrinks by the
 * plain I-controller SAFETY * err^(-1/k). */
#define RKF45_K 5.0
#define RKF45_SAFETY 0.9
#define RKF45_BETA 0.04
#define RKF45_ALPHA (1.0 / RKF45_K - 0.75 * RKF45_BETA)
#define RKF45_GROW_MAX 5.0
#define RKF45_SHRINK_MIN 0.2
/* A last step up to 1% longer than the proposal is stretched to t_out rather
 * than leaving a sliver step behind. */
#define RKF45_STRETCH 1.01

/* Fehlberg's RKF4(5) coefficients (NASA TR R-315, Table III). */
static const double rkf45_c[6] = {0.0, 1.0 / 4.0, 3.0 / 8.0, 12.0 / 13.0, 1.0, 1.0 / 2.0};
static const double rkf45_a2[1] = {1.0 / 4.0};
static const double rkf45_a3[2] = {3.0 / 32.0, 9.0 / 32.0};
static const double rkf45_a4[3] = {1932.0 / 2197.0, -7200.0 / 2197.0, 7296.0 / 2197.0};
static const double rkf45_a5[4] = {439.0 / 216.0, -8.0, 3680.0 / 513.0, -845.0 / 4104.0};
static const double rkf45_a6[5] = {-8.0 / 27.0, 2.0, -3544.0 / 2565.0, 1859.0 / 4104.0,
                                   -11.0 / 40.0};
/* 5th-order weights (propagated); b2 = 0 */
static const double rkf45_b5[6] = {16.0 / 135.0, 0.0, 6656.0 / 12825.0, 28561.0 / 56430.0,
                                   -9.0 / 50.0, 2.0 / 55.0};
/* error weights: 5th-order minus 4th-order (25/216, 0, 1408/2565, 2197/4104, -1/5, 0) */
static const double rkf45_e[6] = {1.0 / 360.0, 0.0, -128.0 / 4275.0, -2197.0 / 75240.0,
                                  1.0 / 50.0, 2.0 / 55.0};

typedef struct rkf45_ws {
    int dim, n;
    pb_force f;
    pb_method_config cfg;
    double t;
    double h;              /* the controller's proposal for the next step (0: none yet) */
    double log_err_prev;   /* PI memory: log of the error norm of the last accepted unclamped
                            * step (held as a log: one log and one exp a step, not two pow) */
    double hmin;
    double *atol;          /* effective absolute tolerance per component */
    int have_k1;           /* k[0] holds f(t, y) */
    int last_rejected;
    double *y, *ynew, *ytmp, *k[6];
    pb_dense_span span;
    pb_method_stats st;
} rkf45_ws;

static void *rkf45_alloc(int dim)
{
    rkf45_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    w->n = 2 * dim;
    w->y = calloc(10 * (size_t)w->n, sizeof(double));
    if (!w->y) {
        free(w);
        return NULL;
    }
    w->ynew = w->y + w->n;
    w->ytmp = w->ynew + w->n;
    w->atol = w->ytmp + w->n;
    for (int i = 0; i < 6; i++)
        w->k[i] = w->atol + (size_t)(i + 1) * (size_t)w->n;
    return w;
}

static void rkf45_free(void *ws)
{
    rkf45_ws *w = ws;
    if (!w)
        return;
    free(w->y);
    free(w);
}

static int rkf45_start(void *ws, const pb_force *f, const pb_method_config *cfg,
                       double t0, const double *r0, const double *v0)
{
    rkf45_ws *w = ws;
    if (cfg->h < 0 || !isfinite(cfg->h) || cfg->min_step < 0 || cfg->max_steps < 0)
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    int s = pb_adaptive_tolerances(&w->cfg, w->dim, r0, v0, w->atol);
    if (s)
        return s;
    double scale = cfg->time_scale > 0 ? cfg->time_scale : 1.0;
    w->hmin = cfg->min_step > 0 ? cfg->min_step : 1e-12 * scale;
    w->t = t0;
    w->h = cfg->h;
    w->log_err_prev = 0.0; /* error norm 1 */
    w->have_k1 = 0;
    w->last_rejected = 0;
    memcpy(w->y, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    return PB_OK;
}

/* dy/dt = (v, a(t, r, v)) */
static int rkf45_deriv(rkf45_ws *w, double t, const double *y, double *dy)
{
    memcpy(dy, y + w->dim, (size_t)w->dim * sizeof(double));
    return w->f.accel(w->f.ctx, t, y, y + w->dim, dy + w->dim);
}

/* Weighted RMS norm of e against the tolerances at y and ynew. */
static double rkf45_err_norm(const rkf45_ws *w, const double *y, const double *ynew,
                             const double *e)
{
    double s = 0;
    for (int i = 0; i < w->n; i++) {
        double sc = w->atol[i] + w->cfg.rtol * fmax(fabs(y[i]), fabs(ynew[i]));
        double q = e[i] / sc;
        s += q * q;
    }
    return sqrt(s / w->n);
}

/* Starting step (Hairer, Norsett & Wanner I, Sec. II.4, with p + 1 = 5). The
 * 1e-6 fallbacks of the book assume unit time, so they are scaled by the time
 * scale. Uses k[0] = f(t, y); costs one more evaluation. */
static int rkf45_initial_step(rkf45_ws *w)
{
    int n = w->n, s;
    double scale = w->cfg.time_scale > 0 ? w->cfg.time_scale : 1.0;
    double d0 = rkf45_err_norm(w, w->y, w->y, w->y);
    double d1 = rkf45_err_norm(w, w->y, w->y, w->k[0]);
    double h0 = pb_first_step_trial(d0, d1, scale);
    for (int i = 0; i < n; i++)
        w->ytmp[i] = w->y[i] + h0 * w->k[0][i];
    if ((s = rkf45_deriv(w, w->t + h0, w->ytmp, w->k[1])))
        return s;
    for (int i = 0; i < n; i++)
        w->ynew[i] = w->k[1][i] - w->k[0][i];
    double d2 = rkf45_err_norm(w, w->y, w->y, w->ynew) / h0;
    w->h = pb_first_step(h0, d1, d2, RKF45_K, scale);
    return PB_OK;
}

/* One attempt of size h from (t, y), k[0] = f(t, y) given: the 5th-order
 * result into ynew, the error norm into *err. Leaves y untouched. */
static int rkf45_try(rkf45_ws *w, double h, double *err)
{
    int n = w->n, s, i;
    const double *y = w->y;
    double *yt = w->ytmp, **k = w->k, t = w->t;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + h * rkf45_a2[0] * k[0][i];
    if ((s = rkf45_deriv(w, t + rkf45_c[1] * h, yt, k[1])))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + h * (rkf45_a3[0] * k[0][i] + rkf45_a3[1] * k[1][i]);
    if ((s = rkf45_deriv(w, t + rkf45_c[2] * h, yt, k[2])))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + h * (rkf45_a4[0] * k[0][i] + rkf45_a4[1] * k[1][i] +
                            rkf45_a4[2] * k[2][i]);
    if ((s = rkf45_deriv(w, t + rkf45_c[3] * h, yt, k[3])))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + h * (rkf45_a5[0] * k[0][i] + rkf45_a5[1] * k[1][i] +
                            rkf45_a5[2] * k[2][i] + rkf45_a5[3] * k[3][i]);
    if ((s = rkf45_deriv(w, t + rkf45_c[4] * h, yt, k[4])))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + h * (rkf45_a6[0] * k[0][i] + rkf45_a6[1] * k[1][i] +
                            rkf45_a6[2] * k[2][i] + rkf45_a6[3] * k[3][i] +
                            rkf45_a6[4] * k[4][i]);
    if ((s = rkf45_deriv(w, t + rkf45_c[5] * h, yt, k[5])))
        return s;
    for (i = 0; i < n; i++) {
        w->ynew[i] = y[i] + h * (rkf45_b5[0] * k[0][i] + rkf45_b5[2] * k[2][i] +
                                 rkf45_b5[3] * k[3][i] + rkf45_b5[4] * k[4][i] +
                                 rkf45_b5[5] * k[5][i]);
        yt[i] = h * (rkf45_e[0] * k[0][i] + rkf45_e[2] * k[2][i] + rkf45_e[3] * k[3][i] +
                     rkf45_e[4] * k[4][i] + rkf45_e[5] * k[5][i]);
        if (!isfinite(w->ynew[i]) || !isfinite(yt[i]))
            return PB_ENONFINITE;
    }
    *err = rkf45_err_norm(w, y, w->ynew, yt);
    return PB_OK;
}

static int rkf45_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    rkf45_ws *w = ws;
    int s;
    if (!(t_out >= w->t))
        return PB_EINVAL;
    while (w->t < t_out) {
        if (w->cfg.max_steps > 0 && w->st.steps + w->st.rejected >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        if (!w->have_k1) {
            if ((s = rkf45_deriv(w, w->t, w->y, w->k[0]))) {
                w->st.t_fail = w->t;
                return s;
            }
            w->have_k1 = 1;
            pb_dense_set_a(&w->span, w->k[0] + w->dim);
        }
        if (!(w->h > 0) && (s = rkf45_initial_step(w))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (w->h < w->hmin || w->t + w->h == w->t) {
            w->st.t_fail = w->t;
            return PB_EMINSTEP;
        }
        double rem = t_out - w->t, h = w->h, err;
        int last = rem <= RKF45_STRETCH * h;
        if (last)
            h = rem;
        if ((s = rkf45_try(w, h, &err))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (err <= 1.0) {
            if (last && h < w->h)
                w->st.output_cut++;
            /* A clamped step shorter than the proposal says nothing about the
             * step the solution allows, so the proposal and the PI memory are
             * kept for the next call. */
            if (!last || h >= w->h) {
                /* log is increasing, so log(max(err, c)) = max(log err, log c) */
                double lerr = log(err);
                double fac = RKF45_SAFETY * exp(-RKF45_ALPHA * fmax(lerr, log(1e-10)) +
                                                RKF45_BETA * w->log_err_prev);
                fac = fmin(RKF45_GROW_MAX, fmax(RKF45_SHRINK_MIN, fac));
                if (w->last_rejected)
                    fac = fmin(fac, 1.0);
                w->h = h * fac;
                w->log_err_prev = fmax(lerr, log(1e-4));
            }
            w->t = last ? t_out : w->t + h;
            memcpy(w->y, w->ynew, (size_t)w->n * sizeof(double));
            w->last_rejected = 0;
            w->st.steps++;
            /* the next step's first stage, now, for the dense output's end; a
             * failure here is met again (and reported) by the next step */
            w->have_k1 = rkf45_deriv(w, w->t, w->y, w->k[0]) == PB_OK;
            pb_dense_push(&w->span, w->t, w->y, w->y + w->dim, w->have_k1 ? w->k[0] + w->dim : NULL);
            if (obs && (s = obs(octx, w->t, w->y, w->y + w->dim)))
                return s;
        } else {
            double fac = RKF45_SAFETY * exp(-log(err) / RKF45_K);
            w->h = h * fmax(RKF45_SHRINK_MIN, fac);
            w->last_rejected = 1;
            w->st.rejected++;
        }
    }
    return PB_OK;
}

static int rkf45_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const rkf45_ws *)ws)->span, t, r, v);
}

static void rkf45_get_state(const void *ws, double *t, double *r, double *v)
{
    const rkf45_ws *w = ws;
    *t = w->t;
    memcpy(r, w->y, (size_t)w->dim * sizeof(double));
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof(double));
}

static void rkf45_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const rkf45_ws *)ws)->st;
}

const pb_method_type pb_method_rkf45 = {
    PB_METHOD_RECORD_HEAD,
    .name = "rkf45",
    .description = "Runge-Kutta-Fehlberg 4(5), PI step control, 6 evaluations a step",
    .source = "Fehlberg (1969) NASA TR R-315; PI control: Gustafsson (1991), "
              "Hairer & Wanner II Sec. IV.2",
    .order = 5,
    .flags = PB_KIND_ADAPTIVE,
    .alloc = rkf45_alloc,
    .start = rkf45_start,
    .advance = rkf45_advance,
    .get_state = rkf45_get_state,
    .get_stats = rkf45_get_stats,
    .free = rkf45_free,
    .dense = rkf45_dense,
    .dense_order = 4,
};
