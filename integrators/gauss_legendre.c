/* gauss_legendre.c - implicit Gauss-Legendre collocation Runge-Kutta, s = 4
 * stages (order 8) and s = 6 (order 12): symplectic, fixed step, written for
 * the first-order system y' = (v, a(t, r, v)), so velocity-dependent forces
 * are allowed. Hairer, Lubich & Wanner, Geometric Numerical Integration (2nd
 * ed., 2006), Sec. II.1 and VIII.6; tableaux in gauss_legendre_coeffs.h. */
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "integrators/gauss_legendre_coeffs.h"

/* The stage equations R_i = r + h sum_j a_ij V_j, V_i = v + h sum_j a_ij A_j,
 * A_j = a(t + c_j h, R_j, V_j) are solved by fixed-point iteration: each
 * sweep evaluates the s forces (through the caller's counting wrapper, so the
 * iterations are in the cost: a run costs 1 + s * (iterations) evaluations,
 * the 1 being a(t0) for the first predictor), then forms the new V_i from the
 * A_j and the new R_i from those new V_i. Taking R from the new V makes one
 * sweep contract by O(h^2) for a(r), not O(h), and leaves the fixed point,
 * the Gauss-Legendre solution of the first-order system, unchanged. The sweeps
 * stop at round-off (Hairer, McLachlan & Razakarivony 2008, BIT 48, 231, from
 * memory): when the stage increments fall to a few ulps of the stages, or
 * stop decreasing once they are down at round-off level. Each step starts
 * from the previous step's collocation polynomial extrapolated to the new
 * nodes (error O(h^(s+1))), which is also the dense output inside a step.
 *
 * Not PB_KIND_COMPENSABLE: where the sweeps stop is decided at round-off
 * level, so the last bits of the state move the sweep count of some steps by
 * one, and a Kahan-summed run would cost a few evaluations more or less than
 * the plain one (15277 against 15273 on kepler-e0.5, 400 steps per orbit,
 * 3 orbits), which tests/test_compensated.c forbids of a compensable method. */

#define GL_S_MAX 6
#define GL_MAXIT 50      /* sweeps before a step is given up as PB_ENOCONV */
#define GL_ULPS 4.0      /* increments within this many eps of the stages: converged */
#define GL_NOISE 1e-12   /* below this (relative) an increment that stops shrinking
                          * is round-off, not a diverging iteration */

/* One tableau: a and e are s x s, q is s x (s + 1), row-major. */
typedef struct gl_scheme {
    int s;
    const double *c, *b, *a, *q, *e;
} gl_scheme;

static const gl_scheme gl_scheme4 = {4, gl4_c, gl4_b, &gl4_a[0][0], &gl4_q[0][0], &gl4_e[0][0]};
static const gl_scheme gl_scheme6 = {6, gl6_c, gl6_b, &gl6_a[0][0], &gl6_q[0][0], &gl6_e[0][0]};

typedef struct gl_ws {
    int dim;
    gl_scheme sch;
    pb_force f;
    pb_fixed_grid grid;              /* t0, h, the index of the current state */
    double r[PB_STATE_DIM_MAX], v[PB_STATE_DIM_MAX];   /* committed state */
    /* the last accepted step: its start, and the stage velocities and
     * accelerations that define its collocation polynomial (dense output
     * and the next step's predictor) */
    int have_last;
    double t_last, r_last[PB_STATE_DIM_MAX], v_last[PB_STATE_DIM_MAX];
    double Vl[GL_S_MAX][PB_STATE_DIM_MAX], Al[GL_S_MAX][PB_STATE_DIM_MAX];
    /* the step in progress: stage positions, velocities, accelerations */
    double R[GL_S_MAX][PB_STATE_DIM_MAX], V[GL_S_MAX][PB_STATE_DIM_MAX], A[GL_S_MAX][PB_STATE_DIM_MAX];
    pb_method_stats st;
} gl_ws;

static void *gl_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    gl_ws *w = calloc(1, sizeof *w);
    if (w)
        w->dim = dim;
    return w;
}

static void gl_free(void *ws)
{
    free(ws);
}

static int gl_start_with(void *ws, const gl_scheme *sch, const pb_force *f,
                         const pb_method_config *cfg, double t0, const double *r0,
                         const double *v0)
{
    gl_ws *w = ws;
    if (!(cfg->h > 0) || !isfinite(cfg->h) || !isfinite(t0))
        return PB_EINVAL;
    w->sch = *sch;
    w->f = *f;
    size_t sz = (size_t)w->dim * sizeof(double);
    memcpy(w->r, r0, sz);
    memcpy(w->v, v0, sz);
    w->have_last = 0;
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    pb_fixed_grid_init(&w->grid, t0, cfg->h, cfg->max_steps, w->r, w->v, &w->st);
    return PB_OK;
}

/* The first stages of a step. After a step: the last collocation polynomial
 * extrapolated to t + c_i h. At the start of a run there is none: a Taylor
 * guess from a(t, r, v), one evaluation. */
