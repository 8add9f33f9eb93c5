/* test_conventions.c - the conventions of a Unix tool: -h and --help on
 * every verb, `propbench help VERB`, --version, the manual page (rendered by
 * man -l: every verb, every option each verb's --help names, the sections
 * a reader looks for) and the bash completion (verbs, options, methods,
 * problems). `make install` placing both is checked by
 * tests/install/check-install.sh. */
#include <criterion/criterion.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "test_support.h"

static const char *const conv_verbs[] = {"list", "run", "sweep", "merge", "report", "baseline",
                                         "check", "select", "score", "selftest", NULL};

static char conv_out[1 << 16], conv_err[1 << 14];

static int conv_cli(const char *a, const char *b, const char *c)
{
    const char *args[] = {a, b, c, NULL};
    return pbt_run_cli(args, conv_out, sizeof conv_out, conv_err, sizeof conv_err);
}

/* The output of a shell command run in PB_ROOT, in malloc'd memory. */
static char *conv_shell(const char *cmd)
{
    const char *root = getenv("PB_ROOT");
    char full[2048];
    snprintf(full, sizeof full, "cd '%s' && %s", root ? root : ".", cmd);
    FILE *p = popen(full, "r");
    cr_assert_not_null(p, "%s", cmd);
    size_t cap = 1 << 16, n = 0;
    char *buf = malloc(cap);
    size_t k;
    while ((k = fread(buf + n, 1, cap - n - 1, p)) > 0) {
        n += k;
        if (n + 1 == cap)
            buf = realloc(buf, cap *= 2);
    }
    buf[n] = 0;
    pclose(p);
    return buf;
}

static const char *conv_bin(void)
{
    const char *b = getenv("PB_BIN");
    return b && *b ? b : "build/propbench";
}

Test(conventions, help_on_every_verb_three_ways)
{
    for (const char *const *v = conv_verbs; *v; v++) {
        char usage[64];
        snprintf(usage, sizeof usage, "usage: propbench %s", *v);
        cr_assert_eq(conv_cli(*v, "--help", NULL), 0, "%s --help: %s", *v, conv_err);
        cr_assert(strstr(conv_out, usage), "%s --help: %s", *v, conv_out);
        char *long_help = strdup(conv_out);
        cr_assert_eq(conv_cli(*v, "-h", NULL), 0, "%s -h: %s", *v, conv_err);
        cr_assert_str_eq(conv_out, long_help, "%s -h", *v);
        cr_assert_eq(conv_cli("help", *v, NULL), 0, "help %s: %s", *v, conv_err);
        cr_assert_str_eq(conv_out, long_help, "help %s", *v);
        free(long_help);
    }
    cr_assert_eq(conv_cli("help", "nosuch", NULL), 2);
    cr_assert(strstr(conv_err, "unknown verb 'nosuch'"), "%s", conv_err);
    cr_assert_eq(conv_cli("--version", NULL, NULL), 0);
    cr_assert(!strncmp(conv_out, "propbench ", 10) && strchr(conv_out, '.'), "%s", conv_out);
}

Test(conventions, man_page_names_every_verb_and_option)
{
    char *warn = conv_shell("MANWIDTH=80 man --warnings=all -l man/propbench.1 2>&1 >/dev/null");
    cr_assert_str_eq(warn, "", "man -l warns: %s", warn);
    free(warn);
    /* wide lines, no hyphenation: options stay whole */
    char *page = conv_shell("MANWIDTH=400 man -l man/propbench.1 2>/dev/null");
    static const char *const sections[] = {"NAME", "SYNOPSIS", "VERBS", "CHECK OPTIONS",
                                           "EXIT STATUS", "ENVIRONMENT", "FILES", "EXAMPLES"};
    for (int i = 0; i < 8; i++) {
        char head[40];
        snprintf(head, sizeof head, "\n%s\n", sections[i]);
        cr_assert(strstr(page, head), "section %s missing", sections[i]);
    }
    for (const char *const *v = conv_verbs; *v; v++) {
        char cmd[300];
        snprintf(cmd, sizeof cmd, "'%s' %s --help | grep -o -- '--[a-z][a-z0-9-]*' | sort -u",
                 conv_bin(), *v);
        char *opts = conv_shell(cmd);
        cr_assert(*opts, "%s --help names no option", *v);
        for (char *o = strtok(opts, "\n"); o; o = strtok(NULL, "\n")) {
            /* a whole option: not followed by another letter or hyphen */
            int found = 0;
            for (const char *p = strstr(page, o); p && !found; p = strstr(p + 1, o)) {
                char after = p[strlen(o)];
                found = !(after == '-' || (after >= 'a' && after <= 'z'));
            }
            cr_assert(found, "the manual page lacks %s of '%s'", o, *v);
        }
        free(opts);
        char verb_line[40];
        snprintf(verb_line, sizeof verb_line, "\n       %s", *v);
        cr_assert(strstr(page, verb_line), "verb %s missing", *v);
    }
    free(page);
}

/* What the completion offers for the words given (the last is completed). */
static char *conv_complete(const char *words)
{
    char cmd[1024];
    snprintf(cmd, sizeof cmd,
             "bash -c '. scripts/propbench-completion.bash; COMP_WORDS=(%s %s); "
             "COMP_CWORD=$((${#COMP_WORDS[@]}-1)); _propbench; echo \"${COMPREPLY[*]}\"'",
             conv_bin(), words);
    return conv_shell(cmd);
}

