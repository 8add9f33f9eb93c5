/* gen_gj_coeffs.c - writes integrators/gauss_jackson_coeffs.h: the eighth-order
 * Gauss-Jackson ordinate coefficients, derived exactly in __int128 rational
 * arithmetic from the backward-difference generating functions (sum conventions
 * of Berry & Healy (2004), J. Astronaut. Sci. 52(3), from memory).
 * Build and run: cc -std=c11 -O2 scripts/gen_gj_coeffs.c -o gen && ./gen > integrators/gauss_jackson_coeffs.h */
#include <stdio.h>
#include <stdlib.h>

typedef __int128 gen_int;
typedef struct { gen_int n, d; } gen_q;

#define GEN_NS 14 /* series terms kept; rows need gamma up to x^10 */
#define GEN_NP 9  /* points in the window: differences up to the 8th */

static gen_int gen_gcd(gen_int a, gen_int b)
{
    if (a < 0) a = -a;
    if (b < 0) b = -b;
    while (b) {
        gen_int t = a % b;
        a = b;
        b = t;
    }
    return a;
}

static gen_int gen_mul_i(gen_int a, gen_int b)
{
    gen_int r;
    if (__builtin_mul_overflow(a, b, &r)) {
        fprintf(stderr, "gen_gj_coeffs: overflow\n");
        exit(1);
    }
    return r;
}

static gen_int gen_add_i(gen_int a, gen_int b)
{
    gen_int r;
    if (__builtin_add_overflow(a, b, &r)) {
        fprintf(stderr, "gen_gj_coeffs: overflow\n");
        exit(1);
    }
    return r;
}

static gen_q gen_make(gen_int n, gen_int d)
{
    if (d < 0) {
        n = -n;
        d = -d;
    }
    gen_int g = gen_gcd(n, d);
    if (g > 1) {
        n /= g;
        d /= g;
    }
    return (gen_q){n, d};
}

static gen_q gen_add(gen_q a, gen_q b)
{
    gen_int g = gen_gcd(a.d, b.d);
    return gen_make(gen_add_i(gen_mul_i(a.n, b.d / g), gen_mul_i(b.n, a.d / g)),
                    gen_mul_i(a.d / g, b.d));
}

static gen_q gen_mul(gen_q a, gen_q b)
{
    gen_int g1 = gen_gcd(a.n, b.d), g2 = gen_gcd(b.n, a.d);
    if (g1 == 0) g1 = 1;
    if (g2 == 0) g2 = 1;
    return gen_make(gen_mul_i(a.n / g1, b.n / g2), gen_mul_i(a.d / g2, b.d / g1));
}

static gen_q gen_int_q(long v) { return (gen_q){v, 1}; }

/* c = a * b, truncated */
static void gen_series_mul(const gen_q *a, const gen_q *b, gen_q *c)
{
    for (int k = 0; k < GEN_NS; k++) {
        c[k] = gen_int_q(0);
        for (int i = 0; i <= k; i++)
            c[k] = gen_add(c[k], gen_mul(a[i], b[k - i]));
    }
}

/* difference-form coefficients alpha[0..8] of f_n, grad f_n, ... -> ordinate
 * weights w[k] of f_{n-4+k}, k = 0..8 (k = 8 is the newest point) */
static void gen_to_ordinates(const gen_q *alpha, gen_q *w)
{
    long binom[GEN_NP][GEN_NP] = {{0}};
    for (int m = 0; m < GEN_NP; m++) {
        binom[m][0] = 1;
        for (int i = 1; i <= m; i++)
            binom[m][i] = binom[m - 1][i - 1] + (i < m ? binom[m - 1][i] : 0);
    }
    for (int i = 0; i < GEN_NP; i++) {
        gen_q s = gen_int_q(0);
        for (int m = i; m < GEN_NP; m++)
            s = gen_add(s, gen_mul(alpha[m], gen_int_q((i % 2 ? -1 : 1) * binom[m][i])));
        w[GEN_NP - 1 - i] = s;
    }
}

static void gen_print_int(gen_int v)
{
    printf("%lldLL", (long long)v);
}

static void gen_emit(const char *name, const char *what, gen_q t[10][GEN_NP])
{
    printf("\n/* %s */\nstatic const double %s[GJ_ROWS][GJ_NPTS] = {\n", what, name);
    for (int j = 0; j < 10; j++) {
        printf("    {");
        for (int k = 0; k < GEN_NP; k++)
            printf("%.17g%s", (double)t[j][k].n / (double)t[j][k].d, k + 1 < GEN_NP ? ", " : "");
        printf("},\n");
    }
    printf("};\n");
    printf("#ifdef GJ_WANT_RATIONAL\nstatic const long long %s_num[GJ_ROWS][GJ_NPTS] = {\n", name);
    for (int j = 0; j < 10; j++) {
        printf("    {");
        for (int k = 0; k < GEN_NP; k++) {
            gen_print_int(t[j][k].n);
            printf("%s", k + 1 < GEN_NP ? ", " : "");
        }
        printf("},\n");
    }
    printf("};\nstatic const long long %s_den[GJ_ROWS][GJ_NPTS] = {\n", name);
    for (int j = 0; j < 10; j++) {
        printf("    {");
        for (int k = 0; k < GEN_NP; k++) {
            gen_print_int(t[j][k].d);
            printf("%s", k + 1 < GEN_NP ? ", " : "");
        }
        printf("},\n");
    }
    printf("};\n#endif\n");
}

