/* gauss_jackson.c - eighth-order Gauss-Jackson: summed Stormer-Cowell for r,
 * summed Adams for v, ordinate form, predict-evaluate-correct, with the
 * start-up iteration of Berry & Healy (2004), J. Astronaut. Sci. 52(3) 331-357
 * (from memory). Start-up points from Gragg-Bulirsch-Stoer extrapolation
 * (Hairer, Norsett & Wanner, Solving ODEs I, Sec. II.9). Fixed step. */
#include <math.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "integrators/gauss_jackson_coeffs.h"
#include "propbench/dense.h"

/* Invariant of the summed accumulators: after every accepted step n,
 *   S_n, s_n are the second and first sums with
 *   s_n = s_{n-1} + (f_{n-1} + f_n)/2,  S_n = S_{n-1} + s_{n-1} + f_{n-1}/2,
 * and the window holds f_{n-8} .. f_n, so that r_n = h^2 (S_n + sum b[8][k] f[k])
 * and v_n = h (s_n + sum a[8][k] f[k]). The sums carry the whole history; only
 * the last nine accelerations are kept. The integration constants s_0, S_0 are
 * set once, by the start-up, from the epoch state.
 *
 * The window lives in a ring of GJ_RING slots, each slot k < GJ_NB - 1 mirrored
 * at k + GJ_RING, so that the window (head .. head+8) and the one a step is
 * building (head+1 .. head+9) are each contiguous and nothing is shifted; the
 * new acceleration goes to the slot outside the current window, so a failed
 * step leaves the window whole. Of each 9-term sum the 8 terms over known
 * accelerations are summed before the force call (in the same order, the new
 * term last, as the full sum would be: the same bits), which takes them off
 * the path from one force evaluation to the next.
 *
 * Fixed step: on an eccentric orbit the step is set by periapsis, where the
 * local time scale r/v is shortest; the multistep error constant is large when
 * h is large against that scale, so for e >~ 0.3 a regularized or s-integrated
 * (Sundman) form is the right tool, which this is not. */

#define GJ_NB 9                 /* window: points -4..4 */
#define GJ_RING (GJ_NB + 1)     /* the window and the slot a step writes */
#define GJ_RING_SLOTS (GJ_RING + GJ_NB - 1) /* with the mirrors */
#define GJ_START_TOL 1e-15      /* start-up: max position change / max |r| */
#define GJ_START_MAXIT 60
#define GJ_CORR_MAXIT_DEFAULT 10
#define GJ_GBS_COLS 6           /* extrapolation columns: order 12 */

static const int gj_gbs_seq[GJ_GBS_COLS] = {2, 4, 6, 8, 10, 12};

/* Two doubles side by side (GCC's and clang's vector extension; SSE2 on
 * x86-64): each lane does the scalar operation it replaces, in the same
 * order, so results are the same bits. */
typedef double gj_v2 __attribute__((vector_size(2 * sizeof(double))));

/* calloc's alignment serves the pairs at the workspace's start */
_Static_assert(_Alignof(gj_v2) <= _Alignof(max_align_t), "gj_v2 in a calloc'ed workspace");

