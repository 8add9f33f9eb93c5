/* verb_report.c - `propbench report RUN_DIR`: gnuplot scripts and figures per
 * problem, then report.html (self-contained) and report.md, from a run
 * directory's summary.json and series CSVs. */
#include <getopt.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "bench/cli/cli.h"
#include "bench/report/report_data.h"
#include "bench/report/gnuplot_runner.h"
#include "bench/report/figure_scripts.h"
#include "bench/report/table.h"
#include "bench/store/run_dir.h"

static void report_help(FILE *f)
{
    fprintf(f,
"usage: propbench report RUN_DIR [--out DIR] [--gnuplot PROG] [--no-plots] [--quiet]\n\n"
"Draw the figures of a run and write DIR/report.html (self-contained: inline\n"
"SVG, no scripts, no network) and DIR/report.md (tables, links to the PNGs).\n"
"Per problem: energy and angular-momentum error against time, position error\n"
"growth with its fitted law, radial/along-track/cross-track error,\n"
"work-precision (error against evaluations) and convergence (error against\n"
"step, with reference slopes). Scripts and data go to DIR/plots/ first, so\n"
"the figures can be redrawn elsewhere with `gnuplot ./NAME.gp` in that folder.\n"
"  --out DIR       where report.* and plots/ go (default RUN_DIR)\n"
"  --gnuplot PROG  gnuplot program (default $PB_GNUPLOT or gnuplot in PATH)\n"
"  --no-plots      write scripts, tables and report without running gnuplot\n"
"exit status: 0 written (a missing gnuplot is a warning), 1 gnuplot failed on\n"
"a figure, 2 bad input (unreadable or invalid summary.json)\n");
}

enum { RP_OUT = 400, RP_GNUPLOT, RP_NOPLOTS, RP_QUIET, RP_HELP };

/* The run's name for titles: its summary's sweep name, else the folder name. */
static const char *report_title(const pb_report_run *run, const char *dir, char *buf, size_t len)
{
    const char *s = json_string_value(json_object_get(run->doc, "sweep"));
    char tmp[PATH_MAX];
    snprintf(tmp, sizeof tmp, "%s", dir);
    size_t n = strlen(tmp);
    while (n > 1 && tmp[n - 1] == '/')
        tmp[--n] = 0;
    const char *slash = strrchr(tmp, '/');
    snprintf(buf, len, "%s%s%s%s", slash ? slash + 1 : tmp, s ? " (" : "", s ? s : "", s ? ")" : "");
    return buf;
}

