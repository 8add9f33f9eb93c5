/* verb_sweep.c - `propbench sweep`: a named suite or a grid of cases into one
 * run directory, with worker processes and deterministic shards. */
#include <ctype.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/study/suites.h"
#include "bench/study/sweep.h"
#include "bench/cli/problem_source.h"
#include "bench/cli/summary_table.h"
#include "integrators/formulation.h"

static void sweep_help(FILE *f)
{
    fprintf(f,
"usage: propbench sweep (--suite NAME [--problems P,..] [--methods M,..]\n"
"                        | [--problems P,..] [--problem-file FILE [--case NAME]]\n"
"                        --methods M,..\n"
"                        [--steps-per-orbit N,..] [--tolerances T,..]\n"
"                        [--orbits N | --horizon-s S])\n"
"                       [--out DIR] [-j N] [--shard K/N] [--repeats N]\n"
"                       [--eval-cost-us X] [--compensated] [--formulation F]\n"
"                       [--report [--max-pos-err E]] [--quiet]\n\n"
"Run many cases into one run directory: DIR/summary.json and DIR/series/.\n"
"A grid is problems x methods x (steps per orbit for fixed-step methods,\n"
"tolerances for adaptive ones); it gives work-precision (error against\n"
"evaluations) and convergence (error against step) data per method.\n"
"  --orbits N    every case's horizon in periods (problems with a period)\n"
"  --horizon-s S every case's horizon in time units (s or TU), any problem\n"
"  -j N          worker processes (default 1); results are the same for every N\n"
"  --shard K/N   run only the K-th of N deterministic slices; join with merge\n"
"  --suite NAME  a named suite; with --problems and/or --methods, only its\n"
"                cases of those problems and methods\n"
"  --report      write plots and report.html/report.md afterwards\n"
"  --max-pos-err E  with --report: the requirement line on its figures\n"
"  --compensated compensated summation for every method that has it\n"
"  --formulation F  cartesian, sundman or ks: the equations the methods\n"
"                integrate (a grid: every method must take it; a suite: the\n"
"                first-order methods take it, the others stay Cartesian)\n"
"suites: propbench list suites\n");
}

enum { SW_SUITE = 300, SW_PROBLEMS, SW_METHODS, SW_STEPS, SW_TOLS, SW_ORBITS, SW_OUT,
       SW_SHARD, SW_REPEATS, SW_COST, SW_REPORT, SW_QUIET, SW_HELP, SW_COMP, SW_FILE, SW_CASE,
       SW_FORM, SW_HORIZON, SW_REQ };

/* What the command line asks for; a suite, or the lists of a grid. */
typedef struct sweep_options {
    const char *suite, *out, *pfile, *pcase;
    char *problems, *methods, *steps, *tols;
    double orbits, cost;      /* 0: not given */
    double horizon_s;         /* --horizon-s (0: not given) */
    long jobs, repeats;       /* repeats -1: not given */
    int shard_k, shard_n, quiet, report, comp;
    int form;                 /* -1: each problem's own */
    const char *req;          /* --max-pos-err, passed to the report */
} sweep_options;

/* Parse argv into o. Returns -1 to go on, or an exit status to return at
 * once (0 after --help, 2 after an error, which it has printed). */
/* One decimal number of a K/N pair, digits only, within 1..INT_MAX
 * (sscanf's %d wrapped 4294967297 to 1); *s moves past it. */
static int sweep_shard_part(const char **s, int *out)
{
    if (!isdigit((unsigned char)**s))
        return -1;
    char *end;
    errno = 0;
    long v = strtol(*s, &end, 10);
    if (errno == ERANGE || v < 1 || v > INT_MAX)
        return -1;
    *out = (int)v;
    *s = end;
    return 0;
}

static int sweep_parse_shard(const char *s, int *k, int *n)
{
    if (sweep_shard_part(&s, k) || *s++ != '/' || sweep_shard_part(&s, n) || *s || *k > *n)
        return -1;
    return 0;
}

