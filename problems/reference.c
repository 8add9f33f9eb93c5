/* reference.c - reference trajectories by Gragg-Bulirsch-Stoer extrapolation
 * (Hairer, Norsett, Wanner, Solving ODEs I, Sec. II.9): the modified midpoint
 * rule with step numbers 2, 4, ..., 20 extrapolated in h^2 (order 20), step
 * control from the last two tableau entries, all in __float128; the force
 * models are re-evaluated here in __float128, never the problem's double accel. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <quadmath.h>
#include "problems/reference.h"
#include "problems/files.h"
#include "problems/hash.h"

typedef __float128 ref_real;

#define REF_N 6                 /* state (r, v), 3 + 3 */
#define REF_K 10                /* extrapolation columns: order 2K */
#define REF_TOL_COARSE 1e-24L
#define REF_TOL_FINE 1e-28L
#define REF_MAX_STEPS 20000000L
#define REF_VERSION "pb-reference gbs20 float128 v1"

static void ref_deriv(const pb_problem *p, const ref_real *y, ref_real *dy)
{
    const ref_real *r = y, *v = y + 3;
    ref_real *a = dy + 3;
    dy[0] = v[0];
    dy[1] = v[1];
    dy[2] = v[2];
    ref_real mu = p->mu;
    if (p->force == PB_FORCE_CR3BP) {
        ref_real mu1 = 1.0Q - mu;
        ref_real x1 = r[0] + mu, x2 = r[0] - mu1, yz2 = r[1] * r[1] + r[2] * r[2];
        ref_real d1 = x1 * x1 + yz2, d2 = x2 * x2 + yz2;
        d1 *= sqrtq(d1);
        d2 *= sqrtq(d2);
        ref_real g = mu1 / d1 + mu / d2;
        a[0] = r[0] + 2.0Q * v[1] - mu1 * x1 / d1 - mu * x2 / d2;
        a[1] = r[1] - 2.0Q * v[0] - g * r[1];
        a[2] = -g * r[2];
        return;
    }
    ref_real r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
    ref_real c = -mu / (r2 * sqrtq(r2));
    if (p->force == PB_FORCE_J2) {
        ref_real R = p->body_radius, z2 = r[2] * r[2] / r2;
        ref_real k = 1.5Q * (ref_real)p->j2 * R * R / r2;
        ref_real cxy = c * (1.0Q + k * (1.0Q - 5.0Q * z2));
        a[0] = cxy * r[0];
        a[1] = cxy * r[1];
        a[2] = c * (1.0Q + k * (3.0Q - 5.0Q * z2)) * r[2];
        return;
    }
    a[0] = c * r[0];
    a[1] = c * r[1];
    a[2] = c * r[2];
}

/* Gragg's modified midpoint rule: m substeps of size H/m from y0 (f0 = f(y0)). */
static void ref_midpoint(const pb_problem *p, const ref_real *y0, const ref_real *f0,
                         ref_real H, int m, ref_real *out)
{
    ref_real h = H / m, zp[REF_N], z[REF_N], zn[REF_N], f[REF_N];
    for (int i = 0; i < REF_N; i++) {
        zp[i] = y0[i];
        z[i] = y0[i] + h * f0[i];
    }
    for (int j = 1; j < m; j++) {
        ref_deriv(p, z, f);
        for (int i = 0; i < REF_N; i++) {
            zn[i] = zp[i] + 2.0Q * h * f[i];
            zp[i] = z[i];
            z[i] = zn[i];
        }
    }
    ref_deriv(p, z, f);
    for (int i = 0; i < REF_N; i++)
        out[i] = 0.5Q * (z[i] + zp[i] + h * f[i]);
}

static ref_real ref_norm3(const ref_real *x)
{
    return sqrtq(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]);
}

/* One extrapolated step of size H; y1 receives the result, the return value
 * is the scaled error estimate (relative to |r| and |v| separately). */
