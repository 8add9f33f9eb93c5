/* test_plugin.c - plug-in methods end to end: the example plug-in
 * (build/plugins/ralston3.so, examples/plugins/ralston3.c) through run,
 * sweep -j 2, select, list and selftest; PB_PLUGINS; broken plug-ins of each
 * kind, built here with cc from small C strings, refused with exit 2 and
 * their reason; a plug-in that crashes in a sweep worker makes its case
 * "crashed"; the SHA-256 of the provenance against the FIPS 180-2 vector. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "test_support.h"
#include "bench/cli/plugins.h"

static char out_buf[1 << 16], err_buf[1 << 16];

static int cli(const char *const *args)
{
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

/* the example plug-in, built by `make` (make test builds it first) */
static void ralston3_path(char *buf, size_t len)
{
    const char *root = getenv("PB_ROOT");
    snprintf(buf, len, "%s/build/plugins/ralston3.so", root ? root : ".");
    cr_assert(pbt_exists(buf), "%s missing: run make first", buf);
}

/* Dummy functions for a record that passes pb_method_check; ADVANCE is the
 * advance's body. */
#define PL_HEAD                                                                             \
    "#include <stdlib.h>\n#include <propbench/plugin.h>\n"                                  \
    "#ifndef PL_FLAGS\n#define PL_FLAGS PB_KIND_FIXED\n#endif\n"                             \
    "#ifndef PL_ADV\n#define PL_ADV adv_\n#endif\n"                                          \
    "static void *a_(int d) { (void)d; return malloc(8); }\n"                               \
    "static int s_(void *w, const pb_force *f, const pb_method_config *c, double t,"        \
    " const double *r, const double *v) { (void)w; (void)f; (void)c; (void)t; (void)r;"    \
    " (void)v; return 0; }\n"                                                               \
    "static int adv_(void *w, double t, pb_step_observer o, void *x) { (void)w; (void)t;"  \
    " (void)o; (void)x; ADVANCE; return 0; }\n"                                             \
    "static void g_(const void *w, double *t, double *r, double *v) { (void)w; *t = 0;"    \
    " for (int i = 0; i < 3; i++) r[i] = v[i] = 0; }\n"                                     \
    "static void st_(const void *w, pb_method_stats *s) { (void)w; s->steps = 0; }\n"       \
    "static void f_(void *w) { free(w); }\n"                                                \
    "static int d_(const void *w, double t, double *r, double *v) { (void)w; (void)t;"     \
    " (void)r; (void)v; return PB_EINVAL; }\n"
#define PL_RECORD(NAME)                                                                     \
    "static const pb_method_type m_ = { PB_METHOD_RECORD_HEAD, .name = \"" NAME "\","      \
    " .description = \"test\", .source = \"test\", .order = 2, .flags = PL_FLAGS,"     \
    " .alloc = a_, .start = s_, .advance = PL_ADV, .get_state = g_, .get_stats = st_,"       \
    " .free = f_, .dense = d_, .dense_order = 1 };\n"                                       \
    "static const pb_method_type *const l_[] = {&m_, NULL};\n"
#define PL_PACK(HEAD)                                                                       \
    "static const pb_method_pack p_ = { " HEAD ", .version = \"0\", .methods = l_ };\n"    \
    "const pb_method_pack *pb_plugin_open(void) { return &p_; }\n"

/* Build src as dir/name.so with cc against the tree's include/; the path in out. */
static void pl_build(const char *dir, const char *name, const char *src, const char *defs,
                     char *out, size_t len)
{
    char c[512], cmd[2048];
    const char *root = getenv("PB_ROOT");
    snprintf(c, sizeof c, "%s/%s.c", dir, name);
    snprintf(out, len, "%s/%s.so", dir, name);
    FILE *f = fopen(c, "w");
    cr_assert_not_null(f);
    fputs(src, f);
    fclose(f);
    snprintf(cmd, sizeof cmd, "cc -std=c11 -shared -fPIC %s -I'%s/include' '%s' -o '%s'",
             defs, root ? root : ".", c, out);
    cr_assert_eq(system(cmd), 0, "%s", cmd);
}

/* A broken plug-in: `list methods --plugin FILE` exits 2 naming the file
 * and the reason, and prints no method table. */
static void expect_refused(const char *so, const char *reason)
{
    int rc = cli((const char *[]){"list", "methods", "--plugin", so, NULL});
    cr_assert_eq(rc, 2, "exit %d for %s; stderr: %s", rc, so, err_buf);
    cr_assert(strstr(err_buf, so), "message does not name %s: %s", so, err_buf);
    cr_assert(strstr(err_buf, reason), "message does not say '%s': %s", reason, err_buf);
    cr_assert(!strstr(out_buf, "rk4"), "a table was printed: %s", out_buf);
}

