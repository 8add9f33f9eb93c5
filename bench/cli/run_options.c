/* run_options.c - parsing of the one-case options (see run_options.h). */
#include <getopt.h>
#include <string.h>
#include "bench/cli/run_options.h"
#include "bench/cli/cli.h"
#include "bench/cli/problem_source.h"
#include "bench/study/suites.h"

enum { OPT_PROBLEM = 256, OPT_FILE, OPT_CASE, OPT_METHOD, OPT_SPO, OPT_STEP, OPT_TOL,
       OPT_ORBITS, OPT_HORIZON, OPT_OUT, OPT_COMP, OPT_REPEATS, OPT_COST, OPT_SAMPLES,
       OPT_MAXSTEPS, OPT_QUIET, OPT_HELP, OPT_EPH_OUT, OPT_TRUTH_OUT, OPT_SERIES_STATES, OPT_FORM };

static const struct option run_long_options[] = {
    {"problem", required_argument, 0, OPT_PROBLEM},
    {"problem-file", required_argument, 0, OPT_FILE},
    {"case", required_argument, 0, OPT_CASE},
    {"method", required_argument, 0, OPT_METHOD},
    {"steps-per-orbit", required_argument, 0, OPT_SPO},
    {"step", required_argument, 0, OPT_STEP},
    {"tolerance", required_argument, 0, OPT_TOL},
    {"orbits", required_argument, 0, OPT_ORBITS},
    {"horizon-s", required_argument, 0, OPT_HORIZON},
    {"out", required_argument, 0, OPT_OUT},
    {"compensated", no_argument, 0, OPT_COMP},
    {"repeats", required_argument, 0, OPT_REPEATS},
    {"eval-cost-us", required_argument, 0, OPT_COST},
    {"samples", required_argument, 0, OPT_SAMPLES},
    {"max-steps", required_argument, 0, OPT_MAXSTEPS},
    {"quiet", no_argument, 0, OPT_QUIET},
    {"ephemeris-out", required_argument, 0, OPT_EPH_OUT},
    {"truth-out", required_argument, 0, OPT_TRUTH_OUT},
    {"series-states", no_argument, 0, OPT_SERIES_STATES},
    {"formulation", required_argument, 0, OPT_FORM},
    {"help", no_argument, 0, OPT_HELP},
    {0, 0, 0, 0}
};

void pb_run_options_help(FILE *f)
{
    pb_case_spec d;
    pb_case_spec_default(&d); /* the defaults shown are the ones used */
    fprintf(f,
"case options:\n"
"  --problem NAME          a built-in problem (propbench list problems)\n"
"  --problem-file FILE     an INI problem file; --case NAME picks a section\n"
"                          (default: the first)\n"
"  --method NAME           an integrator (propbench list methods)\n"
"  --steps-per-orbit N     fixed-step methods: N steps per period\n"
"  --step H                fixed-step methods: step in time units instead\n"
"  --tolerance TOL         adaptive methods: relative = absolute tolerance\n"
"  --orbits N              horizon in periods (default: the problem's)\n"
"  --horizon-s S           horizon in time units (instead of --orbits)\n"
"  --compensated           compensated summation of the state update\n"
"  --formulation F         cartesian, sundman or ks: the equations a first-order\n"
"                          method integrates (default: the problem's, cartesian);\n"
"                          metrics stay in Cartesian time and state\n"
"  --repeats N             timing repeats, at least N and 0.2 s of CPU time, median\n"
"                          reported (default %d; 0: no timing)\n"
"  --eval-cost-us X        your cost of one force evaluation, for projected cost\n"
"  --samples N             linear samples for plots (default %d); no metric changes:\n"
"                          metrics use a fixed grid\n"
"  --max-steps N           step budget (default: automatic)\n"
"  --out DIR               run directory\n"
"  --ephemeris-out F.oem   run: the method's states at the sample times as a\n"
"                          CCSDS OEM (KVN); epoch of t0: 2000-01-01T12:00:00 TT\n"
"  --truth-out F.oem       run: the truth's states at the same times\n"
"  --series-states         run: the series CSV also holds both states\n"
"  --quiet                 print nothing but errors\n", d.repeats, d.linear_samples);
}

/* The options that take a number: parse a into o, checked against its
 * range. Returns -1 to go on, or the exit status of the error it printed. */
