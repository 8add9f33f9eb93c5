/* gauss_jackson.c - eighth-order Gauss-Jackson: summed Stormer-Cowell for r,
 * summed Adams for v, ordinate form, predict-evaluate-correct, with the
 * start-up iteration of Berry & Healy (2004), J. Astronaut. Sci. 52(3) 331-357
 * (from memory). Start-up points from Gragg-Bulirsch-Stoer extrapolation
 * (Hairer, Norsett & Wanner, Solving ODEs I, Sec. II.9). Fixed step. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "integrators/gauss_jackson_coeffs.h"
#include "propbench/dense.h"

/* Invariant of the summed accumulators: after every accepted step n,
 *   S_n, s_n are the second and first sums with
 *   s_n = s_{n-1} + (f_{n-1} + f_n)/2,  S_n = S_{n-1} + s_{n-1} + f_{n-1}/2,
 * and fw holds f_{n-8} .. f_n, so that r_n = h^2 (S_n + sum b[8][k] fw[k]) and
 * v_n = h (s_n + sum a[8][k] fw[k]). The sums carry the whole history; only the
 * last nine accelerations are kept. The integration constants s_0, S_0 are set
 * once, by the start-up, from the epoch state.
 *
 * Fixed step: on an eccentric orbit the step is set by periapsis, where the
 * local time scale r/v is shortest; the multistep error constant is large when
 * h is large against that scale, so for e >~ 0.3 a regularized or s-integrated
 * (Sundman) form is the right tool, which this is not. */

#define GJ_NB 9                 /* window: points -4..4 */
#define GJ_START_TOL 1e-15      /* start-up: max position change / max |r| */
#define GJ_START_MAXIT 60
#define GJ_CORR_MAXIT_DEFAULT 10
#define GJ_GBS_COLS 6           /* extrapolation columns: order 12 */

static const int gj_gbs_seq[GJ_GBS_COLS] = {2, 4, 6, 8, 10, 12};

typedef struct gj_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    pb_fixed_grid grid;         /* t0, h, the index of the current state */
    int started;
    double *r, *v;              /* current state */
    double *s, *S;              /* sums at the newest point */
    double *fw;                 /* [GJ_NB][dim] accelerations, oldest first */
    /* start-up and step scratch */
    double *rb, *vb;            /* [GJ_NB][dim] back points -4..4 */
    double *sb, *Sb;            /* [GJ_NB][dim] sums at the back points */
    double *fn;                 /* [GJ_NB][dim] window for the step being taken */
    double *rp, *vp, *rc, *vc, *Sn, *sn, *fa;
    double *gdy, *gz0, *gz1, *gdz, *gtab; /* GBS scratch (2*dim each), table [cols][2*dim] */
    pb_method_stats st;
    pb_dense_span span;         /* the last step's ends with their accelerations */
} gj_ws;

static void *gj_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    gj_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    size_t d = (size_t)dim;
    size_t total = d * (4 + 6 * GJ_NB + 7) + 2 * d * (4 + GJ_GBS_COLS);
    double *p = calloc(total, sizeof(double));
    if (!p) {
        free(w);
        return NULL;
    }
    w->r = p; p += d;
    w->v = p; p += d;
    w->s = p; p += d;
    w->S = p; p += d;
    w->fw = p; p += GJ_NB * d;
    w->rb = p; p += GJ_NB * d;
    w->vb = p; p += GJ_NB * d;
    w->sb = p; p += GJ_NB * d;
    w->Sb = p; p += GJ_NB * d;
    w->fn = p; p += GJ_NB * d;
    w->rp = p; p += d;
    w->vp = p; p += d;
    w->rc = p; p += d;
    w->vc = p; p += d;
    w->Sn = p; p += d;
    w->sn = p; p += d;
    w->fa = p; p += d;
    w->gdy = p; p += 2 * d;
    w->gz0 = p; p += 2 * d;
    w->gz1 = p; p += 2 * d;
    w->gdz = p; p += 2 * d;
    w->gtab = p;
    return w;
}

static void gj_free(void *ws)
{
    gj_ws *w = ws;
    if (!w)
        return;
    free(w->r);
    free(w);
}

static int gj_start(void *ws, const pb_force *f, const pb_method_config *cfg,
                    double t0, const double *r0, const double *v0)
{
    gj_ws *w = ws;
    if (!(cfg->h > 0) || !isfinite(cfg->h) || !isfinite(t0))
        return PB_EINVAL;
    if (cfg->corrector_tol < 0 || !isfinite(cfg->corrector_tol) || cfg->corrector_max_iter < 0)
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->started = 0;
    size_t sz = (size_t)w->dim * sizeof(double);
    memcpy(w->r, r0, sz);
    memcpy(w->v, v0, sz);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    pb_fixed_grid_init(&w->grid, t0, cfg->h, cfg->max_steps, w->r, w->v, &w->st);
    return PB_OK;
}

