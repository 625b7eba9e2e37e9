#!/usr/bin/python3
"""check_sweep_iv.py - `sweep` and `iv` through the program as a user runs it.

    IONMIX=build/ionmix /usr/bin/python3 tests/ref/check_sweep_iv.py

Sweep:
 - free Ca2+ over total Ca 0 to 9 mM with 10 mM EGTA (titrated to pH 7.2,
   keep-pH): rises monotonically, and each point equals the free Ca2+ that
   `show` (--json) gives after `set CaCl2 X; ph 7.2 with KOH`, to the 8
   significant digits `show` prints;
 - the LJP over a temperature sweep of a strong-electrolyte pair scales with
   absolute temperature: LJP / T constant to 1e-5, T = t + 273.15 K with the
   zero of Celsius from scipy.constants (CODATA);
 - JSON, CSV and SVG agree: the CSV rows are the JSON points, the SVG is XML
   whose polyline has one vertex per computed point;
 - bad input (zero or negative range, a pair quantity without its pair, an
   unknown quantity) is one error line, exit status 1, and no file.
I-V:
 - the SVG curve is drawn on the fine grid (481 points) at `step 20`, not
   on the 8 table rows, so it shows no kinks; the legend names the pair,
   the temperature and each permeability;
 - the JSON relative currents times the scale it states equal the GHK
   current computed here independently (Goldman 1943; Hodgkin & Katz 1949;
   constants from scipy.constants, CODATA);
 - with relative P, text, JSON and CSV give the same numbers under a
   relative unit; with P in cm/s, JSON and CSV give A/cm2;
 - P without a unit is said to be taken as relative.
The solutions are invented for the check.
"""
import csv
import json
import math
import os
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

try:
    from scipy import constants as sc
except ImportError:  # pragma: no cover
    print("check_sweep_iv: scipy missing: apt-get install python3-scipy")
    print("ref: sweep_iv: 0 passed, 1 failed")
    sys.exit(1)

IONMIX = os.environ.get("IONMIX", "build/ionmix")
passed = 0
failed = 0


def check(cond, what):
    global passed, failed
    if cond:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def run(cmds, json_mode=True, db=None):
    args = [IONMIX, "--db", db or os.path.join(TMP, "user.db")]
    if json_mode:
        args.append("--json")
    for c in cmds:
        args += ["-e", c]
    p = subprocess.run(args, capture_output=True, text=True,
                       env=dict(os.environ, LC_ALL="C"))
    return p


def json_lines(text):
    return [json.loads(l) for l in text.splitlines() if l.startswith("{")]


TMP = tempfile.mkdtemp(prefix="ionmix-sweep-")
EGTA = ("temp 22; solution egta; add K-gluconate 110; add HEPES 10; "
        "add EGTA 10; ph 7.2 with KOH")

# ---- free Ca2+ with EGTA against `show` ----
svg = os.path.join(TMP, "ca.svg")
csvf = os.path.join(TMP, "ca.csv")
p = run([EGTA, "sweep CaCl2 0 to 9 mM show free Ca keep-pH points 10 svg %s csv %s"
         % (svg, csvf)])
check(p.returncode == 0, "sweep free Ca ran: " + p.stderr)
res = [o for o in json_lines(p.stdout) if o.get("quantity") == "free_Ca2+"]
check(len(res) == 1, "one sweep result")
pts = res[0]["points"] if res else []
check(len(pts) == 10, "10 points")
ys = [q["y"] for q in pts]
check(all(b > a for a, b in zip(ys, ys[1:])), "free Ca2+ rises monotonically")
for q in pts:
    x = q["x"]
    cmds = [EGTA, "solution one from egta"]
    if x > 0:
        cmds.append("set CaCl2 %.17g" % x)
    cmds += ["ph 7.2 with KOH", "show one"]
    s = run(cmds)
    shows = [o for o in json_lines(s.stdout) if o.get("solution") == "one" and "free" in o]
    free = shows[-1]["free"].get("Ca2+", 0.0) if shows else float("nan")
    # show prints 8 significant digits
    check(abs(free - q["y"]) <= 1e-7 * max(abs(free), 1e-12) + 1e-15,
          "point %g mM: sweep %r, show %r" % (x, q["y"], free))
# CSV = JSON, SVG is XML with one vertex a point
with open(csvf, newline="") as f:
    rows = list(csv.reader(f))
check(rows[0] == ["CaCl2_mM", "free_Ca2+_mM", "failure"], "CSV header " + repr(rows[0]))
check(len(rows) == 11, "CSV rows")
for r, q in zip(rows[1:], pts):
    check(abs(float(r[0]) - q["x"]) < 1e-9 and
          abs(float(r[1]) - q["y"]) <= 1e-9 * abs(q["y"]) + 1e-18, "CSV row " + repr(r))
root = ET.parse(svg).getroot()
lines = [e for e in root.iter() if e.tag.endswith("polyline")]
check(len(lines) == 1 and len(lines[0].get("points").split()) == 10,
      "SVG: one curve of 10 vertices")

# ---- LJP over temperature against absolute temperature ----
p = run(["solution pip; add KCl 130; add NaCl 10; add MgCl2 2; add K-gluconate 10",
         "solution bath; add NaCl 140; add KCl 5; add CaCl2 2; add MgCl2 1; add glucose 10",
         "sweep temp 5 to 40 show ljp pip bath points 8"])
res = [o for o in json_lines(p.stdout) if o.get("quantity") == "ljp"]
check(p.returncode == 0 and len(res) == 1, "LJP sweep ran: " + p.stderr)
if res:
    pts = res[0]["points"]
    k = [q["y"] / (q["x"] + sc.zero_Celsius) for q in pts]
    check(all(abs(v / k[0] - 1) < 1e-5 for v in k),
          "LJP / T constant: %r" % k)
    check(abs(pts[0]["y"]) > 0.5, "the LJP is not trivially zero")

