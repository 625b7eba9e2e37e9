/*
 * main.c - options, mode (shell, scripts, -e, standard input) and exit
 * status: 0 when every command succeeded, 1 when one failed outside the
 * interactive shell, 2 for a usage error, 3 when out of memory.
 */
#include <errno.h>
#include <getopt.h>
#include <langinfo.h>
#include <locale.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "command.h"
#include "common.h"
#include "refdb.h"
#include "signals.h"
#include "shell.h"
#include "session.h"
#include "userdb.h"
#include "version.h"

#define IONMIX_BUGS "the ionmix issue tracker, with the commands, their output and `ionmix --version`"

static void usage(FILE *fp)
{
	fprintf(fp,
		"Usage: ionmix [OPTION]... [FILE]...\n"
		"Design pipette and bath solutions for voltage-clamp recording: free ions\n"
		"and activities, ionic strength, osmolarity, Nernst potentials, bench sheets.\n"
		"\n"
		"With no FILE, run the interactive shell on a terminal, or read commands\n"
		"from standard input (always so with --json).  With FILEs, run them as\n"
		"scripts, in order; FILE - is standard input.\n"
		"\n"
		"  -e, --execute=CMD       run CMD ('CMD; CMD' runs several; may be repeated)\n"
		"      --json              print each result as one JSON object per line\n"
		"                          (the schemas are in the schemas/ folder)\n"
		"      --db=PATH           the database of saved solutions (default\n"
		"                          $IONMIX_DB, else $XDG_DATA_HOME/ionmix/ionmix.db)\n"
		"      --help              display this help and exit\n"
		"      --version           output version information and exit\n"
		"\n"
		"Long options may be abbreviated while unambiguous (--ex, --js).\n"
		"Exit status: 0 if every command succeeded, 1 if one failed (or a result\n"
		"could not be written), 2 for a usage error.  Type `help` in the shell for\n"
		"the commands.\n"
		"Results are estimates: confirm pH with a calibrated meter and osmolality\n"
		"with an osmometer.\n"
		"\n"
		"Report bugs to: " IONMIX_BUGS "\n");
}

/* Run a script stream; report the failure with FILE:LINE and return 1. */
static int run_stream(im_ctx *ctx, FILE *fp, const char *name)
{
	char err[IM_ERRLEN];
	int line = 0;
	if (cmd_run_stream(ctx, fp, &line, err) == 0)
		return 0;
	if (ctx->errfile)
		out_error(ctx->out, ctx->errfile, ctx->errline, err);
	else
		out_error(ctx->out, name, line, err);
	return 1;
}

static void version(void)
{
	printf("ionmix %s\nCopyright (C) 2026 the ionmix developers\n"
	       "License GPLv3+: GNU GPL version 3 or later "
	       "<https://gnu.org/licenses/gpl.html>.\n"
	       "This is free software: you are free to change and redistribute it.\n"
	       "There is NO WARRANTY, to the extent permitted by law.\n",
	       IONMIX_VERSION);
}

/* What the options ask for: scripts and -e commands run in the order
 * given (an action is a file name, or an inline command when is_expr). */
typedef struct opts {
	const char *db;
	int json;
	char **acts;
	int *is_expr;
	int nact;
} opts;

enum { OPT_JSON = 256, OPT_DB, OPT_HELP, OPT_VERSION };

/* Parse the command line with getopt_long (abbreviations, --opt=VALUE,
 * -eCMD).  Returns -1 to go on, or the exit status (0 after --help or
 * --version, 2 for a usage error, with a message on stderr). */
static int parse_opts(int argc, char **argv, opts *o)
{
	static const struct option longs[] = {
		{"execute", required_argument, NULL, 'e'},
		{"json", no_argument, NULL, OPT_JSON},
		{"db", required_argument, NULL, OPT_DB},
		{"help", no_argument, NULL, OPT_HELP},
		{"version", no_argument, NULL, OPT_VERSION},
		{NULL, 0, NULL, 0},
	};
	int c;
	opterr = 0;
	/* "-": file names come back in place (as option 1), so scripts and
	 * -e commands keep the order given; ":": a missing argument is told
	 * apart from an unknown option.  After "--" every word is a file. */
	while ((c = getopt_long(argc, argv, "-:e:", longs, NULL)) != -1) {
		switch (c) {
		case 1:
			o->acts[o->nact++] = optarg;
			break;
		case 'e':
			o->is_expr[o->nact] = 1;
			o->acts[o->nact++] = optarg;
			break;
		case OPT_JSON:
			o->json = 1;
			break;
		case OPT_DB:
			if (!*optarg) {
				fprintf(stderr, "ionmix: --db: an empty path names no database "
						"(see --help)\n");
				return 2;
			}
			o->db = optarg;
			break;
		case OPT_HELP:
			usage(stdout);
			return 0;
		case OPT_VERSION:
			version();
			return 0;
		case ':':
			fprintf(stderr, "ionmix: option '%s' needs an argument\nTry 'ionmix --help'.\n",
				argv[optind - 1]);
			return 2;
		default:
			fprintf(stderr, "ionmix: unknown option '%s' (or an ambiguous abbreviation)\n"
					"Try 'ionmix --help'.\n", argv[optind - 1]);
			return 2;
		}
	}
	for (int i = optind; i < argc; i++)
		o->acts[o->nact++] = argv[i];
	return -1;
}

