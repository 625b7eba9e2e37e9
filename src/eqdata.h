/*
 * eqdata.h - the equilibrium and Pitzer tables of data/equilibria.sql as
 * plain C arrays, and the one mechanism that picks a compilation of
 * constants.  Only the data modules include this header: speciation.c,
 * titrate.c and osmotic.c read the structs below; everything else uses
 * the opaque spec_data and osm_data of speciation.h and osmotic.h.
 *
 * Loading (eqd_load_spec, eqd_load_osm) is the only place that reads these
 * tables with SQL.  It checks them: charges of the protonation states,
 * exactly one default compilation per acid-base group, per metal-ligand
 * pair and per salt, contiguous pKa steps, and a temperature dependence
 * (enthalpy, fit, d(pKa)/dT, or a named analogue to take it from) for
 * every constant of a metal-binding ligand.
 *
 * Compilation picks: one ordered list of names (eqd_picks), the latest
 * pick winning for the groups, pairs and salts it covers; any number of
 * picks; picking a name again moves it to the end.  eqd_use_compilation
 * applies one pick to both data sets at once, or to neither.
 *
 * Ownership: the loaders give the caller the data (free with
 * eqd_free_spec, eqd_free_osm).  Errors: 0, or -1 with one line in err
 * (IM_ERRLEN bytes).  Units as in the tables: kJ/mol, C, mol/L, cm3/mol
 * (stored as L/mol in v0_L_mol).
 */
#ifndef IONMIX_EQDATA_H
#define IONMIX_EQDATA_H

#include <sqlite3.h>

#include "osmotic.h"
#include "speciation.h"

#define EQD_MAXH     6   /* protonation steps of one ligand */
#define EQD_COMPLEN  32  /* compilation names */
#define EQD_SRCLEN   40  /* source keys */
#define EQD_SYMLEN   32  /* symbols in the Pitzer tables */
#define EQD_MAX_LIG  128 /* ligands in the tables */

/* ---- the one pick list ---- */

typedef struct eqd_picks {
	char (*name)[EQD_COMPLEN]; /* owned; oldest first */
	int n, cap;
} eqd_picks;

/* Append name (an earlier pick of the same name is dropped first). */
void eqd_picks_push(eqd_picks *p, const char *name);
void eqd_picks_copy(eqd_picks *dst, const eqd_picks *src); /* dst freed first */
void eqd_picks_free(eqd_picks *p);

/* ---- speciation tables ---- */

/* how a row's temperature dependence is known */
typedef enum {
	EQD_T_NONE = 0,     /* nothing entered: constant at t_ref only */
	EQD_T_ENTERED = 1,  /* enthalpy, d(pKa)/dT or a fit of its own */
	EQD_T_ANALOGUE = 2  /* enthalpy taken from the named analogue row */
} eqd_tsrc;

typedef struct pka_row {
	int lig, n_h;
	char comp[EQD_COMPLEN];
	int is_default;
	double pka, t_ref, i_ref, dh, dpdt, fa, fb, fc; /* NAN when absent */
	double dcp;      /* heat capacity of reaction, J/(mol K); NAN when none */
	eqd_tsrc tsrc;
	char analogue[EQD_SYMLEN]; /* species formed by the analogue step */
	char source[EQD_SRCLEN];
	char dh_source[EQD_SRCLEN]; /* source of the enthalpy; "" when source */
} pka_row;

typedef struct lig_def {
	char name[SPEC_SYMLEN];
	int zb, binds;
	char state[EQD_MAXH + 1][SPEC_SYMLEN];
	int has_state[EQD_MAXH + 1];
	int nsteps;             /* modelled steps of the selected compilation */
	int step[EQD_MAXH + 1]; /* pka row of steps 1..nsteps */
	int carbonate;
} lig_def;

enum { CX_ML, CX_MHL, CX_M2L, CX_ML2 };

typedef struct cx_row {
	char sym[SPEC_SYMLEN];
	int metal, lig, kind;
	char comp[EQD_COMPLEN];
	int is_default;
	double logk, t_ref, i_ref, dh, dcp; /* dh kJ/mol, dcp J/(mol K); NAN: none */
	eqd_tsrc tsrc;
	char analogue[EQD_SYMLEN]; /* complex the enthalpy is taken from */
	char source[EQD_SRCLEN];
	char dh_source[EQD_SRCLEN]; /* source of the enthalpy; "" when source */
	int nm, nl, nh, z;
	int ml_row; /* M2L, ML2: the ML row of the same compilation */
	int active;
} cx_row;

typedef struct metal_def {
	char sym[SPEC_SYMLEN];
	int z;
} metal_def;