int pb_cli_report(int argc, char **argv)
{
    static const struct option opts[] = {
        {"out", required_argument, 0, RP_OUT}, {"gnuplot", required_argument, 0, RP_GNUPLOT},
        {"no-plots", no_argument, 0, RP_NOPLOTS}, {"quiet", no_argument, 0, RP_QUIET},
        {"help", no_argument, 0, RP_HELP}, {0, 0, 0, 0}};
    const char *out = NULL, *prog = getenv("PB_GNUPLOT");
    int quiet = 0, noplots = 0;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        switch (c) {
        case RP_OUT: out = optarg; break;
        case RP_GNUPLOT: prog = optarg; break;
        case RP_NOPLOTS: noplots = 1; break;
        case RP_QUIET: quiet = 1; break;
        case RP_HELP: report_help(stdout); return PB_EXIT_OK;
        case ':': return pb_cli_error("report", "option %s needs a value", argv[optind - 1]);
        default: return pb_cli_error("report", "unknown option '%s' (see propbench report --help)", argv[optind - 1]);
        }
    }
    if (optind >= argc)
        return pb_cli_error("report", "give the run directory (see propbench report --help)");
    if (optind + 1 < argc)
        return pb_cli_error("report", "unexpected argument '%s'", argv[optind + 1]);
    const char *dir = argv[optind];
    if (!out)
        out = dir;
    if (!prog || !*prog)
        prog = "gnuplot";

    pb_report_run run;
    char err[1024] = "";
    if (pb_report_load(dir, &run, err, sizeof err))
        return pb_cli_error("report", "%s", err);

    int rc = PB_EXIT_USAGE;
    unsigned char *made = calloc((size_t)run.nproblems * PB_FIG_COUNT, 1);
    unsigned char *drawn = calloc((size_t)run.nproblems * PB_FIG_COUNT, 1);
    char plots[PATH_MAX + 16], rdir[PATH_MAX], odir[PATH_MAX], prefix[PATH_MAX + 2], title[512];
    if (!made || !drawn) {
        pb_cli_error("report", "out of memory");
        goto done;
    }
    /* the report's own files must be writable before any script is */
    static const char *const outputs[] = {"report.html", "report.md"};
    for (int i = 0; i < 2; i++) {
        char f[PATH_MAX + 16];
        snprintf(f, sizeof f, "%s/%s", out, outputs[i]);
        if (pb_path_blocked(f)) {
            pb_cli_error("report", "%s is there and is not a file: the report could not be written", f);
            goto done;
        }
    }
    snprintf(plots, sizeof plots, "%s/plots", out);
    if (pb_mkdirs(plots) || !realpath(dir, rdir) || !realpath(out, odir)) {
        pb_cli_error("report", "%s: cannot create the plots folder", plots);
        goto done;
    }
    /* scripts reach the data relative to plots/ when the report sits in the run */
    if (!strcmp(rdir, odir))
        snprintf(prefix, sizeof prefix, "../");
    else
        snprintf(prefix, sizeof prefix, "%s/", rdir);
    if (pb_report_gp_write(&run, dir, plots, prefix, made, err, sizeof err)) {
        pb_cli_error("report", "%s", err);
        goto done;
    }
    rc = PB_EXIT_OK;
    const char *why = NULL;
    char exe[PATH_MAX], whybuf[PATH_MAX + 64];
    if (noplots) {
        why = "--no-plots was given";
    } else if (pb_report_gnuplot_find(prog, exe, sizeof exe)) {
        snprintf(whybuf, sizeof whybuf, "gnuplot was not found (looked for '%s')", prog);
        why = whybuf;
        fprintf(stderr, "propbench report: warning: %s; figures not drawn. The data and gnuplot scripts "
                "are in %s: install gnuplot (Debian: gnuplot-nox) and run `gnuplot ./NAME.gp` there, "
                "or run propbench report again.\n", why, plots);
    } else {
        int failed = 0;
        for (int pi = 0; pi < run.nproblems; pi++)
            for (int k = 0; k < PB_FIG_COUNT; k++) {
                if (!made[pi * PB_FIG_COUNT + k])
                    continue;
                char base[PB_FIG_BASE_MAX];
                pb_fig_base(run.problems[pi].name, k, base, sizeof base);
                if (pb_report_gnuplot_run(exe, plots, base, err, sizeof err)) {
                    fprintf(stderr, "propbench report: warning: %s\n", err);
                    failed++;
                } else {
                    drawn[pi * PB_FIG_COUNT + k] = 1;
                }
            }
        if (failed) {
            snprintf(whybuf, sizeof whybuf, "gnuplot failed on %d figure%s", failed, failed == 1 ? "" : "s");
            why = whybuf;
            rc = PB_EXIT_FAIL;
        }
    }
    pb_report_view v = {&run, out, report_title(&run, dir, title, sizeof title), made, drawn, why};
    int html_bad = pb_report_html_write(&v, err, sizeof err);
    if (html_bad || pb_report_md_write(&v, err, sizeof err)) {
        if (!html_bad) {
            /* the new report.html without its report.md is a half-written report */
            char html[PATH_MAX + 16];
            snprintf(html, sizeof html, "%s/report.html", out);
            unlink(html);
        }
        pb_cli_error("report", "%s", err);
        rc = PB_EXIT_USAGE;
        goto done;
    }
    if (!quiet)
        printf("wrote %s/report.html\n", out);
done:
    free(made);
    free(drawn);
    pb_report_free(&run);
    return rc;
}
