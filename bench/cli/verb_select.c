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
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/study/select.h"
#include "bench/study/progress.h"
#include "bench/cli/problem_source.h"

static void select_help(FILE *f)
{
    fprintf(f,
"usage: propbench select (--problem NAME | --problem-file FILE [--case NAME])\n"
"                        (--orbits N | --horizon-s S)\n"
"                        [--max-pos-err X | --max-pos-err-m M] [--max-energy-err E]\n"
"                        [--methods M,..] [--eval-cost-us C] [--out FILE] [--quiet]\n\n"
"Find, for each method, the largest step (fixed-step methods, as steps per\n"
"orbit) or loosest tolerance (adaptive ones) whose run meets the requirement\n"
"over the horizon: a coarse sweep, bisection in log space, then confirmation\n"
"(the answer and a 10%% finer neighbour must pass). Ranked by evaluations; the\n"
"projected cost is evaluations x C microseconds + steps x measured ns/step.\n"
"  --max-pos-err X     maximum position error, problem length units\n"
"  --max-pos-err-m M   the same in metres (km-s problems)\n"
"  --max-energy-err E  maximum relative energy error\n"
"  --eval-cost-us C    cost of one evaluation of YOUR force model (default 1)\n"
"  --out FILE          selection JSON (default results/runs/select-<problem>.json)\n"
"Exit status 1 when no method meets the requirement.\n");
}

enum { SE_PROBLEM = 400, SE_FILE, SE_CASE, SE_ORBITS, SE_HORIZON, SE_POS, SE_POSM, SE_EN,
       SE_METHODS, SE_COST, SE_OUT, SE_QUIET, SE_HELP };

static int select_cmp(const void *a, const void *b)
{
    const pb_selection *x = a, *y = b;
    if (x->found != y->found)
        return y->found - x->found;
    if (!x->found)
        return 0;
    return (x->confirmed.evals > y->confirmed.evals) - (x->confirmed.evals < y->confirmed.evals);
}

