#!/usr/bin/python3
"""check_junction_scipy.py - the Planck and free-diffusion junction models
of ionmix against independent implementations written here with
scipy.integrate.solve_bvp (collocation with an adaptive mesh), on
multi-valent pairs: the demo pair (k-pipette | bath), the Cs+ demo internal
against a Ba2+/TEA+ bath, a NaCl | CaCl2 bi-ionic junction and an HCl | KCl junction.

For each pair the script runs `junction PIPETTE BATH model all` with --json
through the ionmix binary ($IONMIX, default build/ionmix), reads the species
it used (charge, diffusion coefficient, both concentrations) from
"contributions", solves both models from those numbers alone, and compares
with "models":
  - Planck's model (steady electroneutral Nernst-Planck layer, zero
    current, the two solutions held at its ends; Planck 1890), as a
    boundary-value problem in the concentrations and the potential with
    the fluxes as unknown parameters:   tolerance 1e-4 mV;
  - free diffusion (self-similar electroneutral Nernst-Planck profile in
    zeta = x / sqrt(D t), zero current), as a boundary-value problem in the
    concentrations, their fluxes and the potential:   tolerance 0.02 mV
    (ionmix's default accuracy is an estimated 0.005 mV).
Inputs are made electroneutral first by adjusting the majority counter-ion
of each side (the JSON rounds to 10 digits; the largest change is printed
and must stay below 1e-6 relative).
Prints one line per failure and, last, "ref: junction_scipy: N passed,
N failed"; exits 0 when all passed.  Run from the repository root.
"""
import json
import math
import os
import subprocess
import sys

# one thread for BLAS: threads only cost time on these small systems
for _v in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_v, "1")

try:
    import numpy as np
    from scipy.integrate import solve_bvp
    from scipy.special import erfc
except ImportError:  # pragma: no cover
    print("check_junction_scipy: scipy missing: apt-get install python3-scipy")
    print("ref: junction_scipy: 0 passed, 1 failed")
    sys.exit(1)

NAME = "junction_scipy"
F = 96485.33212      # C/mol, CODATA 2018
R = 8.314462618      # J/(mol K), CODATA 2018
T0 = 273.15
TOL_PLANCK_MV = 1e-4
TOL_DIFF_MV = 0.02
IONMIX = os.environ.get("IONMIX", "build/ionmix")

passed = 0
failed = 0


def check(ok, msg):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print(f"{NAME}: FAIL: {msg}")


SETUP_SALT = [
    "temp 25",
    "solution nacl", "add NaCl 150",
    "solution cacl2", "add CaCl2 100",
    "solution hcl", "add HCl 100",
    "solution kcl10", "add KCl 10",
]
SETUP_RECIPES = [
    "run recipes/bath-saline.ionmix",
    "run recipes/k-pipette.ionmix",
    "run recipes/cs-pipette.ionmix",
    "solution ba-tea", "add TEA-Cl 140", "add BaCl2 10", "add HEPES 10",
    "ph 7.4 with CsOH",
]
PAIRS = [
    (SETUP_RECIPES, "k-pipette", "bath"),
    (SETUP_RECIPES, "cs-pipette", "ba-tea"),
    (SETUP_SALT, "nacl", "cacl2"),
    (SETUP_SALT, "hcl", "kcl10"),
]


def run_junction(setup, pip, bath):
    script = "\n".join(setup + [f"junction {pip} {bath} model all"]) + "\n"
    p = subprocess.run([IONMIX, "--json"], input=script, capture_output=True,
                       text=True, timeout=120)
    if p.returncode != 0:
        return None, p.stderr.strip()
    last = [ln for ln in p.stdout.splitlines() if ln.startswith('{"pipette"')]
    if not last:
        return None, "no junction line in the output"
    return json.loads(last[-1]), None


def neutral(z, c):
    """Adjust the majority counter-ion so that sum z c = 0; relative change."""
    c = list(c)
    net = sum(zi * ci for zi, ci in zip(z, c))
    if net == 0:
        return c, 0.0
    # the ion of the opposite sign with the largest |z| c
    k = max((i for i in range(len(z)) if z[i] * net < 0),
            key=lambda i: abs(z[i]) * c[i])
    new = c[k] - net / z[k]
    rel = abs(new - c[k]) / c[k]
    c[k] = new
    return c, rel


def henderson(z, d, cp, cb):
    a = sum(zi * di * (b - p) for zi, di, p, b in zip(z, d, cp, cb))
    bp = sum(zi * zi * di * p for zi, di, p in zip(z, d, cp))
    bb = sum(zi * zi * di * b for zi, di, b in zip(z, d, cb))
    db = bb - bp
    if abs(db) < 1e-14 * bp:
        return -a / bp
    return -a / db * math.log(bb / bp)


def planck(z, d, cp, cb):
    """psi(1) - psi(0), units of RT/F."""
    n = len(z)
    z = np.array(z, float)
    d = np.array(d, float)
    cp = np.array(cp, float)
    cb = np.array(cb, float)
    e = int(np.argmax(np.minimum(cp, cb) * abs(z)))

    def f(x, y, p):
        c = y[:n]
        num = np.sum(z[:, None] * p[:, None] / d[:, None], axis=0)
        den = np.sum((z * z)[:, None] * c, axis=0)
        dpsi = -num / den
        dc = -p[:, None] / d[:, None] - z[:, None] * c * dpsi
        return np.vstack([dc, dpsi])

    def bc(ya, yb, p):
        r = list(ya[:n] - cp)
        r += [yb[i] - cb[i] for i in range(n) if i != e]
        r += [ya[n], float(np.dot(z, p))]
        return np.array(r)

    x = np.linspace(0, 1, 41)
    psi_h = henderson(z, d, cp, cb)
    c0 = cp[:, None] + (cb - cp)[:, None] * x
    y0 = np.vstack([c0, psi_h * x])
    J0 = -d * (cb - cp + z * 0.5 * (cp + cb) * psi_h)
    sol = solve_bvp(f, bc, x, y0, p=J0, tol=1e-8, max_nodes=200000)
    if not sol.success:
        raise RuntimeError("planck: " + sol.message)
    return float(sol.sol(1.0)[n])