/* A number in (0, max]; 0, or PB_EXIT_USAGE after a message. */
static int sweep_positive(const char *opt, const char *arg, double max, double *x)
{
    if (pb_cli_double("sweep", opt, arg, x))
        return PB_EXIT_USAGE;
    if (!(*x > 0) || *x > max)
        return isinf(max) ? pb_cli_error("sweep", "%s must be positive, got '%s'", opt, arg)
                          : pb_cli_error("sweep", "%s must be in (0, %g], got '%s'", opt, max, arg);
    return 0;
}

/* Options that go together, after parsing: -1 to go on, or the exit
 * status after a message. */
static int sweep_combination(const sweep_options *o)
{
    if (!o->suite && !(o->problems || o->pfile || o->methods))
        return pb_cli_error("sweep", "give --suite NAME, or a grid with --problems (and/or "
                            "--problem-file) and --methods");
    if (o->suite && (o->pfile || o->steps || o->tols))
        return pb_cli_error("sweep", "a suite sets its own problems' files, steps and tolerances: "
                            "--problem-file, --steps-per-orbit and --tolerances go with a grid");
    if (o->req && !o->report)
        return pb_cli_error("sweep", "--max-pos-err goes with --report");
    if (o->pcase && !o->pfile)
        return pb_cli_error("sweep", "--case goes with --problem-file");
    if (o->orbits > 0 && o->horizon_s > 0)
        return pb_cli_error("sweep", "give --orbits or --horizon-s, not both");
    return -1;
}

