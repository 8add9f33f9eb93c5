/* view.h - what the HTML and Markdown writers need besides the run: where
 * the report goes, and which figures have a script (made) and were drawn. */
#ifndef PB_REPORT_VIEW_H
#define PB_REPORT_VIEW_H

#include "bench/report/report_data.h"

typedef struct pb_report_view {
    const pb_report_run *run;
    const char *out_dir;            /* report.html, report.md, plots/ */
    const char *title;              /* the run's name */
    const unsigned char *made;      /* [problem * PB_FIG_COUNT + kind] */
    const unsigned char *drawn;
    const char *why_not_drawn;      /* NULL, or e.g. "gnuplot was not found" */
    const char *run_dir;            /* summary.json's folder (select-*.json looked for there) */
    int external_figures;           /* 1: img elements link plots/NAME.svg, not inline SVG */
} pb_report_view;

#endif
