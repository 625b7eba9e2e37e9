/*
 * session.c - the workspace, temperature, activity model, chemistry data
 * and user database of one run, and the lookups by name.
 */
#include "session.h"

#include <stddef.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "eqdata.h"
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

int ses_compute(session *s, const solution *sol, sol_state *st, char *err)
{
	const sol_env *env = ses_env(s);
	struct ses_cache *c;
	ses_entry *x;
	if (!s->cache)
		s->cache = im_xcalloc(1, sizeof *s->cache);
	c = s->cache;
	for (int i = 0; i < SES_CACHE_N; i++)
		if (entry_fits(&c->e[i], sol, env)) {
			state_copy(st, &c->e[i].st);
			return 0;
		}
	if (sol_compute(sol, env, st, err))
		return -1;
	x = &c->e[c->next];
	c->next = (c->next + 1) % SES_CACHE_N;
	entry_clear(x);
	sol_copy(&x->key, sol, sol->name);
	x->t_C = env->t_C;
	x->model = env->model;
	x->chem = env->chem;
	x->osm = env->osm;
	x->chem_gen = env->chem ? env->chem->gen : 0;
	x->osm_gen = env->osm ? env->osm->gen : 0;
	state_copy(&x->st, st);
	x->used = 1;
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
	udb_close(s->user);
	s->user = NULL;
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
	if (udb_open(s->db_path, create, &s->user, err) < 0)
		*failed = 1;
	else if (s->user && s->wait_notice) /* after 2 s of waiting, say so */
		udb_set_patience(s->user, UDB_WAIT_S, UDB_NOTICE_S, s->wait_notice);
	return s->user;
}

int ses_solution(session *s, const char *name, solution **out, char *err)
{
	*out = name ? ws_find(&s->ws, name) : ws_current(&s->ws);
	if (*out)
		return 0;
	if (!name)
		return im_fail(err, "no current solution: start one with `solution NAME`");
	return im_fail(err, "unknown solution '%.60s' (see `list`; `load NAME` brings a saved one)",
		       name);
}

int ses_compound(const session *s, const char *name, const rd_compound **out, char *err)
{
	const char *sug[3];
	int n;
	*out = refdb_compound(s->ref, name);
	if (*out)
		return 0;
	n = refdb_suggest(s->ref, name, sug, 3);
	if (n == 0)
		return im_fail(err, "unknown compound '%.60s' (see `compounds`)", name);
	return im_fail(err, "unknown compound '%.60s'; did you mean %s%s%s%s%s?", name, sug[0],
		       n > 1 ? (n > 2 ? ", " : " or ") : "", n > 1 ? sug[1] : "",
		       n > 2 ? " or " : "", n > 2 ? sug[2] : "");
}

int ses_ion(const session *s, const char *name, const rd_ion **out, char *err)
{
	*out = refdb_ion(s->ref, name);
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

void ses_mark_take(const session *s, ses_mark *m)
{
	ws_copy(&m->ws, &s->ws);
	m->temp_C = s->temp_C;
	m->model = s->model;
}

void ses_mark_restore(session *s, ses_mark *m)
{
	ws_free(&s->ws);
	s->ws = m->ws;
	s->temp_C = m->temp_C;
	s->model = m->model;
}

void ses_mark_drop(ses_mark *m)
{
	ws_free(&m->ws);
}
