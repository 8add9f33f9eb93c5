/* radau15.c - Everhart's implicit Runge-Kutta integrator of order 15 on
 * Gauss-Radau spacings (Everhart 1985, IAU Colloq. 83, 185) for
 * r'' = a(t, r, v), its B values iterated to convergence in every step; step
 * control and round-off practice of Rein & Spiegel (2015), MNRAS 446, 1424,
 * with compensated summation of the state update, always on. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/radau15.h"

/* The scheme (Everhart's notation, time within the step T = (t - t0)/dt):
 * the acceleration over the step is the polynomial
 *     a(T) = a0 + B_1 T + ... + B_7 T^7
 * held in Newton form on the spacings h_0 = 0, h_1..h_7,
 *     a(T) = a0 + g_1 T + g_2 T (T - h_1) + ... + g_7 T (T - h_1)...(T - h_6),
 * so that a new acceleration at h_n changes g_n alone (a divided difference)
 * and through it B_1..B_n. Position and velocity are its integrals,
 *     r(T) = r0 + T dt v0 + (T dt)^2 (a0/2 + sum_k B_k T^k / ((k+1)(k+2))),
 *     v(T) = v0 + T dt (a0 + sum_k B_k T^k / (k+1)),
 * which give the substep states the force is evaluated at (velocities too,
 * so a velocity-dependent force is fine), the new state at T = 1 and the
 * dense output anywhere in the step. On the Radau spacings the end point is
 * of order 15 (global error O(dt^15)) once the B values have converged.
 *
 * Invariant between steps: B holds the last attempt's converged values (of
 * an accepted step of size pred_from, carried over, or a rejected attempt of
 * size retry_from, rescaled, once the next step's size is known: it may be
 * cut short on an output time); P the plain prediction the last B started
 * from; and
 * (d_t0, d_dt, d_r, d_v, d_a, d_B) the last accepted step for the dense
 * output. The spacings and the conversion tables are computed in
 * alloc, in long double, from the Legendre polynomials: no table to copy. */

#define RADAU15_N 7              /* substeps; B_1..B_7 */
#define RADAU15_MAXIT 12         /* sweep limit (Rein & Spiegel) */
#define RADAU15_PC_EPS 1e-16     /* converged: max|dB_7| / max|a| below this */
/* Rein & Spiegel's safety factor: a step whose proposed successor is less
 * than SAFETY of it is rejected and retried at that size, and no step is
 * more than 1/SAFETY of the one before. */
#define RADAU15_SAFETY 0.25
/* a last step up to 1% longer than the proposal is stretched to t_out */
#define RADAU15_STRETCH 1.01

typedef struct radau15_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    double h[RADAU15_N + 1];              /* spacings h_0 = 0 .. h_7 */
    double c[RADAU15_N + 1][RADAU15_N + 1]; /* c[k][n]: T^k in T (T - h_1)..(T - h_{n-1}) */
    double d[RADAU15_N + 1][RADAU15_N + 1]; /* its inverse: g_n = sum_k d[n][k] B_k */
    double rinv[RADAU15_N + 1][RADAU15_N + 1]; /* 1 / (h_n - h_j) */
    /* at substep n: h_n^(k+2) / ((k+1)(k+2)) and h_n^(k+1) / (k+1), k = 0..7 */
    double pr[RADAU15_N + 1][RADAU15_N + 1], pv[RADAU15_N + 1][RADAU15_N + 1];
    double eps, hmin;
    double t, dt;                         /* time; the proposal for the next step */
    double *r, *v, *cr, *cv, *a0;         /* state, Kahan compensations, a(t, r, v) */
    double *rs, *vs, *as;                 /* a substep's state and acceleration */
    double *B, *g, *P;                    /* [RADAU15_N][dim] each */
    double *d_r, *d_v, *d_a, *d_B;        /* the last accepted step, for dense output */
    double d_t0, d_dt;
    double pred_from;                     /* > 0: B holds the converged values of a step
                                           * of this size, to be carried over */
    double retry_from;                    /* > 0: ... of a rejected attempt of this size */
    int have_a0, have_pred, have_step;
    pb_method_stats st;
    pb_radau15_info info;
} radau15_ws;

/* P_n(x) by the three-term recurrence (Abramowitz & Stegun 22.7.10) */
static long double radau15_legendre(int n, long double x)
{
    long double p0 = 1, p1 = x;
    if (n == 0)
        return p0;
    for (int k = 1; k < n; k++) {
        long double p2 = ((2 * k + 1) * x * p1 - k * p0) / (k + 1);
        p0 = p1;
        p1 = p2;
    }
    return p1;
}

