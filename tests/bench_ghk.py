#!/usr/bin/python3
"""bench_ghk.py - the GHK reversal potential with a divalent ion, solved by
scipy.optimize.brentq on the summed GHK currents in a Python loop: the
comparison figure for tests/bench_ghk.c, which runs this with /usr/bin/python3
and reads the one line it prints: "<microseconds> us/solve".

The case is the one bench_ghk.c times (K+, Na+, Cl-, Ca2+; Ca2+ outside swept
log-spaced from 0.01 to 10 mM), at the same tolerance (1e-10 mV)."""
import math
import sys
import time

from scipy.optimize import brentq

F = 96485.33212   # C/mol, CODATA 2018
R = 8.314462618   # J/(mol K)
T_C = 22.0
RTF_MV = 1000.0 * R * (T_C + 273.15) / F


def total(V, ions):
    s = 0.0
    for z, P, ci, co in ions:
        u = z * V / RTF_MV
        if abs(u) < 1e-9:
            s += P * z * (ci - co)
        else:
            s += P * z * u * (ci - co * math.exp(-u)) / (1.0 - math.exp(-u))
    return s


def solve(ca_out):
    ions = ((1, 1.0, 140.0, 5.0), (1, 0.04, 10.0, 145.0), (-1, 0.1, 10.0, 150.0),
            (2, 5.0, 1e-4, ca_out))
    return brentq(total, -200.0, 200.0, args=(ions,), xtol=1e-10)


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 3000
    best = float("inf")
    for _ in range(3):
        t0 = time.perf_counter()
        acc = 0.0
        for k in range(n):
            acc += solve(0.01 * 1000.0 ** (k / (n - 1)))
        dt = time.perf_counter() - t0
        best = min(best, dt)
    print("%.3f us/solve" % (best / n * 1e6))


if __name__ == "__main__":
    main()