typedef struct gj_ws {
    /* rows 8 and 9 of the coefficients (the only rows the steps sum with) as
     * pairs {a[row][k], b[row][k]}, for the 3-d partial sums: ab[row - 8] */
    gj_v2 ab[2][GJ_NB - 1];
    int dim;
    double *block;              /* the one allocation all arrays below share */
    pb_force f;
    pb_method_config cfg;
    pb_fixed_grid grid;         /* t0, h, the index of the current state */
    int started;
    double *r, *v;              /* current state */
    double *s, *S;              /* sums at the newest point */
    double *ring;               /* [GJ_RING_SLOTS][dim] accelerations, see above */
    int head;                   /* slot of the window's oldest point */
    int have_part;              /* pa, pb hold the next predictor's partial sums */
    double *pa, *pb;            /* sum over k < 8 of a[9][k], b[9][k] times window[k] */
    double *pan, *pbn, *ca, *cb;/* the same for the next step; the corrector's */
    double *fw;                 /* [GJ_NB][dim] start-up accelerations, oldest first */
    /* start-up and step scratch */
    double *rb, *vb;            /* [GJ_NB][dim] back points -4..4 */
    double *sb, *Sb;            /* [GJ_NB][dim] sums at the back points */
    double *rp, *vp, *rc, *vc, *Sn, *sn;
    double *gdy, *gz0, *gz1, *gdz, *gtab; /* GBS scratch (2*dim each), table [cols][2*dim] */
    pb_method_stats st;
    double *rq, *vq;            /* the state one step back, for the dense output */
} gj_ws;

static void *gj_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    gj_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    for (int k = 0; k < GJ_NB - 1; k++) {
        w->ab[0][k] = (gj_v2){gj_a[8][k], gj_b[8][k]};
        w->ab[1][k] = (gj_v2){gj_a[9][k], gj_b[9][k]};
    }
    size_t d = (size_t)dim;
    size_t total = d * (4 + 5 * GJ_NB + 6) + 2 * d * (4 + GJ_GBS_COLS) +
                   d * (GJ_RING_SLOTS + 8);
    double *p = calloc(total, sizeof(double));
    if (!p) {
        free(w);
        return NULL;
    }
    w->block = p;
    w->r = p; p += d;
    w->v = p; p += d;
    w->s = p; p += d;
    w->S = p; p += d;
    w->fw = p; p += GJ_NB * d;
    w->rb = p; p += GJ_NB * d;
    w->vb = p; p += GJ_NB * d;
    w->sb = p; p += GJ_NB * d;
    w->Sb = p; p += GJ_NB * d;
    w->rp = p; p += d;
    w->vp = p; p += d;
    w->rc = p; p += d;
    w->vc = p; p += d;
    w->Sn = p; p += d;
    w->sn = p; p += d;
    w->gdy = p; p += 2 * d;
    w->gz0 = p; p += 2 * d;
    w->gz1 = p; p += 2 * d;
    w->gdz = p; p += 2 * d;
    w->gtab = p; p += 2 * d * GJ_GBS_COLS;
    w->ring = p; p += GJ_RING_SLOTS * d;
    w->pa = p; p += d;
    w->pb = p; p += d;
    w->pan = p; p += d;
    w->pbn = p; p += d;
    w->ca = p; p += d;
    w->cb = p; p += d;
    w->rq = p; p += d;
    w->vq = p;
    return w;
}

static void gj_free(void *ws)
{
    gj_ws *w = ws;
    if (!w)
        return;
    free(w->block);
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
    w->have_part = 0;
    size_t sz = (size_t)w->dim * sizeof(double);
    memcpy(w->r, r0, sz);
    memcpy(w->v, v0, sz);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    pb_fixed_grid_init(&w->grid, t0, cfg->h, cfg->max_steps, w->r, w->v, &w->st);
    return PB_OK;
}

/* The force at (t, r, v) into a, refused when not finite; d is w->dim (a
 * constant in the 3-d step, see gj_step). */
static PB_STEP_INLINE int gj_eval(gj_ws *w, double t, const double *r, const double *v, double *a,
                                  const int d)
{
    int s = w->f.accel(w->f.ctx, t, r, v, a), ok = 1;
    if (s)
        return s;
    PB_UNROLL_COMPONENTS
    for (int i = 0; i < d; i++)
        ok &= isfinite(a[i]) != 0;
    return ok ? PB_OK : PB_ENONFINITE;
}

