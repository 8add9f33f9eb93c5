/* method_table.c - the registry of methods, in display order. Adding a method
 * is one file, one extern line and one table line here. */
#include <string.h>
#include "method.h"

extern const pb_method_type pb_method_rk4;
extern const pb_method_type pb_method_leapfrog;
extern const pb_method_type pb_method_yoshida4;
extern const pb_method_type pb_method_yoshida6;
extern const pb_method_type pb_method_yoshida8;
extern const pb_method_type pb_method_rkf45;
extern const pb_method_type pb_method_gsl_rk4;
extern const pb_method_type pb_method_gsl_rkf45;
extern const pb_method_type pb_method_gsl_rkck;
extern const pb_method_type pb_method_gsl_rk8pd;
extern const pb_method_type pb_method_gsl_msadams;
extern const pb_method_type pb_method_gauss_jackson8;

const pb_method_type *const pb_method_table[] = {
    &pb_method_rk4,
    &pb_method_leapfrog,
    &pb_method_yoshida4,
    &pb_method_yoshida6,
    &pb_method_yoshida8,
    &pb_method_rkf45,
    &pb_method_gsl_rk4,
    &pb_method_gsl_rkf45,
    &pb_method_gsl_rkck,
    &pb_method_gsl_rk8pd,
    &pb_method_gsl_msadams,
    &pb_method_gauss_jackson8,
    NULL
};

const pb_method_type *pb_method_find(const char *name)
{
    for (const pb_method_type *const *m = pb_method_table; *m; m++)
        if (strcmp((*m)->name, name) == 0)
            return *m;
    return NULL;
}
