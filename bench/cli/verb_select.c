/* verb_select.c - `propbench select`: for each method the largest step or
 * loosest tolerance that meets a requirement over a horizon, ranked by
 * evaluations and by projected cost. Exit 1 when no method meets it. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "bench/cli/cli.h"
#include "integrators/formulation.h"
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/study/select.h"
#include "bench/study/progress.h"
#include "bench/cli/problem_source.h"
#include "bench/cli/select_table.h"
#include "bench/study/suites.h"

static void select_help(FILE *f)
{
    fprintf(f,
"usage: propbench select (--problem NAME | --problem-file FILE [--case NAME])\n"
"                        [--orbits N | --horizon-s S] REQUIREMENT.. [--margin F]\n"
"                        [--methods M,..] [--formulation F] [--eval-cost-us C]\n"
"                        [--prune-factor K] [-j N] [--out FILE] [--quiet]\n\n"
"Find, for each method, the largest step (fixed-step methods, as steps per\n"
"orbit and seconds) or loosest tolerance (adaptive ones) whose run meets every\n"
"requirement over the horizon (default: the problem's own). A coarse ladder\n"
"that follows the observed order, a secant in log error against log step\n"
"between its bracketing rungs, then confirmation (the answer and a 10%%\n"
"finer neighbour must pass). Ranked by projected cost when --eval-cost-us is\n"
"given, by evaluations otherwise; the projected cost is evaluations x C\n"
"microseconds + steps x measured ns/step (measured on this machine, now:\n"
"costs within 2x of each other are ties).\n"
"Requirements (any combination; X in problem units, M in metres and m/s for\n"
"km-s problems); radial, along- and cross-track in the true orbit's frame:\n"
"  --max-pos-err X | --max-pos-err-m M        largest position error\n"
"  --max-vel-err X | --max-vel-err-m M        largest velocity error\n"
"  --max-radial-err X | --max-radial-err-m M  largest |radial| error\n"
"  --max-along-err X | --max-along-err-m M    largest |along-track| error\n"
"  --max-cross-err X | --max-cross-err-m M    largest |cross-track| error\n"
"  --max-energy-err E  largest relative energy error\n"
"  --max-angmom-err E  largest relative angular-momentum error\n"
"  --margin F          each bound must be met divided by 1 + F (default 0)\n"
"  --formulation F     cartesian, sundman or ks: the equations the methods\n"
"                      integrate (methods that cannot take it are not searched)\n"
"  --eval-cost-us C    cost of one evaluation of YOUR force model (default 1)\n"
"  --prune-factor K    0, or K >= 1: a method whose answer is estimated from its\n"
"                      failing runs (half the finest one's evaluations) to take\n"
"                      over K x the evaluations of the answer with the fewest is\n"
"                      not searched to its end (reason costlier). Default %g when\n"
"                      every method is searched; 0 (search each to its answer)\n"
"                      with --methods or --eval-cost-us\n"
"  -j N                methods searched at once (default: the cores, %ld)\n"
"  --out FILE          selection JSON (default results/runs/select-<problem>.json)\n"
"Exit status 1 when no method meets the requirement.\n", PB_SELECT_PRUNE_DEFAULT,
            sysconf(_SC_NPROCESSORS_ONLN));
}

/* The requirements with a metre form: position, velocity, RIC parts. */
enum { RQ_POS, RQ_VEL, RQ_RAD, RQ_ALONG, RQ_CROSS, RQ_N };
static const char *const rq_opt[RQ_N] = {"--max-pos-err", "--max-vel-err", "--max-radial-err",
                                         "--max-along-err", "--max-cross-err"};
static const char *const rq_words[RQ_N] = {"position", "velocity", "radial", "along-track",
                                           "cross-track"};

enum { SE_PROBLEM = 400, SE_FILE, SE_CASE, SE_ORBITS, SE_HORIZON, SE_EN, SE_ANG, SE_MARGIN,
       SE_METHODS, SE_COST, SE_OUT, SE_QUIET, SE_HELP, SE_FORM, SE_JOBS, SE_PRUNE, SE_RQ };

