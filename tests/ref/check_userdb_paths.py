#!/usr/bin/python3
"""check_userdb_paths.py - the user database through the real binary
($IONMIX), issue 14 items 2, 8, 9 and 10:
 - every path of tests/malformed/database.txt (empty, :memory:, URIs, a
   trailing '/', directories, devices, a FIFO), as --db and as IONMIX_DB,
   is refused at start: exit status 2, one line on standard error naming
   it, the existing database byte for byte unchanged, nothing new in the
   scratch or working directory;
 - a database that cannot be reached (a symlink loop, a component that is
   a file, a directory the user cannot enter, a file the user cannot read)
   makes list, load, delete and save fail with exit status 1 and one line
   naming the path and the system's cause (strerror), never "none" or "no
   database yet";
 - without a usable HOME (unset, empty, relative, missing) and without
   XDG_DATA_HOME, save fails with one line saying --db and IONMIX_DB,
   nothing is written in the working directory and HOME is not created;
   with HOME an existing directory the file lands in
   HOME/.local/share/ionmix/ionmix.db, with XDG_DATA_HOME in
   XDG_DATA_HOME/ionmix/ionmix.db (XDG base directory specification);
 - a hand-edited database (Inf, 1e308, negative and NULL amounts, an
   unknown compound) makes load fail with exit status 1 and one line
   naming the solution and the compound; the workspace keeps what it had
   (show of the earlier solution still works) and the file is unchanged;
 - a read-only database (as an unprivileged user when run as root) lists
   and loads without leaving -wal/-shm files, and save fails naming the
   file and the cause.
Run from the repository root with /usr/bin/python3."""
import errno
import hashlib
import os
import shutil
import sqlite3
import stat
import subprocess
import sys
import tempfile

binary = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
passed = failed = 0
NOBODY = 65534


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: %s %s" % (what, detail))


def run(args, cwd, env_extra=None, drop=(), as_nobody=False):
    env = dict(os.environ, LC_ALL="C")
    for k in ("IONMIX_DB", "XDG_DATA_HOME", "HOME") + tuple(drop):
        env.pop(k, None)
    env["XDG_STATE_HOME"] = cwd  # shell history never matters here
    env.setdefault("ASAN_OPTIONS", "detect_leaks=0")
    env.update(env_extra or {})
    pre = None
    if as_nobody and os.geteuid() == 0:
        def pre():
            os.setgid(NOBODY)
            os.setuid(NOBODY)
    exe = nobody_binary if pre else binary
    return subprocess.run([exe] + args, capture_output=True, text=True, cwd=cwd, env=env,
                          timeout=60, preexec_fn=pre)


def one_line(r):
    lines = r.stderr.splitlines()
    return len(lines) == 1 and lines[0].startswith("ionmix: ")


def digest(p):
    with open(p, "rb") as f:
        return hashlib.sha256(f.read()).hexdigest()


def listing(d):
    return sorted(os.listdir(d))


SAVE = "solution bath; add NaCl 140; add KCl 5; save"
root = tempfile.mkdtemp(prefix="ionmix-dbpaths-")
os.chmod(root, 0o755)
# the unprivileged user may not reach the build tree: give it a copy
nobody_binary = os.path.join(root, "ionmix")
shutil.copy2(binary, nobody_binary)
os.chmod(nobody_binary, 0o755)

# ---- refused at start (item 2) ----
scratch = os.path.join(root, "scratch")
os.mkdir(scratch)
os.mkdir(os.path.join(scratch, "dir"))
os.mkfifo(os.path.join(scratch, "fifo"))
r = run(["--db", "user.db", "-e", SAVE], scratch)
check("a plain file name saves", r.returncode == 0, r.stderr)
before = digest(os.path.join(scratch, "user.db"))
names = listing(scratch)
cases = []
with open("tests/malformed/database.txt", encoding="utf-8") as f:
    for line in f:
        line = line.rstrip("\n")
        if not line or line.startswith("# ") or line == "#":
            continue
        cases.append("" if line == "<EMPTY>" else line)
