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
-- To add an ion: one row in the right group, the symbol written as in the
-- convention of schema.sql, lambda with its source id, and the Kielland size
-- only where Kielland (1937) tabulates that ion.  A mobility published as
-- relative to K+ is converted with lambda(K+) = 73.48 (crc-lambda):
-- lambda = rel * 73.48; write the published relative value and the
-- conversion in a comment beside the row.  Never fill a gap with a guess:
-- leave lambda NULL and list the ion in tests/ref/check_formula_weights.py
-- (NO_PUBLISHED_MOBILITY), which fails on any other ion without a mobility.
--
-- Every value here was recalled, not looked up (the sources are flagged
-- from_memory = 1): check them against the originals.

INSERT INTO ions (symbol, name, charge, lambda_S_cm2_eq, diffusion_1e9_m2_s,
                  mobility_source, kielland_a_pm, size_source) VALUES
-- Inorganic cations: lambda from crc-lambda, a from kielland-1937.
-- symbol     name                   z   lambda   D     mobility      a_pm  size
('H+',        'hydrogen ion',         1, 349.65, NULL, 'crc-lambda',    900, 'kielland-1937'),
('Li+',       'lithium',              1,  38.66, NULL, 'crc-lambda',    600, 'kielland-1937'),
-- Kielland gives Na+ (and HCO3-, H2PO4-) as 4-4.5 Angstrom; 450 pm is used
('Na+',       'sodium',               1,  50.08, NULL, 'crc-lambda',    450, 'kielland-1937'),
('K+',        'potassium',            1,  73.48, NULL, 'crc-lambda',    300, 'kielland-1937'),
('Rb+',       'rubidium',             1,  77.8,  NULL, 'crc-lambda',    250, 'kielland-1937'),
('Cs+',       'caesium',              1,  77.2,  NULL, 'crc-lambda',    250, 'kielland-1937'),
('NH4+',      'ammonium',             1,  73.5,  NULL, 'crc-lambda',    250, 'kielland-1937'),
('Mg2+',      'magnesium',            2,  53.0,  NULL, 'crc-lambda',    800, 'kielland-1937'),
('Ca2+',      'calcium',              2,  59.47, NULL, 'crc-lambda',    600, 'kielland-1937'),
('Sr2+',      'strontium',            2,  59.4,  NULL, 'crc-lambda',    500, 'kielland-1937'),
('Ba2+',      'barium',               2,  63.6,  NULL, 'crc-lambda',    500, 'kielland-1937'),
('Cd2+',      'cadmium',              2,  54.0,  NULL, 'crc-lambda',    500, 'kielland-1937'),
('Zn2+',      'zinc',                 2,  52.8,  NULL, 'crc-lambda',    600, 'kielland-1937'),
('Mn2+',      'manganese(II)',        2,  53.5,  NULL, 'crc-lambda',    600, 'kielland-1937'),
('Co2+',      'cobalt(II)',           2,  55.0,  NULL, 'crc-lambda',    600, 'kielland-1937'),
('Ni2+',      'nickel(II)',           2,  49.6,  NULL, 'crc-lambda',    600, 'kielland-1937'),
('La3+',      'lanthanum',            3,  69.7,  NULL, 'crc-lambda',    900, 'kielland-1937'),

-- Inorganic anions: lambda from crc-lambda, a from kielland-1937.
-- symbol     name                   z   lambda   D     mobility      a_pm  size
('OH-',       'hydroxide',           -1, 198.0,  NULL, 'crc-lambda',    350, 'kielland-1937'),
('F-',        'fluoride',            -1,  55.4,  NULL, 'crc-lambda',    350, 'kielland-1937'),
('Cl-',       'chloride',            -1,  76.31, NULL, 'crc-lambda',    300, 'kielland-1937'),
('Br-',       'bromide',             -1,  78.1,  NULL, 'crc-lambda',    300, 'kielland-1937'),
('I-',        'iodide',              -1,  76.8,  NULL, 'crc-lambda',    300, 'kielland-1937'),
('NO3-',      'nitrate',             -1,  71.42, NULL, 'crc-lambda',    300, 'kielland-1937'),
('HCO3-',     'bicarbonate',         -1,  44.5,  NULL, 'crc-lambda',    450, 'kielland-1937'),
('CO3^2-',    'carbonate',           -2,  69.3,  NULL, 'crc-lambda',    450, 'kielland-1937'),
('H2PO4-',    'dihydrogen phosphate',-1,  36.0,  NULL, 'crc-lambda',    450, 'kielland-1937'),
('HPO4^2-',   'hydrogen phosphate',  -2,  57.0,  NULL, 'crc-lambda',    400, 'kielland-1937'),
('SO4^2-',    'sulfate',             -2,  80.0,  NULL, 'crc-lambda',    400, 'kielland-1937'),