int pb_cli_select(int argc, char **argv)
{
    static const struct option opts[] = {
        {"problem", required_argument, 0, SE_PROBLEM}, {"problem-file", required_argument, 0, SE_FILE},
        {"case", required_argument, 0, SE_CASE}, {"orbits", required_argument, 0, SE_ORBITS},
        {"horizon-s", required_argument, 0, SE_HORIZON}, {"max-pos-err", required_argument, 0, SE_POS},
        {"max-pos-err-m", required_argument, 0, SE_POSM}, {"max-energy-err", required_argument, 0, SE_EN},
        {"methods", required_argument, 0, SE_METHODS}, {"eval-cost-us", required_argument, 0, SE_COST},
        {"out", required_argument, 0, SE_OUT}, {"quiet", no_argument, 0, SE_QUIET},
        {"help", no_argument, 0, SE_HELP}, {0, 0, 0, 0}};
    const char *problem = NULL, *file = NULL, *case_name = NULL, *out = NULL;
    char *methods = NULL;
    double orbits = 0, horizon = 0, pos = 0, pos_m = 0, en = 0, cost = 1;
    int quiet = 0, c;
    optind = 1;
    opterr = 0;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        double *dst = NULL;
        const char *name = NULL;
        switch (c) {
        case SE_PROBLEM: problem = optarg; break;
        case SE_FILE: file = optarg; break;
        case SE_CASE: case_name = optarg; break;
        case SE_METHODS: methods = optarg; break;
        case SE_OUT: out = optarg; break;
        case SE_QUIET: quiet = 1; break;
        case SE_ORBITS: dst = &orbits; name = "--orbits"; break;
        case SE_HORIZON: dst = &horizon; name = "--horizon-s"; break;
        case SE_POS: dst = &pos; name = "--max-pos-err"; break;
        case SE_POSM: dst = &pos_m; name = "--max-pos-err-m"; break;
        case SE_EN: dst = &en; name = "--max-energy-err"; break;
        case SE_COST: dst = &cost; name = "--eval-cost-us"; break;
        case SE_HELP: select_help(stdout); return PB_EXIT_OK;
        case ':': return pb_cli_error("select", "option %s needs a value", argv[optind - 1]);
        default: return pb_cli_error("select", "unknown option '%s' (see propbench select --help)", argv[optind - 1]);
        }
        if (dst) {
            if (pb_cli_double("select", name, optarg, dst))
                return PB_EXIT_USAGE;
            if (!(*dst > 0) && dst != &cost)
                return pb_cli_error("select", "%s must be positive, got '%s'", name, optarg);
            if (!(*dst >= 0))
                return pb_cli_error("select", "%s must be >= 0, got '%s'", name, optarg);
        }
    }
    if (optind < argc)
        return pb_cli_error("select", "unexpected argument '%s'", argv[optind]);
    pb_case_spec base;
    memset(&base, 0, sizeof base);
    if (!problem == !file)
        return pb_cli_error("select", "give exactly one of --problem NAME or --problem-file FILE");
    if (problem ? pb_cli_problem("select", problem, &base.problem)
                : pb_problem_source_file("select", file, case_name, &base.problem))
        return PB_EXIT_USAGE;
    const pb_problem *p = &base.problem;
    if (!orbits == !horizon)
        return pb_cli_error("select", "give exactly one of --orbits N or --horizon-s S");
    if (orbits > PB_CLI_ORBITS_MAX)
        return pb_cli_error("select", "--orbits must be in (0, %g], got '%.6g'", PB_CLI_ORBITS_MAX, orbits);
    if (orbits > 0 && !(p->period > 0))
        return pb_cli_error("select", "problem '%s' has no period: give --horizon-s", p->name);
    if (pos > 0 && pos_m > 0)
        return pb_cli_error("select", "give --max-pos-err or --max-pos-err-m, not both");
    if (pos_m > 0 && p->units != PB_UNITS_KM_S)
        return pb_cli_error("select", "--max-pos-err-m needs a problem in km (problem '%s' is normalized)", p->name);
    pb_requirement req = {pos > 0 ? pos : pos_m * 1e-3, en};
    if (!(req.max_pos_err > 0) && !(req.max_energy_rel > 0))
        return pb_cli_error("select", "give a requirement: --max-pos-err, --max-pos-err-m or --max-energy-err");
    if (req.max_energy_rel > 0 && !p->energy)
        return pb_cli_error("select", "problem '%s' has no energy integral", p->name);
    base.orbits = orbits;
    base.horizon_s = horizon;
    base.eval_cost_us = cost;
    base.repeats = 3;
    base.linear_samples = 100; /* as `run` samples by default, so a run reproduces the answer */
    base.cache_dir = "results/cache";
    {
        /* the coarsest step the search tries (4 a period) must make a case
         * run can take at all; past that the horizon is not a question */
        pb_case_spec probe = base;
        probe.method = pb_method_find("rk4");
        probe.steps_per_orbit = 4;
        char why[512];
        if (probe.method && pb_case_validate(&probe, why, sizeof why))
            return pb_cli_error("select", "%s %.6g: %s", orbits > 0 ? "--orbits" : "--horizon-s",
                                orbits > 0 ? orbits : horizon, why);
        double coarsest = pb_case_fixed_steps(&probe);
        if (coarsest > PB_SELECT_MAX_STEPS)
            return pb_cli_error("select", "%s %.6g: even the search's coarsest step (4 a period) needs "
                                "%.3g steps, past its budget of %.3g a case; shorten the horizon",
                                orbits > 0 ? "--orbits" : "--horizon-s", orbits > 0 ? orbits : horizon,
                                coarsest, PB_SELECT_MAX_STEPS);
    }

    const pb_method_type *list[64];
    int n = 0;
    if (methods) {
        char *names[64];
        n = pb_cli_split("select", "--methods", methods, names, 64);
        if (n < 0)
            return PB_EXIT_USAGE;
        for (int i = 0; i < n; i++)
            if (!(list[i] = pb_cli_method("select", names[i])))
                return PB_EXIT_USAGE;
    } else {
        for (const pb_method_type *const *t = pb_method_table; *t && n < 64; t++)
            list[n++] = *t;
    }
    int m = 0;
    for (int i = 0; i < n; i++) {
        if (!((list[i]->flags & PB_FORM_SECOND) && p->velocity_dependent)) {
            list[m++] = list[i];
            continue;
        }
        /* a method asked for by name that cannot run here is bad input */
        if (methods)
            return pb_cli_error("select", "method '%s' needs a velocity-independent force, but "
                                "problem '%s' depends on velocity", list[i]->name, p->name);
    }
    char path[4096];
    if (out)
        snprintf(path, sizeof path, "%s", out);
    else
        snprintf(path, sizeof path, "results/runs/select-%s.json", p->name);
    /* make sure the answer can be written before spending the search on it */
    {
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
    }

    pb_selection *sel = calloc((size_t)(m > 0 ? m : 1), sizeof *sel);
    if (!sel)
        return pb_cli_error("select", "out of memory");
    pb_progress prog;
    pb_progress_start(&prog, pb_cli_progress_wanted(quiet), m, "methods");
    for (int i = 0; i < m; i++) {
        pb_progress_update(&prog, i, list[i]->name);
        if (pb_select_method(&base, list[i], &req, &sel[i]) < 0)
            snprintf(sel[i].note, sizeof sel[i].note, "the case could not be run");
    }
    pb_progress_end(&prog);
    for (int i = 0; i < m; i++) {
        pb_selection *s = &sel[i];
        if (!s->found)
            continue;
        char src[600], set[64], hz[64];
        if (problem)
            snprintf(src, sizeof src, "--problem %s", problem);
        else
            snprintf(src, sizeof src, "--problem-file %.400s --case %s", file, p->name);
        if (s->method->flags & PB_KIND_FIXED)
            snprintf(set, sizeof set, "--steps-per-orbit %d", s->steps_per_orbit);
        else
            snprintf(set, sizeof set, "--tolerance %.3g", s->tolerance);
        if (orbits > 0)
            snprintf(hz, sizeof hz, "--orbits %.17g", orbits);
        else
            snprintf(hz, sizeof hz, "--horizon-s %.17g", horizon);
        snprintf(s->command, sizeof s->command, "propbench run %s --method %s %s %s",
                 src, s->method->name, set, hz);
    }
    qsort(sel, (size_t)m, sizeof *sel, select_cmp);
    int found = 0;
    for (int i = 0; i < m; i++)
        found += sel[i].found;
    int km = p->units == PB_UNITS_KM_S;
    if (!quiet) {
        printf("selection for %s over %.6g %s", p->name, orbits > 0 ? orbits : horizon,
               orbits > 0 ? "orbits" : km ? "s" : "TU");
        if (req.max_pos_err > 0)
            printf(", position error <= %.3g %s", km ? 1e3 * req.max_pos_err : req.max_pos_err, km ? "m" : "DU");
        if (req.max_energy_rel > 0)
            printf(", energy error <= %.3g", req.max_energy_rel);
        printf(", evaluation cost %.3g us\n", cost);
        printf("%4s %-15s %-18s %10s %12s %12s %10s %12s\n", "rank", "method", "setting", "evals",
               km ? "pos err [m]" : "pos err", "energy err", "ns/step", "projected s");
        int rank = 0;
        for (int i = 0; i < m; i++) {
            pb_selection *s = &sel[i];
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
        int gsl_shown = 0;
        for (int i = 0; i < m; i++)
            gsl_shown |= sel[i].found && (sel[i].method->flags & PB_FROM_GSL);
        if (gsl_shown)
            printf("(* GSL's stepper)\n");
        long cut_lo = -1, cut_hi = 0;
        for (int i = 0; i < m; i++)
            if (sel[i].found && (sel[i].method->flags & PB_KIND_ADAPTIVE)) {
                long nc = sel[i].confirmed.output_cut;
                cut_lo = cut_lo < 0 || nc < cut_lo ? nc : cut_lo;
                cut_hi = nc > cut_hi ? nc : cut_hi;
            }
        if (cut_hi > 0)
            printf("adaptive rows include %ld to %ld steps shortened to land on the sample times\n"
                   "(the output grid's cost; a propagator with dense output would not pay it)\n",
                   cut_lo, cut_hi);
        if (!found)
            printf("NO METHOD meets the requirement over this horizon.\n");
        else
            printf("cheapest by evaluations: %s; reproduce it with\n  %s\n"
                   "Benchmarks on idealised problems do not validate an operational propagator;\n"
                   "confirm with the mission's own verification.\n",
                   sel[0].method->name, sel[0].command);
    }
    json_t *doc = pb_selection_json(&base, &req, sel, m);
    int w = pb_json_write_atomic(path, doc);
    json_decref(doc);
    for (int i = 0; i < m; i++)
        pb_selection_free(&sel[i]);
    free(sel);
    if (w)
        return pb_cli_error("select", "cannot write %s", path);
    if (!quiet)
        printf("wrote %s\n", path);
    return found ? PB_EXIT_OK : PB_EXIT_FAIL;
}
