/* test_report.c - `propbench report`: best-value marks, the growth-law fit,
 * bad summaries, the gnuplot-missing path, figures and tables of a real run,
 * report.html opened in headless Chromium (rendered SVG paths, table rows, a
 * screenshot saved into the run directory), and the figure file names:
 * unique per problem, pruned by a rerun, never read as a gnuplot option. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <dirent.h>
#include <unistd.h>
#include "test_support.h"
#include "bench/store/run_dir.h"
#include "bench/store/figure_names.h"
#include "bench/report/report_data.h"
#include "bench/report/figure_scripts.h"
#include "bench/report/table.h"

/* one suite-wide timeout: per-test timeouts make Criterion 2.4.1's runner leak */
TestSuite(report, .timeout = 240);

static int rpt_count(const char *hay, const char *needle)
{
    int n = 0;
    for (const char *s = hay; (s = strstr(s, needle)); s += strlen(needle))
        n++;
    return n;
}

static long rpt_size(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0 ? (long)st.st_size : -1;
}

/* A small grid run: RK4 and leapfrog at three steps, RKF45 at two
 * tolerances, on the e = 0.6 Kepler problem (Hairer, Lubich & Wanner 2006,
 * Ch. I), 20 periods. */
static void rpt_make_run(char *dir, size_t len)
{
    pbt_tmpdir(dir, len);
    cr_assert(dir[0], "no temp dir");
    char out[8192], err[8192];
    const char *args[] = {"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog,rkf45",
                          "--steps-per-orbit", "100,200,400", "--tolerances", "1e-8,1e-10",
                          "--orbits", "20", "--repeats", "1", "--quiet", "--out", dir, NULL};
    int rc = pbt_run_cli(args, out, sizeof out, err, sizeof err);
    cr_assert_eq(rc, 0, "sweep failed (%d): %s", rc, err);
}

static int rpt_report(const char *dir, const char *gnuplot, char *err, size_t errlen)
{
    char out[4096];
    const char *args[] = {"report", dir, "--quiet", gnuplot ? "--gnuplot" : NULL, gnuplot, NULL};
    return pbt_run_cli(args, out, sizeof out, err, errlen);
}

/* The minimum and its ties, ignoring unfinished rows and NaN
 * (the definition of "best" used by the tables; common practice). */
Test(report, best_marks_minimum_and_ties)
{
    double v[6] = {3.0, 1.0, NAN, 1.0, 0.5, 2.0};
    int ok[6] = {1, 1, 1, 1, 0, 1}, best[6];
    cr_assert_eq(pb_report_best(v, ok, 6, best), 2);
    int want[6] = {0, 1, 0, 1, 0, 0};
    for (int i = 0; i < 6; i++)
        cr_assert_eq(best[i], want[i], "row %d", i);
    int none[6] = {0};
    cr_assert_eq(pb_report_best(v, none, 6, best), 0);
}

/* An exact power law err = 3 x^2: the least-squares intercept for slope 2
 * is ln 3 to round-off (exact by construction). Points below x_min are
 * ignored, and with fewer than two qualifying the fit uses every log row. */
Test(report, fit_intercept_exact_power_law)
{
    double x[8] = {1, 2, 5, 10, 20, 50, 100, 200}, e[8];
    int use[8] = {1, 1, 1, 1, 1, 1, 1, 1};
    for (int i = 0; i < 8; i++)
        e[i] = 3.0 * x[i] * x[i];
    e[0] = 1e6;   /* an outlier before x_min = 10 must not move the fit */
    double b = 0;
    cr_assert_eq(pb_report_fit_intercept(x, e, use, 8, 10.0, 2.0, &b), 5);
    cr_assert(fabs(b - log(3.0)) < 1e-12, "b = %.15g", b);
    cr_assert_eq(pb_report_fit_intercept(x, e, use, 8, 150.0, 2.0, &b), 8);
    cr_assert_eq(pb_report_fit_intercept(x, e, use, 8, 10.0, NAN, &b), 0);
}

