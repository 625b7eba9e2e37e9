/*
 * userdb.c - saved solutions in the user's SQLite file.
 */
#include "userdb.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <sqlite3.h>

#include "common.h"
#include "fileio.h"
#include "units.h"

/* The tables of a new file, at version UDB_SCHEMA_VERSION in one step.
 * Version 1 had solutions, solution_items and user_compounds without the
 * columns that version 3 adds (note, fw_g_mol; see migrate_keep); they are
 * written here as that upgrade leaves them (ALTER TABLE ... ADD COLUMN
 * puts ", column" after the last column), so that a new file and an
 * upgraded one have the same schema, the text in sqlite_master included
 * (test_userdb).  The rest is migrate_targets_sql and schema_keep_sql. */
static const char schema_sql[] =
	"CREATE TABLE IF NOT EXISTS solutions ("
	"  name TEXT PRIMARY KEY,"
	"  saved_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%SZ','now')),"
	"  ph_target REAL,"                      /* NULL: not titrated */
	"  co2_frac REAL NOT NULL DEFAULT 0,"    /* CO2 gas, fraction */
	"  co2_p_atm REAL NOT NULL DEFAULT 1,"
	"  co2_dry INTEGER NOT NULL DEFAULT 0, note TEXT NOT NULL DEFAULT '');"
	"CREATE TABLE IF NOT EXISTS solution_items ("
	"  solution TEXT NOT NULL REFERENCES solutions(name) ON DELETE CASCADE,"
	"  position INTEGER NOT NULL,"
	"  compound TEXT NOT NULL,"          /* canonical name in the reference db */
	"  mM REAL NOT NULL CHECK (mM > 0),"
	"  stock_mM REAL NOT NULL DEFAULT 0,"
	"  titrant INTEGER NOT NULL DEFAULT 0, fw_g_mol REAL NOT NULL DEFAULT 0," /* 1: by `ph` */
	"  PRIMARY KEY (solution, position));"
	/* user-defined compounds, same columns as the reference table */
	"CREATE TABLE IF NOT EXISTS user_compounds ("
	"  name TEXT PRIMARY KEY, formula TEXT NOT NULL, fw_g_mol REAL NOT NULL,"
	"  yields TEXT NOT NULL, note TEXT);";

/* Version 2: the targets a solution holds (solution.h sol_target), each
 * with the compound it adds and the temperature at which it holds. */
static const char migrate_targets_sql[] =
	"CREATE TABLE IF NOT EXISTS solution_targets ("
	"  scope INTEGER NOT NULL DEFAULT 0,"   /* 0 saved, 1 a saved version, 2 kept */
	"  solution TEXT NOT NULL,"
	"  version INTEGER NOT NULL DEFAULT 0," /* the version (scope 1), else 0 */
	"  position INTEGER NOT NULL,"
	"  kind TEXT NOT NULL CHECK (kind IN ('ph', 'free', 'osmo')),"
	"  value REAL NOT NULL,"             /* pH; free metal, mM; mOsm/kg */
	"  compound TEXT NOT NULL,"          /* what is added to reach it */
	"  metal TEXT,"                      /* 'free': the ion's symbol */
	"  at_C REAL NOT NULL,"              /* where it holds */
	"  PRIMARY KEY (scope, solution, version, position));";

/* Schema version 3 (migrate_keep): every saved version of a solution, and
 * the shell's workspace kept as it changes.  The same columns as solutions and
 * solution_items, keyed further by version. */
static const char schema_keep_sql[] =
	"CREATE TABLE IF NOT EXISTS solution_versions ("
	"  name TEXT NOT NULL, version INTEGER NOT NULL,"
	"  saved_at TEXT NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%SZ','now')),"
	"  summary TEXT NOT NULL DEFAULT '',"
	"  ph_target REAL, co2_frac REAL NOT NULL DEFAULT 0,"
	"  co2_p_atm REAL NOT NULL DEFAULT 1, co2_dry INTEGER NOT NULL DEFAULT 0,"
	"  note TEXT NOT NULL DEFAULT '',"
	"  PRIMARY KEY (name, version));"
	"CREATE TABLE IF NOT EXISTS solution_version_items ("
	"  solution TEXT NOT NULL, version INTEGER NOT NULL, position INTEGER NOT NULL,"
	"  compound TEXT NOT NULL, mM REAL NOT NULL CHECK (mM > 0),"
	"  stock_mM REAL NOT NULL DEFAULT 0, titrant INTEGER NOT NULL DEFAULT 0,"
	"  fw_g_mol REAL NOT NULL DEFAULT 0,"
	"  PRIMARY KEY (solution, version, position));"
	"CREATE TABLE IF NOT EXISTS kept_solutions ("
	"  name TEXT PRIMARY KEY, version INTEGER NOT NULL DEFAULT 0,"
	"  position INTEGER NOT NULL,"
	"  ph_target REAL, co2_frac REAL NOT NULL DEFAULT 0,"
	"  co2_p_atm REAL NOT NULL DEFAULT 1, co2_dry INTEGER NOT NULL DEFAULT 0,"
	"  note TEXT NOT NULL DEFAULT '');"
	"CREATE TABLE IF NOT EXISTS kept_items ("
	"  solution TEXT NOT NULL, version INTEGER NOT NULL DEFAULT 0,"
	"  position INTEGER NOT NULL,"
	"  compound TEXT NOT NULL, mM REAL NOT NULL CHECK (mM > 0),"
	"  stock_mM REAL NOT NULL DEFAULT 0, titrant INTEGER NOT NULL DEFAULT 0,"
	"  fw_g_mol REAL NOT NULL DEFAULT 0,"
	"  PRIMARY KEY (solution, position));"
	"CREATE TABLE IF NOT EXISTS kept_state (key TEXT PRIMARY KEY, value);"
	/* user-defined ions and compounds (`define`), re-read at start */
	"CREATE TABLE IF NOT EXISTS defined_ions ("
	"  symbol TEXT PRIMARY KEY, z INTEGER NOT NULL, D_1e9_m2_s REAL, source TEXT,"
	"  mass_g_mol REAL);"
	"CREATE TABLE IF NOT EXISTS defined_compounds ("
	"  name TEXT PRIMARY KEY, formula TEXT NOT NULL, yields TEXT NOT NULL DEFAULT '',"
	"  hazard TEXT, source TEXT);";

/* The columns version 3 adds to the tables of version 1 (migrate_keep):
 * the bottle's formula weight of an item (`fw`; 0: the table's) and the
 * user's note on a solution (`note`). */
static const char schema_keep_alter_sql[] =
	"ALTER TABLE solution_items ADD COLUMN fw_g_mol REAL NOT NULL DEFAULT 0;"
	"ALTER TABLE solutions ADD COLUMN note TEXT NOT NULL DEFAULT '';";

/* Where a solution's rows live: saved (the latest), a saved version, or
 * the kept workspace.  The head and item tables share their columns. */
typedef enum { ROWS_SAVED, ROWS_VERSION, ROWS_KEPT } rows_kind;
static const struct {
	const char *head, *items;
} rows_tab[] = {
	{"solutions", "solution_items"},
	{"solution_versions", "solution_version_items"},
	{"kept_solutions", "kept_items"},
};

/* Statements kept prepared per connection (stmt_get). */
#define UDB_STMT_MAX 24

/* Backoff between retries: doubles from 1 ms up to this, with jitter. */
#define BACKOFF_MAX_MS 100

struct userdb {
	sqlite3 *db;
	char *path;
	double wait_max_s;   /* total wait on a lock per statement, s */
	double notice_s;     /* tell `notice` after this long, s */
	FILE *notice;        /* NULL: wait silently */
	double busy_t0;      /* monotonic time the current wait began, s */
	int noticed;         /* the notice was given for the current wait */
	unsigned seed;       /* jitter */
	int schema;          /* the file's schema version */
	/* the statements of saving, prepared once per connection (stmt_get) */
	struct {
		char *sql;
		sqlite3_stmt *st;
	} stmt[UDB_STMT_MAX];
	int nstmt;
	/* compounds the reference data do not know (user-defined) */
	const rd_compound *(*lookup)(void *arg, const char *name);
	void *lookup_arg;
};

static double mono_s(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + t.tv_nsec * 1e-9;
}

/* SQLite's busy handler: count is 0 at the first retry of a lock.  Sleep
 * 1, 2, 4 ... BACKOFF_MAX_MS ms (each between half and all of that, at
 * random, so that waiting writers do not retry in step) until the total
 * reaches wait_max_s; then give up (SQLITE_BUSY reaches the caller). */
