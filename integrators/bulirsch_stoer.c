/* bulirsch_stoer.c - Gragg-Bulirsch-Stoer extrapolation, adaptive in step and
 * order, first-order form y = (r, v). Scheme: Bulirsch & Stoer (1966), Numer.
 * Math. 8, 1, Gragg's midpoint rule, steps 2, 6, 10, ...; order and step
 * control: Deuflhard (1985), SIAM Rev. 27, 505, in the form of Hairer, Norsett
 * & Wanner, Solving ODEs I (2nd ed.), Sec. II.9 (work per unit step); dense
 * output in bulirsch_stoer_dense.c. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/adaptive_setup.h"
#include "integrators/bulirsch_stoer.h"

/* Row j (1-based, as HNW) takes a step H with n_j midpoint substeps,
 * without the smoothing step: for even n_j Gragg's result already has an
 * error expansion in powers of (H/n_j)^2 (Gragg 1965; HNW II.9), and each row
 * costs n_j - 1 evaluations, f at the step's start being shared. T_jj, the
 * row's extrapolated diagonal entry, has order 2j; T_jj - T_j,j-1 estimates
 * the error of T_j,j-1, O(H^(2j-1)). The propagated value is T_kk of the
 * row that converged (local extrapolation, as HNW's ODEX). Work of a step up
 * to row j: A_j = sum_i<=j (n_i - 1) evaluations plus f at the new state,
 * which is the next step's f0 and the dense output's end derivative.
 * The sequence is n_j = 4j - 2 (2, 6, 10, ...), not the cheaper 2, 4, 6, ...
 * (17-35% fewer evaluations at equal final error 1e-4 .. 1e-10 on
 * kepler-e0.5 over 100 orbits, measured):
 * only a sequence whose midpoint indices n_j/2 share one parity gives a
 * dense output of the step's own order (see bulirsch_stoer_dense.c), and a
 * quintic Hermite interpolant over these long steps (9 to 15 an orbit on
 * kepler-e0.5) was measured 1e-4 off at mid-step where the step's ends were
 * 1e-11 off: the samples would have measured the interpolant. */
#define BS_KMAX PB_BS_KMAX
#define BS_KMIN 2 /* the lowest target row: row 1 has no error estimate */

/* HNW II.9 (with their ODEX code's defaults): H_j = H * SAFE2 *
 * (SAFE1/err_j)^(1/(2j-1)), the factor bounded by FAC3^(1/(2j-1)) (growth at
 * most 1/that) and that / FAC4 (shrink); the order is lowered when the
 * work per unit step of the row below is under ORD_DOWN times this row's,
 * raised when this row's is under ORD_UP times the row below's. */
#define BS_SAFE1 0.65
#define BS_SAFE2 0.94
#define BS_FAC3 0.02
#define BS_FAC4 4.0
#define BS_ORD_DOWN 0.8
#define BS_ORD_UP 0.9
/* A last step up to 1% longer than the proposal is stretched to t_out. */
#define BS_STRETCH 1.01

typedef struct bs_ws {
    int dim, n;
    pb_force f;
    pb_method_config cfg;
    double t;
    double H;              /* the proposal for the next step (0: none yet) */
    int k;                 /* the target row of the next step */
    double hmin;
    double *atol;          /* effective absolute tolerance per component */
    int have_f0;           /* f0 holds f(t, y) */
    int last_rejected;
    double *mem;
    double *y, *f0, *zprev, *zcur;
    double *T[BS_KMAX + 1]; /* T[l] = T_j,l of the row j last built, l = 1..j */
    double err[BS_KMAX + 1], hopt[BS_KMAX + 1], work[BS_KMAX + 1];
    long rows[BS_KMAX + 1];      /* accepted steps by the row they converged at */
    long rej_rows[BS_KMAX + 1];  /* rejected attempts by the last row they built */
    /* Each attempt keeps its rows' f values and midpoint states in bank
     * `cur`; an accepted step's bank becomes the other one's, so the last
     * step's stays whole for dense output while the next step is tried. */
    int cur;
    double *fstore[2], *zmid[2][BS_KMAX + 1];
    /* the last accepted step: from (t_old, yold, f0old), size H_old, row kc_old */
    double t_old, H_old, *yold, *f0old, *coef;
    int kc_old, have_step, fsal_status, dense_deg; /* dense_deg 0: not built */
    pb_method_stats st;
} bs_ws;

/* n_j, the substeps of row j */
static int bs_nseq(int j)
{
    return pb_bs_nseq(j);
}