Test(report, style_matches_template)
{
    const char *root = getenv("PB_ROOT");
    char path[4096];
    snprintf(path, sizeof path, "%s/scripts/plot-style.gp", root ? root : ".");
    char *s = pbt_slurp_file(path, NULL);
    cr_assert_not_null(s, "cannot read %s", path);
    cr_assert_str_eq(s, pb_report_style_gp, "scripts/plot-style.gp and bench/report/figure_style.c differ");
    free(s);
}

Test(report, bad_summary_exit_2_naming_the_file)
{
    char dir[256], path[400], err[4096];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert_eq(rpt_report(dir, NULL, err, sizeof err), 2);
    snprintf(path, sizeof path, "%s/summary.json", dir);
    cr_assert(strstr(err, path), "message does not name %s: %s", path, err);

    FILE *f = fopen(path, "w");
    fputs("{\"format\": 1,\n \"cases\": [ {\"id\": \n", f);
    fclose(f);
    cr_assert_eq(rpt_report(dir, NULL, err, sizeof err), 2);
    cr_assert(strstr(err, path) && strstr(err, "corrupt or truncated JSON"), "%s", err);

    f = fopen(path, "w");
    fputs("{\"format\": 2, \"cases\": []}\n", f);
    fclose(f);
    cr_assert_eq(rpt_report(dir, NULL, err, sizeof err), 2);
    cr_assert(strstr(err, "format 2 is newer"), "%s", err);

    f = fopen(path, "w");
    fputs("{\"format\": 1, \"cases\": [{\"id\": \"a\", \"problem\": \"p\", \"method\": \"m\",\n"
          " \"status\": \"ok\", \"metrics\": {}, \"cost\": {}}]}\n", f);
    fclose(f);
    cr_assert_eq(rpt_report(dir, NULL, err, sizeof err), 2);
    cr_assert(strstr(err, path) && strstr(err, "case a") && strstr(err, "key 'energy_rel_max' missing"),
              "%s", err);

    /* complete, but with neither a step nor a tolerance: no setting to plot against */
    char out[4096], cmd[800];
    const char *sweep[] = {"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit", "100",
                           "--orbits", "2", "--repeats", "0", "--quiet", "--out", dir, NULL};
    cr_assert_eq(pbt_run_cli(sweep, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(cmd, sizeof cmd, "sed -i '/\"steps_per_orbit\"/d' '%s'", path);
    cr_assert_eq(system(cmd), 0);
    cr_assert_eq(rpt_report(dir, NULL, err, sizeof err), 2);
    cr_assert(strstr(err, "cases[0]") && strstr(err, "tolerance"), "%s", err);
}

/* A summary whose "series" points outside its series/ folder is refused
 * before anything is read or written: report would otherwise read (and
 * quote in a warning) any file the doctored path names. */
Test(report, series_path_outside_the_run_is_refused)
{
    static const char *const bad[] = {"../../../../etc/passwd", "series/../summary.json",
                                      "/etc/passwd", "series/a/b.csv", "series/.csv", "series/x.txt"};
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        char dir[256], path[400], out[2048], err[4096];
        pbt_tmpdir(dir, sizeof dir);
        snprintf(path, sizeof path, "%s/summary.json", dir);
        FILE *f = fopen(path, "w");
        cr_assert_not_null(f);
        fprintf(f, "{\"format\": 1, \"cases\": [{\"id\": \"a\", \"problem\": \"p\", \"method\": \"m\",\n"
                   " \"series\": \"%s\", \"status\": \"crashed\"}]}\n", bad[k]);
        fclose(f);
        const char *args[] = {"report", dir, "--quiet", "--no-plots", NULL};
        cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 2, "%s: %s", bad[k], err);
        cr_assert(strstr(err, "cases[0]") && strstr(err, "not a file below series/"), "%s: %s", bad[k], err);
        cr_assert(!strstr(err, "root:"), "%s", err);
        snprintf(path, sizeof path, "%s/report.html", dir);
        cr_assert(!pbt_exists(path), "%s written for %s", path, bad[k]);
    }
    cr_assert(pb_series_path_ok("series/kepler-e0.6__rkf45__tol1e-08__o100.csv"));
}

