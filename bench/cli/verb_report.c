/* verb_report.c - `propbench report RUN_DIR`: gnuplot scripts and figures per
 * problem, then report.html (self-contained) and report.md, from a run
 * directory's summary.json and series CSVs. */
#include <errno.h>
#include <getopt.h>
#include <limits.h>
#include <math.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "bench/cli/cli.h"
#include "bench/report/report_data.h"
#include "bench/report/gnuplot_runner.h"
#include "bench/report/figure_scripts.h"
#include "bench/report/html.h"
#include "bench/report/markdown.h"
#include "bench/report/context.h"
#include "bench/store/run_dir.h"

static void report_help(FILE *f)
{
    fprintf(f,
"usage: propbench report RUN_DIR [--out DIR] [--methods M,..] [--problems P,..]\n"
"                       [--max-pos-err E] [--external-figures] [--gnuplot PROG]\n"
"                       [--no-plots] [--quiet]\n\n"
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
"  --methods M,..  --problems P,..  report only these methods and problems of the run\n"
"  --max-pos-err E draw the requirement E (the problem's length unit) on the\n"
"                  work-precision figures (else a select answer's, if any)\n"
"  --external-figures  link the SVG figures from report.html instead of\n"
"                  inlining them (a smaller page; keep plots/ beside it)\n"
"  --quiet         no progress on stderr, no closing line\n"
"exit status: 0 written (a missing gnuplot is a warning), 1 gnuplot failed on\n"
"a figure, 2 bad input (unreadable or invalid summary.json)\n");
}

enum { RP_OUT = 400, RP_GNUPLOT, RP_NOPLOTS, RP_QUIET, RP_HELP, RP_METHODS, RP_PROBLEMS, RP_EXT, RP_REQ };

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

typedef struct report_opts {
    const char *dir, *out, *prog, *methods, *problems;
    int quiet, noplots, external;
    double max_pos_err;           /* 0: none given */
} report_opts;

/* Options into o; -1 (help printed, o->dir NULL) or PB_EXIT_USAGE on a bad
 * command line, 0 to go on. */
static int report_parse(int argc, char **argv, report_opts *o)
{
    static const struct option opts[] = {
        {"out", required_argument, 0, RP_OUT}, {"gnuplot", required_argument, 0, RP_GNUPLOT},
        {"no-plots", no_argument, 0, RP_NOPLOTS}, {"quiet", no_argument, 0, RP_QUIET},
        {"methods", required_argument, 0, RP_METHODS}, {"problems", required_argument, 0, RP_PROBLEMS},
        {"external-figures", no_argument, 0, RP_EXT}, {"max-pos-err", required_argument, 0, RP_REQ},
        {"help", no_argument, 0, RP_HELP}, {0, 0, 0, 0}};
    memset(o, 0, sizeof *o);
    o->prog = getenv("PB_GNUPLOT");
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        switch (c) {
        case RP_OUT: o->out = optarg; break;
        case RP_GNUPLOT: o->prog = optarg; break;
        case RP_NOPLOTS: o->noplots = 1; break;
        case RP_QUIET: o->quiet = 1; break;
        case RP_HELP: report_help(stdout); return -1;
        case RP_METHODS: o->methods = optarg; break;
        case RP_PROBLEMS: o->problems = optarg; break;
        case RP_EXT: o->external = 1; break;
        case RP_REQ:
            if (pb_cli_double("report", "--max-pos-err", optarg, &o->max_pos_err)) return PB_EXIT_USAGE;
            if (!(o->max_pos_err > 0))
                return pb_cli_error("report", "--max-pos-err must be positive, got '%s'", optarg);
            break;
        case ':': return pb_cli_error("report", "option %s needs a value", argv[optind - 1]);
        default: return pb_cli_error("report", "unknown option '%s' (see propbench report --help)", argv[optind - 1]);
        }
    }
    if (optind >= argc)
        return pb_cli_error("report", "give the run directory (see propbench report --help)");
    if (optind + 1 < argc)
        return pb_cli_error("report", "unexpected argument '%s'", argv[optind + 1]);
    o->dir = argv[optind];
    if (!o->out)
        o->out = o->dir;
    if (pb_cli_out_path("report", "--out", o->out, PB_CLI_RESERVE_DIR))
        return PB_EXIT_USAGE;
    if (!o->prog || !*o->prog)
        o->prog = "gnuplot";
    return 0;
}

/* Check that the report's own files can be written, make plots/ and write
 * the figure scripts (made[] says which). 0, or PB_EXIT_USAGE after the
 * message. */
