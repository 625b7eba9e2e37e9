-- schema.sql - the reference database of ionmix: tables and their units.
--
-- Loaded first, into an in-memory SQLite database at every start, from the
-- copy embedded in the binary; the other data/*.sql files hold the rows.
-- Foreign keys are enforced while loading, so a row that names a missing
-- source, ion or compound stops the build's tests.
--
-- Every number carries a key into `sources`.  A source row is either a full
-- citation, or flagged common_practice = 1 (a fact of the trade without a
-- single published source); from_memory = 1 marks a published value that was
-- recalled, not looked up, and should be checked against the original.

PRAGMA foreign_keys = ON;

CREATE TABLE sources (
    id              TEXT PRIMARY KEY,          -- short key, e.g. 'crc-lambda'
    citation        TEXT NOT NULL,             -- full citation, or what the practice is
    common_practice INTEGER NOT NULL DEFAULT 0 CHECK (common_practice IN (0, 1)),
    from_memory     INTEGER NOT NULL DEFAULT 0 CHECK (from_memory IN (0, 1))
);

-- Dissolved species.  Charged ions, and (charge 0) the neutral solutes that
-- compounds yield, so that every yield points into one table.
-- Symbol convention: formula then charge ('K+', 'Ca2+', 'Cl-'); when the
-- formula ends in a digit a caret separates the charge ('SO4^2-',
-- 'HPO4^2-', 'H2ATP^2-'); organic ions by their usual short name
-- ('gluconate-', 'HEPES-', 'NMDG+', 'TEA+').  Neutral solutes carry no sign.
CREATE TABLE ions (
    symbol          TEXT PRIMARY KEY,
    name            TEXT NOT NULL,
    charge          INTEGER NOT NULL CHECK (charge BETWEEN -6 AND 6),
    -- limiting equivalent conductivity at 25 C, S cm2 per mole of charge
    -- (the handbook convention: the value for 1/|z| X); NULL when unknown
    lambda_S_cm2_eq REAL CHECK (lambda_S_cm2_eq IS NULL OR lambda_S_cm2_eq > 0),
    -- tracer diffusion coefficient at 25 C, 1e-9 m2/s, where it was measured
    -- directly rather than derived from lambda; NULL otherwise
    diffusion_1e9_m2_s REAL CHECK (diffusion_1e9_m2_s IS NULL OR diffusion_1e9_m2_s > 0),
    mobility_source TEXT REFERENCES sources(id),
    -- Kielland (1937) effective ion-size parameter a, in pm (1 Angstrom =
    -- 100 pm); NULL when not tabulated
    kielland_a_pm   REAL CHECK (kielland_a_pm IS NULL OR kielland_a_pm > 0),
    size_source     TEXT REFERENCES sources(id),
    -- the species' own formula, charge left off ('C6H11O7' for gluconate-),
    -- and its molar mass in g/mol (IUPAC atomic weights, iupac-fw), where an
    -- estimated mobility is derived from the size
    formula         TEXT,
    mass_g_mol      REAL CHECK (mass_g_mol IS NULL OR mass_g_mol > 0),
    -- uncertainty class of the mobility: 'measured' (a measured value read
    -- in its source), 'from-memory' (a measured value recalled, its source
    -- flagged from_memory), 'estimated' (by the method its source names);
    -- and its relative uncertainty, the half-width of the interval taken as
    -- the mobility's bounds (0.05 = within 5 %)
    mobility_class  TEXT CHECK (mobility_class IN ('measured', 'from-memory', 'estimated')),
    mobility_rel_unc REAL CHECK (mobility_rel_unc IS NULL OR
                                 (mobility_rel_unc >= 0 AND mobility_rel_unc < 1)),
    CHECK (lambda_S_cm2_eq IS NULL AND diffusion_1e9_m2_s IS NULL OR mobility_source IS NOT NULL),
    CHECK (kielland_a_pm IS NULL OR size_source IS NOT NULL),
    CHECK ((lambda_S_cm2_eq IS NULL AND diffusion_1e9_m2_s IS NULL) = (mobility_class IS NULL)),
    CHECK (mobility_class IS NULL OR mobility_rel_unc IS NOT NULL),
    CHECK (mass_g_mol IS NULL OR formula IS NOT NULL)
);

-- Parts of the species that speciation builds (metal complexes, protonation
-- states) and the ions table does not list: each ligand of the equilibria
-- tables by its fully deprotonated form (n_h = 0), each metal, and 'H';
-- a derived species weighs the sum of its parts, which gives its estimated
-- mobility (see data/mobility.sql).
CREATE TABLE species_parts (
    part            TEXT PRIMARY KEY,          -- eq_ligands.name, eq_metals.symbol or 'H'
    formula         TEXT NOT NULL,
    mass_g_mol      REAL NOT NULL CHECK (mass_g_mol > 0),
    mass_source     TEXT NOT NULL REFERENCES sources(id)
);

-- Compounds as weighed.  formula is machine-readable (elements, counts and
-- parentheses; water of hydration as '(H2O)6'), so that fw_g_mol can be
-- checked against IUPAC atomic weights.  fw_g_mol includes the water of
-- hydration.  hydrate_of names the anhydrous compound, if it is in the table.
CREATE TABLE compounds (
    name            TEXT PRIMARY KEY,          -- canonical: 'MgCl2.6H2O', 'K-gluconate'
    formula         TEXT NOT NULL,
    fw_g_mol        REAL NOT NULL CHECK (fw_g_mol > 0),
    fw_source       TEXT NOT NULL REFERENCES sources(id),
    hydrate_of      TEXT REFERENCES compounds(name),
    kind            TEXT NOT NULL CHECK (kind IN ('salt', 'acid', 'base', 'buffer',
                        'chelator', 'sugar', 'organic-salt', 'nucleotide', 'drug')),
    hazard          TEXT,                      -- one-line caution, NULL if none
    description     TEXT NOT NULL
);

-- Other names a compound is known by; matched case-insensitively, like
-- the canonical name.  '·' in a typed name is read as '.'.
CREATE TABLE compound_aliases (
    alias           TEXT PRIMARY KEY COLLATE NOCASE,
    compound        TEXT NOT NULL REFERENCES compounds(name)
);

-- What one formula unit yields in water as dissolved, before any acid-base
-- or metal-ligand reaction (those are the speciation module's business):
-- Na2ATP yields 2 Na+ and 1 H2ATP^2-, EGTA (free acid) yields 1 H4EGTA.
-- Water of hydration is not a yield.
CREATE TABLE compound_yields (
    compound        TEXT NOT NULL REFERENCES compounds(name),
    species         TEXT NOT NULL REFERENCES ions(symbol),
    count           REAL NOT NULL CHECK (count > 0),
    PRIMARY KEY (compound, species)
);
