/* yoshida_coeffs.h - Yoshida's symmetric compositions of a second-order
 * symmetric map, orders 4, 6 ("solution A") and 8 ("solution D"): the
 * weights and the sequence of substep fractions built from them. Shared by
 * the leapfrog family (leapfrog.c) and the time-transformed one
 * (leapfrog_tt.c). Internal to integrators/. */
#ifndef PB_YOSHIDA_COEFFS_H
#define PB_YOSHIDA_COEFFS_H

#define PB_YOSHIDA_STAGES_MAX 15 /* order 8: 2*7+1 substeps */

/* Yoshida (1990), Physics Letters A 150, 262, as listed in REFERENCES.md
 * (from memory; checked by observed order in tests/test_yoshida.c and
 * tests/test_leapfrog_tt.c): w[1..k], w[0] unused. */
static const double pb_yoshida4_w[] = {0, 1.3512071919596578};
static const double pb_yoshida6_w[] = {0, -1.17767998417887, 0.235573213359357,
                                       0.784513610477560};
static const double pb_yoshida8_w[] = {0, 0.102799849391985, -1.96061023297549,
                                       1.93813913762276, -0.158240635368243,
                                       -1.44485223686048, 0.253693336566229,
                                       0.914844246229740};

/* The substep fractions w_k..w_1, w0, w_1..w_k into c, w0 = 1 - 2 sum so
 * that they add up to 1 (k = 0: the map itself, c = {1}); returns their
 * number 2k + 1. */
static inline int pb_yoshida_sequence(int k, const double *w, double *c)
{
    double sum = 0;
    for (int i = 1; i <= k; i++) {
        sum += w[i];
        c[k - i] = c[k + i] = w[i];
    }
    c[k] = 1.0 - 2.0 * sum;
    return 2 * k + 1;
}

#endif