Test(conventions, bash_completion_offers_verbs_options_methods_problems)
{
    char *s = conv_complete("che");
    cr_assert_str_eq(s, "check\n");
    free(s);
    s = conv_complete("check --only");
    cr_assert_str_eq(s, "--only-failures\n");
    free(s);
    s = conv_complete("run --method yoshida4");
    cr_assert(strstr(s, "yoshida4 ") && strstr(s, "yoshida4-tt"), "%s", s);
    free(s);
    s = conv_complete("sweep --problems kepler-e0.6,leo-j");
    cr_assert_str_eq(s, "kepler-e0.6,leo-j2\n");
    free(s);
    s = conv_complete("help sel");
    cr_assert(strstr(s, "select") && strstr(s, "selftest"), "%s", s);
    free(s);
}

Test(conventions, sweep_takes_a_horizon_in_seconds)
{
    char dir[200], out[300], path[330];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/hz", dir);
    /* 3000 s: about half an orbit of leo-near-circular, 477 of kepler-e0.6 */
    const char *a[] = {"sweep", "--problems", "kepler-e0.6,leo-near-circular", "--methods", "rk4",
                       "--steps-per-orbit", "50", "--horizon-s", "3000", "--repeats", "0",
                       "--quiet", "--out", out, NULL};
    cr_assert_eq(pbt_run_cli(a, conv_out, sizeof conv_out, conv_err, sizeof conv_err), 0, "%s", conv_err);
    snprintf(path, sizeof path, "%s/summary.json", out);
    char *s = pbt_slurp_file(path, NULL);
    cr_assert_not_null(s);
    cr_assert(strstr(s, "kepler-e0.6__rk4__n50__s3000") && strstr(s, "leo-near-circular__rk4__n50__s3000"),
              "case ids carry the horizon");
    cr_assert(strstr(s, "\"horizon_s\": 3000"), "horizon recorded");
    free(s);
    const char *both[] = {"sweep", "--problems", "kepler-e0.6", "--methods", "rk4",
                          "--steps-per-orbit", "50", "--horizon-s", "3000", "--orbits", "2",
                          "--out", out, NULL};
    cr_assert_eq(pbt_run_cli(both, conv_out, sizeof conv_out, conv_err, sizeof conv_err), 2);
    cr_assert(strstr(conv_err, "--orbits or --horizon-s, not both"), "%s", conv_err);
    const char *neg[] = {"sweep", "--suite", "quick", "--horizon-s", "-5", "--out", out, NULL};
    cr_assert_eq(pbt_run_cli(neg, conv_out, sizeof conv_out, conv_err, sizeof conv_err), 2);
    cr_assert(strstr(conv_err, "--horizon-s must be positive, got '-5'"), "%s", conv_err);
}

/* `run` on a pseudo-terminal (script(1) from util-linux), or not */
static char *conv_run_tty(const char *extra, int tty)
{
    char dir[200], cmd[1200], inner[800];
    pbt_tmpdir(dir, sizeof dir);
    /* 3e6 steps of rk4: tens of progress calls (one per 65536 steps) */
    snprintf(inner, sizeof inner, "'%s' run --problem kepler-e0.6 --method rk4 --steps-per-orbit 10000 "
             "--orbits 300 --repeats 0 --out '%s/r' %s", conv_bin(), dir, extra);
    if (tty)
        snprintf(cmd, sizeof cmd, "script -qec \"%s\" /dev/null", inner);
    else
        snprintf(cmd, sizeof cmd, "%s 2>&1 >/dev/null", inner);
    return conv_shell(cmd);
}

Test(conventions, run_shows_progress_on_a_terminal_only)
{
    char *s = conv_run_tty("", 1);
    cr_assert(strstr(s, "% of the horizon, ") && strstr(s, " steps/s, about ") && strstr(s, " s left"),
              "%s", s);
    cr_assert(strstr(s, "\r\033[K"), "the line is cleared before the table");
    free(s);
    s = conv_run_tty("--quiet", 1);
    cr_assert(!strstr(s, "of the horizon"), "--quiet: %s", s);
    free(s);
    s = conv_run_tty("", 0);
    cr_assert(!strstr(s, "of the horizon"), "stderr not a terminal: %s", s);
    free(s);
}

/* A run or sweep into its default folder (no --out) that holds an earlier
 * run says so on stderr before replacing it; the first one says nothing. */
Test(conventions, replacing_a_default_folder_is_announced)
{
    char root[256], out[4096], err[4096];
    pbt_tmpdir(root, sizeof root);
    setenv("PB_ROOT", root, 1); /* the CLI runs in this scratch folder */
    const char *run[] = {"run", "--problem", "kepler-e0.5", "--method", "rk4", "--steps-per-orbit",
                         "100", "--orbits", "1", "--repeats", "0", NULL};
    cr_assert_eq(pbt_run_cli(run, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_expect_null(strstr(err, "replacing"), "first run: %s", err);
    cr_assert_eq(pbt_run_cli(run, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_expect(strstr(err, "note: replacing the earlier run in results/runs/kepler-e0.5__rk4__n100__o1"),
              "second run: %s", err);
    const char *sweep[] = {"sweep", "--problems", "kepler-e0.5", "--methods", "rk4",
                           "--steps-per-orbit", "100", "--orbits", "1", "--repeats", "0",
                           "--quiet", NULL};
    cr_assert_eq(pbt_run_cli(sweep, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_expect_null(strstr(err, "replacing"), "first sweep: %s", err);
    cr_assert_eq(pbt_run_cli(sweep, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_expect(strstr(err, "note: replacing the earlier run in results/runs/grid"), "second sweep: %s",
              err);
}
