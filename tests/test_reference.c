/* test_reference.c - the reference integrator (GBS extrapolation in
 * __float128): agreement with the exact two-body flow, its own error estimate
 * for J2 LEO, the cache key (and its FNV-1a, problems/hash.c) and the on-disk
 * cache (and its folder, problems/files.c), and truth.c's hook. */
#include <criterion/criterion.h>
#include <dirent.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>
#include "problems/catalogue.h"
#include "problems/files.h"
#include "problems/hash.h"
#include "problems/reference.h"
#include "problems/truth.h"
#include "test_support.h"

enum { NS = 100 };

static void reft_times(double *t, int n, double horizon)
{
    for (int k = 0; k < n; k++)
        t[k] = horizon * (k + 1) / n;
}

static double reft_norm_ld(const long double *x)
{
    return sqrt((double)(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]));
}

/* Against the exact Kepler flow (universal variables in __float128, tested in
 * test_twobody.c against Vallado): e = 0.6 over 10 orbits, the reference's
 * position error is below 1e-17 and below its own floor estimate. */
Test(reference, matches_exact_kepler_flow)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("kepler-e0.6", &p), PB_OK);
    double t[20], fl[20];
    long double r[60], v[60];
    reft_times(t, 20, 10 * p.period);
    cr_assert_eq(pb_reference_build(&p, t, 20, NULL, r, v, fl), PB_OK);
    double worst = 0, worst_over_floor = 0;
    for (int k = 0; k < 20; k++) {
        __float128 rq[3], vq[3];
        cr_assert_eq(p.exact_q(&p, t[k], rq, vq), PB_OK);
        long double d[3];
        for (int i = 0; i < 3; i++)
            d[i] = r[3 * k + i] - (long double)rq[i];
        double e = reft_norm_ld(d);
        worst = fmax(worst, e);
        worst_over_floor = fmax(worst_over_floor, e / fl[k]);
    }
    cr_log_info("kepler-e0.6 reference error %g, max error/floor %g", worst, worst_over_floor);
    cr_assert_lt(worst, 1e-17, "reference error %g", worst);
    cr_assert_leq(worst_over_floor, 1.0);
}

/* Task requirement (DESIGN.md: >= 100 times more accurate than what it
 * measures): the reference's own estimate for J2 LEO over one day, 100
 * samples, is below 1e-14 relative. How long it takes is logged, not
 * asserted (timings belong in make bench; these machines are noisy). */
Test(reference, j2_leo_one_day_floor)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("leo-j2", &p), PB_OK);
    double t[NS], fl[NS];
    long double r[3 * NS], v[3 * NS];
    reft_times(t, NS, 86400.0);
    clock_t c0 = clock();
    cr_assert_eq(pb_reference_build(&p, t, NS, NULL, r, v, fl), PB_OK);
    double secs = (double)(clock() - c0) / CLOCKS_PER_SEC, worst = 0;
    for (int k = 0; k < NS; k++)
        worst = fmax(worst, fl[k] / reft_norm_ld(r + 3 * k));
    cr_log_info("leo-j2 1 day: floor %.3g relative, %.2f s", worst, secs);
    cr_assert_lt(worst, 1e-14, "floor %g relative", worst);
    cr_assert_gt(worst, 0.0);
}

/* The floor over 10 Arenstorf periods is honest: the orbit's instability
 * amplifies round-off, so the estimate grows, but stays small and finite. */
Test(reference, arenstorf_ten_periods)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("arenstorf", &p), PB_OK);
    double t[NS], fl[NS];
    long double r[3 * NS], v[3 * NS];
    reft_times(t, NS, 10 * p.period);
    cr_assert_eq(pb_reference_build(&p, t, NS, NULL, r, v, fl), PB_OK);
    cr_log_info("arenstorf floor after 1 period %g, after 10 %g", fl[9], fl[NS - 1]);
    cr_assert_lt(fl[9], 1e-15);
    cr_assert(isfinite(fl[NS - 1]) && fl[NS - 1] < 1e-4);
}

Test(reference, key_changes_with_every_field_and_time)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("leo-j2", &p), PB_OK);
    double t[4] = {100, 200, 300, 400};
    uint64_t k0 = pb_reference_key(&p, t, 4);
    pb_problem q = p;
    cr_assert_eq(pb_reference_key(&q, t, 4), k0);
    strcpy(q.description, "renamed: not a trajectory field");
    cr_assert_eq(pb_reference_key(&q, t, 4), k0);
