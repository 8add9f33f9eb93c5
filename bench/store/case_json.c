/* case_json.c - case objects and the summary document (see case_json.h). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/utsname.h>
#include <unistd.h>
#include "bench/store/case_json.h"
#include "bench/store/problem_json.h"
#include "bench/measure/harness.h"
#include "bench/measure/timing.h"
#include "integrators/method.h"

#ifndef PB_BUILD_FLAGS
#define PB_BUILD_FLAGS "unknown"
#endif

json_t *pb_json_real(double x)
{
    return isfinite(x) ? json_real(x) : json_null();
}

static const char *case_kind(unsigned flags)
{
    if (flags & PB_KIND_MULTISTEP) return "multistep";
    if (flags & PB_KIND_SYMPLECTIC) return "symplectic";
    if (flags & PB_KIND_ADAPTIVE) return "adaptive";
    return "fixed";
}

static double case_norm(const double *x, int dim)
{
    double s = 0;
    for (int i = 0; i < dim; i++)
        s += x[i] * x[i];
    return sqrt(s);
}

/* The orbit's own length and speed (|r0|, |v0|), the unit of the gate's
 * round-off floor for positions and velocities. A start at rest takes the
 * circular speed at |r0| instead, so the speed unit is never 0. */
static json_t *case_scales(const pb_problem *p)
{
    double len = case_norm(p->r0, p->dim), speed = case_norm(p->v0, p->dim);
    if (!(speed > 0) && len > 0)
        speed = sqrt(p->mu / len);
    json_t *o = json_object();
    json_object_set_new(o, "length", pb_json_real(len));
    json_object_set_new(o, "speed", pb_json_real(speed));
    return o;
}

static void case_settings(json_t *o, const pb_case_spec *spec)
{
    char id[PB_CASE_ID_MAX];
    pb_case_id(spec, id, sizeof id);
    const pb_method_type *m = spec->method;
    json_object_set_new(o, "id", json_string(id));
    json_object_set_new(o, "problem", json_string(spec->problem.name));
    json_object_set_new(o, "units", json_string(spec->problem.units == PB_UNITS_KM_S ? "km-s" : "normalized"));
    json_object_set_new(o, "method", json_string(m->name));
    json_object_set_new(o, "method_order", json_integer(m->order));
    json_object_set_new(o, "method_kind", json_string(case_kind(m->flags)));
    json_object_set_new(o, "from_gsl", json_boolean(m->flags & PB_FROM_GSL));
    const pb_method_origin *pl = pb_method_origin_of(m);
    if (pl)
        json_object_set_new(o, "plugin", json_pack("{s:s, s:s, s:s}", "path", pl->path,
                                                   "version", pl->version, "sha256", pl->sha256));
    if (m->flags & PB_KIND_FIXED) {
        if (spec->step_s > 0) {
            json_object_set_new(o, "step", json_real(spec->step_s));
            /* the fixed key, as a real number, where a period gives it meaning */
            if (spec->problem.period > 0)
                json_object_set_new(o, "steps_per_orbit", json_real(spec->problem.period / spec->step_s));
        } else
            json_object_set_new(o, "steps_per_orbit", json_integer(spec->steps_per_orbit));
    } else {
        json_object_set_new(o, "tolerance", json_real(spec->tolerance));
    }
    if (spec->orbits > 0 && spec->problem.period > 0)
        json_object_set_new(o, "orbits", json_real(spec->orbits));
    json_object_set_new(o, "horizon_s", json_real(pb_case_horizon(spec)));
    json_object_set_new(o, "compensated", json_boolean(spec->compensated));
    /* absent for Cartesian cases, so that baselines made before the key
     * existed compare unchanged */
    if (spec->problem.formulation != PB_FORMULATION_CARTESIAN)
        json_object_set_new(o, "formulation",
                            json_string(pb_formulation_name(spec->problem.formulation)));
    json_object_set_new(o, "scales", case_scales(&spec->problem));
}

json_t *pb_case_crashed_json(const pb_case_spec *spec, const char *why)
{
    json_t *o = json_object();
    case_settings(o, spec);
    json_object_set_new(o, "status", json_string("crashed"));
    json_object_set_new(o, "status_detail", json_string(why));
    return o;
}

