#!/usr/bin/python3
"""bench_junction.py - the generalized Henderson equation (the same formula
and the same 8-ion pair as tests/bench_junction.c), written in plain Python
for /usr/bin/python3: the comparison figure for bench_junction.c, which runs
this script and reads the one line it prints: "<microseconds> us/call".
Timed inside Python with time.perf_counter over many calls (argument: the
number of calls, default 200000)."""
import math
import sys
import time

F = 96485.33212   # C/mol, CODATA 2018
R = 8.314462618   # J/(mol K)
T_C = 25.0
RTF_MV = 1000.0 * R * (T_C + 273.15) / F


def d_from_lambda(lam, z):
    """Nernst-Einstein: D = R T lambda / (|z| F^2), m2/s."""
    return R * (T_C + 273.15) * lam * 1e-4 / (abs(z) * F * F)


def henderson_mv(ions):
    """Bath relative to pipette, mV; ions: (z, D, c_pip, c_bath)."""
    dmax = 0.0
    for z, d, cp, cb in ions:
        if z != 0 and (cp > 0 or cb > 0) and d > dmax:
            dmax = d
    a = bp = bb = db = 0.0
    for z, d, cp, cb in ions:
        if z == 0 or not (cp > 0 or cb > 0):
            continue
        u = d / dmax
        a += z * u * (cb - cp)
        zz = z * z * u
        bp += zz * cp
        bb += zz * cb
        db += zz * (cb - cp)
    x = db / bp
    if abs(x) < 1e-5:
        g = 1.0 - x / 2.0 + x * x / 3.0 - x * x * x / 4.0
    elif x > -0.5:
        g = math.log1p(x) / x
    else:
        g = math.log(bb / bp) / x
    return -RTF_MV * g / bp * a


# Limiting equivalent conductivities, S cm2/mol of charge, 25 C (CRC
# Handbook, from memory); gluconate- 0.33 and HEPES- 0.30 of K+ (from memory).
DK = d_from_lambda(73.48, 1)
IONS = [
    (1, DK, 149.0, 2.5),                          # K+
    (1, d_from_lambda(50.08, 1), 0.0, 151.0),      # Na+
    (2, d_from_lambda(59.47, 2), 0.0, 2.0),        # Ca2+
    (2, d_from_lambda(53.0, 2), 2.0, 1.0),         # Mg2+
    (-1, d_from_lambda(76.31, -1), 8.0, 133.5),    # Cl-
    (-1, 0.33 * DK, 135.0, 0.0),                   # gluconate-
    (-1, 0.30 * DK, 10.0, 0.0),                    # HEPES-
    (-1, d_from_lambda(44.5, -1), 0.0, 26.0),      # HCO3-
]


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 200000
    v = henderson_mv(IONS)
    best = float("inf")
    for _ in range(3):
        t0 = time.perf_counter()
        s = 0.0
        for _ in range(n):
            s += henderson_mv(IONS)
        t = time.perf_counter() - t0
        best = min(best, t)
    if not math.isfinite(s):
        return 1
    print("%.4f us/call (LJP %.4f mV)" % (best / n * 1e6, v))
    return 0


if __name__ == "__main__":
    sys.exit(main())