int main(void)
{
    gen_q lam[GEN_NS], gam[GEN_NS], gam2[GEN_NS];
    /* -ln(1-x)/x = sum x^k/(k+1); gamma(x) = x/(-ln(1-x)) is its reciprocal */
    for (int k = 0; k < GEN_NS; k++)
        lam[k] = gen_make(1, k + 1);
    gam[0] = gen_int_q(1);
    for (int k = 1; k < GEN_NS; k++) {
        gen_q s = gen_int_q(0);
        for (int i = 1; i <= k; i++)
            s = gen_add(s, gen_mul(lam[i], gam[k - i]));
        gam[k] = gen_mul(s, gen_int_q(-1));
    }
    gen_series_mul(gam, gam, gam2);

    /* v_j/h - s_j = (1-x)^(4-j) [(gamma-1)/x + 1/2] f_4;
     * r_j/h^2 - S_j = (1-x)^(4-j) [(gamma^2-1+x)/x^2] f_4 */
    gen_q av[GEN_NS], bv[GEN_NS];
    for (int m = 0; m < GEN_NS - 2; m++) {
        av[m] = gam[m + 1];
        bv[m] = gam2[m + 2];
    }
    av[0] = gen_add(av[0], gen_make(1, 2));
    for (int m = GEN_NS - 2; m < GEN_NS; m++)
        av[m] = bv[m] = gen_int_q(0);

    gen_q ta[10][GEN_NP], tb[10][GEN_NP];
    for (int j = -4; j <= 4; j++) {
        gen_q pa[GEN_NS], pb[GEN_NS], one_minus[GEN_NS], tmp[GEN_NS];
        for (int m = 0; m < GEN_NS; m++) {
            pa[m] = av[m];
            pb[m] = bv[m];
            one_minus[m] = gen_int_q(m == 0 ? 1 : m == 1 ? -1 : 0);
        }
        for (int p = 0; p < 4 - j; p++) {
            gen_series_mul(pa, one_minus, tmp);
            for (int m = 0; m < GEN_NS; m++)
                pa[m] = tmp[m];
            gen_series_mul(pb, one_minus, tmp);
            for (int m = 0; m < GEN_NS; m++)
                pb[m] = tmp[m];
        }
        gen_to_ordinates(pa, ta[j + 4]);
        gen_to_ordinates(pb, tb[j + 4]);
    }
    /* predictor: v_5/h - s_4 - f_4/2 = [((1-x)^-1 gamma - 1)/x] f_4;
     * r_5/h^2 - S_5 = (1-x)^-1 [(gamma^2-1+x)/x^2] f_4 */
    {
        gen_q cg[GEN_NS], pa[GEN_NS], pb[GEN_NS];
        gen_q acc = gen_int_q(0);
        for (int m = 0; m < GEN_NS; m++) {
            acc = gen_add(acc, gam[m]);
            cg[m] = acc;
        }
        acc = gen_int_q(0);
        for (int m = 0; m < GEN_NS - 1; m++) {
            pa[m] = cg[m + 1];
            acc = gen_add(acc, bv[m]);
            pb[m] = acc;
        }
        pa[GEN_NS - 1] = pb[GEN_NS - 1] = gen_int_q(0);
        gen_to_ordinates(pa, ta[9]);
        gen_to_ordinates(pb, tb[9]);
    }

    printf("/* gauss_jackson_coeffs.h - GENERATED by scripts/gen_gj_coeffs.c; do not edit.\n"
           " * Eighth-order Gauss-Jackson ordinate coefficients, exact rationals from the\n"
           " * backward-difference generating functions; row j+4 (j = -4..5) is the point,\n"
           " * column k+4 (k = -4..4) the acceleration; row 9 is the predictor. Sum\n"
           " * conventions of Berry & Healy (2004), J. Astronaut. Sci. 52(3) (from memory). */\n"
           "#ifndef PB_GAUSS_JACKSON_COEFFS_H\n#define PB_GAUSS_JACKSON_COEFFS_H\n\n"
           "#define GJ_NPTS 9  /* back points -4..4 */\n"
           "#define GJ_ROWS 10 /* mid-correctors -4..3, corrector 4, predictor 5 */\n");
    gen_emit("gj_a", "velocity (summed Adams): v_j = h (s_j + sum_k a[j][k] f_k); predictor "
                     "v_5 = h (s_4 + f_4/2 + sum_k a[5][k] f_k)", ta);
    gen_emit("gj_b", "position (summed Stormer-Cowell): r_j = h^2 (S_j + sum_k b[j][k] f_k)", tb);
    printf("\n#endif\n");
    return 0;
}
