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
    1, 0);

-- ---------------------------------------------------------------------
-- issue 10: chemistry at the recording temperature, osmolality of organic
-- internals, the physiological CO2 constants.  Rows used by
-- data/equilibria.sql.  An 'estimated' row says which analogue or method
-- gave the number; it is flagged from_memory when the analogue's value was
-- recalled rather than looked up.
INSERT INTO sources (id, citation, common_practice, from_memory) VALUES
('eq-harrison-bers-1987',
    'Harrison S.M., Bers D.M. (1987) The effect of temperature and ionic '
    || 'strength on the apparent Ca-affinity of EGTA and the analogous '
    || 'Ca-chelators BAPTA and dibromo-BAPTA. Biochim Biophys Acta 925:133-143 '
    || '(enthalpies of the EGTA protonation and Ca2+, Mg2+ binding steps used '
    || 'for the temperature correction; binding of Ca2+ by EGTA strengthens '
    || 'with temperature between 1 and 36 C)',
    0, 1),
('eq-ms-enthalpy',
    'Martell A.E., Smith R.M. Critical Stability Constants (Plenum, 1974-1989) '
    || 'and NIST Standard Reference Database 46: the enthalpies of protonation '
    || 'and metal binding tabulated beside the constants (25 C, 0.1 M)',
    0, 1),
('eq-est-analogue',
    'Estimated: the enthalpy (or constant) of the closest analogous reaction '
    || 'stored in data/equilibria.sql, named in the row (column dh_analogue or '
    || 'the note); uncertain by about its own size',
    0, 0),
('eq-est-anilinium',
    'Estimated: ionization enthalpy of an anilinium nitrogen, about +31 kJ/mol '
    || '(anilinium ion, as tabulated by Goldberg et al. 2002 for aromatic amines), '
    || 'taken for the two modelled BAPTA steps',
    0, 1),
('eq-est-nucleobase',
    'Estimated: ionization enthalpy of a protonated ring nitrogen of a purine '
    || 'base, about +16 kJ/mol (adenine N1; as tabulated by Goldberg et al. 2002 '
    || 'for nucleobases), taken for the ATP adenine step',
    0, 1),
('eq-sigel-ntp',
    'Sigel H. (1987) Isomeric equilibria in complexes of adenosine '
    || '5''-triphosphate with divalent metal ions. Eur J Biochem 165:65-72, and '
    || 'later work of the same group: the alkaline-earth complexes of the '
    || 'nucleoside 5''-triphosphates (ATP, GTP, ITP, CTP, UTP) have the same '
    || 'stability within about 0.1 log unit, the base taking little part; GTP '
    || 'constants here are the ATP ones of eq-martell-smith on that ground',
    0, 1),
('eq-pcr-metal',
    'Mg2+ and Ca2+ complexes of phosphocreatine as recalled from the critical '
    || 'compilations (Martell & Smith; NIST SRD 46): log K about 1.6 (Mg2+) '
    || 'and 1.3 (Ca2+) near 25 C, I about 0.1 M; the original measurement was '
    || 'not identified, so both are low-confidence recollections',
    0, 1),
('eq-citrate-enthalpy',
    'Martell A.E., Smith R.M. Critical Stability Constants vol 3 and NIST '
    || 'SRD 46: Ca2+ and Mg2+ citrate complexes form with small positive '
    || 'enthalpies (entropy-driven), a few kJ/mol',
    0, 1),
('eq-severinghaus-1966',
    'Severinghaus J.W. (1966) Blood gas calculator. J Appl Physiol '
    || '21:1108-1116, after Severinghaus J.W., Stupfel M., Bradley A.F. (1956) '
    || 'Variations of serum carbonic acid pK'' with pH and temperature. J Appl '
    || 'Physiol 9:197-200: pK'' = 6.086 + 0.042 (7.4 - pH) + (38 - t)(0.00472 '
    || '+ 0.00139 (7.4 - pH)) for plasma',
    0, 1),
('eq-co2-solubility-plasma',
    'Solubility of CO2 in plasma S = 0.0307 + 0.00057 (37 - t) + 0.00002 '
    || '(37 - t)^2 mmol/L per mmHg (Kelman G.R. (1967) Digital computer '
    || 'procedure for the conversion of PCO2 into blood CO2 content. Respir '
    || 'Physiol 3:111-115, after Severinghaus); 0.0307 at 37 C, the value of '
    || 'physiological Henderson-Hasselbalch',
    0, 1),
('eq-plasma-ionic-strength',
    'Common practice: the ionic strength of plasma and of physiological '
    || 'bicarbonate salines is about 0.16 mol/L',
    1, 0),
('eq-robinson-stokes-1959',
    'Robinson R.A., Stokes R.H. (1959) Electrolyte Solutions, 2nd ed., '
    || 'Butterworths, London, Appendix 8.6 (osmotic coefficients of sucrose and '
    || 'glucose in water at 25 C: sucrose 1.039 at 0.5 mol/kg and 1.088 at '
    || '1.0 mol/kg; glucose 1.015 at 1.0 mol/kg)',
    0, 1),
('eq-pitzer-mayorga-acetate',
    'Pitzer K.S., Mayorga G. (1973) J Phys Chem 77:2300-2308: the acetates '
    || '(NaOAc beta0 0.1426, beta1 0.3237, C_phi -0.00629; KOAc beta0 0.1587, '
    || 'beta1 0.3251, C_phi -0.00660), used as the analogue of the hydroxy- and '
    || 'amino-carboxylate anions (gluconate, aspartate, glutamate)',
    0, 1),
('eq-est-osm-analogue',
    'Estimated: Pitzer parameters of an organic salt taken from the named '
    || 'analogue salt (a carboxylate from the acetates, a sulfonate or a large '
    || 'organic cation from the chloride of the nearest alkali ion); the salt''s '
    || 'own term (beta and C) is uncertain by +-50 %, which the osmolality '
    || 'range carries',
    0, 0),
('eq-est-mannitol',
    'Estimated: mannitol taken as non-ideal as glucose (a hexitol against a '
    || 'hexose), uncertain by +-50 % of the term',
    0, 0);

INSERT INTO sources (id, citation, common_practice, from_memory) VALUES
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