/* The Radau spacings: with h_0 = 0 the other seven are the roots of
 * (P_7(x) + P_8(x)) / (1 + x), mapped from [-1, 1] to [0, 1] (Abramowitz &
 * Stegun 25.4.31, Radau's quadrature with the end point -1 fixed; Everhart
 * 1985, Sec. 2). Bracketed on a fine grid and bisected in long double. */
static void radau15_nodes(long double s[RADAU15_N + 1])
{
    const int grid = 4000;
    int n = 0;
    s[0] = 0;
    long double xl = -1 + 1e-9L, fl = radau15_legendre(7, xl) + radau15_legendre(8, xl);
    for (int i = 1; i <= grid && n < RADAU15_N; i++) {
        long double xr = -1 + 2.0L * i / grid;
        long double fr = radau15_legendre(7, xr) + radau15_legendre(8, xr);
        if ((fl < 0) != (fr < 0)) {
            long double lo = xl, hi = xr, flo = fl;
            for (int it = 0; it < 200 && hi - lo > 0; it++) {
                long double mid = 0.5L * (lo + hi);
                long double fm = radau15_legendre(7, mid) + radau15_legendre(8, mid);
                if (mid == lo || mid == hi)
                    break;
                if ((fm < 0) == (flo < 0))
                    lo = mid, flo = fm;
                else
                    hi = mid;
            }
            s[++n] = 0.5L * (0.5L * (lo + hi) + 1);
        }
        xl = xr;
        fl = fr;
    }
}

void pb_radau15_spacings(double h[PB_RADAU15_NODES])
{
    long double s[RADAU15_N + 1];
    radau15_nodes(s);
    for (int i = 0; i <= RADAU15_N; i++)
        h[i] = (double)s[i];
}

/* The tables of the Newton form: c[k][n] the power coefficients of
 * T (T - h_1)...(T - h_{n-1}) (expanded in long double), d its inverse
 * (unit upper triangular, by back substitution), rinv the divided
 * differences' reciprocals. */
static void radau15_tables(radau15_ws *w)
{
    long double s[RADAU15_N + 1], c[RADAU15_N + 1][RADAU15_N + 1] = {{0}};
    long double d[RADAU15_N + 1][RADAU15_N + 1] = {{0}};
    radau15_nodes(s);
    c[1][1] = 1; /* n = 1: the polynomial T */
    for (int n = 2; n <= RADAU15_N; n++)
        for (int k = 1; k <= n; k++)
            c[k][n] = (k > 1 ? c[k - 1][n - 1] : 0) - s[n - 1] * c[k][n - 1];
    for (int n = RADAU15_N; n >= 1; n--) {
        d[n][n] = 1;
        for (int k = n + 1; k <= RADAU15_N; k++) {
            long double acc = 0; /* row n of d times column k of c is 0 */
            for (int j = n; j < k; j++)
                acc += d[n][j] * c[j][k];
            d[n][k] = -acc;
        }
    }
    for (int n = 0; n <= RADAU15_N; n++) {
        w->h[n] = (double)s[n];
        for (int k = 0; k <= RADAU15_N; k++) {
            w->c[k][n] = (double)c[k][n];
            w->d[k][n] = (double)d[k][n];
            w->rinv[n][k] = k < n ? (double)(1 / (s[n] - s[k])) : 0;
            w->pr[n][k] = (double)(powl(s[n], k + 2) / ((k + 1) * (k + 2)));
            w->pv[n][k] = (double)(powl(s[n], k + 1) / (k + 1));
        }
    }
}

static void *radau15_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    radau15_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    size_t d = (size_t)dim, n = RADAU15_N * d;
    w->dim = dim;
    w->r = calloc(11 * d + 4 * n, sizeof(double));
    if (!w->r) {
        free(w);
        return NULL;
    }
    w->v = w->r + d;
    w->cr = w->v + d;
    w->cv = w->cr + d;
    w->a0 = w->cv + d;
    w->rs = w->a0 + d;
    w->vs = w->rs + d;
    w->as = w->vs + d;
    w->d_r = w->as + d;
    w->d_v = w->d_r + d;
    w->d_a = w->d_v + d;
    w->B = w->d_a + d;
    w->g = w->B + n;
    w->P = w->g + n;
    w->d_B = w->P + n;
    radau15_tables(w);
    return w;
}

