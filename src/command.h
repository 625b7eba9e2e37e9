/*
 * command.h - the command table, the context handlers work on, and
 * dispatch of one line.  The table in command.c is the only list of
 * commands: dispatch, argument-count checks, help and completion read it.
 */
#ifndef IONMIX_COMMAND_H
#define IONMIX_COMMAND_H

#include "output.h"
#include "refdb.h"
#include "solution.h"

struct userdb;

typedef struct im_ctx {
	refdb *ref;               /* reference data, owned by main */
	spec_data *chem;          /* equilibria, owned by main; NULL: no speciation */
	osm_data *osm;            /* Pitzer data, owned by main; NULL: no osmolality */
	sol_env env;              /* filled by ctx_env() */
	struct userdb *user;      /* user's database, opened lazily; may be NULL */
	const char *db_path;      /* user db path (owned by main) */
	workspace ws;
	out *out;
	double temp_C;            /* `temp`, default 25 */
	act_model model;          /* `activity davies|dh`, default Davies */
	int interactive;          /* 1 in the readline shell */
	int run_depth;            /* nesting of `run`, to stop recursion */
	/* Where the last failure happened when it was inside a script run by
	 * `run` (errfile[0] == 0 otherwise); the top level reports it. */
	char errfile[512];
	int errline;
} im_ctx;

/* A handler gets the words after the command name (argv[0] is the command
 * itself) and returns 0, or -1 with a one-line message in err. */
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
 * quotes' group, # starts a comment outside quotes; ';' is cmd_exec's).  Returns the word count, or -1 with err on bad input
 * (unterminated quote, too many words, control bytes).  Words point into
 * buf, which is modified. */
int cmd_split(char *buf, char **argv, int max, char *err);

#define CMD_LINE_MAX 4096 /* bytes in one input line */
#define CMD_ARGS_MAX 64   /* words in one command */

/* Run one line: it may hold several commands separated by ';' outside
 * quotes.  Each is split, looked up, checked for arity and handed to its
 * handler; the first failure stops the line.  Empty and comment lines
 * succeed.  On failure err holds the message and the workspace is as it
 * was before the failing command (the handler's changes are rolled back). */
int cmd_exec(im_ctx *ctx, const char *line, char *err);

void ctx_init(im_ctx *ctx, refdb *ref, out *o);
/* Load the equilibria and Pitzer tables into ctx (owned by ctx, freed by
 * ctx_free).  -1 with err when they do not load. */
int ctx_load_chemistry(im_ctx *ctx, char *err);
/* The environment sol_compute needs, from the context's temperature,
 * activity model and chemistry data; points into ctx. */
const sol_env *ctx_env(im_ctx *ctx);
/* The user's database, opened on first use.  create = 1 creates the file;
 * create = 0 returns NULL (no error) when it does not exist yet. */
struct userdb *ctx_userdb(im_ctx *ctx, int create, char *err, int *failed);
void ctx_free(im_ctx *ctx);

#endif
