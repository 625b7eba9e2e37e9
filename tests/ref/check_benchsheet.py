#!/usr/bin/python3
"""check_benchsheet.py - `weigh VOLUME html FILE csv FILE`: the printable
bench sheet and its CSV.

What is checked, and against what:
 - the HTML is well-formed XML and parses as HTML without errors
   (xmllint, libxml2-utils);
 - every mass on the sheet equals mM x volume x formula weight, with the
   formula weight computed independently from the compound's formula by
   python3-periodictable (IUPAC standard atomic weights), within half the
   last printed digit; every stock volume equals volume x mM / stock;
 - grams from 1 g up and milligrams below, per row (a 0.1 mg balance's
   readability; common practice), and no titrant ever in grams;
 - the order of work of the trade (common practice): a bicarbonate saline
   gassed before its Ca2+ is added; titration before making up to volume;
   ATP and GTP added fresh, on ice; the final checks name the pH meter and
   the osmometer; hazard cautions point to the safety data sheet;
 - where Chromium is installed, the page prints to one PDF page on Letter
   and on A4, and pdftotext finds every compound and every amount in it;
   without Chromium that step says it is skipped;
 - bad input: one-line errors, no file left behind.
"""
import csv
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

import periodictable

IONMIX = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
RECIPES = os.path.abspath("recipes")
failures = []

# Invented test solutions (demo numbers, no real lab).
ACSF = ("solution acsf; add NaCl 125; add KCl 2.5; add NaHCO3 26; add NaH2PO4.H2O 1.25;"
        " add glucose 25; add CaCl2.2H2O 2; add MgCl2.6H2O 1; gas co2 5")
HEPES_NOSTOCK = "solution hbs; add NaCl 140; add KCl 5; add HEPES 10; ph 7.4 with NaOH"


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(*cmds, json_out=False):
    args = [IONMIX, "--db", os.path.join(WORK, "user.db")]
    if json_out:
        args.append("--json")
    for c in cmds:
        args += ["-e", c]
    env = dict(os.environ, SOURCE_DATE_EPOCH="1767261600")
    return subprocess.run(args, cwd=WORK, capture_output=True, text=True, env=env)


def formula_of(name):
    r = run("info %s" % name, json_out=True)
    return json.loads(r.stdout.splitlines()[-1])["formula"]


def amount_ok(row):
    """The printed amount against an independent computation."""
    v_mL = float(row["volume_mL"])
    mM = float(row["final_mM"])
    num, unit = row["amount"], row["amount_unit"]
    decimals = len(num.split(".")[1]) if "." in num else 0
    half = 0.5 * 10 ** -decimals
    shown = float(num)
    if row["action"] == "weigh":
        fw = periodictable.formula(formula_of(row["compound"])).mass
        g = mM * 1e-3 * v_mL * 1e-3 * fw
        want = g if unit == "g" else g * 1e3
        # the formula weight in data/ may differ from periodictable's by up
        # to 0.01 g/mol (check_formula_weights.py's tolerance)
        slack = want * 0.01 / fw
        check(unit == ("g" if g >= 1 else "mg"),
              "%s: %s %s, want g from 1 g up and mg below" % (row["compound"], num, unit))
        return abs(shown - want) <= half + slack + 1e-12, want
    stock = float(row["stock_mM"])
    mL = v_mL * mM / stock
    want = mL if unit == "mL" else mL * 1e3
    check(unit in ("mL", "uL"), "%s: a stock volume in mL or uL" % row["compound"])
    # a titrant's final_mM is printed to four figures (an estimate)
    slack = want * 5e-4 if row["action"] == "titrate" else 0
    return abs(shown - want) <= half + slack + 1e-12, want


