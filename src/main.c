/*
 * main.c - options, mode (shell, scripts, -e, standard input) and exit
 * status: 0 when every command succeeded, 1 when one failed outside the
 * interactive shell, 2 for a usage error, 3 when out of memory.
 */
#include <errno.h>
#include <langinfo.h>
#include <locale.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cmd_core.h"
#include "command.h"
#include "common.h"
#include "refdb.h"
#include "signals.h"
#include "shell.h"
#include "userdb.h"
#include "version.h"

static void usage(FILE *fp)
{
	fprintf(fp,
		"Usage: ionmix [OPTION]... [FILE]...\n"
		"Design pipette and bath solutions for voltage-clamp recording: free ions\n"
		"and activities, ionic strength, osmolarity, Nernst potentials, bench sheets.\n"
		"\n"
		"With no FILE, run the interactive shell on a terminal, or read commands\n"
		"from standard input.  With FILEs, run them as scripts, in order.\n"
		"\n"
		"  -e, --execute 'CMD; CMD'  run these commands (may be repeated)\n"
		"      --json                print each result as one JSON object per line\n"
		"      --db PATH             the database of saved solutions (default\n"
		"                            $IONMIX_DB, else $XDG_DATA_HOME/ionmix/ionmix.db)\n"
		"      --help                show this help and exit\n"
		"      --version             show the version and exit\n"
		"\n"
		"Exit status: 0 if every command succeeded, 1 if one failed, 2 for a usage\n"
		"error.  Type `help` in the shell for the commands.\n"
		"Results are estimates: confirm pH with a calibrated meter and osmolality\n"
		"with an osmometer.\n");
}

/* Run a script stream; report the failure with FILE:LINE and return 1. */
static int run_stream(im_ctx *ctx, FILE *fp, const char *name)
{
	char err[IM_ERRLEN];
	int line = 0;
	if (core_run_stream(ctx, fp, name, &line, err) == 0)
		return 0;
	if (ctx->errfile[0])
		out_error(ctx->out, ctx->errfile, ctx->errline, err);
	else
		out_error(ctx->out, name, line, err);
	return 1;
}

int main(int argc, char **argv)
{
	out o = {stdout, stderr, 0, 0};
	const char *db = NULL;
	/* scripts and -e commands run in the order given: an action is a
	 * file name, or an inline command marked by is_expr */
	char **acts = im_xcalloc(argc, sizeof *acts);
	int *is_expr = im_xcalloc(argc, sizeof *is_expr);
	int nact = 0, status = 0;
	char err[IM_ERRLEN];
	refdb *ref;
	im_ctx ctx;
	char *dbpath = NULL, *hist;

	setlocale(LC_CTYPE, ""); /* for readline and UTF-8 output; never LC_NUMERIC */
	o.utf8 = strcmp(nl_langinfo(CODESET), "UTF-8") == 0;

	for (int i = 1; i < argc; i++) {
		const char *a = argv[i];
		if (strcmp(a, "--help") == 0) {
			usage(stdout);
			status = 0;
			goto out;
		} else if (strcmp(a, "--version") == 0) {
			printf("ionmix %s\nCopyright (C) 2026 the ionmix developers\n"
			       "License GPLv3+: GNU GPL version 3 or later "
			       "<https://gnu.org/licenses/gpl.html>.\n"
			       "This is free software: you are free to change and redistribute it.\n"
			       "There is NO WARRANTY, to the extent permitted by law.\n",
			       IONMIX_VERSION);
			status = 0;
			goto out;
		} else if (strcmp(a, "--json") == 0) {
			o.json = 1;
		} else if (strcmp(a, "--db") == 0 || strncmp(a, "--db=", 5) == 0) {
			if (a[4] == '=')
				db = a + 5;
			else if (++i < argc)
				db = argv[i];
			else
				goto missing;
		} else if (strcmp(a, "-e") == 0 || strcmp(a, "--execute") == 0) {
			if (++i >= argc)
				goto missing;
			is_expr[nact] = 1;
			acts[nact++] = argv[i];
		} else if (strcmp(a, "--") == 0) {
			while (++i < argc)
				acts[nact++] = argv[i];
		} else if (a[0] == '-' && a[1] != '\0') {
			fprintf(stderr, "ionmix: unknown option '%s'\nTry 'ionmix --help'.\n", a);
			status = 2;
			goto out;
		} else {
			acts[nact++] = argv[i];
		}
	}

	/* a database that would save nowhere lasting is a usage error */
	if (db ? udb_check_path(db, err) : udb_default_path(&dbpath, err)) {
		fprintf(stderr, "ionmix: %s\n", err);
		status = 2;
		goto out;
	}
	if (db)
		dbpath = im_xstrdup(db);
	if (refdb_open(&ref, err)) {
		fprintf(stderr, "ionmix: %s\n", err);
		status = 1;
		goto out;
	}
	ctx_init(&ctx, ref, &o);
	sig_install(nact == 0 && isatty(STDIN_FILENO) && isatty(STDOUT_FILENO) && !o.json);
	if (ctx_load_chemistry(&ctx, err)) {
		fprintf(stderr, "ionmix: equilibria data do not load: %s\n", err);
		ctx_free(&ctx);
		refdb_close(ref);
		status = 1;
		goto out;
	}
	ctx.db_path = dbpath; /* NULL: no usable place (udb_nowhere says why) */

	for (int i = 0; i < nact && status == 0; i++) {
		FILE *fp;
		if (is_expr[i]) {
			ctx.errfile[0] = '\0';
			if (cmd_exec(&ctx, acts[i], err)) {
				out_error(&o, ctx.errfile[0] ? ctx.errfile : NULL, ctx.errline, err);
				status = 1;
			}
			continue;
		}
		fp = strcmp(acts[i], "-") == 0 ? stdin : fopen(acts[i], "r");
		if (!fp) {
			snprintf(err, sizeof err, "cannot open %s: %s", acts[i], strerror(errno));
			out_error(&o, NULL, 0, err);
			status = 1;
			break;
		}
		status = run_stream(&ctx, fp, acts[i]);
		if (fp != stdin)
			fclose(fp);
	}
	if (nact == 0) {
		if (isatty(STDIN_FILENO) && isatty(STDOUT_FILENO) && !o.json) {
			hist = shell_history_path();
			ctx.interactive = 1;
			shell_run(&ctx, hist);
			free(hist);
		} else {
			status = run_stream(&ctx, stdin, "(stdin)");
		}
	}
	ctx_free(&ctx);
	refdb_close(ref);
	free(dbpath);
	free(acts);
	free(is_expr);
	return status;

missing:
	fprintf(stderr, "ionmix: option '%s' needs an argument\nTry 'ionmix --help'.\n",
		argv[argc - 1]);
	status = 2;
out: /* before the reference data are open */
	free(dbpath);
	free(acts);
	free(is_expr);
	return status;
}
