/*
 * cmd_review.h - `review PIPETTE BATH`: the checks a careful
 * electrophysiologist runs before mixing, each with a verdict (fine,
 * check, problem) and the number behind it.
 */
#ifndef IONMIX_CMD_REVIEW_H
#define IONMIX_CMD_REVIEW_H

#include "command.h"

int cmd_review(im_ctx *ctx, int argc, char **argv, char *err);

#endif
