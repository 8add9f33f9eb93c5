/* test_robust.c - bad input found by fuzzing and fault injection: NUL bytes
 * and non-regular files as input, numbers out of range on the command line
 * and in JSON, outputs that would overwrite inputs, paths too long to keep,
 * and messages that carry the system's reason. Each case is a reproducer
 * that failed before its fix. */
#include <criterion/criterion.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>
#include "problems/problem_file.h"
#include "test_support.h"

static char out_buf[1 << 16], err_buf[1 << 16];

/* A program that would read forever is stopped by its CPU limit (inherited
 * by the child), so the test fails instead of hanging the suite; this is no
 * timing assertion, only a guard. */
static int cli(const char *const *args)
{
    struct rlimit rl = {60, 60};
    setrlimit(RLIMIT_CPU, &rl);
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

static void write_bytes(const char *path, const char *data, size_t len)
{
    FILE *f = fopen(path, "wb");
    cr_assert_not_null(f, "%s", path);
    cr_assert_eq(fwrite(data, 1, len, f), len);
    cr_assert_eq(fclose(f), 0);
}

static int read_pf(const char *path, const char *data, size_t len, char *err, size_t errlen)
{
    write_bytes(path, data, len);
    pb_problem *c = NULL;
    int n = 0;
    int rc = pb_problem_file_read(path, &c, &n, err, errlen, NULL);
    free(c);
    return rc;
}

/* A NUL byte ended every line at strlen: "e = 0.1\0junk" was read as 0.1 and
 * a key behind a NUL was used. Now the line with the NUL is named. */
Test(robust, nul_byte_in_problem_file_refused_with_its_line)
{
    char dir[256], path[300], err[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(path, sizeof path, "%s/p.ini", dir);
    static const char text[] = "[case a]\nbody = earth\na = 7000\ne = 0.1\0junk\norbits = 1\n";
    cr_assert_neq(read_pf(path, text, sizeof text - 1, err, sizeof err), PB_OK);
    cr_assert(strstr(err, ":4:") && strstr(err, "NUL"), "%s", err);
    static const char hidden[] = "[case a]\nbody = earth\na = 7000\ne = 0.1\n\0orbits = 1\n";
    cr_assert_neq(read_pf(path, hidden, sizeof hidden - 1, err, sizeof err), PB_OK);
    cr_assert(strstr(err, ":5:") && strstr(err, "NUL"), "%s", err);
    /* the same file without the NUL bytes reads */
    static const char ok[] = "[case a]\nbody = earth\na = 7000\ne = 0.1\norbits = 1\n";
    cr_assert_eq(read_pf(path, ok, sizeof ok - 1, err, sizeof err), PB_OK, "%s", err);
    remove(path);
    rmdir(dir);
}

/* /dev/zero was read forever (a NUL-filled "line" never ends); a FIFO made
 * the open wait for a writer. Both are refused at once, exit 2. */
Test(robust, device_and_fifo_refused_as_input)
{
    char dir[256], fifo[300], out[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(fifo, sizeof fifo, "%s/pipe.ini", dir);
    snprintf(out, sizeof out, "%s/run", dir);
    cr_assert_eq(mkfifo(fifo, 0600), 0, "%s", strerror(errno));
    const char *devs[] = {"/dev/zero", fifo};
    for (int i = 0; i < 2; i++) {
        int rc = cli((const char *[]){"run", "--problem-file", devs[i], "--method", "rk4",
                                      "--steps-per-orbit", "100", "--out", out, NULL});
        cr_assert_eq(rc, 2, "%s: exit %d: %s", devs[i], rc, err_buf);
        cr_assert(strstr(err_buf, devs[i]) && strstr(err_buf, "not a regular file"), "%s", err_buf);
        cr_assert(!pbt_exists(out));
    }
    remove(fifo);
    rmdir(dir);
}

/* "--shard 1/4294967297" was read by sscanf("%d") as 1/1 (wrapped). */
Test(robust, shard_out_of_range_refused)
{
    const char *bad[] = {"1/4294967297", "4294967297/4294967297", "1/2x", "1/", "/2", "0/2", "3/2",
                         "1/-2", "+1/2 ", "1 /2"};
    for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
        int rc = cli((const char *[]){"sweep", "--suite", "quick", "--shard", bad[i], "--out",
                                      "/nonexistent/never", NULL});
        cr_assert_eq(rc, 2, "--shard %s: exit %d", bad[i], rc);
        cr_assert(strstr(err_buf, "--shard"), "--shard %s: %s", bad[i], err_buf);
    }
}
