/*
 * solution.c - solutions, the workspace, and species with activities.
 */
#include "solution.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "activity.h"
#include "common.h"

void sol_init(solution *s, const char *name)
{
	memset(s, 0, sizeof *s);
	snprintf(s->name, sizeof s->name, "%s", name);
	s->ph_target = NAN;
	s->co2_p_atm = 1.0;
}

void sol_free(solution *s)
{
	free(s->items);
	s->items = NULL;
	s->n = s->cap = 0;
}

void sol_copy(solution *dst, const solution *src, const char *name)
{
	sol_init(dst, name ? name : src->name);
	dst->ph_target = src->ph_target;
	dst->co2_frac = src->co2_frac;
	dst->co2_p_atm = src->co2_p_atm;
	dst->co2_dry = src->co2_dry;
	memcpy(dst->tg, src->tg, sizeof dst->tg);
	memcpy(dst->note, src->note, sizeof dst->note);
	dst->ntg = src->ntg;
	if (src->n) {
		dst->items = im_xmalloc(src->n * sizeof *dst->items);
		memcpy(dst->items, src->items, src->n * sizeof *dst->items);
	}
	dst->n = dst->cap = src->n;
}

sol_item *sol_find(solution *s, const rd_compound *c)
{
	for (int i = 0; i < s->n; i++)
		if (s->items[i].c == c)
			return &s->items[i];
	return NULL;
}

static sol_item *append(solution *s, const rd_compound *c)
{
	if (s->n == s->cap) {
		s->cap = s->cap ? 2 * s->cap : 8;
		s->items = im_xrealloc(s->items, s->cap * sizeof *s->items);
	}
	s->items[s->n] = (sol_item){c, 0.0, 0.0, 0, 0.0};
	return &s->items[s->n++];
}

void sol_add(solution *s, const rd_compound *c, double mM)
{
	sol_item *it = sol_find(s, c);
	(it ? it : append(s, c))->mM += mM;
}

void sol_set(solution *s, const rd_compound *c, double mM)
{
	sol_item *it = sol_find(s, c);
	(it ? it : append(s, c))->mM = mM;
}

int sol_remove(solution *s, const rd_compound *c)
{
	sol_item *it = sol_find(s, c);
	if (!it)
		return -1;
	memmove(it, it + 1, (s->items + s->n - it - 1) * sizeof *it);
	s->n--;
	return 0;
}

static int same_num(double x, double y)
{
	return x == y || (isnan(x) && isnan(y));
}

int sol_equal(const solution *a, const solution *b)
{
	if (strcmp(a->name, b->name) != 0 || a->n != b->n ||
	    !same_num(a->ph_target, b->ph_target) || a->co2_frac != b->co2_frac ||
	    a->co2_p_atm != b->co2_p_atm || a->co2_dry != b->co2_dry || a->ntg != b->ntg ||
	    strcmp(a->note, b->note) != 0)
		return 0;
	for (int k = 0; k < a->ntg; k++)
		if (a->tg[k].kind != b->tg[k].kind || a->tg[k].value != b->tg[k].value ||
		    a->tg[k].with != b->tg[k].with || a->tg[k].metal != b->tg[k].metal ||
		    a->tg[k].at_C != b->tg[k].at_C)
			return 0;
	for (int i = 0; i < a->n; i++)
		if (a->items[i].c != b->items[i].c || a->items[i].mM != b->items[i].mM ||
		    a->items[i].stock_mM != b->items[i].stock_mM ||
		    a->items[i].titrant != b->items[i].titrant ||
		    a->items[i].fw_g_mol != b->items[i].fw_g_mol)
			return 0;
	return 1;
}

/* Charged ions first, cations before anions, higher |z| first, then by
 * symbol; neutral solutes last. */
static int species_cmp(const void *pa, const void *pb)
{
	const sol_species *a = pa, *b = pb;
	int ka = a->ion->z == 0 ? 2 : a->ion->z > 0 ? 0 : 1;
	int kb = b->ion->z == 0 ? 2 : b->ion->z > 0 ? 0 : 1;
	if (ka != kb)
		return ka - kb;
	if (abs(a->ion->z) != abs(b->ion->z))
		return abs(b->ion->z) - abs(a->ion->z);
	return strcmp(a->ion->symbol, b->ion->symbol);
}

