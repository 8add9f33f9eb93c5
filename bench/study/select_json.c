/* select_json.c - select's ranking and its JSON document: the requirement
 * and margin as asked, and every method's answer or the reason it has none. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "bench/study/select.h"
#include "bench/store/case_json.h"
#include "bench/measure/harness.h"

static int rank_by_cost;

static int rank_cmp(const void *a, const void *b)
{
    const pb_selection *x = a, *y = b;
    if (x->found != y->found)
        return y->found - x->found;
    if (x->found) {
        if (rank_by_cost && x->projected_s != y->projected_s)
            return x->projected_s < y->projected_s ? -1 : 1;
        if (!rank_by_cost && x->confirmed.evals != y->confirmed.evals)
            return x->confirmed.evals < y->confirmed.evals ? -1 : 1;
    }
    return (x->index > y->index) - (x->index < y->index);
}

int pb_selection_pruned(const pb_selection *s)
{
    return !s->found && s->reason && !strcmp(s->reason, "costlier");
}

void pb_selection_rank(pb_selection *sel, int n, int by_cost)
{
    rank_by_cost = by_cost;
    qsort(sel, (size_t)n, sizeof *sel, rank_cmp);
}

static void json_bound(json_t *o, const char *key, double v)
{
    if (v > 0)
        json_object_set_new(o, key, json_real(v));
}

static json_t *requirement_json(const pb_requirement *req)
{
    json_t *rq = json_object();
    json_bound(rq, "max_pos_err", req->max_pos_err);
    json_bound(rq, "max_vel_err", req->max_vel_err);
    json_bound(rq, "max_radial_err", req->max_radial);
    json_bound(rq, "max_along_err", req->max_along);
    json_bound(rq, "max_cross_err", req->max_cross);
    json_bound(rq, "max_energy_rel", req->max_energy_rel);
    json_bound(rq, "max_angmom_rel", req->max_angmom_rel);
    return rq;
}

static void answer_json(json_t *e, const pb_selection *s)
{
    const pb_select_answer *r = &s->confirmed;
    if (s->method->flags & PB_KIND_FIXED) {
        json_object_set_new(e, "steps_per_orbit", json_integer(s->steps_per_orbit));
        json_object_set_new(e, "step_s", pb_json_real(r->step_s));
    } else {
        json_object_set_new(e, "tolerance", json_real(s->tolerance));
    }
    json_object_set_new(e, "evals", json_integer(r->evals));
    json_object_set_new(e, "steps", json_integer(r->steps));
    json_object_set_new(e, "pos_err_max", pb_json_real(r->below_floor ? (double)NAN : r->pos_err_max));
    json_object_set_new(e, "vel_err_max", pb_json_real(r->vel_err_max));
    json_object_set_new(e, "radial_err_max", pb_json_real(r->below_floor ? (double)NAN : r->radial_max));
    json_object_set_new(e, "along_err_max", pb_json_real(r->below_floor ? (double)NAN : r->along_max));
    json_object_set_new(e, "cross_err_max", pb_json_real(r->below_floor ? (double)NAN : r->cross_max));
    json_object_set_new(e, "energy_rel_max", pb_json_real(r->energy_rel_max));
    json_object_set_new(e, "angmom_rel_max", pb_json_real(r->angmom_rel_max));
    json_object_set_new(e, "ns_per_step", pb_json_real(r->ns_per_step));
    json_object_set_new(e, "projected_s", pb_json_real(s->projected_s));
    json_object_set_new(e, "fingerprint", json_string(r->fingerprint));
    if (s->command[0])
        json_object_set_new(e, "run_command", json_string(s->command));
}

json_t *pb_selection_json(const pb_case_spec *base, const pb_requirement *req,
                          const pb_selection *sel, int n, int by_cost, double prune_factor)
{
    json_t *o = json_object();
    json_object_set_new(o, "format", json_integer(PB_SUMMARY_FORMAT));
    json_object_set_new(o, "tool", json_string(PB_TOOL_NAME));
    json_object_set_new(o, "problem", json_string(base->problem.name));
    json_object_set_new(o, "horizon_s", json_real(pb_case_horizon(base)));
    if (base->orbits > 0)
        json_object_set_new(o, "orbits", json_real(base->orbits));
    /* the equations every method was run on (integrators/formulation.h) */
    json_object_set_new(o, "formulation", json_string(pb_formulation_name(base->problem.formulation)));
    json_object_set_new(o, "requirement", requirement_json(req));
    json_object_set_new(o, "margin", json_real(req->margin));
    json_object_set_new(o, "eval_cost_us", json_real(base->eval_cost_us));
    json_object_set_new(o, "ranked_by", json_string(by_cost ? "projected_s" : "evals"));
    json_object_set_new(o, "prune_factor", json_real(prune_factor));
    json_t *arr = json_array();
    int rank = 0;
    for (int i = 0; i < n; i++) {
        const pb_selection *s = &sel[i];
        json_t *e = json_object();
        json_object_set_new(e, "method", json_string(s->method->name));
        json_object_set_new(e, "from_gsl", json_boolean(s->method->flags & PB_FROM_GSL));
        /* a method pruned may well meet it: not known, so null */
        json_object_set_new(e, "meets_requirement",
                            pb_selection_pruned(s) ? json_null() : json_boolean(s->found));
        json_object_set_new(e, "runs", json_integer(s->runs));
        if (isfinite(s->order))
            json_object_set_new(e, "observed_order", json_real(s->order));
        if (s->found) {
            json_object_set_new(e, "rank", json_integer(++rank));
            answer_json(e, s);
        } else {
            json_object_set_new(e, "reason", json_string(s->reason ? s->reason : "not_met"));
            json_object_set_new(e, "note", json_string(s->note));
            if (pb_selection_pruned(s))
                json_object_set_new(e, "estimated_min_evals", json_integer(s->est_evals));
        }
        json_array_append_new(arr, e);
    }
    json_object_set_new(o, "ranking", arr);
    json_object_set_new(o, "caution", json_string(
        "Benchmarks on idealised problems do not validate an operational propagator; "
        "defer to the mission's own verification and flight-dynamics practice."));
    return o;
}
