/* test_suites.c - the standard suite's contents (issue 16 item 4): it keeps
 * every built-in problem and every method that fits each, at three settings
 * (one for a Kepler-flow splitting map on a pure two-body problem, where its
 * map is the exact flow; regularized methods by eccentric anomaly), and caps the horizon of a problem whose finest
 * fixed step would spend more than 1e5 steps over it, down to no fewer than
 * 3 orbits (kepler-e0.99: 3 orbits, kepler-e0.9: 12, molniya-like: 50). */
#include <criterion/criterion.h>
#include <jansson.h>
#include <stdio.h>
#include <string.h>
#include "test_support.h"
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
        int fit = 0, exact = 0, n;
        for (const pb_method_type *const *m = pb_method_table; *m; m++) {
            fit += pb_method_fits(*m, &p);
            exact += pb_method_exact_on(*m, &p);
        }
        std_orbits(&l, p.name, &n);
        cr_assert_eq(n, 3 * fit - 2 * exact, "%s: %d cases for %d methods, %d exact", p.name, n, fit, exact);
        /* the five splitting maps on every pure two-body problem (the
         * hyperbolic one too: their drift is the universal-variable flow),
         * on no other */
        int pure = p.force == PB_FORCE_TWO_BODY;
        cr_assert_eq(exact, pure ? 5 : 0, "%s: %d methods exact", p.name, exact);
    }
    pb_case_list_free(&l);
}

Test(suites, standard_horizons)
{
    pb_case_list l = {0, 0, NULL};
    cr_assert_eq(pb_suite_expand("standard", &l), 0);
    int n;
    /* e = 0.99: 50,000 to 200,000 steps an orbit; 1e5 / 200,000 = 0.5
     * orbit, raised to the least, 3 */
    cr_assert_eq(std_orbits(&l, "kepler-e0.99", &n), 3.0);
    /* e = 0.9 at 2,000 to 8,000 steps an orbit: 1e5 / 8,000 = 12.5, 12 orbits */
    cr_assert_eq(std_orbits(&l, "kepler-e0.9", &n), 12.0);
    /* molniya-like at 500 to 2,000: 1e5 / 2,000 = 50 orbits */
    cr_assert_eq(std_orbits(&l, "molniya-like", &n), 50.0);
    /* the others keep up to 100 orbits (kepler-e0.5 at 200 to 800: 8e4 steps) */
    cr_assert_eq(std_orbits(&l, "kepler-e0.5", &n), 100.0);
    for (int i = 0; i < l.n; i++) {
        const pb_case_spec *c = &l.cases[i];
        if (c->steps_per_orbit > 0 && c->orbits > 3)
            cr_assert(c->steps_per_orbit * c->orbits <= 1e5 + 0.5, "%s %s: %d steps/orbit x %g orbits",
                      c->problem.name, c->method->name, c->steps_per_orbit, c->orbits);
        cr_assert_eq(c->timing_min_cpu_s, 0.02, "%s %s: timing pass", c->problem.name, c->method->name);
    }
    pb_case_list_free(&l);
}

/* An exact method runs once, at the first of the steps a method stepping by
 * eccentric anomaly takes (100 an orbit): kepler-split8 on kepler-e0.99
 * once, at 100, not at the periapsis ladder's 50,000; on leo-j2 (a J2 term
 * to split off) at all three of the ladder's steps, like rk4. */
Test(suites, exact_methods_run_once)
{
    pb_case_list l = {0, 0, NULL};
    cr_assert_eq(pb_suite_expand("standard", &l), 0);
    int split_e99 = 0, split_step = 0, split_j2 = 0, split_j2_rk4_steps = 0;
    for (int i = 0; i < l.n; i++) {
        const pb_case_spec *c = &l.cases[i];
        int split = !strcmp(c->method->name, "kepler-split8");
        if (split && !strcmp(c->problem.name, "kepler-e0.99")) {
            split_e99++;
            split_step = c->steps_per_orbit;
        }
        if (split && !strcmp(c->problem.name, "leo-j2")) {
            split_j2++;
            for (int j = 0; j < l.n; j++)
                split_j2_rk4_steps += !strcmp(l.cases[j].problem.name, "leo-j2") &&
                                      !strcmp(l.cases[j].method->name, "rk4") &&
                                      l.cases[j].steps_per_orbit == c->steps_per_orbit;
        }
    }
    cr_expect_eq(split_e99, 1);
    cr_expect_eq(split_step, 100);
    cr_expect_eq(split_j2, 3);
    cr_expect_eq(split_j2_rk4_steps, 3);
    pb_case_list_free(&l);
}

