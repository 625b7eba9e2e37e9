/*
 * cmd_define.h - `define`: compounds and ions of the user's own, checked
 * (formula weight from formula.c, yields that balance the charge, names
 * that do not repeat shipped ones) and stored in the user database.
 */
#ifndef IONMIX_CMD_DEFINE_H
#define IONMIX_CMD_DEFINE_H

#include "command.h"

/* define COMPOUND formula FORMULA [yields ION N ...] [hazard TEXT] [source TEXT]
 * define ion SYMBOL charge Z [mobility D source TEXT] [formula FORMULA]
 * (cmd_fn) */
int cmd_define(im_ctx *ctx, int argc, char **argv, char *err);
/* fw COMPOUND GRAMS_PER_MOL|off: the bottle's formula weight for the
 * current solution (weigh uses it). */
int cmd_fw(im_ctx *ctx, int argc, char **argv, char *err);

#endif
