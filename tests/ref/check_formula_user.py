"""check_formula_user.py - formula weights of formulas a user types (hydrate
dots, parentheses, brackets) against Debian's python3-periodictable, within
0.01 g/mol (the bound of the shipped compounds' check).  ionmix's parser is
driven through build/tests/test_formula, which prints the weight of each
formula named on its command line."""
import os
import subprocess
import sys

import periodictable as pt

# (as a user types it, the same in periodictable's notation)
CASES = [
    ("MgCl2.6H2O", "MgCl2(H2O)6"),
    ("CaCl2\u00b72H2O", "CaCl2(H2O)2"),
    ("CaSO4.0.5H2O", "CaSO4(H2O)0.5"),
    ("Na2HPO4.7H2O", "Na2HPO4(H2O)7"),
    ("NaH2PO4.H2O", "NaH2PO4H2O"),
    ("Ca(NO3)2.4H2O", "Ca(NO3)2(H2O)4"),
    ("Mg(CH3COO)2.4H2O", "Mg(CH3COO)2(H2O)4"),
    ("C6H11KO7", "C6H11KO7"),
    ("CH3SO3Cs", "CH3SO3Cs"),
    ("C8H17N2O4SNa", "C8H17N2O4SNa"),
    ("(CH3CH2)4NCl", "(CH3CH2)4NCl"),
    ("[Co(NH3)6]Cl3", "Co(NH3)6Cl3"),
    ("K2[Fe(CN)6].3H2O", "K2Fe(CN)6(H2O)3"),
    ("C14H30N2O.HCl", "C14H30N2OHCl"),
    ("CuSO4*5H2O", "CuSO4(H2O)5"),
    ("C12H22O11", "C12H22O11"),
    ("BaCl2.2H2O", "BaCl2(H2O)2"),
    ("SrCl2.6H2O", "SrCl2(H2O)6"),
    ("C10H14N5O13P3Na2.3H2O", "C10H14N5O13P3Na2(H2O)3"),
    ("CdCl2.2.5H2O", "CdCl2(H2O)2.5"),
    ("(NH4)2SO4", "(NH4)2SO4"),
]


def main():
    prog = os.path.join(os.environ.get("TESTBIN_DIR", "build/tests"), "test_formula")
    out = subprocess.run([prog] + [c[0] for c in CASES], capture_output=True, text=True,
                         check=True).stdout.splitlines()
    failed = 0
    for (typed, ref), line in zip(CASES, out):
        parts = line.split("\t")
        want = pt.formula(ref).mass
        if len(parts) < 2 or parts[1] == "error":
            print(f"FAIL {typed}: {line}")
            failed += 1
            continue
        got = float(parts[1])
        if abs(got - want) > 0.01:
            print(f"FAIL {typed}: ionmix {got:.4f}, periodictable {want:.4f}")
            failed += 1
    if len(out) != len(CASES):
        print(f"FAIL: {len(out)} lines for {len(CASES)} formulas")
        failed += 1
    print(f"check_formula_user: {len(CASES) - failed} of {len(CASES)} formulas within 0.01 g/mol "
          "of python3-periodictable")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
