"""check_formula_user.py - formula weights of formulas a user types (hydrate
dots, parentheses, brackets) against Debian's python3-periodictable, within
0.01 g/mol (the bound of the shipped compounds' check).  ionmix's parser is
driven through build/tests/test_formula, which prints the weight of each
formula named on its command line."""
import os
import subprocess
import sys

import periodictable as pt

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from formulacases import CASES  # noqa: E402


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
