/* test_support.h - helpers shared by the test files: drive one method on one
 * problem to a time, counting evaluations the way the harness does. */
#ifndef PB_TEST_SUPPORT_H
#define PB_TEST_SUPPORT_H

#include "integrators/method.h"

typedef struct pbt_result {
    int status;
    double t;                      /* time reached */
    double r[PB_DIM_MAX], v[PB_DIM_MAX];
    long evals, steps, rejected, output_cut;
    double t_fail;
} pbt_result;

/* Integrate p from p->t0 to t_end with method m and configuration cfg
 * (one advance call), through the harness's counting force wrapper. */
pbt_result pbt_integrate(const pb_method_type *m, const pb_problem *p,
                         const pb_method_config *cfg, double t_end);

/* The same in `pieces` advance calls to equally spaced output times (the
 * last exactly t_end), as the harness's samples split a run. */
pbt_result pbt_integrate_split(const pb_method_type *m, const pb_problem *p,
                               const pb_method_config *cfg, double t_end, int pieces);

/* Position error |r - r_exact(t)| against the problem's exact solution
 * evaluated in __float128. */
double pbt_pos_error(const pb_problem *p, const pbt_result *res);

/* Largest relative energy error over the first tenth of a run and over the
 * rest, from an observer on every step (Hairer-Lubich-Wanner's bounded-energy
 * check). */
typedef struct pbt_energy_split {
    const pb_problem *p;
    double e0;
    long n, split;
    double max_early, max_late;
} pbt_energy_split;

/* Run m on p for `orbits` periods at steps_per_orbit, driving m->advance
 * directly with the observer; asserts the run ends PB_OK after every step. */
pbt_energy_split pbt_energy_split_run(const pb_method_type *m, const pb_problem *p,
                                      int steps_per_orbit, long orbits);

/* The normalized Kepler problem: mu = 1, a = 1, start at periapsis in the
 * x-y plane, r0 = (1-e, 0, 0), v0 = (0, sqrt((1+e)/(1-e)), 0) (vis-viva;
 * REFERENCES.md two-body laws). */
void pbt_kepler(pb_problem *p, double e);

/* A broken force model: the Kepler force (mu = 1) until t = 1, NaN after. */
int pbt_nan_after_1_accel(const pb_problem *p, double t, const double *r, const double *v,
                          double *a);

/* 1 when the tests run under the sanitizers (long runs may shrink). */
int pbt_sanitized(void);

/* Run the CLI ($PB_BIN) with args (NULL-terminated, without argv[0]),
 * capturing stdout and stderr (each truncated to its buffer). Returns the
 * exit status, or -1 if it did not exit normally. */
int pbt_run_cli(const char *const *args, char *out, size_t outlen, char *err, size_t errlen);

/* A fresh empty directory below $PB_TMP (default /tmp); the path is written
 * into buf, or "" if it cannot be made. */
void pbt_tmpdir(char *buf, size_t len);

/* The whole file, NUL-terminated, in malloc'd memory (NULL if unreadable);
 * its length in *len when len is not NULL. */
char *pbt_slurp_file(const char *path, size_t *len);

/* As much of the file as fits in buf, NUL-terminated ("" if unreadable). */
void pbt_read_into(const char *path, char *buf, size_t len);

/* 1 if the path exists. */
int pbt_exists(const char *path);

/* 1 when one line of text (its first 599 characters) holds all of a, b and c. */
int pbt_line_has(const char *text, const char *a, const char *b, const char *c);

/* Headless Chromium ($PB_CHROMIUM, else chromium) with the extra arguments
 * (NULL-ended) and a fresh profile folder, stdout into out_path; the exit
 * status, and the tail of its stderr in err (test_support_browser.c). */
int pbt_chromium(const char *const *extra, const char *out_path, char *err, size_t errlen);
/* A copy of the page at html_path with script put before its </body>
 * (DIR/probe.html), laid out by headless Chromium at 1200 x 900; the DOM it
 * dumps after the script ran (malloc'd). Fails the test when it cannot. */
char *pbt_browser_dom(const char *html_path, const char *script, const char *dir);

#endif
