/*
 * cmd_store.h - handlers that keep solutions: save, load, list, delete
 * (the user's database) and export (a recipe file).  Each follows cmd_fn
 * in command.h: parse, call, render.
 */
#ifndef IONMIX_CMD_STORE_H
#define IONMIX_CMD_STORE_H

#include "command.h"

int cmd_save(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_load(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_list(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_delete(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_export(im_ctx *ctx, int argc, char **argv, char *err);
/* versions NAME: the saved versions; undo: take back the last change. */
int cmd_versions(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_undo(im_ctx *ctx, int argc, char **argv, char *err);

#endif
