/* html.h - the report as one self-contained HTML file. */
#ifndef PB_REPORT_HTML_H
#define PB_REPORT_HTML_H

#include <stddef.h>
#include <stdio.h>
#include "bench/report/view.h"

/* Write out_dir/report.html (self-contained: inline SVG, no script, no
 * network) atomically. 0, or -1 with err. */
int pb_report_html_write(const pb_report_view *v, char *err, size_t errlen);

/* s with &, <, >, " and ' escaped. */
void pb_report_html_text(FILE *f, const char *s);

/* The summary page's section (html_summary.c): the caution, then per
 * problem the cheapest plain-ok case at each error level (or the select
 * answer beside the run), and the growth classes of every method. */
void pb_report_html_summary(FILE *f, const pb_report_view *v, const char *caution);

#endif
