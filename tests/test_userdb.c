/* test_userdb.c - saving, loading, listing; foreign, corrupted and newer
 * database files are refused and left untouched. */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <sqlite3.h>

#include "common.h"
#include "userdb.h"

static refdb *db;
static char dir[64];

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	snprintf(dir, sizeof dir, "/tmp/ionmix-udb-XXXXXX");
	if (!mkdtemp(dir))
		return -1;
	return refdb_open(&db, err);
}

static int teardown(void **state)
{
	char cmd[128];
	(void)state;
	refdb_close(db);
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : -1;
}

static void path(char *buf, const char *name)
{
	snprintf(buf, 256, "%s/%s", dir, name);
}

static void round_trip(void **state)
{
	char p[256], err[IM_ERRLEN], **names;
	userdb *u;
	solution s, back;
	(void)state;
	path(p, "sub/dir/ionmix.db");
	assert_int_equal(udb_open(p, 0, &u, err), 1); /* never created by reading */
	assert_int_not_equal(access(p, F_OK), 0);
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	sol_init(&s, "bath");
	sol_add(&s, refdb_compound(db, "NaCl"), 140);
	sol_add(&s, refdb_compound(db, "CaCl2.2H2O"), 2);
	sol_find(&s, refdb_compound(db, "CaCl2.2H2O"))->stock_mM = 1000;
	assert_int_equal(udb_save(u, &s, err), 0);
	assert_int_equal(udb_load(u, db, "bath", &back, err), 0);
	assert_true(sol_equal(&s, &back));
	sol_free(&back);
	assert_int_equal(udb_load(u, db, "nope", &back, err), -1);
	assert_non_null(strstr(err, "nope"));
	assert_int_equal(udb_list(u, &names, err), 1);
	assert_string_equal(names[0], "bath");
	free(names[0]);
	free(names);
	assert_int_equal(udb_delete(u, "bath", err), 0);
	assert_int_equal(udb_delete(u, "bath", err), -1);
	udb_close(u);
	sol_free(&s);
}

static void write_file(const char *p, const char *bytes, size_t n)
{
	FILE *f = fopen(p, "wb");
	assert_non_null(f);
	fwrite(bytes, 1, n, f);
	fclose(f);
}

static char *read_file(const char *p, size_t *n)
{
	FILE *f = fopen(p, "rb");
	char *b = malloc(1 << 16);
	*n = fread(b, 1, 1 << 16, f);
	fclose(f);
	return b;
}

static void corrupted_untouched(void **state)
{
	char p[256], err[IM_ERRLEN];
	userdb *u;
	size_t n;
	char *after;
	static const char junk[] = "this is not an SQLite database, just some text\n";
	(void)state;
	path(p, "junk.db");
	write_file(p, junk, sizeof junk - 1);
	assert_int_equal(udb_open(p, 1, &u, err), -1);
	assert_non_null(strstr(err, "left untouched"));
	after = read_file(p, &n);
	assert_int_equal(n, sizeof junk - 1);
	assert_memory_equal(after, junk, n);
	free(after);
}

static void newer_and_foreign(void **state)
{
	char p[256], err[IM_ERRLEN];
	userdb *u;
	sqlite3 *s;
	(void)state;
	path(p, "newer.db");
	sqlite3_open(p, &s);
	sqlite3_exec(s, "CREATE TABLE solutions(x); PRAGMA user_version = 99;", NULL, NULL, NULL);
	sqlite3_close(s);
	assert_int_equal(udb_open(p, 1, &u, err), -1);
	assert_non_null(strstr(err, "newer"));
	path(p, "foreign.db");
	sqlite3_open(p, &s);
	sqlite3_exec(s, "CREATE TABLE t(x);", NULL, NULL, NULL);
	sqlite3_close(s);
	assert_int_equal(udb_open(p, 1, &u, err), -1);
	assert_non_null(strstr(err, "not an ionmix database"));
}

static void unwritable(void **state)
{
	char p[256], err[IM_ERRLEN];
	userdb *u;
	(void)state;
	if (geteuid() == 0)
		skip(); /* root writes anywhere: the permission test means nothing */
	path(p, "ro");
	mkdir(p, 0500);
	path(p, "ro/ionmix.db");
	assert_int_equal(udb_open(p, 1, &u, err), -1);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(round_trip), cmocka_unit_test(corrupted_untouched),
		cmocka_unit_test(newer_and_foreign), cmocka_unit_test(unwritable),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