/* Sum the yields of the compounds into st->sp (unsorted). */
static void totals(const solution *s, int skip_titrant, sol_state *st)
{
	int cap = 0;
	for (int i = 0; i < s->n; i++)
		cap += s->items[i].c->nyields;
	st->sp = im_xcalloc(cap ? cap : 1, sizeof *st->sp);
	for (int i = 0; i < s->n; i++) {
		const rd_compound *c = s->items[i].c;
		if (skip_titrant && s->items[i].titrant)
			continue;
		for (int k = 0; k < c->nyields; k++) {
			const rd_ion *ion = c->yields[k].ion;
			int j = 0;
			while (j < st->n && st->sp[j].ion != ion)
				j++;
			if (j == st->n)
				st->sp[st->n++].ion = ion;
			st->sp[j].mM += c->yields[k].count * s->items[i].mM;
		}
	}
}

int sol_spec_inputs(const solution *s, int skip_titrant, spec_in *in, int max, char *err)
{
	sol_state st;
	int n;
	memset(&st, 0, sizeof st);
	totals(s, skip_titrant, &st);
	if (st.n > max) {
		free(st.sp);
		return im_fail(err, "%s yields more than %d species", s->name, max);
	}
	for (n = 0; n < st.n; n++)
		in[n] = (spec_in){st.sp[n].ion->symbol, st.sp[n].ion->z, st.sp[n].mM};
	free(st.sp);
	return n;
}

void sol_spec_cond(const solution *s, const sol_env *env, spec_cond *cond)
{
	memset(cond, 0, sizeof *cond);
	cond->t_C = env->t_C;
	cond->mode = SPEC_PH_CLOSED;
	cond->pH = NAN;
	if (s->co2_frac > 0) {
		cond->mode = SPEC_PH_CO2;
		cond->pco2_atm = spec_pco2_atm(s->co2_frac, s->co2_p_atm, env->t_C, !s->co2_dry);
	}
}

/* Replace the totals in st by the free species of speciation. */
static int speciate(const solution *s, const sol_env *env, sol_state *st, char *err)
{
	spec_in in[SPEC_MAX_IN];
	spec_cond cond;
	spec_result *r;
	int n = 0;
	if (st->n > SPEC_MAX_IN)
		return im_fail(err, "%s yields more than %d species", s->name, SPEC_MAX_IN);
	for (int j = 0; j < st->n; j++)
		in[n++] = (spec_in){st->sp[j].ion->symbol, st->sp[j].ion->z, st->sp[j].mM};
	sol_spec_cond(s, env, &cond);
	r = im_xmalloc(sizeof *r);
	if (spec_solve(env->chem, in, n, &cond, r, err)) {
		free(r);
		return -1;
	}
	sol_species *given = st->sp;
	int ngiven = st->n;
	st->sp = im_xcalloc(r->n ? r->n : 1, sizeof *st->sp);
	st->n = 0;
	for (int i = 0; i < r->n; i++) {
		const rd_ion *ion = refdb_ion_exact(env->ref, r->sp[i].symbol);
		/* a user-defined ion passes through as it was given */
		for (int j = 0; !ion && j < ngiven; j++)
			if (strcmp(given[j].ion->symbol, r->sp[i].symbol) == 0)
				ion = given[j].ion;
		if (!ion) {
			free(given);
			im_fail(err, "speciation produced %s, which the reference data do not name",
				r->sp[i].symbol);
			free(r);
			return -1;
		}
		if (!(r->sp[i].mM > 0))
			continue;
		st->sp[st->n].ion = ion;
		st->sp[st->n++].mM = r->sp[i].mM;
	}
	free(given);
	st->chem = r;
	st->pH = r->pH;
	if (env->osm) {
		/* osmolality of the free species (osmotic.c) */
		osm_species *os = im_xmalloc((size_t)(r->n ? r->n : 1) * sizeof *os);
		osm_result orr;
		for (int i = 0; i < r->n; i++)
			os[i] = (osm_species){r->sp[i].symbol, r->sp[i].z, r->sp[i].mM};
		int rc = osm_molar(env->osm, os, r->n, env->t_C, &orr, err);
		free(os);
		if (rc)
			return -1;
		st->osmolality_mOsm_kg = orr.osmolality_mOsm_kg;
		st->osmotic_coeff = orr.phi;
		st->osm_fallback_frac = orr.fallback_frac;
		st->osmolality_lo_mOsm_kg = orr.osmolality_lo_mOsm_kg;
		st->osmolality_hi_mOsm_kg = orr.osmolality_hi_mOsm_kg;
		st->osm_estimated_frac = orr.estimated_frac;
	}
	return 0;
}

