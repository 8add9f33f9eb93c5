/* sweep.c - the worker pool of a sweep (see sweep.h).
 * Invariant: the parent never runs a case itself; it forks one child per
 * case (at most `jobs` at a time) and each child writes its case object and
 * series into a work directory private to this sweep (.work.<pid> in the
 * staging folder of run_swap.h). A case counts only if its worker exited 0
 * and its object names the case that was asked for; anything else is
 * "crashed", except a worker that could not write (a full disk), which fails
 * the sweep. The series move into the staging folder and the summary is
 * written there when every worker is done, and the whole run is swapped in,
 * so an interrupted or killed sweep leaves the run directory as it was.
 * Workers die with the sweep (PR_SET_PDEATHSIG). */
#include <errno.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>
#include <dirent.h>
#include "bench/study/sweep.h"
#include "bench/store/case_json.h"
#include "bench/measure/fingerprint.h"
#include "bench/measure/harness.h"
#include "bench/store/run_dir.h"
#include "bench/store/run_swap.h"
#include "bench/study/progress.h"
#include "integrators/method.h"

static volatile sig_atomic_t sweep_stop;

/* The signals that stop a sweep in order: ^C, kill, a closed terminal, ^\. */
static const int sweep_stop_sigs[] = {SIGINT, SIGTERM, SIGHUP, SIGQUIT};
enum { SWEEP_NSTOPS = sizeof sweep_stop_sigs / sizeof *sweep_stop_sigs };

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

/* A worker that cannot write its results exits SWEEP_EXIT_WRITE + errno
 * (or plain SWEEP_EXIT_WRITE when errno says nothing), so the sweep can
 * give the system's reason. */
enum { SWEEP_EXIT_WRITE = 64, SWEEP_ERRNO_MAX = 190 };

static void sweep_child_write_failed(void)
{
    int e = errno;
    _exit(e > 0 && e <= SWEEP_ERRNO_MAX ? SWEEP_EXIT_WRITE + e : SWEEP_EXIT_WRITE);
}

/* The worker starts with the stop signals blocked (see sweep_spawn) and
 * takes the default actions before unblocking them, so a stop the parent
 * sends in the first instant of the worker's life still ends it. It is
 * killed when the sweep dies, however the sweep dies (kill -9 included),
 * and ends at once if the sweep was gone before that was set. */