static int sweep_parse(int argc, char **argv, sweep_options *o)
{
    static const struct option opts[] = {
        {"suite", required_argument, 0, SW_SUITE}, {"problems", required_argument, 0, SW_PROBLEMS},
        {"methods", required_argument, 0, SW_METHODS}, {"steps-per-orbit", required_argument, 0, SW_STEPS},
        {"tolerances", required_argument, 0, SW_TOLS}, {"orbits", required_argument, 0, SW_ORBITS},
        {"out", required_argument, 0, SW_OUT}, {"shard", required_argument, 0, SW_SHARD},
        {"jobs", required_argument, 0, 'j'}, {"repeats", required_argument, 0, SW_REPEATS},
        {"eval-cost-us", required_argument, 0, SW_COST}, {"report", no_argument, 0, SW_REPORT},
        {"compensated", no_argument, 0, SW_COMP}, {"formulation", required_argument, 0, SW_FORM},
        {"problem-file", required_argument, 0, SW_FILE}, {"case", required_argument, 0, SW_CASE},
        {"quiet", no_argument, 0, SW_QUIET}, {"help", no_argument, 0, SW_HELP},
        {"horizon-s", required_argument, 0, SW_HORIZON},
        {"max-pos-err", required_argument, 0, SW_REQ}, {0, 0, 0, 0}};
    memset(o, 0, sizeof *o);
    o->jobs = 1;
    o->repeats = -1;
    o->shard_k = o->shard_n = 1;
    o->form = -1;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":j:", opts, NULL)) != -1) {
        switch (c) {
        case SW_SUITE: o->suite = optarg; break;
        case SW_FILE: o->pfile = optarg; break;
        case SW_CASE: o->pcase = optarg; break;
        case SW_PROBLEMS: o->problems = optarg; break;
        case SW_METHODS: o->methods = optarg; break;
        case SW_STEPS: o->steps = optarg; break;
        case SW_TOLS: o->tols = optarg; break;
        case SW_OUT:
            if (pb_cli_out_path("sweep", "--out", optarg, PB_CLI_RESERVE_DIR)) return PB_EXIT_USAGE;
            o->out = optarg;
            break;
        case SW_QUIET: o->quiet = 1; break;
        case SW_REPORT: o->report = 1; break;
        case SW_COMP: o->comp = 1; break;
        case SW_FORM:
            if (pb_cli_formulation("sweep", optarg, &o->form)) return PB_EXIT_USAGE;
            break;
        case SW_ORBITS:
            if (sweep_positive("--orbits", optarg, PB_CLI_ORBITS_MAX, &o->orbits)) return PB_EXIT_USAGE;
            break;
        case SW_HORIZON:
            if (sweep_positive("--horizon-s", optarg, HUGE_VAL, &o->horizon_s)) return PB_EXIT_USAGE;
            break;
        case SW_REQ: {
            double e;
            if (sweep_positive("--max-pos-err", optarg, HUGE_VAL, &e)) return PB_EXIT_USAGE;
            o->req = optarg;
            break;
        }
        case SW_COST:
            if (pb_cli_double("sweep", "--eval-cost-us", optarg, &o->cost)) return PB_EXIT_USAGE;
            if (!(o->cost >= 0)) return pb_cli_error("sweep", "--eval-cost-us must be >= 0, got '%s'", optarg);
            break;
        case 'j':
            if (pb_cli_long("sweep", "-j", optarg, &o->jobs)) return PB_EXIT_USAGE;
            if (o->jobs < 1 || o->jobs > 256) return pb_cli_error("sweep", "-j must be in 1..256, got '%s'", optarg);
            break;
        case SW_REPEATS:
            if (pb_cli_long("sweep", "--repeats", optarg, &o->repeats)) return PB_EXIT_USAGE;
            if (o->repeats < 0 || o->repeats > 1000) return pb_cli_error("sweep", "--repeats must be in 0..1000");
            break;
        case SW_SHARD:
            if (sweep_parse_shard(optarg, &o->shard_k, &o->shard_n))
                return pb_cli_error("sweep", "--shard expects K/N with 1 <= K <= N <= %d, got '%s'",
                                    INT_MAX, optarg);
            break;
        case SW_HELP: sweep_help(stdout); return PB_EXIT_OK;
        case ':': return pb_cli_error("sweep", "option %s needs a value", argv[optind - 1]);
        default: return pb_cli_error("sweep", "unknown option '%s' (see propbench sweep --help)", argv[optind - 1]);
        }
    }
    if (optind < argc)
        return pb_cli_error("sweep", "unexpected argument '%s'", argv[optind]);
    return sweep_combination(o);
}

/* A grid's lists, split and read: names stay in the option strings. */
typedef struct sweep_grid {
    char *pn[64], *mn[64];
    int np, nm, ns, nt;
    long sv[64];
    double tv[64];
} sweep_grid;

/* Split the grid's lists and read the step and tolerance values; -1 after
 * a message. */
static int sweep_grid_lists(const sweep_options *o, sweep_grid *g)
{
    char *sn[64], *tn[64];
    /* every list is split before any is judged, so each bad one is named */
    g->np = o->problems ? pb_cli_split("sweep", "--problems", o->problems, g->pn, 64) : 0;
    g->nm = pb_cli_split("sweep", "--methods", o->methods, g->mn, 64);
    g->ns = o->steps ? pb_cli_split("sweep", "--steps-per-orbit", o->steps, sn, 64) : 0;
    g->nt = o->tols ? pb_cli_split("sweep", "--tolerances", o->tols, tn, 64) : 0;
    if (g->np < 0 || g->nm < 0 || g->ns < 0 || g->nt < 0)
        return -1;
    for (int i = 0; i < g->ns; i++) {
        if (pb_cli_long("sweep", "--steps-per-orbit", sn[i], &g->sv[i]))
            return -1;
        if (g->sv[i] < 1 || g->sv[i] > 100000000L) {
            pb_cli_error("sweep", "--steps-per-orbit values must be whole numbers in 1..1e8 (got '%s')", sn[i]);
            return -1;
        }
    }
    for (int i = 0; i < g->nt; i++) {
        if (pb_cli_double("sweep", "--tolerances", tn[i], &g->tv[i]))
            return -1;
        if (!(g->tv[i] > 0 && g->tv[i] < 1)) {
            pb_cli_error("sweep", "--tolerances values must be in (0, 1) (got '%s')", tn[i]);
            return -1;
        }
    }
    return 0;
}

