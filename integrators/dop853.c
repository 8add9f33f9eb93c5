/* dop853.c - Dormand-Prince 8(5,3), adaptive, first-order form y = (r, v).
 * Scheme: Prince & Dormand (1981), J. Comput. Appl. Math. 7, 67, with the
 * 5th/3rd-order error estimator, step control and 7th-order dense output of
 * Hairer, Norsett & Wanner, Solving ODEs I (2nd ed.), Sec. II.5 and II.10 (their
 * DOP853); coefficients in dop853_coeffs.h. 12 evaluations a step (FSAL). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/adaptive_setup.h"
#include "method.h"
#include "dop853_coeffs.h"

/* Step control in the form of HNW's DOP853 (II.4, IV.2 and their published
 * code): the error norm err behaves like O(h^8) (see dop853_try), and
 * h_new = h * SAFETY * err^-ALPHA * err_prev^BETA (Lund-stabilized, i.e. PI),
 * ALPHA = 1/8 - 0.2 BETA, the factor bounded to [SHRINK_MIN, GROW_MAX], no
 * growth right after a rejection; a rejected step shrinks by SAFETY *
 * err^(-1/8). Their code's defaults are SAFETY 0.9, BETA 0. On eccentric
 * orbits the error constant grows by more than 0.9^-8 = 2.3 a step on the way
 * into periapsis, so those defaults reject ~26% of the steps on kepler-e0.5
 * (30% on e = 0.9), each costing 11 evaluations. SAFETY 0.8 (one of the
 * values HNW II.4 list, a margin of 0.8^-8 = 6) with BETA 0.04 (their PI
 * value, IV.2) rejects ~2% (3% on e = 0.9) and needs 5-14% fewer
 * evaluations at equal error on kepler-e0.5 (9-12% on e = 0.9), 2-4% more on
 * e = 0.1 (measured over 100 orbits, tolerances 1e-7..1e-13). */
#define DOP853_K 8.0
#define DOP853_SAFETY 0.8
#define DOP853_BETA 0.04
#define DOP853_ALPHA (1.0 / DOP853_K - 0.2 * DOP853_BETA)
#define DOP853_SHRINK_MIN 0.333
#define DOP853_GROW_MAX 6.0
/* A last step up to 1% longer than the proposal is stretched to t_out rather
 * than leaving a sliver step behind (HNW's code does the same). */
#define DOP853_STRETCH 1.01
/* Stages a step evaluates: 0..11, stage 12 being f at the new state (FSAL). */
#define DOP853_STEP_STAGES 12

/* The dense output, as a polynomial in theta = (t - t_old)/h (HNW II.6 form):
 * y(theta) = y_old + theta (F0 + (1-theta) (F1 + theta (F2 + (1-theta) (F3 +
 * theta (F4 + (1-theta) (F5 + theta F6)))))). F0..F2 come from the ends of
 * the step; F3..F6 need the three extra stages 13..15. */
#define DOP853_NCONT 7
/* Every vector has room for the largest state, (r, v) in 3 dimensions, its
 * unused tail zero: the stage sums run over that fixed length, without a
 * test per component (with one they were 58% of a step's instructions on
 * kepler-e0.5, 43% without; callgrind). */
#define DOP853_NMAX (2 * PB_STATE_DIM_MAX)

