/* verb_list.c - `propbench list [methods|problems|suites]`. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/study/suites.h"
#include "problems/catalogue.h"
#include "problems/summary.h"

static void list_help(FILE *f)
{
    fprintf(f, "usage: propbench list [methods|problems|suites]\n\n"
               "Show the built-in methods (order, kind, form), problems (a, e, period,\n"
               "energy, angular momentum) and sweep suites. Without an argument, all three.\n");
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
    printf("%-15s %5s  %-10s %-6s %-26s %s\n", "method", "order", "kind", "step", "form", "description");
    for (const pb_method_type *const *t = pb_method_table; *t; t++) {
        const pb_method_type *m = *t;
        printf("%-15s %5d  %-10s %-6s %-26s %s%s\n", m->name, m->order, list_kind(m->flags),
               (m->flags & PB_KIND_FIXED) ? "fixed" : "adapt",
               (m->flags & PB_FORM_SECOND) ? "2nd order, a(r) only" : "1st order y=(r,v)",
               m->description, (m->flags & PB_KIND_COMPENSABLE) ? " [--compensated]" : "");
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

int pb_cli_list(int argc, char **argv)
{
    if (argc > 2 || (argc == 2 && (!strcmp(argv[1], "--help") || !strcmp(argv[1], "-h")))) {
        list_help(argc == 2 ? stdout : stderr);
        return argc == 2 ? PB_EXIT_OK : PB_EXIT_USAGE;
    }
    const char *what = argc == 2 ? argv[1] : "all";
    int all = !strcmp(what, "all");
    if (!all && strcmp(what, "methods") && strcmp(what, "problems") && strcmp(what, "suites"))
        return pb_cli_error("list", "unknown list '%s' (methods, problems or suites)", what);
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
