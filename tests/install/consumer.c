/* consumer.c - a user's program built outside the tree against an installed
 * propbench (pkg-config propbench): its own method, the explicit midpoint
 * rule, written against the public headers alone and driven on a built-in
 * orbit, beside the built-in rk4. Exits 1 when a number is off. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <propbench/propbench.h>

/* The explicit midpoint rule (Runge 1895), order 2: Hairer, Norsett &
 * Wanner, Solving ODEs I, Sec. II.1, eq. (1.3); 2 evaluations a step. */
typedef struct {
    int dim;
    pb_force f;
    double h, t0, t;
    long n, steps;
    double y[6], k[6], m[6];
    pb_dense_span span;   /* dense output from the library's Hermite helper */
} midpoint_ws;

static void *midpoint_alloc(int dim)
{
    if (dim < 1 || dim > 3)
        return NULL;
    midpoint_ws *w = calloc(1, sizeof *w);
    if (w)
        w->dim = dim;
    return w;
}

static int midpoint_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                          const double *r0, const double *v0)
{
    midpoint_ws *w = ws;
    if (!(cfg->h > 0))
        return PB_EINVAL;
    w->f = *f;
    w->h = cfg->h;
    w->t0 = w->t = t0;
    w->n = w->steps = 0;
    memcpy(w->y, r0, (size_t)w->dim * sizeof *r0);
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof *v0);
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    return PB_OK;
}

/* y' = (v, a(t, r, v)) into k */
static int midpoint_deriv(midpoint_ws *w, double t, const double *y, double *k)
{
    memcpy(k, y + w->dim, (size_t)w->dim * sizeof *k);
    return w->f.accel(w->f.ctx, t, y, y + w->dim, k + w->dim);
}

static int midpoint_advance(void *ws, double t_out, pb_step_observer obs, void *ctx)
{
    midpoint_ws *w = ws;
    long target = pb_grid_index(w->t0, w->h, t_out);
    if (target < 0)
        return PB_EINVAL;
    int n2 = 2 * w->dim;
    while (w->n < target) {
        int s = midpoint_deriv(w, w->t, w->y, w->k);
        for (int i = 0; s == PB_OK && i < n2; i++)
            w->m[i] = w->y[i] + 0.5 * w->h * w->k[i];
        if (s == PB_OK)
            s = midpoint_deriv(w, w->t + 0.5 * w->h, w->m, w->k);
        if (s != PB_OK)
            return s;
        for (int i = 0; i < n2; i++)
            w->y[i] += w->h * w->k[i];
        w->n++;
        w->steps++;
        w->t = w->t0 + (double)w->n * w->h;
        pb_dense_push(&w->span, w->t, w->y, w->y + w->dim, NULL);
        if (obs && (s = obs(ctx, w->t, w->y, w->y + w->dim)))
            return s;
    }
    return PB_OK;
}

static void midpoint_get_state(const void *ws, double *t, double *r, double *v)
{
    const midpoint_ws *w = ws;
    *t = w->t;
    memcpy(r, w->y, (size_t)w->dim * sizeof *r);
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof *v);
}

static void midpoint_get_stats(const void *ws, pb_method_stats *st)
{
    memset(st, 0, sizeof *st);
    st->steps = ((const midpoint_ws *)ws)->steps;
}

/* cubic Hermite of positions and velocities: order 2, the method's own */
static int midpoint_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const midpoint_ws *)ws)->span, t, r, v);
}

static void midpoint_free(void *ws)
{
    free(ws);
}

static const pb_method_type midpoint = {
    PB_METHOD_RECORD_HEAD,
    .name = "team-midpoint",
    .description = "explicit midpoint rule, 2 evaluations a step",
    .source = "Runge (1895); Hairer, Norsett & Wanner I, Sec. II.1",
    .order = 2,
    .flags = PB_KIND_FIXED,
    .alloc = midpoint_alloc,
    .start = midpoint_start,
    .advance = midpoint_advance,
    .get_state = midpoint_get_state,
    .get_stats = midpoint_get_stats,
    .free = midpoint_free,
    .dense = midpoint_dense,
    .dense_order = 2,
};

static int failures;

static void expect(int ok, const char *what)
{
    printf("%s: %s\n", ok ? "ok  " : "FAIL", what);
    failures += !ok;
}

