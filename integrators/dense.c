/* dense.c - Hermite dense output from the ends of a step (see
 * propbench/dense.h). The basis polynomials are the standard Hermite ones on
 * [0, 1] (values, first and second derivatives at both ends); exact for
 * polynomials of degree 5 (quintic) or 3 (cubic), which tests/test_dense.c
 * checks. */
#include <math.h>
#include <string.h>
#include "propbench/dense.h"

static void dense_copy(double *dst, const double *src, int dim)
{
    for (int i = 0; i < dim; i++)
        dst[i] = src[i];
}

void pb_dense_start(pb_dense_span *s, int dim, double t, const double *r, const double *v,
                    const double *a)
{
    memset(s, 0, sizeof *s);
    s->dim = dim < 1 ? 1 : dim > PB_DENSE_DIM_MAX ? PB_DENSE_DIM_MAX : dim;
    s->points = 1;
    s->end = 1;
    s->t[1] = t;
    dense_copy(s->r[1], r, s->dim);
    dense_copy(s->v[1], v, s->dim);
    if (a)
        dense_copy(s->a[1], a, s->dim);
    s->has_a[1] = a != NULL;
}

void pb_dense_push(pb_dense_span *s, double t, const double *r, const double *v,
                   const double *a)
{
    int d = s->dim, e = 1 - s->end;
    s->t[e] = t;
    dense_copy(s->r[e], r, d);
    dense_copy(s->v[e], v, d);
    if (a)
        dense_copy(s->a[e], a, d);
    s->has_a[e] = a != NULL;
    s->end = e;
    s->points = 2;
}

void pb_dense_set_a(pb_dense_span *s, const double *a)
{
    dense_copy(s->a[s->end], a, s->dim);
    s->has_a[s->end] = 1;
}

int pb_dense_eval(const pb_dense_span *s, double t, double *r, double *v)
{
    int d = s->dim, b = s->end, a0 = 1 - b, at = -1;
    if (s->points < 1)
        return PB_EINVAL;
    if (t == s->t[b])
        at = b;
    else if (s->points == 2 && t == s->t[a0])
        at = a0;
    if (at >= 0) {
        dense_copy(r, s->r[at], d);
        dense_copy(v, s->v[at], d);
        return PB_OK;
    }
    if (s->points < 2 || !(t > s->t[a0] && t < s->t[b]))
        return PB_EINVAL;
    double h = s->t[b] - s->t[a0], x = (t - s->t[a0]) / h;
    double x2 = x * x, x3 = x2 * x, x4 = x3 * x, x5 = x4 * x;
    if (s->has_a[a0] && s->has_a[b]) {
        /* values H, derivatives D: r0, h v0, h^2 a0, r1, h v1, h^2 a1 */
        double H[6] = {1 - 10 * x3 + 15 * x4 - 6 * x5, x - 6 * x3 + 8 * x4 - 3 * x5,
                       0.5 * (x2 - 3 * x3 + 3 * x4 - x5), 10 * x3 - 15 * x4 + 6 * x5,
                       -4 * x3 + 7 * x4 - 3 * x5, 0.5 * (x3 - 2 * x4 + x5)};
        double D[6] = {-30 * x2 + 60 * x3 - 30 * x4, 1 - 18 * x2 + 32 * x3 - 15 * x4,
                       0.5 * (2 * x - 9 * x2 + 12 * x3 - 5 * x4), 30 * x2 - 60 * x3 + 30 * x4,
                       -12 * x2 + 28 * x3 - 15 * x4, 0.5 * (3 * x2 - 8 * x3 + 5 * x4)};
        for (int i = 0; i < d; i++) {
            double c[6] = {s->r[a0][i], h * s->v[a0][i], h * h * s->a[a0][i],
                           s->r[b][i], h * s->v[b][i], h * h * s->a[b][i]};
            double pr = 0, pv = 0;
            for (int k = 0; k < 6; k++) {
                pr += H[k] * c[k];
                pv += D[k] * c[k];
            }
            r[i] = pr;
            v[i] = pv / h;
        }
    } else {
        double H[4] = {2 * x3 - 3 * x2 + 1, x3 - 2 * x2 + x, -2 * x3 + 3 * x2, x3 - x2};
        double D[4] = {6 * x2 - 6 * x, 3 * x2 - 4 * x + 1, -6 * x2 + 6 * x, 3 * x2 - 2 * x};
        for (int i = 0; i < d; i++) {
            double c[4] = {s->r[a0][i], h * s->v[a0][i], s->r[b][i], h * s->v[b][i]};
            double pr = 0, pv = 0;
            for (int k = 0; k < 4; k++) {
                pr += H[k] * c[k];
                pv += D[k] * c[k];
            }
            r[i] = pr;
            v[i] = pv / h;
        }
    }
    for (int i = 0; i < d; i++)
        if (!isfinite(r[i]) || !isfinite(v[i]))
            return PB_ENONFINITE;
    return PB_OK;
}