static int gj_eval(gj_ws *w, double t, const double *r, const double *v, double *a)
{
    int s = w->f.accel(w->f.ctx, t, r, v, a);
    if (s)
        return s;
    for (int i = 0; i < w->dim; i++)
        if (!isfinite(a[i]))
            return PB_ENONFINITE;
    return PB_OK;
}

/* dy = (v, a(t, r, v)) for y = (r, v) */
static int gj_deriv(gj_ws *w, double t, const double *y, double *dy)
{
    memcpy(dy, y + w->dim, (size_t)w->dim * sizeof(double));
    return gj_eval(w, t, y, y + w->dim, dy + w->dim);
}

/* One Gragg-Bulirsch-Stoer step of length H (either sign) from (t, y) into y:
 * modified midpoint rule with n = 2, 4, ..., 12 substeps, extrapolated in H^2
 * (Aitken-Neville). Only used to seed the start-up iteration, so a fixed
 * order is enough: the iteration, not this, sets the back values. */
static int gj_gbs_step(gj_ws *w, double t, double H, double *y)
{
    int n2 = 2 * w->dim, s, i;
    double *dy0 = w->gdy, *dyk = w->gdz, *z0 = w->gz0, *z1 = w->gz1;
    if ((s = gj_deriv(w, t, y, dy0)))
        return s;
    for (int c = 0; c < GJ_GBS_COLS; c++) {
        int n = gj_gbs_seq[c];
        double hs = H / n;
        for (i = 0; i < n2; i++) {
            z0[i] = y[i];
            z1[i] = y[i] + hs * dy0[i];
        }
        for (int m = 1; m < n; m++) {
            if ((s = gj_deriv(w, t + m * hs, z1, dyk)))
                return s;
            for (i = 0; i < n2; i++) {
                double z2 = z0[i] + 2.0 * hs * dyk[i];
                z0[i] = z1[i];
                z1[i] = z2;
            }
        }
        if ((s = gj_deriv(w, t + H, z1, dyk)))
            return s;
        /* Aitken-Neville in place: gtab[k] holds row c-1, becomes row c */
        for (i = 0; i < n2; i++) {
            double prev = w->gtab[i];
            w->gtab[i] = 0.5 * (z0[i] + z1[i] + hs * dyk[i]);
            for (int k = 1; k <= c; k++) {
                double ratio = (double)gj_gbs_seq[c] / gj_gbs_seq[c - k];
                double *Tk = w->gtab + (size_t)k * n2, *Tk1 = Tk - n2;
                double old = Tk[i];
                Tk[i] = Tk1[i] + (Tk1[i] - prev) / (ratio * ratio - 1.0);
                prev = old;
            }
        }
    }
    for (i = 0; i < n2; i++) {
        y[i] = w->gtab[(size_t)(GJ_GBS_COLS - 1) * n2 + i];
        if (!isfinite(y[i]))
            return PB_ENONFINITE;
    }
    return PB_OK;
}

/* The sums at all back points from the epoch state and the window fb. */
static void gj_back_sums(gj_ws *w, const double *fb)
{
    int d = w->dim;
    double h = w->cfg.h, h2 = h * h;
    const double *r0 = w->rb + 4 * d, *v0 = w->vb + 4 * d;
    for (int i = 0; i < d; i++) {
        double sa = 0, sb = 0;
        for (int k = 0; k < GJ_NB; k++) {
            sa += gj_a[4][k] * fb[k * d + i];
            sb += gj_b[4][k] * fb[k * d + i];
        }
        w->sb[4 * d + i] = v0[i] / h - sa;
        w->Sb[4 * d + i] = r0[i] / h2 - sb;
        for (int j = 5; j < GJ_NB; j++) {
            w->sb[j * d + i] = w->sb[(j - 1) * d + i] + 0.5 * (fb[(j - 1) * d + i] + fb[j * d + i]);
            w->Sb[j * d + i] = w->Sb[(j - 1) * d + i] + w->sb[(j - 1) * d + i] + 0.5 * fb[(j - 1) * d + i];
        }
        for (int j = 3; j >= 0; j--) {
            w->sb[j * d + i] = w->sb[(j + 1) * d + i] - 0.5 * (fb[(j + 1) * d + i] + fb[j * d + i]);
            w->Sb[j * d + i] = w->Sb[(j + 1) * d + i] - w->sb[j * d + i] - 0.5 * fb[j * d + i];
        }
    }
}

