-- sources.sql - where every number in data/*.sql comes from.
--
-- Loaded right after schema.sql, so that the rows of ions.sql, compounds.sql
-- and the other data files can point here (foreign keys are enforced).
--
-- To add a source: one row, a short lower-case id ('author-year' or
-- 'handbook-table'), the full citation (authors, year, title, journal,
-- volume:pages; or book, edition, table), and the two flags:
--   common_practice = 1  a fact of the trade with no single published source;
--   from_memory     = 1  a published value recalled, not looked up: check it
--                        against the original before relying on it.
-- Then name the id beside each number that uses it.

INSERT INTO sources (id, citation, common_practice, from_memory) VALUES
('crc-lambda',
    'Vanysek P., "Ionic conductivity and diffusion at infinite dilution", in: '
    || 'CRC Handbook of Chemistry and Physics (Lide D.R. / Haynes W.M., eds.), '
    || 'CRC Press, Boca Raton, section 5: limiting equivalent conductivities '
    || 'lambda (1/|z| X) at 25 C, S cm2 per equivalent (edition not checked)',
    0, 1),
('kielland-1937',
    'Kielland J. (1937) Individual activity coefficients of ions in aqueous '
    || 'solutions. J Am Chem Soc 59:1675-1678 (table of effective ion-size '
    || 'parameters a, in Angstrom; stored here as pm = Angstrom * 100)',
    0, 1),
('ng-barry-1995',
    'Ng B., Barry P.H. (1995) The measurement of ionic conductivities and '
    || 'mobilities of certain less common organic ions needed for junction '
    || 'potential corrections in electrophysiology. J Neurosci Methods 56:37-41 '
    || '(mobilities relative to K+; lambda = relative mobility * lambda(K+) '
    || '73.48 from crc-lambda)',
    0, 1),
('barry-lynch-1991',
    'Barry P.H., Lynch J.W. (1991) Liquid junction potentials and small cell '
    || 'effects in patch-clamp analysis. J Membr Biol 121:101-117 (table of '
    || 'mobilities relative to K+; lambda = relative mobility * lambda(K+) '
    || '73.48 from crc-lambda)',
    0, 1),
('iupac-fw',
    'Formula weights computed from the machine-readable formula with the '
    || 'standard atomic weights of the IUPAC Commission on Isotopic Abundances '
    || 'and Atomic Weights (CIAAW) as shipped in Debian''s python3-periodictable '
    || '1.6.0 (Coplen T.B. (2001) Atomic weights of the elements 1999, Pure Appl '
    || 'Chem 73:667-683, as compiled by NIST); rounded to 0.01 g/mol and checked '
    || 'by tests/ref/check_formula_weights.py',
    0, 0),
('common-practice',
    'Common practice: facts of the trade in preparing electrophysiology '
    || 'solutions (the salt forms and hydrates usually bought, what each '
    || 'compound is used for, how a formula unit dissociates)',
    1, 0),
('sds-hazard',
    'Common practice: hazard statements as given in the usual suppliers'' '
    || 'safety data sheets (GHS classification), condensed to one line; the '
    || 'safety data sheet of the product actually used and local chemical-safety '
    || 'rules take precedence',
    1, 0),

-- ---- issue 9 (junction potentials): estimated mobilities ----
('est-stokes-mass',
    'Estimated (ionmix, issue 9): Stokes-Einstein relation D = kT / (6 pi eta r) '
    || '(Einstein A. (1905) Ann Phys 17:549-560), water at 25 C (eta = 0.8900 '
    || 'mPa s), with r the radius of a sphere of the molar volume M / rho_eff, '
    || 'rho_eff = 1.82 g/cm3 fitted by least squares in log D to the nine organic '
    || 'ions of data/ions.sql with a tabulated mobility (acetate, TEA, NMDG, '
    || 'choline, Tris, gluconate, methanesulfonate, aspartate, HEPES): RMS error '
    || '18 %, largest 36 % (aspartate); lambda = |z| F^2 D / (R T).  Charge is '
    || 'ignored (no hydration term), so multivalent estimates are less certain. '
    || 'Used for ions without a published mobility and for every complex or '
    || 'protonation state from its molar mass (sum of its parts).',
    0, 0);
