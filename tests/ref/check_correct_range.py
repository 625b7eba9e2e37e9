#!/usr/bin/python3
"""check_correct_range.py - `correct FILE for PIPETTE BATH` records the
LJP's range in its side note and in the comment line after '#' metadata.

Checked against: the range `junction PIPETTE BATH --json` reports for the
same pair (ljp_range_mV, the one computation in ljp.c, ljp_pair_mV), the
LJP subtracted lying inside it; and `correct ... by MV` (no solutions)
saying the range is not known rather than inventing one.  The corrected
values are checked against Vm = Vrecorded - LJP (common practice, the
trade's whole-cell convention) computed here in Python's decimal module.
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile
from decimal import Decimal

IONMIX = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
RECIPES = os.path.abspath("recipes")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(*cmds, json_out=False):
    args = [IONMIX, "--db", os.path.join(WORK, "user.db")] + (["--json"] if json_out else [])
    for c in ("run k-pipette.ionmix", "run bath-saline.ionmix") + cmds:
        args += ["-e", c]
    env = dict(os.environ, SOURCE_DATE_EPOCH="1767261600")
    return subprocess.run(args, cwd=WORK, capture_output=True, text=True, env=env)


WORK = tempfile.mkdtemp(prefix="ionmix-range-")
try:
    for r in ("k-pipette.ionmix", "bath-saline.ionmix"):
        shutil.copy(os.path.join(RECIPES, r), WORK)
    with open(os.path.join(WORK, "rec.csv"), "w") as f:
        f.write("# rig 2\n# cell 7\ntime,Vm (mV)\n0,-70.00\n1,-65.25\n")
    r = run("junction k-pipette bath", json_out=True)
    j = [json.loads(x) for x in r.stdout.splitlines() if '"ljp_range_mV"' in x][-1]
    lo, hi = j["ljp_range_mV"]
    rng = "%.1f to %.1f mV" % (lo, hi)

    r = run("correct rec.csv for k-pipette bath to out.csv", json_out=True)
    check(r.returncode == 0, "correct for the demo pair: %s" % r.stderr)
    res = [json.loads(x) for x in r.stdout.splitlines() if '"rows"' in x][-1]
    ljp = res["ljp_mV"]
    check(lo <= ljp <= hi, "LJP %r within the junction range %s" % (ljp, rng))
    check(res["ljp_range_mV"] == [round(lo, 4), round(hi, 4)] or
          abs(res["ljp_range_mV"][0] - lo) < 1e-3 and abs(res["ljp_range_mV"][1] - hi) < 1e-3,
          "correct's JSON range %r is junction's %r" % (res["ljp_range_mV"], [lo, hi]))
    note = open(os.path.join(WORK, "out.csv.ionmix.txt")).read()
    check("LJP range: " + rng in note, "side note records the range %r: %r" % (rng, note))
    lines = open(os.path.join(WORK, "out.csv")).read().splitlines()
    check(lines[:2] == ["# rig 2", "# cell 7"], "metadata kept: %r" % lines[:2])
    check(lines[2].startswith("# ionmix correct:") and "LJP range: " + rng in lines[2],
          "comment line records the range: %r" % lines[2])
    want = [str(Decimal(v) - Decimal(str(ljp))) for v in ("-70.00", "-65.25")]
    got = [ln.split(",")[1] for ln in lines[4:]]
    check([Decimal(g) for g in got] == [Decimal(w) for w in want],
          "corrected values %r, want %r" % (got, want))

    r = run("correct rec.csv by 10 to given.csv")
    check(r.returncode == 0, "correct by 10: %s" % r.stderr)
    note = open(os.path.join(WORK, "given.csv.ionmix.txt")).read()
    check("LJP range: not known" in note, "a given LJP has no invented range: %r" % note)
finally:
    shutil.rmtree(WORK, ignore_errors=True)

if failures:
    print("check_correct_range: %d failures" % len(failures))
    sys.exit(1)
print("check_correct_range: the LJP range recorded in the note and comment line")
