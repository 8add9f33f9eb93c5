/* cli.h - the verbs of the command line and what they share: strict parsing
 * of numbers and names, with messages that name the option and the value.
 * Exit codes: 0 ok, 1 regression or requirement not met, 2 bad input. */
#ifndef PB_CLI_H
#define PB_CLI_H

#include "bench/measure/case.h"

enum { PB_EXIT_OK = 0, PB_EXIT_FAIL = 1, PB_EXIT_USAGE = 2 };

/* The longest horizon in periods any verb takes (as problem files do). */
#define PB_CLI_ORBITS_MAX 1e8

int pb_cli_list(int argc, char **argv);
int pb_cli_run(int argc, char **argv);
int pb_cli_sweep(int argc, char **argv);
int pb_cli_merge(int argc, char **argv);
int pb_cli_report(int argc, char **argv);
int pb_cli_baseline(int argc, char **argv);
int pb_cli_check(int argc, char **argv);
int pb_cli_select(int argc, char **argv);
int pb_cli_score(int argc, char **argv);
int pb_cli_selftest(int argc, char **argv);

/* Print "propbench VERB: error: ..." to stderr; returns PB_EXIT_USAGE. */
int pb_cli_error(const char *verb, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* Strict parses: the whole string must be a finite number; on failure print
 * an error naming the option and the value and return -1. */
int pb_cli_double(const char *verb, const char *opt, const char *s, double *out);
int pb_cli_long(const char *verb, const char *opt, const char *s, long *out);

/* Room kept below an output path for the names propbench adds: a run
 * folder's series/<case id>.csv.tmp.<pid>, .work.<pid>/..., plots/...; a
 * file's .tmp.<pid> or .part.<pid>. */
#define PB_CLI_RESERVE_DIR 512
#define PB_CLI_RESERVE_FILE 32
/* An output path must fit the system's limits with reserve bytes added
 * (PATH_MAX for the whole, NAME_MAX for each name in it): refused before
 * anything is created, never cut. 0, or -1 after a message that gives the
 * reason before the path. */
int pb_cli_out_path(const char *verb, const char *opt, const char *path, int reserve);

/* An output file's path names a file that can be replaced: not empty, not
 * ending in '/', and no folder or device standing there (the rename that
 * writes it would replace it: /dev/null, as root). 0, or -1 after a
 * message naming opt. */
int pb_cli_out_file(const char *verb, const char *opt, const char *path);

/* Before a verb writes its run into a default folder (no --out) that holds
 * an earlier run: a note on stderr naming the folder and how to keep it. */
void pb_cli_note_replacing(const char *verb, const char *dir);

/* Split a comma list in place into at most max items (at least one); -1
 * with a message naming the option when it is empty, has an empty item
 * ("a,,b", a leading or trailing comma) or has more than max. */
int pb_cli_split(const char *verb, const char *opt, char *s, char **items, int max);

/* Resolve a problem name from the catalogue into out; error message if unknown. */
int pb_cli_problem(const char *verb, const char *name, pb_problem *out);
/* Resolve a method name; error message (with the list of names) if unknown. */
const pb_method_type *pb_cli_method(const char *verb, const char *name);
/* --formulation F: "cartesian", "sundman" or "ks" into *out; 0, or -1 after
 * a message naming the option and the value (exit 2). */
int pb_cli_formulation(const char *verb, const char *s, int *out);

/* Print a one-case result as a short table a person can read. */
void pb_cli_print_case(const pb_case_spec *spec, const pb_case_result *res);

/* A warning when `steps` of fixed-step integration will take long (more
 * than 1e9 steps: minutes to an hour of one core), with how to cap it. */
void pb_cli_warn_long(const char *verb, double steps);

/* 1 when stderr is a terminal (progress lines are drawn only then). */
int pb_cli_progress_wanted(int quiet);

#endif