# ---- bad input: one line, exit 1, no file ----
bad = [
    "sweep CaCl2 0 to 0 show free Ca",
    "sweep CaCl2 5 to 1 show free Ca",
    "sweep CaCl2 0 to 5 show ljp",
    "sweep CaCl2 0 to 5 show ljp egta",
    "sweep temp 20 to 30 show erev egta",
    "sweep CaCl2 0 to 5 show mass",
]
for b in bad:
    f1 = os.path.join(TMP, "bad.svg")
    f2 = os.path.join(TMP, "bad.csv")
    p = run([EGTA, "%s svg %s csv %s" % (b, f1, f2)], json_mode=False)
    err = [l for l in p.stderr.splitlines() if l.strip()]
    check(p.returncode == 1 and len(err) == 1 and err[0].startswith("ionmix:"),
          "bad input '%s': %r" % (b, p.stderr))
    check(not os.path.exists(f1) and not os.path.exists(f2), "no file for '%s'" % b)
    check(not [n for n in os.listdir(TMP) if n.startswith("bad")],
          "no temporary left for '%s'" % b)

# ---- iv: fine grid, values on the GHK curve, units agree ----
F = sc.physical_constants["Faraday constant"][0]
R = sc.R
PAIR = ["temp 25", "solution pin; add KCl 140", "solution pout; add NaCl 145; add KCl 5"]


def ghk(z, P, ci, co, V_mV, t_C):
    """GHK current density, A/cm2 for P in cm/s and mM; outward positive."""
    T = t_C + sc.zero_Celsius
    u = z * F * V_mV * 1e-3 / (R * T)
    P_m = P * 1e-2
    if abs(u) < 1e-9:
        I = P_m * z * F * (ci - co)
    else:
        I = P_m * z * z * F * F * V_mV * 1e-3 / (R * T) * (ci - co * math.exp(-u)) / (1 - math.exp(-u))
    return I * 1e-4  # A/m2 -> A/cm2


svg = os.path.join(TMP, "iv.svg")
csvf = os.path.join(TMP, "iv.csv")
p = run(PAIR + ["iv pin pout K=1 Na=0.05 from -100 to 40 step 20 svg %s csv %s"
                % (svg, csvf)])
check(p.returncode == 0, "iv ran: " + p.stderr)
res = [o for o in json_lines(p.stdout) if "points" in o and "current_unit" in o]
check(len(res) == 1, "one iv result")
j = res[0] if res else {"points": [], "current_unit": ""}
check(j.get("permeability_unit") == "relative", "P relative in JSON")
check(j["current_unit"].startswith("relative"), "JSON unit relative: " + j["current_unit"])
scale = j.get("relative_unit_A_cm2_per_cm_s", float("nan"))
for q in j["points"]:
    I = ghk(1, 1, 140, 5, q["mV"], 25) + ghk(1, 0.05, 0, 145, q["mV"], 25)
    check(abs(q["total"] * scale - I) <= 1e-7 * abs(I) + 1e-12,
          "JSON relative total at %g mV x scale = GHK" % q["mV"])
with open(csvf, newline="") as f:
    rows = list(csv.reader(f))
check(rows[0] == ["V_mV", "total_relative", "K+_relative", "Na+_relative"],
      "iv CSV header " + repr(rows[0]))
for r, q in zip(rows[1:], j["points"]):
    check(abs(float(r[1]) - q["total"]) <= 1e-9 * abs(q["total"]) + 1e-12,
          "CSV and JSON agree at %s mV" % r[0])
root = ET.parse(svg).getroot()
lines = [e for e in root.iter() if e.tag.endswith("polyline")]
check(len(lines) == 3, "iv SVG: total and two ions")
verts = lines[-1].get("points").split() if lines else []  # the total, drawn last
check(len(verts) == 481, "the total is drawn on 481 points, not 8: %d" % len(verts))
texts = " ".join(t.text or "" for t in root.iter() if t.tag.endswith("text"))
for needle in ("inside: pin", "outside: pout", "25.0 C", "P(K+) = 1", "P(Na+) = 0.05"):
    check(needle in texts, "SVG legend gives '%s'" % needle)
# text mode: the same relative numbers, and the note on P without a unit
p = run(PAIR + ["iv pin pout K=1 Na=0.05 from -100 to 40 step 20 plain"], json_mode=False)
check("taken as relative" in p.stdout, "text says P without a unit is relative")
rows_t = [l.split() for l in p.stdout.splitlines() if l.strip().startswith("-100.00")]
check(rows_t and abs(float(rows_t[0][1]) - j["points"][0]["total"]) < 1e-4,
      "text and JSON give the same relative current at -100 mV")
# absolute P: A/cm2 in JSON and CSV
p = run(PAIR + ["iv pin pout K=1e-6cm/s from -100 to 40 step 20 csv %s" % csvf])
res = [o for o in json_lines(p.stdout) if "points" in o]
check(res and res[0]["current_unit"] == "A/cm2", "absolute P: A/cm2")
with open(csvf, newline="") as f:
    rows = list(csv.reader(f))
check(rows[0][:2] == ["V_mV", "total_A_cm2"], "absolute CSV header")
I = ghk(1, 1e-6, 140, 5, -100, 25)
check(abs(float(rows[1][1]) - I) <= 1e-7 * abs(I), "CSV A/cm2 = GHK at -100 mV")

for n in os.listdir(TMP):
    os.unlink(os.path.join(TMP, n))
os.rmdir(TMP)
print("ref: sweep_iv: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
