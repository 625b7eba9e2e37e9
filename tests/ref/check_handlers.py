#!/usr/bin/python3
"""check_handlers.py - the shape of the command layer (issue 12, item 6).

Every function in src/cmd_*.c - the handlers named cmd_* and whatever they
delegate to in the same file - is at most MAX_LINES lines long (signature
to closing brace), and none prints by hand: output goes through the
renderer (render.h), never out_printf or the JSON writer's jw_* calls.
Functions are found as the team's style writes them (STYLE.md, K&R): a
definition starts at column 0 and its body is the block from a '{' at
column 0 to the next '}' at column 0.  The rule is a fact of the project
(common practice: short functions that parse, call and render).
"""
import glob
import os
import re
import sys

MAX_LINES = 60
# Files whose conversion is still open, listed by name only while it is
# (none left).
EXCEPT_FILES = set()
# Functions not yet converted, listed by name so that nothing new slips
# in (none left; an entry that keeps the rules is reported as stale).
PENDING = set()

DIRECT = re.compile(r"\b(out_printf|jw_[a-z_]+)\s*\(")
DEF = re.compile(r"^(?!static\s+const\b|typedef\b|struct\b|enum\b|#)"
                 r"[A-Za-z_][\w\s\*]*?\b(\w+)\s*\(")

os.chdir(os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", ".."))
bad = []
seen = 0
pending_found = set()
for path in sorted(glob.glob("src/cmd_*.c")):
    if path in EXCEPT_FILES:
        continue
    lines = open(path, encoding="utf-8").read().split("\n")
    i = 0
    while i < len(lines):
        m = DEF.match(lines[i])
        if not m or lines[i].rstrip().endswith(";"):
            i += 1
            continue
        j = i
        while j < len(lines) and not lines[j].startswith("{") and not lines[j].rstrip().endswith(";"):
            j += 1
        if j >= len(lines) or not lines[j].startswith("{"):
            i = j + 1
            continue
        k = j
        while k < len(lines) and lines[k] != "}":
            k += 1
        name, n = m.group(1), k - i + 1
        pending_found.add((path, name))
        seen += 1
        body = [ln for ln in lines[j:k + 1] if not ln.lstrip().startswith(("*", "/*"))]
        calls = sorted({c.group(1) for ln in body for c in DIRECT.finditer(ln)})
        where = "%s:%d %s" % (path, i + 1, name)
        if (path, name) in PENDING:
            if n <= MAX_LINES and not calls:
                bad.append("%s now keeps the rules: remove it from PENDING" % where)
        else:
            if n > MAX_LINES:
                bad.append("%s is %d lines (at most %d)" % (where, n, MAX_LINES))
            if calls:
                bad.append("%s prints by hand (%s); use render.h" % (where, ", ".join(calls)))
        i = k + 1
for b in bad:
    print("FAIL:", b)
if seen < 20:
    print("FAIL: only %d functions found in src/cmd_*.c; the scanner is broken" % seen)
    sys.exit(1)
stale = sorted(PENDING - pending_found)
for p in stale:
    bad.append("%s: %s is listed as pending but no longer exists" % p)
if bad:
    print("check_handlers: %d problems" % len(bad))
    sys.exit(1)
print("check_handlers: %d functions in src/cmd_*.c at most %d lines and printing through"
      " render.h (%d pending; not checked: %s)"
      % (seen, MAX_LINES, len(PENDING), ", ".join(sorted(EXCEPT_FILES))))