static int report_prepare(const report_opts *o, const pb_report_run *run, char *plots,
                          size_t plots_len, unsigned char *made)
{
    /* the report's own files must be writable before any script is */
    static const char *const outputs[] = {"report.html", "report.md"};
    for (int i = 0; i < 2; i++) {
        char f[PATH_MAX + 16];
        snprintf(f, sizeof f, "%s/%s", o->out, outputs[i]);
        if (pb_path_blocked(f))
            return pb_cli_error("report", "%s is there and is not a file: the report could not be written", f);
    }
    char rdir[PATH_MAX], odir[PATH_MAX], prefix[PATH_MAX + 2], err[1024];
    snprintf(plots, plots_len, "%s/plots", o->out);
    if (pb_mkdirs(plots) || !realpath(o->dir, rdir) || !realpath(o->out, odir))
        return pb_cli_error("report", "%s: cannot create the plots folder: %s", plots,
                            strerror(errno));
    /* scripts reach the data relative to plots/ when the report sits in the run */
    if (!strcmp(rdir, odir))
        snprintf(prefix, sizeof prefix, "../");
    else
        snprintf(prefix, sizeof prefix, "%s/", rdir);
    if (pb_report_gp_write(run, o->dir, plots, prefix, made, err, sizeof err))
        return pb_cli_error("report", "%s", err);
    return 0;
}

/* Draw every figure with a script, as many at once as there are cores (at
 * most PB_GNUPLOT_SLOTS); drawn[] marks the good ones. Returns how many
 * failed (each warned about on stderr). */
static int report_draw_all(const report_opts *o, const pb_report_run *run, const char *exe,
                           const char *plots, const unsigned char *made, unsigned char *drawn)
{
    int nfig = run->nproblems * PB_FIG_COUNT, total = 0, done = 0, failed = 0, running = 0;
    int at_slot[PB_GNUPLOT_SLOTS];
    long cores = sysconf(_SC_NPROCESSORS_ONLN);
    int jobs = cores < 1 ? 1 : cores > PB_GNUPLOT_SLOTS ? PB_GNUPLOT_SLOTS : (int)cores;
    char err[1024];
    for (int i = 0; i < nfig; i++)
        total += made[i];
    for (int i = 0; i < nfig || running > 0;) {
        if (i < nfig && running < jobs) {
            int fig = i++;
            if (!made[fig])
                continue;
            char base[PB_FIG_BASE_MAX];
            pb_fig_base(run->problems[fig / PB_FIG_COUNT].name, fig % PB_FIG_COUNT, base, sizeof base);
            if (!o->quiet)
                fprintf(stderr, "propbench report: figure %d of %d: %s\n", ++done, total, base);
            int k = pb_report_gnuplot_start(exe, plots, base, err, sizeof err);
            if (k < 0) {
                fprintf(stderr, "propbench report: warning: %s\n", err);
                failed++;
                continue;
            }
            at_slot[k] = fig;
            running++;
            continue;
        }
        int k;
        int bad = pb_report_gnuplot_wait(exe, plots, &k, err, sizeof err);
        if (k < 0) {    /* no child left to wait for: nothing is running */
            fprintf(stderr, "propbench report: warning: %s\n", err);
            failed += running;
            running = 0;
            continue;
        }
        running--;
        if (bad) {
            fprintf(stderr, "propbench report: warning: %s\n", err);
            failed++;
        } else {
            drawn[at_slot[k]] = 1;
        }
    }
    return failed;
}

/* Run gnuplot on every script written (drawn[] says which succeeded). The
 * reason nothing or not everything was drawn goes to why (NULL: all drawn);
 * returns PB_EXIT_FAIL when gnuplot failed on a figure, else 0. */
static int report_draw(const report_opts *o, const pb_report_run *run, const char *plots,
                       const unsigned char *made, unsigned char *drawn, const char **why,
                       char *whybuf, size_t whylen)
{
    char exe[PATH_MAX];
    *why = NULL;
    if (o->noplots) {
        *why = "--no-plots was given";
        return 0;
    }
    if (pb_report_gnuplot_find(o->prog, exe, sizeof exe)) {
        snprintf(whybuf, whylen, "gnuplot was not found (looked for '%s')", o->prog);
        *why = whybuf;
        fprintf(stderr, "propbench report: warning: %s; figures not drawn. The data and gnuplot scripts "
                "are in %s: install gnuplot (Debian: gnuplot-nox) and run `gnuplot ./NAME.gp` there, "
                "or run propbench report again.\n", *why, plots);
        return 0;
    }
    int failed = report_draw_all(o, run, exe, plots, made, drawn);
    if (!failed)
        return 0;
    snprintf(whybuf, whylen, "gnuplot failed on %d figure%s", failed, failed == 1 ? "" : "s");
    *why = whybuf;
    return PB_EXIT_FAIL;
}

