#!/usr/bin/env python3
"""Generate leo-circular-radial-1km.oem: the exact circular orbit of the
leo-circular problem (a = 6778 km, i = 51.6 deg, RAAN = argument of
periapsis = true anomaly = 0, mu = 398600.4418 km^3/s^2, as in
problems/catalogue.c and problems/bodies.c) with every position displaced
1 km radially outward and the velocity left exact.

Circular two-body motion (common practice): with P = r0/|r0| and
Q = v0/|v0|, r(t) = a (cos nt P + sin nt Q), v(t) = sqrt(mu/a) (-sin nt P +
cos nt Q), n = sqrt(mu/a^3). Scored by `propbench score`, the file must give
a position error of 1 km, radial +1 km, along-track and cross-track 0
(tests/test_oem.c).

Usage: python3 tests/data/make_leo_offset_oem.py > tests/data/leo-circular-radial-1km.oem
"""
import math

MU = 398600.4418
A = 6778.0
INC = math.radians(51.6)
OFFSET = 1.0          # km, radially outward
STEP = 600            # s between records
NREC = 20             # 0 .. 11400 s, a little over two periods

def epoch(t):
    # t whole seconds after 2000-01-01T12:00:00 (the problem's start), t < 12 h
    s = 12 * 3600 + t
    return "2000-01-01T%02d:%02d:%02d.000" % (s // 3600, s // 60 % 60, s % 60)

def main():
    n = math.sqrt(MU / A**3)
    vc = math.sqrt(MU / A)
    P = (1.0, 0.0, 0.0)
    Q = (0.0, math.cos(INC), math.sin(INC))
    out = ["CCSDS_OEM_VERS = 3.0",
           "COMMENT leo-circular, exact circular orbit displaced 1 km radially",
           "COMMENT written by tests/data/make_leo_offset_oem.py",
           "CREATION_DATE = 2026-12-02T12:00:00",
           "ORIGINATOR = propbench-tests",
           "",
           "META_START",
           "OBJECT_NAME = radial-1km",
           "OBJECT_ID = leo-circular",
           "CENTER_NAME = EARTH",
           "REF_FRAME = EME2000",
           "TIME_SYSTEM = TT",
           "START_TIME = " + epoch(0),
           "STOP_TIME = " + epoch(STEP * (NREC - 1)),
           "META_STOP",
           ""]
    for k in range(NREC):
        t = STEP * k
        c, s = math.cos(n * t), math.sin(n * t)
        r = [(A + OFFSET) * (c * P[i] + s * Q[i]) for i in range(3)]
        v = [vc * (-s * P[i] + c * Q[i]) for i in range(3)]
        out.append(epoch(t) + " " + " ".join("%.17e" % x for x in r + v))
    print("\n".join(out))

if __name__ == "__main__":
    main()
