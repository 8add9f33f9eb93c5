#!/usr/bin/env python3
"""ksplit_corrector.py - the corrector constants g of integrators/kepler_split.c.

SBAB_n (Laskar & Robutel 2001) applied to H = p^2/2 + w^2 q^2/2 (A = p^2/2,
eps B = w^2 q^2/2) is a linear map M; its modified Hamiltonian is
1/2 z^T S z with S = -J log(M)/tau. {{A,B},B} = B'(q)^2 = w^4 q^2 is the only
term of degree two in eps that reaches S_qq at order tau^2 (the eps-linear
nested brackets give q p and p^2 only), so g = (S_qq - w^2)/(2 w^4 tau^2) as
w -> 0, extrapolated from two small w. Needs python3-mpmath (Debian).
Prints g for SBAB_1 (Wisdom-Holman, -1/24), SBAB_2 (1/72) and SBAB_4."""
from mpmath import mp, mpf, sqrt, matrix, logm

mp.dps = 80


def sbab(n):
    """Drift fractions c and kick fractions d: the (n+1)-point Lobatto rule."""
    if n == 1:
        return [mpf(1)], [mpf(1) / 2, mpf(1) / 2]
    if n == 2:
        return [mpf(1) / 2] * 2, [mpf(1) / 6, mpf(2) / 3, mpf(1) / 6]
    s = sqrt(21) / 14
    return ([mpf(1) / 2 - s, s, s, mpf(1) / 2 - s],
            [mpf(1) / 20, mpf(49) / 180, mpf(16) / 45, mpf(49) / 180, mpf(1) / 20])


def g_at(n, w):
    c, d = sbab(n)
    kick = lambda a: matrix([[1, 0], [-a * w * w, 1]])
    drift = lambda a: matrix([[1, a], [0, 1]])
    m = kick(d[0])
    for j in range(n):
        m = kick(d[j + 1]) * drift(c[j]) * m
    s = -matrix([[0, 1], [-1, 0]]) * logm(m)
    return (s[0, 0] - w ** 2) / (2 * w ** 4)


for n in (1, 2, 4):
    g1, g2 = g_at(n, mpf('1e-10')), g_at(n, mpf('2e-10'))
    print("SBAB_%d g = %s" % (n, mp.nstr((4 * g1 - g2) / 3, 20)))