def sheet(tag, setup, vol):
    h, c = tag + ".html", tag + ".csv"
    r = run(*setup, "weigh %s html %s csv %s" % (vol, h, c))
    check(r.returncode == 0, "%s: weigh with html and csv: %s" % (tag, r.stderr))
    hp, cp = os.path.join(WORK, h), os.path.join(WORK, c)
    x = subprocess.run(["xmllint", "--noout", hp], capture_output=True, text=True)
    check(x.returncode == 0 and not x.stderr, "%s: HTML is well-formed XML: %s" % (tag, x.stderr))
    x = subprocess.run(["xmllint", "--html", "--noout", hp], capture_output=True, text=True)
    check(x.returncode == 0 and not x.stderr, "%s: HTML parses without errors: %s" % (tag, x.stderr))
    with open(cp, newline="") as f:
        rows = list(csv.DictReader(f))
    check(len(rows) > 0, "%s: CSV has rows" % tag)
    for row in rows:
        ok, want = amount_ok(row)
        check(ok, "%s: %s %s %s, computed %.6g" % (tag, row["compound"], row["amount"],
                                                   row["amount_unit"], want))
        if row["action"] == "titrate":
            check(row["amount_unit"] not in ("g", "mg"), "%s: titrant %s not in grams"
                  % (tag, row["compound"]))
    with open(hp, encoding="utf-8") as f:
        html = f.read()
    return rows, html


def step_of(rows, name):
    return [int(r["step"]) for r in rows if r["compound"] == name][0]


def text_of(html):
    return re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html))