static int gl_predict(gl_ws *w, double t, double h)
{
    int s = w->sch.s, d = w->dim;
    if (w->have_last) {
        for (int i = 0; i < s; i++) {
            const double *e = w->sch.e + i * s;
            for (int k = 0; k < d; k++) {
                double zr = 0, zv = 0;
                for (int j = 0; j < s; j++) {
                    zr += e[j] * w->Vl[j][k];
                    zv += e[j] * w->Al[j][k];
                }
                w->R[i][k] = w->r[k] + h * zr;
                w->V[i][k] = w->v[k] + h * zv;
            }
        }
        return PB_OK;
    }
    double a0[PB_STATE_DIM_MAX];
    int st = w->f.accel(w->f.ctx, t, w->r, w->v, a0);
    if (st)
        return st;
    for (int i = 0; i < s; i++) {
        double ch = w->sch.c[i] * h;
        for (int k = 0; k < d; k++) {
            w->R[i][k] = w->r[k] + ch * (w->v[k] + 0.5 * ch * a0[k]);
            w->V[i][k] = w->v[k] + ch * a0[k];
        }
    }
    return PB_OK;
}

/* |x| into a running maximum m. The comparison compiles to one max
 * instruction; a NaN or an infinity is caught by the caller's sum of x - x
 * (NaN exactly then, else 0), not here: a branch for it on every component
 * was a fifth of this method's time. */
static inline double gl_maxabs(double m, double x)
{
    x = fabs(x);
    return x > m ? x : m;
}

/* One sweep's update from the accelerations A: new V, then new R from the new
 * V. Returns the largest change, relative to the largest stage position
 * (for R) and velocity (for V), so that it reads in ulps of the stages;
 * NaN if any new stage or change is not finite.
 * Inlined with constant s and d (gl_sweep_update) the loops unroll. */
static inline double gl_sweep_sd(gl_ws *w, double h, const int s, const int d)
{
    double dr = 0, dv = 0, sr = DBL_MIN, sv = DBL_MIN, bad = 0;
    for (int i = 0; i < s; i++) {
        const double *a = w->sch.a + i * s;
        for (int k = 0; k < d; k++) {
            double z = 0;
            for (int j = 0; j < s; j++)
                z += a[j] * w->A[j][k];
            double vn = w->v[k] + h * z, dd = vn - w->V[i][k];
            bad += dd - dd;
            dv = gl_maxabs(dv, dd);
            sv = gl_maxabs(sv, vn);
            w->V[i][k] = vn;
        }
    }
    for (int i = 0; i < s; i++) {
        const double *a = w->sch.a + i * s;
        for (int k = 0; k < d; k++) {
            double z = 0;
            for (int j = 0; j < s; j++)
                z += a[j] * w->V[j][k];
            double rn = w->r[k] + h * z, dd = rn - w->R[i][k];
            bad += dd - dd;
            dr = gl_maxabs(dr, dd);
            sr = gl_maxabs(sr, rn);
            w->R[i][k] = rn;
        }
    }
    if (isnan(bad))
        return NAN;
    return gl_maxabs(dr / sr, dv / sv);
}

static double gl_sweep_update(gl_ws *w, double h)
{
    if (w->dim == 3)
        return w->sch.s == 4 ? gl_sweep_sd(w, h, 4, 3) : gl_sweep_sd(w, h, 6, 3);
    return gl_sweep_sd(w, h, w->sch.s, w->dim);
}

/* Sweeps from the predicted stages until round-off (see the top of the file).
 * On success A holds the forces at the last stages and V the stage
 * velocities formed from them: the pair the update and the dense output use. */
static int gl_solve(gl_ws *w, double t, double h)
{
    int s = w->sch.s, st;
    double prev = INFINITY;
    for (int it = 0; it < GL_MAXIT; it++) {
        for (int i = 0; i < s; i++)
            if ((st = w->f.accel(w->f.ctx, t + w->sch.c[i] * h, w->R[i], w->V[i], w->A[i])))
                return st;
        double delta = gl_sweep_update(w, h);
        if (!isfinite(delta))
            return PB_ENONFINITE;
        if (delta <= GL_ULPS * DBL_EPSILON || (delta >= prev && prev <= GL_NOISE))
            return PB_OK;
        prev = delta;
    }
    return PB_ENOCONV;
}

/* y1 = y0 + h sum_i b_i F_i, committed only when finite; the step's start
 * and stages are kept for the dense output and the next predictor. */
static int gl_commit(gl_ws *w, double t, double h)
{
    int s = w->sch.s, d = w->dim;
    double rn[PB_STATE_DIM_MAX], vn[PB_STATE_DIM_MAX];
    for (int k = 0; k < d; k++) {
        double zr = 0, zv = 0;
        for (int i = 0; i < s; i++) {
            zr += w->sch.b[i] * w->V[i][k];
            zv += w->sch.b[i] * w->A[i][k];
        }
        rn[k] = w->r[k] + h * zr;
        vn[k] = w->v[k] + h * zv;
        if (!isfinite(rn[k]) || !isfinite(vn[k]))
            return PB_ENONFINITE;
    }
    size_t sz = (size_t)d * sizeof(double);
    w->t_last = t;
    memcpy(w->r_last, w->r, sz);
    memcpy(w->v_last, w->v, sz);
    for (int i = 0; i < s; i++) {
        memcpy(w->Vl[i], w->V[i], sz);
        memcpy(w->Al[i], w->A[i], sz);
    }
    w->have_last = 1;
    memcpy(w->r, rn, sz);
    memcpy(w->v, vn, sz);
    return PB_OK;
}

