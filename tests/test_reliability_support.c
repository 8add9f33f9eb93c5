/* test_reliability_support.c - see test_reliability_support.h. */
#include <criterion/criterion.h>
#include <dirent.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>
#include "test_support.h"
#include "test_reliability_support.h"

int rel_sh(const char *fmt, ...)
{
    char cmd[4096];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(cmd, sizeof cmd, fmt, ap);
    va_end(ap);
    int st = system(cmd);
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

void rel_sleep_ms(long ms)
{
    nanosleep(&(struct timespec){ms / 1000, (ms % 1000) * 1000000L}, NULL);
}

/* The entries of dir, sorted, as one space-separated line ("" if none). */
void rel_list(const char *dir, char *buf, size_t len)
{
    char f[600];
    snprintf(f, sizeof f, "%.500s.list", dir);
    rel_sh("ls -A '%s' 2>/dev/null | tr '\\n' ' ' > '%s'", dir, f);
    pbt_read_into(f, buf, len);
    unlink(f);
}

/* 1 if dir holds an entry whose name starts with prefix. */
int rel_has_entry(const char *dir, const char *prefix)
{
    DIR *d = opendir(dir);
    if (!d)
        return 0;
    struct dirent *e;
    int found = 0;
    while ((e = readdir(d)))
        found |= strcmp(e->d_name, ".") && strcmp(e->d_name, "..") &&
                 !strncmp(e->d_name, prefix, strlen(prefix));
    closedir(d);
    return found;
}

/* Poll (up to 20 s) until dir holds an entry starting with prefix ("": any
 * entry). */
int rel_wait_entry(const char *dir, const char *prefix)
{
    for (int i = 0; i < 20000 && !rel_has_entry(dir, prefix); i++)
        rel_sleep_ms(1);
    return rel_has_entry(dir, prefix);
}

/* Start $PB_BIN with args (NULL-terminated, no argv[0]) in a process group
 * of its own (its pid), output to /dev/null. */
pid_t rel_spawn(const char *const *args)
{
    const char *bin = getenv("PB_BIN");
    cr_assert_not_null(bin, "PB_BIN is not set");
    const char *argv[48];
    int n = 0;
    argv[n++] = bin;
    for (int i = 0; args[i] && n < 47; i++)
        argv[n++] = args[i];
    argv[n] = NULL;
    fflush(NULL);
    pid_t pid = fork();
    if (pid == 0) {
        setpgid(0, 0);
        int fd = open("/dev/null", O_WRONLY);
        dup2(fd, 1);
        dup2(fd, 2);
        execv(bin, (char *const *)argv);
        _exit(127);
    }
    cr_assert(pid > 0);
    setpgid(pid, pid);
    return pid;
}

/* How many processes of group pgid are alive (zombies, which have ended,
 * do not count). */
int rel_alive_in_group(pid_t pgid)
{
    DIR *d = opendir("/proc");
    if (!d)
        return 0;
    struct dirent *e;
    int n = 0;
    while ((e = readdir(d))) {
        char p[300], st[1024];
        if (e->d_name[0] < '0' || e->d_name[0] > '9')
            continue;
        snprintf(p, sizeof p, "/proc/%s/stat", e->d_name);
        pbt_read_into(p, st, sizeof st);
        const char *rp = strrchr(st, ')');
        char state;
        long ppid, pgrp;
        if (rp && sscanf(rp + 1, " %c %ld %ld", &state, &ppid, &pgrp) == 3 && pgrp == pgid &&
            state != 'Z' && state != 'X')
            n++;
    }
    closedir(d);
    return n;
}

/* Poll (up to 10 s) until no process of group pgid is alive; how many are. */
int rel_wait_group_gone(pid_t pgid)
{
    for (int i = 0; i < 1000 && rel_alive_in_group(pgid); i++)
        rel_sleep_ms(10);
    return rel_alive_in_group(pgid);
}

/* The folder that holds dir, and ".NAME." + what, the prefix of the
 * entries a writer of dir keeps beside it (run_swap.h). */
void rel_beside(const char *dir, const char *what, char *parent, size_t plen, char *prefix,
                       size_t flen)
{
    snprintf(parent, plen, "%s", dir);
    *strrchr(parent, '/') = 0;
    snprintf(prefix, flen, ".%s.%s", strrchr(dir, '/') + 1, what);
}

double rel_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}
