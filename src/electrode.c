/*
 * electrode.c - Ag/AgCl electrode potentials and bath-exchange offsets.
 * Signs and their derivation are in electrode.h.
 */
#include "electrode.h"

#include <math.h>
#include <string.h>

#include "common.h"

double el_agcl_mV(double a_cl_mM, double t_C)
{
	if (!isfinite(a_cl_mM) || a_cl_mM <= 0 || !isfinite(t_C) || t_C < JN_T_MIN_C ||
	    t_C > JN_T_MAX_C)
		return NAN;
	/* Nernst for AgCl + e- = Ag + Cl-: E = E0 - (RT/F) ln a(Cl-), E0 := 0 */
	return -im_rt_f_mV(t_C) * log(a_cl_mM / 1000.0);
}

int el_bridge_advisable(double agcl_term_mV)
{
	return fabs(agcl_term_mV) > EL_BRIDGE_ADVISE_mV;
}

double el_true_mV(el_config cfg, double v_read_mV, double ljp_zero_mV, double ground_mV)
{
	double v = v_read_mV - ljp_zero_mV - ground_mV;
	if (!isfinite(v))
		return NAN;
	switch (cfg) {
	case EL_WHOLE_CELL:
	case EL_OUTSIDE_OUT:
		return v;
	case EL_INSIDE_OUT:
	case EL_CELL_ATTACHED:
		return -v;
	}
	return NAN;
}

static int junction(const char *what, const jn_ion *ions, int n, double t_C, double *v,
		    char *err)
{
	char e[IM_ERRLEN];
	if (jn_henderson_mV(ions, n, t_C, v, e) < 0)
		return im_fail(err, "%s: %s", what, e);
	return 0;
}

int el_exchange_shift_mV(const el_exchange_in *in, double t_C, el_exchange *res,
			 char *err)
{
	el_exchange r;
	if (!in || !res)
		return im_fail(err, "no exchange given");
	if (!isfinite(t_C) || t_C < JN_T_MIN_C || t_C > JN_T_MAX_C)
		return im_fail(err, "temperature %g C is outside %g to %g C", t_C,
			       JN_T_MIN_C, JN_T_MAX_C);
	memset(&r, 0, sizeof r);

	/* the bare Ag/AgCl term, g = G(NEW) - G(OLD) = -(E_el(NEW) - E_el(OLD)) */
	if (in->ground == EL_GROUND_AGCL || in->a_cl_old_mM != 0 ||
	    in->a_cl_new_mM != 0) {
		double a0 = in->a_cl_old_mM, a1 = in->a_cl_new_mM;
		if (!isfinite(a0) || !isfinite(a1) || a0 < 0 || a1 < 0)
			return im_fail(err, "Cl- activity must be a finite number >= 0");
		if (a0 == 0 || a1 == 0) {
			if (in->ground == EL_GROUND_AGCL)
				return im_fail(err,
					       "the %s bath has no Cl-: a bare Ag/AgCl "
					       "ground has no defined potential there; "
					       "use a salt bridge",
					       a0 == 0 ? "old" : "new");
		} else {
			r.agcl_mV = el_agcl_mV(a0, t_C) - el_agcl_mV(a1, t_C);
			r.have_agcl = 1;
		}
	}
	if (in->ground == EL_GROUND_AGCL) {
		r.ground_mV = r.agcl_mV;
	} else if (in->ground == EL_GROUND_BRIDGE) {
		if (!in->bridge_old || !in->bridge_new)
			return im_fail(err,
				       "a salt-bridge ground needs the bridge filling");
		if (junction("bridge | old bath", in->bridge_old, in->n_bridge_old, t_C,
			     &r.bridge_old_mV, err) < 0 ||
		    junction("bridge | new bath", in->bridge_new, in->n_bridge_new, t_C,
			     &r.bridge_new_mV, err) < 0)
			return -1;
		/* G(X) = LJP(bridge | X) - E_el(bridge filling); the electrode
		 * term is the same before and after, so it cancels */
		r.ground_mV = r.bridge_new_mV - r.bridge_old_mV;
	} else {
		return im_fail(err, "unknown kind of ground electrode");
	}

	if ((in->tip_old == NULL) != (in->tip_new == NULL))
		return im_fail(err,
			       "the tip junction needs the pipette against both baths");
	if (in->tip_old) {
		if (junction("pipette | old bath", in->tip_old, in->n_tip_old, t_C,
			     &r.tip_old_mV, err) < 0 ||
		    junction("pipette | new bath", in->tip_new, in->n_tip_new, t_C,
			     &r.tip_new_mV, err) < 0)
			return -1;
		r.have_tip = 1;
	}
	/* open tip in NEW, zeroed in OLD:
	 * V = E_el(pip) - LJP(pip|NEW) + G(NEW) + offset, offset cancelling
	 * the same in OLD, so V = g - (LJP(pip|NEW) - LJP(pip|OLD)) */
	r.shift_mV = r.ground_mV - (r.tip_new_mV - r.tip_old_mV) + 0.0; /* no -0 */
	r.ground_mV += 0.0;
	r.bridge_advised = r.have_agcl && el_bridge_advisable(r.agcl_mV);
	if (!isfinite(r.shift_mV) || !isfinite(r.ground_mV))
		return im_fail(err, "exchange offset is not finite");
	*res = r;
	return 0;
}
