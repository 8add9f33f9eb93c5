/* test_reliability_kill.c - the fault-injection test: a sweep killed with
 * kill -9 at a dozen seeded random moments, half of them aimed at the swap,
 * leaves its folder holding the old run or the new one, whole, and no
 * worker alive; the next sweep clears what the killed ones left beside it. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>
#include "test_support.h"
#include "test_reliability_support.h"

static char out_buf[1 << 14], err_buf[1 << 14];

static int cli(const char *const *args)
{
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

/* t and energy_rel (columns 1 and 5) of the CSV's last row; 0 or -1. */
static int rel_csv_last(const char *path, double *t, double *e)
{
    char *s = pbt_slurp_file(path, NULL);
    if (!s)
        return -1;
    size_t n = strlen(s);
    while (n && s[n - 1] == '\n')
        s[--n] = 0;
    char *row = strrchr(s, '\n');
    double col[5];
    int k = row && sscanf(row + 1, "%lf,%lf,%lf,%lf,%lf", &col[0], &col[1], &col[2], &col[3], &col[4]) == 5;
    free(s);
    *t = col[0];
    *e = col[4];
    return k ? 0 : -1;
}

static int rel_close(double a, double b, double rel)
{
    return fabs(a - b) <= rel * fmax(fabs(a), fabs(b));
}

/* 1 if the run folder d holds, whole and alone, the run of the reference
 * folder ref: the same cases in the same order with the same final energy
 * error (results are identical on reruns), each case's series there with a
 * last row that agrees with its summary, and nothing else in d. */
static int rel_run_is(const char *d, const char *ref, char *why, size_t wlen)
{
    char p[600], list[4096];
    snprintf(p, sizeof p, "%s/summary.json", d);
    json_t *got = json_load_file(p, 0, NULL);
    snprintf(p, sizeof p, "%s/summary.json", ref);
    json_t *want = json_load_file(p, 0, NULL);
    json_t *gc = json_object_get(got, "cases"), *wc = json_object_get(want, "cases");
    int ok = json_is_array(gc) && json_is_array(wc) && json_array_size(gc) == json_array_size(wc);
    snprintf(why, wlen, "%s", ok ? "" : "no summary, or another number of cases");
    char names[4096] = "";
    for (size_t i = 0; ok && i < json_array_size(gc); i++) {
        json_t *g = json_array_get(gc, i), *w = json_array_get(wc, i);
        const char *id = json_string_value(json_object_get(g, "id"));
        const char *series = json_string_value(json_object_get(g, "series"));
        double ef = json_number_value(json_object_get(json_object_get(g, "metrics"), "energy_rel_final"));
        double ew = json_number_value(json_object_get(json_object_get(w, "metrics"), "energy_rel_final"));
        double tf = json_number_value(json_object_get(g, "t_final")), t, e;
        snprintf(p, sizeof p, "%s/%s", d, series ? series : "-");
        if (!id || strcmp(id, json_string_value(json_object_get(w, "id"))) || !rel_close(ef, ew, 1e-12)) {
            snprintf(why, wlen, "case %zu is %s, not the reference's", i, id ? id : "?");
            ok = 0;
        } else if (!series || rel_csv_last(p, &t, &e)) {
            snprintf(why, wlen, "%s: no series", id);
            ok = 0;
        } else if (!rel_close(t, tf, 1e-15) || !rel_close(e, ef, 1e-8)) {
            /* the CSV holds 10 significant digits (%.9e), the summary 17 */
            snprintf(why, wlen, "%s: last row t=%.17g energy_rel=%.9e, summary %.17g %.9e", id, t, e, tf, ef);
            ok = 0;
        } else {
            size_t k = strlen(names);
            snprintf(names + k, sizeof names - k, "%s ", series + strlen("series/"));
        }
    }
    if (ok) {
        rel_list(d, list, sizeof list);
        if (strcmp(list, "series summary.json ")) {
            snprintf(why, wlen, "the run folder holds %.300s", list);
            ok = 0;
        }
        snprintf(p, sizeof p, "%s/series", d);
        rel_list(p, list, sizeof list);
        if (ok && strcmp(list, names)) { /* ls sorts as the grid's order here does not: compare sorted */
            char cmd[8400];
            snprintf(cmd, sizeof cmd, "test \"$(printf '%%s\\n' %s | sort | tr '\\n' ' ')\" = '%s'", names, list);
            if (rel_sh("%s", cmd)) {
                snprintf(why, wlen, "series/ holds %.300s; the summary names %.300s", list, names);
                ok = 0;
            }
        }
    }
    json_decref(got);
    json_decref(want);
    return ok;
}