/* dy = (v, a(t, r, v)) for y = (r, v) */
static int gj_deriv(gj_ws *w, double t, const double *y, double *dy)
{
    memcpy(dy, y + w->dim, (size_t)w->dim * sizeof(double));
    return gj_eval(w, t, y, y + w->dim, dy + w->dim, w->dim);
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
        if ((s = gj_eval(w, gj_time(w, j - 4), w->rb + j * d, w->vb + j * d, w->fw + j * d, d)))
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
                                       w->fw + j * d, d)))
                return s;
        if (change <= GJ_START_TOL * scale) {
            gj_back_sums(w, w->fw);
            memcpy(w->s, w->sb + 8 * d, sz);
            memcpy(w->S, w->Sb + 8 * d, sz);
            memcpy(w->ring, w->fw, GJ_NB * sz);
            memcpy(w->ring + GJ_RING * d, w->fw, (GJ_NB - 1) * sz);
            w->head = 0;
            return PB_OK;
        }
    }
    return PB_ENOCONV;
}

/* pa[i] = sum over k < 8 of ca[k] f[k][i], pb likewise with cb, and the
 * same with ea, eb into qa, qb: each summed from 0 in k order, as the full
 * 9-term sums begin. */
static void gj_partials_d(int d, const double *f, const double *ca, const double *cb,
                          double *pa, double *pb, const double *ea, const double *eb,
                          double *qa, double *qb)
{
    /* 4 d independent chains side by side (k outer), on the stack: the
     * outputs alias nothing the loop reads, but the compiler cannot know it */
    double sa[PB_STATE_DIM_MAX], sb[PB_STATE_DIM_MAX], ta[PB_STATE_DIM_MAX], tb[PB_STATE_DIM_MAX];
    for (int i = 0; i < d; i++)
        sa[i] = sb[i] = ta[i] = tb[i] = 0;
    for (int k = 0; k < GJ_NB - 1; k++)
        for (int i = 0; i < d; i++) {
            double x = f[k * d + i];
            sa[i] += ca[k] * x;
            sb[i] += cb[k] * x;
            ta[i] += ea[k] * x;
            tb[i] += eb[k] * x;
        }
    for (int i = 0; i < d; i++)
        pa[i] = sa[i], pb[i] = sb[i], qa[i] = ta[i], qb[i] = tb[i];
}

/* The corrector's partial sums (row rc of the coefficients) into pa, pb and
 * the next predictor's (row re) into qa, qb, over the 8 points from f; rc
 * and re are 8 or 9, the rows the workspace keeps in pairs. */
static PB_STEP_INLINE void gj_partials(const gj_ws *w, const double *f, int rc, double *pa, double *pb, int re,
                        double *qa, double *qb)
{
    if (w->dim != 3) {
        gj_partials_d(w->dim, f, gj_a[rc], gj_b[rc], pa, pb, gj_a[re], gj_b[re], qa, qb);
        return;
    }
    /* the common case: for each component, the a and b sums of a row side
     * by side, the component broadcast: 6 pairs of chains, one multiply and
     * one add each a point */
    const gj_v2 *kc = w->ab[rc - 8], *ke = w->ab[re - 8];
    gj_v2 c0 = {0, 0}, c1 = {0, 0}, c2 = {0, 0}, e0 = {0, 0}, e1 = {0, 0}, e2 = {0, 0};
    for (int k = 0; k < GJ_NB - 1; k++) {
        const double *x = f + 3 * k;
        gj_v2 x0 = {x[0], x[0]}, x1 = {x[1], x[1]}, x2 = {x[2], x[2]};
        c0 += kc[k] * x0, c1 += kc[k] * x1, c2 += kc[k] * x2;
        e0 += ke[k] * x0, e1 += ke[k] * x1, e2 += ke[k] * x2;
    }
    pa[0] = c0[0], pa[1] = c1[0], pa[2] = c2[0];
    pb[0] = c0[1], pb[1] = c1[1], pb[2] = c2[1];
    qa[0] = e0[0], qa[1] = e1[0], qa[2] = e2[0];
    qb[0] = e0[1], qb[1] = e1[1], qb[2] = e2[1];
}

