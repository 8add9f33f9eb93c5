/* verb_run.c - `propbench run`: one case into a run directory. All input is
 * checked before anything is written, so bad input leaves no files. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/store/case_json.h"
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/cli/run_options.h"

static void run_help(FILE *f)
{
    fprintf(f,
"usage: propbench run --problem NAME | --problem-file FILE [--case NAME]\n"
"                     --method NAME (--steps-per-orbit N | --step H | --tolerance TOL)\n"
"                     [--orbits N | --horizon-s S] [--out DIR] [options]\n\n"
"Integrate one case, measure it against the exact solution (or a reference\n"
"trajectory), print a short table and write DIR/summary.json and\n"
"DIR/series/<case>.csv (default DIR: results/runs/<case id>).\n\n");
    pb_run_options_help(f);
}

int pb_cli_run(int argc, char **argv)
{
    pb_run_options o;
    int rc = pb_run_options_parse("run", argc, argv, &o, run_help);
    if (rc >= 0)
        return rc;
    pb_case_spec spec;
    if (pb_run_options_spec("run", &o, &spec))
        return PB_EXIT_USAGE;
    char err[512];
    if (pb_case_validate(&spec, err, sizeof err))
        return pb_cli_error("run", "%s", err);
    char id[PB_CASE_ID_MAX];
    pb_case_id(&spec, id, sizeof id);
    char dir[4096];
    if (o.out)
        snprintf(dir, sizeof dir, "%s", o.out);
    else
        snprintf(dir, sizeof dir, "results/runs/%s", id);

    if (pb_run_dir_prepare(dir, err, sizeof err))
        return pb_cli_error("run", "%s", err);
    pb_cli_warn_long("run", pb_case_fixed_steps(&spec));
    json_t *previous = pb_run_dir_previous(dir); /* before this run writes anything */
    pb_case_result res;
    int s = pb_case_run(&spec, &res);
    if (s) {
        json_decref(previous);
        pb_run_dir_unprepare(dir);
        return pb_cli_error("run", "case %s could not be run: %s", id, pb_strerror(s));
    }
    if (!o.quiet)
        pb_cli_print_case(&spec, &res);
    json_t *cases = json_array();
    json_array_append_new(cases, pb_case_to_json(&spec, &res));
    json_t *doc = pb_summary_new(cases);
    char path[4200];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    int bad = pb_series_write(dir, &spec, &res);
    if (!bad && pb_json_write_atomic(path, doc)) {
        pb_run_dir_unwrite(dir, cases); /* no series without its summary */
        bad = 1;
    }
    int pruned = bad ? 0 : pb_run_dir_prune(dir, previous, doc);
    json_decref(previous);
    if (pruned && !o.quiet)
        fprintf(stderr, "propbench run: removed %d files an earlier run left in %s\n", pruned, dir);
    json_decref(doc);
    if (bad) {
        pb_case_result_free(&res);
        pb_run_dir_unprepare(dir);
        fprintf(stderr, "propbench run: error: cannot write the run directory %s\n", dir);
        return PB_EXIT_USAGE;
    }
    if (!o.quiet)
        printf("wrote %s and %s/series/%s.csv\n", path, dir, res.id);
    if (res.status)
        fprintf(stderr, "propbench run: warning: the integration ended early: %s at t = %.9g %s\n",
                pb_strerror(res.status), res.diverged_at,
                spec.problem.units == PB_UNITS_KM_S ? "s" : "TU");
    pb_case_result_free(&res);
    return PB_EXIT_OK;
}
