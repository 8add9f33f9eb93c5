/* figure_scripts.c - figure scripts for gnuplot (see figure_scripts.h). Each script is
 * self-contained apart from style.gp and the series CSVs, so the figures can
 * be redrawn elsewhere with `gnuplot ./<base>.gp` inside plots/. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/figure_scripts.h"
#include "bench/store/run_dir.h"

static const char *const gp_captions[PB_FIG_COUNT] = {
    "Relative energy error against time (largest value over each sample window), one line per method and step or tolerance.",
    "Relative angular-momentum error against time (largest value over each sample window).",
    "Position error against time, with the fitted growth law C t^k (grey dashes, fitted over t >= 10 periods; k in the legend and table).",
    "Position error split into radial, along-track and cross-track parts (absolute values) in the true orbit's frame; each line keeps its style from the legends of the other figures.",
    "Work-precision: largest position error against force evaluations over the horizon, one curve per method.",
    "Convergence of fixed-step methods: largest position error against step, with reference slopes of each method's order (dashed).",
};

/* Dash pattern per step or tolerance of one method (coarsest first). */
static const int gp_dash[] = {2, 1, 4, 3, 5};

const char *pb_report_fig_caption(int kind) { return kind >= 0 && kind < PB_FIG_COUNT ? gp_captions[kind] : ""; }

/* A gnuplot single-quoted string: only the quote itself needs doubling. */
static void gp_quote(FILE *f, const char *s)
{
    fputc('\'', f);
    for (; *s; s++) {
        if (*s == '\'')
            fputc('\'', f);
        if (*s != '\n' && *s != '\r')
            fputc(*s, f);
    }
    fputc('\'', f);
}

static void gp_horizon(const pb_report_problem *p, char *buf, size_t len)
{
    if (p->orbits_max > 0)
        snprintf(buf, len, "%g periods (%.4g %s)", p->orbits_max, p->horizon_max, p->time_unit);
    else
        snprintf(buf, len, "%.4g %s", p->horizon_max, p->time_unit);
}

/* What one case contributes to the time plots. */
typedef struct {
    int ok;                     /* series read and has the columns */
    int cx, cenergy, cangmom, cpos, cr, ca, cc;   /* 1-based gnuplot columns */
    int has[7];                 /* some positive value in: energy, angmom, pos, r, a, c */
    int nfit;
    double fit_b, fit_x0, fit_x1;
} gp_case;

enum { GP_E, GP_H, GP_P, GP_R, GP_A, GP_C };

static int gp_col(const pb_report_series *s, const char *a, const char *b)
{
    int c = pb_report_series_col(s, a);
    if (c < 0 && b)
        c = pb_report_series_col(s, b);
    return c;
}

static void gp_case_scan(const pb_report_case *c, const pb_report_problem *p, const char *run_dir,
                         gp_case *g)
{
    memset(g, 0, sizeof *g);
    if (!c->series)
        return;
    char path[4400], err[512] = "";
    snprintf(path, sizeof path, "%s/%s", run_dir, c->series);
    pb_report_series s;
    if (pb_report_series_read(path, &s, err, sizeof err)) {
        fprintf(stderr, "propbench report: warning: %s; case left out of the time plots\n", err);
        return;
    }
    int cx = gp_col(&s, p->orbits_max > 0 ? "orbits" : "t", "t");
    int cl = gp_col(&s, "log_sample", NULL);
    int cols[6] = {gp_col(&s, "energy_rel_window_max", "energy_rel"),
                   gp_col(&s, "angmom_rel_window_max", "angmom_rel"), gp_col(&s, "pos_err", NULL),
                   gp_col(&s, "radial", NULL), gp_col(&s, "along_track", NULL),
                   gp_col(&s, "cross_track", NULL)};
    if (cx < 0 || s.nrows == 0) {
        fprintf(stderr, "propbench report: warning: %s: no time column or no rows; case left out of the time plots\n", path);
        pb_report_series_free(&s);
        return;
    }
    g->ok = 1;
    g->cx = cx + 1;
    g->cenergy = cols[0] + 1; g->cangmom = cols[1] + 1; g->cpos = cols[2] + 1;
    g->cr = cols[3] + 1; g->ca = cols[4] + 1; g->cc = cols[5] + 1;
    for (int k = 0; k < 6; k++)
        if (cols[k] >= 0)
            for (int i = 0; i < s.nrows; i++) {
                double y = fabs(s.v[(size_t)i * (size_t)s.ncols + (size_t)cols[k]]);
                if (y > 0 && isfinite(y) && s.v[(size_t)i * (size_t)s.ncols + (size_t)cx] > 0)
                    g->has[k] = 1;
            }
    if (cols[2] >= 0 && cl >= 0 && isfinite(c->k_pos)) {
        double *x = malloc((size_t)s.nrows * sizeof *x), *e = malloc((size_t)s.nrows * sizeof *e);
        int *use = malloc((size_t)s.nrows * sizeof *use);
        if (x && e && use) {
            /* the harness fits after the first 10 periods (t >= 10 T) */
            double x_min = p->orbits_max > 0 ? 10.0 : 0.0, x0 = INFINITY, x1 = 0;
            for (int i = 0; i < s.nrows; i++) {
                const double *row = s.v + (size_t)i * (size_t)s.ncols;
                x[i] = row[cx];
                e[i] = row[cols[2]];
                use[i] = row[cl] > 0.5;
                if (x[i] > x1) x1 = x[i];
            }
            g->nfit = pb_report_fit_intercept(x, e, use, s.nrows, x_min, c->k_pos, &g->fit_b);
            for (int i = 0; i < s.nrows; i++)
                if (use[i] && x[i] > 0 && (x[i] >= x_min || g->nfit < 2) && x[i] < x0)
                    x0 = x[i];
            g->fit_x0 = x0;
            g->fit_x1 = x1;
        }
        free(x); free(e); free(use);
    }
    pb_report_series_free(&s);
}

