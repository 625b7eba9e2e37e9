/*
 * spec_work.h - the working state of one speciation problem, shared by
 * the equilibrium solver (speciation.c) and the searches built on it
 * (titrate.c).  Private to those two files.
 *
 * Formulation: basis components are the free metals M, the fully
 * deprotonated ligands L and H+.  Every species s is
 *     c_s = beta_s(T, I) * prod_b c_b^nu_sb,
 * so with u_b = ln c_b the balances R_b(u) = sum_s nu_sb c_s - T_b = 0 are
 * the gradient of the convex function G(u) = sum_s c_s - sum_b T_b u_b.
 * Components may be fixed instead of balanced: H+ when the pH is given,
 * the metal in the free-metal inverse, and (basis changed to CO2(aq)) the
 * carbonate system when open to a gas.
 */
#ifndef IONMIX_SPEC_WORK_H
#define IONMIX_SPEC_WORK_H

#include <math.h>

#include "eqdata.h"
#include "speciation.h"

#define MAXH         EQD_MAXH
#define NB_MAX       (SPEC_MAX_METALS + SPEC_MAX_LIGANDS + 1)
#define NS_MAX       160 /* reacting species in one problem */
#define NSTRONG_MAX  SPEC_MAX_IN
#define MAX_DATA_LIG EQD_MAX_LIG
#define LN10         2.302585092994046

/* solver limits */
#define NEWTON_MAXIT    200
#define NEWTON_STEP_MAX 12.0 /* largest change of any ln c in one step */
#define LS_MAXHALF      60
#define COORD_MAXSWEEP  20000
#define COORD_TOL       1e-7 /* fallback hands over to Newton at this closure */
#define ILOOP_MAXIT     200
#define I_RTOL          1e-11 /* ionic strength self-consistency */
#define X_RTOL          1e-12 /* titrant / metal source amount */
#define MAX_TITRANT_M   5.0   /* mol/L */
#define MAX_SOURCE_M    1.0   /* mol/L */
#define T_MIN_C         0.0
#define T_MAX_C         60.0
#define I_DAVIES_MAX_M  0.5

/* ------------------------------------------------------------------ */
/* the problem                                                          */

enum { B_METAL, B_LIGAND, B_H };
enum { DEST_BASE, DEST_TIT, DEST_SRC, NDEST };

typedef struct strong {
	const char *sym;
	int z;
	double c[NDEST]; /* base: mol/L; titrant, source: per formula unit */
} strong;

typedef struct work {
	const spec_data *d;
	double t_C, A;
	int mode;
	double pH, co2_M;
	int carb_s;     /* species index of CO2(aq) of the carbonate system, or -1 */
	double carb_pH; /* pH the apparent pK' of CO2/HCO3- was evaluated at */
	/* basis */
	int nb, hb, co2b;
	int btype[NB_MAX], bref[NB_MAX], bz[NB_MAX];
	int fixed[NB_MAX], active[NB_MAX];
	int fpos[NB_MAX]; /* index among the free components, or -1 */
	int warm;         /* 1: u holds a solution to start from */
	double T[NDEST][NB_MAX]; /* totals (mol/L): base; titrant, source per unit */
	double Tcur[NB_MAX];
	double u[NB_MAX];
	/* species */
	int ns;
	int skind[NS_MAX], sref[NS_MAX], sm[NS_MAX], sl[NS_MAX];
	int snz[NS_MAX], sb[NS_MAX][3], sn[NS_MAX][3];
	int sz[NS_MAX], snh[NS_MAX], snm[NS_MAX], snl[NS_MAX], ssub[NS_MAX];
	double lb0[NS_MAX], D[NS_MAX], lb[NS_MAX], c[NS_MAX];
	int sact[NS_MAX];
	/* strong ions */
	strong st[NSTRONG_MAX];
	int nst;
	/* unknowns of the outer loop */
	double x_tit, x_src, I; /* titrant, source: mol/L; I: mol/L */
	int fixed_metal;        /* basis index, or -1 */
	/* bookkeeping */
	int newton_it, used_fallback, fallback_only, no_t_lig[MAX_DATA_LIG];
	double rmax;
	char err[IM_ERRLEN];
} work;

enum { RUN_PLAIN, RUN_TITRATE, RUN_SOURCE };

static inline double davies_F(double I_M)
{
	double r = sqrt(I_M > 0 ? I_M : 0);
	return r / (1.0 + r) - 0.3 * I_M;
}

/* the checks of a problem's conditions; 0 or -1 with err */
int specw_check_cond(const spec_data *d, const spec_cond *c, int n, char *err);
/* Build the work for inputs (+ titrant, + source); mode from cond. */
int specw_setup(work *w, const spec_data *d, const spec_in *in, int n,
		const spec_cond *c, const spec_in *tit, int nt, const spec_in *src,
		int ns, char *err);
/* The outer loop (ionic strength, and the titrant or source amount with
 * RUN_TITRATE, RUN_SOURCE) to self-consistency. */
int specw_run(work *w, int what, char *err);
int specw_fill_result(work *w, spec_result *r, char *err);
int specw_metal_basis(work *w, int m);
/* protons bound (needed) minus protons given, mol/L (FIXED mode) */
double specw_proton_excess(const work *w);
/* mean protons bound per free ligand b (all states, metals ignored) */
double specw_mean_h(const work *w, int b);

#endif