static double gj_time(const gj_ws *w, long n)
{
    return pb_fixed_grid_time(&w->grid, n);
}

/* Back points t0-4h .. t0+4h: seed by GBS, then correct with the
 * mid-corrector rows until the positions stop changing (Berry & Healy). */
static int gj_startup(gj_ws *w)
{
    int d = w->dim, s, i, j;
    size_t sz = (size_t)d * sizeof(double);
    double h = w->cfg.h, h2 = h * h;
    double y[2 * PB_STATE_DIM_MAX];
    memcpy(w->rb + 4 * d, w->r, sz);
    memcpy(w->vb + 4 * d, w->v, sz);
    for (int dir = -1; dir <= 1; dir += 2) {
        memcpy(y, w->r, sz);
        memcpy(y + d, w->v, sz);
        for (j = 1; j <= 4; j++) {
            if ((s = gj_gbs_step(w, gj_time(w, dir * (j - 1)), dir * h, y)))
                return s;
            w->st.startup_steps++;
            memcpy(w->rb + (4 + dir * j) * d, y, sz);
            memcpy(w->vb + (4 + dir * j) * d, y + d, sz);
        }
    }
    for (j = 0; j < GJ_NB; j++)
        if ((s = gj_eval(w, gj_time(w, j - 4), w->rb + j * d, w->vb + j * d, w->fw + j * d)))
            return s;
    for (int it = 0; it < GJ_START_MAXIT; it++) {
        gj_back_sums(w, w->fw);
        double change = 0, scale = 0;
        for (j = 0; j < GJ_NB; j++) {
            if (j == 4)
                continue;
            for (i = 0; i < d; i++) {
                double sa = 0, sb = 0;
                for (int k = 0; k < GJ_NB; k++) {
                    sa += gj_a[j][k] * w->fw[k * d + i];
                    sb += gj_b[j][k] * w->fw[k * d + i];
                }
                double rnew = h2 * (w->Sb[j * d + i] + sb);
                double vnew = h * (w->sb[j * d + i] + sa);
                if (!isfinite(rnew) || !isfinite(vnew))
                    return PB_ENONFINITE;
                change = fmax(change, fabs(rnew - w->rb[j * d + i]));
                scale = fmax(scale, fabs(rnew));
                w->rb[j * d + i] = rnew;
                w->vb[j * d + i] = vnew;
            }
        }
        for (j = 0; j < GJ_NB; j++)
            if (j != 4 && (s = gj_eval(w, gj_time(w, j - 4), w->rb + j * d, w->vb + j * d,
                                       w->fw + j * d)))
                return s;
        if (change <= GJ_START_TOL * scale) {
            gj_back_sums(w, w->fw);
            memcpy(w->s, w->sb + 8 * d, sz);
            memcpy(w->S, w->Sb + 8 * d, sz);
            return PB_OK;
        }
    }
    return PB_ENOCONV;
}

/* corrected r, v at the newest point of window fn with sums Sn, sn */
static void gj_correct(gj_ws *w, const double *fn, double *rc, double *vc)
{
    int d = w->dim;
    double h = w->cfg.h;
    for (int i = 0; i < d; i++) {
        double sa = 0, sb = 0;
        for (int k = 0; k < GJ_NB; k++) {
            sa += gj_a[8][k] * fn[k * d + i];
            sb += gj_b[8][k] * fn[k * d + i];
        }
        rc[i] = h * h * (w->Sn[i] + sb);
        vc[i] = h * (w->sn[i] + sa);
    }
}

/* One step n -> n+1, ending at t1: predict, evaluate, correct (iterated if
 * asked). On failure the workspace still holds step n. */