static int on_busy(void *arg, int count)
{
	userdb *u = arg;
	double now = mono_s(), left;
	int ms;
	if (count == 0) {
		u->busy_t0 = now;
		u->noticed = 0;
	}
	left = u->wait_max_s - (now - u->busy_t0);
	if (left <= 0)
		return 0;
	if (u->notice && !u->noticed && now - u->busy_t0 >= u->notice_s) {
		fprintf(u->notice, "waiting for the database (locked by another ionmix)...\n");
		fflush(u->notice);
		u->noticed = 1;
	}
	ms = count < 7 ? 1 << count : BACKOFF_MAX_MS;
	if (ms > BACKOFF_MAX_MS)
		ms = BACKOFF_MAX_MS;
	ms = ms / 2 + (int)(rand_r(&u->seed) % (unsigned)(ms - ms / 2 + 1));
	if (ms < 1)
		ms = 1;
	if (ms > left * 1000.0)
		ms = (int)(left * 1000.0) + 1;
	sqlite3_sleep(ms);
	return 1;
}

void udb_set_patience(userdb *u, double wait_s, double notice_s, FILE *notice)
{
	u->wait_max_s = wait_s;
	u->notice_s = notice_s;
	u->notice = notice;
}

/* Create the missing directories above path (not its last component). */
static int mkdirs(const char *path, char *err)
{
	char *buf = im_xstrdup(path);
	for (char *p = buf + 1; *p; p++) {
		if (*p != '/')
			continue;
		*p = '\0';
		if (mkdir(buf, 0755) != 0 && errno != EEXIST) {
			im_fail(err, "cannot create directory %s: %s", buf, strerror(errno));
			free(buf);
			return -1;
		}
		*p = '/';
	}
	free(buf);
	return 0;
}

/* " (Permission denied)" when SQLite saw a system error, else "". */
static const char *sys_cause(userdb *u, char *buf, size_t n)
{
	int e = sqlite3_system_errno(u->db);
	if (!e && sqlite3_errcode(u->db) == SQLITE_READONLY && access(u->path, W_OK) != 0)
		e = errno;
	if (!e) {
		/* SQLite kept no errno (a short write, say): name the step */
		static const struct {
			int code;
			const char *what;
		} steps[] = {
			{SQLITE_IOERR_WRITE, "a write to it failed"},
			{SQLITE_IOERR_FSYNC, "flushing it to disk failed"},
			{SQLITE_IOERR_TRUNCATE, "truncating it failed"},
			{SQLITE_IOERR_READ, "a read failed"},
			{SQLITE_IOERR_SHORT_READ, "it ended early"},
			{SQLITE_IOERR_SHMMAP, "mapping its -shm file failed"},
			{SQLITE_IOERR_LOCK, "locking it failed"},
		};
		int x = sqlite3_extended_errcode(u->db);
		buf[0] = '\0';
		for (size_t i = 0; i < IM_COUNT(steps); i++)
			if (steps[i].code == x)
				snprintf(buf, n, ": %s", steps[i].what);
		return buf;
	}
	snprintf(buf, n, ": %s", strerror(e));
	return buf;
}

