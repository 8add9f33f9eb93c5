/* kepler.c - Kepler's equation M = E - e sin E (0 <= e < 1) and its
 * hyperbolic form M = e sinh H - H (e > 1), to machine precision.
 * Halley's method (Danby 1988, Fundamentals of Celestial Mechanics, sec. 6.6)
 * inside a sign bracket, with cancellation-free residuals near E = 0, e = 1. */
#include <float.h>
#include <math.h>
#include "twobody.h"

#define KEPLER_MAXIT 200

/* x - sin x, accurate for small x where the difference cancels. */
static double kepler_x_minus_sin(double x)
{
    if (fabs(x) >= 1.0)
        return x - sin(x);
    double x2 = x * x, term = x * x2 / 6.0, s = 0;
    for (int k = 1; k < 30 && fabs(term) > 0.25 * DBL_EPSILON * fabs(s); k++) {
        s += term;
        term *= -x2 / ((2.0 * k + 2) * (2.0 * k + 3));
    }
    return s;
}

/* sinh x - x, accurate for small x. */
static double kepler_sinh_minus_x(double x)
{
    if (fabs(x) >= 1.0)
        return sinh(x) - x;
    double x2 = x * x, term = x * x2 / 6.0, s = 0;
    for (int k = 1; k < 30 && fabs(term) > 0.25 * DBL_EPSILON * fabs(s); k++) {
        s += term;
        term *= x2 / ((2.0 * k + 2) * (2.0 * k + 3));
    }
    return s;
}

/* One safeguarded Halley update of x in [lo, hi] for an increasing f; a step
 * leaving the bracket is replaced by bisection. Returns 1 when converged. */
static int kepler_update(double f, double df, double ddf, double *x, double *lo, double *hi)
{
    if (f == 0)
        return 1;
    if (f < 0)
        *lo = *x;
    else
        *hi = *x;
    double dx = -f / df;
    double den = 1 + 0.5 * dx * ddf / df;   /* Halley correction */
    if (den > 0.5)
        dx /= den;
    double xn = *x + dx;
    if (!(xn >= *lo && xn <= *hi))
        xn = *lo + 0.5 * (*hi - *lo);
    double step = xn - *x;
    *x = xn;
    return fabs(step) <= 2 * DBL_EPSILON * fabs(xn) || *hi - *lo <= 2 * DBL_EPSILON * fabs(xn);
}

/* Contract: E with E - e sin E = M for 0 <= e < 1 and any finite M; E lies in
 * the same 2 pi branch as M. NaN for e outside [0, 1) or non-finite M. */
double pb_kepler_solve(double M, double e)
{
    if (!(e >= 0 && e < 1) || !isfinite(M))
        return NAN;
    /* 2 pi in two parts (Cody-Waite): the reduced anomaly must be accurate in
     * absolute terms, because near e = 1 small anomalies amplify its error. */
    const double twopi = 6.283185307179586232, twopi_lo = 2.4492935982947064e-16;
    double k = nearbyint(M / twopi);
    double m = fma(-k, twopi_lo, fma(-k, twopi, M));   /* in [-pi, pi] */
    double sgn = m < 0 ? -1 : 1;
    m = fabs(m);
    if (m > M_PI)
        m = M_PI;
    /* E - M = e sin E lies in [0, e] on [0, pi]. */
    double lo = m, hi = fmin(M_PI, m + e);
    /* Starter: cube-root form near the singular corner (e -> 1, M -> 0),
     * else M + e sin M / (1 - sin(M + e) + sin M) (Danby 1988). */
    double x;
    if (m < 0.25 && e > 0.5)
        x = fmin(cbrt(6 * m / e), m / (1 - e));
    else
        x = m + e * sin(m) / (1 - sin(m + e) + sin(m));
    if (!(x >= lo && x <= hi))
        x = lo + 0.5 * (hi - lo);
    double om = 1 - e;  /* exact for e >= 0.5 */
    for (int it = 0; it < KEPLER_MAXIT; it++) {
        double f, df;
        if (x < 1.0) {
            /* f = (1-e) x + e (x - sin x) - m, f' = (1-e) + 2 e sin^2(x/2) */
            double s = sin(0.5 * x);
            f = om * x + e * kepler_x_minus_sin(x) - m;
            df = om + 2 * e * s * s;
        } else {
            f = x - e * sin(x) - m;
            df = 1 - e * cos(x);
        }
        if (kepler_update(f, df, e * sin(x), &x, &lo, &hi))
            break;
    }
    return sgn * x + k * twopi;
}

/* Contract: H with e sinh H - H = M for e > 1 and finite M; NaN otherwise. */
double pb_kepler_solve_hyperbolic(double M, double e)
{
    if (!(e > 1) || !isfinite(M))
        return NAN;
    double sgn = M < 0 ? -1 : 1, m = fabs(M);
    if (m == 0)
        return 0;
    /* e sinh H >= M and (e-1) sinh H <= M bracket H. */
    double lo = asinh(m / e), hi = asinh(m / (e - 1));
    double x = m < 1 ? fmin(hi, fmin(m / (e - 1), cbrt(6 * m / e))) : log(2 * m / e + 1.8);
    if (!(x >= lo && x <= hi))
        x = lo + 0.5 * (hi - lo);
    double em = e - 1;  /* exact for e <= 2 */
    for (int it = 0; it < KEPLER_MAXIT; it++) {
        double f, df;
        if (x < 1.0) {
            double s = sinh(0.5 * x);
            f = em * x + e * kepler_sinh_minus_x(x) - m;
            df = em + 2 * e * s * s;
        } else {
            f = e * sinh(x) - x - m;
            df = e * cosh(x) - 1;
        }
        if (kepler_update(f, df, e * sinh(x), &x, &lo, &hi))
            break;
    }
    return sgn * x;
}
