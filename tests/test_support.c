/* test_support.c - see test_support.h. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "test_support.h"
#include "problems/twobody.h"
#include "bench/measure/force_counter.h"

pbt_result pbt_integrate(const pb_method_type *m, const pb_problem *p,
                         const pb_method_config *cfg, double t_end)
{
    return pbt_integrate_split(m, p, cfg, t_end, 1);
}

pbt_result pbt_integrate_split(const pb_method_type *m, const pb_problem *p,
                               const pb_method_config *cfg, double t_end, int pieces)
{
    pbt_result res;
    memset(&res, 0, sizeof res);
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    void *ws = m->alloc(p->dim);
    if (!ws) {
        res.status = PB_ENOMEM;
        return res;
    }
    res.status = m->start(ws, &f, cfg, p->t0, p->r0, p->v0);
    for (int k = 1; k <= pieces && !res.status; k++)
        res.status = m->advance(ws, k == pieces ? t_end : p->t0 + (t_end - p->t0) * k / pieces, NULL, NULL);
    m->get_state(ws, &res.t, res.r, res.v);
    pb_method_stats st;
    m->get_stats(ws, &st);
    res.steps = st.steps;
    res.rejected = st.rejected;
    res.output_cut = st.output_cut;
    res.t_fail = st.t_fail;
    res.evals = c.evals;
    m->free(ws);
    return res;
}

double pbt_pos_error(const pb_problem *p, const pbt_result *res)
{
    __float128 rq[PB_DIM_MAX], vq[PB_DIM_MAX];
    if (!p->exact_q || p->exact_q(p, res->t, rq, vq))
        return NAN;
    __float128 s = 0;
    for (int i = 0; i < p->dim; i++) {
        __float128 d = (__float128)res->r[i] - rq[i];
        s += d * d;
    }
    return sqrt((double)s);
}

static int support_energy_observe(void *ctx, double t, const double *r, const double *v)
{
    pbt_energy_split *o = ctx;
    double d = fabs(o->p->energy(o->p, t, r, v) - o->e0) / fabs(o->e0);
    if (++o->n <= o->split)
        o->max_early = fmax(o->max_early, d);
    else
        o->max_late = fmax(o->max_late, d);
    return 0;
}

pbt_energy_split pbt_energy_split_run(const pb_method_type *m, const pb_problem *p,
                                      int steps_per_orbit, long orbits)
{
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = p->period / steps_per_orbit;
    pbt_energy_split o = {p, p->energy(p, p->t0, p->r0, p->v0), 0,
                          orbits / 10 * steps_per_orbit, 0, 0};
    void *ws = m->alloc(p->dim);
    cr_assert_not_null(ws);
    cr_assert_eq(m->start(ws, &f, &cfg, p->t0, p->r0, p->v0), PB_OK);
    int s = m->advance(ws, p->t0 + (double)(orbits * steps_per_orbit) * cfg.h,
                       support_energy_observe, &o);
    m->free(ws);
    cr_assert_eq(s, PB_OK, "%s failed: %s", m->name, pb_strerror(s));
    cr_assert_eq(o.n, orbits * steps_per_orbit);
    return o;
}

void pbt_kepler(pb_problem *p, double e)
{
    double r0[3] = {1 - e, 0, 0}, v0[3] = {0, sqrt((1 + e) / (1 - e)), 0};
    pb_problem_init_twobody(p, "kepler", "normalized Kepler orbit", PB_UNITS_NORMALIZED, 1.0,
                            r0, v0);
}

int pbt_nan_after_1_accel(const pb_problem *p, double t, const double *r, const double *v,
                          double *a)
{
    (void)p;
    (void)v;
    double rr = sqrt(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]), k = -1.0 / (rr * rr * rr);
    for (int i = 0; i < 3; i++)
        a[i] = t > 1.0 ? (double)NAN : k * r[i];
    return PB_OK;
}

int pbt_sanitized(void)
{
    const char *s = getenv("PB_SANITIZED");
    return s && *s && strcmp(s, "0") != 0;
}

#include <fcntl.h>
#include <stdio.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

void pbt_read_into(const char *path, char *buf, size_t len)
{
    if (!buf || !len)
        return;
    buf[0] = 0;
    FILE *f = fopen(path, "rb");
    if (!f)
        return;
    size_t n = fread(buf, 1, len - 1, f);
    buf[n] = 0;
    fclose(f);
}

char *pbt_slurp_file(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *buf = n >= 0 ? malloc((size_t)n + 1) : NULL;
    size_t got = buf ? fread(buf, 1, (size_t)n, f) : 0;
    fclose(f);
    if (!buf)
        return NULL;
    buf[got] = 0;
    if (len)
        *len = got;
    return buf;
}

int pbt_run_cli(const char *const *args, char *out, size_t outlen, char *err, size_t errlen)
{
    const char *bin = getenv("PB_BIN");
    if (!bin)
        bin = "build/propbench";
    char dir[256];
    pbt_tmpdir(dir, sizeof dir);
    char fo[300], fe[300];
    snprintf(fo, sizeof fo, "%s/stdout", dir);
    snprintf(fe, sizeof fe, "%s/stderr", dir);
    const char *argv[64];
    int n = 0;
    argv[n++] = bin;
    for (int i = 0; args[i] && n < 63; i++)
        argv[n++] = args[i];
    argv[n] = NULL;
    fflush(NULL);
    pid_t pid = fork();
    if (pid == 0) {
        int o = open(fo, O_WRONLY | O_CREAT | O_TRUNC, 0644);
        int e = open(fe, O_WRONLY | O_CREAT | O_TRUNC, 0644);
        if (o < 0 || e < 0)
            _exit(127);
        dup2(o, 1);
        dup2(e, 2);
        const char *root = getenv("PB_ROOT");
        if (root && chdir(root))
            _exit(127);
        execv(bin, (char *const *)argv);
        _exit(127);
    }
    int st = 0;
    if (pid < 0 || waitpid(pid, &st, 0) < 0)
        return -1;
    pbt_read_into(fo, out, outlen);
    pbt_read_into(fe, err, errlen);
    unlink(fo);
    unlink(fe);
    rmdir(dir);
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

void pbt_tmpdir(char *buf, size_t len)
{
    /* below $PB_TMP when make test sets it, so one rm -rf tidies a run */
    const char *root = getenv("PB_TMP");
    if (!root || !*root)
        root = "/tmp";
    mkdir(root, 0755);
    snprintf(buf, len, "%s/pbt-XXXXXX", root);
    if (!mkdtemp(buf))
        buf[0] = 0;
}

int pbt_exists(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0;
}

int pbt_line_has(const char *text, const char *a, const char *b, const char *c)
{
    for (const char *l = text; l && *l;) {
        const char *e = strchr(l, '\n');
        size_t n = e ? (size_t)(e - l) : strlen(l);
        char line[600];
        snprintf(line, sizeof line, "%.*s", (int)(n < sizeof line ? n : sizeof line - 1), l);
        if (strstr(line, a) && strstr(line, b) && strstr(line, c))
            return 1;
        l = e ? e + 1 : NULL;
    }
    return 0;
}
