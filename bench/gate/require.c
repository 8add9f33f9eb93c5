/* require.c - absolute requirements on a run's cases (see require.h). */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/gate/require.h"
#include "bench/store/summary_read.h"

const char *const pb_require_names[] = {
    "energy_rel_max", "energy_rel_final", "angmom_rel_max", "angmom_rel_final",
    "pos_err_max", "pos_err_final", "pos_err_max_m", "pos_err_final_m",
    "vel_err_max", "vel_err_final", "ecc_drift_max", "steps", "evals", "rejected", NULL};

static int require_is_count(const char *name)
{
    return !strcmp(name, "steps") || !strcmp(name, "evals") || !strcmp(name, "rejected");
}

static void require_names(char *err, size_t errlen)
{
    size_t n = strlen(err);
    for (const char *const *k = pb_require_names; *k && n < errlen; k++)
        n += (size_t)snprintf(err + n, errlen - n, "%s%s", k == pb_require_names ? "" : ", ", *k);
}

int pb_require_parse(pb_check_options *o, const char *arg, char *err, size_t errlen)
{
    size_t nl = strcspn(arg, "<>= \t");
    const char *p = arg + nl;
    while (*p == ' ' || *p == '\t')
        p++;
    size_t ol = (p[0] == '<' || p[0] == '>') ? (p[1] == '=' ? 2 : 1) : 0;
    if (!ol) {
        snprintf(err, errlen, "--require '%s': expects METRIC<=VALUE (or <, >=, >), "
                 "e.g. 'pos_err_max_m<=10'", arg);
        return -1;
    }
    const char *const *k = pb_require_names;
    while (*k && !(strlen(*k) == nl && !strncmp(*k, arg, nl)))
        k++;
    if (!*k) {
        snprintf(err, errlen, "--require '%s': unknown metric '%.*s'; one of ", arg, (int)nl, arg);
        require_names(err, errlen);
        return -1;
    }
    char *end;
    errno = 0;
    double v = strtod(p + ol, &end);
    while (*end == ' ' || *end == '\t')
        end++;
    if (end == p + ol || *end || errno || !isfinite(v)) {
        snprintf(err, errlen, "--require '%s': the value '%s' is not a finite number", arg, p + ol);
        return -1;
    }
    if (o->n_require == PB_CHECK_REQUIRE_MAX) {
        snprintf(err, errlen, "--require: at most %d requirements", PB_CHECK_REQUIRE_MAX);
        return -1;
    }
    pb_check_require *q = &o->require[o->n_require++];
    snprintf(q->metric, sizeof q->metric, "%s", *k);
    snprintf(q->op, sizeof q->op, "%.*s", (int)ol, p);
    q->value = v;
    snprintf(q->text, sizeof q->text, "%s%.*s%g", *k, (int)ol, p, v);
    return 0;
}

/* A list name that matches no case of the run: 1 with the message. */
static int require_list_unmatched(const json_t *cases, const char *list, const char *key,
                                  const char *opt, char *err, size_t errlen)
{
    size_t len;
    const char *p = pb_summary_list_unmatched(cases, list, key, &len);
    if (!p)
        return 0;
    snprintf(err, errlen, "%s: no case of %s '%.*s' in the run", opt, key, (int)len, p);
    return 1;
}

static int require_met(const pb_check_require *q, double x)
{
    if (!strcmp(q->op, "<="))
        return x <= q->value;
    if (!strcmp(q->op, "<"))
        return x < q->value;
    if (!strcmp(q->op, ">="))
        return x >= q->value;
    return x > q->value;
}

/* One row: case c against q. 0, or -1 when out of memory. */
static int require_row(pb_check_report *r, const char *id, const json_t *c, const pb_check_require *q)
{
    const json_t *m = json_object_get(c, require_is_count(q->metric) ? "cost" : "metrics");
    const json_t *v = json_object_get(m, q->metric);
    double x = json_is_number(v) ? json_number_value(v) : (double)NAN;
    /* below the reference's floor: smaller than anything the truth resolves */
    int below = !json_is_number(v) && !strncmp(q->metric, "pos_err", 7) &&
                json_is_true(json_object_get(m, "below_reference_floor"));
    int met = isfinite(x) ? require_met(q, x) : below && q->op[0] == '<';
    pb_check_row *w = pb_check_add_row(r, id, q->text, met ? PB_CHECK_SAME : PB_CHECK_UNMET);
    if (!w)
        return -1;
    r->required++;
    snprintf(w->base, sizeof w->base, "%s %g", q->op, q->value);
    if (isfinite(x))
        snprintf(w->run, sizeof w->run, "%.4g", x);
    else
        snprintf(w->run, sizeof w->run, "%s", below ? "below ref floor" : !v ? "absent"
                                                                  : "not a number");
    snprintf(w->change, sizeof w->change, "%s", met ? "met" : "not met");
    w->rel = isfinite(x) && q->value != 0 ? (x - q->value) / fabs(q->value) : met ? 0.0 : (double)INFINITY;
    return 0;
}

/* Rows regrouped by case, cases in the order they first appear (stable). */
typedef struct { size_t first, at; } require_key;

static int require_key_cmp(const void *a, const void *b)
{
    const require_key *x = a, *y = b;
    return x->first != y->first ? (x->first > y->first) - (x->first < y->first)
                                : (x->at > y->at) - (x->at < y->at);
}

static int require_group(pb_check_report *r)
{
    json_t *first = json_object();
    require_key *k = malloc((r->n ? r->n : 1) * sizeof *k);
    pb_check_row *rows = malloc((r->n ? r->n : 1) * sizeof *rows);
    int rc = first && k && rows ? 0 : -1;
    for (size_t i = 0; !rc && i < r->n; i++) {
        json_t *f = json_object_get(first, r->rows[i].case_id);
        if (!f)
            json_object_set_new(first, r->rows[i].case_id, json_integer((json_int_t)i));
        k[i].first = f ? (size_t)json_integer_value(f) : i;
        k[i].at = i;
    }
    if (!rc) {
        qsort(k, r->n, sizeof *k, require_key_cmp);
        for (size_t i = 0; i < r->n; i++)
            rows[i] = r->rows[k[i].at];
        memcpy(r->rows, rows, r->n * sizeof *rows);
    }
    json_decref(first);
    free(k);
    free(rows);
    return rc;
}

int pb_require_check(const json_t *summary, const pb_check_options *o, pb_check_report *r,
                     char *err, size_t errlen)
{
    const json_t *cases = json_object_get(summary, "cases");
    if (require_list_unmatched(cases, o->methods, "method", "--methods", err, errlen) ||
        require_list_unmatched(cases, o->problems, "problem", "--problems", err, errlen))
        return 1;
    size_t i;
    const json_t *c;
    json_array_foreach(cases, i, c) {
        const char *id = json_string_value(json_object_get(c, "id"));
        if (!o->n_require || !pb_summary_listed(o->methods, json_string_value(json_object_get(c, "method"))) ||
            !pb_summary_listed(o->problems, json_string_value(json_object_get(c, "problem"))))
            continue;
        for (int q = 0; q < o->n_require; q++)
            if (require_row(r, id ? id : "?", c, &o->require[q]))
                return -1;
    }
    return require_group(r);
}
