/* test_report_review.c - the report as a method review reads it: the
 * status column says what the console says (ok(sat), diverged at ...), no
 * best mark goes to a case that did not end plain ok, evaluations and CPU
 * time are marked on the work-precision front only, km problems get a
 * metres column, each problem's definition and the run's command are
 * stated, the summary names the cheapest case per error level, and
 * --methods/--problems report a subset. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "test_support.h"
#include "bench/report/table.h"
#include "bench/report/context.h"
#include "bench/store/figure_names.h"
#include <unistd.h>

TestSuite(review, .timeout = 240);

/* The front of cost against error (Pareto optimality, common practice):
 * a row is marked when no other counted row is no worse on both and better
 * on one. Row 2 is dominated by row 1, row 4 is not counted, row 5 ties
 * row 0 exactly (both kept: neither is better on either). */
Test(review, front_marks_cost_at_accuracy)
{
    const double cost[] = {10, 20, 30, 40, 1, 10};
    const double err[] = {1e-3, 1e-6, 1e-5, 1e-9, 1e-12, 1e-3};
    const int ok[] = {1, 1, 1, 1, 0, 1};
    int front[6];
    cr_assert_eq(pb_report_front(cost, err, ok, 6, front), 4);
    const int want[] = {1, 1, 0, 1, 0, 1};
    for (int i = 0; i < 6; i++)
        cr_assert_eq(front[i], want[i], "row %d", i);
    const int none[6] = {0};
    cr_assert_eq(pb_report_front(cost, err, none, 6, front), 0);
}

/* One line of s that starts with prefix (copied into line); 0 if none. */
static int rv_line(const char *s, const char *prefix, char *line, size_t len)
{
    for (const char *p = s; p && *p; p = strchr(p, '\n') ? strchr(p, '\n') + 1 : NULL)
        if (!strncmp(p, prefix, strlen(prefix))) {
            size_t n = strcspn(p, "\n");
            snprintf(line, len, "%.*s", (int)n, p);
            return 1;
        }
    return 0;
}

/* Leapfrog and RK4 on kepler-e0.9 (e = 0.9: the periapsis passage needs
 * far more than 1000 steps per orbit, so both saturate, and 200 steps
 * diverge in the first orbit; the run's own console table says so) and on
 * the km-s LEO problem, 20 orbits. */
static void rv_run(char *dir, size_t len)
{
    pbt_tmpdir(dir, len);
    char out[16384], err[8192];
    const char *args[] = {"sweep", "--problems", "kepler-e0.9,leo-near-circular", "--methods", "leapfrog,rk4",
                          "--steps-per-orbit", "200,1000", "--orbits", "20", "--repeats", "1",
                          "--out", dir, NULL};
    int rc = pbt_run_cli(args, out, sizeof out, err, sizeof err);
    cr_assert_eq(rc, 0, "sweep failed (%d): %s", rc, err);
    /* the console's wording is what the report must repeat */
    cr_assert(strstr(out, "kepler-e0.9        leapfrog        n=1000       ok(sat)"), "%s", out);
    cr_assert(strstr(out, "kepler-e0.9__rk4__n200__o20: diverged at t = 3.33009 TU (0.53 orbits)"), "%s", out);
}

Test(review, tables_say_what_the_console_says)
{
    char dir[256], out[4096], err[8192], path[600], line[2048];
    rv_run(dir, sizeof dir);
    const char *args[] = {"report", dir, "--no-plots", "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/report.md", dir);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert_not_null(md);
    cr_assert(rv_line(md, "| leapfrog | n=1000 |", line, sizeof line));
    cr_assert(strstr(line, "| ok(sat) |"), "%s", line);
    /* a saturated case is never marked, whatever its numbers */
    cr_assert_null(strstr(line, "**"), "a saturated case carries a best mark: %s", line);
    cr_assert(rv_line(md, "| rk4 | n=200 |", line, sizeof line));
    cr_assert(strstr(line, "| diverged at t = 3.33009 TU (0.53 orbits) |"), "%s", line);
    cr_assert_null(strstr(line, "**"), "%s", line);
    /* kepler-e0.9 has no case that ended plain ok: no mark in its table */
    char *leo = strstr(md, "\n## leo-near-circular");
    cr_assert_not_null(leo);
    char *kep = strstr(md, "\n## kepler-e0.9");
    cr_assert_not_null(kep);
    *leo = 0;
    cr_assert_null(strstr(kep, "| **"), "a mark in a table without a plain-ok case");
    *leo = '\n';
    /* metres where lengths are km; RK4 n=1000 has the lowest error (marked);
     * leapfrog n=200 is the cheapest (4001 evaluations): on the front */
    cr_assert(strstr(leo, "max position error [m] |"));
    cr_assert(rv_line(leo + 1, "| rk4 | n=1000 |", line, sizeof line));
    cr_assert(strstr(line, "| ok | "), "%s", line);
    double en = 0, km = 0, m = 0;
    char *c = strstr(line, "| ok | ");
    cr_assert_eq(sscanf(c, "| ok | **%lf** | **%lf** | **%lf** |", &en, &km, &m), 3, "%s", line);
    cr_assert_float_eq(m, 1e3 * km, 1e-3 * m, "metres %g against km %g", m, km);
    cr_assert(rv_line(leo + 1, "| leapfrog | n=200 |", line, sizeof line));
    cr_assert(strstr(line, "| **4001** |"), "%s", line);
    cr_assert(strstr(md, "no other case beats on both cost and position error"));
    free(md);
}

