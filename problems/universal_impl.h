/* universal_impl.h - the universal-variable two-body flow, written once and
 * included by universal.c for double and for __float128 (Bate, Mueller, White
 * (1971) ch. 4; Vallado 4th ed. Alg. 8). The includer defines UV_REAL, UV_SUF,
 * UV_PUBLIC, UV_EPS, UV_PI and the math macros UV_SQRT, UV_SIN, UV_LOG, ... */

#define UV_CAT2(a, b) a##b
#define UV_CAT(a, b) UV_CAT2(a, b)
#define UV_FN(name) UV_CAT(name, UV_SUF)

/* Stumpff functions c2(psi) = (1 - cos s)/psi, c3(psi) = (s - sin s)/s^3,
 * s = sqrt(psi). c2 uses the half-angle form 2 sin^2(s/2)/psi, which has no
 * cancellation; c3 cancels for small |psi|, so there it is a series. */
static void UV_FN(uv_stumpff)(UV_REAL psi, UV_REAL *c2, UV_REAL *c3)
{
    const UV_REAL one = 1, two = 2, half = (UV_REAL)0.5;
    if (UV_FABS(psi) < one) {
        /* c2 = sum (-psi)^k/(2k+2)!, c3 = sum (-psi)^k/(2k+3)! */
        UV_REAL t2 = half, t3 = one / (UV_REAL)6, s2 = 0, s3 = 0;
        for (int k = 0; k < 40; k++) {
            s2 += t2;
            s3 += t3;
            t2 *= -psi / (UV_REAL)((2 * k + 3) * (2 * k + 4));
            t3 *= -psi / (UV_REAL)((2 * k + 4) * (2 * k + 5));
            if (UV_FABS(t2) < UV_EPS * (UV_REAL)1e-2 * s2 &&
                UV_FABS(t3) < UV_EPS * (UV_REAL)1e-2 * s3)
                break;
        }
        *c2 = s2;
        *c3 = s3;
    } else if (psi > 0) {
        UV_REAL s = UV_SQRT(psi), h = UV_SIN(half * s);
        *c2 = two * h * h / psi;
        *c3 = (s - UV_SIN(s)) / (psi * s);
    } else {
        UV_REAL s = UV_SQRT(-psi), h = UV_SINH(half * s);
        *c2 = two * h * h / (-psi);
        *c3 = (UV_SINH(s) - s) / (-psi * s);
    }
}

/* Residual of the universal Kepler equation, scaled by sqrt(mu):
 * F(x) = sigma0 x^2 c2 + (1 - alpha r0) x^3 c3 + r0 x - sqrt(mu) dt.
 * Its derivative is the radius r(x) > 0, so F is strictly increasing. */
static UV_REAL UV_FN(uv_residual)(UV_REAL x, UV_REAL alpha, UV_REAL r0n, UV_REAL sigma0,
                                  UV_REAL smu_dt, UV_REAL *dF)
{
    UV_REAL c2, c3, psi = alpha * x * x;
    UV_FN(uv_stumpff)(psi, &c2, &c3);
    UV_REAL x2 = x * x;
    *dF = x2 * c2 + sigma0 * x * (1 - psi * c3) + r0n * (1 - psi * c2);
    return sigma0 * x2 * c2 + (1 - alpha * r0n) * x2 * x * c3 + r0n * x - smu_dt;
}

/* The orbit's constants for one flow: mu, sqrt(mu), |r0|, r0 . v0 / sqrt(mu), 1/a. */
typedef struct {
    UV_REAL mu, smu, r0n, sigma0, alpha;
} UV_FN(uv_orbit);

/* The starting anomaly x and, on an ellipse, the bracket [lo, hi] that holds
 * the root (lo = hi = 0 otherwise); dt is reduced modulo the period. */
static void UV_FN(uv_start)(const UV_FN(uv_orbit) *o, UV_REAL *dt, UV_REAL *x, UV_REAL *lo,
                            UV_REAL *hi)
{
    UV_REAL smu = o->smu, alpha = o->alpha, r0n = o->r0n;
    if (alpha > 0) {
        /* Reduce dt to [-T/2, T/2]: a whole period maps the state to itself,
         * and a small anomaly keeps the Stumpff arguments small. */
        UV_REAL sa = UV_SQRT(alpha);
        UV_REAL T = 2 * UV_PI / (smu * alpha * sa);
        UV_REAL k = UV_ROUND(*dt / T);
        if (k != 0)
            *dt = UV_FMA(-k, T, *dt);
        /* x = sqrt(a) dE, and |dM| <= pi gives |dE| <= pi + 2e < 2 pi from
         * any starting anomaly (dM = dE - e (sin E - sin E0)), so the root
         * lies within 2 pi sqrt(a); the residual is monotone in x. */
        *hi = 2 * UV_PI / sa;
        *lo = -*hi;
        *x = smu * *dt * alpha;
        return;
    }
    *x = smu * *dt / r0n;
    *lo = *hi = 0;
    if (alpha < 0) {
        /* Vallado 4th ed. Alg. 8's hyperbolic starter, far closer than
         * the above on long spans, where Newton on the exponential
         * residual would creep in steps of about sqrt(-a) */
        UV_REAL mu = o->mu, sg = *dt > 0 ? 1 : -1, sma = UV_SQRT(-1 / alpha);
        UV_REAL q = -2 * mu * alpha * *dt /
                    (o->sigma0 * smu + sg * UV_SQRT(mu / -alpha) * (1 - r0n * alpha));
        UV_REAL xs = q > 0 ? sg * sma * UV_LOG(q) : 0;
        if (UV_FINITE(xs) && xs * *dt > 0)
            *x = xs;
    }
}

