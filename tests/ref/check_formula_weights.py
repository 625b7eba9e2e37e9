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
  - every ion with charge != 0 has a mobility (lambda or D) and a source,
    except the organic ions in NO_PUBLISHED_MOBILITY, which must be present
    and must have none;
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

# Charged organic ions for which no published limiting conductivity or
# mobility is known to us; they are kept with a NULL mobility rather than a
# guess (see data/ions.sql).  Remove an ion from here when a published value
# is added for it.
NO_PUBLISHED_MOBILITY = {
    "glutamate-", "pyruvate-", "QX-314+", "4-AP+",
    "H2ATP^2-", "H2GTP^2-", "PCr^2-",
}

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
        "SELECT symbol, lambda_S_cm2_eq, diffusion_1e9_m2_s, mobility_source "
        "FROM ions WHERE charge != 0 ORDER BY symbol").fetchall()
    symbols = {r[0] for r in rows}
    for sym in sorted(NO_PUBLISHED_MOBILITY - symbols):
        check(False, f"NO_PUBLISHED_MOBILITY names {sym}, which is not a charged ion")
    for sym, lam, dif, src in rows:
        has = lam is not None or dif is not None
        if sym in NO_PUBLISHED_MOBILITY:
            check(not has, f"{sym} now has a mobility: remove it from "
                  "NO_PUBLISHED_MOBILITY")
            continue
        check(has, f"{sym}: charged ion without a mobility")
        check(src is not None, f"{sym}: mobility without a source")


def check_sources(db):
    refs = [
        ("ions", "symbol", "mobility_source"),
        ("ions", "symbol", "size_source"),
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
