/* test_gauss_jackson.c - the eighth-order Gauss-Jackson method: its coefficient
 * table re-derived in rational arithmetic, polynomial exactness, convergence on
 * Kepler orbits, the start-up iteration, failures, and cost against RK4.
 * Scheme: Berry & Healy (2004), J. Astronaut. Sci. 52(3) 331-357 (from memory). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "problems/twobody.h"
#include "test_support.h"
#define GJ_WANT_RATIONAL
#include "integrators/gauss_jackson_coeffs.h"

extern const pb_method_type pb_method_gauss_jackson8;
extern const pb_method_type pb_method_rk4;

/* ---- exact rationals (__int128), written independently of the generator ---- */
typedef struct { __int128 n, d; } tq;

static __int128 tq_gcd(__int128 a, __int128 b)
{
    a = a < 0 ? -a : a;
    b = b < 0 ? -b : b;
    while (b) {
        __int128 t = a % b;
        a = b;
        b = t;
    }
    return a ? a : 1;
}

static __int128 tq_m(__int128 a, __int128 b)
{
    __int128 r;
    cr_assert(!__builtin_mul_overflow(a, b, &r), "rational overflow");
    return r;
}

static tq tq_norm(__int128 n, __int128 d)
{
    if (d < 0) {
        n = -n;
        d = -d;
    }
    __int128 g = tq_gcd(n, d);
    return (tq){n / g, d / g};
}

static tq tq_add(tq a, tq b)
{
    __int128 g = tq_gcd(a.d, b.d), r;
    cr_assert(!__builtin_add_overflow(tq_m(a.n, b.d / g), tq_m(b.n, a.d / g), &r), "overflow");
    return tq_norm(r, tq_m(a.d / g, b.d));
}

static tq tq_sub(tq a, tq b) { return tq_add(a, (tq){-b.n, b.d}); }

static tq tq_mul(tq a, tq b)
{
    __int128 g1 = tq_gcd(a.n, b.d), g2 = tq_gcd(b.n, a.d);
    return tq_norm(tq_m(a.n / g1, b.n / g2), tq_m(a.d / g2, b.d / g1));
}

static tq tq_i(long v) { return (tq){v, 1}; }
static int tq_eq(tq a, tq b) { return a.n == b.n && a.d == b.d; }

#define TQ_N 13

/* Re-derivation. With x the backward difference, h D = -ln(1 - x), so the
 * summed-Adams and summed-Cowell remainders about the newest point are
 * (1/x)(x/-ln(1-x) - 1) + 1/2 and (1/x^2)((x/-ln(1-x))^2 - 1 + x); point j sits
 * 4 - j steps back, a factor (1 - x)^(4 - j), and the predictor (j = 5) divides
 * by (1 - x). Here 1/(-ln(1-x)/x) is found by solving the product term by
 * term (not the generator's recursion order), then ordinates by expanding
 * x^m = sum_i (-1)^i C(m, i) E^-i. */
static void tt_derive(tq A[GJ_ROWS][GJ_NPTS], tq B[GJ_ROWS][GJ_NPTS])
{
    tq g[TQ_N], g2[TQ_N], av[TQ_N], bv[TQ_N];
    for (int k = 0; k < TQ_N; k++) {
        /* sum_{i<=k} g[i]/(k-i+1) = [k == 0] */
        tq s = tq_i(k == 0);
        for (int i = 0; i < k; i++)
            s = tq_sub(s, tq_mul(g[i], tq_norm(1, k - i + 1)));
        g[k] = s;
    }
    for (int k = 0; k < TQ_N; k++) {
        g2[k] = tq_i(0);
        for (int i = 0; i <= k; i++)
            g2[k] = tq_add(g2[k], tq_mul(g[i], g[k - i]));
    }
    for (int m = 0; m + 2 < TQ_N; m++) {
        av[m] = g[m + 1];
        bv[m] = g2[m + 2];
    }
    av[0] = tq_add(av[0], tq_norm(1, 2));
    for (int j = 0; j < GJ_ROWS; j++) {
        tq pa[GJ_NPTS], pb[GJ_NPTS];
        for (int m = 0; m < GJ_NPTS; m++) {
            pa[m] = tq_i(0);
            pb[m] = tq_i(0);
            if (j < 9) {
                /* coefficient of x^m in (1-x)^(8-j) times the series */
                long c = 1;
                for (int i = 0; i <= m && i <= 8 - j; i++) {
                    pa[m] = tq_add(pa[m], tq_mul(tq_i(c), av[m - i]));
                    pb[m] = tq_add(pb[m], tq_mul(tq_i(c), bv[m - i]));
                    c = -c * (8 - j - i) / (i + 1);
                }
            } else {
                for (int i = 0; i <= m; i++)
                    pb[m] = tq_add(pb[m], bv[i]);
                for (int i = 0; i <= m + 1; i++)
                    pa[m] = tq_add(pa[m], g[i]);
            }
        }
        for (int k = 0; k < GJ_NPTS; k++) {
            int i = 8 - k; /* f_{4-i} */
            A[j][k] = tq_i(0);
            B[j][k] = tq_i(0);
            for (int m = i; m < GJ_NPTS; m++) {
                long c = 1; /* C(m, i) */
                for (int q = 0; q < i; q++)
                    c = c * (m - q) / (q + 1);
                tq w = tq_i(i % 2 ? -c : c);
                A[j][k] = tq_add(A[j][k], tq_mul(w, pa[m]));
                B[j][k] = tq_add(B[j][k], tq_mul(w, pb[m]));
            }
        }
    }
}

