/* drive.c - one case run from outside propbench (see propbench/drive.h):
 * the public request turned into a case spec, run by the harness, and its
 * headline numbers copied out, so users never see pb_problem internals. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "propbench/propbench.h"
#include "bench/measure/harness.h"
#include "problems/catalogue.h"

const char *pb_version(void)
{
    return PB_VERSION;
}

static void drive_copy(const pb_case_result *res, pb_drive_outcome *out)
{
    snprintf(out->id, sizeof out->id, "%s", res->id);
    out->status = res->status;
    out->status_name = res->status_name;
    out->t_end = res->t_end;
    out->energy_rel_max = res->energy_rel_max;
    out->angmom_rel_max = res->angmom_rel_max;
    out->pos_err_max = res->pos_err_max;
    out->pos_err_final = res->pos_err_final;
    out->vel_err_max = res->vel_err_max;
    out->growth_exponent_pos = res->g_pos.k;
    out->growth_class_energy = res->g_energy.cls ? res->g_energy.cls : "other";
    out->steps = res->steps;
    out->evals = res->evals;
    out->rejected = res->rejected;
}

int pb_drive_case(const pb_drive_request *rq, pb_drive_outcome *out, char *err, size_t errlen)
{
    if (!rq || !out) {
        if (err && errlen)
            snprintf(err, errlen, "pb_drive_case: no request or no outcome given");
        return -1;
    }
    memset(out, 0, sizeof *out);
    if (pb_method_check(rq->method, err, errlen))
        return -1;
    /* the request's own field names, not the command line's options */
    const pb_method_type *m = rq->method;
    if ((m->flags & PB_KIND_FIXED) && rq->steps_per_orbit <= 0) {
        snprintf(err, errlen, "method %s is fixed-step: steps_per_orbit must be positive, got %d",
                 m->name, rq->steps_per_orbit);
        return -1;
    }
    if ((m->flags & PB_KIND_ADAPTIVE) && !(rq->tolerance > 0 && isfinite(rq->tolerance))) {
        snprintf(err, errlen, "method %s is adaptive: tolerance must be a positive number, got %g",
                 m->name, rq->tolerance);
        return -1;
    }
    pb_case_spec spec;
    pb_case_spec_default(&spec);
    spec.cache_dir = rq->cache_dir;
    if (!rq->problem || pb_problem_lookup(rq->problem, &spec.problem) != PB_OK) {
        snprintf(err, errlen, "unknown problem '%s'", rq->problem ? rq->problem : "(none)");
        return -1;
    }
    if (!(rq->orbits >= 0) || !isfinite(rq->orbits)) {
        snprintf(err, errlen, "orbits must be a finite number >= 0, got %g", rq->orbits);
        return -1;
    }
    spec.method = rq->method;
    spec.steps_per_orbit = rq->steps_per_orbit;
    spec.tolerance = rq->tolerance;
    if (rq->orbits > 0)
        spec.orbits = rq->orbits;
    else if (spec.problem.period > 0)
        spec.orbits = spec.problem.default_orbits;
    else
        spec.horizon_s = spec.problem.default_horizon_s;
    spec.repeats = 0;  /* no timing pass: the caller measures its own time */
    if (pb_case_validate(&spec, err, errlen))
        return -1;
    pb_case_result res;
    int rc = pb_case_run(&spec, &res);
    if (rc) {
        snprintf(err, errlen, "case could not be set up: %s", pb_strerror(rc));
        return -1;
    }
    drive_copy(&res, out);
    pb_case_result_free(&res);
    return 0;
}
