/* test_suites.c - the standard suite's contents (issue 16 item 4): it keeps
 * every built-in problem and every method that fits each, at three settings,
 * and caps only the horizon of the problem whose finest fixed step would
 * spend more than 2e6 steps over it (kepler-e0.99: 10 orbits, not 100). */
#include <criterion/criterion.h>
#include <string.h>
#include "bench/study/suites.h"
#include "problems/catalogue.h"

/* Orbits of the standard suite's cases on the named problem (all alike),
 * and how many cases it has there; -1 orbits when they differ. */
static double std_orbits(const pb_case_list *l, const char *problem, int *ncases)
{
    double orbits = -2;
    *ncases = 0;
    for (int i = 0; i < l->n; i++) {
        if (strcmp(l->cases[i].problem.name, problem))
            continue;
        (*ncases)++;
        if (orbits == -2)
            orbits = l->cases[i].orbits;
        else if (orbits != l->cases[i].orbits)
            orbits = -1;
    }
    return orbits;
}

Test(suites, standard_keeps_every_problem_and_method)
{
    pb_case_list l = {0, 0, NULL};
    cr_assert_eq(pb_suite_expand("standard", &l), 0);
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++) {
        pb_problem p;
        cr_assert_eq(e->make(&p), 0);
        int fit = 0, n;
        for (const pb_method_type *const *m = pb_method_table; *m; m++)
            fit += pb_method_fits(*m, &p);
        std_orbits(&l, p.name, &n);
        cr_assert_eq(n, 3 * fit, "%s: %d cases for %d methods", p.name, n, fit);
    }
    pb_case_list_free(&l);
}

Test(suites, standard_horizons)
{
    pb_case_list l = {0, 0, NULL};
    cr_assert_eq(pb_suite_expand("standard", &l), 0);
    int n;
    /* e = 0.99: 50,000 to 200,000 steps an orbit; 2e6 / 200,000 = 10 orbits */
    cr_assert_eq(std_orbits(&l, "kepler-e0.99", &n), 10.0);
    /* the others keep up to 100 orbits: e = 0.9 at 2,000 to 8,000 steps an
     * orbit spends 800,000 of the finest */
    cr_assert_eq(std_orbits(&l, "kepler-e0.9", &n), 100.0);
    cr_assert_eq(std_orbits(&l, "kepler-e0.5", &n), 100.0);
    for (int i = 0; i < l.n; i++) {
        const pb_case_spec *c = &l.cases[i];
        if (c->steps_per_orbit > 0 && c->orbits > 0)
            cr_assert(c->steps_per_orbit * c->orbits <= 2e6 + 0.5, "%s %s: %d steps/orbit x %g orbits",
                      c->problem.name, c->method->name, c->steps_per_orbit, c->orbits);
    }
    pb_case_list_free(&l);
}
