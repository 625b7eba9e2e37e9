/* test_targets.c - targets that hold (issue 11, items 1-3): `ph`, `free`
 * and `osmo` kept as targets at their own temperature and solved again,
 * jointly, after every change; `targets` and `targets drop`; a recipe that
 * replays its targets at another `temp` to the same amounts; refusals
 * that name the target and leave the solution unchanged.  Every "met" is
 * checked here by computing the solution forward (sol_compute, as `show`
 * does) at the target's temperature, not by the solver's own check. */
#include "testutil.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "command.h"
#include "common.h"
#include "targets.h"
#include "userdb.h"

#include <sqlite3.h>

#include "testctx.h"

/* line must fail with an error that contains every word given */
static void refused(const char *line, const char *w1, const char *w2)
{
	char err[IM_ERRLEN];
	if (!cmd_exec(&ctx, line, err))
		fail_msg("'%s' succeeded", line);
	if (!strstr(err, w1) || (w2 && !strstr(err, w2)))
		fail_msg("'%s': error '%s' lacks '%s' / '%s'", line, err, w1, w2 ? w2 : "");
	if (strchr(err, '\n'))
		fail_msg("'%s': error of more than one line: %s", line, err);
}

static double amount(const char *sol, const char *compound)
{
	sol_item *it = sol_find(ws_find(&ctx.ses->ws, sol), refdb_compound(db, compound));
	return it ? it->mM : 0;
}

/* pH and free Ca2+ (mM) of a solution computed forward at t_C */
static void forward_at(const char *sol, double t_C, double *pH, double *ca_mM)
{
	char err[IM_ERRLEN];
	sol_state st;
	sol_env e = *ses_env(ctx.ses);
	e.t_C = t_C;
	if (sol_compute(ws_find(&ctx.ses->ws, sol), &e, &st, err))
		fail_msg("compute %s: %s", sol, err);
	*pH = st.pH;
	*ca_mM = sol_state_free_mM(&st, "Ca2+");
	sol_state_free(&st);
}

#define INTERNAL "solution kin; add K-gluconate 130; add KCl 10; add HEPES 10; add EGTA 1; " \
		 "add MgCl2 2; add Na2ATP 4; add Na2GTP 0.3"

/* pH 7.3 at 22 C and free Ca2+ 100 nM, exported at 32 C, replayed at
 * 25 C: the same amounts to 1e-9 relative, and both targets met at 22 C. */
static void recipe_replays_targets(void **state)
{
	char path[] = "/tmp/ionmix-targets-XXXXXX", line[256];
	double koh, cacl2, pH, ca;
	int fd = mkstemp(path);
	(void)state;
	assert_true(fd >= 0);
	close(fd);
	ok("temp 22; " INTERNAL "; ph 7.3 with KOH; free Ca 100 nM");
	koh = amount("kin", "KOH");
	cacl2 = amount("kin", "CaCl2");
	assert_true(koh > 1 && cacl2 > 0.1);
	ok("temp 32");
	assert_close(amount("kin", "KOH"), koh, 0, 0); /* temp moves no bench target */
	snprintf(line, sizeof line, "export kin %s", path);
	ok(line);
	ok("solution other; add NaCl 1; temp 25");
	snprintf(line, sizeof line, "run %s", path);
	ok(line);
	unlink(path);
	assert_close(amount("kin", "KOH"), koh, 1e-9, 0);
	assert_close(amount("kin", "CaCl2"), cacl2, 1e-9, 0);
	forward_at("kin", 22, &pH, &ca);
	assert_close(pH, 7.3, 0, TG_TOL_PH);
	assert_close(ca, 100e-6, TG_TOL_FREE, 0);
	/* and at 25 C, where the recipe ran, the pH is not 7.3: the targets
	 * held at 22 C (HEPES pKa falls with temperature) */
	forward_at("kin", 25, &pH, &ca);
	assert_true(pH < 7.3 - 0.02);
}

/* Adding 10 mM EGTA to a titrated solution re-solves the titrant (EGTA
 * is added as the free acid: its protons need more KOH); every target
 * met afterwards. */
static void egta_resolves_titrant(void **state)
{
	double koh, cacl2, pH, ca;
	(void)state;
	ok("temp 22; " INTERNAL "; ph 7.3 with KOH; free Ca 100 nM; osmo 340 with sucrose");
	koh = amount("kin", "KOH");
	cacl2 = amount("kin", "CaCl2");
	ok("temp 35; add EGTA 10");
	assert_true(strstr(buf, "was 1 mM, now 11 mM (`set` replaces)") != NULL);
	/* EGTA (H4EGTA) gives up two protons near pH 7.3 (pKa3, pKa4 about
	 * 2.7 and 8.9 - 9.5 by Martell & Smith, from memory): about 20 mM more
	 * KOH for 10 mM; and 10x the chelator needs far more Ca for 100 nM */
	assert_true(amount("kin", "KOH") > koh + 15);
	assert_true(amount("kin", "CaCl2") > 5 * cacl2);
	forward_at("kin", 22, &pH, &ca);
	assert_close(pH, 7.3, 0, TG_TOL_PH);
	assert_close(ca, 100e-6, TG_TOL_FREE, 0);
	{
		char err[IM_ERRLEN];
		sol_state st;
		sol_env e = *ses_env(ctx.ses);
		e.t_C = 22;
		assert_int_equal(sol_compute(ws_find(&ctx.ses->ws, "kin"), &e, &st, err), 0);
		assert_close(st.osmolality_mOsm_kg, 340, 0, TG_TOL_OSMO);
		sol_state_free(&st);
	}
}

