/* suites.c - the built-in sweep suites, and the default every case spec
 * starts from.
 * quick: every method on two problems at two resolutions (CI, < 60 s);
 * standard: every method on every built-in problem at three resolutions
 * (one where the method is exact: see suite_add_problem). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "bench/study/suites.h"
#include "problems/catalogue.h"

int pb_case_list_add(pb_case_list *list, const pb_case_spec *spec)
{
    if (list->n == list->cap) {
        int nc = list->cap ? 2 * list->cap : 64;
        pb_case_spec *c = realloc(list->cases, (size_t)nc * sizeof *c);
        if (!c)
            return -1;
        list->cases = c;
        list->cap = nc;
    }
    list->cases[list->n++] = *spec;
    return 0;
}

void pb_case_list_free(pb_case_list *list)
{
    free(list->cases);
    list->cases = NULL;
    list->n = list->cap = 0;
}

/* How the standard suite tailors a problem's fixed steps to a method.
 * steps_anomaly (NULL: no tailoring) are the three steps an orbit of a
 * method whose steps fall equally in eccentric anomaly: the same whatever
 * the eccentricity, since a sharper periapsis needs no more of them. A
 * method that steps in a regularizing variable (PB_KIND_REGULARIZED) takes
 * all three: at the periapsis ladder's 50,000 to 200,000 an orbit on
 * kepler-e0.99 such methods sat at round-off, at 100 to 400 they show
 * their orders (at 50, leapfrog-tt's error passed a tenth of the orbit and
 * gauss-jackson8-s diverged there and on heo-moon). A method whose map is
 * the problem's exact flow (pb_method_exact_on) runs once, at the first:
 * its error is round-off whatever the step, so finer steps would cost more
 * and show no order, and the periapsis ladder's coarsest step (50,000 an
 * orbit on kepler-e0.99) would spend 500 times the evaluations for it. */
typedef struct suite_tailoring {
    const int *steps_anomaly;
} suite_tailoring;

/* Add every compatible method on problem p at the given resolutions, timed
 * for repeats and at least timing_min_cpu_s (0: the default), tailored by
 * tl (NULL: the same steps for every fixed-step method). */
static int suite_add_problem(pb_case_list *list, const pb_problem *p, const int *steps, int nsteps,
                             const double *tols, int ntols, double orbits, int repeats,
                             double timing_min_cpu_s, const suite_tailoring *tl)
{
    for (const pb_method_type *const *t = pb_method_table; *t; t++) {
        const pb_method_type *m = *t;
        if (!pb_method_fits(m, p))
            continue;
        int fixed = (m->flags & PB_KIND_FIXED) != 0;
        const int *anomaly = tl ? tl->steps_anomaly : NULL;
        int exact = anomaly && pb_method_exact_on(m, p);
        int nv = fixed ? (exact ? 1 : nsteps) : ntols;
        const int *msteps = anomaly && (exact || (m->flags & PB_KIND_REGULARIZED)) ? anomaly : steps;
        for (int j = 0; j < nv; j++) {
            pb_case_spec s;
            pb_case_spec_default(&s);
            s.problem = *p;
            s.method = m;
            if (fixed)
                s.steps_per_orbit = msteps[j];
            else
                s.tolerance = tols[j];
            if (p->period > 0 && (orbits > 0 || p->default_orbits > 0))
                s.orbits = orbits > 0 ? orbits : p->default_orbits;
            else
                s.horizon_s = p->default_horizon_s;
            s.repeats = repeats;
            s.timing_min_cpu_s = timing_min_cpu_s;
            s.linear_samples = PB_SWEEP_LINEAR_SAMPLES;
            if (pb_case_list_add(list, &s))
                return -1;
        }
    }
    return 0;
}

static int suite_quick(pb_case_list *list)
{
    static const int steps_kepler[] = {200, 400}, steps_leo[] = {100, 200};
    static const double tols[] = {1e-8, 1e-10};
    pb_problem p;
    if (pb_problem_lookup("kepler-e0.6", &p) ||
        suite_add_problem(list, &p, steps_kepler, 2, tols, 2, 100, 1, 0, NULL))
        return -1;
    if (pb_problem_lookup("leo-near-circular", &p) ||
        suite_add_problem(list, &p, steps_leo, 2, tols, 2, 16, 1, 0, NULL))
        return -1;
    return 0;
}

#define SUITE_MAX_STEPS 1e5   /* standard suite: steps of the finest fixed step over the horizon */
#define SUITE_STEPS_CIRCULAR 50 /* standard suite: the coarsest fixed step, in steps an orbit, at e = 0 */
#define SUITE_STEPS_ANOMALY 100 /* ... and of the methods that step by eccentric anomaly (suite_tailoring) */
#define SUITE_MIN_ORBITS 3.0  /* ... but never fewer orbits than this: three periapsis passes */
/* The standard suite's timing pass: at least its 3 repeats and this much CPU
 * time a case (a run's default is 0.2 s; select's answers take 0.002 s). Its
 * 1836 cases at 0.2 s were over 6 minutes of CPU; fewer repeats let one
 * disturbed repeat move a case's median more. */
