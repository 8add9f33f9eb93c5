/* summary_table.c - the text table printed after a sweep. */
#include <string.h>
#include "bench/cli/summary_table.h"

static double tab_num(const json_t *o, const char *k)
{
    const json_t *v = json_object_get(o, k);
    return json_is_number(v) ? json_number_value(v) : -1;
}

static void tab_sci(FILE *f, double x)
{
    if (x < 0)
        fprintf(f, " %10s", "-");
    else
        fprintf(f, " %10.3e", x);
}

/* The setting column: steps per orbit, tolerance, or step. */
static void tab_setting(const json_t *c, char *out, size_t outlen)
{
    const json_t *spo = json_object_get(c, "steps_per_orbit"), *tol = json_object_get(c, "tolerance");
    if (json_is_integer(spo))
        snprintf(out, outlen, "n=%lld", (long long)json_integer_value(spo));
    else if (json_is_number(tol))
        snprintf(out, outlen, "tol=%.0e", json_number_value(tol));
    else
        snprintf(out, outlen, "h=%.3g", tab_num(c, "step"));
}

/* One case's line. */
static void tab_row(const json_t *c, FILE *f)
{
    const json_t *m = json_object_get(c, "metrics"), *k = json_object_get(c, "cost");
    char setting[32];
    tab_setting(c, setting, sizeof setting);
    const char *st = json_string_value(json_object_get(c, "status"));
    if (st && !strcmp(st, "ok") && json_is_true(json_object_get(m, "error_saturated")))
        st = "ok(sat)";
    const char *method = json_string_value(json_object_get(c, "method"));
    int gsl = json_is_true(json_object_get(c, "from_gsl"));
    char mname[40];
    snprintf(mname, sizeof mname, "%s%s", method ? method : "?", gsl ? "*" : "");
    fprintf(f, "%-18s %-15s %-12s %-9s", json_string_value(json_object_get(c, "problem")),
            mname, setting, st ? st : "?");
    if (m) {
        tab_sci(f, tab_num(m, "energy_rel_max"));
        tab_sci(f, tab_num(m, "pos_err_max"));
        const char *u = json_string_value(json_object_get(c, "units"));
        fprintf(f, " %-4s", u && !strcmp(u, "km-s") ? "km" : "DU");
        const char *gp = json_string_value(json_object_get(m, "growth_class_pos"));
        const char *ge = json_string_value(json_object_get(m, "growth_class_energy"));
        fprintf(f, " %-10s %-10s", gp ? gp : "-", ge ? ge : "-");
    } else {
        fprintf(f, " %10s %10s %-4s %-10s %-10s", "-", "-", "", "-", "-");
    }
    if (k) {
        fprintf(f, " %10lld", (long long)json_integer_value(json_object_get(k, "evals")));
        double ns = tab_num(k, "ns_per_step");
        if (ns < 0)
            fprintf(f, " %8s", "-");
        else
            fprintf(f, " %8.1f", ns);
    }
    fputc('\n', f);
}

/* How each unfinished case ended, with the time. */
static void tab_unfinished(const json_t *cases, FILE *f)
{
    size_t i;
    const json_t *c;
    json_array_foreach(cases, i, c) {
        const char *st = json_string_value(json_object_get(c, "status"));
        if (!st || !strcmp(st, "ok"))
            continue;
        const json_t *at = json_object_get(c, "diverged_at");
        fprintf(f, "  %s: %s", json_string_value(json_object_get(c, "id")), st);
        if (json_is_number(at)) {
            const char *u = json_string_value(json_object_get(c, "units"));
            const json_t *orb = json_object_get(c, "diverged_at_orbits");
            fprintf(f, " at t = %.6g %s", json_number_value(at), u && !strcmp(u, "km-s") ? "s" : "TU");
            if (json_is_number(orb))
                fprintf(f, " (%.4g orbits)", json_number_value(orb));
        }
        const char *d = json_string_value(json_object_get(c, "status_detail"));
        fprintf(f, "%s%s\n", d ? ": " : "", d ? d : "");
    }
}

void pb_summary_print(const json_t *doc, FILE *f)
{
    const json_t *cases = json_object_get(doc, "cases");
    fprintf(f, "%-18s %-15s %-12s %-9s %10s %10s %-4s %-10s %-10s %10s %8s\n", "problem", "method",
            "setting", "status", "energy max", "pos max", "unit", "pos growth", "E growth", "evals",
            "ns/step");
    size_t i;
    const json_t *c;
    json_array_foreach(cases, i, c)
        tab_row(c, f);
    fprintf(f, "(* GSL's stepper; energy max is relative; growth = class of the fitted power law;\n"
               " ok(sat): finished, but the position error passed a tenth of the orbit's size)\n");
    tab_unfinished(cases, f);
}
