/* adaptive_setup.c - the absolute tolerances and the automatic first step of
 * our adaptive methods (rkf45, dop853, rkn12, bulirsch-stoer; dop853 keeps
 * its own first step, HNW's DOP853 variant). The error test is sc_i = atol_i +
 * rtol * max(|y_i|, |ynew_i|) (Hairer, Norsett & Wanner I, II.4). With
 * cfg->atol == 0 a purely relative test would divide by zero on a component
 * that is zero (z of a planar orbit), so atol_i becomes rtol times the
 * initial size of its own vector: |r0| for positions, |v0| for velocities (1
 * if that size is 0). This keeps the test unit-independent. */
#include <math.h>
#include "integrators/adaptive_setup.h"

static double tol_norm(const double *x, int d)
{
    double s = 0;
    for (int i = 0; i < d; i++)
        s += x[i] * x[i];
    return sqrt(s);
}

int pb_adaptive_tolerances(const pb_method_config *c, int dim, const double *r0,
                           const double *v0, double *atol)
{
    if (!(c->atol >= 0) || !(c->rtol >= 0) || !(c->atol > 0 || c->rtol > 0) ||
        !isfinite(c->atol) || !isfinite(c->rtol))
        return PB_EINVAL;
    double sr = tol_norm(r0, dim), sv = tol_norm(v0, dim);
    for (int i = 0; i < dim; i++) {
        atol[i] = c->atol > 0 ? c->atol : c->rtol * (sr > 0 ? sr : 1.0);
        atol[dim + i] = c->atol > 0 ? c->atol : c->rtol * (sv > 0 ? sv : 1.0);
    }
    return PB_OK;
}

double pb_first_step_trial(double d0, double d1, double scale)
{
    return (d0 < 1e-5 || d1 < 1e-5) ? 1e-6 * scale : 0.01 * d0 / d1;
}

double pb_first_step(double h0, double d1, double d2, double k, double scale)
{
    double dm = fmax(d1, d2);
    double h1 = dm <= 1e-15 ? fmax(1e-6 * scale, h0 * 1e-3) : pow(0.01 / dm, 1.0 / k);
    return fmin(100.0 * h0, h1);
}