static void radau15_free(void *ws)
{
    radau15_ws *w = ws;
    if (!w)
        return;
    free(w->r);
    free(w);
}

/* Rein & Spiegel's epsilon from cfg->rtol. Their step control holds
 * max|B_7| / max|a| near epsilon, and B_7 ~ (dt/tau)^7 |a| (tau the local
 * time scale), while the local error of a step is O((dt/tau)^16) relative to
 * the state: so epsilon^(16/7) is the error per step, and rtol, an error per
 * step for every adaptive method here, maps to epsilon = rtol^(7/16). Their
 * default epsilon = 1e-9 is then rtol ~ 3e-21, beyond double precision,
 * which is why it gives results at round-off. Measured on kepler-e0.5 over
 * 100 orbits: position error 2.7e-3, 3.0e-5, 6.9e-8, 4.1e-11, 8.2e-13
 * (round-off) at epsilon = 1e-2, 3e-3, 1e-3, 1e-4, 1e-5: the global error
 * falls faster than epsilon^(15/7) over this range, so at a given rtol this
 * method is more accurate than the others here are. */
static double radau15_epsilon(double rtol)
{
    return pow(rtol, 7.0 / 16.0);
}

static int radau15_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                         const double *r0, const double *v0)
{
    radau15_ws *w = ws;
    /* the measure is relative: rtol, or atol when rtol is 0 */
    double tol = cfg->rtol > 0 ? cfg->rtol : cfg->atol;
    if (cfg->h < 0 || !isfinite(cfg->h) || cfg->min_step < 0 || cfg->max_steps < 0 ||
        !(tol > 0) || !isfinite(tol) || !isfinite(t0))
        return PB_EINVAL;
    size_t sz = (size_t)w->dim * sizeof(double), szb = RADAU15_N * sz;
    w->f = *f;
    w->cfg = *cfg;
    double scale = cfg->time_scale > 0 ? cfg->time_scale : 1.0;
    w->hmin = cfg->min_step > 0 ? cfg->min_step : 1e-12 * scale;
    w->eps = radau15_epsilon(tol);
    w->t = t0;
    w->dt = cfg->h;
    memcpy(w->r, r0, sz);
    memcpy(w->v, v0, sz);
    memset(w->cr, 0, sz);
    memset(w->cv, 0, sz);
    memset(w->B, 0, szb);
    memset(w->P, 0, szb);
    w->have_a0 = w->have_pred = w->have_step = 0;
    w->pred_from = w->retry_from = 0;
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    memset(&w->info, 0, sizeof w->info);
    w->info.epsilon = w->eps;
    return PB_OK;
}

/* 1/((k+1)(k+2)) and 1/(k+1), k = 0..7: the integrals of T^k, twice and once */
static const double radau15_wr[RADAU15_N + 1] = {1.0 / 2, 1.0 / 6, 1.0 / 12, 1.0 / 20,
                                                 1.0 / 30, 1.0 / 42, 1.0 / 56, 1.0 / 72};
static const double radau15_wv[RADAU15_N + 1] = {1.0, 1.0 / 2, 1.0 / 3, 1.0 / 4,
                                                 1.0 / 5, 1.0 / 6, 1.0 / 7, 1.0 / 8};

/* r and v at T of a step of size dt from (r0, v0, a0) with the values B
 * (Horner in T; the components innermost, so that their chains interleave) */
static void radau15_poly(int dim, double T, double dt, const double *r0, const double *v0,
                         const double *a0, const double *B, double *r, double *v)
{
    double sr[PB_STATE_DIM_MAX] = {0}, sv[PB_STATE_DIM_MAX] = {0}, Tdt = T * dt;
    for (int k = RADAU15_N; k >= 1; k--) {
        const double *b = B + (k - 1) * dim;
        for (int i = 0; i < dim; i++) {
            sr[i] = T * (sr[i] + b[i] * radau15_wr[k]);
            sv[i] = T * (sv[i] + b[i] * radau15_wv[k]);
        }
    }
    for (int i = 0; i < dim; i++) {
        r[i] = r0[i] + Tdt * (v0[i] + Tdt * (radau15_wr[0] * a0[i] + sr[i]));
        v[i] = v0[i] + Tdt * (a0[i] + sv[i]);
    }
}

