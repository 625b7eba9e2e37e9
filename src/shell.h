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

/* The completer, without a terminal: line is the whole line, the word
 * being completed is line[start, end) (after an opening quote when
 * quoted is 1).  Returns readline's array (caller frees each string and
 * the array): [0] what replaces the word (the one match, or the longest
 * common prefix of all, never shorter than what was typed, in the
 * canonical case), then the matches, NULL-terminated; NULL when nothing
 * matches.  *files = 1: the place takes a file name (readline's own
 * completion applies; NULL returned).  Compounds match by name or alias,
 * case-insensitively, and complete to the canonical name (quoted when it
 * holds a space and no quote was typed); a name with spaces continues
 * over unquoted words; after `with`: titrants (ph), sources of the metal
 * (free), neutral fillers (osmo); after `remove`: the compounds present;
 * after a number in add/set/stock/free: the units. */
char **shell_complete(im_ctx *ctx, const char *line, int start, int end, int quoted,
		      int *files);

/* The default history file: $XDG_STATE_HOME/ionmix/history, else
 * ~/.local/state/ionmix/history.  Caller frees. */
char *shell_history_path(void);

#endif