/* A_j: the evaluations of a step that ends at row j (see above) */
static double bs_cost(int j)
{
    return (double)(1 + pb_bs_foffset(j + 1));
}

static void *bs_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    bs_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    w->n = 2 * dim;
    size_t nvec = 7 + BS_KMAX + 2 * (PB_BS_NFSTORE + BS_KMAX) + PB_BS_DENSE_NCOEF;
    w->mem = calloc(nvec * (size_t)w->n, sizeof(double));
    if (!w->mem) {
        free(w);
        return NULL;
    }
    double *p = w->mem;
    w->y = p, p += w->n;
    w->f0 = p, p += w->n;
    w->zprev = p, p += w->n;
    w->zcur = p, p += w->n;
    w->atol = p, p += w->n;
    w->yold = p, p += w->n;
    w->f0old = p, p += w->n;
    for (int l = 1; l <= BS_KMAX; l++)
        w->T[l] = p, p += w->n;
    for (int b = 0; b < 2; b++) {
        w->fstore[b] = p, p += (size_t)PB_BS_NFSTORE * (size_t)w->n;
        for (int j = 1; j <= BS_KMAX; j++)
            w->zmid[b][j] = p, p += w->n;
    }
    w->coef = p;
    return w;
}

static void bs_free(void *ws)
{
    bs_ws *w = ws;
    if (!w)
        return;
    free(w->mem);
    free(w);
}

/* The first target row from the tolerance, as HNW's ODEX: tighter
 * tolerances start higher. */
static int bs_first_row(double tol)
{
    int k = (int)(-log10(tol + 1e-40) * 0.6 + 1.5);
    return k < BS_KMIN ? BS_KMIN : k > BS_KMAX - 1 ? BS_KMAX - 1 : k;
}

