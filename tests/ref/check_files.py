"""check_files.py - issue 12, item 4, through the program: every file a
command writes goes through the one file writer (src/fileio.c), so
`export` and `iv ... svg FILE csv FILE` keep a symbolic link and replace
its target, write a FIFO in place, keep an existing file's mode, give a
new file 0666 minus the umask, take `-` as standard output, and on an
unwritable path fail with one line naming it and leave nothing behind.
Standard output that cannot be written (/dev/full) gives exit status 1
and a message on standard error.  Everything happens in a scratch
directory; no device node is ever a target."""
import os
import stat
import subprocess
import sys
import tempfile
import threading

binary = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
tmp = tempfile.mkdtemp(prefix="ionmix-files-")
passed = failed = 0
SETUP = "solution pip; add KCl 140; add NaCl 10; solution bath; add NaCl 140; add KCl 5"


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what + (": " + detail if detail else ""))


def run(cmd, umask=None, stdout=subprocess.PIPE):
    env = dict(os.environ, LC_ALL="C", HOME=tmp, XDG_DATA_HOME=tmp)
    env.pop("IONMIX_DB", None)
    pre = (lambda: os.umask(umask)) if umask is not None else None
    return subprocess.run([binary, "--db", os.path.join(tmp, "u.db"), "-e", SETUP, "-e", cmd],
                          cwd=tmp, stdout=stdout, stderr=subprocess.PIPE, text=True, env=env,
                          timeout=60, preexec_fn=pre)


def p(name):
    return os.path.join(tmp, name)


# a new file: 0666 minus the umask
r = run("export pip new.ionmix", umask=0o027)
check("export: exit 0", r.returncode == 0, r.stderr)
check("export: a new file gets 0666 minus the umask (0640 under 027)",
      stat.S_IMODE(os.stat(p("new.ionmix")).st_mode) == 0o640,
      oct(stat.S_IMODE(os.stat(p("new.ionmix")).st_mode)))
check("export: the recipe rebuilds pip", "set \"KCl\" 140 mM" in open(p("new.ionmix")).read())

# an existing file keeps its mode
with open(p("old.ionmix"), "w") as f:
    f.write("old\n")
os.chmod(p("old.ionmix"), 0o604)
r = run("export pip old.ionmix", umask=0o077)
check("export over an existing file keeps its mode 0604",
      stat.S_IMODE(os.stat(p("old.ionmix")).st_mode) == 0o604)
check("export replaced the content", "KCl" in open(p("old.ionmix")).read())

# a symbolic link is followed: the target replaced, the link kept
os.mkdir(p("real"))
with open(p("real/target.ionmix"), "w") as f:
    f.write("old\n")
os.symlink("real/target.ionmix", p("link.ionmix"))
r = run("export pip link.ionmix")
check("export through a symlink: exit 0", r.returncode == 0, r.stderr)
check("the link is still a link", os.path.islink(p("link.ionmix")))
check("its target holds the recipe", "KCl" in open(p("real/target.ionmix")).read())

# iv's SVG and CSV through a link and to a new file
os.symlink("real/iv.csv", p("iv-link.csv"))
r = run("iv pip bath K+=1 Na+=0.05 svg iv.svg csv iv-link.csv")
check("iv svg/csv: exit 0", r.returncode == 0, r.stderr)
check("iv: the CSV link is still a link", os.path.islink(p("iv-link.csv")))
check("iv: the CSV went to the link's target",
      open(p("real/iv.csv")).read().startswith("V_mV,total_"))
check("iv: the SVG is a standalone SVG", "<svg" in open(p("iv.svg")).read())

# a FIFO is written in place, never replaced
os.mkfifo(p("fifo"))
got = []


def reader():
    with open(p("fifo")) as f:
        got.append(f.read())


t = threading.Thread(target=reader)
t.start()
r = run("export pip fifo")
t.join(30)
check("export to a FIFO: exit 0", r.returncode == 0, r.stderr)
check("the FIFO is still a FIFO", stat.S_ISFIFO(os.stat(p("fifo")).st_mode))
check("the reader got the recipe", got and "KCl" in got[0])

# "-" is standard output, and no file named "-" appears
r = run("export pip -")
check("export -: the recipe on standard output", "set \"KCl\" 140 mM" in r.stdout)
check("export -: no file named -", not os.path.exists(p("-")))
r = run("iv pip bath K+=1 svg -")
check("iv svg -: the SVG on standard output", "<svg" in r.stdout and "</svg>" in r.stdout)
check("iv svg -: no file named -", not os.path.exists(p("-")))

# an unwritable path (its parent is a regular file, so even root cannot
# write there): one line naming the file, nothing left behind
with open(p("plain"), "w") as f:
    f.write("x\n")
before = sorted(os.listdir(tmp))
r = run("export pip plain/sub.ionmix")
check("unwritable path: exit 1", r.returncode == 1)
check("unwritable path: one line naming the file",
      len(r.stderr.strip().splitlines()) == 1 and "plain/sub.ionmix" in r.stderr, r.stderr)
r = run("iv pip bath K+=1 svg ok.svg csv plain/iv.csv")
check("iv with one unwritable output: exit 1", r.returncode == 1)
check("iv: all or nothing, the SVG was not left either", not os.path.exists(p("ok.svg")))
check("nothing left behind in the directory", sorted(os.listdir(tmp)) == before,
      str(set(os.listdir(tmp)) ^ set(before)))

# standard output that cannot be written: exit 1, a message on stderr
if os.path.exists("/dev/full"):
    with open("/dev/full", "w") as full:
        r = run("show pip", stdout=full)
    check("show >/dev/full: exit 1", r.returncode == 1, str(r.returncode))
    check("show >/dev/full: a message on standard error", "standard output" in r.stderr, r.stderr)
    with open("/dev/full", "w") as full:
        env = dict(os.environ, LC_ALL="C", HOME=tmp)
        r = subprocess.run([binary, "-e", "show"], stdout=full, stderr=subprocess.PIPE, text=True,
                           env=env, timeout=60)
    check("ionmix -e show >/dev/full: exit 1 with a message", r.returncode == 1 and r.stderr.strip())
    with open("/dev/full", "w") as full:
        r = subprocess.run([binary, "--help"], stdout=full, stderr=subprocess.PIPE, text=True,
                           timeout=60)
    check("--help >/dev/full: exit 1", r.returncode == 1 and "standard output" in r.stderr)

print("ref: check_files: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
