/* table.c - summary-table cells and best-value marks (see table.h).
 * Only cases that ended plain "ok" are marked: a saturated or failed case is
 * never "best", whatever its numbers. Accuracy columns take the minimum;
 * cost columns mark the work-precision front, since fewest evaluations or
 * least time per step alone rewards a cheap, inaccurate run. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/table.h"

const char pb_report_table_marks[] =
    "marks only cases that ended plain ok (never ok(sat), diverged, max_steps or crashed): "
    "the lowest energy and position error, and on evaluations and CPU time the cases no other "
    "case beats on both cost and position error (cost at accuracy). Growth and time per step "
    "are not marked.";

int pb_report_best(const double *v, const int *ok, int n, int *best)
{
    double lo = INFINITY;
    for (int i = 0; i < n; i++)
        if (ok[i] && isfinite(v[i]) && v[i] < lo)
            lo = v[i];
    int marked = 0;
    for (int i = 0; i < n; i++) {
        best[i] = ok[i] && isfinite(lo) && v[i] == lo;
        marked += best[i];
    }
    return marked;
}

int pb_report_front(const double *cost, const double *err, const int *ok, int n, int *front)
{
    int marked = 0;
    for (int i = 0; i < n; i++) {
        front[i] = ok[i] && isfinite(cost[i]) && isfinite(err[i]);
        for (int j = 0; j < n && front[i]; j++)
            if (j != i && ok[j] && isfinite(cost[j]) && isfinite(err[j]) &&
                ((cost[j] <= cost[i] && err[j] < err[i]) || (cost[j] < cost[i] && err[j] <= err[i])))
                front[i] = 0;
        marked += front[i];
    }
    return marked;
}

int pb_report_table_shown(int col, const pb_report_problem *p)
{
    return col != PB_RT_POS_M || !strcmp(p->len_unit, "km");
}

void pb_report_table_heading(int col, const pb_report_problem *p, char *buf, size_t len)
{
    switch (col) {
    case PB_RT_METHOD: snprintf(buf, len, "method"); break;
    case PB_RT_SETTING: snprintf(buf, len, "step or tolerance"); break;
    case PB_RT_STATUS: snprintf(buf, len, "status"); break;
    case PB_RT_ENERGY: snprintf(buf, len, "max energy error [-]"); break;
    case PB_RT_POS: snprintf(buf, len, "max position error [%s]", p->len_unit); break;
    case PB_RT_POS_M: snprintf(buf, len, "max position error [m]"); break;
    case PB_RT_GROWTH: snprintf(buf, len, "position growth (k)"); break;
    case PB_RT_EVALS: snprintf(buf, len, "evaluations"); break;
    case PB_RT_CPU: snprintf(buf, len, "CPU time [ms]"); break;
    case PB_RT_NS: snprintf(buf, len, "ns per step"); break;
    default: snprintf(buf, len, "?"); break;
    }
}

static void table_num(char *buf, double x, const char *fmt)
{
    if (isfinite(x))
        snprintf(buf, PB_RT_CELL, fmt, x);
    else
        snprintf(buf, PB_RT_CELL, "-");
}

void pb_report_table_cells(const pb_report_case *c, char cells[PB_RT_NCOLS][PB_RT_CELL])
{
    snprintf(cells[PB_RT_METHOD], PB_RT_CELL, "%s%s", c->method, c->from_gsl ? " (GSL's)" : "");
    pb_report_case_setting(c, cells[PB_RT_SETTING], PB_RT_CELL);
    pb_report_case_status(c, cells[PB_RT_STATUS], PB_RT_CELL);
    table_num(cells[PB_RT_ENERGY], c->energy_max, "%.3e");
    table_num(cells[PB_RT_POS], c->pos_max, "%.3e");
    table_num(cells[PB_RT_POS_M], 1e3 * c->pos_max, "%.4g");
    if (isfinite(c->k_pos))
        snprintf(cells[PB_RT_GROWTH], PB_RT_CELL, "%s (%.2f)", c->growth_pos ? c->growth_pos : "other", c->k_pos);
    else
        snprintf(cells[PB_RT_GROWTH], PB_RT_CELL, "%s", c->growth_pos ? c->growth_pos : "-");
    if (c->evals >= 0)
        snprintf(cells[PB_RT_EVALS], PB_RT_CELL, "%ld", c->evals);
    else
        snprintf(cells[PB_RT_EVALS], PB_RT_CELL, "-");
    table_num(cells[PB_RT_CPU], 1e3 * c->cpu_s, "%.3g");
    table_num(cells[PB_RT_NS], c->ns_per_step, "%.1f");
}

int *pb_report_table_best(const pb_report_run *run, const pb_report_problem *p)
{
    int n = p->n;
    int *best = calloc((size_t)n * PB_RT_NCOLS, sizeof *best);
    int *ok = calloc((size_t)n, sizeof *ok), *col = calloc((size_t)n, sizeof *col);
    double *v = calloc((size_t)n, sizeof *v), *e = calloc((size_t)n, sizeof *e);
    if (!best || !ok || !col || !v || !e) {
        free(best); free(ok); free(col); free(v); free(e);
        return NULL;
    }
    const pb_report_case *cs = run->cases + p->first;
    for (int i = 0; i < n; i++) {
        ok[i] = pb_report_case_plain_ok(&cs[i]);
        e[i] = cs[i].pos_max;
    }
    static const int cols[] = {PB_RT_ENERGY, PB_RT_POS, PB_RT_POS_M, PB_RT_EVALS, PB_RT_CPU};
    for (size_t k = 0; k < sizeof cols / sizeof cols[0]; k++) {
        for (int i = 0; i < n; i++) {
            const pb_report_case *c = &cs[i];
            switch (cols[k]) {
            case PB_RT_ENERGY: v[i] = c->energy_max; break;
            case PB_RT_POS: case PB_RT_POS_M: v[i] = c->pos_max; break;
            case PB_RT_EVALS: v[i] = c->evals >= 0 ? (double)c->evals : (double)NAN; break;
            default: v[i] = c->cpu_s; break;
            }
        }
        if (cols[k] == PB_RT_EVALS || cols[k] == PB_RT_CPU)
            pb_report_front(v, e, ok, n, col);
        else
            pb_report_best(v, ok, n, col);
        for (int i = 0; i < n; i++)
            best[i * PB_RT_NCOLS + cols[k]] = col[i];
    }
    free(ok); free(col); free(v); free(e);
    return best;
}
