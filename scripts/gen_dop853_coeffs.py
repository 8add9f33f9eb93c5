#!/usr/bin/env python3
"""gen_dop853_coeffs.py - writes integrators/dop853_coeffs.h: the DOP853
coefficients (Prince & Dormand 1981's RK8(7)13M nodes and weights with
Hairer's 5th- and 3rd-order error weights and 7th-order dense output, as
published in Hairer's dop853.f for Hairer, Norsett & Wanner, Solving ODEs I,
2nd ed., Sec. II.5 and II.10), read as decimal text from scipy's copy of that
table (scipy/integrate/_ivp/dop853_coefficients.py; Debian's python3-scipy,
1.10.1 here) and checked on the way in exact rational arithmetic of those
decimals: row sums, the quadrature conditions of the weights, of the error
weights and of the dense output. The residuals go into the header's comment.

    /usr/bin/python3 scripts/gen_dop853_coeffs.py > integrators/dop853_coeffs.h

(no scipy import: the file is parsed as text, so any Python 3.8+ runs it.)
"""
import ast
import sys
from fractions import Fraction

SCIPY = "/usr/lib/python3/dist-packages/scipy/integrate/_ivp/dop853_coefficients.py"
NS = 16  # 12 stages, the FSAL stage 12 = f(t+h, y_new), three extra dense stages
# Hairer's 3rd-order weights (bhh1..3 of dop853.f) sit on stages 0, 8 and 11;
# scipy stores them folded into E3 = b - bhh, so they are read from there.
BHH_STAGES = (0, 8, 11)


def literal(src, node):
    """The exact rational value of a numeric literal as written."""
    if isinstance(node, ast.UnaryOp) and isinstance(node.op, ast.USub):
        v, txt = literal(src, node.operand)
        return -v, "-" + txt
    txt = ast.get_source_segment(src, node)
    return Fraction(txt), txt


def parse(path):
    src = open(path).read()
    c, a, e5, d, bhh = [], {}, {}, {}, {}
    for st in ast.parse(src).body:
        if not isinstance(st, (ast.Assign, ast.AugAssign)):
            continue
        t = st.targets[0] if isinstance(st, ast.Assign) else st.target
        if isinstance(t, ast.Name) and t.id == "C":
            c = [literal(src, e) for e in st.value.args[0].elts]
            continue
        if not isinstance(t, ast.Subscript) or not isinstance(t.value, ast.Name):
            continue
        idx = t.slice
        if isinstance(idx, ast.Tuple):
            key = tuple(int(e.value) for e in idx.elts)
        elif isinstance(idx, ast.Constant):
            key = int(idx.value)
        else:
            continue  # E3[:-1] = B.copy()
        name = t.value.id
        if name == "E3" and isinstance(st, ast.AugAssign):
            bhh[key] = literal(src, st.value)  # E3[j] -= bhh_j
        elif name in ("A", "D", "E5") and isinstance(st, ast.Assign):
            {"A": a, "D": d, "E5": e5}[name][key] = literal(src, st.value)
    return c, a, e5, d, bhh


def dense_weights(b, d, th):
    """b_j(theta) of the dense output y0 + h sum_j b_j(theta) k_j, from its
    nested form theta (F0 + (1-theta)(F1 + theta (F2 + ...)))."""
    z = [Fraction(0)] * NS
    f0 = b
    f1 = [(1 if j == 0 else 0) - b[j] for j in range(NS)]
    f2 = [2 * b[j] - (1 if j in (0, 12) else 0) for j in range(NS)]
    rows = [f0, f1, f2] + [[d.get((r, j), (Fraction(0), ""))[0] for j in range(NS)] for r in range(4)]
    acc = z
    for i, f in enumerate(reversed(rows)):
        acc = [(acc[j] + f[j]) * (th if i % 2 == 0 else 1 - th) for j in range(NS)]
    return acc


