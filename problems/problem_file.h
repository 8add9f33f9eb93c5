/* problem_file.h - user problem files: INI (read with inih), one case per
 * section "[case NAME]"; keys are listed in problem_file.c and the README.
 * Every rejected input gets a message naming the file, the line and the key. */
#ifndef PB_PROBLEM_FILE_H
#define PB_PROBLEM_FILE_H

#include <stddef.h>
#include "problem.h"

/* Read every case of the file at path. On PB_OK *cases is a malloc'ed array
 * of *ncases problems (owner: the caller, release with free()). On failure
 * (PB_EINVAL for bad input or an unreadable file, PB_ENOMEM) *cases is NULL
 * and err receives "file:line: key 'k': reason". warn (may be NULL) receives
 * messages for accepted but suspicious input (periapsis below the surface). */
int pb_problem_file_read(const char *path, pb_problem **cases, int *ncases,
                         char *err, size_t errlen, void (*warn)(const char *msg));

#endif
