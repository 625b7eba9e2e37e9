/*
 * eqdata.c - reads the equilibrium and Pitzer tables of data/equilibria.sql
 * into the arrays of eqdata.h, checks them, and keeps the one list of
 * compilation picks.  The only SQL of the chemistry lives here.
 */
#include "eqdata.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "reftab.h"

static const char *const cx_kind_name[] = {"ML", "MHL", "M2L", "ML2"};

/* ------------------------------------------------------------------ */
/* the pick list                                                        */

void eqd_picks_push(eqd_picks *p, const char *name)
{
	int k = 0;
	for (int i = 0; i < p->n; i++)
		if (strcmp(p->name[i], name) != 0)
			memmove(p->name[k++], p->name[i], EQD_COMPLEN);
	p->n = k;
	if (p->n == p->cap) {
		p->cap = p->cap ? 2 * p->cap : 8;
		p->name = im_xrealloc(p->name, (size_t)p->cap * sizeof *p->name);
	}
	snprintf(p->name[p->n++], EQD_COMPLEN, "%s", name);
}

void eqd_picks_copy(eqd_picks *dst, const eqd_picks *src)
{
	eqd_picks_free(dst);
	for (int i = 0; i < src->n; i++)
		eqd_picks_push(dst, src->name[i]);
}

void eqd_picks_free(eqd_picks *p)
{
	free(p->name);
	p->name = NULL;
	p->n = p->cap = 0;
}

/* ------------------------------------------------------------------ */
/* speciation tables                                                    */

static const char *col_text(sqlite3_stmt *st, int i)
{
	const unsigned char *t = sqlite3_column_text(st, i);
	return t ? (const char *)t : "";
}

static double col_real(sqlite3_stmt *st, int i)
{
	return sqlite3_column_type(st, i) == SQLITE_NULL ? NAN
							 : sqlite3_column_double(st, i);
}

int eqd_find_lig(const spec_data *d, const char *name)
{
	for (int i = 0; i < d->nlig; i++)
		if (strcmp(d->lig[i].name, name) == 0)
			return i;
	return -1;
}

int eqd_find_lig_ci(const spec_data *d, const char *name)
{
	int k = eqd_find_lig(d, name);
	for (int i = 0; k < 0 && i < d->nlig; i++)
		if (im_strcaseeq(d->lig[i].name, name))
			k = i;
	return k;
}

int eqd_find_metal(const spec_data *d, const char *sym)
{
	for (int i = 0; i < d->nmet; i++)
		if (strcmp(d->met[i].sym, sym) == 0)
			return i;
	/* also 'Ca', 'ca2+' */
	for (int i = 0; i < d->nmet; i++) {
		char bare[SPEC_SYMLEN];
		snprintf(bare, sizeof bare, "%s", d->met[i].sym);
		char *p = bare;
		while (*p && !(*p >= '0' && *p <= '9') && *p != '+')
			p++;
		*p = '\0';
		if (im_strcaseeq(d->met[i].sym, sym) || im_strcaseeq(bare, sym))
			return i;
	}
	return -1;
}
/* ------------------------------------------------------------------ */
/* loading                                                              */

static int prep(sqlite3 *db, const char *q, sqlite3_stmt **st, char *err)
{
	if (sqlite3_prepare_v2(db, q, -1, st, NULL) != SQLITE_OK)
		return im_fail(err, "equilibrium data: cannot read the tables: %s",
			       sqlite3_errmsg(db));
	return 0;
}

static int done(sqlite3 *db, sqlite3_stmt *st, int rc, char *err)
{
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE)
		return im_fail(err, "equilibrium data: reading the tables: %s",
			       sqlite3_errmsg(db));
	return 0;
}

/* The compilation used for a ligand's pKa set: the latest pick with rows
 * for it, else the default. */
static const char *lig_comp(const spec_data *d, int k)
{
	for (int p = d->picks.n - 1; p >= 0; p--)
		for (int r = 0; r < d->npka; r++)
			if (d->pka[r].lig == k &&
			    strcmp(d->pka[r].comp, d->picks.name[p]) == 0)
				return d->picks.name[p];
	for (int r = 0; r < d->npka; r++)
		if (d->pka[r].lig == k && d->pka[r].is_default)
			return d->pka[r].comp;
	return NULL;
}

static const char *pair_comp(const spec_data *d, int m, int k)
{
	for (int p = d->picks.n - 1; p >= 0; p--)
		for (int r = 0; r < d->ncx; r++)
			if (d->cx[r].metal == m && d->cx[r].lig == k &&
			    strcmp(d->cx[r].comp, d->picks.name[p]) == 0)
				return d->picks.name[p];
	for (int r = 0; r < d->ncx; r++)
		if (d->cx[r].metal == m && d->cx[r].lig == k && d->cx[r].is_default)
			return d->cx[r].comp;
	return NULL;
}

/* Apply the picks: steps of each ligand, active complexes.  -1 when a
 * selection is inconsistent (a gap in the steps, a complex needing a
 * protonation step that is not modelled). */
