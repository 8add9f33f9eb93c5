/* figure_cost.c - the work-precision and convergence figures (see
 * figure_util.h): only cases that ended plain ok, each point labelled with
 * its step or tolerance, small multiples past GP_PANEL_CURVES methods. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/figure_util.h"

/* One cost panel: error against x (0 evaluations, 1 step, 2 CPU time),
 * a curve per method with each point labelled by its step or tolerance;
 * data blocks go to pre. Returns the curves drawn, -1 out of memory. */
static int gp_cost_panel(FILE *f, FILE *pre, int xk, const pb_report_problem *p, const pb_report_case *cs,
                         int id, const unsigned char *mpick)
{
    int nplot = 0;
    double xlo = INFINITY, xhi = 0; /* the panel's x extent */
    char *list = NULL;
    size_t nlist = 0;
    FILE *fl = open_memstream(&list, &nlist);
    if (!fl)
        return -1;
    for (int m = 0; m < p->nmethods; m++) {
        if (!mpick[m])
            continue;
        int npts = 0, mi = -1;
        double h0 = INFINITY, e0 = NAN, h1 = 0;
        fprintf(pre, "$c%d_%d << EOD\n", id, m);
        for (int i = 0; i < p->n; i++) {
            const pb_report_case *c = &cs[i];
            if (c->method_slot != m || !pb_report_case_plain_ok(c) || !(c->pos_max > 0))
                continue;
            double x = xk == 0 ? (double)c->evals : xk == 1 ? c->h : c->cpu_s;
            if (!(x > 0) || !isfinite(x) || (xk == 1 && !c->fixed))
                continue;
            xlo = fmin(xlo, x);
            xhi = fmax(xhi, x);
            char set[64];
            pb_report_case_setting(c, set, sizeof set);
            mi = i;
            fprintf(pre, "%.9g,%.9g,%s\n", x, c->pos_max, set);
            npts++;
            if (xk == 1 && x < h0) { h0 = x; e0 = c->pos_max; }
            if (xk == 1 && x > h1) h1 = x;
        }
        fputs("EOD\n", pre);
        if (!npts)
            continue;
        const pb_report_case *c = &cs[mi];
        fprintf(fl, "%s$c%d_%d using 1:2 with linespoints lt %d dt %d title ", nplot ? ", \\\n     " : "",
                id, m, c->method_slot + 1, 1 + c->method_slot / 12);
        pb_gp_quote(fl, c->method);
        if (xk != 1)
            fprintf(fl, ", \\\n     $c%d_%d using 1:2:3 with labels offset char 0.6,0.6 left font ',7' "
                    "tc lt %d notitle", id, m, c->method_slot + 1);
        /* a slope needs two steps: a method run at one (exact by
         * construction, see suites.c) gets no line that would suggest an
         * error law it does not have */
        if (xk == 1 && c->order > 0 && h1 > h0) {
            /* anchored at the finest step, where the error is nearest its asymptote */
            fprintf(pre, "$ref%d << EOD\n%.9g,%.9g\n%.9g,%.9g\nEOD\n", m, h0, e0, h1,
                    e0 * pow(h1 / h0, c->order));
            fprintf(fl, ", \\\n     $ref%d using 1:2 with lines lt %d dt (7,5) lw 0.9 title 'slope %d'",
                    m, c->method_slot + 1, c->order);
        }
        nplot++;
    }
    fclose(fl);
    if (nplot) {
        static const char *const xl[3] = {"force evaluations over the horizon [-]", NULL,
                                          "CPU time over the horizon [s] (thread CPU, timed repeats)"};
        if (xl[xk])
            fprintf(f, "set xlabel '%s'\n", xl[xk]);
        else
            fprintf(f, "set xlabel 'step h [%s]'\n", p->time_unit);
        /* every point at one x (the exact maps, each run at one step): a
         * range around it, where gnuplot would warn of an empty one */
        if (!(xhi > xlo))
            fprintf(f, "set xrange [%.9g:%.9g]\n", xlo / 2, xlo * 2);
        fprintf(f, "plot %s\n", list);
        if (!(xhi > xlo))
            fputs("set autoscale x\n", f);
    } else if (xk == 2) {
        /* keep the panel: the next plot of a multiplot would take its place */
        fputs("unset key\nset label 2 'CPU time not measured (run with --repeats 0?)' at graph 0.5,0.5 center\n"
              "plot [1:10][1:10] NaN notitle\nunset label 2\nset key\n", f);
    }
    free(list);
    return nplot;
}

