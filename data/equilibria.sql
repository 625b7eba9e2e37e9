-- equilibria.sql - solution chemistry constants: acid-base groups,
-- metal-ligand stability constants, water and CO2, Pitzer single-salt
-- parameters and partial molar volumes.  Read by src/speciation.c
-- (spec_load) and src/osmotic.c (osm_load) into plain C arrays at start.
--
-- Loaded after schema.sql, sources.sql, ions.sql and compounds.sql with
-- foreign keys on.  The tables here point only at `sources` (their own
-- rows, ids prefixed 'eq-', are inserted first below) and at each other.
-- Species symbols follow the convention of the ions table (formula, then
-- charge; a caret before the charge when the formula ends in a digit:
-- 'HPO4^2-', 'H2ATP^2-'; neutral solutes without sign: 'HEPES', 'Tris').
-- A symbol here names the species that compound_yields produces, so that
-- the speciation module can map what a solution yields to its components.
--
-- Conventions of every constant below:
--  * log K and pKa are decimal logarithms of concentration constants
--    (mol/L) at the reference ionic strength i_ref_M (mol/L) and
--    temperature t_ref_C; i_ref_M = 0 marks a thermodynamic constant.
--    The speciation module converts each to I = 0 with the Davies
--    equation at t_ref_C, to the working temperature (van 't Hoff with
--    the enthalpy, or the linear d(pKa)/dT, or the fit), and back to the
--    working ionic strength with Davies.
--  * Enthalpies are standard reaction enthalpies in kJ/mol for the
--    reaction as written in the table's comment, applied by van 't Hoff
--    from t_ref_C (with a heat capacity where one is entered):
--      ln K(T) = ln K(Tr) - dH/R (1/T - 1/Tr) + dCp/R (ln(T/Tr) + Tr/T - 1).
--    Where none is published, dh_analogue names the analogous reaction in
--    these tables whose enthalpy is used (an estimate, flagged by
--    source eq-est-analogue).  Only buffers may have neither; their
--    constants are then used at the reference temperature, with a warning.
--  * compilation names the compilation or paper a row comes from.  Where
--    two disagree, both are stored; is_default = 1 marks the one used
--    unless the user picks another (`constants NAME`, spec_use_compilation).
--    For an acid-base group all its steps come from one compilation, and
--    for a metal-ligand pair all its complexes come from one compilation,
--    so the loader requires exactly one default compilation per group and
--    per pair.
--  * Every value below was recalled, not looked up (from_memory = 1 in
--    its source row): check against the originals before relying on it.
--
-- To add a constant: add its source row (id 'eq-...'), then the row in the
-- table, with its compilation name; if it is the only compilation for its
-- group or pair, is_default = 1.  To add a ligand: one eq_ligands row, one
-- eq_ligand_states row per protonation state (charge = base_charge + n_h),
-- and its eq_pka rows (n_h = 1 .. the highest modelled step, no gaps).

INSERT INTO sources (id, citation, common_practice, from_memory) VALUES
('eq-goldberg-2002',
    'Goldberg R.N., Kishore N., Lennen R.M. (2002) Thermodynamic quantities '
    || 'for the ionization reactions of buffers. J Phys Chem Ref Data '
    || '31:231-370 (pKa and standard enthalpy of ionization at 25 C, I = 0)',
    0, 1),
('eq-good-1966',
    'Good N.E., Winget G.D., Winter W., Connolly T.N., Izawa S., Singh R.M.M. '
    || '(1966) Hydrogen ion buffers for biological research. Biochemistry '
    || '5:467-477 (pKa at 20 C and d(pKa)/dT; dilute solution, taken as I = 0)',
    0, 1),
('eq-martell-smith',
    'Martell A.E., Smith R.M. Critical Stability Constants, vols 1-6, Plenum '
    || 'Press, New York (1974-1989), and its electronic successor NIST Critically '
    || 'Selected Stability Constants of Metal Complexes, NIST Standard Reference '
    || 'Database 46 (concentration constants at the stated I and t)',
    0, 1),
('eq-schwarzenbach-1957',
    'Schwarzenbach G., Senn H., Anderegg G. (1957) Komplexone XXIX. Ein grosser '
    || 'Chelateffekt besonderer Art. Helv Chim Acta 40:1886-1900 (EGTA '
    || 'protonation and alkaline-earth constants, 20 C, 0.1 M KNO3; as compiled '
    || 'in eq-martell-smith)',
    0, 1),
('eq-tsien-1980',
    'Tsien R.Y. (1980) New calcium indicators and buffers with high '
    || 'selectivity against magnesium and protons: design, synthesis, and '
    || 'properties of prototype structures. Biochemistry 19:2396-2404 (BAPTA '
    || 'pKa values and Ca2+, Mg2+ dissociation constants in 0.1 M KCl, 22 C)',
    0, 1),
('eq-harned-davis-1943',
    'Harned H.S., Davis R. Jr. (1943) The ionization constant of carbonic acid '
    || 'in water and the solubility of carbon dioxide in water and aqueous salt '
    || 'solutions from 0 to 50 C. J Am Chem Soc 65:2030-2037 (fits of -log K1 '
    || 'and -log K0 = a/T + b + c T, T in K)',
    0, 1),
('eq-harned-scholes-1941',
    'Harned H.S., Scholes S.R. Jr. (1941) The ionization constant of HCO3- '
    || 'from 0 to 50 C. J Am Chem Soc 63:1706-1709 (fit of -log K2 = a/T + b '
    || '+ c T, T in K)',
    0, 1),
('eq-harned-robinson-1940',
    'Harned H.S., Robinson R.A. (1940) A note on the temperature variation of '
    || 'the ionisation constants of weak electrolytes. Trans Faraday Soc '
    || '36:973-978 (fit of pKw = a/T + b + c T, T in K, 0-60 C)',
    0, 1),
('eq-albert-1948',
    'Albert A., Goldacre R., Phillips J. (1948) The strength of heterocyclic '
    || 'bases. J Chem Soc 1948:2240-2249 (pKa of 4-aminopyridinium, 20 C)',
    0, 1),
('eq-nmdg-pka',
    'Common practice: the pKa of N-methyl-D-glucamine (meglumine) is usually '
    || 'quoted as 9.5 near 25 C (its enthalpy is estimated from Tris, see eq_pka)',
    1, 1),
('eq-pitzer-mayorga-1973',
    'Pitzer K.S., Mayorga G. (1973) Thermodynamics of electrolytes. II. '
    || 'Activity and osmotic coefficients for strong electrolytes with one or '
    || 'both ions univalent. J Phys Chem 77:2300-2308 (25 C; for 2-1 and 1-2 '
    || 'salts the paper tabulates (4/3)beta0, (4/3)beta1 and 2^(5/2)/3 C_phi, '
    || 'stored here divided back to beta0, beta1, C_phi)',
    0, 1),
('eq-pitzer-mayorga-1974',
    'Pitzer K.S., Mayorga G. (1974) Thermodynamics of electrolytes. III. '
    || 'Activity and osmotic coefficients for 2-2 electrolytes. J Solution Chem '
    || '3:539-546 (25 C, alpha1 = 1.4, alpha2 = 12)',
    0, 1),
('eq-hmw-1984',
    'Harvie C.E., Moller N., Weare J.H. (1984) The prediction of mineral '
    || 'solubilities in natural waters: the Na-K-Mg-Ca-H-Cl-SO4-OH-HCO3-CO3-'
    || 'CO2-H2O system to high ionic strengths at 25 C. Geochim Cosmochim Acta '
    || '48:723-751 (single-salt parameters of its table)',
    0, 1),