static void case_growth(json_t *mt, const char *name, const pb_growth *g, double period)
{
    char key[64];
    snprintf(key, sizeof key, "growth_exponent_%s", name);
    json_object_set_new(mt, key, pb_json_real(g->k));
    snprintf(key, sizeof key, "growth_exponent_%s_err", name);
    json_object_set_new(mt, key, pb_json_real(g->k_err));
    snprintf(key, sizeof key, "growth_class_%s", name);
    json_object_set_new(mt, key, json_string(g->cls ? g->cls : "other"));
    snprintf(key, sizeof key, "growth_fit_from_orbits_%s", name);
    json_object_set_new(mt, key, pb_json_real(period > 0 ? g->from / period : (double)NAN));
}

/* What energy_rel is relative to, where it is not |E0| against the start's
 * energy; NULL there. */
static const char *case_energy_rel_to(const pb_case_spec *spec, const pb_case_result *res)
{
    if (spec->problem.invariants_from_truth && spec->problem.energy)
        return "the truth's own energy at the same time (the force changes the energy), "
               "divided by |E0|";
    if (res->energy_rel_to_parts)
        return "v0^2/2 + mu/|r0| (near-parabolic start: |E0| under 1e-6 of it)";
    return NULL;
}

/* The timing pass's numbers into a case's "cost". */
static void case_timing(json_t *c, const pb_case_result *res)
{
    json_object_set_new(c, "ns_per_step", pb_json_real(res->ns_per_step));
    json_object_set_new(c, "ns_per_eval", pb_json_real(res->ns_per_eval));
    /* how far to trust the two above: the timing pass's repeats, their
     * relative interquartile range, and the clock (null: not timed) */
    int timed = res->timing_repeats > 0;
    json_object_set_new(c, "ns_per_step_spread", pb_json_real(timed ? res->ns_per_step_spread : (double)NAN));
    json_object_set_new(c, "timing_repeats", json_integer(res->timing_repeats));
    json_object_set_new(c, "timing_clock", timed ? json_string(PB_TIMING_CLOCK) : json_null());
    /* the calibration kernel timed beside the repeats: what check --timing
     * compares is step_kernel_ratio, a step's time in kernel chunks */
    json_object_set_new(c, "calib_ns", pb_json_real(timed ? res->calib_ns : (double)NAN));
    json_object_set_new(c, "step_kernel_ratio", pb_json_real(timed ? res->step_kernel_ratio : (double)NAN));
}