/* An output folder that cannot take report.html or report.md is refused
 * before any script or table is written: exit 2 naming the path, nothing
 * left behind. */
Test(report, unwritable_report_leaves_nothing)
{
    static const char *const blocked[] = {"report.html", "report.md"};
    char run[256];
    pbt_tmpdir(run, sizeof run);
    const char *sweep[] = {"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit", "100",
                           "--orbits", "2", "--repeats", "0", "--quiet", "--out", run, NULL};
    char out[4096], err[4096];
    cr_assert_eq(pbt_run_cli(sweep, out, sizeof out, err, sizeof err), 0, "%s", err);
    for (int k = 0; k < 2; k++) {
        char dir[256], b[400], plots[400];
        pbt_tmpdir(dir, sizeof dir);
        snprintf(b, sizeof b, "%s/%s", dir, blocked[k]);
        cr_assert_eq(mkdir(b, 0755), 0);
        const char *args[] = {"report", run, "--out", dir, "--no-plots", "--quiet", NULL};
        cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 2, "%s", err);
        cr_assert(strstr(err, b) && strstr(err, "is not a file"), "%s", err);
        snprintf(plots, sizeof plots, "%s/plots", dir);
        cr_assert(!pbt_exists(plots), "plots/ written although %s is blocked", blocked[k]);
        snprintf(b, sizeof b, "%s/%s", dir, blocked[1 - k]);
        cr_assert(!pbt_exists(b), "%s written although %s is blocked", b, blocked[k]);
    }
}

Test(report, gnuplot_missing_still_writes_data_and_scripts)
{
    char dir[256], err[8192], path[600];
    rpt_make_run(dir, sizeof dir);
    int rc = rpt_report(dir, "/nonexistent/gnuplot", err, sizeof err);
    cr_assert_eq(rc, 0, "rc %d: %s", rc, err);
    cr_assert(strstr(err, "warning: gnuplot was not found"), "no clear warning: %s", err);
    for (int k = 0; k < PB_FIG_COUNT; k++) {
        snprintf(path, sizeof path, "%s/plots/kepler-e0.6-%s.gp", dir, pb_fig_kind(k));
        cr_assert(rpt_size(path) > 200, "missing script %s", path);
        snprintf(path, sizeof path, "%s/plots/kepler-e0.6-%s.png", dir, pb_fig_kind(k));
        cr_assert(!pbt_exists(path), "%s exists without gnuplot", path);
    }
    snprintf(path, sizeof path, "%s/plots/style.gp", dir);
    cr_assert(pbt_exists(path));
    snprintf(path, sizeof path, "%s/report.html", dir);
    char *html = pbt_slurp_file(path, NULL);
    cr_assert_not_null(html);
    cr_assert(strstr(html, "gnuplot was not found"));
    cr_assert_eq(rpt_count(html, "<tr class=\"case"), 8);
    free(html);
}

/* Best energy error in report.md is the minimum over summary.json's
 * "ok" cases, read here independently; every figure is drawn as PNG and
 * SVG; the fitted growth law reproduces the data it was fitted to. */
