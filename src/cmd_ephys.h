/*
 * cmd_ephys.h - handlers of the electrophysiology calculators that live
 * here: nernst.  (junction and exchange are in cmd_junction.c; erev,
 * ratio and iv in cmd_ghk.c.)  Each follows cmd_fn in command.h.
 */
#ifndef IONMIX_CMD_EPHYS_H
#define IONMIX_CMD_EPHYS_H

#include "command.h"

int cmd_nernst(im_ctx *ctx, int argc, char **argv, char *err);

#endif