static int bs_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                    const double *r0, const double *v0)
{
    bs_ws *w = ws;
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
    w->H = cfg->h;
    w->k = bs_first_row(cfg->rtol > 0 ? cfg->rtol : cfg->atol);
    w->have_f0 = 0;
    w->last_rejected = 0;
    memset(w->rows, 0, sizeof w->rows);
    memset(w->rej_rows, 0, sizeof w->rej_rows);
    w->have_step = 0;
    w->dense_deg = 0;
    w->fsal_status = PB_OK;
    memcpy(w->y, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    return PB_OK;
}

/* dy/dt = (v, a(t, r, v)) */
static int bs_deriv(const bs_ws *w, double t, const double *y, double *dy)
{
    memcpy(dy, y + w->dim, (size_t)w->dim * sizeof(double));
    return w->f.accel(w->f.ctx, t, y, y + w->dim, dy + w->dim);
}

/* Weighted RMS norm of e against the tolerances at y and ynew. */
static double bs_err_norm(const bs_ws *w, const double *y, const double *ynew, const double *e)
{
    double s = 0;
    for (int i = 0; i < w->n; i++) {
        double sc = w->atol[i] + w->cfg.rtol * fmax(fabs(y[i]), fabs(ynew[i]));
        double q = e[i] / sc;
        s += q * q;
    }
    return sqrt(s / w->n);
}

/* Row j of the tableau for a step H from (t, y), f0 = f(t, y) given:
 * Gragg's midpoint rule with n_j substeps gives T_j1 (its f values and its
 * midpoint state kept in bank cur for dense output), then Aitken-Neville
 * extrapolation to h = 0 in h^2 along the row, T_j,l+1 = T_jl + (T_jl -
 * T_j-1,l) / ((n_j / n_j-l)^2 - 1), with T[l] holding row j-1 on entry and
 * row j on return. For j >= 2, err (if not NULL) gets the norm of T_jj -
 * T_j,j-1. */
static int bs_row(bs_ws *w, int j, double H, double *err)
{
    int n = w->n, m = bs_nseq(j), s;
    double h = H / m, *zp = w->zprev, *zc = w->zcur;
    double *fr = w->fstore[w->cur] + (size_t)pb_bs_foffset(j) * (size_t)n;
    for (int i = 0; i < n; i++) {
        zp[i] = w->y[i];
        zc[i] = w->y[i] + h * w->f0[i];
    }
    for (int q = 1; q < m; q++) {
        double *fq = fr + (size_t)(q - 1) * (size_t)n;
        if (q == m / 2)
            memcpy(w->zmid[w->cur][j], zc, (size_t)n * sizeof(double));
        if ((s = bs_deriv(w, w->t + q * h, zc, fq)))
            return s;
        for (int i = 0; i < n; i++) {
            double znext = zp[i] + 2.0 * h * fq[i];
            zp[i] = zc[i];
            zc[i] = znext;
        }
    }
    /* zc = T_j1; zp is free now and keeps the last increment */
    for (int i = 0; i < n; i++)
        zp[i] = 0;
    for (int l = 1; l < j; l++) {
        double r = (double)m / bs_nseq(j - l), den = r * r - 1.0;
        for (int i = 0; i < n; i++) {
            double d = (zc[i] - w->T[l][i]) / den;
            w->T[l][i] = zc[i];
            zc[i] += d;
            zp[i] = d;
        }
    }
    memcpy(w->T[j], zc, (size_t)n * sizeof(double));
    for (int i = 0; i < n; i++)
        if (!isfinite(zc[i]))
            return PB_ENONFINITE;
    if (err && j >= 2)
        *err = bs_err_norm(w, w->y, zc, zp);
    return PB_OK;
}

/* H_j, the step row j would need for err_j = SAFE1 next time, and W_j =
 * A_j / H_j, its work per unit step (HNW II.9). */
static void bs_optimal_step(bs_ws *w, int j, double H)
{
    double expo = 1.0 / (2 * j - 1), facmin = pow(BS_FAC3, expo);
    double fac = BS_SAFE2 * pow(BS_SAFE1 / fmax(w->err[j], 1e-300), expo);
    fac = fmin(1.0 / facmin, fmax(facmin / BS_FAC4, fac));
    w->hopt[j] = H * fac;
    w->work[j] = bs_cost(j) / w->hopt[j];
}

/* One attempt of size H aiming at row k (HNW II.9's convergence monitor):
 * rows 1..k-1 are always built; row k-1 converged (err <= 1) is accepted;
 * an error there too large for row k+1 to meet, (n_k n_k+1 / n_1^2)^2,
 * rejects at once; else row k, accepted if converged, rejected if its error
 * exceeds (n_k+1 / n_1)^2; else row k+1, accepted or rejected. *kc gets the
 * accepted row (0: rejected), *jlast the last row built. */
static int bs_try(bs_ws *w, double H, int k, int *kc, int *jlast)
{
    double n1 = bs_nseq(1), nk = bs_nseq(k), nk1 = bs_nseq(k + 1);
    *kc = 0;
    for (int j = 1; j <= k + 1; j++) {
        int s = bs_row(w, j, H, &w->err[j]);
        if (s)
            return s;
        *jlast = j;
        if (j < 2)
            continue;
        bs_optimal_step(w, j, H);
        if (j < k - 1)
            continue;
        double e = w->err[j];
        if (e <= 1.0) {
            *kc = j;
            return PB_OK;
        }
        if ((j == k - 1 && e > pow(nk * nk1 / (n1 * n1), 2)) ||
            (j == k && e > pow(nk1 / n1, 2)))
            return PB_OK;
    }
    return PB_OK;
}

/* The next target row and step after an attempt aimed at row k that ended
 * at row kc (accepted) or was rejected after row kc (HNW II.9 and
 * ODEX): among rows kc-1, kc, kc+1 the least work per unit step, a lower row
 * needing ORD_DOWN less work, a higher one ORD_UP less; a higher row's step
 * is this row's stretched by A_kc+1 / A_kc (its own is unknown). After a
 * rejection the row is at most kc and the step no longer. */
static void bs_select(bs_ws *w, int k, int kc, double H, int accepted)
{
    int kopt;
    const double *W = w->work;
    if (kc <= BS_KMIN) {
        kopt = accepted ? BS_KMIN + 1 : BS_KMIN;
    } else if (kc <= k) {
        kopt = kc;
        if (kc - 1 >= BS_KMIN && W[kc - 1] < BS_ORD_DOWN * W[kc])
            kopt = kc - 1;
        else if (W[kc] < BS_ORD_UP * W[kc - 1])
            kopt = kc + 1;
    } else {
        kopt = kc - 1;
        if (kc - 2 >= BS_KMIN && W[kc - 2] < BS_ORD_DOWN * W[kc - 1])
            kopt = kc - 2;
        if (W[kc] < BS_ORD_UP * W[kopt])
            kopt = kc;
    }
    if (kopt > BS_KMAX - 1)
        kopt = BS_KMAX - 1;
    if (!accepted) {
        int kr = kopt < kc ? kopt : kc;
        if (kr < BS_KMIN)
            kr = BS_KMIN;
        w->k = kr;
        w->H = fmin(H, w->hopt[kr]);
        return;
    }
    double Hn = kopt <= kc ? w->hopt[kopt] : w->hopt[kc] * bs_cost(kopt) / bs_cost(kc);
    if (w->last_rejected)
        Hn = fmin(Hn, H);
    w->k = kopt;
    w->H = Hn;
}

/* Starting step (HNW I, Sec. II.4, for the order 2k of the first target
 * row), the book's unit-time fallbacks scaled by the time scale. Uses f0;
 * costs one more evaluation. */
static int bs_initial_step(bs_ws *w)
{
    int n = w->n, s;
    double scale = w->cfg.time_scale > 0 ? w->cfg.time_scale : 1.0;
    double d0 = bs_err_norm(w, w->y, w->y, w->y), d1 = bs_err_norm(w, w->y, w->y, w->f0);
    double h0 = pb_first_step_trial(d0, d1, scale);
    for (int i = 0; i < n; i++)
        w->zprev[i] = w->y[i] + h0 * w->f0[i];
    double *f1 = w->fstore[w->cur];
    if ((s = bs_deriv(w, w->t + h0, w->zprev, f1)))
        return s;
    for (int i = 0; i < n; i++)
        w->zcur[i] = f1[i] - w->f0[i];
    double d2 = bs_err_norm(w, w->y, w->y, w->zcur) / h0;
    w->H = pb_first_step(h0, d1, d2, 2 * w->k + 1, scale);
    return PB_OK;
}

/* Set up the next attempt: f(t, y) and, on the first step, the starting
 * step. 0, or the status to end with. */
static int bs_prepare(bs_ws *w)
{
    int s;
    if (!w->have_f0) {
        if ((s = bs_deriv(w, w->t, w->y, w->f0)))
            return s;
        w->have_f0 = 1;
    }
    if (!(w->H > 0) && (s = bs_initial_step(w)))
        return s;
    if (w->H < w->hmin || w->t + w->H == w->t)
        return PB_EMINSTEP;
    return PB_OK;
}

/* Row kc converged on a step of size H ending at t_new: T_kc,kc becomes the
 * state, the step's start and bank are kept for dense output, and f at the
 * new state (the next step's f0) is evaluated at once for the dense
 * output's end; a failure of it is met again, and reported, by the next
 * step. */
static void bs_accept(bs_ws *w, int kc, double H, double t_new)
{
    memcpy(w->yold, w->y, (size_t)w->n * sizeof(double));
    memcpy(w->f0old, w->f0, (size_t)w->n * sizeof(double));
    memcpy(w->y, w->T[kc], (size_t)w->n * sizeof(double));
    w->t_old = w->t;
    w->H_old = H;
    w->kc_old = kc;
    w->cur ^= 1;
    w->have_step = 1;
    w->dense_deg = 0;
    w->t = t_new;
    w->rows[kc]++;
    w->st.steps++;
    w->last_rejected = 0;
    w->fsal_status = bs_deriv(w, w->t, w->y, w->f0);
    w->have_f0 = w->fsal_status == PB_OK;
}

static int bs_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    bs_ws *w = ws;
    int s;
    if (!(t_out >= w->t))
        return PB_EINVAL;
    while (w->t < t_out) {
        if (w->cfg.max_steps > 0 && w->st.steps + w->st.rejected >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        if ((s = bs_prepare(w))) {
            w->st.t_fail = w->t;
            return s;
        }
        double rem = t_out - w->t, H = w->H;
        int last = rem <= BS_STRETCH * H, kc, jlast = 0, k = w->k;
        if (last)
            H = rem;
        if ((s = bs_try(w, H, k, &kc, &jlast))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (kc) {
            if (last && H < w->H)
                w->st.output_cut++;
            /* a clamped step shorter than the proposal says nothing about
             * the step and order the solution allows: both are kept */
            if (!last || H >= w->H)
                bs_select(w, k, kc, H, 1);
            bs_accept(w, kc, H, last ? t_out : w->t + H);
            if (obs && (s = obs(octx, w->t, w->y, w->y + w->dim)))
                return s;
        } else {
            bs_select(w, k, jlast, H, 0);
            w->rej_rows[jlast]++;
            w->last_rejected = 1;
            w->st.rejected++;
        }
    }
    return PB_OK;
}

/* Dense output (bulirsch_stoer_dense.c): the polynomial is built the first
 * time a state inside the step is asked for, once per step, from data the
 * step kept; no evaluations. That is why the const workspace of the
 * interface is written here: it always comes from bs_alloc (never const),
 * and only the last step's dense cache changes, never the integration. The
 * step's ends are returned exactly. */
static int bs_dense(const void *cws, double t, double *r, double *v)
{
    bs_ws *w = (bs_ws *)cws;
    if (!w->have_step || !(t >= w->t_old && t <= w->t))
        return PB_EINVAL;
    const double *ye = t == w->t ? w->y : t == w->t_old ? w->yold : NULL;
    if (ye) {
        memcpy(r, ye, (size_t)w->dim * sizeof(double));
        memcpy(v, ye + w->dim, (size_t)w->dim * sizeof(double));
        return PB_OK;
    }
    if (w->fsal_status)
        return w->fsal_status;
    int last = w->cur ^ 1;
    if (!w->dense_deg)
        w->dense_deg = pb_bs_dense_build(w->n, w->kc_old, w->H_old, w->yold, w->f0old, w->y,
                                         w->f0, (const double *const *)w->zmid[last],
                                         w->fstore[last], w->coef);
    double yt[2 * PB_STATE_DIM_MAX];
    pb_bs_dense_eval(w->n, w->dense_deg, w->coef, (t - w->t_old) / w->H_old, yt);
    memcpy(r, yt, (size_t)w->dim * sizeof(double));
    memcpy(v, yt + w->dim, (size_t)w->dim * sizeof(double));
    return PB_OK;
}

static void bs_get_state(const void *ws, double *t, double *r, double *v)
{
    const bs_ws *w = ws;
    *t = w->t;
    memcpy(r, w->y, (size_t)w->dim * sizeof(double));
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof(double));
}

static void bs_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const bs_ws *)ws)->st;
}

