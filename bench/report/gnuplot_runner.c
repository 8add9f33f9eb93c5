/* gnuplot_runner.c - run gnuplot on a figure script (see gnuplot_runner.h).
 * fork + chdir + execv with an argument vector, so no path ever passes
 * through a shell. */
#include <errno.h>
#include <signal.h>
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

/* The figures being drawn, one per slot, for pb_report_gnuplot_abort (a
 * signal handler): each gnuplot and the two temporary images it may be
 * writing; base and log for the messages once it ends. */
static volatile pid_t gnuplot_child[PB_GNUPLOT_SLOTS];
static char gnuplot_tmp[PB_GNUPLOT_SLOTS][2][5000];
static char gnuplot_log[PB_GNUPLOT_SLOTS][5000], gnuplot_base[PB_GNUPLOT_SLOTS][700];
static volatile sig_atomic_t gnuplot_have_tmp[PB_GNUPLOT_SLOTS];
static const char *const gnuplot_ext[] = {"png", "svg"};

void pb_report_gnuplot_abort(void)
{
    for (int k = 0; k < PB_GNUPLOT_SLOTS; k++) {
        pid_t pid = gnuplot_child[k];
        if (pid > 0) {
            kill(pid, SIGKILL);
            waitpid(pid, NULL, 0);  /* dead before its files go: it cannot write one again */
        }
        if (gnuplot_have_tmp[k])
            for (int i = 0; i < 2; i++)
                unlink(gnuplot_tmp[k][i]);
    }
}

/* Is the file at path a whole image of its kind? gnuplot exits 0 when its
 * writes fail (a full disk left 0-byte and 4096-byte images), so the file
 * itself is checked: a PNG begins with its 8-byte signature and ends with
 * the IEND chunk (00 00 00 00 "IEND" AE 42 60 82; PNG specification,
 * ISO/IEC 15948, 5.2 and 11.2.5); an SVG begins with "<?xml" or "<svg"
 * and ends with "</svg>". NULL, or what is wrong. */
static const char *gnuplot_image_bad(const char *path, int svg)
{
    static const unsigned char sig[8] = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
    static const unsigned char iend[12] = {0, 0, 0, 0, 'I', 'E', 'N', 'D', 0xae, 0x42, 0x60, 0x82};
    FILE *f = fopen(path, "rb");
    if (!f)
        return "it is missing";
    unsigned char head[8] = {0}, tail[64] = {0};
    size_t nh = fread(head, 1, sizeof head, f);
    long size = (fseek(f, 0, SEEK_END) == 0) ? ftell(f) : -1;
    size_t nt = 0;
    if (size >= (long)sizeof tail && fseek(f, -(long)sizeof tail, SEEK_END) == 0)
        nt = fread(tail, 1, sizeof tail, f);
    fclose(f);
    if (size <= 0)
        return "it is empty";
    if (!svg)
        return nh == 8 && !memcmp(head, sig, 8) && nt == sizeof tail &&
               !memcmp(tail + sizeof tail - 12, iend, 12) ? NULL : "it is not a complete PNG";
    size_t e = nt;
    while (e > 0 && (tail[e - 1] == '\n' || tail[e - 1] == '\r' || tail[e - 1] == ' '))
        e--;
    int starts = nh >= 5 && (!memcmp(head, "<?xml", 5) || !memcmp(head, "<svg", 4));
    return starts && e >= 6 && !memcmp(tail + e - 6, "</svg>", 6) ? NULL
           : "it is not a complete SVG";
}

/* Both images whole, then under their final names; else neither is
 * installed and both temporary files go. 0, or -1 with the reason. */
static int gnuplot_install(int k, const char *exe, const char *plots_dir, const char *base, char *err,
                           size_t errlen)
{
    for (int i = 0; i < 2; i++) {
        const char *bad = gnuplot_image_bad(gnuplot_tmp[k][i], i == 1);
        if (bad) {
            snprintf(err, errlen, "%s exited 0 but its %s.%s is unusable (%s; is the disk full?)",
                     exe, base, gnuplot_ext[i], bad);
            return -1;
        }
    }
    for (int i = 0; i < 2; i++) {
        char fin[5000];
        snprintf(fin, sizeof fin, "%s/%s.%s", plots_dir, base, gnuplot_ext[i]);
        if (rename(gnuplot_tmp[k][i], fin) != 0) {
            snprintf(err, errlen, "cannot install %s: %s", fin, strerror(errno));
            return -1;
        }
    }
    return 0;
}

