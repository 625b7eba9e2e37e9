/*
 * nernst.c - the Nernst equation.
 */
#include "nernst.h"

#include <math.h>

#include "common.h"

int nernst_mV(int z, double in_mM, double out_mM, double t_C, double *E_mV,
	      char *err)
{
	if (z == 0)
		return im_fail(err, "a neutral species has no equilibrium potential");
	if (!isfinite(in_mM) || !isfinite(out_mM) || !isfinite(t_C))
		return im_fail(err, "non-finite input");
	if (t_C <= -IM_ZERO_C_K)
		return im_fail(err, "temperature %g C is not a real temperature", t_C);
	if (in_mM <= 0 && out_mM <= 0)
		return im_fail(err, "absent from both sides");
	if (in_mM <= 0)
		return im_fail(err, "absent inside: no finite equilibrium potential");
	if (out_mM <= 0)
		return im_fail(err, "absent outside: no finite equilibrium potential");
	double E = im_rt_f_mV(t_C) / z * log(out_mM / in_mM);
	if (!isfinite(E))
		return im_fail(err, "Nernst potential out of range");
	*E_mV = E;
	return 0;
}
