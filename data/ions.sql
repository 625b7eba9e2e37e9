-- ions.sql - dissolved species: charged ions with their mobilities and
-- Kielland sizes, and the neutral solutes that compounds yield.
--
-- Columns (units in data/schema.sql):
--   symbol, name, charge,
--   lambda_S_cm2_eq     limiting equivalent conductivity at 25 C, S cm2/eq,
--                       for 1/|z| X (so 1/2 Ca2+ = 59.47), or NULL
--   diffusion_1e9_m2_s  only where measured directly as a tracer diffusion
--                       coefficient; the handbook's D values are derived
--                       from lambda, so they are not repeated here (NULL)
--   mobility_source     sources.id of lambda (or D)
--   kielland_a_pm       Kielland ion size in pm (Angstrom * 100), or NULL
--   size_source         sources.id of the size
--
--   formula, mass_g_mol the species' own formula (charge left off) and its
--                       molar mass (iupac-fw), for the rows whose mobility
--                       is estimated from the size, and the organic ions
--                       the estimation method is calibrated on
--   mobility_class      'measured', 'from-memory' or 'estimated'
--   mobility_rel_unc    relative uncertainty of the mobility (the half-width
--                       of the interval the LJP range propagates)
--
-- To add an ion: one row in the right group, the symbol written as in the
-- convention of schema.sql, lambda with its source id and class, and the
-- Kielland size only where Kielland (1937) tabulates that ion.  A mobility
-- published as relative to K+ is converted with lambda(K+) = 73.48
-- (crc-lambda): lambda = rel * 73.48; write the published relative value
-- and the conversion in a comment beside the row.  Where no published
-- value is known, estimate it with the method of 'est-stokes-mass' (what
-- src/ljp.c does for species without a row; tests/test_ljp.c checks that
-- the stored estimate is what the method gives), class 'estimated'.
-- Classes and relative uncertainties used here: handbook values recalled,
-- 'from-memory' 0.01 (inorganic) or 0.02 (organic); relative mobilities
-- recalled, 'from-memory' 0.05; estimates, 0.25 for |z| = 1 and 0.35 for
-- |z| >= 2 (the method's scatter on the organic ions with a published
-- value is 18 % RMS, 36 % at worst, and it ignores the extra hydration of
-- multivalent ions).
--
-- Every published value here was recalled, not looked up (the sources are
-- flagged from_memory = 1): check them against the originals.

INSERT INTO ions (symbol, name, charge, lambda_S_cm2_eq, diffusion_1e9_m2_s,
                  mobility_source, kielland_a_pm, size_source,
                  formula, mass_g_mol, mobility_class, mobility_rel_unc) VALUES