/* What the command line asks for; numbers left 0 were not given. */
typedef struct select_options {
    const char *problem, *file, *case_name, *out;
    char *methods;
    double orbits, horizon, en, ang, margin, cost, prune;
    double bound[RQ_N], bound_m[RQ_N];  /* X forms, -m forms */
    int cost_given, prune_given;
    long jobs;
    int quiet;
    int form;                 /* -1: the problem's own */
} select_options;

/* A number option's value into *dst: positive, or (cost, margin) >= 0;
 * 0, or the exit status of the error it printed. */
static int select_number(const char *name, const char *arg, double *dst, int zero_ok)
{
    if (pb_cli_double("select", name, arg, dst))
        return PB_EXIT_USAGE;
    if (zero_ok ? !(*dst >= 0) : !(*dst > 0))
        return pb_cli_error("select", "%s must be %s, got '%s'", name, zero_ok ? ">= 0" : "positive", arg);
    return 0;
}

/* One option that is not a requirement bound; -1 when it was not one. */
static int select_option(int c, select_options *o)
{
    switch (c) {
    case SE_PROBLEM: o->problem = optarg; return 0;
    case SE_FILE: o->file = optarg; return 0;
    case SE_CASE: o->case_name = optarg; return 0;
    case SE_METHODS: o->methods = optarg; return 0;
    case SE_OUT: o->out = optarg; return 0;
    case SE_QUIET: o->quiet = 1; return 0;
    case SE_FORM: return pb_cli_formulation("select", optarg, &o->form) ? PB_EXIT_USAGE : 0;
    case SE_JOBS:
        if (pb_cli_long("select", "-j", optarg, &o->jobs)) return PB_EXIT_USAGE;
        if (o->jobs < 1 || o->jobs > 64) return pb_cli_error("select", "-j must be in 1..64, got '%s'", optarg);
        return 0;
    case SE_ORBITS: return select_number("--orbits", optarg, &o->orbits, 0);
    case SE_HORIZON: return select_number("--horizon-s", optarg, &o->horizon, 0);
    case SE_EN: return select_number("--max-energy-err", optarg, &o->en, 0);
    case SE_ANG: return select_number("--max-angmom-err", optarg, &o->ang, 0);
    case SE_MARGIN: return select_number("--margin", optarg, &o->margin, 1);
    case SE_PRUNE:
        o->prune_given = 1;
        if (select_number("--prune-factor", optarg, &o->prune, 1))
            return PB_EXIT_USAGE;
        /* below 1, "more than K x the fewest" would prune methods cheaper than it */
        if (o->prune > 0 && o->prune < 1)
            return pb_cli_error("select", "--prune-factor must be 0 or at least 1, got '%s'", optarg);
        return 0;
    case SE_COST: o->cost_given = 1; return select_number("--eval-cost-us", optarg, &o->cost, 1);
    }
    if (c >= SE_RQ && c < SE_RQ + 2 * RQ_N) {
        int k = (c - SE_RQ) / 2, metres = (c - SE_RQ) % 2;
        char name[40];
        snprintf(name, sizeof name, "%s%s", rq_opt[k], metres ? "-m" : "");
        return select_number(name, optarg, metres ? &o->bound_m[k] : &o->bound[k], 0);
    }
    return -1;
}

/* Parse argv into o. Returns -1 to go on, or an exit status to return at
 * once (0 after --help, 2 after an error, which it has printed). */