Test(gauss_jackson, coefficients_rederived)
{
    /* Source: the generating functions above; Berry & Healy (2004) table entry
     * b[-4][-4] = 3250433/53222400 (from memory) checked as a spot value. */
    tq A[GJ_ROWS][GJ_NPTS], B[GJ_ROWS][GJ_NPTS];
    tt_derive(A, B);
    for (int j = 0; j < GJ_ROWS; j++)
        for (int k = 0; k < GJ_NPTS; k++) {
            cr_assert(tq_eq(A[j][k], tq_norm(gj_a_num[j][k], gj_a_den[j][k])), "a[%d][%d]", j, k);
            cr_assert(tq_eq(B[j][k], tq_norm(gj_b_num[j][k], gj_b_den[j][k])), "b[%d][%d]", j, k);
            /* the double table is the correctly rounded quotient (exact to 0 ulp) */
            cr_assert_eq(gj_a[j][k], (double)gj_a_num[j][k] / (double)gj_a_den[j][k]);
            cr_assert_eq(gj_b[j][k], (double)gj_b_num[j][k] / (double)gj_b_den[j][k]);
        }
    cr_assert_eq(gj_b_num[0][0], 3250433);
    cr_assert_eq(gj_b_den[0][0], 53222400);
}

Test(gauss_jackson, row_sums)
{
    /* Source: exactness for a constant acceleration (common practice): the
     * remainder series at x = 0 give 0 for every velocity row, 1/2 for the
     * velocity predictor and 1/12 for every position row (the Cowell 1/12). */
    for (int j = 0; j < GJ_ROWS; j++) {
        tq sa = tq_i(0), sb = tq_i(0);
        for (int k = 0; k < GJ_NPTS; k++) {
            sa = tq_add(sa, tq_norm(gj_a_num[j][k], gj_a_den[j][k]));
            sb = tq_add(sb, tq_norm(gj_b_num[j][k], gj_b_den[j][k]));
        }
        cr_assert(tq_eq(sa, j == 9 ? tq_norm(1, 2) : tq_i(0)), "a row %d", j);
        cr_assert(tq_eq(sb, tq_norm(1, 12)), "b row %d", j);
    }
}

/* Exact check of every row on r = t^m (h = 1, points t = -4..5): sums from the
 * epoch row, propagated by the recursions; returns the number of mismatches. */
