/*
 * session.c - the workspace, temperature, activity model, chemistry data
 * and user database of one run, and the lookups by name.
 */
#include "session.h"

#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "eqdata.h"
#include "usercomp.h"
#include "userdb.h"

/* ---- the cache of computed states ---- */

#define SES_CACHE_N 8 /* solutions whose states are kept; oldest replaced */

typedef struct ses_entry {
	int used;
	solution key;          /* a copy of the solution computed */
	double t_C;
	act_model model;
	const spec_data *chem; /* the data and their revisions */
	const osm_data *osm;
	unsigned long chem_gen, osm_gen;
	sol_state st;          /* the result, owned */
	int holds;             /* ses_compute_hold's not yet released */
} ses_entry;

struct ses_cache {
	ses_entry e[SES_CACHE_N];
	int next; /* the entry replaced next */
};

static void entry_clear(ses_entry *x)
{
	if (x->used) {
		sol_free(&x->key);
		sol_state_free(&x->st);
	}
	memset(x, 0, sizeof *x);
}

static void cache_free(struct ses_cache *c)
{
	if (!c)
		return;
	for (int i = 0; i < SES_CACHE_N; i++)
		entry_clear(&c->e[i]);
	free(c);
}

/* Copy a speciation result, only the filled part of its arrays (the
 * whole struct is about 20 kB, mostly empty slots); the scalars between
 * and after the arrays are copied as one block each. */
static void result_copy(spec_result *d, const spec_result *s)
{
	size_t a = offsetof(spec_result, t_C), b = offsetof(spec_result, warnings);
	size_t c = offsetof(spec_result, nwarn);
	memcpy(d->sp, s->sp, (size_t)s->n * sizeof s->sp[0]);
	d->n = s->n;
	memcpy(d->metals, s->metals, (size_t)s->nmetals * sizeof s->metals[0]);
	d->nmetals = s->nmetals;
	memcpy(d->ligands, s->ligands, (size_t)s->nligands * sizeof s->ligands[0]);
	d->nligands = s->nligands;
	memcpy((char *)d + a, (const char *)s + a, b - a);
	memcpy(d->warnings, s->warnings, (size_t)s->nwarn * sizeof s->warnings[0]);
	memcpy((char *)d + c, (const char *)s + c, sizeof *d - c);
}

/* A deep copy of a computed state (the species array and the speciation
 * result are owned by each copy). */
static void state_copy(sol_state *dst, const sol_state *src)
{
	*dst = *src;
	dst->sp = NULL;
	dst->chem = NULL;
	if (src->n > 0) {
		dst->sp = im_xmalloc((size_t)src->n * sizeof *dst->sp);
		memcpy(dst->sp, src->sp, (size_t)src->n * sizeof *dst->sp);
	}
	if (src->chem) {
		dst->chem = im_xmalloc(sizeof *dst->chem);
		result_copy(dst->chem, src->chem);
	}
}

static int entry_fits(const ses_entry *x, const solution *sol, const sol_env *env)
{
	return x->used && x->t_C == env->t_C && x->model == env->model &&
	       x->chem == env->chem && x->osm == env->osm &&
	       (!env->chem || x->chem_gen == env->chem->gen) &&
	       (!env->osm || x->osm_gen == env->osm->gen) && sol_equal(&x->key, sol);
}

/* The cached entry of sol, or NULL. */
static ses_entry *cache_find(session *s, const solution *sol, const sol_env *env)
{
	if (!s->cache)
		s->cache = im_xcalloc(1, sizeof *s->cache);
	for (int i = 0; i < SES_CACHE_N; i++)
		if (entry_fits(&s->cache->e[i], sol, env))
			return &s->cache->e[i];
	return NULL;
}

/* An entry for a new state, the oldest not held, emptied; NULL when
 * every one is held. */
static ses_entry *cache_victim(struct ses_cache *c)
{
	for (int k = 0; k < SES_CACHE_N; k++) {
		ses_entry *x = &c->e[(c->next + k) % SES_CACHE_N];
		if (x->holds == 0) {
			c->next = (int)(x - c->e + 1) % SES_CACHE_N;
			entry_clear(x);
			return x;
		}
	}
	return NULL;
}

/* Fill x (from cache_victim) with sol's key; the caller sets x->st. */
static void entry_key(ses_entry *x, const solution *sol, const sol_env *env)
{
	sol_copy(&x->key, sol, sol->name);
	x->t_C = env->t_C;
	x->model = env->model;
	x->chem = env->chem;
	x->osm = env->osm;
	x->chem_gen = env->chem ? env->chem->gen : 0;
	x->osm_gen = env->osm ? env->osm->gen : 0;
	x->used = 1;
}

