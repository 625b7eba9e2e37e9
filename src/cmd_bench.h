/*
 * cmd_bench.h - handlers for the bench: weigh (the bench sheet) and stock
 * (take a compound from a stock solution).  Each follows cmd_fn in
 * command.h: parse, call, render.
 */
#ifndef IONMIX_CMD_BENCH_H
#define IONMIX_CMD_BENCH_H

#include "command.h"

int cmd_weigh(im_ctx *ctx, int argc, char **argv, char *err);
int cmd_stock(im_ctx *ctx, int argc, char **argv, char *err);

#endif
