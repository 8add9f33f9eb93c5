/* test_oem.c - CCSDS OEM (KVN) output of run (--ephemeris-out, --truth-out),
 * `propbench score` of another program's trajectory, the strict reader's
 * rejections (exit 2, file, line and keyword named, nothing written), and
 * the series CSV's state columns. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "test_support.h"
#include "bench/store/oem_write.h"

static char out_buf[1 << 16], err_buf[1 << 16];

static int cli(const char *const *args)
{
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

static json_t *case0(const char *dir)
{
    char p[600];
    snprintf(p, sizeof p, "%s/summary.json", dir);
    json_t *d = json_load_file(p, 0, NULL);
    cr_assert(d, "no summary in %s", dir);
    json_t *c = json_incref(json_array_get(json_object_get(d, "cases"), 0));
    json_decref(d);
    return c;
}

static double metric(const json_t *c, const char *k)
{
    const json_t *v = json_object_get(json_object_get(c, "metrics"), k);
    cr_assert(json_is_number(v), "metric %s missing", k);
    return json_number_value(v);
}

/* The test data file, from the tree the tests run in. */
static void data_path(const char *name, char *buf, size_t n)
{
    const char *root = getenv("PB_ROOT");
    snprintf(buf, n, "%s/tests/data/%s", root ? root : ".", name);
}

Test(oem, epoch_text_reads_back_to_the_same_double)
{
    /* the format keeps 17+ significant digits of the seconds' fraction */
    const double el[] = {0.0, 555.34558969598731, 55534.558969598729, 86399.999999999985,
                         1e-3, 3.1e7 + 0.123456789012345};
    for (size_t i = 0; i < sizeof el / sizeof el[0]; i++) {
        char s[80];
        double back = -1;
        pb_oem_epoch_format(el[i], s, sizeof s);
        cr_assert_eq(pb_oem_epoch_parse(s, &back), 0, "%s", s);
        cr_assert_eq(back, el[i], "%s reads as %.17g, not %.17g", s, back, el[i]);
    }
    double d;
    cr_assert_eq(pb_oem_epoch_parse("2000-001T12:00:01.5", &d), 0);
    cr_assert_eq(d, 1.5); /* day-of-year form */
    cr_assert_eq(pb_oem_epoch_parse("2000-01-01 12:00:00", &d), -1);
    cr_assert_eq(pb_oem_epoch_parse("2000-13-01T12:00:00", &d), -1);
}

/* run -> OEM -> score: the same errors to round-off, since the file keeps
 * 18 significant digits and the epochs read back exactly. */
