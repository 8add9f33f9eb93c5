/* bulirsch_stoer_dense.c - dense output of the Gragg-Bulirsch-Stoer method:
 * derivatives at the step's midpoint from central differences of the
 * midpoint rule's f values, extrapolated like the step itself, and a
 * polynomial through them and the step's ends (Hairer & Ostermann (1990),
 * Numer. Math. 58, 419; Hairer, Norsett & Wanner, Solving ODEs I, Sec. II.9). */
#include <math.h>
#include "integrators/bulirsch_stoer.h"

/* Why it works. Row j's midpoint rule puts its point m_j = n_j / 2 = 2j - 1
 * at the step's midpoint for every row, and m_j is odd for every row of the
 * sequence 4j - 2: Gragg's expansion z_m = y + sum h^2i (a_i + (-1)^m b_i)
 * then has one sign for all rows, so z_(m_j) and any central difference of
 * the f values with spacing 2h (points m_j +- l, m_j +- (l - 2), ..., one
 * parity again) extrapolate in h^2 like the step's end (HNW II.9; the
 * sequence 2, 4, 6, ... alternates the parity and would not). Row j has
 * f_1 .. f_(n_j - 1), so differences up to l = m_j - 1 = 2j - 2, i.e. the
 * derivatives y^(d), d = l + 1 <= 2j - 1. Derivative d is extrapolated over
 * the rows that have it, ceil((d+1)/2) .. kc; H^d y^(d) is then accurate to
 * O(H^(2 kc)) for all d <= 2 kc - 1 (h^2 per row eliminated, times H^d).
 * The polynomial in u = theta - 1/2 takes them as its Taylor part and adds
 * u^(2 kc) B(u), B cubic, to meet y and H f at both ends: degree 2 kc + 3,
 * no evaluation beyond the step's own. */

#define BSD_NMAX (2 * PB_STATE_DIM_MAX)

/* l choose i, exact in double for l <= 2 KMAX - 2 */
static double bsd_binom(int l, int i)
{
    double c = 1;
    for (int q = 1; q <= i; q++)
        c = c * (l - i + q) / q;
    return c;
}

/* Row j's approximation of H^d y^(d) at the midpoint into a[n]. */
static void bsd_row_derivative(int n, int j, int d, double H, const double *zmid,
                               const double *fstore, double *a)
{
    if (d == 0) {
        for (int i = 0; i < n; i++)
            a[i] = zmid[i];
        return;
    }
    int l = d - 1, m = pb_bs_nseq(j) / 2;
    const double *fr = fstore + (size_t)pb_bs_foffset(j) * (size_t)n;
    double scale = H * pow(0.5 * pb_bs_nseq(j), l);
    for (int i = 0; i < n; i++)
        a[i] = 0;
    for (int q = 0; q <= l; q++) {
        double c = (q % 2 ? -1.0 : 1.0) * bsd_binom(l, q);
        const double *fq = fr + (size_t)(m + l - 2 * q - 1) * (size_t)n; /* f_(m+l-2q) */
        for (int i = 0; i < n; i++)
            a[i] += c * fq[i];
    }
    for (int i = 0; i < n; i++)
        a[i] *= scale;
}

/* coef[D+1..D+4]: the cubic B of u^(D+1) B(u) that makes the polynomial meet
 * y and H f at u = -1/2 (y0, hf0) and u = +1/2 (y1, hf1); coef[0..D] set. */
static void bsd_match_ends(int n, int D, const double *y0, const double *hf0, const double *y1,
                           const double *hf1, double *coef)
{
    const double sg = 0.5;
    for (int i = 0; i < n; i++) {
        double Bv[2], Bd[2];
        for (int e = 0; e < 2; e++) {
            double s = e ? sg : -sg, p = 0, dp = 0;
            for (int d = D; d >= 0; d--) {
                dp = dp * s + p;
                p = p * s + coef[(size_t)d * (size_t)n + (size_t)i];
            }
            double sD = pow(s, D), sD1 = sD * s;
            double r = (e ? y1[i] : y0[i]) - p, rd = (e ? hf1[i] : hf0[i]) - dp;
            Bv[e] = r / sD1;
            Bd[e] = (rd - (D + 1) * sD * Bv[e]) / sD1;
        }
        /* the cubic through B(+-sg), B'(+-sg), by its even and odd parts */
        double E = 0.5 * (Bv[1] + Bv[0]), O = 0.5 * (Bv[1] - Bv[0]);
        double DE = 0.5 * (Bd[1] + Bd[0]), DO = 0.5 * (Bd[1] - Bd[0]);
        double g = DO / (2 * sg), al = E - g * sg * sg;
        double de = (DE - O / sg) / (2 * sg * sg), be = O / sg - de * sg * sg;
        double c[4] = {al, be, g, de};
        for (int q = 0; q < 4; q++)
            coef[(size_t)(D + 1 + q) * (size_t)n + (size_t)i] = c[q];
    }
}

int pb_bs_dense_build(int n, int kc, double H, const double *y0, const double *f0,
                      const double *y1, const double *f1, const double *const *zmid,
                      const double *fstore, double *coef)
{
    int D = 2 * kc - 1;
    double t[PB_BS_KMAX + 1][BSD_NMAX], fact = 1;
    for (int d = 0; d <= D; d++) {
        int jd = (d + 2) / 2; /* the first row with derivative d */
        for (int j = jd; j <= kc; j++)
            bsd_row_derivative(n, j, d, H, zmid[j], fstore, t[j]);
        /* Aitken-Neville in h^2 over rows jd..kc, as the step's tableau */
        for (int s = 1; s <= kc - jd; s++)
            for (int j = kc; j >= jd + s; j--) {
                double r = (double)pb_bs_nseq(j) / pb_bs_nseq(j - s), den = r * r - 1.0;
                for (int i = 0; i < n; i++)
                    t[j][i] += (t[j][i] - t[j - 1][i]) / den;
            }
        if (d > 1)
            fact *= d;
        for (int i = 0; i < n; i++)
            coef[(size_t)d * (size_t)n + (size_t)i] = t[kc][i] / fact;
    }
    double hf0[BSD_NMAX], hf1[BSD_NMAX];
    for (int i = 0; i < n; i++) {
        hf0[i] = H * f0[i];
        hf1[i] = H * f1[i];
    }
    bsd_match_ends(n, D, y0, hf0, y1, hf1, coef);
    return D + 4;
}

void pb_bs_dense_eval(int n, int deg, const double *coef, double theta, double *y)
{
    double u = theta - 0.5;
    for (int i = 0; i < n; i++) {
        double p = 0;
        for (int d = deg; d >= 0; d--)
            p = p * u + coef[(size_t)d * (size_t)n + (size_t)i];
        y[i] = p;
    }
}
