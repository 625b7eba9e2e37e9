/*
 * userdb.h - the user's own database file: saved solutions (and room for
 * user-defined compounds), with a schema version, written in transactions
 * (WAL journal, busy timeout) so that a crash leaves each solution wholly
 * old or wholly new.  Never created at read-only start; never overwritten
 * when it is not an ionmix database or has a newer schema version.
 */
#ifndef IONMIX_USERDB_H
#define IONMIX_USERDB_H

#include "refdb.h"
#include "solution.h"

#define UDB_SCHEMA_VERSION 1

typedef struct userdb userdb;

/* Open path.  create = 0: a missing file is not created; returns 1 with
 * *out == NULL (no error).  create = 1: creates it and its directory.
 * Returns 0 when open, -1 with err on failure.  Caller owns *out. */
int udb_open(const char *path, int create, userdb **out, char *err);
void udb_close(userdb *u);

/* Save (replace) a solution in one transaction. */
int udb_save(userdb *u, const solution *s, char *err);
/* Load a saved solution into out (initialised here; caller frees it with
 * sol_free).  Compounds are looked up in ref; an unknown one fails. */
int udb_load(userdb *u, const refdb *ref, const char *name, solution *out,
	     char *err);
/* Names of saved solutions, sorted.  *names is owned by the caller: free
 * each string and the array.  Returns the count or -1 with err. */
int udb_list(userdb *u, char ***names, char *err);
/* 0 when deleted, -1 with err (also when there is no such solution). */
int udb_delete(userdb *u, const char *name, char *err);

/* The default path: $IONMIX_DB, else $XDG_DATA_HOME/ionmix/ionmix.db, else
 * ~/.local/share/ionmix/ionmix.db.  Caller frees. */
char *udb_default_path(void);

#endif
