/*
 * cmd_ghk.h - the shell commands on GHK reversal potentials: erev, ratio
 * and iv.  Handlers of type cmd_fn (command.h): they read solutions from the
 * workspace, call ghk.c and plot.c, and print through output.h.  They change
 * nothing in the workspace.  Synopses:
 *   erev INSIDE OUTSIDE ION=P [ION=P ...] [activities] [corrected]
 *   ratio INSIDE OUTSIDE ION REF at MV [ION=P ...] [activities]
 *   ratio INSIDE OUTSIDE ION REF shift FROM_BATH TO_BATH by MV [ION=P ...]
 *   iv INSIDE OUTSIDE ION=P [...] [from V1] [to V2] [step DV] [rect MV]
 *      [svg FILE] [csv FILE] [plain] [activities]
 * P is in cm/s or relative (only ratios matter for potentials; iv's current
 * density takes P as cm/s).
 */
#ifndef IONMIX_CMD_GHK_H
#define IONMIX_CMD_GHK_H

#include "command.h"

int cmd_ghk_erev(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_ghk_ratio(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_ghk_iv(im_ctx *ctx, int argc, char **argv, char *err);

#endif
