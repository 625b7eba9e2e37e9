"""check_note.py - a solution's note is kept with everything a user makes
(issue 11, item 3): saves, versions, the kept workspace is covered by the
shell test; here save and load, `load NAME@N`, an exported recipe
replayed in a fresh database, `off`, and the length limit (one line, the
note unchanged).  No outside data: the note typed is the reference."""
import json
import os
import subprocess
import sys
import tempfile

binary = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
passed = failed = 0
NOTE = "made for the invented rig; lot 7, \"fresh\" ATP"


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL", what, detail)


def run(db, *cmds, script=None):
    args = [binary, "--json", "--db", db] + ([script] if script else [])
    for c in cmds:
        args += ["-e", c]
    p = subprocess.run(args, capture_output=True, text=True)
    return p.returncode, [json.loads(l) for l in p.stdout.splitlines() if l.startswith("{")]


with tempfile.TemporaryDirectory() as d:
    db1, db2, rec = os.path.join(d, "a.db"), os.path.join(d, "b.db"), os.path.join(d, "p.ionmix")
    rc, out = run(db1, "solution p", "add KCl 140", "note '%s'" % NOTE, "save",
                  "note second thoughts", "save", "export p " + rec)
    check("set, saved twice, exported", rc == 0, out[-1])
    check("the note as typed", out[2]["note"] == NOTE, out[2])
    rc, out = run(db1, "load p@1", "show p", "load p", "show p")
    check("version 1 keeps the first note", rc == 0 and out[1].get("note") == NOTE, out)
    check("the saved one keeps the second", rc == 0 and out[3].get("note") == "second thoughts", out)
    rc, out = run(db2, "show p", script=rec)
    check("the recipe carries it", rc == 0 and out[-1].get("note") == "second thoughts", out[-1:])
    rc, out = run(db1, "load p", "note off", "show p")
    check("off removes it", rc == 0 and "note" not in out[-1], out[-1:])
    p = subprocess.run([binary, "--db", db1, "-e", "load p", "-e", "note " + "x" * 600],
                       capture_output=True, text=True)
    check("too long: one line, exit 1", p.returncode == 1 and len(p.stderr.strip().splitlines()) == 1
          and "511" in p.stderr, p.stderr)

print(f"ref: check_note: {passed} passed, {failed} failed")
sys.exit(1 if failed else 0)
