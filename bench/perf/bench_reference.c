/* bench_reference.c - the cost of a reference trajectory with mission-like
 * forces: a one-day 425 km LEO with J2..J6, drag, Sun, Moon and radiation
 * pressure (no shadow, cylindrical, conical), built from scratch (no cache)
 * at both tolerances, as the harness builds it; wall and process CPU
 * seconds (the coarse build runs on a second thread), accepted steps
 * and the floor (the goal is printed by bench_main.c). */
#include <stdio.h>
#include <string.h>
#include <time.h>
#include "bench/perf/bench.h"
#include "problems/bodies.h"
#include "problems/force_terms.h"
#include "problems/reference.h"
#include "problems/twobody.h"

#define BENCH_REF_EPOCH_DAYS 9564.5   /* 2026-03-10T00:00:00 TT, days from J2000.0 */

static void bench_full_force_leo(pb_problem *p, int shadow)
{
    const pb_body *b = &pb_body_earth;
    pb_forces f;
    memset(&f, 0, sizeof f);
    f.zonal_degree = 6;
    memcpy(f.jn, b->jn, sizeof f.jn);
    f.drag = PB_DRAG_EXPONENTIAL;
    f.ballistic_m2_kg = 0.01;
    f.body_rate = b->rate;
    f.sun = f.moon = 1;
    f.has_epoch = 1;
    f.epoch_days = BENCH_REF_EPOCH_DAYS;
    f.srp_area_mass_m2_kg = 0.01;
    f.cr = 1.3;
    f.shadow = shadow;
    double a = b->radius + 425.0, e = 0.0005;
    pb_elements el = {a, e, 51.6 * M_PI / 180, 0, 0, 0, a * (1 - e * e)};
    double r0[3], v0[3];
    pb_state_from_elements(b->mu, &el, r0, v0);
    pb_problem_init_forces(p, "bench-leo-full", "", PB_UNITS_KM_S, b->mu, b->radius, &f, r0, v0);
}

/* CPU time of the whole process: the build runs its coarse pass on a
 * second thread, which the calling thread's clock would not see. */
static double bench_process_cpu(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int bench_reference(double *worst_s)
{
    static const char *const names[] = {"no shadow", "cylindrical shadow", "conical shadow"};
    printf("== Reference trajectory: one day of a 425 km LEO, J2..J6 + drag + Sun + Moon + SRP ==\n");
    printf("   %-20s %10s %10s %12s %12s\n", "shadow", "build s", "CPU s", "fine steps", "floor km");
    *worst_s = 0;
    int bad = 0;
    for (int shadow = PB_SHADOW_NONE; shadow <= PB_SHADOW_CONICAL; shadow++) {
        pb_problem p;
        bench_full_force_leo(&p, shadow);
        double t[1] = {86400.0}, floor[1];
        long double r[PB_DIM_MAX], v[PB_DIM_MAX];
        double w0 = bench_now(), c0 = bench_process_cpu();
        int s = pb_reference_build(&p, t, 1, NULL, r, v, floor);
        double sec = bench_now() - w0, cpu = bench_process_cpu() - c0;
        long steps = 0;
        pb_reference_propagate(&p, t, 1, 1e-26L, r, v, &steps); /* the fine build's tolerance */
        printf("   %-20s %10.2f %10.2f %12ld %12.2g%s\n", names[shadow], sec, cpu, steps, floor[0],
               s ? "  (failed)" : "");
        bad |= s != 0;
        if (sec > *worst_s)
            *worst_s = sec;
    }
    printf("\n");
    return bad ? -1 : 0;
}