static int select_parse(int argc, char **argv, select_options *o)
{
    static const struct option opts[] = {
        {"problem", required_argument, 0, SE_PROBLEM}, {"problem-file", required_argument, 0, SE_FILE},
        {"case", required_argument, 0, SE_CASE}, {"orbits", required_argument, 0, SE_ORBITS},
        {"horizon-s", required_argument, 0, SE_HORIZON},
        {"max-pos-err", required_argument, 0, SE_RQ + 2 * RQ_POS},
        {"max-pos-err-m", required_argument, 0, SE_RQ + 2 * RQ_POS + 1},
        {"max-vel-err", required_argument, 0, SE_RQ + 2 * RQ_VEL},
        {"max-vel-err-m", required_argument, 0, SE_RQ + 2 * RQ_VEL + 1},
        {"max-radial-err", required_argument, 0, SE_RQ + 2 * RQ_RAD},
        {"max-radial-err-m", required_argument, 0, SE_RQ + 2 * RQ_RAD + 1},
        {"max-along-err", required_argument, 0, SE_RQ + 2 * RQ_ALONG},
        {"max-along-err-m", required_argument, 0, SE_RQ + 2 * RQ_ALONG + 1},
        {"max-cross-err", required_argument, 0, SE_RQ + 2 * RQ_CROSS},
        {"max-cross-err-m", required_argument, 0, SE_RQ + 2 * RQ_CROSS + 1},
        {"max-energy-err", required_argument, 0, SE_EN}, {"max-angmom-err", required_argument, 0, SE_ANG},
        {"margin", required_argument, 0, SE_MARGIN},
        {"methods", required_argument, 0, SE_METHODS}, {"eval-cost-us", required_argument, 0, SE_COST},
        {"out", required_argument, 0, SE_OUT}, {"quiet", no_argument, 0, SE_QUIET},
        {"formulation", required_argument, 0, SE_FORM}, {"jobs", required_argument, 0, SE_JOBS},
        {"prune-factor", required_argument, 0, SE_PRUNE},
        {"help", no_argument, 0, SE_HELP}, {0, 0, 0, 0}};
    memset(o, 0, sizeof *o);
    o->cost = 1;
    o->form = -1;
    o->jobs = sysconf(_SC_NPROCESSORS_ONLN);
    if (o->jobs < 1)
        o->jobs = 1;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":j:", opts, NULL)) != -1) {
        int rc = select_option(c == 'j' ? SE_JOBS : c, o);
        if (rc > 0)
            return rc;
        if (rc == 0)
            continue;
        if (c == SE_HELP) {
            select_help(stdout);
            return PB_EXIT_OK;
        }
        if (c == ':')
            return pb_cli_error("select", "option %s needs a value", argv[optind - 1]);
        return pb_cli_error("select", "unknown option '%s' (see propbench select --help)", argv[optind - 1]);
    }
    if (optind < argc)
        return pb_cli_error("select", "unexpected argument '%s'", argv[optind]);
    return -1;
}

/* The horizon option, for messages and the reproducing command. */
static const char *select_horizon_option(const select_options *o)
{
    return o->orbits > 0 ? "--orbits" : "--horizon-s";
}

static double select_horizon_value(const select_options *o)
{
    return o->orbits > 0 ? o->orbits : o->horizon;
}

/* The horizon: as given, or the problem's own (a problem file's orbits or
 * horizon_s); 0, or the exit status of the error it printed. */
static int select_horizon(select_options *o, const pb_problem *p)
{
    if (o->orbits > 0 && o->horizon > 0)
        return pb_cli_error("select", "give --orbits N or --horizon-s S, not both");
    if (!(o->orbits > 0) && !(o->horizon > 0)) {
        if (p->default_horizon_s > 0)
            o->horizon = p->default_horizon_s;
        else if (p->period > 0 && p->default_orbits > 0)
            o->orbits = p->default_orbits;
        else
            return pb_cli_error("select", "problem '%s' sets no horizon: give --orbits N or --horizon-s S",
                                p->name);
    }
    if (o->orbits > PB_CLI_ORBITS_MAX)
        return pb_cli_error("select", "--orbits must be in (0, %g], got '%.6g'", PB_CLI_ORBITS_MAX, o->orbits);
    if (o->orbits > 0 && !(p->period > 0))
        return pb_cli_error("select", "problem '%s' has no period: give --horizon-s", p->name);
    return 0;
}

/* The bounds into req, in problem units; 0, or the exit status of the
 * error it printed. */