int eqd_select_spec(spec_data *d, char *err)
{
	d->gen++;
	for (int k = 0; k < d->nlig; k++) {
		lig_def *L = &d->lig[k];
		const char *comp = lig_comp(d, k);
		L->nsteps = 0;
		for (int h = 0; h <= EQD_MAXH; h++)
			L->step[h] = -1;
		for (int r = 0; comp && r < d->npka; r++)
			if (d->pka[r].lig == k && strcmp(d->pka[r].comp, comp) == 0)
				L->step[d->pka[r].n_h] = r;
		while (L->nsteps < EQD_MAXH && L->step[L->nsteps + 1] >= 0)
			L->nsteps++;
		for (int h = L->nsteps + 1; h <= EQD_MAXH; h++)
			if (L->step[h] >= 0)
				return im_fail(err,
					       "speciation: %s (%s): pKa steps are not "
					       "1..n without gaps",
					       L->name, comp);
		for (int h = 0; h <= L->nsteps; h++)
			if (!L->has_state[h])
				return im_fail(err,
					       "speciation: %s has no eq_ligand_states "
					       "row for n_h = %d",
					       L->name, h);
	}
	for (int r = 0; r < d->ncx; r++) {
		cx_row *c = &d->cx[r];
		const char *comp = pair_comp(d, c->metal, c->lig);
		c->active = comp && strcmp(c->comp, comp) == 0;
		if (c->active && c->nh > d->lig[c->lig].nsteps)
			return im_fail(err,
				       "speciation: %s needs protonation step %d of %s, "
				       "not modelled",
				       c->sym, c->nh, d->lig[c->lig].name);
	}
	return 0;
}