/* Targets that cannot be met: one line naming the target and the reason;
 * the solution unchanged. */
static void impossible_targets(void **state)
{
	solution before;
	(void)state;
	ok("temp 22; " INTERNAL "; ph 7.3 with KOH; free Ca 100 nM");
	sol_copy(&before, ws_find(&ctx.ses->ws, "kin"), NULL);
	/* a titrant in the wrong direction: an acid to raise the pH */
	refused("ph 7.5 with HCl", "target pH 7.50 with HCl", "base");
	/* an osmolality below that of the salts alone */
	refused("osmo 200 with sucrose", "target osmolality 200.0", "alone gives");
	/* a change that breaks a target: gas sets the pH */
	refused("gas co2 5", "target pH 7.30 with KOH", "CO2");
	/* a compound a target owns */
	refused("set KOH 5", "KOH", "targets drop ph");
	refused("remove CaCl2", "CaCl2", "targets drop Ca2+");
	assert_true(sol_equal(&before, ws_find(&ctx.ses->ws, "kin")));
	sol_free(&before);
	/* free Ca2+ the rest already exceeds: a Ca2+ ingredient, and the
	 * target asks less free Ca2+ than it alone leaves */
	ok("solution plain; add NaCl 140; add CaCl2.2H2O 2; add HEPES 10; ph 7.4 with NaOH");
	sol_copy(&before, ws_find(&ctx.ses->ws, "plain"), NULL);
	refused("free Ca 100 nM with CaCl2", "target free Ca2+ 100 nM with CaCl2", NULL);
	assert_true(sol_equal(&before, ws_find(&ctx.ses->ws, "plain")));
	sol_free(&before);
}

/* `targets drop` keeps the amount and ends the rule: a later change no
 * longer moves it. */
static void drop_keeps_amount(void **state)
{
	double koh;
	(void)state;
	ok("temp 22; solution h; add HEPES 10; ph 7.3 with KOH at 22");
	koh = amount("h", "KOH");
	ok("targets drop ph");
	assert_close(amount("h", "KOH"), koh, 0, 0);
	assert_int_equal(ws_find(&ctx.ses->ws, "h")->ntg, 0);
	assert_true(isnan(ws_find(&ctx.ses->ws, "h")->ph_target));
	ok("add HEPES 10");
	assert_close(amount("h", "KOH"), koh, 0, 0);
}

/* The bench and the rig: a HEPES solution titrated to 7.30 at 22 C reads
 * lower at 35 C by about dpKa/dT x 13 K; HEPES dpKa/dT = -0.014 /K (Good
 * et al. 1966; Goldberg et al. 2002 give -0.0140, from memory), and the
 * ratio base/acid is fixed by the titrant, so pH(35) ~ 7.30 - 0.18. */
static void bench_and_rig_temperature(void **state)
{
	double pH, ca, koh;
	(void)state;
	ok("temp 35; solution h; add HEPES 10; ph 7.3 with KOH at 22");
	koh = amount("h", "KOH");
	forward_at("h", 22, &pH, &ca);
	assert_close(pH, 7.3, 0, TG_TOL_PH);
	forward_at("h", 35, &pH, &ca);
	assert_close(pH, 7.30 - 0.014 * 13, 0, 0.03);
	/* titrated at 35 C instead: more KOH (the pKa is lower there) */
	ok("solution h2; add HEPES 10; ph 7.3 with KOH");
	assert_true(amount("h2", "KOH") > koh);
	/* show gives the pH at the recording temperature beside the target */
	ok("solution h; show");
	assert_true(strstr(buf, "pH 7.30 with KOH at 22.0 C") != NULL);
	assert_true(strstr(buf, "at 35.0 C") != NULL);
}

/* A saved solution keeps its targets with their temperatures; loaded, it
 * holds them again (a change re-solves them). */
static void saved_targets(void **state)
{
	char dir[] = "/tmp/ionmix-tgdb-XXXXXX", path[96];
	solution before;
	double pH, ca;
	(void)state;
	assert_non_null(mkdtemp(dir));
	snprintf(path, sizeof path, "%s/user.db", dir);
	ctx.ses->db_path = path;
	ok("temp 22; " INTERNAL "; ph 7.3 with KOH stock 1 M; free Ca 100 nM at 22; "
	   "osmo 330 with sucrose at 30");
	sol_copy(&before, ws_find(&ctx.ses->ws, "kin"), NULL);
	ok("save kin; solution kin; clear; temp 35; load kin");
	assert_true(sol_equal(&before, ws_find(&ctx.ses->ws, "kin")));
	assert_int_equal(ws_find(&ctx.ses->ws, "kin")->ntg, 3);
	assert_close(ws_find(&ctx.ses->ws, "kin")->tg[2].at_C, 30, 0, 0);
	ok("add EGTA 1");
	forward_at("kin", 22, &pH, &ca);
	assert_close(pH, 7.3, 0, TG_TOL_PH);
	assert_close(ca, 100e-6, TG_TOL_FREE, 0);
	sol_free(&before);
	ctx_free(&ctx); /* closes the database before it is removed */
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = "/nonexistent/ionmix-test.db";
	snprintf(path, sizeof path, "rm -rf %s", dir);
	assert_int_equal(system(path), 0);
}

