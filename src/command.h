/*
 * command.h - the command table, the context handlers work on, dispatch
 * of one line, and the one line loop that serves the terminal, scripts,
 * `run` and standard input alike.  The table in command.c is the only
 * list of commands: dispatch, argument-count checks, help, completion and
 * the JSON contract test read it.
 */
#ifndef IONMIX_COMMAND_H
#define IONMIX_COMMAND_H

#include "output.h"
#include "session.h"

typedef struct im_ctx {
	session *ses;             /* the state commands share; owned by main */
	out *out;                 /* where results go; owned by main */
	int interactive;          /* 1 in the readline shell */
	int run_depth;            /* nesting of `run`, to stop recursion */
	int quit;                 /* set by `quit`: every loop stops */
	int batch;                /* 1 while a script from a file runs: results
				   * are not flushed command by command
				   * (cmd_run_stream) */
	/* Where the last failure happened when it was inside a script run by
	 * `run` (NULL otherwise; owned, set by cmd_loop); the top level
	 * reports it. */
	char *errfile;
	int errline;
} im_ctx;

/* A handler gets the words after the command name (argv[0] is the command
 * itself) and returns 0, or -1 with a one-line message in err.  It parses
 * its words, calls the calculators and renders one result (render.h). */
typedef int (*cmd_fn)(im_ctx *ctx, int argc, char **argv, char *err);

/* What a command's arguments complete to. */
typedef enum {
	COMPL_NONE, COMPL_COMPOUND, COMPL_SOLUTION, COMPL_SAVED, COMPL_FILE,
	COMPL_ION, COMPL_COMMAND
} compl_kind;

typedef struct cmd_def {
	const char *name;
	const char *synopsis;  /* arguments, e.g. "COMPOUND AMOUNT [UNIT]" */
	const char *help;      /* one line */
	int min_args, max_args; /* counted without the name; -1 = no limit */
	cmd_fn fn;
	compl_kind compl;       /* first argument */
	compl_kind compl_rest;  /* later arguments */
	int keep_on_fail;       /* 1: do not roll the workspace back when the
				 * handler fails (run: earlier lines stand) */
} cmd_def;

const cmd_def *cmd_table(int *n);
const cmd_def *cmd_lookup(const char *name);

/* Split one command into words (shell-like: "double quotes" and 'single
 * quotes' group, # starts a comment outside quotes; ';' is cmd_exec's).
 * Returns the word count, or -1 with err on bad input (unterminated
 * quote, too many words).  Words point into buf, which is modified. */
int cmd_split(char *buf, char **argv, int max, char *err);

#define CMD_LINE_MAX 4096 /* bytes in one input line */
#define CMD_ARGS_MAX 64   /* words in one command */
/* bytes in one script or input stream (16 MiB): /dev/zero or an endless
 * stream ends with an error instead of running or growing forever */
#define CMD_SCRIPT_MAX (16 * 1024 * 1024)

/* Run one line: it may hold several commands separated by ';' outside
 * quotes.  Each is split, looked up, checked for arity and handed to its
 * handler; the first failure stops the line.  Empty and comment lines
 * succeed.  On failure err holds the message and the session is as it
 * was before the failing command (the handler's changes are rolled back).
 * A result that could not be written (standard output full or closed)
 * is a failure too. */
int cmd_exec(im_ctx *ctx, const char *line, char *err);

/* Where cmd_loop reads lines: next() sets *line (owned by the reader,
 * valid until the next call) and *len (bytes, without a terminating NUL;
 * the line may hold NUL bytes, which the loop refuses) and returns 1, or
 * returns 0 at the end, -1 with errno set on a read error, or -2 when the
 * input goes past CMD_SCRIPT_MAX bytes. */
typedef struct cmd_reader {
	int (*next)(void *arg, char **line, size_t *len);
	void *arg;
} cmd_reader;

/* A reader of a stdio stream with bounded memory (one line of at most
 * CMD_LINE_MAX + 1 bytes is held; a longer one is returned cut at that
 * length, which the loop refuses, and its rest skipped); it returns -2
 * past CMD_SCRIPT_MAX bytes.  Free with cmd_reader_file_done. */
void cmd_reader_file(cmd_reader *r, FILE *fp);
void cmd_reader_file_done(cmd_reader *r);

/* The one line loop, for the terminal, scripts, `run` and standard
 * input.  Rules: a UTF-8 byte-order mark before the first line is
 * skipped; a line longer than CMD_LINE_MAX bytes, or one holding a NUL or
 * another control byte, is an error, and so is input beyond
 * CMD_SCRIPT_MAX bytes; ';' separates commands and '#'
 * starts a comment (cmd_exec).  When ctx->interactive, an error is
 * reported on the output and the loop goes on; otherwise the loop stops
 * at the first error and returns -1 with err and *line_out its line
 * number (ctx->errfile / errline name a deeper script when the failure
 * was inside `run`).  `quit` ends the loop (and every enclosing one).
 * Returns 0 at the end of input. */
int cmd_loop(im_ctx *ctx, const cmd_reader *rd, int *line_out, char *err);

/* cmd_loop over a stdio stream (the reader of cmd_reader_file). */
int cmd_run_stream(im_ctx *ctx, FILE *fp, int *line_out, char *err);

/* Start a context with a new session on ref (not owned) and the output o
 * (not owned); ctx owns the session and ctx_free frees it. */
void ctx_init(im_ctx *ctx, refdb *ref, out *o);
/* Load the chemistry data into the session (ses_load_chemistry). */
int ctx_load_chemistry(im_ctx *ctx, char *err);
void ctx_free(im_ctx *ctx);

#endif
