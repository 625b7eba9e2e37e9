"""check_shell_keep.py - the interactive shell on a pseudo-terminal (issue 11
item 4, issue 14 item 5): Ctrl-C at the prompt clears the half-typed line
and keeps the shell with its workspace; a SIGKILL of the shell loses
nothing but the line being typed: the next start restores the workspace
and says so in one line; `quit` with unsaved solutions names them and asks
once; `undo` takes back the last change; the kept workspace carries the
temperature.  Run by tests/run.sh with IONMIX set to the binary."""
import os
import pty
import select
import signal
import sys
import tempfile
import time

binary = os.environ.get("IONMIX", "build/ionmix")
tmp = tempfile.mkdtemp(prefix="ionmix-keep-")
db = os.path.join(tmp, "user.db")
passed = failed = 0


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what + (": " + detail if detail else ""))


class Shell:
    """The shell on a pty; `expect` reads until a pattern appears."""

    def __init__(self):
        env = dict(os.environ, LC_ALL="C", HOME=tmp, XDG_DATA_HOME=tmp,
                   XDG_STATE_HOME=tmp, TERM="dumb", INPUTRC="/dev/null")
        env.pop("IONMIX_DB", None)
        self.pid, self.fd = pty.fork()
        if self.pid == 0:
            os.execve(binary, [binary, "--db", db], env)
        self.buf = b""

    def send(self, s):
        os.write(self.fd, s.encode())

    def expect(self, pat, timeout=20.0):
        """Read until pat (bytes) is in the output after the mark; the text
        read since the mark, or None on timeout or end."""
        end = time.time() + timeout
        while pat.encode() not in self.buf:
            left = end - time.time()
            if left <= 0:
                return None
            r, _, _ = select.select([self.fd], [], [], left)
            if not r:
                continue
            try:
                data = os.read(self.fd, 4096)
            except OSError:
                return None
            if not data:
                return None
            self.buf += data
        i = self.buf.index(pat.encode()) + len(pat)
        out, self.buf = self.buf[:i], self.buf[i:]
        return out.decode(errors="replace")

    def command(self, line):
        """Send a command; the output up to the next prompt."""
        self.send(line + "\r")
        return self.expect("]> ")

    def alive(self):
        pid, _ = os.waitpid(self.pid, os.WNOHANG)
        return pid == 0

    def wait(self, timeout=20.0):
        end = time.time() + timeout
        while time.time() < end:
            pid, status = os.waitpid(self.pid, os.WNOHANG)
            if pid:
                return status
            try:
                r, _, _ = select.select([self.fd], [], [], 0.1)
                if r:
                    self.buf += os.read(self.fd, 4096)
            except OSError:
                pass
        return None


# ---- first session: build a workspace, Ctrl-C, then SIGKILL ----
sh = Shell()
check("the shell starts and shows a prompt", sh.expect("]> ") is not None)
sh.command("solution pip")
sh.command("add NaCl 10")
sh.command("temp 32")
out = sh.command("solution bath")
sh.command("add KCl 3")
# half-typed, then Ctrl-C: the text must not survive into the next line
sh.send("add CaCl2 2")
time.sleep(0.3)
sh.send("\x03")
out = sh.expect("]> ")
check("Ctrl-C at the prompt keeps the shell running, with a new prompt",
      out is not None and sh.alive(), repr(out))
sh.send("\r")
sh.expect("]> ")
out = sh.command("show bath")
check("after Ctrl-C the workspace is intact (bath has KCl 3 mM)",
      out is not None and "KCl" in out and "3 mM" in out, repr(out))
check("the half-typed line did not survive Ctrl-C (no CaCl2 in bath)",
      out is not None and "CaCl2" not in out, repr(out))
out = sh.command("add KCl 1")
out = sh.command("undo")
check("undo takes back the last change", out is not None and "undid" in out, repr(out))
out = sh.command("show bath")
check("after undo bath has KCl 3 mM again", out is not None and "3 mM" in out and
      "4 mM" not in out, repr(out))
# typed but not entered when killed: lost, and only that
sh.send("add KCl 50")
time.sleep(0.3)
os.kill(sh.pid, signal.SIGKILL)
sh.wait()
os.close(sh.fd)

# ---- second session: the workspace comes back ----
sh = Shell()
out = sh.expect("]> ")
check("after SIGKILL the next start says what it restored in one line",
      out is not None and "restored the workspace of the last session: 2 solutions (pip, bath)"
      in out and "32.0 C" in out, repr(out))
out = sh.command("show pip")
check("the restored pip holds NaCl 10 mM", out is not None and "NaCl" in out and "10 mM" in out,
      repr(out))
out = sh.command("show bath")
check("the restored bath holds KCl 3 mM and not the line typed at the kill",
      out is not None and "3 mM" in out and "53 mM" not in out, repr(out))
check("the restored temperature is 32 C", out is not None and "32.0 C" in out, repr(out))

# ---- completion on the terminal: the typed prefix completes, not eaten ----
sh.send("info k-gluc\t")
time.sleep(0.5)
sh.send("\r")
out = sh.expect("]> ")
check("Tab completes 'k-gluc' to K-gluconate and the command runs",
      out is not None and "K-gluconate" in out and "formula" in out, repr(out))

# ---- quit with unsaved solutions: named, asked once ----
sh.send("quit\r")
out = sh.expect("[y/N] ")
check("quit with unsaved solutions names them and asks",
      out is not None and "not saved: pip, bath" in out, repr(out))
sh.send("n\r")
out = sh.expect("]> ")
check("answering no keeps the shell", out is not None and sh.alive())
sh.command("save pip")
sh.command("save bath")
sh.send("quit\r")
status = sh.wait()
check("with everything saved, quit leaves at once with status 0",
      status is not None and os.WIFEXITED(status) and os.WEXITSTATUS(status) == 0,
      repr(status))
os.close(sh.fd)

print("check_shell_keep: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
