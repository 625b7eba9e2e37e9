/*
 * solution.h - a solution (compounds and their amounts), the workspace of
 * named solutions, and the species a solution yields with their activities.
 *
 * Data flow: compounds --sol_compute--> species totals --activity--> gamma,
 * activity, ionic strength, osmolarity, net charge.  Nothing here prints.
 */
#ifndef IONMIX_SOLUTION_H
#define IONMIX_SOLUTION_H

#include "osmotic.h"
#include "refdb.h"
#include "speciation.h"

#define SOL_NAME_MAX 64

typedef struct sol_item {
	const rd_compound *c;
	double mM;       /* final concentration in the solution, mmol/L */
	double stock_mM; /* > 0: comes from a stock of this concentration */
	int titrant;     /* 1: added by `ph` to reach ph_target */
	double fw_g_mol; /* > 0: the formula weight on the bottle (`fw`: hydrate,
			  * lot), used to weigh; 0: the compound's */
} sol_item;

/* A target the solution holds (targets.h solves them): what is added
 * (`with`, its whole amount belongs to the target) so that, at at_C, the
 * pH (kind SOL_TG_PH), the free concentration of metal (SOL_TG_FREE, mM)
 * or the osmolality (SOL_TG_OSMO, mOsm/kg) is value. */
typedef enum { SOL_TG_PH = 0, SOL_TG_FREE = 1, SOL_TG_OSMO = 2 } sol_tg_kind;

typedef struct sol_target {
	sol_tg_kind kind;
	double value;             /* pH; free metal, mM; osmolality, mOsm/kg */
	const rd_compound *with;  /* the compound added to reach it (refdb's) */
	const rd_ion *metal;      /* SOL_TG_FREE: the metal; else NULL */
	double at_C;              /* the temperature at which it holds */
} sol_target;

#define SOL_TG_MAX 8

typedef struct solution {
	char name[SOL_NAME_MAX];
	sol_item *items; /* in the order they were added; owned */
	int n, cap;
	double ph_target; /* pH the titrant items were computed for; NAN: none */
	double co2_frac;  /* > 0: equilibrated with a gas of this CO2 fraction */
	double co2_p_atm; /* total pressure of that gas, atm (1 by default) */
	int co2_dry;      /* 1: the gas is dry; 0: humidified at the temperature */
	sol_target tg[SOL_TG_MAX]; /* targets, in the order they were set */
	int ntg;
} solution;

/* Activity-coefficient model (see activity.h). */
typedef enum { ACT_DAVIES = 0, ACT_DEBYE_HUCKEL = 1 } act_model;

typedef struct sol_species {
	const rd_ion *ion;
	double mM;        /* total concentration, mmol/L */
	double gamma;     /* activity coefficient (molar scale) */
	double act_mM;    /* gamma * mM */
	int dh_fallback;  /* 1: extended DH asked, no Kielland size: Davies used */
} sol_species;

typedef struct sol_state {
	sol_species *sp;  /* charged ions first (by charge, then symbol), then neutrals; owned */
	int n;
	double t_C;
	act_model model;
	double ionic_strength_mM;
	double osmolarity_mOsm_L;   /* ideal: sum of all particles */
	double net_charge_mEq_L;    /* sum z c */
	double cation_mEq_L;        /* sum over z>0 of z c, for judging balance */
	/* after speciation (env->chem set): the whole result, owned, else NULL */
	spec_result *chem;
	double pH;                  /* -log10 a(H+); NAN without speciation */
	double osmolality_mOsm_kg;  /* Pitzer estimate; NAN without osm data */
	double osmotic_coeff;       /* molal phi; NAN without osm data */
	double osm_fallback_frac;   /* share of ion pairs without Pitzer parameters */
	/* the range the osmotic data allow (osmotic.h); NAN without osm data */
	double osmolality_lo_mOsm_kg, osmolality_hi_mOsm_kg;
	double osm_estimated_frac;  /* share of particles with estimated terms */
} sol_state;

/* What sol_compute works with.  ref is needed to name the species that
 * speciation produces; chem NULL means no speciation (every salt
 * dissociates fully, buffers and chelators stay as added); osm NULL means
 * no osmolality estimate. */
typedef struct sol_env {
	const refdb *ref;
	const spec_data *chem;
	const osm_data *osm;
	double t_C;
	act_model model;
} sol_env;

/* What a command changed in the workspace, kept so that it can be taken
 * back (a failed command's rollback, `undo`): for each solution the
 * command touched, its state before (NULL: there was none) and where it
 * stood.  Filled while it is the workspace's active journal
 * (ws_journal_begin .. ws_journal_end); it costs one copy per solution
 * the command looks at, nothing per solution it leaves alone. */
