/* catalogue.h - the named built-in problems. */
#ifndef PB_CATALOGUE_H
#define PB_CATALOGUE_H

#include "problem.h"

typedef struct pb_problem_entry {
    const char *name;
    int (*make)(pb_problem *out);  /* fills out; PB_OK */
} pb_problem_entry;

/* NULL-terminated, in display order. */
extern const pb_problem_entry pb_problem_table[];

/* Build the named problem into out; PB_EINVAL if the name is unknown. */
int pb_problem_lookup(const char *name, pb_problem *out);

#endif
