#!/usr/bin/python3
"""check_install.py - shell integration (issue 13 item 6): the bash
completion file generated at build time from the command table names
every command the binary lists (`--json -e help`), bash -n accepts it, and
sourced in bash it completes a command word after -e, options after -, and
file names after a command that takes one; `make install DESTDIR=TMP
PREFIX=/usr` puts the binary, the man page, the completion file and every
demo recipe in place, the man page's examples name the installed recipes,
the installed binary runs them, and `make uninstall` removes them again.

Run from the repository root with IONMIX set to the binary and
IONMIX_BUILD (and IONMIX_SAN) to the build it belongs to, as
tests/run.sh does."""
import json
import os
import subprocess
import sys
import tempfile

binary = os.environ.get("IONMIX", "build/ionmix")
build = os.environ.get("IONMIX_BUILD") or os.path.dirname(binary)
san = os.environ.get("IONMIX_SAN", "")
compl = os.path.abspath(os.path.join(build, "ionmix.bash"))
passed = failed = 0


def check(what, ok):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what)


def complete(words):
    """COMPREPLY of the sourced file for the command line `words` (the
    last word is the one being completed)."""
    arr = " ".join("'" + w.replace("'", "'\\''") + "'" for w in words)
    script = ('source "$1"; COMP_WORDS=(%s); COMP_CWORD=%d; _ionmix; '
              'printf "%%s\\n" "${COMPREPLY[@]}"' % (arr, len(words) - 1))
    r = subprocess.run(["bash", "-c", script, "bash", compl], capture_output=True,
                       text=True, timeout=30, cwd=tmp)
    return r.returncode, [x for x in r.stdout.split("\n") if x]


env = dict(os.environ, LC_ALL="C")
env.pop("IONMIX_DB", None)
r = subprocess.run([binary, "--json", "-e", "help"], capture_output=True, text=True,
                   env=env, timeout=60)
table = [c["command"] for c in json.loads(r.stdout.splitlines()[-1])["commands"]]
check("help lists the command table (%d commands)" % len(table), len(table) >= 30)
text = open(compl).read()
line = [x for x in text.splitlines() if x.startswith("_ionmix_commands=")]
listed = line[0].split("=", 1)[1].strip("'").split() if line else []
check("the completion file names every command of the table, in its order",
      listed == table)
check("bash -n accepts the completion file",
      subprocess.run(["bash", "-n", compl], timeout=30).returncode == 0)

tmp = tempfile.mkdtemp(prefix="ionmix-install-")
open(os.path.join(tmp, "my-bath.ionmix"), "w").close()
rc, got = complete(["ionmix", "-e", "jun"])
check("-e jun completes to junction (%s)" % got, rc == 0 and got == ["junction"])
rc, got = complete(["ionmix", "--execute", "s"])
check("--execute s completes to the s-commands of the table (%s)" % got,
      rc == 0 and sorted(got) == sorted(c for c in table if c.startswith("s")))
rc, got = complete(["ionmix", "--j"])
check("--j completes to --json (%s)" % got, rc == 0 and got == ["--json"])
rc, got = complete(["ionmix", "-e", "run my-"])
check("a file name after run inside -e (%s)" % got, rc == 0 and got == ["my-bath.ionmix"])
rc, got = complete(["ionmix", "my-"])
check("a script file name (%s)" % got, rc == 0 and got == ["my-bath.ionmix"])

dest = os.path.join(tmp, "dest")
mk = ["make", "-s", "--no-print-directory", "BUILD=" + build, "SAN=" + san,
      "DESTDIR=" + dest, "PREFIX=/usr"]
r = subprocess.run(mk + ["install"], capture_output=True, text=True, timeout=600)
check("make install DESTDIR=... exits 0 (%s)" % r.stderr[-300:], r.returncode == 0)
root = dest + "/usr"
recipes = sorted(x for x in os.listdir("recipes") if x.endswith(".ionmix"))
want = ["bin/ionmix", "share/man/man1/ionmix.1",
        "share/bash-completion/completions/ionmix"] + \
       ["share/ionmix/recipes/" + x for x in recipes]
for w in want:
    check("installed: " + w, os.path.isfile(os.path.join(root, w)))
check("the installed binary is executable", os.access(root + "/bin/ionmix", os.X_OK))
check("the installed completion file is the generated one",
      open(root + "/share/bash-completion/completions/ionmix").read() == text)
man = open(root + "/share/man/man1/ionmix.1").read()
ex = man[man.find(".SH EXAMPLES"):]
check("the man page's examples use the installed recipes",
      "/usr/share/ionmix/recipes/k-pipette.ionmix" in ex and
      "/usr/local/share" not in man)
r = subprocess.run([root + "/bin/ionmix", "--db", os.path.join(tmp, "u.db")] +
                   [root + "/share/ionmix/recipes/" + x for x in recipes] +
                   ["-e", "junction k-pipette bath"],
                   capture_output=True, text=True, env=env, timeout=120)
check("the installed binary runs the installed recipes (%s)" % r.stderr[-200:],
      r.returncode == 0 and "mV" in r.stdout)
r = subprocess.run(mk + ["uninstall"], capture_output=True, text=True, timeout=120)
left = [os.path.join(d, f) for d, _, fs in os.walk(dest) for f in fs]
check("make uninstall removes every installed file (%s)" % left[:5],
      r.returncode == 0 and not left)
subprocess.run(["rm", "-rf", tmp])
print("ref: check_install: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