static int tt_poly_mismatches(int m)
{
    tq r[10], v[10], f[10], s[10], S[10];
    for (int j = 0; j < 10; j++) {
        tq t = tq_i(j - 4), p = tq_i(1);
        r[j] = v[j] = f[j] = tq_i(0);
        for (int q = 0; q <= m; q++) {
            if (q == m)
                r[j] = p;
            if (q == m - 1)
                v[j] = tq_mul(tq_i(m), p);
            if (q == m - 2)
                f[j] = tq_mul(tq_i((long)m * (m - 1)), p);
            p = tq_mul(p, t);
        }
    }
    s[4] = v[4];
    S[4] = r[4];
    for (int k = 0; k < GJ_NPTS; k++) {
        s[4] = tq_sub(s[4], tq_mul(tq_norm(gj_a_num[4][k], gj_a_den[4][k]), f[k]));
        S[4] = tq_sub(S[4], tq_mul(tq_norm(gj_b_num[4][k], gj_b_den[4][k]), f[k]));
    }
    for (int j = 5; j < 10; j++) {
        s[j] = tq_add(s[j - 1], tq_mul(tq_norm(1, 2), tq_add(f[j - 1], f[j])));
        S[j] = tq_add(tq_add(S[j - 1], s[j - 1]), tq_mul(tq_norm(1, 2), f[j - 1]));
    }
    for (int j = 3; j >= 0; j--) {
        s[j] = tq_sub(s[j + 1], tq_mul(tq_norm(1, 2), tq_add(f[j + 1], f[j])));
        S[j] = tq_sub(tq_sub(S[j + 1], s[j]), tq_mul(tq_norm(1, 2), f[j]));
    }
    int bad = 0;
    for (int j = 0; j < 10; j++) {
        /* the predictor row uses s_4 + f_4/2 in place of s_5 */
        tq vj = j == 9 ? tq_add(s[8], tq_mul(tq_norm(1, 2), f[8])) : s[j], rj = S[j];
        for (int k = 0; k < GJ_NPTS; k++) {
            vj = tq_add(vj, tq_mul(tq_norm(gj_a_num[j][k], gj_a_den[j][k]), f[k]));
            rj = tq_add(rj, tq_mul(tq_norm(gj_b_num[j][k], gj_b_den[j][k]), f[k]));
        }
        bad += !tq_eq(vj, v[j]) + !tq_eq(rj, r[j]);
    }
    return bad;
}

Test(gauss_jackson, polynomial_exactness)
{
    /* Source: common practice - a nine-point ordinate formula for r'' = f is
     * exact when f is a polynomial of degree <= 8, i.e. r of degree <= 10 (the
     * brief asks for <= 9); degree 11 must fail, so the check can fail. */
    for (int m = 0; m <= 10; m++)
        cr_assert_eq(tt_poly_mismatches(m), 0, "degree %d", m);
    cr_assert_gt(tt_poly_mismatches(11), 0);
}

/* Least-squares slope of log(error) against log(h) over the step counts N
 * (steps per orbit), each error asserted above min_err (well above the
 * round-off floor, so the slope is truncation error's). */
static double tt_order(double e, const int *N, int n, int orbits, double min_err)
{
    pb_problem p;
    pbt_kepler(&p, e);
    double sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (int i = 0; i < n; i++) {
        pb_method_config c = {0};
        c.h = p.period / N[i];
        pbt_result r = pbt_integrate(&pb_method_gauss_jackson8, &p, &c,
                                     p.t0 + (double)(orbits * N[i]) * c.h);
        cr_assert_eq(r.status, PB_OK);
        double err = pbt_pos_error(&p, &r);
        cr_log_info("gauss-jackson8 e=%.1f %d orbits N=%d err=%.4e", e, orbits, N[i], err);
        cr_assert_gt(err, min_err, "e=%.1f N=%d: error %.3e too close to round-off", e, N[i], err);
        double x = log(c.h), y = log(err);
        sx += x; sy += y; sxx += x * x; sxy += x * y;
    }
    return (n * sxy - sx * sy) / (n * sxx - sx * sx);
}

Test(gauss_jackson, observed_order_kepler)
{
    /* Order 11, not 8 (the name) and not 10. "8" counts the backward
     * differences kept (Berry & Healy 2004, from memory); summed twice, the
     * ordinate formulas are the Stormer-Cowell series truncated after the
     * 10th difference: local error O(h^13), global O(h^11) (REFERENCES.md,
     * Methods: an independent 34-digit copy of the scheme gives local orders
     * 10.63, 10.81, 10.90, 10.94, 10.97, 10.98 at halving steps).
     * Measured here, steps in ratio 2^(1/6), e = 0 over 100 orbits: local
     * orders 10.44, 10.58, 10.68, 10.75, 10.80, 10.85, 10.87, 10.90 for
     * N = 40 .. 102 steps per orbit, the deficit from 11 shrinking by 0.78 a
     * step (like h^2; Richardson-extrapolated 11.0). The windows below are in
     * that asymptotic range and their errors at least 50x the round-off floor
     * (measured: ~2e-11 over 100 orbits, ~5e-13 over 10): fitted slopes 10.85
     * (e = 0, N = 64 .. 102) and 10.83 (e = 0.1, 10 orbits, N = 102 .. 144).
     * Asserted: within 0.3 of 11 (REFERENCES.md's rule for observed orders)
     * and above 10.5, so an order-10 scheme (one difference short) fails. */
    static const int N0[] = {64, 72, 81, 91, 102};
    static const int N1[] = {102, 114, 128, 144};
    double p0 = tt_order(0.0, N0, 5, 100, 1e-9), p1 = tt_order(0.1, N1, 4, 10, 3e-11);
    cr_log_info("gauss-jackson8 observed order: e0 %.2f, e0.1 %.2f", p0, p1);
    cr_assert(fabs(p0 - 11) <= 0.3 && p0 > 10.5, "order %.2f on e = 0", p0);
    cr_assert(fabs(p1 - 11) <= 0.3 && p1 > 10.5, "order %.2f on e = 0.1", p1);
}