-- Organic ions with a handbook lambda.
-- symbol     name                   z   lambda   D     mobility      a_pm  size
('acetate-',  'acetate',             -1,  40.9,  NULL, 'crc-lambda',    450, 'kielland-1937'),
-- tetraethylammonium, N(C2H5)4+ in the handbook and in Kielland
('TEA+',      'tetraethylammonium',   1,  32.6,  NULL, 'crc-lambda',    600, 'kielland-1937'),

-- Large organic ions, published as mobility relative to K+;
-- lambda = rel * 73.48 (lambda(K+), crc-lambda), rounded to 0.01.
-- Not in Kielland's table: a_pm NULL.
-- symbol              name                        z   lambda  D     mobility          a_pm  size
('NMDG+',              'N-methyl-D-glucammonium',   1,  24.25, NULL, 'ng-barry-1995',    NULL, NULL), -- rel 0.33 * 73.48
('choline+',           'choline',                   1,  37.47, NULL, 'barry-lynch-1991', NULL, NULL), -- rel 0.51 * 73.48
('Tris+',              'tris(hydroxymethyl)aminomethane, protonated (TrisH+)',
                                                    1,  29.39, NULL, 'barry-lynch-1991', NULL, NULL), -- rel 0.40 * 73.48
('gluconate-',         'gluconate',                -1,  24.25, NULL, 'ng-barry-1995',    NULL, NULL), -- rel 0.33 * 73.48
('methanesulfonate-',  'methanesulfonate (CH3SO3-)',-1, 49.09, NULL, 'ng-barry-1995',    NULL, NULL), -- rel 0.668 * 73.48
('aspartate-',         'L-aspartate (monoanion)',  -1,  22.04, NULL, 'ng-barry-1995',    NULL, NULL), -- rel 0.30 * 73.48
('HEPES-',             'HEPES anion',              -1,  22.04, NULL, 'ng-barry-1995',    NULL, NULL), -- rel 0.30 * 73.48

-- Organic ions without a published mobility known to us: lambda NULL (no
-- estimate), listed in NO_PUBLISHED_MOBILITY of the reference check.
-- symbol              name                                           z
('glutamate-',         'L-glutamate (monoanion)',                    -1, NULL, NULL, NULL, NULL, NULL),
('pyruvate-',          'pyruvate',                                   -1, NULL, NULL, NULL, NULL, NULL),
('QX-314+',            'QX-314, N-(2,6-dimethylphenylcarbamoylmethyl)triethylammonium',
                                                                      1, NULL, NULL, NULL, NULL, NULL),
('4-AP+',              '4-aminopyridinium (protonated 4-aminopyridine)',1, NULL, NULL, NULL, NULL, NULL),
('H2ATP^2-',           'ATP, doubly protonated (H2ATP 2-)',          -2, NULL, NULL, NULL, NULL, NULL),
('H2GTP^2-',           'GTP, doubly protonated (H2GTP 2-)',          -2, NULL, NULL, NULL, NULL, NULL),
('PCr^2-',             'phosphocreatine dianion',                    -2, NULL, NULL, NULL, NULL, NULL),

-- Neutral solutes (charge 0; no mobility needed, no sign in the symbol).
-- symbol       name
('glucose',     'D-glucose',                                      0, NULL, NULL, NULL, NULL, NULL),
('sucrose',     'sucrose',                                        0, NULL, NULL, NULL, NULL, NULL),
('mannitol',    'D-mannitol',                                     0, NULL, NULL, NULL, NULL, NULL),
('HEPES',       'HEPES, zwitterion (free acid)',                  0, NULL, NULL, NULL, NULL, NULL),
('H4EGTA',      'EGTA, free acid',                                0, NULL, NULL, NULL, NULL, NULL),
('H4BAPTA',     'BAPTA, free acid',                               0, NULL, NULL, NULL, NULL, NULL),
('H4EDTA',      'EDTA, free acid',                                0, NULL, NULL, NULL, NULL, NULL),
('NMDG',        'N-methyl-D-glucamine, free base',                0, NULL, NULL, NULL, NULL, NULL),
('Tris',        'tris(hydroxymethyl)aminomethane, free base',     0, NULL, NULL, NULL, NULL, NULL),
('4-AP',        '4-aminopyridine, free base',                     0, NULL, NULL, NULL, NULL, NULL);
