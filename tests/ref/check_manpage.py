"""check_manpage.py - the man page documents every command of the table
(as listed by `ionmix -e help`) and every JSON key the issues fix as a
contract.  Run from the repository root; IONMIX is the binary."""
import os
import re
import subprocess
import sys

binary = os.environ.get("IONMIX", "build/ionmix")
page = open("src/ionmix.1", encoding="utf-8").read()
out = subprocess.run([binary, "-e", "help"], capture_output=True, text=True, check=True).stdout
names = [m.group(1) for m in re.finditer(r"^  (\S+)\s", out, re.M)]
passed = failed = 0
for name in names:
    # a command is documented when it starts a .B/.BI/.BR line or is named in one
    if re.search(r"^\.(B|BI|BR)\s+\"?%s\b" % re.escape(name), page, re.M) or \
            re.search(r"\\fP%s\b|^\.BR .*\b%s\b" % (re.escape(name), re.escape(name)), page, re.M):
        passed += 1
    else:
        failed += 1
        print("not in the man page: command %s" % name)
for key in ["ionic_strength_mM", "osmolarity_mOsm_L", "net_charge_mEq_L", "E_mV", "ljp_mV",
            "shift_mV", "E_rev_mV", "rectification", "titrant_mM", "added_mM",
            "dilute_mL_per_L", "osmolality_mOsm_kg", "verdict"]:
    if key in page:
        passed += 1
    else:
        failed += 1
        print("not in the man page: JSON key %s" % key)
if len(names) < 20:
    failed += 1
    print("help listed only %d commands" % len(names))
print("ref: check_manpage: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