/* The state at substep n: radau15_poly at T = h_n, its powers tabulated */
static void radau15_substep(radau15_ws *w, int n, double dt)
{
    int dim = w->dim;
    const double *pr = w->pr[n], *pv = w->pv[n];
    for (int i = 0; i < dim; i++) {
        double sr = pr[0] * w->a0[i], sv = pv[0] * w->a0[i];
        for (int k = 1; k <= RADAU15_N; k++) {
            double b = w->B[(k - 1) * dim + i];
            sr += b * pr[k];
            sv += b * pv[k];
        }
        w->rs[i] = w->r[i] + dt * (w->h[n] * w->v[i] + dt * sr);
        w->vs[i] = w->v[i] + dt * sv;
    }
}

/* One sweep over the seven substeps: evaluate, update g_n and through it
 * B_1..B_n. Returns the sweep's max |change of B_7| / max |a_7| in *corr. */
static int radau15_sweep(radau15_ws *w, double dt, double *corr)
{
    int dim = w->dim, s;
    double dmax = 0, amax = 0;
    for (int n = 1; n <= RADAU15_N; n++) {
        radau15_substep(w, n, dt);
        if ((s = w->f.accel(w->f.ctx, w->t + w->h[n] * dt, w->rs, w->vs, w->as)))
            return s;
        /* g_n = [a_0 .. a_n]: peel g_1 .. g_{n-1} off (a_n - a_0) / h_n */
        double q[PB_STATE_DIM_MAX], *gn = w->g + (n - 1) * dim;
        for (int i = 0; i < dim; i++)
            q[i] = (w->as[i] - w->a0[i]) * w->rinv[n][0];
        for (int j = 1; j < n; j++)
            for (int i = 0; i < dim; i++)
                q[i] = (q[i] - w->g[(j - 1) * dim + i]) * w->rinv[n][j];
        for (int i = 0; i < dim; i++) {
            double delta = q[i] - gn[i];
            gn[i] = q[i];
            for (int k = 1; k <= n; k++)
                w->B[(k - 1) * dim + i] += w->c[k][n] * delta;
            if (n == RADAU15_N) {
                dmax = fmax(dmax, fabs(delta));
                amax = fmax(amax, fabs(w->as[i]));
            }
        }
    }
    *corr = amax > 0 ? dmax / amax : dmax;
    return isfinite(*corr) ? PB_OK : PB_ENONFINITE;
}

/* Predictor-corrector to convergence from the starting values in B:
 * sweeps until the change of B_7 is below RADAU15_PC_EPS of the
 * acceleration (in practice until it is exactly 0: the substep states stop
 * changing), or stops shrinking from the third sweep on (round-off reached:
 * Rein & Spiegel), or RADAU15_MAXIT sweeps. The second sweep may change B_7
 * as much as the first (from zero starting values, the first sweep's
 * substeps see only the B values of those before them), so it cannot end
 * the iteration on that ground. */
static int radau15_iterate(radau15_ws *w, double dt)
{
    int dim = w->dim, s, it;
    double corr = 0, prev = INFINITY;
    for (int n = 1; n <= RADAU15_N; n++)
        for (int i = 0; i < dim; i++) {
            double acc = 0;
            for (int k = n; k <= RADAU15_N; k++)
                acc += w->d[n][k] * w->B[(k - 1) * dim + i];
            w->g[(n - 1) * dim + i] = acc;
        }
    for (it = 1; it <= RADAU15_MAXIT; it++) {
        if ((s = radau15_sweep(w, dt, &corr)))
            return s;
        if (corr < RADAU15_PC_EPS || (it >= 3 && corr >= prev))
            break;
        prev = corr;
    }
    if (it > RADAU15_MAXIT) {
        it = RADAU15_MAXIT;
        w->info.not_converged++;
    }
    w->info.iterations += it;
    w->info.last_iterations = it;
    w->info.last_correction = corr;
    return PB_OK;
}

/* x += inc with Kahan's compensation c (the true sum is x - c) */
static void radau15_kahan(double *x, double *c, double inc)
{
    double y = inc - *c, s = *x + y;
    *c = (s - *x) - y;
    *x = s;
}

/* Starting values for a step q times the size of the one last converged:
 * Everhart's predictor, the polynomial carried over the step's end,
 *     P_k = q^k sum_{j >= k} binom(j, k) B_j,
 * plus the last prediction's error B - P_old scaled as the B values
 * (Everhart 1985, Sec. 3: the correction E). With q beyond 1/SAFETY (after
 * a step cut short on an output time) the polynomial of a short step says
 * little about a long one: the next step starts from zero, as the first. */
