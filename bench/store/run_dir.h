/* run_dir.h - the run directory on disk: results/runs/<name>/ with
 * summary.json, series/<case>.csv, plots/, report.*. Every file is written to
 * a temporary name and renamed, so an interrupted run never leaves a
 * half-written file. */
#ifndef PB_RUN_DIR_H
#define PB_RUN_DIR_H

#include <stddef.h>
#include <stdio.h>
#include <jansson.h>
#include "bench/measure/case.h"
#include "problems/files.h"  /* pb_mkdirs */

/* 1 if something that is not a plain file stands at path (a folder, say),
 * so no file can be written there, with errno EISDIR for a folder and
 * EPERM otherwise; 0 if it is absent or a plain file. */
int pb_path_blocked(const char *path);

/* Write len bytes to path through path.tmp.<pid> + rename; 0 or -1 (errno
 * EISDIR or EPERM, nothing written, when a folder or a device stands at
 * path: the rename would replace it). */
int pb_write_atomic(const char *path, const char *data, size_t len);

/* Write what body prints (0 on success) to path atomically, through an
 * in-memory stream; 0, or -1 when body or the write fails. */
int pb_write_atomic_printed(const char *path, int (*body)(FILE *f, const void *ctx),
                            const void *ctx);

/* Dump JSON (indented, keys in insertion order) atomically; 0 or -1. */
int pb_json_write_atomic(const char *path, const json_t *doc);

/* Write the case's samples as CSV (header names columns with units) to
 * dir/series/<id>.csv atomically; 0 or -1. */
int pb_series_write(const char *dir, const pb_case_spec *spec, const pb_case_result *res);
/* The same; with states = 1 the rows also hold the method's state
 * (r_x..r_z, v_x..v_z) and the truth's (r_true_x.., v_true_x..). */
int pb_series_write_states(const char *dir, const pb_case_spec *spec, const pb_case_result *res,
                           int states);

/* 1 if rel, a case's "series" entry, names a file below the run's series/
 * folder ("series/<file-safe id>.csv"): the only paths report, merge and
 * prune will read, copy or remove, so a doctored summary cannot point them
 * at another file. */
int pb_series_path_ok(const char *rel);

/* The summary.json in dir if propbench wrote it (new reference), else NULL:
 * only an earlier propbench run's files are ever removed, and a user's own
 * folder given as --out keeps everything but its summary.json. */
json_t *pb_run_dir_previous(const char *dir);

/* Remove from dir what the earlier run (old, from pb_run_dir_previous;
 * NULL: nothing) wrote and the new one (summary; NULL: none) does not own:
 * its series that the new summary does not name, its figures (by
 * pb_fig_base, the names the report gave them) and its report. run_swap.c
 * calls it on the earlier folder after a swap, so that what is left there is
 * not propbench's and moves into the new folder. Returns how many files
 * were removed. */
int pb_run_dir_prune(const char *dir, const json_t *old, const json_t *summary);

#endif
