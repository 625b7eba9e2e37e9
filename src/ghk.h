/*
 * ghk.h - mixed-ion reversal potentials (Goldman-Hodgkin-Katz), permeability
 * ratios from measured reversal potentials, and GHK current-voltage curves.
 *
 * Pure functions: nothing here prints, reads input or keeps state.  Units:
 * potentials in mV (membrane potential inside relative to outside),
 * temperature in degrees C, concentrations in mM (== mol/m3), permeability
 * P in cm/s (or relative: every result but the current's scale depends only
 * on the ratios of P), current density in A/cm2, outward (positive charge
 * leaving the cell) positive.  Failing functions return -1 and write a
 * one-line message into the caller's err[IM_ERRLEN]; no result is ever NaN
 * or infinite.
 *
 * Sources: Goldman (1943) J Gen Physiol 27:37; Hodgkin & Katz (1949)
 * J Physiol 108:37; the mixed mono-/divalent case as in Lewis (1979)
 * J Physiol 286:417.
 */
#ifndef IONMIX_GHK_H
#define IONMIX_GHK_H

#include "common.h"

/* One ion species on both sides of the membrane.  The caller owns the array
 * and the symbol string; the functions below only read them. */
typedef struct ghk_ion {
	const char *symbol; /* for messages, e.g. "K+" */
	int z;              /* charge number, nonzero */
	double P;           /* permeability, cm/s (or relative), >= 0 */
	double in_mM;       /* inside (cytoplasm, pipette in whole-cell) */
	double out_mM;      /* outside (bath) */
} ghk_ion;

/* Solver settings for every root found here (Brent's method). */
#define GHK_TOL_ABS_MV 1e-10   /* absolute tolerance on a potential, mV */
#define GHK_TOL_REL 1e-13      /* relative tolerance */
#define GHK_MAX_ITER 200       /* iterations of one root search */
#define GHK_BRACKET_MAX_MV 1e5 /* a bracket is never widened past +-100 V */
/* |measured E_rev| or its shift, mV, that ghk_ratio and ghk_ratio_shift
 * take: beyond it no ratio can fit and the arithmetic loses the range */
#define GHK_MEASURED_MAX_mV 1000.0
#define GHK_RATIO_MIN 1e-6     /* permeability ratios are sought in (MIN, MAX) */
#define GHK_RATIO_MAX 1e6

/* GHK current density of one ion at V_mV, in A/cm2 when P is in cm/s and
 * the concentrations in mM; outward positive:
 *   I = P z^2 (F^2 V/RT) (c_in - c_out exp(-zFV/RT)) / (1 - exp(-zFV/RT))
 * with the V -> 0 limit P z F (c_in - c_out) taken exactly.  Does not check
 * its arguments (it is the inner loop): pass finite values. */
double ghk_current_A_cm2(int z, double P_cm_s, double in_mM, double out_mM,
			 double V_mV, double t_C);

/* Nernst potential E = (RT/zF) ln(out/in) of one ion, mV.  -1 with err when
 * z == 0, a concentration is not finite and positive, or t_C is bad. */
int ghk_nernst_mV(int z, double in_mM, double out_mM, double t_C, double *E_mV,
		  char *err);

/* Reversal potential (zero of the summed GHK currents) of n ions at t_C.
 * With monovalent ions only, the closed-form GHK voltage equation; with any
 * other charge, Brent's method on the summed currents in a bracket set by
 * the ions' Nernst potentials.  Ions with P == 0 are impermeant and ignored.
 * Fails with err on: n < 1, a non-finite value, a negative P or
 * concentration, z == 0 with P > 0, a permeant ion absent from both
 * solutions (named), zero total permeability, no reversal potential (the
 * current is outward, or inward, at every voltage). */
int ghk_erev_mV(const ghk_ion *ions, int n, double t_C, double *E_mV, char *err);

/* The same, always by the numerical root (exposed so that tests can check
 * it against the closed form). */
int ghk_erev_numeric_mV(const ghk_ion *ions, int n, double t_C, double *E_mV,
			char *err);

/* Permeability ratio P_ion/P_ref such that the GHK reversal potential equals
 * measured_mV, every other P held (ions[ion_idx].P is not read; P_ref must be
 * > 0).  Brent's method on ln(ratio) in (GHK_RATIO_MIN, GHK_RATIO_MAX); err
 * when no ratio there fits, or when more than one does. */
