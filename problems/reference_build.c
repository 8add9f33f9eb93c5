/* reference_build.c - a problem's reference trajectory as the harness
 * asks for it: read from the cache by its key, else propagated at two
 * tolerances (reference.c) whose difference is the floor reported, the
 * coarse one on a second thread, and written to the cache. */
#include <pthread.h>
#include <quadmath.h>
#include <stdlib.h>
#include "problems/reference.h"
#include "problems/reference_cache.h"
#include "problems/hash.h"
#include "problems/force_terms.h"

/* Per-step tolerances of the two builds, relative to |r| and |v|. The
 * states are kept as long double (a 64-bit mantissa, 5e-20 relative), so
 * the fine build need not go below 1e-26 a step (1e-23 after a thousand
 * steps); the coarse one sets the floor reported, their difference, which
 * is never claimed below 1e-18 |r| (6.8e-15 km in LEO) */
#define REF_TOL_COARSE 1e-24L
#define REF_TOL_FINE 1e-26L
#define REF_VERSION "pb-reference gbs20 float128 v7 sampled dips"

uint64_t pb_reference_key(const pb_problem *p, const double *times, int n)
{
    uint64_t h = PB_FNV1A64_INIT;
    int force = (int)p->force;
    /* as doubles: a long double's padding bytes are indeterminate */
    double tols[2] = {(double)REF_TOL_COARSE, (double)REF_TOL_FINE};
    h = pb_fnv1a64(h, REF_VERSION, sizeof REF_VERSION);
    h = pb_fnv1a64(h, tols, sizeof tols);
    h = pb_fnv1a64(h, &force, sizeof force);
    h = pb_fnv1a64(h, &p->dim, sizeof p->dim);
    h = pb_fnv1a64(h, &p->mu, sizeof p->mu);
    h = pb_fnv1a64(h, &p->body_radius, sizeof p->body_radius);
    h = pb_forces_hash(h, &p->forces);
    h = pb_fnv1a64(h, &p->t0, sizeof p->t0);
    h = pb_fnv1a64(h, p->r0, sizeof p->r0);
    h = pb_fnv1a64(h, p->v0, sizeof p->v0);
    h = pb_fnv1a64(h, &n, sizeof n);
    if (n > 0)
        h = pb_fnv1a64(h, times, (size_t)n * sizeof *times);
    return h;
}

/* One of the two builds (coarse or fine), as a thread's job. */
typedef struct ref_job {
    const pb_problem *p;
    const double *times;
    int n;
    long double tol, *r, *v;
    int status;
} ref_job;

static void *ref_job_run(void *arg)
{
    ref_job *j = arg;
    j->status = pb_reference_propagate(j->p, j->times, j->n, j->tol, j->r, j->v, NULL);
    return NULL;
}

/* pb_reference_build past the cache: both builds, the floor, the entry. */
static int ref_build_now(const pb_problem *p, const double *times, int n, const char *cache_dir,
                         uint64_t key, long double *r, long double *v, double *floor)
{
    size_t m = (size_t)(n > 0 ? n : 1) * PB_DIM_MAX;
    long double *rc = malloc(2 * m * sizeof *rc);
    if (!rc)
        return PB_ENOMEM;
    long double *vc = rc + m;
    /* the two builds are independent: the coarse one runs on a second
     * thread where one can be had, so the wait is the fine build's alone */
    ref_job coarse = {p, times, n, REF_TOL_COARSE, rc, vc, PB_OK};
    pthread_t th;
    int threaded = pthread_create(&th, NULL, ref_job_run, &coarse) == 0;
    if (!threaded)
        ref_job_run(&coarse);
    int s = pb_reference_propagate(p, times, n, REF_TOL_FINE, r, v, NULL);
    if (threaded)
        pthread_join(th, NULL);
    if (!s)
        s = coarse.status;
    if (!s) {
        for (int k = 0; k < n; k++) {
            long double d2 = 0, r2 = 0;
            for (int i = 0; i < PB_DIM_MAX; i++) {
                long double d = rc[(size_t)k * PB_DIM_MAX + i] - r[(size_t)k * PB_DIM_MAX + i];
                d2 += d * d;
                r2 += r[(size_t)k * PB_DIM_MAX + i] * r[(size_t)k * PB_DIM_MAX + i];
            }
            /* The coarse-fine difference bounds the fine run's error; never
             * claim better than a few units of long-double round-off. */
            double fl = (double)sqrtq(d2), ro = 1e-18 * (double)sqrtq(r2);
            floor[k] = fl > ro ? fl : ro;
        }
        pb_ref_cache_write(cache_dir, key, n, r, v, floor);
    }
    free(rc);
    return s;
}

int pb_reference_build(const pb_problem *p, const double *times, int n,
                       const char *cache_dir, long double *r, long double *v,
                       double *floor)
{
    /* a force with no __float128 form is refused before the cache is read:
     * the key cannot tell two force functions apart */
    if (!p || n < 0 || (n > 0 && (!times || !r || !v || !floor)) || !pb_forces_have_quad(p))
        return PB_EINVAL;
    uint64_t key = pb_reference_key(p, times, n);
    if (pb_ref_cache_read(cache_dir, key, n, r, v, floor))
        return PB_OK;
    /* one build per entry: another process may be building it now */
    int lock = pb_ref_cache_lock(cache_dir, key);
    if (lock >= 0 && pb_ref_cache_read(cache_dir, key, n, r, v, floor)) {
        pb_ref_cache_unlock(lock);
        return PB_OK;
    }
    int s = ref_build_now(p, times, n, cache_dir, key, r, v, floor);
    pb_ref_cache_unlock(lock);
    return s;
}