Test(report, figures_and_tables_of_a_run)
{
    char dir[256], err[8192], path[600];
    rpt_make_run(dir, sizeof dir);
    int rc = rpt_report(dir, NULL, err, sizeof err);
    cr_assert_eq(rc, 0, "rc %d: %s", rc, err);
    for (int k = 0; k < PB_FIG_COUNT; k++) {
        unsigned char magic[8] = {0};
        snprintf(path, sizeof path, "%s/plots/kepler-e0.6-%s.png", dir, pb_fig_kind(k));
        FILE *f = fopen(path, "rb");
        cr_assert_not_null(f, "missing %s", path);
        cr_assert_eq(fread(magic, 1, 8, f), 8);
        fclose(f);
        cr_assert(!memcmp(magic, "\x89PNG\r\n\x1a\n", 8), "%s is not a PNG", path);
        cr_assert(rpt_size(path) > 20000, "%s is only %ld bytes", path, rpt_size(path));
        snprintf(path, sizeof path, "%s/plots/kepler-e0.6-%s.svg", dir, pb_fig_kind(k));
        cr_assert(rpt_size(path) > 5000, "%s missing or tiny", path);
    }

    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    double emin = INFINITY;
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(doc, "cases"), i, c) {
        double e = json_number_value(json_object_get(json_object_get(c, "metrics"), "energy_rel_max"));
        if (!strcmp(json_string_value(json_object_get(c, "status")), "ok") && e < emin)
            emin = e;
    }
    json_decref(doc);
    char want[64];
    snprintf(want, sizeof want, "| **%.3e** |", emin);
    snprintf(path, sizeof path, "%s/report.md", dir);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert_not_null(md);
    cr_assert(strstr(md, want), "report.md does not mark the best energy error %s", want);
    cr_assert_eq(rpt_count(md, "\n| rk4 |") + rpt_count(md, "\n| **rk4** |"), 3);
    cr_assert_eq(rpt_count(md, "\n| leapfrog |"), 3);
    cr_assert_eq(rpt_count(md, "\n| rkf45 |"), 2);
    cr_assert(strstr(md, "](plots/kepler-e0.6-work.png)"));
    cr_assert(strstr(md, "do not validate an operational propagator"));
    free(md);

    /* The drawn law C t^k with the run's k must pass within 10% of RK4's
     * last fitted sample (tolerance: common practice for a log-log fit over
     * one decade of a smooth, monotone error series). */
    pb_report_run run;
    char e2[1024];
    cr_assert_eq(pb_report_load(dir, &run, e2, sizeof e2), 0, "%s", e2);
    const pb_report_case *rk = NULL;
    for (int j = 0; j < run.ncases; j++)
        if (!strcmp(run.cases[j].method, "rk4") && run.cases[j].steps_per_orbit == 400)
            rk = &run.cases[j];
    cr_assert_not_null(rk);
    cr_assert(isfinite(rk->k_pos) && rk->k_pos > 0.5, "k = %g", rk->k_pos);
    snprintf(path, sizeof path, "%s/%s", dir, rk->series);
    pb_report_series s;
    cr_assert_eq(pb_report_series_read(path, &s, e2, sizeof e2), 0, "%s", e2);
    int co = pb_report_series_col(&s, "orbits"), cl = pb_report_series_col(&s, "log_sample"),
        cp = pb_report_series_col(&s, "pos_err");
    cr_assert(co >= 0 && cl >= 0 && cp >= 0);
    double *x = calloc((size_t)s.nrows, sizeof *x), *y = calloc((size_t)s.nrows, sizeof *y);
    int *use = calloc((size_t)s.nrows, sizeof *use), last = -1;
    for (int j = 0; j < s.nrows; j++) {
        x[j] = s.v[j * s.ncols + co];
        y[j] = s.v[j * s.ncols + cp];
        use[j] = s.v[j * s.ncols + cl] > 0.5;
        if (use[j]) last = j;
    }
    double b = NAN;
    cr_assert(pb_report_fit_intercept(x, y, use, s.nrows, 10.0, rk->k_pos, &b) >= 2);
    double pred = exp(b + rk->k_pos * log(x[last]));
    cr_assert(fabs(pred / y[last] - 1) < 0.10, "fit %.4e vs data %.4e at %g orbits", pred, y[last], x[last]);
    free(x); free(y); free(use);
    pb_report_series_free(&s);
    pb_report_free(&run);

    snprintf(path, sizeof path, "%s/report.html", dir);
    char *html = pbt_slurp_file(path, NULL);
    cr_assert_not_null(html);
    cr_assert_eq(rpt_count(html, "<svg"), PB_FIG_COUNT);
    cr_assert_eq(rpt_count(html, "<script"), 0, "report.html must not need scripts");
    cr_assert_eq(rpt_count(html, "src="), 0, "report.html must not load anything");
    cr_assert_eq(rpt_count(html, "https:"), 0);
    cr_assert_eq(rpt_count(html, "http:"), rpt_count(html, "http://www.w3.org/"),
                 "only XML namespace names may look like URLs");
    cr_assert_eq(rpt_count(html, "id='f0-0-gpPt0'"), 1, "figure ids must be unique");
    cr_assert_eq(rpt_count(html, "id='gpPt0'"), 0);
    free(html);
}

