/* verb_list.c - `propbench list [methods|problems|suites]`, and
 * `list problems --detail`: every built-in problem's constants, osculating
 * elements and initial state as a Markdown table (README's Problems table). */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/study/suites.h"
#include "problems/catalogue.h"
#include "problems/summary.h"
#include "problems/twobody.h"

static void list_help(FILE *f)
{
    fprintf(f, "usage: propbench list [methods|problems|suites]\n"
               "       propbench list problems --detail\n\n"
               "Show the built-in methods (order, kind, form), problems (a, e, period,\n"
               "energy, angular momentum) and sweep suites. Without an argument, all three.\n"
               "--detail: each problem's constants (mu, body radius, J2), force model,\n"
               "osculating elements, initial r and v, period, default horizon and epoch,\n"
               "as a Markdown table.\n");
}

static const char *list_kind(unsigned fl)
{
    if (fl & PB_KIND_MULTISTEP) return "multistep";
    if (fl & PB_KIND_SYMPLECTIC) return "symplectic";
    if (fl & PB_KIND_ADAPTIVE) return "adaptive";
    return "fixed";
}

static void list_methods(void)
{
    printf("%-15s %5s %5s  %-10s %-6s %-26s %s\n", "method", "order", "dense", "kind", "step", "form",
           "description");
    const pb_method_type *m;
    for (int i = 0; (m = pb_method_at(i)); i++) {
        const pb_method_origin *pl = pb_method_origin_of(m);
        printf("%-15s %5d %5d  %-10s %-6s %-26s %s%s", m->name, m->order, m->dense_order,
               list_kind(m->flags),
               (m->flags & PB_KIND_FIXED) ? "fixed" : "adapt",
               (m->flags & PB_FORM_SECOND) ? "2nd order, a(r) only" : "1st order y=(r,v)",
               m->description, (m->flags & PB_KIND_COMPENSABLE) ? " [--compensated]" : "");
        if (pl)
            printf(" [plug-in %s %s]", pl->path, pl->version);
        printf("\n");
    }
}

static void list_num(double x)
{
    if (isfinite(x))
        printf(" %13.6g", x);
    else
        printf(" %13s", "-");
}

static void list_problems(void)
{
    printf("%-20s %-10s %13s %13s %13s %13s %13s %-5s %s\n", "problem", "units", "a", "e",
           "period", "energy", "ang.mom.", "(is)", "description");
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++) {
        pb_problem p;
        pb_problem_facts f;
        if (e->make(&p) || pb_problem_summary(&p, &f))
            continue;
        printf("%-20s %-10s", p.name, p.units == PB_UNITS_KM_S ? "km-s" : "normalized");
        list_num(f.a);
        /* an eccentricity at round-off level is a circular orbit */
        list_num(isfinite(f.e) && f.e < 1e-12 ? 0.0 : f.e);
        list_num(f.period > 0 ? f.period : (double)NAN);
        list_num(f.energy);
        list_num(f.angmom);
        printf(" %-5s %s\n", p.angmom_label ? p.angmom_label : "-", p.description);
    }
    printf("units: a in km or DU; period in s or TU; energy (specific, with the J2 potential where\n"
           "there is J2; the Jacobi constant for arenstorf) in km^2/s^2 or DU^2/TU^2; angular\n"
           "momentum in km^2/s or DU^2/TU: |h|, or its conserved z component h_z with J2.\n");
}

/* Degrees of an angle in radians, rounded to 1e-9 deg so that round-off
 * around 0 prints as 0 (not -0 or 360); signed: in (-180, 180], else [0, 360). */
static double list_deg(double rad, int signed_range)
{
    double d = rad * (180.0 / M_PI);
    d = fmod(d, 360.0);
    if (d < 0)
        d += 360.0;
    if (signed_range && d > 180.0)
        d -= 360.0;
    if (fabs(d) < 1e-9 || fabs(d - 360.0) < 1e-9)
        d = 0.0;
    return d;
}

static void list_cell(double x, const char *fmt)
{
    if (isfinite(x) && x != 0)
        printf(fmt, x);
    else
        printf(isfinite(x) ? " 0 |" : " - |");
}

/* A vector to 15 digits; + 0.0 prints a negative zero as 0. */
static void list_vec(const double *x)
{
    printf(" (%.15g, %.15g, %.15g) |", x[0] + 0.0, x[1] + 0.0, x[2] + 0.0);
}

