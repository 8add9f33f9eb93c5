/* j2.c - two-body plus the J2 zonal term of the body's potential (second zonal
 * harmonic, e.g. Vallado 4th ed. Sec. 8.6): the zonal-degree-2 case of the
 * force terms (force_terms_impl.h); the secular rates it causes are those of
 * Brouwer (1959) and Kozai (1959). */
#include <string.h>
#include "j2.h"
#include "force_terms.h"

void pb_problem_init_j2(pb_problem *p, const char *name, const char *description,
                        double mu, double radius, double j2,
                        const double *r0, const double *v0)
{
    pb_forces f;
    memset(&f, 0, sizeof f);
    f.zonal_degree = 2;
    f.jn[2] = j2;
    pb_problem_init_forces(p, name, description, PB_UNITS_KM_S, mu, radius, &f, r0, v0);
}
