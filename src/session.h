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

#include "common.h"
#include "refdb.h"
#include "solution.h"

struct userdb;
struct ses_cache;

/* What a failed command must not change: taken before each command and
 * put back when it fails (command.c's rollback).  It records only what
 * the command touches (ws_journal), so it costs in proportion to that,
 * not to the size of the workspace.  A kept mark is one level of `undo`. */
typedef struct ses_mark {
	ws_journal jr;
	double temp_C;
	act_model model;
	int nested;      /* 1: taken inside another command's mark: inert */
} ses_mark;

#define SES_UNDO_MAX 50 /* levels of `undo` */

typedef struct session {
	refdb *ref;             /* reference data; owned by the caller (main) */
	spec_data *chem;        /* equilibria, owned; NULL: no speciation */
	osm_data *osm;          /* Pitzer data, owned; NULL: no osmolality */
	sol_env env;            /* filled by ses_env() */
	struct userdb *user;    /* the user's database, opened lazily, owned */
	const char *db_path;    /* its path; owned by the caller; may be NULL */
	/* How ses_userdb gets the connection: udb_open's arguments and
	 * result.  NULL (the default): udb_open itself.  The fuzz harness
	 * lends one connection to all its inputs (tests/fuzz/fuzz_recipe.c);
	 * whoever sets it takes s->user back before ses_free. */
	int (*open_db)(void *arg, const char *path, int create, struct userdb **out, char *err);
	void *open_db_arg;
	FILE *wait_notice;      /* where a long wait for a locked database is
				 * announced (the shell's stderr); NULL: silently */
	workspace ws;           /* named solutions, one current */
	double temp_C;          /* `temp`, default 25 degrees C */
	act_model model;        /* `activity`, default Davies */
	struct ses_cache *cache; /* computed states (ses_compute); owned */
	ses_mark *undo;         /* changes `undo` takes back, oldest first; owned */
	int nundo;
	int undoing;            /* set by ses_undo: the command is not undoable */
	/* Keeping the workspace in the user database (the shell): after each
	 * command that changed it, the changed solutions and the temperature
	 * are written (ses_keep_changes).  keep_err: the last failure, printed
	 * once by the shell; "" when none. */
	int keep_ws;
	char keep_err[IM_ERRLEN];
	/* user-defined compounds and ions, read from the user database on the
	 * first lookup the reference data cannot answer; owned */
	struct usercomp *uc;
	int uc_loaded;
} session;


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
/* As ses_compute, without a copy: *st is the cache's own state, kept
 * (never replaced) until ses_state_release(s, *st), which every
 * successful call needs once.  For a command that only reads the state. */
int ses_compute_hold(session *s, const solution *sol, const sol_state **st, char *err);
void ses_state_release(session *s, const sol_state *st);

/* The user's database, opened on first use.  create = 1 creates the file;
 * create = 0 returns NULL with *failed == 0 when it does not exist yet.
 * NULL with *failed == 1 and err on failure. */
struct userdb *ses_userdb(session *s, int create, char *err, int *failed);

/* The named solution of the workspace, or the current one when name is
 * NULL.  A name not in the workspace is looked for among the saved
 * solutions: found there, it is loaded into the workspace (not made
 * current) and a note saying so goes to s->wait_notice, or stderr.  -1
 * with err ("unknown solution 'X' ..." / "no current solution") when
 * absent from both. */
int ses_solution(session *s, const char *name, solution **out, char *err);
/* As ses_solution, for a command that only reads the solution: one in
 * the workspace is not copied into the command's mark (nothing to put
 * back), so a read costs no allocation.  The pointer is the workspace's;
 * valid until the workspace changes. */
int ses_solution_read(session *s, const char *name, const solution **out, char *err);
/* A compound by name or alias: the shipped ones, then those the user
 * defined (read from the user database the first time one is needed);
 * the error suggests the nearest names. */
int ses_compound(session *s, const char *name, const rd_compound **out, char *err);
/* An ion by symbol (with or without its sign), shipped or user-defined;
 * -1 with err when unknown. */
int ses_ion(session *s, const char *name, const rd_ion **out, char *err);
/* The user-defined compounds and ions (read on first use; never NULL).
 * err gets a message when the database could not be read (the set is
 * then empty) and is "" otherwise. */
struct usercomp *ses_defs(session *s, char *err);
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

/* Mark the state before a command; put it back (freeing what changed);
 * or keep what the command did: ses_mark_drop makes the change one level
 * of `undo` (unless the command was `undo`) and, with keep_ws, writes the
 * changed solutions to the user database.  A mark taken while another is
 * active (a command inside `run`, which takes none) is inert. */
void ses_mark_take(session *s, ses_mark *m);
void ses_mark_restore(session *s, ses_mark *m);
void ses_mark_drop(session *s, ses_mark *m);

/* Take back the last kept change: 0 with *what (static text: the names
 * it concerned, or the temperature), or -1 with err when there is
 * nothing to undo. */
int ses_undo(session *s, char *what, size_t n, char *err);

/* The workspace kept in the user database: restore it at start (0 with
 * *count solutions restored, 1 when nothing was kept, -1 with err), and
 * write a set of changed names now (used by ses_mark_drop). */
int ses_restore_kept(session *s, int *count, char *err);

/* Is the named workspace solution unsaved (never saved, or different
 * from its saved content)?  1 yes, 0 no, -1 with err when the database
 * cannot be read. */
int ses_unsaved(session *s, const solution *sol, char *err);

#endif