json_t *pb_case_to_json(const pb_case_spec *spec, const pb_case_result *res)
{
    json_t *o = json_object();
    case_settings(o, spec);
    json_t *def = pb_problem_def_json(&spec->problem);
    if (def)
        json_object_set_new(o, "problem_def", def);
    json_object_set_new(o, "status", json_string(res->status_name));
    json_object_set_new(o, "status_detail",
                        json_string(res->status_detail ? res->status_detail : pb_strerror(res->status)));
    if (res->status) {
        json_object_set_new(o, "diverged_at", pb_json_real(res->diverged_at));
        if (spec->problem.period > 0)
            json_object_set_new(o, "diverged_at_orbits",
                                pb_json_real((res->diverged_at - spec->problem.t0) / spec->problem.period));
    }
    json_object_set_new(o, "t_end", pb_json_real(res->t_end));
    /* the "final" metrics are taken here: t_end on a finished run, the last
     * metric sample before it on one that stopped early */
    json_object_set_new(o, "t_final", pb_json_real(res->nsamples > 0 ? res->t_final : (double)NAN));
    if (res->h > 0)
        json_object_set_new(o, "h", json_real(res->h));

    json_t *mt = json_object();
    int km = spec->problem.units == PB_UNITS_KM_S;
    json_object_set_new(mt, "energy_rel_max", pb_json_real(res->energy_rel_max));
    const char *rel_to = case_energy_rel_to(spec, res);
    if (rel_to)
        json_object_set_new(mt, "energy_rel_to", json_string(rel_to));
    json_object_set_new(mt, "energy_rel_final", pb_json_real(res->energy_rel_final));
    json_object_set_new(mt, "angmom_rel_max", pb_json_real(res->angmom_rel_max));
    json_object_set_new(mt, "angmom_rel_final", pb_json_real(res->angmom_rel_final));
    /* errors below 10x the reference's own error are not numbers we can defend */
    double pmax = res->below_floor ? (double)NAN : res->pos_err_max;
    double pfin = res->below_floor ? (double)NAN : res->pos_err_final;
    json_object_set_new(mt, "pos_err_max", pb_json_real(pmax));
    json_object_set_new(mt, "pos_err_final", pb_json_real(pfin));
    if (km) {
        json_object_set_new(mt, "pos_err_max_m", pb_json_real(1e3 * pmax));
        json_object_set_new(mt, "pos_err_final_m", pb_json_real(1e3 * pfin));
    }
    json_object_set_new(mt, "below_reference_floor", json_boolean(res->below_floor));
    json_object_set_new(mt, "error_saturated", json_boolean(res->saturated));
    json_object_set_new(mt, "reference_floor_max", pb_json_real(res->truth_floor_max));
    json_object_set_new(mt, "vel_err_max", pb_json_real(res->vel_err_max));
    json_object_set_new(mt, "vel_err_final", pb_json_real(res->vel_err_final));
    json_object_set_new(mt, "radial_final", pb_json_real(res->radial_final));
    json_object_set_new(mt, "along_track_final", pb_json_real(res->along_final));
    json_object_set_new(mt, "cross_track_final", pb_json_real(res->cross_final));
    json_object_set_new(mt, "ecc_drift_max", pb_json_real(spec->problem.keplerian ? res->ecc_drift_max : (double)NAN));
    json_object_set_new(mt, "apsidal_rate_rad_per_orbit", pb_json_real(res->apsidal_rate));
    case_growth(mt, "pos", &res->g_pos, spec->problem.period);
    case_growth(mt, "along", &res->g_along, spec->problem.period);
    case_growth(mt, "energy", &res->g_energy, spec->problem.period);
    case_growth(mt, "angmom", &res->g_angmom, spec->problem.period);
    json_object_set_new(o, "metrics", mt);

    json_t *c = json_object();
    json_object_set_new(c, "steps", json_integer(res->steps));
    json_object_set_new(c, "evals", json_integer(res->evals));
    json_object_set_new(c, "rejected", json_integer(res->rejected));
    json_object_set_new(c, "startup_steps", json_integer(res->startup_steps));
    if (spec->method->flags & PB_KIND_ADAPTIVE)
        json_object_set_new(c, "output_cut_steps", json_integer(res->output_cut));
    case_timing(c, res);
    if (spec->eval_cost_us > 0) {
        json_object_set_new(c, "eval_cost_us", json_real(spec->eval_cost_us));
        json_object_set_new(c, "projected_s", json_real(res->projected_s));
    }
    json_object_set_new(o, "cost", c);
    json_object_set_new(o, "fingerprint", json_string(res->fingerprint));
    char path[PB_CASE_ID_MAX + 16];
    snprintf(path, sizeof path, "series/%s.csv", res->id);
    json_object_set_new(o, "series", json_string(path));
    return o;
}

static json_t *summary_machine(void)
{
    json_t *m = json_object();
    struct utsname u;
    if (uname(&u) == 0) {
        json_object_set_new(m, "system", json_string(u.sysname));
        json_object_set_new(m, "release", json_string(u.release));
        json_object_set_new(m, "arch", json_string(u.machine));
    }
    FILE *f = fopen("/proc/cpuinfo", "r");
    if (f) {
        char line[512];
        while (fgets(line, sizeof line, f))
            if (strncmp(line, "model name", 10) == 0) {
                char *c = strchr(line, ':');
                if (c) {
                    c += 2;
                    c[strcspn(c, "\n")] = 0;
                    json_object_set_new(m, "cpu", json_string(c));
                }
                break;
            }
        fclose(f);
    }
    json_object_set_new(m, "cores", json_integer(sysconf(_SC_NPROCESSORS_ONLN)));
    return m;
}