int ses_compute_hold(session *s, const solution *sol, const sol_state **st, char *err)
{
	const sol_env *env = ses_env(s);
	ses_entry *x = cache_find(s, sol, env);
	sol_state fresh;
	if (x) {
		x->holds++;
		*st = &x->st;
		return 0;
	}
	if (sol_compute(sol, env, &fresh, err))
		return -1;
	x = cache_victim(s->cache);
	if (!x) { /* every entry held: a state of the caller's own */
		sol_state *own = im_xmalloc(sizeof *own);
		*own = fresh;
		*st = own;
		return 0;
	}
	entry_key(x, sol, env);
	x->st = fresh;
	x->holds = 1;
	*st = &x->st;
	return 0;
}

void ses_state_release(session *s, const sol_state *st)
{
	for (int i = 0; s->cache && i < SES_CACHE_N; i++)
		if (st == &s->cache->e[i].st) {
			s->cache->e[i].holds--;
			return;
		}
	sol_state_free((sol_state *)st); /* ses_compute_hold's own */
	free((sol_state *)st);
}

int ses_compute(session *s, const solution *sol, sol_state *st, char *err)
{
	const sol_env *env = ses_env(s);
	ses_entry *x = cache_find(s, sol, env);
	if (x) {
		state_copy(st, &x->st);
		return 0;
	}
	if (sol_compute(sol, env, st, err))
		return -1;
	x = cache_victim(s->cache);
	if (!x)
		return 0; /* every entry held: not kept */
	entry_key(x, sol, env);
	state_copy(&x->st, st);
	return 0;
}

void ses_init(session *s, refdb *ref)
{
	memset(s, 0, sizeof *s);
	s->ref = ref;
	s->temp_C = 25.0;
	s->model = ACT_DAVIES;
	ws_init(&s->ws);
}

int ses_load_chemistry(session *s, char *err)
{
	spec_data *chem = NULL;
	osm_data *osm = NULL;
	/* NULL: the tables built into the program, no SQL (eqdata.h) */
	if (spec_load(NULL, &chem, err))
		return -1;
	if (osm_load(NULL, &osm, err)) {
		spec_data_free(chem);
		return -1;
	}
	s->chem = chem;
	s->osm = osm;
	return 0;
}

void ses_free(session *s)
{
	spec_data_free(s->chem);
	osm_data_free(s->osm);
	s->chem = NULL;
	s->osm = NULL;
	ws_free(&s->ws);
	cache_free(s->cache);
	s->cache = NULL;
	for (int i = 0; i < s->nundo; i++)
		ws_journal_free(&s->undo[i].jr);
	free(s->undo);
	s->undo = NULL;
	s->nundo = 0;
	udb_close(s->user);
	s->user = NULL;
	uc_free(s->uc);
	s->uc = NULL;
	s->uc_loaded = 0;
}

static const rd_compound *lookup_defined(void *arg, const char *name)
{
	char err[IM_ERRLEN];
	return uc_compound(ses_defs(arg, err), name);
}

struct usercomp *ses_defs(session *s, char *err)
{
	struct userdb *u;
	int failed = 0;
	err[0] = '\0';
	if (!s->uc)
		s->uc = uc_new();
	if (s->uc_loaded)
		return s->uc;
	s->uc_loaded = 1;
	if (!s->db_path)
		return s->uc;
	u = ses_userdb(s, 0, err, &failed);
	if (u && udb_defined_read(u, s->ref, s->uc, err) < 0) {
		uc_free(s->uc); /* half read: none */
		s->uc = uc_new();
	}
	return s->uc;
}

const sol_env *ses_env(session *s)
{
	s->env = (sol_env){s->ref, s->chem, s->osm, s->temp_C, s->model};
	return &s->env;
}

struct userdb *ses_userdb(session *s, int create, char *err, int *failed)
{
	*failed = 0;
	if (s->user)
		return s->user;
	if (!s->db_path) {
		*failed = 1;
		udb_nowhere(err);
		return NULL;
	}
	if ((s->open_db ? s->open_db(s->open_db_arg, s->db_path, create, &s->user, err)
			: udb_open(s->db_path, create, &s->user, err)) < 0)
		*failed = 1;
	else if (s->user && s->wait_notice) /* after 2 s of waiting, say so */
		udb_set_patience(s->user, UDB_WAIT_S, UDB_NOTICE_S, s->wait_notice);
	if (s->user)
		udb_set_lookup(s->user, lookup_defined, s);
	return s->user;
}