#define CHANGED(stmt) do { q = p; stmt; cr_assert_neq(pb_reference_key(&q, t, 4), k0, #stmt); } while (0)
    CHANGED(q.mu *= 1 + 1e-15);
    CHANGED(q.forces.jn[2] *= 1 + 1e-15);
    CHANGED(q.forces.zonal_degree = 3);
    CHANGED(q.forces.drag = PB_DRAG_EXPONENTIAL);
    CHANGED(q.forces.ballistic_m2_kg = 0.01);
    CHANGED(q.forces.moon = 1);
    CHANGED(q.forces.circular = 1);
    CHANGED(q.forces.circ.rate = 1e-6);
    CHANGED(q.forces.epoch_days = 1e-9);
    CHANGED(q.forces.srp_area_mass_m2_kg = 0.02);
    CHANGED(q.forces.shadow = PB_SHADOW_CONICAL);
    CHANGED((q.forces.n_manoeuvres = 1, q.forces.manoeuvres[0].t = 50));
    CHANGED(q.body_radius += 1e-9);
    CHANGED(q.t0 = 1.0);
    CHANGED(q.force = PB_FORCE_TWO_BODY);
    CHANGED(q.dim = 2);
    for (int i = 0; i < 3; i++) {
        CHANGED(q.r0[i] = nextafter(q.r0[i], INFINITY));
        CHANGED(q.v0[i] = nextafter(q.v0[i], INFINITY));
    }
#undef CHANGED
    double t2[4] = {100, 200, 300, 400.0000001};
    cr_assert_neq(pb_reference_key(&p, t2, 4), k0);
    cr_assert_neq(pb_reference_key(&p, t, 3), k0);
}

static int reft_count_files(const char *dir, const char *needle)
{
    DIR *d = opendir(dir);
    if (!d)
        return -1;
    int n = 0;
    struct dirent *e;
    while ((e = readdir(d)))
        if (strstr(e->d_name, needle))
            n++;
    closedir(d);
    return n;
}

Test(reference, cache_round_trip_and_corruption)
{
    char base[256];
    pbt_tmpdir(base, sizeof base);
    cr_assert(base[0]);
    char dir[300];
    snprintf(dir, sizeof dir, "%s/results/cache", base);  /* created on demand */
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("arenstorf", &p), PB_OK);
    double t[10], fl[10], fl2[10];
    long double r[30], v[30], r2[30], v2[30];
    reft_times(t, 10, p.period);
    cr_assert_eq(pb_reference_build(&p, t, 10, dir, r, v, fl), PB_OK);
    char path[512];
    snprintf(path, sizeof path, "%s/ref-%016llx.bin", dir,
             (unsigned long long)pb_reference_key(&p, t, 10));
    FILE *f = fopen(path, "rb");
    cr_assert_not_null(f, "no cache file %s", path);
    fclose(f);
    cr_assert_eq(reft_count_files(dir, ".tmp"), 0);
    cr_assert_eq(reft_count_files(dir, "ref-"), 1);
    cr_assert_eq(pb_reference_build(&p, t, 10, dir, r2, v2, fl2), PB_OK);
    cr_assert_eq(memcmp(fl, fl2, sizeof fl), 0);
    for (int i = 0; i < 30; i++)
        cr_assert(r[i] == r2[i] && v[i] == v2[i]);
    /* a truncated entry is ignored and rebuilt */
    f = fopen(path, "wb");
    cr_assert_not_null(f);
    fputs("PBREF01", f);
    fclose(f);
    memset(r2, 0, sizeof r2);
    cr_assert_eq(pb_reference_build(&p, t, 10, dir, r2, v2, fl2), PB_OK);
    for (int i = 0; i < 30; i++)
        cr_assert(r[i] == r2[i]);
    remove(path);
    char sub[300];
    snprintf(sub, sizeof sub, "%s/results", base);
    rmdir(dir);
    rmdir(sub);
    rmdir(base);
}

