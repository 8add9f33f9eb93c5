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

int pb_cli_merge(int argc, char **argv)
{
    static const struct option opts[] = {{"out", required_argument, 0, 'o'},
                                         {"allow-partial", no_argument, 0, 'p'},
                                         {"help", no_argument, 0, 'h'}, {0, 0, 0, 0}};
    const char *out = NULL;
    int partial = 0;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        if (c == 'o')
            out = optarg;
        else if (c == 'p')
            partial = 1;
        else if (c == 'h') {
            merge_help(stdout);
            return PB_EXIT_OK;
        } else
            return pb_cli_error("merge", c == ':' ? "option %s needs a value" : "unknown option '%s'", argv[optind - 1]);
    }
    if (!out || optind >= argc)
        return pb_cli_error("merge", "give --out DIR and at least one shard directory");
    int nshards = argc - optind, rc = PB_EXIT_USAGE;
    json_t **docs = calloc((size_t)nshards, sizeof *docs);
    json_t *all = json_array();
    json_int_t total = -1;
    const char *label = NULL, *ident = NULL;
    for (int i = 0; i < nshards; i++) {
        char path[4200];
        snprintf(path, sizeof path, "%s/summary.json", argv[optind + i]);
        /* the loader check, baseline and report use: errno's words for a
         * missing file, "is a folder", line and column for corrupt JSON,
         * the format, then every finished case complete */
        char why[1024];
        if (pb_summary_load(path, &docs[i], why, sizeof why) ||
            pb_summary_complete(path, docs[i], why, sizeof why)) {
            pb_cli_error("merge", "%s", why);
            goto out;
        }
        json_t *tc = json_object_get(docs[i], "total_cases");
        json_t *cs = json_object_get(docs[i], "cases");
        if (!json_is_integer(tc) || !json_is_array(cs)) {
            pb_cli_error("merge", "%s: not a sweep (no 'total_cases' or 'cases')", path);
            goto out;
        }
        if (total >= 0 && json_integer_value(tc) != total) {
            pb_cli_error("merge", "%s: shard of a different sweep (%lld cases, expected %lld)", path,
                         (long long)json_integer_value(tc), (long long)total);
            goto out;
        }
        /* shards of one sweep carry one identity: its case count and the hash
         * of its ordered case ids */
        const char *id_here = json_string_value(json_object_get(docs[i], "sweep_id"));
        if (!id_here) {
            pb_cli_error("merge", "%s: key 'sweep_id' missing: not written by 'propbench sweep'", path);
            goto out;
        }
        if (ident && strcmp(ident, id_here)) {
            pb_cli_error("merge", "%s: shard of a different sweep (sweep_id %s, expected %s)", path,
                         id_here, ident);
            goto out;
        }
        ident = id_here;
        total = json_integer_value(tc);
        label = json_string_value(json_object_get(docs[i], "sweep"));
        size_t k;
        json_t *o;
        json_array_foreach(cs, k, o) {
            json_t *ix = json_object_get(o, "index");
            if (!json_is_integer(ix) || json_integer_value(ix) < 0 ||
                json_integer_value(ix) >= json_integer_value(tc)) {
                pb_cli_error("merge", "%s: case %zu has no 'index' in 0..%lld", path, k,
                             (long long)json_integer_value(tc) - 1);
                goto out;
            }
            json_object_set_new(o, "_from", json_integer(i));
            json_array_append(all, o);
        }
    }
    size_t n = json_array_size(all);
    json_t **v = malloc((n ? n : 1) * sizeof *v);
    for (size_t k = 0; k < n; k++)
        v[k] = json_array_get(all, k);
    qsort(v, n, sizeof *v, merge_cmp);
    for (size_t k = 1; k < n; k++)
        if (merge_cmp(&v[k - 1], &v[k]) == 0) {
            pb_cli_error("merge", "case index %lld appears in two shards",
                         (long long)json_integer_value(json_object_get(v[k], "index")));
            free(v);
            goto out;
        }
    if ((json_int_t)n < total && !partial) {
        pb_cli_error("merge", "%lld of %lld cases are missing (a shard not given?); "
                     "--allow-partial merges what is there", (long long)(total - (json_int_t)n),
                     (long long)total);
        free(v);
        goto out;
    }
    /* every series must be there before anything is written */
    for (size_t k = 0; k < n; k++) {
        const char *series = json_string_value(json_object_get(v[k], "series"));
        int from = (int)json_integer_value(json_object_get(v[k], "_from"));
        char a[8400];
        snprintf(a, sizeof a, "%s/%s", argv[optind + from], series ? series : "");
        if (series && !pb_series_path_ok(series)) {
            pb_cli_error("merge", "%s/summary.json: case %s: \"series\" is \"%.200s\", not a file below series/",
                         argv[optind + from], json_string_value(json_object_get(v[k], "id")), series);
            free(v);
            goto out;
        }
        if (series && access(a, R_OK)) {
            pb_cli_error("merge", "%s: cannot read: %s", a, strerror(errno));
            free(v);
            goto out;
        }
    }
    char why[4400];
    if (pb_run_dir_prepare(out, why, sizeof why)) {
        pb_cli_error("merge", "%s", why);
        free(v);
        goto out;
    }
    json_t *cases = json_array();
    for (size_t k = 0; k < n; k++) {
        json_t *o = v[k];
        int from = (int)json_integer_value(json_object_get(o, "_from"));
        json_object_del(o, "_from");
        const char *series = json_string_value(json_object_get(o, "series"));
        if (series) {
            char a[8400], b[8400];
            snprintf(a, sizeof a, "%s/%s", argv[optind + from], series);
            snprintf(b, sizeof b, "%s/%s", out, series);
            if (pb_copy_file(a, b)) {
                pb_cli_error("merge", "cannot copy %s to %s", a, b);
                pb_run_dir_unwrite(out, cases);
                json_decref(cases);
                free(v);
                goto out;
            }
        }
        json_array_append(cases, o);
    }
    if ((json_int_t)n < total)
        fprintf(stderr, "propbench merge: warning: %lld of %lld cases are missing\n",
                (long long)(total - (json_int_t)n), (long long)total);
    free(v);
    json_t *doc = pb_summary_new(cases);
    json_object_set_new(doc, "sweep", json_string(label ? label : "grid"));
    json_object_set_new(doc, "sweep_id", json_string(ident));
    json_object_set_new(doc, "total_cases", json_integer(total));
    char path[4200];
    snprintf(path, sizeof path, "%s/summary.json", out);
    int w = pb_json_write_atomic(path, doc);
    if (w)
        pb_run_dir_unwrite(out, json_object_get(doc, "cases"));
    json_decref(doc);
    if (w) {
        pb_cli_error("merge", "cannot write %s", path);
        goto out;
    }
    printf("merged %zu cases from %d shards into %s\n", n, nshards, path);
    rc = PB_EXIT_OK;
out:
    for (int i = 0; i < nshards; i++)
        json_decref(docs[i]);
    free(docs);
    json_decref(all);
    return rc;
}