WORK = tempfile.mkdtemp(prefix="ionmix-sheet-")
try:
    for r in os.listdir(RECIPES):
        shutil.copy(os.path.join(RECIPES, r), WORK)

    # -- a pipette solution with nucleotides and a titrant from a stock
    krows, khtml = sheet("k", ["run k-pipette.ionmix"], "50 mL")
    kt = text_of(khtml)
    check(step_of(krows, "Na2ATP") == step_of(krows, "Na2GTP"), "ATP and GTP in one step")
    check(re.search(r"%d\. On ice from here: add the ATP and GTP fresh" % step_of(krows, "Na2ATP"),
                    kt) is not None, "ATP/GTP step says fresh, on ice")
    ti = step_of(krows, "KOH")
    m = re.search(r"(\d+)\. Make up to 50", kt)
    check(m is not None and ti < int(m.group(1)), "titration before making up to volume")
    check("Titrate to pH 7.30" in kt, "the titration step names the target pH")
    check("KOH: Corrosive" in kt and "safety data sheet" in kt, "KOH's hazard on the sheet")
    check("pH meter" in kt and "Osmometer" in kt, "final checks: pH meter and osmometer")
    check("Recording temperature 22.0" in kt, "recording temperature on the sheet")
    check("2026-01-01" in kt, "the date on the sheet")
    check("total to weigh" not in kt, "no total to weigh")

    # -- a bicarbonate saline: gas before calcium
    arows, ahtml = sheet("acsf", [ACSF], "1 L")
    at = text_of(ahtml)
    g = re.search(r"(\d+)\. Gas with 5 % CO2", at)
    check(g is not None, "bicarbonate saline: a gassing step")
    if g:
        check(step_of(arows, "NaHCO3") < int(g.group(1)) < step_of(arows, "CaCl2.2H2O"),
              "bicarbonate dissolved, then gassed, then Ca2+ added")
    check("free Ca" in at, "free Ca2+ among the targets")

    # -- a titrant without a stock: mmol and a suggested 1 M stock, never grams
    hrows, hhtml = sheet("hbs", [HEPES_NOSTOCK], "100 mL")
    naoh = [r for r in hrows if r["compound"] == "NaOH"][0]
    check(naoh["action"] == "titrate" and float(naoh["stock_mM"]) == 1000 and
          "suggested" in naoh["note"], "titrant without stock: a suggested 1 M stock")
    r = run(HEPES_NOSTOCK, "weigh 100 mL")
    line = [x for x in r.stdout.splitlines() if x.strip().startswith("NaOH")][0]
    check(re.search(r"\d mmol: .*of a 1 M stock, suggested", line) is not None and
          not re.search(r"\d (m)?g\b", line), "terminal: titrant in mmol, not grams: %r" % line)
    r = run("run bath-saline.ionmix", "weigh 1 L")
    check("total to weigh" not in r.stdout, "terminal: no total to weigh")
    masses = re.findall(r"(\d+\.\d+) (g|mg)\b", r.stdout)
    check(masses and all((u == "g" and float(v) >= 1) or (u == "mg" and float(v) < 1000)
                         for v, u in masses), "terminal: g from 1 g, mg below: %r" % masses)

    # -- print with Chromium where it is installed
    chrome = shutil.which("chromium") or shutil.which("chromium-browser")
    if not chrome or not shutil.which("pdftotext"):
        print("skipped: printing to PDF (chromium or pdftotext not installed)")
    elif "/san/" in IONMIX:
        # the page is the same bytes in the sanitizer build: printed once, in the plain run
        print("skipped: printing to PDF (done in the plain build's run)")
    else:
        for tag, rows, html in (("k", krows, khtml), ("acsf", arows, ahtml),
                                ("hbs", hrows, hhtml)):
            variants = {"letter": html,
                        "a4": html.replace("@page { margin: 12mm; }",
                                           "@page { size: A4; margin: 12mm; }")}
            papers = {"k": ("letter", "a4"), "acsf": ("a4",), "hbs": ("letter",)}[tag]
            for paper, text in ((p, variants[p]) for p in papers):
                src = os.path.join(WORK, "%s-%s.html" % (tag, paper))
                pdf = src[:-5] + ".pdf"
                with open(src, "w", encoding="utf-8") as f:
                    f.write(text)
                p = subprocess.run([chrome, "--headless", "--no-sandbox", "--disable-gpu",
                                    "--no-pdf-header-footer", "--print-to-pdf=" + pdf,
                                    "file://" + src], capture_output=True, timeout=120)
                check(os.path.exists(pdf), "%s/%s: chromium printed a PDF" % (tag, paper))
                if not os.path.exists(pdf):
                    continue
                info = subprocess.run(["pdfinfo", pdf], capture_output=True, text=True).stdout
                check(re.search(r"Pages:\s+1\n", info) is not None, "%s/%s: one page" % (tag, paper))
                want = "A4" if paper == "a4" else "letter"
                check(want in info, "%s: page size %s" % (paper, want))
                t = subprocess.run(["pdftotext", "-layout", pdf, "-"], capture_output=True,
                                   text=True).stdout
                flat = re.sub(r"\s+", " ", t)
                for row in rows:
                    check(row["compound"] in flat, "%s/%s: %s in the PDF" % (tag, paper, row["compound"]))
                    amt = "%s %s" % (row["amount"], row["amount_unit"].replace("uL", "\u00b5L"))
                    check(amt in flat, "%s/%s: amount %r in the PDF" % (tag, paper, amt))
        print("printed to PDF with %s: one page on Letter and on A4, every compound and amount found"
              % os.path.basename(chrome))

    # -- bad input: one line, nothing written
    def refused(cmd, what, needle):
        before = sorted(os.listdir(WORK))
        r = run("run k-pipette.ionmix", cmd)
        lines = r.stderr.strip().splitlines()
        check(r.returncode == 1 and len(lines) == 1 and needle in r.stderr,
              "%s: one-line error naming %r (got %r)" % (what, needle, r.stderr))
        check(sorted(os.listdir(WORK)) == before, "%s: no file created" % what)

    refused("weigh 50 html", "html without a file", "html")
    refused("weigh 50 mL html s1.html csv s1.html", "the same file twice", "twice")
    refused("weigh 50 html nodir/s2.html csv s2.csv", "an unwritable html", "nodir/s2.html")
    refused("weigh 50 csv s3.csv prep 90", "a preparation temperature out of range", "prep")
    refused("weigh 50 pdf s4.pdf", "an unknown word", "pdf")
finally:
    shutil.rmtree(WORK, ignore_errors=True)

if failures:
    print("check_benchsheet: %d failures" % len(failures))
    sys.exit(1)
print("check_benchsheet: sheet, CSV, amounts and order of work as expected")
