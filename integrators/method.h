/* method.h - the method interface inside propbench: the public record
 * (propbench/method.h) plus the method table, the fixed-step grid and
 * whether a method fits a problem, which need the problem's internals. */
#ifndef PB_METHOD_H
#define PB_METHOD_H

#include "propbench/method.h"
#include "problems/problem.h"

/* The method table: NULL-terminated, in display order (method_table.c). */
extern const pb_method_type *const pb_method_table[];

/* 1 when m can integrate p: a second-order-form method (PB_FORM_SECOND) sees
 * a(r) only, so it cannot take a velocity-dependent force. */
int pb_method_fits(const pb_method_type *m, const pb_problem *p);

#endif