static int fail_db(userdb *u, char *err, const char *what)
{
	int code = sqlite3_errcode(u->db);
	char cause[128];
	sys_cause(u, cause, sizeof cause);
	if (code == SQLITE_NOTADB || code == SQLITE_CORRUPT)
		return im_fail(err, "%s is not a readable ionmix database (%s); it was left untouched",
			       u->path, sqlite3_errmsg(u->db));
	if (code == SQLITE_FULL)
		return im_fail(err, "%s: disk full while %s; nothing was changed", u->path, what);
	if (code == SQLITE_BUSY || code == SQLITE_LOCKED)
		return im_fail(err, "%s is locked by another program (waited %.0f s) while %s; "
				    "nothing was changed", u->path, u->wait_max_s, what);
	if (code == SQLITE_IOERR)
		/* say why when the system said: "File too large", "Disk quota
		 * exceeded" */
		return im_fail(err, "%s: input/output error while %s%s; nothing was changed",
			       u->path, what, cause);
	if (code == SQLITE_READONLY || code == SQLITE_CANTOPEN || code == SQLITE_PERM)
		return im_fail(err, "%s cannot be written (%s%s); nothing was changed", u->path,
			       sqlite3_errmsg(u->db), cause);
	return im_fail(err, "%s: %s%s while %s", u->path, sqlite3_errmsg(u->db), cause, what);
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

/* Create the tables of a new, empty database at the current version
 * directly (no migration steps: they are for older files).  Two processes
 * may both get here for the same new file: the write lock is taken first
 * (BEGIN IMMEDIATE waits out the other through the busy timeout), and the
 * schema version is read again under it, so the second finds the work
 * done. */
static int create_schema(userdb *u, char *err)
{
	char sql[sizeof schema_sql + sizeof migrate_targets_sql + sizeof schema_keep_sql + 64];
	int v = 0;
	/* switching the journal can report busy without calling the busy
	 * handler: retry it here, as long as a writer would wait */
	double t0 = mono_s();
	for (int tries = 0;; tries++) {
		int rc = sqlite3_exec(u->db, "PRAGMA journal_mode = WAL", NULL, NULL, NULL);
		if (rc == SQLITE_OK)
			break;
		if ((rc != SQLITE_BUSY && rc != SQLITE_LOCKED) || mono_s() - t0 > u->wait_max_s)
			return fail_db(u, err, "creating the tables");
		sqlite3_sleep(tries < 5 ? 1 << tries : 20);
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
	snprintf(sql, sizeof sql, "%s%s%s PRAGMA user_version = %d; COMMIT;", schema_sql,
		 migrate_targets_sql, schema_keep_sql, UDB_SCHEMA_VERSION);
	if (sqlite3_exec(u->db, sql, NULL, NULL, NULL) != SQLITE_OK) {
		fail_db(u, err, "creating the tables");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	return 0;
}


/* What kind of file st is, for "is a directory, not a database file". */
static const char *file_kind(const struct stat *st)
{
	if (S_ISDIR(st->st_mode))
		return "a directory";
	if (S_ISFIFO(st->st_mode))
		return "a FIFO";
	if (S_ISCHR(st->st_mode))
		return "a character device";
	if (S_ISBLK(st->st_mode))
		return "a block device";
	if (S_ISSOCK(st->st_mode))
		return "a socket";
	return "not a regular file";
}

int udb_check_path(const char *path, char *err)
{
	struct stat st;
	size_t n = path ? strlen(path) : 0;
	if (n == 0)
		return im_fail(err, "the database path is empty: name a file (--db PATH)");
	if (strcmp(path, ":memory:") == 0)
		return im_fail(err, "database '%s' would live only in memory: name a file "
				    "(--db PATH)", path);
	if (strncmp(path, "file:", 5) == 0)
		return im_fail(err, "database '%s' is a URI: name the file itself (--db PATH)",
			       path);
	if (path[n - 1] == '/')
		return im_fail(err, "database path '%s' ends in '/': name a file "
				    "(--db PATH)", path);
	if (stat(path, &st) == 0 && !S_ISREG(st.st_mode))
		return im_fail(err, "database %s is %s, not a database file", path,
			       file_kind(&st));
	return 0;
}

/* Can an existing file be used?  0 when it is a regular file we can read
 * (*exists = 1) or when it is missing (*exists = 0); else -1 with the
 * path and the system's cause. */
static int probe_file(const char *path, int *exists, char *err)
{
	struct stat st;
	int fd;
	*exists = 0;
	if (stat(path, &st) != 0) {
		if (errno == ENOENT)
			return 0;
		return im_fail(err, "cannot reach the database %s: %s", path, strerror(errno));
	}
	if (!S_ISREG(st.st_mode))
		return im_fail(err, "database %s is %s, not a database file", path,
			       file_kind(&st));
	if ((fd = open(path, O_RDONLY | O_NONBLOCK)) < 0)
		return im_fail(err, "cannot read the database %s: %s", path, strerror(errno));
	close(fd);
	*exists = 1;
	return 0;
}

/* May a file be created in the directory of path?  0, or -1 with err
 * naming the file and the cause (SQLite would report a stale errno). */
static int dir_writable(const char *path, char *err)
{
	char *d = im_xstrdup(path), *slash = strrchr(d, '/');
	int rc = 0;
	if (!slash)
		strcpy(d, ".");
	else if (slash == d)
		slash[1] = '\0';
	else
		*slash = '\0';
	if (access(d, W_OK | X_OK) != 0)
		rc = im_fail(err, "the database %s cannot be created: %s; nothing was changed", path,
			     strerror(errno));
	free(d);
	return rc;
}

/* Does path+suffix exist? */
static int side_exists(const char *path, const char *suffix)
{
	size_t n = strlen(path), m = strlen(suffix);
	char *p = im_xmalloc(n + m + 1);
	struct stat st;
	int r;
	memcpy(p, path, n);
	memcpy(p + n, suffix, m + 1);
	r = lstat(p, &st) == 0;
	free(p);
	return r;
}

/* "file:PATH?immutable=1", with the characters a URI path reserves
 * escaped.  Caller frees. */
static char *immutable_uri(const char *path)
{
	size_t n = strlen(path);
	char *u = im_xmalloc(3 * n + 32), *q = u;
	q += sprintf(q, path[0] == '/' ? "file://" : "file:"); /* empty authority */
	for (const char *p = path; *p; p++) {
		if (*p == '%' || *p == '?' || *p == '#')
			q += sprintf(q, "%%%02X", (unsigned char)*p);
		else
			*q++ = *p;
	}
	strcpy(q, "?immutable=1");
	return u;
}

/* ---- migration steps: each brings the schema from version N - 1 to N ---- */

static int migrate_targets(userdb *u)
{
	return sqlite3_exec(u->db, migrate_targets_sql, NULL, NULL, NULL);
}

/* The steps, index N - 2 for version N. */
/* Version 3: every saved version, the shell's kept workspace, defined
 * ions and compounds, the bottle's formula weight of an item
 * (schema_keep_sql). */
static int migrate_keep(userdb *u)
{
	int rc = sqlite3_exec(u->db, schema_keep_sql, NULL, NULL, NULL);
	return rc == SQLITE_OK ? sqlite3_exec(u->db, schema_keep_alter_sql, NULL, NULL, NULL) : rc;
}

static int (*const migrate_step[])(userdb *u) = {migrate_targets, migrate_keep};

/* Write the copy kept before an upgrade: VACUUM INTO a name of this
 * process's own, then link it to `copy`, so that several processes
 * upgrading the same file at once never write into one another's copy
 * (VACUUM INTO an existing database fails); the first copy made stands. */
static int keep_backup(userdb *u, const char *copy, char *err)
{
	char *tmp = im_xmalloc(strlen(copy) + 32), *sql;
	int rc, e = 0;
	sprintf(tmp, "%s.%ld.tmp", copy, (long)getpid());
	unlink(tmp);
	sql = sqlite3_mprintf("VACUUM INTO %Q", tmp);
	rc = sqlite3_exec(u->db, sql, NULL, NULL, NULL);
	sqlite3_free(sql);
	if (rc != SQLITE_OK)
		im_fail(err, "%s: could not keep a copy as %s before upgrading it (%s); it was "
			     "left untouched", u->path, copy, sqlite3_errmsg(u->db));
	else if (link(tmp, copy) != 0 && (e = errno) != EEXIST) {
		im_fail(err, "%s: could not keep a copy as %s before upgrading it (%s); it was "
			     "left untouched", u->path, copy, strerror(e));
		rc = SQLITE_ERROR;
	}
	unlink(tmp);
	free(tmp);
	return rc == SQLITE_OK ? 0 : -1;
}

/* Keep a copy of the file as it is beside it (PATH.vV-backup), then run
 * the missing steps and set the version in one transaction (a file just
 * created, keep_copy 0, has nothing to keep); the version
 * is read again under the write lock, so a second process finds the work
 * done.  A failure rolls back and leaves the file as it was. */
static int migrate(userdb *u, int keep_copy, char *err)
{
	int v = 0, rc = SQLITE_OK;
	char *copy;
	if (user_version(u, &v) != SQLITE_OK)
		return fail_db(u, err, "reading");
	if (v >= UDB_SCHEMA_VERSION)
		return 0;
	copy = im_xmalloc(strlen(u->path) + 32);
	sprintf(copy, "%s.v%d-backup", u->path, v);
	if (keep_copy && access(copy, F_OK) != 0 && keep_backup(u, copy, err)) {
		free(copy);
		return -1;
	}
	free(copy);
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
		return fail_db(u, err, "upgrading");
	if (user_version(u, &v) != SQLITE_OK)
		rc = SQLITE_ERROR;
	for (; rc == SQLITE_OK && v < UDB_SCHEMA_VERSION; v++)
		rc = migrate_step[v - 1](u);
	if (rc == SQLITE_OK) {
		char set[48];
		snprintf(set, sizeof set, "PRAGMA user_version = %d", UDB_SCHEMA_VERSION);
		rc = sqlite3_exec(u->db, set, NULL, NULL, NULL);
	}
	if (rc == SQLITE_OK && sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK)
		return 0;
	fail_db(u, err, "upgrading");
	sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
	return -1;
}

/* The bytes of an empty database at the current schema: the statements
 * of create_schema run once per process on an in-memory database and
 * serialized, marked for WAL (the file format's read and write versions,
 * bytes 18 and 19 of the header, 2 for WAL: SQLite's file format document,
 * from memory; test_userdb checks that such a file opens in WAL).  A new
 * file is written from them (create_from_image), which costs a fraction of
 * running the statements on the file: no schema re-reads per table, no
 * WAL frames to checkpoint on close.  Kept until the process ends. */
static unsigned char *image;
static size_t image_len;

static int empty_image(char *err)
{
	sqlite3 *db = NULL;
	unsigned char *p = NULL;
	sqlite3_int64 n = 0;
	char sql[sizeof schema_sql + sizeof migrate_targets_sql + sizeof schema_keep_sql + 64];
	if (image)
		return 0;
	snprintf(sql, sizeof sql, "%s%s%s PRAGMA user_version = %d;", schema_sql,
		 migrate_targets_sql, schema_keep_sql, UDB_SCHEMA_VERSION);
	if (sqlite3_open(":memory:", &db) != SQLITE_OK ||
	    sqlite3_exec(db, sql, NULL, NULL, NULL) != SQLITE_OK ||
	    (p = sqlite3_serialize(db, "main", &n, 0)) == NULL || n < 100) {
		im_fail(err, "cannot make a new database: %s",
			db ? sqlite3_errmsg(db) : "out of memory");
		sqlite3_free(p);
		sqlite3_close(db);
		return -1;
	}
	image = im_xmalloc((size_t)n);
	memcpy(image, p, (size_t)n);
	image_len = (size_t)n;
	image[18] = image[19] = 2;
	sqlite3_free(p);
	sqlite3_close(db);
	return 0;
}

/* Create the missing file path from the image: written to a temporary
 * file beside it, synced and linked into place (fio_commit_new), so no
 * other process ever sees it half-written and none is overwritten (a file
 * another process created first stands).  0 when path exists afterwards;
 * 1 when hard links are not supported there (the caller then lets SQLite
 * create the file and runs create_schema); -1 with err naming path. */
static int create_from_image(const char *path, char *err)
{
	fio_file *f;
	int existed, rc;
	if (empty_image(err) || fio_open(&f, path, err))
		return -1;
	if (fwrite(image, 1, image_len, fio_stream(f)) != image_len) {
		int e = errno;
		fio_abort(f);
		return im_fail(err, "cannot write %s: %s", path, strerror(e ? e : EIO));
	}
	rc = fio_commit_new(f, &existed, err);
	return rc == -2 ? 1 : rc;
}

int udb_open(const char *path, int create, userdb **out, char *err)
{
	userdb *u;
	int v = 0, tables = 0, exists, flags, rc, werr = 0;
	char *name = NULL;
	sqlite3_stmt *st;
	*out = NULL;
	if (udb_check_path(path, err) || probe_file(path, &exists, err))
		return -1;
	if (!exists) {
		if (!create)
			return 1;
		if (mkdirs(path, err) || dir_writable(path, err) ||
		    create_from_image(path, err) < 0)
			return -1;
	}
	flags = SQLITE_OPEN_READWRITE | (create ? SQLITE_OPEN_CREATE : 0);
	/* A file only to be read, which we may not write, with no journal
	 * beside it (wholly checkpointed): SQLite would create an empty -wal
	 * and -shm next to it and could not remove them.  Read it as it is. */
	if (exists && access(path, W_OK) != 0 && (werr = errno) != 0 &&
	    !side_exists(path, "-wal") && !side_exists(path, "-shm")) {
		if (create)
			return im_fail(err, "the database %s cannot be written: %s; nothing was "
					    "changed", path, strerror(werr));
		name = immutable_uri(path);
		flags = SQLITE_OPEN_READONLY | SQLITE_OPEN_URI;
	}
	u = im_xcalloc(1, sizeof *u);
	u->path = im_xstrdup(path);
	u->wait_max_s = UDB_WAIT_S;
	u->notice_s = UDB_NOTICE_S;
	u->seed = (unsigned)getpid() ^ (unsigned)(unsigned long long)(mono_s() * 1e6);
	rc = sqlite3_open_v2(name ? name : path, &u->db, flags, NULL);
	free(name);
	if (rc != SQLITE_OK) {
		if (!u->db) {
			udb_close(u);
			return im_fail(err, "%s: out of memory opening it", path);
		}
		fail_db(u, err, "opening");
		udb_close(u);
		return -1;
	}
	sqlite3_busy_handler(u->db, on_busy, u);
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
	if (v == 0 && !create) { /* an empty file: nothing saved yet, and reading
				  * writes nothing */
		udb_close(u);
		return 1;
	}
	if (v == 0 && create_schema(u, err)) {
		udb_close(u);
		return -1;
	}
	u->schema = v ? v : UDB_SCHEMA_VERSION;
	/* an older file is upgraded when it may be written (one just created
	 * is at the current version, unless an older ionmix created it first);
	 * read-only, it is read as it stands (no targets, no versions, no kept
	 * workspace) */
	if (!(flags & SQLITE_OPEN_READONLY)) {
		if (migrate(u, v != 0, err)) {
			udb_close(u);
			return -1;
		}
		u->schema = UDB_SCHEMA_VERSION;
	}
	sqlite3_exec(u->db, "PRAGMA foreign_keys = ON", NULL, NULL, NULL);
	*out = u;
	return 0;
}

struct sqlite3 *udb_sqlite(userdb *u)
{
	return u->db;
}

void udb_close(userdb *u)
{
	if (!u)
		return;
	for (int i = 0; i < u->nstmt; i++) {
		sqlite3_finalize(u->stmt[i].st);
		free(u->stmt[i].sql);
	}
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

/* The statement for sql, prepared on the first use and kept for the
 * connection's life (SQLite prepares it again by itself if the schema
 * changes): a save runs a dozen statements, and scripts and the shell save
 * again and again.  Give it back with stmt_put, never finalize it.  Once
 * UDB_STMT_MAX are kept, further ones are prepared for one use (stmt_put
 * finalizes those).  SQLITE_OK or SQLite's error code (*st NULL then). */
static int stmt_get(userdb *u, const char *sql, sqlite3_stmt **st)
{
	int rc;
	for (int i = 0; i < u->nstmt; i++)
		if (strcmp(u->stmt[i].sql, sql) == 0) {
			*st = u->stmt[i].st;
			return SQLITE_OK;
		}
	rc = sqlite3_prepare_v3(u->db, sql, -1, SQLITE_PREPARE_PERSISTENT, st, NULL);
	if (rc == SQLITE_OK && u->nstmt < UDB_STMT_MAX) {
		u->stmt[u->nstmt].sql = im_xstrdup(sql);
		u->stmt[u->nstmt++].st = *st;
	}
	return rc;
}

/* Done with a statement of stmt_get: reset, its bindings cleared (no
 * pointer into the caller's memory stays behind); NULL is ignored. */
static void stmt_put(userdb *u, sqlite3_stmt *st)
{
	if (!st)
		return;
	for (int i = 0; i < u->nstmt; i++)
		if (u->stmt[i].st == st) {
			sqlite3_reset(st);
			sqlite3_clear_bindings(st);
			return;
		}
	sqlite3_finalize(st);
}

static const char *const target_kind[] = {"ph", "free", "osmo"};

/* The targets of s as rows of solution_targets under scope (a saved
 * solution, a saved version, the kept workspace) and version, replacing
 * what was there (inside the caller's transaction). */
static int save_targets(userdb *u, const solution *s, int scope, int version)
{
	sqlite3_stmt *st, *del;
	int rc = 0;
	if (u->schema < 2)
		return 0;
	if (stmt_get(u, "DELETE FROM solution_targets WHERE scope = ?1 AND"
		     " solution = ?2 AND version = ?3", &del) != SQLITE_OK)
		return -1;
	sqlite3_bind_int(del, 1, scope);
	sqlite3_bind_text(del, 2, s->name, -1, SQLITE_STATIC);
	sqlite3_bind_int(del, 3, version);
	rc = step_done(del);
	stmt_put(u, del);
	if (rc)
		return -1;
	if (stmt_get(u, "INSERT INTO solution_targets(solution, position, kind,"
		     " value, compound, metal, at_C, scope, version) VALUES (?1, ?2, ?3,"
		     " ?4, ?5, ?6, ?7, ?8, ?9)", &st) != SQLITE_OK)
		return -1;
	for (int k = 0; k < s->ntg && !rc; k++) {
		const sol_target *t = &s->tg[k];
		sqlite3_bind_int(st, 8, scope);
		sqlite3_bind_int(st, 9, version);
		sqlite3_bind_text(st, 1, s->name, -1, SQLITE_STATIC);
		sqlite3_bind_int(st, 2, k);
		sqlite3_bind_text(st, 3, target_kind[t->kind], -1, SQLITE_STATIC);
		sqlite3_bind_double(st, 4, t->value);
		sqlite3_bind_text(st, 5, t->with->name, -1, SQLITE_STATIC);
		if (t->metal)
			sqlite3_bind_text(st, 6, t->metal->symbol, -1, SQLITE_STATIC);
		else
			sqlite3_bind_null(st, 6);
		sqlite3_bind_double(st, 7, t->at_C);
		rc = step_done(st);
		sqlite3_clear_bindings(st);
	}
	stmt_put(u, st);
	return rc;
}

/* Write s into the tables of kind k (inside the caller's transaction),
 * replacing what was there under its name (and version: the version
 * number, or the position in the kept workspace). */
static int save_rows(userdb *u, rows_kind k, const solution *s, int version)
{
	static const char *const head_cols[] = {
		"(name, ph_target, co2_frac, co2_p_atm, co2_dry, note) VALUES (?1, ?3, ?4, ?5, ?6,"
		" ?7)",
		"(name, version, ph_target, co2_frac, co2_p_atm, co2_dry, note) VALUES (?1, ?2, ?3,"
		" ?4, ?5, ?6, ?7)",
		"(name, position, ph_target, co2_frac, co2_p_atm, co2_dry, note) VALUES (?1, ?2, ?3,"
		" ?4, ?5, ?6, ?7)",
	};
	static const char *const item_cols[] = {
		"(solution, position, compound, mM, stock_mM, titrant, fw_g_mol) VALUES (?1, ?3, ?4,"
		" ?5, ?6, ?7, ?8)",
		"(solution, version, position, compound, mM, stock_mM, titrant, fw_g_mol) VALUES"
		" (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8)",
		"(solution, position, compound, mM, stock_mM, titrant, fw_g_mol) VALUES (?1, ?3, ?4,"
		" ?5, ?6, ?7, ?8)",
	};
	const char *vcond = k == ROWS_VERSION ? " AND version = ?2" : "";
	char sql[256];
	sqlite3_stmt *del = NULL, *deli = NULL, *ins = NULL, *item = NULL;
	int ok = 0;
	snprintf(sql, sizeof sql, "DELETE FROM %s WHERE name = ?1%s", rows_tab[k].head, vcond);
	if (stmt_get(u, sql, &del))
		goto done;
	snprintf(sql, sizeof sql, "DELETE FROM %s WHERE solution = ?1%s", rows_tab[k].items,
		 vcond);
	if (stmt_get(u, sql, &deli))
		goto done;
	snprintf(sql, sizeof sql, "INSERT INTO %s%s", rows_tab[k].head, head_cols[k]);
	if (stmt_get(u, sql, &ins))
		goto done;
	snprintf(sql, sizeof sql, "INSERT INTO %s%s", rows_tab[k].items, item_cols[k]);
	if (stmt_get(u, sql, &item))
		goto done;
	sqlite3_bind_text(del, 1, s->name, -1, SQLITE_STATIC);
	sqlite3_bind_text(deli, 1, s->name, -1, SQLITE_STATIC);
	sqlite3_bind_text(ins, 1, s->name, -1, SQLITE_STATIC);
	if (k == ROWS_VERSION) {
		sqlite3_bind_int(del, 2, version);
		sqlite3_bind_int(deli, 2, version);
	}
	sqlite3_bind_int(ins, 2, version);
	if (isfinite(s->ph_target))
		sqlite3_bind_double(ins, 3, s->ph_target);
	else
		sqlite3_bind_null(ins, 3);
	sqlite3_bind_double(ins, 4, s->co2_frac);
	sqlite3_bind_double(ins, 5, s->co2_p_atm);
	sqlite3_bind_int(ins, 6, s->co2_dry);
	sqlite3_bind_text(ins, 7, s->note, -1, SQLITE_STATIC);
	if (step_done(deli) || step_done(del) || step_done(ins))
		goto done;
	for (int i = 0; i < s->n; i++) {
		sqlite3_bind_text(item, 1, s->name, -1, SQLITE_STATIC);
		sqlite3_bind_int(item, 2, version);
		sqlite3_bind_int(item, 3, i);
		sqlite3_bind_text(item, 4, s->items[i].c->name, -1, SQLITE_STATIC);
		sqlite3_bind_double(item, 5, s->items[i].mM);
		sqlite3_bind_double(item, 6, s->items[i].stock_mM);
		sqlite3_bind_int(item, 7, s->items[i].titrant);
		sqlite3_bind_double(item, 8, s->items[i].fw_g_mol);
		if (step_done(item))
			goto done;
	}
	if (save_targets(u, s, (int)k, k == ROWS_KEPT ? 0 : version))
		goto done;
	ok = 1;
done:
	stmt_put(u, del);
	stmt_put(u, deli);
	stmt_put(u, ins);
	stmt_put(u, item);
	return ok ? 0 : -1;
}

/* Do the saved targets of name equal those of s (in order, numbers
 * exactly)?  1 yes, 0 no, -1 on a database error. */
static int same_targets_as_saved(userdb *u, const solution *s)
{
	sqlite3_stmt *st;
	int same = 1, n = 0, rc;
	if (stmt_get(u, "SELECT kind, value, compound, metal, at_C FROM"
		     " solution_targets WHERE scope = ?1 AND solution = ?2 AND"
		     " version = 0 ORDER BY position", &st))
		return -1;
	sqlite3_bind_int(st, 1, ROWS_SAVED);
	sqlite3_bind_text(st, 2, s->name, -1, SQLITE_STATIC);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *kind = (const char *)sqlite3_column_text(st, 0);
		const char *with = (const char *)sqlite3_column_text(st, 2);
		const char *metal = (const char *)sqlite3_column_text(st, 3);
		const sol_target *t = n < s->ntg ? &s->tg[n] : NULL;
		if (!t || !kind || strcmp(kind, target_kind[t->kind]) != 0 ||
		    sqlite3_column_double(st, 1) != t->value ||
		    !with || strcmp(with, t->with->name) != 0 ||
		    (metal == NULL) != (t->metal == NULL) ||
		    (metal && strcmp(metal, t->metal->symbol) != 0) ||
		    sqlite3_column_double(st, 4) != t->at_C)
			same = 0;
		n++;
	}
	stmt_put(u, st);
	if (rc != SQLITE_DONE)
		return -1;
	return same && n == s->ntg;
}

/* Do the saved rows of name equal s (compounds by name, numbers
 * exactly)?  1 yes, 0 no or nothing saved, -1 on a database error. */
static int same_as_saved(userdb *u, const solution *s)
{
	sqlite3_stmt *st;
	int same = 1, n = 0, rc;
	if (stmt_get(u, "SELECT ph_target, co2_frac, co2_p_atm, co2_dry, note FROM"
		     " solutions WHERE name = ?1", &st))
		return -1;
	sqlite3_bind_text(st, 1, s->name, -1, SQLITE_STATIC);
	rc = sqlite3_step(st);
	if (rc != SQLITE_ROW) {
		stmt_put(u, st);
		return rc == SQLITE_DONE ? 0 : -1;
	}
	if (sqlite3_column_type(st, 0) == SQLITE_NULL ? isfinite(s->ph_target)
	    : sqlite3_column_double(st, 0) != s->ph_target)
		same = 0;
	if (sqlite3_column_double(st, 1) != s->co2_frac ||
	    sqlite3_column_double(st, 2) != s->co2_p_atm || sqlite3_column_int(st, 3) != s->co2_dry)
		same = 0;
	if (strcmp(sqlite3_column_text(st, 4) ? (const char *)sqlite3_column_text(st, 4) : "",
		   s->note) != 0)
		same = 0;
	stmt_put(u, st);
	if (stmt_get(u, "SELECT compound, mM, stock_mM, titrant, fw_g_mol FROM"
		     " solution_items WHERE solution = ?1 ORDER BY position", &st))
		return -1;
	sqlite3_bind_text(st, 1, s->name, -1, SQLITE_STATIC);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *c = (const char *)sqlite3_column_text(st, 0);
		if (n >= s->n || !c || strcmp(c, s->items[n].c->name) != 0 ||
		    sqlite3_column_double(st, 1) != s->items[n].mM ||
		    sqlite3_column_double(st, 2) != s->items[n].stock_mM ||
		    sqlite3_column_int(st, 3) != s->items[n].titrant ||
		    sqlite3_column_double(st, 4) != s->items[n].fw_g_mol)
			same = 0;
		n++;
	}
	stmt_put(u, st);
	if (rc != SQLITE_DONE)
		return -1;
	if (same && n == s->n)
		return same_targets_as_saved(u, s);
	return 0;
}

/* The one-line summary of a version: its compounds with amounts (the
 * first four), the target pH. */
static void summarize(const solution *s, char *buf, size_t n)
{
	size_t len = 0;
	buf[0] = '\0';
	len += snprintf(buf, n, "%d compound%s", s->n, s->n == 1 ? "" : "s");
	for (int i = 0; i < s->n && i < 4 && len < n; i++)
		len += snprintf(buf + len, n - len, "%s %s %.4g mM", i ? "," : ":",
				s->items[i].c->name, s->items[i].mM);
	if (s->n > 4 && len < n)
		len += snprintf(buf + len, n - len, ", ...");
	if (isfinite(s->ph_target) && len < n)
		len += snprintf(buf + len, n - len, "; pH %.2f", s->ph_target);
	for (int k = 0; k < s->ntg && len < n; k++)
		len += snprintf(buf + len, n - len, "%s%s", k ? ", " : "; targets: ",
				target_kind[s->tg[k].kind]);
}

/* The highest version of name (0: none), or -1 on error. */
static int last_version(userdb *u, const char *name)
{
	sqlite3_stmt *st;
	int v = -1;
	if (stmt_get(u, "SELECT coalesce(max(version), 0) FROM solution_versions"
		     " WHERE name = ?1", &st))
		return -1;
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	if (sqlite3_step(st) == SQLITE_ROW)
		v = sqlite3_column_int(st, 0);
	stmt_put(u, st);
	return v;
}

/* A solution saved before versions were kept becomes version 1: 1 when
 * there was one, 0 when not, -1 on error. */
static int adopt_unversioned(userdb *u, const char *name)
{
	sqlite3_stmt *a = NULL, *b = NULL;
	int rc = -1;
	if (stmt_get(u,
		     "INSERT INTO solution_versions(name, version, saved_at, summary,"
		     " ph_target, co2_frac, co2_p_atm, co2_dry) SELECT name, 1, saved_at,"
		     " '(saved before versions were kept)', ph_target, co2_frac, co2_p_atm,"
		     " co2_dry FROM solutions WHERE name = ?1", &a) == SQLITE_OK &&
	    stmt_get(u,
		     "INSERT INTO solution_version_items(solution, version, position,"
		     " compound, mM, stock_mM, titrant, fw_g_mol) SELECT solution, 1,"
		     " position, compound, mM, stock_mM, titrant, fw_g_mol FROM"
		     " solution_items WHERE"
		     " solution = ?1", &b) == SQLITE_OK) {
		sqlite3_bind_text(a, 1, name, -1, SQLITE_STATIC);
		sqlite3_bind_text(b, 1, name, -1, SQLITE_STATIC);
		if (step_done(a) == 0) {
			rc = sqlite3_changes(u->db) > 0;
			if (step_done(b))
				rc = -1;
		}
	}
	stmt_put(u, a);
	stmt_put(u, b);
	return rc;
}

int udb_save_v(userdb *u, const solution *s, int *version, int *superseded, char *err)
{
	int ok = 0, same = 0, last = 0, v = 0, sup = 0;
	char summary[256];
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
		return fail_db(u, err, "starting to save");
	if (u->schema >= 3) {
		if ((same = same_as_saved(u, s)) < 0 || (last = last_version(u, s->name)) < 0)
			goto done;
		if (last == 0 && (last = adopt_unversioned(u, s->name)) < 0)
			goto done;
		if (same && last > 0) { /* nothing new to keep */
			v = last;
			ok = sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK;
			goto done;
		}
		sup = same ? 0 : last;
		v = last + 1;
	}
	if (save_rows(u, ROWS_SAVED, s, 0))
		goto done;
	if (u->schema >= 3) {
		sqlite3_stmt *st;
		if (save_rows(u, ROWS_VERSION, s, v))
			goto done;
		summarize(s, summary, sizeof summary);
		if (stmt_get(u, "UPDATE solution_versions SET summary = ?3 WHERE"
			     " name = ?1 AND version = ?2", &st))
			goto done;
		sqlite3_bind_text(st, 1, s->name, -1, SQLITE_STATIC);
		sqlite3_bind_int(st, 2, v);
		sqlite3_bind_text(st, 3, summary, -1, SQLITE_STATIC);
		if (step_done(st)) {
			stmt_put(u, st);
			goto done;
		}
		stmt_put(u, st);
	}
	ok = sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK;
done:
	if (!ok) {
		fail_db(u, err, "saving");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	if (version)
		*version = v;
	if (superseded)
		*superseded = sup;
	return 0;
}

int udb_save(userdb *u, const solution *s, char *err)
{
	return udb_save_v(u, s, NULL, NULL, err);
}

/* ---- loading: a saved row is checked like typed input ---- */

/* Bounds of typed input (cmd_core.c `add`/`stock`, cmd_chem.c `ph`/`gas`). */
#define AMOUNT_MIN_mM 1e-9 /* 1 fM */
#define PH_MIN 2.0
#define PH_MAX 12.0
#define PRESSURE_MIN_atm 0.1
#define PRESSURE_MAX_atm 5.0

/* Column i as a number: 0 with *v, or -1 with what it holds instead
 * ("empty (NULL)", "text 'abc'", "a blob", "inf") in buf. */
static int col_number(sqlite3_stmt *st, int i, double *v, char *buf, size_t n)
{
	switch (sqlite3_column_type(st, i)) {
	case SQLITE_INTEGER:
	case SQLITE_FLOAT:
		*v = sqlite3_column_double(st, i);
		if (isfinite(*v))
			return 0;
		snprintf(buf, n, "%g, not a finite number", *v);
		return -1;
	case SQLITE_NULL:
		snprintf(buf, n, "empty (NULL)");
		return -1;
	case SQLITE_TEXT:
		snprintf(buf, n, "text '%.24s', not a number", (const char *)sqlite3_column_text(st, i));
		return -1;
	default:
		snprintf(buf, n, "a blob, not a number");
		return -1;
	}
}

/* Column i as a flag, 0 or 1. */
static int col_flag(sqlite3_stmt *st, int i, int *v, char *buf, size_t n)
{
	double d;
	if (col_number(st, i, &d, buf, n))
		return -1;
	if (d != 0 && d != 1) {
		snprintf(buf, n, "%g, not 0 or 1", d);
		return -1;
	}
	*v = (int)d;
	return 0;
}

/* The solutions row of name, checked; 1 when there is none. */
static int load_head(userdb *u, rows_kind k, const char *name, int version, solution *out,
		     char *err)
{
	sqlite3_stmt *st;
	char why[96], sql[160];
	const char *col = NULL;
	double v;
	int rc;
	snprintf(sql, sizeof sql, "SELECT ph_target, co2_frac, co2_p_atm, co2_dry, %s FROM %s"
		 " WHERE name = ?1%s", u->schema >= 3 ? "note" : "''", rows_tab[k].head,
		 k == ROWS_VERSION ? " AND version = ?2" : "");
	if (sqlite3_prepare_v2(u->db, sql, -1, &st, NULL) != SQLITE_OK)
		return fail_db(u, err, "loading");
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	if (k == ROWS_VERSION)
		sqlite3_bind_int(st, 2, version);
	rc = sqlite3_step(st);
	if (rc != SQLITE_ROW) {
		sqlite3_finalize(st);
		if (rc == SQLITE_DONE)
			return 1;
		return fail_db(u, err, "loading");
	}
	if (sqlite3_column_type(st, 0) != SQLITE_NULL) {
		if (col_number(st, 0, &v, why, sizeof why))
			col = "target pH";
		else if (v < PH_MIN || v > PH_MAX)
			snprintf(why, sizeof why, "%g, outside %g to %g", v, PH_MIN, PH_MAX),
				col = "target pH";
		else
			out->ph_target = v;
	}
	if (!col) {
		if (col_number(st, 1, &v, why, sizeof why))
			col = "CO2 fraction";
		else if (v < 0 || v > 1)
			snprintf(why, sizeof why, "%g, outside 0 to 1", v), col = "CO2 fraction";
		else
			out->co2_frac = v;
	}
	if (!col) {
		if (col_number(st, 2, &v, why, sizeof why))
			col = "gas pressure";
		else if (v <= PRESSURE_MIN_atm || v > PRESSURE_MAX_atm)
			snprintf(why, sizeof why, "%g atm, outside %g to %g atm", v,
				 PRESSURE_MIN_atm, PRESSURE_MAX_atm), col = "gas pressure";
		else
			out->co2_p_atm = v;
	}
	if (!col && col_flag(st, 3, &out->co2_dry, why, sizeof why))
		col = "dry-gas flag";
	if (!col) {
		const char *note = (const char *)sqlite3_column_text(st, 4);
		if (sqlite3_column_type(st, 4) != SQLITE_TEXT || strlen(note) >= SOL_NOTE_MAX)
			snprintf(why, sizeof why, "not a text of at most %d bytes", SOL_NOTE_MAX - 1),
				col = "note";
		else
			snprintf(out->note, sizeof out->note, "%s", note);
	}
	sqlite3_finalize(st);
	if (col)
		return im_fail(err, "%s: saved solution '%s': %s is %s; nothing was loaded (was "
				    "the file edited?)", u->path, name, col, why);
	return 0;
}

/* One solution_items row into out, checked: 0, or -1 with err. */
static int load_item(userdb *u, const refdb *ref, sqlite3_stmt *st, solution *out,
		     char *err)
{
	const char *cname = (const char *)sqlite3_column_text(st, 0), *col = NULL;
	const rd_compound *c;
	char why[96];
	double mM = 0, stock = 0, fw = 0;
	int titrant = 0;
	if (!cname || !*cname)
		return im_fail(err, "%s: saved solution '%s' has a compound without a name; "
				    "nothing was loaded (was the file edited?)", u->path, out->name);
	if (!(c = refdb_compound(ref, cname)) && u->lookup)
		c = u->lookup(u->lookup_arg, cname);
	if (!c)
		return im_fail(err, "%s: saved solution '%s' uses '%.40s', which this ionmix does "
				    "not know; nothing was loaded", u->path, out->name, cname);
	if (sol_find(out, c))
		return im_fail(err, "%s: saved solution '%s' lists %s twice; nothing was loaded "
				    "(was the file edited?)", u->path, out->name, c->name);
	if (col_number(st, 1, &mM, why, sizeof why))
		col = "amount";
	else if (mM < AMOUNT_MIN_mM || mM > UNITS_MAX_mM)
		snprintf(why, sizeof why, "%g mM, outside 1 fM to %g M", mM, UNITS_MAX_mM / 1000),
			col = "amount";
	else if (col_number(st, 2, &stock, why, sizeof why))
		col = "stock";
	else if (stock != 0 && (stock < AMOUNT_MIN_mM || stock > UNITS_MAX_mM))
		snprintf(why, sizeof why, "%g mM, neither 0 (weighed) nor 1 fM to %g M", stock,
			 UNITS_MAX_mM / 1000), col = "stock";
	else if (col_flag(st, 3, &titrant, why, sizeof why))
		col = "titrant flag";
	else if (col_number(st, 4, &fw, why, sizeof why))
		col = "formula weight";
	else if (fw != 0 && !(fw >= 1 && fw <= 5000))
		snprintf(why, sizeof why, "%g g/mol, neither 0 (the table's) nor 1 to 5000", fw),
			col = "formula weight";
	if (col)
		return im_fail(err, "%s: saved solution '%s', %s: %s is %s; nothing was loaded "
				    "(was the file edited?)", u->path, out->name, c->name, col, why);
	sol_set(out, c, mM);
	sol_find(out, c)->stock_mM = stock;
	sol_find(out, c)->titrant = titrant;
	sol_find(out, c)->fw_g_mol = fw;
	return 0;
}

/* One solution_targets row into out, checked as the commands check what
 * is typed: 0, or -1 with err. */
static int load_target(userdb *u, const refdb *ref, sqlite3_stmt *st, solution *out,
		       char *err)
{
	const char *kind = (const char *)sqlite3_column_text(st, 0);
	const char *cname = (const char *)sqlite3_column_text(st, 2);
	const char *metal = (const char *)sqlite3_column_text(st, 3);
	sol_target t = {0};
	char why[96] = "";
	int k;
	for (k = 0; k < 3 && !(kind && strcmp(kind, target_kind[k]) == 0); k++)
		;
	t.kind = (sol_tg_kind)k;
	if (k == 3)
		snprintf(why, sizeof why, "a target of unknown kind '%.20s'", kind ? kind : "");
	else if (out->ntg == SOL_TG_MAX)
		snprintf(why, sizeof why, "more than %d targets", SOL_TG_MAX);
	else if (col_number(st, 1, &t.value, why, sizeof why) ||
		 col_number(st, 4, &t.at_C, why, sizeof why))
		;
	else if (!cname || !(t.with = refdb_compound(ref, cname)))
		snprintf(why, sizeof why, "a target adds '%.40s', unknown", cname ? cname : "");
	else if (k == SOL_TG_FREE && (!metal || !(t.metal = refdb_ion(ref, metal))))
		snprintf(why, sizeof why, "a target of the free '%.20s', unknown", metal ? metal : "");
	else if (!(t.at_C >= 0 && t.at_C <= 60))
		snprintf(why, sizeof why, "a target at %g C, outside 0 to 60 C", t.at_C);
	else if ((k == SOL_TG_PH && !(t.value >= PH_MIN && t.value <= PH_MAX)) ||
		 (k == SOL_TG_FREE && !(t.value > 0 && t.value <= UNITS_MAX_mM)) ||
		 (k == SOL_TG_OSMO && !(t.value > 0 && t.value <= 2000)))
		snprintf(why, sizeof why, "a %s target of %g, out of range", target_kind[k], t.value);
	if (why[0])
		return im_fail(err, "%s: saved solution '%s': %s; nothing was loaded (was the file "
				    "edited?)", u->path, out->name, why);
	out->tg[out->ntg++] = t;
	return 0;
}

/* The targets of out under scope and version (none in a file of schema
 * version 1, read where it stands). */
static int load_targets(userdb *u, const refdb *ref, solution *out, int scope, int version,
			char *err)
{
	sqlite3_stmt *st;
	int rc;
	if (u->schema < 2)
		return 0;
	if (sqlite3_prepare_v2(u->db, "SELECT kind, value, compound, metal, at_C FROM"
			       " solution_targets WHERE solution = ?1 AND scope = ?2 AND version = ?3"
			       " ORDER BY position", -1, &st, NULL) != SQLITE_OK)
		return fail_db(u, err, "loading");
	sqlite3_bind_text(st, 1, out->name, -1, SQLITE_STATIC);
	sqlite3_bind_int(st, 2, scope);
	sqlite3_bind_int(st, 3, version);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW)
		if (load_target(u, ref, st, out, err)) {
			sqlite3_finalize(st);
			return -1;
		}
	sqlite3_finalize(st);
	return rc == SQLITE_DONE ? 0 : fail_db(u, err, "loading");
}

/* Load the rows of kind k (and version) into out, checked. */
static int load_rows(userdb *u, const refdb *ref, rows_kind k, const char *name, int version,
		     solution *out, char *err)
{
	sqlite3_stmt *st;
	char sql[200];
	int rc;
	sol_init(out, name);
	rc = load_head(u, k, name, version, out, err);
	if (rc == 1 && k == ROWS_VERSION)
		rc = im_fail(err, "no version %d of '%s' (see `versions %s`)", version, name, name);
	else if (rc == 1)
		rc = im_fail(err, "no saved solution named '%s' (see `list`)", name);
	if (rc) {
		sol_free(out);
		return -1;
	}
	snprintf(sql, sizeof sql, "SELECT compound, mM, stock_mM, titrant, %s FROM %s WHERE"
		 " solution = ?1%s ORDER BY position", u->schema >= 3 ? "fw_g_mol" : "0",
		 rows_tab[k].items,
		 k == ROWS_VERSION ? " AND version = ?2" : "");
	if (sqlite3_prepare_v2(u->db, sql, -1, &st, NULL) != SQLITE_OK) {
		sol_free(out);
		return fail_db(u, err, "loading");
	}
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	if (k == ROWS_VERSION)
		sqlite3_bind_int(st, 2, version);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW)
		if (load_item(u, ref, st, out, err)) {
			sqlite3_finalize(st);
			sol_free(out);
			return -1;
		}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE) {
		sol_free(out);
		return fail_db(u, err, "loading");
	}
	if (load_targets(u, ref, out, (int)k, k == ROWS_KEPT ? 0 : version, err)) {
		sol_free(out);
		return -1;
	}
	return 0;
}