static int summary_cmp_double(const void *a, const void *b)
{
    double d = *(const double *)a - *(const double *)b;
    return (d > 0) - (d < 0);
}

/* The run's calibration: the kernel's name and the median over timed cases
 * of its ns per chunk (null when nothing was timed), so a reader sees how
 * fast the machine was during the run. */
static json_t *summary_calibration(const json_t *cases)
{
    size_t n = json_array_size(cases), k = 0, i;
    double *x = malloc((n ? n : 1) * sizeof(double));
    json_t *c, *o = json_object();
    json_array_foreach(cases, i, c) {
        json_t *v = json_object_get(json_object_get(c, "cost"), "calib_ns");
        if (x && json_is_number(v))
            x[k++] = json_number_value(v);
    }
    if (x && k)
        qsort(x, k, sizeof(double), summary_cmp_double);
    json_object_set_new(o, "kernel", json_string(PB_CALIB_KERNEL));
    json_object_set_new(o, "clock", json_string(PB_TIMING_CLOCK));
    json_object_set_new(o, "ns", x && k ? json_real(k % 2 ? x[k / 2] : 0.5 * (x[k / 2 - 1] + x[k / 2]))
                                        : json_null());
    json_object_set_new(o, "cases_timed", json_integer((json_int_t)k));
    free(x);
    return o;
}

/* The command line that made this summary, as a shell would take it back
 * (arguments with other than [A-Za-z0-9_./,=:+@%-] single-quoted), the
 * program named by its base name. Read from /proc/self/cmdline before main
 * runs: option parsing splits lists in place (a comma becomes a NUL), which
 * /proc would show afterwards. Empty where /proc is not there. */
static char summary_cmd[16384];

__attribute__((constructor)) static void summary_command_capture(void)
{
    FILE *f = fopen("/proc/self/cmdline", "rb");
    if (!f)
        return;
    char buf[8192];
    size_t n = fread(buf, 1, sizeof buf - 1, f), o = 0;
    fclose(f);
    buf[n] = 0;
    for (size_t i = 0; i < n && o + 8 < sizeof summary_cmd; i += strlen(buf + i) + 1) {
        const char *a = buf + i;
        if (i == 0 && strrchr(a, '/'))
            a = strrchr(a, '/') + 1;
        int plain = *a != 0;
        for (const char *c = a; *c; c++)
            if (!strchr("_./,=:+@%-", *c) && !((*c >= 'a' && *c <= 'z') || (*c >= 'A' && *c <= 'Z') ||
                                                (*c >= '0' && *c <= '9')))
                plain = 0;
        if (i)
            summary_cmd[o++] = ' ';
        if (!plain)
            summary_cmd[o++] = '\'';
        for (const char *c = a; *c && o + 6 < sizeof summary_cmd; c++) {
            if (*c == '\'' && !plain) {
                memcpy(summary_cmd + o, "'\\''", 4);
                o += 4;
            } else {
                summary_cmd[o++] = *c;
            }
        }
        if (!plain)
            summary_cmd[o++] = '\'';
    }
    summary_cmd[o] = 0;
}

json_t *pb_summary_new(json_t *cases)
{
    json_t *s = json_object();
    json_object_set_new(s, "format", json_integer(PB_SUMMARY_FORMAT));
    json_object_set_new(s, "tool", json_string(PB_TOOL_NAME));
    json_object_set_new(s, "machine", summary_machine());
    if (summary_cmd[0])
        json_object_set_new(s, "command", json_string(summary_cmd));
    json_t *b = json_object();
#ifdef __VERSION__
    json_object_set_new(b, "compiler", json_string("gcc-compatible " __VERSION__));
#endif
    json_object_set_new(b, "flags", json_string(PB_BUILD_FLAGS));
    json_object_set_new(s, "build", b);
    json_object_set_new(s, "calibration", summary_calibration(cases));
    json_object_set_new(s, "caution", json_string(
        "Benchmarks on idealised problems do not validate an operational propagator; "
        "defer to the mission's own verification and flight-dynamics practice."));
    json_object_set_new(s, "cases", cases);
    return s;
}