static int run_options_number(const char *verb, int c, const char *a, pb_run_options *o)
{
    switch (c) {
    case OPT_SPO:
        if (pb_cli_long(verb, "--steps-per-orbit", a, &o->steps_per_orbit)) return PB_EXIT_USAGE;
        if (o->steps_per_orbit <= 0 || o->steps_per_orbit > 100000000L)
            return pb_cli_error(verb, "--steps-per-orbit must be in 1..1e8, got '%s'", a);
        o->have_steps = 1;
        break;
    case OPT_STEP:
        if (pb_cli_double(verb, "--step", a, &o->step)) return PB_EXIT_USAGE;
        if (!(o->step > 0)) return pb_cli_error(verb, "--step must be positive, got '%s'", a);
        o->have_step = 1;
        break;
    case OPT_TOL:
        if (pb_cli_double(verb, "--tolerance", a, &o->tolerance)) return PB_EXIT_USAGE;
        if (!(o->tolerance > 0 && o->tolerance < 1))
            return pb_cli_error(verb, "--tolerance must be in (0, 1), got '%s'", a);
        o->have_tol = 1;
        break;
    case OPT_ORBITS:
        if (pb_cli_double(verb, "--orbits", a, &o->orbits)) return PB_EXIT_USAGE;
        if (!(o->orbits > 0) || o->orbits > PB_CLI_ORBITS_MAX)
            return pb_cli_error(verb, "--orbits must be in (0, %g], got '%s'", PB_CLI_ORBITS_MAX, a);
        o->have_orbits = 1;
        break;
    case OPT_HORIZON:
        if (pb_cli_double(verb, "--horizon-s", a, &o->horizon_s)) return PB_EXIT_USAGE;
        if (!(o->horizon_s > 0)) return pb_cli_error(verb, "--horizon-s must be positive, got '%s'", a);
        o->have_horizon = 1;
        break;
    case OPT_REPEATS:
        if (pb_cli_long(verb, "--repeats", a, &o->repeats)) return PB_EXIT_USAGE;
        if (o->repeats < 0 || o->repeats > 1000)
            return pb_cli_error(verb, "--repeats must be in 0..1000, got '%s'", a);
        break;
    case OPT_COST:
        if (pb_cli_double(verb, "--eval-cost-us", a, &o->eval_cost_us)) return PB_EXIT_USAGE;
        if (!(o->eval_cost_us >= 0)) return pb_cli_error(verb, "--eval-cost-us must be >= 0, got '%s'", a);
        break;
    case OPT_SAMPLES:
        if (pb_cli_long(verb, "--samples", a, &o->samples)) return PB_EXIT_USAGE;
        if (o->samples < 0 || o->samples > 100000)
            return pb_cli_error(verb, "--samples must be in 0..100000, got '%s'", a);
        break;
    case OPT_MAXSTEPS:
        if (pb_cli_long(verb, "--max-steps", a, &o->max_steps)) return PB_EXIT_USAGE;
        if (o->max_steps <= 0) return pb_cli_error(verb, "--max-steps must be positive, got '%s'", a);
        break;
    }
    return -1;
}

int pb_run_options_parse(const char *verb, int argc, char **argv, pb_run_options *o,
                         void (*help)(FILE *))
{
    pb_case_spec d;
    pb_case_spec_default(&d);
    memset(o, 0, sizeof *o);
    o->formulation = -1;
    o->repeats = d.repeats;
    o->samples = d.linear_samples;
    optind = 1;
    opterr = 0;
    int c, rc;
    while ((c = getopt_long(argc, argv, ":", run_long_options, NULL)) != -1) {
        const char *a = optarg;
        switch (c) {
        case OPT_PROBLEM: o->problem = a; break;
        case OPT_FILE: o->problem_file = a; break;
        case OPT_CASE: o->case_name = a; break;
        case OPT_METHOD: o->method = a; break;
        case OPT_OUT:
            if (pb_cli_out_path(verb, "--out", a, PB_CLI_RESERVE_DIR)) return PB_EXIT_USAGE;
            o->out = a;
            break;
        case OPT_COMP: o->compensated = 1; break;
        case OPT_QUIET: o->quiet = 1; break;
        case OPT_EPH_OUT:
        case OPT_TRUTH_OUT:
            if (pb_cli_out_path(verb, c == OPT_EPH_OUT ? "--ephemeris-out" : "--truth-out", a,
                                PB_CLI_RESERVE_FILE))
                return PB_EXIT_USAGE;
            *(c == OPT_EPH_OUT ? &o->ephemeris_out : &o->truth_out) = a;
            break;
        case OPT_SERIES_STATES: o->series_states = 1; break;
        case OPT_FORM:
            if (pb_cli_formulation(verb, a, &o->formulation)) return PB_EXIT_USAGE;
            break;
        case OPT_SPO: case OPT_STEP: case OPT_TOL: case OPT_ORBITS: case OPT_HORIZON:
        case OPT_REPEATS: case OPT_COST: case OPT_SAMPLES: case OPT_MAXSTEPS:
            if ((rc = run_options_number(verb, c, a, o)) >= 0)
                return rc;
            break;
        case OPT_HELP:
            help(stdout);
            return PB_EXIT_OK;
        case ':':
            return pb_cli_error(verb, "option %s needs a value", argv[optind - 1]);
        default:
            return pb_cli_error(verb, "unknown option '%s' (see propbench %s --help)", argv[optind - 1], verb);
        }
    }
    if (optind < argc)
        return pb_cli_error(verb, "unexpected argument '%s'", argv[optind]);
    return -1;
}