int udb_load(userdb *u, const refdb *ref, const char *name, solution *out, char *err)
{
	return load_rows(u, ref, ROWS_SAVED, name, 0, out, err);
}

static int need_v2(userdb *u, const char *what, char *err)
{
	if (u->schema >= 3)
		return 0;
	return im_fail(err, "%s: %s needs schema version 2; this file (version %d) could not be "
			    "upgraded because it is read-only", u->path, what, u->schema);
}

int udb_load_version(userdb *u, const refdb *ref, const char *name, int version,
		     solution *out, char *err)
{
	if (need_v2(u, "loading a version", err))
		return -1;
	return load_rows(u, ref, ROWS_VERSION, name, version, out, err);
}

int udb_versions(userdb *u, const char *name, udb_version **out, char *err)
{
	sqlite3_stmt *st;
	int n = 0, cap = 8, rc;
	*out = NULL;
	if (need_v2(u, "versions", err))
		return -1;
	if (sqlite3_prepare_v2(u->db, "SELECT version, saved_at, summary FROM solution_versions"
			       " WHERE name = ?1 ORDER BY version", -1, &st, NULL) != SQLITE_OK)
		return fail_db(u, err, "listing versions");
	sqlite3_bind_text(st, 1, name, -1, SQLITE_STATIC);
	*out = im_xmalloc((size_t)cap * sizeof **out);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *at = (const char *)sqlite3_column_text(st, 1);
		const char *sum = (const char *)sqlite3_column_text(st, 2);
		if (n == cap)
			*out = im_xrealloc(*out, (size_t)(cap *= 2) * sizeof **out);
		(*out)[n].version = sqlite3_column_int(st, 0);
		snprintf((*out)[n].saved_at, sizeof (*out)[n].saved_at, "%s", at ? at : "");
		(*out)[n].summary = im_xstrdup(sum ? sum : "");
		n++;
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE) {
		udb_versions_free(*out, n);
		*out = NULL;
		return fail_db(u, err, "listing versions");
	}
	return n;
}