/* Parabola and hyperbola: bracket the root by doubling away from 0 in the
 * direction of dt; F grows at least like x^3 (parabola) or exponentially
 * (hyperbola). F is increasing, so where the Stumpff functions overflow F
 * is beyond the root: a non-finite F ends the bracket as an overshoot would.
 * PB_OK with [lo, hi] and x at its middle, or PB_ENOCONV. */
static int UV_FN(uv_bracket)(const UV_FN(uv_orbit) *o, UV_REAL dt, UV_REAL smu_dt, UV_REAL *x,
                             UV_REAL *lo, UV_REAL *hi)
{
    UV_REAL step = *x, dF;
    int n = 0;
    for (;;) {
        if (!UV_FINITE(step))
            return PB_ENOCONV;
        UV_REAL F = UV_FN(uv_residual)(step, o->alpha, o->r0n, o->sigma0, smu_dt, &dF);
        if (!UV_FINITE(F) || (dt > 0 && F >= 0) || (dt < 0 && F <= 0))
            break;
        if (++n > 2000)
            return PB_ENOCONV;
        step *= 2;
    }
    if (dt > 0) {
        *lo = n ? step / 2 : 0;
        *hi = step;
    } else {
        *hi = n ? step / 2 : 0;
        *lo = step;
    }
    *x = (*lo + *hi) / 2;
    return PB_OK;
}

/* Newton safeguarded by the bracket [lo, hi]: a step that leaves it is
 * replaced by bisection, so convergence never depends on the starter.
 * PB_OK with the root in x, or PB_ENOCONV; *iters: residuals evaluated. */
static int UV_FN(uv_solve)(const UV_FN(uv_orbit) *o, UV_REAL smu_dt, UV_REAL *xp, UV_REAL lo,
                           UV_REAL hi, int *iters)
{
    UV_REAL x = *xp, dF;
    int it;
    for (it = 0; it < 400; it++) {
        UV_REAL F = UV_FN(uv_residual)(x, o->alpha, o->r0n, o->sigma0, smu_dt, &dF);
        if (!UV_FINITE(F)) {
            /* overflow: past the root on the side of x's sign (see above) */
            if (x > 0)
                hi = x;
            else
                lo = x;
            x = lo + (hi - lo) / 2;
            continue;
        }
        if (F == 0)
            break;
        if (F < 0)
            lo = x;
        else
            hi = x;
        UV_REAL xn = x - F / dF;
        /* a correction below half an ulp of x: x is the root to rounding (the
         * bracket test below would take xn == hi for a step out of it) */
        if (xn == x)
            break;
        /* after 50 Newton steps bisection alone finishes (a bracket of any
         * double width closes in far fewer than the remaining 350) */
        if (!(xn > lo && xn < hi) || it >= 50)
            xn = lo + (hi - lo) / 2;
        UV_REAL dx = xn - x;
        x = xn;
        if (UV_FABS(dx) <= 4 * UV_EPS * UV_FABS(x) || hi - lo <= 4 * UV_EPS * UV_FABS(x))
            break;
    }
    *xp = x;
    *iters = it < 400 ? it + 1 : it;
    return it == 400 ? PB_ENOCONV : PB_OK;
}

/* The state at anomaly x through the Lagrange coefficients f, g, f', g'. */
static void UV_FN(uv_state)(const UV_FN(uv_orbit) *o, UV_REAL x, const UV_REAL *r0,
                            const UV_REAL *v0, UV_REAL *r, UV_REAL *v)
{
    UV_REAL smu = o->smu, r0n = o->r0n;
    UV_REAL c2, c3, psi = o->alpha * x * x, x2 = x * x;
    UV_FN(uv_stumpff)(psi, &c2, &c3);
    UV_REAL f = 1 - x2 * c2 / r0n;
    /* g from x alone (no cancellation against dt): sqrt(mu) g = sigma0 x^2 c2 + r0 x (1 - psi c3) */
    UV_REAL g = (o->sigma0 * x2 * c2 + r0n * x * (1 - psi * c3)) / smu;
    UV_REAL rr[3];
    for (int i = 0; i < 3; i++)
        rr[i] = f * r0[i] + g * v0[i];
    UV_REAL rn = UV_SQRT(rr[0] * rr[0] + rr[1] * rr[1] + rr[2] * rr[2]);
    UV_REAL fd = smu / (rn * r0n) * x * (psi * c3 - 1);
    UV_REAL gd = 1 - x2 * c2 / rn;
    for (int i = 0; i < 3; i++) {
        UV_REAL vi = fd * r0[i] + gd * v0[i];
        r[i] = rr[i];
        v[i] = vi;
    }
}

