/* kepler_split.c - Kepler-splitting symplectic maps for r'' = -mu r/|r|^3 + P(t, r):
 * kicks by the perturbation P around drifts along the exact Kepler flow
 * (pb_universal_propagate). kepler-split2 is Wisdom & Holman (1991), AJ 102,
 * 1528; kepler-split4 and -8 are SBAB_2 and SBAB_4 of Laskar & Robutel (2001),
 * Celest. Mech. Dyn. Astron. 80, 39. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "problems/twobody.h"
#include "propbench/dense.h"

/* Naming rule: kepler-splitN is the member whose error is O(eps h^N + eps^2
 * h^2), eps the size of P against the Kepler term (Laskar & Robutel's SBAB_n
 * has N = 2n; Wisdom-Holman is SBAB_1). Every member is of order 2 in h as
 * h -> 0 at fixed eps (the eps^2 h^2 term), so each record says order 2; N
 * is the order while eps h^N leads, i.e. for h^(N-2) > eps.
 *
 * SBAB_n kicks by d_1 h, drifts c_2 h, kicks by d_2 h, ... and ends with the
 * kick d_1 h: n drifts, n + 1 kicks at the nodes of the (n+1)-point Lobatto
 * quadrature with its weights as the kick fractions (the first-order-in-eps
 * error is that quadrature's error on the perturbation along the Kepler
 * flow, so exactness to degree 2n - 1 gives eps h^2n). The end kicks fall on
 * the grid times, where one force serves the end of a step and the start of
 * the next: n evaluations a step. SBAB was chosen over SABA (same error
 * terms, same cost) because it has the force at both ends of every step,
 * which the dense output below needs. A time-dependent P is kicked at the
 * time its kick falls on (time advances with the Kepler part). */

#define KS_KICKS_MAX 5 /* SBAB_4 */

typedef struct ks_scheme {
    int n;                       /* drifts a step (n + 1 kicks) */
    double c[KS_KICKS_MAX - 1];  /* drift j: c[j] h */
    double d[KS_KICKS_MAX];      /* kick j: d[j] h */
} ks_scheme;

/* Laskar & Robutel (2001) Sec. 4, SBAB_n (as listed in REFERENCES.md, from
 * memory): the Lobatto nodes and weights on [0, 1], Abramowitz & Stegun
 * 25.4.32 (n + 1 = 3: 0, 1/2, 1 with weights 1/6, 2/3, 1/6; n + 1 = 5: 0,
 * 1/2 -+ sqrt(21)/14, 1/2, 1 with 1/20, 49/180, 16/45). Closed forms and the
 * quadrature conditions are checked in tests/test_kepler_split.c. */
static const ks_scheme ks_sbab1 = {1, {1.0}, {0.5, 0.5}};
static const ks_scheme ks_sbab2 = {2, {0.5, 0.5}, {1.0 / 6.0, 2.0 / 3.0, 1.0 / 6.0}};
static const ks_scheme ks_sbab4 = {
    4,
    {0.17267316464601142810, 0.32732683535398857190, 0.32732683535398857190,
     0.17267316464601142810},
    {0.05, 0.27222222222222222222, 0.35555555555555555556, 0.27222222222222222222, 0.05}};

typedef struct ks_ws {
    pb_force f;
    pb_method_config cfg;
    const ks_scheme *sch;
    double node[KS_KICKS_MAX];  /* time of kick j as a fraction of h */
    pb_fixed_grid grid;
    double r[3], v[3], a[3], p[3];      /* state, its force a and perturbation P */
    double rn[3], vn[3], an[3], pn[3];  /* the step in progress */
    int have_a;
    pb_method_stats st;
    /* the last step: its start (its end is r, v, a) */
    int stepped;
    double ts, te, rs[3], vs[3], as[3];
    /* dense output's correction for that step, filled on first use */
    int corr_ok;
    pb_dense_span corr;
} ks_ws;

static void *ks_alloc(int dim)
{
    /* the universal-variable flow is written for 3-vectors */
    if (dim != 3)
        return NULL;
    return calloc(1, sizeof(ks_ws));
}

static void ks_free(void *ws)
{
    free(ws);
}

/* The Kepler term -mu r/|r|^3, written as pb_twobody_accel writes it, so
 * that on a pure two-body force the perturbation is zero to the bit. */
static void ks_kepler_accel(double mu, const double *r, double *a)
{
    double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2], rn = sqrt(r2);
    double k = -mu / (r2 * rn);
    for (int i = 0; i < 3; i++)
        a[i] = k * r[i];
}

/* The force at (t, r) and its perturbation a - a_Kepler; PB_ENONFINITE for
 * a non-finite one. */
