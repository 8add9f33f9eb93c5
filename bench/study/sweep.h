/* sweep.h - run a list of cases into one run directory with N worker
 * processes. Each case runs in a child process of its own, so a case that
 * crashes is recorded as "crashed" and the sweep goes on; results are
 * collected in case order, identical for every N. */
#ifndef PB_SWEEP_H
#define PB_SWEEP_H

#include <jansson.h>
#include "bench/study/suites.h"
#include "bench/store/run_swap.h"

typedef struct pb_sweep_options {
    int jobs;              /* worker processes (>= 1) */
    int shard_k, shard_n;  /* run cases with index % shard_n == shard_k - 1 (1-based k) */
    int progress;          /* draw progress on stderr */
    const char *label;     /* suite name or "grid", recorded in the summary */
    int quiet;             /* no notes on stderr */
} pb_sweep_options;

/* Run the cases into the run folder out (opened and locked by the caller:
 * summary.json, series/), staged whole and swapped in at the end. Returns
 * 0, -1 when the run cannot be written, a worker among them (message
 * printed with the system's reason, the folder as it was), or -2 when
 * interrupted by SIGINT, SIGTERM, SIGHUP or SIGQUIT (workers stopped, the
 * folder as it was). */
int pb_sweep_run(const pb_case_list *list, pb_run_out *out, const pb_sweep_options *opt);

/* The signal that interrupted the last pb_sweep_run. */
int pb_sweep_stop_signal(void);

/* The identity of a sweep: its case count and a hash of its ordered case
 * ids, the problems' numbers and the settings that change results, so merge
 * can refuse shards of different sweeps. */
void pb_sweep_identity(const pb_case_list *list, char *out, size_t outlen);

/* Copy a file atomically (for merge); 0 or -1. */
int pb_copy_file(const char *from, const char *to);

#endif