/* truth.c's reference branch: J2 problems get a non-exact truth with a floor. */
Test(reference, truth_uses_reference_for_j2)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("leo-j2", &p), PB_OK);
    double t[5];
    reft_times(t, 5, p.period);
    pb_truth *tr = NULL;
    cr_assert_eq(pb_truth_build(&p, t, 5, NULL, &tr), PB_OK);
    cr_assert_eq(pb_truth_is_exact(tr), 0);
    long double r[3], v[3], rr[15], vv[15];
    cr_assert_eq(pb_reference_propagate(&p, t, 5, 1e-28L, rr, vv, NULL), PB_OK);
    for (int k = 0; k < 5; k++) {
        pb_truth_state(tr, k, r, v);
        long double d[3] = {r[0] - rr[3 * k], r[1] - rr[3 * k + 1], r[2] - rr[3 * k + 2]};
        cr_assert_lt(reft_norm_ld(d), 1e-12);
        cr_assert(pb_truth_floor(tr, k) > 0 && pb_truth_floor(tr, k) < 1e-9);
    }
    pb_truth_free(tr);
}

Test(reference, rejects_bad_input)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("leo-j2", &p), PB_OK);
    double t[2] = {100, 50};  /* decreasing */
    long double r[6], v[6];
    double fl[2];
    cr_assert_eq(pb_reference_build(&p, t, 2, NULL, r, v, fl), PB_EINVAL);
    cr_assert_eq(pb_reference_propagate(&p, t, 1, 0.0L, r, v, NULL), PB_EINVAL);
}

Test(reference, fnv1a64_test_vectors)
{
    /* Source: the FNV-1a 64-bit test vectors of Fowler, Noll and Vo's
     * reference page (from memory; recomputed here by a separate Python
     * implementation): "" -> cbf29ce484222325 (the offset basis),
     * "a" -> af63dc4c8601ec8c, "foobar" -> 85944171f73967e8. */
    cr_assert_eq(pb_fnv1a64(PB_FNV1A64_INIT, "", 0), UINT64_C(0xcbf29ce484222325));
    cr_assert_eq(pb_fnv1a64(PB_FNV1A64_INIT, "a", 1), UINT64_C(0xaf63dc4c8601ec8c));
    cr_assert_eq(pb_fnv1a64(PB_FNV1A64_INIT, "foobar", 6), UINT64_C(0x85944171f73967e8));
    /* chained calls hash the concatenation, as the cache key relies on */
    cr_assert_eq(pb_fnv1a64(pb_fnv1a64(PB_FNV1A64_INIT, "foo", 3), "bar", 3),
                 UINT64_C(0x85944171f73967e8));
}

Test(reference, cache_folder_made_or_refused)
{
    char base[256], deep[400], file[400], below[450];
    pbt_tmpdir(base, sizeof base);
    cr_assert(base[0]);
    snprintf(deep, sizeof deep, "%s/a/b/c/", base);   /* a trailing slash too */
    cr_assert_eq(pb_mkdirs(deep), 0);
    cr_assert_eq(pb_mkdirs(deep), 0);                /* already there */
    snprintf(file, sizeof file, "%s/a/file", base);
    FILE *f = fopen(file, "w");
    cr_assert_not_null(f);
    fclose(f);
    errno = 0;
    cr_assert_eq(pb_mkdirs(file), -1);               /* a file stands there */
    cr_assert_eq(errno, ENOTDIR);
    snprintf(below, sizeof below, "%s/x", file);
    cr_assert_eq(pb_mkdirs(below), -1);
    errno = 0;
    cr_assert_eq(pb_mkdirs(""), -1);
    cr_assert_eq(errno, ENOENT);
    static char huge[5000];
    memset(huge, 'x', sizeof huge - 1);
    errno = 0;
    cr_assert_eq(pb_mkdirs(huge), -1);
    cr_assert_eq(errno, ENAMETOOLONG);
    /* a cache folder that cannot be made loses the cache entry, never the result */
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("arenstorf", &p), PB_OK);
    double t[2], fl[2];
    long double r[6], v[6];
    reft_times(t, 2, 0.01 * p.period);
    cr_assert_eq(pb_reference_build(&p, t, 2, below, r, v, fl), PB_OK);
    cr_assert(isfinite((double)r[0]) && fl[1] > 0);
    remove(file);
    snprintf(deep, sizeof deep, "%s/a/b/c", base);
    rmdir(deep);
    snprintf(deep, sizeof deep, "%s/a/b", base);
    rmdir(deep);
    snprintf(deep, sizeof deep, "%s/a", base);
    rmdir(deep);
    rmdir(base);
}
