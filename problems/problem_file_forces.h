/* problem_file_forces.h - the force-term keys of a problem-file case
 * (zonal_degree, j2..j6, r2_potential_gamma, drag, ballistic_m2_kg,
 * third_bodies, epoch, third_body_circular, srp_area_mass_m2_kg, cr, shadow,
 * manoeuvres): their values, the terms they need, and the pb_forces they
 * make. Private to the problem-file reader and its tests. */
#ifndef PB_PROBLEM_FILE_FORCES_H
#define PB_PROBLEM_FILE_FORCES_H

#include <stddef.h>
#include "problem_file_case.h"

/* Add the force terms of case cs to *p, the two-body problem that
 * pb_problem_file_case made of it (its body, units, radius, initial state
 * and horizon stay). PB_OK, or PB_EINVAL with err receiving "path:line: key
 * 'k': reason" (the key's line, or the case's header line when a needed key
 * is missing). warn (may be NULL) receives messages about accepted but
 * suspicious input (a J2 outside (0, 0.1)). */
int pb_problem_file_forces(pf_case *cs, const char *path, pb_problem *p, char *err, size_t errlen,
                           void (*warn)(const char *msg));

/* "YYYY-MM-DDThh:mm:ss[.fff]" (TT) as days from J2000.0 (2000-01-01T12:00:00
 * TT) into *days: 0, or -1 with the reason in why. */
int pb_problem_file_epoch(const char *text, double *days, char *why, size_t whylen);

/* "t_s dv_r dv_t dv_n; ..." into f->manoeuvres and f->n_manoeuvres: 0, or
 * -1 with the reason in why (the entry's number among them). */
int pb_problem_file_manoeuvres(const char *text, pb_forces *f, char *why, size_t whylen);

#endif