#ifdef UV_SEED_FROM_DOUBLE
/* The double-precision anomaly of the same orbit and (already reduced) span,
 * as the starting point of this precision's Newton solve: the constants
 * rounded to double, solved by the double instance. PB_OK with *x, or
 * PB_ENOCONV (double overflow, or a span at the edge of the period that the
 * double reduction would map to another turn): the caller keeps its starter. */
static int UV_FN(uv_seed)(const UV_FN(uv_orbit) *o, UV_REAL dt, UV_REAL *x)
{
    uv_orbit_d d = {(double)o->mu, (double)o->smu, (double)o->r0n, (double)o->sigma0,
                    (double)o->alpha};
    double dtd = (double)dt, dts = dtd, xd;
    int it;
    if (uv_anomaly_d(&d, &dtd, &xd, 0, &it) || dtd != dts || !isfinite(xd))
        return PB_ENOCONV;
    *x = xd;
    return PB_OK;
}
#endif

/* The universal anomaly x for the span *dt (reduced modulo the period on an
 * ellipse: *dt is updated; x = 0 when it reduces to 0): the starter (or, with
 * seed, the double solution where this is not the double instance), the
 * bracket, the safeguarded Newton solve. A seed outside the bracket is
 * replaced by the bracket's middle, so the answer never depends on it.
 * PB_OK, or PB_ENOCONV; *iters: Newton iterations (0 when dt reduces to 0). */
static int UV_FN(uv_anomaly)(const UV_FN(uv_orbit) *o, UV_REAL *dt, UV_REAL *x, int seed,
                             int *iters)
{
    UV_REAL lo, hi;
    *iters = 0;
    UV_FN(uv_start)(o, dt, x, &lo, &hi);
    if (*dt == 0) {
        *x = 0;
        return PB_OK;
    }
    UV_REAL smu_dt = o->smu * *dt;
    if (!(o->alpha > 0) && UV_FN(uv_bracket)(o, *dt, smu_dt, x, &lo, &hi))
        return PB_ENOCONV;
#ifdef UV_SEED_FROM_DOUBLE
    UV_REAL xs;
    if (seed && UV_FN(uv_seed)(o, *dt, &xs) == PB_OK)
        *x = xs;
#else
    (void)seed;
#endif
    if (*x <= lo || *x >= hi)
        *x = (lo + hi) / 2;
    return UV_FN(uv_solve)(o, smu_dt, x, lo, hi, iters);
}

/* The flow with its solver's knobs: seed (see uv_anomaly) and, if iters is
 * not NULL, the Newton iterations taken. */
static int UV_FN(uv_propagate)(UV_REAL mu, const UV_REAL *r0, const UV_REAL *v0, UV_REAL dt,
                               UV_REAL *r, UV_REAL *v, int seed, int *iters)
{
    UV_FN(uv_orbit) o;
    o.r0n = UV_SQRT(r0[0] * r0[0] + r0[1] * r0[1] + r0[2] * r0[2]);
    UV_REAL v0s = v0[0] * v0[0] + v0[1] * v0[1] + v0[2] * v0[2];
    if (!(mu > 0) || !(o.r0n > 0) || !UV_FINITE(v0s) || !UV_FINITE(dt))
        return PB_EINVAL;
    o.mu = mu;
    o.smu = UV_SQRT(mu);
    o.sigma0 = (r0[0] * v0[0] + r0[1] * v0[1] + r0[2] * v0[2]) / o.smu;
    o.alpha = 2 / o.r0n - v0s / mu;   /* 1/a; 0 for a parabola */
    UV_REAL x;
    int it;
    int s = UV_FN(uv_anomaly)(&o, &dt, &x, seed, &it);
    if (iters)
        *iters = it;
    if (s)
        return s;
    if (dt == 0) {
        for (int i = 0; i < 3; i++) {
            r[i] = r0[i];
            v[i] = v0[i];
        }
        return PB_OK;
    }
    UV_FN(uv_state)(&o, x, r0, v0, r, v);
    return PB_OK;
}

/* Contract: the exact two-body state (r, v) at dt after (r0, v0), for any
 * conic. Returns PB_EINVAL for mu <= 0 or r0 = 0, PB_ENOCONV if the
 * universal anomaly cannot be found (a span so long that even the bracket
 * overflows). The __float128 instance starts from the double solution. */
int UV_PUBLIC(UV_REAL mu, const UV_REAL *r0, const UV_REAL *v0, UV_REAL dt,
              UV_REAL *r, UV_REAL *v)
{
    return UV_FN(uv_propagate)(mu, r0, v0, dt, r, v, 1, NULL);
}

#undef UV_FN
#undef UV_CAT
#undef UV_CAT2