/* The force terms in words ("two-body + J2..J6 + drag (...)"). */
static const char *list_force(const pb_problem *p, char *buf, unsigned len)
{
    if (p->force == PB_FORCE_CR3BP)
        return "CR3BP, rotating frame";
    pb_forces_describe(&p->forces, buf, len);
    return buf;
}

/* One row: constants, elements (osculating, from the state; "-" where the
 * problem is not keplerian), state, period, horizon, epoch. */
static void list_detail_row(const pb_problem *p)
{
    pb_elements el;
    int kep = p->keplerian && pb_elements_from_state(p->mu, p->r0, p->v0, &el) == PB_OK;
    printf("| %s | %s | %.10g |", p->name, p->units == PB_UNITS_KM_S ? "km-s" : "normalized",
           p->mu);
    list_cell(p->body_radius > 0 ? p->body_radius : (double)NAN, " %.10g |");
    list_cell(p->forces.jn[2] != 0 ? p->forces.jn[2] : (double)NAN, " %.9g |");
    char force[256];
    printf(" %s |", list_force(p, force, sizeof force));
    if (kep) {
        list_cell(el.a, " %.10g |");
        /* an eccentricity at round-off level is a circular orbit */
        list_cell(el.e < 1e-12 ? 0.0 : el.e, " %.10g |");
        list_cell(list_deg(el.i, 0), " %.10g |");
        list_cell(list_deg(el.raan, 0), " %.10g |");
        list_cell(list_deg(el.argp, 0), " %.10g |");
        list_cell(list_deg(el.nu, el.e > 1), " %.10g |");
    } else {
        printf(" - | - | - | - | - | - |");
    }
    list_vec(p->r0);
    list_vec(p->v0);
    list_cell(p->period > 0 ? p->period : (double)NAN, " %.10g |");
    if (p->period > 0)
        printf(" %g orbits = %.10g |", p->default_orbits, p->default_orbits * p->period);
    else
        printf(" %.10g |", p->default_horizon_s);
    if (p->forces.has_epoch)
        printf(" %g (J2000.0 + %.10g d TT) |\n", p->t0, p->forces.epoch_days);
    else
        printf(" %g |\n", p->t0);
}

static void list_problems_detail(void)
{
    printf("| problem | units | mu | body radius | J2 | force | a | e | i (deg) | RAAN (deg) "
           "| argp (deg) | nu (deg) | r0 | v0 | period | default horizon | epoch t0 |\n");
    printf("| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- "
           "| --- | --- | --- |\n");
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++) {
        pb_problem p;
        if (e->make(&p) == PB_OK)
            list_detail_row(&p);
    }
    printf("\nUnits: km-s problems: mu in km^3/s^2, lengths in km, v0 in km/s, times in s;\n"
           "normalized: mu = 1 (arenstorf: mu is the mass ratio, a rotating frame), DU, TU.\n"
           "Elements are osculating two-body elements of the initial state about mu\n"
           "(pb_elements_from_state; with J2 they are not mean elements). Circular orbits\n"
           "have argp = 0 and nu the argument of latitude; circular equatorial orbits nu the\n"
           "true longitude; open orbits a < 0 and nu in (-180, 180]. J2 is unnormalized;\n"
           "'-': not set or not defined.\n");
}

int pb_cli_list(int argc, char **argv)
{
    if (argc > 3 || (argc >= 2 && (!strcmp(argv[1], "--help") || !strcmp(argv[1], "-h")))) {
        list_help(argc == 2 ? stdout : stderr);
        return argc == 2 ? PB_EXIT_OK : PB_EXIT_USAGE;
    }
    const char *what = argc >= 2 ? argv[1] : "all";
    int all = !strcmp(what, "all");
    if (!all && strcmp(what, "methods") && strcmp(what, "problems") && strcmp(what, "suites"))
        return pb_cli_error("list", "unknown list '%s' (methods, problems or suites)", what);
    if (argc == 3) {
        if (strcmp(argv[2], "--detail"))
            return pb_cli_error("list", "unknown option '%s' (list problems takes --detail)",
                                argv[2]);
        if (strcmp(what, "problems"))
            return pb_cli_error("list", "--detail is for 'list problems' only, not '%s'", what);
        list_problems_detail();
        return PB_EXIT_OK;
    }
    if (all || !strcmp(what, "methods"))
        list_methods();
    if (all)
        printf("\n");
    if (all || !strcmp(what, "problems"))
        list_problems();
    if (all)
        printf("\n");
    if (all || !strcmp(what, "suites"))
        pb_suites_print(stdout);
    return PB_EXIT_OK;
}
