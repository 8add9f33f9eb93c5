/* verb_sweep.c - `propbench sweep`: a named suite or a grid of cases into one
 * run directory, with worker processes and deterministic shards. */
#include <getopt.h>
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

static void sweep_help(FILE *f)
{
    fprintf(f,
"usage: propbench sweep (--suite NAME | [--problems P,..] [--problem-file FILE [--case NAME]]\n"
"                        --methods M,..\n"
"                        [--steps-per-orbit N,..] [--tolerances T,..] [--orbits N])\n"
"                       [--out DIR] [-j N] [--shard K/N] [--repeats N]\n"
"                       [--eval-cost-us X] [--compensated] [--report] [--quiet]\n\n"
"Run many cases into one run directory: DIR/summary.json and DIR/series/.\n"
"A grid is problems x methods x (steps per orbit for fixed-step methods,\n"
"tolerances for adaptive ones); it gives work-precision (error against\n"
"evaluations) and convergence (error against step) data per method.\n"
"  -j N          worker processes (default 1); results are the same for every N\n"
"  --shard K/N   run only the K-th of N deterministic slices; join with merge\n"
"  --report      write plots and report.html/report.md afterwards\n"
"  --compensated compensated summation for every method that has it\n"
"suites: propbench list suites\n");
}

enum { SW_SUITE = 300, SW_PROBLEMS, SW_METHODS, SW_STEPS, SW_TOLS, SW_ORBITS, SW_OUT,
       SW_SHARD, SW_REPEATS, SW_COST, SW_REPORT, SW_QUIET, SW_HELP, SW_COMP, SW_FILE, SW_CASE };