#define SUITE_TIMING_MIN_CPU_S 0.02

static int suite_standard(pb_case_list *list)
{
    static const double tols[] = {1e-6, 1e-9, 1e-12};
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++) {
        pb_problem p;
        if (e->make(&p))
            return -1;
        /* eccentric orbits need more steps per period for fixed-step methods */
        double ecc = 0;
        if (p.keplerian && p.period > 0) {
            double r0 = sqrt(p.r0[0] * p.r0[0] + p.r0[1] * p.r0[1] + p.r0[2] * p.r0[2]);
            double v2 = p.v0[0] * p.v0[0] + p.v0[1] * p.v0[1] + p.v0[2] * p.v0[2];
            double a = 1.0 / (2.0 / r0 - v2 / p.mu);
            ecc = fabs(1.0 - r0 / a); /* exact at periapsis or apoapsis starts */
        }
        /* the step must resolve periapsis, where the local time scale is
         * (1 - e)^1.5 of the period: 50 steps per such time, rounded up to
         * 1, 2 or 5 times a power of ten */
        double want = SUITE_STEPS_CIRCULAR * pow(fmax(1.0 - ecc, 1e-3), -1.5);
        double dec = pow(10.0, floor(log10(want)));
        int base = (int)(want <= dec ? dec : want <= 2 * dec ? 2 * dec : want <= 5 * dec ? 5 * dec : 10 * dec);
        /* without a Kepler orbit there is no periapsis scale to size the step
         * by (the CR3BP's close passes by the small body): a fine fixed step */
        if (!p.keplerian && p.period > 0)
            base = 2000;
        int steps[3] = {base, 2 * base, 4 * base};
        double orbits = p.period > 0 ? fmin(p.default_orbits > 0 ? p.default_orbits : 100, 100) : 0;
        /* the horizon spends at most SUITE_MAX_STEPS of the finest fixed step,
         * where the suite's time went, but no fewer than SUITE_MIN_ORBITS:
         * kepler-e0.9 (2,000 to 8,000 steps an orbit) runs 12 orbits,
         * molniya-like and gto-transfer (500 to 2,000) 50, and kepler-e0.99
         * (50,000 to 200,000) 3, so 600,000; every other problem keeps its
         * horizon (at most 100,000 such steps) */
        if (orbits > 0 && 4.0 * base * orbits > SUITE_MAX_STEPS)
            orbits = fmax(floor(SUITE_MAX_STEPS / (4.0 * base)), SUITE_MIN_ORBITS);
        int steps_anomaly[3] = {SUITE_STEPS_ANOMALY, 2 * SUITE_STEPS_ANOMALY, 4 * SUITE_STEPS_ANOMALY};
        suite_tailoring tl = {p.keplerian ? steps_anomaly : NULL};
        if (suite_add_problem(list, &p, steps, 3, tols, 3, orbits, 3, SUITE_TIMING_MIN_CPU_S, &tl))
            return -1;
    }
    return 0;
}

typedef struct { const char *name; int (*expand)(pb_case_list *); const char *what; } suite_entry;

static const suite_entry suite_table[] = {
    {"quick", suite_quick, "every method on kepler-e0.6 (100 orbits) and leo-near-circular (16 orbits), "
                           "2 resolutions each; for CI, under a minute on 2 cores"},
    {"standard", suite_standard, "every method on every built-in problem, 3 resolutions, "
                                 "steps scaled to resolve periapsis, horizon up to 100 orbits (3 for kepler-e0.99, 12 for "
                                 "kepler-e0.9, 50 for molniya-like and gto-transfer), regularized methods at 100 to 400 "
                                 "steps an orbit, the Kepler-flow splitting maps once at 100 on pure "
                                 "two-body problems (exact there), "
                                 "timing pass 0.02 s a case"},
    {NULL, NULL, NULL}
};

int pb_suite_expand(const char *name, pb_case_list *list)
{
    for (const suite_entry *s = suite_table; s->name; s++)
        if (!strcmp(s->name, name))
            return s->expand(list);
    return -1;
}

void pb_suites_print(FILE *f)
{
    fprintf(f, "%-10s %s\n", "suite", "contents");
    for (const suite_entry *s = suite_table; s->name; s++) {
        pb_case_list l = {0, 0, NULL};
        int n = s->expand(&l) ? -1 : l.n;
        pb_case_list_free(&l);
        fprintf(f, "%-10s %4d cases: %s\n", s->name, n, s->what);
    }
}
