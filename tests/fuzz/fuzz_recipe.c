/*
 * fuzz_recipe.c - libFuzzer target: the input is a script, run from
 * memory by the one line loop (cmd_run_stream over fmemopen: NUL bytes,
 * over-long lines, the BOM, ';' and '#'), with human output when its
 * length is even and --json output when it is odd (mutations change the
 * length all the time, so both are reached; running both for every input
 * doubled the cost of the slow commands, junction above all).  A script
 * that says "run" is also written to input.ionmix in the scratch
 * directory first, so that a nested `run input.ionmix` (and its depth
 * limit) is reached too.
 *
 * Checks, besides the sanitizers: a failure has a one-line message and a
 * line number within the script (or within a file it ran); amounts stay
 * finite and in range; human output has no NaN or infinity in a numeric
 * position; JSON output is valid JSON lines; no command leaves a
 * transaction or a statement of the user database open.
 *
 * Persistent: the reference database is opened once and the chemistry
 * data loaded once; per input there are only the memory streams and a
 * context (no file unless the script runs or saves one).  The user
 * database is opened once too and lent to every input (the session's
 * open_db): opening a new file costs SQLite a parse of the whole schema
 * and of every statement a save prepares, a fifth of the run time when
 * each input opened its own file.  An input sees it as a new file would
 * look: "no database yet" until its first save, then empty tables; after
 * the input the harness checks that no transaction or statement was left
 * open and empties the tables.  It lives in a directory of its own,
 * beside the scratch directory, where no path a script names can reach.
 * udb_open's work on a new file is still run by the first save of the run
 * and is tested in test_userdb.
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
#include <sys/stat.h>
#include <unistd.h>

#include <sqlite3.h>

#include "command.h"
#include "common.h"
#include "eqdata.h"
#include "session.h"
#include "units.h"
#include "userdb.h"

#include "fuzzutil.h"

static refdb *ref;
static char dbdir[600], dbpath[700], script[600];

/* The user database lent to every input: the connection (NULL until the
 * first save of the run), whether the current input has it (its first
 * save came), and a statement per table that empties it. */
static userdb *lent;
static int lent_used;
static sqlite3_stmt *wipe[32];
static int nwipe;

static int open_lent(void *arg, const char *path, int create, userdb **out, char *err)
{
	(void)arg;
	*out = NULL;
	if (!lent_used && !create)
		return 1; /* as udb_open for a missing file: no database yet */
	if (!lent) {
		int rc = udb_open(path, create, &lent, err);
		sqlite3_stmt *st;
		if (rc)
			return rc;
		FZ_CHECK(sqlite3_prepare_v2(udb_sqlite(lent),
					    "SELECT name FROM sqlite_master WHERE type = 'table'",
					    -1, &st, NULL) == SQLITE_OK, "listing the tables");
		while (sqlite3_step(st) == SQLITE_ROW) {
			char sql[160];
			FZ_CHECK(nwipe < (int)(sizeof wipe / sizeof *wipe), "too many tables");
			snprintf(sql, sizeof sql, "DELETE FROM \"%s\"", sqlite3_column_text(st, 0));
			FZ_CHECK(sqlite3_prepare_v2(udb_sqlite(lent), sql, -1, &wipe[nwipe++],
						    NULL) == SQLITE_OK, "%s", sql);
		}
		sqlite3_finalize(st);
	}
	lent_used = 1;
	*out = lent;
	return 0;
}

/* After an input that used the database: nothing may be left open (a
 * statement not reset would hold a read snapshot, an open transaction the
 * write lock), then every table is emptied, so the next input starts as
 * on a new file.  Foreign keys stay on (turning them off and on would
 * expire every prepared statement); the one reference, of solution_items
 * to solutions, deletes in cascade. */
static void return_lent(void)
{
	sqlite3 *db = udb_sqlite(lent);
	sqlite3_stmt *st = NULL;
	FZ_CHECK(sqlite3_get_autocommit(db), "a transaction was left open");
	while ((st = sqlite3_next_stmt(db, st)) != NULL)
		FZ_CHECK(!sqlite3_stmt_busy(st), "a statement was left running: %s", sqlite3_sql(st));
	FZ_CHECK(sqlite3_exec(db, "BEGIN", NULL, NULL, NULL) == SQLITE_OK, "wipe: %s",
		 sqlite3_errmsg(db));
	for (int i = 0; i < nwipe; i++) {
		FZ_CHECK(sqlite3_step(wipe[i]) == SQLITE_DONE, "wipe: %s", sqlite3_errmsg(db));
		sqlite3_reset(wipe[i]);
	}
	FZ_CHECK(sqlite3_exec(db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK, "wipe: %s",
		 sqlite3_errmsg(db));
	lent_used = 0;
}

/* The chemistry data (equilibria and Pitzer tables), loaded by the first
 * input and lent to all: a load per input was about 3 % of a run.  The one
 * change a script can make to them is a compilation pick (`constants
 * NAME`), which moves their generation; after such an input the picks are
 * dropped ("default", which selects the defaults again, as a load does). */
static spec_data *chem;
static osm_data *osm;
static unsigned long chem_gen, osm_gen;

static void lend_chemistry(im_ctx *ctx)
{
	char err[IM_ERRLEN];
	if (!chem) {
		FZ_CHECK(ctx_load_chemistry(ctx, err) == 0, "chemistry: %s", err);
		chem = ctx->ses->chem;
		osm = ctx->ses->osm;
		chem_gen = chem->gen;
		osm_gen = osm->gen;
		return;
	}
	ctx->ses->chem = chem;
	ctx->ses->osm = osm;
}

static void return_chemistry(im_ctx *ctx)
{
	char err[IM_ERRLEN];
	FZ_CHECK(ctx->ses->chem == chem && ctx->ses->osm == osm, "chemistry data replaced");
	ctx->ses->chem = NULL;
	ctx->ses->osm = NULL;
	if (chem->gen == chem_gen && osm->gen == osm_gen)
		return;
	FZ_CHECK(spec_pick_compilation(chem, osm, "default", err) == 0, "default picks: %s", err);
	chem_gen = chem->gen;
	osm_gen = osm->gen;
}

static void free_chemistry(void)
{
	spec_data_free(chem);
	osm_data_free(osm);
	chem = NULL;
	osm = NULL;
}

static void close_lent(void)
{
	char p[760];
	for (int i = 0; i < nwipe; i++)
		sqlite3_finalize(wipe[i]);
	nwipe = 0;
	udb_close(lent);
	lent = NULL;
	unlink(dbpath);
	snprintf(p, sizeof p, "%s-wal", dbpath);
	unlink(p);
	snprintf(p, sizeof p, "%s-shm", dbpath);
	unlink(p);
	rmdir(dbdir);
}

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
	snprintf(dbdir, sizeof dbdir, "%s.db", fz_dir);
	FZ_CHECK(mkdir(dbdir, 0700) == 0, "cannot make %s", dbdir);
	snprintf(dbpath, sizeof dbpath, "%s/user.db", dbdir);
	atexit(close_lent);
	atexit(free_chemistry);
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
	 * targets) */
	lend_chemistry(&ctx);
	ctx.ses->db_path = dbpath;
	ctx.ses->open_db = open_lent;
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
	FZ_CHECK(ctx.ses->user == NULL || ctx.ses->user == lent, "a database not lent");
	ctx.ses->user = NULL; /* lent, not the session's to close */
	return_chemistry(&ctx);
	ctx_free(&ctx);
	if (lent_used)
		return_lent();
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
