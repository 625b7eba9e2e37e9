#!/usr/bin/python3
"""check_ghk_scipy.py - GHK reversal potentials with a divalent ion, by
scipy.optimize.brentq on the summed GHK currents written here independently
of src/ghk.c, checked against the table tests/ghk_cases.txt that
tests/test_ghk.c asserts too.

    /usr/bin/python3 tests/ref/check_ghk_scipy.py          # check (from repo root)
    /usr/bin/python3 tests/ref/check_ghk_scipy.py --write  # regenerate the table

Every run recomputes each case and compares it with the file (1e-6 mV), so a
changed table, a changed case or a changed formula fails.  The case inputs
below are made up for checking the numerics; they are no published data.
GHK current: Goldman (1943) J Gen Physiol 27:37; Hodgkin & Katz (1949)
J Physiol 108:37; mixed mono-/divalent case as in Lewis (1979) J Physiol
286:417.
"""
import math
import os
import sys

try:
    from scipy.optimize import brentq
except ImportError:  # pragma: no cover
    print("check_ghk_scipy: scipy missing: apt-get install python3-scipy")
    print("ref: ghk_scipy: 0 passed, 1 failed")
    sys.exit(1)

F = 96485.33212      # C/mol, CODATA 2018
R = 8.314462618      # J/(mol K), CODATA 2018
T0 = 273.15          # K
TOL_MV = 1e-6
TABLE = os.path.join("tests", "ghk_cases.txt")

# name, t_C, [(symbol, z, P, in_mM, out_mM), ...]
CASES = [
    ("ca_na_k_cl_22C", 22.0, [("Na+", 1, 1.0, 10.0, 140.0), ("K+", 1, 1.0, 140.0, 5.0),
                              ("Ca2+", 2, 10.0, 1e-4, 2.0), ("Cl-", -1, 0.0, 10.0, 150.0)]),
    ("ca_bi_ionic_cs", 25.0, [("Cs+", 1, 1.0, 140.0, 0.0), ("Ca2+", 2, 0.5, 0.0, 10.0)]),
    ("ca_high_p", 35.0, [("Na+", 1, 1.0, 5.0, 145.0), ("K+", 1, 1.1, 135.0, 4.0),
                         ("Ca2+", 2, 20.0, 5e-5, 2.5)]),
    ("ba_k", 20.0, [("K+", 1, 1.0, 120.0, 2.5), ("Ba2+", 2, 0.3, 0.0, 20.0)]),
    ("mg_na", 30.0, [("Na+", 1, 1.0, 15.0, 140.0), ("Mg2+", 2, 0.1, 1.0, 1.0)]),
    ("ca_only_inside", 25.0, [("K+", 1, 1.0, 5.0, 140.0), ("Ca2+", 2, 2.0, 1.0, 0.0)]),
    ("ca_cl_anion", 24.0, [("Ca2+", 2, 1.0, 1e-4, 10.0), ("Cl-", -1, 0.5, 30.0, 160.0)]),
    ("sulfate_k", 25.0, [("K+", 1, 1.0, 140.0, 5.0), ("SO4^2-", -2, 0.2, 5.0, 50.0)]),
    ("ca_equal_sides", 25.0, [("Na+", 1, 1.0, 140.0, 140.0), ("Ca2+", 2, 3.0, 2.0, 2.0)]),
    ("sr_nmdg", 21.0, [("Na+", 1, 1.0, 10.0, 1.0), ("Sr2+", 2, 4.0, 0.0, 30.0),
                       ("Cl-", -1, 0.05, 20.0, 80.0)]),
    ("ca_tiny_p", 37.0, [("Na+", 1, 0.05, 12.0, 145.0), ("K+", 1, 1.0, 140.0, 4.5),
                         ("Ca2+", 2, 1e-4, 1e-4, 2.0)]),
    ("ca_huge_p", 25.0, [("Na+", 1, 1e-3, 140.0, 140.0), ("Ca2+", 2, 1e3, 1e-4, 1.8)]),
    ("ca_mg_two_divalent", 25.0, [("K+", 1, 1.0, 140.0, 5.0), ("Ca2+", 2, 1.0, 1e-4, 2.0),
                                  ("Mg2+", 2, 0.5, 0.5, 1.0)]),
    ("ca_at_10C", 10.0, [("Na+", 1, 1.0, 10.0, 140.0), ("Ca2+", 2, 5.0, 1e-4, 10.0)]),
    ("ca_at_37C", 37.0, [("Na+", 1, 1.0, 10.0, 140.0), ("Ca2+", 2, 5.0, 1e-4, 10.0)]),
    ("ca_li_anion_mix", 23.0, [("Li+", 1, 0.7, 0.0, 100.0), ("Cs+", 1, 1.0, 130.0, 0.0),
                               ("Ca2+", 2, 2.0, 1e-4, 5.0), ("Cl-", -1, 0.2, 10.0, 110.0)]),
    ("ca_inside_high", 25.0, [("Na+", 1, 1.0, 140.0, 10.0), ("Ca2+", 2, 1.0, 10.0, 0.1)]),
    ("ca_dilute", 25.0, [("Na+", 1, 1.0, 0.5, 0.5), ("Ca2+", 2, 1.0, 0.01, 0.1)]),
    ("ca_strong_gradient", 25.0, [("K+", 1, 1.0, 150.0, 0.01), ("Ca2+", 2, 0.01, 1e-5, 100.0)]),
    ("ca_tea_na", 28.0, [("TEA+", 1, 0.01, 0.0, 20.0), ("Na+", 1, 1.0, 10.0, 120.0),
                         ("Ca2+", 2, 0.8, 1e-4, 2.0)]),
]