static int ks_force(const ks_ws *w, double t, const double *r, const double *v, double *a,
                    double *p)
{
    int s = w->f.accel(w->f.ctx, t, r, v, a);
    if (s)
        return s;
    ks_kepler_accel(w->cfg.mu, r, p);
    for (int i = 0; i < 3; i++) {
        p[i] = a[i] - p[i];
        if (!isfinite(p[i]))
            return PB_ENONFINITE;
    }
    return PB_OK;
}

static int ks_start_with(void *ws, const ks_scheme *sch, const pb_force *f,
                         const pb_method_config *cfg, double t0, const double *r0,
                         const double *v0)
{
    ks_ws *w = ws;
    /* a Kepler drift needs a central body: mu > 0 (pb_method_fits refuses
     * the problems without one before any case starts) */
    if (!(cfg->h > 0) || !isfinite(cfg->h) || !(cfg->mu > 0) || !isfinite(cfg->mu) ||
        f->dim != 3)
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->sch = sch;
    w->node[0] = 0;
    for (int j = 0; j < sch->n; j++)
        w->node[j + 1] = w->node[j] + sch->c[j];
    memcpy(w->r, r0, sizeof w->r);
    memcpy(w->v, v0, sizeof w->v);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    w->have_a = w->stepped = w->corr_ok = 0;
    pb_fixed_grid_init(&w->grid, t0, cfg->h, cfg->max_steps, w->r, w->v, &w->st);
    return PB_OK;
}

/* One SBAB step from the committed state into rn, vn, an, pn (the committed
 * state is untouched, so a failure leaves the last good state). */
static int ks_step(ks_ws *w, double t, double t1, double h)
{
    const ks_scheme *s = w->sch;
    double r[3], v[3];
    int st, i;
    memcpy(r, w->r, sizeof r);
    for (i = 0; i < 3; i++)
        v[i] = w->v[i] + s->d[0] * h * w->p[i];
    for (int j = 0; j < s->n; j++) {
        if ((st = pb_universal_propagate(w->cfg.mu, r, v, s->c[j] * h, w->rn, w->vn)))
            return st;
        memcpy(r, w->rn, sizeof r);
        /* the last drift ends exactly on the grid time t1 */
        double tj = j == s->n - 1 ? t1 : t + w->node[j + 1] * h;
        if ((st = ks_force(w, tj, r, w->vn, w->an, w->pn)))
            return st;
        for (i = 0; i < 3; i++)
            v[i] = w->vn[i] + s->d[j + 1] * h * w->pn[i];
    }
    for (i = 0; i < 3; i++) {
        if (!isfinite(r[i]) || !isfinite(v[i]))
            return PB_ENONFINITE;
        w->rn[i] = r[i];
        w->vn[i] = v[i];
    }
    return PB_OK;
}

/* pb_fixed_step_fn: the force at the start of a run (each step's last force
 * is the next one's first), then one step, committed only whole. */
static int ks_fixed_step(void *ctx, long n, double t, double t1)
{
    ks_ws *w = ctx;
    int s;
    (void)n;
    if (!w->have_a) {
        if ((s = ks_force(w, t, w->r, w->v, w->a, w->p)))
            return s;
        w->have_a = 1;
    }
    if ((s = ks_step(w, t, t1, w->grid.h)))
        return s;
    w->ts = t;
    w->te = t1;
    memcpy(w->rs, w->r, sizeof w->rs);
    memcpy(w->vs, w->v, sizeof w->vs);
    memcpy(w->as, w->a, sizeof w->as);
    memcpy(w->r, w->rn, sizeof w->r);
    memcpy(w->v, w->vn, sizeof w->v);
    memcpy(w->a, w->an, sizeof w->a);
    memcpy(w->p, w->pn, sizeof w->p);
    w->stepped = 1;
    w->corr_ok = 0;
    return PB_OK;
}

/* Dense output: the exact Kepler flow K from the step's start x0 plus a
 * correction d(tau) = x(t0 + tau) - K_tau(x0), which is O(eps) with all its
 * derivatives: d = d' = 0 and d'' = P(x0) at the start; at the end d =
 * x1 - K_h(x0), d' likewise, d'' = a(x1) - a_Kepler(K_h(x0)). Its quintic
 * Hermite (propbench/dense.h) errs by O(eps h^6), where the Hermite of the
 * state itself would err by O(h^6) with the orbit's own derivatives, far
 * larger at the long steps these maps take. The step's own local error in
 * position reaches the velocity divided by h: eps h^3 for kepler-split2
 * (dense order 1, as leapfrog's), and eps h^(2n+1) + eps^2 h^4 for SBAB_n,
 * n > 1 (the eps^2 term moves the velocity first, so its position part is
 * h^4): dense order 2 (local order measured in tests/test_kepler_split.c).
 * Costs one Kepler flow per call plus one per step (K_h, cached on the
 * first call in a step); no force evaluation. */
