/* problem_source.c - pick one case of a user's problem file for the CLI. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "problem_source.h"
#include "../problems/problem_file.h"

static void source_warn(const char *msg)
{
    fprintf(stderr, "propbench: warning: %s\n", msg);
}

int pb_problem_source_file(const char *verb, const char *path, const char *case_name,
                           pb_problem *out)
{
    pb_problem *cases = NULL;
    int n = 0;
    char err[1024];
    if (pb_problem_file_read(path, &cases, &n, err, sizeof err, source_warn) != PB_OK) {
        fprintf(stderr, "propbench %s: error: %s\n", verb, err);
        return -1;
    }
    int rc = -1;
    for (int i = 0; i < n; i++)
        if (!case_name || strcmp(cases[i].name, case_name) == 0) {
            *out = cases[i];
            rc = 0;
            break;
        }
    if (rc) {
        fprintf(stderr, "propbench %s: error: %s: no case named '%s'; cases:", verb, path,
                case_name ? case_name : "");
        for (int i = 0; i < n; i++)
            fprintf(stderr, " %s", cases[i].name);
        fputc('\n', stderr);
    }
    free(cases);
    return rc;
}
