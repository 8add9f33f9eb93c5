/* run_dir.h - the run directory on disk: results/runs/<name>/ with
 * summary.json, series/<case>.csv, plots/, report.*. Every file is written to
 * a temporary name and renamed, so an interrupted run never leaves a
 * half-written file. */
#ifndef PB_RUN_DIR_H
#define PB_RUN_DIR_H

#include <stddef.h>
#include <stdio.h>
#include <jansson.h>
#include "case.h"

/* mkdir -p; 0 or -1 with errno. */
int pb_mkdirs(const char *path);

/* Write len bytes to path through path.tmp.<pid> + rename; 0 or -1. */
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

/* After a new summary.json is written to dir: remove what an earlier run left
 * there and the new one does not own (series CSVs it does not name, and the
 * report and figures, which described the earlier summary). Only files of
 * the kinds propbench writes are touched. Returns how many were removed. */
int pb_run_dir_prune(const char *dir, const json_t *summary);

/* 1 when dir already holds a summary.json written by propbench: only then
 * may a new run prune what the earlier one left (a user's own folder given
 * as --out is never cleaned). */
int pb_run_dir_is_ours(const char *dir);

#endif