static void gp_label(const pb_report_case *c, char *buf, size_t len)
{
    char set[64];
    pb_report_case_setting(c, set, sizeof set);
    snprintf(buf, len, "%s %s", c->method, set);
}

static void gp_axes_log(FILE *f)
{
    fputs("set logscale xy\nset format x '10^{%L}'\nset format y '10^{%L}'\n", f);
}

/* Time plot of one column set (energy, angmom, pos or one RIC part). */
static int gp_time_plot(FILE *f, const pb_report_run *run, const pb_report_problem *p,
                        const gp_case *g, int which, const char *prefix, int with_fits, int key)
{
    int any = 0;
    for (int i = 0; i < p->n; i++)
        any |= g[i].ok && g[i].has[which];
    if (!any) {
        fputs("unset logscale\nunset key\nset format x ''\nset format y ''\n"
              "set label 1 'no non-zero values to draw (exactly zero for this problem)' at graph 0.5,0.5 center\n"
              "plot [0:1][0:1] NaN notitle\nunset label 1\n", f);
        return 0;
    }
    gp_axes_log(f);
    if (!key)
        fputs("unset key\n", f);
    else
        fputs("set key\n", f);
    fputs("plot ", f);
    int first = 1;
    for (int i = 0; i < p->n; i++) {
        const pb_report_case *c = &run->cases[p->first + i];
        if (!g[i].ok || !g[i].has[which])
            continue;
        int col = which == GP_E ? g[i].cenergy : which == GP_H ? g[i].cangmom : which == GP_P ? g[i].cpos
                : which == GP_R ? g[i].cr : which == GP_A ? g[i].ca : g[i].cc;
        char path[4400], label[200];
        snprintf(path, sizeof path, "%s%s", prefix, c->series);
        gp_label(c, label, sizeof label);
        if (with_fits && g[i].nfit >= 2) {
            size_t u = strlen(label);
            snprintf(label + u, sizeof label - u, "  k=%.2f", c->k_pos);
        }
        fputs(first ? "" : ", \\\n     ", f);
        first = 0;
        gp_quote(f, path);
        fprintf(f, " skip 1 using (pbpos($%d)):(pbpos(abs($%d))) with linespoints pi 5 lt %d dt %d title ",
                g[i].cx, col, c->method_slot + 1, gp_dash[c->variant % 5]);
        gp_quote(f, label);
    }
    if (with_fits) {
        int titled = 0;
        for (int i = 0; i < p->n; i++)
            if (g[i].ok && g[i].has[which] && g[i].nfit >= 2) {
                fprintf(f, ", \\\n     $fit%d using 1:2 with lines ls 100 %s", i,
                        titled ? "notitle" : "title 'fitted C t^k'");
                titled = 1;
            }
    }
    fputc('\n', f);
    return 1;
}

static void gp_title(FILE *f, const pb_report_problem *p, const char *what)
{
    char hz[96], t[512];
    gp_horizon(p, hz, sizeof hz);
    snprintf(t, sizeof t, "%s: %s, horizon %s", p->name, what, hz);
    fputs("set title ", f);
    gp_quote(f, t);
    fputc('\n', f);
}

static void gp_xtime(FILE *f, const pb_report_problem *p)
{
    if (p->orbits_max > 0)
        fputs("set xlabel 'time [orbital periods]'\n", f);
    else
        fprintf(f, "set xlabel 'time [%s]'\n", p->time_unit);
}

/* Work-precision (conv = 0: error against evaluations) or convergence
 * (conv = 1: error against step, with each order's reference slope), one
 * curve per method; the points go to pre as data blocks. 1 drawn, 0 no
 * point to draw, -1 out of memory. */