/* Work-precision (error against evaluations and, beside it, against CPU
 * time; the requirement as a line when there is one) or convergence (error
 * against step with each order's reference slope). 1 drawn, 0 no point to
 * draw, -1 out of memory. */
int pb_gp_cost_plot(FILE *f, FILE *pre, int conv, const pb_report_problem *p,
                    const pb_report_case *cs, int *width, int *height)
{
    char *body = NULL;
    size_t nbody = 0;
    FILE *fb = open_memstream(&body, &nbody);
    if (!fb)
        return -1;
    fprintf(fb, "set ylabel 'largest position error [%s]'\n", p->len_unit);
    pb_gp_axes_log(fb);
    pb_gp_offsets(fb);
    fputs("set key\n", fb);
    if (p->req_pos > 0)
        fprintf(fb, "set arrow 1 from graph 0, first %.9g to graph 1, first %.9g nohead dt 3 lw 1.6 lc rgb '#000000' front\n"
                "set label 1 'requirement %.3g %s' at graph 0.02, first %.9g offset 0,0.7 front font ',9'\n",
                p->req_pos, p->req_pos, p->req_pos, p->len_unit, p->req_pos);
    if (p->req_pos > 0)   /* the requirement inside the y range, whatever the data */
        fprintf(fb, "set yrange [*<%.9g:%.9g<*]\n", p->req_pos / 3, p->req_pos * 3);
    /* methods with a point, in groups of at most GP_PANEL_CURVES: one row
     * of panels each (small multiples past the first group) */
    int nm = p->nmethods, rows = 0, used = 0, n1 = 0, n2 = 0;
    int *row = malloc((size_t)(nm + 1) * sizeof *row);
    unsigned char *pick = malloc((size_t)nm + 1);
    if (!row || !pick) {
        free(row); free(pick); fclose(fb); free(body);
        return -1;
    }
    for (int m = 0; m < nm; m++) {
        row[m] = -1;
        for (int i = 0; i < p->n && row[m] < 0; i++)
            if (cs[i].method_slot == m && pb_report_case_plain_ok(&cs[i]) && cs[i].pos_max > 0 &&
                (conv ? cs[i].fixed && cs[i].h > 0 : cs[i].evals > 0)) {
                if (rows == 0 || used == GP_PANEL_CURVES) {
                    rows++;
                    used = 0;
                }
                row[m] = rows - 1;
                used++;
            }
    }
    char hz[96], t[512];
    pb_gp_horizon(p, hz, sizeof hz);
    snprintf(t, sizeof t, "%s: %s, horizon %s (cases that ended plain ok)", p->name,
             conv ? "convergence with step" : "work-precision", hz);
    if (conv && rows <= 1) {
        fputs("set title ", fb);
        pb_gp_quote(fb, t);
        fputc('\n', fb);
    } else {
        fprintf(fb, "set multiplot layout %d,%d title ", rows > 0 ? rows : 1, conv ? 1 : 2);
        pb_gp_quote(fb, t);
        fputs(" font ',12'\nunset title\n", fb);
    }
    for (int r = 0; r < rows && n1 >= 0 && n2 >= 0; r++) {
        for (int m = 0; m < nm; m++)
            pick[m] = row[m] == r;
        int a = gp_cost_panel(fb, pre, conv ? 1 : 0, p, cs, 2 * r, pick);
        int b = conv || a <= 0 ? 0 : gp_cost_panel(fb, pre, 2, p, cs, 2 * r + 1, pick);
        n1 = a < 0 ? -1 : n1 + a;
        n2 = b < 0 ? -1 : n2 + b;
    }
    if (!conv || rows > 1)
        fputs("unset multiplot\n", fb);
    if (!conv)
        *width = 1500;
    if (rows > 1)
        *height = 60 + GP_PANEL_H * rows;
    free(row); free(pick);
    fclose(fb);
    if (n1 > 0 && n2 >= 0)
        fputs(body, f);
    free(body);
    return n1 < 0 || n2 < 0 ? -1 : n1 > 0;
}

