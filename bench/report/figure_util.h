/* figure_util.h - what the figure-script writers share: gnuplot quoting,
 * the horizon in words, log axes, margins, the small-multiples limits, and
 * the work-precision and convergence figures (figure_cost.c). */
#ifndef PB_REPORT_FIGURE_UTIL_H
#define PB_REPORT_FIGURE_UTIL_H

#include <stdio.h>
#include "bench/report/report_data.h"

/* Curves at most per panel: beyond it a figure becomes small multiples,
 * one panel (or row of panels) per group of whole methods, each with its
 * own legend; GP_PANEL_H is a panel's height in pixels. */
#define GP_PANEL_CURVES 8
#define GP_PANEL_H 420

/* s as a gnuplot single-quoted string. */
void pb_gp_quote(FILE *f, const char *s);
/* "100 orbits (628.3 TU)" or "2 hours": the horizon of p in words. */
void pb_gp_horizon(const pb_report_problem *p, char *buf, size_t len);
void pb_gp_axes_log(FILE *f);
/* Margins so that no point sits on the frame. */
void pb_gp_offsets(FILE *f);

/* Work-precision (conv = 0: error against evaluations and, beside it,
 * against CPU time; the requirement as a line when there is one) or
 * convergence (conv = 1: error against step with each order's reference
 * slope), rows of panels past GP_PANEL_CURVES methods; data blocks go to
 * pre, the image size to *width and *height. 1 drawn, 0 no point to draw,
 * -1 out of memory. */
int pb_gp_cost_plot(FILE *f, FILE *pre, int conv, const pb_report_problem *p, const pb_report_case *cs,
                    int *width, int *height);

#endif
