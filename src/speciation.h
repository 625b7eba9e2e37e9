/*
 * speciation.h - acid-base and metal-ligand equilibria of a solution:
 * pH, titration to a target pH, free Ca2+/Mg2+ (and Ba2+, Sr2+, Zn2+)
 * with chelators and nucleotides, the free-metal inverse, and the
 * bicarbonate/CO2 system.  Pure: no printing, no input.
 *
 * How a solution enters.  The caller passes the species a solution yields
 * (compound_yields in data/compounds.sql, summed over compounds) as
 * (symbol, charge, total mM) triples.  Each symbol is looked up in the
 * tables of data/equilibria.sql:
 *   - a protonation state of a ligand or buffer ('H4EGTA', 'H2ATP^2-',
 *     'HEPES', 'HEPES-', 'Tris', 'Tris+', 'H2PO4-', 'HCO3-', 'NMDG') adds
 *     its total to the ligand and its protons to the proton balance (H4EGTA
 *     adds 4 H per EGTA, H2ATP^2- adds 2); protons beyond the modelled
 *     steps of a ligand (H4BAPTA: 2 of 4) act as a strong acid;
 *   - a metal ('Ca2+', 'Mg2+', 'Ba2+', 'Sr2+', 'Zn2+') adds to its total;
 *   - a complex symbol ('MgATP^2-') adds to both;
 *   - 'H+' and 'OH-' add +1 and -1 to the proton balance;
 *   - anything else is a strong ion or neutral solute ('Na+', 'Cl-',
 *     'gluconate-', 'sucrose'): it only counts for ionic strength, charge
 *     and osmolality, and is passed through to the result unchanged.
 * The result lists the free species: free metals, every protonation state,
 * the complexes (as extra species, e.g. 'CaEGTA^2-'), H+, OH-, CO2 and the
 * strong ions, each with its charge and concentration, ready for the
 * activity, Nernst, junction and osmolality calculators.
 *
 * Model:
 *  - Concentration constants (mol/L) of data/equilibria.sql are taken to
 *    I = 0 with the Davies equation at their reference temperature,
 *    to the working temperature (van 't Hoff with the reaction enthalpy
 *    and, where entered, heat capacity; an estimated enthalpy taken from a
 *    named analogue reaction; linear d(pKa)/dT; or the stored fit - every
 *    metal-binding ligand has one of these, the loader refuses the tables
 *    otherwise; a buffer without any is used unchanged, with a warning),
 *    then to the working ionic strength with Davies (A from activity.h).
 *    The ionic strength is that of the speciated solution, iterated to
 *    self-consistency.
 *  - CO2/HCO3-: the physiological apparent pK' (Severinghaus 1966) by
 *    temperature and pH, moved from the plasma ionic strength with the
 *    Davies coefficient of HCO3- (spec_co2_pk_app), and the CO2 solubility
 *    of plasma (spec_co2_mM_per_atm); the pH it depends on is iterated
 *    with the ionic strength.
 *  - A metal-binding ligand without a constant for a metal present is
 *    taken as not binding it, with a warning (never a refusal).
 *  - pH is what an electrode reads: -log10 a(H+), a(H+) = gamma_H [H+]
 *    with the Davies gamma.
 *  - Equilibria: free concentrations are the unknowns, solved as ln c by
 *    damped Newton's method (the problem is the minimum of a convex
 *    function, so a backtracking line search on that function converges
 *    from any start), with a fallback of one-component-at-a-time bracketed
 *    solves that always converges, then Newton again to polish.  Mass and
 *    proton balances close to SPEC_TOL relative.
 *  - Not modelled: metal hydrolysis (MOH+), metal complexes of phosphate,
 *    carbonate and the Good buffers, ion pairs of the strong ions.
 *
 * Layout: the tables are read and picked in eqdata.c, the solver is
 * speciation.c, titration and the free-metal inverse are titrate.c; the
 * osmolality of a result is osmotic.c's (sol_compute calls it).
 *
 * Ownership: spec_data is owned by the caller of spec_load (free with
 * spec_data_free); results are plain structs with fixed arrays (nothing to
 * free); input symbols are borrowed for the duration of a call only.
 * Errors: functions return 0, or -1 with one line in err (IM_ERRLEN).
 * Units: mM (mmol/L), C, atm, kJ/mol, as in the names.
 */
#ifndef IONMIX_SPECIATION_H
#define IONMIX_SPECIATION_H

#include <sqlite3.h>

#include "osmotic.h"

#define SPEC_SYMLEN      32  /* species symbols, with the terminating 0 */
#define SPEC_MAX_IN      128 /* input species per call */
#define SPEC_MAX_OUT     192 /* species in a result */
#define SPEC_MAX_METALS  8
#define SPEC_MAX_LIGANDS 24 /* different ligands in one solution */
#define SPEC_MAX_WARN    8
#define SPEC_WARNLEN     160
#define SPEC_TOL         1e-12 /* relative closure of mass and proton balances */