static int load_ligands(sqlite3 *db, spec_data *d, char *err)
{
	sqlite3_stmt *st;
	int rc, cap = 0;
	if (prep(db,
		 "SELECT name, base_charge, binds_metals FROM eq_ligands ORDER BY rowid",
		 &st, err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->nlig == EQD_MAX_LIG) {
			sqlite3_finalize(st);
			return im_fail(err, "speciation: more than %d ligands",
				       EQD_MAX_LIG);
		}
		if (d->nlig == cap) {
			cap = cap ? 2 * cap : 32;
			d->lig = im_xrealloc(d->lig, (size_t)cap * sizeof *d->lig);
		}
		lig_def *L = &d->lig[d->nlig++];
		memset(L, 0, sizeof *L);
		snprintf(L->name, sizeof L->name, "%s", col_text(st, 0));
		L->zb = sqlite3_column_int(st, 1);
		L->binds = sqlite3_column_int(st, 2);
		L->carbonate = strcmp(L->name, "carbonate") == 0;
	}
	if (done(db, st, rc, err))
		return -1;
	if (prep(db, "SELECT symbol, ligand, n_h, charge FROM eq_ligand_states", &st,
		 err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		int k = eqd_find_lig(d, col_text(st, 1)), h = sqlite3_column_int(st, 2);
		int z = sqlite3_column_int(st, 3);
		if (k < 0 || h < 0 || h > EQD_MAXH) {
			im_fail(err, "speciation: eq_ligand_states %s: bad ligand or n_h",
				col_text(st, 0));
			sqlite3_finalize(st);
			return -1;
		}
		if (z != d->lig[k].zb + h) {
			im_fail(err,
				"speciation: %s has charge %d, but %s%+d protons "
				"gives %d",
				col_text(st, 0), z, d->lig[k].name, h, d->lig[k].zb + h);
			sqlite3_finalize(st);
			return -1;
		}
		snprintf(d->lig[k].state[h], SPEC_SYMLEN, "%s", col_text(st, 0));
		d->lig[k].has_state[h] = 1;
	}
	return done(db, st, rc, err);
}

static int load_pka(sqlite3 *db, spec_data *d, char *err)
{
	sqlite3_stmt *st;
	int rc, cap = 0;
	if (prep(db,
		 "SELECT ligand, n_h, compilation, is_default, pka, t_ref_C, i_ref_M, "
		 "dh_kJ_mol, dpka_dt_per_K, fit_a_K, fit_b, fit_c_per_K, source, "
		 "dcp_J_mol_K, dh_analogue, dh_source FROM eq_pka ORDER BY ligand, "
		 "compilation, n_h",
		 &st, err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->npka == cap) {
			cap = cap ? 2 * cap : 64;
			d->pka = im_xrealloc(d->pka, (size_t)cap * sizeof *d->pka);
		}
		pka_row *p = &d->pka[d->npka];
		memset(p, 0, sizeof *p);
		p->lig = eqd_find_lig(d, col_text(st, 0));
		p->n_h = sqlite3_column_int(st, 1);
		if (p->lig < 0 || p->n_h < 1 || p->n_h > EQD_MAXH) {
			sqlite3_finalize(st);
			return im_fail(err, "speciation: eq_pka row of unknown "
				       "ligand or step");
		}
		snprintf(p->comp, EQD_COMPLEN, "%s", col_text(st, 2));
		p->is_default = sqlite3_column_int(st, 3);
		p->pka = sqlite3_column_double(st, 4);
		p->t_ref = sqlite3_column_double(st, 5);
		p->i_ref = sqlite3_column_double(st, 6);
		p->dh = col_real(st, 7);
		p->dpdt = col_real(st, 8);
		p->fa = col_real(st, 9);
		p->fb = col_real(st, 10);
		p->fc = col_real(st, 11);
		snprintf(p->source, EQD_SRCLEN, "%s", col_text(st, 12));
		p->dcp = col_real(st, 13);
		snprintf(p->analogue, EQD_SYMLEN, "%s", col_text(st, 14));
		snprintf(p->dh_source, EQD_SRCLEN, "%s", col_text(st, 15));
		p->tsrc = isfinite(p->dh) || isfinite(p->dpdt) || isfinite(p->fa)
				  ? EQD_T_ENTERED
				  : p->analogue[0] ? EQD_T_ANALOGUE : EQD_T_NONE;
		d->npka++;
	}
	if (done(db, st, rc, err))
		return -1;
	/* one default compilation per ligand, all of its steps default */
	for (int k = 0; k < d->nlig; k++) {
		const char *def = NULL;
		int nrows = 0;
		for (int r = 0; r < d->npka; r++) {
			if (d->pka[r].lig != k)
				continue;
			nrows++;
			if (d->pka[r].is_default) {
				if (def && strcmp(def, d->pka[r].comp) != 0)
					return im_fail(err,
						       "speciation: %s has default pKa "
						       "rows from two compilations",
						       d->lig[k].name);
				def = d->pka[r].comp;
			}
		}
		if (nrows && !def)
			return im_fail(err,
				       "speciation: %s has no default pKa compilation",
				       d->lig[k].name);
		for (int r = 0; def && r < d->npka; r++)
			if (d->pka[r].lig == k && strcmp(d->pka[r].comp, def) == 0 &&
			    !d->pka[r].is_default)
				return im_fail(err,
					       "speciation: %s: compilation %s is "
					       "default for some steps only",
					       d->lig[k].name, def);
	}
	return 0;
}

static int load_metals_complexes(sqlite3 *db, spec_data *d, char *err)
{
	sqlite3_stmt *st;
	int rc, cap = 0;
	if (prep(db, "SELECT symbol, charge FROM eq_metals ORDER BY rowid", &st, err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->nmet == SPEC_MAX_METALS) {
			sqlite3_finalize(st);
			return im_fail(err, "speciation: more than %d metals",
				       SPEC_MAX_METALS);
		}
		snprintf(d->met[d->nmet].sym, SPEC_SYMLEN, "%s", col_text(st, 0));
		d->met[d->nmet++].z = sqlite3_column_int(st, 1);
	}
	if (done(db, st, rc, err))
		return -1;
	if (prep(db,
		 "SELECT symbol, metal, ligand, kind, compilation, is_default, log_k, "
		 "t_ref_C, i_ref_M, dh_kJ_mol, source, dcp_J_mol_K, dh_analogue, dh_source FROM "
		 "eq_complexes ORDER BY metal, ligand, compilation, kind",
		 &st, err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->ncx == cap) {
			cap = cap ? 2 * cap : 64;
			d->cx = im_xrealloc(d->cx, (size_t)cap * sizeof *d->cx);
		}
		cx_row *c = &d->cx[d->ncx];
		memset(c, 0, sizeof *c);
		snprintf(c->sym, SPEC_SYMLEN, "%s", col_text(st, 0));
		c->metal = eqd_find_metal(d, col_text(st, 1));
		c->lig = eqd_find_lig(d, col_text(st, 2));
		c->kind = -1;
		for (int k = 0; k < 4; k++)
			if (strcmp(col_text(st, 3), cx_kind_name[k]) == 0)
				c->kind = k;
		if (c->metal < 0 || c->lig < 0 || c->kind < 0) {
			im_fail(err,
				"speciation: eq_complexes %s: unknown metal, ligand or "
				"kind",
				c->sym);
			sqlite3_finalize(st);
			return -1;
		}
		snprintf(c->comp, EQD_COMPLEN, "%s", col_text(st, 4));
		c->is_default = sqlite3_column_int(st, 5);
		c->logk = sqlite3_column_double(st, 6);
		c->t_ref = sqlite3_column_double(st, 7);
		c->i_ref = sqlite3_column_double(st, 8);
		c->dh = col_real(st, 9);
		snprintf(c->source, EQD_SRCLEN, "%s", col_text(st, 10));
		c->dcp = col_real(st, 11);
		snprintf(c->analogue, EQD_SYMLEN, "%s", col_text(st, 12));
		snprintf(c->dh_source, EQD_SRCLEN, "%s", col_text(st, 13));
		c->tsrc = isfinite(c->dh) ? EQD_T_ENTERED
					  : c->analogue[0] ? EQD_T_ANALOGUE : EQD_T_NONE;
		c->nm = c->kind == CX_M2L ? 2 : 1;
		c->nl = c->kind == CX_ML2 ? 2 : 1;
		c->nh = c->kind == CX_MHL ? 1 : 0;
		c->z = c->nm * d->met[c->metal].z + c->nl * d->lig[c->lig].zb + c->nh;
		c->ml_row = -1;
		d->ncx++;
	}
	if (done(db, st, rc, err))
		return -1;
	for (int r = 0; r < d->ncx; r++) {
		cx_row *c = &d->cx[r];
		if (d->lig[c->lig].carbonate)
			return im_fail(err,
				       "speciation: %s: complexes of carbonate are not "
				       "supported",
				       c->sym);
		if (c->kind == CX_M2L || c->kind == CX_ML2) {
			for (int s = 0; s < d->ncx; s++)
				if (d->cx[s].metal == c->metal &&
				    d->cx[s].lig == c->lig && d->cx[s].kind == CX_ML &&
				    strcmp(d->cx[s].comp, c->comp) == 0)
					c->ml_row = s;
			if (c->ml_row < 0)
				return im_fail(err,
					       "speciation: %s (%s) needs the ML row of "
					       "the same compilation",
					       c->sym, c->comp);
		}
		const char *def = NULL;
		for (int s = 0; s < d->ncx; s++) {
			const cx_row *o = &d->cx[s];
			if (o->metal != c->metal || o->lig != c->lig || !o->is_default)
				continue;
			if (def && strcmp(def, o->comp) != 0)
				return im_fail(err,
					       "speciation: %s-%s has default constants "
					       "from two compilations",
					       d->met[c->metal].sym, d->lig[c->lig].name);
			def = o->comp;
		}
		if (!def)
			return im_fail(err,
				       "speciation: %s-%s has no default compilation",
				       d->met[c->metal].sym, d->lig[c->lig].name);
	}
	return 0;
}

static int load_fits(sqlite3 *db, spec_data *d, char *err)
{
	sqlite3_stmt *st;
	int rc, have = 0;
	if (prep(db,
		 "SELECT name, fit_a_K, fit_b, fit_c_per_K, t_min_C, t_max_C, source "
		 "FROM eq_fits",
		 &st, err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		fit3 *f = NULL;
		if (strcmp(col_text(st, 0), "pKw") == 0)
			f = &d->pkw, have |= 1;
		else if (strcmp(col_text(st, 0), "co2-pk0") == 0)
			f = &d->k0, have |= 2;
		if (!f)
			continue;
		f->a = sqlite3_column_double(st, 1);
		f->b = sqlite3_column_double(st, 2);
		f->c = sqlite3_column_double(st, 3);
		f->tmin = sqlite3_column_double(st, 4);
		f->tmax = sqlite3_column_double(st, 5);
		snprintf(f->source, EQD_SRCLEN, "%s", col_text(st, 6));
	}
	if (done(db, st, rc, err))
		return -1;
	if (have != 3)
		return im_fail(err, "speciation: eq_fits lacks %s",
			       (have & 1) ? "co2-pk0" : "pKw");
	if (prep(db,
		 "SELECT pk0, pk_ph, pk_t_per_K, pk_tph_per_K, t_ref_C, ph_ref, ph_min, "
		 "ph_max, i_ref_M, pk_source, s0_mM_mmHg, s1_per_K, s2_per_K2, t_ref_sol_C, "
		 "sol_source, t_min_C, t_max_C FROM eq_co2_apparent",
		 &st, err))
		return -1;
	have = 0;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		co2_app *a = &d->co2;
		a->pk0 = sqlite3_column_double(st, 0);
		a->pk_ph = sqlite3_column_double(st, 1);
		a->pk_t = sqlite3_column_double(st, 2);
		a->pk_tph = sqlite3_column_double(st, 3);
		a->t_ref = sqlite3_column_double(st, 4);
		a->ph_ref = sqlite3_column_double(st, 5);
		a->ph_min = sqlite3_column_double(st, 6);
		a->ph_max = sqlite3_column_double(st, 7);
		a->i_ref = sqlite3_column_double(st, 8);
		snprintf(a->source, EQD_SRCLEN, "%s", col_text(st, 9));
		a->s0 = sqlite3_column_double(st, 10);
		a->s1 = sqlite3_column_double(st, 11);
		a->s2 = sqlite3_column_double(st, 12);
		a->t_ref_sol = sqlite3_column_double(st, 13);
		snprintf(a->sol_source, EQD_SRCLEN, "%s", col_text(st, 14));
		a->tmin = sqlite3_column_double(st, 15);
		a->tmax = sqlite3_column_double(st, 16);
		have++;
	}
	if (done(db, st, rc, err))
		return -1;
	if (have != 1)
		return im_fail(err, "speciation: eq_co2_apparent needs exactly one row");
	return 0;
}

#define ANALOGUE_DEPTH 8 /* longest chain of analogues followed */

/* The row of the step forming species sym with an enthalpy of its own (the
 * default compilation's first), following analogue chains; -1 if none. */
static int pka_analogue(const spec_data *d, const char *sym, int depth)
{
	int best = -1;
	for (int r = 0; r < d->npka; r++) {
		const pka_row *p = &d->pka[r];
		if (strcmp(d->lig[p->lig].state[p->n_h], sym) != 0)
			continue;
		int t = r;
		if (p->tsrc == EQD_T_ANALOGUE)
			t = depth < ANALOGUE_DEPTH ? pka_analogue(d, p->analogue, depth + 1)
						   : -1;
		else if (!isfinite(p->dh))
			t = -1;
		if (t >= 0 && (best < 0 || p->is_default))
			best = t;
	}
	return best;
}

static int cx_analogue(const spec_data *d, const char *sym, int depth)
{
	int best = -1;
	for (int r = 0; r < d->ncx; r++) {
		const cx_row *c = &d->cx[r];
		if (strcmp(c->sym, sym) != 0)
			continue;
		int t = r;
		if (c->tsrc == EQD_T_ANALOGUE)
			t = depth < ANALOGUE_DEPTH ? cx_analogue(d, c->analogue, depth + 1) : -1;
		else if (!isfinite(c->dh))
			t = -1;
		if (t >= 0 && (best < 0 || c->is_default))
			best = t;
	}
	return best;
}

/* Take the enthalpies of the rows that name an analogue, and refuse a
 * metal-binding ligand's constant without any temperature dependence. */
static int resolve_enthalpies(spec_data *d, char *err)
{
	for (int r = 0; r < d->npka; r++) {
		pka_row *p = &d->pka[r];
		const lig_def *L = &d->lig[p->lig];
		if (p->tsrc == EQD_T_ANALOGUE) {
			int t = pka_analogue(d, p->analogue, 0);
			if (t < 0)
				return im_fail(err,
					       "equilibrium data: %s (%s): the analogue '%s' "
					       "is no step with an enthalpy",
					       L->state[p->n_h], p->comp, p->analogue);
			p->dh = d->pka[t].dh;
			p->dcp = d->pka[t].dcp;
		} else if (p->tsrc == EQD_T_NONE && L->binds) {
			return im_fail(err,
				       "equilibrium data: %s = %s + H+ (%s) has no enthalpy "
				       "and no analogue: its temperature dependence is unknown",
				       L->state[p->n_h], L->state[p->n_h - 1], p->comp);
		}
	}
	for (int r = 0; r < d->ncx; r++) {
		cx_row *c = &d->cx[r];
		if (c->tsrc == EQD_T_ANALOGUE) {
			int t = cx_analogue(d, c->analogue, 0);
			if (t < 0)
				return im_fail(err,
					       "equilibrium data: %s (%s): the analogue '%s' "
					       "is no complex with an enthalpy",
					       c->sym, c->comp, c->analogue);
			c->dh = d->cx[t].dh;
			c->dcp = d->cx[t].dcp;
		} else if (c->tsrc == EQD_T_NONE) {
			return im_fail(err,
				       "equilibrium data: %s (%s) has no enthalpy and no "
				       "analogue: its temperature dependence is unknown",
				       c->sym, c->comp);
		}
	}
	return 0;
}

#ifndef IM_NO_TABLES
/* A copy of n elements of size sz (at least one byte allocated). */
static void *dup_rows(const void *src, size_t n, size_t sz)
{
	void *p = im_xmalloc(n ? n * sz : 1);
	if (n)
		memcpy(p, src, n * sz);
	return p;
}

/* The tables built into the program (reftab.h): loaded, checked and
 * selected at build time by the code below, copied here. */
static spec_data *builtin_spec(void)
{
	spec_data *d = im_xmalloc(sizeof *d);
	*d = *im_tab_spec;
	d->lig = dup_rows(im_tab_lig, (size_t)d->nlig, sizeof *d->lig);
	d->pka = dup_rows(im_tab_pka, (size_t)d->npka, sizeof *d->pka);
	d->cx = dup_rows(im_tab_cx, (size_t)d->ncx, sizeof *d->cx);
	memset(&d->picks, 0, sizeof d->picks);
	d->gen = 0;
	return d;
}

static osm_data *builtin_osm(void)
{
	osm_data *d = im_xmalloc(sizeof *d);
	*d = *im_tab_osm;
	d->sym = dup_rows(im_tab_osm_sym, (size_t)d->nsym, sizeof *d->sym);
	d->v0_L_mol = dup_rows(im_tab_osm_v0, (size_t)d->nsym, sizeof *d->v0_L_mol);
	d->pz = dup_rows(im_tab_pz, (size_t)d->npz, sizeof *d->pz);
	d->nz = dup_rows(im_tab_nz, (size_t)d->nnz, sizeof *d->nz);
	d->pair = dup_rows(im_tab_osm_pair, (size_t)d->nsym * (size_t)d->nsym, sizeof *d->pair);
	memset(&d->picks, 0, sizeof d->picks);
	d->gen = 0;
	return d;
}
#endif

int eqd_load_spec(sqlite3 *db, spec_data **out, char *err)
{
	*out = NULL;
	if (!db) {
#ifndef IM_NO_TABLES
		*out = builtin_spec();
		return 0;
#else
		return im_fail(err, "speciation: no database");
#endif
	}
	spec_data *d = im_xcalloc(1, sizeof *d);
	if (load_ligands(db, d, err) || load_pka(db, d, err) ||
	    load_metals_complexes(db, d, err) || load_fits(db, d, err) ||
	    resolve_enthalpies(d, err) || eqd_select_spec(d, err)) {
		eqd_free_spec(d);
		return -1;
	}
	/* every compilation of every ligand must select cleanly */
	for (int r = 0; r < d->npka; r++) {
		char e2[IM_ERRLEN];
		d->picks.n = 0;
		eqd_picks_push(&d->picks, d->pka[r].comp);
		if (eqd_select_spec(d, e2)) {
			im_fail(err, "%s", e2);
			eqd_free_spec(d);
			return -1;
		}
	}
	d->picks.n = 0;
	eqd_select_spec(d, err);
	*out = d;
	return 0;
}

void eqd_free_spec(spec_data *d)
{
	if (!d)
		return;
	free(d->lig);
	free(d->pka);
	free(d->cx);
	eqd_picks_free(&d->picks);
	free(d);
}

int eqd_spec_has_compilation(const spec_data *d, const char *name, const char **canon)
{
	*canon = NULL;
	for (int r = 0; d && r < d->npka && !*canon; r++)
		if (im_strcaseeq(d->pka[r].comp, name))
			*canon = d->pka[r].comp;
	for (int r = 0; d && r < d->ncx && !*canon; r++)
		if (im_strcaseeq(d->cx[r].comp, name))
			*canon = d->cx[r].comp;
	return *canon != NULL;
}

/* ------------------------------------------------------------------ */
/* Pitzer tables                                                        */

static int isdigit_ascii(int c)
{
	return c >= '0' && c <= '9';
}

int eqd_osm_sym(const osm_data *d, const char *s)
{
	for (int i = 0; i < d->nsym; i++)
		if (im_symeq(d->sym[i], s))
			return i;
	return -1;
}

static int sym_add(osm_data *d, const char *s, int *cap)
{
	int i = eqd_osm_sym(d, s);
	if (i >= 0)
		return i;
	if (d->nsym == *cap) {
		*cap = *cap ? 2 * *cap : 32;
		d->sym = im_xrealloc(d->sym, (size_t)*cap * sizeof *d->sym);
		d->v0_L_mol =
			im_xrealloc(d->v0_L_mol, (size_t)*cap * sizeof *d->v0_L_mol);
	}
	/* zeroed first: the build writes these bytes into its tables */
	memset(d->sym[d->nsym], 0, sizeof d->sym[d->nsym]);
	snprintf(d->sym[d->nsym], EQD_SYMLEN, "%s", s);
	d->v0_L_mol[d->nsym] = NAN;
	return d->nsym++;
}

/* Which row each pair uses: the latest pick that covers it, else the
 * default row. */
void eqd_select_osm(osm_data *d)
{
	d->gen++;
	for (int i = 0; i < d->nsym * d->nsym; i++)
		d->pair[i] = -1;
	for (int r = 0; r < d->npz; r++) {
		int k = d->pz[r].cat * d->nsym + d->pz[r].an;
		if (d->pz[r].is_default && d->pair[k] < 0)
			d->pair[k] = r;
	}
	for (int p = 0; p < d->picks.n; p++)
		for (int r = 0; r < d->npz; r++)
			if (strcmp(d->pz[r].comp, d->picks.name[p]) == 0)
				d->pair[d->pz[r].cat * d->nsym + d->pz[r].an] = r;
}


int eqd_load_osm(sqlite3 *db, osm_data **out, char *err)
{
	*out = NULL;
	if (!db) {
#ifndef IM_NO_TABLES
		*out = builtin_osm();
		return 0;
#else
		return im_fail(err, "osmotic: no database");
#endif
	}
	osm_data *d = im_xcalloc(1, sizeof *d);
	int cap = 0, pcap = 0;
	sqlite3_stmt *st = NULL;
	const char *q1 =
		"SELECT cation, anion, salt, compilation, is_default, beta0, beta1, "
		"beta2, alpha1, alpha2, c_phi, m_max_mol_kg, class FROM osm_pitzer ORDER BY "
		"cation, anion, compilation";
	if (sqlite3_prepare_v2(db, q1, -1, &st, NULL) != SQLITE_OK) {
		im_fail(err, "osmotic: cannot read osm_pitzer: %s", sqlite3_errmsg(db));
		goto fail;
	}
	int rc;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->npz == pcap) {
			pcap = pcap ? 2 * pcap : 32;
			d->pz = im_xrealloc(d->pz, (size_t)pcap * sizeof *d->pz);
		}
		pz_row *p = &d->pz[d->npz];
		memset(p, 0, sizeof *p);
		p->cat = sym_add(d, col_text(st, 0), &cap);
		p->an = sym_add(d, col_text(st, 1), &cap);
		snprintf(p->salt, EQD_SYMLEN, "%s", col_text(st, 2));
		snprintf(p->comp, EQD_COMPLEN, "%s", col_text(st, 3));
		p->is_default = sqlite3_column_int(st, 4);
		p->b0 = sqlite3_column_double(st, 5);
		p->b1 = sqlite3_column_double(st, 6);
		p->b2 = sqlite3_column_double(st, 7);
		p->a1 = sqlite3_column_double(st, 8);
		p->a2 = sqlite3_column_double(st, 9);
		p->cphi = sqlite3_column_double(st, 10);
		p->m_max = sqlite3_column_double(st, 11);
		p->cls = strcmp(col_text(st, 12), "estimated") == 0 ? EQD_OSM_ESTIMATED
								   : EQD_OSM_PUBLISHED;
		d->npz++;
	}
	sqlite3_finalize(st);
	st = NULL;
	if (rc != SQLITE_DONE) {
		im_fail(err, "osmotic: reading osm_pitzer: %s", sqlite3_errmsg(db));
		goto fail;
	}
	const char *q3 = "SELECT symbol, lambda_kg_mol, mu_kg2_mol2, m_max_mol_kg, class "
			 "FROM osm_neutral ORDER BY symbol";
	int ncap = 0;
	if (sqlite3_prepare_v2(db, q3, -1, &st, NULL) != SQLITE_OK) {
		im_fail(err, "osmotic: cannot read osm_neutral: %s", sqlite3_errmsg(db));
		goto fail;
	}
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->nnz == ncap) {
			ncap = ncap ? 2 * ncap : 8;
			d->nz = im_xrealloc(d->nz, (size_t)ncap * sizeof *d->nz);
		}
		nz_row *z = &d->nz[d->nnz++];
		memset(z, 0, sizeof *z);
		z->sym = sym_add(d, col_text(st, 0), &cap);
		z->lambda = sqlite3_column_double(st, 1);
		z->mu = sqlite3_column_double(st, 2);
		z->m_max = sqlite3_column_double(st, 3);
		z->cls = strcmp(col_text(st, 4), "estimated") == 0 ? EQD_OSM_ESTIMATED
								  : EQD_OSM_PUBLISHED;
	}
	sqlite3_finalize(st);
	st = NULL;
	if (rc != SQLITE_DONE) {
		im_fail(err, "osmotic: reading osm_neutral: %s", sqlite3_errmsg(db));
		goto fail;
	}
	const char *q2 = "SELECT symbol, v0_cm3_mol FROM osm_molar_volumes";
	if (sqlite3_prepare_v2(db, q2, -1, &st, NULL) != SQLITE_OK) {
		im_fail(err, "osmotic: cannot read osm_molar_volumes: %s",
			sqlite3_errmsg(db));
		goto fail;
	}
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		int i = sym_add(d, col_text(st, 0), &cap);
		d->v0_L_mol[i] = sqlite3_column_double(st, 1) / 1000.0;
	}
	sqlite3_finalize(st);
	st = NULL;
	if (rc != SQLITE_DONE) {
		im_fail(err, "osmotic: reading osm_molar_volumes: %s",
			sqlite3_errmsg(db));
		goto fail;
	}
	/* Charges follow from the symbols' signs; the loader checks that every
	 * pair has exactly one default row. */
	for (int r = 0; r < d->npz; r++) {
		pz_row *p = &d->pz[r];
		const char *c = d->sym[p->cat], *a = d->sym[p->an];
		size_t lc = strlen(c), la = strlen(a);
		if (lc < 2 || la < 2 || c[lc - 1] != '+' || a[la - 1] != '-') {
			im_fail(err,
				"osmotic: osm_pitzer %s: '%s' '%s' are not a cation and "
				"an anion",
				p->salt, c, a);
			goto fail;
		}
		p->zc = isdigit_ascii(c[lc - 2]) ? c[lc - 2] - '0' : 1;
		p->za = -(isdigit_ascii(a[la - 2]) ? a[la - 2] - '0' : 1);
		if (!(p->m_max > 0) || !isfinite(p->b0 + p->b1 + p->b2 + p->cphi)) {
			im_fail(err, "osmotic: osm_pitzer %s: bad parameters", p->salt);
			goto fail;
		}
	}
	d->pair = im_xmalloc((size_t)(d->nsym ? d->nsym * d->nsym : 1) * sizeof *d->pair);
	eqd_select_osm(d);
	for (int r = 0; r < d->npz; r++) {
		int ndef = 0;
		for (int s = 0; s < d->npz; s++)
			if (d->pz[s].cat == d->pz[r].cat && d->pz[s].an == d->pz[r].an)
				ndef += d->pz[s].is_default;
		if (ndef != 1) {
			im_fail(err,
				"osmotic: osm_pitzer %s: %d default rows, need exactly 1",
				d->pz[r].salt, ndef);
			goto fail;
		}
	}
	*out = d;
	return 0;