/* The ring slot outside the window, where the new point's acceleration
 * goes: (head + GJ_NB) % GJ_RING, without a division. */
static inline int gj_new_slot(const gj_ws *w)
{
    return w->head ? w->head - 1 : GJ_NB;
}

/* The acceleration at the new point: evaluated into the ring slot outside
 * the window (and its mirror). */
static PB_STEP_INLINE int gj_eval_new(gj_ws *w, double t, const double *r, const double *v, double *fa,
                                  const int d)
{
    int s = gj_eval(w, t, r, v, fa, d);
    if (s)
        return s;
    int q = gj_new_slot(w);
    if (q < GJ_NB - 1) {
        double *mirror = w->ring + (size_t)(q + GJ_RING) * d;
        PB_UNROLL_COMPONENTS
        for (int i = 0; i < d; i++)
            mirror[i] = fa[i];
    }
    return PB_OK;
}

/* corrected r, v at the new point from its acceleration fa, the corrector's
 * partial sums and the sums Sn, sn (locals: the arrays alias nothing, which
 * the compiler cannot see through w) */
static PB_STEP_INLINE void gj_correct(gj_ws *w, const double *fnow, const double *fa, const int d)
{
    double h = w->cfg.h, h2 = h * h;
    const double *s = w->s, *Sn = w->Sn, *ca = w->ca, *cb = w->cb;
    double *sn = w->sn, *rc = w->rc, *vc = w->vc;
    const double a8 = gj_a[8][GJ_NB - 1], b8 = gj_b[8][GJ_NB - 1];
    PB_UNROLL_COMPONENTS
    for (int i = 0; i < d; i++) {
        double f = fa[i], sni = s[i] + 0.5 * (fnow[i] + f);
        double r = h2 * (Sn[i] + (cb[i] + b8 * f)), v = h * (sni + (ca[i] + a8 * f));
        sn[i] = sni, rc[i] = r, vc[i] = v;
    }
}

/* The corrector iterated to corrector_tol (re-evaluating at the corrected
 * point), when asked. */
static int gj_iterate(gj_ws *w, double t1, const double *fnow, double *fa)
{
    int d = w->dim, s, i, it;
    int maxit = w->cfg.corrector_max_iter > 0 ? w->cfg.corrector_max_iter : GJ_CORR_MAXIT_DEFAULT;
    for (it = 0; it < maxit; it++) {
        if ((s = gj_eval_new(w, t1, w->rc, w->vc, fa, d)))
            return s;
        double rold[PB_STATE_DIM_MAX], change = 0, scale = 0;
        memcpy(rold, w->rc, (size_t)d * sizeof(double));
        gj_correct(w, fnow, fa, d);
        for (i = 0; i < d; i++) {
            change = fmax(change, fabs(w->rc[i] - rold[i]));
            scale = fmax(scale, fabs(w->rc[i]));
        }
        if (change <= w->cfg.corrector_tol * scale)
            return PB_OK;
    }
    return PB_ENOCONV;
}

static void gj_swap(double **a, double **b)
{
    double *t = *a;
    *a = *b;
    *b = t;
}

/* One step n -> n+1, ending at t1: predict, evaluate, correct (iterated if
 * asked). On failure the workspace still holds step n. d is w->dim, a
 * constant where it is inlined for 3 dimensions, so that every loop over
 * the components unrolls. */
