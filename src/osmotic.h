/*
 * osmotic.h - osmotic coefficient and osmolality by Pitzer's equations,
 * the conversion between molarity and molality, and how much of a
 * compound (or of water) brings a solution to a target osmolality.
 *
 * Model (all of it stated, so that a result can be judged):
 *  - Pitzer's equation for the osmotic coefficient of a mixture with the
 *    binary (single-salt) terms only: theta, psi and the solute-ion
 *    lambda are 0.  With m in mol/kg, I = 1/2 sum m z^2, Z = sum m |z|,
 *      phi - 1 = (2 / sum_i m_i) [ -A_phi I^1.5 / (1 + b sqrt I)
 *                + sum_c sum_a m_c m_a (B_ca^phi + Z C_ca) ],
 *      B^phi = beta0 + beta1 exp(-alpha1 sqrt I) + beta2 exp(-alpha2 sqrt I),
 *      C_ca = C^phi_ca / (2 sqrt |z_c z_a|),  b = 1.2,
 *    where sum_i runs over every solute (neutral ones included), and the
 *    parameters (25 C) come from table osm_pitzer (data/equilibria.sql).
 *  - A cation-anion pair without parameters (complexes, nucleotides)
 *    gets beta = C = 0: only the Debye-Hueckel term acts for it.  The
 *    result says how much of the ion-pair sum fell back so.
 *  - Neutral solutes: a solute n with a row in osm_neutral adds
 *    lambda_n m_n^2 + mu_n m_n^3 to (phi - 1) sum_i m_i (its own
 *    non-ideality; sucrose, glucose, mannitol); solute-ion terms are 0 and
 *    solutes without a row are ideal.
 *  - Organic salts without a published fit carry the parameters of an
 *    analogue salt (class 'estimated' in osm_pitzer).
 *  - Range: osmolality_lo/hi_mOsm_kg bound the result by a stated, linear
 *    (worst-case) propagation: an estimated salt's own term
 *    2 m_c m_a (B + Z C) and an estimated solute's lambda/mu term count
 *    +-50 %; a cation-anion pair without any row (Debye-Hueckel alone in
 *    the central value) may add up to the term of a typical 1-1 salt,
 *    2 m_c m_a (0.05 + 0.25 exp(-2 sqrt I)) (between the KCl and NaCl
 *    values of Pitzer & Mayorga 1973), so the range extends upward by it.
 *  - Parameters are 25 C values at any temperature; A_phi follows the
 *    temperature: A_phi(t) = 0.3915 * A(t) / A(25 C), with 0.3915 at 25 C
 *    (Bradley D.J. & Pitzer K.S. (1979) J Phys Chem 83:1599, from memory)
 *    and A(t) the Debye-Hueckel constant of activity.h (dielectric
 *    constant of Malmberg & Maryott 1956, density of Kell 1975), which
 *    has the same sqrt(rho) (eps T)^-3/2 dependence.
 *  - Molarity -> molality: with the partial molar volumes V_i at infinite
 *    dilution, 25 C (table osm_molar_volumes; Millero 1971 for ions), one
 *    litre of solution holds rho_w (1 - sum c_i V_i) kg of water, so
 *    m_i = c_i / (rho_w (1 - sum_j c_j V_j)) (rho_w of activity.h at t).
 *    Species without a volume row count as V = 0.  This neglects the
 *    concentration dependence of the apparent molar volumes (about 0.1 %
 *    of the molality at 150 mM NaCl).
 *
 * Units: concentrations in mM (mmol/L of solution) or mmol/kg of water,
 * as each function says; osmolality in mOsm/kg (mmol/kg of osmotically
 * active particles), osmolarity in mOsm/L; temperature in C.
 * Nothing here prints; errors are one line in a caller-owned err buffer
 * of IM_ERRLEN bytes, and functions return 0 or -1.
 */
#ifndef IONMIX_OSMOTIC_H
#define IONMIX_OSMOTIC_H

#include <sqlite3.h>

typedef struct osm_data osm_data;

/* Read tables osm_pitzer and osm_molar_volumes from db (the reference
 * database, refdb_sqlite()).  On success *out is owned by the caller
 * (osm_data_free); on failure -1, *out == NULL and err says why. */
int osm_load(sqlite3 *db, osm_data **out, char *err);
void osm_data_free(osm_data *d);

