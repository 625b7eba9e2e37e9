"""formulacases.py - the formulas as a user types them (hydrate dots,
parentheses, brackets), each beside the same formula in Debian's
python3-periodictable notation; shared by check_formula_user.py and
check_define.py."""

# (as a user types it, the same in periodictable's notation)
CASES = [
    ("MgCl2.6H2O", "MgCl2(H2O)6"),
    ("CaCl2\u00b72H2O", "CaCl2(H2O)2"),
    ("CaSO4.0.5H2O", "CaSO4(H2O)0.5"),
    ("Na2HPO4.7H2O", "Na2HPO4(H2O)7"),
    ("NaH2PO4.H2O", "NaH2PO4H2O"),
    ("Ca(NO3)2.4H2O", "Ca(NO3)2(H2O)4"),
    ("Mg(CH3COO)2.4H2O", "Mg(CH3COO)2(H2O)4"),
    ("C6H11KO7", "C6H11KO7"),
    ("CH3SO3Cs", "CH3SO3Cs"),
    ("C8H17N2O4SNa", "C8H17N2O4SNa"),
    ("(CH3CH2)4NCl", "(CH3CH2)4NCl"),
    ("[Co(NH3)6]Cl3", "Co(NH3)6Cl3"),
    ("K2[Fe(CN)6].3H2O", "K2Fe(CN)6(H2O)3"),
    ("C14H30N2O.HCl", "C14H30N2OHCl"),
    ("CuSO4*5H2O", "CuSO4(H2O)5"),
    ("C12H22O11", "C12H22O11"),
    ("BaCl2.2H2O", "BaCl2(H2O)2"),
    ("SrCl2.6H2O", "SrCl2(H2O)6"),
    ("C10H14N5O13P3Na2.3H2O", "C10H14N5O13P3Na2(H2O)3"),
    ("CdCl2.2.5H2O", "CdCl2(H2O)2.5"),
    ("(NH4)2SO4", "(NH4)2SO4"),
]
