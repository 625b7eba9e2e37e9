/*
 * cmd_junction.h - handlers of `junction` (the liquid junction potential
 * of a pipette | bath pair, with its breakdown and the corrections it
 * implies) and `exchange` (the offset a bath exchange brings with a bare
 * Ag/AgCl or a salt-bridge ground).  Each follows cmd_fn in command.h.
 * The physics is in junction.h and electrode.h; these only parse, look
 * up and print.
 */
#ifndef IONMIX_CMD_JUNCTION_H
#define IONMIX_CMD_JUNCTION_H

#include "command.h"

/* junction PIPETTE BATH [activities] [model henderson|planck|diffusion|all] */
int cmd_junction(im_ctx *ctx, int argc, char **argv, char *err);

/* exchange OLD NEW [pipette NAME] [ground agcl | ground bridge SALT CONC [UNIT]]
 * ("bridge SALT CONC [UNIT]" and "agcl" alone are accepted too) */
int cmd_exchange(im_ctx *ctx, int argc, char **argv, char *err);

#endif