def diffusion(z, d, cp, cb):
    """psi(+Z) - psi(-Z), units of RT/F, d relative to the fastest ion."""
    n = len(z)
    z = np.array(z, float)
    d = np.array(d, float) / max(d)
    cp = np.array(cp, float)
    cb = np.array(cb, float)
    e = int(np.argmax(np.minimum(cp, cb) * abs(z)))
    Z = 14.0

    def f(x, y):
        c, g = y[:n], y[n:2 * n]
        num = np.sum((z / d)[:, None] * g, axis=0)
        den = np.sum((z * z)[:, None] * c, axis=0)
        dpsi = num / den
        dc = g / d[:, None] - z[:, None] * c * dpsi
        dg = -0.5 * x * dc
        return np.vstack([dc, dg, dpsi])

    def bc(ya, yb):
        r = list(ya[:n] - cp)
        r += [yb[i] - cb[i] for i in range(n) if i != e]
        r += [float(np.dot(z, ya[n:2 * n])), ya[2 * n]]
        return np.array(r)

    # start: Henderson's mixing along one erfc profile
    w = z * z * d * (cp + cb)
    dm = float(np.sum(w * d) / np.sum(w))
    s = np.sinh(np.linspace(-2.5, 2.5, 161))
    x = Z * s / s[-1]
    th = 0.5 * erfc(-x / (2 * math.sqrt(dm)))
    dth = np.exp(-x * x / (4 * dm)) / (2 * math.sqrt(math.pi * dm))
    c0 = cp[:, None] + (cb - cp)[:, None] * th
    dc0 = (cb - cp)[:, None] * dth
    K = np.sum((z * z * d)[:, None] * c0, axis=0)
    G = np.sum((z * d)[:, None] * dc0, axis=0)
    dpsi0 = -G / K
    g0 = d[:, None] * (dc0 + z[:, None] * c0 * dpsi0)
    psi0 = np.concatenate([[0], np.cumsum(0.5 * (dpsi0[1:] + dpsi0[:-1]) * np.diff(x))])
    y0 = np.vstack([c0, g0, psi0])
    sol = solve_bvp(f, bc, x, y0, tol=1e-6, max_nodes=400000)
    if not sol.success:
        raise RuntimeError("diffusion: " + sol.message)
    return float(sol.sol(Z)[2 * n])


def main():
    if not os.path.isfile("data/schema.sql"):
        check(False, "run from the repository root")
    for setup, pip, bath in PAIRS:
        j, err = run_junction(setup, pip, bath)
        tag = f"{pip} | {bath}"
        check(j is not None, f"{tag}: ionmix failed: {err}")
        if j is None:
            continue
        t_c = j["temperature_C"]
        rtf = 1000.0 * R * (t_c + T0) / F
        sp = [s for s in j["contributions"] if s["pipette_mM"] > 0 or s["bath_mM"] > 0]
        z = [s["z"] for s in sp]
        d = [s["D_1e9_m2_s"] for s in sp]
        cp, r1 = neutral(z, [s["pipette_mM"] for s in sp])
        cb, r2 = neutral(z, [s["bath_mM"] for s in sp])
        check(max(r1, r2) < 1e-6, f"{tag}: inputs not electroneutral ({max(r1, r2):.2g})")
        m = j["models"]
        check("planck" in m and "diffusion" in m,
              f"{tag}: a model gave no value: {j.get('not_applicable')}")
        if "planck" not in m or "diffusion" not in m:
            continue
        # Henderson from the same numbers (a check of the reading itself)
        h = henderson(z, d, cp, cb) * rtf
        check(abs(h - m["henderson"]) < 1e-4,
              f"{tag}: Henderson {m['henderson']} vs {h:.6f}")
        try:
            p = planck(z, d, cp, cb) * rtf
            check(abs(p - m["planck"]) < TOL_PLANCK_MV,
                  f"{tag}: Planck {m['planck']:.6f} vs solve_bvp {p:.6f} mV")
        except RuntimeError as ex:
            check(False, f"{tag}: {ex}")
        try:
            df = diffusion(z, d, cp, cb) * rtf
            check(abs(df - m["diffusion"]) < TOL_DIFF_MV,
                  f"{tag}: free diffusion {m['diffusion']:.6f} vs solve_bvp {df:.6f} mV")
        except RuntimeError as ex:
            check(False, f"{tag}: {ex}")
        print(f"{NAME}: {tag}: Henderson {m['henderson']:.4f}, Planck {m['planck']:.4f} "
              f"(scipy {p:.4f}), free diffusion {m['diffusion']:.4f} (scipy {df:.4f}) mV")
    print(f"ref: {NAME}: {passed} passed, {failed} failed")
    sys.exit(0 if failed == 0 else 1)


if __name__ == "__main__":
    main()