/* report.html and report.md, both or neither. 0, or PB_EXIT_USAGE. */
static int report_write(const report_opts *o, const pb_report_view *v)
{
    char err[1024];
    int html_bad = pb_report_html_write(v, err, sizeof err);
    if (html_bad || pb_report_md_write(v, err, sizeof err)) {
        if (!html_bad) {
            /* the new report.html without its report.md is a half-written report */
            char html[PATH_MAX + 16];
            snprintf(html, sizeof html, "%s/report.html", o->out);
            unlink(html);
        }
        return pb_cli_error("report", "%s", err);
    }
    return 0;
}

/* A stop while gnuplot draws: its process and the temporary images go, so
 * no *.png.tmp or *.svg.tmp stays in plots/. */
static void report_on_stop(int sig)
{
    pb_report_gnuplot_abort();
    _exit(128 + sig);
}

static void report_catch_stops(void)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = report_on_stop;
    sigemptyset(&sa.sa_mask);
    static const int sigs[] = {SIGINT, SIGTERM, SIGHUP, SIGQUIT};
    for (size_t i = 0; i < sizeof sigs / sizeof *sigs; i++)
        sigaction(sigs[i], &sa, NULL);
}

/* A report that failed (exit 2) takes back the scripts it wrote: a .gp
 * whose report was never written is a half-written result. The plots
 * folder goes too when that leaves it empty. */
static void report_unwrite_scripts(const pb_report_run *run, const char *plots,
                                   const unsigned char *made)
{
    char f[PATH_MAX + PB_FIG_BASE_MAX + 32];
    int any = 0;
    for (int pi = 0; made && pi < run->nproblems; pi++)
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            if (!made[pi * PB_FIG_COUNT + k])
                continue;
            char base[PB_FIG_BASE_MAX];
            pb_fig_base(run->problems[pi].name, k, base, sizeof base);
            snprintf(f, sizeof f, "%s/%s.gp", plots, base);
            unlink(f);
            any = 1;
        }
    if (!any)
        return;
    snprintf(f, sizeof f, "%s/style.gp", plots);
    unlink(f);
    rmdir(plots);
}

int pb_cli_report(int argc, char **argv)
{
    report_opts o;
    int rc = report_parse(argc, argv, &o);
    if (rc)
        return rc < 0 ? PB_EXIT_OK : rc;
    pb_report_run run;
    char err[1024] = "";
    if (pb_report_load_subset(o.dir, o.methods, o.problems, &run, err, sizeof err))
        return pb_cli_error("report", "%s", err);

    for (int pi = 0; pi < run.nproblems; pi++) {
        pb_report_select sel;
        pb_report_select_find(o.dir, run.problems[pi].name, &sel);
        run.problems[pi].req_pos = o.max_pos_err > 0 ? o.max_pos_err
                                 : sel.found && isfinite(sel.max_pos_err) ? sel.max_pos_err : 0;
    }
    rc = PB_EXIT_USAGE;
    unsigned char *made = calloc((size_t)run.nproblems * PB_FIG_COUNT, 1);
    unsigned char *drawn = calloc((size_t)run.nproblems * PB_FIG_COUNT, 1);
    char plots[PATH_MAX + 16], title[512], whybuf[PATH_MAX + 64];
    const char *why = NULL;
    plots[0] = 0;
    if (!made || !drawn) {
        pb_cli_error("report", "out of memory");
        goto done;
    }
    report_catch_stops();
    if (report_prepare(&o, &run, plots, sizeof plots, made))
        goto done;
    int drew = report_draw(&o, &run, plots, made, drawn, &why, whybuf, sizeof whybuf);
    pb_report_view v = {&run, o.out, report_title(&run, o.dir, title, sizeof title), made, drawn, why,
                        o.dir, o.external};
    if (report_write(&o, &v))
        goto done;
    rc = drew;
    if (!o.quiet)
        printf("wrote %s/report.html\n", o.out);
done:
    if (rc == PB_EXIT_USAGE && plots[0])
        report_unwrite_scripts(&run, plots, made);
    free(made);
    free(drawn);
    pb_report_free(&run);
    return rc;
}