void udb_versions_free(udb_version *v, int n)
{
	for (int i = 0; i < n; i++)
		free(v[i].summary);
	free(v);
}

/* ---- user-defined ions and compounds ---- */

void udb_set_lookup(userdb *u, const rd_compound *(*fn)(void *arg, const char *name),
		    void *arg)
{
	u->lookup = fn;
	u->lookup_arg = arg;
}

static int exec_bound(userdb *u, const char *sql, const char *what, const char *const *text,
		      int ntext, const double *num, int nnum, char *err)
{
	sqlite3_stmt *st;
	int ok;
	if (need_v2(u, what, err))
		return -1;
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK)
		return fail_db(u, err, what);
	if (sqlite3_prepare_v2(u->db, sql, -1, &st, NULL) != SQLITE_OK) {
		fail_db(u, err, what);
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	for (int i = 0; i < ntext; i++)
		if (text[i])
			sqlite3_bind_text(st, i + 1, text[i], -1, SQLITE_STATIC);
		else
			sqlite3_bind_null(st, i + 1);
	for (int i = 0; i < nnum; i++)
		if (isfinite(num[i]))
			sqlite3_bind_double(st, ntext + i + 1, num[i]);
		else
			sqlite3_bind_null(st, ntext + i + 1);
	ok = sqlite3_step(st) == SQLITE_DONE;
	sqlite3_finalize(st);
	if (ok)
		ok = sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK;
	if (!ok) {
		fail_db(u, err, what);
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
		return -1;
	}
	return 0;
}