/* The problem (named or from a file) and the method; -1 after a message. */
static int run_options_problem_method(const char *verb, const pb_run_options *o, pb_case_spec *spec)
{
    if (!o->problem == !o->problem_file) {
        pb_cli_error(verb, "give exactly one of --problem NAME or --problem-file FILE");
        return -1;
    }
    if (o->case_name && !o->problem_file) {
        pb_cli_error(verb, "--case goes with --problem-file");
        return -1;
    }
    if (o->problem) {
        if (pb_cli_problem(verb, o->problem, &spec->problem))
            return -1;
    } else if (pb_problem_source_file(verb, o->problem_file, o->case_name, &spec->problem)) {
        return -1;
    }
    if (!o->method) {
        pb_cli_error(verb, "--method NAME is required (see propbench list methods)");
        return -1;
    }
    if (!(spec->method = pb_cli_method(verb, o->method)))
        return -1;
    return 0;
}

/* The step or tolerance must suit the kind of method, and the horizon the
 * problem; -1 after a message. */
static int run_options_check_setting(const char *verb, const pb_run_options *o, const pb_case_spec *spec)
{
    const pb_problem *p = &spec->problem;
    int fixed = (spec->method->flags & PB_KIND_FIXED) != 0;
    if (fixed && o->have_tol) {
        pb_cli_error(verb, "method '%s' is fixed-step: give --steps-per-orbit or --step, not --tolerance", o->method);
        return -1;
    }
    if (!fixed && (o->have_steps || o->have_step)) {
        pb_cli_error(verb, "method '%s' is adaptive: give --tolerance, not a step", o->method);
        return -1;
    }
    if (fixed && !o->have_steps && !o->have_step) {
        pb_cli_error(verb, "method '%s' needs --steps-per-orbit N or --step H", o->method);
        return -1;
    }
    if (o->have_steps && o->have_step) {
        pb_cli_error(verb, "give --steps-per-orbit or --step, not both");
        return -1;
    }
    if (!fixed && !o->have_tol) {
        pb_cli_error(verb, "method '%s' needs --tolerance TOL", o->method);
        return -1;
    }
    if (o->have_orbits && o->have_horizon) {
        pb_cli_error(verb, "give --orbits or --horizon-s, not both");
        return -1;
    }
    if (o->have_orbits && !(p->period > 0)) {
        pb_cli_error(verb, "problem '%s' has no period: give --horizon-s instead of --orbits", p->name);
        return -1;
    }
    return 0;
}

int pb_run_options_spec(const char *verb, const pb_run_options *o, pb_case_spec *spec)
{
    pb_case_spec_default(spec);
    if (run_options_problem_method(verb, o, spec) || run_options_check_setting(verb, o, spec))
        return -1;
    const pb_problem *p = &spec->problem;
    if (o->formulation >= 0)
        spec->problem.formulation = (pb_formulation)o->formulation;
    spec->steps_per_orbit = (int)o->steps_per_orbit;
    spec->step_s = o->have_step ? o->step : 0;
    spec->tolerance = o->tolerance;
    if (o->have_orbits) {
        spec->orbits = o->orbits;
    } else if (o->have_horizon) {
        spec->horizon_s = o->horizon_s;
    } else if (p->period > 0 && p->default_orbits > 0) {
        spec->orbits = p->default_orbits;
    } else {
        spec->horizon_s = p->default_horizon_s;
    }
    spec->compensated = o->compensated;
    spec->repeats = (int)o->repeats;
    spec->eval_cost_us = o->eval_cost_us;
    spec->linear_samples = (int)o->samples;
    spec->max_steps = o->max_steps;
    return 0;
}