/* Appended to a copy of report.html (never to the report itself): after
 * layout, count the SVGs, those with at least 5 paths of non-zero drawn
 * size, and the table rows, into one line the DOM dump carries out. */
static const char rpt_probe[] =
    "<script>(function(){var s=document.querySelectorAll('svg'),d=0;"
    "s.forEach(function(g){var r=g.getBoundingClientRect(),k=0;"
    "g.querySelectorAll('path').forEach(function(p){var b=p.getBBox();if(b.width>0||b.height>0)k++;});"
    "if(r.width>100&&r.height>100&&k>=5)d++;});"
    "var rows=document.querySelectorAll('table.summary tr.case').length;"
    "var o=document.createElement('pre');o.id='pbcheck';"
    "o.textContent='PBCHECK svgs='+s.length+' drawn='+d+' rows='+rows+' END';"
    "document.body.appendChild(o);})();</script>";

Test(report, browser_renders_figures_and_tables)
{
    char dir[256], err[8192], path[600], url[700], shot[700];
    rpt_make_run(dir, sizeof dir);
    int rc = rpt_report(dir, NULL, err, sizeof err);
    cr_assert_eq(rc, 0, "rc %d: %s", rc, err);

    snprintf(path, sizeof path, "%s/report.html", dir);
    char *d = pbt_browser_dom(path, rpt_probe, dir);
    char *line = strstr(d, "<pre id=\"pbcheck\">");
    cr_assert_not_null(line, "the page's probe did not run");
    int svgs = -1, drawn = -1, rows = -1;
    cr_assert_eq(sscanf(line, "<pre id=\"pbcheck\">PBCHECK svgs=%d drawn=%d rows=%d", &svgs, &drawn, &rows), 3,
                 "%.200s", line);
    cr_assert_eq(svgs, PB_FIG_COUNT, "inline SVGs: %d", svgs);
    cr_assert_eq(drawn, PB_FIG_COUNT, "SVGs with plotted paths of non-zero size: %d of %d", drawn, svgs);
    cr_assert_eq(rows, 8, "table rows: %d (8 cases in the run)", rows);
    free(d);

    /* screenshot of the report itself, kept in the run directory; a page
     * with figures must compress far worse than an empty page of that size */
    snprintf(url, sizeof url, "file://%s", path);
    snprintf(shot, sizeof shot, "--screenshot=%s/report.png", dir);
    const char *a2[] = {"--window-size=1200,2400", shot, url, NULL};
    char devnull[600];
    snprintf(devnull, sizeof devnull, "%s/chromium.out", dir);
    rc = pbt_chromium(a2, devnull, err, sizeof err);
    cr_assert_eq(rc, 0, "screenshot failed (status %d): %s", rc, err);
    char blank[600], bshot[700], burl[700];
    snprintf(blank, sizeof blank, "%s/blank.html", dir);
    FILE *f = fopen(blank, "w");
    cr_assert_not_null(f);
    fputs("<!DOCTYPE html><html><body></body></html>\n", f);
    fclose(f);
    snprintf(burl, sizeof burl, "file://%s", blank);
    snprintf(bshot, sizeof bshot, "--screenshot=%s/blank.png", dir);
    const char *a3[] = {"--window-size=1200,2400", bshot, burl, NULL};
    rc = pbt_chromium(a3, devnull, err, sizeof err);
    cr_assert_eq(rc, 0, "blank screenshot failed (status %d): %s", rc, err);
    char rp[600], bp[600];
    snprintf(rp, sizeof rp, "%s/report.png", dir);
    snprintf(bp, sizeof bp, "%s/blank.png", dir);
    long rs = rpt_size(rp), bs = rpt_size(bp);
    cr_assert(bs > 0, "no blank screenshot");
    cr_assert(rs > 20 * bs && rs > 100000, "report.png %ld bytes vs empty page %ld: nothing rendered?", rs, bs);
}

