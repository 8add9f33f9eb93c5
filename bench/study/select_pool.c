/* select_pool.c - select's methods searched side by side and in rounds.
 * A round: one worker process a method, at most `jobs` at once, each
 * sending its pb_selection and its search's memory (plain data) back
 * through a pipe. The first round caps each run's forecast evaluations, so
 * the cheap answers come first; a method then estimated (from its own
 * failing runs) to take more than K times the evaluations of the
 * fewest-evaluation answer ends there, and the rest are searched on to
 * their end from where they stopped. What each round does depends on the
 * rounds before and on evaluation counts only (never on timings or on which
 * worker ended first), so the answers are those of one process; a worker
 * that dies leaves its method with the reason "could_not_run". */
#include <errno.h>
#include <math.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/study/select.h"

#define POOL_MAX 64
#define POOL_FIRST_CAP 2e4   /* evaluations a run of the first round may be forecast to take */
#define POOL_CAP_GROWTH 8.0  /* the cap of each further round while no answer is known */

/* What a worker sends back: its method's selection and search so far. */
typedef struct pool_reply {
    pb_selection sel;
    pb_select_memo memo;
} pool_reply;

typedef struct pool_slot {
    pid_t pid;
    int fd, which;       /* the pipe's read end; the method's index */
    size_t got;          /* bytes of the reply read so far */
    pool_reply buf;
} pool_slot;

/* One round's shared facts. */
typedef struct pool_round {
    const pb_case_spec *base;
    const pb_requirement *req;
    const pb_method_type *const *list;
    pb_selection *sel;
    pb_select_memo *memo;
    double cap;
} pool_round;

static void pool_child(const pool_round *rd, int index, int fd)
{
    pool_reply *rp = calloc(1, sizeof *rp);
    if (!rp)
        _exit(1);
    rp->sel.index = index;
    rp->memo = rd->memo[index];
    pb_select_method(rd->base, rd->list[index], rd->req, rd->cap, &rp->memo, &rp->sel);
    const char *p = (const char *)rp;
    size_t left = sizeof *rp;
    while (left > 0) {
        ssize_t w = write(fd, p, left);
        if (w < 0 && errno == EINTR)
            continue;
        if (w <= 0) {
            free(rp);
            _exit(1);
        }
        p += w;
        left -= (size_t)w;
    }
    free(rp);
    _exit(0);
}

static int pool_spawn(pool_slot *sl, const pool_round *rd, int index)
{
    int fds[2];
    if (pipe(fds))
        return -1;
    fflush(NULL); /* nothing buffered is written twice */
    pid_t pid = fork();
    if (pid < 0) {
        close(fds[0]);
        close(fds[1]);
        return -1;
    }
    if (pid == 0) {
        close(fds[0]);
        pool_child(rd, index, fds[1]);
    }
    close(fds[1]);
    sl->pid = pid;
    sl->fd = fds[0];
    sl->which = index;
    sl->got = 0;
    return 0;
}

/* The worker of slot sl has closed its pipe: reap it and take its result. */
static void pool_finish(pool_slot *sl, const pool_round *rd)
{
    int st = 0, i = sl->which;
    pb_selection *out = &rd->sel[i];
    close(sl->fd);
    while (waitpid(sl->pid, &st, 0) < 0 && errno == EINTR)
        ;
    if (sl->got == sizeof sl->buf && WIFEXITED(st) && WEXITSTATUS(st) == 0) {
        *out = sl->buf.sel;
        out->method = rd->list[i]; /* the same table in both processes, but said here */
        rd->memo[i] = sl->buf.memo;
        return;
    }
    memset(out, 0, sizeof *out);
    out->method = rd->list[i];
    out->index = i;
    out->reason = "could_not_run";
    if (WIFSIGNALED(st))
        snprintf(out->note, sizeof out->note, "the search's worker died (signal %d)", WTERMSIG(st));
    else
        snprintf(out->note, sizeof out->note, "the search's worker ended without an answer");
}

/* Read what the busy workers have written; reap those that finished. */
static int pool_poll(pool_slot *slot, int busy, const pool_round *rd, int *finished, int *nfin)
{
    struct pollfd pf[POOL_MAX];
    if (busy < 1 || busy > POOL_MAX)
        return busy;
    for (int i = 0; i < busy; i++)
        pf[i] = (struct pollfd){.fd = slot[i].fd, .events = POLLIN};
    if (poll(pf, (nfds_t)busy, -1) < 0)
        return busy; /* interrupted: poll again */
    for (int i = busy - 1; i >= 0; i--) {
        if (!(pf[i].revents & (POLLIN | POLLHUP | POLLERR)))
            continue;
        pool_slot *sl = &slot[i];
        ssize_t r = read(sl->fd, (char *)&sl->buf + sl->got, sizeof sl->buf - sl->got);
        if (r > 0) {
            sl->got += (size_t)r;
            if (sl->got < sizeof sl->buf)
                continue;
        } else if (r < 0 && errno == EINTR) {
            continue;
        }
        pool_finish(sl, rd);
        finished[(*nfin)++] = sl->which;
        slot[i] = slot[--busy];
    }
    return busy;
}

/* One round over the methods todo[0..n): each searched (or its search
 * resumed) under rd->cap, by up to jobs workers; the indices of those that
 * ended, in the order they did, into finished. */
