"""check_invocation.py - options, modes and exit status of the binary, as
the core issue and the GNU coding standards (--help, --version) describe
them: 0 when every command succeeded, 1 when one failed, 2 for a usage
error; standard input read as a script when it is not a terminal; JSON
errors on standard output."""
import json
import os
import subprocess
import sys
import tempfile

binary = os.environ.get("IONMIX", "build/ionmix")
tmp = tempfile.mkdtemp(prefix="ionmix-inv-")
db = os.path.join(tmp, "sub", "user.db")
passed = failed = 0


def run(args, stdin=None):
    env = dict(os.environ, LC_ALL="C", HOME=tmp, XDG_DATA_HOME=tmp)
    env.pop("IONMIX_DB", None)
    return subprocess.run([binary] + args, input=stdin, capture_output=True, text=True,
                          env=env, timeout=60)


def check(what, ok):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what)


r = run(["--help"])
check("--help exits 0 and starts with Usage", r.returncode == 0 and r.stdout.startswith("Usage: ionmix"))
r = run(["--version"])
check("--version exits 0, first line 'ionmix VERSION'",
      r.returncode == 0 and r.stdout.splitlines()[0].startswith("ionmix ") and "GPL" in r.stdout)
r = run(["--frobnicate"])
check("unknown option exits 2 with one line and a hint",
      r.returncode == 2 and "unknown option" in r.stderr and "--help" in r.stderr)
r = run(["--db"])
check("--db without its argument exits 2", r.returncode == 2)
r = run(["--db", db, "-e", "solution a; add NaCl 140; show"])
check("-e runs commands, exit 0", r.returncode == 0 and "ionic strength" in r.stdout)
check("reading never creates the database", not os.path.exists(os.path.dirname(db)))
r = run(["--db", db, "-e", "solution a", "-e", "add Nope 1", "-e", "show"])
check("a failing -e stops there with exit 1",
      r.returncode == 1 and "Nope" in r.stderr and "ionic strength" not in r.stdout)
r = run(["--db", db], stdin="solution a\nadd NaCl 10\nshow\n")
check("standard input (not a terminal) runs as a script, no prompt",
      r.returncode == 0 and "ionmix [" not in r.stdout and "ionic strength" in r.stdout)
r = run(["--db", db], stdin="solution a\nadd NaCl ten\nshow\n")
check("a bad stdin line: exit 1, (stdin):2: in the message",
      r.returncode == 1 and "(stdin):2:" in r.stderr)
r = run(["--db", db, "--json", "-e", "solution a; add NaCl 140; show"])
lines = [json.loads(x) for x in r.stdout.splitlines()]
check("--json prints one object per line with the show keys",
      r.returncode == 0 and all(k in lines[-1] for k in
                                ("solution", "temperature_C", "ions", "ionic_strength_mM",
                                 "osmolarity_mOsm_L", "net_charge_mEq_L", "pH", "free",
                                 "osmolality_mOsm_kg", "osmotic_coefficient")))
r = run(["--db", db, "--json", "-e", "add Nope 1"])
check("--json errors go to standard output as {\"error\"}",
      r.returncode == 1 and "error" in json.loads(r.stdout.splitlines()[-1]))
r = run(["--db", db, os.path.join(tmp, "missing.ionmix")])
check("a missing script exits 1", r.returncode == 1 and "cannot open" in r.stderr)
r = run(["--db", db, "-e", "solution a; add NaCl 1; save"])
check("save creates the database and its directory", r.returncode == 0 and os.path.exists(db))
r = run(["--db", db, "-e", "load a; show"])
check("a saved solution loads in a new process", r.returncode == 0 and "NaCl" in r.stdout)
# getopt_long: --execute=CMD, -eCMD, unambiguous abbreviations, --db=
r = run(["--db=" + db, "--execute=solution a; add NaCl 140", "-eshow"])
check("--execute=CMD and -eCMD run", r.returncode == 0 and "ionic strength" in r.stdout)
r = run(["--d", db, "--ex", "solution a", "--js", "-e", "temp"])
check("unambiguous abbreviations (--d, --ex, --js)",
      r.returncode == 0 and json.loads(r.stdout.splitlines()[-1]) == {"temperature_C": 25})
