/*
 * fuzz_recipe.c - libFuzzer target: the input is a script, written to a
 * file in a scratch directory and replayed with `run FILE` through
 * cmd_exec (cmd_run_stream: NUL bytes, over-long lines, nested `run`).
 *
 * Checks, besides the sanitizers: a failure has a one-line message and a
 * line number within the script (or within a file it ran); amounts stay
 * finite and in range; human output has no NaN or infinity; JSON output
 * is valid JSON lines.
 */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "command.h"
#include "common.h"
#include "units.h"

#include "fuzzutil.h"

static refdb *ref;
static char dbpath[600], script[600], runline[700];

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
	char err[IM_ERRLEN];
	(void)argc;
	(void)argv;
	FZ_CHECK(refdb_open(&ref, err) == 0, "%s", err);
	fz_scratch("fuzz-recipe");
	FZ_CHECK(chdir(fz_dir) == 0, "chdir %s", fz_dir);
	snprintf(dbpath, sizeof dbpath, "%s/user.db", fz_dir);
	snprintf(script, sizeof script, "%s/input.ionmix", fz_dir);
	snprintf(runline, sizeof runline, "run \"%s\"", script);
	return 0;
}

static void run_script(const char *bytes, size_t n, int json)
{
	char err[IM_ERRLEN];
	char *buf = NULL;
	size_t len = 0, lines = 1;
	out o = {NULL, NULL, 0, 0, NULL, 0};
	im_ctx ctx;
	int rc;
	FILE *f = fopen(script, "wb");
	FZ_CHECK(f != NULL, "cannot write %s", script);
	FZ_CHECK(fwrite(bytes, 1, n, f) == n && fclose(f) == 0, "short write");
	for (size_t i = 0; i < n; i++)
		lines += bytes[i] == '\n';
	o.fp = open_memstream(&buf, &len);
	o.errfp = o.fp;
	o.json = json;
	o.utf8 = 0;
	ctx_init(&ctx, ref, &o);
	ctx.ses->db_path = dbpath;
	err[0] = '\0';
	rc = cmd_exec(&ctx, runline, err);
	FZ_CHECK(rc == 0 || rc == -1, "cmd_exec returned %d", rc);
	if (rc) {
		fz_check_err(err, "run");
		if (ctx.errfile && strcmp(ctx.errfile, script) == 0)
			FZ_CHECK(ctx.errline >= 1 && (size_t)ctx.errline <= lines,
				 "error at line %d of a %zu-line script", ctx.errline, lines);
		out_error(&o, ctx.errfile, ctx.errline, err);
	}
	for (int i = 0; i < ctx.ses->ws.n; i++)
		for (int k = 0; k < ctx.ses->ws.sol[i]->n; k++) {
			double mM = ctx.ses->ws.sol[i]->items[k].mM;
			FZ_CHECK(isfinite(mM) && mM > 0 && mM <= UNITS_MAX_mM, "amount %g", mM);
		}
	FZ_CHECK(ctx.ses->temp_C >= 0 && ctx.ses->temp_C <= 60, "temperature %g", ctx.ses->temp_C);
	ctx_free(&ctx);
	fclose(o.fp);
	if (json)
		fz_check_json_lines(buf, len);
	else
		fz_check_finite_text(buf, len, bytes, n);
	free(buf);
	fz_empty_dir();
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	char *bytes = malloc(size + 1);
	memcpy(bytes, data, size);
	bytes[size] = '\0';
	fz_confine_paths(bytes, size);
	run_script(bytes, size, 0);
	run_script(bytes, size, 1);
	free(bytes);
	return 0;
}