fail:
	if (st)
		sqlite3_finalize(st);
	eqd_free_osm(d);
	return -1;
}

void eqd_free_osm(osm_data *d)
{
	if (!d)
		return;
	free(d->sym);
	free(d->v0_L_mol);
	free(d->pz);
	free(d->pair);
	free(d->nz);
	eqd_picks_free(&d->picks);
	free(d);
}

int eqd_osm_has_compilation(const osm_data *d, const char *name, const char **canon)
{
	*canon = NULL;
	for (int r = 0; d && r < d->npz && !*canon; r++)
		if (im_strcaseeq(d->pz[r].comp, name))
			*canon = d->pz[r].comp;
	return *canon != NULL;
}


/* ------------------------------------------------------------------ */
/* both                                                                 */

int eqd_use_compilation(spec_data *d, osm_data *o, const char *name, char *err)
{
	if (!name || !*name)
		return im_fail(err, "no compilation named");
	if (im_strcaseeq(name, "default")) {
		if (d) {
			d->picks.n = 0;
			if (eqd_select_spec(d, err))
				return -1;
		}
		if (o) {
			o->picks.n = 0;
			eqd_select_osm(o);
		}
		return 0;
	}
	const char *cs = NULL, *co = NULL;
	int in_s = eqd_spec_has_compilation(d, name, &cs);
	int in_o = eqd_osm_has_compilation(o, name, &co);
	if (!in_s && !in_o)
		return im_fail(err,
			       "no equilibrium constants from a compilation named '%s'",
			       name);
	if (in_s) {
		eqd_picks old = {0};
		eqd_picks_copy(&old, &d->picks);
		eqd_picks_push(&d->picks, cs);
		if (eqd_select_spec(d, err)) {
			/* an inconsistent combination: keep the selection as it was */
			char e2[IM_ERRLEN];
			eqd_picks_copy(&d->picks, &old);
			eqd_picks_free(&old);
			eqd_select_spec(d, e2);
			return -1;
		}
		eqd_picks_free(&old);
	}
	if (in_o) {
		eqd_picks_push(&o->picks, co);
		eqd_select_osm(o);
	}
	return 0;
}