/* A database of schema version 1 (before targets) is upgraded on open, in
 * one transaction, after a copy is kept beside it; its solutions load as
 * they were (a titrated one with its target pH, without a target rule). */
static void old_database_upgraded(void **state)
{
	char dir[] = "/tmp/ionmix-tgdb-XXXXXX", path[96], copy[128], err[IM_ERRLEN];
	sqlite3 *h;
	userdb *u;
	solution s;
	int v = 0;
	sqlite3_stmt *st;
	(void)state;
	assert_non_null(mkdtemp(dir));
	snprintf(path, sizeof path, "%s/user.db", dir);
	snprintf(copy, sizeof copy, "%s.v1-backup", path);
	assert_int_equal(sqlite3_open(path, &h), SQLITE_OK);
	assert_int_equal(sqlite3_exec(h,
		"CREATE TABLE solutions (name TEXT PRIMARY KEY, saved_at TEXT NOT NULL DEFAULT"
		" (strftime('%Y-%m-%dT%H:%M:%SZ','now')), ph_target REAL, co2_frac REAL NOT NULL"
		" DEFAULT 0, co2_p_atm REAL NOT NULL DEFAULT 1, co2_dry INTEGER NOT NULL DEFAULT 0);"
		"CREATE TABLE solution_items (solution TEXT NOT NULL REFERENCES solutions(name) ON"
		" DELETE CASCADE, position INTEGER NOT NULL, compound TEXT NOT NULL, mM REAL NOT NULL"
		" CHECK (mM > 0), stock_mM REAL NOT NULL DEFAULT 0, titrant INTEGER NOT NULL DEFAULT"
		" 0, PRIMARY KEY (solution, position));"
		"CREATE TABLE user_compounds (name TEXT PRIMARY KEY, formula TEXT NOT NULL,"
		" fw_g_mol REAL NOT NULL, yields TEXT NOT NULL, note TEXT);"
		"INSERT INTO solutions(name, ph_target) VALUES ('h', 7.3);"
		"INSERT INTO solution_items VALUES ('h', 0, 'HEPES', 10, 0, 0);"
		"INSERT INTO solution_items VALUES ('h', 1, 'KOH', 3.68, 0, 1);"
		"PRAGMA user_version = 1;", NULL, NULL, NULL), SQLITE_OK);
	sqlite3_close(h);
	if (udb_open(path, 0, &u, err) != 0)
		fail_msg("open: %s", err);
	assert_int_equal(access(copy, F_OK), 0);
	assert_int_equal(udb_load(u, db, "h", &s, err), 0);
	assert_int_equal(s.n, 2);
	assert_int_equal(s.ntg, 0);
	assert_close(s.ph_target, 7.3, 0, 0);
	sol_free(&s);
	udb_close(u);
	/* the upgraded file says 2; the copy still says 1 */
	assert_int_equal(sqlite3_open(path, &h), SQLITE_OK);
	assert_int_equal(sqlite3_prepare_v2(h, "PRAGMA user_version", -1, &st, NULL), SQLITE_OK);
	assert_int_equal(sqlite3_step(st), SQLITE_ROW);
	v = sqlite3_column_int(st, 0);
	sqlite3_finalize(st);
	sqlite3_close(h);
	assert_int_equal(v, UDB_SCHEMA_VERSION);
	assert_int_equal(sqlite3_open(copy, &h), SQLITE_OK);
	assert_int_equal(sqlite3_prepare_v2(h, "PRAGMA user_version", -1, &st, NULL), SQLITE_OK);
	assert_int_equal(sqlite3_step(st), SQLITE_ROW);
	assert_int_equal(sqlite3_column_int(st, 0), 1);
	sqlite3_finalize(st);
	sqlite3_close(h);
	snprintf(path, sizeof path, "rm -rf %s", dir);
	assert_int_equal(system(path), 0);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(recipe_replays_targets, fresh, done),
		cmocka_unit_test_setup_teardown(egta_resolves_titrant, fresh, done),
		cmocka_unit_test_setup_teardown(impossible_targets, fresh, done),
		cmocka_unit_test_setup_teardown(drop_keeps_amount, fresh, done),
		cmocka_unit_test_setup_teardown(bench_and_rig_temperature, fresh, done),
		cmocka_unit_test_setup_teardown(saved_targets, fresh, done),
		cmocka_unit_test_setup_teardown(old_database_upgraded, fresh, done),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