/* ---- figure file names (bench/store/figure_names.c) ---- */

/* Two cases named a and b (NULL: only a) of our own invented orbits, a
 * normalized ellipse of e = 0.1 and 0.3 over 5 periods, into dir/p.ini;
 * the file's path in ini. */
static void rpt_write_ini(const char *dir, const char *a, const char *b, char *ini, size_t len)
{
    snprintf(ini, len, "%s/p.ini", dir);
    FILE *f = fopen(ini, "w");
    cr_assert_not_null(f, "cannot write %s", ini);
    fprintf(f, "[case %s]\nunits = normalized\na = 1\ne = 0.1\norbits = 5\n", a);
    if (b)
        fprintf(f, "\n[case %s]\nunits = normalized\na = 1\ne = 0.3\norbits = 5\n", b);
    fclose(f);
}

/* Sweep every case of ini with RK4 at 100 steps per period into run. */
static void rpt_sweep_ini(const char *ini, const char *run)
{
    char out[4096], err[8192];
    const char *args[] = {"sweep", "--problem-file", ini, "--methods", "rk4", "--steps-per-orbit", "100",
                          "--repeats", "0", "--quiet", "--out", run, NULL};
    int rc = pbt_run_cli(args, out, sizeof out, err, sizeof err);
    cr_assert_eq(rc, 0, "sweep of %s failed (%d): %s", ini, rc, err);
}

/* Files in run/plots whose names start with prefix and end with suffix
 * ("" matches any); -1 when there is no plots folder. */
static int rpt_plots_count(const char *run, const char *prefix, const char *suffix)
{
    char path[600];
    snprintf(path, sizeof path, "%s/plots", run);
    DIR *d = opendir(path);
    if (!d)
        return -1;
    int n = 0;
    size_t lp = strlen(prefix), ls = strlen(suffix);
    for (struct dirent *e; (e = readdir(d));) {
        size_t l = strlen(e->d_name);
        if (e->d_name[0] != '.' && l >= lp + ls && !strncmp(e->d_name, prefix, lp) &&
            !strcmp(e->d_name + l - ls, suffix))
            n++;
    }
    closedir(d);
    return n;
}

/* 1 if path is a PNG of more than a few kilobytes (a drawn figure). */
static int rpt_is_png(const char *path)
{
    unsigned char magic[8] = {0};
    FILE *f = fopen(path, "rb");
    if (!f)
        return 0;
    size_t n = fread(magic, 1, 8, f);
    fclose(f);
    return n == 8 && !memcmp(magic, "\x89PNG\r\n\x1a\n", 8) && rpt_size(path) > 5000;
}

/* Two problem-file case names whose folded stems share the 8-digit hash:
 * found by enumerating 'x' + 20 characters of '+' or '_' (2^20 names, so a
 * shared 32-bit hash is expected by the birthday bound). */
static const char rpt_clash_a[] = "x__+++___+_+++_++++__", rpt_clash_b[] = "x____+++++_+++++__+_+";

/* The names themselves: a safe name is kept (so existing reports keep
 * their file names), any other is folded and marked with '~' and a hash,
 * and no name can leave plots/ or start with the kind's '-'. */