static ref_real ref_step(const pb_problem *p, const ref_real *y0, ref_real H, ref_real *y1)
{
    ref_real T[REF_K][REF_N], f0[REF_N];
    ref_deriv(p, y0, f0);
    for (int j = 0; j < REF_K; j++) {
        int nj = 2 * (j + 1);
        ref_midpoint(p, y0, f0, H, nj, T[j]);
        /* Aitken-Neville in place: T[j-k] becomes the k-times extrapolated value. */
        for (int k = 1; k <= j; k++) {
            int nk = 2 * (j - k + 1);
            ref_real q = (ref_real)nj / nk;
            ref_real den = q * q - 1.0Q;
            for (int i = 0; i < REF_N; i++)
                T[j - k][i] = T[j - k + 1][i] + (T[j - k + 1][i] - T[j - k][i]) / den;
        }
    }
    /* T[0] is the fully extrapolated value, T[1] the one before it. */
    ref_real dr[3], dv[3];
    for (int i = 0; i < 3; i++) {
        dr[i] = T[0][i] - T[1][i];
        dv[i] = T[0][i + 3] - T[1][i + 3];
    }
    ref_real sr = fmaxq(ref_norm3(y0), ref_norm3(T[0]));
    ref_real sv = fmaxq(ref_norm3(y0 + 3), ref_norm3(T[0] + 3));
    memcpy(y1, T[0], sizeof T[0]);
    ref_real er = sr > 0 ? ref_norm3(dr) / sr : ref_norm3(dr);
    ref_real ev = sv > 0 ? ref_norm3(dv) / sv : ref_norm3(dv);
    return fmaxq(er, ev);
}

static int ref_finite(const ref_real *y)
{
    for (int i = 0; i < REF_N; i++)
        if (!finiteq(y[i]))
            return 0;
    return 1;
}

int pb_reference_propagate(const pb_problem *p, const double *times, int n,
                           long double tol, long double *r, long double *v,
                           long *steps)
{
    if (!p || p->dim < 1 || p->dim > 3 || n < 0 || (n > 0 && !times) || !(tol > 0))
        return PB_EINVAL;
    ref_real y[REF_N] = {0}, y1[REF_N];
    for (int i = 0; i < p->dim; i++) {
        y[i] = p->r0[i];
        y[i + 3] = p->v0[i];
    }
    ref_real t = p->t0;
    ref_real vn = ref_norm3(y + 3);
    ref_real h = vn > 0 ? 0.01Q * ref_norm3(y) / vn : 1e-3Q;
    if (p->period > 0 && h > p->period / 50)
        h = p->period / 50;
    long nsteps = 0;
    const ref_real expo = 1.0Q / (2 * REF_K - 1);
    for (int k = 0; k < n; k++) {
        ref_real tk = times[k];
        if (tk < t || !isfinite(tk))
            return PB_EINVAL;
        while (t < tk) {
            ref_real H = h, left = tk - t;
            int last = H >= left;
            if (last)
                H = left;
            ref_real err = ref_step(p, y, H, y1);
            if (!ref_finite(y1) || !finiteq(err))
                return PB_ENONFINITE;
            ref_real fac = err > 0 ? 0.9Q * powq(tol / err, expo) : 4.0Q;
            fac = fminq(4.0Q, fmaxq(0.2Q, fac));
            if (err <= tol) {
                memcpy(y, y1, sizeof y);
                t = last ? tk : t + H;
                if (++nsteps > REF_MAX_STEPS)
                    return PB_EMAXSTEPS;
                if (!last || fac < 1)
                    h = H * fac;
            } else {
                h = H * fac;
            }
            if (h < 1e-30Q * fabsq(t) || h <= 0)
                return PB_EMINSTEP;
        }
        for (int i = 0; i < PB_DIM_MAX; i++) {
            r[(size_t)k * PB_DIM_MAX + i] = i < p->dim ? y[i] : 0.0Q;
            v[(size_t)k * PB_DIM_MAX + i] = i < p->dim ? y[i + 3] : 0.0Q;
        }
    }
    if (steps)
        *steps = nsteps;
    return PB_OK;
}

uint64_t pb_reference_key(const pb_problem *p, const double *times, int n)
{
    uint64_t h = PB_FNV1A64_INIT;
    int force = (int)p->force;
    /* as doubles: a long double's padding bytes are indeterminate */
    double tols[2] = {(double)REF_TOL_COARSE, (double)REF_TOL_FINE};
    h = pb_fnv1a64(h, REF_VERSION, sizeof REF_VERSION);
    h = pb_fnv1a64(h, tols, sizeof tols);
    h = pb_fnv1a64(h, &force, sizeof force);
    h = pb_fnv1a64(h, &p->dim, sizeof p->dim);
    h = pb_fnv1a64(h, &p->mu, sizeof p->mu);
    h = pb_fnv1a64(h, &p->body_radius, sizeof p->body_radius);
    h = pb_fnv1a64(h, &p->j2, sizeof p->j2);
    h = pb_fnv1a64(h, &p->t0, sizeof p->t0);
    h = pb_fnv1a64(h, p->r0, sizeof p->r0);
    h = pb_fnv1a64(h, p->v0, sizeof p->v0);
    h = pb_fnv1a64(h, &n, sizeof n);
    if (n > 0)
        h = pb_fnv1a64(h, times, (size_t)n * sizeof *times);
    return h;
}

