/* verb_run.c - `propbench run`: one case into a run directory. All input is
 * checked before anything is written, so bad input leaves no files. */
#include <errno.h>
#include <getopt.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "bench/cli/cli.h"
#include "bench/store/case_json.h"
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/store/run_swap.h"
#include "bench/cli/run_options.h"
#include "bench/store/oem_write.h"
#include <unistd.h>

/* An output file's path can be written: not a folder, in a folder that
 * exists and can be written; -1 after a message naming the option. */
static int run_check_out(const char *opt, const char *path)
{
    char dir[4096];
    snprintf(dir, sizeof dir, "%s", path);
    char *slash = strrchr(dir, '/');
    if (slash)
        slash == dir ? (void)(slash[1] = 0) : (void)(*slash = 0);
    else
        snprintf(dir, sizeof dir, ".");
    if (pb_cli_out_file("run", opt, path))
        return -1;
    if (access(dir, W_OK | X_OK)) {
        pb_cli_error("run", "%s '%s': cannot write in the folder %s: %s", opt, path, dir,
                     strerror(errno));
        return -1;
    }
    return 0;
}

static int run_check_outputs(const pb_run_options *o)
{
    if ((o->ephemeris_out && run_check_out("--ephemeris-out", o->ephemeris_out)) ||
        (o->truth_out && run_check_out("--truth-out", o->truth_out)))
        return -1;
    if (o->ephemeris_out && o->truth_out && !strcmp(o->ephemeris_out, o->truth_out)) {
        pb_cli_error("run", "--ephemeris-out and --truth-out name the same file '%s'", o->truth_out);
        return -1;
    }
    return 0;
}

/* The OEM files asked for; -1 after a message. */
static int run_write_oems(const pb_run_options *o, const pb_case_spec *spec, const pb_case_result *res)
{
    if (o->ephemeris_out && pb_oem_write(o->ephemeris_out, spec, res, PB_OEM_METHOD)) {
        pb_cli_error("run", "cannot write --ephemeris-out %s: %s", o->ephemeris_out, strerror(errno));
        return -1;
    }
    if (o->truth_out && pb_oem_write(o->truth_out, spec, res, PB_OEM_TRUTH)) {
        pb_cli_error("run", "cannot write --truth-out %s: %s", o->truth_out, strerror(errno));
        if (o->ephemeris_out)
            unlink(o->ephemeris_out); /* both or neither */
        return -1;
    }
    return 0;
}

/* The lock file to remove when a stop comes while the case runs (set only
 * while the lock is held; signals are blocked whenever it changes). */
static const char *volatile run_lock_path;

static void run_on_stop(int sig)
{
    if (run_lock_path)
        unlink(run_lock_path);
    _exit(128 + sig);
}

/* The signals that stop a run in order: ^C, kill, a closed terminal, ^\. */
static const int run_stop_sigs[] = {SIGINT, SIGTERM, SIGHUP, SIGQUIT};

/* block = 1: hold the stop signals back; 0: let them in, to run_on_stop. */
static void run_stops(int block)
{
    sigset_t set;
    sigemptyset(&set);
    for (size_t k = 0; k < sizeof run_stop_sigs / sizeof *run_stop_sigs; k++)
        sigaddset(&set, run_stop_sigs[k]);
    if (block) {
        sigprocmask(SIG_BLOCK, &set, NULL);
        return;
    }
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = run_on_stop;
    sigemptyset(&sa.sa_mask);
    for (size_t k = 0; k < sizeof run_stop_sigs / sizeof *run_stop_sigs; k++)
        sigaction(run_stop_sigs[k], &sa, NULL);
    sigprocmask(SIG_UNBLOCK, &set, NULL);
}

/* The lock given back and the stops let in again (a stop that waited ends
 * the process now, with nothing left behind). */
static void run_release(pb_run_out *out)
{
    pb_run_out_close(out);
    run_lock_path = NULL;
    run_stops(0);
}

/* The OEM files, then the run staged (series, summary) and swapped in.
 * 0; 1 with the reason in why (the run folder as it was, no OEM file);
 * 2 when an OEM file could not be written (message printed). */