/* pb_fixed_step_fn: predict, iterate, commit; a failure leaves the state and
 * the last step's polynomial as they were. */
static int gl_fixed_step(void *ctx, long n, double t, double t1)
{
    gl_ws *w = ctx;
    double h = w->grid.h;
    int st;
    (void)n;
    (void)t1;
    if ((st = gl_predict(w, t, h)) || (st = gl_solve(w, t, h)))
        return st;
    return gl_commit(w, t, h);
}

static int gl_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    gl_ws *w = ws;
    return pb_fixed_grid_advance(&w->grid, t_out, gl_fixed_step, w, obs, octx);
}

static void gl_get_state(const void *ws, double *t, double *r, double *v)
{
    const gl_ws *w = ws;
    *t = pb_fixed_grid_time(&w->grid, w->grid.n);
    memcpy(r, w->r, (size_t)w->dim * sizeof(double));
    memcpy(v, w->v, (size_t)w->dim * sizeof(double));
}

static void gl_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const gl_ws *)ws)->st;
}

/* Dense output: the last step's collocation polynomial, y_last + h sum_j
 * L_j(theta) F_j, whose error inside the step is O(h^(s+1)) in both r and v
 * (HLW Sec. II.1.3): dense order s. The ends are returned exactly. */
static int gl_dense(const void *ws, double t, double *r, double *v)
{
    const gl_ws *w = ws;
    int s = w->sch.s, d = w->dim;
    size_t sz = (size_t)d * sizeof(double);
    double t1 = pb_fixed_grid_time(&w->grid, w->grid.n), h = w->grid.h;
    const double *r0 = w->r, *v0 = w->v;
    if (t == t1 || (w->have_last && t == w->t_last)) {
        if (t != t1) {
            r0 = w->r_last;
            v0 = w->v_last;
        }
        memcpy(r, r0, sz);
        memcpy(v, v0, sz);
        return PB_OK;
    }
    if (!w->have_last || !(t > w->t_last && t < t1))
        return PB_EINVAL;
    double x = 2.0 * (t - w->t_last) / h - 1.0, L[GL_S_MAX];
    for (int j = 0; j < s; j++) {
        const double *q = w->sch.q + j * (s + 1);
        double p = q[s];
        for (int k = s - 1; k >= 0; k--)
            p = p * x + q[k];
        L[j] = h * p;
    }
    for (int k = 0; k < d; k++) {
        double zr = 0, zv = 0;
        for (int j = 0; j < s; j++) {
            zr += L[j] * w->Vl[j][k];
            zv += L[j] * w->Al[j][k];
        }
        r[k] = w->r_last[k] + zr;
        v[k] = w->v_last[k] + zv;
        if (!isfinite(r[k]) || !isfinite(v[k]))
            return PB_ENONFINITE;
    }
    return PB_OK;
}

static int gl4_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                     const double *r0, const double *v0)
{
    return gl_start_with(ws, &gl_scheme4, f, cfg, t0, r0, v0);
}

static int gl6_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                     const double *r0, const double *v0)
{
    return gl_start_with(ws, &gl_scheme6, f, cfg, t0, r0, v0);
}

const pb_method_type pb_method_gauss_legendre = {
    PB_METHOD_RECORD_HEAD,
    .name = "gauss-legendre",
    .description = "implicit Gauss-Legendre, 4 stages, fixed-point iterated: 4 evaluations "
                   "an iteration",
    .source = "Hairer, Lubich & Wanner (2006), Geometric Numerical Integration, Sec. II.1",
    .order = 8,
    .flags = PB_KIND_FIXED | PB_KIND_SYMPLECTIC,
    .alloc = gl_alloc,
    .start = gl4_start,
    .advance = gl_advance,
    .get_state = gl_get_state,
    .get_stats = gl_get_stats,
    .free = gl_free,
    .dense = gl_dense,
    .dense_order = 4, /* the collocation polynomial: s */
};

const pb_method_type pb_method_gauss_legendre12 = {
    PB_METHOD_RECORD_HEAD,
    .name = "gauss-legendre12",
    .description = "implicit Gauss-Legendre, 6 stages, fixed-point iterated: 6 evaluations "
                   "an iteration",
    .source = "Hairer, Lubich & Wanner (2006), Geometric Numerical Integration, Sec. II.1",
    .order = 12,
    .flags = PB_KIND_FIXED | PB_KIND_SYMPLECTIC,
    .alloc = gl_alloc,
    .start = gl6_start,
    .advance = gl_advance,
    .get_state = gl_get_state,
    .get_stats = gl_get_stats,
    .free = gl_free,
    .dense = gl_dense,
    .dense_order = 6, /* the collocation polynomial: s */
};
