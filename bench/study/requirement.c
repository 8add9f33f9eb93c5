/* requirement.c - whether a run meets select's requirement: each bound
 * (position, velocity, radial / along-track / cross-track, energy,
 * angular momentum) against the run's largest error, divided by 1 + margin;
 * below the reference's floor a position error counts as 10x the floor. */
#include <math.h>
#include "bench/study/select.h"

/* One bound's ratio value / (bound / (1 + margin)); 0 when not required. */
static double req_ratio(double value, double bound, double margin)
{
    if (!(bound > 0))
        return 0;
    double r = value / (bound / (1 + margin));
    return isnan(r) ? (double)INFINITY : r;
}

/* The largest |radial|, |along| and |cross| over the metric grid. */
void pb_requirement_components(const pb_case_result *res, double *rad, double *alo, double *crs)
{
    *rad = *alo = *crs = 0;
    for (int k = 0; k < res->nsamples; k++) {
        const pb_sample *s = &res->samples[k];
        if (!s->in_metrics)
            continue;
        *rad = fmax(*rad, fabs(s->radial));
        *alo = fmax(*alo, fabs(s->along));
        *crs = fmax(*crs, fabs(s->cross));
        if (isnan(s->radial) || isnan(s->along) || isnan(s->cross))
            *rad = *alo = *crs = NAN;
    }
}

double pb_requirement_ratio(const pb_requirement *req, const pb_case_result *res)
{
    if (res->status != PB_OK)
        return INFINITY;
    double F = req->margin, q = 0, rad, alo, crs;
    /* below the reference floor a position error is known only to be under
     * 10x the floor: that meets a bound at or above it, and no finer one */
    double floor10 = 10 * res->truth_floor_max;
    pb_requirement_components(res, &rad, &alo, &crs);
    if (res->below_floor) {
        rad = alo = crs = floor10;
    }
    q = fmax(q, req_ratio(res->below_floor ? floor10 : res->pos_err_max, req->max_pos_err, F));
    q = fmax(q, req_ratio(res->vel_err_max, req->max_vel_err, F));
    q = fmax(q, req_ratio(rad, req->max_radial, F));
    q = fmax(q, req_ratio(alo, req->max_along, F));
    q = fmax(q, req_ratio(crs, req->max_cross, F));
    q = fmax(q, req_ratio(res->energy_rel_max, req->max_energy_rel, F));
    q = fmax(q, req_ratio(res->angmom_rel_max, req->max_angmom_rel, F));
    return q;
}

int pb_requirement_met(const pb_requirement *req, const pb_case_result *res)
{
    return pb_requirement_ratio(req, res) <= 1;
}