static PB_STEP_INLINE int gj_step(gj_ws *w, double t1, const int d)
{
    int s, i;
    double h = w->cfg.h, h2 = h * h;
    const double *fw = w->ring + (size_t)w->head * d, *fnow = fw + 8 * d;
    double *fa = w->ring + (size_t)gj_new_slot(w) * d;
    if (!w->have_part) {
        gj_partials(w, fw, 9, w->pa, w->pb, 9, w->pan, w->pbn);
        w->have_part = 1;
    }
    {
        const double *S = w->S, *sv = w->s, *pa = w->pa, *pb = w->pb;
        double *Sn = w->Sn, *rp = w->rp, *vp = w->vp;
        const double a9 = gj_a[9][GJ_NB - 1], b9 = gj_b[9][GJ_NB - 1];
        PB_UNROLL_COMPONENTS
        for (i = 0; i < d; i++) {
            double f = fnow[i], sa = pa[i] + a9 * f, sb = pb[i] + b9 * f;
            double Sni = S[i] + sv[i] + 0.5 * f;
            Sn[i] = Sni;
            rp[i] = h2 * (Sni + sb);
            vp[i] = h * (sv[i] + 0.5 * f + sa);
        }
    }
    /* what the corrector and the next predictor sum over the window's
     * newest 8 points, before the force call rather than after it */
    gj_partials(w, fw + d, 8, w->ca, w->cb, 9, w->pan, w->pbn);
    if ((s = gj_eval_new(w, t1, w->rp, w->vp, fa, d)))
        return s;
    gj_correct(w, fnow, fa, d);
    if (w->cfg.corrector_tol > 0 && (s = gj_iterate(w, t1, fnow, fa)))
        return s;
    int ok = 1; /* one branch, not one a component */
    PB_UNROLL_COMPONENTS
    for (i = 0; i < d; i++)
        ok &= (isfinite(w->rc[i]) != 0) & (isfinite(w->vc[i]) != 0);
    if (!ok)
        return PB_ENONFINITE;
    w->head = w->head == GJ_RING - 1 ? 0 : w->head + 1; /* (head + 1) % GJ_RING */
    gj_swap(&w->s, &w->sn);
    gj_swap(&w->S, &w->Sn);
    /* state n becomes the one a step back, n+1 the current one */
    gj_swap(&w->rq, &w->r);
    gj_swap(&w->vq, &w->v);
    gj_swap(&w->r, &w->rc);
    gj_swap(&w->v, &w->vc);
    gj_swap(&w->pa, &w->pan);
    gj_swap(&w->pb, &w->pbn);
    w->grid.r = w->r;
    w->grid.v = w->v;
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
    }
    if (n < 4) {
        /* the start-up already produced t0+h .. t0+4h */
        memcpy(w->r, w->rb + (5 + n) * d, (size_t)d * sizeof(double));
        memcpy(w->v, w->vb + (5 + n) * d, (size_t)d * sizeof(double));
        return PB_OK;
    }
    return d == 3 ? gj_step(w, t1, 3) : gj_step(w, t1, d);
}

/* The last step's ends with their accelerations, put together only when
 * asked (the span pb_dense_push would have kept after every step): the
 * start-up's back points for the first four steps, then the state one step
 * back and the current one with the window's two newest accelerations (each
 * evaluated at the predicted position: PEC). */
static int gj_dense(const void *ws, double t, double *r, double *v)
{
    const gj_ws *w = ws;
    const pb_fixed_grid *g = &w->grid;
    long n = g->n;
    int d = w->dim;
    pb_dense_span sp;
    double t0 = pb_fixed_grid_time(g, n - 1), t1 = pb_fixed_grid_time(g, n);
    if (n == 0) {
        pb_dense_start(&sp, d, g->t0, w->r, w->v, w->started ? w->fw + 4 * d : NULL);
    } else if (n <= 4) {
        size_t j = (size_t)(3 + n) * d;
        pb_dense_start(&sp, d, t0, w->rb + j, w->vb + j, w->fw + j);
        pb_dense_push(&sp, t1, w->rb + j + d, w->vb + j + d, w->fw + j + d);
    } else {
        const double *f = w->ring + (size_t)(w->head + GJ_NB - 2) * d;
        pb_dense_start(&sp, d, t0, w->rq, w->vq, f);
        pb_dense_push(&sp, t1, w->r, w->v, f + d);
    }
    return pb_dense_eval(&sp, t, r, v);
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