static void pool_round_run(const pool_round *rd, const int *todo, int n, int jobs, int *finished)
{
    int nfin = 0, next = 0, busy = 0;
    pool_slot *slot = calloc((size_t)(jobs > 1 ? jobs : 1), sizeof *slot);
    if (!slot)
        jobs = 1; /* the slots' reply buffers are large; without them, one at a time */
    while (nfin < n) {
        while (jobs > 1 && busy < jobs && next < n && !pool_spawn(&slot[busy], rd, todo[next]))
            busy++, next++;
        if (busy == 0) {
            /* one job, or no worker to be had: the method runs here */
            int i = todo[next++];
            rd->sel[i].index = i;
            pb_select_method(rd->base, rd->list[i], rd->req, rd->cap, &rd->memo[i], &rd->sel[i]);
            finished[nfin++] = i;
            continue;
        }
        busy = pool_poll(slot, busy, rd, finished, &nfin);
    }
    free(slot);
}

/* The answer with the fewest evaluations among sel[0..n); -1: none. */
static int pool_fewest(const pb_selection *sel, int n)
{
    int best = -1;
    for (int i = 0; i < n; i++)
        if (sel[i].found && (best < 0 || sel[i].confirmed.evals < sel[best].confirmed.evals))
            best = i;
    return best;
}

/* A deferred method whose answer is estimated to take more than K times the
 * evaluations of the fewest-evaluation answer ends here with the reason
 * "costlier"; 1 when it did. */
static int pool_prune(pb_selection *s, const pb_selection *best, double K)
{
    long b = best->confirmed.evals;
    if (!(K >= 1) || !((double)s->est_evals > K * (double)b))
        return 0;
    s->deferred = 0;
    s->reason = "costlier";
    snprintf(s->note, sizeof s->note, "not searched to its end: estimated at over %ld evaluations (half "
             "those of its finest failing run), over %g x the fewest of any answer (%ld, %s)",
             s->est_evals, K, b, best->method->name);
    return 1;
}

/* The next round's cap. Stage 0, no answer yet: a larger cap, for the
 * cheapest answer to show first. Once one is known (stage 1): 4 K times its
 * evaluations, and at least twice the last cap (one rung more, since the
 * rungs of fixed-step methods double). A method costing more than K times
 * it then meets a failing run past 2 K times it (the ladder runs the finest
 * rung the cap allows where it would jump past: select.c), and its
 * estimate, half that run's, prunes it; one costing less than about 2 K
 * times it mostly reaches its answer. Adaptive methods' rungs are decades
 * of tolerance, whose cost grows slower than that. Stage 2: no cap, every
 * method left is searched to its end. */
static double pool_next_cap(double cap, const pb_selection *best, double K, int *stage)
{
    if (*stage == 0 && !best)
        return cap > 1e12 ? 0 : cap * POOL_CAP_GROWTH;
    if (*stage == 0) {
        *stage = 1;
        return fmax(4 * K * (double)best->confirmed.evals, 2 * cap);
    }
    *stage = 2;
    return 0;
}

void pb_select_all(const pb_case_spec *base, const pb_requirement *req,
                   const pb_method_type *const *list, int n, const pb_select_plan *plan,
                   pb_selection *sel, void (*progress)(void *ctx, int done, const char *name),
                   void *ctx)
{
    int jobs = plan->jobs > POOL_MAX ? POOL_MAX : plan->jobs;
    pb_select_memo *memo = calloc((size_t)(n > 0 ? n : 1), sizeof *memo);
    int *todo = malloc((size_t)(n > 0 ? n : 1) * sizeof *todo);
    int *fin = malloc((size_t)(n > 0 ? n : 1) * sizeof *fin);
    int ntodo = 0, done = 0, stage = 0;
    for (int i = 0; i < n; i++)
        todo[ntodo++] = i;
    /* without pruning, or without room for the searches' memories, one
     * round with no cap: every method searched to its end */
    pool_round rd = {base, req, list, sel, memo, plan->prune_factor >= 1 ? POOL_FIRST_CAP : 0};
    if (!memo || !todo || !fin) {
        free(memo), free(todo), free(fin);
        for (int i = 0; i < n; i++) {
            pb_select_memo m1;
            memset(&m1, 0, sizeof m1);
            sel[i].index = i;
            pb_select_method(base, list[i], req, 0, &m1, &sel[i]);
            if (progress)
                progress(ctx, ++done, list[i]->name);
        }
        return;
    }
    while (ntodo > 0) {
        pool_round_run(&rd, todo, ntodo, jobs, fin);
        int best = pool_fewest(sel, n), left = 0;
        for (int k = 0; k < ntodo; k++) {
            int i = fin[k]; /* in the order they ended, for the progress line */
            if (!sel[i].deferred || (best >= 0 && pool_prune(&sel[i], &sel[best], plan->prune_factor)))
                if (progress)
                    progress(ctx, ++done, list[i]->name);
        }
        /* those left, in the list's order (todo's own), so the same methods
         * start first whatever the workers did */
        for (int k = 0; k < ntodo; k++)
            if (sel[todo[k]].deferred)
                todo[left++] = todo[k];
        ntodo = left;
        rd.cap = pool_next_cap(rd.cap, best >= 0 ? &sel[best] : NULL, plan->prune_factor, &stage);
    }
    free(memo), free(todo), free(fin);
}