typedef struct spec_data spec_data;

/* Read the tables eq_* of data/equilibria.sql from db (refdb_sqlite()).
 * Checks them (charges, defaults, contiguous steps).  On success the
 * caller owns *out; on failure -1, *out == NULL, err says why. */
int spec_load(sqlite3 *db, spec_data **out, char *err);
void spec_data_free(spec_data *d);

/* Use the constants of compilation `name` ('good-1966', 'martell-smith',
 * 'goldberg-2002', ...) for every acid-base group and metal-ligand pair it
 * covers, on top of earlier picks (the latest pick wins); the others keep
 * their defaults.  "default" drops every pick.  -1 when unknown. */
int spec_use_compilation(spec_data *d, const char *name, char *err);

/* The one compilation pick for the speciation and the Pitzer data at
 * once (either may be NULL): both use `name` where they have it, or
 * neither changes.  "default" drops every pick.  -1 with err when no
 * table has the name or the pick is inconsistent. */
int spec_pick_compilation(spec_data *d, osm_data *o, const char *name, char *err);

/* The distinct compilation names of both data sets, sorted, into names
 * (up to max, 32 bytes each); returns how many. */
int spec_compilations(const spec_data *d, const osm_data *o, char (*names)[32], int max);

/* One stored constant, for listing (`constants NAME`). */
typedef struct spec_const {
	char what[SPEC_SYMLEN]; /* species formed: 'HEPES', 'CaEGTA^2-' */
	char reaction[112];     /* e.g. 'HEPES = HEPES- + H+' */
	int is_pka;             /* 1: value is a pKa; 0: a log K of formation */
	double value;           /* pKa or log K at t_ref_C, i_ref_M */
	double t_ref_C, i_ref_M;
	double dh_kJ_mol;     /* reaction enthalpy; NAN when none entered */
	char dh_analogue[SPEC_SYMLEN]; /* non-empty: dh_kJ_mol is an estimate
					* taken from this analogous reaction */
	char dh_source[40];            /* key into sources of the enthalpy; "" */
	double dpka_dt_per_K; /* NAN when none */
	int has_fit;          /* 1: temperature from a stored fit */
	char compilation[32];
	char source[40]; /* key into sources */
	int in_use;      /* 1: the row the solver uses now */
} spec_const;

/* The stored constants of a ligand ('EGTA'), a metal ('Ca2+'), or every
 * row of a compilation ('good-1966'): up to max rows into out; returns the
 * number written, or -1 with err when the name is unknown. */
int spec_constants(const spec_data *d, const char *name, spec_const *out, int max,
		   char *err);

/* ---- inputs and conditions ---- */

typedef struct spec_in {
	const char *symbol; /* species symbol as in ions.symbol; borrowed */
	int z;              /* charge; must agree with the tables when they know it */
	double mM;          /* total, mmol/L, >= 0; in a titrant or a metal
			     * source: count per formula unit */
} spec_in;

typedef enum {
	SPEC_PH_FIXED = 0,  /* pH given (cond.pH); reports the acid/base needed */
	SPEC_PH_CLOSED = 1, /* the protons of the inputs are all there is: find pH */
	SPEC_PH_CO2 = 2     /* open to a gas of CO2 partial pressure pco2_atm */
} spec_ph_mode;

typedef struct spec_cond {
	double t_C; /* temperature, 0-60 C */
	spec_ph_mode mode;
	double pH;           /* SPEC_PH_FIXED, and the target of spec_titrate */
	double pco2_atm;     /* SPEC_PH_CO2: partial pressure of CO2, atm */
	int fallback_only;   /* 1: skip Newton, use the fallback solver alone
			      * (slow; for testing it); 0 normally */
} spec_cond;

/* ---- results ---- */

typedef enum {
	SPEC_K_METAL = 0,     /* free metal ion */
	SPEC_K_LIGAND = 1,    /* a protonation state of a ligand or buffer */
	SPEC_K_COMPLEX = 2,   /* metal-ligand complex */
	SPEC_K_PROTON = 3,    /* H+ */
	SPEC_K_HYDROXIDE = 4, /* OH- */
	SPEC_K_STRONG = 5     /* passed through unchanged */
} spec_kind;

typedef struct spec_out {
	char symbol[SPEC_SYMLEN];
	int z;
	double mM;    /* free concentration, mmol/L */
	double gamma; /* Davies activity coefficient used */
	spec_kind kind;
	int metal, ligand; /* indices into spec_result.metals/.ligands, or -1 */
	int n_m, n_l, n_h; /* metals, ligands, protons in the species */
} spec_out;

typedef struct spec_metal_sum {
	char symbol[SPEC_SYMLEN];
	double total_mM, free_mM, free_act_mM, bound_mM;
} spec_metal_sum;

