/* figure_scripts.h - gnuplot scripts for the report's figures, written next to
 * the data: plots/style.gp (the look) and one plots/<problem>-<kind>.gp per
 * figure, each drawing <base>.png and <base>.svg (as .tmp, renamed by the
 * runner) from the series CSVs and data blocks taken from summary.json. */
#ifndef PB_REPORT_GP_H
#define PB_REPORT_GP_H

#include <stddef.h>
#include "bench/report/report_data.h"

enum { PB_FIG_ENERGY, PB_FIG_ANGMOM, PB_FIG_GROWTH, PB_FIG_RIC, PB_FIG_WORK, PB_FIG_CONV,
       PB_FIG_COUNT };

/* The look, as shipped in scripts/plot-style.gp (figure_style.c). */
extern const char pb_report_style_gp[];

/* "energy", "angmom", ... and a one-line caption for the HTML/Markdown. */
const char *pb_report_fig_kind(int kind);
const char *pb_report_fig_caption(int kind);

/* File base "<problem>-<kind>" with the problem name made file-safe. */
void pb_report_fig_base(const pb_report_problem *p, int kind, char *buf, size_t len);

/* Write plots_dir/style.gp and the figure scripts of every problem of run.
 * run_dir is where summary.json and series/ are (read here for the fits);
 * data_prefix is how a script in plots_dir reaches run_dir ("../" or an
 * absolute path ending in '/'). made[p * PB_FIG_COUNT + kind] is set to 1
 * for each script written (a figure with no data to draw is skipped).
 * Problems with unreadable series are warned about on stderr and drawn from
 * the rest. 0, or -1 with a message in err (a file could not be written). */
int pb_report_gp_write(const pb_report_run *run, const char *run_dir, const char *plots_dir,
                       const char *data_prefix, unsigned char *made, char *err, size_t errlen);

#endif