/* One case of the grid, checked; -1 after a message. */
static int sweep_grid_case(const sweep_options *o, const pb_problem *p, const pb_method_type *m,
                           int fixed, long steps, double tol, pb_case_list *list)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    s.problem = *p;
    s.method = m;
    s.steps_per_orbit = fixed ? (int)steps : 0;
    s.tolerance = fixed ? 0 : tol;
    if (o->horizon_s > 0)
        s.horizon_s = o->horizon_s;
    else if (p->period > 0 && (o->orbits > 0 || p->default_orbits > 0))
        s.orbits = o->orbits > 0 ? o->orbits : p->default_orbits;
    else
        s.horizon_s = p->default_horizon_s;
    s.linear_samples = PB_SWEEP_LINEAR_SAMPLES;
    s.compensated = o->comp && (m->flags & PB_KIND_COMPENSABLE);
    if (o->form >= 0)
        s.problem.formulation = (pb_formulation)o->form;
    char err[512];
    if (pb_case_validate(&s, err, sizeof err)) {
        char id[PB_CASE_ID_MAX];
        pb_case_id(&s, id, sizeof id);
        pb_cli_error("sweep", "case %s (--steps-per-orbit/--tolerances x %s): %s", id,
                     o->horizon_s > 0 ? "--horizon-s" : "--orbits", err);
        return -1;
    }
    if (pb_case_list_add(list, &s)) {
        pb_cli_error("sweep", "out of memory");
        return -1;
    }
    return 0;
}

/* Every method of the grid on problem p, at its steps or tolerances; -1
 * after a message. */
static int sweep_grid_problem(const sweep_options *o, const sweep_grid *g, const pb_problem *p,
                              pb_case_list *list)
{
    if (o->orbits > 0 && !(p->period > 0)) {
        pb_cli_error("sweep", "--orbits: problem '%s' has no period; its horizon is a time "
                     "(%.6g %s, from its definition), so leave --orbits out for it",
                     p->name, p->default_horizon_s, p->units == PB_UNITS_KM_S ? "s" : "TU");
        return -1;
    }
    for (int j = 0; j < g->nm; j++) {
        const pb_method_type *m = pb_cli_method("sweep", g->mn[j]);
        if (!m)
            return -1;
        int fixed = (m->flags & PB_KIND_FIXED) != 0;
        int nv = fixed ? g->ns : g->nt;
        if (nv == 0) {
            pb_cli_error("sweep", "method '%s' needs %s", m->name,
                         fixed ? "--steps-per-orbit values" : "--tolerances values");
            return -1;
        }
        for (int k = 0; k < nv; k++)
            if (sweep_grid_case(o, p, m, fixed, fixed ? g->sv[k] : 0, fixed ? 0 : g->tv[k], list))
                return -1;
    }
    return 0;
}

/* The grid's cases into list: the named problems, then the problem file's
 * cases, each with every method; -1 after a message. */
static int sweep_grid_expand(const sweep_options *o, pb_case_list *list)
{
    if (!(o->problems || o->pfile) || !o->methods) {
        pb_cli_error("sweep", "a grid needs --problems or --problem-file, and --methods");
        return -1;
    }
    pb_problem *fcases = NULL;
    int nf = 0;
    if (o->pfile && pb_problem_source_cases("sweep", o->pfile, o->pcase, &fcases, &nf))
        return -1;
    sweep_grid g;
    int rc = sweep_grid_lists(o, &g);
    for (int i = 0; !rc && i < g.np + nf; i++) {
        pb_problem p;
        if (i >= g.np)
            p = fcases[i - g.np];
        else if (pb_cli_problem("sweep", g.pn[i], &p))
            rc = -1;
        if (!rc)
            rc = sweep_grid_problem(o, &g, &p, list);
    }
    free(fcases);
    return rc;
}