Test(oem, round_trip_scores_the_run_it_came_from)
{
    char dir[256], run[300], sc[300], tr[300], eph[300], tru[300], csv[600];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    snprintf(sc, sizeof sc, "%s/score", dir);
    snprintf(tr, sizeof tr, "%s/score-truth", dir);
    snprintf(eph, sizeof eph, "%s/rk4.oem", dir);
    snprintf(tru, sizeof tru, "%s/truth.oem", dir);
    int rc = cli((const char *[]){"run", "--problem", "leo-circular", "--method", "rk4",
                 "--steps-per-orbit", "200", "--orbits", "10", "--samples", "0", "--repeats", "0",
                 "--ephemeris-out", eph, "--truth-out", tru, "--series-states", "--quiet",
                 "--out", run, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    rc = cli((const char *[]){"score", "--problem", "leo-circular", "--ephemeris", eph,
             "--quiet", "--out", sc, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    json_t *a = case0(run), *b = case0(sc);
    const char *keys[] = {"pos_err_max", "pos_err_final", "vel_err_max", "radial_final",
                          "along_track_final", "cross_track_final", "energy_rel_max"};
    for (size_t i = 0; i < sizeof keys / sizeof keys[0]; i++) {
        double x = metric(a, keys[i]), y = metric(b, keys[i]);
        cr_assert(fabs(x - y) <= 1e-12 * fabs(x) + 1e-300, "%s: run %.17g, score %.17g", keys[i], x, y);
    }
    cr_assert_str_eq(json_string_value(json_object_get(b, "method")), "rk4"); /* OBJECT_NAME */
    cr_assert_str_eq(json_string_value(json_object_get(b, "source")), "ephemeris");
    cr_assert(json_is_null(json_object_get(json_object_get(b, "cost"), "evals")),
              "an evaluation count nobody gave was invented");
    json_decref(a);
    json_decref(b);
    /* the truth's own file scores at the truth's rounding to double */
    rc = cli((const char *[]){"score", "--problem", "leo-circular", "--ephemeris", tru,
             "--quiet", "--out", tr, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    json_t *t = case0(tr);
    cr_assert(metric(t, "pos_err_max") < 1e-9, "truth file: %g km", metric(t, "pos_err_max"));
    json_decref(t);
    snprintf(csv, sizeof csv, "%s/series/leo-circular__rk4__n200__o10.csv", run);
    char head[4096];
    pbt_read_into(csv, head, sizeof head);
    cr_assert(strstr(head, ",r_x[km],r_y[km],r_z[km],v_x[km/s]") != NULL, "%.300s", head);
    cr_assert(strstr(head, ",r_true_x[km],") && strstr(head, ",v_true_z[km/s]\n"), "%.600s", head);
}

/* An independent check: the exact circular orbit displaced 1 km radially
 * (tests/data/make_leo_offset_oem.py) scores 1 km, all of it radial. */
Test(oem, hand_written_radial_offset_scores_one_km)
{
    char dir[256], sc[300], f[600];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(sc, sizeof sc, "%s/score", dir);
    data_path("leo-circular-radial-1km.oem", f, sizeof f);
    int rc = cli((const char *[]){"score", "--problem", "leo-circular", "--ephemeris", f,
                 "--evals", "1234", "--cpu-s", "0.25", "--quiet", "--out", sc, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    json_t *c = case0(sc);
    cr_assert(fabs(metric(c, "pos_err_max") - 1.0) < 1e-9, "%.17g", metric(c, "pos_err_max"));
    cr_assert(fabs(metric(c, "pos_err_final") - 1.0) < 1e-9);
    cr_assert(fabs(metric(c, "radial_final") - 1.0) < 1e-9, "%.17g", metric(c, "radial_final"));
    cr_assert(fabs(metric(c, "along_track_final")) < 1e-9, "%g", metric(c, "along_track_final"));
    cr_assert(fabs(metric(c, "cross_track_final")) < 1e-9, "%g", metric(c, "cross_track_final"));
    cr_assert_str_eq(json_string_value(json_object_get(c, "method")), "radial-1km");
    const json_t *cost = json_object_get(c, "cost");
    cr_assert_eq(json_integer_value(json_object_get(cost, "evals")), 1234);
    cr_assert_eq(json_real_value(json_object_get(cost, "cpu_s")), 0.25);
    cr_assert(json_is_null(json_object_get(cost, "steps")));
    json_decref(c);
    /* report, baseline and check read it as a run */
    char bl[300];
    snprintf(bl, sizeof bl, "%s/b.json", dir);
    cr_assert_eq(cli((const char *[]){"baseline", sc, "--out", bl, NULL}), 0, "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"check", "--strict", "--baseline", bl, sc, NULL}), 0, "%s%s",
                 out_buf, err_buf);
}

/* A bad file: exit 2, the file, line and keyword named, no folder written. */
static void expect_bad_oem(const char *text, const char *problem, const char *named)
{
    char dir[256], f[300], sc[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(f, sizeof f, "%s/bad.oem", dir);
    snprintf(sc, sizeof sc, "%s/score", dir);
    FILE *fp = fopen(f, "wb");
    cr_assert(fp);
    fputs(text, fp);
    fclose(fp);
    int rc = cli((const char *[]){"score", "--problem", problem, "--ephemeris", f, "--out", sc, NULL});
    cr_assert_eq(rc, 2, "exit %d for %s; stderr: %s", rc, named, err_buf);
    cr_assert(strstr(err_buf, f) != NULL, "file not named: %s", err_buf);
    cr_assert(strstr(err_buf, named) != NULL, "'%s' not named: %s", named, err_buf);
    cr_assert(!pbt_exists(sc), "a run folder was written for %s", named);
}

/* The good file with line `drop` (1-based, 0: none) left out and `add`
 * inserted before line `at` (0: nothing inserted); `replace` swaps the first
 * `from` of the text for `to`. */
static char *variant(const char *good, int drop, int at, const char *add, const char *from,
                     const char *to)
{
    size_t n = strlen(good) + (add ? strlen(add) : 0) + (to ? strlen(to) : 0) + 16;
    char *out = calloc(1, n), *o = out;
    int line = 1;
    for (const char *p = good; *p; line++) {
        const char *e = strchr(p, '\n');
        size_t len = e ? (size_t)(e - p + 1) : strlen(p);
        if (at == line && add)
            o += sprintf(o, "%s\n", add);
        if (line != drop) {
            memcpy(o, p, len);
            o += len;
        }
        p += len;
    }
    if (from) {
        char *hit = strstr(out, from);
        cr_assert(hit, "'%s' not in the file", from);
        char *rest = strdup(hit + strlen(from));
        sprintf(hit, "%s%s", to, rest);
        free(rest);
    }
    return out;
}

Test(oem, bad_files_exit_2_naming_line_and_keyword)
{
    char f[600];
    data_path("leo-circular-radial-1km.oem", f, sizeof f);
    char *good = pbt_slurp_file(f, NULL);
    cr_assert(good);
    /* lines: 1 version, 7 META_START, 9 OBJECT_ID, 10 CENTER_NAME, 14 STOP_TIME,
     * 15 META_STOP, 17.. data */
    char longc[300];
    memset(longc, 'x', sizeof longc);
    memcpy(longc, "COMMENT ", 8);
    longc[sizeof longc - 1] = 0;
    struct { char *text; const char *named; } cases[] = {
        {variant(good, 9, 0, NULL, NULL, NULL), ":14: OBJECT_ID: missing"},
        {variant(good, 4, 0, NULL, NULL, NULL), ":6: CREATION_DATE: missing"},
        {variant(good, 0, 9, "COLOR = blue", NULL, NULL), ":9: COLOR: unknown keyword"},
        {variant(good, 18, 20, "2000-01-01T12:10:00.000 1 2 3 4 5 6", NULL, NULL), ":19: EPOCH: "},
        {variant(good, 0, 0, NULL, "STOP_TIME = 2000-01-01T15:10:00.000", "STOP_TIME = 2000-01-01T13:00:00.000"),
         ":24: EPOCH: 2000-01-01T13:10:00.000 lies outside START_TIME..STOP_TIME"},
        {variant(good, 0, 0, NULL, " 4.76335602741208231e+00", " 4.7633560274120823le+00"), ":17: Y_DOT: "},
        {variant(good, 0, 0, NULL, " 6.00985960526792340e+00\n", "\n"), ":17: data: 6 columns"},
        {variant(good, 0, 3, longc, NULL, NULL), ":3: line: longer than 254"},
        {variant(good, 0, 0, NULL, "OBJECT_NAME = ", "OBJECT_NAME =\t"), ":8: line: a tab"},
        {variant(good, 0, 0, NULL, "radial-1km", "radial\001-1km"), ":8: line: a non-printable byte 0x01"},
        {variant(good, 0, 0, NULL, "CENTER_NAME = EARTH", "CENTER_NAME = MARS"), ":10: CENTER_NAME: 'MARS'"},
        {variant(good, 0, 0, NULL, "REF_FRAME = EME2000", "REF_FRAME = GCRF"), ":11: REF_FRAME: 'GCRF'"},
        {variant(good, 0, 0, NULL, "TIME_SYSTEM = TT", "TIME_SYSTEM = UTC"), ":12: TIME_SYSTEM: 'UTC'"},
        {variant(good, 1, 0, NULL, NULL, NULL), ":1: CCSDS_OEM_VERS: must come first"},
        {variant(good, 15, 0, NULL, NULL, NULL), ":16: META_STOP: missing before this line"},
        {variant(good, 0, 0, NULL, "12:10:00.000 ", "12:1O:00.000 "), ":18: EPOCH: "},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        expect_bad_oem(cases[i].text, "leo-circular", cases[i].named);
        free(cases[i].text);
    }
    /* a NUL byte inside a line */
    {
        char dir[256], bad[300], sc[300];
        pbt_tmpdir(dir, sizeof dir);
        snprintf(bad, sizeof bad, "%s/nul.oem", dir);
        snprintf(sc, sizeof sc, "%s/score", dir);
        FILE *fp = fopen(bad, "wb");
        cr_assert(fp);
        fwrite(good, 1, 30, fp);   /* into line 2, the COMMENT */
        fputc(0, fp);
        fputs(good + 30, fp);
        fclose(fp);
        cr_assert_eq(cli((const char *[]){"score", "--problem", "leo-circular", "--ephemeris", bad,
                     "--out", sc, NULL}), 2, "%s", err_buf);
        cr_assert(strstr(err_buf, ":2: line: a non-printable byte 0x00") && !pbt_exists(sc), "%s", err_buf);
    }
    /* a normalized problem's states are not about the Earth */
    expect_bad_oem(good, "kepler-e0", ":10: CENTER_NAME: 'EARTH'");
    free(good);
    /* a file that is not there */
    char dir[256], sc[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(sc, sizeof sc, "%s/score", dir);
    cr_assert_eq(cli((const char *[]){"score", "--problem", "leo-circular", "--ephemeris",
                 "/nonexistent/x.oem", "--out", sc, NULL}), 2);
    cr_assert(strstr(err_buf, "/nonexistent/x.oem") && !pbt_exists(sc), "%s", err_buf);
}

Test(oem, run_refuses_bad_output_paths_before_running)
{
    char dir[256], run[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    const char *bad[][2] = {{"--ephemeris-out", "/nonexistent/dir/x.oem"}, {"--truth-out", dir},
                            {"--ephemeris-out", "/nonexistent/y.oem"}};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        int rc = cli((const char *[]){"run", "--problem", "kepler-e0", "--method", "rk4",
                     "--steps-per-orbit", "100", "--orbits", "1", bad[i][0], bad[i][1],
                     "--out", run, NULL});
        cr_assert_eq(rc, 2, "exit %d; %s", rc, err_buf);
        cr_assert(strstr(err_buf, bad[i][0]) && strstr(err_buf, bad[i][1]), "%s", err_buf);
        cr_assert(!pbt_exists(run), "a run folder was written");
    }
}

/* A scored trajectory gets growth laws like a run's: its epochs nearest the
 * log-spaced whole periods serve the position fit. rk4 on kepler-e0.5 over
 * 100 orbits at 500 steps per orbit: the OEM it writes, scored back, gives
 * the run's position growth exponent and class to round-off (measured here:
 * 1.825, quadratic). The invariants' fits differ by design: a run's windows
 * cover every step, a scored file's only its records. */
Test(oem, scored_file_gets_the_runs_position_growth_law)
{
    char dir[256], run[300], sc[300], eph[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    snprintf(sc, sizeof sc, "%s/score", dir);
    snprintf(eph, sizeof eph, "%s/rk4.oem", dir);
    cr_assert_eq(cli((const char *[]){"run", "--problem", "kepler-e0.5", "--method", "rk4",
                                      "--steps-per-orbit", "500", "--orbits", "100", "--repeats", "0",
                                      "--ephemeris-out", eph, "--quiet", "--out", run, NULL}),
                 0, "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"score", "--problem", "kepler-e0.5", "--ephemeris", eph,
                                      "--label", "mine", "--quiet", "--out", sc, NULL}),
                 0, "%s", err_buf);
    json_t *a = case0(run), *b = case0(sc);
    double ka = metric(a, "growth_exponent_pos"), kb = metric(b, "growth_exponent_pos");
    cr_assert(fabs(ka - kb) <= 1e-9 * fabs(ka), "run k = %.12g, scored k = %.12g", ka, kb);
    cr_assert_str_eq(json_string_value(json_object_get(json_object_get(b, "metrics"),
                                                       "growth_class_pos")),
                     json_string_value(json_object_get(json_object_get(a, "metrics"),
                                                       "growth_class_pos")));
    cr_assert(ka > 1.5 && ka < 2.25, "rk4's position error grows about quadratically: k = %g", ka);
    json_decref(a);
    json_decref(b);
}
