#!/usr/bin/python3
"""check_formula_weights.py - reference check of the rows in data/*.sql.

Loads data/schema.sql, then data/sources.sql, data/ions.sql,
data/compounds.sql, then every other data/*.sql in sorted order (the order
the Makefile embeds them in), into an in-memory SQLite database with
foreign keys on, and checks:
  - every compound's fw_g_mol against the mass of its formula computed by
    python3-periodictable (IUPAC/CIAAW standard atomic weights as shipped by
    Debian: Coplen (2001) Pure Appl Chem 73:667-683), within 0.01 g/mol;
  - every compound yields something, and the charges of its yields sum to
    zero (an electroneutral formula unit);
  - every ion with charge != 0 has a mobility (lambda or D), a source, an
    uncertainty class and a relative uncertainty; every species a formula
    and molar mass are given for (ions, species_parts) weighs what its
    formula weighs (same tolerance); every species speciation can produce
    (eq_ligand_states, eq_complexes) either is an ion row with a mobility
    or is built of parts listed in species_parts (so that src/ljp.c can
    estimate its mobility); the species left without either are listed;
  - every source id named by ions and compounds exists in `sources`;
  - every hazard line ends with the pointer to the safety data sheet
    (common practice, see ../shared/CONVENTIONS.md).
Run from the repository root with /usr/bin/python3.  Prints one line per
failure and, last, "ref: check_formula_weights: N passed, N failed";
exits 0 when every check passed, else 1.
"""
import glob
import os
import sqlite3
import sys

import periodictable

NAME = "check_formula_weights"
FW_TOL_G_MOL = 0.01
HAZARD_END = "see the safety data sheet and local chemical-safety rules."
DATA_FIRST = ["data/schema.sql", "data/sources.sql", "data/ions.sql",
              "data/compounds.sql"]

passed = 0
failed = 0


def check(ok, msg):
    """Count one check; print msg when it failed."""
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print(f"{NAME}: FAIL: {msg}")


def finish():
    print(f"ref: {NAME}: {passed} passed, {failed} failed")
    sys.exit(0 if failed == 0 else 1)


def load(db):
    """Load the data files in embedding order; False on the first error."""
    rest = sorted(set(glob.glob("data/*.sql")) - set(DATA_FIRST))
    for path in DATA_FIRST + rest:
        try:
            with open(path, encoding="utf-8") as f:
                sql = f.read()
            db.executescript(sql)
        except (OSError, sqlite3.Error) as e:
            check(False, f"{path} does not load: {e}")
            return False
        check(True, f"{path} loads")
    # Inserts are already refused on a dangling key; this also catches rows
    # loaded while a data file had turned foreign keys off.
    bad = db.execute("PRAGMA foreign_key_check").fetchall()
    for table, rowid, parent, _ in bad:
        check(False, f"{table} row {rowid}: no such {parent} row")
    check(not bad, "foreign_key_check")
    return True


def check_formula_weights(db):
    rows = db.execute("SELECT name, formula, fw_g_mol FROM compounds "
                      "ORDER BY name").fetchall()
    check(len(rows) > 0, "compounds table is empty")
    for name, formula, fw in rows:
        try:
            mass = periodictable.formula(formula).mass
        except Exception as e:  # the parser raises several kinds
            check(False, f"{name}: formula {formula!r} does not parse: {e}")
            continue
        # fw_g_mol vs periodictable.formula(formula).mass (IUPAC standard
        # atomic weights as shipped by python3-periodictable)
        check(abs(fw - mass) <= FW_TOL_G_MOL,
              f"{name}: fw_g_mol {fw} but {formula} weighs {mass:.4f} g/mol")


def check_yields(db):
    rows = db.execute(
        "SELECT c.name, COUNT(y.species), TOTAL(y.count * i.charge) "
        "FROM compounds c LEFT JOIN compound_yields y ON y.compound = c.name "
        "LEFT JOIN ions i ON i.symbol = y.species "
        "GROUP BY c.name ORDER BY c.name").fetchall()
    for name, n, net in rows:
        check(n > 0, f"{name}: yields nothing")
        check(abs(net) < 1e-9, f"{name}: yields carry net charge {net:+g}")


