/* report_data.h - a run directory read back for reporting: summary.json
 * (through jansson) as cases grouped by problem, and series CSVs by column
 * name. Everything the report draws or tabulates comes from here. */
#ifndef PB_REPORT_DATA_H
#define PB_REPORT_DATA_H

#include <stddef.h>
#include <jansson.h>

typedef struct pb_report_case {
    const char *id, *problem, *method, *units, *status, *series;  /* borrowed from the doc */
    const char *growth_pos, *growth_energy;
    int order, fixed;             /* fixed: has steps_per_orbit or step, else tolerance */
    int from_gsl;                 /* GSL's stepper: labelled so in every table */
    long steps_per_orbit;         /* 0 when the step was given in time units */
    double step, tolerance, orbits, horizon_s, h;
    double energy_max, angmom_max, pos_max, k_pos;   /* NaN when absent or null */
    long evals, steps;            /* -1 when absent */
    double ns_per_step;
    double cpu_s;                 /* ns_per_step * steps: CPU time over the horizon; NaN if untimed */
    int saturated;                /* finished, but the error passed a tenth of the orbit's size */
    double diverged_at, diverged_orbits;   /* NaN when absent */
    const char *status_detail;    /* NULL when absent */
    double floor_max;             /* the reference's floor (0 for a closed form) */
    const json_t *def;            /* "problem_def" of a problem-file case; NULL for built-ins */
    int method_slot;              /* 0.. per problem, in order of first appearance */
    int variant;                  /* 0 = coarsest step / loosest tolerance of its method */
} pb_report_case;

typedef struct pb_report_problem {
    const char *name;
    int first, n;                 /* cases[first .. first+n-1] */
    int nmethods;
    const char *len_unit, *time_unit;   /* "km"/"s" or "DU"/"TU" */
    double orbits_max, horizon_max;     /* longest horizon among its cases */
    double req_pos;               /* a position-error requirement to draw; 0: none */
} pb_report_problem;

typedef struct pb_report_run {
    json_t *doc;                  /* owned; the strings above point into it */
    int ncases;
    pb_report_case *cases;        /* owned, sorted by problem, method, variant */
    int nproblems;
    pb_report_problem *problems;  /* owned */
} pb_report_run;

/* Read dir/summary.json. 0 on success; -1 with a message naming the file
 * and what is wrong in err (also when two problems would get the same
 * figure files, pb_fig_stem). On failure run holds nothing to free. */
int pb_report_load(const char *dir, pb_report_run *run, char *err, size_t errlen);
/* The same for a subset: methods and problems are comma-separated lists
 * (NULL: all). A name in a list that no case of the run has is refused
 * with a message naming it and the option. */
int pb_report_load_subset(const char *dir, const char *methods, const char *problems,
                          pb_report_run *run, char *err, size_t errlen);
void pb_report_free(pb_report_run *run);

/* 1 when the case ended plain "ok": finished and not saturated. Only these
 * take part in best-value marks and recommendations. */
int pb_report_case_plain_ok(const pb_report_case *c);

/* The status as the console prints it: "ok", "ok(sat)", "diverged at t =
 * 3.33 TU (0.53 orbits)", "max_steps at ...", "crashed". */
void pb_report_case_status(const pb_report_case *c, char *buf, size_t len);

/* "n=200", "h=60 s" or "tol=1e-08" into buf. */
void pb_report_case_setting(const pb_report_case *c, char *buf, size_t len);

/* A series CSV: column names (unit suffix "[..]" stripped) and rows. */
typedef struct pb_report_series {
    int ncols, nrows;
    char **names;                 /* owned */
    double *v;                    /* owned, row-major nrows x ncols */
} pb_report_series;

/* 0, or -1 with a message in err (missing file, no header, ragged row). */
int pb_report_series_read(const char *path, pb_report_series *s, char *err, size_t errlen);
/* Column index by name (without unit), or -1. */
int pb_report_series_col(const pb_report_series *s, const char *name);
void pb_report_series_free(pb_report_series *s);

/* Intercept b of ln(err) = b + k ln(x) for a given slope k, by least squares
 * over the rows with log_sample = 1, x >= x_min and err > 0 (falls back to
 * every log_sample row when fewer than 2 qualify). Returns the number of
 * points used (< 2: no fit, b untouched). */
int pb_report_fit_intercept(const double *x, const double *err, const int *use, int n,
                            double x_min, double k, double *b);

#endif
