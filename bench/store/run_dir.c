/* run_dir.c - atomic files, the per-case CSV series, and the clean-up of an
 * earlier run in the same folder. */
#include <ctype.h>
#include <errno.h>
#include <limits.h>
#include <stdarg.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <dirent.h>
#include "bench/store/run_dir.h"
#include "bench/store/figure_names.h"

int pb_path_blocked(const char *path)
{
    struct stat st;
    if (stat(path, &st) || S_ISREG(st.st_mode))
        return 0;
    errno = S_ISDIR(st.st_mode) ? EISDIR : EPERM;
    return 1;
}

int pb_write_atomic(const char *path, const char *data, size_t len)
{
    /* an output that is a symbolic link is written through: the file it
     * names is replaced, by a rename in that file's own folder, and the link
     * stays (a link that names nothing is refused: ENOENT) */
    char target[PATH_MAX], tmp[4200];
    if (!(path = pb_link_target(path, target)))
        return -1;
    /* a rename would replace a folder's or a device's name (/dev/null, as
     * root) with a plain file: refused, whoever the caller */
    if (pb_path_blocked(path))
        return -1;
    /* never cut: a shortened name would be another file */
    if (snprintf(tmp, sizeof tmp, "%s.tmp.%ld", path, (long)getpid()) >= (int)sizeof tmp) {
        errno = ENAMETOOLONG;
        return -1;
    }
    FILE *f = fopen(tmp, "wb");
    if (!f)
        return -1;
    /* errno keeps the first failure's reason (ENOSPC on a full disk) */
    int e = 0;
    errno = 0;
    if (fwrite(data, 1, len, f) != len || fflush(f) || fsync(fileno(f)))
        e = errno ? errno : EIO;
    if (fclose(f) && !e)
        e = errno;
    if (!e && rename(tmp, path))
        e = errno;
    if (e) {
        unlink(tmp);
        errno = e;
        return -1;
    }
    return 0;
}

int pb_write_atomic_printed(const char *path, int (*body)(FILE *f, const void *ctx),
                            const void *ctx)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    if (!f)
        return -1;
    int rc = body(f, ctx);
    if (fclose(f))
        rc = -1;
    if (rc == 0 && pb_write_atomic(path, buf, n))
        rc = -1;
    int e = errno;
    free(buf);
    errno = e;
    return rc ? -1 : 0;
}

int pb_json_write_atomic(const char *path, const json_t *doc)
{
    char *s = json_dumps(doc, JSON_INDENT(1) | JSON_PRESERVE_ORDER | JSON_REAL_PRECISION(17));
    if (!s)
        return -1;
    size_t n = strlen(s);
    char *t = realloc(s, n + 2);
    if (!t) {
        free(s);
        return -1;
    }
    t[n] = '\n';
    t[n + 1] = 0;
    int rc = pb_write_atomic(path, t, n + 1);
    free(t);
    return rc;
}

/* A growable text buffer for the CSV (a few hundred rows at most). */
typedef struct { char *s; size_t n, cap; int bad; } series_buf;

