/*
 * electrode.h - reference-electrode offsets: the Ag/AgCl electrode's
 * dependence on Cl-, and the offset that a bath exchange brings with a
 * bare Ag/AgCl ground or with a salt-bridge ground.
 *
 * Signs.  The amplifier reads V = (pipette wire) - (ground wire) plus the
 * offset set at zeroing.  Electrode potential E_el = phi(metal) -
 * phi(solution).  LJP = phi(bath) - phi(pipette solution) (junction.h).
 * Zeroing with the open tip in the OLD bath makes the reading 0 there.
 * Let G(X) = phi(bath X) - phi(ground wire): -E_el(X) for a bare Ag/AgCl
 * ground; LJP(bridge | X) - E_el(bridge filling) for a salt bridge.  Then
 *
 *   ground term  g = G(NEW) - G(OLD)          (the bath moves by g against
 *                                              the ground; bare: g = -dE_el)
 *   open tip in NEW:  V = g - (LJP(pip|NEW) - LJP(pip|OLD))   = shift
 *   whole-cell or outside-out in NEW (the tip junction is gone once the
 *   pipette is sealed; the offset still holds the one at zeroing):
 *       V = Vm + LJP(pip|OLD) + g,  so  Vm = V - LJP(pip|OLD) - g
 *   inside-out in NEW (bath on the inner face):  Vm = -(V - LJP(pip|OLD) - g)
 *   cell-attached (intact cell, resting potential Vrest, patch potential
 *   Vpatch = inside - pipette solution):  V = Vrest - Vpatch + LJP0 + g
 *
 * So a bath that moves by g against the ground shows up with the opposite
 * sign in the membrane potential: a reversal potential read in NEW is
 * truly Erev = Erev_read - LJP(pip|OLD) - g.  Example (hand-derived): 140
 * -> 10 mM Cl- with a bare Ag/AgCl ground at 25 C: E_el rises by
 * (RT/F) ln 14 = 67.8 mV, g = -67.8 mV, so the true Erev is 67.8 mV more
 * positive than read (before the usual -LJP).
 *
 * Pure functions, nothing prints; errors are -1 with a message in err
 * (IM_ERRLEN); outputs untouched on failure.
 */
#ifndef IONMIX_ELECTRODE_H
#define IONMIX_ELECTRODE_H

#include "junction.h"

/* Above this |Ag/AgCl term| a salt-bridge ground is advisable, mV
 * (common practice, no single source). */
#define EL_BRIDGE_ADVISE_mV 2.0

/* Potential of a bare Ag/AgCl electrode in a solution of Cl- activity
 * a_cl_mM, relative to the same electrode at unit activity (1 M), mV:
 * E = -(RT/F) ln(a_Cl / 1000 mM) (AgCl + e- = Ag + Cl-; only differences
 * matter).  Falls by 59.16 mV per tenfold Cl- at 25 C.  NAN when a_cl_mM
 * is not > 0 and finite or t_C is outside JN_T_MIN_C..JN_T_MAX_C. */
double el_agcl_mV(double a_cl_mM, double t_C);

typedef enum { EL_GROUND_AGCL = 0, EL_GROUND_BRIDGE = 1 } el_ground;

/* What a bath exchange involves.  Arrays are the caller's; a pair array
 * holds one side in pip_mM and the other in bath_mM (junction.h). */
typedef struct el_exchange_in {
	el_ground ground;
	/* Cl- activity of the OLD and NEW bath, mM: needed for a bare Ag/AgCl
	 * ground; with a bridge, optional (0: skip the comparison term) */
	double a_cl_old_mM, a_cl_new_mM;
	/* tip junction: pip_mM = pipette, bath_mM = OLD (resp. NEW) bath;
	 * both NULL (n 0) when there is no pipette: then no tip term */
	const jn_ion *tip_old, *tip_new;
	int n_tip_old, n_tip_new;
	/* salt bridge: pip_mM = bridge filling, bath_mM = OLD (resp. NEW) */
	const jn_ion *bridge_old, *bridge_new;
	int n_bridge_old, n_bridge_new;
} el_exchange_in;

typedef struct el_exchange {
	double ground_mV;     /* g: change of the bath against the ground wire */
	double agcl_mV;       /* what a bare Ag/AgCl ground alone would give as g
				* (-(E_el(NEW) - E_el(OLD))); 0 when not computed */
	int have_agcl;        /* 1 when agcl_mV was computed */
	double bridge_old_mV; /* LJP(bridge | OLD), LJP(bridge | NEW); bridge only */
	double bridge_new_mV;
	int have_tip;      /* 1 when the tip terms were computed */
	double tip_old_mV; /* LJP(pipette | OLD), LJP(pipette | NEW) */
	double tip_new_mV;
	double shift_mV;    /* open-tip reading in NEW after zeroing in OLD:
				* g - (tip_new - tip_old); g alone without a tip */
	int bridge_advised; /* 1 when |agcl_mV| > EL_BRIDGE_ADVISE_mV */
} el_exchange;

/* The offsets of a bath exchange OLD -> NEW at t_C (definitions above).
 * Junctions by the Henderson equation.  Errors: t_C out of range; bare
 * ground with an activity not > 0 (a Cl--free bath leaves a bare Ag/AgCl
 * electrode without a defined potential); bridge ground without both
 * bridge arrays; one tip array without the other; any jn_henderson_mV
 * error (prefixed with which junction). */
int el_exchange_shift_mV(const el_exchange_in *in, double t_C, el_exchange *res,
			 char *err);

/* Recording configurations, for el_true_mV. */
typedef enum {
	EL_WHOLE_CELL = 0, /* pipette solution = inside of the cell */
	EL_OUTSIDE_OUT,    /* pipette solution on the inner face */
	EL_INSIDE_OUT,     /* bath on the inner face */
	EL_CELL_ATTACHED   /* pipette solution on the outer face of a patch
			    * of an intact cell */
} el_config;

/* The true membrane potential from an amplifier reading v_read_mV (a
 * command or a measured reversal potential), the LJP at zeroing
 * (pipette | the bath zeroed in) and the ground term g of any bath change
 * since (0 when none; el_exchange.ground_mV):
 *   whole-cell, outside-out:  Vm = v - LJP0 - g
 *   inside-out:               Vm = -(v - LJP0 - g)
 *   cell-attached:            Vpatch - Vrest = -(v - LJP0 - g)
 *                             (the patch's potential relative to the
 *                             cell's resting potential)
 * Derivation in the header comment.  NAN when an input is not finite. */
double el_true_mV(el_config cfg, double v_read_mV, double ljp_zero_mV, double ground_mV);

/* 1 when a Cl- change this large on a bare Ag/AgCl ground calls for a
 * salt bridge: |agcl_term_mV| > EL_BRIDGE_ADVISE_mV (common practice). */
int el_bridge_advisable(double agcl_term_mV);

#endif
