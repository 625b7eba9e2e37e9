/*
 * cmd_core.h - handlers of the core commands: temperature, solutions,
 * show, nernst, the bench sheet, saving and replaying.  Each follows
 * cmd_fn in command.h.
 */
#ifndef IONMIX_CMD_CORE_H
#define IONMIX_CMD_CORE_H

#include "command.h"

int cmd_temp(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_activity(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_solution(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_add(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_set(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_remove(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_clear(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_show(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_nernst(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_weigh(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_stock(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_save(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_load(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_list(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_delete(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_export(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_run(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_info(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_compounds(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_help(im_ctx *ctx, int argc, char **argv, char *err);

/* Shared by other handlers: the named solution of the workspace, or the
 * current one when name is NULL; -1 with err naming it when absent. */
int core_solution(im_ctx *ctx, const char *name, solution **out, char *err);
/* Look up a compound; the error suggests the nearest names. */
int core_compound(im_ctx *ctx, const char *name, const rd_compound **out, char *err);

/* Run the lines of an open stream as a script (file names messages).
 * Stops at the first failing line: err holds "message" and *line_out
 * the line number.  Used by `run` and by main for script files. */
int core_run_stream(im_ctx *ctx, void *fp, const char *file, int *line_out,
		    char *err);

#endif