r = run(["--db=", "-e", "temp"])
check("an empty --db= is refused with exit 2", r.returncode == 2 and "--db" in r.stderr)
r = run(["--db", db, "--help"])
check("--help ends with a bug-report line",
      r.returncode == 0 and r.stdout.strip().splitlines()[-1].startswith("Report bugs to"))
script = os.path.join(tmp, "s.ionmix")
with open(script, "w") as f:
    f.write("temp 30\n")
r = run(["--db", db, "-e", "temp 20", script, "-e", "temp"])
check("scripts and -e keep their order among options",
      r.returncode == 0 and r.stdout.splitlines()[-1] == "temperature 30.0 C")
r = run(["--db", db, "-e", "quit", "-e", "temp 40", "-e", "temp"])
check("quit stops: nothing after it runs", r.returncode == 0 and "40" not in r.stdout)
r = run(["--db", db, "--json", "-e", "temp 31", "-e", "help", "-e", "solution a", "-e", "clear"])
check("state-changing commands answer under --json, one object each",
      r.returncode == 0 and len(r.stdout.splitlines()) == 4 and
      json.loads(r.stdout.splitlines()[0]) == {"temperature_C": 31})

# Input limits (issue 14 item 3): a line over 4096 bytes and a script over
# 16 MiB end with one line naming the limit and exit 1, holding no more
# than a few MB more than a one-line run does (peak RSS of the child, read
# with wait4, compared with the same binary's own baseline so that the
# sanitizer build's larger footprint does not matter).
def run_rss(args, stdin_file=None, feed=None):
    """Run the binary; return (status, stderr bytes, peak RSS in KiB)."""
    env = dict(os.environ, LC_ALL="C", HOME=tmp, XDG_DATA_HOME=tmp)
    env.pop("IONMIX_DB", None)
    p = subprocess.Popen([binary, "--db", db] + args, stdin=stdin_file or
                         (subprocess.PIPE if feed else subprocess.DEVNULL),
                         stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, env=env)
    if feed:
        import threading

        def writer():
            try:
                while True:
                    p.stdin.write(feed)
            except (BrokenPipeError, OSError, ValueError):
                pass
        t = threading.Thread(target=writer, daemon=True)
        t.start()
    err = p.stderr.read()
    _, status, ru = os.wait4(p.pid, 0)
    p.returncode = os.waitstatus_to_exitcode(status)
    return p.returncode, err, ru.ru_maxrss


base_rc, _, base_rss = run_rss(["-e", "temp"])
check("baseline run for the memory checks exits 0", base_rc == 0)
limit_kib = base_rss + 8 * 1024
for what, args, stdin_file, feed, word in (
        ("ionmix /dev/zero", ["/dev/zero"], None, None, "4096 bytes"),
        ("run /dev/zero", ["-e", "run /dev/zero"], None, None, "4096 bytes"),
        ("ionmix < /dev/zero", [], "/dev/zero", None, "4096 bytes"),
        ("an endless stream of comment lines", [], None,
         b"# " + b"x" * 4000 + b"\n", "16777216 bytes"),
        ("an endless stream of one long line", [], None, b"temp 25 " * 512, "4096 bytes")):
    fh = open(stdin_file, "rb") if stdin_file else None
    rc, err, rss = run_rss(args, fh, feed)
    if fh:
        fh.close()
    check("%s: exit 1, one line naming the limit (%r)" % (what, err[:160]),
          rc == 1 and err.count(b"\n") == 1 and word.encode() in err)
    check("%s: peak RSS %d KiB within 8 MiB of a one-command run (%d KiB)"
          % (what, rss, base_rss), rss <= limit_kib)
r = run(["--db", db], stdin="temp 21\n" + "#" * 4096 + "\ntemp 22\n")
check("a 4096-byte line is still a line", r.returncode == 0 and "22.0" in r.stdout)
os.environ["IONMIX_DB"] = db
r = subprocess.run([binary, "-e", "list"], capture_output=True, text=True,
                   env=dict(os.environ, LC_ALL="C", HOME=tmp))
check("IONMIX_DB names the database", r.returncode == 0 and "  a" in r.stdout)
print("ref: check_invocation: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