Test(review, orbit_run_and_summary_stated)
{
    char dir[256], out[4096], err[8192], path[600];
    rv_run(dir, sizeof dir);
    const char *args[] = {"report", dir, "--no-plots", "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/report.html", dir);
    char *html = pbt_slurp_file(path, NULL);
    cr_assert_not_null(html);
    /* kepler-e0.9's catalogue entry: a = 1, e = 0.9 from periapsis, mu = 1
     * (Hairer, Lubich & Wanner 2006, Ch. I's Kepler problem, normalized) */
    cr_assert(strstr(html, "a = 1 DU, e = 0.9, i = 0 deg"), "kepler-e0.9 elements missing");
    cr_assert(strstr(html, "r0 = (0.1, 0, 0) DU"));
    /* the LEO problem's mu: Earth's GM, 398600.4418 km^3/s^2 (IERS/WGS 84) */
    cr_assert(strstr(html, "<dt>mu</dt><dd>398600.4418</dd>"));
    cr_assert(strstr(html, "<dt>reference floor</dt>"));
    cr_assert(strstr(html, "class=\"orbit-definition\""));
    cr_assert(strstr(html, "<dt>command</dt><dd>") &&
              strstr(html, "sweep --problems kepler-e0.9,leo-near-circular --methods leapfrog,rk4"),
              "the sweep's command is not stated");
    cr_assert(strstr(html, "<dt>tool version</dt><dd>propbench "));
    /* the summary comes before the tables and only names plain-ok cases:
     * nothing reaches 1e-2 DU on kepler-e0.9; RK4 n=1000 (5.2e-5 km over
     * 20 orbits, printed by the sweep) is the cheapest at 1 m on LEO */
    char *sum = strstr(html, "<section id=\"summary\">"), *first = strstr(html, "<table class=\"summary\">");
    cr_assert(sum && first && sum < first);
    cr_assert(strstr(sum, "<tr><td class=\"l\">1e-2 DU</td><td class=\"l\" colspan=\"3\">no case"));
    cr_assert(strstr(sum, "<tr><td class=\"l\">1 m</td><td class=\"l\">rk4 n=1000</td><td>80001</td>"));
    free(html);

    /* a subset: only rk4 on LEO */
    const char *a2[] = {"report", dir, "--no-plots", "--quiet", "--methods", "rk4", "--problems",
                        "leo-near-circular", "--out", NULL, NULL};
    char sub[400];
    snprintf(sub, sizeof sub, "%s/sub", dir);
    a2[9] = sub;
    cr_assert_eq(pbt_run_cli(a2, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/report.md", sub);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert_not_null(md);
    cr_assert_null(strstr(md, "## kepler-e0.9"));
    cr_assert_null(strstr(md, "| leapfrog |"));
    cr_assert(strstr(md, "| rk4 | n=200 |"));
    free(md);
    const char *a3[] = {"report", dir, "--no-plots", "--methods", "rk4,nosuch", NULL};
    cr_assert_eq(pbt_run_cli(a3, out, sizeof out, err, sizeof err), 2);
    cr_assert(strstr(err, "--methods: 'nosuch' is no method of this run"), "%s", err);
}

/* The figures stand alone: every drawn SVG carries its legend (the method
 * names as text), the work-precision figure draws the requirement given
 * with --max-pos-err and labels its points with their step, time is in
 * orbits, no empty log stays in plots/, and a script redraws its images
 * under their final names with plain `gnuplot ./NAME.gp`. */
Test(review, figures_stand_alone)
{
    char dir[256], out[4096], err[8192], path[700];
    rv_run(dir, sizeof dir);
    const char *args[] = {"report", dir, "--quiet", "--max-pos-err", "0.001", NULL};
    cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 0, "%s", err);
    static const char *const probs[] = {"kepler-e0.9", "leo-near-circular"};
    int svgs = 0;
    for (int pi = 0; pi < 2; pi++)
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            snprintf(path, sizeof path, "%s/plots/%s-%s.svg", dir, probs[pi], pb_fig_kind(k));
            char *svg = pbt_slurp_file(path, NULL);
            if (!svg)
                continue;   /* e.g. no plain-ok case on kepler-e0.9: no work-precision figure */
            svgs++;
            cr_assert(strstr(svg, ">rk4") || strstr(svg, ">leapfrog"), "%s has no legend", path);
            free(svg);
            snprintf(path, sizeof path, "%s/plots/%s-%s.log", dir, probs[pi], pb_fig_kind(k));
            FILE *f = fopen(path, "r");
            if (f) {
                int c = fgetc(f);
                fclose(f);
                cr_assert_neq(c, EOF, "%s is empty", path);
            }
        }
    cr_assert_geq(svgs, 10, "only %d figures drawn", svgs);
    snprintf(path, sizeof path, "%s/plots/leo-near-circular-work.svg", dir);
    char *w = pbt_slurp_file(path, NULL);
    cr_assert_not_null(w);
    cr_assert(strstr(w, ">requirement 0.001 km<"), "no requirement line label");
    cr_assert(strstr(w, ">n=1000<") && strstr(w, ">n=200<"), "points not labelled with their step");
    cr_assert(strstr(w, "CPU time over the horizon [s]"), "no CPU-time panel");
    free(w);
    snprintf(path, sizeof path, "%s/plots/leo-near-circular-growth.svg", dir);
    w = pbt_slurp_file(path, NULL);
    cr_assert(w && strstr(w, ">time [orbits]<"));
    free(w);

    /* redraw by hand: final names, nothing temporary left */
    char png[700], cmd[1600];
    snprintf(png, sizeof png, "%s/plots/leo-near-circular-energy.png", dir);
    cr_assert_eq(unlink(png), 0);
    snprintf(cmd, sizeof cmd, "cd '%s/plots' && gnuplot ./leo-near-circular-energy.gp 2>/dev/null && "
             "! ls | grep -q '\\.tmp$'", dir);
    cr_assert_eq(system(cmd), 0, "gnuplot ./NAME.gp failed or left a temporary file");
    cr_assert(pbt_exists(png), "the redraw did not write %s", png);
}