/* ---- a recording force for the start-up test ---- */
#define TT_REC_MAX 4096
typedef struct tt_rec {
    const pb_problem *p;
    int n;
    double t[TT_REC_MAX], r[TT_REC_MAX][3];
} tt_rec;

static int tt_rec_accel(void *ctx, double t, const double *r, const double *v, double *a)
{
    tt_rec *c = ctx;
    if (c->n < TT_REC_MAX) {
        c->t[c->n] = t;
        memcpy(c->r[c->n], r, sizeof c->r[0]);
    }
    c->n++;
    return c->p->accel(c->p, t, r, v, a);
}

Test(gauss_jackson, startup_converges)
{
    pb_problem p;
    pbt_kepler(&p, 0.5);
    static tt_rec rec;
    memset(&rec, 0, sizeof rec);
    rec.p = &p;
    pb_force f = {tt_rec_accel, &rec, 3};
    pb_method_config c = {0};
    c.h = p.period / 24;
    const pb_method_type *m = &pb_method_gauss_jackson8;
    void *ws = m->alloc(3);
    cr_assert_not_null(ws);
    cr_assert_eq(m->start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
    cr_assert_eq(m->advance(ws, p.t0 + 6 * c.h, NULL, NULL), PB_OK);
    pb_method_stats st;
    m->get_stats(ws, &st);
    cr_assert_eq(st.startup_steps, 8); /* 4 single steps back, 4 forward */
    cr_assert_eq(st.steps, 6);
    m->free(ws);
    cr_assert_lt(rec.n, TT_REC_MAX);
    /* The last two calls are the PEC steps to t0+5h and t0+6h (one evaluation
     * each); before them come the start-up passes, 8 calls each at the grid
     * points -4..-1, 1..4. Source of the criterion: Berry & Healy (2004), from
     * memory - iterate until the back values stop changing; our tolerance 1e-15
     * relative. */
    int end = rec.n - 2;
    cr_assert_eq(rec.t[end], p.t0 + 5 * c.h);
    int passes = 0;
    double last = 0, scale = 0;
    while (end - 16 >= 0) {
        int ok = 1;
        for (int q = 0; q < 16; q++) {
            int j = q % 8 < 4 ? q % 8 - 4 : q % 8 - 3;
            ok &= rec.t[end - 16 + q] == p.t0 + j * c.h;
        }
        if (!ok)
            break;
        double ch = 0;
        for (int q = 0; q < 8; q++)
            for (int i = 0; i < 3; i++) {
                ch = fmax(ch, fabs(rec.r[end - 8 + q][i] - rec.r[end - 16 + q][i]));
                scale = fmax(scale, fabs(rec.r[end - 8 + q][i]));
            }
        if (passes == 0)
            last = ch;
        cr_log_info("gauss-jackson8 start-up: pass -%d changed positions by %.2e", passes, ch);
        passes++;
        end -= 8;
    }
    cr_log_info("gauss-jackson8 start-up: %d passes compared, last change %.2e relative",
                passes, last / scale);
    cr_assert_geq(passes, 2);
    cr_assert_leq(passes, 60);
    cr_assert_leq(last, 1e-15 * scale);
}

static double tt_osc_k;
static int tt_osc_accel(void *ctx, double t, const double *r, const double *v, double *a)
{
    (void)ctx; (void)t; (void)v;
    a[0] = -tt_osc_k * r[0];
    return PB_OK;
}

static int tt_osc_run(double k)
{
    tt_osc_k = k;
    pb_force f = {tt_osc_accel, NULL, 1};
    pb_method_config c = {0};
    c.h = 1.0;
    double r0 = 1.0, v0 = 0.0, t, r, v;
    const pb_method_type *m = &pb_method_gauss_jackson8;
    void *ws = m->alloc(1);
    cr_assert_not_null(ws);
    cr_assert_eq(m->start(ws, &f, &c, 0.0, &r0, &v0), PB_OK);
    int s = m->advance(ws, 5.0, NULL, NULL);
    pb_method_stats st;
    m->get_stats(ws, &st);
    m->get_state(ws, &t, &r, &v);
    if (s) {
        cr_assert_eq(st.t_fail, 0.0);
        cr_assert_eq(st.steps, 0);
        cr_assert_eq(r, 1.0); /* the epoch state is kept */
    }
    m->free(ws);
    return s;
}

Test(gauss_jackson, startup_fails_when_stiff)
{
    /* Source: common practice - the start-up correction is a functional
     * (fixed-point) iteration; it contracts only when h^2 |df/dr| times the
     * mid-corrector weights (~0.1) is small. On r'' = -k r with h = 1 it
     * converges for k = 1 and must stop with PB_ENOCONV (iteration cap) at k = 4. */
    cr_assert_eq(tt_osc_run(1.0), PB_OK);
    cr_assert_eq(tt_osc_run(4.0), PB_ENOCONV);
}

/* ---- NaN injection ---- */
static pb_accel_fn tt_real_accel;
static double tt_nan_after;

static int tt_nan_accel(const pb_problem *p, double t, const double *r, const double *v, double *a)
{
    int s = tt_real_accel(p, t, r, v, a);
    if (t > tt_nan_after)
        a[1] = NAN;
    return s;
}

Test(gauss_jackson, nan_force_stops)
{
    /* Source: the method interface (method.h): a non-finite force ends the case
     * with PB_ENONFINITE and the last good state's time in t_fail. */
    pb_problem p;
    pbt_kepler(&p, 0.1);
    tt_real_accel = p.accel;
    p.accel = tt_nan_accel;
    pb_method_config c = {0};
    c.h = p.period / 100;
    tt_nan_after = p.t0 + 20.5 * c.h;
    pbt_result r = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, p.t0 + 50 * c.h);
    cr_assert_eq(r.status, PB_ENONFINITE);
    cr_assert_eq(r.steps, 20);
    cr_assert_float_eq(r.t_fail, p.t0 + 20 * c.h, 1e-12);
    cr_assert_float_eq(r.t, p.t0 + 20 * c.h, 1e-12);
    cr_assert(isfinite(r.r[0]) && isfinite(r.r[1]) && isfinite(r.v[1]));
    /* inside the start-up window: fails before any step */
    tt_nan_after = p.t0 + 2.5 * c.h;
    r = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, p.t0 + 50 * c.h);
    cr_assert_eq(r.status, PB_ENONFINITE);
    cr_assert_eq(r.steps, 0);
    cr_assert_eq(r.t_fail, p.t0);
}