int sol_compute(const solution *s, const sol_env *env, sol_state *st, char *err)
{
	double t_C = env->t_C;
	memset(st, 0, sizeof *st);
	st->pH = st->osmolality_mOsm_kg = st->osmotic_coeff = NAN;
	st->osmolality_lo_mOsm_kg = st->osmolality_hi_mOsm_kg = NAN;
	if (!isfinite(t_C) || t_C < 0 || t_C > 100)
		return im_fail(err, "temperature %g C is outside 0 to 100 C", t_C);
	st->t_C = t_C;
	st->model = env->model;
	totals(s, 0, st);
	/* water alone has no species to solve for, but water under CO2 has */
	if (env->chem && (st->n > 0 || s->co2_frac > 0) && speciate(s, env, st, err)) {
		sol_state_free(st);
		return -1;
	}
	qsort(st->sp, st->n, sizeof *st->sp, species_cmp);
	for (int j = 0; j < st->n; j++) {
		const sol_species *x = &st->sp[j];
		int z = x->ion->z;
		st->ionic_strength_mM += 0.5 * z * z * x->mM;
		st->osmolarity_mOsm_L += x->mM;
		st->net_charge_mEq_L += z * x->mM;
		if (z > 0)
			st->cation_mEq_L += z * x->mM;
	}
	for (int j = 0; j < st->n; j++) {
		sol_species *x = &st->sp[j];
		int z = x->ion->z;
		if (env->model == ACT_DEBYE_HUCKEL && isfinite(x->ion->kielland_a_pm)) {
			x->gamma = act_extended_dh(z, x->ion->kielland_a_pm,
						   st->ionic_strength_mM, t_C);
		} else {
			x->gamma = act_davies(z, st->ionic_strength_mM, t_C);
			x->dh_fallback = env->model == ACT_DEBYE_HUCKEL && z != 0;
		}
		x->act_mM = x->gamma * x->mM;
	}
	return 0;
}

void sol_state_free(sol_state *st)
{
	free(st->sp);
	free(st->chem);
	st->sp = NULL;
	st->chem = NULL;
	st->n = 0;
}

const sol_species *sol_state_find(const sol_state *st, const rd_ion *ion)
{
	for (int j = 0; j < st->n; j++)
		if (st->sp[j].ion == ion)
			return &st->sp[j];
	return NULL;
}

double sol_state_free_mM(const sol_state *st, const char *metal)
{
	if (!st->chem)
		return NAN;
	for (int m = 0; m < st->chem->nmetals; m++)
		if (strcmp(st->chem->metals[m].symbol, metal) == 0)
			return st->chem->metals[m].free_mM;
	return 0;
}

void ws_init(workspace *w)
{
	memset(w, 0, sizeof *w);
	w->current = -1;
}

void ws_free(workspace *w)
{
	for (int i = 0; i < w->n; i++) {
		sol_free(w->sol[i]);
		free(w->sol[i]);
	}
	free(w->sol);
	free(w->stamp);
	free(w->slot);
	ws_init(w);
}

/* ---- the name index: open addressing, linear probing ---- */

static unsigned name_hash(const char *s)
{
	unsigned h = 2166136261u; /* FNV-1a */
	for (; *s; s++)
		h = (h ^ (unsigned char)*s) * 16777619u;
	return h;
}

static void hash_insert(workspace *w, int index)
{
	unsigned m = (unsigned)w->nslot - 1, k = name_hash(w->sol[index]->name) & m;
	while (w->slot[k])
		k = (k + 1) & m;
	w->slot[k] = index + 1;
}