/* Run the actions in order; the exit status. */
static int run_actions(im_ctx *ctx, const opts *op)
{
	char err[IM_ERRLEN];
	int status = 0;
	for (int i = 0; i < op->nact && status == 0 && !ctx->quit; i++) {
		FILE *fp;
		if (op->is_expr[i]) {
			if (cmd_exec(ctx, op->acts[i], err)) {
				out_error(ctx->out, ctx->errfile, ctx->errline, err);
				status = 1;
			}
			continue;
		}
		fp = strcmp(op->acts[i], "-") == 0 ? stdin : fopen(op->acts[i], "r");
		if (!fp) {
			snprintf(err, sizeof err, "cannot open %s: %s", op->acts[i], strerror(errno));
			out_error(ctx->out, NULL, 0, err);
			return 1;
		}
		status = run_stream(ctx, fp, strcmp(op->acts[i], "-") == 0 ? "(stdin)" : op->acts[i]);
		if (fp != stdin)
			fclose(fp);
	}
	return status;
}

/* Standard output must have taken every result: a full disk or a closed
 * pipe is exit status 1 with a message, never a silent 0. */
static int check_stdout(out *o, int status)
{
	int failed = out_failed(o);
	if (fclose(stdout) != 0)
		failed = 1;
	if (failed && !o->wsaid) { /* else a message has said it */
		fprintf(stderr, "ionmix: cannot write to standard output: %s\n",
			strerror(o->werrno ? o->werrno : errno ? errno : EIO));
		return 1;
	}
	return failed && status == 0 ? 1 : status;
}

int main(int argc, char **argv)
{
	out o = {.fp = stdout, .errfp = stderr};
	opts op = {0};
	int status;
	char err[IM_ERRLEN];
	refdb *ref;
	im_ctx ctx;
	char *dbpath = NULL, *hist;

	setlocale(LC_CTYPE, ""); /* for readline and UTF-8 output; never LC_NUMERIC */
	o.utf8 = strcmp(nl_langinfo(CODESET), "UTF-8") == 0;
	op.acts = im_xcalloc((size_t)argc + 1, sizeof *op.acts);
	op.is_expr = im_xcalloc((size_t)argc + 1, sizeof *op.is_expr);
	status = parse_opts(argc, argv, &op);
	if (status >= 0)
		goto out;
	o.json = op.json;
	status = 0;
	/* a database that would save nowhere lasting is a usage error */
	if (op.db ? udb_check_path(op.db, err) : udb_default_path(&dbpath, err)) {
		fprintf(stderr, "ionmix: %s\n", err);
		status = 2;
		goto out;
	}
	if (op.db)
		dbpath = im_xstrdup(op.db);
	if (refdb_open(&ref, err)) {
		fprintf(stderr, "ionmix: %s\n", err);
		status = 1;
		goto out;
	}
	ctx_init(&ctx, ref, &o);
	sig_install(op.nact == 0 && isatty(STDIN_FILENO) && isatty(STDOUT_FILENO) && !o.json);
	if (ctx_load_chemistry(&ctx, err)) {
		fprintf(stderr, "ionmix: equilibria data do not load: %s\n", err);
		ctx_free(&ctx);
		refdb_close(ref);
		status = 1;
		goto out;
	}
	ctx.ses->db_path = dbpath; /* NULL: no usable place (udb_nowhere says why) */

	status = run_actions(&ctx, &op);
	if (op.nact == 0) {
		if (isatty(STDIN_FILENO) && isatty(STDOUT_FILENO) && !o.json) {
			hist = shell_history_path();
			ctx.interactive = 1;
			ctx.ses->wait_notice = o.errfp;
			shell_run(&ctx, hist);
			free(hist);
		} else {
			status = run_stream(&ctx, stdin, "(stdin)");
		}
	}
	ctx_free(&ctx);
	refdb_close(ref);
out:
	free(dbpath);
	status = check_stdout(&o, status);
	free(op.acts);
	free(op.is_expr);
	return status;
}
