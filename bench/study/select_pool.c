/* select_pool.c - select's methods searched side by side: one worker
 * process a method, at most `jobs` at once, each sending its pb_selection
 * (plain data) back through a pipe. The search of a method does not depend
 * on the others, so the answers are those of one process; a worker that
 * dies leaves its method with the reason "could_not_run". */
#include <errno.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/study/select.h"

#define POOL_MAX 64

typedef struct pool_slot {
    pid_t pid;
    int fd, which;       /* the pipe's read end; the method's index */
    size_t got;          /* bytes of the selection read so far */
    pb_selection buf;
} pool_slot;

static void pool_child(const pb_case_spec *base, const pb_requirement *req, const pb_method_type *m,
                       int index, int fd)
{
    pb_selection s;
    memset(&s, 0, sizeof s);
    s.index = index;
    pb_select_method(base, m, req, &s);
    const char *p = (const char *)&s;
    size_t left = sizeof s;
    while (left > 0) {
        ssize_t w = write(fd, p, left);
        if (w < 0 && errno == EINTR)
            continue;
        if (w <= 0)
            _exit(1);
        p += w;
        left -= (size_t)w;
    }
    _exit(0);
}

static int pool_spawn(pool_slot *sl, const pb_case_spec *base, const pb_requirement *req,
                      const pb_method_type *m, int index)
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
        pool_child(base, req, m, index, fds[1]);
    }
    close(fds[1]);
    *sl = (pool_slot){.pid = pid, .fd = fds[0], .which = index, .got = 0};
    return 0;
}

/* The worker of slot sl has closed its pipe: reap it and take its result. */
static void pool_finish(pool_slot *sl, const pb_method_type *m, pb_selection *out)
{
    int st = 0;
    close(sl->fd);
    while (waitpid(sl->pid, &st, 0) < 0 && errno == EINTR)
        ;
    if (sl->got == sizeof sl->buf && WIFEXITED(st) && WEXITSTATUS(st) == 0) {
        *out = sl->buf;
        return;
    }
    memset(out, 0, sizeof *out);
    out->method = m;
    out->index = sl->which;
    out->reason = "could_not_run";
    if (WIFSIGNALED(st))
        snprintf(out->note, sizeof out->note, "the search's worker died (signal %d)", WTERMSIG(st));
    else
        snprintf(out->note, sizeof out->note, "the search's worker ended without an answer");
}

/* Read what the busy workers have written; reap those that finished. */
static int pool_poll(pool_slot *slot, int busy, const pb_method_type *const *list, pb_selection *sel,
                     void (*progress)(void *, int, const char *), void *ctx, int *done)
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
        pool_finish(sl, list[sl->which], &sel[sl->which]);
        ++*done;
        if (progress)
            progress(ctx, *done, list[sl->which]->name);
        slot[i] = slot[--busy];
    }
    return busy;
}

void pb_select_all(const pb_case_spec *base, const pb_requirement *req,
                   const pb_method_type *const *list, int n, int jobs, pb_selection *sel,
                   void (*progress)(void *ctx, int done, const char *name), void *ctx)
{
    if (jobs > POOL_MAX)
        jobs = POOL_MAX;
    int done = 0, next = 0, busy = 0;
    pool_slot slot[POOL_MAX];
    while (done < n) {
        while (jobs > 1 && busy < jobs && next < n && !pool_spawn(&slot[busy], base, req, list[next], next))
            busy++, next++;
        if (busy == 0) {
            /* one job, or no worker to be had: the method runs here */
            sel[next].index = next;
            pb_select_method(base, list[next], req, &sel[next]);
            if (progress)
                progress(ctx, ++done, list[next]->name);
            next++;
            continue;
        }
        busy = pool_poll(slot, busy, list, sel, progress, ctx, &done);
    }
}
