/* adaptive_tolerance.c - the absolute tolerances of our adaptive methods
 * (rkf45, dop853, rkn12, bulirsch-stoer). The error test is sc_i = atol_i +
 * rtol * max(|y_i|, |ynew_i|) (Hairer, Norsett & Wanner I, II.4). With
 * cfg->atol == 0 a purely relative test would divide by zero on a component
 * that is zero (z of a planar orbit), so atol_i becomes rtol times the
 * initial size of its own vector: |r0| for positions, |v0| for velocities (1
 * if that size is 0). This keeps the test unit-independent. */
#include <math.h>
#include "integrators/adaptive_tolerance.h"

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