static int tt_obs_n;
static double tt_obs_t0, tt_obs_h;
static int tt_obs(void *ctx, double t, const double *r, const double *v)
{
    (void)ctx; (void)r; (void)v;
    tt_obs_n++;
    cr_assert_eq(t, tt_obs_t0 + tt_obs_n * tt_obs_h); /* the integer-count grid */
    return 0;
}

Test(gauss_jackson, pec_cost_observer_and_split_advance)
{
    /* Source: method interface contract (method.h) and the brief: one
     * evaluation a step after start-up; splitting advance changes nothing. */
    pb_problem p;
    pbt_kepler(&p, 0.1);
    pb_method_config c = {0};
    c.h = p.period / 100;
    pbt_result a = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, p.t0 + 200 * c.h);
    pbt_result b = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, p.t0 + 300 * c.h);
    cr_assert_eq(a.status, PB_OK);
    cr_assert_eq(b.evals - a.evals, 100);
    cr_assert_eq(b.steps, 300);

    const pb_method_type *m = &pb_method_gauss_jackson8;
    void *ws = m->alloc(3);
    pb_force f = {0};
    static tt_rec rec;
    memset(&rec, 0, sizeof rec);
    rec.p = &p;
    f.accel = tt_rec_accel;
    f.ctx = &rec;
    f.dim = 3;
    cr_assert_eq(m->start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
    tt_obs_n = 0;
    tt_obs_t0 = p.t0;
    tt_obs_h = c.h;
    cr_assert_eq(m->advance(ws, p.t0 + 2 * c.h, tt_obs, NULL), PB_OK);
    cr_assert_eq(m->advance(ws, p.t0 + 2 * c.h, tt_obs, NULL), PB_OK);
    cr_assert_eq(m->advance(ws, p.t0 + 200 * c.h, tt_obs, NULL), PB_OK);
    cr_assert_eq(tt_obs_n, 200);
    cr_assert_eq(m->advance(ws, p.t0 + 100.5 * c.h, NULL, NULL), PB_EINVAL);
    double t, r[3], v[3];
    m->get_state(ws, &t, r, v);
    for (int i = 0; i < 3; i++) {
        cr_assert_eq(r[i], a.r[i]);
        cr_assert_eq(v[i], a.v[i]);
    }
    m->free(ws);
    m->free(NULL);
}

