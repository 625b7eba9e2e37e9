/*
 * shell.h - the interactive shell: the only module that includes GNU
 * readline (prompt, line editing, history, completion).
 */
#ifndef IONMIX_SHELL_H
#define IONMIX_SHELL_H

#include "command.h"

/* Run the readline loop on the terminal until end of input or `quit`.
 * Errors are reported and the loop goes on.  history_path may be NULL (no
 * persistent history).  Returns 0. */
int shell_run(im_ctx *ctx, const char *history_path);

/* The default history file: $XDG_STATE_HOME/ionmix/history, else
 * ~/.local/state/ionmix/history.  Caller frees. */
char *shell_history_path(void);

#endif