/* What the command line says over the cases of a suite or grid. */
static void sweep_apply_options(const sweep_options *o, pb_case_list *list)
{
    for (int i = 0; i < list->n; i++) {
        pb_case_spec *s = &list->cases[i];
        /* --compensated applies to every method that has the variant */
        if (o->comp && (s->method->flags & PB_KIND_COMPENSABLE))
            s->compensated = 1;
        if (o->repeats >= 0)
            s->repeats = (int)o->repeats;
        if (o->cost > 0)
            s->eval_cost_us = o->cost;
        if (o->suite && o->orbits > 0 && s->problem.period > 0)
            s->orbits = o->orbits;
        if (o->suite && o->horizon_s > 0)
            s->orbits = 0, s->horizon_s = o->horizon_s;
        if (o->form >= 0 && !pb_formulation_refusal(s->method, (pb_formulation)o->form))
            s->problem.formulation = (pb_formulation)o->form;
    }
}

static int sweep_id_cmp(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

/* Two cases with one id would share a series file and a baseline row; -1
 * after a message. The ids are sorted once, so that equal ids meet as
 * neighbours: n log n comparisons (the pairwise check took 9.8 s for a
 * grid of 6,720 cases before the first line of output). */
static int sweep_check_unique(const pb_case_list *list)
{
    if (list->n < 2)
        return 0;
    char *ids = malloc((size_t)list->n * PB_CASE_ID_MAX);
    char **by = malloc((size_t)list->n * sizeof *by);
    if (!ids || !by) {
        free(ids);
        free(by);
        pb_cli_error("sweep", "out of memory checking %d case ids", list->n);
        return -1;
    }
    for (int i = 0; i < list->n; i++) {
        by[i] = ids + (size_t)i * PB_CASE_ID_MAX;
        pb_case_id(&list->cases[i], by[i], PB_CASE_ID_MAX);
    }
    qsort(by, (size_t)list->n, sizeof *by, sweep_id_cmp);
    int rc = 0;
    for (int i = 1; i < list->n && !rc; i++) {
        if (!strcmp(by[i - 1], by[i])) {
            pb_cli_error("sweep", "the grid holds case %s twice (repeated or equal values)", by[i]);
            rc = -1;
        }
    }
    free(ids);
    free(by);
    return rc;
}

/* 1 when name is one of items[0..n) (n < 0: no list given, so all). */
static int sweep_listed(char *const *items, int n, const char *name)
{
    for (int i = 0; i < n; i++)
        if (!strcmp(items[i], name))
            return 1;
    return n < 0;
}

/* A suite's cases of the problems and methods named (--problems,
 * --methods); every name must be in the suite. -1 after a message. */
static int sweep_suite_filter(const sweep_options *o, pb_case_list *list)
{
    char *names[2][64];
    char *lists[2] = {o->problems, o->methods};
    const char *opt[2] = {"--problems", "--methods"};
    int n[2];
    for (int k = 0; k < 2; k++) {
        n[k] = lists[k] ? pb_cli_split("sweep", opt[k], lists[k], names[k], 64) : -1;
        if (lists[k] && n[k] < 0)
            return -1;
        for (int j = 0; j < n[k]; j++) {
            int found = 0;
            for (int i = 0; i < list->n && !found; i++)
                found = !strcmp(k ? list->cases[i].method->name : list->cases[i].problem.name,
                                names[k][j]);
            if (!found) {
                pb_cli_error("sweep", "%s: '%s' is not in suite '%s'", opt[k], names[k][j], o->suite);
                return -1;
            }
        }
    }
    int m = 0;
    for (int i = 0; i < list->n; i++)
        if (sweep_listed(names[0], n[0], list->cases[i].problem.name)
            && sweep_listed(names[1], n[1], list->cases[i].method->name))
            list->cases[m++] = list->cases[i];
    list->n = m;
    return 0;
}

static int sweep_cases(const sweep_options *o, pb_case_list *list)
{
    if (o->suite) {
        if (pb_suite_expand(o->suite, list)) {
            pb_cli_error("sweep", "unknown suite '%s' (see propbench list suites)", o->suite);
            return -1;
        }
        if (sweep_suite_filter(o, list))
            return -1;
    } else if (sweep_grid_expand(o, list)) {
        return -1;
    }
    sweep_apply_options(o, list);
    return sweep_check_unique(list);
}

/* Run the cases into dir and print the summary; the exit status (128 +
 * the signal after an interruption, as a shell reports it). */
static int sweep_execute(const sweep_options *o, const pb_case_list *list, const char *dir)
{
    double fixed_steps = 0;
    for (int i = 0; i < list->n; i++)
        if (o->shard_n <= 1 || i % o->shard_n == o->shard_k - 1)
            fixed_steps += pb_case_fixed_steps(&list->cases[i]);
    pb_cli_warn_long("sweep", fixed_steps);
    /* the output folder is checked and locked before the banner, so a
     * refusal is one line */
    char why[4400];
    pb_run_out out;
    if (pb_run_out_open(&out, dir, why, sizeof why)) {
        pb_run_out_close(&out);
        return pb_cli_error("sweep", "%s", why);
    }
    pb_sweep_options so = {(int)o->jobs, o->shard_k, o->shard_n, pb_cli_progress_wanted(o->quiet),
                           o->suite ? o->suite : "grid", o->quiet};
    if (!o->quiet)
        fprintf(stderr, "propbench sweep: %d cases%s into %s with %ld worker%s\n",
                o->shard_n > 1 ? (list->n + o->shard_n - o->shard_k) / o->shard_n : list->n,
                o->shard_n > 1 ? " (this shard)" : "", dir, o->jobs, o->jobs > 1 ? "s" : "");
    int sr = pb_sweep_run(list, &out, &so);
    pb_run_out_close(&out);
    if (sr == -2)
        return 128 + pb_sweep_stop_signal();
    if (sr)
        return PB_EXIT_USAGE;
    if (!o->quiet) {
        char path[4200];
        snprintf(path, sizeof path, "%s/summary.json", dir);
        json_t *doc = json_load_file(path, 0, NULL);
        if (doc)
            pb_summary_print(doc, stdout);
        json_decref(doc);
        printf("wrote %s/summary.json\n", dir);
    }
    return PB_EXIT_OK;
}

int pb_cli_sweep(int argc, char **argv)
{
    sweep_options o;
    int rc = sweep_parse(argc, argv, &o);
    if (rc >= 0)
        return rc;
    pb_case_list list = {0, 0, NULL};
    if (sweep_cases(&o, &list)) {
        pb_case_list_free(&list);
        return PB_EXIT_USAGE;
    }
    char dir[4096];
    if (o.out)
        snprintf(dir, sizeof dir, "%s", o.out);
    else {
        snprintf(dir, sizeof dir, "results/runs/%s", o.suite ? o.suite : "grid");
        pb_cli_note_replacing("sweep", dir);
    }
    rc = sweep_execute(&o, &list, dir);
    pb_case_list_free(&list);
    if (rc == PB_EXIT_OK && o.report) {
        char *rargv[6] = {"report", dir};
        int ra = 2;
        if (o.req) {
            rargv[ra++] = "--max-pos-err";
            rargv[ra++] = (char *)o.req;
        }
        if (o.quiet)
            rargv[ra++] = "--quiet";
        rargv[ra] = NULL;
        rc = pb_cli_report(ra, rargv);
    }
    return rc;
}
