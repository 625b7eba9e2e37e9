#!/usr/bin/python3
"""check_malformed_batch.py - every malformed command line of
tests/malformed/ (lines.txt and the *.bin files), given to the ionmix
binary ($IONMIX) in batch mode, makes it exit with status 1 and print
exactly one line on standard error, "ionmix: ..." (the error contract:
bad input gets a one-line message, exit status 1 outside the shell), and
creates nothing in the database directory.  Lines go as `-e LINE` after
an `-e` that builds the same two solutions as tests/test_malformed.c;
cases with a NUL byte, which an argument cannot hold, go on standard
input.  Every case runs once more with --json: the same exit status (1),
nothing on standard error, and the last line of standard output is a JSON
object with an "error" key, in valid UTF-8.  The cases of expect.txt
("WORDS<TAB>LINE") must also say what is wrong: the text message holds
WORDS, and so does the JSON one unless WORDS show an escaped byte
(invalid UTF-8 is \\xNN in text, U+FFFD in JSON) (issue 14 item 10).

Run from the repository root with /usr/bin/python3; exits 0 when every
check passes, else prints one line per failure and exits 1."""

import concurrent.futures
import json
import os
import subprocess
import sys
import tempfile

CASE_DIR = "tests/malformed"
SETUP = ("solution bath; add NaCl 140; add KCl 5; add CaCl2.2H2O 2; "
         "add MgCl2.6H2O 1; add HEPES 10; add glucose 10; stock CaCl2.2H2O 1 M; "
         "solution pip; add K-gluconate 135; add KCl 5; add EGTA 1; add Na2ATP 4; "
         "add MgCl2.6H2O 2")


def load_cases():
    cases = []
    with open(os.path.join(CASE_DIR, "lines.txt"), "rb") as f:
        for i, raw in enumerate(f, 1):
            line = raw.rstrip(b"\n")
            if not line or line == b"#" or line.startswith(b"# "):
                continue
            cases.append((f"lines.txt:{i}", line, False, None))
    with open(os.path.join(CASE_DIR, "expect.txt"), "rb") as f:
        for i, raw in enumerate(f, 1):
            line = raw.rstrip(b"\n")
            if not line or line.startswith(b"# "):
                continue
            words, _, cmd = line.partition(b"\t")
            cases.append((f"expect.txt:{i}", cmd, False, words))
    for name in sorted(os.listdir(CASE_DIR)):
        if name.endswith(".bin"):
            with open(os.path.join(CASE_DIR, name), "rb") as f:
                cases.append((name, f.read(), True, None))
    return cases


def run_case(ionmix, case, json_mode):
    name, data, _, words = case
    with tempfile.TemporaryDirectory(prefix="ionmix-batch-") as tmp:
        dbdir = os.path.join(tmp, "db")
        work = os.path.join(tmp, "work")
        os.mkdir(work)
        argv = [ionmix, "--db", os.path.join(dbdir, "user.db")]
        if json_mode:
            argv.append("--json")
        argv += ["-e", SETUP]
        if b"\0" in data:
            argv.append("-")
            stdin = data + b"\n"
        else:
            argv += ["-e", data]
            stdin = b""
        env = dict(os.environ, LC_ALL="C", HOME=tmp, XDG_DATA_HOME=tmp,
                   XDG_STATE_HOME=tmp)
        # Leaks are checked in-process by test_malformed under ASan; here a
        # leak check per process would only multiply the run time.
        env.setdefault("ASAN_OPTIONS", "detect_leaks=0")
        p = subprocess.run(argv, input=stdin, capture_output=True, cwd=work,
                           env=env, timeout=60)
        problems = []
        mode = "json" if json_mode else "text"
        if p.returncode != 1:
            problems.append(f"exit status {p.returncode}, not 1")
        if os.path.exists(dbdir):
            problems.append("created the database directory")
        left = os.listdir(work)
        if left:
            problems.append(f"left files behind: {left}")
        if json_mode:
            if p.stderr:
                problems.append(f"wrote to stderr: {p.stderr[:120]!r}")
            lines = p.stdout.split(b"\n")
            last = lines[-2] if len(lines) >= 2 and lines[-1] == b"" else b""
            try:
                obj = json.loads(last.decode("utf-8", errors="strict"))
                if not isinstance(obj, dict) or not obj.get("error"):
                    problems.append(f"last line has no error: {last[:120]!r}")
                elif words and b"\\x" not in words and \
                        words.decode("utf-8") not in obj["error"]:
                    problems.append(f"JSON error does not say {words!r}: {last[:160]!r}")
            except (UnicodeDecodeError, ValueError) as e:
                problems.append(f"last line is not JSON in UTF-8 ({e}): {last[:120]!r}")
        else:
            err = p.stderr
            nlines = err.count(b"\n")
            if nlines != 1 or not err.endswith(b"\n"):
                problems.append(f"{nlines} lines on stderr: {err[:200]!r}")
            elif not err.startswith(b"ionmix: ") or len(err.strip()) <= len(b"ionmix:"):
                problems.append(f"stderr is not an ionmix message: {err[:200]!r}")
            elif words and words not in err:
                problems.append(f"message does not say {words!r}: {err[:200]!r}")
        return [f"{name} [{mode}]: {x}: {data[:60]!r}" for x in problems]


def main():
    ionmix = os.environ.get("IONMIX")
    if not ionmix or not os.access(ionmix, os.X_OK):
        print("check_malformed_batch: set IONMIX to the ionmix binary")
        return 1
    ionmix = os.path.abspath(ionmix)
    cases = load_cases()
    # both ways: text and JSON must agree on the exit status of every case
    jobs = [(c, False) for c in cases] + [(c, True) for c in cases]
    failures = []
    passed = 0
    if len(cases) < 230:
        failures.append(f"only {len(cases)} malformed cases; expected at least 230")
    workers = max(2, os.cpu_count() or 2)
    with concurrent.futures.ThreadPoolExecutor(max_workers=workers) as pool:
        for probs in pool.map(lambda j: run_case(ionmix, j[0], j[1]), jobs):
            if probs:
                failures.extend(probs)
            else:
                passed += 1
    for f in failures:
        print(f)
    print(f"ref: malformed_batch: {passed} passed, {len(failures)} failed")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
