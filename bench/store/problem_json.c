/* problem_json.c - a problem-file case's definition as JSON (see
 * problem_json.h). Built-in problems are left out: their names are their
 * definitions, and 1839 copies would only swell the standard suite's file. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/store/problem_json.h"
#include "problems/catalogue.h"
#include "problems/forces.h"

/* A number, or null where it is not finite (JSON has no NaN). */
static json_t *pj_real(double x)
{
    return isfinite(x) ? json_real(x) : json_null();
}

static json_t *pj_vec(const double *x)
{
    json_t *a = json_array();
    for (int i = 0; i < 3; i++)
        json_array_append_new(a, pj_real(x[i] + 0.0));
    return a;
}

json_t *pb_problem_def_json(const pb_problem *p)
{
    pb_problem q;
    if (pb_problem_lookup(p->name, &q) == PB_OK)
        return NULL;
    json_t *o = json_object();
    json_object_set_new(o, "description", json_string(p->description));
    json_object_set_new(o, "units", json_string(p->units == PB_UNITS_KM_S ? "km-s" : "normalized"));
    json_object_set_new(o, "mu", pj_real(p->mu));
    json_object_set_new(o, "body_radius", pj_real(p->body_radius));
    char force[256];
    if (p->force == PB_FORCE_CR3BP)
        snprintf(force, sizeof force, "CR3BP, rotating frame");
    else
        pb_forces_describe(&p->forces, force, sizeof force);
    json_object_set_new(o, "forces", json_string(force));
    json_object_set_new(o, "r0", pj_vec(p->r0));
    json_object_set_new(o, "v0", pj_vec(p->v0));
    json_object_set_new(o, "period", pj_real(p->period));
    json_object_set_new(o, "t0", pj_real(p->t0));
    if (p->forces.has_epoch)
        json_object_set_new(o, "epoch_days", pj_real(p->forces.epoch_days));
    json_object_set_new(o, "keplerian", json_boolean(p->keplerian));
    return o;
}
