/* report_data.c - summary.json and series CSVs read back for the report
 * (see report_data.h). JSON through jansson; the fit intercept through GSL. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <gsl/gsl_statistics_double.h>
#include "bench/report/report_data.h"
#include "bench/store/summary_read.h"
#include "bench/store/run_dir.h"
#include "bench/store/figure_names.h"

static double data_num(const json_t *o, const char *key)
{
    const json_t *v = json_object_get(o, key);
    return json_is_number(v) ? json_number_value(v) : (double)NAN;
}

/* -1 for a value that is not a whole number in 0..2^62: a summary's
 * "steps_per_orbit": 1e300 was converted to long (undefined behaviour). */
static long data_long(const json_t *o, const char *key)
{
    const json_t *v = json_object_get(o, key);
    if (json_is_integer(v))
        return json_integer_value(v) >= 0 && json_integer_value(v) <= (1LL << 62)
                   ? (long)json_integer_value(v) : -1;
    double x = json_is_real(v) ? json_real_value(v) : -1.0;
    return x >= 0 && x <= 0x1p62 ? (long)x : -1;
}

static const char *data_str(const json_t *o, const char *key, const char *dflt)
{
    const char *s = json_string_value(json_object_get(o, key));
    return s ? s : dflt;
}

/* Sort key: problem slot, method slot, then coarse to fine. */
typedef struct { pb_report_case c; int pslot; double fine; int seq; } data_item;

static int data_cmp(const void *a, const void *b)
{
    const data_item *x = a, *y = b;
    if (x->pslot != y->pslot) return x->pslot < y->pslot ? -1 : 1;
    if (x->c.method_slot != y->c.method_slot) return x->c.method_slot < y->c.method_slot ? -1 : 1;
    if (x->fine != y->fine) return x->fine < y->fine ? -1 : 1;
    return x->seq < y->seq ? -1 : x->seq > y->seq;
}

static int data_case(const json_t *o, pb_report_case *c, char *err, size_t errlen, const char *path, int i)
{
    memset(c, 0, sizeof *c);
    c->id = data_str(o, "id", NULL);
    c->problem = data_str(o, "problem", NULL);
    c->method = data_str(o, "method", NULL);
    if (!json_is_object(o) || !c->id || !c->problem || !c->method) {
        snprintf(err, errlen, "%s: cases[%d] lacks \"id\", \"problem\" or \"method\"", path, i);
        return -1;
    }
    c->units = data_str(o, "units", "normalized");
    c->status = data_str(o, "status", "crashed");
    c->series = data_str(o, "series", NULL);
    if (c->series && !pb_series_path_ok(c->series)) {
        snprintf(err, errlen, "%s: cases[%d] (%s): \"series\" is \"%.200s\", not a file below series/",
                 path, i, c->id, c->series);
        return -1;
    }
    long order = data_long(o, "method_order");
    c->order = order <= 64 ? (int)order : -1;
    c->from_gsl = json_is_true(json_object_get(o, "from_gsl"));
    c->steps_per_orbit = data_long(o, "steps_per_orbit");
    /* a step given in time units carries steps_per_orbit as a real number for
     * readers of the fixed key; here the step itself names the case */
    if (json_is_number(json_object_get(o, "step")))
        c->steps_per_orbit = 0;
    c->step = data_num(o, "step");
    c->tolerance = data_num(o, "tolerance");
    c->fixed = c->steps_per_orbit > 0 || c->step > 0;
    if (c->steps_per_orbit < 0) c->steps_per_orbit = 0;
    if (!c->fixed && !(c->tolerance > 0)) {
        snprintf(err, errlen, "%s: cases[%d] (%s) has no \"steps_per_orbit\", \"step\" or \"tolerance\"",
                 path, i, c->id);
        return -1;
    }
    c->orbits = data_num(o, "orbits");
    c->horizon_s = data_num(o, "horizon_s");
    c->h = data_num(o, "h");
    const json_t *m = json_object_get(o, "metrics"), *k = json_object_get(o, "cost");
    c->energy_max = data_num(m, "energy_rel_max");
    c->angmom_max = data_num(m, "angmom_rel_max");
    c->pos_max = data_num(m, "pos_err_max");
    c->k_pos = data_num(m, "growth_exponent_pos");
    c->growth_pos = data_str(m, "growth_class_pos", NULL);
    c->growth_energy = data_str(m, "growth_class_energy", NULL);
    c->evals = data_long(k, "evals");
    c->steps = data_long(k, "steps");
    c->ns_per_step = data_num(k, "ns_per_step");
    c->cpu_s = c->steps >= 0 ? 1e-9 * c->ns_per_step * (double)c->steps : (double)NAN;
    c->saturated = json_is_true(json_object_get(m, "error_saturated"));
    c->diverged_at = data_num(o, "diverged_at");
    c->diverged_orbits = data_num(o, "diverged_at_orbits");
    c->status_detail = data_str(o, "status_detail", NULL);
    c->floor_max = data_num(m, "reference_floor_max");
    c->def = json_object_get(o, "problem_def");
    if (!(c->h > 0) && c->fixed && c->steps > 0 && c->horizon_s > 0)
        c->h = c->horizon_s / (double)c->steps;
    return 0;
}