static void series_printf(series_buf *b, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

static void series_printf(series_buf *b, const char *fmt, ...)
{
    if (b->bad)
        return;
    for (;;) {
        va_list ap;
        va_start(ap, fmt);
        int k = vsnprintf(b->s + b->n, b->cap - b->n, fmt, ap);
        va_end(ap);
        if (k < 0) {
            b->bad = 1;
            return;
        }
        if ((size_t)k < b->cap - b->n) {
            b->n += (size_t)k;
            return;
        }
        size_t nc = 2 * b->cap + (size_t)k + 64;
        char *ns = realloc(b->s, nc);
        if (!ns) {
            b->bad = 1;
            return;
        }
        b->s = ns;
        b->cap = nc;
    }
}

static void series_num(series_buf *b, double x)
{
    if (isfinite(x))
        series_printf(b, ",%.9e", x);
    else
        series_printf(b, ",");
}

int pb_series_write(const char *dir, const pb_case_spec *spec, const pb_case_result *res)
{
    return pb_series_write_states(dir, spec, res, 0);
}

/* The state columns' header (states = 1) and one row's values. */
static void series_state_head(series_buf *b, const char *L, const char *V)
{
    static const char *const q[] = {"r_", "v_", "r_true_", "v_true_"};
    for (int j = 0; j < 4; j++)
        for (int i = 0; i < 3; i++)
            series_printf(b, ",%s%c[%s]", q[j], "xyz"[i], j % 2 ? V : L);
}

static void series_state_row(series_buf *b, const pb_sample *s)
{
    const double *q[] = {s->r, s->v, s->rt, s->vt};
    for (int j = 0; j < 4; j++)
        for (int i = 0; i < 3; i++)
            series_printf(b, ",%.17g", q[j][i]);
}

int pb_series_write_states(const char *dir, const pb_case_spec *spec, const pb_case_result *res,
                           int states)
{
    char path[4096];
    snprintf(path, sizeof path, "%s/series", dir);
    if (pb_mkdirs(path))
        return -1;
    snprintf(path, sizeof path, "%s/series/%s.csv", dir, res->id);
    const char *L = spec->problem.units == PB_UNITS_KM_S ? "km" : "DU";
    const char *V = spec->problem.units == PB_UNITS_KM_S ? "km/s" : "DU/TU";
    const char *T = spec->problem.units == PB_UNITS_KM_S ? "s" : "TU";
    series_buf b = {malloc(4096), 0, 4096, 0};
    if (!b.s)
        return -1;
    series_printf(&b, "t[%s],orbits[-],log_sample[-],metric_sample[-],energy_rel[-],energy_rel_window_max[-],"
                  "angmom_rel[-],angmom_rel_window_max[-],ecc_drift[-],apsis_angle[rad],"
                  "pos_err[%s],vel_err[%s],radial[%s],along_track[%s],cross_track[%s],"
                  "truth_floor[%s]", T, L, V, L, L, L, L);
    if (states)
        series_state_head(&b, L, V);
    series_printf(&b, "\n");
    for (int k = 0; k < res->nsamples; k++) {
        const pb_sample *s = &res->samples[k];
        series_printf(&b, "%.17g", s->t);
        series_num(&b, s->orbits);
        series_printf(&b, ",%d", s->on_log_grid);
        series_printf(&b, ",%d", s->in_metrics);
        series_num(&b, s->energy_rel);
        series_num(&b, s->energy_rel_window);
        series_num(&b, s->angmom_rel);
        series_num(&b, s->angmom_rel_window);
        series_num(&b, s->ecc_drift);
        series_num(&b, s->apsis_angle);
        series_num(&b, s->pos_err);
        series_num(&b, s->vel_err);
        series_num(&b, s->radial);
        series_num(&b, s->along);
        series_num(&b, s->cross);
        series_num(&b, s->truth_floor);
        if (states)
            series_state_row(&b, s);
        series_printf(&b, "\n");
    }
    int rc = b.bad ? -1 : pb_write_atomic(path, b.s, b.n);
    free(b.s);
    return rc;
}

int pb_series_path_ok(const char *rel)
{
    static const char prefix[] = "series/", suffix[] = ".csv";
    size_t n = rel ? strlen(rel) : 0, lp = sizeof prefix - 1, ls = sizeof suffix - 1;
    if (n <= lp + ls || strncmp(rel, prefix, lp) || strcmp(rel + n - ls, suffix) || strstr(rel, ".."))
        return 0;
    for (const char *c = rel + lp; *c; c++)
        if (!isalnum((unsigned char)*c) && !strchr("._+-", *c))
            return 0;
    return 1;
}

/* 1 if some case of summary names this series path */
static int run_dir_names(const json_t *summary, const char *rel)
{
    size_t i;
    const json_t *c;
    json_array_foreach(json_object_get(summary, "cases"), i, c) {
        const char *sr = json_string_value(json_object_get(c, "series"));
        if (sr && !strcmp(sr, rel))
            return 1;
    }
    return 0;
}

json_t *pb_run_dir_previous(const char *dir)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *d = json_load_file(path, 0, NULL);
    const char *tool = d ? json_string_value(json_object_get(d, "tool")) : NULL;
    if (tool && !strncmp(tool, "propbench", 9) && json_is_array(json_object_get(d, "cases")))
        return d;
    json_decref(d);
    return NULL;
}

int pb_run_dir_prune(const char *dir, const json_t *old, const json_t *summary)
{
    char path[8400];
    int removed = 0;
    if (!old)
        return 0;
    size_t i;
    const json_t *c;
    json_array_foreach(json_object_get(old, "cases"), i, c) {
        /* the earlier run's series that the new run does not write again */
        const char *sr = json_string_value(json_object_get(c, "series"));
        if (pb_series_path_ok(sr) && !run_dir_names(summary, sr)) {
            snprintf(path, sizeof path, "%s/%s", dir, sr);
            if (unlink(path) == 0)
                removed++;
        }
        /* the figures `report` draws for the earlier run's problems, named
         * as the report names them (a base is one file-safe component, so
         * no problem name can reach outside plots/) */
        const char *prob = json_string_value(json_object_get(c, "problem"));
        for (int k = 0; prob && k < PB_FIG_COUNT; k++) {
            char base[PB_FIG_BASE_MAX];
            pb_fig_base(prob, k, base, sizeof base);
            for (const char *const *x = pb_fig_exts; *x; x++) {
                snprintf(path, sizeof path, "%s/plots/%s.%s", dir, base, *x);
                if (unlink(path) == 0)
                    removed++;
            }
        }
    }
    static const char *const reports[] = {"report.html", "report.md", "report.png", "plots/style.gp", NULL};
    for (const char *const *r = reports; *r; r++) {
        snprintf(path, sizeof path, "%s/%s", dir, *r);
        if (unlink(path) == 0)
            removed++;
    }
    /* the earlier report's folder, if nothing else is in it now */
    snprintf(path, sizeof path, "%s/plots", dir);
    rmdir(path);
    return removed;
}
