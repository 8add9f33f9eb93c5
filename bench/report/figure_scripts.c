/* figure_scripts.c - figure scripts for gnuplot (see figure_scripts.h). Each script is
 * self-contained apart from style.gp and the series CSVs, so the figures can
 * be redrawn elsewhere with `gnuplot ./<base>.gp` inside plots/. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/figure_scripts.h"
#include "bench/report/figure_util.h"
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
void pb_gp_quote(FILE *f, const char *s)
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

/* The time axis: orbits for a problem with a period; else days, hours or
 * minutes by the horizon (at least two of the unit), seconds below. */
typedef struct { double div; const char *name; } gp_tscale;

static gp_tscale gp_time_scale(const pb_report_problem *p)
{
    gp_tscale t = {1.0, p->time_unit};
    if (p->orbits_max > 0 || strcmp(p->time_unit, "s"))
        return t;
    static const gp_tscale units[] = {{86400.0, "days"}, {3600.0, "hours"}, {60.0, "minutes"}};
    for (size_t i = 0; i < sizeof units / sizeof *units; i++)
        if (p->horizon_max >= 2 * units[i].div)
            return units[i];
    return t;
}

void pb_gp_horizon(const pb_report_problem *p, char *buf, size_t len)
{
    gp_tscale t = gp_time_scale(p);
    if (p->orbits_max > 0)
        snprintf(buf, len, "%g orbits (%.4g %s)", p->orbits_max, p->horizon_max, p->time_unit);
    else
        snprintf(buf, len, "%.4g %s", p->horizon_max / t.div, t.name);
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

void pb_gp_axes_log(FILE *f)
{
    fputs("set logscale xy\nset format x '10^{%L}'\nset format y '10^{%L}'\n", f);
}

/* Time plot of one column set (energy, angmom, pos or one RIC part). */
static int gp_time_plot(FILE *f, const pb_report_run *run, const pb_report_problem *p,
                        const gp_case *g, int which, const char *prefix, int with_fits, int key,
                        const unsigned char *pick)
{
    int any = 0;
    for (int i = 0; i < p->n; i++)
        any |= g[i].ok && g[i].has[which] && pick[i];
    if (!any) {
        fputs("unset logscale\nunset key\nset format x ''\nset format y ''\n"
              "set label 1 'no non-zero values to draw (exactly zero for this problem)' at graph 0.5,0.5 center\n"
              "plot [0:1][0:1] NaN notitle\nunset label 1\n", f);
        return 0;
    }
    pb_gp_axes_log(f);
    if (!key)
        fputs("unset key\n", f);
    else
        fputs("set key\n", f);
    fputs("plot ", f);
    int first = 1;
    for (int i = 0; i < p->n; i++) {
        const pb_report_case *c = &run->cases[p->first + i];
        if (!g[i].ok || !g[i].has[which] || !pick[i])
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
        pb_gp_quote(f, path);
        fprintf(f, " skip 1 using (pbpos($%d/%.10g)):(pbpos(abs($%d))) with linespoints pi 5 lt %d dt %d title ",
                g[i].cx, gp_time_scale(p).div, col, c->method_slot + 1, gp_dash[c->variant % 5]);
        pb_gp_quote(f, label);
    }
    if (with_fits) {
        int titled = 0;
        for (int i = 0; i < p->n; i++)
            if (g[i].ok && g[i].has[which] && g[i].nfit >= 2 && pick[i]) {
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
    pb_gp_horizon(p, hz, sizeof hz);
    snprintf(t, sizeof t, "%s: %s, horizon %s", p->name, what, hz);
    fputs("set title ", f);
    pb_gp_quote(f, t);
    fputc('\n', f);
}

static void gp_xtime(FILE *f, const pb_report_problem *p)
{
    if (p->orbits_max > 0)
        fputs("set xlabel 'time [orbits]'\n", f);
    else
        fprintf(f, "set xlabel 'time [%s]'\n", gp_time_scale(p).name);
}

/* Margins so that no point sits on the frame. */
void pb_gp_offsets(FILE *f)
{
    fputs("set offsets graph 0.03, graph 0.03, graph 0.08, graph 0.08\n", f);
}

/* Radial, along-track and cross-track error in three panels; each
 * method's finest finished case only (the legend on the first panel). */
static int gp_ric(FILE *f, const pb_report_run *run, const pb_report_problem *p, const gp_case *g,
                  const char *prefix)
{
    static const char *const part[3] = {"radial", "along-track", "cross-track"};
    unsigned char *pick = calloc((size_t)p->n, 1);
    if (!pick)
        return -1;
    int any = 0;
    for (int i = 0; i < p->n; i++) {
        const pb_report_case *c = &run->cases[p->first + i];
        int last = i + 1 == p->n || run->cases[p->first + i + 1].method_slot != c->method_slot;
        pick[i] = last && g[i].ok && (g[i].has[GP_R] || g[i].has[GP_A] || g[i].has[GP_C]);
        any |= pick[i];
    }
    if (!any) {
        free(pick);
        return 0;
    }
    char hz[96], t[512];
    pb_gp_horizon(p, hz, sizeof hz);
    snprintf(t, sizeof t, "%s: radial, along-track and cross-track error (finest case of each method), horizon %s",
             p->name, hz);
    fputs("set multiplot layout 3,1 title ", f);
    pb_gp_quote(f, t);
    /* the same plot width in every panel, the first one's legend in the margin */
    fputs(" font ',12'\nunset title\nset lmargin at screen 0.10\nset rmargin at screen 0.74\n", f);
    pb_gp_offsets(f);
    for (int k = 0; k < 3; k++) {
        if (k == 2) gp_xtime(f, p);
        else fputs("unset xlabel\n", f);
        fprintf(f, "set ylabel '|%s error| [%s]'\n", part[k], p->len_unit);
        gp_time_plot(f, run, p, g, GP_R + k, prefix, 0, k == 0, pick);
    }
    fputs("unset multiplot\n", f);
    free(pick);
    return 1;
}

/* Curves at most per panel: beyond it a figure becomes small multiples,
 * one panel per group of whole methods, each panel with its own legend. */

/* panel[i] for each case of p (-1: nothing to draw); returns the count. */
static int gp_panels(const pb_report_run *run, const pb_report_problem *p, const gp_case *g,
                     int which, int *panel)
{
    int np = 0, used = 0;
    for (int i = 0; i < p->n; i++)
        panel[i] = -1;
    for (int m = 0; m < p->nmethods; m++) {
        int k = 0;
        for (int i = 0; i < p->n; i++)
            k += g[i].ok && g[i].has[which] && run->cases[p->first + i].method_slot == m;
        if (!k)
            continue;
        if (np == 0 || used + k > GP_PANEL_CURVES) {
            np++;
            used = 0;
        }
        used += k;
        for (int i = 0; i < p->n; i++)
            if (g[i].ok && g[i].has[which] && run->cases[p->first + i].method_slot == m)
                panel[i] = np - 1;
    }
    return np;
}

/* A time figure (energy, angular momentum or position growth): one plot,
 * or small multiples (two columns past two panels) when it has more than
 * GP_PANEL_CURVES curves. *width and *height: the image size. 1 drawn, 0 nothing to draw, -1 no memory. */
static int gp_time_figure(FILE *f, const pb_report_run *run, const pb_report_problem *p,
                          const gp_case *g, int which, const char *prefix, const char *what,
                          const char *ylabel, int *width, int *height)
{
    int *panel = malloc((size_t)p->n * sizeof *panel);
    unsigned char *pick = malloc((size_t)p->n);
    if (!panel || !pick) {
        free(panel); free(pick);
        return -1;
    }
    int np = gp_panels(run, p, g, which, panel);
    pb_gp_offsets(f);
    fputs(ylabel, f);
    if (np <= 1) {
        gp_title(f, p, what);
        gp_xtime(f, p);
        memset(pick, 1, (size_t)p->n);
        int rc = gp_time_plot(f, run, p, g, which, prefix, which == GP_P, 1, pick);
        free(panel); free(pick);
        return rc;
    }
    char hz[96], t[512];
    pb_gp_horizon(p, hz, sizeof hz);
    snprintf(t, sizeof t, "%s: %s, horizon %s (%d panels of at most %d curves)", p->name, what, hz, np,
             GP_PANEL_CURVES);
    int cols = np > 2 ? 2 : 1, rows = (np + cols - 1) / cols;
    fprintf(f, "set multiplot layout %d,%d title ", rows, cols);
    pb_gp_quote(f, t);
    fputs(" font ',12'\nunset title\n", f);
    gp_xtime(f, p);
    for (int k = 0; k < np; k++) {
        for (int i = 0; i < p->n; i++)
            pick[i] = panel[i] == k;
        gp_time_plot(f, run, p, g, which, prefix, which == GP_P, 1, pick);
    }
    fputs("unset multiplot\n", f);
    *height = 60 + GP_PANEL_H * rows;
    *width = cols == 2 ? 1600 : 1000;
    free(panel); free(pick);
    return 1;
}

/* Body of one figure (everything after the terminal is set); datablocks go
 * to pre; *width and *height the image size. */
static int gp_body(FILE *f, FILE *pre, int kind, const pb_report_run *run, const pb_report_problem *p,
                   const gp_case *g, const char *prefix, int *width, int *height)
{
    const pb_report_case *cs = run->cases + p->first;
    double div = gp_time_scale(p).div;
    char yl[160];
    switch (kind) {
    case PB_FIG_ENERGY:
        return gp_time_figure(f, run, p, g, GP_E, prefix, "relative energy error",
                              "set ylabel 'relative energy error |E - E_0| / |E_0| [-]'\n", width, height);
    case PB_FIG_ANGMOM:
        return gp_time_figure(f, run, p, g, GP_H, prefix, "relative angular-momentum error",
                              "set ylabel 'relative angular-momentum error |h - h_0| / |h_0| [-]'\n", width, height);
    case PB_FIG_GROWTH:
        for (int i = 0; i < p->n; i++)
            if (g[i].ok && g[i].nfit >= 2) {
                fprintf(pre, "$fit%d << EOD\n%.9g,%.9g\n%.9g,%.9g\nEOD\n", i, g[i].fit_x0 / div,
                        exp(g[i].fit_b + cs[i].k_pos * log(g[i].fit_x0)), g[i].fit_x1 / div,
                        exp(g[i].fit_b + cs[i].k_pos * log(g[i].fit_x1)));
            }
        snprintf(yl, sizeof yl, "set ylabel 'position error |r - r_{true}| [%s]'\n", p->len_unit);
        return gp_time_figure(f, run, p, g, GP_P, prefix, "position error growth", yl, width, height);
    case PB_FIG_RIC:
        *height = 980;
        return gp_ric(f, run, p, g, prefix);
    case PB_FIG_WORK:
    case PB_FIG_CONV:
        return pb_gp_cost_plot(f, pre, kind == PB_FIG_CONV, p, cs, width, height);
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
    int width = 1000, height = 600;
    int drew = fp && fb ? gp_body(fb, fp, kind, run, p, g, prefix, &width, &height) : -1;
    if (fp) fclose(fp);
    if (fb) fclose(fb);
    int rc = 0;
    *made = 0;
    if (drew > 0) {
        char base[PB_FIG_BASE_MAX], path[5000];
        pb_fig_base(p->name, kind, base, sizeof base);
        FILE *fa = open_memstream(&all, &nall);
        if (!fa) {
            rc = -1;
        } else {
            fprintf(fa, "# %s.gp - propbench report figure; run `gnuplot ./%s.gp` in this folder.\n", base, base);
            fputs("# Writes <name>.png and <name>.svg; propbench runs it with -e \"pb_tmp = '.tmp'\" to\n"
                  "# write temporary names it installs once both images are whole.\n", fa);
            fputs("if (!exists('pb_tmp')) pb_tmp = ''\n", fa);
            fputs("load 'style.gp'\n", fa);
            fputs(pre ? pre : "", fa);
            fprintf(fa, "set terminal pngcairo size %d,%d font pb_font enhanced\n", width, height);
            fprintf(fa, "set output '%s.png'.pb_tmp\n%s", base, body ? body : "");
            fprintf(fa, "unset output\nreset\nload 'style.gp'\n");
            fputs(pre ? pre : "", fa);
            fprintf(fa, "set terminal svg size %d,%d font pb_font enhanced background '#ffffff'\n", width, height);
            fprintf(fa, "set output '%s.svg'.pb_tmp\n%s", base, body ? body : "");
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
