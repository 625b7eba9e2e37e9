/*
 * session.h - what a run of ionmix remembers between commands: the
 * workspace of solutions, the temperature, the activity model, the
 * chemistry data (with its compilation picks) and the user's database;
 * and the lookups by name that every handler shares, each with one error
 * text.  It sits below the command layer: nothing here knows about
 * commands, words or output.
 */
#ifndef IONMIX_SESSION_H
#define IONMIX_SESSION_H

#include <stdio.h>

#include "refdb.h"
#include "solution.h"

struct userdb;
struct ses_cache;

typedef struct session {
	refdb *ref;             /* reference data; owned by the caller (main) */
	spec_data *chem;        /* equilibria, owned; NULL: no speciation */
	osm_data *osm;          /* Pitzer data, owned; NULL: no osmolality */
	sol_env env;            /* filled by ses_env() */
	struct userdb *user;    /* the user's database, opened lazily, owned */
	const char *db_path;    /* its path; owned by the caller; may be NULL */
	FILE *wait_notice;      /* where a long wait for a locked database is
				 * announced (the shell's stderr); NULL: silently */
	workspace ws;           /* named solutions, one current */
	double temp_C;          /* `temp`, default 25 degrees C */
	act_model model;        /* `activity`, default Davies */
	struct ses_cache *cache; /* computed states (ses_compute); owned */
} session;

/* What a failed command must not change: taken before each command and
 * put back when it fails (command.c's rollback). */
typedef struct ses_mark {
	workspace ws;
	double temp_C;
	act_model model;
} ses_mark;

/* Start a session on ref (not owned): 25 C, Davies, empty workspace, no
 * chemistry data until ses_load_chemistry. */
void ses_init(session *s, refdb *ref);
/* Load the equilibria and Pitzer tables (owned by s).  -1 with err when
 * they do not load; s is unchanged then. */
int ses_load_chemistry(session *s, char *err);
/* Free what s owns (not ref, not db_path). */
void ses_free(session *s);

/* The environment sol_compute needs; points into s, valid until the next
 * call. */
const sol_env *ses_env(session *s);

/* The computed state of sol under the session's environment, as
 * sol_compute gives it, from a cache keyed by everything it depends on:
 * the solution's contents (sol_equal), the temperature, the activity
 * model and the revision of the equilibrium and Pitzer data (bumped by a
 * compilation pick).  A repeated command on unchanged solutions reuses
 * the result; any change computes afresh.  The caller owns *st (free with
 * sol_state_free), exactly as after sol_compute.  -1 with err as
 * sol_compute (failures are not cached). */
int ses_compute(session *s, const solution *sol, sol_state *st, char *err);

/* The user's database, opened on first use.  create = 1 creates the file;
 * create = 0 returns NULL with *failed == 0 when it does not exist yet.
 * NULL with *failed == 1 and err on failure. */
struct userdb *ses_userdb(session *s, int create, char *err, int *failed);

/* The named solution of the workspace, or the current one when name is
 * NULL.  -1 with err ("unknown solution 'X' ..." / "no current solution")
 * when absent. */
int ses_solution(session *s, const char *name, solution **out, char *err);
/* A compound by name or alias; the error suggests the nearest names. */
int ses_compound(const session *s, const char *name, const rd_compound **out, char *err);
/* An ion by symbol (with or without its sign); -1 with err when unknown. */
int ses_ion(const session *s, const char *name, const rd_ion **out, char *err);
/* 0 when name may name a solution (1 to SOL_NAME_MAX - 1 of letters,
 * digits, '-', '_', '.'), else -1 with err. */
int ses_valid_name(const char *name, char *err);

/* Set the temperature (0 to 60 C, where the water data hold); text is
 * the number as typed, for the message.  -1 with err otherwise. */
int ses_set_temp(session *s, double t_C, const char *text, char *err);
/* Set the activity model by its word: davies or dh. */
int ses_set_model(session *s, const char *word, char *err);
/* The model's word ("davies", "dh") and its description. */
const char *ses_model_key(act_model m);
const char *ses_model_text(act_model m);

/* Mark the state, put it back (freeing what changed), or drop the mark. */
void ses_mark_take(const session *s, ses_mark *m);
void ses_mark_restore(session *s, ses_mark *m);
void ses_mark_drop(ses_mark *m);

#endif
