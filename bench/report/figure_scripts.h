/* figure_scripts.h - gnuplot scripts for the report's figures, written next to
 * the data: plots/style.gp (the look) and one plots/<base>.gp per figure
 * (pb_fig_base), each drawing <base>.png and <base>.svg (as .tmp, renamed by the
 * runner) from the series CSVs and data blocks taken from summary.json. */
#ifndef PB_REPORT_GP_H
#define PB_REPORT_GP_H

#include <stddef.h>
#include "bench/report/report_data.h"
#include "bench/store/figure_names.h"

/* The look, as shipped in scripts/plot-style.gp (figure_style.c). */
extern const char pb_report_style_gp[];

/* A one-line caption for the HTML/Markdown (kinds and file names are
 * bench/store/figure_names.h's). */
const char *pb_report_fig_caption(int kind);

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
