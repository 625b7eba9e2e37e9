/*
 * cmd_junction.h - handlers of `junction` (the liquid junction potential
 * of a pipette | bath pair, with its breakdown and the corrections it
 * implies) and `exchange` (the offset a bath exchange brings with a bare
 * Ag/AgCl or a salt-bridge ground).  Each follows cmd_fn in command.h.
 * The junction itself (species, mobilities, models, interval, breakdown)
 * is ljp.h's result; the physics is in junction.h, diffusion.h and
 * electrode.h; these only parse, look up and print.
 */
#ifndef IONMIX_CMD_JUNCTION_H
#define IONMIX_CMD_JUNCTION_H

#include "command.h"
#include "solution.h"

/* junction PIPETTE BATH [activities] [model henderson|planck|diffusion|all] */
int cmd_junction(im_ctx *ctx, int argc, char **argv, char *err);

/* exchange OLD NEW [pipette NAME] [ground agcl | ground bridge SALT CONC [UNIT]]
 * ("bridge SALT CONC [UNIT]" and "agcl" alone are accepted too) */
int cmd_exchange(im_ctx *ctx, int argc, char **argv, char *err);

/* The Henderson LJP (bath relative to pipette, mV) of two computed
 * solutions at t_C, from concentrations (act = 0) or activities, with its
 * interval from the mobility uncertainties (lo_mV, hi_mV may be NULL):
 * the one way every command turns solutions into a junction (through
 * ljp.c), so `correct for`, `erev corrected`, `review` and `junction`
 * agree.  Never refuses for want of a mobility (estimated ones widen the
 * interval); -1 with err for a side without ions or bad input. */
int cmdj_ljp(const sol_state *pip, const sol_state *bath, int act, double t_C, double *ljp_mV,
	     double *lo_mV, double *hi_mV, char *err);
/* The same without the interval. */
int cmdj_henderson_mV(const sol_state *pip, const sol_state *bath, int act, double t_C,
		      double *ljp_mV, char *err);

#endif