static int run_write(const pb_run_options *o, pb_run_out *out, const pb_case_spec *spec,
                     const pb_case_result *res, char *why, size_t whylen)
{
    if (run_write_oems(o, spec, res))
        return 2;
    json_t *cases = json_array();
    json_array_append_new(cases, pb_case_to_json(spec, res));
    json_t *doc = pb_summary_new(cases);
    char path[4400];
    snprintf(path, sizeof path, "%s/summary.json", out->stage);
    int bad = pb_run_out_stage(out, why, whylen);
    if (!bad && (pb_series_write_states(out->stage, spec, res, o->series_states) ||
                 pb_json_write_atomic(path, doc))) {
        snprintf(why, whylen, "cannot write the run: %s", strerror(errno));
        bad = 1;
    }
    if (!bad && pb_run_out_commit(out, why, whylen))
        bad = 1;
    json_decref(doc);
    if (bad) {
        pb_run_out_discard(out);
        if (o->ephemeris_out) unlink(o->ephemeris_out);
        if (o->truth_out) unlink(o->truth_out);
        return 1;
    }
    return 0;
}

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

/* The progress line on stderr (a terminal, without --quiet): the share of
 * the horizon done, the rate and the time left at that rate, at most four
 * times a second, from the metric pass every 65536 steps. */
typedef struct run_prog {
    double start, last;
    int shown;
} run_prog;

static double run_wall(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static void run_progress(void *ctx, double done, long steps)
{
    run_prog *p = ctx;
    double now = run_wall(), el = now - p->start;
    if (p->shown && now - p->last < 0.25)
        return;
    p->last = now;
    p->shown = 1;
    double left = done > 0 && done < 1 ? el * (1 - done) / done : 0;
    fprintf(stderr, "\rpropbench run: %5.1f%% of the horizon, %.3g steps/s, about %.0f s left\033[K",
            100 * done, el > 0 ? (double)steps / el : 0.0, left);
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
    if (run_check_outputs(&o))
        return PB_EXIT_USAGE;
    char id[PB_CASE_ID_MAX];
    pb_case_id(&spec, id, sizeof id);
    char dir[4096];
    if (o.out)
        snprintf(dir, sizeof dir, "%s", o.out);
    else {
        snprintf(dir, sizeof dir, "results/runs/%s", id);
        pb_cli_note_replacing("run", dir);
    }

    pb_run_out out;
    char why[4400];
    run_stops(1);
    int lk = pb_run_out_open(&out, dir, why, sizeof why);
    if (lk) {
        pb_run_out_close(&out);
        run_stops(0);
        return pb_cli_error("run", "%s", why);
    }
    run_lock_path = out.lock;
    run_stops(0); /* a stop while the case runs removes the lock file and exits */
    pb_cli_warn_long("run", pb_case_fixed_steps(&spec));
    pb_case_result res;
    run_prog prog = {run_wall(), 0, 0};
    if (pb_cli_progress_wanted(o.quiet))
        spec.progress = run_progress, spec.progress_ctx = &prog;
    int s = pb_case_run(&spec, &res);
    if (prog.shown)
        fputs("\r\033[K", stderr);
    run_stops(1); /* from here to the swap, a stop waits */
    if (s) {
        run_release(&out);
        return pb_cli_error("run", "case %s could not be run: %s", id, pb_strerror(s));
    }
    if (!o.quiet)
        pb_cli_print_case(&spec, &res);
    int bad = run_write(&o, &out, &spec, &res, why, sizeof why);
    run_release(&out);
    if (bad) {
        pb_case_result_free(&res);
        if (bad == 1)
            fprintf(stderr, "propbench run: error: %s; %s was left as it was\n", why, dir);
        return PB_EXIT_USAGE;
    }
    char path[4200];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    if (!o.quiet)
        printf("wrote %s and %s/series/%s.csv\n", path, dir, res.id);
    if (res.status)
        fprintf(stderr, "propbench run: warning: the integration ended early: %s at t = %.9g %s\n",
                pb_strerror(res.status), res.diverged_at,
                spec.problem.units == PB_UNITS_KM_S ? "s" : "TU");
    pb_case_result_free(&res);
    return PB_EXIT_OK;
}
