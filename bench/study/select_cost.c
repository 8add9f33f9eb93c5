/* select_cost.c - select's cost model: the evaluations a run will take
 * (so a round's cap can stop a search before it), and the evaluations an
 * answer not yet found will take at least, estimated from the failing runs
 * (so a method far costlier than the cheapest answer can be left). */
#include <math.h>
#include "bench/study/select.h"
#include "bench/study/select_state.h"
#include "bench/measure/harness.h"

/* The evaluations a fixed-step run at x will take: its steps are known from
 * x (x a period over the horizon), times the evaluations a step of the
 * finest run that tells them, preferring one that reached the horizon. A
 * run tells them if it took steps, at least ten times its start-up steps:
 * one that failed early took few evaluations, but not few a step, while
 * one that diverged just after a multistep start-up has hundreds a step.
 * With lowest, the fewest a step of any run that tells them (0: none). */
static double select_forecast_fixed(const select_state *st, double x, int lowest)
{
    const pb_select_memo *mm = st->mm;
    int b = -1, bd = -1;
    double per_min = INFINITY;
    for (int i = 0; i < mm->n; i++) {
        long steps = mm->ans[i].steps, startup = mm->steps_done[i] - steps;
        if (steps <= 0 || steps < 10 * startup)
            continue;
        per_min = fmin(per_min, (double)mm->ans[i].evals / (double)steps);
        if (b < 0 || mm->x[i] > mm->x[b])
            b = i;
        if (mm->done[i] && (bd < 0 || mm->x[i] > mm->x[bd]))
            bd = i;
    }
    b = bd >= 0 ? bd : b;
    if (b < 0)
        return 0;
    double per = lowest ? per_min : (double)mm->ans[b].evals / (double)mm->ans[b].steps;
    return x * pb_case_horizon(st->base) / pb_case_scale(st->base) * per;
}

/* The evaluations a run at x not yet made will take, from the runs so far
 * (0 before any): fixed-step methods as above; an adaptive one's grow as
 * x^s with s the slope between its two finest runs that reached the
 * horizon (1/(order + 1), the step's tolerance law, before there are
 * two). */
double pb_select_forecast(const select_state *st, double x, int lowest)
{
    if (st->ax->fixed)
        return select_forecast_fixed(st, x, lowest);
    const pb_select_memo *mm = st->mm;
    int a = -1, b = -1; /* the finest such run and the one before it */
    for (int i = 0; i < mm->n; i++) {
        if (!mm->done[i] || mm->ans[i].evals <= 0)
            continue;
        if (b < 0 || mm->x[i] > mm->x[b])
            a = b, b = i;
        else if (a < 0 || mm->x[i] > mm->x[a])
            a = i;
    }
    if (b < 0)
        return 0;
    double s = 1.0 / (st->m->order > 0 ? st->m->order + 1 : 5);
    if (a >= 0 && mm->x[b] > mm->x[a])
        s = log((double)mm->ans[b].evals / (double)mm->ans[a].evals) / log(mm->x[b] / mm->x[a]);
    s = fmin(fmax(s, 0.05), 1.0);
    return (double)mm->ans[b].evals * pow(x / mm->x[b], s);
}

/* The answer's evaluations estimated from below: half those of the finest
 * failing setting coarser than every passing run (the answer is finer). A
 * fixed-step setting's steps over the horizon are known, and its
 * evaluations are taken as those times the fewest evaluations a step of
 * any run that tells them (select_forecast_fixed), so a run that diverged
 * early counts as the whole run it would have been; an adaptive
 * setting counts only if its run reached the horizon (one that failed
 * before says nothing of the cost of one that does not). Half, because a
 * finer setting can cost less: an adaptive method's evaluations need not
 * grow as its tolerance tightens (gsl-msadams on leo-j2 over a day: 14,663
 * at 1e-9, 8,930 at 1e-11), nor a fixed-step method's with its steps where
 * an iterated corrector and the start-up cost less on finer steps
 * (gauss-jackson8-s on kepler-e0.5 over 100 orbits: 11,856 at 16 steps per
 * orbit, 11,235 at 54); both measured. An estimate, not a bound: the cost
 * can fall by more (bulirsch-stoer on arenstorf over one orbit: 1,821 at
 * 3.39e-5, 867 at 1.53e-5, found in review). */
long pb_select_estimate(const select_state *st)
{
    const pb_select_memo *mm = st->mm;
    double pass = INFINITY;
    int f = -1, fixed = st->ax->fixed;
    for (int i = 0; i < mm->n; i++)
        if (mm->ok[i])
            pass = fmin(pass, mm->x[i]);
    for (int i = 0; i < mm->n; i++)
        if (!mm->ok[i] && (fixed || mm->done[i]) && mm->x[i] < pass && (f < 0 || mm->x[i] > mm->x[f]))
            f = i;
    if (f < 0)
        return 0;
    double e = fixed ? pb_select_forecast(st, mm->x[f], 1) : (double)mm->ans[f].evals;
    return (long)(e / 2);
}
