/* sweep.c - the worker pool of a sweep (see sweep.h).
 * Invariant: the parent never runs a case itself; it forks one child per
 * case (at most `jobs` at a time) and each child writes its case object and
 * series into a work directory private to this sweep (dir/.work.<pid>). A
 * case counts only if its worker exited 0 and its object names the case that
 * was asked for; anything else is "crashed". The series move into dir and
 * the summary is written only when every worker is done, so an interrupted
 * sweep leaves the run directory as it was. */
#include <errno.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>
#include "sweep.h"
#include "case_json.h"
#include "harness.h"
#include "run_dir.h"
#include "progress.h"

static volatile sig_atomic_t sweep_stop;

static void sweep_on_signal(int sig)
{
    sweep_stop = sig;
}

/* Test hook: PB_TEST_CRASH_CASE=<case id> makes that case's worker abort,
 * so the tests can show a crash is recorded and the sweep completes. */
static void sweep_maybe_crash(const char *id)
{
    const char *c = getenv("PB_TEST_CRASH_CASE");
    if (c && !strcmp(c, id))
        abort();
}

static void sweep_child(const pb_case_spec *spec, int index, const char *work)
{
    signal(SIGINT, SIG_DFL);
    signal(SIGTERM, SIG_DFL);
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
        if (pb_series_write(work, spec, &res))
            _exit(3);
        pb_case_result_free(&res);
    }
    json_object_set_new(o, "index", json_integer(index));
    snprintf(path, sizeof path, "%s/%06d.json", work, index);
    int rc = pb_json_write_atomic(path, o);
    json_decref(o);
    _exit(rc ? 3 : 0);
}

void pb_sweep_identity(const pb_case_list *list, char *out, size_t outlen)
{
    uint64_t h = UINT64_C(0xcbf29ce484222325);
    for (int i = 0; i < list->n; i++) {
        char id[PB_CASE_ID_MAX];
        pb_case_id(&list->cases[i], id, sizeof id);
        for (const char *c = id; *c; c++) {
            h ^= (unsigned char)*c;
            h *= UINT64_C(0x100000001b3);
        }
        h ^= '\n';
        h *= UINT64_C(0x100000001b3);
    }
    snprintf(out, outlen, "%d:%016llx", list->n, (unsigned long long)h);
}

/* A worker's case object, if it finished and is the case asked for. */
static json_t *sweep_collect(const char *work, int i, const pb_case_spec *spec, int exited_ok,
                             const char *dir)
{
    char path[4300], id[PB_CASE_ID_MAX];
    snprintf(path, sizeof path, "%s/%06d.json", work, i);
    json_t *o = exited_ok ? json_load_file(path, 0, NULL) : NULL;
    unlink(path);
    pb_case_id(spec, id, sizeof id);
    const char *got = o ? json_string_value(json_object_get(o, "id")) : NULL;
    if (!got || strcmp(got, id)) {
        json_decref(o);
        o = pb_case_crashed_json(spec, "the worker process died before it finished");
        json_object_set_new(o, "index", json_integer(i));
        return o;
    }
    const char *series = json_string_value(json_object_get(o, "series"));
    if (series) {
        char from[8400], to[8400];
        snprintf(from, sizeof from, "%s/%s", work, series);
        snprintf(to, sizeof to, "%s/%s", dir, series);
        if (rename(from, to))
            json_object_del(o, "series");
    }
    return o;
}

/* Remove the work directory and what is left in it (only our own files). */
static void sweep_clean(const char *work, const pb_case_list *list, const int *mine, int nmine)
{
    char path[8400];
    for (int k = 0; k < nmine; k++) {
        char id[PB_CASE_ID_MAX];
        pb_case_id(&list->cases[mine[k]], id, sizeof id);
        snprintf(path, sizeof path, "%s/%06d.json", work, mine[k]);
        unlink(path);
        snprintf(path, sizeof path, "%s/series/%s.csv", work, id);
        unlink(path);
    }
    snprintf(path, sizeof path, "%s/series", work);
    rmdir(path);
    rmdir(work);
}

