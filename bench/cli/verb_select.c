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
#include "bench/study/suites.h"

static void select_help(FILE *f)
{
    fprintf(f,
"usage: propbench select (--problem NAME | --problem-file FILE [--case NAME])\n"
"                        (--orbits N | --horizon-s S)\n"
"                        [--max-pos-err X | --max-pos-err-m M] [--max-energy-err E]\n"
"                        [--methods M,..] [--formulation F] [--eval-cost-us C]\n"
"                        [--out FILE] [--quiet]\n\n"
"Find, for each method, the largest step (fixed-step methods, as steps per\n"
"orbit) or loosest tolerance (adaptive ones) whose run meets the requirement\n"
"over the horizon: a coarse sweep, bisection in log space, then confirmation\n"
"(the answer and a 10%% finer neighbour must pass). Ranked by evaluations; the\n"
"projected cost is evaluations x C microseconds + steps x measured ns/step.\n"
"  --max-pos-err X     maximum position error, problem length units\n"
"  --max-pos-err-m M   the same in metres (km-s problems)\n"
"  --max-energy-err E  maximum relative energy error\n"
"  --formulation F     cartesian, sundman or ks: the equations the methods\n"
"                      integrate (methods that cannot take it are not searched)\n"
"  --eval-cost-us C    cost of one evaluation of YOUR force model (default 1)\n"
"  --out FILE          selection JSON (default results/runs/select-<problem>.json)\n"
"Exit status 1 when no method meets the requirement.\n");
}

enum { SE_PROBLEM = 400, SE_FILE, SE_CASE, SE_ORBITS, SE_HORIZON, SE_POS, SE_POSM, SE_EN,
       SE_METHODS, SE_COST, SE_OUT, SE_QUIET, SE_HELP, SE_FORM };

static int select_cmp(const void *a, const void *b)
{
    const pb_selection *x = a, *y = b;
    if (x->found != y->found)
        return y->found - x->found;
    if (!x->found)
        return 0;
    return (x->confirmed.evals > y->confirmed.evals) - (x->confirmed.evals < y->confirmed.evals);
}

/* What the command line asks for; numbers left 0 were not given. */
typedef struct select_options {
    const char *problem, *file, *case_name, *out;
    char *methods;
    double orbits, horizon, pos, pos_m, en, cost;
    int quiet;
    int form;                 /* -1: the problem's own */
} select_options;

/* Parse argv into o. Returns -1 to go on, or an exit status to return at
 * once (0 after --help, 2 after an error, which it has printed). */
static int select_parse(int argc, char **argv, select_options *o)
{
    static const struct option opts[] = {
        {"problem", required_argument, 0, SE_PROBLEM}, {"problem-file", required_argument, 0, SE_FILE},
        {"case", required_argument, 0, SE_CASE}, {"orbits", required_argument, 0, SE_ORBITS},
        {"horizon-s", required_argument, 0, SE_HORIZON}, {"max-pos-err", required_argument, 0, SE_POS},
        {"max-pos-err-m", required_argument, 0, SE_POSM}, {"max-energy-err", required_argument, 0, SE_EN},
        {"methods", required_argument, 0, SE_METHODS}, {"eval-cost-us", required_argument, 0, SE_COST},
        {"out", required_argument, 0, SE_OUT}, {"quiet", no_argument, 0, SE_QUIET},
        {"formulation", required_argument, 0, SE_FORM},
        {"help", no_argument, 0, SE_HELP}, {0, 0, 0, 0}};
    memset(o, 0, sizeof *o);
    o->cost = 1;
    o->form = -1;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        double *dst = NULL;
        const char *name = NULL;
        switch (c) {
        case SE_PROBLEM: o->problem = optarg; break;
        case SE_FILE: o->file = optarg; break;
        case SE_CASE: o->case_name = optarg; break;
        case SE_METHODS: o->methods = optarg; break;
        case SE_OUT: o->out = optarg; break;
        case SE_QUIET: o->quiet = 1; break;
        case SE_FORM:
            if (pb_cli_formulation("select", optarg, &o->form)) return PB_EXIT_USAGE;
            continue;
        case SE_ORBITS: dst = &o->orbits; name = "--orbits"; break;
        case SE_HORIZON: dst = &o->horizon; name = "--horizon-s"; break;
        case SE_POS: dst = &o->pos; name = "--max-pos-err"; break;
        case SE_POSM: dst = &o->pos_m; name = "--max-pos-err-m"; break;
        case SE_EN: dst = &o->en; name = "--max-energy-err"; break;
        case SE_COST: dst = &o->cost; name = "--eval-cost-us"; break;
        case SE_HELP: select_help(stdout); return PB_EXIT_OK;
        case ':': return pb_cli_error("select", "option %s needs a value", argv[optind - 1]);
        default: return pb_cli_error("select", "unknown option '%s' (see propbench select --help)", argv[optind - 1]);
        }
        if (dst) {
            if (pb_cli_double("select", name, optarg, dst))
                return PB_EXIT_USAGE;
            /* a cost may be 0 (no force-model cost in the projection); nothing else may */
            if (!(*dst > 0) && dst != &o->cost)
                return pb_cli_error("select", "%s must be positive, got '%s'", name, optarg);
            if (!(*dst >= 0))
                return pb_cli_error("select", "%s must be >= 0, got '%s'", name, optarg);
        }
    }
    if (optind < argc)
        return pb_cli_error("select", "unexpected argument '%s'", argv[optind]);
    return -1;
}