def checks(c, a, e5, d, bhh):
    cv = [x[0] for x in c]
    av = {k: v[0] for k, v in a.items()}
    b = [av.get((12, j), Fraction(0)) for j in range(NS)]
    out = []
    rs = max(abs(sum(av.get((i, j), 0) for j in range(i)) - cv[i]) for i in range(1, NS))
    out.append("row sums |sum_j a_ij - c_i|, i = 1..15: max %.1e" % rs)
    q = [sum(b[j] * cv[j] ** (k - 1) for j in range(NS)) - Fraction(1, k) for k in range(1, 10)]
    out.append("b: max |sum b c^(k-1) - 1/k|, k = 1..8: %.1e; k = 9: %.3e"
               % (max(abs(x) for x in q[:8]), q[8]))
    bh = [bhh.get(j, (Fraction(0), ""))[0] for j in range(NS)]
    q = [sum(bh[j] * cv[j] ** (k - 1) for j in range(NS)) - Fraction(1, k) for k in range(1, 5)]
    out.append("bhh: max residual k = 1..3: %.1e; k = 4: %.3e" % (max(abs(x) for x in q[:3]), q[3]))
    ev = [e5.get(j, (Fraction(0), ""))[0] for j in range(NS)]
    q = [sum(ev[j] * cv[j] ** (k - 1) for j in range(NS)) for k in range(1, 7)]
    out.append("er (5th-order error weights): max |sum er c^(k-1)|, k = 1..5: %.1e; k = 6: %.3e"
               % (max(abs(x) for x in q[:5]), q[5]))
    worst, k8 = 0, 0
    for th in (Fraction(1, 3), Fraction(37, 100), Fraction(9, 10)):
        bt = dense_weights(b, d, th)
        q = [sum(bt[j] * cv[j] ** (k - 1) for j in range(NS)) - th ** k / k for k in range(1, 9)]
        worst = max(worst, max(abs(x) for x in q[:7]))
        k8 = max(k8, abs(q[7]))
    out.append("dense b(theta), theta = 1/3, 0.37, 0.9: max |sum b(theta) c^(k-1) - theta^k/k|, "
               "k = 1..7: %.1e; k = 8: %.3e" % (worst, k8))
    return out


def cnum(txt):
    return txt.replace("D", "e").replace("d", "e")


def main():
    path = sys.argv[1] if len(sys.argv) > 1 else SCIPY
    c, a, e5, d, bhh = parse(path)
    if len(c) != NS or not a or not e5 or len(d) == 0 or sorted(bhh) != list(BHH_STAGES):
        sys.exit("gen_dop853_coeffs: unexpected layout in " + path)
    w = sys.stdout.write
    w("/* dop853_coeffs.h - GENERATED by scripts/gen_dop853_coeffs.py; do not edit.\n")
    w(" * DOP853: Prince & Dormand (1981), J. Comput. Appl. Math. 7, 67 (RK8(7)13M), with the\n")
    w(" * 5th- and 3rd-order error weights and 7th-order dense output of Hairer, Norsett &\n")
    w(" * Wanner, Solving ODEs I (2nd ed.), Sec. II.5 and II.10, as published in Hairer's\n")
    w(" * dop853.f; digits as scipy 1.10.1 copies that table (dop853_coefficients.py).\n")
    w(" * Checked by the generator in exact rational arithmetic of these decimals:\n")
    for line in checks(c, a, e5, d, bhh):
        w(" *   " + line + "\n")
    w(" * Stages 0..11 make a step; stage 12 (c = 1, a row = b) is f(t+h, y_new), the next\n")
    w(" * step's stage 0; stages 13..15 serve only the dense output. */\n")
    w("#ifndef PB_DOP853_COEFFS_H\n#define PB_DOP853_COEFFS_H\n\n")
    w("#define DOP853_NSTAGES 16\n\n")
    w("static const double dop853_c[DOP853_NSTAGES] = {\n")
    for x in c:
        w("    %s,\n" % cnum(x[1]))
    w("};\n\n")
    w("/* a[i][j], j < i; row 12 holds the 8th-order weights b */\n")
    w("static const double dop853_a[DOP853_NSTAGES][DOP853_NSTAGES] = {\n")
    for i in range(NS):
        ents = ["[%d] = %s" % (j, cnum(a[(i, j)][1])) for j in range(NS) if (i, j) in a]
        w("    [%d] = {%s},\n" % (i, ", ".join(ents) if ents else "0.0"))
    w("};\n\n")
    w("/* er_j: 5th-order error estimate h sum_j er_j k_j (Hairer's er1, er6..er12) */\n")
    w("static const double dop853_er[12] = {\n")
    for j in range(12):
        w("    %s,\n" % (cnum(e5[j][1]) if j in e5 else "0.0"))
    w("};\n\n")
    w("/* bhh_j: 3rd-order weights; h sum_j (b_j - bhh_j) k_j estimates the 3rd-order error */\n")
    w("static const double dop853_bhh[12] = {\n")
    for j in range(12):
        w("    %s,\n" % (cnum(bhh[j][1]) if j in bhh else "0.0"))
    w("};\n\n")
    w("/* d[r][j]: dense-output rows F3..F6 = h sum_j d[r][j] k_j (Hairer's d4*..d7*) */\n")
    w("static const double dop853_d[4][DOP853_NSTAGES] = {\n")
    for r in range(4):
        ents = ["[%d] = %s" % (j, cnum(d[(r, j)][1])) for j in range(NS) if (r, j) in d]
        w("    {%s},\n" % ", ".join(ents))
    w("};\n\n#endif\n")


if __name__ == "__main__":
    main()
