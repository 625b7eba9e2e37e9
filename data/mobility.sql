-- mobility.sql - the parts that species built by speciation are made of,
-- so that every such species (a metal complex or protonation state the ions
-- table does not list) gets a molar mass and, from it, an estimated
-- mobility (method: source 'est-stokes-mass'; code: src/ljp.c).
--
-- Columns (schema.sql, table species_parts): part = a ligand of
-- eq_ligands by name, in its fully deprotonated form (n_h = 0), a metal of
-- eq_metals by symbol, or 'H' (one proton); formula; mass_g_mol from the
-- formula with IUPAC atomic weights (iupac-fw, checked by
-- tests/ref/check_formula_weights.py).  A species weighs
-- metal(s) + ligand(s) + n_h H.
--
-- To add a part: when equilibria.sql gains a ligand or a metal, add its row
-- here; tests/test_ljp.c fails for any charged species left without a
-- mobility.

INSERT INTO species_parts (part, formula, mass_g_mol, mass_source) VALUES
('H',         'H',             1.01, 'iupac-fw'),
('Ca2+',      'Ca',           40.08, 'iupac-fw'),
('Mg2+',      'Mg',           24.30, 'iupac-fw'),
('Ba2+',      'Ba',          137.33, 'iupac-fw'),
('Sr2+',      'Sr',           87.62, 'iupac-fw'),
('Zn2+',      'Zn',           65.41, 'iupac-fw'),
('HEPES',     'C8H17N2O4S',  237.30, 'iupac-fw'),
('MOPS',      'C7H14NO4S',   208.26, 'iupac-fw'),
('PIPES',     'C8H16N2O6S2', 300.35, 'iupac-fw'),
('MES',       'C6H12NO4S',   194.23, 'iupac-fw'),
('TES',       'C6H14NO6S',   228.24, 'iupac-fw'),
('BES',       'C6H14NO5S',   212.24, 'iupac-fw'),
('Tris',      'C4H11NO3',    121.14, 'iupac-fw'),
('phosphate', 'PO4',          94.97, 'iupac-fw'),
('carbonate', 'CO3',          60.01, 'iupac-fw'),
('NMDG',      'C7H17NO5',    195.21, 'iupac-fw'),
('4-AP',      'C5H6N2',       94.11, 'iupac-fw'),
('EGTA',      'C14H20N2O10', 376.32, 'iupac-fw'),
('BAPTA',     'C22H20N2O10', 472.40, 'iupac-fw'),
('EDTA',      'C10H12N2O8',  288.21, 'iupac-fw'),
('ATP',       'C10H12N5O13P3', 503.15, 'iupac-fw'),
('ADP',       'C10H12N5O10P2', 424.18, 'iupac-fw'),
('GTP',       'C10H12N5O14P3', 519.15, 'iupac-fw'),
('PCr',       'C4H8N3O5P',   209.10, 'iupac-fw'),
('citrate',   'C6H5O7',      189.10, 'iupac-fw');