/* Index of s in names[0..n-1], appending it when new. */
static int data_slot(const char **names, int *n, const char *s)
{
    for (int i = 0; i < *n; i++)
        if (!strcmp(names[i], s))
            return i;
    names[*n] = s;
    return (*n)++;
}

/* Sort the n read cases into run, grouped by their np problems (nm[p]
 * methods each), and number each method's variants coarse to fine. */
static void data_group(pb_report_run *run, data_item *items, int n, int np, const int *nm)
{
    qsort(items, (size_t)n, sizeof *items, data_cmp);
    run->ncases = n;
    run->nproblems = np;
    for (int i = 0; i < n; i++) {
        run->cases[i] = items[i].c;
        pb_report_problem *p = &run->problems[items[i].pslot];
        if (p->n == 0) {
            p->name = items[i].c.problem;
            p->first = i;
            p->nmethods = nm[items[i].pslot];
            int km = !strcmp(items[i].c.units, "km-s");
            p->len_unit = km ? "km" : "DU";
            p->time_unit = km ? "s" : "TU";
        }
        pb_report_case *c = &run->cases[i];
        c->variant = (i > p->first && run->cases[i - 1].method_slot == c->method_slot)
                         ? run->cases[i - 1].variant + 1 : 0;
        p->n++;
        if (c->orbits > p->orbits_max) p->orbits_max = c->orbits;
        if (c->horizon_s > p->horizon_max) p->horizon_max = c->horizon_s;
    }
}

/* Two problems whose figures would be the same files are refused before
 * anything is written: the second would draw over the first's figures and
 * both sections of the report would show one problem. pb_fig_stem leaves
 * only a hash collision (or a doctored summary) to get here, so the message
 * names both for a rename. 0, or -1 with the message in err. */
static int data_stems_distinct(const pb_report_run *run, const char *path, char *err, size_t errlen)
{
    for (int i = 0; i < run->nproblems; i++) {
        char a[PB_FIG_BASE_MAX];
        pb_fig_stem(run->problems[i].name, a, sizeof a);
        for (int j = i + 1; j < run->nproblems; j++) {
            char b[PB_FIG_BASE_MAX];
            pb_fig_stem(run->problems[j].name, b, sizeof b);
            if (!strcmp(a, b)) {
                snprintf(err, errlen, "%s: problems '%.200s' and '%.200s' would share the figure files "
                         "plots/%s-*; rename one of them", path, run->problems[i].name,
                         run->problems[j].name, a);
                return -1;
            }
        }
    }
    return 0;
}

/* Every item of list must name a case's field key (method or problem). */
static int data_list_known(const json_t *cases, const char *list, const char *key, const char *opt,
                           char *err, size_t errlen)
{
    size_t k;
    const char *s = pb_summary_list_unmatched(cases, list, key, &k);
    if (!s)
        return 0;
    snprintf(err, errlen, "%s: '%.*s' is no %s of this run", opt, (int)(k > 200 ? 200 : k), s, key);
    return -1;
}

int pb_report_load(const char *dir, pb_report_run *run, char *err, size_t errlen)
{
    return pb_report_load_subset(dir, NULL, NULL, run, err, errlen);
}