static int gj_step(gj_ws *w, double t1)
{
    int d = w->dim, s, i;
    double h = w->cfg.h, h2 = h * h;
    const double *fnow = w->fw + 8 * d;
    for (i = 0; i < d; i++) {
        double sa = 0, sb = 0;
        for (int k = 0; k < GJ_NB; k++) {
            sa += gj_a[9][k] * w->fw[k * d + i];
            sb += gj_b[9][k] * w->fw[k * d + i];
        }
        w->Sn[i] = w->S[i] + w->s[i] + 0.5 * fnow[i];
        w->rp[i] = h2 * (w->Sn[i] + sb);
        w->vp[i] = h * (w->s[i] + 0.5 * fnow[i] + sa);
    }
    if ((s = gj_eval(w, t1, w->rp, w->vp, w->fa)))
        return s;
    memcpy(w->fn, w->fw + d, (size_t)(8 * d) * sizeof(double));
    memcpy(w->fn + 8 * d, w->fa, (size_t)d * sizeof(double));
    for (i = 0; i < d; i++)
        w->sn[i] = w->s[i] + 0.5 * (fnow[i] + w->fa[i]);
    gj_correct(w, w->fn, w->rc, w->vc);
    if (w->cfg.corrector_tol > 0) {
        int maxit = w->cfg.corrector_max_iter > 0 ? w->cfg.corrector_max_iter
                                                  : GJ_CORR_MAXIT_DEFAULT;
        int it;
        for (it = 0; it < maxit; it++) {
            if ((s = gj_eval(w, t1, w->rc, w->vc, w->fa)))
                return s;
            memcpy(w->fn + 8 * d, w->fa, (size_t)d * sizeof(double));
            for (i = 0; i < d; i++)
                w->sn[i] = w->s[i] + 0.5 * (fnow[i] + w->fa[i]);
            double rold[PB_STATE_DIM_MAX], change = 0, scale = 0;
            memcpy(rold, w->rc, (size_t)d * sizeof(double));
            gj_correct(w, w->fn, w->rc, w->vc);
            for (i = 0; i < d; i++) {
                change = fmax(change, fabs(w->rc[i] - rold[i]));
                scale = fmax(scale, fabs(w->rc[i]));
            }
            if (change <= w->cfg.corrector_tol * scale)
                break;
        }
        if (it == maxit)
            return PB_ENOCONV;
    }
    for (i = 0; i < d; i++)
        if (!isfinite(w->rc[i]) || !isfinite(w->vc[i]))
            return PB_ENONFINITE;
    memcpy(w->fw, w->fn, (size_t)(GJ_NB * d) * sizeof(double));
    memcpy(w->s, w->sn, (size_t)d * sizeof(double));
    memcpy(w->S, w->Sn, (size_t)d * sizeof(double));
    memcpy(w->r, w->rc, (size_t)d * sizeof(double));
    memcpy(w->v, w->vc, (size_t)d * sizeof(double));
    return PB_OK;
}

/* pb_fixed_step_fn: the start-up before the first step of a run (it fails
 * at t0, the state kept), then steps 1..4 from the start-up's back points and
 * after them one PEC step each. */
static int gj_fixed_step(void *ctx, long n, double t, double t1)
{
    gj_ws *w = ctx;
    int d = w->dim, s;
    (void)t;
    if (!w->started) {
        if ((s = gj_startup(w)))
            return s;
        w->started = 1;
        pb_dense_set_a(&w->span, w->fw + 4 * d);
    }
    if (n < 4) {
        /* the start-up already produced t0+h .. t0+4h */
        memcpy(w->r, w->rb + (5 + n) * d, (size_t)d * sizeof(double));
        memcpy(w->v, w->vb + (5 + n) * d, (size_t)d * sizeof(double));
        pb_dense_push(&w->span, t1, w->r, w->v, w->fw + (5 + n) * d);
        return PB_OK;
    }
    if ((s = gj_step(w, t1)))
        return s;
    /* the newest acceleration, evaluated at the predicted position (PEC) */
    pb_dense_push(&w->span, t1, w->r, w->v, w->fw + 8 * d);
    return PB_OK;
}

static int gj_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const gj_ws *)ws)->span, t, r, v);
}

static int gj_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    gj_ws *w = ws;
    return pb_fixed_grid_advance(&w->grid, t_out, gj_fixed_step, w, obs, octx);
}

static void gj_get_state(const void *ws, double *t, double *r, double *v)
{
    const gj_ws *w = ws;
    *t = gj_time(w, w->grid.n);
    memcpy(r, w->r, (size_t)w->dim * sizeof(double));
    memcpy(v, w->v, (size_t)w->dim * sizeof(double));
}

static void gj_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const gj_ws *)ws)->st;
}

const pb_method_type pb_method_gauss_jackson8 = {
    PB_METHOD_RECORD_HEAD,
    .name = "gauss-jackson8",
    .description = "Gauss-Jackson 8th order, summed ordinate PEC, 1 evaluation a step",
    .source = "Berry & Healy (2004), J. Astronaut. Sci. 52(3) 331-357",
    /* measured, not nominal: differences up to the 8th summed twice are the
     * Stormer-Cowell series cut after its 10th difference, local error
     * O(h^13), global O(h^11) (tests/test_gauss_jackson.c: 10.85 on e = 0) */
    .order = 11,
    .flags = PB_KIND_FIXED | PB_KIND_MULTISTEP | PB_FORM_SECOND,
    .alloc = gj_alloc,
    .start = gj_start,
    .advance = gj_advance,
    .get_state = gj_get_state,
    .get_stats = gj_get_stats,
    .free = gj_free,
    .dense = gj_dense,
    .dense_order = 4,   /* quintic Hermite of the step's ends */
};
