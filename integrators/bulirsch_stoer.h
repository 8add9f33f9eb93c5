/* bulirsch_stoer.h - the Gragg-Bulirsch-Stoer method's parts shared by its
 * two files (the integrator, the dense output) and seen by its tests: the
 * step-number sequence, the dense-output construction, one extrapolated
 * step of a fixed size and row, and the rows its control accepted steps at.
 * Internal to integrators/ and tests/. */
#ifndef PB_BULIRSCH_STOER_H
#define PB_BULIRSCH_STOER_H

#include "integrators/method.h"

/* Rows of the extrapolation tableau: row j takes n_j = 4j - 2 midpoint
 * substeps (2, 6, 10, ...) and its diagonal entry T_jj has order 2j. */
#define PB_BS_KMAX 9
/* Degree bound of the dense-output polynomial: 2 KMAX + 3. */
#define PB_BS_DENSE_NCOEF (2 * PB_BS_KMAX + 4)

static inline int pb_bs_nseq(int j)
{
    return 4 * j - 2;
}

/* Where row j's midpoint-rule values f_1 .. f_(n_j - 1) start in a step's
 * store of them (in vectors): the rows below hold sum_i<j (n_i - 1). */
static inline int pb_bs_foffset(int j)
{
    return (j - 1) * (2 * j - 3);
}

/* Vectors in a step's f store for rows 1..PB_BS_KMAX. */
#define PB_BS_NFSTORE (PB_BS_KMAX * (2 * PB_BS_KMAX - 1))

extern const pb_method_type pb_method_bulirsch_stoer;

/* The dense output of a step of size H that converged at row kc: from the
 * step's ends (y0, H f0, y1, H f1), and, at the midpoint, the states zmid[j]
 * (z_(n_j/2) of row j, j = 1..kc) and the derivatives the central
 * differences of each row's f values (fstore, laid out by pb_bs_foffset)
 * give, extrapolated in h^2 over the rows, the polynomial
 * P(u) = sum_d coef[d] u^d, u = theta - 1/2, of degree 2 kc + 3 in each of
 * the n components; coef holds PB_BS_DENSE_NCOEF vectors of n. Returns the
 * degree. */
int pb_bs_dense_build(int n, int kc, double H, const double *y0, const double *f0,
                      const double *y1, const double *f1, const double *const *zmid,
                      const double *fstore, double *coef);

/* P(theta - 1/2) of pb_bs_dense_build's coef, degree deg, into y[n]. */
void pb_bs_dense_eval(int n, int deg, const double *coef, double theta, double *y);

/* From the state a started workspace ws holds (pb_method_bulirsch_stoer's
 * start), a step of size H with rows 1..k (1 <= k <= PB_BS_KMAX): its
 * diagonal entry T_kk (theta = 1) or its dense output at theta in [0, 1)
 * into y_out = (r, v); the state is not advanced, the workspace's dense cache
 * is. PB_OK, PB_EINVAL for k, H or theta out of range, or the force's
 * failure. */
int pb_bs_extrapolated_step(void *ws, double H, int k, double theta, double *y_out);

/* Since start: accepted[j], the accepted steps that converged at row j
 * (order 2j), and rejected[j], the rejected attempts whose last row built
 * was j (j = 1..PB_BS_KMAX; index 0 unused). A step up to row j costs
 * pb_bs_foffset(j + 1) evaluations, an accepted one one more. */
void pb_bs_row_counts(const void *ws, long accepted[PB_BS_KMAX + 1],
                      long rejected[PB_BS_KMAX + 1]);

#endif
