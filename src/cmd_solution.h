/*
 * cmd_solution.h - handlers for composing a solution and reading it
 * back: temp, activity, solution, add, set, remove, clear, show.  Each
 * follows cmd_fn in command.h: parse, call, render.
 */
#ifndef IONMIX_CMD_SOLUTION_H
#define IONMIX_CMD_SOLUTION_H

#include "command.h"

int cmd_temp(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_activity(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_solution(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_add(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_set(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_remove(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_clear(im_ctx *ctx, int argc, char **argv, char *err);
/* `targets [drop NAME]`: the targets of the current solution and whether
 * each is met; drop removes the rule and keeps the amount. */
int cmd_targets(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_show(im_ctx *ctx, int argc, char **argv, char *err);

#endif
