/* gnuplot_runner.c - run gnuplot on a figure script (see gnuplot_runner.h).
 * fork + chdir + execv with an argument vector, so no path ever passes
 * through a shell. */
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/report/gnuplot_runner.h"

static int gnuplot_exec_ok(const char *p)
{
    struct stat st;
    return stat(p, &st) == 0 && S_ISREG(st.st_mode) && access(p, X_OK) == 0;
}

int pb_report_gnuplot_find(const char *prog, char *out, size_t len)
{
    if (!prog || !*prog)
        return -1;
    if (strchr(prog, '/')) {
        if (!gnuplot_exec_ok(prog) || !realpath(prog, out))
            return -1;
        (void)len;
        return 0;
    }
    const char *path = getenv("PATH");
    if (!path)
        return -1;
    const char *s = path;
    while (*s) {
        size_t n = strcspn(s, ":");
        if (n > 0 && (size_t)snprintf(out, len, "%.*s/%s", (int)n, s, prog) < len && gnuplot_exec_ok(out))
            return 0;
        s += n;
        if (*s == ':')
            s++;
    }
    return -1;
}

/* Last non-empty line of the log, for the error message. */
static void gnuplot_last_line(const char *log, char *buf, size_t len)
{
    buf[0] = 0;
    FILE *f = fopen(log, "r");
    if (!f)
        return;
    char line[512];
    while (fgets(line, sizeof line, f)) {
        line[strcspn(line, "\r\n")] = 0;
        if (line[0])
            snprintf(buf, len, "%s", line);
    }
    fclose(f);
}

int pb_report_gnuplot_run(const char *exe, const char *plots_dir, const char *base, char *err,
                          size_t errlen)
{
    char script[700], log[5000];
    /* "./" first: gnuplot reads any argument starting with '-' as an
     * option (a problem named "-V" gives "-V-energy.gp"), and a path never
     * starts with one */
    snprintf(script, sizeof script, "./%s.gp", base);
    snprintf(log, sizeof log, "%s/%s.log", plots_dir, base);
    fflush(NULL);
    pid_t pid = fork();
    if (pid < 0) {
        snprintf(err, errlen, "cannot start %s: %s", exe, strerror(errno));
        return -1;
    }
    if (pid == 0) {
        int fd = open(log, O_WRONLY | O_CREAT | O_TRUNC, 0644);
        if (fd >= 0) {
            dup2(fd, STDOUT_FILENO);
            dup2(fd, STDERR_FILENO);
            close(fd);
        }
        int nul = open("/dev/null", O_RDONLY);
        if (nul >= 0) {
            dup2(nul, STDIN_FILENO);
            close(nul);
        }
        if (chdir(plots_dir) != 0)
            _exit(126);
        char *const argv[] = {(char *)exe, script, NULL};
        execv(exe, argv);
        _exit(127);
    }
    int st;
    while (waitpid(pid, &st, 0) < 0)
        if (errno != EINTR) {
            snprintf(err, errlen, "waiting for %s: %s", exe, strerror(errno));
            return -1;
        }
    if (!WIFEXITED(st) || WEXITSTATUS(st) != 0) {
        char last[512];
        gnuplot_last_line(log, last, sizeof last);
        if (WIFEXITED(st))
            snprintf(err, errlen, "%s %s exited with status %d%s%s (see %s)", exe, script, WEXITSTATUS(st),
                     last[0] ? ": " : "", last, log);
        else
            snprintf(err, errlen, "%s %s was killed by signal %d (see %s)", exe, script, WTERMSIG(st), log);
        return -1;
    }
    static const char *const ext[] = {"png", "svg"};
    for (int i = 0; i < 2; i++) {
        char tmp[5000], fin[5000];
        snprintf(tmp, sizeof tmp, "%s/%s.%s.tmp", plots_dir, base, ext[i]);
        snprintf(fin, sizeof fin, "%s/%s.%s", plots_dir, base, ext[i]);
        if (rename(tmp, fin) != 0) {
            snprintf(err, errlen, "%s ran but did not write %s: %s", exe, tmp, strerror(errno));
            return -1;
        }
    }
    return 0;
}