/* Run in the page after layout: per figure whether a legend entry (a text
 * naming a method of the run) was rendered with a size; the saturated
 * row's status text and whether it holds a best mark; the rendered orbit
 * definitions. One line out through the DOM dump. */
static const char rv_probe[] =
    "<script>(function(){var figs=document.querySelectorAll('figure svg'),leg=0;"
    "figs.forEach(function(g){var ok=0;g.querySelectorAll('text').forEach(function(t){"
    "var b=t.getBBox();if(/^(rk4|leapfrog)( |$)/.test(t.textContent)&&b.width>0)ok=1;});leg+=ok;});"
    "var st='none',best=-1;document.querySelectorAll('table.summary tr.case').forEach(function(r){"
    "var c=r.querySelectorAll('td');if(c[0].textContent=='leapfrog'&&c[1].textContent=='n=1000'&&"
    "r.closest('section').id=='problem-0'){st=c[2].textContent;best=r.querySelectorAll('td.best').length;}});"
    "var defs=0;document.querySelectorAll('.orbit-definition').forEach(function(d){"
    "if(d.getBoundingClientRect().height>0&&/elements \\(osculating/.test(d.textContent))defs++;});"
    "var o=document.createElement('pre');o.id='rvcheck';"
    "o.textContent='RV figs='+figs.length+' legends='+leg+' status='+st+' best='+best+' defs='+defs+' END';"
    "document.body.appendChild(o);})();</script>";