/* gnuplot's exit status st: 0 when it exited 0, else -1 with the reason. */
static int gnuplot_status(int st, const char *exe, const char *script, const char *log, char *err,
                          size_t errlen)
{
    if (WIFEXITED(st) && WEXITSTATUS(st) == 0)
        return 0;
    char last[512];
    gnuplot_last_line(log, last, sizeof last);
    if (WIFEXITED(st))
        snprintf(err, errlen, "%s %s exited with status %d%s%s (see %s)", exe, script,
                 WEXITSTATUS(st), last[0] ? ": " : "", last, log);
    else
        snprintf(err, errlen, "%s %s was killed by signal %d (see %s)", exe, script, WTERMSIG(st),
                 log);
    return -1;
}

static void gnuplot_child_run(const char *exe, const char *plots_dir, const char *script,
                              const char *log)
{
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
    /* the script writes its images under their final names when a user runs
     * it; propbench asks for temporary names and installs them when whole */
    char *const argv[] = {(char *)exe, (char *)"-e", (char *)"pb_tmp = '.tmp'", (char *)script, NULL};
    execv(exe, argv);
    _exit(127);
}

int pb_report_gnuplot_start(const char *exe, const char *plots_dir, const char *base, char *err,
                            size_t errlen)
{
    int k = 0;
    while (k < PB_GNUPLOT_SLOTS && (gnuplot_child[k] > 0 || gnuplot_have_tmp[k]))
        k++;
    if (k == PB_GNUPLOT_SLOTS) {
        snprintf(err, errlen, "more than %d figures drawn at once", PB_GNUPLOT_SLOTS);
        return -1;
    }
    /* "./" first: gnuplot reads any argument starting with '-' as an
     * option (a problem named "-V" gives "-V-energy.gp"), and a path never
     * starts with one */
    char script[720];
    snprintf(script, sizeof script, "./%s.gp", base);
    snprintf(gnuplot_base[k], sizeof gnuplot_base[k], "%s", base);
    snprintf(gnuplot_log[k], sizeof gnuplot_log[k], "%s/%s.log", plots_dir, base);
    for (int i = 0; i < 2; i++)
        snprintf(gnuplot_tmp[k][i], sizeof gnuplot_tmp[k][i], "%s/%s.%s.tmp", plots_dir, base,
                 gnuplot_ext[i]);
    gnuplot_have_tmp[k] = 1;
    fflush(NULL);
    pid_t pid = fork();
    if (pid < 0) {
        gnuplot_have_tmp[k] = 0;
        snprintf(err, errlen, "cannot start %s: %s", exe, strerror(errno));
        return -1;
    }
    if (pid == 0)
        gnuplot_child_run(exe, plots_dir, script, gnuplot_log[k]);
    gnuplot_child[k] = pid;
    return k;
}

int pb_report_gnuplot_wait(const char *exe, const char *plots_dir, int *slot, char *err, size_t errlen)
{
    int st, k = -1;
    pid_t pid;
    for (;;) {
        pid = waitpid(-1, &st, 0);
        if (pid < 0 && errno == EINTR)
            continue;
        if (pid < 0) {
            snprintf(err, errlen, "waiting for %s: %s", exe, strerror(errno));
            *slot = -1;
            return -1;
        }
        for (k = 0; k < PB_GNUPLOT_SLOTS && gnuplot_child[k] != pid; k++)
            ;
        if (k < PB_GNUPLOT_SLOTS)
            break;          /* another child of ours (none today): not a figure */
    }
    gnuplot_child[k] = 0;
    *slot = k;
    char script[720];
    snprintf(script, sizeof script, "./%s.gp", gnuplot_base[k]);
    int rc = gnuplot_status(st, exe, script, gnuplot_log[k], err, errlen);
    if (!rc)
        rc = gnuplot_install(k, exe, plots_dir, gnuplot_base[k], err, errlen);
    for (int i = 0; rc && i < 2; i++)
        unlink(gnuplot_tmp[k][i]);  /* no temporary image stays behind */
    gnuplot_have_tmp[k] = 0;
    struct stat sb;
    if (!rc && stat(gnuplot_log[k], &sb) == 0 && sb.st_size == 0)
        unlink(gnuplot_log[k]);   /* a log with nothing in it says nothing */
    return rc;
}

int pb_report_gnuplot_run(const char *exe, const char *plots_dir, const char *base, char *err,
                          size_t errlen)
{
    int k;
    if (pb_report_gnuplot_start(exe, plots_dir, base, err, errlen) < 0)
        return -1;
    return pb_report_gnuplot_wait(exe, plots_dir, &k, err, errlen);
}