int udb_define_ion(userdb *u, const rd_ion *ion, char *err)
{
	const char *text[] = {ion->symbol, ion->mobility_source ? ion->mobility_source->citation
							    : NULL};
	double num[] = {ion->z, ion->D_1e9_m2_s, ion->mass_g_mol};
	return exec_bound(u, "INSERT INTO defined_ions(symbol, source, z, D_1e9_m2_s, mass_g_mol)"
			  " VALUES (?1, ?2, ?3, ?4, ?5)", "defining an ion", text, 2, num, 3, err);
}

int udb_define_compound(userdb *u, const rd_compound *c, const char *source, char *err)
{
	char yields[512];
	const char *text[] = {c->name, c->formula, yields, c->hazard, source};
	uc_yields_text(c, yields, sizeof yields);
	if (c->nyields == 1 && c->yields[0].ion->z == 0 &&
	    strcmp(c->yields[0].ion->symbol, c->name) == 0)
		yields[0] = '\0'; /* a neutral solute of itself */
	return exec_bound(u, "INSERT INTO defined_compounds(name, formula, yields, hazard, source)"
			  " VALUES (?1, ?2, ?3, ?4, ?5)", "defining a compound", text, 5, NULL, 0,
			  err);
}

int udb_defined_read(userdb *u, const refdb *ref, usercomp *uc, char *err)
{
	sqlite3_stmt *st;
	int rc, n = 0;
	char why[IM_ERRLEN];
	if (u->schema < 3)
		return 0;
	if (sqlite3_prepare_v2(u->db, "SELECT symbol, z, D_1e9_m2_s, source, mass_g_mol FROM"
			       " defined_ions ORDER BY rowid", -1, &st, NULL))
		return fail_db(u, err, "reading the defined ions");
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *sym = (const char *)sqlite3_column_text(st, 0);
		uc_ion_def d = {sym ? sym : "", sqlite3_column_int(st, 1), NAN,
				(const char *)sqlite3_column_text(st, 3), NAN};
		if (sqlite3_column_type(st, 2) == SQLITE_FLOAT)
			d.D_1e9_m2_s = sqlite3_column_double(st, 2);
		if (sqlite3_column_type(st, 4) == SQLITE_FLOAT)
			d.mass_g_mol = sqlite3_column_double(st, 4);
		if (uc_ion(uc, d.symbol))
			continue; /* a neutral solute's own particle, added with it */
		if (uc_add_ion(uc, ref, &d, NULL, why)) {
			sqlite3_finalize(st);
			return im_fail(err, "%s: defined ion '%.40s': %s", u->path, d.symbol, why);
		}
		n++;
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE)
		return fail_db(u, err, "reading the defined ions");
	if (sqlite3_prepare_v2(u->db, "SELECT name, formula, yields, hazard, source FROM"
			       " defined_compounds ORDER BY rowid", -1, &st, NULL))
		return fail_db(u, err, "reading the defined compounds");
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *name = (const char *)sqlite3_column_text(st, 0);
		const char *yields = (const char *)sqlite3_column_text(st, 2);
		char ybuf[512], *save = NULL, *w;
		uc_compound_def d;
		memset(&d, 0, sizeof d);
		d.name = name ? name : "";
		d.formula = sqlite3_column_text(st, 1) ? (const char *)sqlite3_column_text(st, 1) : "";
		d.hazard = (const char *)sqlite3_column_text(st, 3);
		d.source = (const char *)sqlite3_column_text(st, 4);
		snprintf(ybuf, sizeof ybuf, "%s", yields ? yields : "");
		for (w = strtok_r(ybuf, " ", &save); w && d.nyields < UC_MAX_YIELDS;
		     w = strtok_r(NULL, " ", &save)) {
			char *cnt = strtok_r(NULL, " ", &save);
			d.yield_sym[d.nyields] = w;
			d.yield_n[d.nyields++] = cnt ? strtod(cnt, NULL) : NAN;
		}
		if (uc_add_compound(uc, ref, &d, NULL, why)) {
			sqlite3_finalize(st);
			return im_fail(err, "%s: defined compound '%.40s': %s", u->path, d.name, why);
		}
		n++;
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE)
		return fail_db(u, err, "reading the defined compounds");
	return n;
}