def ghk_current(z, P, ci, co, V_mV, t_C):
    """GHK current density per unit permeability, written out directly:
    I = P z^2 (F^2 V/RT) (ci - co exp(-zFV/RT)) / (1 - exp(-zFV/RT))."""
    V = V_mV * 1e-3
    RT = R * (t_C + T0)
    a = z * F * V / RT
    if abs(a) < 1e-9:
        return P * z * F * (ci - co)  # the V -> 0 limit
    return P * z * z * F * F * V / RT * (ci - co * math.exp(-a)) / (1.0 - math.exp(-a))


def erev(t_C, ions):
    f = lambda V: sum(ghk_current(z, P, ci, co, V, t_C) for (_, z, P, ci, co) in ions)
    lo, hi = -400.0, 400.0
    assert f(lo) < 0 < f(hi), "no sign change in [-400, 400] mV"
    return brentq(f, lo, hi, xtol=1e-12, rtol=1e-15, maxiter=500)


def write_table():
    with open(TABLE + ".tmp", "w") as fp:
        fp.write("# tests/ghk_cases.txt - written by tests/ref/check_ghk_scipy.py --write;\n")
        fp.write("# checked by it and by tests/test_ghk.c.  Do not edit by hand.\n")
        fp.write("# case NAME T_C E_REV_MV, then ion SYMBOL Z P IN_MM OUT_MM lines, "
                 "then end.\n")
        fp.write("# E_rev by scipy.optimize.brentq on the summed GHK currents.\n")
        for name, t, ions in CASES:
            fp.write("case %s %r %r\n" % (name, t, erev(t, ions)))
            for s, z, P, ci, co in ions:
                fp.write("ion %s %d %r %r %r\n" % (s, z, P, ci, co))
            fp.write("end\n")
    os.replace(TABLE + ".tmp", TABLE)
    print("wrote %s (%d cases)" % (TABLE, len(CASES)))


def read_table():
    cases, cur = [], None
    with open(TABLE) as fp:
        for line in fp:
            w = line.split()
            if not w or w[0].startswith("#"):
                continue
            if w[0] == "case":
                cur = (w[1], float(w[2]), float(w[3]), [])
            elif w[0] == "ion":
                cur[3].append((w[1], int(w[2]), float(w[3]), float(w[4]), float(w[5])))
            elif w[0] == "end":
                cases.append(cur)
                cur = None
    return cases


def main():
    if "--write" in sys.argv[1:]:
        write_table()
        return 0
    passed = failed = 0
    try:
        table = {c[0]: c for c in read_table()}
    except OSError as e:
        print("ghk_scipy: cannot read %s: %s" % (TABLE, e))
        table = {}
    for name, t, ions in CASES:
        row = table.get(name)
        if row is None:
            print("ghk_scipy: %s: missing from %s" % (name, TABLE))
            failed += 1
            continue
        _, t2, E_file, ions2 = row
        if t2 != t or [tuple(x) for x in ions2] != [tuple(x) for x in ions]:
            print("ghk_scipy: %s: inputs in %s differ from the script" % (name, TABLE))
            failed += 1
            continue
        E = erev(t, ions)
        if abs(E - E_file) > TOL_MV:
            print("ghk_scipy: %s: brentq %.9f mV, table %.9f mV" % (name, E, E_file))
            failed += 1
        else:
            passed += 1
    if len(table) != len(CASES):
        print("ghk_scipy: %s has %d cases, the script %d" % (TABLE, len(table), len(CASES)))
        failed += 1
    print("ref: ghk_scipy: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