/* Position error after one orbit of the e = 0.6 Kepler orbit at n steps
 * (one orbit from periapsis reaches the asymptotic range sooner than ten,
 * where the accumulated phase error is still pre-asymptotic). */
static double run(const pb_method_type *m, int n, pb_drive_outcome *o)
{
    pb_drive_request rq = {.problem = "kepler-e0.6", .method = m, .steps_per_orbit = n,
                           .orbits = 1};
    char err[256];
    if (pb_drive_case(&rq, o, err, sizeof err)) {
        printf("FAIL: %s at n=%d: %s\n", m->name, n, err);
        failures++;
        return NAN;
    }
    printf("      %s n=%d: %s, pos_err_final %.6e, evals %ld, steps %ld\n", m->name, n,
           o->status_name, o->pos_err_final, o->evals, o->steps);
    return o->pos_err_final;
}

/* Observed order from two runs at n and 2n steps per orbit. */
static double order(const pb_method_type *m, int n, pb_drive_outcome *o)
{
    double e1 = run(m, n, o), e2 = run(m, 2 * n, o);
    return log2(e1 / e2);
}

int main(void)
{
    char err[256];
    pb_drive_outcome o;
    expect(!strcmp(pb_version(), PB_VERSION), "library version matches the headers");

    /* nominal orders: 2 for the midpoint rule, 4 for RK4 (textbook; within 0.3
     * in the asymptotic range, as the project's own order tests) */
    double p2 = order(&midpoint, 2000, &o);
    printf("      observed order of team-midpoint: %.3f\n", p2);
    expect(fabs(p2 - 2) < 0.3, "team-midpoint converges at order 2 +- 0.3");
    expect(o.status == PB_OK && o.evals == 2 * o.steps, "propbench counted 2 evaluations a step");
    const pb_method_type *rk4 = pb_method_find("rk4");
    expect(rk4 != NULL, "the built-in rk4 is found by name");
    if (rk4) {
        double p4 = order(rk4, 800, &o);
        printf("      observed order of rk4: %.3f\n", p4);
        expect(fabs(p4 - 4) < 0.3, "rk4 converges at order 4 +- 0.3");
    }

    /* a perturbed orbit (J2) is measured against a reference trajectory; with
     * no cache_dir nothing may be written in the caller's folder */
    pb_drive_request j2 = {.problem = "leo-j2", .method = &midpoint, .steps_per_orbit = 2000,
                           .orbits = 1};
    int j2rc = pb_drive_case(&j2, &o, err, sizeof err);
    printf("      team-midpoint on leo-j2: %s, pos_err_final %.3e km, evals %ld\n",
           j2rc ? err : o.status_name, o.pos_err_final, o.evals);
    struct stat st;
    expect(j2rc == 0 && o.status == PB_OK && o.evals == 2 * o.steps && o.steps == 2000,
           "a J2 case runs against its reference trajectory");
    expect(stat("results", &st) != 0, "nothing was written in the working folder");

    /* records built against other headers are refused, not misread */
    pb_method_type other = midpoint;
    other.abi = PB_METHOD_ABI + 1;
    pb_drive_request rq = {.problem = "kepler-e0", .method = &other, .steps_per_orbit = 100};
    int rc = pb_drive_case(&rq, &o, err, sizeof err);
    printf("      %s\n", err);
    expect(rc == -1 && strstr(err, "interface version"), "a record of another ABI is refused");
    other = midpoint;
    other.size -= 8;
    rc = pb_drive_case(&rq, &o, err, sizeof err);
    printf("      %s\n", err);
    expect(rc == -1 && strstr(err, "bytes"), "a record of another size is refused");
    rq.method = &midpoint;
    rq.steps_per_orbit = 0;
    rc = pb_drive_case(&rq, &o, err, sizeof err);
    expect(rc == -1 && strstr(err, "steps_per_orbit"), "a missing step is named by its field");
    rq.steps_per_orbit = 100;
    rq.problem = "no-such-orbit";
    rc = pb_drive_case(&rq, &o, err, sizeof err);
    expect(rc == -1 && strstr(err, "no-such-orbit"), "an unknown problem is named");
    printf("%s\n", failures ? "consumer: FAILED" : "consumer: all checks passed");
    return failures ? 1 : 0;
}