static int select_bounds(const select_options *o, const pb_problem *p, pb_requirement *req)
{
    double *dst[RQ_N] = {&req->max_pos_err, &req->max_vel_err, &req->max_radial, &req->max_along,
                         &req->max_cross};
    int any = 0;
    for (int k = 0; k < RQ_N; k++) {
        if (o->bound[k] > 0 && o->bound_m[k] > 0)
            return pb_cli_error("select", "give %s or %s-m, not both", rq_opt[k], rq_opt[k]);
        if (o->bound_m[k] > 0 && p->units != PB_UNITS_KM_S)
            return pb_cli_error("select", "%s-m needs a problem in km (problem '%s' is normalized)",
                                rq_opt[k], p->name);
        *dst[k] = o->bound[k] > 0 ? o->bound[k] : o->bound_m[k] * 1e-3;
        any |= *dst[k] > 0;
    }
    req->max_energy_rel = o->en;
    req->max_angmom_rel = o->ang;
    req->margin = o->margin;
    if (!any && !(o->en > 0) && !(o->ang > 0))
        return pb_cli_error("select", "give a requirement: --max-pos-err[-m], --max-vel-err[-m], "
                            "--max-radial-err[-m], --max-along-err[-m], --max-cross-err[-m], "
                            "--max-energy-err or --max-angmom-err");
    if (o->en > 0 && !p->energy)
        return pb_cli_error("select", "problem '%s' has no energy integral", p->name);
    if (o->ang > 0 && !p->angmom)
        return pb_cli_error("select", "problem '%s' has no angular-momentum integral", p->name);
    return 0;
}

/* The problem, horizon and requirement into base and req, each checked
 * against the others; 0, or the exit status of the error it printed. */
static int select_setup(select_options *o, pb_case_spec *base, pb_requirement *req)
{
    pb_case_spec_default(base);
    memset(req, 0, sizeof *req);
    if (!o->problem == !o->file)
        return pb_cli_error("select", "give exactly one of --problem NAME or --problem-file FILE");
    if (o->problem ? pb_cli_problem("select", o->problem, &base->problem)
                   : pb_problem_source_file("select", o->file, o->case_name, &base->problem))
        return PB_EXIT_USAGE;
    if (o->form >= 0)
        base->problem.formulation = (pb_formulation)o->form;
    int rc;
    if ((rc = select_horizon(o, &base->problem)) || (rc = select_bounds(o, &base->problem, req)))
        return rc;
    base->orbits = o->orbits;
    base->horizon_s = o->orbits > 0 ? 0 : o->horizon;
    base->eval_cost_us = o->cost;
    /* linear samples stay at the default `run` takes, so the printed run
     * command reproduces the answer */
    return 0;
}

/* The coarsest step the search tries (4 a period) must make a case run can
 * take at all; past that the horizon is not a question. 0, or the exit
 * status of the error it printed. */
static int select_check_horizon(const select_options *o, const pb_case_spec *base)
{
    pb_case_spec probe = *base;
    probe.method = pb_method_find("rk4");
    probe.steps_per_orbit = 4;
    char why[512];
    if (probe.method && pb_case_validate(&probe, why, sizeof why))
        return pb_cli_error("select", "%s %.6g: %s", select_horizon_option(o), select_horizon_value(o), why);
    double coarsest = pb_case_fixed_steps(&probe);
    if (coarsest > PB_SELECT_MAX_STEPS)
        return pb_cli_error("select", "%s %.6g: even the search's coarsest step (4 a period) needs "
                            "%.3g steps, past its budget of %.3g a case; shorten the horizon",
                            select_horizon_option(o), select_horizon_value(o), coarsest,
                            PB_SELECT_MAX_STEPS);
    return 0;
}

/* A method left out of the search, for the JSON: reason "refused". */
static void select_refuse(pb_selection *r, const pb_method_type *m, const char *why)
{
    memset(r, 0, sizeof *r);
    r->method = m;
    r->order = NAN;
    r->reason = "refused";
    snprintf(r->note, sizeof r->note, "%s", why);
}

/* The methods to search into list (at most 64): those named, or every one
 * that can run the problem; the others into refused[*nref]. Returns how
 * many to search, or -1 after a message. */