int pb_report_load_subset(const char *dir, const char *methods, const char *problems,
                          pb_report_run *run, char *err, size_t errlen)
{
    memset(run, 0, sizeof *run);
    char path[4200];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *doc;
    /* the same checks as check and baseline apply: readable, valid JSON, our
     * format, and every finished case with all its metrics and counts */
    if (pb_summary_load(path, &doc, err, errlen))
        return -1;
    if (pb_summary_complete(path, doc, err, errlen))
        goto fail;
    const json_t *fmt = json_object_get(doc, "format");
    const json_t *cases = json_object_get(doc, "cases");
    if (!json_is_integer(fmt) || json_integer_value(fmt) != 1) {
        snprintf(err, errlen, "%s: \"format\" must be 1 (this propbench reads format 1)", path);
        goto fail;
    }
    if (!json_is_array(cases) || json_array_size(cases) == 0) {
        snprintf(err, errlen, "%s: \"cases\" must be a non-empty list", path);
        goto fail;
    }
    if (data_list_known(cases, methods, "method", "--methods", err, errlen) ||
        data_list_known(cases, problems, "problem", "--problems", err, errlen))
        goto fail;
    int n = (int)json_array_size(cases);
    data_item *items = calloc((size_t)n, sizeof *items);
    const char **pnames = calloc((size_t)n, sizeof *pnames);
    int *nm = calloc((size_t)n, sizeof *nm);
    run->problems = calloc((size_t)n, sizeof *run->problems);
    run->cases = calloc((size_t)n, sizeof *run->cases);
    if (!items || !pnames || !nm || !run->problems || !run->cases) {
        snprintf(err, errlen, "%s: out of memory", path);
        free(items); free(pnames); free(nm);
        goto fail;
    }
    int np = 0, bad = 0, kept = 0;
    for (int i = 0; i < n && !bad; i++) {
        data_item *it = &items[kept];
        if (data_case(json_array_get(cases, (size_t)i), &it->c, err, errlen, path, i)) {
            bad = 1;
            break;
        }
        if (!pb_summary_listed(methods, it->c.method) || !pb_summary_listed(problems, it->c.problem))
            continue;
        kept++;
        it->pslot = data_slot(pnames, &np, it->c.problem);
        it->c.method_slot = -1;
        for (int j = 0; j < kept - 1 && it->c.method_slot < 0; j++)
            if (items[j].pslot == it->pslot && !strcmp(items[j].c.method, it->c.method))
                it->c.method_slot = items[j].c.method_slot;
        if (it->c.method_slot < 0)
            it->c.method_slot = nm[it->pslot]++;
        /* finer = smaller step or tolerance, so ascending "fine" is coarse first */
        it->fine = it->c.fixed ? (it->c.steps_per_orbit > 0 ? (double)it->c.steps_per_orbit : 1.0 / it->c.step)
                               : -log(it->c.tolerance);
        it->seq = i;
    }
    if (!bad && kept == 0) {
        snprintf(err, errlen, "%s: no case of the run is both in --methods and in --problems", path);
        bad = 1;
    }
    if (!bad) {
        data_group(run, items, kept, np, nm);
        bad = data_stems_distinct(run, path, err, errlen);
    }
    free(items); free(pnames); free(nm);
    if (bad)
        goto fail;
    run->doc = doc;
    return 0;
fail:
    free(run->problems);
    free(run->cases);
    memset(run, 0, sizeof *run);
    json_decref(doc);
    return -1;
}

void pb_report_free(pb_report_run *run)
{
    if (!run)
        return;
    free(run->cases);
    free(run->problems);
    json_decref(run->doc);
    memset(run, 0, sizeof *run);
}

int pb_report_case_plain_ok(const pb_report_case *c)
{
    return !strcmp(c->status, "ok") && !c->saturated;
}

void pb_report_case_status(const pb_report_case *c, char *buf, size_t len)
{
    if (!strcmp(c->status, "ok")) {
        snprintf(buf, len, "%s", c->saturated ? "ok(sat)" : "ok");
        return;
    }
    int n = snprintf(buf, len, "%s", c->status);
    if (n < 0 || (size_t)n >= len || !isfinite(c->diverged_at))
        return;
    n += snprintf(buf + n, len - (size_t)n, " at t = %.6g %s", c->diverged_at,
                  strcmp(c->units, "km-s") ? "TU" : "s");
    if ((size_t)n < len && isfinite(c->diverged_orbits))
        snprintf(buf + n, len - (size_t)n, " (%.4g orbits)", c->diverged_orbits);
}

void pb_report_case_setting(const pb_report_case *c, char *buf, size_t len)
{
    if (c->fixed && c->steps_per_orbit > 0)
        snprintf(buf, len, "n=%ld", c->steps_per_orbit);
    else if (c->fixed)
        snprintf(buf, len, "h=%.4g %s", c->step, strcmp(c->units, "km-s") ? "TU" : "s");
    else
        snprintf(buf, len, "tol=%.0e", c->tolerance);
}

