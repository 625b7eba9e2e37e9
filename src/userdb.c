/*
 * userdb.c - saved solutions in the user's SQLite file.
 */
#include "userdb.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <sqlite3.h>

#include "common.h"

struct userdb {
	sqlite3 *db;
	char *path;
};

static const char schema_sql[] =
	"CREATE TABLE IF NOT EXISTS solutions ("
	"  name TEXT PRIMARY KEY,"
	"  saved_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%SZ','now')),"
	"  ph_target REAL,"                      /* NULL: not titrated */
	"  co2_frac REAL NOT NULL DEFAULT 0,"    /* CO2 gas, fraction */
	"  co2_p_atm REAL NOT NULL DEFAULT 1,"
	"  co2_dry INTEGER NOT NULL DEFAULT 0);"
	"CREATE TABLE IF NOT EXISTS solution_items ("
	"  solution TEXT NOT NULL REFERENCES solutions(name) ON DELETE CASCADE,"
	"  position INTEGER NOT NULL,"
	"  compound TEXT NOT NULL,"          /* canonical name in the reference db */
	"  mM REAL NOT NULL CHECK (mM > 0),"
	"  stock_mM REAL NOT NULL DEFAULT 0,"
	"  titrant INTEGER NOT NULL DEFAULT 0,"  /* 1: added by `ph` */
	"  PRIMARY KEY (solution, position));"
	/* user-defined compounds, same columns as the reference table */
	"CREATE TABLE IF NOT EXISTS user_compounds ("
	"  name TEXT PRIMARY KEY, formula TEXT NOT NULL, fw_g_mol REAL NOT NULL,"
	"  yields TEXT NOT NULL, note TEXT);";

static int mkdirs(const char *path, char *err)
{
	char buf[4096];
	size_t n = strlen(path);
	if (n >= sizeof buf)
		return im_fail(err, "database path too long");
	memcpy(buf, path, n + 1);
	for (char *p = buf + 1; *p; p++) {
		if (*p != '/')
			continue;
		*p = '\0';
		if (mkdir(buf, 0755) != 0 && errno != EEXIST)
			return im_fail(err, "cannot create directory %s: %s", buf,
				       strerror(errno));
		*p = '/';
	}
	return 0;
}

static int fail_db(userdb *u, char *err, const char *what)
{
	int code = sqlite3_errcode(u->db);
	if (code == SQLITE_NOTADB || code == SQLITE_CORRUPT)
		return im_fail(err, "%s is not a readable ionmix database (%s); it was left untouched",
			       u->path, sqlite3_errmsg(u->db));
	if (code == SQLITE_FULL)
		return im_fail(err, "%s: disk full while %s; nothing was changed", u->path, what);
	if (code == SQLITE_IOERR) {
		/* say why when the system said: "File too large", "Disk quota
		 * exceeded" */
		int e = sqlite3_system_errno(u->db);
		return im_fail(err, "%s: input/output error while %s%s%s%s; nothing was changed",
			       u->path, what, e ? " (" : "", e ? strerror(e) : "", e ? ")" : "");
	}
	if (code == SQLITE_READONLY || code == SQLITE_CANTOPEN || code == SQLITE_PERM)
		return im_fail(err, "%s cannot be written (%s); nothing was changed", u->path,
			       sqlite3_errmsg(u->db));
	return im_fail(err, "%s: %s while %s", u->path, sqlite3_errmsg(u->db), what);
}

static int user_version(userdb *u, int *v)
{
	sqlite3_stmt *st;
	int rc = sqlite3_prepare_v2(u->db, "PRAGMA user_version", -1, &st, NULL);
	if (rc == SQLITE_OK && (rc = sqlite3_step(st)) == SQLITE_ROW) {
		*v = sqlite3_column_int(st, 0);
		rc = SQLITE_OK;
	}
	sqlite3_finalize(st);
	return rc;
}

/* Create the tables of a new, empty database.  Two processes may both get
 * here for the same new file: the write lock is taken first (BEGIN
 * IMMEDIATE waits out the other through the busy timeout), and the schema
 * version is read again under it, so the second finds the work done. */