int pb_bs_extrapolated_step(void *ws, double H, int k, double theta, double *y_out)
{
    bs_ws *w = ws;
    int s, n = w->n;
    if (k < 1 || k > BS_KMAX || !(H > 0) || !isfinite(H) || !(theta >= 0 && theta <= 1))
        return PB_EINVAL;
    if (!w->have_f0) {
        if ((s = bs_deriv(w, w->t, w->y, w->f0)))
            return s;
        w->have_f0 = 1;
    }
    for (int j = 1; j <= k; j++)
        if ((s = bs_row(w, j, H, NULL)))
            return s;
    if (theta == 1) {
        memcpy(y_out, w->T[k], (size_t)n * sizeof(double));
        return PB_OK;
    }
    /* the dense output of this step, its end derivative in zcur */
    if ((s = bs_deriv(w, w->t + H, w->T[k], w->zcur)))
        return s;
    int deg = pb_bs_dense_build(n, k, H, w->y, w->f0, w->T[k], w->zcur,
                                (const double *const *)w->zmid[w->cur], w->fstore[w->cur],
                                w->coef);
    pb_bs_dense_eval(n, deg, w->coef, theta, y_out);
    return PB_OK;
}

void pb_bs_row_counts(const void *ws, long accepted[PB_BS_KMAX + 1],
                      long rejected[PB_BS_KMAX + 1])
{
    const bs_ws *w = ws;
    memcpy(accepted, w->rows, sizeof w->rows);
    memcpy(rejected, w->rej_rows, sizeof w->rej_rows);
}

