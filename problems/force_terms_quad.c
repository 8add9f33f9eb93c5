/* force_terms_quad.c - the force terms of forces.h in __float128 for the
 * reference trajectory: the same source as the methods' double force
 * (force_terms_impl.h), so the truth integrates the very model under test. */
#include <quadmath.h>
#include "forces.h"
#include "force_terms.h"
#include "cr3bp.h"

#define FT_REAL __float128
#define FT_SUF _q
#define FT_SQRT sqrtq
#define FT_EXP expq
#define FT_SIN sinq
#define FT_COS cosq
#define FT_ASIN asinq
#define FT_ACOS acosq
#define FT_FABS fabsq
#define FT_PI M_PIq
#include "force_terms_impl.h"

int pb_forces_have_quad(const pb_problem *p)
{
    return p->accel == pb_forces_accel || p->accel == pb_cr3bp_accel ||
           p->accel == pb_twobody_accel;
}

int pb_forces_deriv_q(const pb_problem *p, __float128 t, const __float128 *y, __float128 *dy)
{
    if (!pb_forces_have_quad(p))
        return PB_EINVAL;
    dy[0] = y[3];
    dy[1] = y[4];
    dy[2] = y[5];
    if (p->accel == pb_cr3bp_accel)
        ft_cr3bp_q(p, y, y + 3, dy + 3);
    else
        ft_accel_q(p, t, y, y + 3, dy + 3);
    return PB_OK;
}

int pb_forces_events_q(const pb_problem *p, __float128 t, const __float128 *r, __float128 *g)
{
    return ft_shadow_events_q(p, t, r, g);
}