def check_mobilities(db):
    rows = db.execute(
        "SELECT symbol, lambda_S_cm2_eq, diffusion_1e9_m2_s, mobility_source, "
        "mobility_class, mobility_rel_unc FROM ions WHERE charge != 0 "
        "ORDER BY symbol").fetchall()
    for sym, lam, dif, src, cls, unc in rows:
        has = lam is not None or dif is not None
        check(has, f"{sym}: charged ion without a mobility")
        check(src is not None, f"{sym}: mobility without a source")
        check(cls is not None and unc is not None,
              f"{sym}: mobility without an uncertainty class")
    # molar masses given beside formulas (IUPAC weights, periodictable)
    for table, key in (("ions", "symbol"), ("species_parts", "part")):
        for name, formula, mass in db.execute(
                f"SELECT {key}, formula, mass_g_mol FROM {table} "
                "WHERE mass_g_mol IS NOT NULL").fetchall():
            try:
                m = periodictable.formula(formula).mass
            except Exception as e:  # the parser raises several kinds
                check(False, f"{table} {name}: formula {formula!r} does not parse: {e}")
                continue
            check(abs(m - mass) <= FW_TOL_G_MOL,
                  f"{table} {name}: mass_g_mol {mass} but {formula} weighs {m:.4f}")
    # every species speciation can produce gets a mobility: a row, or parts
    missing = []
    states = db.execute(
        "SELECT s.symbol, s.charge, s.ligand FROM eq_ligand_states s "
        "WHERE s.charge != 0 AND s.symbol NOT IN (SELECT symbol FROM ions)").fetchall()
    for sym, _, lig in states:
        if not db.execute("SELECT 1 FROM species_parts WHERE part = ?", (lig,)).fetchone():
            missing.append(sym)
    cplx = db.execute(
        "SELECT c.symbol, c.metal, c.ligand FROM eq_complexes c "
        "WHERE c.symbol NOT IN (SELECT symbol FROM ions)").fetchall()
    for sym, metal, lig in cplx:
        for part in (metal, lig):
            if not db.execute("SELECT 1 FROM species_parts WHERE part = ?",
                              (part,)).fetchone():
                missing.append(f"{sym} (part {part})")
    for sym in sorted(set(missing)):
        check(False, f"{sym}: a species of speciation without a mobility or parts")
    check(not missing, "every species of speciation has a mobility or its parts")


def check_sources(db):
    refs = [
        ("ions", "symbol", "mobility_source"),
        ("ions", "symbol", "size_source"),
        ("species_parts", "part", "mass_source"),
        ("compounds", "name", "fw_source"),
    ]
    for table, key, col in refs:
        rows = db.execute(
            f"SELECT t.{key}, t.{col} FROM {table} t "
            f"LEFT JOIN sources s ON s.id = t.{col} "
            f"WHERE t.{col} IS NOT NULL AND s.id IS NULL").fetchall()
        for k, src in rows:
            check(False, f"{table} {k}: {col} {src!r} is not in sources")
        check(not rows, f"{table}.{col} sources exist")
    # formula weights are computed, never recalled
    rows = db.execute("SELECT c.name FROM compounds c JOIN sources s "
                      "ON s.id = c.fw_source WHERE s.from_memory != 0").fetchall()
    for (k,) in rows:
        check(False, f"{k}: formula weight cites a from-memory source")


def check_hazards(db):
    rows = db.execute("SELECT name, hazard FROM compounds "
                      "WHERE hazard IS NOT NULL ORDER BY name").fetchall()
    for name, hazard in rows:
        check(hazard.endswith(HAZARD_END),
              f"{name}: hazard text does not end with '{HAZARD_END}'")
        check("\n" not in hazard, f"{name}: hazard text is not one line")


def main():
    if not os.path.isfile("data/schema.sql"):
        check(False, "run from the repository root (data/schema.sql not found)")
        finish()
    db = sqlite3.connect(":memory:")
    db.execute("PRAGMA foreign_keys = ON")
    if load(db):
        check_formula_weights(db)
        check_yields(db)
        check_mobilities(db)
        check_sources(db)
        check_hazards(db)
    db.close()
    finish()


if __name__ == "__main__":
    main()
