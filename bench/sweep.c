/* sweep.c - the worker pool of a sweep (see sweep.h).
 * Invariant: the parent never runs a case itself; it forks one child per
 * case (at most `jobs` at a time), each child writes its case object to
 * dir/.cases/<index>.json by rename, and the parent assembles the summary in
 * index order afterwards. A child that dies leaves no file: crashed. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>
#include <dirent.h>
#include "sweep.h"
#include "case_json.h"
#include "harness.h"
#include "run_dir.h"
#include "progress.h"

/* Test hook: PB_TEST_CRASH_CASE=<case id> makes that case's worker abort,
 * so the tests can show a crash is recorded and the sweep completes. */
static void sweep_maybe_crash(const char *id)
{
    const char *c = getenv("PB_TEST_CRASH_CASE");
    if (c && !strcmp(c, id))
        abort();
}

static void sweep_child(const pb_case_spec *spec, int index, const char *dir)
{
    char id[PB_CASE_ID_MAX], path[4300];
    pb_case_id(spec, id, sizeof id);
    sweep_maybe_crash(id);
    pb_case_result res;
    json_t *o;
    int s = pb_case_run(spec, &res);
    if (s) {
        o = pb_case_crashed_json(spec, pb_strerror(s));
    } else {
        o = pb_case_to_json(spec, &res);
        if (pb_series_write(dir, spec, &res))
            _exit(3);
        pb_case_result_free(&res);
    }
    json_object_set_new(o, "index", json_integer(index));
    snprintf(path, sizeof path, "%s/.cases/%06d.json", dir, index);
    int rc = pb_json_write_atomic(path, o);
    json_decref(o);
    _exit(rc ? 3 : 0);
}

int pb_sweep_run(const pb_case_list *list, const char *dir, const pb_sweep_options *opt)
{
    char work[4200];
    snprintf(work, sizeof work, "%s/.cases", dir);
    if (pb_mkdirs(work) || pb_mkdirs(dir)) {
        fprintf(stderr, "propbench sweep: error: cannot create %s: %s\n", work, strerror(errno));
        return -1;
    }
    int *mine = malloc((size_t)(list->n > 0 ? list->n : 1) * sizeof(int));
    pid_t *pids = calloc((size_t)(opt->jobs > 0 ? opt->jobs : 1), sizeof(pid_t));
    if (!mine || !pids) {
        free(mine);
        free(pids);
        return -1;
    }
    int nmine = 0;
    for (int i = 0; i < list->n; i++)
        if (opt->shard_n <= 1 || i % opt->shard_n == opt->shard_k - 1)
            mine[nmine++] = i;
    fflush(NULL);
    pb_progress prog;
    pb_progress_start(&prog, opt->progress, nmine, "cases");
    int next = 0, running = 0, done = 0;
    while (done < nmine) {
        while (running < opt->jobs && next < nmine) {
            pid_t pid = fork();
            if (pid == 0)
                sweep_child(&list->cases[mine[next]], mine[next], dir);
            if (pid < 0) {
                /* no process to be had: run nothing more, record the rest as crashed */
                next = nmine;
                break;
            }
            for (int j = 0; j < opt->jobs; j++)
                if (!pids[j]) {
                    pids[j] = pid;
                    break;
                }
            running++;
            next++;
        }
        if (running == 0)
            break;
        int st;
        pid_t w = wait(&st);
        if (w < 0) {
            if (errno == EINTR)
                continue;
            break;
        }
        for (int j = 0; j < opt->jobs; j++)
            if (pids[j] == w)
                pids[j] = 0;
        running--;
        done++;
        pb_progress_update(&prog, done, NULL);
    }

    pb_progress_end(&prog);
    json_t *cases = json_array();
    for (int k = 0; k < nmine; k++) {
        int i = mine[k];
        char path[4300];
        snprintf(path, sizeof path, "%s/%06d.json", work, i);
        json_error_t e;
        json_t *o = json_load_file(path, 0, &e);
        if (!o) {
            o = pb_case_crashed_json(&list->cases[i], "the worker process died before it finished");
            json_object_set_new(o, "index", json_integer(i));
        }
        json_array_append_new(cases, o);
        unlink(path);
    }
    rmdir(work);
    json_t *doc = pb_summary_new(cases);
    json_object_set_new(doc, "sweep", json_string(opt->label ? opt->label : "grid"));
    json_object_set_new(doc, "total_cases", json_integer(list->n));
    if (opt->shard_n > 1) {
        char sh[32];
        snprintf(sh, sizeof sh, "%d/%d", opt->shard_k, opt->shard_n);
        json_object_set_new(doc, "shard", json_string(sh));
    }
    char path[4300];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    int rc = pb_json_write_atomic(path, doc);
    json_decref(doc);
    free(mine);
    free(pids);
    if (rc)
        fprintf(stderr, "propbench sweep: error: cannot write %s\n", path);
    return rc ? -1 : 0;
}

int pb_copy_file(const char *from, const char *to)
{
    FILE *f = fopen(from, "rb");
    if (!f)
        return -1;
    size_t cap = 1 << 16, n = 0;
    char *buf = malloc(cap);
    int rc = -1;
    while (buf) {
        size_t k = fread(buf + n, 1, cap - n, f);
        n += k;
        if (n < cap)
            break;
        char *nb = realloc(buf, cap *= 2);
        if (!nb)
            goto out;
        buf = nb;
    }
    if (buf && !ferror(f))
        rc = pb_write_atomic(to, buf, n);
out:
    free(buf);
    fclose(f);
    return rc;
}