('eq-millero-1971',
    'Millero F.J. (1971) The molal volumes of electrolytes. Chem Rev '
    || '71:147-176 (conventional ionic partial molar volumes at infinite '
    || 'dilution, 25 C, V(H+) = 0, cm3/mol)',
    0, 1),
('eq-crc-sugar-volumes',
    'Partial molar volumes of sugars at infinite dilution in water, 25 C, as '
    || 'tabulated in the CRC Handbook of Chemistry and Physics (Lide D.R. / '
    || 'Haynes W.M., eds.), CRC Press (edition not checked)',
    0, 1);

-- ---------------------------------------------------------------------
-- Acid-base groups and ligands.
--
-- eq_ligands: one row per acid-base group or ligand, named by its fully
-- deprotonated form L (base_charge = its charge).  binds_metals = 1 marks a
-- ligand expected to bind the metals below (chelators, nucleotides,
-- citrate, phosphocreatine): a missing constant for such a ligand and a
-- metal present is reported (a warning in a forward solve, an error when
-- asking for a free metal concentration), while buffers (binds_metals = 0)
-- are taken as not binding metals.
CREATE TABLE eq_ligands (
    name            TEXT PRIMARY KEY,          -- 'EGTA', 'HEPES', 'phosphate'
    base_charge     INTEGER NOT NULL CHECK (base_charge BETWEEN -6 AND 2),
    binds_metals    INTEGER NOT NULL CHECK (binds_metals IN (0, 1)),
    description     TEXT NOT NULL
);

-- eq_ligand_states: the species symbol of each protonation state H_nL and
-- its charge (base_charge + n_h, checked by the loader).  States with n_h
-- above the highest modelled step (no eq_pka row) may be listed so that a
-- compound yielding them is understood: their extra protons are taken as
-- fully dissociated (a strong acid), which is what the unmodelled low
-- pKa (< 3) steps do at any pH of interest here.
CREATE TABLE eq_ligand_states (
    symbol          TEXT PRIMARY KEY,
    ligand          TEXT NOT NULL REFERENCES eq_ligands(name),
    n_h             INTEGER NOT NULL CHECK (n_h BETWEEN 0 AND 6),
    charge          INTEGER NOT NULL CHECK (charge BETWEEN -6 AND 6),
    UNIQUE (ligand, n_h)
);