/* The two sweeps that take turns in the folder: 2 and 4 cases. */
static void rel_grid(int which, const char *out, const char **a)
{
    static const char *const g[] = {"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog",
                                    "--steps-per-orbit", NULL, "--orbits", NULL, "--repeats", "0",
                                    "--quiet", "-j", "2", "--out", NULL, NULL};
    memcpy(a, g, sizeof g);
    a[6] = which ? "2000,4000" : "100";
    a[8] = which ? "50" : "5";
    a[15] = out;
}

Test(reliability, kill_9_at_random_moments_leaves_the_old_run_or_the_new_one)
{
    char dir[256], refs[256], ref[2][300], d[300], why[1024], left[1024];
    const char *a[17];
    pbt_tmpdir(dir, sizeof dir);
    pbt_tmpdir(refs, sizeof refs);
    snprintf(d, sizeof d, "%s/D", dir);
    double took[2];
    for (int w = 0; w < 2; w++) {
        snprintf(ref[w], sizeof ref[w], "%s/ref%d", refs, w);
        rel_grid(w, ref[w], a);
        double t0 = rel_now();
        cr_assert_eq(cli(a), 0, "%s", err_buf);
        took[w] = rel_now() - t0; /* only to spread the kills over a sweep's life */
    }
    rel_grid(0, d, a);
    cr_assert_eq(cli(a), 0, "%s", err_buf);
    int cur = 0, outcome[2] = {0, 0};
    unsigned long long x = 19; /* the seed: the same kill moments on every run */
    for (int k = 0; k < 12; k++) {
        x = x * 6364136223846793005ULL + 1442695040888963407ULL; /* Knuth's MMIX LCG */
        double u = (double)(x >> 11) / 9007199254740992.0;
        rel_grid(!cur, d, a);
        pid_t pid = rel_spawn(a);
        double at = 1.5 * u * took[!cur];
        if (k % 2) {
            /* every other kill aims at the swap: 0 to 8 ms after the first
             * series reaches the staging folder (the cases are all done then,
             * and the summary, the swap and the clean-up follow) */
            char staged[400];
            snprintf(staged, sizeof staged, "%s/.D.pb-new.%ld/series", dir, (long)pid);
            double t0 = rel_now();
            while (!rel_has_entry(staged, "kepler") && rel_now() - t0 < 20 * took[!cur] + 5)
                nanosleep(&(struct timespec){0, 50000}, NULL);
            at = 8e-3 * u;
        }
        nanosleep(&(struct timespec){(time_t)at, (long)(1e9 * (at - floor(at)))}, NULL);
        kill(pid, SIGKILL);
        int st;
        cr_assert_eq(waitpid(pid, &st, 0), pid);
        cr_assert_eq(rel_wait_group_gone(pid), 0, "kill %d (at %.3f s): workers outlived their sweep", k, at);
        char w0[512], w1[512];
        int is_old = rel_run_is(d, ref[cur], w0, sizeof w0), is_new = rel_run_is(d, ref[!cur], w1, sizeof w1);
        cr_assert(is_old || is_new, "kill %d (at %.3f s): neither the old run (%s) nor the new one (%s)", k, at,
                  w0, w1);
        outcome[is_new]++;
        cur = is_new ? !cur : cur;
    }
    cr_log_info("12 kills: %d left the old run, %d the new one", outcome[0], outcome[1]);
    /* the next sweep clears what the killed ones left beside the folder */
    rel_grid(!cur, d, a);
    cr_assert_eq(cli(a), 0, "%s", err_buf);
    cr_assert(rel_run_is(d, ref[!cur], why, sizeof why), "%s", why);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "left beside the run folder: %s", left);
    cr_assert_eq(rel_sh("rm -rf '%s' '%s'", dir, refs), 0);
}