Test(review, browser_shows_status_legends_and_orbit)
{
    char dir[256], out[4096], err[8192], path[600];
    rv_run(dir, sizeof dir);
    const char *args[] = {"report", dir, "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(args, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/report.html", dir);
    size_t n = 0;
    char *html = pbt_slurp_file(path, &n);
    cr_assert_not_null(html);
    free(html);
    /* the size limit the issue sets for report.html (3 MB) */
    cr_assert_lt(n, 3000000, "report.html is %zu bytes", n);
    char *d = pbt_browser_dom(path, rv_probe, dir);
    char *line = strstr(d, "<pre id=\"rvcheck\">");
    cr_assert_not_null(line, "the probe did not run");
    line += strlen("<pre id=\"rvcheck\">");
    int figs = -1, legends = -1, best = -2, defs = -1;
    char status[64] = "";
    cr_assert_eq(sscanf(line, "RV figs=%d legends=%d status=%63s best=%d defs=%d", &figs, &legends, status,
                        &best, &defs), 5, "%.200s", line);
    cr_assert_geq(figs, 10, "%.200s", line);
    cr_assert_eq(legends, figs, "figures with a rendered legend: %d of %d", legends, figs);
    cr_assert_str_eq(status, "ok(sat)");
    cr_assert_eq(best, 0, "the saturated case carries %d best marks", best);
    cr_assert_eq(defs, 2, "rendered orbit definitions: %d of 2", defs);
    free(d);
}

/* Every built-in method at three steps or tolerances on kepler-e0.5 (84
 * cases, 5 orbits, untimed): the time figures become small multiples of at
 * most 8 curves with a legend each, and report.html stays under the issue's
 * 3 MB by linking the figures once their SVG passes 2.5 MB in all (as here:
 * 2.51 MB when written) or when --external-figures asks. */
