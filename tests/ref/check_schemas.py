"""check_schemas.py - the JSON contract of issue 12: every command of the
table, run with --json on the demo recipes, prints exactly one object per
command, and each object is valid against schemas/COMMAND.json (JSON
Schema draft 2020-12, validated with Debian's python3-jsonschema).

The list of commands comes from the program itself (`help` under --json),
so a command added to the table without a schema and an example here
fails this check.  Each example runs in a fresh scratch directory on the
three demo recipes, every recipe line and the example given as its own -e,
so line i of the output belongs to command i."""
import json
import os
import shutil
import subprocess
import sys
import tempfile

try:
    import jsonschema
except ImportError:
    print("check_schemas: python3-jsonschema is missing (src/tools/ensure-deps.sh test installs it)")
    sys.exit(1)

binary = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
schema_dir = os.path.join(root, "schemas")
recipes = ["bath-saline.ionmix", "k-pipette.ionmix", "cs-pipette.ionmix"]
passed = failed = 0

# Setup commands (after the recipes) and the command under test.  Every
# command of the table needs at least one row; several rows cover the
# forms of one command.
EXAMPLES = [
    ([], "solution extra"),
    ([], "solution copy from bath"),
    (["solution k-pipette"], "add KCl 1"),
    (["solution k-pipette"], "set KCl 12"),
    (["solution k-pipette"], "remove KCl"),
    (["solution extra"], "clear"),
    ([], "show k-pipette"),
    ([], "show cs-pipette"),
    (["solution empty"], "show"),
    (["solution k-pipette"], "ph 7.2 with KOH"),
    (["solution k-pipette"], "ph 7.2 with KOH at 30"),
    (["solution cs-pipette"], "targets"),
    (["solution cs-pipette"], "targets drop Ca"),
    (["solution k-pipette"], "add EGTA 2"),
    (["solution bath", "targets drop ph"], "gas co2 5"),
    (["solution bath"], "gas off"),
    (["solution cs-pipette"], "free Ca 100 nM with CaCl2.2H2O"),
    (["solution k-pipette"], "osmo 295"),
    ([], "constants"),
    ([], "constants EGTA"),
    ([], "constants good-1966"),
    ([], "constants default"),
    ([], "temp"),
    ([], "temp 30"),
    ([], "activity"),
    ([], "activity dh"),
    ([], "nernst k-pipette bath"),
    ([], "nernst cs-pipette bath activities"),
    ([], "junction k-pipette bath"),
    ([], "junction cs-pipette bath model all"),
    (["solution lowcl", "add Na-gluconate 140", "add KCl 5", "add CaCl2 2"],
     "exchange bath lowcl pipette k-pipette"),
    ([], "erev k-pipette bath K+=1 Na+=0.04 Cl-=0.45"),
    ([], "ratio k-pipette bath Na+ K+ at -40"),
    ([], "iv k-pipette bath K+=1 Na+=0.05 step 20"),
    ([], "sweep temp 20 to 36 in bath show ionic-strength points 5"),
    ([], "sweep CaCl2.2H2O 0 to 4 mM in bath show ljp k-pipette bath points 5 csv sw.csv svg sw.svg"),
    ([], "iv k-pipette bath K+=1e-6cm/s step 20 csv iv.csv svg iv.svg"),
    ([], "review k-pipette bath"),
    ([], "review cs-pipette bath"),
    (["solution k-pipette"], "weigh 250 mL"),
    (["solution k-pipette"], "stock KCl 1 M"),
    (["solution k-pipette", "stock MgCl2.6H2O 1 M"], "stock MgCl2.6H2O off"),
    ([], "save k-pipette"),
    (["save bath"], "load bath"),
    (["save bath", "solution bath", "add KCl 1", "save bath"], "load bath@1"),
    (["save bath", "solution bath", "add KCl 1", "save bath"], "versions bath"),
    (["solution bath", "add KCl 1"], "undo"),
    ([], "list"),
    (["save bath"], "delete bath"),
    ([], "export k-pipette k.ionmix"),
    ([], "run tiny.ionmix"),
    ([], "correct value -70 -60.5 by 15"),
    ([], "correct value -70 for k-pipette bath"),
    ([], "correct rec.csv column 2 by 12 to rec-corrected.csv"),
    ([], "define Testdrug formula C13H20N2O2.HCl source \"an invented example\""),
    (["define ion Tq+ charge 1 formula C8H20N"], "define TqBr formula C8H20NBr yields Tq+ 1 Br- 1"),
    ([], "define ion Zq2- charge -2 mobility 0.7 source \"an invented example\""),
    (["define ion Zr+ charge 1 mass 150"], "define ion Zr+ charge 1 mass 150"),
    (["define Testdrug2 formula C13H20N2O2.HCl"], "compounds mine"),
    (["define Testdrug3 formula C13H20N2O2.HCl"], "info Testdrug3"),
    (["solution k-pipette"], "fw KCl 74.6"),
    ([], "info KCl"),
    ([], "info Ca2+"),
    ([], "compounds"),
    ([], "compounds buffer"),
    ([], "help"),
    ([], "help weigh"),
    ([], "quit"),
    ([], "exit"),
]
TINY = "temp 24\nsolution tiny\nadd NaCl 10\n"
CSV = "t_ms,V_mV\n0,-70.0\n1,-69.5\n"


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what + (": " + detail if detail else ""))


