/* test_keep.c - nothing a user makes is lost (issue 11 item 4) and the
 * workspace costs what a command touches (issue 14 item 4): ten saves keep
 * ten versions and each loads back exactly; an identical save keeps no
 * new version; an older (schema 1) database is upgraded after a copy is
 * kept beside it and its solution becomes version 1; the workspace finds
 * names through its index after any mix of inserts and deletes (checked
 * against a linear search); a command's journal holds only the solutions
 * it touched and puts the workspace back exactly; `undo` takes back
 * several levels; the kept workspace is written and read back. */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <sqlite3.h>

#include "command.h"
#include "common.h"
#include "userdb.h"

#define TESTDIR_TAG "keep"
#include "testdir.h"

static const rd_compound *cmp(const char *name)
{
	const rd_compound *c = refdb_compound(db, name);
	assert_non_null(c);
	return c;
}

static void ten_versions(void **state)
{
	char p[256], err[IM_ERRLEN];
	solution s, want[10], got;
	userdb *u;
	udb_version *v;
	int version, sup, n;
	(void)state;
	snprintf(p, sizeof p, "%s/ten.db", dir);
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	sol_init(&s, "kglu");
	for (int i = 0; i < 10; i++) {
		/* each save differs: an amount, a compound more, a pH target */
		sol_set(&s, cmp("NaCl"), 1.0 + i / 3.0);
		if (i == 3)
			sol_set(&s, cmp("KCl"), 140);
		if (i == 6)
			s.ph_target = 7.3;
		if (i == 8)
			sol_find(&s, cmp("KCl"))->stock_mM = 3000;
		if (i == 9) /* the bottle's formula weight (`fw`) */
			sol_find(&s, cmp("NaCl"))->fw_g_mol = 58.45;
		if (udb_save_v(u, &s, &version, &sup, err))
			fail_msg("%s", err);
		assert_int_equal(version, i + 1);
		assert_int_equal(sup, i);
		sol_copy(&want[i], &s, NULL);
	}
	/* the same content again: no new version */
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	assert_int_equal(version, 10);
	assert_int_equal(sup, 0);
	n = udb_versions(u, "kglu", &v, err);
	assert_int_equal(n, 10);
	for (int i = 0; i < 10; i++) {
		assert_int_equal(v[i].version, i + 1);
		assert_int_equal(strlen(v[i].saved_at), 20); /* 2026-01-02T03:04:05Z */
		assert_non_null(strstr(v[i].summary, "NaCl"));
		assert_int_equal(udb_load_version(u, db, "kglu", i + 1, &got, err), 0);
		assert_true(sol_equal(&got, &want[i]));
		sol_free(&got);
		sol_free(&want[i]);
	}
	udb_versions_free(v, n);
	assert_int_equal(udb_load_version(u, db, "kglu", 11, &got, err), -1);
	assert_non_null(strstr(err, "no version 11"));
	sol_free(&s);
	udb_close(u);
}

/* A change of targets alone is a new version, and loads back with them:
 * adding a target, then dropping it again, each keep a version; saving
 * the same targets again keeps none. */
static void targets_alone_are_a_version(void **state)
{
	char p[256], err[IM_ERRLEN];
	solution s, got;
	userdb *u;
	int version, sup;
	(void)state;
	snprintf(p, sizeof p, "%s/targets.db", dir);
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	sol_init(&s, "bath");
	sol_set(&s, cmp("NaCl"), 140);
	sol_set(&s, cmp("sucrose"), 10);
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	assert_int_equal(version, 1);
	/* the same items, now holding an osmolality target at 32 C */
	s.tg[0] = (sol_target){SOL_TG_OSMO, 300, cmp("sucrose"), NULL, 32};
	s.ntg = 1;
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	assert_int_equal(version, 2);
	assert_int_equal(sup, 1);
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	assert_int_equal(version, 2); /* unchanged: no new version */
	assert_int_equal(udb_load(u, db, "bath", &got, err), 0);
	assert_true(sol_equal(&got, &s));
	assert_int_equal(got.ntg, 1);
	sol_free(&got);
	/* another temperature for the same target is a change too */
	s.tg[0].at_C = 35;
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	assert_int_equal(version, 3);
	/* the target dropped */
	s.ntg = 0;
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	assert_int_equal(version, 4);
	assert_int_equal(udb_load(u, db, "bath", &got, err), 0);
	assert_int_equal(got.ntg, 0);
	sol_free(&got);
	assert_int_equal(udb_load_version(u, db, "bath", 3, &got, err), 0);
	assert_int_equal(got.ntg, 1);
	assert_true(got.tg[0].at_C == 35);
	sol_free(&got);
	sol_free(&s);
	udb_close(u);
}