int ghk_ratio(const ghk_ion *ions, int n, int ion_idx, int ref_idx,
	      double measured_mV, double t_C, double *ratio, char *err);

/* Permeability ratio from a measured shift of the reversal potential when
 * the bath is changed: ions[i].out_mM is the bath before the change (the
 * "from" bath), to_out_mM[i] the bath after it (the "to" bath, n values, the
 * caller's array); the inside is ions[i].in_mM in both.  shift_mV =
 * E_rev(to) - E_rev(from).  Covers bi-ionic substitution and dilution in
 * either direction: an ion absent from both sides of one state (the test
 * ion before a full substitution, the ion it replaces after it) carries no
 * current in that state, so only each state's reversal potential must
 * exist.  err when a state has none (every permeant ion on one side, say
 * which), or when the test ion is absent from every state. */
int ghk_ratio_shift(const ghk_ion *ions, int n, const double *to_out_mM,
		    int ion_idx, int ref_idx, double shift_mV, double t_C,
		    double *ratio, char *err);

/* ghk_erev_mV with the ions absent from both sides taken as impermeant
 * (what a state of a substitution experiment holds). */
int ghk_erev_present_mV(const ghk_ion *ions, int n, double t_C, double *E_mV, char *err);

/* A current-voltage curve.  Arrays owned by the struct (ghk_iv_free). */
typedef struct ghk_iv_curve {
	int npts, nions;
	double *V_mV;       /* npts voltages */
	double *total_A_cm2;/* npts summed currents */
	double *ion_A_cm2;  /* npts * nions, row-major: [k * nions + i] */
	int has_erev;       /* 0: no reversal potential (see no_erev) */
	double E_rev_mV;    /* valid when has_erev */
	double rect_mV;     /* distance used for the rectification figure */
	double rect;        /* |I(E_rev + rect_mV)| / |I(E_rev - rect_mV)|;
			     * > 1: outward rectification; valid when has_erev */
	char no_erev[IM_ERRLEN]; /* why there is none, when has_erev == 0 */
} ghk_iv_curve;

#define GHK_IV_V1_MV -120.0  /* defaults of the voltage grid */
#define GHK_IV_V2_MV 60.0
#define GHK_IV_DV_MV 5.0
#define GHK_IV_RECT_MV 50.0
#define GHK_IV_MAX_PTS 100001

/* Currents from v1_mV to v2_mV (v1 < v2) in steps of dv_mV > 0 (v2 is
 * included when it falls on the grid), the reversal potential and the
 * rectification figure at +-rect_mV (> 0) about it.  A missing reversal
 * potential is not an error (has_erev = 0); bad input is, as for
 * ghk_erev_mV, and so are more than GHK_IV_MAX_PTS points.  On success the
 * caller owns *iv and frees it with ghk_iv_free; on failure *iv is empty. */
int ghk_iv(const ghk_ion *ions, int n, double t_C, double v1_mV, double v2_mV,
	   double dv_mV, double rect_mV, ghk_iv_curve *iv, char *err);
void ghk_iv_free(ghk_iv_curve *iv);

/* Points of the fine grid plots draw whatever the table step, so that a
 * curve never shows the kinks of straight segments between table rows
 * (0.375 mV apart over the default -120 to 60 mV). */
#define GHK_IV_FINE_PTS 481

/* Currents on npts (2 .. GHK_IV_MAX_PTS) evenly spaced voltages from v1_mV
 * to v2_mV, both included (v1 < v2): V_mV[k], the sum total_A_cm2[k] and,
 * when ion_A_cm2 is not NULL, each ion's current ion_A_cm2[k * n + i].
 * The arrays are the caller's, with room for npts (npts * n) values.
 * Checks the ions as ghk_erev_mV does (but a missing reversal potential
 * is no error here); -1 with err on bad input or a non-finite current. */
int ghk_iv_fill(const ghk_ion *ions, int n, double t_C, double v1_mV,
		double v2_mV, int npts, double *V_mV, double *total_A_cm2,
		double *ion_A_cm2, char *err);

#endif
