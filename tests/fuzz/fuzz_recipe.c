/*
 * fuzz_recipe.c - libFuzzer target: the input is a script, run from
 * memory by the one line loop (cmd_run_stream over fmemopen: NUL bytes,
 * over-long lines, the BOM, ';' and '#'), with human output when its
 * length is even and --json output when it is odd (mutations change the
 * length all the time, so both are reached; running both for every input
 * doubled the cost of the slow commands, junction above all).  A script that says "run" is also written to
 * input.ionmix in the scratch directory first, so that a nested
 * `run input.ionmix` (and its depth limit) is reached too.
 *
 * Checks, besides the sanitizers: a failure has a one-line message and a
 * line number within the script (or within a file it ran); amounts stay
 * finite and in range; human output has no NaN or infinity in a numeric
 * position; JSON output is valid JSON lines.
 *
 * Persistent: the reference database is opened once; per input there are
 * only the memory streams and a context with the chemistry data (no file
 * unless the script runs or saves one).
 *
 * Built with FUZZING_BUILD_MODE_UNSAFE_FOR_PRODUCTION (the Makefile's fuzz
 * build): the junction solvers bound the work of one input (free
 * diffusion: 51 to 101 grid nodes for 0.05 mV; Planck: 100 to 400 steps for
 * 1e-4 mV; see DEVELOPERS.md), with both the converged result and the
 * "finest grid / most steps reached" error still common, so an input never
 * asks for the seconds of numeric work the normal build may spend.
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
static char dbpath[600], script[600];

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
	return 0;
}

static void run_script(const char *bytes, size_t n, int json)
{
	char err[IM_ERRLEN];
	char *buf = NULL;
	size_t len = 0, lines = 1;
	out o = {0};
	im_ctx ctx;
	int rc;
	FILE *in;
	int line = 0, says_run = 0;
	for (size_t i = 0; i + 3 <= n && !says_run; i++)
		says_run = fz_eq(bytes + i, "run", 3);
	if (says_run) {
		FILE *f = fopen(script, "wb");
		FZ_CHECK(f != NULL, "cannot write %s", script);
		FZ_CHECK(fwrite(bytes, 1, n, f) == n && fclose(f) == 0, "short write");
	}
	for (size_t i = 0; i < n; i++)
		lines += bytes[i] == '\n';
	o.fp = open_memstream(&buf, &len);
	o.errfp = o.fp;
	o.json = json;
	o.utf8 = 0;
	ctx_init(&ctx, ref, &o);
	/* the chemistry as the program has it (speciation, titration,
	 * targets); loaded per input (about 2 us) because `constants`
	 * changes its picks */
	FZ_CHECK(ctx_load_chemistry(&ctx, err) == 0, "chemistry: %s", err);
	ctx.ses->db_path = dbpath;
	err[0] = '\0';
	/* fmemopen takes no empty buffer: an empty script reads as "" */
	in = fmemopen(n ? (void *)bytes : (void *)"", n ? n : 1, "r");
	FZ_CHECK(in != NULL, "fmemopen");
	rc = cmd_run_stream(&ctx, in, &line, err);
	fclose(in);
	FZ_CHECK(rc == 0 || rc == -1, "cmd_run_stream returned %d", rc);
	if (rc) {
		fz_check_err(err, "the script", n);
		if (!ctx.errfile)
			FZ_CHECK(line >= 1 && (size_t)line <= lines,
				 "error at line %d of a %zu-line script", line, lines);
		else if (strcmp(ctx.errfile, script) == 0 ||
			 strcmp(ctx.errfile, "input.ionmix") == 0)
			FZ_CHECK(ctx.errline >= 1 && (size_t)ctx.errline <= lines,
				 "error at line %d of a %zu-line script", ctx.errline, lines);
		out_error(&o, ctx.errfile ? ctx.errfile : "input", ctx.errfile ? ctx.errline : line,
			  err);
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
	run_script(bytes, size, (int)(size & 1));
	free(bytes);
	return 0;
}
