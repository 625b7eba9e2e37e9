"""check_export_defs.py - a recipe alone rebuilds a solution that uses
user-defined ions and compounds and a bottle's formula weight (issue 11,
item 3): exported from one database, replayed into a fresh one and again
into the same one (the definitions then match and are kept), the amounts,
the free ions and the weighed grams agree exactly.  Reference: the
solution as built by hand in the first database (no outside data)."""
import json
import os
import subprocess
import sys
import tempfile

binary = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
passed = failed = 0


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL", what, detail)


def run(db, *cmds, script=None):
    args = [binary, "--json", "--db", db]
    if script:
        args.append(script)
    for c in cmds:
        args += ["-e", c]
    p = subprocess.run(args, capture_output=True, text=True)
    return p.returncode, [json.loads(l) for l in p.stdout.splitlines() if l.startswith("{")], p.stderr


with tempfile.TemporaryDirectory() as d:
    db1, db2 = os.path.join(d, "a.db"), os.path.join(d, "b.db")
    recipe = os.path.join(d, "p.ionmix")
    rc, out, err = run(db1, "define ion Foo+ charge 1 formula C10H20N",
                       "define Foo-Cl formula C10H20NCl yields Foo+ 1 Cl- 1",
                       "solution p", "add Foo-Cl 5", "add KCl 140", "fw KCl 74.6",
                       "show p", "weigh 100 mL", "export p " + recipe)
    check("built and exported", rc == 0, err)
    ref_show, ref_weigh = out[-3], out[-2]
    for db, what in ((db2, "fresh database"), (db2, "same database again"), (db1, "first database")):
        rc, out, err = run(db, "show p", "weigh 100 mL", script=recipe)
        check(what + ": replays", rc == 0, err)
        if rc:
            continue
        show, weigh = out[-2], out[-1]
        check(what + ": compounds", show["compounds"] == ref_show["compounds"])
        check(what + ": free ions", [(i["ion"], i["mM"]) for i in show["ions"]] ==
              [(i["ion"], i["mM"]) for i in ref_show["ions"]])
        check(what + ": grams", [(i["compound"], i["grams"]) for i in weigh["items"]] ==
              [(i["compound"], i["grams"]) for i in ref_weigh["items"]])
        check(what + ": the bottle's weight used", any(i.get("fw_from_bottle") for i in weigh["items"]),
              weigh["items"])
    # a definition that differs from the stored one is refused in one line
    rc, out, err = run(db2, "define Foo-Cl formula C11H22NCl yields Foo+ 1 Cl- 1")
    check("a different redefinition is refused", rc == 1 and len(err.strip().splitlines()) <= 1, err)

print(f"ref: check_export_defs: {passed} passed, {failed} failed")
sys.exit(1 if failed else 0)
