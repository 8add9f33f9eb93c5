/* gnuplot_runner.h - gnuplot run as an external program (fork/exec, no
 * shell) on one figure script inside the plots folder. */
#ifndef PB_REPORT_GNUPLOT_H
#define PB_REPORT_GNUPLOT_H

#include <stddef.h>

/* Resolve prog (a path, or a name searched in PATH) to an executable file.
 * 0 and the path in out, or -1 when there is none. */
int pb_report_gnuplot_find(const char *prog, char *out, size_t len);

/* Run `exe ./<base>.gp` (a path, so no base is taken for an option) with
 * plots_dir as working directory, stdout and stderr into
 * plots_dir/<base>.log (removed when empty after a good drawing); on success check that <base>.png.tmp and
 * <base>.svg.tmp are whole images (gnuplot exits 0 when its writes fail)
 * and rename them to their final names; on any failure remove both. 0, or -1 with the reason in err
 * (the log's last line when gnuplot reported an error). */
int pb_report_gnuplot_run(const char *exe, const char *plots_dir, const char *base, char *err,
                          size_t errlen);

/* Figures drawn at once at most (pb_report_gnuplot_start). */
#define PB_GNUPLOT_SLOTS 4

/* The same in two halves, so that several figures draw at once: start
 * returns the slot (0 .. PB_GNUPLOT_SLOTS-1) or -1 with err; wait waits for
 * any started figure, puts its slot in *slot, checks and installs its
 * images as above, and returns 0 or -1 with err. */
int pb_report_gnuplot_start(const char *exe, const char *plots_dir, const char *base, char *err,
                            size_t errlen);
int pb_report_gnuplot_wait(const char *exe, const char *plots_dir, int *slot, char *err, size_t errlen);

/* For a signal handler (async-signal-safe): kill every gnuplot being run
 * and remove the temporary images of their figures. */
void pb_report_gnuplot_abort(void);

#endif
