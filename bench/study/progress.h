/* progress.h - a progress line on stderr for long sweeps and selections:
 * done of total, elapsed, an estimate of the rest. Drawn only on a terminal,
 * never with --quiet, and only once the work has taken two seconds. */
#ifndef PB_PROGRESS_H
#define PB_PROGRESS_H

typedef struct pb_progress {
    int enabled, drawn, total;
    double t0;
    const char *what;   /* "cases", "methods" */
} pb_progress;

void pb_progress_start(pb_progress *p, int enabled, int total, const char *what);
/* Report done of total; label (may be NULL) names the item in progress. */
void pb_progress_update(pb_progress *p, int done, const char *label);
/* Clear the line if one was drawn. */
void pb_progress_end(pb_progress *p);

#endif