static int select_methods(const select_options *o, const pb_problem *p, const pb_method_type **list,
                          pb_selection *refused, int *nref)
{
    int n = 0;
    if (o->methods) {
        char *names[64];
        n = pb_cli_split("select", "--methods", o->methods, names, 64);
        if (n < 0)
            return -1;
        for (int i = 0; i < n; i++) {
            if (!(list[i] = pb_cli_method("select", names[i])))
                return -1;
            for (int j = 0; j < i; j++)
                if (list[j] == list[i]) {
                    pb_cli_error("select", "--methods names '%s' twice", names[i]);
                    return -1;
                }
        }
    } else {
        for (const pb_method_type *const *t = pb_method_table; *t && n < 64; t++)
            list[n++] = *t;
    }
    int m = 0;
    for (int i = 0; i < n; i++) {
        const char *nf = pb_formulation_refusal(list[i], p->formulation);
        if (nf && o->methods) {
            pb_cli_error("select", "method '%s' cannot take formulation '%s': %s", list[i]->name,
                         pb_formulation_name(p->formulation), nf);
            return -1;
        }
        char why[256];
        if (nf) {
            snprintf(why, sizeof why, "cannot take formulation '%s'", pb_formulation_name(p->formulation));
            select_refuse(&refused[(*nref)++], list[i], why);
            if (!o->quiet)
                printf("not searched: %s (%s)\n", list[i]->name, why);
            continue;
        }
        if (pb_method_fits(list[i], p)) {
            list[m++] = list[i];
            continue;
        }
        /* a method asked for by name that cannot run here is bad input */
        pb_method_fit_error(list[i], p, why, sizeof why);
        if (o->methods) {
            pb_cli_error("select", "%s", why);
            return -1;
        }
        select_refuse(&refused[(*nref)++], list[i], why);
        /* one the search leaves out is said, so a short table is not a surprise */
        if (!o->quiet)
            printf("not searched: %s (written for r'' = a(r); problem '%s' depends on velocity)\n",
                   list[i]->name, p->name);
    }
    return m;
}

/* Where the selection goes, made sure to be writable before the search is
 * spent on it; 0, or the exit status of the error it printed. */
static int select_out_path(const select_options *o, const pb_problem *p, char *path, size_t len)
{
    if (o->out)
        snprintf(path, len, "%s", o->out);
    else
        snprintf(path, len, "results/runs/select-%s.json", p->name);
    if (pb_cli_out_file("select", "--out", path))
        return PB_EXIT_USAGE;
    char dir[4096];
    snprintf(dir, sizeof dir, "%s", path);
    char *slash = strrchr(dir, '/');
    if (slash) {
        *slash = 0;
        if (dir[0] && pb_mkdirs(dir))
            return pb_cli_error("select", "cannot create %s: %s", dir, strerror(errno));
    }
    char probe[4200];
    snprintf(probe, sizeof probe, "%s.probe.%ld", path, (long)getpid());
    FILE *f = fopen(probe, "w");
    if (!f)
        return pb_cli_error("select", "cannot write %s: %s", path, strerror(errno));
    fclose(f);
    unlink(probe);
    return 0;
}

/* The `propbench run` that reproduces each answer found. */
static void select_commands(const select_options *o, const pb_problem *p, pb_selection *sel, int m)
{
    for (int i = 0; i < m; i++) {
        pb_selection *s = &sel[i];
        if (!s->found)
            continue;
        char src[600], set[64], hz[64];
        if (o->problem)
            snprintf(src, sizeof src, "--problem %s", o->problem);
        else
            snprintf(src, sizeof src, "--problem-file %.400s --case %s", o->file, p->name);
        if (s->method->flags & PB_KIND_FIXED)
            snprintf(set, sizeof set, "--steps-per-orbit %d", s->steps_per_orbit);
        else
            snprintf(set, sizeof set, "--tolerance %.3g", s->tolerance);
        snprintf(hz, sizeof hz, "%s %.17g", select_horizon_option(o), select_horizon_value(o));
        snprintf(s->command, sizeof s->command, "propbench run %s --method %s %s %s%s%s",
                 src, s->method->name, set, hz, o->form >= 0 ? " --formulation " : "",
                 o->form >= 0 ? pb_formulation_name(o->form) : "");
    }
}