static int create_schema(userdb *u, char *err)
{
	char sql[sizeof schema_sql + 64];
	int v = 0;
	for (int tries = 0; tries < 50; tries++) {
		int rc = sqlite3_exec(u->db, "PRAGMA journal_mode = WAL", NULL, NULL, NULL);
		if (rc == SQLITE_OK)
			break;
		if (rc != SQLITE_BUSY && rc != SQLITE_LOCKED)
			return fail_db(u, err, "creating the tables");
		sqlite3_sleep(20);
	}
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
		return fail_db(u, err, "creating the tables");
	if (user_version(u, &v) != SQLITE_OK) {
		fail_db(u, err, "creating the tables");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	if (v != 0)
		return sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK
			       ? 0 : fail_db(u, err, "opening");
	snprintf(sql, sizeof sql, "%s PRAGMA user_version = %d; COMMIT;", schema_sql,
		 UDB_SCHEMA_VERSION);
	if (sqlite3_exec(u->db, sql, NULL, NULL, NULL) != SQLITE_OK) {
		fail_db(u, err, "creating the tables");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	return 0;
}

int udb_open(const char *path, int create, userdb **out, char *err)
{
	userdb *u;
	int v = 0, tables = 0;
	sqlite3_stmt *st;
	*out = NULL;
	if (access(path, F_OK) != 0) {
		if (!create)
			return 1;
		if (mkdirs(path, err))
			return -1;
	}
	u = im_xcalloc(1, sizeof *u);
	u->path = im_xstrdup(path);
	if (sqlite3_open_v2(path, &u->db,
			    SQLITE_OPEN_READWRITE | (create ? SQLITE_OPEN_CREATE : 0),
			    NULL) != SQLITE_OK) {
		fail_db(u, err, "opening");
		udb_close(u);
		return -1;
	}
	sqlite3_busy_timeout(u->db, 5000);
	/* Reading the schema is the first touch of the file: a corrupted or
	 * foreign file fails here, before anything is written. */
	if (sqlite3_prepare_v2(u->db, "SELECT count(*) FROM sqlite_master", -1, &st,
			       NULL) != SQLITE_OK ||
	    sqlite3_step(st) != SQLITE_ROW) {
		sqlite3_finalize(st);
		fail_db(u, err, "reading");
		udb_close(u);
		return -1;
	}
	tables = sqlite3_column_int(st, 0);
	sqlite3_finalize(st);
	if (user_version(u, &v) != SQLITE_OK) {
		fail_db(u, err, "reading");
		udb_close(u);
		return -1;
	}
	if (v > UDB_SCHEMA_VERSION) {
		im_fail(err, "%s has schema version %d, newer than this ionmix knows (%d); "
			     "it was left untouched: use a newer ionmix",
			u->path, v, UDB_SCHEMA_VERSION);
		udb_close(u);
		return -1;
	}
	if (v == 0 && tables > 0) {
		im_fail(err, "%s is an SQLite file but not an ionmix database; it was left untouched",
			u->path);
		udb_close(u);
		return -1;
	}
	if (v == 0 && create_schema(u, err)) {
		udb_close(u);
		return -1;
	}
	sqlite3_exec(u->db, "PRAGMA foreign_keys = ON", NULL, NULL, NULL);
	*out = u;
	return 0;
}

void udb_close(userdb *u)
{
	if (!u)
		return;
	sqlite3_close(u->db);
	free(u->path);
	free(u);
}

static int step_done(sqlite3_stmt *st)
{
	int rc = sqlite3_step(st);
	sqlite3_reset(st);
	return rc == SQLITE_DONE ? 0 : -1;
}

int udb_save(userdb *u, const solution *s, char *err)
{
	sqlite3_stmt *del = NULL, *ins = NULL, *item = NULL;
	int ok = 0;
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
		return fail_db(u, err, "starting to save");
	if (sqlite3_prepare_v2(u->db, "DELETE FROM solutions WHERE name = ?1", -1, &del, NULL) ||
	    sqlite3_prepare_v2(u->db,
			       "INSERT INTO solutions(name, ph_target, co2_frac, co2_p_atm, co2_dry)"
			       " VALUES (?1, ?2, ?3, ?4, ?5)", -1, &ins, NULL) ||
	    sqlite3_prepare_v2(u->db,
			       "INSERT INTO solution_items(solution, position, compound, mM,"
			       " stock_mM, titrant) VALUES (?1, ?2, ?3, ?4, ?5, ?6)", -1, &item,
			       NULL))
		goto done;
	sqlite3_bind_text(del, 1, s->name, -1, SQLITE_STATIC);
	sqlite3_bind_text(ins, 1, s->name, -1, SQLITE_STATIC);
	if (isfinite(s->ph_target))
		sqlite3_bind_double(ins, 2, s->ph_target);
	else
		sqlite3_bind_null(ins, 2);
	sqlite3_bind_double(ins, 3, s->co2_frac);
	sqlite3_bind_double(ins, 4, s->co2_p_atm);
	sqlite3_bind_int(ins, 5, s->co2_dry);
	if (step_done(del) || step_done(ins))
		goto done;
	for (int i = 0; i < s->n; i++) {
		sqlite3_bind_text(item, 1, s->name, -1, SQLITE_STATIC);
		sqlite3_bind_int(item, 2, i);
		sqlite3_bind_text(item, 3, s->items[i].c->name, -1, SQLITE_STATIC);
		sqlite3_bind_double(item, 4, s->items[i].mM);
		sqlite3_bind_double(item, 5, s->items[i].stock_mM);
		sqlite3_bind_int(item, 6, s->items[i].titrant);
		if (step_done(item))
			goto done;
	}
	ok = sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK;
done:
	if (!ok) {
		fail_db(u, err, "saving");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
	}
	sqlite3_finalize(del);
	sqlite3_finalize(ins);
	sqlite3_finalize(item);
	return ok ? 0 : -1;
}

int udb_load(userdb *u, const refdb *ref, const char *name, solution *out, char *err)
{
	sqlite3_stmt *st;
	int found = 0, rc;
	sol_init(out, name);
	if (sqlite3_prepare_v2(u->db, "SELECT ph_target, co2_frac, co2_p_atm, co2_dry FROM"
			       " solutions WHERE name = ?1", -1, &st, NULL) != SQLITE_OK)
		return fail_db(u, err, "loading");
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	if (sqlite3_step(st) == SQLITE_ROW) {
		found = 1;
		if (sqlite3_column_type(st, 0) != SQLITE_NULL)
			out->ph_target = sqlite3_column_double(st, 0);
		out->co2_frac = sqlite3_column_double(st, 1);
		out->co2_p_atm = sqlite3_column_double(st, 2);
		out->co2_dry = sqlite3_column_int(st, 3);
	}
	sqlite3_finalize(st);
	if (!found)
		return im_fail(err, "no saved solution named '%s' (see `list`)", name);
	if (sqlite3_prepare_v2(u->db,
			       "SELECT compound, mM, stock_mM, titrant FROM solution_items"
			       " WHERE solution = ?1 ORDER BY position", -1, &st, NULL) != SQLITE_OK)
		return fail_db(u, err, "loading");
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *cname = (const char *)sqlite3_column_text(st, 0);
		const rd_compound *c = refdb_compound(ref, cname);
		if (!c) {
			im_fail(err, "saved solution '%s' uses '%s', which this ionmix does not know",
				name, cname);
			sqlite3_finalize(st);
			sol_free(out);
			return -1;
		}
		sol_set(out, c, sqlite3_column_double(st, 1));
		sol_find(out, c)->stock_mM = sqlite3_column_double(st, 2);
		sol_find(out, c)->titrant = sqlite3_column_int(st, 3);
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE) {
		sol_free(out);
		return fail_db(u, err, "loading");
	}
	return 0;
}

int udb_list(userdb *u, char ***names, char *err)
{
	sqlite3_stmt *st;
	int n = 0, cap = 8, rc;
	*names = NULL;
	if (sqlite3_prepare_v2(u->db, "SELECT name FROM solutions ORDER BY name", -1, &st,
			       NULL) != SQLITE_OK)
		return fail_db(u, err, "listing");
	*names = im_xmalloc(cap * sizeof **names);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (n == cap)
			*names = im_xrealloc(*names, (cap *= 2) * sizeof **names);
		(*names)[n++] = im_xstrdup((const char *)sqlite3_column_text(st, 0));
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE) {
		for (int i = 0; i < n; i++)
			free((*names)[i]);
		free(*names);
		*names = NULL;
		return fail_db(u, err, "listing");
	}
	return n;
}

int udb_delete(userdb *u, const char *name, char *err)
{
	sqlite3_stmt *st;
	int rc;
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
		return fail_db(u, err, "deleting");
	if (sqlite3_prepare_v2(u->db, "DELETE FROM solutions WHERE name = ?1", -1, &st,
			       NULL) != SQLITE_OK) {
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return fail_db(u, err, "deleting");
	}
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	rc = sqlite3_step(st);
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE) {
		fail_db(u, err, "deleting");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	if (sqlite3_changes(u->db) == 0) {
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return im_fail(err, "no saved solution named '%s' (see `list`)", name);
	}
	if (sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) != SQLITE_OK) {
		fail_db(u, err, "deleting");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	return 0;
}

char *udb_default_path(void)
{
	const char *env = getenv("IONMIX_DB"), *xdg = getenv("XDG_DATA_HOME"),
		   *home = getenv("HOME");
	char buf[4096];
	if (env && *env)
		return im_xstrdup(env);
	if (xdg && *xdg == '/')
		snprintf(buf, sizeof buf, "%s/ionmix/ionmix.db", xdg);
	else
		snprintf(buf, sizeof buf, "%s/.local/share/ionmix/ionmix.db",
			 home && *home ? home : ".");
	return im_xstrdup(buf);
}