typedef struct dop853_ws {
    int dim, n;
    pb_force f;
    pb_method_config cfg;
    double t;
    double h;              /* the controller's proposal for the next step (0: none yet) */
    double err_prev;       /* PI memory: error norm of the last accepted unclamped step */
    double hmin;
    double *atol;          /* effective absolute tolerance per component */
    int have_f0;           /* kw[0] holds f(t, y) */
    int last_rejected;
    double *mem;           /* the one allocation every vector below lives in */
    double *y, *ynew, *yold, *ytmp, *inc;   /* y, ynew and yold rotate */
    double *kw[DOP853_NSTAGES]; /* stages of the step being tried */
    double *kl[DOP853_NSTAGES]; /* stages of the last accepted step, for dense output */
    double *cont[DOP853_NCONT];
    /* the last accepted step: from (t_old, yold), length h_old, to (t, y) */
    double t_old, h_old;
    int have_step;
    int fsal_status;       /* status of f at the new state (kl[12]) */
    int dense_ready;       /* cont holds the last step's polynomial */
    /* the nonzero a[s][j] of each stage, so that a stage sums over them
     * only (50 of the 120 below the diagonal of stages 1..11) */
    int nz[DOP853_NSTAGES];
    int jz[DOP853_NSTAGES][DOP853_NSTAGES];
    double az[DOP853_NSTAGES][DOP853_NSTAGES];
    pb_method_stats st;
} dop853_ws;

static void *dop853_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    dop853_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    w->n = 2 * dim;
    size_t nvec = 6 + 2 * DOP853_NSTAGES + DOP853_NCONT;
    w->mem = calloc(nvec * DOP853_NMAX, sizeof(double));
    if (!w->mem) {
        free(w);
        return NULL;
    }
    double *p = w->mem;
    w->y = p, p += DOP853_NMAX;
    w->ynew = p, p += DOP853_NMAX;
    w->yold = p, p += DOP853_NMAX;
    w->ytmp = p, p += DOP853_NMAX;
    w->inc = p, p += DOP853_NMAX;
    w->atol = p, p += DOP853_NMAX;
    for (int i = 0; i < DOP853_NSTAGES; i++) {
        w->kw[i] = p, p += DOP853_NMAX;
        w->kl[i] = p, p += DOP853_NMAX;
    }
    for (int i = 0; i < DOP853_NCONT; i++)
        w->cont[i] = p, p += DOP853_NMAX;
    for (int st = 0; st < DOP853_NSTAGES; st++)
        for (int j = 0; j < st; j++)
            if (dop853_a[st][j] != 0) {
                w->jz[st][w->nz[st]] = j;
                w->az[st][w->nz[st]++] = dop853_a[st][j];
            }
    return w;
}

static void dop853_free(void *ws)
{
    dop853_ws *w = ws;
    if (!w)
        return;
    free(w->mem);
    free(w);
}