/* The requirement as one line: every bound, the margin, the cost. */
static void select_print_head(const select_options *o, const pb_problem *p, const pb_requirement *req)
{
    int km = p->units == PB_UNITS_KM_S;
    printf("selection for %s over %.6g %s", p->name, select_horizon_value(o),
           o->orbits > 0 ? "orbits" : km ? "s" : "TU");
    const double b[RQ_N] = {req->max_pos_err, req->max_vel_err, req->max_radial, req->max_along,
                            req->max_cross};
    for (int k = 0; k < RQ_N; k++)
        if (b[k] > 0)
            printf(", %s error <= %.3g %s", rq_words[k], km ? 1e3 * b[k] : b[k],
                   k == RQ_VEL ? (km ? "m/s" : "DU/TU") : (km ? "m" : "DU"));
    if (req->max_energy_rel > 0)
        printf(", energy error <= %.3g", req->max_energy_rel);
    if (req->max_angmom_rel > 0)
        printf(", angular-momentum error <= %.3g", req->max_angmom_rel);
    if (req->margin > 0)
        printf(", margin %.3g (each bound / %.4g)", req->margin, 1 + req->margin);
    printf(", evaluation cost %.3g us\n", o->cost);
}

static void select_print(const select_options *o, const pb_problem *p, const pb_requirement *req,
                         const pb_selection *sel, int m, int found, double K)
{
    select_print_head(o, p, req);
    pb_select_print_table(sel, m, req, p->units == PB_UNITS_KM_S, found, o->cost_given, K);
}

static void select_progress(void *ctx, int done, const char *name)
{
    pb_progress_update(ctx, done, name);
}

/* Search every method, rank, print and write the selection; the exit
 * status: 0 when a method meets the requirement, 1 when none does. The
 * methods refused for the problem (refused[0..nref)) go into the JSON. */
static int select_run(const select_options *o, const pb_case_spec *base, const pb_requirement *req,
                      const pb_method_type *const *list, int m, const pb_selection *refused, int nref,
                      const char *path)
{
    pb_selection *sel = calloc((size_t)(m + nref > 0 ? m + nref : 1), sizeof *sel);
    if (!sel)
        return pb_cli_error("select", "out of memory");
    pb_progress prog;
    pb_progress_start(&prog, pb_cli_progress_wanted(o->quiet), m, "methods");
    /* a user who names the methods, or gives the force's cost, wants each
     * one's answer; a search of every method prunes by default */
    double K = o->prune_given ? o->prune : o->methods || o->cost_given ? 0 : PB_SELECT_PRUNE_DEFAULT;
    pb_select_plan plan = {(int)o->jobs, K};
    pb_select_all(base, req, list, m, &plan, sel, select_progress, &prog);
    pb_progress_end(&prog);
    select_commands(o, &base->problem, sel, m);
    pb_selection_rank(sel, m, o->cost_given);
    int found = 0;
    for (int i = 0; i < m; i++)
        found += sel[i].found;
    if (!o->quiet)
        select_print(o, &base->problem, req, sel, m, found, K);
    for (int i = 0; i < nref; i++)
        sel[m + i] = refused[i];
    json_t *doc = pb_selection_json(base, req, sel, m + nref, o->cost_given, K);
    int w = pb_json_write_atomic(path, doc), e = errno;
    json_decref(doc);
    free(sel);
    if (w)
        return pb_cli_error("select", "cannot write %s: %s", path, strerror(e));
    if (!o->quiet)
        printf("wrote %s\n", path);
    return found ? PB_EXIT_OK : PB_EXIT_FAIL;
}

int pb_cli_select(int argc, char **argv)
{
    select_options o;
    int rc = select_parse(argc, argv, &o);
    if (rc >= 0)
        return rc;
    pb_case_spec base;
    pb_requirement req;
    if ((rc = select_setup(&o, &base, &req)) || (rc = select_check_horizon(&o, &base)))
        return rc;
    const pb_method_type *list[64];
    pb_selection refused[64];
    int nref = 0;
    int m = select_methods(&o, &base.problem, list, refused, &nref);
    if (m < 0)
        return PB_EXIT_USAGE;
    char path[4096];
    if ((rc = select_out_path(&o, &base.problem, path, sizeof path)))
        return rc;
    return select_run(&o, &base, &req, list, m, refused, nref, path);
}