/* A schema-1 file (as the first release wrote it) with one solution. */
static void older_db_upgraded(void **state)
{
	char p[256], copy[300], err[IM_ERRLEN];
	sqlite3 *h;
	userdb *u;
	solution s, got;
	int version, sup;
	udb_version *v;
	(void)state;
	snprintf(p, sizeof p, "%s/old.db", dir);
	assert_int_equal(sqlite3_open(p, &h), SQLITE_OK);
	assert_int_equal(sqlite3_exec(h,
		"CREATE TABLE solutions (name TEXT PRIMARY KEY, saved_at TEXT NOT NULL DEFAULT"
		" (strftime('%Y-%m-%dT%H:%M:%SZ','now')), ph_target REAL, co2_frac REAL NOT NULL"
		" DEFAULT 0, co2_p_atm REAL NOT NULL DEFAULT 1, co2_dry INTEGER NOT NULL DEFAULT 0);"
		"CREATE TABLE solution_items (solution TEXT NOT NULL REFERENCES solutions(name) ON"
		" DELETE CASCADE, position INTEGER NOT NULL, compound TEXT NOT NULL, mM REAL NOT"
		" NULL CHECK (mM > 0), stock_mM REAL NOT NULL DEFAULT 0, titrant INTEGER NOT NULL"
		" DEFAULT 0, PRIMARY KEY (solution, position));"
		"CREATE TABLE user_compounds (name TEXT PRIMARY KEY, formula TEXT NOT NULL,"
		" fw_g_mol REAL NOT NULL, yields TEXT NOT NULL, note TEXT);"
		"INSERT INTO solutions(name) VALUES ('acsf');"
		"INSERT INTO solution_items VALUES ('acsf', 0, 'NaCl', 125, 0, 0);"
		"PRAGMA user_version = 1;", NULL, NULL, NULL), SQLITE_OK);
	sqlite3_close(h);
	assert_int_equal(udb_open(p, 0, &u, err), 0);
	snprintf(copy, sizeof copy, "%s.v1-backup", p);
	assert_int_equal(access(copy, F_OK), 0); /* the copy beside it */
	assert_int_equal(udb_load(u, db, "acsf", &got, err), 0);
	assert_int_equal(got.n, 1);
	sol_copy(&s, &got, NULL);
	sol_set(&s, cmp("KCl"), 2.5);
	assert_int_equal(udb_save_v(u, &s, &version, &sup, err), 0);
	/* what was saved before versions were kept is version 1 */
	assert_int_equal(version, 2);
	assert_int_equal(sup, 1);
	assert_int_equal(udb_versions(u, "acsf", &v, err), 2);
	udb_versions_free(v, 2);
	sol_free(&s);
	assert_int_equal(udb_load_version(u, db, "acsf", 1, &s, err), 0);
	assert_true(sol_equal(&s, &got));
	sol_free(&s);
	sol_free(&got);
	udb_close(u);
	/* the copy is still the schema-1 file */
	assert_int_equal(sqlite3_open(copy, &h), SQLITE_OK);
	{
		sqlite3_stmt *st;
		assert_int_equal(sqlite3_prepare_v2(h, "PRAGMA user_version", -1, &st, NULL),
				 SQLITE_OK);
		assert_int_equal(sqlite3_step(st), SQLITE_ROW);
		assert_int_equal(sqlite3_column_int(st, 0), 1);
		sqlite3_finalize(st);
	}
	sqlite3_close(h);
}

/* The name index against a linear search, after inserts, deletes (from
 * the middle and the end) and rollbacks. */
static void index_matches_linear(void **state)
{
	workspace w;
	char name[32];
	unsigned x = 12345;
	(void)state;
	ws_init(&w);
	for (int step = 0; step < 4000; step++) {
		x = x * 1103515245u + 12345u;
		snprintf(name, sizeof name, "s%u", (x >> 8) % 700);
		if ((x >> 20) % 3 == 0)
			ws_delete(&w, name);
		else
			ws_open(&w, name);
		if (step % 97 == 0) { /* every name: index == linear */
			for (int k = 0; k < 700; k++) {
				int lin = -1;
				snprintf(name, sizeof name, "s%d", k);
				for (int i = 0; i < w.n; i++)
					if (strcmp(w.sol[i]->name, name) == 0)
						lin = i;
				assert_int_equal(ws_index_of(&w, name), lin);
			}
		}
	}
	ws_free(&w);
}

static int ws_same(const workspace *a, const workspace *b)
{
	if (a->n != b->n || a->current != b->current)
		return 0;
	for (int i = 0; i < a->n; i++)
		if (!sol_equal(a->sol[i], b->sol[i]))
			return 0;
	return 1;
}