/* Pick the parameter compilation `name` (e.g. 'pitzer-mayorga',
 * 'hmw-1984') for the pairs it covers, on top of earlier picks; "default"
 * drops every pick.  -1 with err when no row has that compilation. */
int osm_use_compilation(osm_data *d, const char *name, char *err);

/* Debye-Hueckel osmotic slope A_phi at t_C, (kg/mol)^1/2. */
double osm_a_phi(double t_C);

/* One solute species.  symbol is borrowed (not copied); z its charge. */
typedef struct osm_species {
	const char *symbol;
	int z;
	double conc; /* mM or mmol/kg, as the function taking it says */
} osm_species;

typedef struct osm_result {
	double osmolality_mOsm_kg; /* phi * sum of molalities */
	double phi;                /* osmotic coefficient (molal) */
	double molality_sum_mmol_kg;
	double osmolarity_ideal_mOsm_L; /* sum of molar concentrations (molar input) */
	double ionic_strength_mmol_kg;
	double water_kg_L;    /* kg of water per litre of solution (molar input) */
	double fallback_frac; /* share of sum m_c m_a over pairs without parameters */
	int n_fallback_pairs; /* cation-anion pairs present without parameters */
	int n_no_volume;      /* species counted with V = 0 */
	int over_range;       /* 1: a salt's ions exceed its fit's m_max */
	/* the range the data allow (see the model above), and the share of
	 * the solute particles whose own terms are estimated or missing */
	double osmolality_lo_mOsm_kg, osmolality_hi_mOsm_kg;
	double estimated_frac;
} osm_result;

/* Osmotic coefficient and osmolality of n species given in mmol/kg water. */
int osm_molal(const osm_data *d, const osm_species *sp, int n, double t_C, osm_result *r,
	      char *err);

/* The same for species given in mM (mmol/L of solution): converted to
 * molality as stated above, then osm_molal. */
int osm_molar(const osm_data *d, const osm_species *sp, int n, double t_C, osm_result *r,
	      char *err);

/* Molalities (mmol/kg, caller's array of n) of species given in mM, and
 * the kg of water per litre of solution (may be NULL). */
int osm_to_molal(const osm_data *d, const osm_species *sp, int n, double t_C,
		 double *m_mmol_kg, double *water_kg_L, char *err);

typedef struct osm_adjust_result {
	int dilute;            /* 1: the solution is above the target: add water */
	double add_mM;         /* compound to add, mmol per litre of the solution
				 * made up to its volume (0 when dilute) */
	double water_mL_per_L; /* water to add per litre of solution (volumes
				 * taken as additive; 0 when not dilute) */
	double before_mOsm_kg;
	double after_mOsm_kg; /* estimated osmolality after the change */
} osm_adjust_result;

/* What brings the solution (species in mM) to target_mOsm_kg: when below,
 * the amount of a compound whose formula unit yields `add` (conc = count
 * per formula unit, e.g. NaCl: Na+ 1, Cl- 1; sucrose: sucrose 1); when
 * above, the water to add per litre (add may then be NULL).  Speciation is
 * held fixed (the added compound does not react).  Fails on a target that
 * is not a positive finite number, a compound that yields nothing, or a
 * target that needs more than 5 mol/L of the compound. */
int osm_adjust(const osm_data *d, const osm_species *sp, int n, double t_C,
	       double target_mOsm_kg, const osm_species *add, int nadd,
	       osm_adjust_result *r, char *err);

/* The amount to add so that a full forward computation reaches a target:
 * eval(ctx, x, &osm, err) gives the osmolality (mOsm/kg) with x mM added
 * (x >= 0; with all reactions, as `show` computes it); f0_mOsm_kg is its
 * value at x = 0 and guess_mM a first estimate (osm_adjust's).  Secant
 * steps, kept at x > 0, until within 1e-6 mOsm/kg or 20 steps; *add_mM and
 * *after_mOsm_kg get the last point.  -1 when eval fails. */
typedef int (*osm_eval_fn)(void *ctx, double add_mM, double *osm_mOsm_kg, char *err);
int osm_target_solve(osm_eval_fn eval, void *ctx, double target_mOsm_kg,
		     double f0_mOsm_kg, double guess_mM, double *add_mM,
		     double *after_mOsm_kg, char *err);

#endif