/* The horizon option as given, for messages and the reproducing command. */
static const char *select_horizon_option(const select_options *o)
{
    return o->orbits > 0 ? "--orbits" : "--horizon-s";
}

static double select_horizon_value(const select_options *o)
{
    return o->orbits > 0 ? o->orbits : o->horizon;
}

/* The problem, horizon and requirement into base and req, each checked
 * against the others; 0, or the exit status of the error it printed. */
static int select_setup(const select_options *o, pb_case_spec *base, pb_requirement *req)
{
    pb_case_spec_default(base);
    if (!o->problem == !o->file)
        return pb_cli_error("select", "give exactly one of --problem NAME or --problem-file FILE");
    if (o->problem ? pb_cli_problem("select", o->problem, &base->problem)
                   : pb_problem_source_file("select", o->file, o->case_name, &base->problem))
        return PB_EXIT_USAGE;
    if (o->form >= 0)
        base->problem.formulation = (pb_formulation)o->form;
    const pb_problem *p = &base->problem;
    if (!o->orbits == !o->horizon)
        return pb_cli_error("select", "give exactly one of --orbits N or --horizon-s S");
    if (o->orbits > PB_CLI_ORBITS_MAX)
        return pb_cli_error("select", "--orbits must be in (0, %g], got '%.6g'", PB_CLI_ORBITS_MAX, o->orbits);
    if (o->orbits > 0 && !(p->period > 0))
        return pb_cli_error("select", "problem '%s' has no period: give --horizon-s", p->name);
    if (o->pos > 0 && o->pos_m > 0)
        return pb_cli_error("select", "give --max-pos-err or --max-pos-err-m, not both");
    if (o->pos_m > 0 && p->units != PB_UNITS_KM_S)
        return pb_cli_error("select", "--max-pos-err-m needs a problem in km (problem '%s' is normalized)", p->name);
    req->max_pos_err = o->pos > 0 ? o->pos : o->pos_m * 1e-3;
    req->max_energy_rel = o->en;
    if (!(req->max_pos_err > 0) && !(req->max_energy_rel > 0))
        return pb_cli_error("select", "give a requirement: --max-pos-err, --max-pos-err-m or --max-energy-err");
    if (req->max_energy_rel > 0 && !p->energy)
        return pb_cli_error("select", "problem '%s' has no energy integral", p->name);
    base->orbits = o->orbits;
    base->horizon_s = o->horizon;
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

/* The methods to search into list (at most 64): those named, or every one
 * that can run the problem. Returns how many, or -1 after a message. */
static int select_methods(const select_options *o, const pb_problem *p, const pb_method_type **list)
{
    int n = 0;
    if (o->methods) {
        char *names[64];
        n = pb_cli_split("select", "--methods", o->methods, names, 64);
        if (n < 0)
            return -1;
        for (int i = 0; i < n; i++)
            if (!(list[i] = pb_cli_method("select", names[i])))
                return -1;
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
        if (nf) {
            if (!o->quiet)
                printf("not searched: %s (cannot take formulation '%s')\n", list[i]->name,
                       pb_formulation_name(p->formulation));
            continue;
        }
        if (pb_method_fits(list[i], p)) {
            list[m++] = list[i];
            continue;
        }
        /* a method asked for by name that cannot run here is bad input */
        if (o->methods) {
            char why[256];
            pb_method_fit_error(list[i], p, why, sizeof why);
            pb_cli_error("select", "%s", why);
            return -1;
        }
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

/* The ranking table: one row a method, found ones ranked first. */
static void select_print_rows(const pb_selection *sel, int m, int km)
{
    printf("%4s %-15s %-18s %10s %12s %12s %10s %12s\n", "rank", "method", "setting", "evals",
           km ? "pos err [m]" : "pos err", "energy err", "ns/step", "projected s");
    int rank = 0;
    for (int i = 0; i < m; i++) {
        const pb_selection *s = &sel[i];
        char setting[40];
        if (!s->found) {
            printf("   - %-15s %s\n", s->method->name, s->note[0] ? s->note : "requirement not met");
            continue;
        }
        if (s->method->flags & PB_KIND_FIXED)
            snprintf(setting, sizeof setting, "%d steps/orbit", s->steps_per_orbit);
        else
            snprintf(setting, sizeof setting, "tol %.3g", s->tolerance);
        const pb_case_result *r = &s->confirmed;
        double pe = r->below_floor ? (double)NAN : (km ? 1e3 * r->pos_err_max : r->pos_err_max);
        char mname[40];
        snprintf(mname, sizeof mname, "%s%s", s->method->name, (s->method->flags & PB_FROM_GSL) ? "*" : "");
        printf("%4d %-15s %-18s %10ld %12.3e %12.3e %10.1f %12.4g\n", ++rank, mname,
               setting, r->evals, pe, r->energy_rel_max, r->ns_per_step, s->projected_s);
    }
}

/* The notes under the table: GSL marks, the verdict. */
static void select_print_notes(const pb_selection *sel, int m, int found)
{
    int gsl_shown = 0;
    for (int i = 0; i < m; i++)
        gsl_shown |= sel[i].found && (sel[i].method->flags & PB_FROM_GSL);
    if (gsl_shown)
        printf("(* GSL's stepper)\n");
    if (!found)
        printf("NO METHOD meets the requirement over this horizon.\n");
    else
        printf("cheapest by evaluations: %s; reproduce it with\n  %s\n"
               "Benchmarks on idealised problems do not validate an operational propagator;\n"
               "confirm with the mission's own verification.\n",
               sel[0].method->name, sel[0].command);
}

static void select_print(const select_options *o, const pb_problem *p, const pb_requirement *req,
                         const pb_selection *sel, int m, int found)
{
    int km = p->units == PB_UNITS_KM_S;
    printf("selection for %s over %.6g %s", p->name, select_horizon_value(o),
           o->orbits > 0 ? "orbits" : km ? "s" : "TU");
    if (req->max_pos_err > 0)
        printf(", position error <= %.3g %s", km ? 1e3 * req->max_pos_err : req->max_pos_err, km ? "m" : "DU");
    if (req->max_energy_rel > 0)
        printf(", energy error <= %.3g", req->max_energy_rel);
    printf(", evaluation cost %.3g us\n", o->cost);
    select_print_rows(sel, m, km);
    select_print_notes(sel, m, found);
}

/* Search every method, rank, print and write the selection; the exit
 * status: 0 when a method meets the requirement, 1 when none does. */
static int select_run(const select_options *o, const pb_case_spec *base, const pb_requirement *req,
                      const pb_method_type *const *list, int m, const char *path)
{
    pb_selection *sel = calloc((size_t)(m > 0 ? m : 1), sizeof *sel);
    if (!sel)
        return pb_cli_error("select", "out of memory");
    pb_progress prog;
    pb_progress_start(&prog, pb_cli_progress_wanted(o->quiet), m, "methods");
    for (int i = 0; i < m; i++) {
        pb_progress_update(&prog, i, list[i]->name);
        if (pb_select_method(base, list[i], req, &sel[i]) < 0)
            snprintf(sel[i].note, sizeof sel[i].note, "the case could not be run");
    }
    pb_progress_end(&prog);
    select_commands(o, &base->problem, sel, m);
    qsort(sel, (size_t)m, sizeof *sel, select_cmp);
    int found = 0;
    for (int i = 0; i < m; i++)
        found += sel[i].found;
    if (!o->quiet)
        select_print(o, &base->problem, req, sel, m, found);
    json_t *doc = pb_selection_json(base, req, sel, m);
    int w = pb_json_write_atomic(path, doc), e = errno;
    json_decref(doc);
    for (int i = 0; i < m; i++)
        pb_selection_free(&sel[i]);
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
    int m = select_methods(&o, &base.problem, list);
    if (m < 0)
        return PB_EXIT_USAGE;
    char path[4096];
    if ((rc = select_out_path(&o, &base.problem, path, sizeof path)))
        return rc;
    return select_run(&o, &base, &req, list, m, path);
}