Test(report, figure_names_kept_or_folded_with_a_hash)
{
    char a[PB_FIG_BASE_MAX], b[PB_FIG_BASE_MAX];
    pb_fig_base("kepler-e0.6", PB_FIG_ENERGY, a, sizeof a);
    cr_assert_str_eq(a, "kepler-e0.6-energy");
    pb_fig_base("x_y", PB_FIG_CONV, a, sizeof a);
    cr_assert_str_eq(a, "x_y-convergence");
    pb_fig_base("-V", PB_FIG_RIC, a, sizeof a);
    cr_assert_str_eq(a, "-V-ric");

    pb_fig_base("x+y", PB_FIG_ENERGY, a, sizeof a);
    unsigned h = 0;
    char tail[32] = "";
    cr_assert_eq(sscanf(a, "x_y~%8x-%31s", &h, tail), 2, "%s", a);
    cr_assert_eq(strlen(a), strlen("x_y~12345678-energy"), "%s", a);
    cr_assert_str_eq(tail, "energy");
    pb_fig_base("x+y", PB_FIG_GROWTH, b, sizeof b);
    cr_assert_eq(strncmp(a, b, strlen("x_y~12345678-")), 0, "%s vs %s: one stem per problem", a, b);

    static const char *const odd[] = {"../../etc", ".hidden", "a/b", "", "x y'z"};
    for (size_t k = 0; k < sizeof odd / sizeof odd[0]; k++) {
        pb_fig_stem(odd[k], a, sizeof a);
        cr_assert(!strchr(a, '/') && a[0] != '.' && a[0] != '-' && !strchr(a, '\'') && strchr(a, '~'),
                  "'%s' -> '%s'", odd[k], a);
    }
    char longname[400];
    memset(longname, 'a', sizeof longname - 1);
    longname[sizeof longname - 1] = 0;
    pb_fig_base(longname, PB_FIG_CONV, a, sizeof a);
    longname[200] = 0;
    pb_fig_base(longname, PB_FIG_CONV, b, sizeof b);
    cr_assert(strlen(a) < PB_FIG_BASE_MAX - 1 && strcmp(a, b), "cut names must still differ: %s", a);

    pb_fig_stem(rpt_clash_a, a, sizeof a);
    pb_fig_stem(rpt_clash_b, b, sizeof b);
    cr_assert_str_eq(a, b, "the test pair no longer collides; find another for clash_refused");
}

/* A rerun into a folder whose report drew a problem named "x+y" removes
 * every file that report made for it: 6 figures x (script, log, PNG, SVG),
 * then the emptied plots/ folder itself. */
