/* revolving_impl.h - the exact flow of Newton's revolving orbit (Principia I,
 * Prop. 44; REFERENCES.md), written once and included by revolving.c for
 * double and for __float128. The includer defines RV_REAL, RV_SUF, RV_PUBLIC,
 * RV_KEPLER (the universal-variable flow of that precision), RV_PI and the
 * math macros RV_SQRT, RV_SIN, RV_COS, RV_ATAN2, RV_ROUND, RV_FINITE.
 *
 * Invariant: the radial motion under -mu/r^2 - 2 gamma/r^3 with angular
 * momentum h is the radial motion of a Kepler orbit with h' = h k,
 * k = sqrt(1 - 2 gamma/h^2) (the centrifugal term h^2/r^3 - 2 gamma/r^3 =
 * h'^2/r^3). That auxiliary orbit sweeps its true anomaly at h'/r^2, the real
 * one its polar angle at h/r^2, so theta - theta0 = phi/k with phi the
 * auxiliary orbit's swept angle counted in full turns. */

#define RV_CAT2(a, b) a##b
#define RV_CAT(a, b) RV_CAT2(a, b)
#define RV_FN(name) RV_CAT(name, RV_SUF)

static RV_REAL RV_FN(rv_dot)(const RV_REAL *a, const RV_REAL *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/* The auxiliary orbit's whole turns over dt: psi, its polar angle at dt
 * measured from its start, is its swept angle modulo 2 pi. Its true anomaly
 * nu and mean anomaly M agree at every apse and rise together between them,
 * so |nu - M| < pi at every time when both are counted continuously from
 * the same turn; with M1 = M0 + n dt that fixes the turn. r0n and rdot0:
 * radius and radial velocity at the start; alpha = 1/a. */
static RV_REAL RV_FN(rv_turns)(RV_REAL mu, RV_REAL alpha, RV_REAL r0n, RV_REAL rdot0, RV_REAL dt,
                               RV_REAL psi)
{
    /* e cos E0 = 1 - r0/a, e sin E0 = r0 . v0 / sqrt(mu a) (two-body laws) */
    RV_REAL ec = 1 - r0n * alpha, es = r0n * rdot0 * RV_SQRT(alpha / mu);
    RV_REAL e = RV_SQRT(ec * ec + es * es);
    RV_REAL E0 = RV_ATAN2(es, ec), M0 = E0 - es;
    RV_REAL nu0 = 2 * RV_ATAN2(RV_SQRT(1 + e) * RV_SIN(E0 / 2), RV_SQRT(1 - e) * RV_COS(E0 / 2));
    RV_REAL M1 = M0 + RV_SQRT(mu * alpha * alpha * alpha) * dt;
    return RV_ROUND((M1 - nu0 - psi) / (2 * RV_PI));
}

/* Contract: the exact state (r, v) at dt after (r0, v0) under the force
 * -mu r/|r|^3 - 2 gamma r/|r|^4. PB_EINVAL for mu <= 0, r0 = 0, h = 0,
 * 2 gamma >= h^2 (the orbit falls into the centre: no real k) or an
 * auxiliary orbit that is not an ellipse; otherwise as the Kepler flow. */
int RV_PUBLIC(RV_REAL mu, RV_REAL gamma, const RV_REAL *r0, const RV_REAL *v0, RV_REAL dt,
              RV_REAL *r, RV_REAL *v)
{
    RV_REAL hv[3] = {r0[1] * v0[2] - r0[2] * v0[1], r0[2] * v0[0] - r0[0] * v0[2],
                     r0[0] * v0[1] - r0[1] * v0[0]};
    RV_REAL r0n = RV_SQRT(RV_FN(rv_dot)(r0, r0)), h = RV_SQRT(RV_FN(rv_dot)(hv, hv));
    if (!(mu > 0) || !(r0n > 0) || !(h > 0) || !RV_FINITE(h) || !RV_FINITE(dt))
        return PB_EINVAL;
    RV_REAL k2 = 1 - 2 * gamma / (h * h);
    if (!(k2 > 0))
        return PB_EINVAL;
    RV_REAL k = RV_SQRT(k2), rdot0 = RV_FN(rv_dot)(r0, v0) / r0n;
    /* the auxiliary orbit in the plane frame (r0_hat, t0_hat, h_hat) */
    RV_REAL ra0[3] = {r0n, 0, 0}, va0[3] = {rdot0, h * k / r0n, 0}, ra[3], va[3];
    RV_REAL alpha = 2 / r0n - RV_FN(rv_dot)(va0, va0) / mu;
    if (!(alpha > 0))
        return PB_EINVAL;
    int s = RV_KEPLER(mu, ra0, va0, dt, ra, va);
    if (s)
        return s;
    RV_REAL rn = RV_SQRT(RV_FN(rv_dot)(ra, ra)), rdot = RV_FN(rv_dot)(ra, va) / rn;
    RV_REAL psi = RV_ATAN2(ra[1], ra[0]), turns = RV_FN(rv_turns)(mu, alpha, r0n, rdot0, dt, psi);
    /* theta = (psi + 2 pi turns)/k, less the whole turns 2 pi turns: the
     * advance per turn 2 pi (1/k - 1) = 2 pi (2 gamma/h^2)/(k (1 + k)) has no
     * cancellation, and the angle stays small, so no rounding grows with the
     * number of turns beyond that of turns * advance */
    RV_REAL advance = 2 * RV_PI * (2 * gamma / (h * h)) / (k * (1 + k));
    RV_REAL theta = psi / k + turns * advance, c = RV_COS(theta), sn = RV_SIN(theta);
    RV_REAL rh[3], th[3], w = h / rn;
    for (int i = 0; i < 3; i++)
        rh[i] = r0[i] / r0n;
    /* t0_hat = h_hat x r0_hat */
    th[0] = (hv[1] * rh[2] - hv[2] * rh[1]) / h;
    th[1] = (hv[2] * rh[0] - hv[0] * rh[2]) / h;
    th[2] = (hv[0] * rh[1] - hv[1] * rh[0]) / h;
    for (int i = 0; i < 3; i++) {
        RV_REAL ur = c * rh[i] + sn * th[i], ut = -sn * rh[i] + c * th[i];
        r[i] = rn * ur;
        v[i] = rdot * ur + w * ut;
    }
    return PB_OK;
}

#undef RV_FN
#undef RV_CAT
#undef RV_CAT2
