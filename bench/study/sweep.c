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
#include <dirent.h>
#include "bench/study/sweep.h"
#include "bench/store/case_json.h"
#include "bench/measure/fingerprint.h"
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/study/progress.h"

static volatile sig_atomic_t sweep_stop;

static void sweep_on_signal(int sig)
{
    sweep_stop = sig;
}

static void sweep_on_child(int sig)
{
    (void)sig;
}

int pb_sweep_stop_signal(void)
{
    return (int)sweep_stop;
}

/* Test hook: PB_TEST_CRASH_CASE=<case id> makes that case's worker abort,
 * so the tests can show a crash is recorded and the sweep completes. */
static void sweep_maybe_crash(const char *id)
{
    const char *c = getenv("PB_TEST_CRASH_CASE");
    if (c && !strcmp(c, id))
        abort();
}

/* The worker starts with SIGINT and SIGTERM blocked (see pb_sweep_run) and
 * takes the default actions before unblocking them, so a stop the parent
 * sends in the first instant of the worker's life still ends it. */
static void sweep_child(const pb_case_spec *spec, int index, const char *work, const sigset_t *unblocked)
{
    signal(SIGINT, SIG_DFL);
    signal(SIGTERM, SIG_DFL);
    signal(SIGCHLD, SIG_DFL);
    sigprocmask(SIG_SETMASK, unblocked, NULL);
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
    uint64_t h = PB_FNV1A64_INIT;
    for (int i = 0; i < list->n; i++) {
        const pb_case_spec *c = &list->cases[i];
        char id[PB_CASE_ID_MAX];
        pb_case_id(c, id, sizeof id);
        h = pb_fnv1a64(h, id, strlen(id) + 1);
        /* what the id does not show: the problem's own numbers and the
         * settings that change results, so edited inputs do not merge */
        const pb_problem *p = &c->problem;
        double nums[] = {p->mu, p->body_radius, p->j2, p->t0, p->r0[0], p->r0[1], p->r0[2],
                         p->v0[0], p->v0[1], p->v0[2], c->eval_cost_us};
        int ints[] = {p->force, p->units, c->repeats, c->linear_samples, c->compensated};
        h = pb_fnv1a64(h, nums, sizeof nums);
        h = pb_fnv1a64(h, ints, sizeof ints);
        h = pb_fnv1a64(h, &c->max_steps, sizeof c->max_steps);
    }
    snprintf(out, outlen, "%d:%016llx", list->n, (unsigned long long)h);
}

/* A worker's case object, if it finished and is the case asked for. */
static json_t *sweep_collect(const char *work, int i, const pb_case_spec *spec, int exited_ok,
                             const char *dir)
{
    char path[4300], id[PB_CASE_ID_MAX];
    snprintf(path, sizeof path, "%s/%06d.json", work, i);
    json_t *o = exited_ok == 1 ? json_load_file(path, 0, NULL) : NULL;
    unlink(path);
    pb_case_id(spec, id, sizeof id);
    const char *got = o ? json_string_value(json_object_get(o, "id")) : NULL;
    if (!got || strcmp(got, id)) {
        json_decref(o);
        char why[160];
        if (exited_ok < 0)
            snprintf(why, sizeof why, "the worker process was killed by signal %d (%s)", -exited_ok,
                     strsignal(-exited_ok));
        else if (exited_ok > 100)
            snprintf(why, sizeof why, "the worker could not write its results (exit status %d)",
                     exited_ok - 100);
        else if (exited_ok == 1)
            snprintf(why, sizeof why, "the worker's results were missing or for another case");
        else
            snprintf(why, sizeof why, "the worker process was lost");
        o = pb_case_crashed_json(spec, why);
        json_object_set_new(o, "index", json_integer(i));
        return o;
    }
    const char *series = json_string_value(json_object_get(o, "series"));
    if (series) {
        char from[8400], to[8400];
        snprintf(from, sizeof from, "%s/%s", work, series);
        snprintf(to, sizeof to, "%s/%s", dir, series);
        if (rename(from, to)) {
            fprintf(stderr, "propbench sweep: warning: cannot move %s to %s: %s; the case has no series\n",
                    from, to, strerror(errno));
            json_object_del(o, "series");
        }
    }
    return o;
}

/* Empty and remove one directory level (the work directory is private to
 * this sweep, so everything in it is ours, half-written files included). */
static void sweep_rmdir_flat(const char *path)
{
    DIR *d = opendir(path);
    if (d) {
        struct dirent *e;
        char f[8400];
        while ((e = readdir(d)))
            if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) {
                snprintf(f, sizeof f, "%s/%s", path, e->d_name);
                unlink(f);
            }
        closedir(d);
    }
    rmdir(path);
}

static void sweep_clean(const char *work)
{
    char path[4300];
    snprintf(path, sizeof path, "%s/series", work);
    sweep_rmdir_flat(path);
    sweep_rmdir_flat(work);
}