typedef struct spec_ligand_sum {
	char name[SPEC_SYMLEN];
	double total_mM;   /* in the solution (CO2 mode: carbonate as found) */
	double unbound_mM; /* all protonation states, not bound to a metal */
	double bound_mM;   /* in complexes (per ligand) */
	double h_bound;    /* mean protons bound per ligand */
} spec_ligand_sum;

/* A result: about 20 kB of fixed arrays, nothing to free (put it on the
 * heap rather than the stack in deep call chains). */
typedef struct spec_result {
	spec_out sp[SPEC_MAX_OUT];
	int n;
	spec_metal_sum metals[SPEC_MAX_METALS];
	int nmetals;
	spec_ligand_sum ligands[SPEC_MAX_LIGANDS];
	int nligands;
	double t_C;
	double pH;          /* -log10 a(H+) */
	double H_mM, OH_mM; /* free concentrations */
	double excess_H_mM; /* FIXED mode: strong acid (> 0) or base (< 0, as
			     * OH-) still needed to hold the pH; 0 otherwise */
	double ionic_strength_mM;
	double net_charge_mEq_L; /* sum z c over the result's species */
	double co2_mM; /* CO2 mode: dissolved CO2; else what the solution holds */
	int newton_iterations;
	int used_fallback;       /* 1: the bracketed fallback solver was needed */
	double max_rel_residual; /* worst balance closure reached */
	char warnings[SPEC_MAX_WARN][SPEC_WARNLEN];
	int nwarn;
} spec_result;

/* Speciation of n input species under cond.  r is filled on success. */
int spec_solve(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
	       spec_result *r, char *err);

/* Titration: the amount *amount_mM (formula units of titrant per litre of
 * final solution) of a titrant yielding `tit` (nt species, mM field = count
 * per formula unit: KOH = {K+ 1, OH- 1}, HCl = {H+ 1, Cl- 1}, NMDG =
 * {NMDG 1}, Tris = {Tris 1}) that brings the solution to cond.pH at
 * cond.t_C; r holds the speciation with the titrant in.  cond.mode must be
 * SPEC_PH_FIXED.  Fails when the titrant goes the wrong way (an acid to
 * raise the pH), is no acid or base, is a weak base (or acid) asked past
 * its buffering range (target more than 1 pH unit beyond its pKa'), or
 * needs more than 5 mol/L. */
int spec_titrate(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
		 const spec_in *tit, int nt, double *amount_mM, spec_result *r,
		 char *err);

/* Inverse: the amount *amount_mM of a metal source yielding `src` (e.g.
 * CaCl2 = {Ca2+ 1, Cl- 2}) to add so that the free concentration of
 * `metal` ('Ca2+') is target_free_mM.  r holds the forward speciation with
 * that amount added.  Fails when the target is negative, below what the
 * solution already gives without the source, or above what 1 mol/L of the
 * source gives.  A metal-binding ligand without a constant for that metal
 * is taken as not binding it (r->warnings says so). */
int spec_free_target(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
		     const char *metal, const spec_in *src, int ns, double target_free_mM,
		     double *amount_mM, spec_result *r, char *err);

/* Apparent (conditional) dissociation constant of metal with ligand at pH,
 * t_C and ionic strength I_mM, counting all protonation states of the free
 * ligand and the ML and MHL complexes: Kd' = [M][L']/([ML] + [MHL]), mM. */
int spec_apparent_kd(const spec_data *d, const char *metal, const char *ligand, double pH,
		     double t_C, double I_mM, double *kd_mM, char *err);

/* ---- CO2 ---- */

/* Saturated vapour pressure of water over a flat surface, kPa, by Buck
 * (1981) J Appl Meteorol 20:1527 (from memory); 6.28 kPa at 37 C. */
double spec_water_vapour_kPa(double t_C);

/* Partial pressure of CO2 (atm) of a gas with CO2 fraction frac (0.05 for
 * 5 %) at total pressure p_total_atm, humidified at t_C when humid = 1
 * (bubbled gas: pCO2 = frac (P - p_H2O)) or dry when 0 (pCO2 = frac P). */
double spec_pco2_atm(double frac, double p_total_atm, double t_C, int humid);

/* Solubility of CO2 in physiological saline, mM per atm: the plasma
 * relation of table eq_co2_apparent (Kelman 1967 after Severinghaus;
 * 0.0307 mM/mmHg at 37 C) times 760 mmHg/atm. */
double spec_co2_mM_per_atm(const spec_data *d, double t_C);

/* The apparent pK' = pH - log10([HCO3-]/[CO2]) of the CO2/HCO3- system at
 * t_C, pH (clamped into the range of the data, 6.8-7.8) and ionic strength
 * I_mM: the physiological relation of table eq_co2_apparent (Severinghaus
 * 1966) at its reference ionic strength (0.16 M), moved to I_mM with the
 * Davies coefficient of HCO3-.  6.09 at 37 C, pH 7.4, 160 mM. */
double spec_co2_pk_app(const spec_data *d, double t_C, double pH, double I_mM);

#endif