static int ks_correction(ks_ws *w)
{
    double rk[3], vk[3], ak[3], p0[3], dr[3], dv[3], da[3];
    int s = pb_universal_propagate(w->cfg.mu, w->rs, w->vs, w->te - w->ts, rk, vk);
    if (s)
        return s;
    ks_kepler_accel(w->cfg.mu, w->rs, p0);
    ks_kepler_accel(w->cfg.mu, rk, ak);
    for (int i = 0; i < 3; i++) {
        p0[i] = w->as[i] - p0[i];
        dr[i] = w->r[i] - rk[i];
        dv[i] = w->v[i] - vk[i];
        da[i] = w->a[i] - ak[i];
    }
    static const double zero[3] = {0, 0, 0};
    pb_dense_start(&w->corr, 3, w->ts, zero, zero, p0);
    pb_dense_push(&w->corr, w->te, dr, dv, da);
    w->corr_ok = 1;
    return PB_OK;
}

static int ks_dense(const void *ws, double t, double *r, double *v)
{
    const ks_ws *w = ws;
    if (!w->stepped || !(t >= w->ts && t <= w->te))
        return PB_EINVAL;
    if (t == w->te || t == w->ts) {
        memcpy(r, t == w->te ? w->r : w->rs, 3 * sizeof(double));
        memcpy(v, t == w->te ? w->v : w->vs, 3 * sizeof(double));
        return PB_OK;
    }
    int s;
    /* the cache is the workspace's own (calloc'd, never a const object) */
    if (!w->corr_ok && (s = ks_correction((ks_ws *)ws)))
        return s;
    double dr[3], dv[3];
    if ((s = pb_dense_eval(&w->corr, t, dr, dv)) ||
        (s = pb_universal_propagate(w->cfg.mu, w->rs, w->vs, t - w->ts, r, v)))
        return s;
    for (int i = 0; i < 3; i++) {
        r[i] += dr[i];
        v[i] += dv[i];
    }
    return PB_OK;
}

static int ks_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    ks_ws *w = ws;
    return pb_fixed_grid_advance(&w->grid, t_out, ks_fixed_step, w, obs, octx);
}

static void ks_get_state(const void *ws, double *t, double *r, double *v)
{
    const ks_ws *w = ws;
    *t = pb_fixed_grid_time(&w->grid, w->grid.n);
    memcpy(r, w->r, sizeof w->r);
    memcpy(v, w->v, sizeof w->v);
}

static void ks_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const ks_ws *)ws)->st;
}

#define KEPLER_SPLIT(NAME, CNAME, SCH, DENSE, DESC, SRC)                                   \
    static int NAME##_start(void *ws, const pb_force *f, const pb_method_config *cfg,  \
                            double t0, const double *r0, const double *v0)            \
    {                                                                                \
        return ks_start_with(ws, &SCH, f, cfg, t0, r0, v0);                          \
    }                                                                                \
    const pb_method_type pb_method_##NAME = {                                        \
        PB_METHOD_RECORD_HEAD,                                                       \
        .name = CNAME,                                                               \
        .description = DESC,                                                         \
        .source = SRC,                                                               \
        .order = 2,                                                                  \
        .flags = PB_KIND_FIXED | PB_KIND_SYMPLECTIC | PB_FORM_SECOND | PB_KIND_KEPLER, \
        .alloc = ks_alloc,                                                           \
        .start = NAME##_start,                                                       \
        .advance = ks_advance,                                                       \
        .get_state = ks_get_state,                                                   \
        .get_stats = ks_get_stats,                                                   \
        .free = ks_free,                                                             \
        .dense = ks_dense,                                                           \
        .dense_order = DENSE,                                                        \
    }

KEPLER_SPLIT(kepler_split2, "kepler-split2", ks_sbab1, 1,
             "Wisdom-Holman kick-drift-kick, exact Kepler drift: error eps h^2, 1 evaluation "
             "a step",
             "Wisdom & Holman (1991), AJ 102, 1528");
KEPLER_SPLIT(kepler_split4, "kepler-split4", ks_sbab2, 2,
             "SBAB_2, exact Kepler drifts: error eps h^4 + eps^2 h^2, 2 evaluations a step",
             "Laskar & Robutel (2001), Celest. Mech. Dyn. Astron. 80, 39");
KEPLER_SPLIT(kepler_split8, "kepler-split8", ks_sbab4, 2,
             "SBAB_4, exact Kepler drifts: error eps h^8 + eps^2 h^2, 4 evaluations a step",
             "Laskar & Robutel (2001), Celest. Mech. Dyn. Astron. 80, 39");
