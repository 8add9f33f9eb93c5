/* compare.h - the case-by-case comparison of a later run against a baseline
 * (baseline.h), its options and its verdicts. The rules are stated above
 * pb_check_compare. */
#ifndef PB_COMPARE_H
#define PB_COMPARE_H

#include <stddef.h>
#include <jansson.h>

#define PB_CHECK_TOLERANCE 0.10   /* worse by more than 10% is a regression */
#define PB_CHECK_FLOOR 1e-14      /* round-off floor, relative to the case's scale */
#define PB_CHECK_TIMING_RATIO 1.5
#define PB_CHECK_METRIC_MAX 16
#define PB_CHECK_COUNT_MAX 4      /* steps, evals, rejected, startup_steps */
#define PB_CHECK_REQUIRE_MAX 16
/* Limits of the options: beyond them the gate passes anything. A tolerance
 * of 100 already lets a metric get 101 times worse, far past any method or
 * build change one would accept without a look (0 is sane: bit-identical
 * reruns, only the floor left); a floor of 1e-3 of the orbit's size is a
 * kilometre-class error on an Earth orbit, far above round-off; a timing
 * ratio of 100 is two orders of magnitude slower. */
#define PB_CHECK_TOLERANCE_MAX 100.0
#define PB_CHECK_FLOOR_MAX 1e-3
#define PB_CHECK_TIMING_RATIO_MAX 100.0

typedef enum {
    PB_CHECK_SAME = 0,     /* within tolerance (or equal) */
    PB_CHECK_IMPROVED,     /* better by more than the tolerance */
    PB_CHECK_CHANGED,      /* informational: bits or a round-off-level class changed */
    PB_CHECK_NEW,          /* case only in the run */
    PB_CHECK_REGRESSED,    /* fails the check */
    PB_CHECK_MISSING,      /* case only in the baseline: fails the check */
    PB_CHECK_UNMET         /* an absolute requirement (--require) not met: fails */
} pb_check_verdict;

typedef struct pb_check_row {
    char case_id[200];
    char item[40];          /* metric name, "status", "settings", "steps", ..., "fingerprint", "case" */
    pb_check_verdict verdict;
    char base[48], run[48]; /* the two values as text ("-" when absent) */
    char change[48];        /* "+12.3%", "x1.62", "changed", ... */
    double rel;             /* signed relative change of a metric (0 when not a metric) */
    int strict_fail;        /* a fingerprint change: fails only under --strict */
} pb_check_row;

/* One absolute requirement, "METRIC<=VALUE" (or <, >=, >), as given. */
typedef struct pb_check_require {
    char metric[40];
    char op[3];
    double value;
    char text[96];
} pb_check_require;

typedef struct pb_check_options {
    double tolerance;                 /* default relative tolerance */
    double floor;                     /* round-off floor (relative to scale) */
    int n_metric;                     /* per-metric overrides */
    char metric_name[PB_CHECK_METRIC_MAX][40];
    double metric_tol[PB_CHECK_METRIC_MAX];
    int timing;                       /* compare ns_per_step as a ratio */
    double timing_ratio;
    int strict;                       /* fingerprint changes fail */
    int n_count;                      /* count tolerances (default: exact) */
    char count_name[PB_CHECK_COUNT_MAX][24];
    double count_tol[PB_CHECK_COUNT_MAX];
    int n_require;                    /* absolute requirements (require.h) */
    pb_check_require require[PB_CHECK_REQUIRE_MAX];
    const char *methods, *problems;   /* comma lists: the cases requirements apply to */
} pb_check_options;

typedef struct pb_check_report {
    pb_check_row *rows;               /* every comparison, grouped by case */
    size_t n, cap;
    char warnings[8][320];            /* compiler, flags, machine differences */
    int n_warnings;
    long cases, regressions, improvements, fingerprints_changed, missing, added;
    long timing_raw;                  /* timing compared without calibration */
    long unmet, required;             /* requirement rows unmet, and in all */
    int compared;                     /* 1: against a baseline (not requirements alone) */
} pb_check_report;

void pb_check_options_default(pb_check_options *o);

/* Parse "NAME=REL" into an override; 0, or -1 with a message in err (unknown
 * metric name, bad number or one outside [0, PB_CHECK_TOLERANCE_MAX], too
 * many overrides). */
int pb_check_options_metric(pb_check_options *o, const char *arg, char *err, size_t errlen);

/* Parse "NAME=REL[,NAME=REL...]" (NAME a count: steps, evals, rejected,
 * startup_steps) into count tolerances; 0, or -1 with a message in err. */
int pb_check_options_counts(pb_check_options *o, const char *arg, char *err, size_t errlen);

/* Compare run (a baseline document made from the run's summary) with base.
 * Per matching case id:
 *  - status: any change is a regression; settings (problem, method, step or
 *    tolerance, horizon, compensation): any change is a regression;
 *  - each accuracy metric x against its baseline b (tolerance t, floor f =
 *    PB_CHECK_FLOOR x the case's length or speed scale for positions and
 *    velocities, x 1 for relative quantities): regression when
 *    x > (1 + t) b + f, improvement when b > (1 + t) x + f, so differences at
 *    round-off never flag. A null value below the reference floor counts as
 *    better than any number, a non-finite one (null otherwise) as worse;
 *  - growth classes (bounded < sqrt < linear < quadratic < other): a worse
 *    class is a regression unless the run's error is below 100 f, where
 *    the fit measures round-off and the change is only reported;
 *  - steps, evals, rejected, startup_steps: equal, or within a count
 *    tolerance t (o->count_tol): regression when x > (1 + t) b,
 *    improvement when b > (1 + t) x;
 *  - timing (only with o->timing): the ratio of a step's time in
 *    calibration-kernel chunks (the kernel timed beside the case in the same
 *    run; raw ns_per_step when either side lacks it) above o->timing_ratio
 *    is a regression, below 1 / ratio an improvement;
 *  - fingerprint: a change is reported; it fails only with o->strict.
 * Cases only in base are missing (regressions); cases only in run are new.
 * Differences of compiler, flags or machine are warnings. 0, or -1 when out
 * of memory. The caller frees r with pb_check_report_free. */
int pb_check_compare(const json_t *base, const json_t *run, const pb_check_options *o,
                     pb_check_report *r);

/* 1 when the report fails the check under o (regressions, missing cases,
 * fingerprint changes with o->strict, unmet requirements). */
int pb_check_failed(const pb_check_report *r, const pb_check_options *o);

const char *pb_check_verdict_name(pb_check_verdict v);

/* Append a row (value texts "-") to r, counting regressions, unmet
 * requirements and improvements; NULL when out of memory. */
pb_check_row *pb_check_add_row(pb_check_report *r, const char *id, const char *item,
                              pb_check_verdict v);

void pb_check_report_free(pb_check_report *r);

#endif