check("database.txt has its cases", len(cases) >= 15)
for path in cases:
    for how in ("--db", "IONMIX_DB"):
        if how == "--db":
            r = run(["--db", path, "-e", SAVE], scratch)
        else:
            if path == "":
                continue  # an empty IONMIX_DB counts as unset
            r = run(["-e", SAVE], scratch, {"IONMIX_DB": path, "HOME": scratch})
        what = "%s %r" % (how, path)
        check(what + ": exit status 2", r.returncode == 2, "(%d) %s" % (r.returncode, r.stderr))
        check(what + ": one line naming it", one_line(r) and (path in r.stderr or not path),
              r.stderr)
        check(what + ": nothing saved", "saved" not in r.stdout, r.stdout)
        check(what + ": database unchanged", digest(os.path.join(scratch, "user.db")) == before)
        check(what + ": nothing new", listing(scratch) == names, str(listing(scratch)))

# ---- unreachable (item 2) ----
ur = os.path.join(root, "unreach")
os.mkdir(ur)
os.chmod(ur, 0o777)
os.symlink("loop.db", os.path.join(ur, "loop.db"))
open(os.path.join(ur, "plain"), "w").close()
os.mkdir(os.path.join(ur, "shut"))
r = run(["--db", os.path.join(ur, "shut", "u.db"), "-e", SAVE], ur)
check("save into shut/", r.returncode == 0, r.stderr)
r = run(["--db", os.path.join(ur, "noread.db"), "-e", SAVE], ur)
check("save noread.db", r.returncode == 0, r.stderr)
os.chmod(os.path.join(ur, "shut"), 0o000)
os.chmod(os.path.join(ur, "noread.db"), 0o000)
unreach = [("loop.db", errno.ELOOP), ("plain/u.db", errno.ENOTDIR),
           ("shut/u.db", errno.EACCES), ("noread.db", errno.EACCES)]
for name, code in unreach:
    p = os.path.join(ur, name)
    for cmd in ("list", "load bath", "delete bath", SAVE):
        r = run(["--db", p, "-e", cmd], ur, as_nobody=True)
        what = "%s on %s" % (cmd.split()[0] if cmd != SAVE else "save", name)
        check(what + ": exit status 1", r.returncode == 1, "(%d) %s" % (r.returncode, r.stderr))
        check(what + ": one line with path and cause",
              one_line(r) and p in r.stderr and os.strerror(code) in r.stderr, r.stderr)
        check(what + ": no empty answer",
              "none" not in r.stdout and "no database yet" not in r.stderr, r.stdout)
os.chmod(os.path.join(ur, "shut"), 0o700)
os.chmod(os.path.join(ur, "noread.db"), 0o600)

# ---- no usable HOME (item 8) ----
work = os.path.join(root, "work")
os.mkdir(work)
gone = os.path.join(root, "gone-home")
for label, env, drop in (("HOME unset", {}, ("HOME",)), ("HOME empty", {"HOME": ""}, ()),
                         ("HOME relative", {"HOME": "home"}, ()),
                         ("HOME missing", {"HOME": gone}, ()),
                         ("XDG_DATA_HOME relative", {"HOME": gone, "XDG_DATA_HOME": "d"}, ())):
    r = run(["-e", SAVE], work, env, drop)
    check(label + ": save fails, exit 1", r.returncode == 1, r.stderr)
    check(label + ": one line naming --db and IONMIX_DB",
          one_line(r) and "--db" in r.stderr and "IONMIX_DB" in r.stderr, r.stderr)
    check(label + ": nothing in the working directory", listing(work) == [], str(listing(work)))
    check(label + ": HOME not created", not os.path.exists(gone))
    r = run(["-e", "solution a; add NaCl 1; show"], work, env, drop)
    check(label + ": commands without the database still work", r.returncode == 0, r.stderr)
home = os.path.join(root, "home")
os.mkdir(home)
r = run(["-e", SAVE], work, {"HOME": home})
check("HOME: saved under .local/share/ionmix",
      r.returncode == 0 and os.path.isfile(os.path.join(home, ".local/share/ionmix/ionmix.db")),
      r.stderr)
xdg = os.path.join(root, "xdg")
r = run(["-e", SAVE], work, {"HOME": gone, "XDG_DATA_HOME": xdg})
check("XDG_DATA_HOME: saved there without HOME",
      r.returncode == 0 and os.path.isfile(os.path.join(xdg, "ionmix/ionmix.db")), r.stderr)
check("XDG_DATA_HOME: HOME not created", not os.path.exists(gone))
check("nothing in the working directory at all", listing(work) == [], str(listing(work)))