-- Inorganic cations: lambda from crc-lambda, a from kielland-1937.
-- symbol     name                   z   lambda   D     mobility      a_pm  size
('H+',        'hydrogen ion',         1, 349.65, NULL, 'crc-lambda',    900, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Li+',       'lithium',              1,  38.66, NULL, 'crc-lambda',    600, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
-- Kielland gives Na+ (and HCO3-, H2PO4-) as 4-4.5 Angstrom; 450 pm is used
('Na+',       'sodium',               1,  50.08, NULL, 'crc-lambda',    450, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('K+',        'potassium',            1,  73.48, NULL, 'crc-lambda',    300, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Rb+',       'rubidium',             1,  77.8,  NULL, 'crc-lambda',    250, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Cs+',       'caesium',              1,  77.2,  NULL, 'crc-lambda',    250, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('NH4+',      'ammonium',             1,  73.5,  NULL, 'crc-lambda',    250, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Mg2+',      'magnesium',            2,  53.0,  NULL, 'crc-lambda',    800, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Ca2+',      'calcium',              2,  59.47, NULL, 'crc-lambda',    600, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Sr2+',      'strontium',            2,  59.4,  NULL, 'crc-lambda',    500, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Ba2+',      'barium',               2,  63.6,  NULL, 'crc-lambda',    500, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Cd2+',      'cadmium',              2,  54.0,  NULL, 'crc-lambda',    500, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Zn2+',      'zinc',                 2,  52.8,  NULL, 'crc-lambda',    600, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Mn2+',      'manganese(II)',        2,  53.5,  NULL, 'crc-lambda',    600, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Co2+',      'cobalt(II)',           2,  55.0,  NULL, 'crc-lambda',    600, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Ni2+',      'nickel(II)',           2,  49.6,  NULL, 'crc-lambda',    600, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('La3+',      'lanthanum',            3,  69.7,  NULL, 'crc-lambda',    900, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),

-- Inorganic anions: lambda from crc-lambda, a from kielland-1937.
-- symbol     name                   z   lambda   D     mobility      a_pm  size
('OH-',       'hydroxide',           -1, 198.0,  NULL, 'crc-lambda',    350, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('F-',        'fluoride',            -1,  55.4,  NULL, 'crc-lambda',    350, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Cl-',       'chloride',            -1,  76.31, NULL, 'crc-lambda',    300, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('Br-',       'bromide',             -1,  78.1,  NULL, 'crc-lambda',    300, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('I-',        'iodide',              -1,  76.8,  NULL, 'crc-lambda',    300, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('NO3-',      'nitrate',             -1,  71.42, NULL, 'crc-lambda',    300, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('HCO3-',     'bicarbonate',         -1,  44.5,  NULL, 'crc-lambda',    450, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('CO3^2-',    'carbonate',           -2,  69.3,  NULL, 'crc-lambda',    450, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('H2PO4-',    'dihydrogen phosphate',-1,  36.0,  NULL, 'crc-lambda',    450, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('HPO4^2-',   'hydrogen phosphate',  -2,  57.0,  NULL, 'crc-lambda',    400, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),
('SO4^2-',    'sulfate',             -2,  80.0,  NULL, 'crc-lambda',    400, 'kielland-1937', NULL, NULL, 'from-memory', 0.01),

-- Organic ions with a handbook lambda.
-- symbol     name                   z   lambda   D     mobility      a_pm  size
('acetate-',  'acetate',             -1,  40.9,  NULL, 'crc-lambda',    450, 'kielland-1937', 'C2H3O2', 59.04, 'from-memory', 0.02),
-- tetraethylammonium, N(C2H5)4+ in the handbook and in Kielland
('TEA+',      'tetraethylammonium',   1,  32.6,  NULL, 'crc-lambda',    600, 'kielland-1937', 'C8H20N', 130.25, 'from-memory', 0.02),

-- Large organic ions, published as mobility relative to K+;
-- lambda = rel * 73.48 (lambda(K+), crc-lambda), rounded to 0.01.
-- Not in Kielland's table: a_pm NULL.
-- symbol              name                        z   lambda  D     mobility          a_pm  size
('NMDG+',              'N-methyl-D-glucammonium',   1,  24.25, NULL, 'ng-barry-1995',    NULL, NULL, 'C7H18NO5', 196.22, 'from-memory', 0.05), -- rel 0.33 * 73.48
('choline+',           'choline',                   1,  37.47, NULL, 'barry-lynch-1991', NULL, NULL, 'C5H14NO', 104.17, 'from-memory', 0.05), -- rel 0.51 * 73.48
('Tris+',              'tris(hydroxymethyl)aminomethane, protonated (TrisH+)',
                                                    1,  29.39, NULL, 'barry-lynch-1991', NULL, NULL, 'C4H12NO3', 122.14, 'from-memory', 0.05), -- rel 0.40 * 73.48
('gluconate-',         'gluconate',                -1,  24.25, NULL, 'ng-barry-1995',    NULL, NULL, 'C6H11O7', 195.15, 'from-memory', 0.05), -- rel 0.33 * 73.48
('methanesulfonate-',  'methanesulfonate (CH3SO3-)',-1, 49.09, NULL, 'ng-barry-1995',    NULL, NULL, 'CH3O3S', 95.10, 'from-memory', 0.05), -- rel 0.668 * 73.48
('aspartate-',         'L-aspartate (monoanion)',  -1,  22.04, NULL, 'ng-barry-1995',    NULL, NULL, 'C4H6NO4', 132.09, 'from-memory', 0.05), -- rel 0.30 * 73.48
('HEPES-',             'HEPES anion',              -1,  22.04, NULL, 'ng-barry-1995',    NULL, NULL, 'C8H17N2O4S', 237.30, 'from-memory', 0.05), -- rel 0.30 * 73.48

-- Organic ions without a published mobility known to us: lambda estimated
-- from the molar mass by the method of est-stokes-mass (rounded to 0.1).
-- symbol              name                                           z  lambda  D  mobility  a_pm size formula mass class unc
('glutamate-',         'L-glutamate (monoanion)',                    -1, 29.1, NULL, 'est-stokes-mass', NULL, NULL, 'C5H8NO4', 146.12, 'estimated', 0.25),
('pyruvate-',          'pyruvate',                                   -1, 34.6, NULL, 'est-stokes-mass', NULL, NULL, 'C3H3O3', 87.05, 'estimated', 0.25),
('QX-314+',            'QX-314, N-(2,6-dimethylphenylcarbamoylmethyl)triethylammonium',
                                                                      1, 23.9, NULL, 'est-stokes-mass', NULL, NULL, 'C16H27N2O', 263.40, 'estimated', 0.25),
('4-AP+',              '4-aminopyridinium (protonated 4-aminopyridine)',1, 33.5, NULL, 'est-stokes-mass', NULL, NULL, 'C5H7N2', 95.12, 'estimated', 0.25),
('H2ATP^2-',           'ATP, doubly protonated (H2ATP 2-)',          -2, 38.5, NULL, 'est-stokes-mass', NULL, NULL, 'C10H14N5O13P3', 505.17, 'estimated', 0.35),
('H2GTP^2-',           'GTP, doubly protonated (H2GTP 2-)',          -2, 38.1, NULL, 'est-stokes-mass', NULL, NULL, 'C10H14N5O14P3', 521.16, 'estimated', 0.35),
('isethionate-',      'isethionate (2-hydroxyethanesulfonate)',     -1, 30.6, NULL, 'est-stokes-mass', NULL, NULL, 'C2H5O4S', 125.12, 'estimated', 0.25),
('PCr^2-',             'phosphocreatine dianion',                    -2, 51.6, NULL, 'est-stokes-mass', NULL, NULL, 'C4H8N3O5P', 209.10, 'estimated', 0.35),

-- Neutral solutes (charge 0; no mobility needed, no sign in the symbol).
-- symbol       name
('glucose',     'D-glucose',                                      0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('sucrose',     'sucrose',                                        0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('mannitol',    'D-mannitol',                                     0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('HEPES',       'HEPES, zwitterion (free acid)',                  0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('H4EGTA',      'EGTA, free acid',                                0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('H4BAPTA',     'BAPTA, free acid',                               0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('H4EDTA',      'EDTA, free acid',                                0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('NMDG',        'N-methyl-D-glucamine, free base',                0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('Tris',        'tris(hydroxymethyl)aminomethane, free base',     0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL),
('4-AP',        '4-aminopyridine, free base',                     0, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL);