static void radau15_predict(radau15_ws *w, double q)
{
    int dim = w->dim;
    if (!(q <= 1.0 / RADAU15_SAFETY)) {
        memset(w->B, 0, RADAU15_N * (size_t)dim * sizeof(double));
        memset(w->P, 0, RADAU15_N * (size_t)dim * sizeof(double));
        w->have_pred = 0;
        return;
    }
    for (int i = 0; i < dim; i++) {
        double Bf[RADAU15_N + 1], qk = 1;
        for (int k = 1; k <= RADAU15_N; k++)
            Bf[k] = w->B[(k - 1) * dim + i];
        for (int k = 1; k <= RADAU15_N; k++) {
            double binom = 1, acc = 0; /* binom(j, k) for j = k, k+1, ... */
            qk *= q;
            for (int j = k; j <= RADAU15_N; j++) {
                acc += binom * Bf[j];
                binom = binom * (j + 1) / (j + 1 - k);
            }
            double pred = qk * acc, *p = w->P + (k - 1) * dim + i;
            double e = w->have_pred ? Bf[k] - *p : 0;
            *p = pred;
            w->B[(k - 1) * dim + i] = pred + qk * e;
        }
    }
    w->have_pred = 1;
}

/* The step's error measure (Rein & Spiegel's global one): max |B_7| over
 * max |a| at the last substep, and the step it asks for, dt (eps/err)^(1/7),
 * no more than dt / SAFETY. */
static double radau15_next_dt(const radau15_ws *w, double dt)
{
    double bmax = 0, amax = 0;
    for (int i = 0; i < w->dim; i++) {
        bmax = fmax(bmax, fabs(w->B[(RADAU15_N - 1) * w->dim + i]));
        amax = fmax(amax, fabs(w->as[i]));
    }
    double err = amax > 0 ? bmax / amax : bmax;
    double grow = dt / RADAU15_SAFETY;
    if (!(err > 0))
        return grow;
    double want = dt * pow(w->eps / err, 1.0 / 7.0);
    return isfinite(want) ? fmin(want, grow) : grow;
}

/* Accept the converged step of size dt: the new state with compensated
 * sums, the step kept for dense output. */
static void radau15_accept(radau15_ws *w, double dt, double t_new)
{
    int dim = w->dim;
    size_t sz = (size_t)dim * sizeof(double);
    w->d_t0 = w->t;
    w->d_dt = dt;
    memcpy(w->d_r, w->r, sz);
    memcpy(w->d_v, w->v, sz);
    memcpy(w->d_a, w->a0, sz);
    memcpy(w->d_B, w->B, RADAU15_N * sz);
    for (int i = 0; i < dim; i++) {
        double sr = radau15_wr[0] * w->a0[i], sv = w->a0[i];
        for (int k = 1; k <= RADAU15_N; k++) {
            double b = w->B[(k - 1) * dim + i];
            sr += b * radau15_wr[k];
            sv += b * radau15_wv[k];
        }
        radau15_kahan(&w->r[i], &w->cr[i], dt * (w->v[i] + dt * sr));
        radau15_kahan(&w->v[i], &w->cv[i], dt * sv);
    }
    w->t = t_new;
    w->have_a0 = 0;
    w->have_step = 1;
    w->st.steps++;
    w->pred_from = dt;
}

/* A first step when cfg->h is 0: a hundredth of the local dynamical time
 * sqrt(|r| / |a|) (common practice), or of the time scale when that is
 * undefined; the control grows it by up to 1/SAFETY a step. */
static double radau15_first_dt(const radau15_ws *w)
{
    double scale = w->cfg.time_scale > 0 ? w->cfg.time_scale : 1.0, r2 = 0, a2 = 0;
    for (int i = 0; i < w->dim; i++) {
        r2 += w->r[i] * w->r[i];
        a2 += w->a0[i] * w->a0[i];
    }
    double tdyn = a2 > 0 && r2 > 0 ? sqrt(sqrt(r2 / a2)) : scale;
    return 0.01 * fmin(tdyn, scale);
}

/* One attempt of size dt (clamped to t_out when last): 1 accepted, 0
 * rejected (the proposal shrunk and B rescaled for the retry). */
