/* test_support_browser.c - headless Chromium for the report tests that
 * check what a browser actually lays out (see test_support.h). */
#include <criterion/criterion.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>
#include "test_support.h"

int pbt_chromium(const char *const *extra, const char *out_path, char *err, size_t errlen)
{
    const char *bin = getenv("PB_CHROMIUM");
    if (!bin)
        bin = "chromium";
    char prof[256], errpath[300];
    pbt_tmpdir(prof, sizeof prof);
    snprintf(errpath, sizeof errpath, "%s.stderr", prof);
    char udd[300];
    snprintf(udd, sizeof udd, "--user-data-dir=%s", prof);
    const char *argv[32] = {bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                            "--no-first-run", "--disable-background-networking",
                            "--disable-component-update", "--disable-sync", "--disable-extensions",
                            "--hide-scrollbars", udd};
    int n = 12;
    for (int i = 0; extra[i] && n < 31; i++)
        argv[n++] = extra[i];
    argv[n] = NULL;
    fflush(NULL);
    pid_t pid = fork();
    if (pid == 0) {
        int o = open(out_path, O_WRONLY | O_CREAT | O_TRUNC, 0644);
        int e = open(errpath, O_WRONLY | O_CREAT | O_TRUNC, 0644);
        if (o < 0 || e < 0)
            _exit(127);
        dup2(o, 1);
        dup2(e, 2);
        alarm(90);
        execvp(bin, (char *const *)argv);
        dprintf(2, "cannot execute %s (install Debian's chromium: PB_WITH_BROWSER=1 sh scripts/install-deps.sh)\n", bin);
        _exit(127);
    }
    int st = 0;
    waitpid(pid, &st, 0);
    size_t len = 0;
    char *e = pbt_slurp_file(errpath, &len);
    err[0] = 0;
    if (e) {
        snprintf(err, errlen, "%s", len + 1 > errlen ? e + len + 1 - errlen : e);
        free(e);
    }
    unlink(errpath);
    char cmd[400];
    snprintf(cmd, sizeof cmd, "%s", prof);
    const char *rm[] = {"rm", "-rf", cmd, NULL};
    pid_t r = fork();
    if (r == 0) {
        execvp("rm", (char *const *)rm);
        _exit(127);
    }
    waitpid(r, NULL, 0);
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

char *pbt_browser_dom(const char *html_path, const char *script, const char *dir)
{
    char probe[600], url[700], dom[600], err[2048];
    char *html = pbt_slurp_file(html_path, NULL);
    cr_assert_not_null(html, "%s", html_path);
    char *end = strstr(html, "</body>");
    cr_assert_not_null(end, "%s has no </body>", html_path);
    snprintf(probe, sizeof probe, "%s/probe.html", dir);
    FILE *f = fopen(probe, "w");
    cr_assert_not_null(f, "%s", probe);
    fwrite(html, 1, (size_t)(end - html), f);
    fputs(script, f);
    fputs(end, f);
    fclose(f);
    free(html);
    snprintf(url, sizeof url, "file://%s", probe);
    snprintf(dom, sizeof dom, "%s/probe.dom", dir);
    const char *args[] = {"--window-size=1200,900", "--dump-dom", url, NULL};
    int rc = pbt_chromium(args, dom, err, sizeof err);
    cr_assert_eq(rc, 0, "headless chromium could not start or failed (status %d): %s", rc, err);
    char *d = pbt_slurp_file(dom, NULL);
    cr_assert_not_null(d, "no DOM dump in %s", dom);
    return d;
}
