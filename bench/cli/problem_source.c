/* problem_source.c - pick one case of a user's problem file for the CLI. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/cli/problem_source.h"
#include "problems/problem_file.h"

/* Warnings are held until the case is chosen, so that a file's other cases
 * do not speak up for a run that does not use them. */
#define SOURCE_WARN_MAX 32
static char source_warnings[SOURCE_WARN_MAX][512];
static int source_nwarn;

static int source_dropped;

static void source_warn(const char *msg)
{
    if (source_nwarn < SOURCE_WARN_MAX)
        snprintf(source_warnings[source_nwarn++], sizeof source_warnings[0], "%s", msg);
    else
        source_dropped++;
}

static void source_flush(const char *case_name)
{
    char tag[PB_NAME_MAX + 16];
    snprintf(tag, sizeof tag, "case '%s'", case_name);
    for (int i = 0; i < source_nwarn; i++)
        if (!strstr(source_warnings[i], "case '") || strstr(source_warnings[i], tag))
            fprintf(stderr, "propbench: warning: %s\n", source_warnings[i]);
    if (source_dropped)
        fprintf(stderr, "propbench: warning: %d more warnings about this file were not kept\n",
                source_dropped);
    source_dropped = 0;
}

int pb_problem_source_cases(const char *verb, const char *path, const char *case_name,
                            pb_problem **out, int *nout)
{
    pb_problem *cases = NULL;
    int n = 0;
    char err[1024];
    *out = NULL;
    *nout = 0;
    source_nwarn = source_dropped = 0;
    if (pb_problem_file_read(path, &cases, &n, err, sizeof err, source_warn) != PB_OK) {
        fprintf(stderr, "propbench %s: error: %s\n", verb, err);
        return -1;
    }
    int m = 0;
    for (int i = 0; i < n; i++)
        if (!case_name || strcmp(cases[i].name, case_name) == 0) {
            source_flush(cases[i].name); /* keeps only the chosen case's warnings */
            cases[m++] = cases[i];
            if (case_name)
                break;
        }
    source_nwarn = 0;
    if (m == 0) {
        fprintf(stderr, "propbench %s: error: %s: no case named '%s'; cases:", verb, path,
                case_name ? case_name : "");
        for (int i = 0; i < n; i++)
            fprintf(stderr, " %s", cases[i].name);
        fputc('\n', stderr);
        free(cases);
        return -1;
    }
    *out = cases;
    *nout = m;
    return 0;
}

int pb_problem_source_file(const char *verb, const char *path, const char *case_name,
                           pb_problem *out)
{
    pb_problem *cases;
    int n;
    if (pb_problem_source_cases(verb, path, case_name, &cases, &n))
        return -1;
    *out = cases[0]; /* the named case, or the first */
    free(cases);
    return 0;
}
