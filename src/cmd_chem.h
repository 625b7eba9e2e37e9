/*
 * cmd_chem.h - handlers of the solution-chemistry commands: `ph` (titrate
 * to a pH), `gas` (equilibrate with CO2), `free` (the total of a metal
 * source that gives a free Ca2+ or Mg2+), `osmo` (reach an osmolality) and
 * `constants` (list or pick the compilation of equilibrium constants).
 * The chemistry is in speciation.h and osmotic.h; these parse and print.
 */
#ifndef IONMIX_CMD_CHEM_H
#define IONMIX_CMD_CHEM_H

#include "command.h"

int cmd_ph(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_gas(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_free(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_osmo(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_constants(im_ctx *ctx, int argc, char **argv, char *err);

#endif