/* A regularized method (PB_KIND_REGULARIZED: the -tt compositions and
 * gauss-jackson8-s) steps 100, 200 and 400 times an orbit on every
 * problem; the others on kepler-e0.99 at the periapsis ladder, 50,000 to
 * 200,000, over the same 3 orbits. */
Test(suites, regularized_methods_step_by_anomaly)
{
    pb_case_list l = {0, 0, NULL};
    cr_assert_eq(pb_suite_expand("standard", &l), 0);
    int nreg = 0, nother = 0;
    for (int i = 0; i < l.n; i++) {
        const pb_case_spec *c = &l.cases[i];
        if (!(c->method->flags & PB_KIND_FIXED))
            continue;
        if (c->method->flags & PB_KIND_REGULARIZED) {
            nreg++;
            cr_expect(c->steps_per_orbit == 100 || c->steps_per_orbit == 200 || c->steps_per_orbit == 400,
                      "%s on %s: %d steps an orbit", c->method->name, c->problem.name, c->steps_per_orbit);
        } else if (!strcmp(c->problem.name, "kepler-e0.99") && !pb_method_exact_on(c->method, &c->problem)) {
            nother++;
            cr_expect(c->steps_per_orbit >= 50000, "%s: %d", c->method->name, c->steps_per_orbit);
            cr_expect_eq(c->orbits, 3.0);
        }
    }
    /* three steps for each problem a regularized method fits */
    int fits = 0;
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++) {
        pb_problem p;
        cr_assert_eq(e->make(&p), 0);
        for (const pb_method_type *const *m = pb_method_table; *m; m++)
            fits += ((*m)->flags & PB_KIND_REGULARIZED) && pb_method_fits(*m, &p);
    }
    cr_expect_gt(fits, 5);
    cr_expect_eq(nreg, 3 * fits);
    cr_expect_gt(nother, 0);
    pb_case_list_free(&l);
}

/* sweep --suite NAME --methods/--problems: only the suite's cases of those
 * methods and problems, as many as the suite has of them (counted from
 * pb_suite_expand); a name the suite does not have is refused (exit 2). */
Test(suites, sweep_filters_a_suite_by_method_and_problem, .timeout = 120)
{
    pb_case_list l = {0};
    cr_assert_eq(pb_suite_expand("quick", &l), 0);
    int want = 0;
    for (int i = 0; i < l.n; i++)
        want += !strcmp(l.cases[i].method->name, "rk4") && !strcmp(l.cases[i].problem.name, "kepler-e0.6");
    pb_case_list_free(&l);
    cr_assert_gt(want, 0);
    char dir[256], out[300], path[340], o[4096], e[4096];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/q", dir);
    const char *a[] = {"sweep", "--suite", "quick", "--methods", "rk4", "--problems", "kepler-e0.6",
                       "--repeats", "0", "--quiet", "--out", out, NULL};
    cr_assert_eq(pbt_run_cli(a, o, sizeof o, e, sizeof e), 0, "%s", e);
    snprintf(path, sizeof path, "%s/summary.json", out);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    json_t *cases = json_object_get(doc, "cases"), *c;
    size_t i;
    cr_expect_eq((int)json_array_size(cases), want);
    json_array_foreach(cases, i, c) {
        cr_expect_str_eq(json_string_value(json_object_get(c, "method")), "rk4");
        cr_expect_str_eq(json_string_value(json_object_get(c, "problem")), "kepler-e0.6");
    }
    json_decref(doc);
    const char *bad[] = {"sweep", "--suite", "quick", "--methods", "rk4,nosuch", "--out", out, NULL};
    cr_expect_eq(pbt_run_cli(bad, o, sizeof o, e, sizeof e), 2);
    cr_expect(strstr(e, "'nosuch' is not in suite 'quick'"), "%s", e);
}