static int gp_cost_plot(FILE *f, FILE *pre, int conv, const pb_report_problem *p,
                        const pb_report_case *cs)
{
    int nplot = 0;
    char *list = NULL;
    size_t nlist = 0;
    FILE *fl = open_memstream(&list, &nlist);
    if (!fl)
        return -1;
    for (int m = 0; m < p->nmethods; m++) {
        int npts = 0, mi = -1;
        double h0 = INFINITY, e0 = NAN, h1 = 0;
        fprintf(pre, "$%s%d << EOD\n", conv ? "conv" : "work", m);
        for (int i = 0; i < p->n; i++) {
            const pb_report_case *c = &cs[i];
            if (c->method_slot != m || strcmp(c->status, "ok") || !(c->pos_max > 0))
                continue;
            if (conv ? !(c->fixed && c->h > 0) : c->evals <= 0)
                continue;
            mi = i;
            double x = conv ? c->h : (double)c->evals;
            fprintf(pre, "%.9g,%.9g\n", x, c->pos_max);
            npts++;
            if (conv && x < h0) { h0 = x; e0 = c->pos_max; }
            if (conv && x > h1) h1 = x;
        }
        fputs("EOD\n", pre);
        if (!npts)
            continue;
        const pb_report_case *c = &cs[mi];
        fprintf(fl, "%s$%s%d using 1:2 with linespoints lt %d dt 1 title ", nplot ? ", \\\n     " : "",
                conv ? "conv" : "work", m, c->method_slot + 1);
        gp_quote(fl, c->method);
        if (conv && c->order > 0) {
            /* anchored at the finest step, where the error is nearest its asymptote */
            if (!(h1 > h0)) h1 = 4 * h0;
            fprintf(pre, "$ref%d << EOD\n%.9g,%.9g\n%.9g,%.9g\nEOD\n", m, h0, e0, h1,
                    e0 * pow(h1 / h0, c->order));
            fprintf(fl, ", \\\n     $ref%d using 1:2 with lines lt %d dt (7,5) lw 0.9 title 'slope %d'",
                    m, c->method_slot + 1, c->order);
        }
        nplot++;
    }
    fclose(fl);
    if (!nplot) {
        free(list);
        return 0;
    }
    gp_title(f, p, conv ? "convergence with step" : "work-precision");
    if (conv)
        fprintf(f, "set xlabel 'step h [%s]'\n", p->time_unit);
    else
        fputs("set xlabel 'force evaluations over the horizon [-]'\n", f);
    fprintf(f, "set ylabel 'largest position error [%s]'\n", p->len_unit);
    gp_axes_log(f);
    fprintf(f, "set key\nplot %s\n", list);
    free(list);
    return 1;
}

/* Body of one figure (everything after the terminal is set); datablocks go to pre. */
static int gp_body(FILE *f, FILE *pre, int kind, const pb_report_run *run, const pb_report_problem *p,
                   const gp_case *g, const char *prefix)
{
    const pb_report_case *cs = run->cases + p->first;
    switch (kind) {
    case PB_FIG_ENERGY:
        gp_title(f, p, "relative energy error");
        gp_xtime(f, p);
        fputs("set ylabel 'relative energy error |E - E_0| / |E_0| [-]'\n", f);
        return gp_time_plot(f, run, p, g, GP_E, prefix, 0, 1);
    case PB_FIG_ANGMOM:
        gp_title(f, p, "relative angular-momentum error");
        gp_xtime(f, p);
        fputs("set ylabel 'relative angular-momentum error |h - h_0| / |h_0| [-]'\n", f);
        return gp_time_plot(f, run, p, g, GP_H, prefix, 0, 1);
    case PB_FIG_GROWTH:
        for (int i = 0; i < p->n; i++)
            if (g[i].ok && g[i].nfit >= 2) {
                fprintf(pre, "$fit%d << EOD\n%.9g,%.9g\n%.9g,%.9g\nEOD\n", i, g[i].fit_x0,
                        exp(g[i].fit_b + cs[i].k_pos * log(g[i].fit_x0)), g[i].fit_x1,
                        exp(g[i].fit_b + cs[i].k_pos * log(g[i].fit_x1)));
            }
        gp_title(f, p, "position error growth");
        gp_xtime(f, p);
        fprintf(f, "set ylabel 'position error |r - r_{true}| [%s]'\n", p->len_unit);
        return gp_time_plot(f, run, p, g, GP_P, prefix, 1, 1);
    case PB_FIG_RIC: {
        static const char *const part[3] = {"radial", "along-track", "cross-track"};
        int any = 0;
        for (int i = 0; i < p->n; i++)
            any |= g[i].ok && (g[i].has[GP_R] || g[i].has[GP_A] || g[i].has[GP_C]);
        if (!any)
            return 0;
        char hz[96], t[512];
        gp_horizon(p, hz, sizeof hz);
        snprintf(t, sizeof t, "%s: radial, along-track and cross-track error, horizon %s", p->name, hz);
        fputs("set multiplot layout 3,1 title ", f);
        gp_quote(f, t);
        fputs(" font ',12'\nset lmargin at screen 0.10\nset rmargin at screen 0.97\nunset title\n", f);
        for (int k = 0; k < 3; k++) {
            if (k == 2) gp_xtime(f, p);
            else fputs("unset xlabel\n", f);
            fprintf(f, "set ylabel '|%s error| [%s]'\n", part[k], p->len_unit);
            gp_time_plot(f, run, p, g, GP_R + k, prefix, 0, 0);
        }
        fputs("unset multiplot\n", f);
        return 1;
    }
    case PB_FIG_WORK:
    case PB_FIG_CONV:
        return gp_cost_plot(f, pre, kind == PB_FIG_CONV, p, cs);
    default:
        return 0;
    }
}

