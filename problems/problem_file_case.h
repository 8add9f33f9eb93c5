/* problem_file_case.h - one case of a problem file as the reader collects
 * it (which keys, on which lines, with which values) and the checks that
 * make it a problem. Private to problem_file.c, problem_file_case.c and
 * their tests; users read files through problem_file.h. */
#ifndef PB_PROBLEM_FILE_CASE_H
#define PB_PROBLEM_FILE_CASE_H

#include <stddef.h>
#include "problem.h"

enum {
    K_UNITS, K_MU, K_BODY, K_FORCE, K_A, K_E, K_I, K_RAAN, K_ARGP, K_NU, K_R, K_V,
    K_ORBITS, K_HORIZON, K_RADIUS, K_J2, K_DESC, K_COUNT
};

/* The keys a case may hold, by K_ index, NULL after the last (defined in
 * problem_file.c). The reader looks keys up here and builds its "unknown
 * key" message from here, so a new key cannot be accepted yet left
 * unlisted. */
extern const char *const pb_problem_file_keys[K_COUNT + 1];

typedef struct pf_case {
    char name[PB_NAME_MAX];
    int line;                 /* line of the section header */
    int kline[K_COUNT];       /* line of each key given (0: absent) */
    double num[K_COUNT];
    double vec[2][3];         /* r, v */
    char str[K_COUNT][160];   /* units, body, force, description */
} pf_case;

/* Check the keys of case cs and make its problem in *p; path names the
 * file in messages. PB_OK, or PB_EINVAL with err receiving "path:line: key
 * 'k': reason" (the key's line, or the case's header line when the key is
 * missing). warn (may be NULL) receives messages about accepted but
 * suspicious input (periapsis below the surface, an unusual J2). Reduces
 * the angles of cs modulo 360 in place. */
int pb_problem_file_case(pf_case *cs, const char *path, pb_problem *p, char *err, size_t errlen,
                         void (*warn)(const char *msg));

#endif
