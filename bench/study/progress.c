/* progress.c - see progress.h. */
#include <stdio.h>
#include <time.h>
#include "bench/study/progress.h"

#define PROGRESS_AFTER_S 2.0

static double progress_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

void pb_progress_start(pb_progress *p, int enabled, int total, const char *what)
{
    p->enabled = enabled;
    p->drawn = 0;
    p->total = total;
    p->what = what;
    p->t0 = progress_now();
}

void pb_progress_update(pb_progress *p, int done, const char *label)
{
    if (!p->enabled)
        return;
    double el = progress_now() - p->t0;
    if (el < PROGRESS_AFTER_S)
        return;
    double left = done > 0 ? el * (p->total - done) / done : 0;
    fprintf(stderr, "\r  %d/%d %s, %.0f s elapsed, about %.0f s left%s%-16s", done, p->total,
            p->what, el, left, label ? "  " : "", label ? label : "");
    fflush(stderr);
    p->drawn = 1;
}

void pb_progress_end(pb_progress *p)
{
    if (p->drawn)
        fprintf(stderr, "\r%78s\r", "");
    p->drawn = 0;
}