int pb_cli_sweep(int argc, char **argv)
{
    static const struct option opts[] = {
        {"suite", required_argument, 0, SW_SUITE}, {"problems", required_argument, 0, SW_PROBLEMS},
        {"methods", required_argument, 0, SW_METHODS}, {"steps-per-orbit", required_argument, 0, SW_STEPS},
        {"tolerances", required_argument, 0, SW_TOLS}, {"orbits", required_argument, 0, SW_ORBITS},
        {"out", required_argument, 0, SW_OUT}, {"shard", required_argument, 0, SW_SHARD},
        {"jobs", required_argument, 0, 'j'}, {"repeats", required_argument, 0, SW_REPEATS},
        {"eval-cost-us", required_argument, 0, SW_COST}, {"report", no_argument, 0, SW_REPORT},
        {"compensated", no_argument, 0, SW_COMP},
        {"problem-file", required_argument, 0, SW_FILE}, {"case", required_argument, 0, SW_CASE},
        {"quiet", no_argument, 0, SW_QUIET}, {"help", no_argument, 0, SW_HELP}, {0, 0, 0, 0}};
    const char *suite = NULL, *out = NULL, *pfile = NULL, *pcase = NULL;
    pb_problem *fcases = NULL;
    int nf = 0;
    char *problems = NULL, *methods = NULL, *steps = NULL, *tols = NULL;
    double orbits = 0, cost = 0;
    long jobs = 1, repeats = -1;
    int shard_k = 1, shard_n = 1, quiet = 0, report = 0, comp = 0;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":j:", opts, NULL)) != -1) {
        switch (c) {
        case SW_SUITE: suite = optarg; break;
        case SW_FILE: pfile = optarg; break;
        case SW_CASE: pcase = optarg; break;
        case SW_PROBLEMS: problems = optarg; break;
        case SW_METHODS: methods = optarg; break;
        case SW_STEPS: steps = optarg; break;
        case SW_TOLS: tols = optarg; break;
        case SW_OUT: out = optarg; break;
        case SW_QUIET: quiet = 1; break;
        case SW_REPORT: report = 1; break;
        case SW_COMP: comp = 1; break;
        case SW_ORBITS:
            if (pb_cli_double("sweep", "--orbits", optarg, &orbits)) return PB_EXIT_USAGE;
            if (!(orbits > 0) || orbits > PB_CLI_ORBITS_MAX)
                return pb_cli_error("sweep", "--orbits must be in (0, %g], got '%s'", PB_CLI_ORBITS_MAX, optarg);
            break;
        case SW_COST:
            if (pb_cli_double("sweep", "--eval-cost-us", optarg, &cost)) return PB_EXIT_USAGE;
            if (!(cost >= 0)) return pb_cli_error("sweep", "--eval-cost-us must be >= 0, got '%s'", optarg);
            break;
        case 'j':
            if (pb_cli_long("sweep", "-j", optarg, &jobs)) return PB_EXIT_USAGE;
            if (jobs < 1 || jobs > 256) return pb_cli_error("sweep", "-j must be in 1..256, got '%s'", optarg);
            break;
        case SW_REPEATS:
            if (pb_cli_long("sweep", "--repeats", optarg, &repeats)) return PB_EXIT_USAGE;
            if (repeats < 0 || repeats > 1000) return pb_cli_error("sweep", "--repeats must be in 0..1000");
            break;
        case SW_SHARD: {
            char tail;
            if (sscanf(optarg, "%d/%d%c", &shard_k, &shard_n, &tail) != 2 || shard_n < 1 ||
                shard_k < 1 || shard_k > shard_n)
                return pb_cli_error("sweep", "--shard expects K/N with 1 <= K <= N, got '%s'", optarg);
            break;
        }
        case SW_HELP: sweep_help(stdout); return PB_EXIT_OK;
        case ':': return pb_cli_error("sweep", "option %s needs a value", argv[optind - 1]);
        default: return pb_cli_error("sweep", "unknown option '%s' (see propbench sweep --help)", argv[optind - 1]);
        }
    }
    if (optind < argc)
        return pb_cli_error("sweep", "unexpected argument '%s'", argv[optind]);
    if (!suite == !(problems || pfile || methods))
        return pb_cli_error("sweep", "give --suite NAME, or a grid with --problems (and/or "
                            "--problem-file) and --methods");
    if (pcase && !pfile)
        return pb_cli_error("sweep", "--case goes with --problem-file");

    pb_case_list list = {0, 0, NULL};
    int rc = PB_EXIT_USAGE;
    if (suite) {
        if (pb_suite_expand(suite, &list)) {
            pb_cli_error("sweep", "unknown suite '%s' (see propbench list suites)", suite);
            goto out;
        }
    } else {
        if (!(problems || pfile) || !methods) {
            pb_cli_error("sweep", "a grid needs --problems or --problem-file, and --methods");
            goto out;
        }
        if (pfile && pb_problem_source_cases("sweep", pfile, pcase, &fcases, &nf))
            goto out;
        char *pn[64], *mn[64], *sn[64], *tn[64];
        int np = problems ? pb_cli_split("sweep", "--problems", problems, pn, 64) : 0;
        int nm = pb_cli_split("sweep", "--methods", methods, mn, 64);
        int ns = steps ? pb_cli_split("sweep", "--steps-per-orbit", steps, sn, 64) : 0;
        int nt = tols ? pb_cli_split("sweep", "--tolerances", tols, tn, 64) : 0;
        if (np < 0 || nm < 0 || ns < 0 || nt < 0)
            goto out;
        long sv[64];
        double tv[64];
        for (int i = 0; i < ns; i++)
            if (pb_cli_long("sweep", "--steps-per-orbit", sn[i], &sv[i]))
                goto out;
            else if (sv[i] < 1 || sv[i] > 100000000L) {
                pb_cli_error("sweep", "--steps-per-orbit values must be whole numbers in 1..1e8 (got '%s')", sn[i]);
                goto out;
            }
        for (int i = 0; i < nt; i++)
            if (pb_cli_double("sweep", "--tolerances", tn[i], &tv[i]))
                goto out;
            else if (!(tv[i] > 0 && tv[i] < 1)) {
                pb_cli_error("sweep", "--tolerances values must be in (0, 1) (got '%s')", tn[i]);
                goto out;
            }
        for (int i = 0; i < np + nf; i++) {
            pb_problem p;
            if (i >= np)
                p = fcases[i - np]; /* the problem file's cases after the named ones */
            else if (pb_cli_problem("sweep", pn[i], &p))
                goto out;
            if (orbits > 0 && !(p.period > 0)) {
                pb_cli_error("sweep", "--orbits: problem '%s' has no period; its horizon is a time "
                             "(%.6g %s, from its definition), so leave --orbits out for it",
                             p.name, p.default_horizon_s, p.units == PB_UNITS_KM_S ? "s" : "TU");
                goto out;
            }
            for (int j = 0; j < nm; j++) {
                const pb_method_type *m = pb_cli_method("sweep", mn[j]);
                if (!m)
                    goto out;
                int fixed = (m->flags & PB_KIND_FIXED) != 0;
                int nv = fixed ? ns : nt;
                if (nv == 0) {
                    pb_cli_error("sweep", "method '%s' needs %s", m->name,
                                 fixed ? "--steps-per-orbit values" : "--tolerances values");
                    goto out;
                }
                for (int k = 0; k < nv; k++) {
                    pb_case_spec s;
                    memset(&s, 0, sizeof s);
                    s.problem = p;
                    s.method = m;
                    s.steps_per_orbit = fixed ? (int)sv[k] : 0;
                    s.tolerance = fixed ? 0 : tv[k];
                    if (p.period > 0 && (orbits > 0 || p.default_orbits > 0))
                        s.orbits = orbits > 0 ? orbits : p.default_orbits;
                    else
                        s.horizon_s = p.default_horizon_s;
                    s.repeats = 3;
                    s.linear_samples = 50;
                    s.compensated = comp && (m->flags & PB_KIND_COMPENSABLE);
                    s.cache_dir = "results/cache";
                    char err[512];
                    if (pb_case_validate(&s, err, sizeof err)) {
                        char id[PB_CASE_ID_MAX];
                        pb_case_id(&s, id, sizeof id);
                        pb_cli_error("sweep", "case %s (--steps-per-orbit/--tolerances x --orbits): %s", id, err);
                        goto out;
                    }
                    if (pb_case_list_add(&list, &s)) {
                        pb_cli_error("sweep", "out of memory");
                        goto out;
                    }
                }
            }
        }
    }
    for (int i = 0; i < list.n; i++) {
        /* --compensated applies to every method that has the variant */
        if (comp && (list.cases[i].method->flags & PB_KIND_COMPENSABLE))
            list.cases[i].compensated = 1;
        if (repeats >= 0)
            list.cases[i].repeats = (int)repeats;
        if (cost > 0)
            list.cases[i].eval_cost_us = cost;
        if (suite && orbits > 0 && list.cases[i].problem.period > 0)
            list.cases[i].orbits = orbits;
    }
    /* two cases with one id would share a series file and a baseline row */
    for (int i = 0; i < list.n; i++) {
        char a[PB_CASE_ID_MAX], b[PB_CASE_ID_MAX];
        pb_case_id(&list.cases[i], a, sizeof a);
        for (int j = 0; j < i; j++) {
            pb_case_id(&list.cases[j], b, sizeof b);
            if (!strcmp(a, b)) {
                pb_cli_error("sweep", "the grid holds case %s twice (repeated or equal values)", a);
                goto out;
            }
        }
    }
    char dir[4096];
    snprintf(dir, sizeof dir, "%s", out ? out : suite ? suite : "grid");
    if (!out)
        snprintf(dir, sizeof dir, "results/runs/%s", suite ? suite : "grid");
    double fixed_steps = 0;
    for (int i = 0; i < list.n; i++)
        if (shard_n <= 1 || i % shard_n == shard_k - 1)
            fixed_steps += pb_case_fixed_steps(&list.cases[i]);
    pb_cli_warn_long("sweep", fixed_steps);
    /* the output folder is checked before the banner, so a refusal is one line */
    char why[4400];
    if (pb_run_dir_prepare(dir, why, sizeof why)) {
        pb_cli_error("sweep", "%s", why);
        goto out;
    }
    pb_sweep_options so = {(int)jobs, shard_k, shard_n, pb_cli_progress_wanted(quiet), suite ? suite : "grid", quiet};
    if (!quiet)
        fprintf(stderr, "propbench sweep: %d cases%s into %s with %ld worker%s\n",
                shard_n > 1 ? (list.n + shard_n - shard_k) / shard_n : list.n,
                shard_n > 1 ? " (this shard)" : "", dir, jobs, jobs > 1 ? "s" : "");
    int sr = pb_sweep_run(&list, dir, &so);
    if (sr == -2) {
        rc = 128 + pb_sweep_stop_signal(); /* as a shell reports the signal */
        goto out;
    }
    if (sr)
        goto out;
    if (!quiet) {
        char path[4200];
        snprintf(path, sizeof path, "%s/summary.json", dir);
        json_t *doc = json_load_file(path, 0, NULL);
        if (doc)
            pb_summary_print(doc, stdout);
        json_decref(doc);
        printf("wrote %s/summary.json\n", dir);
    }
    rc = PB_EXIT_OK;
    if (report) {
        char *rargv[] = {"report", dir, quiet ? "--quiet" : NULL, NULL};
        rc = pb_cli_report(quiet ? 3 : 2, rargv);
    }
out:
    free(fcases);
    pb_case_list_free(&list);
    return rc;
}