/* ---- cache: <dir>/ref-<key>.bin = magic, key, n, then r, v, floor ---- */
static const char ref_magic[8] = "PBREF01";

static void ref_cache_path(char *buf, size_t len, const char *dir, uint64_t key)
{
    snprintf(buf, len, "%s/ref-%016llx.bin", dir, (unsigned long long)key);
}

static int ref_cache_read(const char *path, uint64_t key, int n, long double *r,
                          long double *v, double *floor)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return 0;
    char magic[8];
    uint64_t k;
    int nn;
    size_t m = (size_t)n * PB_DIM_MAX;
    int ok = fread(magic, 1, 8, f) == 8 && memcmp(magic, ref_magic, 8) == 0
             && fread(&k, sizeof k, 1, f) == 1 && k == key
             && fread(&nn, sizeof nn, 1, f) == 1 && nn == n
             && fread(r, sizeof *r, m, f) == m && fread(v, sizeof *v, m, f) == m
             && fread(floor, sizeof *floor, (size_t)n, f) == (size_t)n;
    fclose(f);
    return ok;
}

/* Temp file + rename so an interrupted run never leaves a half-written entry.
 * A failed write only loses the cache entry, never the result. */
static void ref_cache_write(const char *dir, const char *path, uint64_t key, int n,
                            const long double *r, const long double *v,
                            const double *floor)
{
    if (pb_mkdirs(dir))
        return;
    char tmp[4200];
    snprintf(tmp, sizeof tmp, "%s.tmp.%ld", path, (long)getpid());
    FILE *f = fopen(tmp, "wb");
    if (!f)
        return;
    size_t m = (size_t)n * PB_DIM_MAX;
    int ok = fwrite(ref_magic, 1, 8, f) == 8 && fwrite(&key, sizeof key, 1, f) == 1
             && fwrite(&n, sizeof n, 1, f) == 1 && fwrite(r, sizeof *r, m, f) == m
             && fwrite(v, sizeof *v, m, f) == m
             && fwrite(floor, sizeof *floor, (size_t)n, f) == (size_t)n;
    ok = (fclose(f) == 0) && ok;
    if (!ok || rename(tmp, path))
        remove(tmp);
}

int pb_reference_build(const pb_problem *p, const double *times, int n,
                       const char *cache_dir, long double *r, long double *v,
                       double *floor)
{
    if (!p || n < 0 || (n > 0 && (!times || !r || !v || !floor)))
        return PB_EINVAL;
    uint64_t key = pb_reference_key(p, times, n);
    char path[4096];
    if (cache_dir) {
        ref_cache_path(path, sizeof path, cache_dir, key);
        if (ref_cache_read(path, key, n, r, v, floor))
            return PB_OK;
    }
    size_t m = (size_t)(n > 0 ? n : 1) * PB_DIM_MAX;
    long double *rc = malloc(2 * m * sizeof *rc);
    if (!rc)
        return PB_ENOMEM;
    long double *vc = rc + m;
    int s = pb_reference_propagate(p, times, n, REF_TOL_COARSE, rc, vc, NULL);
    if (!s)
        s = pb_reference_propagate(p, times, n, REF_TOL_FINE, r, v, NULL);
    if (!s) {
        for (int k = 0; k < n; k++) {
            long double d2 = 0, r2 = 0;
            for (int i = 0; i < PB_DIM_MAX; i++) {
                long double d = rc[(size_t)k * PB_DIM_MAX + i] - r[(size_t)k * PB_DIM_MAX + i];
                d2 += d * d;
                r2 += r[(size_t)k * PB_DIM_MAX + i] * r[(size_t)k * PB_DIM_MAX + i];
            }
            /* The coarse-fine difference bounds the fine run's error; never
             * claim better than a few units of long-double round-off. */
            double fl = (double)sqrtq(d2), ro = 1e-18 * (double)sqrtq(r2);
            floor[k] = fl > ro ? fl : ro;
        }
        if (cache_dir)
            ref_cache_write(cache_dir, path, key, n, r, v, floor);
    }
    free(rc);
    return s;
}
