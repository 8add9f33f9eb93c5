/* truth.c - the truth the harness measures against, at its sample times:
 * the problem's exact solution evaluated in __float128, or (for problems with
 * no closed form) a reference trajectory built by reference.c; and the memo
 * of exact truths a process keeps (see truth_memo_find). */
#include <pthread.h>
#include <stdlib.h>
#include <string.h>
#include "forces.h"
#include "hash.h"
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

static pb_truth *truth_alloc(int n, int dim)
{
    pb_truth *tr = calloc(1, sizeof *tr);
    if (!tr)
        return NULL;
    tr->n = n;
    tr->dim = dim;
    size_t m = (size_t)(n > 0 ? n : 1) * PB_DIM_MAX;
    tr->r = calloc(m, sizeof(long double));
    tr->v = calloc(m, sizeof(long double));
    tr->floor = calloc((size_t)(n > 0 ? n : 1), sizeof(double));
    if (!tr->r || !tr->v || !tr->floor) {
        pb_truth_free(tr);
        return NULL;
    }
    return tr;
}

static pb_truth *truth_copy(const pb_truth *a)
{
    pb_truth *tr = truth_alloc(a->n, a->dim);
    if (!tr)
        return NULL;
    size_t m = (size_t)(a->n > 0 ? a->n : 1);
    tr->exact = a->exact;
    memcpy(tr->r, a->r, m * PB_DIM_MAX * sizeof(long double));
    memcpy(tr->v, a->v, m * PB_DIM_MAX * sizeof(long double));
    memcpy(tr->floor, a->floor, m * sizeof(double));
    return tr;
}

/* ---- the memo of exact truths ----
 * A sweep's cases on one problem share their sample times (they do not
 * depend on the method or the step), and the exact solution at ~100 times
 * in __float128 was a third of a short case's CPU time. So a process keeps
 * the exact truths it built, keyed by what they depend on: the problem's
 * exact solution, its constants and initial state, its forces (by their
 * 64-bit hash, as the reference cache keys them) and the times, compared
 * in full. The sweep's parent builds each problem's before it forks its
 * workers (pb_case_truth_warm: pb_truth_build on the plan a case will
 * make), which then find it. References are not kept: they come from the
 * reference cache, and a parent building them would build them one after
 * another instead of in its workers side by side. */
#define TRUTH_MEMO_MAX 64

typedef struct truth_key {
    int (*exact_q)(const pb_problem *, double, __float128 *, __float128 *);
    int dim, units;
    double mu, t0, r0[PB_DIM_MAX], v0[PB_DIM_MAX];
    uint64_t forces;
} truth_key;

typedef struct truth_memo_entry {
    truth_key key;
    int n;
    double *times;
    pb_truth *tr;
} truth_memo_entry;

static truth_memo_entry truth_memo[TRUTH_MEMO_MAX];
static int truth_memo_next; /* the entry the next one replaces */
static long truth_memo_hits, truth_memo_misses;
static pthread_mutex_t truth_memo_lock = PTHREAD_MUTEX_INITIALIZER;

static void truth_key_of(const pb_problem *p, truth_key *k)
{
    memset(k, 0, sizeof *k); /* padding too: keys are compared with memcmp */
    k->exact_q = p->exact_q;
    k->dim = p->dim;
    k->units = (int)p->units;
    k->mu = p->mu;
    k->t0 = p->t0;
    for (int i = 0; i < PB_DIM_MAX; i++)
        k->r0[i] = p->r0[i], k->v0[i] = p->v0[i];
    k->forces = pb_forces_hash(PB_FNV1A64_INIT, &p->forces);
}

/* A copy of the memo's truth for p at times, or NULL. */
static pb_truth *truth_memo_find(const pb_problem *p, const double *times, int n)
{
    truth_key k;
    truth_key_of(p, &k);
    pb_truth *got = NULL;
    pthread_mutex_lock(&truth_memo_lock);
    for (int i = 0; i < TRUTH_MEMO_MAX && !got; i++) {
        const truth_memo_entry *e = &truth_memo[i];
        if (e->tr && e->n == n && !memcmp(&e->key, &k, sizeof k) &&
            (n == 0 || !memcmp(e->times, times, (size_t)n * sizeof *times)))
            got = truth_copy(e->tr);
    }
    if (got)
        truth_memo_hits++;
    else
        truth_memo_misses++;
    pthread_mutex_unlock(&truth_memo_lock);
    return got;
}

void pb_truth_memo_counts(long *hits, long *misses)
{
    pthread_mutex_lock(&truth_memo_lock);
    *hits = truth_memo_hits;
    *misses = truth_memo_misses;
    pthread_mutex_unlock(&truth_memo_lock);
}

/* Keep a copy of tr, built for p at times (nothing kept when memory is short). */
static void truth_memo_keep(const pb_problem *p, const double *times, int n, const pb_truth *tr)
{
    truth_memo_entry e;
    truth_key_of(p, &e.key);
    e.n = n;
    e.times = malloc((size_t)(n > 0 ? n : 1) * sizeof *times);
    e.tr = truth_copy(tr);
    if (!e.times || !e.tr) {
        free(e.times);
        pb_truth_free(e.tr);
        return;
    }
    if (n > 0)
        memcpy(e.times, times, (size_t)n * sizeof *times);
    pthread_mutex_lock(&truth_memo_lock);
    truth_memo_entry *old = &truth_memo[truth_memo_next];
    free(old->times);
    pb_truth_free(old->tr);
    *old = e;
    truth_memo_next = (truth_memo_next + 1) % TRUTH_MEMO_MAX;
    pthread_mutex_unlock(&truth_memo_lock);
}
/* ---- end of the memo ---- */

int pb_truth_build(const pb_problem *p, const double *times, int n,
                   const char *cache_dir, pb_truth **out)
{
    *out = NULL;
    if (n < 0)
        return PB_EINVAL;
    int exact = p->exact_q != NULL;
    if (exact && (*out = truth_memo_find(p, times, n)))
        return PB_OK;
    pb_truth *tr = truth_alloc(n, p->dim);
    if (!tr)
        return PB_ENOMEM;
    tr->exact = exact;
    int s = exact ? truth_from_exact(p, times, tr) : truth_from_reference(p, times, cache_dir, tr);
    if (s) {
        pb_truth_free(tr);
        return s;
    }
    if (exact)
        truth_memo_keep(p, times, n, tr);
    *out = tr;
    return PB_OK;
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
