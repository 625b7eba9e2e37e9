"""check_define.py - user-defined compounds and ions (issue 11 item 6),
through the binary: the formula weights of 21 formulas a user types
(hydrate dots, parentheses, brackets) agree with Debian's
python3-periodictable within 0.01 g/mol; the definitions are kept in the
user database and come back in the next process (`compounds mine`, `info`
marks them user-defined); a saved solution that uses one loads back; an
amount in % (w/v) is g per 100 mL (common practice), checked against
periodictable's molar mass; bad definitions fail with one line and change
nothing."""
import json
import os
import subprocess
import sys
import tempfile

import periodictable as pt

binary = os.environ.get("IONMIX", "build/ionmix")
tmp = tempfile.mkdtemp(prefix="ionmix-define-")
db = os.path.join(tmp, "user.db")
passed = failed = 0

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from formulacases import CASES  # noqa: E402


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what + (": " + detail if detail else ""))


def run(cmds, json_out=True):
    env = dict(os.environ, LC_ALL="C", HOME=tmp, XDG_DATA_HOME=tmp)
    env.pop("IONMIX_DB", None)
    args = [binary, "--db", db] + (["--json"] if json_out else [])
    for c in cmds:
        args += ["-e", c]
    return subprocess.run(args, capture_output=True, text=True, env=env, timeout=60)


def objects(r):
    return [json.loads(line) for line in r.stdout.splitlines() if line.startswith("{")]


# 20 formulas, defined in one process ...
defs = ["define Mine%d formula %s" % (i, typed) for i, (typed, _) in enumerate(CASES)]
r = run(defs)
check("20 definitions succeed", r.returncode == 0, r.stdout + r.stderr)
# ... read back in another: the weights against periodictable
r = run(["info Mine%d" % i for i in range(len(CASES))])
objs = objects(r)
check("info of each defined compound in a new process", r.returncode == 0 and
      len(objs) == len(CASES), r.stderr)
for (typed, ref), o in zip(CASES, objs):
    want = pt.formula(ref).mass
    check("%s: %.4f g/mol within 0.01 of periodictable %.4f" % (typed, o.get("fw_g_mol", 0), want),
          abs(o.get("fw_g_mol", 0) - want) <= 0.01)
    check("info marks %s user-defined" % typed, o.get("user_defined") is True)
r = run(["compounds mine"])
mine = objects(r)
check("compounds mine lists the 20", r.returncode == 0 and mine and
      len(mine[0]["compounds"]) == len(CASES), r.stdout)
r = run(["info KCl"])
check("a shipped compound is not user-defined", objects(r)[0].get("user_defined") is False)

# an ion with and without a mobility, a salt of it, used and saved
r = run(["define ion Qb+ charge 1 formula C12H20N",
         "define ion Zq2- charge -2 mobility 0.7 source \"an invented test value\"",
         "define QbCl formula C12H20NCl yields Qb+ 1 Cl- 1 source \"test\"",
         "info Qb+", "info Zq2-"])
o = objects(r)
check("ion and salt definitions succeed", r.returncode == 0 and len(o) == 5, r.stderr)
if len(o) == 5:
    check("an ion without a mobility is flagged estimated", o[0].get("mobility_estimated") is True)
    check("an ion with a mobility is not estimated", o[1].get("mobility_estimated") is False)
    check("info of the estimated ion: class estimated", o[3].get("mobility_class") == "estimated",
          json.dumps(o[3]))
    check("info of the given mobility: 0.7", abs(o[4].get("D_1e9_m2_s", 0) - 0.7) < 1e-9)
r = run(["solution qsol", "add QbCl 2", "add KCl 140", "save qsol"])
check("a solution with a defined compound saves", r.returncode == 0, r.stderr)
r = run(["load qsol", "show"])
shows = [x for x in objects(r) if "species" in x or "ionic_strength_mM" in x]
check("it loads back in a new process and shows", r.returncode == 0 and shows, r.stdout + r.stderr)
if shows:
    check("ionic strength 142 mM (KCl 140 + QbCl 2, all 1:1; water adds ~0.1 uM)",
          abs(shows[-1]["ionic_strength_mM"] - 142) < 1e-3, str(shows[-1].get("ionic_strength_mM")))

# % (w/v): 1 g per 100 mL of a defined sugar alcohol
r = run(["define Sorb1 formula C6H14O6", "solution w", "add Sorb1 1 %", "show"])
o = [x for x in objects(r) if "compounds" in x and isinstance(x["compounds"], list)]
want = 10.0 / pt.formula("C6H14O6").mass * 1000  # mM
got = None
for x in objects(r):
    for c in x.get("compounds", []) if isinstance(x.get("compounds"), list) else []:
        if isinstance(c, dict) and c.get("compound") == "Sorb1":
            got = c.get("mM", c.get("amount_mM"))
check("1 %% (w/v) of C6H14O6 is %.3f mM" % want, got is not None and abs(got - want) < 0.01 * want
      / 100 + 1e-6, "got %r" % (got,))

# bad definitions: one line, exit 1, nothing stored
before = len(objects(run(["compounds mine"]))[0]["compounds"])
BAD = [
    ("define Bad1 formula Qq2", "unknown element"),
    ("define Bad2 formula C6H(O", "parenthes"),
    ("define KCl formula KCl", "shipped compound"),
    ("define Bad3 formula NaCl yields Na+ 1 Cl- 2", "do not balance"),
    ("define Bad4 formula KCl yields Kx+ 1 Cl- 1", "unknown ion"),
    ("define ion Na+ charge 1", "shipped"),
    ("define ion Bad5+ charge 1 mobility 50 source x", "outside"),
    ("define Mine0 formula KCl", "already defined"),
]
for cmd, word in BAD:
    r = run([cmd], json_out=False)
    lines = r.stderr.strip().splitlines()
    check("'%s' fails with one line naming the cause" % cmd,
          r.returncode == 1 and len(lines) == 1 and word in lines[0], r.stderr)
after = len(objects(run(["compounds mine"]))[0]["compounds"])
check("bad definitions stored nothing", after == before, "%d vs %d" % (after, before))

print("check_define: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