static int gp_write_figure(const pb_report_run *run, const pb_report_problem *p, int kind,
                           const gp_case *g, const char *plots_dir, const char *prefix, int *made,
                           char *err, size_t errlen)
{
    char *pre = NULL, *body = NULL, *all = NULL;
    size_t npre = 0, nbody = 0, nall = 0;
    FILE *fp = open_memstream(&pre, &npre), *fb = open_memstream(&body, &nbody);
    int drew = fp && fb ? gp_body(fb, fp, kind, run, p, g, prefix) : -1;
    if (fp) fclose(fp);
    if (fb) fclose(fb);
    int rc = 0;
    *made = 0;
    if (drew > 0) {
        char base[PB_FIG_BASE_MAX], path[5000];
        pb_fig_base(p->name, kind, base, sizeof base);
        int tall = kind == PB_FIG_RIC;
        FILE *fa = open_memstream(&all, &nall);
        if (!fa) {
            rc = -1;
        } else {
            fprintf(fa, "# %s.gp - propbench report figure; run `gnuplot ./%s.gp` in this folder.\n", base, base);
            fputs("# Writes <name>.png.tmp and <name>.svg.tmp; propbench renames them when gnuplot succeeds.\n", fa);
            fputs("load 'style.gp'\n", fa);
            fputs(pre ? pre : "", fa);
            fprintf(fa, "set terminal pngcairo size 1000,%d font pb_font enhanced\n", tall ? 980 : 600);
            fprintf(fa, "set output '%s.png.tmp'\n%s", base, body ? body : "");
            fprintf(fa, "unset output\nreset session\nload 'style.gp'\n");
            fputs(pre ? pre : "", fa);
            fprintf(fa, "set terminal svg size 1000,%d font pb_font enhanced background '#ffffff'\n", tall ? 980 : 600);
            fprintf(fa, "set output '%s.svg.tmp'\n%s", base, body ? body : "");
            fputs("unset output\n", fa);
            fclose(fa);
            snprintf(path, sizeof path, "%s/%s.gp", plots_dir, base);
            if (pb_write_atomic(path, all, nall)) {
                snprintf(err, errlen, "%s: cannot write: %s", path, strerror(errno));
                rc = -1;
            } else {
                *made = 1;
            }
        }
    } else if (drew < 0) {
        rc = -1;
    }
    if (rc && !err[0])
        snprintf(err, errlen, "out of memory writing figure scripts");
    free(pre); free(body); free(all);
    return rc;
}

int pb_report_gp_write(const pb_report_run *run, const char *run_dir, const char *plots_dir,
                       const char *data_prefix, unsigned char *made, char *err, size_t errlen)
{
    err[0] = 0;
    char path[4200];
    snprintf(path, sizeof path, "%s/style.gp", plots_dir);
    if (pb_mkdirs(plots_dir) || pb_write_atomic(path, pb_report_style_gp, strlen(pb_report_style_gp))) {
        snprintf(err, errlen, "%s: cannot write: %s", path, strerror(errno));
        return -1;
    }
    for (int pi = 0; pi < run->nproblems; pi++) {
        const pb_report_problem *p = &run->problems[pi];
        gp_case *g = calloc((size_t)p->n, sizeof *g);
        if (!g) {
            snprintf(err, errlen, "out of memory");
            return -1;
        }
        for (int i = 0; i < p->n; i++)
            gp_case_scan(&run->cases[p->first + i], p, run_dir, &g[i]);
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            int m = 0;
            if (gp_write_figure(run, p, k, g, plots_dir, data_prefix, &m, err, errlen)) {
                free(g);
                return -1;
            }
            made[pi * PB_FIG_COUNT + k] = (unsigned char)m;
        }
        free(g);
    }
    return 0;
}