int ses_solution(session *s, const char *name, solution **out, char *err)
{
	struct userdb *u;
	char uerr[IM_ERRLEN];
	int failed = 0;
	solution *sv;
	*out = name ? ws_find(&s->ws, name) : ws_current(&s->ws);
	if (*out)
		return 0;
	if (!name)
		return im_fail(err, "no current solution: start one with `solution NAME`");
	/* not in the workspace: a saved one of that name? */
	if (ses_valid_name(name, uerr) == 0 && s->db_path &&
	    (u = ses_userdb(s, 0, uerr, &failed)) != NULL) {
		sv = im_xmalloc(sizeof *sv);
		if (udb_load(u, s->ref, name, sv, uerr) == 0) {
			fflush(stdout); /* the results before it first (a script's, see ctx->batch) */
			fprintf(s->wait_notice ? s->wait_notice : stderr,
				"note: '%s' is not in the workspace; using the saved solution "
				"(now in the workspace)\n", name);
			ws_put(&s->ws, sv);
			*out = ws_find(&s->ws, name);
			return 0;
		}
		free(sv);
		if (strstr(uerr, "no saved solution") == NULL)
			return im_fail(err, "%s", uerr);
	} else if (failed) {
		return im_fail(err, "%s", uerr);
	}
	return im_fail(err, "unknown solution '%.60s' (neither in the workspace nor saved; see "
			    "`list`)", name);
}

int ses_solution_read(session *s, const char *name, const solution **out, char *err)
{
	solution *sv;
	int i = name ? ws_index_of(&s->ws, name) : s->ws.current;
	if (i >= 0) {
		*out = s->ws.sol[i];
		return 0;
	}
	if (ses_solution(s, name, &sv, err))
		return -1;
	*out = sv;
	return 0;
}

int ses_compound(session *s, const char *name, const rd_compound **out, char *err)
{
	const char *sug[3];
	char derr[IM_ERRLEN];
	int n;
	*out = refdb_compound(s->ref, name);
	if (*out)
		return 0;
	*out = uc_compound(ses_defs(s, derr), name);
	if (*out)
		return 0;
	if (derr[0])
		return im_fail(err, "unknown compound '%.60s' (and the compounds you defined could "
				    "not be read: %s)", name, derr);
	n = refdb_suggest(s->ref, name, sug, 3);
	if (n == 0)
		return im_fail(err, "unknown compound '%.60s' (see `compounds`)", name);
	return im_fail(err, "unknown compound '%.60s'; did you mean %s%s%s%s%s?", name, sug[0],
		       n > 1 ? (n > 2 ? ", " : " or ") : "", n > 1 ? sug[1] : "",
		       n > 2 ? " or " : "", n > 2 ? sug[2] : "");
}

int ses_ion(session *s, const char *name, const rd_ion **out, char *err)
{
	char derr[IM_ERRLEN];
	*out = refdb_ion(s->ref, name);
	if (*out)
		return 0;
	*out = uc_ion(ses_defs(s, derr), name);
	if (*out)
		return 0;
	return im_fail(err, "unknown ion '%.40s' (`info ION` shows one; symbols like Na+, Ca2+, Cl-)",
		       name);
}

int ses_valid_name(const char *name, char *err)
{
	size_t n = strlen(name);
	if (n == 0 || n >= SOL_NAME_MAX)
		return im_fail(err, "solution name '%.40s' must be 1 to %d characters", name,
			       SOL_NAME_MAX - 1);
	for (const char *p = name; *p; p++)
		if (!((*p >= 'a' && *p <= 'z') || (*p >= 'A' && *p <= 'Z') ||
		      (*p >= '0' && *p <= '9') || *p == '-' || *p == '_' || *p == '.'))
			return im_fail(err, "solution name '%.40s': use letters, digits, '-', '_' "
					    "or '.'", name);
	return 0;
}

int ses_set_temp(session *s, double t_C, const char *text, char *err)
{
	if (!(t_C >= 0 && t_C <= 60))
		return im_fail(err, "temperature %.20s C is outside 0 to 60 C, where the water "
				    "data hold", text);
	s->temp_C = t_C;
	return 0;
}

int ses_set_model(session *s, const char *word, char *err)
{
	if (im_strcaseeq(word, "davies"))
		s->model = ACT_DAVIES;
	else if (im_strcaseeq(word, "dh"))
		s->model = ACT_DEBYE_HUCKEL;
	else
		return im_fail(err, "unknown activity model '%.30s' (use davies or dh)", word);
	return 0;
}

const char *ses_model_key(act_model m)
{
	return m == ACT_DAVIES ? "davies" : "dh";
}

const char *ses_model_text(act_model m)
{
	return m == ACT_DAVIES ? "Davies"
			       : "extended Debye-Hueckel with Kielland sizes (Davies where no "
				 "size is known)";
}

void ses_mark_take(session *s, ses_mark *m)
{
	memset(m, 0, sizeof *m);
	m->temp_C = s->temp_C;
	m->model = s->model;
	if (s->ws.jr) { /* inside another command's mark */
		m->nested = 1;
		return;
	}
	ws_journal_begin(&s->ws, &m->jr);
}