static int add_name(char (*names)[EQD_COMPLEN], int n, int max, const char *s)
{
	for (int i = 0; i < n; i++)
		if (strcmp(names[i], s) == 0)
			return n;
	if (n == max)
		return n;
	snprintf(names[n], EQD_COMPLEN, "%s", s);
	return n + 1;
}

static int cmp_name(const void *a, const void *b)
{
	return strcmp((const char *)a, (const char *)b);
}

int eqd_compilations(const spec_data *d, const osm_data *o, char (*names)[EQD_COMPLEN],
		     int max)
{
	int n = 0;
	for (int r = 0; d && r < d->npka; r++)
		n = add_name(names, n, max, d->pka[r].comp);
	for (int r = 0; d && r < d->ncx; r++)
		n = add_name(names, n, max, d->cx[r].comp);
	for (int r = 0; o && r < o->npz; r++)
		n = add_name(names, n, max, o->pz[r].comp);
	qsort(names, (size_t)n, sizeof *names, cmp_name);
	return n;
}

/* ------------------------------------------------------------------ */
/* listing                                                              */

int eqd_constants(const spec_data *d, const char *name, spec_const *out, int max,
		  char *err)
{
	if (!d || !name || !*name)
		return im_fail(err, "no name given");
	int k = eqd_find_lig_ci(d, name), m = eqd_find_metal(d, name), comp = 0;
	for (int r = 0; r < d->npka && !comp; r++)
		comp = im_strcaseeq(d->pka[r].comp, name);
	for (int r = 0; r < d->ncx && !comp; r++)
		comp = im_strcaseeq(d->cx[r].comp, name);
	if (k < 0 && m < 0 && !comp)
		return im_fail(err,
			       "'%s' is neither a ligand, a metal nor a compilation of "
			       "the equilibria tables",
			       name);
	int n = 0;
	for (int r = 0; r < d->npka && n < max; r++) {
		const pka_row *p = &d->pka[r];
		if (!((k >= 0 && p->lig == k) || (comp && im_strcaseeq(p->comp, name))))
			continue;
		const lig_def *L = &d->lig[p->lig];
		spec_const *o = &out[n++];
		memset(o, 0, sizeof *o);
		snprintf(o->what, SPEC_SYMLEN, "%s", L->state[p->n_h]);
		snprintf(o->reaction, sizeof o->reaction, "%s = %s + H+",
			 L->state[p->n_h], L->state[p->n_h - 1]);
		o->is_pka = 1;
		o->value = p->pka;
		o->t_ref_C = p->t_ref;
		o->i_ref_M = p->i_ref;
		o->dh_kJ_mol = p->dh;
		if (p->tsrc == EQD_T_ANALOGUE)
			snprintf(o->dh_analogue, SPEC_SYMLEN, "%s", p->analogue);
		snprintf(o->dh_source, sizeof o->dh_source, "%s", p->dh_source);
		o->dpka_dt_per_K = p->dpdt;
		o->has_fit = isfinite(p->fa);
		snprintf(o->compilation, sizeof o->compilation, "%s", p->comp);
		snprintf(o->source, sizeof o->source, "%s", p->source);
		o->in_use = p->n_h <= L->nsteps && L->step[p->n_h] == r;
	}
	for (int r = 0; r < d->ncx && n < max; r++) {
		const cx_row *c = &d->cx[r];
		if (!((k >= 0 && c->lig == k) || (m >= 0 && c->metal == m) ||
		      (comp && im_strcaseeq(c->comp, name))))
			continue;
		const lig_def *L = &d->lig[c->lig];
		const char *M = d->met[c->metal].sym;
		spec_const *o = &out[n++];
		memset(o, 0, sizeof *o);
		snprintf(o->what, SPEC_SYMLEN, "%s", c->sym);
		switch (c->kind) {
		case CX_MHL:
			snprintf(o->reaction, sizeof o->reaction, "%s + %s = %s", M,
				 L->state[1], c->sym);
			break;
		case CX_M2L:
			snprintf(o->reaction, sizeof o->reaction, "%s + %s = %s",
				 d->cx[c->ml_row].sym, M, c->sym);
			break;
		case CX_ML2:
			snprintf(o->reaction, sizeof o->reaction, "%s + %s = %s",
				 d->cx[c->ml_row].sym, L->state[0], c->sym);
			break;
		default:
			snprintf(o->reaction, sizeof o->reaction, "%s + %s = %s", M,
				 L->state[0], c->sym);
		}
		o->value = c->logk;
		o->t_ref_C = c->t_ref;
		o->i_ref_M = c->i_ref;
		o->dh_kJ_mol = c->dh;
		if (c->tsrc == EQD_T_ANALOGUE)
			snprintf(o->dh_analogue, SPEC_SYMLEN, "%s", c->analogue);
		snprintf(o->dh_source, sizeof o->dh_source, "%s", c->dh_source);
		o->dpka_dt_per_K = NAN;
		snprintf(o->compilation, sizeof o->compilation, "%s", c->comp);
		snprintf(o->source, sizeof o->source, "%s", c->source);
		o->in_use = c->active;
	}
	return n;
}