Test(plugin, sha256_fips_180_2_abc)
{
    /* FIPS 180-2, Appendix B.1: SHA-256("abc") */
    char hex[65];
    pb_sha256_hex("abc", 3, hex);
    cr_assert_str_eq(hex, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    char dir[256], path[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(path, sizeof path, "%s/abc", dir);
    FILE *f = fopen(path, "w");
    cr_assert_not_null(f);
    fputs("abc", f);
    fclose(f);
    cr_assert_eq(pb_sha256_file(path, hex), 0);
    cr_assert_str_eq(hex, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    cr_assert_eq(pb_sha256_file("/nonexistent/x", hex), -1);
}

Test(plugin, list_and_run_with_the_example)
{
    char so[512], dir[256], out[300], path[400], hex[65];
    ralston3_path(so, sizeof so);
    cr_assert_eq(cli((const char *[]){"list", "methods", "--plugin", so, NULL}), 0, "%s",
                 err_buf);
    cr_assert(strstr(out_buf, "ralston3") && strstr(out_buf, "[plug-in"), "%s", out_buf);
    cr_assert(strstr(out_buf, "rk4"), "%s", out_buf);
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/run", dir);
    int rc = cli((const char *[]){"run", "--plugin", so, "--method", "ralston3", "--problem",
                                 "kepler-e0.5", "--steps-per-orbit", "400", "--orbits", "4",
                                 "--out", out, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/summary.json", out);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    json_t *c = json_array_get(json_object_get(doc, "cases"), 0);
    json_t *pl = json_object_get(c, "plugin");
    cr_assert_not_null(pl, "no plugin key");
    cr_assert_eq(pb_sha256_file(so, hex), 0);
    cr_assert_str_eq(json_string_value(json_object_get(pl, "sha256")), hex);
    cr_assert_str_eq(json_string_value(json_object_get(pl, "path")), so);
    cr_assert_str_eq(json_string_value(json_object_get(pl, "version")), "1.0");
    /* 3 evaluations a step, counted by propbench */
    json_t *cost = json_object_get(c, "cost");
    cr_assert_eq(json_integer_value(json_object_get(cost, "evals")), 3 * 1600);
    json_decref(doc);
    /* a built-in case has no plugin key */
    rc = cli((const char *[]){"run", "--plugin", so, "--method", "rk4", "--problem",
                             "kepler-e0.5", "--steps-per-orbit", "100", "--orbits", "1",
                             "--out", out, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    doc = json_load_file(path, 0, NULL);
    cr_assert_null(json_object_get(json_array_get(json_object_get(doc, "cases"), 0), "plugin"));
    json_decref(doc);
}

Test(plugin, sweep_j2_and_select_with_the_example)
{
    char so[512], dir[256], out[300], path[400], sel[300], arg[600];
    ralston3_path(so, sizeof so);
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/sweep", dir);
    snprintf(arg, sizeof arg, "--plugin=%s", so);
    int rc = cli((const char *[]){"sweep", arg, "--methods", "ralston3,rk4", "--problems",
                                 "kepler-e0.5", "--steps-per-orbit", "200,400", "--orbits",
                                 "4", "-j", "2", "--quiet", "--out", out, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/summary.json", out);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    json_t *cases = json_object_get(doc, "cases"), *c;
    size_t i;
    int with = 0;
    cr_assert_eq(json_array_size(cases), 4);
    json_array_foreach(cases, i, c) {
        const char *m = json_string_value(json_object_get(c, "method"));
        json_t *pl = json_object_get(c, "plugin");
        cr_assert_str_eq(json_string_value(json_object_get(c, "status")), "ok");
        cr_assert_eq(pl != NULL, !strcmp(m, "ralston3"), "%s: plugin key", m);
        with += pl != NULL;
        if (pl)
            cr_assert_eq(strlen(json_string_value(json_object_get(pl, "sha256"))), 64);
    }
    cr_assert_eq(with, 2);
    json_decref(doc);
    snprintf(sel, sizeof sel, "%s/select.json", dir);
    rc = cli((const char *[]){"select", "--plugin", so, "--problem", "kepler-e0.5", "--orbits",
                             "4", "--max-pos-err", "1e-4", "--methods", "ralston3", "--quiet",
                             "--out", sel, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    char *s = pbt_slurp_file(sel, NULL);
    cr_assert(s && strstr(s, "ralston3"), "%s", s ? s : "(no file)");
    free(s);
}

Test(plugin, selftest_certifies_the_example_at_order_3)
{
    char so[512];
    ralston3_path(so, sizeof so);
    int rc = cli((const char *[]){"selftest", "--plugin", so, NULL});
    cr_assert_eq(rc, 0, "exit %d: %s%s", rc, out_buf, err_buf);
    cr_assert(strstr(out_buf, "9 of 9 checks passed"), "%s", out_buf);
    /* the observed order: Ralston (1962) is third order; within 0.3 */
    const char *o = strstr(out_buf, "observed order");
    cr_assert_not_null(o, "%s", out_buf);
    double q = NAN;
    const char *steps = strstr(o, "steps");
    cr_assert(steps && sscanf(steps + 5, " %lf", &q) == 1, "%s", o);
    cr_assert(fabs(q - 3) < 0.3, "observed order %g", q);
    rc = cli((const char *[]){"selftest", "--plugin", so, "--method", "ralston3", NULL});
    cr_assert_eq(rc, 0, "%s", out_buf);
    /* a built-in method passes it too; bad input exits 2 */
    cr_assert_eq(cli((const char *[]){"selftest", "--method", "rk4", NULL}), 0, "%s", out_buf);
    cr_assert_eq(cli((const char *[]){"selftest", NULL}), 2);
    cr_assert(strstr(err_buf, "--plugin"), "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"selftest", "--method", "nope", NULL}), 2);
    cr_assert(strstr(err_buf, "nope"), "%s", err_buf);
}

Test(plugin, selftest_fails_a_method_that_does_not_integrate)
{
    char dir[256], so[512];
    pbt_tmpdir(dir, sizeof dir);
    pl_build(dir, "lazy", PL_HEAD PL_RECORD("lazy") PL_PACK("PB_METHOD_PACK_HEAD"),
             "'-DADVANCE=(void)0'", so, sizeof so);
    int rc = cli((const char *[]){"selftest", "--plugin", so, NULL});
    cr_assert_eq(rc, 1, "exit %d: %s", rc, out_buf);
    cr_assert(strstr(out_buf, "FAIL"), "%s", out_buf);
}

Test(plugin, pb_plugins_environment)
{
    char so[512];
    ralston3_path(so, sizeof so);
    setenv("PB_PLUGINS", so, 1);
    int rc = cli((const char *[]){"list", "methods", NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    cr_assert(strstr(out_buf, "ralston3"), "%s", out_buf);
    /* the same file named twice (PB_PLUGINS and --plugin) is loaded once */
    rc = cli((const char *[]){"list", "methods", "--plugin", so, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    const char *first = strstr(out_buf, "\nralston3");
    cr_assert(first && !strstr(first + 1, "\nralston3"), "%s", out_buf);
    /* a copy of it under another name is another plug-in: its name collides */
    char dir[256], copy[600], cmd[1400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(copy, sizeof copy, "%s/copy.so", dir);
    snprintf(cmd, sizeof cmd, "cp '%s' '%s'", so, copy);
    cr_assert_eq(system(cmd), 0);
    rc = cli((const char *[]){"list", "methods", "--plugin", copy, NULL});
    cr_assert_eq(rc, 2, "%s", out_buf);
    cr_assert(strstr(err_buf, "taken"), "%s", err_buf);
    setenv("PB_PLUGINS", "/nonexistent/p.so", 1);
    rc = cli((const char *[]){"list", "methods", NULL});
    unsetenv("PB_PLUGINS");
    cr_assert_eq(rc, 2);
    cr_assert(strstr(err_buf, "/nonexistent/p.so") && strstr(err_buf, "cannot read"), "%s",
              err_buf);
}

Test(plugin, broken_plugins_exit_2_with_their_reason)
{
    char dir[256], so[512], junk[300];
    pbt_tmpdir(dir, sizeof dir);
    pl_build(dir, "nosym", "int pb_something_else = 1;\n", "", so, sizeof so);
    expect_refused(so, "no symbol pb_plugin_open");
    pl_build(dir, "abi", PL_HEAD PL_RECORD("abi") PL_PACK("PB_METHOD_PACK_HEAD, .abi = 99"),
             "'-DADVANCE=(void)0'", so, sizeof so);
    expect_refused(so, "interface version 99");
    pl_build(dir, "size", PL_HEAD PL_RECORD("size") PL_PACK("PB_METHOD_PACK_HEAD, .force_size = 8"),
             "'-DADVANCE=(void)0'", so, sizeof so);
    expect_refused(so, "pb_force is 8 bytes");
    pl_build(dir, "nullfn", PL_HEAD PL_RECORD("nullfn") PL_PACK("PB_METHOD_PACK_HEAD"),
             "'-DADVANCE=(void)0' -DPL_ADV=0", so, sizeof so);
    expect_refused(so, "is NULL");
    pl_build(dir, "flags", PL_HEAD PL_RECORD("flags") PL_PACK("PB_METHOD_PACK_HEAD"),
             "'-DADVANCE=(void)0' -DPL_FLAGS=3", so, sizeof so);
    expect_refused(so, "exactly one of PB_KIND_FIXED and PB_KIND_ADAPTIVE");
    pl_build(dir, "collide", PL_HEAD PL_RECORD("rk4") PL_PACK("PB_METHOD_PACK_HEAD"),
             "'-DADVANCE=(void)0'", so, sizeof so);
    expect_refused(so, "method rk4: the name is taken by a built-in method");
    snprintf(junk, sizeof junk, "%s/junk.so", dir);
    FILE *f = fopen(junk, "w");
    cr_assert_not_null(f);
    fputs("not an ELF file\n", f);
    fclose(f);
    expect_refused(junk, "not loadable");
    /* every verb that takes a method refuses it the same way */
    const char *verbs[] = {"run", "sweep", "select", "selftest", NULL};
    for (int i = 0; verbs[i]; i++) {
        cr_assert_eq(cli((const char *[]){verbs[i], "--plugin", junk, NULL}), 2, "%s", verbs[i]);
        cr_assert(strstr(err_buf, junk), "%s: %s", verbs[i], err_buf);
    }
    cr_assert_eq(cli((const char *[]){"list", "--plugin", NULL}), 2);
    cr_assert(strstr(err_buf, "--plugin needs"), "%s", err_buf);
}

/* A plug-in whose advance aborts: its sweep case is recorded as crashed, the
 * other cases finish (the sweep's worker per case). */
Test(plugin, crashing_plugin_makes_its_case_crashed)
{
    char dir[256], so[512], out[300], path[400];
    pbt_tmpdir(dir, sizeof dir);
    pl_build(dir, "crashy", PL_HEAD PL_RECORD("crashy") PL_PACK("PB_METHOD_PACK_HEAD"),
             "'-DADVANCE=abort()'", so, sizeof so);
    snprintf(out, sizeof out, "%s/sweep", dir);
    int rc = cli((const char *[]){"sweep", "--plugin", so, "--methods", "crashy,rk4",
                                 "--problems", "kepler-e0", "--steps-per-orbit", "100",
                                 "--orbits", "2", "-j", "2", "--quiet", "--out", out, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/summary.json", out);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    json_t *cases = json_object_get(doc, "cases"), *c;
    size_t i;
    cr_assert_eq(json_array_size(cases), 2);
    json_array_foreach(cases, i, c) {
        const char *m = json_string_value(json_object_get(c, "method"));
        const char *st = json_string_value(json_object_get(c, "status"));
        cr_assert_str_eq(st, !strcmp(m, "crashy") ? "crashed" : "ok", "%s", m);
    }
    json_decref(doc);
}

/* A method that keeps heap memory from every advance fails the heap check
 * (and only it, of the contract checks it can reach: the method does not
 * integrate, so the accuracy checks fail too; the heap row must say FAIL). */
Test(plugin, selftest_sees_an_advance_that_keeps_heap_memory)
{
    /* under the sanitizers the heap is ASan's, which mallinfo2 does not see,
     * and LeakSanitizer ends the run on the deliberate leak */
    if (pbt_sanitized())
        cr_skip_test("the heap check reads glibc's allocator");
    char dir[256], so[512];
    pbt_tmpdir(dir, sizeof dir);
    pl_build(dir, "leaky", PL_HEAD PL_RECORD("leaky") PL_PACK("PB_METHOD_PACK_HEAD"),
             "'-DADVANCE=if (!malloc(4096)) return 1'", so, sizeof so);
    int rc = cli((const char *[]){"selftest", "--plugin", so, NULL});
    cr_assert_eq(rc, 1, "exit %d: %s", rc, out_buf);
    const char *row = strstr(out_buf, "heap kept by an advance");
    cr_assert_not_null(row, "%s", out_buf);
    char line[256];
    const char *eol = strchr(row, '\n');
    snprintf(line, sizeof line, "%.*s", eol ? (int)(eol - row) : 200, row);
    long kept = 0;
    cr_assert_eq(sscanf(line + strlen("heap kept by an advance (mallinfo2)"), "%ld", &kept), 1);
    cr_assert(strstr(line, "FAIL") && kept >= 4096, "%s", line);
}
