/* segments.h - an integration from a problem's start to a stop time, cut at
 * its impulsive manoeuvres: the method stops exactly at each one, the
 * velocity change is applied and the method is started again (a multistep
 * method pays its start-up again, and that is counted). The metric pass and
 * the timing pass both integrate through here, so both do the same work. */
#ifndef PB_SEGMENTS_H
#define PB_SEGMENTS_H

#include "bench/measure/case.h"

/* Start spec's method in ws (cfg copied; f borrowed) at the problem's initial
 * state and integrate to t_stop. Without manoeuvres this is the method's own
 * start and one advance. With them, a fixed-step method's step is shortened
 * in each segment to the largest h_seg <= cfg->h that divides it into whole
 * steps, so that it lands on every manoeuvre time. stats receives the counts
 * summed over the segments (t_fail of the last). Returns the status of the
 * integration (obs's own non-zero return included); *first_start (may be
 * NULL) receives the status of the first start, non-zero when the method
 * refused to start at all (a set-up failure, not a result). */
int pb_case_integrate(const pb_case_spec *spec, const pb_method_config *cfg, void *ws,
                      const pb_force *f, double t_stop, pb_step_observer obs, void *obs_ctx,
                      pb_method_stats *stats, int *first_start);

/* Apply an impulsive manoeuvre to v: dv in the radial, along-track and
 * cross-track directions of (r, v). */
void pb_manoeuvre_apply(const pb_manoeuvre *m, const double *r, double *v);

#endif
