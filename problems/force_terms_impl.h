/* force_terms_impl.h - every force term, written once for a real type FT_REAL
 * and included by force_terms.c (double, for the methods) and by
 * force_terms_quad.c (__float128, for the reference trajectory), so that the
 * truth follows exactly the model the methods integrate. The includer defines
 * FT_REAL, FT_SUF and the math macros FT_SQRT, FT_EXP, FT_SIN, FT_COS, FT_ASIN,
 * FT_ACOS, FT_FABS and FT_PI. Constants are double literals in both
 * instantiations, so both evaluate the same model. */
#include "problem.h"

#define FT_CAT2(a, b) a##b
#define FT_CAT(a, b) FT_CAT2(a, b)
#define FT_FN(name) FT_CAT(name, FT_SUF)
/* each includer uses a different subset */
#define FT_API static __attribute__((unused))

FT_API FT_REAL FT_FN(ft_dot)(const FT_REAL *a, const FT_REAL *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/* Zonal harmonics J2..J_deg of the potential energy per unit mass
 * V = (mu/r) sum_n J_n (R/r)^n P_n(s), s = z/r (Vallado 4th ed. Sec. 8.6;
 * Montenbruck & Gill Sec. 3.2). With V_n = mu J_n R^n r^-(n+1) P_n(s),
 * a = -grad V_n = mu J_n R^n / r^(n+2) [((n+1) P_n + s P_n') r_hat - P_n' z_hat];
 * P_n and P_n' by the Bonnet recurrence, P'_(n+1) = (n+1) P_n + s P'_n, which
 * has no pole at s = +-1. rn = |r|. Adds to a; *V (may be NULL) receives V. */
FT_API void FT_FN(ft_zonal)(const pb_problem *p, const FT_REAL *r, FT_REAL rn, FT_REAL *a, FT_REAL *V)
{
    /* the recurrences' integers and 1/(n+1), n = 1..5, as FT_REAL
     * constants: the loop neither converts nor divides (in __float128 each
     * conversion is a call and a division costs several multiplications) */
    static const FT_REAL k2n1[] = {1, 3, 5, 7, 9, 11}, kn[] = {0, 1, 2, 3, 4, 5};
    static const FT_REAL kn1[] = {1, 2, 3, 4, 5, 6}, kn2[] = {2, 3, 4, 5, 6, 7};
    static const FT_REAL inv[] = {1, (FT_REAL)1 / 2, (FT_REAL)1 / 3, (FT_REAL)1 / 4, (FT_REAL)1 / 5,
                                  (FT_REAL)1 / 6};
    const pb_forces *f = &p->forces;
    FT_REAL irn = 1 / rn, s = r[2] * irn;
    FT_REAL mu = p->mu, q = (FT_REAL)p->body_radius * irn;
    FT_REAL Pm = 1, P = s, dP = 1, qn = q, radial = 0, axial = 0, pot = 0;
    for (int n = 1; n < f->zonal_degree; n++) {
        FT_REAL Pn = (k2n1[n] * s * P - kn[n] * Pm) * inv[n];
        FT_REAL dPn = kn1[n] * P + s * dP;
        Pm = P, P = Pn, dP = dPn;
        qn *= q;
        FT_REAL J = (FT_REAL)f->jn[n + 1] * qn;
        radial += J * (kn2[n] * P + s * dP);
        axial += J * dP;
        if (V)
            pot += J * P;
    }
    FT_REAL c = mu * irn * irn, cr = c * radial * irn;
    for (int i = 0; i < 3; i++)
        a[i] += cr * r[i];
    a[2] -= c * axial;
    if (V)
        *V = mu * irn * pot;
}

/* Exponential atmosphere, Vallado 4th ed. Table 8-4 (REFERENCES.md): base
 * altitude h0 [km], density rho0 [kg/m^3], scale height H [km]. */
static const double FT_FN(ft_atmosphere)[][3] = {
    {0, 1.225, 7.249}, {25, 3.899e-2, 6.349}, {30, 1.774e-2, 6.682},
    {40, 3.972e-3, 7.554}, {50, 1.057e-3, 8.382}, {60, 3.206e-4, 7.714},
    {70, 8.770e-5, 6.549}, {80, 1.905e-5, 5.799}, {90, 3.396e-6, 5.382},
    {100, 5.297e-7, 5.877}, {110, 9.661e-8, 7.263}, {120, 2.438e-8, 9.473},
    {130, 8.484e-9, 12.636}, {140, 3.845e-9, 16.149}, {150, 2.070e-9, 22.523},
    {180, 5.464e-10, 29.740}, {200, 2.789e-10, 37.105}, {250, 7.248e-11, 45.546},
    {300, 2.418e-11, 53.628}, {350, 9.518e-12, 53.298}, {400, 3.725e-12, 58.515},
    {450, 1.585e-12, 60.828}, {500, 6.967e-13, 63.822}, {600, 1.454e-13, 71.835},
    {700, 3.614e-14, 88.667}, {800, 1.170e-14, 124.64}, {900, 5.245e-15, 181.05},
    {1000, 3.019e-15, 268.00},
};

#define FT_ATMOSPHERE_ROWS ((int)(sizeof FT_FN(ft_atmosphere) / sizeof FT_FN(ft_atmosphere)[0]))

/* The row of the table for altitude h: the largest base at or below h (the
 * first row below 0, the last above). */
FT_API int FT_FN(ft_band)(FT_REAL h)
{
    int k = 0;
    while (k + 1 < FT_ATMOSPHERE_ROWS && h >= (FT_REAL)FT_FN(ft_atmosphere)[k + 1][0])
        k++;
    return k;
}

/* Density [kg/m^3] at altitude h [km] above the body's sphere, from row band
 * (-1: the row of h itself; the reference holds a row fixed between located
 * crossings of its bounds, so that each step sees one smooth exponential). */
FT_API FT_REAL FT_FN(ft_density)(FT_REAL h, int band)
{
    const double *row = FT_FN(ft_atmosphere)[band >= 0 ? band : FT_FN(ft_band)(h)];
    return (FT_REAL)row[1] * FT_EXP(-(h - (FT_REAL)row[0]) / (FT_REAL)row[2]);
}

/* The altitude of r (km above the body's sphere). */
FT_API FT_REAL FT_FN(ft_altitude)(const pb_problem *p, const FT_REAL *r)
{
    return FT_SQRT(FT_FN(ft_dot)(r, r)) - (FT_REAL)p->body_radius;
}

/* Drag a = -(1/2) rho (C_D A/m) |v_rel| v_rel with v_rel = v - omega x r
 * (Vallado 4th ed. Sec. 8.6.2); rho B is per metre, speeds in km/s, so the
 * result in km/s^2 carries a factor 1000. rn = |r|. */
FT_API void FT_FN(ft_drag)(const pb_problem *p, const FT_REAL *r, FT_REAL rn, const FT_REAL *v,
                           int band, FT_REAL *a)
{
    const pb_forces *f = &p->forces;
    FT_REAL w = f->body_rate;
    FT_REAL vr[3] = {v[0] + w * r[1], v[1] - w * r[0], v[2]};
    FT_REAL h = rn - (FT_REAL)p->body_radius;
    FT_REAL k = -(FT_REAL)0.5 * (FT_REAL)1000 * FT_FN(ft_density)(h, band) * (FT_REAL)f->ballistic_m2_kg
                * FT_SQRT(FT_FN(ft_dot)(vr, vr));
    for (int i = 0; i < 3; i++)
        a[i] += k * vr[i];
}

#define FT_DEG (FT_PI / (FT_REAL)180)
#define FT_ARCSEC (FT_PI / (FT_REAL)648000)

/* Ecliptic (longitude, latitude, distance) to equatorial coordinates by the
 * obliquity of J2000 (rotation about x). */
FT_API void FT_FN(ft_ecliptic_to_equatorial)(FT_REAL lon, FT_REAL lat, FT_REAL dist, FT_REAL *s)
{
    FT_REAL eps = (FT_REAL)PB_OBLIQUITY_J2000_DEG * FT_DEG, ce = FT_COS(eps), se = FT_SIN(eps);
    FT_REAL x = dist * FT_COS(lon) * FT_COS(lat), y = dist * FT_SIN(lon) * FT_COS(lat);
    FT_REAL z = dist * FT_SIN(lat);
    s[0] = x;
    s[1] = ce * y - se * z;
    s[2] = se * y + ce * z;
}

/* An angle by its sine and cosine. The Sun's and Moon's series below take
 * sines and cosines of sums of four fundamental arguments: each sum is built
 * from the arguments' own sines and cosines by the addition theorems, four
 * sincos a call instead of some forty sin and cos (which were two thirds of
 * the time of a problem with the Moon). Same series; the values differ from
 * direct evaluation by a few units in the last place, less than the
 * arguments' own rounding (l is of order 1e3 rad). */
typedef struct { FT_REAL s, c; } FT_FN(ft_sc);
#define FT_SC FT_FN(ft_sc)

FT_API FT_SC FT_FN(ft_sc_of)(FT_REAL x)
{
    FT_SC a = {FT_SIN(x), FT_COS(x)};
    return a;
}

FT_API FT_SC FT_FN(ft_sc_add)(FT_SC a, FT_SC b)
{
    FT_SC r = {a.s * b.c + a.c * b.s, a.c * b.c - a.s * b.s};
    return r;
}

FT_API FT_SC FT_FN(ft_sc_sub)(FT_SC a, FT_SC b)
{
    FT_SC r = {a.s * b.c - a.c * b.s, a.c * b.c + a.s * b.s};
    return r;
}

FT_API FT_SC FT_FN(ft_sc_twice)(FT_SC a)
{
    FT_SC r = {2 * a.s * a.c, (a.c - a.s) * (a.c + a.s)};
    return r;
}

#define FT_ADD_SC FT_FN(ft_sc_add)
#define FT_SUB_SC FT_FN(ft_sc_sub)

/* Low-precision Sun, Montenbruck & Gill, Satellite Orbits (2000), Sec. 3.3.2,
 * eqs. 3.43-3.45 (REFERENCES.md); T in Julian centuries TT from J2000. */
FT_API void FT_FN(ft_sun)(FT_REAL days, FT_REAL *s)
{
    FT_REAL T = days / (FT_REAL)36525;
    FT_REAL M = ((FT_REAL)357.5256 + (FT_REAL)35999.049 * T) * FT_DEG;
    FT_SC m = FT_FN(ft_sc_of)(M), m2 = FT_FN(ft_sc_twice)(m);
    FT_REAL lon = (FT_REAL)282.9400 * FT_DEG + M + ((FT_REAL)6892 * m.s + (FT_REAL)72 * m2.s) * FT_ARCSEC;
    FT_REAL dist = ((FT_REAL)149.619 - (FT_REAL)2.499 * m.c - (FT_REAL)0.021 * m2.c) * (FT_REAL)1e6;
    FT_FN(ft_ecliptic_to_equatorial)(lon, 0, dist, s);
}

/* Low-precision Moon, Montenbruck & Gill (2000), eqs. 3.47-3.49 (as
 * REFERENCES.md gives them: 22640" and D = 297.85027, not the typo'd copies).
 * Each term's argument is named in the comment at its end. */
FT_API void FT_FN(ft_moon)(FT_REAL days, FT_REAL *s)
{
    FT_REAL T = days / (FT_REAL)36525;
    FT_REAL L0 = ((FT_REAL)218.31617 + (FT_REAL)481267.88088 * T - (FT_REAL)1.3972 * T) * FT_DEG;
    FT_REAL l = ((FT_REAL)134.96292 + (FT_REAL)477198.86753 * T) * FT_DEG;
    FT_REAL lp = ((FT_REAL)357.52543 + (FT_REAL)35999.04944 * T) * FT_DEG;
    FT_REAL F = ((FT_REAL)93.27283 + (FT_REAL)483202.01873 * T) * FT_DEG;
    FT_REAL D = ((FT_REAL)297.85027 + (FT_REAL)445267.11135 * T) * FT_DEG;
    FT_SC a_l = FT_FN(ft_sc_of)(l), a_lp = FT_FN(ft_sc_of)(lp), a_F = FT_FN(ft_sc_of)(F);
    FT_SC a_D = FT_FN(ft_sc_of)(D);
    FT_SC a_2l = FT_FN(ft_sc_twice)(a_l), a_2D = FT_FN(ft_sc_twice)(a_D), a_2F = FT_FN(ft_sc_twice)(a_F);
    FT_SC a_l_m2D = FT_SUB_SC(a_l, a_2D);        /* l - 2D */
    FT_SC a_2l_m2D = FT_SUB_SC(a_2l, a_2D);      /* 2l - 2D */
    FT_SC a_l_lp_m2D = FT_ADD_SC(a_l_m2D, a_lp);    /* l + l' - 2D */
    FT_SC a_lp_m2D = FT_SUB_SC(a_lp, a_2D);      /* l' - 2D */
    FT_SC a_l_p2D = FT_ADD_SC(a_l, a_2D);      /* l + 2D */
    FT_SC a_F_m2D = FT_SUB_SC(a_F, a_2D);        /* F - 2D */
    FT_REAL dl = (FT_REAL)22640 * a_l.s + (FT_REAL)769 * a_2l.s
                 - (FT_REAL)4586 * a_l_m2D.s + (FT_REAL)2370 * a_2D.s
                 - (FT_REAL)668 * a_lp.s - (FT_REAL)412 * a_2F.s
                 - (FT_REAL)212 * a_2l_m2D.s - (FT_REAL)206 * a_l_lp_m2D.s
                 + (FT_REAL)192 * a_l_p2D.s - (FT_REAL)165 * a_lp_m2D.s
                 + (FT_REAL)148 * FT_SUB_SC(a_l, a_lp).s - (FT_REAL)125 * a_D.s     /* l - l', D */
                 - (FT_REAL)110 * FT_ADD_SC(a_l, a_lp).s                             /* l + l' */
                 - (FT_REAL)55 * FT_SUB_SC(a_2F, a_2D).s;                            /* 2F - 2D */
    FT_REAL lon = L0 + dl * FT_ARCSEC;
    /* the first term's argument holds the perturbed longitude: a sine of its own */
    FT_REAL lat = (FT_REAL)18520 * FT_SIN(F + lon - L0 + ((FT_REAL)412 * a_2F.s
                                                         + (FT_REAL)541 * a_lp.s) * FT_ARCSEC)
                  - (FT_REAL)526 * a_F_m2D.s + (FT_REAL)44 * FT_ADD_SC(a_l, a_F_m2D).s  /* l + F - 2D */
                  - (FT_REAL)31 * FT_SUB_SC(a_F_m2D, a_l).s                           /* -l + F - 2D */
                  - (FT_REAL)25 * FT_SUB_SC(a_F, a_2l).s                            /* -2l + F */
                  - (FT_REAL)23 * FT_ADD_SC(a_lp, a_F_m2D).s                          /* l' + F - 2D */
                  + (FT_REAL)21 * FT_SUB_SC(a_F, a_l).s                             /* -l + F */
                  + (FT_REAL)11 * FT_SUB_SC(a_F_m2D, a_lp).s;                         /* -l' + F - 2D */
    /* cosines are even: cos(2D - l) = cos(l - 2D) */
    FT_REAL dist = (FT_REAL)385000 - (FT_REAL)20905 * a_l.c - (FT_REAL)3699 * a_l_m2D.c
                   - (FT_REAL)2956 * a_2D.c - (FT_REAL)570 * a_2l.c
                   + (FT_REAL)246 * a_2l_m2D.c - (FT_REAL)205 * a_lp_m2D.c
                   - (FT_REAL)171 * a_l_p2D.c - (FT_REAL)152 * a_l_lp_m2D.c;
    FT_FN(ft_ecliptic_to_equatorial)(lon, lat * FT_ARCSEC, dist, s);
}

#undef FT_ADD_SC
#undef FT_SUB_SC

/* The user's circular third body at time t. */
FT_API void FT_FN(ft_circular)(const pb_circular_body *c, FT_REAL t, FT_REAL *s)
{
    FT_REAL u = (FT_REAL)c->u0 + (FT_REAL)c->rate * t;
    FT_REAL x = (FT_REAL)c->radius * FT_COS(u), y = (FT_REAL)c->radius * FT_SIN(u);
    FT_REAL ci = FT_COS((FT_REAL)c->i), si = FT_SIN((FT_REAL)c->i);
    FT_REAL cO = FT_COS((FT_REAL)c->raan), sO = FT_SIN((FT_REAL)c->raan);
    s[0] = cO * x - sO * ci * y;
    s[1] = sO * x + cO * ci * y;
    s[2] = si * y;
}

/* A third body of parameter mu_b at s, direct and indirect terms together in
 * Battin's form (Battin 1987, Sec. 8.4, eq. 8.60): a = -mu_b/d^3 (r + F(q) s),
 * d = |s - r|, q = r.(r - 2s)/s^2, F(q) = q (3 + 3q + q^2)/(1 + (1 + q)^(3/2)),
 * which avoids the cancellation of mu_b((s - r)/d^3 - s/s^3) for far bodies.
 * d3 = |s - r|^3, or 0 to compute it here. */
FT_API void FT_FN(ft_third_body)(FT_REAL mu_b, const FT_REAL *s, const FT_REAL *r, FT_REAL d3,
                                 FT_REAL *a)
{
    FT_REAL rm2s[3] = {r[0] - 2 * s[0], r[1] - 2 * s[1], r[2] - 2 * s[2]};
    FT_REAL q = FT_FN(ft_dot)(r, rm2s) / FT_FN(ft_dot)(s, s);
    FT_REAL q1 = 1 + q, F = q * (3 + 3 * q + q * q) / (1 + q1 * FT_SQRT(q1));
    if (d3 == 0) {
        FT_REAL d[3] = {s[0] - r[0], s[1] - r[1], s[2] - r[2]}, d2 = FT_FN(ft_dot)(d, d);
        d3 = d2 * FT_SQRT(d2);
    }
    FT_REAL k = -mu_b / d3;
    for (int i = 0; i < 3; i++)
        a[i] += k * (r[i] + F * s[i]);
}

/* Shadow boundary functions at r for the Sun at s, positive in sunlight:
 * g[0] crosses zero at penumbra entry (conical) or at the shadow cylinder's
 * wall (cylindrical), g[1] at umbra entry (conical only). Montenbruck & Gill
 * Sec. 3.4.2: apparent radii a (Sun) and b (body), separation c. Returns how
 * many functions the model has. The visible fraction goes into *nu: from the
 * geometry when region is FT_REGION_GEOMETRY (the methods' force), else the
 * formula of the given region (FT_REGION_SUN, _PENUMBRA, _UMBRA) wherever r
 * is, which is smooth: the reference integrates each region with its own
 * formula between located boundaries. */
enum { FT_REGION_GEOMETRY = -1, FT_REGION_SUN = 0, FT_REGION_PENUMBRA = 1, FT_REGION_UMBRA = 2 };

/* The squared distances and distances of the satellite at r from the body's
 * centre and from the Sun at s, which several terms share (each square root
 * once an evaluation: in __float128 it is not cheap). */
typedef struct FT_FN(ft_dist) {
    FT_REAL rr, rn, dd, dn;
} FT_FN(ft_dist);

FT_API void FT_FN(ft_dist_fill)(const FT_REAL *s, const FT_REAL *r, FT_FN(ft_dist) *q)
{
    FT_REAL d[3] = {s[0] - r[0], s[1] - r[1], s[2] - r[2]};
    q->rr = FT_FN(ft_dot)(r, r);
    q->rn = FT_SQRT(q->rr);
    q->dd = FT_FN(ft_dot)(d, d);
    q->dn = FT_SQRT(q->dd);
}

FT_API int FT_FN(ft_shadow_at)(int model, FT_REAL R, const FT_REAL *s, const FT_REAL *r,
                               const FT_FN(ft_dist) *q, int region, FT_REAL *g, FT_REAL *nu)
{
    *nu = 1;
    /* a region given by the caller needs no geometry where its formula is a
     * constant (g is asked for only with FT_REGION_GEOMETRY) */
    if (region == FT_REGION_SUN)
        return model == PB_SHADOW_CONICAL ? 2 : model == PB_SHADOW_CYLINDRICAL ? 1 : 0;
    if (region == FT_REGION_UMBRA && model == PB_SHADOW_CYLINDRICAL) {
        *nu = 0;
        return 1;
    }
    if (model == PB_SHADOW_CYLINDRICAL) {
        FT_REAL sn = FT_SQRT(FT_FN(ft_dot)(s, s)), along = FT_FN(ft_dot)(r, s) / sn;
        FT_REAL perp = FT_SQRT(FT_FABS(q->rr - along * along));
        /* on the sunlit side the distance from the body's centre stands in:
         * equal to perp where along = 0, so g is continuous */
        g[0] = along < 0 ? perp - R : q->rn - R;
        if (region == FT_REGION_GEOMETRY)
            region = g[0] < 0 ? FT_REGION_UMBRA : FT_REGION_SUN;
        *nu = region == FT_REGION_SUN ? 1 : 0;
        return 1;
    }
    if (model != PB_SHADOW_CONICAL)
        return 0;
    /* in the umbra the body's disc covers the Sun's (sb >= sa) unless the
     * eclipse is annular; asin is increasing, so the sines tell which
     * without the transcendental calls */
    FT_REAL rs = (FT_REAL)PB_SUN_RADIUS_KM, dn = q->dn, rn = q->rn;
    if (region == FT_REGION_UMBRA && R * dn >= rs * rn) {
        *nu = 0;
        return 2;
    }
    FT_REAL d[3] = {s[0] - r[0], s[1] - r[1], s[2] - r[2]};
    FT_REAL sa = FT_ASIN(rs / dn), sb = FT_ASIN(R / rn);
    FT_REAL cc = -FT_FN(ft_dot)(r, d) / (rn * dn);
    cc = cc > 1 ? 1 : cc < -1 ? -1 : cc;
    FT_REAL c = FT_ACOS(cc);
    g[0] = c - (sa + sb);
    g[1] = c - FT_FABS(sb - sa);
    if (region == FT_REGION_GEOMETRY)
        region = g[0] >= 0 ? FT_REGION_SUN : g[1] <= 0 ? FT_REGION_UMBRA : FT_REGION_PENUMBRA;
    if (region == FT_REGION_SUN) {
        *nu = 1;
    } else if (region == FT_REGION_UMBRA) {
        /* inside the umbra, or the body lies within the Sun's disc (annular) */
        *nu = sb >= sa ? 0 : 1 - (sb * sb) / (sa * sa);
    } else {
        /* the overlap of two discs; arguments clamped so that the formula
         * stays defined a little outside the penumbra */
        FT_REAL x = (c * c + sa * sa - sb * sb) / (2 * c), y2 = sa * sa - x * x;
        FT_REAL y = FT_SQRT(y2 > 0 ? y2 : 0);
        FT_REAL xa = x / sa, xb = (c - x) / sb;
        xa = xa > 1 ? 1 : xa < -1 ? -1 : xa;
        xb = xb > 1 ? 1 : xb < -1 ? -1 : xb;
        FT_REAL A = sa * sa * FT_ACOS(xa) + sb * sb * FT_ACOS(xb) - c * y;
        *nu = 1 - A / (FT_PI * sa * sa);
    }
    return 2;
}

FT_API int FT_FN(ft_shadow)(int model, FT_REAL R, const FT_REAL *s, const FT_REAL *r, int region,
                            FT_REAL *g, FT_REAL *nu)
{
    FT_FN(ft_dist) q;
    FT_FN(ft_dist_fill)(s, r, &q);
    return FT_FN(ft_shadow_at)(model, R, s, r, &q, region, g, nu);
}

/* Cannonball radiation pressure a = nu P (AU/|d|)^2 C_R (A/m) d_hat, d from
 * the Sun to the satellite (Montenbruck & Gill Sec. 3.4); N/m^2 times m^2/kg
 * is m/s^2, hence the 1e-3 for km/s^2. */
FT_API void FT_FN(ft_srp)(const pb_problem *p, const FT_REAL *sun, const FT_REAL *r,
                          const FT_FN(ft_dist) *q, int region, FT_REAL *a)
{
    const pb_forces *f = &p->forces;
    FT_REAL g[2], nu = 1;
    FT_FN(ft_shadow_at)(f->shadow, (FT_REAL)p->body_radius, sun, r, q, region, g, &nu);
    if (nu <= 0)
        return;
    FT_REAL d[3] = {r[0] - sun[0], r[1] - sun[1], r[2] - sun[2]};
    FT_REAL au = (FT_REAL)PB_AU_KM;
    FT_REAL k = nu * (FT_REAL)PB_SRP_1AU_N_M2 * (FT_REAL)1e-3 * (FT_REAL)f->cr
                * (FT_REAL)f->srp_area_mass_m2_kg * au * au / (q->dd * q->dn);
    for (int i = 0; i < 3; i++)
        a[i] += k * d[i];
}

/* Positions at t of the bodies whose place depends on time alone: [0] the
 * Sun (for its attraction or its radiation), [1] the Moon, [2] the user's
 * circular body; only those the problem has are set. */
FT_API void FT_FN(ft_bodies)(const pb_problem *p, FT_REAL t, FT_REAL pos[3][3])
{
    const pb_forces *f = &p->forces;
    FT_REAL days = (FT_REAL)f->epoch_days + t / (FT_REAL)86400;
    if (f->sun || f->srp_area_mass_m2_kg > 0)
        FT_FN(ft_sun)(days, pos[0]);
    if (f->moon)
        FT_FN(ft_moon)(days, pos[1]);
    if (f->circular)
        FT_FN(ft_circular)(&f->circ, t, pos[2]);
}

/* The whole acceleration of a central-body problem at (t, r, v): the
 * inverse-square attraction and every term of p->forces, with the bodies at
 * pos (ft_bodies); region as for ft_shadow, band as for ft_density. */
FT_API void FT_FN(ft_accel_at)(const pb_problem *p, const FT_REAL *r, const FT_REAL *v,
                               int region, int band, FT_REAL pos[3][3], FT_REAL *a)
{
    const pb_forces *f = &p->forces;
    FT_FN(ft_dist) q;
    int sunlit = f->sun || f->srp_area_mass_m2_kg > 0;
    if (sunlit) {
        FT_FN(ft_dist_fill)(pos[0], r, &q);
    } else {
        q.rr = FT_FN(ft_dot)(r, r);
        q.rn = FT_SQRT(q.rr);
    }
    FT_REAL r2 = q.rr, rn = q.rn;
    FT_REAL c = -(FT_REAL)p->mu / (r2 * rn);
    if (f->inverse_cube_gamma != 0)
        c -= 2 * (FT_REAL)f->inverse_cube_gamma / (r2 * r2);
    for (int i = 0; i < 3; i++)
        a[i] = c * r[i];
    if (f->zonal_degree >= 2)
        FT_FN(ft_zonal)(p, r, rn, a, NULL);
    if (f->drag)
        FT_FN(ft_drag)(p, r, rn, v, band, a);
    if (f->sun)
        FT_FN(ft_third_body)((FT_REAL)PB_GM_SUN, pos[0], r, q.dd * q.dn, a);
    if (f->moon)
        FT_FN(ft_third_body)((FT_REAL)PB_GM_MOON, pos[1], r, 0, a);
    if (f->circular)
        FT_FN(ft_third_body)((FT_REAL)f->circ.mu, pos[2], r, 0, a);
    if (f->srp_area_mass_m2_kg > 0)
        FT_FN(ft_srp)(p, pos[0], r, &q, region, a);
}

FT_API void FT_FN(ft_accel)(const pb_problem *p, FT_REAL t, const FT_REAL *r, const FT_REAL *v,
                            int region, int band, FT_REAL *a)
{
    FT_REAL pos[3][3];
    FT_FN(ft_bodies)(p, t, pos);
    FT_FN(ft_accel_at)(p, r, v, region, band, pos, a);
}

/* Circular restricted three-body problem in the rotating frame (Hairer,
 * Norsett & Wanner, Solving ODEs I, Sec. II.0, extended to 3-D). */
FT_API void FT_FN(ft_cr3bp)(const pb_problem *p, const FT_REAL *r, const FT_REAL *v, FT_REAL *a)
{
    FT_REAL mu = p->mu, mu1 = 1 - mu;
    FT_REAL x1 = r[0] + mu, x2 = r[0] - mu1, yz2 = r[1] * r[1] + r[2] * r[2];
    FT_REAL d1 = x1 * x1 + yz2, d2 = x2 * x2 + yz2;
    d1 *= FT_SQRT(d1);
    d2 *= FT_SQRT(d2);
    FT_REAL g = mu1 / d1 + mu / d2;
    a[0] = r[0] + 2 * v[1] - mu1 * x1 / d1 - mu * x2 / d2;
    a[1] = r[1] - 2 * v[0] - g * r[1];
    a[2] = -g * r[2];
}

/* The functions whose sign changes mark a jump in the force, for the
 * reference's event location, positive on the side where the state is:
 * the shadow boundaries (none, one or two; *nshadow of them), then, with
 * drag, the bounds of atmosphere row band: h - h0(band) and
 * h0(band + 1) - h (an unbounded side gives a constant 1). Returns how many. */
FT_API int FT_FN(ft_events)(const pb_problem *p, FT_REAL t, const FT_REAL *r, int band, FT_REAL *g,
                            int *nshadow)
{
    const pb_forces *f = &p->forces;
    int n = 0;
    if (f->srp_area_mass_m2_kg > 0 && f->shadow != PB_SHADOW_NONE) {
        FT_REAL sun[3], nu;
        FT_FN(ft_sun)((FT_REAL)f->epoch_days + t / (FT_REAL)86400, sun);
        n = FT_FN(ft_shadow)(f->shadow, (FT_REAL)p->body_radius, sun, r, FT_REGION_GEOMETRY, g, &nu);
    }
    *nshadow = n;
    if (f->drag) {
        FT_REAL h = FT_FN(ft_altitude)(p, r);
        if (band < 0)
            band = FT_FN(ft_band)(h);
        g[n++] = band > 0 ? h - (FT_REAL)FT_FN(ft_atmosphere)[band][0] : 1;
        g[n++] = band + 1 < FT_ATMOSPHERE_ROWS ? (FT_REAL)FT_FN(ft_atmosphere)[band + 1][0] - h : 1;
    }
    return n;
}
