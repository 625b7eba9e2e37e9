/*
 * formula.h - chemical formulas as a user types them for a compound of
 * their own: formula weight (g/mol) and net charge, from an embedded table
 * of standard atomic weights (source in formula.c).
 *
 * Grammar (whitespace is not allowed inside a formula):
 *   formula  := part { sep part } [ charge ]
 *   sep      := '.' | '*' | U+00B7 (middle dot)       -- hydrate dot
 *   part     := [ number ] group { group }            -- '6H2O', '0.5H2O'
 *   group    := element [ digits ]
 *             | '(' group { group } ')' [ digits ]
 *             | '[' group { group } ']' [ digits ]
 *   element  := uppercase letter [ lowercase letter ]  -- 'C', 'Cl', 'Mg'
 *   number   := digits [ '.' digits ]                 -- only leading counts
 *   charge   := '^' [ digits ] ( '+' | '-' )          -- 'SO4^2-'
 *             | ( '+' | '-' )+                         -- 'C6H11O7-', 'Ca++'
 * Examples: 'MgCl2.6H2O', 'MgCl2(H2O)6', 'CaCl2·2H2O', 'C6H11KO7',
 * 'Ca(NO3)2.4H2O', 'CaSO4.0.5H2O', '[Co(NH3)6]Cl3', 'HPO4^2-'.
 */
#ifndef IONMIX_FORMULA_H
#define IONMIX_FORMULA_H

typedef struct formula_info {
	double fw_g_mol;  /* formula weight, g/mol, water of hydration included */
	int charge;       /* net charge of one formula unit (0 for a salt) */
	int elements;     /* distinct elements in it */
} formula_info;

/* Parse text.  0 and *out filled, or -1 with a one-line message naming
 * the formula and what is wrong (an unknown element, an unclosed
 * parenthesis, a stray character, a count of zero, empty input). */
int formula_parse(const char *text, formula_info *out, char *err);

/* Standard atomic weight of an element symbol ('Cl'), g/mol; NAN when
 * the symbol is not an element of the table (1-92). */
double formula_atomic_weight(const char *sym);

/* The source of the atomic-weight table, for `info` and source lists. */
const char *formula_weights_source(void);

#endif
