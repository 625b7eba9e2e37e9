/* test_userdb.c - saving, loading, listing; foreign, corrupted and newer
 * database files are refused and left untouched; paths that would save
 * nowhere lasting are refused; an unreachable file is an error naming
 * the path and the system's cause; the default place follows the XDG base
 * directory specification; hand-edited rows are checked like typed input;
 * a read-only file leaves no -wal/-shm; a locked file is waited for. */
#include "testutil.h"

#include <errno.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include <sqlite3.h>

#include "common.h"
#include "userdb.h"

#define TESTDIR_TAG "udb"
#include "testdir.h"

static void path(char *buf, const char *name)
{
	snprintf(buf, 256, "%s/%s", dir, name);
}

static void write_file(const char *p, const char *bytes, size_t n)
{
	FILE *f = fopen(p, "wb");
	assert_non_null(f);
	fwrite(bytes, 1, n, f);
	fclose(f);
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
	/* an empty file holds nothing yet; reading it writes nothing */
	path(p, "empty.db");
	write_file(p, "", 0);
	assert_int_equal(udb_open(p, 0, &u, err), 1);
	{
		struct stat st;
		assert_int_equal(stat(p, &st), 0);
		assert_int_equal(st.st_size, 0);
	}
	assert_int_equal(udb_open(p, 1, &u, err), 0); /* saving gives it its tables */
	udb_close(u);
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

static int as_user(void (*fn)(void));

static void unwritable_child(void)
{
	char p[256], err[IM_ERRLEN];
	userdb *u;
	path(p, "ro/ionmix.db");
	if (udb_open(p, 1, &u, err) != -1 || !strstr(err, p) || !strstr(err, strerror(EACCES))) {
		fprintf(stderr, "unwritable: %s\n", err);
		_exit(1);
	}
	if (access(p, F_OK) == 0)
		_exit(2);
}

/* A directory the user may not write: creating the file there fails,
 * naming the file and the cause (as an unprivileged user when root). */
static void unwritable(void **state)
{
	char p[256];
	(void)state;
	path(p, "ro");
	assert_int_equal(mkdir(p, 0555), 0);
	if (geteuid() == 0)
		assert_int_equal(chmod(dir, 0755), 0);
	assert_int_equal(as_user(unwritable_child), 0);
}

/* ---- paths that save nowhere lasting (issue 14, item 2) ---- */

static void refused_paths(void **state)
{
	char p[256], err[IM_ERRLEN], fifo[256];
	userdb *u;
	const char *bad[] = {"", ":memory:", "file:x.db?mode=memory", "file:x.db", "user.db/",
			     "/dev/null", "/tmp", fifo, NULL};
	(void)state;
	path(fifo, "fifo");
	assert_int_equal(mkfifo(fifo, 0644), 0);
	assert_int_equal(chdir(dir), 0); /* relative names land here, if anywhere */
	for (int i = 0; bad[i]; i++) {
		err[0] = '\0';
		if (udb_check_path(bad[i], err) != -1)
			fail_msg("'%s' was accepted", bad[i]);
		assert_true(err[0] != '\0' && !strchr(err, '\n'));
		if (bad[i][0])
			assert_non_null(strstr(err, bad[i])); /* the message names it */
		assert_int_equal(udb_open(bad[i], 1, &u, err), -1);
		assert_null(u);
	}
	assert_non_null(strstr((udb_check_path("/dev/null", err), err), "character device"));
	assert_non_null(strstr((udb_check_path(fifo, err), err), "FIFO"));
	assert_non_null(strstr((udb_check_path("/tmp", err), err), "directory"));
	/* nothing was created by any of them */
	assert_int_not_equal(access("x.db", F_OK), 0);
	assert_int_not_equal(access("user.db", F_OK), 0);
	assert_int_not_equal(access("file:x.db", F_OK), 0);
	/* a plain file name, existing or not, is fine */
	path(p, "new.db");
	assert_int_equal(udb_check_path(p, err), 0);
	assert_int_equal(udb_check_path("./file:x.db", err), 0);
	assert_int_equal(chdir("/"), 0);
}

/* Run fn as an unprivileged user (uid/gid 65534, "nobody" on Debian) in
 * a child when we are root, so that permissions mean something; returns
 * the child's exit status (0: fn's checks passed). */
static int as_user(void (*fn)(void))
{
	pid_t pid = fork();
	int status;
	assert_true(pid >= 0);
	if (pid == 0) {
		if (geteuid() == 0 && (setgid(65534) != 0 || setuid(65534) != 0))
			_exit(90);
		fn();
		_exit(0);
	}
	assert_int_equal(waitpid(pid, &status, 0), pid);
	return WIFEXITED(status) ? WEXITSTATUS(status) : 100 + WTERMSIG(status);
}

#define CHILD_CHECK(cond, code)                                                         \
	do {                                                                            \
		if (!(cond)) {                                                          \
			fprintf(stderr, "%s:%d: %s failed\n", __FILE__, __LINE__, #cond); \
			_exit(code);                                                    \
		}                                                                       \
	} while (0)

static void cannot_enter_child(void)
{
	char p[256], err[IM_ERRLEN];
	userdb *u;
	path(p, "locked/ionmix.db");
	for (int create = 0; create <= 1; create++) {
		CHILD_CHECK(udb_open(p, create, &u, err) == -1, 1);
		CHILD_CHECK(strstr(err, p) && strstr(err, strerror(EACCES)), 2);
	}
	path(p, "noread.db");
	CHILD_CHECK(udb_open(p, 0, &u, err) == -1, 3);
	CHILD_CHECK(strstr(err, p) && strstr(err, strerror(EACCES)), 4);
}

/* Unreachable files: errors naming the path and the cause, never
 * "no database" (udb_open returning 1). */
static void unreachable(void **state)
{
	char p[256], q[256], err[IM_ERRLEN];
	userdb *u;
	(void)state;
	path(p, "loop");
	assert_int_equal(symlink(p, p), 0); /* loop -> loop */
	for (int create = 0; create <= 1; create++) {
		assert_int_equal(udb_open(p, create, &u, err), -1);
		assert_non_null(strstr(err, p));
		assert_non_null(strstr(err, strerror(ELOOP)));
	}
	path(p, "plain.db");
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	udb_close(u);
	path(q, "plain.db/sub.db"); /* a component that is a file */
	assert_int_equal(udb_open(q, 0, &u, err), -1);
	assert_non_null(strstr(err, strerror(ENOTDIR)));
	/* a directory the user cannot enter, a file the user cannot read */
	path(p, "locked");
	assert_int_equal(mkdir(p, 0755), 0);
	path(p, "locked/ionmix.db");
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	udb_close(u);
	path(p, "locked");
	assert_int_equal(chmod(p, 0000), 0);
	path(q, "noread.db");
	assert_int_equal(udb_open(q, 1, &u, err), 0);
	udb_close(u);
	assert_int_equal(chmod(q, 0000), 0);
	if (geteuid() == 0)
		assert_int_equal(chmod(dir, 0755), 0); /* nobody may pass through */
	assert_int_equal(as_user(cannot_enter_child), 0);
	assert_int_equal(chmod(p, 0700), 0); /* so that teardown can remove them */
	assert_int_equal(chmod(q, 0600), 0);
}

/* ---- the default place (issue 14, item 8) ---- */

static void expect_default(const char *want)
{
	char err[IM_ERRLEN], *got = (char *)"unset";
	assert_int_equal(udb_default_path(&got, err), 0);
	if (!want) {
		assert_null(got);
		return;
	}
	assert_non_null(got);
	assert_string_equal(got, want);
	free(got);
}

static void default_place(void **state)
{
	char home[256], want[300], xdg[300], err[IM_ERRLEN], *got;
	(void)state;
	path(home, "home");
	assert_int_equal(mkdir(home, 0755), 0);
	unsetenv("IONMIX_DB");
	unsetenv("XDG_DATA_HOME");
	/* XDG base directory specification: $HOME/.local/share by default */
	setenv("HOME", home, 1);
	snprintf(want, sizeof want, "%s/.local/share/ionmix/ionmix.db", home);
	expect_default(want);
	/* an absolute XDG_DATA_HOME wins, a relative one is ignored (same) */
	snprintf(xdg, sizeof xdg, "%s/data", home);
	setenv("XDG_DATA_HOME", xdg, 1);
	snprintf(want, sizeof want, "%s/data/ionmix/ionmix.db", home);
	expect_default(want);
	setenv("XDG_DATA_HOME", "data", 1);
	snprintf(want, sizeof want, "%s/.local/share/ionmix/ionmix.db", home);
	expect_default(want);
	/* XDG_DATA_HOME below a missing directory: not created from nothing */
	snprintf(xdg, sizeof xdg, "%s/no/such/data", home);
	setenv("XDG_DATA_HOME", xdg, 1);
	expect_default(want);
	unsetenv("XDG_DATA_HOME");
	/* no usable HOME: no place at all, never the current directory */
	unsetenv("HOME");
	expect_default(NULL);
	assert_int_equal(udb_nowhere(err), -1);
	assert_non_null(strstr(err, "HOME is not set"));
	assert_non_null(strstr(err, "--db"));
	assert_non_null(strstr(err, "IONMIX_DB"));
	setenv("HOME", "", 1);
	expect_default(NULL);
	setenv("HOME", "relative/home", 1);
	expect_default(NULL);
	snprintf(want, sizeof want, "%s/gone", home);
	setenv("HOME", want, 1);
	expect_default(NULL);
	assert_int_not_equal(access(want, F_OK), 0);
	/* but XDG_DATA_HOME alone is enough */
	snprintf(xdg, sizeof xdg, "%s/xdg", home);
	setenv("XDG_DATA_HOME", xdg, 1);
	snprintf(want, sizeof want, "%s/xdg/ionmix/ionmix.db", home);
	expect_default(want);
	/* IONMIX_DB wins over both, checked like --db; empty means unset */
	setenv("IONMIX_DB", "/some/where.db", 1);
	expect_default("/some/where.db");
	setenv("IONMIX_DB", ":memory:", 1);
	got = NULL;
	assert_int_equal(udb_default_path(&got, err), -1);
	assert_null(got);
	assert_non_null(strstr(err, ":memory:"));
	setenv("IONMIX_DB", "", 1);
	expect_default(want);
	unsetenv("IONMIX_DB");
	unsetenv("XDG_DATA_HOME");
}

/* ---- hand-edited rows (issue 14, item 9) ---- */

/* A database with the ionmix tables but none of their constraints, as a
 * user with the sqlite3 shell might leave it, holding one good solution
 * "good" and the rows of sql. */
static void edited_db(const char *p, const char *sql)
{
	sqlite3 *h;
	char *msg = NULL;
	unlink(p);
	assert_int_equal(sqlite3_open(p, &h), SQLITE_OK);
	if (sqlite3_exec(h,
			 "PRAGMA synchronous = OFF;" /* a scratch file: no need to wait for the disk */
			 "CREATE TABLE solutions(name TEXT PRIMARY KEY, saved_at TEXT,"
			 " ph_target REAL, co2_frac REAL, co2_p_atm REAL, co2_dry INTEGER);"
			 "CREATE TABLE solution_items(solution TEXT, position INTEGER,"
			 " compound TEXT, mM REAL, stock_mM REAL, titrant INTEGER);"
			 "CREATE TABLE user_compounds(name TEXT PRIMARY KEY, formula TEXT,"
			 " fw_g_mol REAL, yields TEXT, note TEXT);"
			 "PRAGMA user_version = 1;"
			 "INSERT INTO solutions VALUES('good', NULL, 7.3, 0, 1, 0);"
			 "INSERT INTO solution_items VALUES('good', 0, 'NaCl', 140, 0, 0);"
			 "INSERT INTO solution_items VALUES('good', 1, 'KCl', 5, 3000, 0);"
			 "INSERT INTO solutions VALUES('bad', NULL, NULL, 0, 1, 0);"
			 "INSERT INTO solution_items VALUES('bad', 0, 'NaCl', 140, 0, 0);",
			 NULL, NULL, &msg) != SQLITE_OK ||
	    sqlite3_exec(h, sql, NULL, NULL, &msg) != SQLITE_OK)
		fail_msg("edited_db: %s", msg);
	sqlite3_close(h);
}

static void edited_rows(void **state)
{
	/* each case: rows added to "bad", and words the message must hold
	 * (beside the solution's name, always checked) */
	static const struct {
		const char *sql, *words[3];
	} cases[] = {
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 1e999, 0, 0)",
		 {"KCl", "amount", "not a finite number"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', -1e999, 0, 0)",
		 {"KCl", "amount", "not a finite number"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 1e308, 0, 0)",
		 {"KCl", "amount", "outside 1 fM to 5 M"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', -5, 0, 0)",
		 {"KCl", "amount", "-5 mM"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 0, 0, 0)",
		 {"KCl", "amount", "outside"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 5001, 0, 0)",
		 {"KCl", "amount", "outside"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', NULL, 0, 0)",
		 {"KCl", "amount", "NULL"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 'five', 0, 0)",
		 {"KCl", "amount", "text 'five'"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', x'00', 0, 0)",
		 {"KCl", "amount", "blob"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 5, 1e999, 0)",
		 {"KCl", "stock", "not a finite number"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 5, -1000, 0)",
		 {"KCl", "stock", "-1000"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 5, 1e308, 0)",
		 {"KCl", "stock", "neither 0"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 5, NULL, 0)",
		 {"KCl", "stock", "NULL"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'KCl', 5, 0, 2)",
		 {"KCl", "titrant", "not 0 or 1"}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'Unobtainium', 5, 0, 0)",
		 {"Unobtainium", "does not know", NULL}},
		{"INSERT INTO solution_items VALUES('bad', 1, NULL, 5, 0, 0)",
		 {"without a name", NULL, NULL}},
		{"INSERT INTO solution_items VALUES('bad', 1, 'NaCl', 5, 0, 0)",
		 {"NaCl", "twice", NULL}},
		{"UPDATE solutions SET ph_target = 1e999 WHERE name = 'bad'",
		 {"target pH", "not a finite number", NULL}},
		{"UPDATE solutions SET ph_target = 14.5 WHERE name = 'bad'",
		 {"target pH", "outside 2 to 12", NULL}},
		{"UPDATE solutions SET co2_frac = 2 WHERE name = 'bad'",
		 {"CO2 fraction", "outside 0 to 1", NULL}},
		{"UPDATE solutions SET co2_frac = NULL WHERE name = 'bad'",
		 {"CO2 fraction", "NULL", NULL}},
		{"UPDATE solutions SET co2_p_atm = 0 WHERE name = 'bad'",
		 {"gas pressure", "outside", NULL}},
		{"UPDATE solutions SET co2_dry = 0.5 WHERE name = 'bad'",
		 {"dry-gas flag", "not 0 or 1", NULL}},
	};
	char p[256], err[IM_ERRLEN];
	userdb *u;
	solution s;
	(void)state;
	path(p, "edited.db");
	for (size_t i = 0; i < IM_COUNT(cases); i++) {
		edited_db(p, cases[i].sql);
		assert_int_equal(udb_open(p, 0, &u, err), 0);
		/* the good one still loads whole, the bad one not at all */
		assert_int_equal(udb_load(u, db, "good", &s, err), 0);
		assert_int_equal(s.n, 2);
		assert_close(s.items[1].stock_mM, 3000, 0, 0);
		assert_close(s.ph_target, 7.3, 0, 0);
		sol_free(&s);
		err[0] = '\0';
		if (udb_load(u, db, "bad", &s, err) != -1)
			fail_msg("case %zu (%s) loaded", i, cases[i].sql);
		assert_null(s.items); /* nothing half-loaded, nothing to free */
		assert_null(strchr(err, '\n'));
		if (!strstr(err, "'bad'") || !strstr(err, p))
			fail_msg("case %zu: '%s' names neither the solution nor the file", i, err);
		for (int w = 0; w < 3 && cases[i].words[w]; w++)
			if (!strstr(err, cases[i].words[w]))
				fail_msg("case %zu: '%s' lacks '%s'", i, err, cases[i].words[w]);
		udb_close(u);
	}
	/* a nameless solution row: `list` is an error, not a shorter list */
	edited_db(p, "INSERT INTO solutions VALUES(NULL, NULL, NULL, 0, 1, 0)");
	assert_int_equal(udb_open(p, 0, &u, err), 0);
	{
		char **names = (char **)"unset";
		assert_int_equal(udb_list(u, &names, err), -1);
		assert_null(names);
		assert_non_null(strstr(err, "no name"));
	}
	udb_close(u);
}

/* ---- a read-only file (issue 14, item 10) ---- */

static int side_files(const char *p)
{
	char q[300];
	int n = 0;
	snprintf(q, sizeof q, "%s-wal", p);
	n += access(q, F_OK) == 0;
	snprintf(q, sizeof q, "%s-shm", p);
	n += access(q, F_OK) == 0;
	return n;
}

static void read_only_child(void)
{
	char p[256], err[IM_ERRLEN], **names;
	userdb *u;
	solution s;
	path(p, "shared/ro.db");
	CHILD_CHECK(access(p, W_OK) != 0, 1);
	CHILD_CHECK(udb_open(p, 0, &u, err) == 0, 2);
	CHILD_CHECK(udb_list(u, &names, err) == 1, 3);
	free(names[0]);
	free(names);
	CHILD_CHECK(udb_load(u, db, "bath", &s, err) == 0 && s.n == 1, 4);
	sol_free(&s);
	/* a write through it fails, naming the file and the cause */
	CHILD_CHECK(udb_delete(u, "bath", err) == -1, 5);
	CHILD_CHECK(strstr(err, p) && strstr(err, strerror(EACCES)), 6);
	udb_close(u);
	CHILD_CHECK(side_files(p) == 0, 7);
	/* so does a save, before anything is touched */
	CHILD_CHECK(udb_open(p, 1, &u, err) == -1, 8);
	CHILD_CHECK(strstr(err, p) && strstr(err, strerror(EACCES)), 9);
	CHILD_CHECK(side_files(p) == 0, 10);
}

static void read_only_file(void **state)
{
	char p[256], err[IM_ERRLEN];
	userdb *u;
	solution s;
	(void)state;
	path(p, "shared");
	assert_int_equal(mkdir(p, 0777), 0);
	assert_int_equal(chmod(p, 01777), 0); /* the reader may create files here */
	path(p, "shared/ro.db");
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	sol_init(&s, "bath");
	sol_add(&s, refdb_compound(db, "NaCl"), 140);
	assert_int_equal(udb_save(u, &s, err), 0);
	sol_free(&s);
	udb_close(u);
	assert_int_equal(side_files(p), 0);
	assert_int_equal(chmod(p, 0444), 0);
	if (geteuid() == 0)
		assert_int_equal(chmod(dir, 0755), 0);
	assert_int_equal(as_user(read_only_child), 0);
	assert_int_equal(side_files(p), 0);
}

/* ---- a locked file (issue 14, item 7) ---- */

static double mono(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + t.tv_nsec * 1e-9;
}

/* A child holding the write lock of p for hold_s seconds; returns once it
 * holds it. */
static pid_t hold_lock(const char *p, double hold_s)
{
	int fds[2];
	char c;
	pid_t pid;
	assert_int_equal(pipe(fds), 0);
	pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		sqlite3 *h;
		close(fds[0]);
		if (sqlite3_open(p, &h) != SQLITE_OK ||
		    sqlite3_exec(h, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
			_exit(1);
		if (write(fds[1], "l", 1) != 1)
			_exit(2);
		usleep((useconds_t)(hold_s * 1e6));
		sqlite3_exec(h, "COMMIT", NULL, NULL, NULL);
		sqlite3_close(h);
		_exit(0);
	}
	close(fds[1]);
	assert_int_equal(read(fds[0], &c, 1), 1);
	close(fds[0]);
	return pid;
}

static void waits_for_lock(void **state)
{
	char p[256], err[IM_ERRLEN], *said = NULL;
	size_t n = 0;
	userdb *u;
	solution s;
	FILE *notice;
	pid_t pid;
	int status;
	double t0, waited;
	(void)state;
	path(p, "busy.db");
	assert_int_equal(udb_open(p, 1, &u, err), 0);
	sol_init(&s, "bath");
	sol_add(&s, refdb_compound(db, "NaCl"), 140);
	/* held longer than we wait: the save gives up, naming file and cause */
	pid = hold_lock(p, 2.0);
	udb_set_patience(u, 0.5, 2, NULL);
	t0 = mono();
	assert_int_equal(udb_save(u, &s, err), -1);
	waited = mono() - t0;
	assert_true(waited >= 0.45 && waited < 5); /* not the 30 s default */
	assert_non_null(strstr(err, p));
	assert_non_null(strstr(err, "locked"));
	assert_int_equal(waitpid(pid, &status, 0), pid);
	assert_true(WIFEXITED(status) && WEXITSTATUS(status) == 0);
	/* held 2.5 s: the save waits it out, saying so once after 2 s */
	notice = open_memstream(&said, &n);
	udb_set_patience(u, 30, 2, notice);
	pid = hold_lock(p, 2.5);
	t0 = mono();
	assert_int_equal(udb_save(u, &s, err), 0);
	waited = mono() - t0;
	fclose(notice);
	assert_true(waited >= 2.0 && waited < 10);
	assert_string_equal(said, "waiting for the database (locked by another ionmix)...\n");
	free(said);
	assert_int_equal(waitpid(pid, &status, 0), pid);
	assert_true(WIFEXITED(status) && WEXITSTATUS(status) == 0);
	udb_close(u);
	sol_free(&s);
	printf("userdb: waited out a 2.5 s lock in %.2f s\n", waited);
}

/* ---- a new file and an upgraded one (schema) ---- */

/* The tables as version 1 of ionmix created them (its schema_sql, word
 * for word: ALTER TABLE edits this text in sqlite_master). */
static const char v1_sql[] =
	"CREATE TABLE IF NOT EXISTS solutions ("
	"  name TEXT PRIMARY KEY,"
	"  saved_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%SZ','now')),"
	"  ph_target REAL,"
	"  co2_frac REAL NOT NULL DEFAULT 0,"
	"  co2_p_atm REAL NOT NULL DEFAULT 1,"
	"  co2_dry INTEGER NOT NULL DEFAULT 0);"
	"CREATE TABLE IF NOT EXISTS solution_items ("
	"  solution TEXT NOT NULL REFERENCES solutions(name) ON DELETE CASCADE,"
	"  position INTEGER NOT NULL,"
	"  compound TEXT NOT NULL,"
	"  mM REAL NOT NULL CHECK (mM > 0),"
	"  stock_mM REAL NOT NULL DEFAULT 0,"
	"  titrant INTEGER NOT NULL DEFAULT 0,"
	"  PRIMARY KEY (solution, position));"
	"CREATE TABLE IF NOT EXISTS user_compounds ("
	"  name TEXT PRIMARY KEY, formula TEXT NOT NULL, fw_g_mol REAL NOT NULL,"
	"  yields TEXT NOT NULL, note TEXT);"
	"PRAGMA user_version = 1;";

/* The schema of the file at p as text: user_version, then one line per
 * entry of sqlite_master (type, name, table, SQL) by name; *rows counts
 * the entries. */
static char *schema_text(const char *p, int *rows)
{
	sqlite3 *h;
	sqlite3_stmt *st;
	char *out = NULL;
	size_t len = 0;
	FILE *f = open_memstream(&out, &len);
	assert_non_null(f);
	assert_int_equal(sqlite3_open_v2(p, &h, SQLITE_OPEN_READONLY, NULL), SQLITE_OK);
	assert_int_equal(sqlite3_prepare_v2(h, "PRAGMA user_version", -1, &st, NULL), SQLITE_OK);
	assert_int_equal(sqlite3_step(st), SQLITE_ROW);
	fprintf(f, "user_version %d\n", sqlite3_column_int(st, 0));
	sqlite3_finalize(st);
	assert_int_equal(sqlite3_prepare_v2(h,
					    "SELECT type, name, tbl_name, sql FROM sqlite_master "
					    "ORDER BY name", -1, &st, NULL), SQLITE_OK);
	*rows = 0;
	while (sqlite3_step(st) == SQLITE_ROW) {
		for (int i = 0; i < 4; i++) {
			const unsigned char *t = sqlite3_column_text(st, i);
			fprintf(f, "%s%s", i ? " | " : "", t ? (const char *)t : "NULL");
		}
		fputc('\n', f);
		(*rows)++;
	}
	sqlite3_finalize(st);
	sqlite3_close(h);
	fclose(f);
	return out;
}

/* A missing file is created from the image of an empty database (in WAL
 * mode); an empty file is given its tables by SQL; a file of version 1 is
 * upgraded step by step; all three end with the same schema, the SQL text
 * of every table and index included. */
static void new_file_as_upgraded(void **state)
{
	char pn[256], pe[256], po[256], err[IM_ERRLEN], want[32];
	userdb *u;
	sqlite3 *h;
	sqlite3_stmt *st;
	char *tn, *te, *to;
	int rn, re, ro;
	(void)state;
	path(pn, "schema-new.db");
	path(pe, "schema-empty.db");
	path(po, "schema-old.db");
	assert_int_equal(udb_open(pn, 1, &u, err), 0);
	udb_close(u);
	assert_int_equal(sqlite3_open(pn, &h), SQLITE_OK);
	assert_int_equal(sqlite3_prepare_v2(h, "PRAGMA journal_mode", -1, &st, NULL), SQLITE_OK);
	assert_int_equal(sqlite3_step(st), SQLITE_ROW);
	assert_string_equal((const char *)sqlite3_column_text(st, 0), "wal");
	sqlite3_finalize(st);
	sqlite3_close(h);
	write_file(pe, "", 0);
	if (udb_open(pe, 1, &u, err) != 0)
		fail_msg("empty file: %s", err);
	udb_close(u);
	assert_int_equal(sqlite3_open(po, &h), SQLITE_OK);
	assert_int_equal(sqlite3_exec(h, v1_sql, NULL, NULL, NULL), SQLITE_OK);
	sqlite3_close(h);
	if (udb_open(po, 1, &u, err) != 0)
		fail_msg("upgrade: %s", err);
	udb_close(u);
	tn = schema_text(pn, &rn);
	te = schema_text(pe, &re);
	to = schema_text(po, &ro);
	/* every table of every version: 3 + 1 + 7, each with its index */
	assert_true(rn >= 11);
	assert_int_equal(rn, ro);
	assert_int_equal(re, ro);
	snprintf(want, sizeof want, "user_version %d\n", UDB_SCHEMA_VERSION);
	assert_non_null(strstr(tn, want));
	assert_non_null(strstr(tn, "fw_g_mol REAL NOT NULL DEFAULT 0,  PRIMARY KEY"));
	assert_string_equal(tn, to);
	assert_string_equal(te, to);
	free(tn);
	free(te);
	free(to);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(round_trip), cmocka_unit_test(corrupted_untouched),
		cmocka_unit_test(newer_and_foreign), cmocka_unit_test(unwritable),
		cmocka_unit_test(refused_paths), cmocka_unit_test(unreachable),
		cmocka_unit_test(default_place), cmocka_unit_test(edited_rows),
		cmocka_unit_test(read_only_file), cmocka_unit_test(waits_for_lock),
		cmocka_unit_test(new_file_as_upgraded),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
