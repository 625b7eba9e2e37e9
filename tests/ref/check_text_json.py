"""check_text_json.py - issue 12: the text and the JSON of show, junction,
erev, iv, weigh and review (and of correct, ratio, exchange and sweep)
carry the same numbers.  Each command runs on
the demo recipes twice, as text and with --json; the numbers are parsed
out of the text and compared with the JSON within the rounding of the
digits the text shows (half a unit of the last digit printed)."""
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

binary = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
recipes = ["bath-saline.ionmix", "k-pipette.ionmix", "cs-pipette.ionmix"]
passed = failed = 0
CONC = {"M": 1e3, "mM": 1.0, "uM": 1e-3, "\u00b5M": 1e-3, "nM": 1e-6, "pM": 1e-9}
NUM = r"[-+]?\d+(?:\.\d+)?(?:e[-+]?\d+)?"


def check(what, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("failed: " + what + (": " + detail if detail else ""))


def half_ulp(text):
    """Half a unit of the last digit printed in a number's text."""
    m = re.fullmatch(r"[-+]?(\d+)(?:\.(\d+))?(?:e([-+]?\d+))?", text)
    dec = len(m.group(2) or "")
    exp = int(m.group(3) or 0)
    return 0.5 * 10 ** (exp - dec)


def close(what, text, value, factor=1.0):
    """Does the printed text (times factor) agree with the JSON value?"""
    if value is None:
        check(what + ": JSON has a number", False, "null for text " + text)
        return
    got = float(text) * factor
    tol = half_ulp(text) * abs(factor) * 1.0001 + 1e-12
    check("%s: text %s vs JSON %.10g" % (what, text, value), abs(got - value) <= tol)


def conc_close(what, text, mM):
    m = re.fullmatch(r"(" + NUM + r") (M|mM|uM|\u00b5M|nM|pM)", text.strip())
    if not m:
        check(what + ": a concentration in the text", False, repr(text))
        return
    close(what, m.group(1), mM, CONC[m.group(2)])


def run(cmds, work, json_mode):
    args = [binary, "--db", os.path.join(work, "user.db")] + (["--json"] if json_mode else [])
    for c in cmds:
        args += ["-e", c]
    env = dict(os.environ, LC_ALL="C.UTF-8", HOME=work, XDG_DATA_HOME=work)
    env.pop("IONMIX_DB", None)
    r = subprocess.run(args, cwd=work, capture_output=True, text=True, env=env, timeout=120)
    check("%s exits 0" % cmds[-1], r.returncode == 0, r.stderr[:200])
    return r.stdout


def both(work, base, cmd):
    """The text of cmd alone, and its JSON object."""
    before = run(base, work, False)
    after = run(base + [cmd], work, False)
    check("%s: the text before it is the same" % cmd, after.startswith(before))
    js = run(base + [cmd], work, True).splitlines()[-1]
    return after[len(before):], json.loads(js)


def rows(text, first):
    """Lines of text that start (after two blanks) with `first`."""
    return [l for l in text.splitlines() if l.startswith("  " + first + " ")]


def check_show(text, js):
    w = "show " + js["solution"]
    for ion in js["ions"]:
        rs = rows(text, re.escape(ion["ion"]) if False else ion["ion"])
        check(w + ": a text row for " + ion["ion"], len(rs) == 1)
        if len(rs) != 1:
            continue
        m = re.match(r"\s+\S+\s+([-+]\d+)\s+(" + NUM + r" \S+)\s+(" + NUM + r")\s+(" + NUM +
                     r" \S+)", rs[0])
        check(w + ": " + ion["ion"] + " row parses", m is not None, rs[0])
        if not m:
            continue
        check(w + ": " + ion["ion"] + " z", int(m.group(1)) == ion["z"])
        conc_close(w + ": " + ion["ion"] + " free", m.group(2), ion["mM"])
        close(w + ": " + ion["ion"] + " gamma", m.group(3), ion["gamma"])
        conc_close(w + ": " + ion["ion"] + " activity", m.group(4), ion["activity_mM"])
    scalars = [("ionic strength", "ionic_strength_mM", 1), ("osmolarity (ideal)", "osmolarity_mOsm_L", 1),
               ("pH", "pH", 1), ("osmolality (estimate)", "osmolality_mOsm_kg", 1),
               ("osmotic coefficient", "osmotic_coefficient", 1), ("net charge", "net_charge_mEq_L", 1)]
    for label, key, f in scalars:
        m = re.search(r"^  " + re.escape(label) + r"\s+(" + NUM + r")", text, re.M)
        check(w + ": text shows " + label, m is not None)
        if m:
            close(w + ": " + label, m.group(1), js[key], f)
    for metal, mM in js["free"].items():
        m = re.search(r"^  free " + re.escape(metal) + r"\s+(" + NUM + r" \S+)$", text, re.M)
        total = [x for x in js["metals"] if x["metal"] == metal][0]["total_mM"]
        if total > 0:
            check(w + ": text shows free " + metal, m is not None)
            if m:
                conc_close(w + ": free " + metal, m.group(1), mM)
    for c in js["compounds"]:
        m = re.search(r"^  " + re.escape(c["compound"]) + r"\s+(" + NUM + r" \S+)", text, re.M)
        check(w + ": text lists " + c["compound"], m is not None)
        if m:
            conc_close(w + ": amount of " + c["compound"], m.group(1), c["mM"])
        check(w + ": " + c["compound"] + " stock flag in both",
              ("stock_mM" in c) == bool(m and "(from stock)" in text.splitlines()[
                  [i for i, l in enumerate(text.splitlines()) if l.startswith("  " + c["compound"] + " ")][0]]))


def check_weigh(text, js):
    """Each line of the order of work against its JSON item: final
    concentration, formula weight and what to weigh or pipette."""
    vol = {"mL": 1, "uL": 1e-3, "\u00b5L": 1e-3, "L": 1e3}
    for it in js["items"]:
        w = "weigh: " + it["compound"]
        m = re.search(r"^\s+" + re.escape(it["compound"]) + r"\s+(" + NUM + r" \S+)\s+(" + NUM +
                      r")\s+(.*)$", text, re.M)
        check(w + ": row parses", m is not None)
        if not m:
            continue
        conc_close(w + " final", m.group(1), it["mM"])
        close(w + " FW", m.group(2), it["fw_g_mol"])
        what = m.group(3)
        check(w + ": the amount in both",
              it["amount"] in what.replace("\u00b5", "u") or it["action"] == "titrate",
              what)
        if it["action"] == "weigh":
            g = re.match(r"(" + NUM + r") (g|mg)\b", what)
            check(w + ": a mass", g is not None, what)
            if g:
                close(w + " mass", g.group(1), it["grams"], 1e-3 if g.group(2) == "mg" else 1)
        elif "stock_mL" in it:
            v = re.match(r"(" + NUM + r") (mL|uL|\u00b5L|L) of ", what)
            check(w + ": a stock volume", v is not None, what)
            if v:
                close(w + " stock volume", v.group(1), it["stock_mL"], vol[v.group(2)])
        else:
            v = re.match(r"(" + NUM + r") mmol: ", what)
            check(w + ": titrant amount", v is not None, what)
            if v:
                close(w + " mmol", v.group(1), it["mmol"])
        check(w + ": titrant never in grams", not (it.get("titrant") and
                                                    re.match(NUM + r" (g|mg)\b", what)))
    for step in js["steps"]:
        check("weigh: step in the text", step in text, step)


def check_review(text, js):
    lines = [l for l in text.splitlines() if re.match(r"  (fine|check|problem) ", l)]
    check("review: one text row per item", len(lines) == len(js["items"]))
    for line, it in zip(lines, js["items"]):
        w = "review %s: %s" % (js["pipette"], it["check"])
        m = re.match(r"  (\S+)\s+" + re.escape(it["check"]) + r"(\s.*)$", line)
        check(w + ": verdict and check", m is not None and m.group(1) == it["verdict"], line)
        if not m:
            continue
        rest = m.group(2).strip()
        check(w + ": note in both", rest.endswith(it["note"]))
        if it["value"] is None:
            check(w + ": no number in the text either", not re.match(NUM + " ", rest + " "))
            continue
        m = re.match(r"(" + NUM + r")(?: (\S+))?", rest)
        check(w + ": number in the text", m is not None)
        if not m:
            continue
        unit = m.group(2) or ""
        if unit in CONC:
            f = CONC[unit] / CONC[it["unit"]]
            close(w, m.group(1), it["value"], f)
        else:
            check(w + ": unit", unit == it["unit"] or (it["unit"] == "" and not unit.endswith("/L")))
            close(w, m.group(1), it["value"])


def check_junction(text, js):
    m = re.search(r"LJP = (" + NUM + r") mV \((" + NUM + r") to (" + NUM + r")\)", text)
    check("junction: LJP and its range in the text", m is not None)
    if m:
        close("junction: LJP", m.group(1), js["ljp_mV"])
        close("junction: range low", m.group(2), js["ljp_range_mV"][0])
        close("junction: range high", m.group(3), js["ljp_range_mV"][1])
    # the ranked breakdown shows the ions that matter, the rest summed in
    # one "N others" line
    rest, nrest = 0.0, 0
    for c in js["contributions"]:
        rs = rows(text, c["ion"])
        if len(rs) > 1:
            check("junction: one share row for " + c["ion"], False)
            continue
        if not rs:
            rest += c["share_mV"]
            nrest += 1
            continue
        close("junction: share of " + c["ion"], rs[0].split()[1], c["share_mV"])
    if nrest:
        m = re.search(r"^  (\d+) others?\s+(" + NUM + r") mV", text, re.M)
        check("junction: the rest in one line", m is not None)
        if m:
            check("junction: count of the rest", int(m.group(1)) == nrest)
            close("junction: sum of the rest", m.group(2), rest)


def check_erev(text, js):
    m = re.search(r"E_rev = (" + NUM + r") mV", text)
    check("erev: E_rev in the text", m is not None)
    if m:
        close("erev: E_rev", m.group(1), js["E_rev_mV"])
    for ion, p in js["permeabilities"].items():
        rs = rows(text, ion)
        check("erev: a row for " + ion, len(rs) == 1)
        if len(rs) == 1:
            f = rs[0].split()
            close("erev: P of " + ion, f[1], p)
            if js["nernst_mV"][ion] is not None:
                close("erev: Nernst of " + ion, f[-1], js["nernst_mV"][ion])


def check_iv(text, js):
    ions = list(js["permeabilities"])
    pts = {p["mV"]: p for p in js["points"]}
    n = 0
    # the table's unit is in its header: "(relative units)" or "(uA/cm2)"
    m = re.search(r"^\s+V mV .*\((.*)\)$", text, re.M)
    check("iv: the table header names its unit", m is not None)
    unit = m.group(1) if m else ""
    scale = {"A/cm2": 1, "mA/cm2": 1e-3, "uA/cm2": 1e-6, "nA/cm2": 1e-9, "pA/cm2": 1e-12}
    f_unit = scale.get(unit.replace("\u00b5", "u").replace("\u00b2", "2"), 1)
    if js["current_unit"] == "A/cm2":
        check("iv: an absolute unit in the text", unit.replace("\u00b5", "u").replace("\u00b2", "2") in scale, unit)
    else:
        check("iv: relative units in both", unit == "relative units", unit)
    for line in text.splitlines():
        f = line.split()
        if len(f) == 2 + len(ions) and all(re.fullmatch(NUM, x) for x in f) and "." in f[0]:
            p = pts.get(float(f[0]))
            check("iv: a JSON point at %s mV" % f[0], p is not None)
            if p is None:
                continue
            n += 1
            close("iv: total at %s mV" % f[0], f[1], p["total"], f_unit)
            for i, ion in enumerate(ions):
                close("iv: %s at %s mV" % (ion, f[0]), f[2 + i], p[ion], f_unit)
    check("iv: every point in the text", n == len(js["points"]))
    m = re.search(r"E_rev = (" + NUM + r") mV", text)
    if js["E_rev_mV"] is not None:
        check("iv: E_rev in the text", m is not None)
        if m:
            close("iv: E_rev", m.group(1), js["E_rev_mV"])


def check_correct(text, js):
    m = re.search(r"LJP (" + NUM + r") mV from the Henderson equation .*: (" + NUM +
                  r") mV, rounded to 0.1 mV \((" + NUM + r") to (" + NUM + r") mV", text)
    check("correct: LJP, Henderson value and range in the text", m is not None)
    if m:
        close("correct: LJP", m.group(1), js["ljp_mV"])
        close("correct: Henderson", m.group(2), js["henderson_ljp_mV"])
        close("correct: range low", m.group(3), js["ljp_range_mV"][0])
        close("correct: range high", m.group(4), js["ljp_range_mV"][1])
    for v in js["values"]:
        rs = [l.split() for l in text.splitlines() if re.fullmatch(r"\s+" + NUM + r"\s+" + NUM, l)]
        hit = [r for r in rs if float(r[0]) == v["recorded_mV"]]
        check("correct: a row for %g mV" % v["recorded_mV"], len(hit) == 1)
        if hit:
            close("correct: Vm of %g" % v["recorded_mV"], hit[0][1], v["Vm_mV"])


def check_ratio(text, js):
    m = re.search(r"P\(%s\)/P\(%s\) = (%s)" % (re.escape(js["ion"]), re.escape(js["ref"]), NUM),
                  text)
    check("ratio: the ratio in the text", m is not None)
    if m:
        close("ratio: P ratio", m.group(1), js["ratio"])
    m = re.search(r"measured (?:shift|E_rev) (" + NUM + r") mV", text)
    check("ratio: the measured potential in the text", m is not None)
    if m:
        close("ratio: measured", m.group(1), js["measured_mV"])
    if "E_rev_from_mV" in js:
        m = re.search(r"E_rev is (" + NUM + r") mV in \S+ and (" + NUM + r") mV", text)
        check("ratio: both reversal potentials in the text", m is not None)
        if m:
            close("ratio: E_rev from", m.group(1), js["E_rev_from_mV"])
            close("ratio: E_rev to", m.group(2), js["E_rev_to_mV"])


def check_exchange(text, js):
    for what, rx, key in (("shift", r"shift = (%s) mV", "shift_mV"),
                          ("ground term", r"ground term g = (%s) mV", "ground_term_mV")):
        m = re.search(rx % NUM, text)
        check("exchange: %s in the text" % what, m is not None)
        if m:
            close("exchange: " + what, m.group(1), js[key])
    if js["includes_tip"]:
        m = re.search(r"old (%s) mV, \| new (%s) mV \(change (%s) mV\)" % (NUM, NUM, NUM), text)
        check("exchange: tip junctions in the text", m is not None)
        if m:
            close("exchange: tip old", m.group(1), js["tip_old_mV"])
            close("exchange: tip new", m.group(2), js["tip_new_mV"])
            close("exchange: tip change", m.group(3), js["tip_change_mV"])
    if "bridge" in js:
        m = re.search(r"old bath (%s) mV, to the new (%s) mV" % (NUM, NUM), text)
        check("exchange: bridge junctions in the text", m is not None)
        if m:
            close("exchange: bridge old", m.group(1), js["bridge"]["old_ljp_mV"])
            close("exchange: bridge new", m.group(2), js["bridge"]["new_ljp_mV"])


def check_sweep(text, js):
    # a quantity in mV or pH: the table shows the JSON's unit unscaled
    n = 0
    for p in js["points"]:
        rs = [l.split() for l in text.splitlines()
              if re.fullmatch(r"\s+" + NUM + r"\s+" + NUM, l)
              and abs(float(l.split()[0]) - p["x"]) <= half_ulp(l.split()[0]) * 1.0001]
        check("sweep: one row at x = %g" % p["x"], len(rs) == 1)
        if len(rs) == 1 and p["y"] is not None:
            close("sweep: y at %g" % p["x"], rs[0][1], p["y"])
            n += 1
    check("sweep: every point compared", n == len(js["points"]) - js["failed_points"])


CASES = [
    ([], "show k-pipette", check_show),
    ([], "show cs-pipette", check_show),
    ([], "show bath", check_show),
    (["solution k-pipette"], "weigh 250 mL", check_weigh),
    (["solution cs-pipette"], "weigh 1 L", check_weigh),
    ([], "review k-pipette bath", check_review),
    ([], "review cs-pipette bath", check_review),
    ([], "junction k-pipette bath", check_junction),
    ([], "junction cs-pipette bath", check_junction),
    ([], "erev k-pipette bath K+=1 Na+=0.04 Cl-=0.45", check_erev),
    ([], "iv k-pipette bath K+=1 Na+=0.05 step 20 plain", check_iv),
    ([], "iv cs-pipette bath Cs+=1e-6cm/s Na+=1e-7cm/s step 20 plain", check_iv),
    ([], "correct value -70 -45.5 for k-pipette bath", check_correct),
    ([], "correct value 12.25 for cs-pipette bath", check_correct),
    ([], "ratio k-pipette bath Na K at -40", check_ratio),
    ([], "ratio k-pipette bath Na K shift bath k-pipette by 12 Cl=0.3", check_ratio),
    ([], "exchange bath k-pipette", check_exchange),
    ([], "exchange bath k-pipette pipette cs-pipette ground bridge KCl 3 M", check_exchange),
    ([], "sweep temp 15 to 35 show ljp k-pipette bath points 5 plain", check_sweep),
    ([], "sweep KCl 2.5 to 20 in bath show nernst K k-pipette bath points 4 plain", check_sweep),
    ([], "sweep NaCl 100 to 150 in bath show pH points 3 plain", check_sweep),
]


def main():
    tmp = tempfile.mkdtemp(prefix="ionmix-parity-")
    base = []
    for r in recipes:
        shutil.copy(os.path.join(root, "recipes", r), tmp)
        base.append("run " + r)
    for setup, cmd, fn in CASES:
        for f in os.listdir(tmp):
            if f.endswith(".db") or f.endswith("-wal") or f.endswith("-shm"):
                os.remove(os.path.join(tmp, f))
        text, js = both(tmp, base + setup, cmd)
        fn(text, js)
    shutil.rmtree(tmp, ignore_errors=True)
    print("ref: check_text_json: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


sys.exit(main())
