/* verb_score.c - `propbench score`: measure a trajectory another program
 * produced (a CCSDS OEM file), at its own epochs, against propbench's truth,
 * with the metrics of a run, into a run folder that report, baseline and
 * check read unchanged. The file is replayed as the ephemeris pseudo-method
 * (bench/measure/ephemeris_method.h). All input is checked before anything
 * is written. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/cli/problem_source.h"
#include "bench/measure/ephemeris_method.h"
#include "bench/measure/harness.h"
#include "bench/store/case_json.h"
#include "bench/store/oem_read.h"
#include "bench/store/oem_write.h"
#include "bench/store/run_dir.h"
#include "bench/store/run_swap.h"

typedef struct score_opts {
    const char *problem, *problem_file, *case_name, *ephemeris, *label, *out;
    long evals;
    double cpu_s;
    int have_evals, have_cpu, quiet;
} score_opts;

enum { SC_PROBLEM = 256, SC_FILE, SC_CASE, SC_EPH, SC_LABEL, SC_EVALS, SC_CPU, SC_OUT,
       SC_QUIET, SC_HELP };

static const struct option score_long_options[] = {
    {"problem", required_argument, 0, SC_PROBLEM},
    {"problem-file", required_argument, 0, SC_FILE},
    {"case", required_argument, 0, SC_CASE},
    {"ephemeris", required_argument, 0, SC_EPH},
    {"label", required_argument, 0, SC_LABEL},
    {"evals", required_argument, 0, SC_EVALS},
    {"cpu-s", required_argument, 0, SC_CPU},
    {"out", required_argument, 0, SC_OUT},
    {"quiet", no_argument, 0, SC_QUIET},
    {"help", no_argument, 0, SC_HELP},
    {0, 0, 0, 0}
};

static void score_help(FILE *f)
{
    fprintf(f,
"usage: propbench score --problem NAME | --problem-file FILE [--case NAME]\n"
"                       --ephemeris FILE.oem [--label NAME] [--evals N]\n"
"                       [--cpu-s S] [--out DIR] [--quiet]\n\n"
"Measure a trajectory another program produced, given as a CCSDS OEM (KVN)\n"
"file, at its own epochs against the problem's truth, with the metrics of a\n"
"run. The problem's start is the epoch " PB_OEM_EPOCH " TT; CENTER_NAME and\n"
"REF_FRAME must be the problem's (EARTH and EME2000 for km problems).\n"
"Writes DIR/summary.json and DIR/series/<case>.csv (default DIR:\n"
"results/runs/<problem>__<label>__ephemeris); the case's \"method\" is the\n"
"label (default: OBJECT_NAME) and its \"source\" \"ephemeris\".\n\n"
"  --evals N     the force evaluations the other program spent (recorded)\n"
"  --cpu-s S     the CPU seconds it spent (recorded); absent costs are null\n");
}

static int score_number(int c, const char *a, score_opts *o)
{
    if (c == SC_EVALS) {
        if (pb_cli_long("score", "--evals", a, &o->evals)) return PB_EXIT_USAGE;
        if (o->evals < 0) return pb_cli_error("score", "--evals must be >= 0, got '%s'", a);
        o->have_evals = 1;
    } else {
        if (pb_cli_double("score", "--cpu-s", a, &o->cpu_s)) return PB_EXIT_USAGE;
        if (!(o->cpu_s >= 0)) return pb_cli_error("score", "--cpu-s must be >= 0, got '%s'", a);
        o->have_cpu = 1;
    }
    return -1;
}

static int score_parse(int argc, char **argv, score_opts *o)
{
    memset(o, 0, sizeof *o);
    optind = 1;
    opterr = 0;
    int c, rc;
    while ((c = getopt_long(argc, argv, ":", score_long_options, NULL)) != -1) {
        switch (c) {
        case SC_PROBLEM: o->problem = optarg; break;
        case SC_FILE: o->problem_file = optarg; break;
        case SC_CASE: o->case_name = optarg; break;
        case SC_EPH: o->ephemeris = optarg; break;
        case SC_LABEL: o->label = optarg; break;
        case SC_OUT:
            if (pb_cli_out_path("score", "--out", optarg, PB_CLI_RESERVE_DIR)) return PB_EXIT_USAGE;
            o->out = optarg;
            break;
        case SC_QUIET: o->quiet = 1; break;
        case SC_EVALS: case SC_CPU:
            if ((rc = score_number(c, optarg, o)) >= 0)
                return rc;
            break;
        case SC_HELP: score_help(stdout); return PB_EXIT_OK;
        case ':': return pb_cli_error("score", "option %s needs a value", argv[optind - 1]);
        default:
            return pb_cli_error("score", "unknown option '%s' (see propbench score --help)", argv[optind - 1]);
        }
    }
    if (optind < argc)
        return pb_cli_error("score", "unexpected argument '%s'", argv[optind]);
    if (!o->problem == !o->problem_file)
        return pb_cli_error("score", "give exactly one of --problem NAME or --problem-file FILE");
    if (o->case_name && !o->problem_file)
        return pb_cli_error("score", "--case goes with --problem-file");
    if (!o->ephemeris)
        return pb_cli_error("score", "--ephemeris FILE.oem is required");
    return -1;
}

/* The label (--label, else OBJECT_NAME, else the file's name) and a
 * file-safe case id made from it. */