# ---- hand-edited rows (item 9) ----
ed = os.path.join(root, "edited")
os.mkdir(ed)
db = os.path.join(ed, "user.db")
r = run(["--db", db, "-e", SAVE], ed)
check("edited: saved", r.returncode == 0, r.stderr)
edits = [("UPDATE solution_items SET mM = 1e999 WHERE compound = 'KCl'", "KCl"),
         ("UPDATE solution_items SET mM = 1e308 WHERE compound = 'KCl'", "KCl"),
         ("UPDATE solution_items SET mM = -5 WHERE compound = 'KCl'", "KCl"),
         ("UPDATE solution_items SET mM = NULL WHERE compound = 'KCl'", "KCl"),
         ("UPDATE solution_items SET stock_mM = 1e999 WHERE compound = 'KCl'", "KCl"),
         ("UPDATE solution_items SET stock_mM = -1000 WHERE compound = 'KCl'", "KCl"),
         ("UPDATE solution_items SET compound = 'Kryptonite' WHERE compound = 'KCl'",
          "Kryptonite")]
for sql, compound in edits:
    shutil.copy(db, db + ".edit")
    ed_db = db + ".edit"
    h = sqlite3.connect(ed_db)
    h.execute("PRAGMA ignore_check_constraints = 1")
    # a NULL needs the NOT NULL constraint gone: rebuild the table as a
    # user with the sqlite3 shell might
    h.executescript("CREATE TABLE t AS SELECT * FROM solution_items;"
                    "DROP TABLE solution_items; ALTER TABLE t RENAME TO solution_items;")
    h.execute(sql)
    h.commit()
    h.close()
    before = digest(ed_db)
    r = run(["--db", ed_db, "-e", "solution mine; add NaCl 10", "-e", "load bath",
             "-e", "show"], ed)
    what = "load after %r" % sql
    check(what + ": exit status 1", r.returncode == 1, "(%d) %s" % (r.returncode, r.stderr))
    check(what + ": one line naming solution and compound",
          one_line(r) and "'bath'" in r.stderr and compound in r.stderr, r.stderr)
    check(what + ": nothing loaded", "loaded" not in r.stdout, r.stdout)
    check(what + ": file unchanged", digest(ed_db) == before)
    r = run(["--db", ed_db, "--json", "-e", "load bath"], ed)
    check(what + ": --json exit status 1 too", r.returncode == 1 and '"error"' in r.stdout,
          r.stdout)
    os.unlink(ed_db)
# a script stops at the line of the bad load, FILE:LINE: in the message
shutil.copy(db, db + ".edit")
h = sqlite3.connect(db + ".edit")
h.execute("PRAGMA ignore_check_constraints = 1")
h.execute("UPDATE solution_items SET mM = -5 WHERE compound = 'KCl'")
h.commit()
h.close()
script = os.path.join(ed, "s.ionmix")
with open(script, "w") as f:
    f.write("solution mine\nadd NaCl 10\nload bath\nshow\n")
r = run(["--db", db + ".edit", script], ed)
check("script: a bad row fails at its line", r.returncode == 1 and one_line(r) and
      "s.ionmix:3:" in r.stderr and "KCl" in r.stderr and "ionic strength" not in r.stdout,
      r.stderr)

# ---- a read-only database (item 10) ----
ro = os.path.join(root, "ro")
os.mkdir(ro)
os.chmod(ro, 0o1777)
rodb = os.path.join(ro, "user.db")
r = run(["--db", rodb, "-e", SAVE], ro)
check("ro: saved", r.returncode == 0, r.stderr)
os.chmod(rodb, 0o444)
before = digest(rodb)
for cmd in ("list", "load bath; show"):
    r = run(["--db", rodb, "-e", cmd], ro, as_nobody=True)
    check("ro: %s works" % cmd, r.returncode == 0 and "bath" in r.stdout, r.stderr)
    check("ro: %s leaves no -wal/-shm" % cmd, listing(ro) == ["user.db"], str(listing(ro)))
for cmd in (SAVE, "delete bath"):
    r = run(["--db", rodb, "-e", cmd], ro, as_nobody=True)
    check("ro: %s fails naming file and cause" % cmd.split(";")[-1].strip(),
          r.returncode == 1 and one_line(r) and rodb in r.stderr and
          os.strerror(errno.EACCES) in r.stderr, r.stderr)
    check("ro: %s leaves no -wal/-shm" % cmd, listing(ro) == ["user.db"], str(listing(ro)))
check("ro: file unchanged", digest(rodb) == before)

shutil.rmtree(root, ignore_errors=True)
print("ref: check_userdb_paths: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