-- eq_pka: stepwise acid dissociation H_nL = H_(n-1)L + H+ (n = n_h),
-- pKa = -log10 Ka.  The temperature dependence comes from, in order of
-- preference: a fit pKa = fit_a/T + fit_b + fit_c T (T in K; pka then
-- holds the fit's value at t_ref_C, for display); else dh_kJ_mol, the
-- standard enthalpy of the dissociation (van 't Hoff, with the heat
-- capacity dcp_J_mol_K where entered); else the enthalpy of the analogue
-- step named in dh_analogue (an estimate); else dpka_dt_per_K (linear);
-- else none (the pKa holds at t_ref_C only: warned).  A ligand that binds
-- metals must have one of these for every step and every complex: the
-- loader refuses the tables otherwise.  dh_source names the source of the
-- enthalpy when it is not the row's own source.
CREATE TABLE eq_pka (
    ligand          TEXT NOT NULL REFERENCES eq_ligands(name),
    n_h             INTEGER NOT NULL CHECK (n_h BETWEEN 1 AND 6),
    compilation     TEXT NOT NULL,
    is_default      INTEGER NOT NULL CHECK (is_default IN (0, 1)),
    pka             REAL NOT NULL CHECK (pka BETWEEN -2 AND 16),
    t_ref_C         REAL NOT NULL CHECK (t_ref_C BETWEEN 0 AND 100),
    i_ref_M         REAL NOT NULL CHECK (i_ref_M BETWEEN 0 AND 3),
    dh_kJ_mol       REAL,
    dpka_dt_per_K   REAL,
    fit_a_K         REAL,
    fit_b           REAL,
    fit_c_per_K     REAL,
    source          TEXT NOT NULL REFERENCES sources(id),
    note            TEXT,
    -- heat capacity of the dissociation, J/(mol K), where published
    dcp_J_mol_K     REAL,
    -- no enthalpy of its own: the species formed by the analogous step
    -- whose enthalpy (and heat capacity) is used instead; flagged
    -- 'estimated' (source eq-est-analogue)
    dh_analogue     TEXT,
    dh_source       TEXT REFERENCES sources(id),
    PRIMARY KEY (ligand, n_h, compilation),
    FOREIGN KEY (ligand, n_h) REFERENCES eq_ligand_states(ligand, n_h),
    CHECK ((fit_a_K IS NULL) = (fit_b IS NULL) AND (fit_b IS NULL) = (fit_c_per_K IS NULL))
);

INSERT INTO eq_ligands (name, base_charge, binds_metals, description) VALUES
('HEPES',     -1, 0, 'HEPES (Good buffer); the free acid is the zwitterion, HEPES- its base; the piperazine pKa near 3 is not modelled'),
('MOPS',      -1, 0, 'MOPS (Good-type buffer); free acid zwitterion, MOPS- base'),
('PIPES',     -2, 0, 'PIPES (Good buffer); the free acid yields 2 H+, the first (pKa near 3, not modelled) is taken as strong'),
('MES',       -1, 0, 'MES (Good buffer); free acid zwitterion, MES- base'),
('TES',       -1, 0, 'TES (Good buffer); free acid zwitterion, TES- base'),
('BES',       -1, 0, 'BES (Good buffer); free acid zwitterion, BES- base'),
('Tris',       0, 0, 'Tris(hydroxymethyl)aminomethane; base Tris, acid Tris+ (TrisH+)'),
('phosphate', -3, 0, 'orthophosphate; metal phosphate complexes not modelled'),
('carbonate', -2, 0, 'carbonate system; the state H2L stands for CO2(aq) + H2CO3 (total dissolved CO2)'),
('NMDG',       0, 0, 'N-methyl-D-glucamine; base NMDG, acid NMDG+'),
('4-AP',       0, 0, '4-aminopyridine; base 4-AP, acid 4-AP+'),
('EGTA',      -4, 1, 'EGTA; the free acid is H4EGTA'),
('BAPTA',     -4, 1, 'BAPTA; the free acid is H4BAPTA; only the two pKa values of Tsien (1980) are modelled, the other two protons are taken as strong'),
('EDTA',      -4, 1, 'EDTA; the free acid is H4EDTA (the two pKa values below 2 are not modelled)'),
('ATP',       -4, 1, 'adenosine 5''-triphosphate; Na2ATP yields H2ATP^2-'),
('ADP',       -3, 1, 'adenosine 5''-diphosphate'),
('GTP',       -4, 1, 'guanosine 5''-triphosphate; the guanine N1-H (pKa near 9.5) is not modelled'),
('PCr',       -2, 1, 'phosphocreatine (creatine phosphate)'),
('citrate',   -3, 1, 'citrate');

INSERT INTO eq_ligand_states (symbol, ligand, n_h, charge) VALUES
('HEPES-', 'HEPES', 0, -1), ('HEPES', 'HEPES', 1, 0),
('MOPS-', 'MOPS', 0, -1), ('MOPS', 'MOPS', 1, 0),
('PIPES^2-', 'PIPES', 0, -2), ('HPIPES-', 'PIPES', 1, -1), ('PIPES', 'PIPES', 2, 0),
('MES-', 'MES', 0, -1), ('MES', 'MES', 1, 0),
('TES-', 'TES', 0, -1), ('TES', 'TES', 1, 0),
('BES-', 'BES', 0, -1), ('BES', 'BES', 1, 0),
('Tris', 'Tris', 0, 0), ('Tris+', 'Tris', 1, 1),
('PO4^3-', 'phosphate', 0, -3), ('HPO4^2-', 'phosphate', 1, -2),
('H2PO4-', 'phosphate', 2, -1), ('H3PO4', 'phosphate', 3, 0),
('CO3^2-', 'carbonate', 0, -2), ('HCO3-', 'carbonate', 1, -1), ('CO2', 'carbonate', 2, 0),
('NMDG', 'NMDG', 0, 0), ('NMDG+', 'NMDG', 1, 1),
('4-AP', '4-AP', 0, 0), ('4-AP+', '4-AP', 1, 1),
('EGTA^4-', 'EGTA', 0, -4), ('HEGTA^3-', 'EGTA', 1, -3), ('H2EGTA^2-', 'EGTA', 2, -2),
('H3EGTA-', 'EGTA', 3, -1), ('H4EGTA', 'EGTA', 4, 0),
('BAPTA^4-', 'BAPTA', 0, -4), ('HBAPTA^3-', 'BAPTA', 1, -3), ('H2BAPTA^2-', 'BAPTA', 2, -2),
('H3BAPTA-', 'BAPTA', 3, -1), ('H4BAPTA', 'BAPTA', 4, 0),
('EDTA^4-', 'EDTA', 0, -4), ('HEDTA^3-', 'EDTA', 1, -3), ('H2EDTA^2-', 'EDTA', 2, -2),
('H3EDTA-', 'EDTA', 3, -1), ('H4EDTA', 'EDTA', 4, 0),
('ATP^4-', 'ATP', 0, -4), ('HATP^3-', 'ATP', 1, -3), ('H2ATP^2-', 'ATP', 2, -2),
('ADP^3-', 'ADP', 0, -3), ('HADP^2-', 'ADP', 1, -2), ('H2ADP-', 'ADP', 2, -1),
('GTP^4-', 'GTP', 0, -4), ('HGTP^3-', 'GTP', 1, -3), ('H2GTP^2-', 'GTP', 2, -2),
('PCr^2-', 'PCr', 0, -2), ('HPCr-', 'PCr', 1, -1),
('citrate^3-', 'citrate', 0, -3), ('Hcitrate^2-', 'citrate', 1, -2),
('H2citrate-', 'citrate', 2, -1), ('H3citrate', 'citrate', 3, 0);

-- pKa rows.  Goldberg et al. (2002) is the default for the buffers it
-- covers (thermodynamic, I = 0, with enthalpies); Good et al. (1966) is the
-- alternative (20 C, d(pKa)/dT).  Chelators and nucleotides: Martell &
-- Smith concentration constants at I = 0.1 M.
INSERT INTO eq_pka (ligand, n_h, compilation, is_default, pka, t_ref_C, i_ref_M,
                    dh_kJ_mol, dpka_dt_per_K, fit_a_K, fit_b, fit_c_per_K, source, note) VALUES
('HEPES', 1, 'goldberg-2002', 1, 7.564, 25, 0, 20.4,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL),
('HEPES', 1, 'good-1966',     0, 7.55,  20, 0, NULL, -0.014, NULL, NULL, NULL, 'eq-good-1966', NULL),
('MOPS',  1, 'goldberg-2002', 1, 7.184, 25, 0, 21.1,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', 'not in Good et al. 1966'),
('PIPES', 1, 'goldberg-2002', 1, 7.141, 25, 0, 11.2,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', 'second dissociation (HPIPES- = PIPES^2- + H+)'),
('PIPES', 1, 'good-1966',     0, 6.80,  20, 0, NULL, -0.0085, NULL, NULL, NULL, 'eq-good-1966', NULL),
('MES',   1, 'goldberg-2002', 1, 6.270, 25, 0, 14.8,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL),
('MES',   1, 'good-1966',     0, 6.15,  20, 0, NULL, -0.011, NULL, NULL, NULL, 'eq-good-1966', NULL),
('TES',   1, 'goldberg-2002', 1, 7.550, 25, 0, 32.13, NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL),
('TES',   1, 'good-1966',     0, 7.50,  20, 0, NULL, -0.020, NULL, NULL, NULL, 'eq-good-1966', NULL),
('BES',   1, 'goldberg-2002', 1, 7.187, 25, 0, 25.25, NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL),
('BES',   1, 'good-1966',     0, 7.15,  20, 0, NULL, -0.016, NULL, NULL, NULL, 'eq-good-1966', NULL),
('Tris',  1, 'goldberg-2002', 1, 8.072, 25, 0, 47.45, NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL),
('phosphate', 1, 'goldberg-2002', 1, 12.35, 25, 0, 16.0, NULL, NULL, NULL, NULL, 'eq-goldberg-2002', 'HPO4^2- = PO4^3- + H+'),
('phosphate', 2, 'goldberg-2002', 1, 7.198, 25, 0, 3.6,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', 'H2PO4- = HPO4^2- + H+'),
('phosphate', 3, 'goldberg-2002', 1, 2.148, 25, 0, -8.0, NULL, NULL, NULL, NULL, 'eq-goldberg-2002', 'H3PO4 = H2PO4- + H+'),
-- carbonate: the fits of Harned & Scholes (K2) and Harned & Davis (K1),
-- valid 0-50 C; pka holds the fit at 25 C.
('carbonate', 1, 'harned', 1, 10.3296, 25, 0, NULL, NULL, 2902.39, -6.4980, 0.02379,
    'eq-harned-scholes-1941', 'HCO3- = CO3^2- + H+; fit 0-50 C'),
('carbonate', 2, 'harned', 1, 6.3510, 25, 0, NULL, NULL, 3404.71, -14.8435, 0.032786,
    'eq-harned-davis-1943', 'CO2(aq) + H2O = HCO3- + H+; fit 0-50 C');

-- The rest carry enthalpies of dissociation (kJ/mol) with their source in
-- dh_source, or the analogue step they are taken from (dh_analogue: the
-- species the analogous step forms).  Every enthalpy here was recalled
-- (from_memory = 1 in its source row).
INSERT INTO eq_pka (ligand, n_h, compilation, is_default, pka, t_ref_C, i_ref_M,
                    dh_kJ_mol, dpka_dt_per_K, fit_a_K, fit_b, fit_c_per_K, source, note,
                    dh_analogue, dh_source) VALUES
('NMDG', 1, 'practice', 1, 9.5, 25, 0, NULL, NULL, NULL, NULL, NULL, 'eq-nmdg-pka',
    'enthalpy estimated: Tris+ analogue (an aliphatic amine)', 'Tris+', 'eq-est-analogue'),
('4-AP', 1, 'albert-1948', 1, 9.17, 20, 0, NULL, NULL, NULL, NULL, NULL, 'eq-albert-1948',
    'enthalpy estimated: Tris+ analogue (a protonated nitrogen base)', 'Tris+', 'eq-est-analogue'),
('EGTA', 1, 'martell-smith', 1, 9.46, 20, 0.1, 23.4, NULL, NULL, NULL, NULL, 'eq-schwarzenbach-1957',
    'amine', NULL, 'eq-harrison-bers-1987'),
('EGTA', 2, 'martell-smith', 1, 8.85, 20, 0.1, 23.8, NULL, NULL, NULL, NULL, 'eq-schwarzenbach-1957',
    'amine', NULL, 'eq-harrison-bers-1987'),
('EGTA', 3, 'martell-smith', 1, 2.68, 20, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-schwarzenbach-1957',
    'carboxylate; enthalpy estimated from the citrate carboxylate', 'H2citrate-', 'eq-est-analogue'),
('EGTA', 4, 'martell-smith', 1, 2.00, 20, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-schwarzenbach-1957',
    'carboxylate; enthalpy estimated from the citrate carboxylate', 'H3citrate', 'eq-est-analogue'),
('BAPTA', 1, 'tsien-1980', 1, 6.36, 22, 0.1, 31.0, NULL, NULL, NULL, NULL, 'eq-tsien-1980',
    'anilino nitrogen; enthalpy estimated (anilinium)', NULL, 'eq-est-anilinium'),
('BAPTA', 2, 'tsien-1980', 1, 5.47, 22, 0.1, 31.0, NULL, NULL, NULL, NULL, 'eq-tsien-1980',
    'anilino nitrogen; enthalpy estimated (anilinium)', NULL, 'eq-est-anilinium'),
('EDTA', 1, 'martell-smith', 1, 10.19, 25, 0.1, 23.4, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'amine', NULL, 'eq-ms-enthalpy'),
('EDTA', 2, 'martell-smith', 1, 6.13,  25, 0.1, 17.6, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'amine', NULL, 'eq-ms-enthalpy'),
('EDTA', 3, 'martell-smith', 1, 2.69,  25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'carboxylate; enthalpy estimated from the citrate carboxylate', 'H2citrate-', 'eq-est-analogue'),
('EDTA', 4, 'martell-smith', 1, 2.00,  25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'carboxylate; enthalpy estimated from the citrate carboxylate', 'H3citrate', 'eq-est-analogue'),
('ATP', 1, 'martell-smith', 1, 6.47, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'terminal phosphate; enthalpy estimated from H2PO4- = HPO4^2- + H+', 'H2PO4-', 'eq-est-analogue'),
('ATP', 2, 'martell-smith', 1, 4.06, 25, 0.1, 16.0, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'adenine N1; enthalpy estimated (purine ring nitrogen)', NULL, 'eq-est-nucleobase'),
('ADP', 1, 'martell-smith', 1, 6.38, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'enthalpy estimated: the ATP step', 'HATP^3-', 'eq-est-analogue'),
('ADP', 2, 'martell-smith', 1, 3.93, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'enthalpy estimated: the ATP step', 'H2ATP^2-', 'eq-est-analogue'),
('GTP', 1, 'martell-smith', 1, 6.5,  25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'terminal phosphate; low-confidence recollection; enthalpy estimated: the ATP step',
    'HATP^3-', 'eq-est-analogue'),
('PCr', 1, 'martell-smith', 1, 4.58, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'phosphate group; low-confidence recollection; enthalpy estimated from H2PO4-',
    'H2PO4-', 'eq-est-analogue'),
('citrate', 1, 'goldberg-2002', 1, 6.396, 25, 0, -3.38, NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL, NULL, NULL),
('citrate', 2, 'goldberg-2002', 1, 4.761, 25, 0, 2.23,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL, NULL, NULL),
('citrate', 3, 'goldberg-2002', 1, 3.128, 25, 0, 4.07,  NULL, NULL, NULL, NULL, 'eq-goldberg-2002', NULL, NULL, NULL),
('citrate', 1, 'martell-smith', 0, 5.69, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'enthalpy: the Goldberg et al. step', 'Hcitrate^2-', 'eq-est-analogue'),
('citrate', 2, 'martell-smith', 0, 4.35, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'enthalpy: the Goldberg et al. step', 'H2citrate-', 'eq-est-analogue'),
('citrate', 3, 'martell-smith', 0, 2.87, 25, 0.1, NULL, NULL, NULL, NULL, NULL, 'eq-martell-smith',
    'enthalpy: the Goldberg et al. step', 'H3citrate', 'eq-est-analogue');

-- ---------------------------------------------------------------------
-- Metals and metal-ligand complexes.
CREATE TABLE eq_metals (
    symbol          TEXT PRIMARY KEY,          -- 'Ca2+'
    charge          INTEGER NOT NULL CHECK (charge BETWEEN 1 AND 4),
    name            TEXT NOT NULL
);

INSERT INTO eq_metals (symbol, charge, name) VALUES
('Ca2+', 2, 'calcium'), ('Mg2+', 2, 'magnesium'), ('Ba2+', 2, 'barium'),
('Sr2+', 2, 'strontium'), ('Zn2+', 2, 'zinc');

-- eq_complexes: formation constants, as tabulated, of
--   kind 'ML'  : M + L = ML          K = [ML]/([M][L])
--   kind 'MHL' : M + HL = MHL        K = [MHL]/([M][HL])
--   kind 'M2L' : ML + M = M2L        K = [M2L]/([ML][M])
--   kind 'ML2' : ML + L = ML2        K = [ML2]/([ML][L])
-- (L, HL: the ligand's states with n_h = 0, 1; a kind other than ML needs
-- the ML row of the same compilation).  symbol names the complex species.
-- dh_kJ_mol is the enthalpy of the reaction as written; NULL: none entered.
CREATE TABLE eq_complexes (
    symbol          TEXT NOT NULL,
    metal           TEXT NOT NULL REFERENCES eq_metals(symbol),
    ligand          TEXT NOT NULL REFERENCES eq_ligands(name),
    kind            TEXT NOT NULL CHECK (kind IN ('ML', 'MHL', 'M2L', 'ML2')),
    compilation     TEXT NOT NULL,
    is_default      INTEGER NOT NULL CHECK (is_default IN (0, 1)),
    log_k           REAL NOT NULL CHECK (log_k BETWEEN -5 AND 30),
    t_ref_C         REAL NOT NULL CHECK (t_ref_C BETWEEN 0 AND 100),
    i_ref_M         REAL NOT NULL CHECK (i_ref_M BETWEEN 0 AND 3),
    dh_kJ_mol       REAL,
    source          TEXT NOT NULL REFERENCES sources(id),
    note            TEXT,
    dcp_J_mol_K     REAL,          -- heat capacity of formation, J/(mol K)
    dh_analogue     TEXT,          -- complex whose enthalpy is used instead
    dh_source       TEXT REFERENCES sources(id), -- source of dh_kJ_mol
    PRIMARY KEY (metal, ligand, kind, compilation)
);

-- Columns: the formation constant as tabulated, then the enthalpy of
-- formation (kJ/mol) with its source (dh_source), or the analogous complex
-- it is taken from (dh_analogue, an estimate).  Every value here was
-- recalled (from_memory = 1 in its source row) unless its source says
-- 'Estimated'.
INSERT INTO eq_complexes (symbol, metal, ligand, kind, compilation, is_default,
                          log_k, t_ref_C, i_ref_M, dh_kJ_mol, source, note,
                          dh_analogue, dh_source) VALUES
-- EGTA (Schwarzenbach et al. 1957 as compiled by Martell & Smith; 20 C,
-- 0.1 M); enthalpies as used by Harrison & Bers (1987)
('CaEGTA^2-', 'Ca2+', 'EGTA', 'ML',  'martell-smith', 1, 10.97, 20, 0.1, -33.9, 'eq-schwarzenbach-1957', NULL,
    NULL, 'eq-harrison-bers-1987'),
('CaHEGTA-',  'Ca2+', 'EGTA', 'MHL', 'martell-smith', 1, 5.33,  20, 0.1, NULL, 'eq-schwarzenbach-1957',
    'enthalpy estimated: CaEGTA^2-', 'CaEGTA^2-', 'eq-est-analogue'),
('MgEGTA^2-', 'Mg2+', 'EGTA', 'ML',  'martell-smith', 1, 5.21,  20, 0.1, 21.8, 'eq-schwarzenbach-1957',
    'endothermic, as Mg2+ binding by aminocarboxylates is', NULL, 'eq-ms-enthalpy'),
('MgHEGTA-',  'Mg2+', 'EGTA', 'MHL', 'martell-smith', 1, 3.37,  20, 0.1, NULL, 'eq-schwarzenbach-1957',
    'low-confidence recollection; enthalpy estimated: MgEGTA^2-', 'MgEGTA^2-', 'eq-est-analogue'),
('SrEGTA^2-', 'Sr2+', 'EGTA', 'ML',  'martell-smith', 1, 8.50,  20, 0.1, NULL, 'eq-schwarzenbach-1957',
    'enthalpy estimated: CaEGTA^2-', 'CaEGTA^2-', 'eq-est-analogue'),
('BaEGTA^2-', 'Ba2+', 'EGTA', 'ML',  'martell-smith', 1, 8.41,  20, 0.1, NULL, 'eq-schwarzenbach-1957',
    'enthalpy estimated: CaEGTA^2-', 'CaEGTA^2-', 'eq-est-analogue'),
('ZnEGTA^2-', 'Zn2+', 'EGTA', 'ML',  'martell-smith', 1, 12.6,  20, 0.1, NULL, 'eq-martell-smith',
    'low-confidence recollection; enthalpy estimated: CaEGTA^2-', 'CaEGTA^2-', 'eq-est-analogue'),
-- BAPTA (Tsien 1980: Kd Ca 1.1e-7 M, Kd Mg 17 mM, 0.1 M KCl, 22 C);
-- enthalpies estimated from the EGTA complexes (same tetracarboxylate cage)
('CaBAPTA^2-', 'Ca2+', 'BAPTA', 'ML', 'tsien-1980', 1, 6.96, 22, 0.1, NULL, 'eq-tsien-1980',
    'from Kd = 110 nM; enthalpy estimated: CaEGTA^2-', 'CaEGTA^2-', 'eq-est-analogue'),
('MgBAPTA^2-', 'Mg2+', 'BAPTA', 'ML', 'tsien-1980', 1, 1.77, 22, 0.1, NULL, 'eq-tsien-1980',
    'from Kd = 17 mM; enthalpy estimated: MgEGTA^2-', 'MgEGTA^2-', 'eq-est-analogue'),
-- EDTA (Martell & Smith, 25 C, 0.1 M)
('CaEDTA^2-', 'Ca2+', 'EDTA', 'ML', 'martell-smith', 1, 10.65, 25, 0.1, -27.2, 'eq-martell-smith', NULL,
    NULL, 'eq-ms-enthalpy'),
('MgEDTA^2-', 'Mg2+', 'EDTA', 'ML', 'martell-smith', 1, 8.79,  25, 0.1, 14.6, 'eq-martell-smith', NULL,
    NULL, 'eq-ms-enthalpy'),
('SrEDTA^2-', 'Sr2+', 'EDTA', 'ML', 'martell-smith', 1, 8.73,  25, 0.1, NULL, 'eq-martell-smith',
    'enthalpy estimated: CaEDTA^2-', 'CaEDTA^2-', 'eq-est-analogue'),
('BaEDTA^2-', 'Ba2+', 'EDTA', 'ML', 'martell-smith', 1, 7.86,  25, 0.1, NULL, 'eq-martell-smith',
    'enthalpy estimated: CaEDTA^2-', 'CaEDTA^2-', 'eq-est-analogue'),
('ZnEDTA^2-', 'Zn2+', 'EDTA', 'ML', 'martell-smith', 1, 16.50, 25, 0.1, NULL, 'eq-martell-smith',
    'enthalpy estimated: CaEDTA^2-', 'CaEDTA^2-', 'eq-est-analogue'),
-- ATP, ADP (Martell & Smith, 25 C, 0.1 M; low-confidence recollections);
-- MgATP forms endothermically; the others take its enthalpy
('CaATP^2-', 'Ca2+', 'ATP', 'ML',  'martell-smith', 1, 3.97, 25, 0.1, NULL, 'eq-martell-smith',
    'low-confidence recollection; enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
('CaHATP-',  'Ca2+', 'ATP', 'MHL', 'martell-smith', 1, 2.13, 25, 0.1, NULL, 'eq-martell-smith',
    'low-confidence recollection; enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
('MgATP^2-', 'Mg2+', 'ATP', 'ML',  'martell-smith', 1, 4.22, 25, 0.1, 18.8, 'eq-martell-smith',
    'low-confidence recollection', NULL, 'eq-ms-enthalpy'),
('MgHATP-',  'Mg2+', 'ATP', 'MHL', 'martell-smith', 1, 2.24, 25, 0.1, NULL, 'eq-martell-smith',
    'low-confidence recollection; enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
('CaADP-',   'Ca2+', 'ADP', 'ML',  'martell-smith', 1, 2.83, 25, 0.1, NULL, 'eq-martell-smith',
    'low-confidence recollection; enthalpy estimated: CaATP^2-', 'CaATP^2-', 'eq-est-analogue'),
('MgADP-',   'Mg2+', 'ADP', 'ML',  'martell-smith', 1, 3.17, 25, 0.1, NULL, 'eq-martell-smith',
    'low-confidence recollection; enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
-- GTP: the ATP constants (eq-sigel-ntp: the alkaline-earth complexes of the
-- nucleoside triphosphates do not depend on the base)
('MgGTP^2-', 'Mg2+', 'GTP', 'ML',  'sigel-ntp', 1, 4.22, 25, 0.1, NULL, 'eq-sigel-ntp',
    'as MgATP^2-; enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
('MgHGTP-',  'Mg2+', 'GTP', 'MHL', 'sigel-ntp', 1, 2.24, 25, 0.1, NULL, 'eq-sigel-ntp',
    'as MgHATP-; enthalpy estimated: MgHATP-', 'MgHATP-', 'eq-est-analogue'),
('CaGTP^2-', 'Ca2+', 'GTP', 'ML',  'sigel-ntp', 1, 3.97, 25, 0.1, NULL, 'eq-sigel-ntp',
    'as CaATP^2-; enthalpy estimated: CaATP^2-', 'CaATP^2-', 'eq-est-analogue'),
('CaHGTP-',  'Ca2+', 'GTP', 'MHL', 'sigel-ntp', 1, 2.13, 25, 0.1, NULL, 'eq-sigel-ntp',
    'as CaHATP-; enthalpy estimated: CaHATP-', 'CaHATP-', 'eq-est-analogue'),
-- phosphocreatine (low-confidence recollections, eq-pcr-metal); the
-- protonated complexes estimated at half the log K of the ML complex, as
-- ATP's are (4.22 -> 2.24); enthalpies from the ATP complexes (phosphate
-- binding, endothermic)
('MgPCr',    'Mg2+', 'PCr', 'ML',  'pcr-metal', 1, 1.60, 25, 0.1, NULL, 'eq-pcr-metal',
    'enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
('MgHPCr+',  'Mg2+', 'PCr', 'MHL', 'pcr-metal', 1, 0.80, 25, 0.1, NULL, 'eq-est-analogue',
    'estimated: half the log K of MgPCr; enthalpy estimated: MgATP^2-', 'MgATP^2-', 'eq-est-analogue'),
('CaPCr',    'Ca2+', 'PCr', 'ML',  'pcr-metal', 1, 1.30, 25, 0.1, NULL, 'eq-pcr-metal',
    'enthalpy estimated: CaATP^2-', 'CaATP^2-', 'eq-est-analogue'),
('CaHPCr+',  'Ca2+', 'PCr', 'MHL', 'pcr-metal', 1, 0.65, 25, 0.1, NULL, 'eq-est-analogue',
    'estimated: half the log K of CaPCr; enthalpy estimated: CaATP^2-', 'CaATP^2-', 'eq-est-analogue'),
-- citrate (Martell & Smith, 25 C, 0.1 M)
('Cacitrate-', 'Ca2+', 'citrate', 'ML', 'martell-smith', 1, 3.50, 25, 0.1, 4.0, 'eq-martell-smith', NULL,
    NULL, 'eq-citrate-enthalpy'),
('Mgcitrate-', 'Mg2+', 'citrate', 'ML', 'martell-smith', 1, 3.37, 25, 0.1, 8.0, 'eq-martell-smith',
    'low-confidence recollection', NULL, 'eq-citrate-enthalpy');
-- Not entered (no value recalled reliably): BAPTA with Sr2+, Ba2+, Zn2+;
-- ATP, ADP, GTP, phosphocreatine, citrate with Sr2+, Ba2+, Zn2+ (taken as
-- not binding, with a note); protonated (MHL) complexes of EDTA; metal
-- complexes of phosphate, carbonate and the buffers; metal hydrolysis
-- (MOH+).

-- ---------------------------------------------------------------------
-- Temperature fits of water and CO2: value = fit_a_K/T + fit_b + fit_c_per_K*T,
-- T in K.  'pKw': -log10 of Kw = a(H+) a(OH-), mol^2/kg^2 (used as mol^2/L^2);
-- 'co2-pk0': -log10 of the solubility of CO2, K0 = m(CO2, aq)/p(CO2),
-- mol/(kg atm), in pure water (salting-out by the salts is not modelled);
-- 1.466 at 25 C (K0 = 0.0342), 1.592 at 37 C (K0 = 0.0256).
CREATE TABLE eq_fits (
    name            TEXT PRIMARY KEY,
    fit_a_K         REAL NOT NULL,
    fit_b           REAL NOT NULL,
    fit_c_per_K     REAL NOT NULL,
    t_min_C         REAL NOT NULL,
    t_max_C         REAL NOT NULL,
    source          TEXT NOT NULL REFERENCES sources(id)
);

INSERT INTO eq_fits (name, fit_a_K, fit_b, fit_c_per_K, t_min_C, t_max_C, source) VALUES
('pKw',        4470.99,  -6.0875,  0.01706,     0, 60, 'eq-harned-robinson-1940'),
('co2-pk0',    -2385.73, 14.0184, -0.0152642,  0, 50, 'eq-harned-davis-1943');

-- ---------------------------------------------------------------------
-- The CO2/HCO3- system with the physiological constants.  In place of the
-- thermodynamic CO2(aq) step of Harned & Davis (kept above, and its CO2
-- solubility in eq_fits, for the record), the speciation uses the apparent
-- (mixed) constant of plasma and bicarbonate salines,
--   pK' = pH - log10([HCO3-]/[CO2]) =
--         pk0 + pk_ph (ph_ref - pH) + (t_ref - t)(pk_t + pk_tph (ph_ref - pH)),
-- with the pH terms evaluated within ph_min..ph_max (the range of the
-- data; the pH is clamped into it), taken from the reference ionic
-- strength i_ref_M to the solution's with the Davies coefficient of HCO3-;
-- and the solubility S = s0 + s1 (t_ref_sol - t) + s2 (t_ref_sol - t)^2 in
-- mmol/L per mmHg.  One row.
CREATE TABLE eq_co2_apparent (
    name            TEXT PRIMARY KEY,
    pk0             REAL NOT NULL CHECK (pk0 BETWEEN 5.5 AND 7),
    pk_ph           REAL NOT NULL,
    pk_t_per_K      REAL NOT NULL,
    pk_tph_per_K    REAL NOT NULL,
    t_ref_C         REAL NOT NULL,
    ph_ref          REAL NOT NULL,
    ph_min          REAL NOT NULL,
    ph_max          REAL NOT NULL,
    i_ref_M         REAL NOT NULL CHECK (i_ref_M BETWEEN 0 AND 1),
    pk_source       TEXT NOT NULL REFERENCES sources(id),
    i_source        TEXT NOT NULL REFERENCES sources(id),
    s0_mM_mmHg      REAL NOT NULL CHECK (s0_mM_mmHg > 0),
    s1_per_K        REAL NOT NULL,
    s2_per_K2       REAL NOT NULL,
    t_ref_sol_C     REAL NOT NULL,
    sol_source      TEXT NOT NULL REFERENCES sources(id),
    t_min_C         REAL NOT NULL,
    t_max_C         REAL NOT NULL
);

INSERT INTO eq_co2_apparent VALUES
('physiological', 6.086, 0.042, 0.00472, 0.00139, 38, 7.4, 6.8, 7.8, 0.16,
    'eq-severinghaus-1966', 'eq-plasma-ionic-strength',
    0.0307, 0.00057, 0.00002, 37, 'eq-co2-solubility-plasma', 0, 50);

-- ---------------------------------------------------------------------
-- Pitzer single-salt parameters at 25 C, for the osmotic coefficient.
--   B_phi = beta0 + beta1 exp(-alpha1 sqrt I) + beta2 exp(-alpha2 sqrt I)
--   (alpha1 = 2, beta2 = 0 for salts with a univalent ion; alpha1 = 1.4,
--   alpha2 = 12 for 2-2 salts), C_phi as tabulated.  m_max_mol_kg is the
-- highest molality of the fit.  One row per cation-anion pair and
-- compilation; is_default as above.
CREATE TABLE osm_pitzer (
    cation          TEXT NOT NULL,             -- 'Na+'
    anion           TEXT NOT NULL,             -- 'Cl-'
    salt            TEXT NOT NULL,             -- 'NaCl'
    compilation     TEXT NOT NULL,
    is_default      INTEGER NOT NULL CHECK (is_default IN (0, 1)),
    beta0           REAL NOT NULL,
    beta1           REAL NOT NULL,
    beta2           REAL NOT NULL DEFAULT 0,
    alpha1          REAL NOT NULL DEFAULT 2.0,
    alpha2          REAL NOT NULL DEFAULT 12.0,
    c_phi           REAL NOT NULL,
    m_max_mol_kg    REAL NOT NULL CHECK (m_max_mol_kg > 0),
    source          TEXT NOT NULL REFERENCES sources(id),
    -- 'published': a fit to the salt's own data; 'estimated': taken from
    -- the analogue salt named in `analogue` (the osmolality range carries
    -- +-50 % of such a salt's own term, see src/osmotic.h)
    class           TEXT NOT NULL DEFAULT 'published'
                        CHECK (class IN ('published', 'estimated')),
    analogue        TEXT,
    CHECK ((class = 'estimated') = (analogue IS NOT NULL)),
    PRIMARY KEY (cation, anion, compilation)
);

INSERT INTO osm_pitzer (cation, anion, salt, compilation, is_default, beta0, beta1,
                        beta2, alpha1, alpha2, c_phi, m_max_mol_kg, source) VALUES
('Na+', 'Cl-',  'NaCl',  'pitzer-mayorga', 1, 0.0765,  0.2664, 0, 2, 12,  0.00127, 6.0, 'eq-pitzer-mayorga-1973'),
('K+',  'Cl-',  'KCl',   'pitzer-mayorga', 1, 0.04835, 0.2122, 0, 2, 12, -0.00084, 4.8, 'eq-pitzer-mayorga-1973'),
('Li+', 'Cl-',  'LiCl',  'pitzer-mayorga', 1, 0.1494,  0.3074, 0, 2, 12,  0.00359, 6.0, 'eq-pitzer-mayorga-1973'),
('Cs+', 'Cl-',  'CsCl',  'pitzer-mayorga', 1, 0.0300,  0.0558, 0, 2, 12,  0.00038, 5.0, 'eq-pitzer-mayorga-1973'),
('Rb+', 'Cl-',  'RbCl',  'pitzer-mayorga', 1, 0.0441,  0.1483, 0, 2, 12, -0.00101, 5.0, 'eq-pitzer-mayorga-1973'),
('H+',  'Cl-',  'HCl',   'pitzer-mayorga', 1, 0.1775,  0.2945, 0, 2, 12,  0.00080, 6.0, 'eq-pitzer-mayorga-1973'),
('Na+', 'Br-',  'NaBr',  'pitzer-mayorga', 1, 0.0973,  0.2791, 0, 2, 12,  0.00116, 4.0, 'eq-pitzer-mayorga-1973'),
('K+',  'Br-',  'KBr',   'pitzer-mayorga', 1, 0.0569,  0.2212, 0, 2, 12, -0.00180, 5.5, 'eq-pitzer-mayorga-1973'),
('Na+', 'F-',   'NaF',   'pitzer-mayorga', 1, 0.0215,  0.2107, 0, 2, 12,  0,       1.0, 'eq-pitzer-mayorga-1973'),
('K+',  'F-',   'KF',    'pitzer-mayorga', 1, 0.08089, 0.2021, 0, 2, 12,  0.00093, 2.0, 'eq-pitzer-mayorga-1973'),
('Cs+', 'F-',   'CsF',   'pitzer-mayorga', 1, 0.1306,  0.2570, 0, 2, 12, -0.0043,  3.0, 'eq-pitzer-mayorga-1973'),
('Na+', 'OH-',  'NaOH',  'pitzer-mayorga', 1, 0.0864,  0.253,  0, 2, 12,  0.0044,  6.0, 'eq-pitzer-mayorga-1973'),
('K+',  'OH-',  'KOH',   'pitzer-mayorga', 1, 0.1298,  0.320,  0, 2, 12,  0.0041,  5.5, 'eq-pitzer-mayorga-1973'),
('Na+', 'NO3-', 'NaNO3', 'pitzer-mayorga', 1, 0.0068,  0.1783, 0, 2, 12, -0.00072, 6.0, 'eq-pitzer-mayorga-1973'),
('K+',  'NO3-', 'KNO3',  'pitzer-mayorga', 1, -0.0816, 0.0494, 0, 2, 12,  0.0066,  3.5, 'eq-pitzer-mayorga-1973'),
('Na+', 'H2PO4-', 'NaH2PO4', 'pitzer-mayorga', 1, -0.0533, 0.0396, 0, 2, 12, 0.00795, 6.0, 'eq-pitzer-mayorga-1973'),
('K+',  'H2PO4-', 'KH2PO4',  'pitzer-mayorga', 1, -0.0678, -0.1042, 0, 2, 12, 0,     1.8, 'eq-pitzer-mayorga-1973'),
('Na+', 'HCO3-', 'NaHCO3', 'hmw-1984', 1, 0.0277,  0.0411, 0, 2, 12, 0,       1.0, 'eq-hmw-1984'),
('K+',  'HCO3-', 'KHCO3',  'hmw-1984', 1, -0.0107, 0.0478, 0, 2, 12, 0,       1.0, 'eq-hmw-1984'),
('Na+', 'CO3^2-', 'Na2CO3', 'hmw-1984', 1, 0.0399, 1.389,  0, 2, 12, 0.0044,  1.5, 'eq-hmw-1984'),
('Ca2+', 'Cl-', 'CaCl2', 'pitzer-mayorga', 1, 0.3159,  1.614,   0, 2, 12, -0.00034, 2.5, 'eq-pitzer-mayorga-1973'),
('Mg2+', 'Cl-', 'MgCl2', 'pitzer-mayorga', 1, 0.35235, 1.6815,  0, 2, 12,  0.00519, 4.5, 'eq-pitzer-mayorga-1973'),
('Ba2+', 'Cl-', 'BaCl2', 'pitzer-mayorga', 1, 0.2628,  1.49625, 0, 2, 12, -0.01938, 1.8, 'eq-pitzer-mayorga-1973'),
('Sr2+', 'Cl-', 'SrCl2', 'pitzer-mayorga', 1, 0.28575, 1.66725, 0, 2, 12, -0.00130, 4.0, 'eq-pitzer-mayorga-1973'),
('Na+', 'SO4^2-', 'Na2SO4', 'pitzer-mayorga', 1, 0.01958, 1.113,  0, 2, 12,  0.00497, 4.0, 'eq-pitzer-mayorga-1973'),
('K+',  'SO4^2-', 'K2SO4',  'pitzer-mayorga', 1, 0.04995, 0.7793, 0, 2, 12,  0,       0.7, 'eq-pitzer-mayorga-1973'),
('Li+', 'SO4^2-', 'Li2SO4', 'pitzer-mayorga', 1, 0.1363,  1.2705, 0, 2, 12, -0.00399, 3.0, 'eq-pitzer-mayorga-1973'),
('Mg2+', 'SO4^2-', 'MgSO4', 'pitzer-mayorga', 1, 0.2210, 3.343, -37.23, 1.4, 12, 0.025, 3.0, 'eq-pitzer-mayorga-1974');

-- Organic salts of pipette solutions and baths.  No single-salt fits were
-- recalled for them, so each takes the parameters of its closest analogue
-- (class 'estimated', source eq-est-osm-analogue): the hydroxy- and amino-
-- carboxylates (gluconate, aspartate, glutamate) those of the acetate of
-- the same cation (Pitzer & Mayorga 1973, eq-pitzer-mayorga-acetate); the
-- sulfonates (methanesulfonate, HEPES-) and the large organic cations
-- (NMDG+, choline+, TEA+, Tris+) those of the chloride of the nearest alkali
-- ion.  m_max is the analogue's.
INSERT INTO osm_pitzer (cation, anion, salt, compilation, is_default, beta0, beta1,
                        beta2, alpha1, alpha2, c_phi, m_max_mol_kg, source, class,
                        analogue) VALUES
('K+',  'gluconate-', 'K-gluconate',  'analogue-estimate', 1, 0.1587, 0.3251, 0, 2, 12, -0.00660, 3.5, 'eq-est-osm-analogue', 'estimated', 'KOAc'),
('Na+', 'gluconate-', 'Na-gluconate', 'analogue-estimate', 1, 0.1426, 0.3237, 0, 2, 12, -0.00629, 3.5, 'eq-est-osm-analogue', 'estimated', 'NaOAc'),
('K+',  'aspartate-', 'K-aspartate',  'analogue-estimate', 1, 0.1587, 0.3251, 0, 2, 12, -0.00660, 3.5, 'eq-est-osm-analogue', 'estimated', 'KOAc'),
('K+',  'glutamate-', 'K-glutamate',  'analogue-estimate', 1, 0.1587, 0.3251, 0, 2, 12, -0.00660, 3.5, 'eq-est-osm-analogue', 'estimated', 'KOAc'),
('Na+', 'glutamate-', 'Na-glutamate', 'analogue-estimate', 1, 0.1426, 0.3237, 0, 2, 12, -0.00629, 3.5, 'eq-est-osm-analogue', 'estimated', 'NaOAc'),
('K+',  'methanesulfonate-', 'K-methanesulfonate',  'analogue-estimate', 1, 0.04835, 0.2122, 0, 2, 12, -0.00084, 4.8, 'eq-est-osm-analogue', 'estimated', 'KCl'),
('Cs+', 'methanesulfonate-', 'Cs-methanesulfonate', 'analogue-estimate', 1, 0.0300,  0.0558, 0, 2, 12,  0.00038, 5.0, 'eq-est-osm-analogue', 'estimated', 'CsCl'),
('Na+', 'methanesulfonate-', 'Na-methanesulfonate', 'analogue-estimate', 1, 0.0765,  0.2664, 0, 2, 12,  0.00127, 6.0, 'eq-est-osm-analogue', 'estimated', 'NaCl'),
('K+',  'HEPES-', 'K-HEPES',  'analogue-estimate', 1, 0.04835, 0.2122, 0, 2, 12, -0.00084, 4.8, 'eq-est-osm-analogue', 'estimated', 'KCl'),
('Na+', 'HEPES-', 'Na-HEPES', 'analogue-estimate', 1, 0.0765,  0.2664, 0, 2, 12,  0.00127, 6.0, 'eq-est-osm-analogue', 'estimated', 'NaCl'),
('Cs+', 'HEPES-', 'Cs-HEPES', 'analogue-estimate', 1, 0.0300,  0.0558, 0, 2, 12,  0.00038, 5.0, 'eq-est-osm-analogue', 'estimated', 'CsCl'),
('NMDG+',    'Cl-', 'NMDG-Cl',     'analogue-estimate', 1, 0.0765, 0.2664, 0, 2, 12, 0.00127, 6.0, 'eq-est-osm-analogue', 'estimated', 'NaCl'),
('choline+', 'Cl-', 'choline-Cl',  'analogue-estimate', 1, 0.0765, 0.2664, 0, 2, 12, 0.00127, 6.0, 'eq-est-osm-analogue', 'estimated', 'NaCl'),
('TEA+',     'Cl-', 'TEA-Cl',      'analogue-estimate', 1, 0.0765, 0.2664, 0, 2, 12, 0.00127, 6.0, 'eq-est-osm-analogue', 'estimated', 'NaCl'),
('Tris+',    'Cl-', 'Tris-HCl',    'analogue-estimate', 1, 0.0765, 0.2664, 0, 2, 12, 0.00127, 6.0, 'eq-est-osm-analogue', 'estimated', 'NaCl');
-- Not entered: the parameters of Kim & Frederick (1988) J Chem Eng Data
-- 33:177-184 (a later evaluation of the same salts; its values were not
-- recalled reliably); NaHCO3 of Peiper & Pitzer (1982) is represented by
-- the HMW (1984) row.  Pairs without a row (the complexes, the nucleotides,
-- phosphocreatine) count by the Debye-Hueckel term alone, and the
-- osmolality range allows for what a salt's own term would add (see
-- src/osmotic.h).

-- ---------------------------------------------------------------------
-- Neutral solutes: their own non-ideality at 25 C.  A solute of molality
-- m (mol/kg) adds lambda m^2 + mu m^3 to (phi - 1) times the sum of
-- molalities (so alone, phi = 1 + lambda m + mu m^2); solute-ion and
-- solute-solute cross terms are not modelled.  Solutes without a row count
-- as ideal.
CREATE TABLE osm_neutral (
    symbol          TEXT PRIMARY KEY,
    lambda_kg_mol   REAL NOT NULL,
    mu_kg2_mol2     REAL NOT NULL,
    m_max_mol_kg    REAL NOT NULL CHECK (m_max_mol_kg > 0),
    class           TEXT NOT NULL CHECK (class IN ('published', 'estimated')),
    source          TEXT NOT NULL REFERENCES sources(id),
    note            TEXT
);

INSERT INTO osm_neutral (symbol, lambda_kg_mol, mu_kg2_mol2, m_max_mol_kg, class, source, note) VALUES
('sucrose',  0.068, 0.020, 1.0, 'published', 'eq-robinson-stokes-1959',
    'through phi = 1.039 at 0.5 and 1.088 at 1.0 mol/kg'),
('glucose',  0.015, 0,     1.0, 'published', 'eq-robinson-stokes-1959',
    'through phi = 1.015 at 1.0 mol/kg'),
('mannitol', 0.015, 0,     1.0, 'estimated', 'eq-est-mannitol', 'as glucose');

-- ---------------------------------------------------------------------
-- Partial molar volumes at infinite dilution, 25 C, cm3/mol, for the
-- conversion between molarity and molality (see src/osmotic.h); ions on
-- the conventional scale V(H+) = 0, so that a neutral salt's volume is the
-- sum of its ions'.  Species without a row are given volume 0.
CREATE TABLE osm_molar_volumes (
    symbol          TEXT PRIMARY KEY,
    v0_cm3_mol      REAL NOT NULL CHECK (v0_cm3_mol BETWEEN -100 AND 1000),
    source          TEXT NOT NULL REFERENCES sources(id)
);

INSERT INTO osm_molar_volumes (symbol, v0_cm3_mol, source) VALUES
('H+', 0, 'eq-millero-1971'),
('Li+', -0.88, 'eq-millero-1971'), ('Na+', -1.21, 'eq-millero-1971'),
('K+', 9.02, 'eq-millero-1971'), ('Rb+', 14.07, 'eq-millero-1971'),
('Cs+', 21.42, 'eq-millero-1971'), ('Mg2+', -21.17, 'eq-millero-1971'),
('Ca2+', -17.85, 'eq-millero-1971'), ('Sr2+', -18.16, 'eq-millero-1971'),
('Ba2+', -12.47, 'eq-millero-1971'), ('F-', -1.16, 'eq-millero-1971'),
('Cl-', 17.83, 'eq-millero-1971'), ('Br-', 24.71, 'eq-millero-1971'),
('OH-', -4.04, 'eq-millero-1971'), ('NO3-', 29.0, 'eq-millero-1971'),
('SO4^2-', 13.98, 'eq-millero-1971'),
('sucrose', 211.3, 'eq-crc-sugar-volumes'), ('glucose', 112.0, 'eq-crc-sugar-volumes');