static void score_names(const score_opts *o, const pb_oem *oem, const pb_problem *p,
                        char *label, size_t ll, char *id, size_t il)
{
    const char *base = strrchr(o->ephemeris, '/');
    base = base ? base + 1 : o->ephemeris;
    snprintf(label, ll, "%s", o->label ? o->label : oem->object_name[0] ? oem->object_name : base);
    char safe[PB_CASE_ID_MAX / 2];
    size_t n = strnlen(label, sizeof safe - 1);
    memcpy(safe, label, n);
    safe[n] = 0;
    for (char *c = safe; *c; c++)
        if (!((*c >= 'a' && *c <= 'z') || (*c >= 'A' && *c <= 'Z') || (*c >= '0' && *c <= '9') ||
              strchr(".+-", *c)))
            *c = '_';
    snprintf(id, il, "%s__%s__ephemeris", p->name, safe);
}

/* The case object as a run writes it, made to say what was measured: the
 * label as method, the source, and only the costs the user gave. */
static void score_json(json_t *c, const score_opts *o, const char *label, const pb_oem *oem,
                       const char *id)
{
    json_object_set_new(c, "id", json_string(id));
    json_object_set_new(c, "method", json_string(label));
    json_object_set_new(c, "source", json_string("ephemeris"));
    json_object_set_new(c, "ephemeris_file", json_string(o->ephemeris));
    json_object_set_new(c, "object_name", json_string(oem->object_name));
    json_object_set_new(c, "object_id", json_string(oem->object_id));
    json_object_set_new(c, "method_order", json_null());
    json_object_set_new(c, "method_kind", json_string("ephemeris"));
    json_object_del(c, "tolerance");
    /* the records' mean spacing stands where a run has its step (the report
     * names a case by its step or tolerance) */
    const pb_ephemeris *e = &oem->eph;
    json_object_set_new(c, "step", json_real((e->t[e->n - 1] - e->t[0]) / (e->n - 1)));
    json_object_set_new(c, "records", json_integer(oem->eph.n));
    /* only the costs the user gave: the other program's counts are not known */
    json_t *cost = json_object();
    json_object_set_new(cost, "steps", json_null());
    json_object_set_new(cost, "evals", o->have_evals ? json_integer(o->evals) : json_null());
    json_object_set_new(cost, "rejected", json_null());
    json_object_set_new(cost, "startup_steps", json_null());
    json_object_set_new(cost, "cpu_s", o->have_cpu ? json_real(o->cpu_s) : json_null());
    json_object_set_new(cost, "ns_per_step", json_null());
    json_object_set_new(cost, "ns_per_eval", o->have_cpu && o->have_evals && o->evals > 0
                        ? json_real(1e9 * o->cpu_s / (double)o->evals) : json_null());
    json_object_set_new(cost, "timing_repeats", json_integer(0));
    json_object_set_new(cost, "timing_clock", json_null());
    json_object_set_new(c, "cost", cost);
}

/* The spec that replays the ephemeris at its own epochs. */
static void score_spec(const pb_problem *p, const pb_oem *oem, pb_case_spec *spec)
{
    pb_case_spec_default(spec);
    spec->problem = *p;
    spec->method = &pb_method_ephemeris;
    spec->tolerance = 0.5; /* unused by the replay; removed from the summary */
    spec->horizon_s = oem->eph.t[oem->eph.n - 1] - p->t0;
    spec->repeats = 0;
    spec->linear_samples = 0;
    spec->sample_times = oem->eph.t;
    spec->nsample_times = oem->eph.n;
}

