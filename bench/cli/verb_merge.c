/* verb_merge.c - `propbench merge --out DIR SHARD_DIR...`: join the shards of
 * a sweep into one run directory equal to the unsharded run (cases in their
 * original order, series files copied). */
#include <getopt.h>
#include <unistd.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/gate/baseline.h"
#include "bench/store/summary_read.h"
#include "bench/store/case_json.h"
#include "bench/store/run_dir.h"
#include "bench/store/run_swap.h"
#include "bench/study/sweep.h"

static void merge_help(FILE *f)
{
    fprintf(f, "usage: propbench merge --out DIR [--allow-partial] SHARD_DIR [SHARD_DIR ...]\n\n"
               "Join run directories written by 'sweep --shard K/N' into DIR.\n"
               "Fails (exit 2) on unreadable shards, shards of different sweeps (their\n"
               "'sweep_id' differs), duplicate cases, series that cannot be copied, and\n"
               "missing cases unless --allow-partial is given.\n");
}

static int merge_cmp(const void *a, const void *b)
{
    json_int_t x = json_integer_value(json_object_get(*(json_t *const *)a, "index"));
    json_int_t y = json_integer_value(json_object_get(*(json_t *const *)b, "index"));
    return (x > y) - (x < y);
}

/* What the command line asked for. */
typedef struct merge_args {
    const char *out;
    int partial;
    char **shards;
    int nshards;
} merge_args;

/* merge_parse's answer when the merge should go ahead. */
enum { MERGE_GO = -1 };

/* MERGE_GO with *a filled in, or the exit status (--help, bad options). */
static int merge_parse(int argc, char **argv, merge_args *a)
{
    static const struct option opts[] = {{"out", required_argument, 0, 'o'},
                                         {"allow-partial", no_argument, 0, 'p'},
                                         {"help", no_argument, 0, 'h'}, {0, 0, 0, 0}};
    memset(a, 0, sizeof *a);
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        if (c == 'o')
            a->out = optarg;
        else if (c == 'p')
            a->partial = 1;
        else if (c == 'h') {
            merge_help(stdout);
            return PB_EXIT_OK;
        } else
            return pb_cli_error("merge", c == ':' ? "option %s needs a value" : "unknown option '%s'", argv[optind - 1]);
    }
    if (!a->out || optind >= argc)
        return pb_cli_error("merge", "give --out DIR and at least one shard directory");
    a->shards = argv + optind;
    a->nshards = argc - optind;
    return MERGE_GO;
}

/* The shards as read, and what they must agree on. docs and all are owned;
 * label and ident point into docs; v (owned) holds all's cases sorted. */
typedef struct merge_set {
    json_t **docs;
    json_t *all;          /* every shard's cases, each tagged with "_from" */
    json_int_t total;     /* the sweep's case count; -1 before the first shard */
    const char *label, *ident;
    json_t **v;
    size_t n;
} merge_set;

/* Read shard i, check it belongs with those before it, and add its cases
 * to set->all; 0, or -1 with the message printed. */
static int merge_load_shard(const merge_args *a, int i, merge_set *set)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/summary.json", a->shards[i]);
    /* the loader check, baseline and report use: errno's words for a
     * missing file, "is a folder", line and column for corrupt JSON,
     * the format, then every finished case complete */
    char why[1024];
    if (pb_summary_load(path, &set->docs[i], why, sizeof why) ||
        pb_summary_complete(path, set->docs[i], why, sizeof why)) {
        pb_cli_error("merge", "%s", why);
        return -1;
    }
    json_t *tc = json_object_get(set->docs[i], "total_cases");
    json_t *cs = json_object_get(set->docs[i], "cases");
    if (!json_is_integer(tc) || !json_is_array(cs)) {
        pb_cli_error("merge", "%s: not a sweep (no 'total_cases' or 'cases')", path);
        return -1;
    }
    if (set->total >= 0 && json_integer_value(tc) != set->total) {
        pb_cli_error("merge", "%s: shard of a different sweep (%lld cases, expected %lld)", path,
                     (long long)json_integer_value(tc), (long long)set->total);
        return -1;
    }
    /* shards of one sweep carry one identity: its case count and the hash
     * of its ordered case ids */
    const char *id_here = json_string_value(json_object_get(set->docs[i], "sweep_id"));
    if (!id_here) {
        pb_cli_error("merge", "%s: key 'sweep_id' missing: not written by 'propbench sweep'", path);
        return -1;
    }
    if (set->ident && strcmp(set->ident, id_here)) {
        pb_cli_error("merge", "%s: shard of a different sweep (sweep_id %s, expected %s)", path,
                     id_here, set->ident);
        return -1;
    }
    set->ident = id_here;
    set->total = json_integer_value(tc);
    set->label = json_string_value(json_object_get(set->docs[i], "sweep"));
    size_t k;
    json_t *o;
    json_array_foreach(cs, k, o) {
        json_t *ix = json_object_get(o, "index");
        if (!json_is_integer(ix) || json_integer_value(ix) < 0 ||
            json_integer_value(ix) >= json_integer_value(tc)) {
            pb_cli_error("merge", "%s: case %zu has no 'index' in 0..%lld", path, k,
                         (long long)json_integer_value(tc) - 1);
            return -1;
        }
        json_object_set_new(o, "_from", json_integer(i));
        json_array_append(set->all, o);
    }
    return 0;
}

/* Put the cases in sweep order and refuse duplicates and, unless partial
 * merges are allowed, gaps; 0, or -1 with the message printed. */