static void journal_is_proportional(void **state)
{
	workspace w, before;
	ws_journal jr;
	char name[32];
	solution *s;
	(void)state;
	ws_init(&w);
	for (int i = 0; i < 2000; i++) {
		snprintf(name, sizeof name, "sol%d", i);
		sol_set(ws_open(&w, name), cmp("NaCl"), i + 1);
	}
	ws_copy(&before, &w);
	ws_journal_begin(&w, &jr);
	s = ws_find(&w, "sol17");           /* changed */
	sol_set(s, cmp("KCl"), 4);
	sol_add(ws_find(&w, "sol17"), cmp("KCl"), 1); /* touched again: no second copy */
	ws_open(&w, "fresh");                /* new, made current */
	ws_delete(&w, "sol500");             /* from the middle */
	(void)ws_find(&w, "sol3");           /* only looked at */
	ws_journal_end(&w);
	assert_int_equal(jr.n, 4);
	assert_int_equal(ws_journal_prune(&w, &jr), 3); /* sol3 unchanged */
	ws_journal_undo(&w, &jr);
	assert_true(ws_same(&w, &before));
	assert_int_equal(ws_index_of(&w, "sol500"), 500);
	assert_int_equal(ws_index_of(&w, "fresh"), -1);
	ws_journal_free(&jr);
	ws_free(&w);
	ws_free(&before);
}

/* Commands through the line loop: undo several levels; a failed command
 * leaves nothing behind and is not a level. */
static void undo_levels(void **state)
{
	im_ctx ctx;
	out o = {0};
	char *buf = NULL, err[IM_ERRLEN];
	size_t len = 0;
	solution *s;
	(void)state;
	o.fp = open_memstream(&buf, &len);
	o.errfp = stderr;
	ctx_init(&ctx, db, &o);
	assert_int_equal(cmd_exec(&ctx, "solution a; add NaCl 10; add KCl 2; temp 30", err), 0);
	assert_int_equal(cmd_exec(&ctx, "add NoSuchThing 3", err), -1);
	assert_int_equal(ctx.ses->nundo, 4);
	assert_int_equal(cmd_exec(&ctx, "undo", err), 0);
	assert_close(ctx.ses->temp_C, 25.0, 0, 0);
	assert_int_equal(cmd_exec(&ctx, "undo", err), 0);
	s = ws_current(&ctx.ses->ws);
	assert_non_null(s);
	assert_int_equal(s->n, 1);
	assert_int_equal(cmd_exec(&ctx, "undo; undo", err), 0);
	assert_int_equal(ctx.ses->ws.n, 0);
	assert_int_equal(cmd_exec(&ctx, "undo", err), -1);
	assert_non_null(strstr(err, "nothing to undo"));
	ctx_free(&ctx);
	fclose(o.fp);
	free(buf);
}

/* The kept workspace: written as commands change it, read back whole. */
static void kept_round_trip(void **state)
{
	im_ctx ctx, again;
	out o = {0};
	char *buf = NULL, err[IM_ERRLEN], p[256];
	size_t len = 0;
	int n;
	(void)state;
	snprintf(p, sizeof p, "%s/kept.db", dir);
	o.fp = open_memstream(&buf, &len);
	o.errfp = stderr;
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = p;
	ctx.ses->keep_ws = 1;
	assert_int_equal(cmd_exec(&ctx, "solution a; add NaCl 10; solution b; add KCl 3; "
				  "temp 31; solution c; solution a", err), 0);
	assert_int_equal(cmd_exec(&ctx, "solution gone; undo", err), 0);
	assert_string_equal(ctx.ses->keep_err, "");
	ctx_init(&again, db, &o);
	again.ses->db_path = p;
	assert_int_equal(ses_restore_kept(again.ses, &n, err), 0);
	assert_int_equal(n, 3);
	assert_int_equal(again.ses->ws.n, 3);
	for (int i = 0; i < 3; i++)
		assert_true(sol_equal(again.ses->ws.sol[i], ctx.ses->ws.sol[i]));
	assert_int_equal(again.ses->ws.current, ctx.ses->ws.current);
	assert_close(again.ses->temp_C, 31.0, 0, 0);
	ctx_free(&again);
	ctx_free(&ctx);
	fclose(o.fp);
	free(buf);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(ten_versions),
		cmocka_unit_test(targets_alone_are_a_version),
		cmocka_unit_test(older_db_upgraded),
		cmocka_unit_test(index_matches_linear),
		cmocka_unit_test(journal_is_proportional),
		cmocka_unit_test(undo_levels),
		cmocka_unit_test(kept_round_trip),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
