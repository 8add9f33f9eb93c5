/* truth.c - the truth the harness measures against, at its sample times:
 * the problem's exact solution evaluated in __float128, or (for problems with
 * no closed form) a reference trajectory built by reference.c. */
#include <stdlib.h>
#include <string.h>
#include "truth.h"

struct pb_truth {
    int n, dim, exact;
    long double *r, *v;   /* n x PB_DIM_MAX each */
    double *floor;        /* n; estimated position error of the truth */
};

static int truth_from_exact(const pb_problem *p, const double *times, pb_truth *tr)
{
    for (int k = 0; k < tr->n; k++) {
        __float128 rq[PB_DIM_MAX] = {0}, vq[PB_DIM_MAX] = {0};
        int s = p->exact_q(p, times[k], rq, vq);
        if (s)
            return s;
        for (int i = 0; i < PB_DIM_MAX; i++) {
            tr->r[k * PB_DIM_MAX + i] = (long double)rq[i];
            tr->v[k * PB_DIM_MAX + i] = (long double)vq[i];
        }
        tr->floor[k] = 0.0;
    }
    return PB_OK;
}

/* ---- reference branch: problems without an exact solution ---- */
#include "reference.h"
static int truth_from_reference(const pb_problem *p, const double *times,
                                const char *cache_dir, pb_truth *tr)
{
    return pb_reference_build(p, times, tr->n, cache_dir, tr->r, tr->v, tr->floor);
}
/* ---- end of reference branch ---- */

int pb_truth_build(const pb_problem *p, const double *times, int n,
                   const char *cache_dir, pb_truth **out)
{
    *out = NULL;
    if (n < 0)
        return PB_EINVAL;
    pb_truth *tr = calloc(1, sizeof *tr);
    if (!tr)
        return PB_ENOMEM;
    tr->n = n;
    tr->dim = p->dim;
    size_t m = (size_t)(n > 0 ? n : 1) * PB_DIM_MAX;
    tr->r = calloc(m, sizeof(long double));
    tr->v = calloc(m, sizeof(long double));
    tr->floor = calloc((size_t)(n > 0 ? n : 1), sizeof(double));
    int s = PB_ENOMEM;
    if (!tr->r || !tr->v || !tr->floor)
        goto fail;
    tr->exact = p->exact_q != NULL;
    s = tr->exact ? truth_from_exact(p, times, tr)
                  : truth_from_reference(p, times, cache_dir, tr);
    if (s)
        goto fail;
    *out = tr;
    return PB_OK;
fail:
    pb_truth_free(tr);
    return s;
}

void pb_truth_state(const pb_truth *tr, int k, long double *r, long double *v)
{
    memcpy(r, tr->r + (size_t)k * PB_DIM_MAX, PB_DIM_MAX * sizeof(long double));
    memcpy(v, tr->v + (size_t)k * PB_DIM_MAX, PB_DIM_MAX * sizeof(long double));
}

double pb_truth_floor(const pb_truth *tr, int k) { return tr->floor[k]; }

int pb_truth_is_exact(const pb_truth *tr) { return tr->exact; }

void pb_truth_shift(pb_truth *tr, int k, double t, double dt, const pb_problem *p)
{
    long double *r = tr->r + (size_t)k * PB_DIM_MAX, *v = tr->v + (size_t)k * PB_DIM_MAX;
    double rd[PB_DIM_MAX] = {0}, vd[PB_DIM_MAX] = {0}, a[PB_DIM_MAX] = {0};
    for (int i = 0; i < PB_DIM_MAX; i++)
        rd[i] = (double)r[i], vd[i] = (double)v[i];
    if (p->accel(p, t, rd, vd, a) != PB_OK)
        return;
    for (int i = 0; i < tr->dim && i < PB_DIM_MAX; i++) {
        r[i] += (long double)dt * (v[i] + 0.5L * (long double)dt * (long double)a[i]);
        v[i] += (long double)dt * (long double)a[i];
    }
}

void pb_truth_free(pb_truth *tr)
{
    if (!tr)
        return;
    free(tr->r);
    free(tr->v);
    free(tr->floor);
    free(tr);
}
