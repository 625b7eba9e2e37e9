/*
 * cmd_ref.h - handlers that read the reference data: info (a compound or
 * an ion, with sources) and compounds (the list).  Each follows cmd_fn in
 * command.h: parse, call, render.
 */
#ifndef IONMIX_CMD_REF_H
#define IONMIX_CMD_REF_H

#include "command.h"

int cmd_info(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_compounds(im_ctx *ctx, int argc, char **argv, char *err);

#endif
