/* test_hotpath_bits.c - the hot paths rewritten for speed (issue 16 item 5:
 * gauss-jackson8's history ring, the leapfrog family without state copies,
 * the metric pass's observer on squared norms) compute what they computed
 * before, to the last bit. Each expected value is a final state (or a dense
 * output, or a case's invariant maxima) recorded from the code before the
 * rewrite, at commit 9f3d5cd, by running this file there
 * (`./build/run_tests --jobs 1 --filter hotpath_bits/\*`: a mismatch prints every
 * value as a C99 hex float, which is how they were copied here). */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/measure/force_counter.h"
#include "bench/measure/harness.h"
#include "problems/catalogue.h"
#include "test_support.h"

extern const pb_method_type pb_method_gauss_jackson8;
extern const pb_method_type pb_method_gauss_jackson8_s;

#define HB_N 9 /* r[3], v[3], dense r[0], dense v[1], evaluations */

/* Run m on the normalized Kepler orbit of eccentricity e for `orbits`
 * periods at spo steps per orbit, in `pieces` advances, then read the dense
 * output `back` steps before the end (inside the last step); out[] gets the
 * values compared. */
static void hb_run(const pb_method_type *m, double e, int spo, int orbits, int pieces,
                   int compensated, double back, double *out)
{
    pb_problem p;
    pbt_kepler(&p, e);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = 2 * M_PI / spo;
    cfg.mu = 1;
    cfg.time_scale = 2 * M_PI;
    cfg.compensated = compensated;
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, &p, &f);
    void *ws = m->alloc(p.dim);
    cr_assert_not_null(ws);
    cr_assert_eq(m->start(ws, &f, &cfg, 0, p.r0, p.v0), PB_OK);
    long n = (long)spo * orbits;
    for (int k = 1; k <= pieces; k++)
        cr_assert_eq(m->advance(ws, (double)(n * k / pieces) * cfg.h, NULL, NULL), PB_OK,
                     "%s piece %d", m->name, k);
    double t, r[3], v[3], rd[3], vd[3];
    m->get_state(ws, &t, r, v);
    cr_assert_eq(m->dense(ws, t - back * cfg.h, rd, vd), PB_OK);
    m->free(ws);
    double got[HB_N] = {r[0], r[1], r[2], v[0], v[1], v[2], rd[0], vd[1], (double)c.evals};
    memcpy(out, got, sizeof got);
}

/* 1 when got and want are the same bits; else 0, with got on stderr. */
static int hb_same(const char *what, const double *got, const double *want, int n)
{
    int same = memcmp(got, want, (size_t)n * sizeof(double)) == 0;
    if (!same) {
        fprintf(stderr, "%s: got {", what);
        for (int i = 0; i < n; i++)
            fprintf(stderr, "%s%a", i ? ", " : "", got[i]);
        fprintf(stderr, "}\n");
    }
    return same;
}

static void hb_check(const char *what, const double *got, const double *want, int n)
{
    cr_assert(hb_same(what, got, want, n), "%s: not bit-identical to the recorded run (values on stderr)",
              what);
}

Test(hotpath_bits, gauss_jackson8_pec)
{
    /* PEC, e = 0.5, 200 steps per orbit, 10 orbits in 7 advances */
    static const double want[HB_N] = {0x1.ffffffda6039fp-2, 0x1.a29495974cdd8p-21, 0x0p+0,
                                      -0x1.e110dbbe35648p-20, 0x1.bb67af0733cc6p+0, 0x0p+0,
                                      0x1.ff32c41df0019p-2, 0x1.bab61549275dap+0, 0x1.29ap+11};
    double got[HB_N];
    hb_run(&pb_method_gauss_jackson8, 0.5, 200, 10, 7, 0, 0.63, got);
    hb_check("gauss-jackson8", got, want, HB_N);
}

Test(hotpath_bits, gauss_jackson8_s_iterated_corrector)
{
    /* gauss-jackson8 inside the Sundman formulation, corrector iterated:
     * e = 0.9, 128 steps per orbit, 10 orbits in 3 advances */
    static const double want[HB_N] = {0x1.9999999999de8p-4, -0x1.0360c238c39bp-32, 0x0p+0,
                                      0x1.73ec63fdc3ebfp-28, 0x1.16f8334644cedp+2, 0x0p+0,
                                      0x1.99999946ce968p-4, 0x1.16f8330de12d7p+2, 0x1.6d2p+11};
    double got[HB_N];
    hb_run(&pb_method_gauss_jackson8_s, 0.9, 128, 10, 3, 0, 1e-4, got);
    hb_check("gauss-jackson8-s", got, want, HB_N);
}