typedef struct fit3 {
	double a, b, c, tmin, tmax;
	char source[EQD_SRCLEN];
} fit3;

/* The apparent constants of the CO2/HCO3- system in physiological saline:
 *   pK'(t, pH) = pk0 + pk_ph (pH_ref - pH) + (t_ref - t)(pk_t + pk_tph (pH_ref - pH))
 *   S(t) = s0 + s1 (t_ref_sol - t) + s2 (t_ref_sol - t)^2   (mM per mmHg)
 * (pH clamped into ph_min..ph_max)
 * valid for t_min..t_max; pK' is the mixed constant pH - log([HCO3-]/[CO2])
 * at the ionic strength i_ref_M. */
typedef struct co2_app {
	double pk0, pk_ph, pk_t, pk_tph, t_ref, ph_ref, ph_min, ph_max, i_ref;
	double s0, s1, s2, t_ref_sol; /* S in mM per mmHg */
	double tmin, tmax;
	char source[EQD_SRCLEN], sol_source[EQD_SRCLEN];
} co2_app;

struct spec_data {
	lig_def *lig;
	int nlig;
	pka_row *pka;
	int npka;
	metal_def met[SPEC_MAX_METALS];
	int nmet;
	cx_row *cx;
	int ncx;
	fit3 pkw, k0;
	co2_app co2;
	eqd_picks picks;
	unsigned long gen;  /* bumped by every eqd_select_spec: results
			     * computed under an older value are stale */
};

int eqd_find_lig(const spec_data *d, const char *name);
int eqd_find_lig_ci(const spec_data *d, const char *name); /* any case */
int eqd_find_metal(const spec_data *d, const char *sym);   /* 'Ca2+', 'Ca' */

/* db NULL: the tables built into the program (reftab.h; loaded, checked
 * and selected by this code at build time), with no SQL. */
int eqd_load_spec(sqlite3 *db, spec_data **out, char *err);
void eqd_free_spec(spec_data *d);
/* Re-select the rows in use after d->picks changed; -1 when the picks
 * select an inconsistent set (then nothing is in use: restore the picks
 * and call again). */
int eqd_select_spec(spec_data *d, char *err);
int eqd_spec_has_compilation(const spec_data *d, const char *name, const char **canon);

/* ---- Pitzer tables ---- */

/* how well a salt's parameters are known (the osmolality range uses it) */
typedef enum {
	EQD_OSM_PUBLISHED = 0, /* a published fit */
	EQD_OSM_ESTIMATED = 1  /* estimated from a named analogue */
} eqd_osm_class;

typedef struct pz_row {
	int cat, an; /* symbol indices */
	char salt[EQD_SYMLEN];
	char comp[EQD_COMPLEN];
	int is_default;
	double b0, b1, b2, a1, a2, cphi, m_max;
	int zc, za;
	eqd_osm_class cls;
} pz_row;

/* a neutral solute's own non-ideality: its contribution to
 * (phi - 1) sum m is lambda m^2 + mu m^3 (m in mol/kg) */
typedef struct nz_row {
	int sym;
	double lambda, mu, m_max;
	eqd_osm_class cls;
} nz_row;

struct osm_data {
	char (*sym)[EQD_SYMLEN]; /* every symbol named in the tables */
	double *v0_L_mol;        /* partial molar volume, L/mol; NAN if none */
	int nsym;
	pz_row *pz;
	int npz;
	nz_row *nz;
	int nnz;
	int *pair; /* nsym*nsym: active row or -1 */
	eqd_picks picks;
	unsigned long gen; /* bumped by every eqd_select_osm (see spec_data) */
};

int eqd_osm_sym(const osm_data *d, const char *s); /* index, or -1 */
int eqd_load_osm(sqlite3 *db, osm_data **out, char *err);
void eqd_free_osm(osm_data *d);
void eqd_select_osm(osm_data *d);
int eqd_osm_has_compilation(const osm_data *d, const char *name, const char **canon);

/* ---- both ---- */

/* Pick compilation `name` for the speciation and the Pitzer data (either
 * may be NULL); "default" drops every pick.  -1 with err when no table
 * has that compilation, or the pick makes an inconsistent set (then
 * nothing changes). */
int eqd_use_compilation(spec_data *d, osm_data *o, const char *name, char *err);

/* The distinct compilation names of both data sets, sorted, into names
 * (up to max); returns how many. */
int eqd_compilations(const spec_data *d, const osm_data *o, char (*names)[EQD_COMPLEN],
		     int max);

/* The stored constants of a ligand, metal or compilation (see
 * spec_constants in speciation.h). */
int eqd_constants(const spec_data *d, const char *name, spec_const *out, int max,
		  char *err);

#endif