Test(review, many_methods_small_multiples_and_size)
{
    char dir[256], out[16384], err[8192], path[700], methods[2048] = "";
    pbt_tmpdir(dir, sizeof dir);
    const char *la[] = {"list", "methods", NULL};
    cr_assert_eq(pbt_run_cli(la, out, sizeof out, err, sizeof err), 0, "%s", err);
    for (char *l = strchr(out, '\n'); l && l[1]; l = strchr(l + 1, '\n')) {
        size_t k = strcspn(l + 1, " \t\n");
        if (k)
            snprintf(methods + strlen(methods), sizeof methods - strlen(methods), "%s%.*s",
                     methods[0] ? "," : "", (int)k, l + 1);
    }
    const char *sw[] = {"sweep", "--problems", "kepler-e0.5", "--methods", methods, "--steps-per-orbit",
                        "200,400,800", "--tolerances", "1e-7,1e-9,1e-11", "--orbits", "5", "--repeats", "0",
                        "--quiet", "--out", dir, NULL};
    cr_assert_eq(pbt_run_cli(sw, out, sizeof out, err, sizeof err), 0, "%s", err);
    const char *rp[] = {"report", dir, "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(rp, out, sizeof out, err, sizeof err), 0, "%s", err);
    long svg_total = 0;
    for (int k = 0; k < PB_FIG_COUNT; k++) {
        size_t n = 0;
        snprintf(path, sizeof path, "%s/plots/kepler-e0.5-%s.svg", dir, pb_fig_kind(k));
        char *svg = pbt_slurp_file(path, &n);
        cr_assert_not_null(svg, "%s missing", path);
        svg_total += (long)n;
        cr_assert(strstr(svg, ">rk4") && (k == PB_FIG_CONV || strstr(svg, ">dop853")), "%s lacks a legend entry", path);
        if (k == PB_FIG_ENERGY)
            cr_assert(strstr(svg, "panels of at most 8 curves"), "no small multiples in %s", path);
        free(svg);
    }
    /* work-precision: a row of two panels per group of at most 8 methods */
    snprintf(path, sizeof path, "%s/plots/kepler-e0.5-work.gp", dir);
    char *gp = pbt_slurp_file(path, NULL);
    cr_assert_not_null(gp);
    const char *lay = strstr(gp, "set multiplot layout ");
    int rows = 0, cols = 0;
    cr_assert(lay && sscanf(lay, "set multiplot layout %d,%d", &rows, &cols) == 2, "no panels in %s", path);
    cr_assert(rows >= 2 && cols == 2, "work-precision in %d x %d panels", rows, cols);
    free(gp);
    snprintf(path, sizeof path, "%s/report.html", dir);
    size_t n = 0;
    char *html = pbt_slurp_file(path, &n);
    cr_assert_not_null(html);
    cr_assert_lt(n, 3000000, "report.html is %zu bytes", n);
    if (svg_total > 2500000) {
        cr_assert(strstr(html, "are linked from plots/, not inlined"));
        cr_assert_eq(strstr(html, "<svg") != NULL, 0);
    }
    free(html);
    const char *ex[] = {"report", dir, "--quiet", "--external-figures", NULL};
    cr_assert_eq(pbt_run_cli(ex, out, sizeof out, err, sizeof err), 0, "%s", err);
    html = pbt_slurp_file(path, &n);
    cr_assert_not_null(html);
    cr_assert_null(strstr(html, "<svg"));
    int imgs = 0;
    for (const char *s = html; (s = strstr(s, "<img src=\"plots/kepler-e0.5-")); s++)
        imgs++;
    cr_assert_eq(imgs, PB_FIG_COUNT, "%d linked figures", imgs);
    free(html);
}

/* A problem-file case is not in the catalogue: its definition travels in
 * summary.json ("problem_def") and the report states it. The values are
 * the file's own (a = 1, e = 0.1 written here), read back. */
Test(review, problem_file_orbit_stated)
{
    char dir[256], ini[400], run[400], out[4096], err[8192], path[600];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(ini, sizeof ini, "%s/p.ini", dir);
    FILE *f = fopen(ini, "w");
    cr_assert_not_null(f);
    fputs("[case own-ellipse]\ndescription = our own test ellipse\nunits = normalized\na = 1\ne = 0.1\n"
          "orbits = 3\n", f);
    fclose(f);
    snprintf(run, sizeof run, "%s/run", dir);
    const char *sw[] = {"sweep", "--problem-file", ini, "--methods", "rk4", "--steps-per-orbit", "100",
                        "--repeats", "0", "--quiet", "--out", run, NULL};
    cr_assert_eq(pbt_run_cli(sw, out, sizeof out, err, sizeof err), 0, "%s", err);
    const char *rp[] = {"report", run, "--no-plots", "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(rp, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/report.md", run);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert_not_null(md);
    cr_assert(strstr(md, "- description: our own test ellipse\n"), "%s", md);
    cr_assert(strstr(md, "- elements (osculating at t0): a = 1 DU, e = 0.1, i = 0 deg"), "%s", md);
    cr_assert(strstr(md, "- horizon: 3 orbits"));
    cr_assert_null(strstr(md, "does not carry its definition"));
    free(md);
}

/* A select run for the same problem saved in the run folder: the summary
 * quotes its first-ranked answer and the work-precision figure draws its
 * requirement (1e-3 km here) without --max-pos-err. */
Test(review, select_answer_and_requirement_from_the_folder)
{
    char dir[256], out[8192], err[8192], path[700], sel[600];
    rv_run(dir, sizeof dir);
    snprintf(sel, sizeof sel, "%s/select-leo.json", dir);
    const char *se[] = {"select", "--problem", "leo-near-circular", "--orbits", "20", "--max-pos-err", "1e-3",
                        "--methods", "rk4,leapfrog", "-j", "1", "--quiet", "--out", sel, NULL};
    cr_assert_eq(pbt_run_cli(se, out, sizeof out, err, sizeof err), 0, "%s", err);
    json_t *doc = json_load_file(sel, 0, NULL);
    cr_assert_not_null(doc);
    json_t *first = json_array_get(json_object_get(doc, "ranking"), 0);
    char want[256];
    snprintf(want, sizeof want, "%s n=%lld: %lld evaluations", json_string_value(json_object_get(first, "method")),
             (long long)json_integer_value(json_object_get(first, "steps_per_orbit")),
             (long long)json_integer_value(json_object_get(first, "evals")));
    json_decref(doc);
    const char *rp[] = {"report", dir, "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(rp, out, sizeof out, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/report.html", dir);
    char *html = pbt_slurp_file(path, NULL);
    cr_assert_not_null(html);
    cr_assert(strstr(html, "select's answer for a largest position error of 0.001 km: "), "no select answer");
    cr_assert(strstr(html, want), "the answer %s is not quoted", want);
    free(html);
    snprintf(path, sizeof path, "%s/plots/leo-near-circular-work.svg", dir);
    char *w = pbt_slurp_file(path, NULL);
    cr_assert(w && strstr(w, ">requirement 0.001 km<"), "the select requirement is not drawn");
    free(w);
}

/* Sweep methods on kepler-e0.5 at 100 steps an orbit for 2 orbits into
 * run (a folder under a fresh scratch folder), report it without figures
 * and return report.html, cut after its summary section, whose start is
 * *sum (the caller frees the returned text). */
static char *review_summary_of(const char *methods, char *run, size_t n, char **sum)
{
    char dir[256], path[340], o[4096], e[4096];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, n, "%s/run", dir);
    const char *sw[] = {"sweep", "--problems", "kepler-e0.5", "--methods", methods,
                        "--steps-per-orbit", "100", "--orbits", "2", "--repeats", "0", "--quiet",
                        "--out", run, NULL};
    cr_assert_eq(pbt_run_cli(sw, o, sizeof o, e, sizeof e), 0, "%s", e);
    const char *rp[] = {"report", run, "--no-plots", "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(rp, o, sizeof o, e, sizeof e), 0, "%s", e);
    snprintf(path, sizeof path, "%s/report.html", run);
    char *html = pbt_slurp_file(path, NULL);
    cr_assert_not_null(html);
    char *s = strstr(html, "id=\"summary\""), *end = s ? strstr(s, "</section>") : NULL;
    cr_assert(s && end);
    *end = 0;
    *sum = s;
    return html;
}

/* On a problem whose whole force is the central one, a Kepler-flow
 * splitting map (kepler-split2: its map is that flow) wins the summary's
 * error levels by construction; both summaries say so beside it, and not
 * beside rk4. */
Test(review, summary_marks_a_win_by_construction, .timeout = 120)
{
    char run[300], path[340], *sum;
    char *html = review_summary_of("kepler-split2,rk4", run, sizeof run, &sum);
    char *hit = strstr(sum, "kepler-split2 n=100");
    cr_expect(hit && strstr(hit, "by construction"), "no note beside kepler-split2's win");
    free(html);
    snprintf(path, sizeof path, "%s/report.md", run);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert_not_null(md);
    hit = strstr(md, "kepler-split2 n=100");
    cr_expect(hit && strstr(hit, "exact by construction"), "report.md: no note beside kepler-split2");
    free(md);
}

/* A regularized method (yoshida6-tt) that wins the levels is not exact: its
 * error is its own (in time along the Kepler ellipse), so no note. */
Test(review, summary_notes_no_construction_for_a_regularized_win, .timeout = 120)
{
    char run[300], *sum;
    char *html = review_summary_of("yoshida6-tt,rk4", run, sizeof run, &sum);
    cr_expect(strstr(sum, "yoshida6-tt n=100"), "yoshida6-tt does not win a level");
    cr_expect(!strstr(sum, "by construction"), "a note beside a method that is not exact");
    free(html);
}

/* The standard suite runs kepler-split2 on kepler-e0.5 at one step: the
 * convergence figure draws no slope line from that one point (it would
 * suggest an error law an exact map does not have), and draws rk4's. */
Test(review, convergence_has_no_slope_from_one_step, .timeout = 120)
{
    char dir[256], run[300], path[340], o[4096], e[4096];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    const char *sw[] = {"sweep", "--suite", "standard", "--problems", "kepler-e0.5", "--methods",
                        "kepler-split2,rk4", "--repeats", "0", "--quiet", "--out", run, NULL};
    cr_assert_eq(pbt_run_cli(sw, o, sizeof o, e, sizeof e), 0, "%s", e);
    const char *rp[] = {"report", run, "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(rp, o, sizeof o, e, sizeof e), 0, "%s", e);
    snprintf(path, sizeof path, "%s/plots/kepler-e0.5-convergence.gp", run);
    char *gp = pbt_slurp_file(path, NULL);
    cr_assert_not_null(gp);
    /* rk4's order is 4, kepler-split2's 2; the figure's panels each draw rk4's */
    cr_expect(strstr(gp, "title 'slope 4'"), "no slope line for rk4");
    cr_expect(!strstr(gp, "title 'slope 2'"), "a slope line from kepler-split2's one step");
    free(gp);
    /* only exact maps, every point at one step: gnuplot draws the panel
     * without a warning of an empty x range (a .log beside the figure would hold it) */
    const char *sw2[] = {"sweep", "--suite", "standard", "--problems", "kepler-e0.5", "--methods",
                         "kepler-split2,kepler-split4", "--repeats", "0", "--quiet", "--out", run, NULL};
    cr_assert_eq(pbt_run_cli(sw2, o, sizeof o, e, sizeof e), 0, "%s", e);
    cr_assert_eq(pbt_run_cli(rp, o, sizeof o, e, sizeof e), 0, "%s", e);
    snprintf(path, sizeof path, "%s/plots/kepler-e0.5-convergence.log", run);
    char *log = pbt_slurp_file(path, NULL);
    cr_expect_null(log, "gnuplot said: %s", log ? log : "");
    free(log);
}