static int dop853_start(void *ws, const pb_force *f, const pb_method_config *cfg,
                        double t0, const double *r0, const double *v0)
{
    dop853_ws *w = ws;
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
    w->err_prev = 1e-4; /* HNW's code starts its memory there */
    w->have_f0 = 0;
    w->last_rejected = 0;
    w->have_step = 0;
    w->dense_ready = 0;
    w->fsal_status = PB_OK;
    memcpy(w->y, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    return PB_OK;
}

/* dy/dt = (v, a(t, r, v)) */
static int dop853_deriv(const dop853_ws *w, double t, const double *y, double *dy)
{
    memcpy(dy, y + w->dim, (size_t)w->dim * sizeof(double));
    return w->f.accel(w->f.ctx, t, y, y + w->dim, dy + w->dim);
}

/* Weighted sum of squares of e against the tolerances at y and ynew. */
static double dop853_sumsq(const dop853_ws *w, const double *y, const double *ynew,
                           const double *e)
{
    double s = 0;
    for (int i = 0; i < w->n; i++) {
        double sc = w->atol[i] + w->cfg.rtol * fmax(fabs(y[i]), fabs(ynew[i]));
        double q = e[i] / sc;
        s += q * q;
    }
    return s;
}

/* Starting step (HNW I, Sec. II.4, with the order 8 of DOP853's estimate).
 * The book's 1e-6 fallbacks assume unit time, so they are scaled by the time
 * scale. Uses kw[0] = f(t, y); costs one more evaluation. */
static int dop853_initial_step(dop853_ws *w)
{
    int n = w->n, s;
    double scale = w->cfg.time_scale > 0 ? w->cfg.time_scale : 1.0;
    double dny = dop853_sumsq(w, w->y, w->y, w->y), dnf = dop853_sumsq(w, w->y, w->y, w->kw[0]);
    double h0 = (dnf <= 1e-10 || dny <= 1e-10) ? 1e-6 * scale : 0.01 * sqrt(dny / dnf);
    for (int i = 0; i < n; i++)
        w->ytmp[i] = w->y[i] + h0 * w->kw[0][i];
    if ((s = dop853_deriv(w, w->t + h0, w->ytmp, w->kw[1])))
        return s;
    for (int i = 0; i < n; i++)
        w->inc[i] = w->kw[1][i] - w->kw[0][i];
    double der2 = sqrt(dop853_sumsq(w, w->y, w->y, w->inc)) / h0;
    double dm = fmax(der2, sqrt(dnf));
    double h1 = dm <= 1e-15 ? fmax(1e-6 * scale, h0 * 1e-3) : pow(0.01 / dm, 1.0 / DOP853_K);
    w->h = fmin(100.0 * h0, h1);
    return PB_OK;
}

/* ytmp = y0 + h sum_{j<s} a[s][j] k[j], the input of stage s. */
static void dop853_stage_input(const dop853_ws *w, const double *y0, double h, int s,
                               double *const *k, double *ytmp)
{
    double acc[DOP853_NMAX] = {0};
    for (int q = 0; q < w->nz[s]; q++) {
        const double a = w->az[s][q], *kq = k[w->jz[s][q]];
        for (int i = 0; i < DOP853_NMAX; i++)
            acc[i] += a * kq[i];
    }
    for (int i = 0; i < DOP853_NMAX; i++)
        ytmp[i] = y0[i] + h * acc[i];
}

/* One attempt of size h from (t, y), kw[0] = f(t, y) given: the 8th-order
 * result into ynew, the error norm into *err. Leaves y untouched.
 * The norm is HNW's (II.10): with e5 (5th-order estimate, O(h^6)) and e3
 * (b - bhh, O(h^4)), err = ||e5||^2 / sqrt(||e5||^2 + 0.01 ||e3||^2), which
 * behaves like ||e5||^2/(0.1 ||e3||) = O(h^8) for small h and like ||e5||
 * when the 3rd-order estimate is no larger: an estimate of the right order
 * that does not collapse where e5 happens to be tiny. */
static int dop853_try(dop853_ws *w, double h, double *err)
{
    int n = w->n, s;
    double *const *k = w->kw;
    for (int st = 1; st < DOP853_STEP_STAGES; st++) {
        dop853_stage_input(w, w->y, h, st, k, w->ytmp);
        if ((s = dop853_deriv(w, w->t + dop853_c[st] * h, w->ytmp, k[st])))
            return s;
    }
    /* b and er are zero on stages 1..4: the sums skip them */
    static const int bj[8] = {0, 5, 6, 7, 8, 9, 10, 11};
    const double *b = dop853_a[DOP853_STEP_STAGES];
    double inc[DOP853_NMAX] = {0}, e5[DOP853_NMAX] = {0}, e5sq = 0, e3sq = 0;
    for (int q = 0; q < 8; q++) {
        const double bq = b[bj[q]], eq = dop853_er[bj[q]], *kq = k[bj[q]];
        for (int i = 0; i < DOP853_NMAX; i++) {
            inc[i] += bq * kq[i];
            e5[i] += eq * kq[i];
        }
    }
    for (int i = 0; i < n; i++) {
        double e3 = inc[i] - dop853_bhh[0] * k[0][i] - dop853_bhh[8] * k[8][i] -
                    dop853_bhh[11] * k[11][i];
        w->ynew[i] = w->y[i] + h * inc[i];
        if (!isfinite(w->ynew[i]) || !isfinite(e5[i]) || !isfinite(e3))
            return PB_ENONFINITE;
        double isc = 1.0 / (w->atol[i] + w->cfg.rtol * fmax(fabs(w->y[i]), fabs(w->ynew[i])));
        e5sq += (e5[i] * isc) * (e5[i] * isc);
        e3sq += (e3 * isc) * (e3 * isc);
    }
    double deno = e5sq + 0.01 * e3sq;
    *err = deno > 0 ? fabs(h) * e5sq / sqrt((double)n * deno) : 0.0;
    return isfinite(*err) ? PB_OK : PB_ENONFINITE;
}

/* The step of size h just tried is accepted: rotate the states and stage
 * sets (no copying: the last step's stages stay whole for dense output while
 * the next step is tried in the other set) and evaluate f at the new state,
 * the next step's first stage. A failure of that evaluation is met again, and
 * reported, by the next step. */
static void dop853_accept(dop853_ws *w, double h, double t_new)
{
    double *tmp = w->yold;
    w->yold = w->y;
    w->y = w->ynew;
    w->ynew = tmp;
    for (int j = 0; j < DOP853_NSTAGES; j++) {
        double *kt = w->kl[j];
        w->kl[j] = w->kw[j];
        w->kw[j] = kt;
    }
    w->t_old = w->t;
    w->h_old = h;
    w->t = t_new;
    w->have_step = 1;
    w->dense_ready = 0;
    w->fsal_status = dop853_deriv(w, w->t, w->y, w->kl[DOP853_STEP_STAGES]);
    w->have_f0 = w->fsal_status == PB_OK;
    if (w->have_f0)
        memcpy(w->kw[0], w->kl[DOP853_STEP_STAGES], (size_t)w->n * sizeof(double));
    w->st.steps++;
}

/* The new proposal after an attempt of size h with error norm err. */
static void dop853_control(dop853_ws *w, double h, double err, int accepted)
{
    double e = fmax(err, 1e-300), fac;
    if (accepted) {
        fac = DOP853_SAFETY * pow(e, -DOP853_ALPHA) * pow(w->err_prev, DOP853_BETA);
        fac = fmin(DOP853_GROW_MAX, fmax(DOP853_SHRINK_MIN, fac));
        if (w->last_rejected)
            fac = fmin(fac, 1.0);
        w->err_prev = fmax(err, 1e-4);
    } else {
        fac = fmax(DOP853_SHRINK_MIN, DOP853_SAFETY * pow(e, -1.0 / DOP853_K));
    }
    w->h = h * fac;
}

/* Set up the next attempt: f(t, y) and, on the first step, the starting
 * step. 0, or the status to end with. */
static int dop853_prepare(dop853_ws *w)
{
    int s;
    if (!w->have_f0) {
        if ((s = dop853_deriv(w, w->t, w->y, w->kw[0])))
            return s;
        w->have_f0 = 1;
    }
    if (!(w->h > 0) && (s = dop853_initial_step(w)))
        return s;
    if (w->h < w->hmin || w->t + w->h == w->t)
        return PB_EMINSTEP;
    return PB_OK;
}

static int dop853_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    dop853_ws *w = ws;
    int s;
    if (!(t_out >= w->t))
        return PB_EINVAL;
    while (w->t < t_out) {
        if (w->cfg.max_steps > 0 && w->st.steps + w->st.rejected >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        if ((s = dop853_prepare(w))) {
            w->st.t_fail = w->t;
            return s;
        }
        double rem = t_out - w->t, h = w->h, err;
        int last = rem <= DOP853_STRETCH * h;
        if (last)
            h = rem;
        if ((s = dop853_try(w, h, &err))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (err <= 1.0) {
            if (last && h < w->h)
                w->st.output_cut++;
            /* A clamped step shorter than the proposal says nothing about the
             * step the solution allows: the proposal is kept for the next call. */
            if (!last || h >= w->h)
                dop853_control(w, h, err, 1);
            dop853_accept(w, h, last ? t_out : w->t + h);
            w->last_rejected = 0;
            if (obs && (s = obs(octx, w->t, w->y, w->y + w->dim)))
                return s;
        } else {
            dop853_control(w, h, err, 0);
            w->last_rejected = 1;
            w->st.rejected++;
        }
    }
    return PB_OK;
}

/* The extra stages 13..15 of the last step and the polynomial's
 * coefficients F0..F6. */
static int dop853_dense_prepare(dop853_ws *w)
{
    int n = w->n, s;
    double h = w->h_old, *const *k = w->kl;
    if (w->fsal_status)
        return w->fsal_status;
    for (int st = DOP853_STEP_STAGES + 1; st < DOP853_NSTAGES; st++) {
        dop853_stage_input(w, w->yold, h, st, k, w->ytmp);
        if ((s = dop853_deriv(w, w->t_old + dop853_c[st] * h, w->ytmp, k[st])))
            return s;
    }
    for (int i = 0; i < n; i++) {
        double dy = w->y[i] - w->yold[i], f0 = k[0][i], f1 = k[DOP853_STEP_STAGES][i];
        w->cont[0][i] = dy;
        w->cont[1][i] = h * f0 - dy;
        w->cont[2][i] = 2.0 * dy - h * (f0 + f1);
        for (int r = 0; r < 4; r++) {
            double acc = 0;
            for (int j = 0; j < DOP853_NSTAGES; j++)
                acc += dop853_d[r][j] * k[j][i];
            w->cont[3 + r][i] = h * acc;
        }
    }
    w->dense_ready = 1;
    return PB_OK;
}

/* Dense output. The three extra stages are evaluated the first time a state
 * inside the step is asked for, once per step, and counted like every other
 * evaluation (the harness's wrapper). That is why the const workspace of the
 * interface is written here: the workspace always comes from dop853_alloc
 * (never const), and only the last step's dense cache changes, never the
 * integration. The step's ends are returned exactly, without the extra
 * stages. */
static int dop853_dense(const void *cws, double t, double *r, double *v)
{
    dop853_ws *w = (dop853_ws *)cws;
    if (!w->have_step || !(t >= w->t_old && t <= w->t))
        return PB_EINVAL;
    const double *ye = t == w->t ? w->y : t == w->t_old ? w->yold : NULL;
    if (ye) {
        memcpy(r, ye, (size_t)w->dim * sizeof(double));
        memcpy(v, ye + w->dim, (size_t)w->dim * sizeof(double));
        return PB_OK;
    }
    int s;
    if (!w->dense_ready && (s = dop853_dense_prepare(w)))
        return s;
    double th = (t - w->t_old) / w->h_old, th1 = 1.0 - th;
    for (int i = 0; i < w->n; i++) {
        double p = w->cont[5][i] + th * w->cont[6][i];
        p = w->cont[4][i] + th1 * p;
        p = w->cont[3][i] + th * p;
        p = w->cont[2][i] + th1 * p;
        p = w->cont[1][i] + th * p;
        p = w->cont[0][i] + th1 * p;
        double yi = w->yold[i] + th * p;
        if (i < w->dim)
            r[i] = yi;
        else
            v[i - w->dim] = yi;
    }
    return PB_OK;
}

static void dop853_get_state(const void *ws, double *t, double *r, double *v)
{
    const dop853_ws *w = ws;
    *t = w->t;
    memcpy(r, w->y, (size_t)w->dim * sizeof(double));
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof(double));
}

static void dop853_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const dop853_ws *)ws)->st;
}

const pb_method_type pb_method_dop853 = {
    PB_METHOD_RECORD_HEAD,
    .name = "dop853",
    .description = "Dormand-Prince 8(5,3), 5th/3rd-order error estimate, 12 evaluations a "
                   "step (FSAL), 7th-order dense output (3 more where asked)",
    .source = "Prince & Dormand (1981) J. Comput. Appl. Math. 7, 67; Hairer, Norsett & "
              "Wanner, Solving ODEs I (2nd ed.) Sec. II.5, II.10 (DOP853)",
    .order = 8,
    .flags = PB_KIND_ADAPTIVE,
    .alloc = dop853_alloc,
    .start = dop853_start,
    .advance = dop853_advance,
    .get_state = dop853_get_state,
    .get_stats = dop853_get_stats,
    .free = dop853_free,
    .dense = dop853_dense,
    .dense_order = 7,
};
