/*
 * cmd_sweep.h - handler of `sweep`: one quantity (pH, a free metal,
 * osmolality, ionic strength, an equilibrium potential, the LJP of a pair,
 * a GHK reversal potential) followed over a range of a compound's amount
 * or of the temperature, as a table, a terminal plot, an SVG and a CSV.
 * Follows cmd_fn in command.h; the computation is in sweep.h.
 */
#ifndef IONMIX_CMD_SWEEP_H
#define IONMIX_CMD_SWEEP_H

#include "command.h"

/* sweep COMPOUND|temp FROM to TO [UNIT] [in SOLUTION] show QUANTITY
 *       [activities] [points N] [svg FILE] [csv FILE] [plain] */
int cmd_sweep(im_ctx *ctx, int argc, char **argv, char *err);

#endif