Test(report, rerun_removes_figures_of_a_folded_name)
{
    char dir[256], run[400], ini[400], out[4096], err[8192];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    rpt_write_ini(dir, "x+y", NULL, ini, sizeof ini);
    const char *first[] = {"run", "--problem-file", ini, "--method", "rk4", "--steps-per-orbit", "100",
                           "--repeats", "0", "--quiet", "--out", run, NULL};
    cr_assert_eq(pbt_run_cli(first, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_assert_eq(rpt_report(run, NULL, err, sizeof err), 0, "%s", err);
    char stem[PB_FIG_BASE_MAX];
    pb_fig_stem("x+y", stem, sizeof stem);
    /* a script and two images per figure; a log only where gnuplot said something */
    static const char *const ext[] = {".gp", ".png", ".svg"};
    for (int k = 0; k < 3; k++)
        cr_assert_eq(rpt_plots_count(run, stem, ext[k]), PB_FIG_COUNT, "%s files of %s", ext[k], stem);
    int logs = rpt_plots_count(run, stem, ".log");
    cr_assert_eq(rpt_plots_count(run, stem, ""), 3 * PB_FIG_COUNT + logs, "figure files of %s", stem);
    cr_assert_eq(rpt_plots_count(run, "", ""), 3 * PB_FIG_COUNT + logs + 1,
                 "plots/ holds more than x+y's and style.gp");

    const char *again[] = {"run", "--problem", "kepler-e0", "--method", "rk4", "--steps-per-orbit", "100",
                           "--orbits", "2", "--repeats", "0", "--quiet", "--out", run, NULL};
    cr_assert_eq(pbt_run_cli(again, out, sizeof out, err, sizeof err), 0, "%s", err);
    int left = rpt_plots_count(run, "", "");
    cr_assert_eq(left, -1, "%d files of the earlier report left in %s/plots", left, run);
}

/* "x+y" and "x_y" fold to the same characters but are two problems: each
 * gets its own 6 figures, and report.md links each to its own. */
Test(report, folded_names_get_their_own_figures)
{
    char dir[256], run[400], ini[400], err[8192], path[800];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    rpt_write_ini(dir, "x+y", "x_y", ini, sizeof ini);
    rpt_sweep_ini(ini, run);
    cr_assert_eq(rpt_report(run, NULL, err, sizeof err), 0, "%s", err);
    cr_assert_eq(rpt_plots_count(run, "", ".png"), 2 * PB_FIG_COUNT);
    snprintf(path, sizeof path, "%s/report.md", run);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert_not_null(md);
    static const char *const names[] = {"x+y", "x_y"};
    for (int p = 0; p < 2; p++)
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            char base[PB_FIG_BASE_MAX], link[300];
            pb_fig_base(names[p], k, base, sizeof base);
            snprintf(link, sizeof link, "](plots/%s.png)", base);
            cr_assert_eq(rpt_count(md, link), 1, "report.md links %s %d times", link, rpt_count(md, link));
            snprintf(path, sizeof path, "%s/plots/%s.png", run, base);
            cr_assert(rpt_is_png(path), "%s not drawn", path);
        }
    free(md);
}

/* Two problems whose stems still coincide (a shared hash) are refused
 * before anything is written: exit 2, both names in the message. */
Test(report, shared_figure_names_are_refused)
{
    char dir[256], run[400], ini[400], err[8192], path[800];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    rpt_write_ini(dir, rpt_clash_a, rpt_clash_b, ini, sizeof ini);
    rpt_sweep_ini(ini, run);
    cr_assert_eq(rpt_report(run, NULL, err, sizeof err), 2, "%s", err);
    cr_assert(strstr(err, rpt_clash_a) && strstr(err, rpt_clash_b) && strstr(err, "summary.json"), "%s", err);
    snprintf(path, sizeof path, "%s/plots", run);
    cr_assert(!pbt_exists(path), "plots/ written for a refused report");
    snprintf(path, sizeof path, "%s/report.html", run);
    cr_assert(!pbt_exists(path), "report.html written for a refused report");
}

/* A problem named "-V" gives figure scripts "-V-<kind>.gp", which gnuplot
 * would take for an option (and exit 0 without drawing): every figure of
 * it is drawn, and no unfinished .tmp is left. */
Test(report, problem_named_like_an_option_is_drawn)
{
    char dir[256], run[400], ini[400], err[8192], path[800];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    rpt_write_ini(dir, "-V", NULL, ini, sizeof ini);
    rpt_sweep_ini(ini, run);
    cr_assert_eq(rpt_report(run, NULL, err, sizeof err), 0, "%s", err);
    for (int k = 0; k < PB_FIG_COUNT; k++) {
        char base[PB_FIG_BASE_MAX];
        pb_fig_base("-V", k, base, sizeof base);
        snprintf(path, sizeof path, "%s/plots/%s.png", run, base);
        cr_assert(rpt_is_png(path), "%s not drawn", path);
        snprintf(path, sizeof path, "%s/plots/%s.svg", run, base);
        cr_assert(rpt_size(path) > 5000, "%s missing or tiny", path);
    }
    cr_assert_eq(rpt_plots_count(run, "", ".tmp"), 0);
}
