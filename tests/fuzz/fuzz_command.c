/*
 * fuzz_command.c - libFuzzer target: the input is one command line, run
 * by cmd_exec on a fresh context that holds two solutions (bath, pip),
 * once with human output and once with --json output.
 *
 * Checks, besides the sanitizers: a failure has a one-line message; a
 * failing line without ';' (and not `run`) leaves the workspace, the
 * temperature and the activity model as they were; every amount in the
 * workspace stays finite and within (0, UNITS_MAX_mM]; human output has no
 * NaN or infinity; every JSON line is valid JSON.  Files the line names
 * stay in a scratch directory that is emptied after each input.
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
static workspace base;
static char dbpath[600];

static const char setup_lines[] =
	"solution bath; add NaCl 140; add KCl 5; add CaCl2.2H2O 2; add MgCl2.6H2O 1; "
	"add HEPES 10; add glucose 10; stock CaCl2.2H2O 1 M; "
	"solution pip; add K-gluconate 135; add KCl 5; add EGTA 1; add Na2ATP 4; "
	"add MgCl2.6H2O 2";

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
	char err[IM_ERRLEN];
	FILE *null = fopen("/dev/null", "w");
	out o = {0};
	im_ctx ctx;
	(void)argc;
	(void)argv;
	o.fp = o.errfp = null;
	FZ_CHECK(refdb_open(&ref, err) == 0, "%s", err);
	fz_scratch("fuzz-command");
	FZ_CHECK(chdir(fz_dir) == 0, "chdir %s", fz_dir);
	snprintf(dbpath, sizeof dbpath, "%s/user.db", fz_dir);
	ctx_init(&ctx, ref, &o);
	FZ_CHECK(ctx_load_chemistry(&ctx, err) == 0, "chemistry: %s", err);
	FZ_CHECK(cmd_exec(&ctx, setup_lines, err) == 0, "setup: %s", err);
	ws_copy(&base, &ctx.ses->ws);
	ctx_free(&ctx);
	fclose(null);
	return 0;
}

static int same_workspace(const workspace *a, const workspace *b)
{
	if (a->n != b->n || a->current != b->current)
		return 0;
	for (int i = 0; i < a->n; i++)
		if (!sol_equal(a->sol[i], b->sol[i]))
			return 0;
	return 1;
}

static void check_amounts(const im_ctx *ctx)
{
	FZ_CHECK(ctx->ses->temp_C >= 0 && ctx->ses->temp_C <= 60, "temperature %g", ctx->ses->temp_C);
	for (int i = 0; i < ctx->ses->ws.n; i++) {
		const solution *s = ctx->ses->ws.sol[i];
		for (int k = 0; k < s->n; k++) {
			double mM = s->items[k].mM, st = s->items[k].stock_mM;
			FZ_CHECK(isfinite(mM) && mM > 0 && mM <= UNITS_MAX_mM, "%s: %s at %g mM",
				 s->name, s->items[k].c->name, mM);
			FZ_CHECK(isfinite(st) && st >= 0 && st <= UNITS_MAX_mM, "stock %g", st);
		}
	}
}

static void run_line(const char *line, size_t n, int json)
{
	char err[IM_ERRLEN];
	char *buf = NULL;
	size_t len = 0;
	out o = {0};
	im_ctx ctx;
	workspace before;
	int rc;
	o.fp = open_memstream(&buf, &len);
	o.errfp = o.fp;
	o.json = json;
	o.utf8 = json;
	FZ_CHECK(o.fp != NULL, "open_memstream");
	ctx_init(&ctx, ref, &o);
	/* the chemistry as the program has it (speciation, titration,
	 * targets); loaded per input (about 2 us) because `constants`
	 * changes its picks */
	FZ_CHECK(ctx_load_chemistry(&ctx, err) == 0, "chemistry: %s", err);
	ctx.ses->db_path = dbpath;
	ws_free(&ctx.ses->ws);
	ws_copy(&ctx.ses->ws, &base);
	ws_copy(&before, &ctx.ses->ws);
	err[0] = '\0';
	rc = cmd_exec(&ctx, line, err);
	FZ_CHECK(rc == 0 || rc == -1, "cmd_exec returned %d", rc);
	if (rc) {
		fz_check_err(err, "cmd_exec", n);
		if (!memchr(line, ';', n) && !strstr(line, "run")) {
			FZ_CHECK(same_workspace(&before, &ctx.ses->ws), "a failed line changed the "
				 "workspace: %s", err);
			FZ_CHECK(ctx.ses->temp_C == 25.0 && ctx.ses->model == ACT_DAVIES,
				 "a failed line changed the settings");
		}
		out_error(&o, ctx.errfile, ctx.errline, err);
	}
	check_amounts(&ctx);
	ctx_free(&ctx);
	ws_free(&before);
	fclose(o.fp);
	if (json)
		fz_check_json_lines(buf, len);
	else
		fz_check_finite_text(buf, len, line, n);
	free(buf);
	fz_empty_dir();
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	char *line = malloc(size + 1);
	size_t n;
	memcpy(line, data, size);
	line[size] = '\0';
	fz_confine_paths(line, size);
	n = strlen(line);
	run_line(line, n, 0);
	run_line(line, n, 1);
	free(line);
	return 0;
}