typedef struct ws_entry {
	char name[SOL_NAME_MAX];
	solution *old;   /* owned; NULL: the name was not in the workspace */
	int index;       /* its position then */
} ws_entry;

typedef struct ws_journal {
	ws_entry *e;     /* in the order of first touch; owned */
	int n, cap;
	char current[SOL_NAME_MAX]; /* the current solution then; "" none */
	unsigned long serial;       /* which journal stamped a solution */
} ws_journal;

/* The workspace: named solutions, one current, found by name through a
 * hash index (O(1)). */
typedef struct workspace {
	solution **sol;  /* owned, in the order they were made */
	int n, cap;
	int current;     /* index, or -1 when there is none */
	unsigned long *stamp; /* per solution: the journal that holds its old state */
	int *slot;       /* open-addressing index: slot -> index + 1, 0 free */
	int nslot;       /* a power of two, at least twice n; 0 before use */
	ws_journal *jr;  /* the active journal, NULL outside a command */
	unsigned long serial;
} workspace;

void sol_init(solution *s, const char *name);
void sol_free(solution *s);
/* Deep copy src into dst (dst must be uninitialised or freed). */
void sol_copy(solution *dst, const solution *src, const char *name);
sol_item *sol_find(solution *s, const rd_compound *c);
/* Add mM to the compound (appending it when absent). */
void sol_add(solution *s, const rd_compound *c, double mM);
/* Set the amount (appending when absent). */
void sol_set(solution *s, const rd_compound *c, double mM);
/* Remove; returns -1 when the compound is not in the solution. */
int sol_remove(solution *s, const rd_compound *c);
int sol_equal(const solution *a, const solution *b);

/* Species and activities under env: the totals the compounds yield, then
 * (with env->chem) acid-base and metal-ligand speciation at the pH the
 * solution's protons give (closed) or under its CO2 gas, then activity
 * coefficients at the resulting ionic strength.  The state owns its
 * arrays; free with sol_state_free.  Fails (-1, err) on a bad temperature
 * or a speciation failure. */
int sol_compute(const solution *s, const sol_env *env, sol_state *st, char *err);

/* The species totals a solution yields (before speciation), as inputs for
 * the speciation module: up to max entries into in (symbols borrowed from
 * the refdb).  Titrant items are left out when skip_titrant.  Returns the
 * count, or -1 with err when there are more than max. */
int sol_spec_inputs(const solution *s, int skip_titrant, spec_in *in, int max,
		    char *err);

/* The speciation conditions of a solution at t_C (closed, or its CO2). */
void sol_spec_cond(const solution *s, const sol_env *env, spec_cond *cond);
void sol_state_free(sol_state *st);
/* The species entry for ion, or NULL when the solution lacks it. */
const sol_species *sol_state_find(const sol_state *st, const rd_ion *ion);
/* The free concentration of a metal (its symbol, "Ca2+"), mM, after
 * speciation: 0 when the solution holds none of it, NAN when the state
 * was computed without speciation (nothing known about binding).  The one
 * meaning of "absent" for every caller. */
double sol_state_free_mM(const sol_state *st, const char *metal);

void ws_init(workspace *w);
void ws_free(workspace *w);
/* Lookups and changes below record what they touch in the active journal
 * (a copy of the solution handed out, since the caller may change it). */
solution *ws_find(workspace *w, const char *name);   /* case-sensitive, O(1) */
solution *ws_current(workspace *w);                  /* NULL if none */
/* Create (empty) or return the existing one; makes it current. */
solution *ws_open(workspace *w, const char *name);
/* Insert a solution the workspace takes ownership of, replacing one of the
 * same name. */
void ws_put(workspace *w, solution *s);
int ws_delete(workspace *w, const char *name);
/* Deep copy of the whole workspace (dst uninitialised or freed); no
 * journal. */
void ws_copy(workspace *dst, const workspace *src);
/* Position of a name, or -1; records nothing. */
int ws_index_of(const workspace *w, const char *name);

/* Start recording into jr (which the caller owns) / stop recording. */
void ws_journal_begin(workspace *w, ws_journal *jr);
void ws_journal_end(workspace *w);
/* Drop the entries of solutions the command only looked at (equal to
 * before, at the same place); returns how many entries remain. */
int ws_journal_prune(workspace *w, ws_journal *jr);
/* Put back every solution jr recorded, and the current one; jr is
 * emptied (call ws_journal_end first). */
void ws_journal_undo(workspace *w, ws_journal *jr);
/* Free the saved states. */
void ws_journal_free(ws_journal *jr);

#endif