const pb_method_type pb_method_bulirsch_stoer = {
    PB_METHOD_RECORD_HEAD,
    .name = "bulirsch-stoer",
    .description = "Gragg-Bulirsch-Stoer extrapolation, steps 2,6,10,..., order 4-18 and step "
                   "chosen by work per unit step, extrapolated dense output",
    .source = "Bulirsch & Stoer (1966) Numer. Math. 8, 1; Deuflhard (1985) SIAM Rev. 27, 505; "
              "Hairer, Norsett & Wanner, Solving ODEs I (2nd ed.) Sec. II.9; dense output: "
              "Hairer & Ostermann (1990) Numer. Math. 58, 419",
    /* Both vary with the row kc a step converges at, 2..KMAX: order 2 kc,
     * dense output 2 kc - 1 (local error O(H^(2 kc)), bulirsch_stoer_dense.c);
     * the record states the maxima, as gsl-msadams states its 12. */
    .order = 2 * BS_KMAX,
    .flags = PB_KIND_ADAPTIVE,
    .alloc = bs_alloc,
    .start = bs_start,
    .advance = bs_advance,
    .get_state = bs_get_state,
    .get_stats = bs_get_stats,
    .free = bs_free,
    .dense = bs_dense,
    .dense_order = 2 * BS_KMAX - 1,
};