static int merge_order(const merge_args *a, merge_set *set)
{
    size_t n = json_array_size(set->all);
    set->n = n;
    set->v = malloc((n ? n : 1) * sizeof *set->v);
    for (size_t k = 0; k < n; k++)
        set->v[k] = json_array_get(set->all, k);
    qsort(set->v, n, sizeof *set->v, merge_cmp);
    for (size_t k = 1; k < n; k++)
        if (merge_cmp(&set->v[k - 1], &set->v[k]) == 0) {
            pb_cli_error("merge", "case index %lld appears in two shards",
                         (long long)json_integer_value(json_object_get(set->v[k], "index")));
            return -1;
        }
    if ((json_int_t)n < set->total && !a->partial) {
        pb_cli_error("merge", "%lld of %lld cases are missing (a shard not given?); "
                     "--allow-partial merges what is there", (long long)(set->total - (json_int_t)n),
                     (long long)set->total);
        return -1;
    }
    return 0;
}

/* Every series must be there before anything is written; 0, or -1 with
 * the message printed. */
static int merge_check_series(const merge_args *a, const merge_set *set)
{
    for (size_t k = 0; k < set->n; k++) {
        const char *series = json_string_value(json_object_get(set->v[k], "series"));
        int from = (int)json_integer_value(json_object_get(set->v[k], "_from"));
        char p[8400];
        snprintf(p, sizeof p, "%s/%s", a->shards[from], series ? series : "");
        if (series && !pb_series_path_ok(series)) {
            pb_cli_error("merge", "%s/summary.json: case %s: \"series\" is \"%.200s\", not a file below series/",
                         a->shards[from], json_string_value(json_object_get(set->v[k], "id")), series);
            return -1;
        }
        if (series && access(p, R_OK)) {
            pb_cli_error("merge", "%s: cannot read: %s", p, strerror(errno));
            return -1;
        }
    }
    return 0;
}

/* Copy each case's series into the staging folder `to` and gather the
 * cases, untagged; the cases, or NULL (message printed). */
static json_t *merge_copy_series(const merge_args *a, const merge_set *set, const char *to)
{
    json_t *cases = json_array();
    for (size_t k = 0; k < set->n; k++) {
        json_t *o = set->v[k];
        int from = (int)json_integer_value(json_object_get(o, "_from"));
        json_object_del(o, "_from");
        const char *series = json_string_value(json_object_get(o, "series"));
        if (series) {
            char src[8400], dst[8400];
            snprintf(src, sizeof src, "%s/%s", a->shards[from], series);
            snprintf(dst, sizeof dst, "%s/%s", to, series);
            errno = 0;
            if (pb_copy_file(src, dst)) {
                pb_cli_error("merge", "cannot copy %s into %s: %s", src, a->out,
                             errno ? strerror(errno) : "out of memory");
                json_decref(cases);
                return NULL;
            }
        }
        json_array_append(cases, o);
    }
    return cases;
}

/* Fill a->out: its series, then its summary, staged beside it and swapped
 * in (a->out may be one of the shards: it is read whole before the swap);
 * 0, or -1 with the message printed and a->out as it was. */
static int merge_write(const merge_args *a, const merge_set *set)
{
    char why[4400];
    pb_run_out out;
    if (pb_run_out_open(&out, a->out, why, sizeof why) || pb_run_out_stage(&out, why, sizeof why)) {
        pb_run_out_close(&out);
        pb_cli_error("merge", "%s", why);
        return -1;
    }
    json_t *cases = merge_copy_series(a, set, out.stage);
    if (!cases) {
        pb_run_out_close(&out);
        return -1;
    }
    if ((json_int_t)set->n < set->total)
        fprintf(stderr, "propbench merge: warning: %lld of %lld cases are missing\n",
                (long long)(set->total - (json_int_t)set->n), (long long)set->total);
    json_t *doc = pb_summary_new(cases);
    json_object_set_new(doc, "sweep", json_string(set->label ? set->label : "grid"));
    json_object_set_new(doc, "sweep_id", json_string(set->ident));
    json_object_set_new(doc, "total_cases", json_integer(set->total));
    char path[4400];
    snprintf(path, sizeof path, "%s/summary.json", out.stage);
    errno = 0;
    int w = pb_json_write_atomic(path, doc);
    json_decref(doc);
    if (w)
        snprintf(why, sizeof why, "cannot write %s/summary.json: %s", a->out,
                 errno ? strerror(errno) : "out of memory");
    if (w || pb_run_out_commit(&out, why, sizeof why)) {
        pb_run_out_close(&out);
        pb_cli_error("merge", "%s; %s was left as it was", why, a->out);
        return -1;
    }
    pb_run_out_close(&out);
    snprintf(path, sizeof path, "%s/summary.json", a->out);
    printf("merged %zu cases from %d shards into %s\n", set->n, a->nshards, path);
    return 0;
}

int pb_cli_merge(int argc, char **argv)
{
    merge_args a;
    int rc = merge_parse(argc, argv, &a);
    if (rc != MERGE_GO)
        return rc;
    rc = PB_EXIT_USAGE;
    merge_set set = {calloc((size_t)a.nshards, sizeof(json_t *)), json_array(), -1, NULL, NULL, NULL, 0};
    for (int i = 0; i < a.nshards; i++)
        if (merge_load_shard(&a, i, &set))
            goto out;
    if (merge_order(&a, &set) || merge_check_series(&a, &set) || merge_write(&a, &set))
        goto out;
    rc = PB_EXIT_OK;
out:
    for (int i = 0; i < a.nshards; i++)
        json_decref(set.docs[i]);
    free(set.docs);
    free(set.v);
    json_decref(set.all);
    return rc;
}