/* ---- the kept workspace ---- */

int udb_kept_write(userdb *u, const workspace *w, const char *const *names, int n,
		   double temp_C, char *err)
{
	sqlite3_stmt *del = NULL, *deli = NULL, *state = NULL;
	int ok = 0;
	if (need_v2(u, "keeping the workspace", err))
		return -1;
	/* a crash of the program cannot lose a WAL commit; only power loss
	 * could, which costs at most the last commands of the workspace */
	sqlite3_exec(u->db, "PRAGMA synchronous = NORMAL", NULL, NULL, NULL);
	if (sqlite3_exec(u->db, "BEGIN IMMEDIATE", NULL, NULL, NULL) != SQLITE_OK) {
		sqlite3_exec(u->db, "PRAGMA synchronous = FULL", NULL, NULL, NULL);
		return fail_db(u, err, "keeping the workspace");
	}
	if (sqlite3_prepare_v2(u->db, "DELETE FROM kept_solutions WHERE name = ?1", -1, &del,
			       NULL) ||
	    sqlite3_prepare_v2(u->db, "DELETE FROM kept_items WHERE solution = ?1", -1, &deli,
			       NULL) ||
	    sqlite3_prepare_v2(u->db, "INSERT OR REPLACE INTO kept_state(key, value) VALUES"
			       " (?1, ?2)", -1, &state, NULL))
		goto done;
	for (int j = 0; j < n; j++) {
		int i = ws_index_of(w, names[j]);
		if (i >= 0) {
			if (save_rows(u, ROWS_KEPT, w->sol[i], i))
				goto done;
			continue;
		}
		sqlite3_bind_text(del, 1, names[j], -1, SQLITE_STATIC);
		sqlite3_bind_text(deli, 1, names[j], -1, SQLITE_STATIC);
		if (step_done(del) || step_done(deli))
			goto done;
	}
	sqlite3_bind_text(state, 1, "temp_C", -1, SQLITE_STATIC);
	sqlite3_bind_double(state, 2, temp_C);
	if (step_done(state))
		goto done;
	sqlite3_bind_text(state, 1, "current", -1, SQLITE_STATIC);
	if (w->current >= 0)
		sqlite3_bind_text(state, 2, w->sol[w->current]->name, -1, SQLITE_STATIC);
	else
		sqlite3_bind_null(state, 2);
	if (step_done(state))
		goto done;
	ok = sqlite3_exec(u->db, "COMMIT", NULL, NULL, NULL) == SQLITE_OK;
done:
	if (!ok) {
		fail_db(u, err, "keeping the workspace");
		sqlite3_exec(u->db, "ROLLBACK", NULL, NULL, NULL);
	}
	sqlite3_finalize(del);
	sqlite3_finalize(deli);
	sqlite3_finalize(state);
	sqlite3_exec(u->db, "PRAGMA synchronous = FULL", NULL, NULL, NULL);
	return ok ? 0 : -1;
}