static void rehash(workspace *w)
{
	int want = 16;
	while (want < 2 * (w->n + 1))
		want *= 2;
	if (want != w->nslot) {
		free(w->slot);
		w->slot = im_xmalloc((size_t)want * sizeof *w->slot);
		w->nslot = want;
	}
	memset(w->slot, 0, (size_t)w->nslot * sizeof *w->slot);
	for (int i = 0; i < w->n; i++)
		hash_insert(w, i);
}

int ws_index_of(const workspace *w, const char *name)
{
	unsigned m, k;
	if (!w->nslot)
		return -1;
	m = (unsigned)w->nslot - 1;
	for (k = name_hash(name) & m; w->slot[k]; k = (k + 1) & m)
		if (strcmp(w->sol[w->slot[k] - 1]->name, name) == 0)
			return w->slot[k] - 1;
	return -1;
}

/* Append s at the end (index n), indexed. */
static void push(workspace *w, solution *s)
{
	if (w->n == w->cap) {
		w->cap = w->cap ? 2 * w->cap : 8;
		w->sol = im_xrealloc(w->sol, (size_t)w->cap * sizeof *w->sol);
		w->stamp = im_xrealloc(w->stamp, (size_t)w->cap * sizeof *w->stamp);
	}
	w->sol[w->n] = s;
	w->stamp[w->n] = 0;
	w->n++;
	if (2 * (w->n + 1) > w->nslot)
		rehash(w);
	else
		hash_insert(w, w->n - 1);
}

/* Take solution i out (not freed); the current index follows. */
static solution *take_out(workspace *w, int i)
{
	solution *s = w->sol[i];
	memmove(&w->sol[i], &w->sol[i + 1], (size_t)(w->n - i - 1) * sizeof *w->sol);
	memmove(&w->stamp[i], &w->stamp[i + 1], (size_t)(w->n - i - 1) * sizeof *w->stamp);
	w->n--;
	if (w->current == i)
		w->current = -1;
	else if (w->current > i)
		w->current--;
	if (i == w->n) { /* the last one: delete its slot (backward shift) */
		unsigned m = (unsigned)w->nslot - 1, k = name_hash(s->name) & m, j;
		while (w->slot[k] != i + 1)
			k = (k + 1) & m;
		w->slot[k] = 0;
		for (j = (k + 1) & m; w->slot[j]; j = (j + 1) & m) {
			int idx = w->slot[j] - 1;
			w->slot[j] = 0;
			hash_insert(w, idx);
		}
	} else {
		rehash(w);
	}
	return s;
}

/* Put s at position i (0..n). */
static void put_at(workspace *w, solution *s, int i)
{
	push(w, s);
	if (i < 0 || i >= w->n - 1)
		return;
	memmove(&w->sol[i + 1], &w->sol[i], (size_t)(w->n - 1 - i) * sizeof *w->sol);
	memmove(&w->stamp[i + 1], &w->stamp[i], (size_t)(w->n - 1 - i) * sizeof *w->stamp);
	w->sol[i] = s;
	w->stamp[i] = 0;
	if (w->current >= i)
		w->current++;
	rehash(w);
}

/* ---- the journal ---- */

static void record(workspace *w, const char *name, solution *old, int index)
{
	ws_journal *jr = w->jr;
	if (jr->n == jr->cap) {
		jr->cap = jr->cap ? 2 * jr->cap : 8;
		jr->e = im_xrealloc(jr->e, (size_t)jr->cap * sizeof *jr->e);
	}
	snprintf(jr->e[jr->n].name, sizeof jr->e[jr->n].name, "%s", name);
	jr->e[jr->n].old = old;
	jr->e[jr->n].index = index;
	jr->n++;
}

/* Solution i is about to be handed out or changed: keep its state. */
static void touch(workspace *w, int i)
{
	solution *c;
	if (!w->jr || w->stamp[i] == w->jr->serial)
		return;
	c = im_xmalloc(sizeof *c);
	sol_copy(c, w->sol[i], NULL);
	record(w, c->name, c, i);
	w->stamp[i] = w->jr->serial;
}