def recipe_lines(path):
    out = []
    with open(path) as f:
        for line in f:
            s = line.strip()
            if s and not s.startswith("#"):
                out.append(s)
    return out


def load_schemas():
    schemas = {}
    for name in sorted(os.listdir(schema_dir)):
        if not name.endswith(".json"):
            continue
        with open(os.path.join(schema_dir, name)) as f:
            s = json.load(f)
        cls = jsonschema.validators.validator_for(s)
        try:
            cls.check_schema(s)
            check("schema %s is a valid JSON Schema" % name, True)
        except jsonschema.SchemaError as e:
            check("schema %s is a valid JSON Schema" % name, False, e.message)
            continue
        schemas[name[:-5]] = cls(s)
    return schemas


def run(cmds, work):
    args = [binary, "--json", "--db", os.path.join(work, "user.db")]
    for c in cmds:
        args += ["-e", c]
    env = dict(os.environ, LC_ALL="C", HOME=work, XDG_DATA_HOME=work)
    env.pop("IONMIX_DB", None)
    return subprocess.run(args, cwd=work, capture_output=True, text=True, env=env, timeout=120)


def validate(schemas, cmd, obj, where):
    name = cmd.split()[0]
    if "error" in obj:
        v = schemas.get("error")
        check(where + ": " + cmd + " succeeded", False, obj["error"])
        return
    v = schemas.get(name)
    if v is None:
        check(where + ": a schema for " + name, False)
        return
    errs = sorted(v.iter_errors(obj), key=lambda e: list(e.path))
    check(where + ": " + cmd + " valid against schemas/" + name + ".json", not errs,
          "; ".join("%s: %s" % ("/".join(map(str, e.path)), e.message) for e in errs[:3]))


def main():
    schemas = load_schemas()
    tmp = tempfile.mkdtemp(prefix="ionmix-schema-")
    base = []
    for r in recipes:
        base += recipe_lines(os.path.join(root, "recipes", r))
    # the table, from the program
    r = run(["help"], tmp)
    table = [c["command"] for c in json.loads(r.stdout.splitlines()[-1])["commands"]]
    check("help lists the table under --json", len(table) > 20)
    covered = {cmd.split()[0] for _, cmd in EXAMPLES}
    for name in table:
        check("schemas/%s.json exists" % name, name in schemas)
        check("an example of %s runs here" % name, name in covered)
    check("schemas/error.json exists", "error" in schemas)
    for setup, cmd in EXAMPLES:
        work = os.path.join(tmp, "w")
        shutil.rmtree(work, ignore_errors=True)
        os.mkdir(work)
        for rc in recipes:
            shutil.copy(os.path.join(root, "recipes", rc), work)
        with open(os.path.join(work, "tiny.ionmix"), "w") as f:
            f.write(TINY)
        with open(os.path.join(work, "rec.csv"), "w") as f:
            f.write(CSV)
        cmds = base + setup + [cmd]
        r = run(cmds, work)
        lines = r.stdout.splitlines()
        # `run FILE` prints the objects of FILE's commands, then its own
        expect = len(cmds) + (len(TINY.splitlines()) if cmd.startswith("run ") else 0)
        check("'%s': exit 0" % cmd, r.returncode == 0, r.stderr.strip()[:200])
        check("'%s': one JSON object per command (%d lines, %d expected)"
              % (cmd, len(lines), expect), len(lines) == expect)
        objs = []
        for i, line in enumerate(lines):
            try:
                o = json.loads(line)
                check("'%s': line %d is one JSON object" % (cmd, i + 1), isinstance(o, dict))
                objs.append(o)
            except ValueError as e:
                check("'%s': line %d parses as JSON" % (cmd, i + 1), False, str(e))
                objs.append(None)
        if len(objs) != expect:
            continue
        names = cmds[:-1] + (TINY.splitlines() if cmd.startswith("run ") else []) + [cmd]
        # the recipe lines are validated once, with the first example
        start = 0 if (setup, cmd) == EXAMPLES[0] else len(base)
        for i in range(start, len(objs)):
            if objs[i] is not None:
                validate(schemas, names[i], objs[i], "line %d" % (i + 1))
    # an error is one object too, valid against schemas/error.json
    r = run(["add Nope 1"], tmp)
    o = json.loads(r.stdout.splitlines()[-1])
    errs = list(schemas["error"].iter_errors(o)) if "error" in schemas else ["no schema"]
    check("a failed command prints one object valid against schemas/error.json",
          r.returncode == 1 and not errs)
    shutil.rmtree(tmp, ignore_errors=True)
    print("ref: check_schemas: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


sys.exit(main())