Test(hotpath_bits, leapfrog_family)
{
    /* e = 0.5, 300 steps per orbit, 10 orbits in 4 advances; yoshida6 also
     * with Kahan-compensated sums */
    static const struct { const char *name; int comp; double want[HB_N]; } cs[] = {
        {"leapfrog", 0,
         {0x1.e4dbc90d9bab4p-2, -0x1.8cec1955ae548p-3, 0x0p+0,
          0x1.c9a30c5677fa7p-2, 0x1.a56571f860644p+0, 0x0p+0,
          0x1.de7fb2f6a4933p-2, 0x1.a096f6442134bp+0, 0x1.772p+11}},
        {"yoshida4", 0,
         {0x1.ffffe8ed54bd4p-2, 0x1.58895d104b68p-11, 0x0p+0,
          -0x1.b932003020e2p-10, 0x1.bb679d645889bp+0, 0x0p+0,
          0x1.ffaa799f47f48p-2, 0x1.bb1d1d57099eap+0, 0x1.1948p+13}},
        {"yoshida6", 0,
         {0x1.ffffffffffa2fp-2, -0x1.69839d1e1p-22, 0x0p+0,
          0x1.c83f35f17p-21, 0x1.bb67ae85847d1p+0, 0x0p+0,
          0x1.ffa4bebdf5cbbp-2, 0x1.bb18ae456dec2p+0, 0x1.4824p+14}},
        {"yoshida8", 0,
         {0x1.0000000000034p-1, -0x1.c14325dp-29, 0x0p+0,
          0x1.1e28d1bp-27, 0x1.bb67ae8584c81p+0, 0x0p+0,
          0x1.ffa4bf7ca2da5p-2, 0x1.bb18aec4ab58ap+0, 0x1.5f92p+15}},
        {"yoshida6", 1,
         {0x1.ffffffffff9c5p-2, -0x1.69837dec8p-22, 0x0p+0,
          0x1.c83f11727p-21, 0x1.bb67ae85847fcp+0, 0x0p+0,
          0x1.ffa4bebdf5d45p-2, 0x1.bb18ae456dfc2p+0, 0x1.4824p+14}},
    };
    int bad = 0;
    for (size_t k = 0; k < sizeof cs / sizeof cs[0]; k++) {
        const pb_method_type *m = pb_method_find(cs[k].name);
        cr_assert_not_null(m, "%s", cs[k].name);
        double got[HB_N];
        char what[64];
        snprintf(what, sizeof what, "%s%s", cs[k].name, cs[k].comp ? " compensated" : "");
        hb_run(m, 0.5, 300, 10, 4, cs[k].comp, 0.63, got);
        bad += !hb_same(what, got, cs[k].want, HB_N);
    }
    cr_assert_eq(bad, 0, "%d runs not bit-identical to the recorded ones (values on stderr)", bad);
}

/* The metric pass's observer: a case's invariant maxima and the window
 * maxima at its samples. */
Test(hotpath_bits, metric_pass_observer)
{
    static const struct { const char *problem, *method; int spo; double want[6]; } cs[] = {
        {"kepler-e0.5", "rk4", 300,
         {0x1.9eaf6351ffffdp-21, 0x1.95cdebeb774a9p-24, 0x1.1b929141ffffep-21,
          0x1.982a44b01c2fap-25, 0x1.874811b3ffffdp-21, 0x1.77p+10}},
        {"kepler-e0.9", "yoshida4", 400,
         {0x1.0c284707d52p-4, 0x1.73a74b0bee483p-47, 0x1.603878f217fcp-6,
          0x1.b87a6be836da5p-51, 0x1.6302442af83cp-6, 0x1.f4p+10}},
    };
    int bad = 0;
    for (size_t k = 0; k < sizeof cs / sizeof cs[0]; k++) {
        pb_case_spec s;
        pb_case_spec_default(&s);
        cr_assert_eq(pb_problem_lookup(cs[k].problem, &s.problem), PB_OK);
        s.method = pb_method_find(cs[k].method);
        cr_assert_not_null(s.method);
        s.steps_per_orbit = cs[k].spo;
        s.orbits = 5;
        s.repeats = 0;
        s.linear_samples = 10;
        pb_case_result res;
        cr_assert_eq(pb_case_run(&s, &res), PB_OK);
        cr_assert_eq(res.status, PB_OK, "%s", res.status_detail);
        cr_assert(res.nsamples >= 3);
        int mid = res.nsamples / 2;
        double got[6] = {res.energy_rel_max, res.angmom_rel_max,
                         res.samples[mid].energy_rel_window, res.samples[mid].angmom_rel_window,
                         res.samples[res.nsamples - 1].energy_rel_window, (double)res.steps};
        pb_case_result_free(&res);
        bad += !hb_same(cs[k].problem, got, cs[k].want, 6);
    }
    cr_assert_eq(bad, 0, "%d cases not bit-identical to the recorded ones (values on stderr)", bad);
}