Test(gauss_jackson, iterated_corrector)
{
    /* Source: the brief's contract for cfg->corrector_tol (P(EC)^k to a
     * tolerance, bounded by corrector_max_iter, PB_ENOCONV past it); the accuracy
     * bound (iterating may not cost accuracy: within 2x of PEC) is common practice. */
    pb_problem p;
    pbt_kepler(&p, 0.1);
    pb_method_config c = {0};
    c.h = p.period / 100;
    double t_end = p.t0 + 500 * c.h;
    pbt_result pec = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, t_end);
    c.corrector_tol = 1e-14;
    c.corrector_max_iter = 8;
    pbt_result it = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, t_end);
    cr_assert_eq(it.status, PB_OK);
    cr_assert_gt(it.evals - pec.evals, 496);     /* at least one re-evaluation a step */
    cr_assert_lt(it.evals - pec.evals, 8 * 496); /* converges well inside the bound */
    double e_pec = pbt_pos_error(&p, &pec), e_it = pbt_pos_error(&p, &it);
    cr_log_info("gauss-jackson8 PEC %.3e (%ld evals), iterated %.3e (%ld evals)", e_pec,
                pec.evals, e_it, it.evals);
    cr_assert_lt(e_it, 2 * e_pec);
    c.corrector_tol = 1e-300;
    c.corrector_max_iter = 1;
    pbt_result bad = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, t_end);
    cr_assert_eq(bad.status, PB_ENOCONV);
    cr_assert_float_eq(bad.t_fail, p.t0 + 4 * c.h, 1e-12);
}

Test(gauss_jackson, leo_beats_rk4_at_equal_evaluations)
{
    /* Invented demo orbit (a = 6778 km, e = 0.001, i = 51.6 deg); the check is
     * against its exact two-body solution (universal variables, __float128).
     * mu_earth = 398600.4418 km^3/s^2 (WGS-84, common practice). RK4 gets at
     * least as many force evaluations as Gauss-Jackson including its start-up.
     * Brief: a factor >= 100; asserted 1e4 (measured 1e8 .. 1e10). */
    const double mu = 398600.4418, day = 86400.0;
    pb_elements el = {0};
    el.a = 6778.0;
    el.e = 0.001;
    el.i = 51.6 * M_PI / 180.0;
    el.p = el.a * (1 - el.e * el.e);
    double r0[3], v0[3];
    cr_assert_eq(pb_state_from_elements(mu, &el, r0, v0), PB_OK);
    pb_problem p;
    pb_problem_init_twobody(&p, "leo-demo", "demo LEO", PB_UNITS_KM_S, mu, r0, v0);
    static const double hs[] = {30.0, 60.0, 120.0};
    for (int k = 0; k < 3; k++) {
        pb_method_config c = {0};
        c.h = hs[k];
        pbt_result g = pbt_integrate(&pb_method_gauss_jackson8, &p, &c, p.t0 + day);
        cr_assert_eq(g.status, PB_OK);
        long nrk = (g.evals + 3) / 4;
        c.h = day / (double)nrk;
        pbt_result q = pbt_integrate(&pb_method_rk4, &p, &c, p.t0 + day);
        cr_assert_eq(q.status, PB_OK);
        cr_assert_geq(q.evals, g.evals);
        double eg = pbt_pos_error(&p, &g), eq = pbt_pos_error(&p, &q);
        cr_log_info("LEO 1 day: gauss-jackson8 h=%g s, %ld evals, err %.3e km; "
                    "rk4 h=%.2f s, %ld evals, err %.3e km; ratio %.2e",
                    hs[k], g.evals, eg, c.h, q.evals, eq, eq / eg);
        cr_assert_gt(eq / eg, 1e4);
    }
}
