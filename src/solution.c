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
	s->items[s->n] = (sol_item){c, 0.0, 0.0};
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

int sol_equal(const solution *a, const solution *b)
{
	if (strcmp(a->name, b->name) != 0 || a->n != b->n)
		return 0;
	for (int i = 0; i < a->n; i++)
		if (a->items[i].c != b->items[i].c || a->items[i].mM != b->items[i].mM ||
		    a->items[i].stock_mM != b->items[i].stock_mM)
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

int sol_compute(const solution *s, double t_C, act_model model, sol_state *st,
		char *err)
{
	int cap = 0;
	memset(st, 0, sizeof *st);
	if (!isfinite(t_C) || t_C < 0 || t_C > 100)
		return im_fail(err, "temperature %g C is outside 0 to 100 C", t_C);
	st->t_C = t_C;
	st->model = model;
	for (int i = 0; i < s->n; i++)
		cap += s->items[i].c->nyields;
	st->sp = im_xcalloc(cap ? cap : 1, sizeof *st->sp);
	for (int i = 0; i < s->n; i++) {
		const rd_compound *c = s->items[i].c;
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
		if (model == ACT_DEBYE_HUCKEL && isfinite(x->ion->kielland_a_pm)) {
			x->gamma = act_extended_dh(z, x->ion->kielland_a_pm,
						   st->ionic_strength_mM, t_C);
		} else {
			x->gamma = act_davies(z, st->ionic_strength_mM, t_C);
			x->dh_fallback = model == ACT_DEBYE_HUCKEL && z != 0;
		}
		x->act_mM = x->gamma * x->mM;
	}
	return 0;
}

void sol_state_free(sol_state *st)
{
	free(st->sp);
	st->sp = NULL;
	st->n = 0;
}

const sol_species *sol_state_find(const sol_state *st, const rd_ion *ion)
{
	for (int j = 0; j < st->n; j++)
		if (st->sp[j].ion == ion)
			return &st->sp[j];
	return NULL;
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
	ws_init(w);
}

static int ws_index(const workspace *w, const char *name)
{
	for (int i = 0; i < w->n; i++)
		if (strcmp(w->sol[i]->name, name) == 0)
			return i;
	return -1;
}

solution *ws_find(workspace *w, const char *name)
{
	int i = ws_index(w, name);
	return i < 0 ? NULL : w->sol[i];
}

solution *ws_current(workspace *w)
{
	return w->current < 0 ? NULL : w->sol[w->current];
}

void ws_put(workspace *w, solution *s)
{
	int i = ws_index(w, s->name);
	if (i >= 0) {
		sol_free(w->sol[i]);
		free(w->sol[i]);
		w->sol[i] = s;
		return;
	}
	if (w->n == w->cap) {
		w->cap = w->cap ? 2 * w->cap : 8;
		w->sol = im_xrealloc(w->sol, w->cap * sizeof *w->sol);
	}
	w->sol[w->n++] = s;
}

solution *ws_open(workspace *w, const char *name)
{
	int i = ws_index(w, name);
	if (i < 0) {
		solution *s = im_xmalloc(sizeof *s);
		sol_init(s, name);
		ws_put(w, s);
		i = w->n - 1;
	}
	w->current = i;
	return w->sol[i];
}

int ws_delete(workspace *w, const char *name)
{
	int i = ws_index(w, name);
	if (i < 0)
		return -1;
	sol_free(w->sol[i]);
	free(w->sol[i]);
	memmove(&w->sol[i], &w->sol[i + 1], (w->n - i - 1) * sizeof *w->sol);
	w->n--;
	if (w->current == i)
		w->current = -1;
	else if (w->current > i)
		w->current--;
	return 0;
}

void ws_copy(workspace *dst, const workspace *src)
{
	ws_init(dst);
	for (int i = 0; i < src->n; i++) {
		solution *s = im_xmalloc(sizeof *s);
		sol_copy(s, src->sol[i], NULL);
		ws_put(dst, s);
	}
	dst->current = src->current;
}
