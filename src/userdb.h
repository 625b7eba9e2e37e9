/*
 * userdb.h - the user's own database file: saved solutions (and room for
 * user-defined compounds), with a schema version, written in transactions
 * (WAL journal, busy timeout) so that a crash leaves each solution wholly
 * old or wholly new.  Never created at read-only start; never overwritten
 * when it is not an ionmix database or has a newer schema version.
 */
#ifndef IONMIX_USERDB_H
#define IONMIX_USERDB_H

#include <stdio.h>

#include "refdb.h"
#include "solution.h"
#include "usercomp.h"

/* The schema: a new file is created at this version directly (schema_sql,
 * migrate_targets_sql and schema_keep_sql in userdb.c); an older file is
 * brought to it on open by one migration step per version, in one
 * transaction, after a copy of the file is kept beside it
 * (PATH.vN-backup), and ends with the same schema as a new one.
 * 1: solutions, their items, user compounds; 2: solution_targets (the
 * targets of issue 11); 3: saved versions, the kept workspace, defined
 * ions and compounds, the bottle's formula weight of an item, the note. */
#define UDB_SCHEMA_VERSION 3
/* Seconds a statement waits for another process holding the database's
 * lock, and after how long an interactive user is told so. */
#define UDB_WAIT_S 30.0
#define UDB_NOTICE_S 2.0

typedef struct userdb userdb;

/* Open path (checked with udb_check_path).  create = 0: a missing file
 * (ENOENT) is not created; returns 1 with *out == NULL (no error).
 * create = 1: creates it and its directory.  Any other failure to reach,
 * read or lock an existing file (permission, symlink loop, a component
 * that is not a directory, corruption) returns -1 with err naming the
 * path and the cause.  An empty file is, for reading, no database yet
 * (returns 1), and is given its tables only when create = 1.  A file
 * opened only to read that this process may
 * not write, with no -wal/-shm beside it, is read as it stands so that
 * no empty -wal/-shm is left behind.  Returns 0 when open.  Caller owns
 * *out. */
int udb_open(const char *path, int create, userdb **out, char *err);
void udb_close(userdb *u);
/* The SQLite connection itself, for tests that look under the API (the
 * fuzz harness checks that no command left a transaction or statement
 * open, and empties the tables between its inputs).  Still owned by u. */
struct sqlite3 *udb_sqlite(userdb *u);

/* Save (replace) a solution in one transaction. */
int udb_save(userdb *u, const solution *s, char *err);
/* Save and keep a version: when the saved content of the name differs
 * from s (or nothing was saved), s becomes the next version (*version)
 * and *superseded the one it replaced (0: none); when equal, nothing new
 * is kept and *version is the existing one.  Either pointer may be NULL.
 * A solution saved before versions were kept becomes version 1 first. */
int udb_save_v(userdb *u, const solution *s, int *version, int *superseded, char *err);

/* One saved version: number, UTC time "YYYY-MM-DDTHH:MM:SSZ", summary
 * (owned). */
typedef struct udb_version {
	int version;
	char saved_at[32];
	char *summary;
} udb_version;

/* The versions of name, oldest first: the count (0: none) with *out
 * (free with udb_versions_free), or -1 with err. */
int udb_versions(userdb *u, const char *name, udb_version **out, char *err);
void udb_versions_free(udb_version *v, int n);
/* Load version `version` of name, checked as udb_load. */
int udb_load_version(userdb *u, const refdb *ref, const char *name, int version,
		     solution *out, char *err);

/* The shell's workspace, kept as it changes: write the named solutions
 * (those in w by their current content, the others removed), the
 * temperature and the current solution, in one transaction. */
int udb_kept_write(userdb *u, const workspace *w, const char *const *names, int n,
		   double temp_C, char *err);
/* Read the kept workspace into w (names already in w are skipped) and
 * *temp_C: the count of solutions restored, or -1 with err (a bad row is
 * named as udb_load does). */
int udb_kept_read(userdb *u, const refdb *ref, workspace *w, double *temp_C, char *err);

/* User-defined ions and compounds (`define`): store one (in one
 * transaction; a name already stored fails), or read them all into uc
 * (the count, or -1 with err naming a bad row).  source: the text given
 * with the compound, NULL when none. */
int udb_define_ion(userdb *u, const rd_ion *ion, char *err);
int udb_define_compound(userdb *u, const rd_compound *c, const char *source, char *err);
int udb_defined_read(userdb *u, const refdb *ref, usercomp *uc, char *err);
/* Where loading finds a compound the reference data do not know. */
void udb_set_lookup(userdb *u, const rd_compound *(*fn)(void *arg, const char *name),
		    void *arg);

/* Load a saved solution into out.  Every value is checked as typed input
 * is (finite; amounts and stocks within 1 fM to 5 M, stock 0 meaning
 * weighed; target pH 2 to 12; CO2 fraction 0 to 1, pressure 0.1 to 5 atm;
 * flags 0 or 1; compounds known to ref, each once): a bad row fails with
 * the solution and the compound named.  On success the caller frees out
 * with sol_free; on failure out holds nothing to free. */
int udb_load(userdb *u, const refdb *ref, const char *name, solution *out,
	     char *err);
/* Names of saved solutions, sorted.  *names is owned by the caller: free
 * each string and the array.  Returns the count or -1 with err. */
int udb_list(userdb *u, char ***names, char *err);
/* 0 when deleted, -1 with err (also when there is no such solution). */
int udb_delete(userdb *u, const char *name, char *err);

/* Is path fit to be the database?  Refuses an empty path, ":memory:",
 * URIs ("file:..."), a path ending in '/' and an existing file that is
 * not a regular file (directory, device, FIFO, socket): those would
 * save nowhere lasting.  0, or -1 with err naming the path. */
int udb_check_path(const char *path, char *err);

/* The default database: $IONMIX_DB when set and not empty (checked with
 * udb_check_path: -1 with err when refused), else
 * $XDG_DATA_HOME/ionmix/ionmix.db when XDG_DATA_HOME is absolute and its
 * parent exists, else $HOME/.local/share/ionmix/ionmix.db when HOME is an
 * absolute path to an existing directory.  Returns 0 with *out (caller
 * frees), or 0 with *out == NULL when there is no usable place: never the
 * current directory, and HOME itself is never created. */
int udb_default_path(char **out, char *err);

/* The message for a database command when udb_default_path found no
 * place: says why and how to choose one (--db, IONMIX_DB).  Returns -1. */
int udb_nowhere(char *err);

/* How long a statement waits for a lock another process holds (seconds;
 * UDB_WAIT_S by default), and, when notice is not NULL, after how long
 * (UDB_NOTICE_S by default) to print there once "waiting for the
 * database (locked by another ionmix)...".  Retries back off from 1 to
 * 100 ms apart. */
void udb_set_patience(userdb *u, double wait_s, double notice_s, FILE *notice);

#endif
