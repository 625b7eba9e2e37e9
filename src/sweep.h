/*
 * sweep.h - how one number ionmix computes follows one thing varied over a
 * range: the amount of a compound in a solution, or the temperature.
 *
 * The number is one of: pH, a free metal (Ca2+, Mg2+ ...), the osmolality
 * estimate, the ionic strength, an ion's equilibrium (Nernst) potential
 * between two solutions, the liquid junction potential of a pipette | bath
 * pair (Henderson, as `junction` computes it), or a GHK reversal potential
 * for given permeabilities.  Each is computed exactly as the single
 * command computes it (show, nernst, junction, erev), at each point of an
 * even grid from `from` to `to`.
 *
 * Pure: nothing here prints, reads input or changes a solution.  The
 * varied solution is copied; the caller's solutions are only read.  A
 * point that cannot be computed (a speciation failure, an ion absent on
 * one side) is recorded with its reason and the sweep goes on.
 *
 * Units: amounts in mM, temperatures in degrees C, potentials in mV (the
 * trade's signs: membrane potential inside relative to outside; LJP the
 * bath relative to the pipette solution), osmolality in mOsm/kg, free
 * metals and ionic strength in mM, pH without a unit.
 * Errors: 0, or -1 with one line in err[IM_ERRLEN].
 */
#ifndef IONMIX_SWEEP_H
#define IONMIX_SWEEP_H

#include "refdb.h"
#include "solution.h"

#define SWEEP_MAX_PTS 2001    /* points of one sweep */
#define SWEEP_DEFAULT_PTS 41
#define SWEEP_MAX_PERM 16     /* ions with a permeability (erev) */
#define SWEEP_T_MIN_C 0.0     /* the range `temp` accepts: the water data */
#define SWEEP_T_MAX_C 60.0

/* What is varied. */
typedef enum { SWEEP_AMOUNT, SWEEP_TEMP } sweep_var;

/* What is followed.  Keep in step with the names in sweep.c. */
typedef enum {
	SWQ_PH,             /* pH of sol (-log a(H+)) */
	SWQ_FREE,           /* free metal `ion` in sol, mM */
	SWQ_OSMOLALITY,     /* Pitzer estimate of sol, mOsm/kg */
	SWQ_IONIC_STRENGTH, /* of sol, mM */
	SWQ_NERNST,         /* E of `ion`, inside | outside, mV */
	SWQ_LJP,            /* Henderson LJP, pipette = inside, bath = outside, mV */
	SWQ_EREV,           /* GHK reversal potential, inside | outside, mV */
	SWQ_COUNT
} sweep_qty;

typedef struct sweep_spec {
	sweep_var var;
	const rd_compound *compound; /* SWEEP_AMOUNT: the compound varied ... */
	const solution *target;      /* ... in this solution (read, copied) */
	double from, to;             /* mM or degrees C; from < to */
	int npts;                    /* 2 .. SWEEP_MAX_PTS */
	sweep_qty qty;
	const solution *sol;         /* one-solution quantities */
	const solution *inside;      /* pair quantities (the pipette for LJP) */
	const solution *outside;     /* (the bath for LJP) */
	const rd_ion *ion;           /* SWQ_FREE: the metal; SWQ_NERNST: the ion */
	const rd_ion *perm_ion[SWEEP_MAX_PERM]; /* SWQ_EREV */
	double perm[SWEEP_MAX_PERM];            /* P, cm/s or relative, >= 0 */
	int nperm;
	int activities;              /* nernst, ljp, erev: activities, not totals */
	int keep_pH;                 /* 1: each varied solution that was titrated
				      * (`ph TARGET with TITRANT`) is titrated
				      * again to its target at every point, as
				      * `ph` after the change would; 0: the
				      * titrant stays as made */
} sweep_spec;

/* One sweep.  Arrays owned (sweep_free). */
typedef struct sweep_result {
	int n;
	double *x;        /* n values of what is varied (mM or C) */
	double *y;        /* n values followed; NAN where the point failed */
	char **why;       /* n entries: NULL, or why that point failed */
	int nfail;
	const char *x_unit;  /* "mM" or "C" (static) */
	const char *y_unit;  /* "", "mM", "mOsm/kg" or "mV" (static) */
	char x_name[80];  /* "CaCl2 in kglu", "temperature" */
	char y_name[120]; /* "free Ca2+ in kglu", "LJP kglu | bath" */
	char y_key[64];   /* a short machine name: "pH", "free_Ca2+", "ljp" */
	char y_short[48]; /* a legend label: "free Ca2+", "LJP", "E(K+)" */
	double pH_lo, pH_hi; /* range of the pH of the varied solution(s)
			      * over the points; NAN without speciation */
} sweep_result;

/* Check spec (names what is wrong: a range over nothing or backwards, a
 * pair quantity without its pair, a compound sweep that changes none of
 * the solutions the quantity reads, a temperature outside 0..60 C, bad
 * permeabilities, keep_pH for a solution never titrated or when the
 * compound varied is its titrant).  0, or -1 with err. */
int sweep_check(const sweep_spec *spec, char *err);

/* Run the sweep under env (its temperature is replaced point by point in
 * a temperature sweep; its chemistry and model are used as they are).
 * Solutions the sweep does not change are computed once.  Fails (-1, err)
 * on a bad spec and when every point failed (with the first reason); a
 * failure of some points only is recorded in r->why.  On success the
 * caller owns *r (sweep_free); on failure *r is empty. */
int sweep_run(const sweep_spec *spec, const sol_env *env, sweep_result *r,
	      char *err);
void sweep_free(sweep_result *r);

/* The one value of a quantity for computed solutions (sol_compute at
 * t_C): a, the one-solution state or the inside; b, the outside (NULL
 * for one-solution quantities).  Exposed so that commands and tests
 * compute a single point exactly as the sweep does.  0, or -1 with err. */
int sweep_value(const sweep_spec *spec, const sol_state *a, const sol_state *b,
		double t_C, double *y, char *err);

#endif
