/* timing.h - the timing pass of a case, apart from its metric pass. */
#ifndef PB_TIMING_H
#define PB_TIMING_H

#include "bench/measure/case.h"

/* Time spec's integration from t0 towards t_end (the metric pass reached
 * t_end in steps_done steps) spec->repeats times with cfg, no observer, and
 * set res->ns_per_step, ns_per_eval and timing_s (left as they are when
 * nothing could be timed). */
void pb_case_time(const pb_case_spec *spec, const pb_method_config *cfg, double t_end,
                  long steps_done, pb_case_result *res);

#endif