int pb_sweep_run(const pb_case_list *list, const char *dir, const pb_sweep_options *opt)
{
    /* The handlers go in before the work directory exists: whoever sees it
     * may interrupt at once, and must get the orderly 128+signal exit. */
    sweep_stop = 0;
    struct sigaction sa, old_int, old_term;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = sweep_on_signal;
    sigemptyset(&sa.sa_mask);
    struct sigaction old_chld, on_chld;
    memset(&on_chld, 0, sizeof on_chld);
    on_chld.sa_handler = sweep_on_child; /* only to wake sigsuspend */
    sigemptyset(&on_chld.sa_mask);
    sigaction(SIGINT, &sa, &old_int);
    sigaction(SIGTERM, &sa, &old_term);
    sigaction(SIGCHLD, &on_chld, &old_chld);
    sigset_t stops, unblocked, waiting;
    sigemptyset(&stops);
    sigaddset(&stops, SIGINT);
    sigaddset(&stops, SIGTERM);
    sigaddset(&stops, SIGCHLD);
    sigprocmask(SIG_SETMASK, NULL, &unblocked);
    waiting = unblocked;
    sigdelset(&waiting, SIGINT);
    sigdelset(&waiting, SIGTERM);
    sigdelset(&waiting, SIGCHLD);
    json_t *previous = pb_run_dir_previous(dir); /* before this sweep writes anything */
    char work[4200];
    snprintf(work, sizeof work, "%s/.work.%ld", dir, (long)getpid());
    int *mine = NULL, *exited_ok = NULL, *slot_case = NULL;
    pid_t *pids = NULL;
    int rc = -1;
    char why[4400];
    if (pb_run_dir_prepare(dir, why, sizeof why)) {
        fprintf(stderr, "propbench sweep: error: %s\n", why);
        goto restore;
    }
    if (pb_mkdirs(work)) {
        fprintf(stderr, "propbench sweep: error: cannot create the folder %s: %s\n", work, strerror(errno));
        goto restore;
    }
    size_t cap = (size_t)(list->n > 0 ? list->n : 1);
    mine = malloc(cap * sizeof(int));
    exited_ok = calloc(cap, sizeof(int));
    pids = calloc((size_t)(opt->jobs > 0 ? opt->jobs : 1), sizeof(pid_t));
    slot_case = calloc((size_t)(opt->jobs > 0 ? opt->jobs : 1), sizeof(int));
    if (!mine || !exited_ok || !pids || !slot_case) {
        sweep_clean(work);
        goto restore;
    }
    int nmine = 0;
    for (int i = 0; i < list->n; i++)
        if (opt->shard_n <= 1 || i % opt->shard_n == opt->shard_k - 1)
            mine[nmine++] = i;
    fflush(NULL);
    pb_progress prog;
    pb_progress_start(&prog, opt->progress, nmine, "cases");
    int next = 0, running = 0, done = 0;
    /* Stops stay blocked in the loop and are taken only inside sigsuspend,
     * with SIGCHLD: a stop that comes between the check and the wait would
     * otherwise sit unseen until some worker ended. */
    sigprocmask(SIG_BLOCK, &stops, NULL);
    while (done < nmine && !sweep_stop) {
        while (running < opt->jobs && next < nmine && !sweep_stop) {
            pid_t pid = fork();
            if (pid == 0)
                sweep_child(&list->cases[mine[next]], mine[next], work, &unblocked);
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
        pid_t w = waitpid(-1, &st, WNOHANG);
        if (w == 0) {
            if (!sweep_stop)
                sigsuspend(&waiting);
            continue;
        }
        if (w < 0) {
            if (errno == EINTR)
                continue;
            break;
        }
        for (int j = 0; j < opt->jobs; j++)
            if (pids[j] == w) {
                pids[j] = 0;
                /* 1: finished; 0: unknown; -N: killed by signal N; 100+K: exit status K */
                exited_ok[slot_case[j]] = WIFEXITED(st) ? (WEXITSTATUS(st) == 0 ? 1 : 100 + WEXITSTATUS(st))
                                        : WIFSIGNALED(st) ? -WTERMSIG(st) : 0;
            }
        running--;
        done++;
        pb_progress_update(&prog, done, NULL);
    }
    sigprocmask(SIG_SETMASK, &unblocked, NULL);
    pb_progress_end(&prog);
    if (sweep_stop) {
        /* interrupted: stop the workers, leave the run directory as it was */
        for (int j = 0; j < opt->jobs; j++)
            if (pids[j] > 0)
                kill(pids[j], SIGTERM);
        while (wait(NULL) > 0 || errno == EINTR)
            ;
        sweep_clean(work);
        pb_run_dir_unprepare(dir);
        fprintf(stderr, "propbench sweep: interrupted; %s was left as it was\n", dir);
        rc = -2;
        goto restore;
    }

    json_t *cases = json_array();
    for (int k = 0; k < nmine; k++)
        json_array_append_new(cases, sweep_collect(work, mine[k], &list->cases[mine[k]],
                                                   exited_ok[mine[k]], dir));
    sweep_clean(work);
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
    if (rc)
        pb_run_dir_unwrite(dir, cases);
    if (rc == 0 && previous) {
        int pruned = pb_run_dir_prune(dir, previous, doc);
        if (pruned && !opt->quiet)
            fprintf(stderr, "propbench sweep: removed %d files an earlier run left in %s\n", pruned, dir);
    }
    json_decref(doc);
    if (rc)
        fprintf(stderr, "propbench sweep: error: cannot write %s\n", path);
restore:
    sigaction(SIGINT, &old_int, NULL);
    sigaction(SIGTERM, &old_term, NULL);
    sigaction(SIGCHLD, &old_chld, NULL);
    json_decref(previous);
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
