/* expected_error.c - the error bound a method of a given order and kind is
 * expected to meet on a two-body orbit, shared by the method matrix test and
 * `propbench selftest`, so that a built-in method and a user's are held to
 * the same rule. */
#include <math.h>
#include "integrators/method.h"

void pb_method_expected_error(const pb_method_type *m, double e, double *steps_or_tol,
                              double *bound)
{
    if (m->flags & PB_KIND_ADAPTIVE) {
        *steps_or_tol = 1e-9;
        *bound = 1e-4;
        return;
    }
    double n = m->order <= 2 ? 1000 : 200;
    double heff = 2.0 * M_PI / n / pow(1.0 - e, 1.5);
    int p = m->order < 8 ? m->order : 8;
    *steps_or_tol = n;
    *bound = fmin(0.1, fmax(1e-10, 1e3 * pow(heff, p)));
}
