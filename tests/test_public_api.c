/* test_public_api.c - the installed interface: every method record passes
 * pb_method_check, records built against other headers are refused, the
 * case driver runs a case, and the version is one string everywhere. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "propbench/propbench.h"
#include "integrators/method.h"
#include "bench/store/case_json.h"
#include "test_support.h"

Test(public_api, every_builtin_record_passes_the_check)
{
    char err[256];
    int n = 0;
    for (const pb_method_type *const *m = pb_method_table; *m; m++, n++) {
        cr_assert_eq(pb_method_check(*m, err, sizeof err), 0, "%s", err);
        cr_assert_eq((*m)->abi, PB_METHOD_ABI);
        cr_assert_eq((*m)->size, sizeof(pb_method_type));
    }
    cr_assert_geq(n, 12);
}

Test(public_api, records_of_other_headers_are_refused)
{
    char err[256];
    pb_method_type m = *pb_method_find("rk4");
    m.abi = PB_METHOD_ABI + 1;
    cr_assert_eq(pb_method_check(&m, err, sizeof err), -1);
    cr_assert(strstr(err, "interface version"), "%s", err);
    m = *pb_method_find("rk4");
    m.size = (unsigned)sizeof m - 8;
    cr_assert_eq(pb_method_check(&m, err, sizeof err), -1);
    cr_assert(strstr(err, "bytes"), "%s", err);
    m = *pb_method_find("rk4");
    m.flags |= PB_KIND_ADAPTIVE;
    cr_assert_eq(pb_method_check(&m, err, sizeof err), -1);
    cr_assert(strstr(err, "method rk4") && strstr(err, "exactly one"), "%s", err);
    m = *pb_method_find("rk4");
    m.advance = NULL;
    cr_assert_eq(pb_method_check(&m, err, sizeof err), -1);
    m = *pb_method_find("rk4");
    m.order = 0;
    cr_assert_eq(pb_method_check(&m, err, sizeof err), -1);
    cr_assert(strstr(err, "order 0"), "%s", err);
    cr_assert_eq(pb_method_check(NULL, err, sizeof err), -1);
}

/* The driver gives the harness's numbers: rk4 on the e = 0.6 orbit over one
 * orbit at 800 steps costs exactly 4 x 800 evaluations, plus one for the last
 * state's dense output (counted by the harness), and halving the step divides the error by 2^4 within 0.3 in the
 * exponent (order 4, the same check as test_rk4.c: 4.09 measured there). */
Test(public_api, driver_runs_a_case_with_the_harness_numbers)
{
    char err[256];
    pb_drive_outcome a, b;
    pb_drive_request rq = {.problem = "kepler-e0.6", .method = pb_method_find("rk4"),
                           .steps_per_orbit = 800, .orbits = 1};
    cr_assert_eq(pb_drive_case(&rq, &a, err, sizeof err), 0, "%s", err);
    rq.steps_per_orbit = 1600;
    cr_assert_eq(pb_drive_case(&rq, &b, err, sizeof err), 0, "%s", err);
    cr_assert_eq(a.status, PB_OK);
    cr_assert_str_eq(a.status_name, "ok");
    cr_assert_eq(a.steps, 800);
    cr_assert_eq(a.evals, 3201);
    cr_assert_str_eq(a.id, "kepler-e0.6__rk4__n800__o1");
    double order = log2(a.pos_err_final / b.pos_err_final);
    cr_assert(fabs(order - 4) < 0.3, "observed order %.3f", order);
    /* leapfrog cannot take a velocity-dependent force (the CR3BP's Coriolis term) */
    rq.problem = "arenstorf";
    rq.method = pb_method_find("leapfrog");
    cr_assert_eq(pb_drive_case(&rq, &a, err, sizeof err), -1);
    cr_assert(strstr(err, "velocity"), "%s", err);
    rq.problem = "kepler-e0.6";
    rq.orbits = -1;
    cr_assert_eq(pb_drive_case(&rq, &a, err, sizeof err), -1);
}

Test(public_api, one_version_string)
{
    cr_assert_str_eq(pb_version(), PB_VERSION);
    cr_assert_str_eq(PB_TOOL_NAME, "propbench " PB_VERSION);
    char out[256], err[256];
    const char *args[] = {"--version", NULL};
    cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 0);
    cr_assert_str_eq(out, "propbench " PB_VERSION "\n");
    const char *extra[] = {"--version", "x", NULL};
    cr_assert_eq(pbt_run_cli(extra, out, sizeof out, err, sizeof err), 2);
    cr_assert(strstr(err, "takes no argument"), "%s", err);
}
