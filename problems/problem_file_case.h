/* problem_file_case.h - one case of a problem file as the reader collects
 * it (which keys, on which lines, with which values) and the checks that
 * make it a problem. Private to problem_file.c, problem_file_case.c,
 * problem_file_forces.c and their tests; users read files through
 * problem_file.h. */
#ifndef PB_PROBLEM_FILE_CASE_H
#define PB_PROBLEM_FILE_CASE_H

#include <stddef.h>
#include "problem.h"

/* K_J2 .. K_J6 are consecutive: the key of J_n is K_J2 + n - 2. */
enum {
    K_UNITS, K_MU, K_BODY, K_FORCE, K_A, K_E, K_I, K_RAAN, K_ARGP, K_NU, K_R, K_V,
    K_ORBITS, K_HORIZON, K_RADIUS, K_J2, K_J3, K_J4, K_J5, K_J6, K_ZONAL, K_GAMMA,
    K_DRAG, K_BALLISTIC, K_THIRD, K_EPOCH, K_CIRC, K_SRP, K_CR, K_SHADOW, K_MAN,
    K_FORM, K_DESC, K_COUNT
};

/* The keys a case may hold, by K_ index, NULL after the last (defined in
 * problem_file.c). The reader looks keys up here and builds its "unknown
 * key" message from here, so a new key cannot be accepted yet left
 * unlisted. */
extern const char *const pb_problem_file_keys[K_COUNT + 1];

/* Room for any value: inih reads lines of at most 198 characters (its
 * INI_MAX_LINE of 200 less the newline and NUL), so a value never exceeds
 * this and a manoeuvre list is kept whole. */
#define PF_VALUE_MAX 200

/* largest |angle| in degrees still reduced modulo 360 to better than 1e-7 deg */
#define PF_ANGLE_MAX 1e9

typedef struct pf_case {
    char name[PB_NAME_MAX];
    int line;                 /* line of the section header */
    int kline[K_COUNT];       /* line of each key given (0: absent) */
    double num[K_COUNT];
    double vec[2][3];         /* r, v */
    char str[K_COUNT][PF_VALUE_MAX];  /* every value as written */
} pf_case;

/* Where a case's checks report: one failure (the first ends the checks),
 * and any number of warnings. */
typedef struct pf_build {
    pf_case *cs;
    const char *path;
    char *err;
    size_t errlen;
    void (*warn)(const char *msg);  /* may be NULL */
} pf_build;

/* A failure about key k into b->err: "path:line: key 'k': reason", at k's
 * line, or at the case's header when k was not given. Returns -1, for the
 * caller to return. */
int pf_fail_key(pf_build *b, int k, const char *fmt, ...) __attribute__((format(printf, 3, 4)));

/* Check the keys of case cs that make its central-body problem (units,
 * body, state, horizon) and make it in *p, two-body; the force terms are
 * added by pb_problem_file_forces (problem_file_forces.h). path names the
 * file in messages. PB_OK, or PB_EINVAL with err receiving "path:line: key
 * 'k': reason" (the key's line, or the case's header line when the key is
 * missing). warn (may be NULL) receives messages about accepted but
 * suspicious input (periapsis below the surface). Reduces
 * the angles of cs modulo 360 in place. */
int pb_problem_file_case(pf_case *cs, const char *path, pb_problem *p, char *err, size_t errlen,
                         void (*warn)(const char *msg));

#endif