static void sweep_child(const pb_case_spec *spec, int index, const char *work, const sigset_t *unblocked,
                        pid_t parent)
{
    if (prctl(PR_SET_PDEATHSIG, SIGKILL) || getppid() != parent)
        _exit(1);
    for (int k = 0; k < SWEEP_NSTOPS; k++)
        signal(sweep_stop_sigs[k], SIG_DFL);
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
            sweep_child_write_failed();
        pb_case_result_free(&res);
    }
    json_object_set_new(o, "index", json_integer(index));
    snprintf(path, sizeof path, "%s/%06d.json", work, index);
    if (pb_json_write_atomic(path, o))
        sweep_child_write_failed();
    json_decref(o);
    _exit(0);
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
        double nums[] = {p->mu, p->body_radius, p->t0, p->r0[0], p->r0[1], p->r0[2],
                         p->v0[0], p->v0[1], p->v0[2], c->eval_cost_us};
        int ints[] = {p->force, p->units, c->repeats, c->linear_samples, c->compensated};
        h = pb_fnv1a64(h, nums, sizeof nums);
        h = pb_fnv1a64(h, ints, sizeof ints);
        h = pb_forces_hash(h, &p->forces);
        h = pb_fnv1a64(h, &c->max_steps, sizeof c->max_steps);
        /* a plug-in method: its file's bytes, so a rebuilt plug-in does not merge */
        const pb_method_origin *pl = pb_method_origin_of(c->method);
        if (pl)
            h = pb_fnv1a64(h, pl->sha256, sizeof pl->sha256);
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
        if (rename(from, to)) { /* within the staging folder: only a bug gets here */
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

/* What the steps of one pb_sweep_run share: the dispositions and mask to
 * put back, the work directory, and which worker runs which case. */
typedef struct sweep_state {
    const pb_case_list *list;
    pb_run_out *out;     /* the run folder, locked; the run is written to out->stage */
    const char *dir;     /* out->stage */
    const pb_sweep_options *opt;
    struct sigaction old_stop[SWEEP_NSTOPS], old_chld;
    sigset_t stops;      /* blocked in the loop, taken only in sigsuspend */
    sigset_t unblocked;  /* the caller's mask, restored after the loop and in workers */
    sigset_t waiting;    /* the caller's mask with the stops let through */
    char work[4200];
    int *mine, nmine;    /* this shard's case indices */
    /* by case index: 1 finished; 0 unknown; -N killed by signal N; 100+K exit status K */
    int *exited_ok;
    pid_t *pids;         /* by worker slot; 0 when the slot is free */
    int *slot_case;      /* by worker slot: the case index it runs */
    int next, running, done;
    pid_t parent;        /* this process, for the workers' check */
} sweep_state;

/* The handlers go in before the work directory exists: whoever sees it may
 * interrupt at once, and must get the orderly 128+signal exit. */
static void sweep_signals_install(sweep_state *s)
{
    sweep_stop = 0;
    struct sigaction sa, on_chld;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = sweep_on_signal;
    sigemptyset(&sa.sa_mask);
    memset(&on_chld, 0, sizeof on_chld);
    on_chld.sa_handler = sweep_on_child; /* only to wake sigsuspend */
    sigemptyset(&on_chld.sa_mask);
    sigaction(SIGCHLD, &on_chld, &s->old_chld);
    sigemptyset(&s->stops);
    sigaddset(&s->stops, SIGCHLD);
    sigprocmask(SIG_SETMASK, NULL, &s->unblocked);
    s->waiting = s->unblocked;
    sigdelset(&s->waiting, SIGCHLD);
    for (int k = 0; k < SWEEP_NSTOPS; k++) {
        sigaction(sweep_stop_sigs[k], &sa, &s->old_stop[k]);
        sigaddset(&s->stops, sweep_stop_sigs[k]);
        sigdelset(&s->waiting, sweep_stop_sigs[k]);
    }
}

static void sweep_signals_restore(const sweep_state *s)
{
    for (int k = 0; k < SWEEP_NSTOPS; k++)
        sigaction(sweep_stop_sigs[k], &s->old_stop[k], NULL);
    sigaction(SIGCHLD, &s->old_chld, NULL);
}

/* The run directory prepared, the work directory made, the tables
 * allocated and this shard's cases chosen; -1 (message printed) if not. */
static int sweep_prepare(sweep_state *s)
{
    const pb_sweep_options *opt = s->opt;
    char why[4400];
    if (pb_run_out_stage(s->out, why, sizeof why)) {
        fprintf(stderr, "propbench sweep: error: %s\n", why);
        return -1;
    }
    if (pb_mkdirs(s->work)) {
        fprintf(stderr, "propbench sweep: error: cannot create the folder %s: %s\n", s->work,
                strerror(errno));
        pb_run_out_discard(s->out);
        return -1;
    }
    size_t cap = (size_t)(s->list->n > 0 ? s->list->n : 1);
    size_t slots = (size_t)(opt->jobs > 0 ? opt->jobs : 1);
    s->mine = malloc(cap * sizeof(int));
    s->exited_ok = calloc(cap, sizeof(int));
    s->pids = calloc(slots, sizeof(pid_t));
    s->slot_case = calloc(slots, sizeof(int));
    if (!s->mine || !s->exited_ok || !s->pids || !s->slot_case) {
        pb_run_out_discard(s->out);
        return -1;
    }
    s->nmine = 0;
    for (int i = 0; i < s->list->n; i++)
        if (opt->shard_n <= 1 || i % opt->shard_n == opt->shard_k - 1)
            s->mine[s->nmine++] = i;
    return 0;
}

/* Fork workers until every slot is busy or every case is given out. The
 * stops are blocked here, so a worker is born with them blocked and takes
 * its default actions before it lets them in (sweep_child). */
static void sweep_spawn(sweep_state *s)
{
    while (s->running < s->opt->jobs && s->next < s->nmine && !sweep_stop) {
        int ci = s->mine[s->next];
        pid_t pid = fork();
        if (pid == 0)
            sweep_child(&s->list->cases[ci], ci, s->work, &s->unblocked, s->parent);
        if (pid < 0) {
            /* no process to be had: run nothing more, record the rest as crashed */
            s->next = s->nmine;
            break;
        }
        for (int j = 0; j < s->opt->jobs; j++)
            if (!s->pids[j]) {
                s->pids[j] = pid;
                s->slot_case[j] = ci;
                break;
            }
        s->running++;
        s->next++;
    }
}

/* A wait status in the code of sweep_state.exited_ok. */
static int sweep_exit_code(int st)
{
    if (WIFEXITED(st))
        return WEXITSTATUS(st) == 0 ? 1 : 100 + WEXITSTATUS(st);
    return WIFSIGNALED(st) ? -WTERMSIG(st) : 0;
}

/* Free the slot of worker w and note how it ended. */
static void sweep_record(sweep_state *s, pid_t w, int st)
{
    for (int j = 0; j < s->opt->jobs; j++)
        if (s->pids[j] == w) {
            s->pids[j] = 0;
            s->exited_ok[s->slot_case[j]] = sweep_exit_code(st);
        }
    s->running--;
    s->done++;
}

/* Run the cases until all are done or a stop arrives. */
static void sweep_loop(sweep_state *s)
{
    fflush(NULL);
    pb_progress prog;
    pb_progress_start(&prog, s->opt->progress, s->nmine, "cases");
    s->next = s->running = s->done = 0;
    /* Stops stay blocked in the loop and are taken only inside sigsuspend,
     * with SIGCHLD: a stop that comes between the check and the wait would
     * otherwise sit unseen until some worker ended. */
    sigprocmask(SIG_BLOCK, &s->stops, NULL);
    while (s->done < s->nmine && !sweep_stop) {
        sweep_spawn(s);
        if (s->running == 0)
            break;
        int st;
        pid_t w = waitpid(-1, &st, WNOHANG);
        if (w == 0) {
            if (!sweep_stop)
                sigsuspend(&s->waiting);
            continue;
        }
        if (w < 0) {
            if (errno == EINTR)
                continue;
            break;
        }
        sweep_record(s, w, st);
        pb_progress_update(&prog, s->done, NULL);
    }
    sigprocmask(SIG_SETMASK, &s->unblocked, NULL);
    pb_progress_end(&prog);
}

/* Interrupted: stop the workers, leave the run directory as it was. */
static int sweep_abandon(sweep_state *s)
{
    for (int j = 0; j < s->opt->jobs; j++)
        if (s->pids[j] > 0)
            kill(s->pids[j], SIGTERM);
    while (wait(NULL) > 0 || errno == EINTR)
        ;
    pb_run_out_discard(s->out);
    fprintf(stderr, "propbench sweep: interrupted; %s was left as it was\n", s->out->dir);
    return -2;
}

/* Workers that could not write their results (a full disk, say) fail the
 * sweep: count them and keep the first one's reason; 0 when there are none. */
static int sweep_write_failures(const sweep_state *s, int *err)
{
    int n = 0;
    *err = 0;
    for (int k = 0; k < s->nmine; k++) {
        int st = s->exited_ok[s->mine[k]] - 100;
        if (st >= SWEEP_EXIT_WRITE && st <= SWEEP_EXIT_WRITE + SWEEP_ERRNO_MAX) {
            if (!n++)
                *err = st - SWEEP_EXIT_WRITE;
        }
    }
    return n;
}

/* The summary of the gathered cases, written into the staging folder;
 * 0, or -1 with the message printed. */
static int sweep_write_summary(sweep_state *s, json_t *cases)
{
    const pb_sweep_options *opt = s->opt;
    json_t *doc = pb_summary_new(cases);
    char ident[64];
    pb_sweep_identity(s->list, ident, sizeof ident);
    json_object_set_new(doc, "sweep", json_string(opt->label ? opt->label : "grid"));
    json_object_set_new(doc, "sweep_id", json_string(ident));
    json_object_set_new(doc, "total_cases", json_integer(s->list->n));
    if (opt->shard_n > 1) {
        char sh[32];
        snprintf(sh, sizeof sh, "%d/%d", opt->shard_k, opt->shard_n);
        json_object_set_new(doc, "shard", json_string(sh));
    }
    char path[4300];
    snprintf(path, sizeof path, "%s/summary.json", s->dir);
    errno = 0;
    int rc = pb_json_write_atomic(path, doc) ? -1 : 0;
    if (rc)
        fprintf(stderr, "propbench sweep: error: cannot write the summary of %s: %s; %s was left as it was\n",
                s->out->dir, errno ? strerror(errno) : "out of memory", s->out->dir);
    json_decref(doc);
    return rc;
}

/* Every worker done: gather the cases in order, write the summary into the
 * staging folder and swap the run in; -1 (message printed, the run folder
 * as it was) when anything could not be written. */
static int sweep_finish(sweep_state *s)
{
    int e, nw = sweep_write_failures(s, &e);
    if (nw) {
        fprintf(stderr, "propbench sweep: error: %d of %d workers could not write their results: %s; "
                "%s was left as it was\n", nw, s->nmine,
                e ? strerror(e) : "reason unknown", s->out->dir);
        pb_run_out_discard(s->out);
        return -1;
    }
    json_t *cases = json_array();
    for (int k = 0; k < s->nmine; k++) {
        int ci = s->mine[k];
        json_array_append_new(cases, sweep_collect(s->work, ci, &s->list->cases[ci],
                                                   s->exited_ok[ci], s->dir));
    }
    sweep_clean(s->work);
    int rc = sweep_write_summary(s, cases);
    char why[4400];
    if (rc == 0 && pb_run_out_commit(s->out, why, sizeof why)) {
        fprintf(stderr, "propbench sweep: error: %s; %s was left as it was\n", why, s->out->dir);
        rc = -1;
    }
    if (rc)
        pb_run_out_discard(s->out);
    return rc;
}

int pb_sweep_run(const pb_case_list *list, pb_run_out *out, const pb_sweep_options *opt)
{
    sweep_state s;
    memset(&s, 0, sizeof s);
    s.list = list;
    s.out = out;
    s.dir = out->stage;
    s.opt = opt;
    s.parent = getpid();
    sweep_signals_install(&s);
    snprintf(s.work, sizeof s.work, "%s/.work.%ld", s.dir, (long)s.parent);
    int rc = -1;
    if (sweep_prepare(&s) == 0) {
        /* the exact truths the cases share, built once here for every
         * worker rather than once in each */
        for (int k = 0; k < s.nmine && !sweep_stop; k++)
            pb_case_truth_warm(&list->cases[s.mine[k]]);
        sweep_loop(&s);
        rc = sweep_stop ? sweep_abandon(&s) : sweep_finish(&s);
    }
    sweep_signals_restore(&s);
    free(s.mine);
    free(s.exited_ok);
    free(s.pids);
    free(s.slot_case);
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