void ws_journal_begin(workspace *w, ws_journal *jr)
{
	memset(jr, 0, sizeof *jr);
	jr->serial = ++w->serial;
	if (w->current >= 0) { /* cut to fit, as snprintf would */
		const char *name = w->sol[w->current]->name;
		size_t n = strnlen(name, sizeof jr->current - 1);
		memcpy(jr->current, name, n);
		jr->current[n] = '\0';
	}
	w->jr = jr;
}

void ws_journal_end(workspace *w)
{
	w->jr = NULL;
}

int ws_journal_prune(workspace *w, ws_journal *jr)
{
	int k = 0;
	for (int j = 0; j < jr->n; j++) {
		ws_entry *e = &jr->e[j];
		int i = ws_index_of(w, e->name);
		if (e->old && i == e->index && sol_equal(e->old, w->sol[i])) {
			sol_free(e->old);
			free(e->old);
			continue;
		}
		jr->e[k++] = *e;
	}
	jr->n = k;
	return k;
}

void ws_journal_undo(workspace *w, ws_journal *jr)
{
	for (int j = jr->n - 1; j >= 0; j--) {
		ws_entry *e = &jr->e[j];
		int i = ws_index_of(w, e->name);
		if (i >= 0 && e->old && i == e->index) { /* in place */
			sol_free(w->sol[i]);
			free(w->sol[i]);
			w->sol[i] = e->old;
		} else {
			if (i >= 0) {
				solution *s = take_out(w, i);
				sol_free(s);
				free(s);
			}
			if (e->old)
				put_at(w, e->old, e->index);
		}
		e->old = NULL;
	}
	jr->n = 0;
	w->current = jr->current[0] ? ws_index_of(w, jr->current) : -1;
}

void ws_journal_free(ws_journal *jr)
{
	for (int j = 0; j < jr->n; j++) {
		if (!jr->e[j].old)
			continue;
		sol_free(jr->e[j].old);
		free(jr->e[j].old);
	}
	free(jr->e);
	memset(jr, 0, sizeof *jr);
}

/* ---- lookups and changes ---- */

solution *ws_find(workspace *w, const char *name)
{
	int i = ws_index_of(w, name);
	if (i < 0)
		return NULL;
	touch(w, i);
	return w->sol[i];
}

solution *ws_current(workspace *w)
{
	if (w->current < 0)
		return NULL;
	touch(w, w->current);
	return w->sol[w->current];
}

void ws_put(workspace *w, solution *s)
{
	int i = ws_index_of(w, s->name);
	if (i >= 0) {
		if (w->jr && w->stamp[i] != w->jr->serial) { /* keep the old one */
			record(w, s->name, w->sol[i], i);
			w->stamp[i] = w->jr->serial;
		} else {
			sol_free(w->sol[i]);
			free(w->sol[i]);
		}
		w->sol[i] = s;
		return;
	}
	if (w->jr)
		record(w, s->name, NULL, -1);
	push(w, s);
	if (w->jr)
		w->stamp[w->n - 1] = w->jr->serial;
}

solution *ws_open(workspace *w, const char *name)
{
	int i = ws_index_of(w, name);
	if (i < 0) {
		solution *s = im_xmalloc(sizeof *s);
		sol_init(s, name);
		ws_put(w, s);
		i = w->n - 1;
	} else {
		touch(w, i);
	}
	w->current = i;
	return w->sol[i];
}

int ws_delete(workspace *w, const char *name)
{
	int i = ws_index_of(w, name);
	solution *s;
	if (i < 0)
		return -1;
	if (w->jr && w->stamp[i] != w->jr->serial) {
		record(w, name, w->sol[i], i);
		take_out(w, i);
		return 0;
	}
	s = take_out(w, i);
	sol_free(s);
	free(s);
	return 0;
}

void ws_copy(workspace *dst, const workspace *src)
{
	ws_init(dst);
	for (int i = 0; i < src->n; i++) {
		solution *s = im_xmalloc(sizeof *s);
		sol_copy(s, src->sol[i], NULL);
		push(dst, s);
	}
	dst->current = src->current;
}
