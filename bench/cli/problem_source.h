/* problem_source.h - a problem from a user's INI problem file, for the CLI. */
#ifndef PB_PROBLEM_SOURCE_H
#define PB_PROBLEM_SOURCE_H

#include "problems/problem.h"

/* Read FILE and pick the case named case_name (or the first); prints the
 * reader's message (file, line, key) and returns -1 on bad input. */
int pb_problem_source_file(const char *verb, const char *path, const char *case_name,
                           pb_problem *out);

/* Every case of FILE (or only case_name) into a malloc'ed array (owner: the
 * caller, free()); prints the reader's message and returns -1 on bad input. */
int pb_problem_source_cases(const char *verb, const char *path, const char *case_name,
                            pb_problem **out, int *n);

#endif