/* A short table of what was measured. */
static void score_print(const pb_case_spec *spec, const pb_case_result *r, const char *label, int n)
{
    const char *L = spec->problem.units == PB_UNITS_KM_S ? "km" : "DU";
    const char *V = spec->problem.units == PB_UNITS_KM_S ? "km/s" : "DU/TU";
    printf("case %s\n  problem                %s\n  trajectory             %s, %d records (ephemeris)\n",
           r->id, spec->problem.name, label, n);
    printf("  status                 %s\n", r->status_name);
    printf("  position error, max    %.3e %s\n  position error, final  %.3e %s\n",
           r->pos_err_max, L, r->pos_err_final, L);
    printf("  final RIC error        radial %+.3e  along %+.3e  cross %+.3e %s\n",
           r->radial_final, r->along_final, r->cross_final, L);
    printf("  velocity error, final  %.3e %s\n", r->vel_err_final, V);
    if (spec->problem.energy)
        printf("  energy                 max %.3e   final %.3e   (relative)\n",
               r->energy_rel_max, r->energy_rel_final);
}

/* Run the replay and write the folder (locked, staged beside it and
 * swapped in: bench/store/run_swap.h); an exit status. */
static int score_write(const score_opts *o, const pb_case_spec *spec, const pb_oem *oem,
                       const char *label, const char *id, const char *dir)
{
    char err[4400];
    pb_run_out out;
    if (pb_run_out_open(&out, dir, err, sizeof err)) {
        pb_run_out_close(&out);
        return pb_cli_error("score", "%s", err);
    }
    pb_case_result res;
    pb_ephemeris_bind(&oem->eph);
    int s = pb_case_run(spec, &res);
    pb_ephemeris_bind(NULL);
    if (s) {
        pb_run_out_close(&out);
        return pb_cli_error("score", "%s could not be scored: %s", o->ephemeris, pb_strerror(s));
    }
    snprintf(res.id, sizeof res.id, "%s", id);
    if (!o->quiet)
        score_print(spec, &res, label, oem->eph.n);
    json_t *cases = json_array(), *c = pb_case_to_json(spec, &res);
    score_json(c, o, label, oem, id);
    json_array_append_new(cases, c);
    json_t *doc = pb_summary_new(cases);
    char path[4400];
    snprintf(path, sizeof path, "%s/summary.json", out.stage);
    int bad = pb_run_out_stage(&out, err, sizeof err);
    if (!bad && (pb_series_write(out.stage, spec, &res) || pb_json_write_atomic(path, doc))) {
        snprintf(err, sizeof err, "cannot write the run directory %s: %s", dir, strerror(errno));
        bad = 1;
    }
    if (!bad)
        bad = pb_run_out_commit(&out, err, sizeof err);
    pb_run_out_close(&out);
    json_decref(doc);
    pb_case_result_free(&res);
    if (bad)
        return pb_cli_error("score", "%s", err);
    if (!o->quiet)
        printf("wrote %s/summary.json and %s/series/%s.csv\n", dir, dir, id);
    return PB_EXIT_OK;
}

int pb_cli_score(int argc, char **argv)
{
    score_opts o;
    int rc = score_parse(argc, argv, &o);
    if (rc >= 0)
        return rc;
    pb_problem p;
    if (o.problem ? pb_cli_problem("score", o.problem, &p)
                  : pb_problem_source_file("score", o.problem_file, o.case_name, &p))
        return PB_EXIT_USAGE;
    pb_oem oem;
    char err[1024];
    if (pb_oem_read(o.ephemeris, &p, &oem, err, sizeof err))
        return pb_cli_error("score", "%s", err);
    char label[PB_OEM_LINE_MAX + 1], id[PB_CASE_ID_MAX], dir[4096];
    score_names(&o, &oem, &p, label, sizeof label, id, sizeof id);
    snprintf(dir, sizeof dir, o.out ? "%s" : "results/runs/%s", o.out ? o.out : id);
    if (!o.out)
        pb_cli_note_replacing("score", dir);
    pb_case_spec spec;
    score_spec(&p, &oem, &spec);
    rc = score_write(&o, &spec, &oem, label, id, dir);
    pb_oem_free(&oem);
    return rc;
}