int udb_kept_read(userdb *u, const refdb *ref, workspace *w, double *temp_C, char *err)
{
	sqlite3_stmt *st;
	char current[SOL_NAME_MAX] = "";
	int rc, n = 0;
	if (u->schema < 3)
		return 0;
	if (sqlite3_prepare_v2(u->db, "SELECT key, value FROM kept_state", -1, &st, NULL))
		return fail_db(u, err, "reading the kept workspace");
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *k = (const char *)sqlite3_column_text(st, 0);
		if (!k)
			continue;
		if (strcmp(k, "temp_C") == 0 && sqlite3_column_type(st, 1) == SQLITE_FLOAT) {
			double t = sqlite3_column_double(st, 1);
			if (t >= 0 && t <= 60) /* as `temp` accepts */
				*temp_C = t;
		} else if (strcmp(k, "current") == 0 && sqlite3_column_text(st, 1)) {
			snprintf(current, sizeof current, "%s", sqlite3_column_text(st, 1));
		}
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE)
		return fail_db(u, err, "reading the kept workspace");
	if (sqlite3_prepare_v2(u->db, "SELECT name FROM kept_solutions ORDER BY position, name",
			       -1, &st, NULL))
		return fail_db(u, err, "reading the kept workspace");
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		const char *name = (const char *)sqlite3_column_text(st, 0);
		solution *s;
		if (!name || ws_index_of(w, name) >= 0)
			continue;
		s = im_xmalloc(sizeof *s);
		if (load_rows(u, ref, ROWS_KEPT, name, 0, s, err)) {
			free(s);
			sqlite3_finalize(st);
			return -1;
		}
		ws_put(w, s);
		n++;
	}
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE)
		return fail_db(u, err, "reading the kept workspace");
	w->current = current[0] ? ws_index_of(w, current) : -1;
	return n;
}

int udb_list(userdb *u, char ***names, char *err)
{
	sqlite3_stmt *st;
	int n = 0, cap = 8, rc, unnamed = 0;
	*names = NULL;
	if (sqlite3_prepare_v2(u->db, "SELECT name FROM solutions ORDER BY name", -1, &st,
			       NULL) != SQLITE_OK)
		return fail_db(u, err, "listing");
	*names = im_xmalloc(cap * sizeof **names);
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (n == cap)
			*names = im_xrealloc(*names, (cap *= 2) * sizeof **names);
		const char *name = (const char *)sqlite3_column_text(st, 0);
		if (!name) { /* a hand-edited row: name is not NOT NULL */
			unnamed = 1;
			break;
		}
		(*names)[n++] = im_xstrdup(name);
	}
	sqlite3_finalize(st);
	if (unnamed || rc != SQLITE_DONE) {
		for (int i = 0; i < n; i++)
			free((*names)[i]);
		free(*names);
		*names = NULL;
		if (unnamed)
			return im_fail(err, "%s: a saved solution has no name (NULL); the file was "
					    "edited by hand", u->path);
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

/* ---- where the database lives ---- */

/* Is p an absolute path to an existing directory? */
static int is_dir(const char *p)
{
	struct stat st;
	return p && p[0] == '/' && stat(p, &st) == 0 && S_ISDIR(st.st_mode);
}

/* malloc'd a + b */
static char *concat(const char *a, const char *b)
{
	size_t n = strlen(a), m = strlen(b);
	char *r = im_xmalloc(n + m + 1);
	memcpy(r, a, n);
	memcpy(r + n, b, m + 1);
	return r;
}

/* XDG_DATA_HOME is usable when absolute and its parent directory exists
 * (the XDG base directory specification ignores a relative value; at
 * most XDG_DATA_HOME itself and ionmix/ below it are created). */
static int xdg_usable(const char *xdg)
{
	char *parent, *slash;
	int ok;
	if (!xdg || xdg[0] != '/')
		return 0;
	parent = im_xstrdup(xdg);
	while ((slash = strrchr(parent, '/')) && slash[1] == '\0' && slash != parent)
		*slash = '\0'; /* "/data/" -> "/data" */
	slash = strrchr(parent, '/');
	if (slash == parent)
		slash[1] = '\0';
	else
		*slash = '\0';
	ok = is_dir(parent);
	free(parent);
	return ok;
}

int udb_nowhere(char *err)
{
	const char *home = getenv("HOME");
	const char *why = !home ? "HOME is not set"
			  : !*home ? "HOME is empty"
			  : home[0] != '/' ? "HOME is not an absolute path"
			  : "HOME is not an existing directory";
	return im_fail(err, "no place for the database: %s and XDG_DATA_HOME gives none; choose "
			    "a file with --db PATH or the IONMIX_DB environment variable", why);
}

int udb_default_path(char **out, char *err)
{
	const char *env = getenv("IONMIX_DB"), *xdg = getenv("XDG_DATA_HOME"),
		   *home = getenv("HOME");
	*out = NULL;
	if (env && *env) {
		if (udb_check_path(env, err))
			return -1;
		*out = im_xstrdup(env);
	} else if (xdg_usable(xdg)) {
		*out = concat(xdg, "/ionmix/ionmix.db");
	} else if (is_dir(home)) {
		*out = concat(home, "/.local/share/ionmix/ionmix.db");
	}
	return 0;
}