static int radau15_attempt(radau15_ws *w, double dt, int last, double t_out, int *accepted)
{
    if (w->pred_from > 0) {
        radau15_predict(w, dt / w->pred_from);
        w->pred_from = 0;
    } else if (w->retry_from > 0) {
        /* after a rejection: the same polynomial from the same start, on
         * the shorter step, B_k scaled by (dt / dt_rejected)^k */
        double r = dt / w->retry_from, rk = 1;
        for (int k = 1; k <= RADAU15_N; k++) {
            rk *= r;
            for (int i = 0; i < w->dim; i++)
                w->B[(k - 1) * w->dim + i] *= rk;
        }
        memcpy(w->P, w->B, RADAU15_N * (size_t)w->dim * sizeof(double));
        w->have_pred = 1;
        w->retry_from = 0;
    }
    int s = radau15_iterate(w, dt);
    if (s)
        return s;
    double want = radau15_next_dt(w, dt);
    if (want < RADAU15_SAFETY * dt) {
        w->retry_from = dt;
        w->dt = want;
        w->st.rejected++;
        *accepted = 0;
        return PB_OK;
    }
    /* a step cut short on t_out says nothing of the step the orbit allows:
     * the proposal stands for the next call */
    if (last && dt < w->dt)
        w->st.output_cut++;
    else
        w->dt = want;
    radau15_accept(w, dt, last ? t_out : w->t + dt);
    *accepted = 1;
    return PB_OK;
}

static int radau15_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    radau15_ws *w = ws;
    int s, acc;
    if (!(t_out >= w->t))
        return PB_EINVAL;
    while (w->t < t_out) {
        if (w->cfg.max_steps > 0 && w->st.steps + w->st.rejected >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        if (!w->have_a0) {
            if ((s = w->f.accel(w->f.ctx, w->t, w->r, w->v, w->a0))) {
                w->st.t_fail = w->t;
                return s;
            }
            w->have_a0 = 1;
        }
        if (!(w->dt > 0))
            w->dt = radau15_first_dt(w);
        if (w->dt < w->hmin || w->t + w->dt == w->t) {
            w->st.t_fail = w->t;
            return PB_EMINSTEP;
        }
        double rem = t_out - w->t, dt = w->dt;
        int last = rem <= RADAU15_STRETCH * dt;
        if (last)
            dt = rem;
        if ((s = radau15_attempt(w, dt, last, t_out, &acc))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (acc && obs && (s = obs(octx, w->t, w->r, w->v)))
            return s;
    }
    return PB_OK;
}

/* The last accepted step's own polynomial: exact ends, order 8 inside. */
static int radau15_dense(const void *ws, double t, double *r, double *v)
{
    const radau15_ws *w = ws;
    size_t sz = (size_t)w->dim * sizeof(double);
    if (!w->have_step && t == w->t) {
        memcpy(r, w->r, sz);
        memcpy(v, w->v, sz);
        return PB_OK;
    }
    if (!w->have_step || !(t >= w->d_t0 && t <= w->t))
        return PB_EINVAL;
    if (t == w->t || t == w->d_t0) {
        memcpy(r, t == w->t ? w->r : w->d_r, sz);
        memcpy(v, t == w->t ? w->v : w->d_v, sz);
        return PB_OK;
    }
    radau15_poly(w->dim, (t - w->d_t0) / w->d_dt, w->d_dt, w->d_r, w->d_v, w->d_a, w->d_B, r, v);
    for (int i = 0; i < w->dim; i++)
        if (!isfinite(r[i]) || !isfinite(v[i]))
            return PB_ENONFINITE;
    return PB_OK;
}

static void radau15_get_state(const void *ws, double *t, double *r, double *v)
{
    const radau15_ws *w = ws;
    *t = w->t;
    memcpy(r, w->r, (size_t)w->dim * sizeof(double));
    memcpy(v, w->v, (size_t)w->dim * sizeof(double));
}

static void radau15_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const radau15_ws *)ws)->st;
}

void pb_radau15_get_info(const void *ws, pb_radau15_info *info)
{
    *info = ((const radau15_ws *)ws)->info;
}

const pb_method_type pb_method_radau15 = {
    PB_METHOD_RECORD_HEAD,
    .name = "radau15",
    .description = "Everhart's Gauss-Radau 15 (Rein & Spiegel step control), r'' = a(t, r, v), "
                   "compensated sums always",
    .source = "Everhart (1985), IAU Colloq. 83, 185; Rein & Spiegel (2015), MNRAS 446, 1424",
    .order = 15,
    .flags = PB_KIND_ADAPTIVE,
    .alloc = radau15_alloc,
    .start = radau15_start,
    .advance = radau15_advance,
    .get_state = radau15_get_state,
    .get_stats = radau15_get_stats,
    .free = radau15_free,
    .dense = radau15_dense,
    /* inside a step the acceleration polynomial is off by O(dt^8): the
     * velocity by O(dt^9), the position by O(dt^10) */
    .dense_order = 8,
};