int pb_sweep_run(const pb_case_list *list, const char *dir, const pb_sweep_options *opt)
{
    int ours = pb_run_dir_is_ours(dir); /* before this sweep writes anything */
    char work[4200], sdir[4200];
    snprintf(work, sizeof work, "%s/.work.%ld", dir, (long)getpid());
    snprintf(sdir, sizeof sdir, "%s/series", dir);
    if (pb_mkdirs(dir) || pb_mkdirs(sdir) || pb_mkdirs(work)) {
        fprintf(stderr, "propbench sweep: error: cannot create %s: %s\n", work, strerror(errno));
        return -1;
    }
    size_t cap = (size_t)(list->n > 0 ? list->n : 1);
    int *mine = malloc(cap * sizeof(int));
    int *exited_ok = calloc(cap, sizeof(int));
    pid_t *pids = calloc((size_t)(opt->jobs > 0 ? opt->jobs : 1), sizeof(pid_t));
    int *slot_case = calloc((size_t)(opt->jobs > 0 ? opt->jobs : 1), sizeof(int));
    int rc = -1;
    if (!mine || !exited_ok || !pids || !slot_case)
        goto out;
    int nmine = 0;
    for (int i = 0; i < list->n; i++)
        if (opt->shard_n <= 1 || i % opt->shard_n == opt->shard_k - 1)
            mine[nmine++] = i;
    sweep_stop = 0;
    struct sigaction sa, old_int, old_term;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = sweep_on_signal;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, &old_int);
    sigaction(SIGTERM, &sa, &old_term);
    fflush(NULL);
    pb_progress prog;
    pb_progress_start(&prog, opt->progress, nmine, "cases");
    int next = 0, running = 0, done = 0;
    while (done < nmine && !sweep_stop) {
        while (running < opt->jobs && next < nmine && !sweep_stop) {
            pid_t pid = fork();
            if (pid == 0)
                sweep_child(&list->cases[mine[next]], mine[next], work);
            if (pid < 0) {
                /* no process to be had: run nothing more, record the rest as crashed */
                next = nmine;
                break;
            }
            for (int j = 0; j < opt->jobs; j++)
                if (!pids[j]) {
                    pids[j] = pid;
                    slot_case[j] = mine[next];
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
            if (pids[j] == w) {
                pids[j] = 0;
                exited_ok[slot_case[j]] = WIFEXITED(st) && WEXITSTATUS(st) == 0;
            }
        running--;
        done++;
        pb_progress_update(&prog, done, NULL);
    }
    pb_progress_end(&prog);
    if (sweep_stop) {
        /* interrupted: stop the workers, leave the run directory as it was */
        for (int j = 0; j < opt->jobs; j++)
            if (pids[j] > 0)
                kill(pids[j], SIGTERM);
        while (wait(NULL) > 0 || errno == EINTR)
            ;
        sweep_clean(work, list, mine, nmine);
        fprintf(stderr, "propbench sweep: interrupted; %s was left as it was\n", dir);
        rc = -2;
        goto restore;
    }

    json_t *cases = json_array();
    for (int k = 0; k < nmine; k++)
        json_array_append_new(cases, sweep_collect(work, mine[k], &list->cases[mine[k]],
                                                   exited_ok[mine[k]], dir));
    sweep_clean(work, list, mine, nmine);
    json_t *doc = pb_summary_new(cases);
    char ident[64];
    pb_sweep_identity(list, ident, sizeof ident);
    json_object_set_new(doc, "sweep", json_string(opt->label ? opt->label : "grid"));
    json_object_set_new(doc, "sweep_id", json_string(ident));
    json_object_set_new(doc, "total_cases", json_integer(list->n));
    if (opt->shard_n > 1) {
        char sh[32];
        snprintf(sh, sizeof sh, "%d/%d", opt->shard_k, opt->shard_n);
        json_object_set_new(doc, "shard", json_string(sh));
    }
    char path[4300];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    rc = pb_json_write_atomic(path, doc) ? -1 : 0;
    if (rc == 0 && ours) {
        int pruned = pb_run_dir_prune(dir, doc);
        if (pruned && !opt->quiet)
            fprintf(stderr, "propbench sweep: removed %d files an earlier run left in %s\n", pruned, dir);
    }
    json_decref(doc);
    if (rc)
        fprintf(stderr, "propbench sweep: error: cannot write %s\n", path);
restore:
    sigaction(SIGINT, &old_int, NULL);
    sigaction(SIGTERM, &old_term, NULL);
out:
    free(mine);
    free(exited_ok);
    free(pids);
    free(slot_case);
    return rc;
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