void pb_report_series_free(pb_report_series *s)
{
    if (!s)
        return;
    for (int i = 0; i < s->ncols; i++)
        free(s->names[i]);
    free(s->names);
    free(s->v);
    memset(s, 0, sizeof *s);
}

/* The header row's column names (units in [] dropped); -1 out of memory. */
static int series_header(pb_report_series *s, char *line)
{
    for (char *tok = strtok(line, ","); tok; tok = strtok(NULL, ",")) {
        char **nn = realloc(s->names, (size_t)(s->ncols + 1) * sizeof *nn);
        if (!nn)
            return -1;
        s->names = nn;
        tok[strcspn(tok, "[")] = 0;
        if (!(s->names[s->ncols] = strdup(tok)))
            return -1;
        s->ncols++;
    }
    return 0;
}

int pb_report_series_read(const char *path, pb_report_series *s, char *err, size_t errlen)
{
    memset(s, 0, sizeof *s);
    const char *why;
    FILE *f = pb_open_input(path, "r", &why);
    if (!f) {
        snprintf(err, errlen, "%s: cannot read: %s", path, why);
        return -1;
    }
    char *line = NULL;
    size_t cap = 0;
    size_t rows_cap = 0;
    int lineno = 0, rc = -1;
    ssize_t got;
    while ((got = getline(&line, &cap, f)) > 0) {
        lineno++;
        if (memchr(line, 0, (size_t)got)) {
            snprintf(err, errlen, "%s:%d: a NUL byte: not a text file", path, lineno);
            goto out;
        }
        line[strcspn(line, "\r\n")] = 0;
        if (lineno == 1) {
            if (series_header(s, line))
                goto out;
            if (s->ncols == 0) {
                snprintf(err, errlen, "%s:1: no header row", path);
                goto out;
            }
            continue;
        }
        if (!*line)
            continue;
        if ((size_t)s->nrows + 1 > rows_cap) {
            rows_cap = rows_cap ? 2 * rows_cap : 64;
            double *nv = realloc(s->v, rows_cap * (size_t)s->ncols * sizeof *nv);
            if (!nv) goto out;
            s->v = nv;
        }
        double *row = s->v + (size_t)s->nrows * (size_t)s->ncols;
        char *p = line;
        for (int j = 0; j < s->ncols; j++) {
            char *end;
            /* an empty field is a quantity undefined at that sample (e.g. the
             * apsidal angle of a circular orbit): NaN, which plots skip */
            if (*p == ',' || (*p == 0 && j + 1 == s->ncols)) {
                row[j] = NAN;
                end = p;
            } else {
                row[j] = strtod(p, &end);
                if (end == p) {
                    snprintf(err, errlen, "%s:%d: column %d (%s) is not a number", path, lineno, j + 1,
                             s->names[j]);
                    goto out;
                }
            }
            if (j + 1 < s->ncols ? *end != ',' : *end != 0) {
                snprintf(err, errlen, "%s:%d: column %d (%s) is not a number", path, lineno, j + 1,
                         s->names[j]);
                goto out;
            }
            p = end + 1;
        }
        s->nrows++;
    }
    if (lineno == 0)
        snprintf(err, errlen, "%s: empty file", path);
    else
        rc = 0;
out:
    if (rc && !err[0])
        snprintf(err, errlen, "%s: out of memory", path);
    free(line);
    fclose(f);
    if (rc)
        pb_report_series_free(s);
    return rc;
}

int pb_report_series_col(const pb_report_series *s, const char *name)
{
    for (int i = 0; i < s->ncols; i++)
        if (!strcmp(s->names[i], name))
            return i;
    return -1;
}

int pb_report_fit_intercept(const double *x, const double *err, const int *use, int n,
                            double x_min, double k, double *b)
{
    if (!isfinite(k) || n <= 0)
        return 0;
    double *r = malloc((size_t)n * sizeof *r);
    if (!r)
        return 0;
    int m = 0;
    for (int pass = 0; pass < 2 && m < 2; pass++) {
        m = 0;
        for (int i = 0; i < n; i++)
            if (use[i] && err[i] > 0 && x[i] > 0 && (pass || x[i] >= x_min) && isfinite(err[i]))
                r[m++] = log(err[i]) - k * log(x[i]);
    }
    /* the least-squares intercept for a fixed slope is the mean residual */
    if (m >= 2)
        *b = gsl_stats_mean(r, 1, (size_t)m);
    free(r);
    return m;
}
