/* options.c - shared command-line helpers (see cli.h). */
#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "bench/cli/cli.h"
#include "bench/store/run_dir.h"
#include "problems/catalogue.h"

int pb_cli_error(const char *verb, const char *fmt, ...)
{
    va_list ap;
    fprintf(stderr, "propbench %s: error: ", verb);
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fputc('\n', stderr);
    return PB_EXIT_USAGE;
}

int pb_cli_double(const char *verb, const char *opt, const char *s, double *out)
{
    char *end;
    errno = 0;
    double x = strtod(s, &end);
    if (end == s || *end || errno == ERANGE || !isfinite(x)) {
        pb_cli_error(verb, "%s expects a finite number, got '%s'", opt, s);
        return -1;
    }
    *out = x;
    return 0;
}

int pb_cli_long(const char *verb, const char *opt, const char *s, long *out)
{
    char *end;
    errno = 0;
    long x = strtol(s, &end, 10);
    if (end == s || *end) {
        pb_cli_error(verb, "%s expects a whole number, got '%s'", opt, s);
        return -1;
    }
    if (errno == ERANGE) {
        pb_cli_error(verb, "%s: '%s' is out of range", opt, s);
        return -1;
    }
    *out = x;
    return 0;
}

int pb_cli_out_path(const char *verb, const char *opt, const char *path, int reserve)
{
    size_t len = strlen(path);
    if (len + (size_t)reserve >= PATH_MAX) {
        pb_cli_error(verb, "%s: a path of %zu bytes is too long (at most %d here, the system's "
                     "limit %d less room for the names propbench adds): %s", opt, len,
                     PATH_MAX - 1 - reserve, PATH_MAX, path);
        return -1;
    }
    for (const char *p = path; *p;) {
        size_t n = strcspn(p, "/");
        if (n > NAME_MAX) {
            pb_cli_error(verb, "%s: a name of %zu bytes in the path is too long (the system's "
                         "limit is %d): %.*s", opt, n, NAME_MAX, (int)n, p);
            return -1;
        }
        p += n;
        p += strspn(p, "/");
    }
    return 0;
}

int pb_cli_out_file(const char *verb, const char *opt, const char *path)
{
    if (!path[0] || path[strlen(path) - 1] == '/' || pb_path_blocked(path)) {
        pb_cli_error(verb, "%s '%s': not a file name (a folder or a device stands there)", opt, path);
        return -1;
    }
    return 0;
}

int pb_cli_split(const char *verb, const char *opt, char *s, char **items, int max)
{
    size_t len = strlen(s);
    if (!len || s[0] == ',' || s[len - 1] == ',' || strstr(s, ",,")) {
        pb_cli_error(verb, "%s: an empty name or value in '%s'", opt, s);
        return -1;
    }
    int n = 0;
    for (char *tok = strtok(s, ","); tok; tok = strtok(NULL, ",")) {
        if (n == max) {
            pb_cli_error(verb, "%s takes at most %d values", opt, max);
            return -1;
        }
        items[n++] = tok;
    }
    return n;
}

int pb_cli_problem(const char *verb, const char *name, pb_problem *out)
{
    if (pb_problem_lookup(name, out) == PB_OK)
        return 0;
    fprintf(stderr, "propbench %s: error: unknown problem '%s'; known problems:", verb, name);
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++)
        fprintf(stderr, " %s", e->name);
    fprintf(stderr, " (see 'propbench list problems')\n");
    return -1;
}

const pb_method_type *pb_cli_method(const char *verb, const char *name)
{
    const pb_method_type *m = pb_method_find(name);
    if (m)
        return m;
    fprintf(stderr, "propbench %s: error: unknown method '%s'; known methods:", verb, name);
    /* built-in methods, then those of the plug-ins loaded */
    for (int i = 0; pb_method_at(i); i++)
        fprintf(stderr, " %s", pb_method_at(i)->name);
    fputc('\n', stderr);
    return NULL;
}

int pb_cli_progress_wanted(int quiet)
{
    return !quiet && isatty(STDERR_FILENO);
}

void pb_cli_warn_long(const char *verb, double steps)
{
    /* 50 to 500 ns a step spans rk4 to yoshida8 and GSL's rk8pd here
     * (make bench; machine-dependent) */
    if (steps > 1e9)
        fprintf(stderr, "propbench %s: warning: %.3g steps of fixed-step integration: at 50 to 500 ns a "
                "step that is %.3g to %.3g minutes of one core; --max-steps N ends a case early\n",
                verb, steps, steps * 50e-9 / 60, steps * 500e-9 / 60);
}

int pb_cli_formulation(const char *verb, const char *s, int *out)
{
    for (int f = 0; f < PB_FORMULATION_COUNT; f++)
        if (strcmp(s, pb_formulation_name(f)) == 0) {
            *out = f;
            return 0;
        }
    pb_cli_error(verb, "--formulation: unknown formulation '%s' (known: cartesian, sundman, ks)", s);
    return -1;
}

void pb_cli_note_replacing(const char *verb, const char *dir)
{
    char path[PATH_MAX];
    if (snprintf(path, sizeof path, "%s/summary.json", dir) >= (int)sizeof path)
        return;
    if (access(path, F_OK) == 0)
        fprintf(stderr, "propbench %s: note: replacing the earlier run in %s (give --out DIR "
                "to keep it)\n", verb, dir);
}