void ses_mark_restore(session *s, ses_mark *m)
{
	if (m->nested)
		return;
	ws_journal_end(&s->ws);
	ws_journal_undo(&s->ws, &m->jr);
	ws_journal_free(&m->jr);
	s->temp_C = m->temp_C;
	s->model = m->model;
	s->undoing = 0;
}

/* Write the solutions named in jr (and the temperature) to the kept
 * workspace; a failure is remembered in keep_err, not fatal. */
static void keep(session *s, const ws_journal *jr, int temp_changed)
{
	const char **names;
	struct userdb *u;
	int failed = 0;
	if (!s->keep_ws || (jr->n == 0 && !temp_changed && jr->current[0] == '\0' &&
			    s->ws.current < 0))
		return;
	if (!(u = ses_userdb(s, 1, s->keep_err, &failed)))
		return;
	names = im_xmalloc((size_t)(jr->n + 1) * sizeof *names);
	for (int i = 0; i < jr->n; i++)
		names[i] = jr->e[i].name;
	if (udb_kept_write(u, &s->ws, names, jr->n, s->temp_C, s->keep_err) == 0)
		s->keep_err[0] = '\0';
	free(names);
}

void ses_mark_drop(session *s, ses_mark *m)
{
	int n, moved;
	const char *cur;
	if (m->nested)
		return;
	ws_journal_end(&s->ws);
	n = ws_journal_prune(&s->ws, &m->jr);
	cur = s->ws.current >= 0 ? s->ws.sol[s->ws.current]->name : "";
	moved = strcmp(cur, m->jr.current) != 0;
	if (s->undoing || (n == 0 && !moved && s->temp_C == m->temp_C && s->model == m->model)) {
		/* `undo` kept its own changes; nothing else changed */
		ws_journal_free(&m->jr);
		s->undoing = 0;
		return;
	}
	keep(s, &m->jr, s->temp_C != m->temp_C || moved);
	if (s->nundo == SES_UNDO_MAX) { /* forget the oldest */
		ws_journal_free(&s->undo[0].jr);
		memmove(&s->undo[0], &s->undo[1], (SES_UNDO_MAX - 1) * sizeof *s->undo);
		s->nundo--;
	}
	if (!s->undo)
		s->undo = im_xmalloc(SES_UNDO_MAX * sizeof *s->undo);
	s->undo[s->nundo++] = *m;
}

int ses_undo(session *s, char *what, size_t n, char *err)
{
	ses_mark m;
	size_t len = 0;
	if (s->nundo == 0)
		return im_fail(err, "nothing to undo in this session");
	m = s->undo[--s->nundo];
	what[0] = '\0';
	for (int i = 0; i < m.jr.n && len < n; i++) {
		int dup = 0;
		for (int j = 0; j < i; j++)
			dup |= strcmp(m.jr.e[j].name, m.jr.e[i].name) == 0;
		if (!dup)
			len += snprintf(what + len, n - len, "%s%s", len ? ", " : "",
					m.jr.e[i].name);
	}
	if (m.temp_C != s->temp_C && len < n)
		len += snprintf(what + len, n - len, "%stemperature %.1f C", len ? ", " : "",
				m.temp_C);
	if (m.model != s->model && len < n)
		len += snprintf(what + len, n - len, "%sactivity model", len ? ", " : "");
	if (!len)
		snprintf(what, n, "the current solution");
	{
		/* the names to write to the kept workspace, before the journal
		 * is emptied */
		ws_journal names = m.jr;
		ws_entry *e = im_xmalloc((size_t)(m.jr.n + 1) * sizeof *e);
		if (m.jr.n)
			memcpy(e, m.jr.e, (size_t)m.jr.n * sizeof *e);
		names.e = e;
		ws_journal_undo(&s->ws, &m.jr);
		s->temp_C = m.temp_C;
		s->model = m.model;
		keep(s, &names, 1);
		free(e);
	}
	ws_journal_free(&m.jr);
	s->undoing = 1;
	return 0;
}

int ses_restore_kept(session *s, int *count, char *err)
{
	struct userdb *u;
	int failed = 0, n;
	*count = 0;
	if (!s->db_path)
		return 1;
	u = ses_userdb(s, 0, err, &failed);
	if (!u)
		return failed ? -1 : 1;
	n = udb_kept_read(u, s->ref, &s->ws, &s->temp_C, err);
	if (n < 0)
		return -1;
	*count = n;
	return n ? 0 : 1;
}

int ses_unsaved(session *s, const solution *sol, char *err)
{
	struct userdb *u;
	solution saved;
	int failed = 0, diff;
	char uerr[IM_ERRLEN];
	if (!s->db_path)
		return 1;
	u = ses_userdb(s, 0, err, &failed);
	if (!u)
		return failed ? -1 : 1;
	if (udb_load(u, s->ref, sol->name, &saved, uerr))
		return 1;
	diff = !sol_equal(&saved, sol);
	sol_free(&saved);
	return diff;
}
