/*
 * speciation.c - acid-base and metal-ligand equilibria, titration, the
 * free-metal inverse and the CO2 system.  The model is stated in
 * speciation.h; this file holds the loader, the constants at temperature
 * and ionic strength, and the solver.
 *
 * Formulation: basis components are the free metals M, the fully
 * deprotonated ligands L and H+.  Every species s is
 *     c_s = beta_s(T, I) * prod_b c_b^nu_sb,
 * so with u_b = ln c_b the balances R_b(u) = sum_s nu_sb c_s - T_b = 0 are
 * the gradient of the convex function G(u) = sum_s c_s - sum_b T_b u_b.
 * Newton's method on u with a backtracking line search on G converges from
 * any start; the fallback minimises G one component at a time.  Components
 * may be fixed instead of balanced: H+ when the pH is given, the metal in
 * the free-metal inverse, and (basis changed to CO2(aq)) the carbonate
 * system when open to a gas.
 */
#include "speciation.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "activity.h"
#include "common.h"

#define MAXH         6
#define COMPLEN      32
#define SRCLEN       40
#define MAX_PICKS    8
#define NB_MAX       (SPEC_MAX_METALS + SPEC_MAX_LIGANDS + 1)
#define NS_MAX       160 /* reacting species in one problem */
#define NSTRONG_MAX  SPEC_MAX_IN
#define MAX_DATA_LIG 128 /* ligands in the tables */
#define LN10         2.302585092994046

/* solver limits */
#define NEWTON_MAXIT    200
#define NEWTON_STEP_MAX 12.0 /* largest change of any ln c in one step */
#define LS_MAXHALF      60
#define COORD_MAXSWEEP  20000
#define COORD_TOL       1e-7 /* fallback hands over to Newton at this closure */
#define ILOOP_MAXIT     200
#define I_RTOL          1e-11 /* ionic strength self-consistency */
#define X_RTOL          1e-12 /* titrant / metal source amount */
#define MAX_TITRANT_M   5.0   /* mol/L */
#define MAX_SOURCE_M    1.0   /* mol/L */
#define T_MIN_C         0.0
#define T_MAX_C         60.0
#define I_DAVIES_MAX_M  0.5

typedef struct pka_row {
	int lig, n_h;
	char comp[COMPLEN];
	int is_default;
	double pka, t_ref, i_ref, dh, dpdt, fa, fb, fc; /* NAN when absent */
	char source[SRCLEN];
} pka_row;

typedef struct lig_def {
	char name[SPEC_SYMLEN];
	int zb, binds;
	char state[MAXH + 1][SPEC_SYMLEN];
	int has_state[MAXH + 1];
	int nsteps;         /* modelled steps of the selected compilation */
	int step[MAXH + 1]; /* pka row of steps 1..nsteps */
	int carbonate;
} lig_def;

enum { CX_ML, CX_MHL, CX_M2L, CX_ML2 };
static const char *const cx_kind_name[] = {"ML", "MHL", "M2L", "ML2"};

typedef struct cx_row {
	char sym[SPEC_SYMLEN];
	int metal, lig, kind;
	char comp[COMPLEN];
	int is_default;
	double logk, t_ref, i_ref, dh;
	char source[SRCLEN];
	int nm, nl, nh, z;
	int ml_row; /* M2L, ML2: the ML row of the same compilation */
	int active;
} cx_row;

typedef struct metal_def {
	char sym[SPEC_SYMLEN];
	int z;
} metal_def;

typedef struct fit3 {
	double a, b, c, tmin, tmax;
	char source[SRCLEN];
} fit3;

struct spec_data {
	lig_def *lig;
	int nlig;
	pka_row *pka;
	int npka;
	metal_def met[SPEC_MAX_METALS];
	int nmet;
	cx_row *cx;
	int ncx;
	fit3 pkw, k0;
	char picks[MAX_PICKS][COMPLEN];
	int npicks;
};

/* ------------------------------------------------------------------ */
/* small helpers                                                        */

static double davies_F(double I_M)
{
	double r = sqrt(I_M > 0 ? I_M : 0);
	return r / (1.0 + r) - 0.3 * I_M;
}

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

static int find_lig(const spec_data *d, const char *name)
{
	for (int i = 0; i < d->nlig; i++)
		if (strcmp(d->lig[i].name, name) == 0)
			return i;
	return -1;
}

static int find_lig_ci(const spec_data *d, const char *name)
{
	int k = find_lig(d, name);
	for (int i = 0; k < 0 && i < d->nlig; i++)
		if (im_strcaseeq(d->lig[i].name, name))
			k = i;
	return k;
}

static int find_metal(const spec_data *d, const char *sym)
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
		return im_fail(err, "speciation: cannot read the equilibria tables: %s",
			       sqlite3_errmsg(db));
	return 0;
}

static int done(sqlite3 *db, sqlite3_stmt *st, int rc, char *err)
{
	sqlite3_finalize(st);
	if (rc != SQLITE_DONE)
		return im_fail(err, "speciation: reading the equilibria tables: %s",
			       sqlite3_errmsg(db));
	return 0;
}

/* The compilation used for a ligand's pKa set: the latest pick with rows
 * for it, else the default. */
static const char *lig_comp(const spec_data *d, int k)
{
	for (int p = d->npicks - 1; p >= 0; p--)
		for (int r = 0; r < d->npka; r++)
			if (d->pka[r].lig == k &&
			    strcmp(d->pka[r].comp, d->picks[p]) == 0)
				return d->picks[p];
	for (int r = 0; r < d->npka; r++)
		if (d->pka[r].lig == k && d->pka[r].is_default)
			return d->pka[r].comp;
	return NULL;
}

static const char *pair_comp(const spec_data *d, int m, int k)
{
	for (int p = d->npicks - 1; p >= 0; p--)
		for (int r = 0; r < d->ncx; r++)
			if (d->cx[r].metal == m && d->cx[r].lig == k &&
			    strcmp(d->cx[r].comp, d->picks[p]) == 0)
				return d->picks[p];
	for (int r = 0; r < d->ncx; r++)
		if (d->cx[r].metal == m && d->cx[r].lig == k && d->cx[r].is_default)
			return d->cx[r].comp;
	return NULL;
}

/* Apply the picks: steps of each ligand, active complexes.  -1 when a
 * selection is inconsistent (a gap in the steps, a complex needing a
 * protonation step that is not modelled). */
static int select_constants(spec_data *d, char *err)
{
	for (int k = 0; k < d->nlig; k++) {
		lig_def *L = &d->lig[k];
		const char *comp = lig_comp(d, k);
		L->nsteps = 0;
		for (int h = 0; h <= MAXH; h++)
			L->step[h] = -1;
		for (int r = 0; comp && r < d->npka; r++)
			if (d->pka[r].lig == k && strcmp(d->pka[r].comp, comp) == 0)
				L->step[d->pka[r].n_h] = r;
		while (L->nsteps < MAXH && L->step[L->nsteps + 1] >= 0)
			L->nsteps++;
		for (int h = L->nsteps + 1; h <= MAXH; h++)
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
		if (d->nlig == MAX_DATA_LIG) {
			sqlite3_finalize(st);
			return im_fail(err, "speciation: more than %d ligands",
				       MAX_DATA_LIG);
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
		int k = find_lig(d, col_text(st, 1)), h = sqlite3_column_int(st, 2);
		int z = sqlite3_column_int(st, 3);
		if (k < 0 || h < 0 || h > MAXH) {
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
		 "dh_kJ_mol, dpka_dt_per_K, fit_a_K, fit_b, fit_c_per_K, source FROM "
		 "eq_pka ORDER BY ligand, compilation, n_h",
		 &st, err))
		return -1;
	while ((rc = sqlite3_step(st)) == SQLITE_ROW) {
		if (d->npka == cap) {
			cap = cap ? 2 * cap : 64;
			d->pka = im_xrealloc(d->pka, (size_t)cap * sizeof *d->pka);
		}
		pka_row *p = &d->pka[d->npka];
		memset(p, 0, sizeof *p);
		p->lig = find_lig(d, col_text(st, 0));
		p->n_h = sqlite3_column_int(st, 1);
		if (p->lig < 0 || p->n_h < 1 || p->n_h > MAXH) {
			sqlite3_finalize(st);
			return im_fail(err, "speciation: eq_pka row of unknown "
				       "ligand or step");
		}
		snprintf(p->comp, COMPLEN, "%s", col_text(st, 2));
		p->is_default = sqlite3_column_int(st, 3);
		p->pka = sqlite3_column_double(st, 4);
		p->t_ref = sqlite3_column_double(st, 5);
		p->i_ref = sqlite3_column_double(st, 6);
		p->dh = col_real(st, 7);
		p->dpdt = col_real(st, 8);
		p->fa = col_real(st, 9);
		p->fb = col_real(st, 10);
		p->fc = col_real(st, 11);
		snprintf(p->source, SRCLEN, "%s", col_text(st, 12));
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
		 "t_ref_C, i_ref_M, dh_kJ_mol, source FROM eq_complexes ORDER BY metal, "
		 "ligand, compilation, kind",
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
		c->metal = find_metal(d, col_text(st, 1));
		c->lig = find_lig(d, col_text(st, 2));
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
		snprintf(c->comp, COMPLEN, "%s", col_text(st, 4));
		c->is_default = sqlite3_column_int(st, 5);
		c->logk = sqlite3_column_double(st, 6);
		c->t_ref = sqlite3_column_double(st, 7);
		c->i_ref = sqlite3_column_double(st, 8);
		c->dh = col_real(st, 9);
		snprintf(c->source, SRCLEN, "%s", col_text(st, 10));
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
		snprintf(f->source, SRCLEN, "%s", col_text(st, 6));
	}
	if (done(db, st, rc, err))
		return -1;
	if (have != 3)
		return im_fail(err, "speciation: eq_fits lacks %s",
			       (have & 1) ? "co2-pk0" : "pKw");
	return 0;
}

int spec_load(sqlite3 *db, spec_data **out, char *err)
{
	*out = NULL;
	if (!db)
		return im_fail(err, "speciation: no database");
	spec_data *d = im_xcalloc(1, sizeof *d);
	if (load_ligands(db, d, err) || load_pka(db, d, err) ||
	    load_metals_complexes(db, d, err) || load_fits(db, d, err) ||
	    select_constants(d, err)) {
		spec_data_free(d);
		return -1;
	}
	/* every compilation of every ligand must select cleanly */
	for (int r = 0; r < d->npka; r++) {
		char e2[IM_ERRLEN];
		snprintf(d->picks[0], COMPLEN, "%s", d->pka[r].comp);
		d->npicks = 1;
		if (select_constants(d, e2)) {
			im_fail(err, "%s", e2);
			spec_data_free(d);
			return -1;
		}
	}
	d->npicks = 0;
	select_constants(d, err);
	*out = d;
	return 0;
}

void spec_data_free(spec_data *d)
{
	if (!d)
		return;
	free(d->lig);
	free(d->pka);
	free(d->cx);
	free(d);
}

int spec_use_compilation(spec_data *d, const char *name, char *err)
{
	if (!d || !name || !*name)
		return im_fail(err, "no compilation named");
	if (im_strcaseeq(name, "default")) {
		d->npicks = 0;
		return select_constants(d, err);
	}
	const char *found = NULL;
	for (int r = 0; r < d->npka && !found; r++)
		if (im_strcaseeq(d->pka[r].comp, name))
			found = d->pka[r].comp;
	for (int r = 0; r < d->ncx && !found; r++)
		if (im_strcaseeq(d->cx[r].comp, name))
			found = d->cx[r].comp;
	if (!found)
		return im_fail(err,
			       "no equilibrium constants from a compilation named '%s'",
			       name);
	char keep[MAX_PICKS][COMPLEN];
	int n = 0;
	for (int p = 0; p < d->npicks; p++)
		if (strcmp(d->picks[p], found) != 0)
			snprintf(keep[n++], COMPLEN, "%s", d->picks[p]);
	if (n == MAX_PICKS)
		return im_fail(err, "too many compilations picked (at most %d)",
			       MAX_PICKS);
	snprintf(keep[n++], COMPLEN, "%s", found);
	char old[MAX_PICKS][COMPLEN];
	int nold = d->npicks;
	memcpy(old, d->picks, sizeof old);
	memcpy(d->picks, keep, sizeof keep);
	d->npicks = n;
	if (select_constants(d, err) == 0)
		return 0;
	/* an inconsistent combination: keep the selection as it was */
	memcpy(d->picks, old, sizeof old);
	d->npicks = nold;
	char e2[IM_ERRLEN];
	select_constants(d, e2);
	return -1;
}

/* ------------------------------------------------------------------ */
/* constants at temperature (I = 0)                                     */

/* thermodynamic pKa of a step at T, from its row */
static double pka_at(const spec_data *d, const pka_row *p, double t_C, int *no_t)
{
	double T = t_C + IM_ZERO_C_K, Tr = p->t_ref + IM_ZERO_C_K;
	if (isfinite(p->fa))
		return p->fa / T + p->fb + p->fc * T;
	const lig_def *L = &d->lig[p->lig];
	int za = L->zb + p->n_h - 1, zp = L->zb + p->n_h; /* H(n-1)L + H = HnL */
	double D = za * za + 1 - zp * zp;
	double pk0 = p->pka + act_dh_A(p->t_ref) * davies_F(p->i_ref) * D;
	if (isfinite(p->dh))
		return pk0 +
		       p->dh * 1000.0 / (IM_GAS_J_MOL_K * LN10) * (1.0 / T - 1.0 / Tr);
	if (isfinite(p->dpdt))
		return pk0 + p->dpdt * (t_C - p->t_ref);
	if (no_t && fabs(t_C - p->t_ref) > 0.5)
		*no_t = 1;
	return pk0;
}

/* log10 of the cumulative protonation constant beta_h of ligand k */
static double lig_logbeta0(const spec_data *d, int k, int h, double t_C, int *no_t)
{
	double s = 0;
	for (int i = 1; i <= h; i++)
		s += pka_at(d, &d->pka[d->lig[k].step[i]], t_C, no_t);
	return s;
}

/* log10 K of a complex row as tabulated, at I = 0 and t_C */
static double cx_logk0(const spec_data *d, const cx_row *c, double t_C, int *no_t)
{
	int zM = d->met[c->metal].z, zL = d->lig[c->lig].zb, zML = zM + zL;
	double D;
	switch (c->kind) {
	case CX_MHL:
		D = zM * zM + (zL + 1) * (zL + 1) - c->z * c->z;
		break;
	case CX_M2L:
		D = zML * zML + zM * zM - c->z * c->z;
		break;
	case CX_ML2:
		D = zML * zML + zL * zL - c->z * c->z;
		break;
	default:
		D = zM * zM + zL * zL - c->z * c->z;
	}
	double lk = c->logk + act_dh_A(c->t_ref) * davies_F(c->i_ref) * D;
	double T = t_C + IM_ZERO_C_K, Tr = c->t_ref + IM_ZERO_C_K;
	if (isfinite(c->dh))
		lk -= c->dh * 1000.0 / (IM_GAS_J_MOL_K * LN10) * (1.0 / T - 1.0 / Tr);
	else if (no_t && fabs(t_C - c->t_ref) > 0.5)
		*no_t = 1;
	return lk;
}

/* log10 beta of a complex over the basis (M, L, H) at I = 0 */
static double cx_logbeta0(const spec_data *d, const cx_row *c, double t_C, int *no_t)
{
	double lk = cx_logk0(d, c, t_C, no_t);
	if (c->kind == CX_MHL)
		lk += lig_logbeta0(d, c->lig, 1, t_C, no_t);
	if (c->ml_row >= 0)
		lk += cx_logk0(d, &d->cx[c->ml_row], t_C, no_t);
	return lk;
}

static double pkw_at(const spec_data *d, double t_C)
{
	double T = t_C + IM_ZERO_C_K;
	return d->pkw.a / T + d->pkw.b + d->pkw.c * T;
}

double spec_co2_mM_per_atm(const spec_data *d, double t_C)
{
	double T = t_C + IM_ZERO_C_K;
	double pk0 = d->k0.a / T + d->k0.b + d->k0.c * T; /* -log10 K0 */
	return pow(10.0, -pk0) * act_water_density_g_cm3(t_C) * 1000.0;
}

double spec_water_vapour_kPa(double t_C)
{
	/* Buck A.L. (1981) J Appl Meteorol 20:1527-1532, over water (from memory) */
	return 0.61121 * exp((18.678 - t_C / 234.5) * (t_C / (257.14 + t_C)));
}

double spec_pco2_atm(double frac, double p_total_atm, double t_C, int humid)
{
	double p = p_total_atm;
	if (humid)
		p -= spec_water_vapour_kPa(t_C) / 101.325;
	return frac * p;
}

/* ------------------------------------------------------------------ */
/* the problem                                                          */

enum { B_METAL, B_LIGAND, B_H };
enum { DEST_BASE, DEST_TIT, DEST_SRC, NDEST };

typedef struct strong {
	const char *sym;
	int z;
	double c[NDEST]; /* base: mol/L; titrant, source: per formula unit */
} strong;

typedef struct work {
	const spec_data *d;
	double t_C, A;
	int mode;
	double pH, co2_M;
	/* basis */
	int nb, hb, co2b;
	int btype[NB_MAX], bref[NB_MAX], bz[NB_MAX];
	int fixed[NB_MAX], active[NB_MAX];
	int fpos[NB_MAX]; /* index among the free components, or -1 */
	int warm;         /* 1: u holds a solution to start from */
	double T[NDEST][NB_MAX]; /* totals (mol/L): base; titrant, source per unit */
	double Tcur[NB_MAX];
	double u[NB_MAX];
	/* species */
	int ns;
	int skind[NS_MAX], sref[NS_MAX], sm[NS_MAX], sl[NS_MAX];
	int snz[NS_MAX], sb[NS_MAX][3], sn[NS_MAX][3];
	int sz[NS_MAX], snh[NS_MAX], snm[NS_MAX], snl[NS_MAX], ssub[NS_MAX];
	double lb0[NS_MAX], D[NS_MAX], lb[NS_MAX], c[NS_MAX];
	int sact[NS_MAX];
	/* strong ions */
	strong st[NSTRONG_MAX];
	int nst;
	/* unknowns of the outer loop */
	double x_tit, x_src, I; /* titrant, source: mol/L; I: mol/L */
	int fixed_metal;        /* basis index, or -1 */
	/* bookkeeping */
	int newton_it, used_fallback, fallback_only, no_t_lig[MAX_DATA_LIG];
	double rmax;
	char err[IM_ERRLEN];
} work;

static int lig_basis(work *w, int k)
{
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_LIGAND && w->bref[b] == k)
			return b;
	return -1;
}

static int metal_basis(work *w, int m)
{
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_METAL && w->bref[b] == m)
			return b;
	return -1;
}

static int add_basis(work *w, int type, int ref, char *err)
{
	int b = type == B_LIGAND ? lig_basis(w, ref) : metal_basis(w, ref);
	if (b >= 0)
		return b;
	if (w->nb == NB_MAX)
		return im_fail(err,
			       "speciation: too many metals and ligands in one solution");
	int nlig = 0, nmet = 0;
	for (int i = 0; i < w->nb; i++)
		nlig += w->btype[i] == B_LIGAND, nmet += w->btype[i] == B_METAL;
	if ((type == B_LIGAND && nlig == SPEC_MAX_LIGANDS) ||
	    (type == B_METAL && nmet == SPEC_MAX_METALS))
		return im_fail(err, "speciation: too many %s in one solution",
			       type == B_LIGAND ? "ligands" : "metals");
	b = w->nb++;
	w->btype[b] = type;
	w->bref[b] = ref;
	w->bz[b] = type == B_LIGAND ? w->d->lig[ref].zb : w->d->met[ref].z;
	w->fixed[b] = 0;
	for (int k = 0; k < NDEST; k++)
		w->T[k][b] = 0;
	return b;
}

static void work_init(work *w, const spec_data *d, double t_C)
{
	memset(w, 0, sizeof *w);
	w->d = d;
	w->t_C = t_C;
	w->A = act_dh_A(t_C);
	w->nb = 1;
	w->hb = 0;
	w->btype[0] = B_H;
	w->bz[0] = 1;
	w->bref[0] = -1;
	w->co2b = -1;
	w->fixed_metal = -1;
}

/* Map one input species into the problem (dest: base, titrant, source). */
static int add_input(work *w, const spec_in *in, int dest, char *err)
{
	const spec_data *d = w->d;
	const char *s = in->symbol;
	/* solution totals in mol/L; titrant and source as counts per unit */
	double c = dest == DEST_BASE ? in->mM / 1000.0 : in->mM;
	if (!s || !*s)
		return im_fail(err, "speciation: a species without a symbol");
	if (!isfinite(in->mM) || in->mM < 0)
		return im_fail(err,
			       "speciation: %s: amount %g is not a finite number >= 0", s,
			       in->mM);
	if (strcmp(s, "H+") == 0 || strcmp(s, "OH-") == 0) {
		int zz = s[0] == 'H' ? 1 : -1;
		if (in->z != zz)
			return im_fail(err, "speciation: %s given with charge %d", s,
				       in->z);
		w->T[dest][w->hb] += zz * c;
		return 0;
	}
	for (int k = 0; k < d->nlig; k++)
		for (int h = 0; h <= MAXH; h++)
			if (d->lig[k].has_state[h] &&
			    strcmp(d->lig[k].state[h], s) == 0) {
				if (in->z != d->lig[k].zb + h)
					return im_fail(err,
						       "speciation: %s given with charge "
						       "%d, the equilibria tables say %d",
						       s, in->z, d->lig[k].zb + h);
				int b = add_basis(w, B_LIGAND, k, err);
				if (b < 0)
					return -1;
				w->T[dest][b] += c;
				w->T[dest][w->hb] += h * c;
				return 0;
			}
	int m = -1;
	for (int i = 0; i < d->nmet; i++)
		if (strcmp(d->met[i].sym, s) == 0)
			m = i;
	if (m >= 0) {
		if (in->z != d->met[m].z)
			return im_fail(err, "speciation: %s given with charge %d", s,
				       in->z);
		int b = add_basis(w, B_METAL, m, err);
		if (b < 0)
			return -1;
		w->T[dest][b] += c;
		return 0;
	}
	for (int r = 0; r < d->ncx; r++)
		if (strcmp(d->cx[r].sym, s) == 0) {
			const cx_row *x = &d->cx[r];
			if (in->z != x->z)
				return im_fail(err,
					       "speciation: %s given with charge %d, the "
					       "equilibria tables say %d",
					       s, in->z, x->z);
			int bm = add_basis(w, B_METAL, x->metal, err);
			int bl = bm < 0 ? -1 : add_basis(w, B_LIGAND, x->lig, err);
			if (bl < 0)
				return -1;
			w->T[dest][bm] += x->nm * c;
			w->T[dest][bl] += x->nl * c;
			w->T[dest][w->hb] += x->nh * c;
			return 0;
		}
	/* a strong ion or neutral solute */
	for (int i = 0; i < w->nst; i++)
		if (strcmp(w->st[i].sym, s) == 0) {
			if (w->st[i].z != in->z)
				return im_fail(err,
					       "speciation: %s given with two charges",
					       s);
			w->st[i].c[dest] += c;
			return 0;
		}
	if (w->nst == NSTRONG_MAX)
		return im_fail(err, "speciation: more than %d species", NSTRONG_MAX);
	if (in->z < -6 || in->z > 6)
		return im_fail(err, "speciation: %s: charge %d out of range", s, in->z);
	strong *t = &w->st[w->nst++];
	memset(t, 0, sizeof *t);
	t->sym = s;
	t->z = in->z;
	t->c[dest] = c;
	return 0;
}

static int add_species(work *w, int kind, int ref, int bm, int nm, int bl, int nl, int nh,
		       int z, double lb0, char *err)
{
	if (w->ns == NS_MAX)
		return im_fail(err, "speciation: too many species in one solution");
	int s = w->ns++;
	w->skind[s] = kind;
	w->sref[s] = ref;
	w->sm[s] = bm;
	w->sl[s] = bl;
	w->snm[s] = nm;
	w->snl[s] = nl;
	w->snh[s] = nh;
	w->sz[s] = z;
	w->lb0[s] = lb0 * LN10;
	w->ssub[s] = -1;
	int k = 0;
	double D = -(double)z * z;
	if (bm >= 0 && nm) {
		w->sb[s][k] = bm, w->sn[s][k++] = nm;
		D += nm * w->bz[bm] * w->bz[bm];
	}
	if (bl >= 0 && nl) {
		w->sb[s][k] = bl, w->sn[s][k++] = nl;
		D += nl * w->bz[bl] * w->bz[bl];
	}
	if (nh) {
		w->sb[s][k] = w->hb, w->sn[s][k++] = nh;
		D += nh; /* z(H+)^2 = 1 */
	}
	w->snz[s] = k;
	w->D[s] = D;
	return 0;
}

/* Build the species once the basis is known. */
static int build_species(work *w, char *err)
{
	const spec_data *d = w->d;
	double t = w->t_C;
	w->ns = 0;
	if (add_species(w, SPEC_K_PROTON, -1, -1, 0, -1, 0, 1, 1, 0.0, err) ||
	    add_species(w, SPEC_K_HYDROXIDE, -1, -1, 0, -1, 0, -1, -1, -pkw_at(d, t),
			err))
		return -1;
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_METAL &&
		    add_species(w, SPEC_K_METAL, w->bref[b], b, 1, -1, 0, 0, w->bz[b],
				0.0, err))
			return -1;
	for (int b = 0; b < w->nb; b++) {
		if (w->btype[b] != B_LIGAND)
			continue;
		int k = w->bref[b], no_t = 0, first = w->ns;
		const lig_def *L = &d->lig[k];
		for (int h = 0; h <= L->nsteps; h++)
			if (add_species(w, SPEC_K_LIGAND, h, -1, 0, b, 1, h, L->zb + h,
					lig_logbeta0(d, k, h, t, &no_t), err))
				return -1;
		if (b == w->co2b) {
			int s2 = first + 2; /* H2L = CO2(aq) */
			for (int s = first; s < w->ns; s++) {
				w->ssub[s] = s2;
				/* protons relative to CO2: h - 2 */
				for (int j = 0; j < w->snz[s]; j++)
					if (w->sb[s][j] == w->hb)
						w->sn[s][j] -= 2;
				if (w->snh[s] == 0) { /* add an H entry of -2 */
					w->sb[s][w->snz[s]] = w->hb;
					w->sn[s][w->snz[s]++] = -2;
				}
				/* drop zero entries */
				int k2 = 0;
				for (int j = 0; j < w->snz[s]; j++)
					if (w->sn[s][j] != 0) {
						w->sb[s][k2] = w->sb[s][j];
						w->sn[s][k2++] = w->sn[s][j];
					}
				w->snz[s] = k2;
			}
		}
		w->no_t_lig[k] |= no_t;
	}
	for (int r = 0; r < d->ncx; r++) {
		const cx_row *c = &d->cx[r];
		if (!c->active)
			continue;
		int bm = metal_basis(w, c->metal), bl = lig_basis(w, c->lig), no_t = 0;
		if (bm < 0 || bl < 0)
			continue;
		if (add_species(w, SPEC_K_COMPLEX, r, bm, c->nm, bl, c->nl, c->nh, c->z,
				cx_logbeta0(d, c, t, &no_t), err))
			return -1;
		w->no_t_lig[c->lig] |= no_t;
	}
	return 0;
}

/* Conditional constants at ionic strength I (mol/L), and the fixed u. */
static void set_conditions(work *w, double I)
{
	double aF = LN10 * w->A * davies_F(I);
	w->I = I;
	for (int s = 0; s < w->ns; s++)
		w->lb[s] = w->lb0[s] - aF * w->D[s];
	for (int s = 0; s < w->ns; s++)
		if (w->ssub[s] >= 0)
			w->lb[s] -= w->lb0[w->ssub[s]] - aF * w->D[w->ssub[s]];
	if (w->mode == SPEC_PH_FIXED)
		w->u[w->hb] = -w->pH * LN10 + aF; /* ln [H] = ln a_H - ln gamma_H */
}

static void set_totals(work *w)
{
	for (int b = 0; b < w->nb; b++)
		w->Tcur[b] = w->T[DEST_BASE][b] + w->x_tit * w->T[DEST_TIT][b] +
			     w->x_src * w->T[DEST_SRC][b];
	if (w->co2b >= 0) /* proton balance relative to CO2(aq) */
		w->Tcur[w->hb] -= 2.0 * w->Tcur[w->co2b];
	for (int b = 0; b < w->nb; b++)
		w->active[b] = w->fixed[b] || b == w->hb || w->Tcur[b] > 0;
	for (int s = 0; s < w->ns; s++) {
		int a = 1;
		for (int j = 0; j < w->snz[s]; j++)
			a &= w->active[w->sb[s][j]];
		w->sact[s] = a;
	}
}

static inline double species_ln(const work *w, int s, const double *u)
{
	double x = w->lb[s];
	for (int j = 0; j < w->snz[s]; j++)
		x += w->sn[s][j] * u[w->sb[s][j]];
	return x;
}

static void concentrations(work *w, const double *u, double *c)
{
	for (int s = 0; s < w->ns; s++) {
		if (!w->sact[s]) {
			c[s] = 0;
			continue;
		}
		double x = species_ln(w, s, u);
		c[s] = exp(x > 700 ? 700 : x);
	}
}

/* scaled residuals of the balanced components; returns the worst |R|/S */
static double residuals(const work *w, const double *c, const int *fb, int nf, double *R,
			double *S)
{
	double worst = 0;
	for (int i = 0; i < nf; i++)
		R[i] = -w->Tcur[fb[i]], S[i] = fabs(w->Tcur[fb[i]]);
	for (int s = 0; s < w->ns; s++) {
		if (!w->sact[s])
			continue;
		for (int j = 0; j < w->snz[s]; j++) {
			int i = w->fpos[w->sb[s][j]];
			if (i >= 0) {
				R[i] += w->sn[s][j] * c[s];
				S[i] += fabs((double)w->sn[s][j]) * c[s];
			}
		}
	}
	for (int i = 0; i < nf; i++) {
		double e = S[i] > 0 ? fabs(R[i]) / S[i] : 0;
		if (!(e <= worst))
			worst = isfinite(e) ? e : INFINITY;
	}
	return worst;
}

static double potential(const work *w, const double *u, const int *fb, int nf)
{
	double g = 0;
	for (int s = 0; s < w->ns; s++)
		if (w->sact[s]) {
			double x = species_ln(w, s, u);
			g += exp(x > 700 ? 700 : x);
		}
	for (int i = 0; i < nf; i++)
		g -= w->Tcur[fb[i]] * u[fb[i]];
	return g;
}

static int free_components(work *w, int *fb)
{
	int nf = 0;
	for (int b = 0; b < w->nb; b++) {
		w->fpos[b] = -1;
		if (w->active[b] && !w->fixed[b]) {
			w->fpos[b] = nf;
			fb[nf++] = b;
		}
	}
	return nf;
}

/* Solve J d = -R for symmetric positive definite J (n x n, row-major),
 * after Jacobi scaling.  Returns -1 when J is not positive definite. */
static int spd_solve(double *J, const double *R, double *dx, int n)
{
	double sc[NB_MAX], y[NB_MAX];
	for (int i = 0; i < n; i++) {
		if (!(J[i * n + i] > 0))
			return -1;
		sc[i] = 1.0 / sqrt(J[i * n + i]);
	}
	for (int i = 0; i < n; i++)
		for (int j = 0; j < n; j++)
			J[i * n + j] *= sc[i] * sc[j];
	for (int i = 0; i < n; i++)
		J[i * n + i] *= 1.0 + 1e-13;
	for (int j = 0; j < n; j++) { /* Cholesky, lower */
		double s = J[j * n + j];
		for (int k = 0; k < j; k++)
			s -= J[j * n + k] * J[j * n + k];
		if (!(s > 0))
			return -1;
		double l = sqrt(s);
		J[j * n + j] = l;
		for (int i = j + 1; i < n; i++) {
			double t = J[i * n + j];
			for (int k = 0; k < j; k++)
				t -= J[i * n + k] * J[j * n + k];
			J[i * n + j] = t / l;
		}
	}
	for (int i = 0; i < n; i++) {
		double t = -R[i] * sc[i];
		for (int k = 0; k < i; k++)
			t -= J[i * n + k] * y[k];
		y[i] = t / J[i * n + i];
	}
	for (int i = n - 1; i >= 0; i--) {
		double t = y[i];
		for (int k = i + 1; k < n; k++)
			t -= J[k * n + i] * dx[k];
		dx[i] = t / J[i * n + i];
	}
	for (int i = 0; i < n; i++)
		dx[i] *= sc[i];
	return 0;
}

/* Damped Newton.  0: converged to SPEC_TOL; -1: gave up (use fallback). */
static int newton(work *w, double tol)
{
	int fb[NB_MAX] = {0}, nf = free_components(w, fb);
	double R[NB_MAX], S[NB_MAX], J[NB_MAX * NB_MAX], dx[NB_MAX], ut[NB_MAX];
	concentrations(w, w->u, w->c);
	w->rmax = residuals(w, w->c, fb, nf, R, S);
	if (nf == 0) {
		w->rmax = 0;
		return 0;
	}
	for (int it = 0; it < NEWTON_MAXIT; it++) {
		if (w->rmax <= tol)
			return 0;
		w->newton_it++;
		memset(J, 0, (size_t)nf * nf * sizeof *J);
		for (int s = 0; s < w->ns; s++) {
			if (!w->sact[s])
				continue;
			int ii[3], nn[3], k = 0;
			for (int j = 0; j < w->snz[s]; j++) {
				int i = w->fpos[w->sb[s][j]];
				if (i >= 0)
					ii[k] = i, nn[k++] = w->sn[s][j];
			}
			for (int a = 0; a < k; a++)
				for (int b = 0; b < k; b++)
					J[ii[a] * nf + ii[b]] +=
						(double)nn[a] * nn[b] * w->c[s];
		}
		if (spd_solve(J, R, dx, nf))
			return -1;
		double big = 0, slope = 0;
		for (int i = 0; i < nf; i++) {
			big = fmax(big, fabs(dx[i]));
			slope += R[i] * dx[i];
		}
		if (!isfinite(big))
			return -1;
		double lim = big > NEWTON_STEP_MAX ? NEWTON_STEP_MAX / big : 1.0;
		double g0 = potential(w, w->u, fb, nf), t = lim;
		int ok = 0;
		memcpy(ut, w->u, sizeof ut);
		for (int h = 0; h < LS_MAXHALF && !ok; h++, t *= 0.5) {
			for (int i = 0; i < nf; i++)
				ut[fb[i]] = w->u[fb[i]] + t * dx[i];
			double g1 = potential(w, ut, fb, nf);
			if (g1 <= g0 + 1e-4 * t * slope) {
				ok = 1;
			} else if (h == 0) {
				/* near the solution G cannot resolve the decrease: judge
				 * the full step by the balances instead */
				double Rt[NB_MAX], St[NB_MAX], ct[NS_MAX];
				concentrations(w, ut, ct);
				if (residuals(w, ct, fb, nf, Rt, St) < 0.5 * w->rmax)
					ok = 1;
			}
			if (ok)
				break;
		}
		if (!ok)
			return -1;
		memcpy(w->u, ut, sizeof ut);
		concentrations(w, w->u, w->c);
		w->rmax = residuals(w, w->c, fb, nf, R, S);
	}
	return w->rmax <= tol ? 0 : -1;
}

/* Fallback: minimise G along one component at a time (each balance is
 * increasing in its own ln c), sweeping until the closure reaches tol. */
static int coordinate(work *w, double tol)
{
	int fb[NB_MAX] = {0}, nf = free_components(w, fb);
	double R[NB_MAX], S[NB_MAX];
	w->used_fallback = 1;
	for (int sweep = 0; sweep < COORD_MAXSWEEP; sweep++) {
		for (int i = 0; i < nf; i++) {
			int b = fb[i];
			double Tb = w->Tcur[b];
			double lo = NAN, hi = NAN, v = w->u[b];
			for (int it = 0; it < 400; it++) {
				double f = -Tb, fp = 0, sc = fabs(Tb);
				for (int s = 0; s < w->ns; s++) {
					if (!w->sact[s])
						continue;
					for (int j = 0; j < w->snz[s]; j++)
						if (w->sb[s][j] == b) {
							double x = species_ln(w, s, w->u);
							double cs =
								exp(x > 700 ? 700 : x);
							f += w->sn[s][j] * cs;
							fp += (double)w->sn[s][j] *
							      w->sn[s][j] * cs;
							sc += fabs((double)w->sn[s][j]) *
							      cs;
						}
				}
				if (fabs(f) <= 1e-14 * sc)
					break;
				if (f < 0)
					lo = v;
				else
					hi = v;
				double nv = fp > 0 ? v - f / fp : NAN;
				if (f < 0 && !(nv > v))
					nv = v + 2.0;
				if (f > 0 && !(nv < v))
					nv = v - 2.0;
				if (nv - v > 20)
					nv = v + 20;
				if (nv - v < -20)
					nv = v - 20;
				if (isfinite(lo) && isfinite(hi) && !(nv > lo && nv < hi))
					nv = 0.5 * (lo + hi);
				v = w->u[b] = nv;
				if (isfinite(lo) && isfinite(hi) && hi - lo < 1e-15)
					break;
			}
		}
		concentrations(w, w->u, w->c);
		w->rmax = residuals(w, w->c, fb, nf, R, S);
		if (w->rmax <= tol)
			return 0;
	}
	return -1;
}

static int equilibrate(work *w)
{
	if (w->fallback_only)
		return coordinate(w, SPEC_TOL);
	if (newton(w, SPEC_TOL) == 0)
		return 0;
	if (coordinate(w, COORD_TOL) == 0 && newton(w, SPEC_TOL) == 0)
		return 0;
	/* Newton could not polish: finish with the fallback alone */
	if (coordinate(w, SPEC_TOL) == 0)
		return 0;
	return -1;
}

/* starting values of the balanced components */
static void initial_guess(work *w)
{
	if (!w->fixed[w->hb])
		w->u[w->hb] = -7.0 * LN10;
	for (int b = 0; b < w->nb; b++) {
		if (w->fixed[b] || b == w->hb)
			continue;
		double Tb = w->Tcur[b] > 0 ? w->Tcur[b] : 1e-12;
		if (w->btype[b] == B_METAL) {
			w->u[b] = log(Tb);
			continue;
		}
		double den = 0;
		for (int s = 0; s < w->ns; s++)
			if (w->skind[s] == SPEC_K_LIGAND && w->sl[s] == b)
				den += exp(fmin(700, w->lb[s] + w->snh[s] * w->u[w->hb]));
		w->u[b] = log(Tb) - log(den > 0 && isfinite(den) ? den : 1.0);
	}
}

static double ionic_strength(const work *w)
{
	double s = 0;
	for (int i = 0; i < w->ns; i++)
		if (w->sact[i])
			s += (double)w->sz[i] * w->sz[i] * w->c[i];
	for (int i = 0; i < w->nst; i++) {
		double c = w->st[i].c[DEST_BASE] + w->x_tit * w->st[i].c[DEST_TIT] +
			   w->x_src * w->st[i].c[DEST_SRC];
		s += (double)w->st[i].z * w->st[i].z * c;
	}
	return 0.5 * s;
}

/* protons bound (needed) minus protons given, mol/L (FIXED mode) */
static double proton_excess(const work *w)
{
	double need = 0;
	for (int s = 0; s < w->ns; s++)
		if (w->sact[s])
			for (int j = 0; j < w->snz[s]; j++)
				if (w->sb[s][j] == w->hb)
					need += w->sn[s][j] * w->c[s];
	return need - w->Tcur[w->hb];
}

/* mean protons bound per free ligand b (all states, metals ignored) */
static double mean_h(const work *w, int b)
{
	double num = 0, den = 0;
	for (int s = 0; s < w->ns; s++)
		if (w->skind[s] == SPEC_K_LIGAND && w->sl[s] == b) {
			double x = w->lb[s] + w->snh[s] * w->u[w->hb];
			double e = exp(x > 700 ? 700 : x);
			num += w->snh[s] * e;
			den += e;
		}
	return den > 0 ? num / den : 0;
}

enum { RUN_PLAIN, RUN_TITRATE, RUN_SOURCE };

/* The outer loop: ionic strength (and the titrant or source amount) to
 * self-consistency, the equilibria solved at each step. */
static int run(work *w, int what, char *err)
{
	double I = w->I;
	for (int it = 0; it < ILOOP_MAXIT; it++) {
		set_totals(w);
		set_conditions(w, I);
		if (!w->warm) {   /* later runs on the same work start from the last */
			initial_guess(w);
			w->warm = 1;
		}
		if (equilibrate(w))
			return im_fail(err, "speciation did not converge (closure %.2g)",
				       w->rmax);
		int x_done = 1;
		if (what == RUN_TITRATE) {
			double g = proton_excess(w), q = -w->T[DEST_TIT][w->hb];
			for (int b = 0; b < w->nb; b++)
				if (w->btype[b] == B_LIGAND && w->T[DEST_TIT][b] > 0)
					q += w->T[DEST_TIT][b] * mean_h(w, b);
			double scale = fabs(w->Tcur[w->hb]) + fabs(w->x_tit) + 1e-12;
			if (!(fabs(q) > 0))
				return im_fail(err,
					       "titrant neither takes up nor gives off "
					       "protons");
			double nx = w->x_tit - g / q;
			x_done = fabs(g) <= X_RTOL * scale;
			if (!x_done)
				w->x_tit = nx < 0 ? 0.5 * w->x_tit : nx;
			if (w->x_tit > 2 * MAX_TITRANT_M)
				return im_fail(err, "titrant amount runs past %g mol/L",
					       MAX_TITRANT_M);
		} else if (what == RUN_SOURCE) {
			int b = w->fixed_metal;
			double need = 0;
			for (int s = 0; s < w->ns; s++)
				if (w->sact[s] && w->sm[s] == b)
					need += w->snm[s] * w->c[s];
			double nx = (need - w->T[DEST_BASE][b]) / w->T[DEST_SRC][b];
			x_done = fabs(nx - w->x_src) <=
				 X_RTOL * (fabs(nx) + need / w->T[DEST_SRC][b]);
			w->x_src = nx;
			if (w->x_src > 2 * MAX_SOURCE_M)
				return im_fail(err,
					       "metal source amount runs past %g mol/L",
					       MAX_SOURCE_M);
		}
		double In = ionic_strength(w);
		int i_done = fabs(In - I) <= 1e-15 + I_RTOL * I;
		if (i_done && x_done)
			return 0;
		I = it < 40 ? In : 0.5 * (I + In);
	}
	return im_fail(err, "ionic strength iteration did not converge");
}

/* ------------------------------------------------------------------ */
/* results                                                              */

static void warnf(spec_result *r, const char *fmt, ...)
	__attribute__((format(printf, 2, 3)));
static void warnf(spec_result *r, const char *fmt, ...)
{
	char buf[SPEC_WARNLEN];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(buf, sizeof buf, fmt, ap);
	va_end(ap);
	for (int i = 0; i < r->nwarn; i++)
		if (strcmp(r->warnings[i], buf) == 0)
			return;
	if (r->nwarn < SPEC_MAX_WARN)
		snprintf(r->warnings[r->nwarn++], SPEC_WARNLEN, "%s", buf);
}

static int fill_result(work *w, const spec_cond *cond, spec_result *r, char *err)
{
	const spec_data *d = w->d;
	double aF = w->A * davies_F(w->I); /* -log10 gamma for z = 1 */
	int bsum[NB_MAX];
	memset(r, 0, sizeof *r);
	r->t_C = w->t_C;
	for (int b = 0; b < w->nb; b++) {
		bsum[b] = -1;
		if (w->btype[b] == B_METAL && w->active[b]) {
			bsum[b] = r->nmetals;
			snprintf(r->metals[r->nmetals++].symbol, SPEC_SYMLEN, "%s",
				 d->met[w->bref[b]].sym);
		} else if (w->btype[b] == B_LIGAND && w->active[b]) {
			bsum[b] = r->nligands;
			snprintf(r->ligands[r->nligands++].name, SPEC_SYMLEN, "%s",
				 d->lig[w->bref[b]].name);
		}
	}
	double hsum[NB_MAX] = {0};
	for (int s = 0; s < w->ns; s++) {
		if (!w->sact[s] || !(w->c[s] > 0))
			continue;
		if (r->n == SPEC_MAX_OUT)
			return im_fail(err, "speciation: more than %d species",
				       SPEC_MAX_OUT);
		spec_out *o = &r->sp[r->n++];
		double mM = w->c[s] * 1000.0;
		switch (w->skind[s]) {
		case SPEC_K_PROTON:
			snprintf(o->symbol, SPEC_SYMLEN, "H+");
			break;
		case SPEC_K_HYDROXIDE:
			snprintf(o->symbol, SPEC_SYMLEN, "OH-");
			break;
		case SPEC_K_METAL:
			snprintf(o->symbol, SPEC_SYMLEN, "%s",
				 d->met[w->bref[w->sm[s]]].sym);
			break;
		case SPEC_K_LIGAND:
			snprintf(o->symbol, SPEC_SYMLEN, "%s",
				 d->lig[w->bref[w->sl[s]]].state[w->sref[s]]);
			break;
		default:
			snprintf(o->symbol, SPEC_SYMLEN, "%s", d->cx[w->sref[s]].sym);
		}
		o->z = w->sz[s];
		o->mM = mM;
		o->gamma = pow(10.0, -aF * o->z * o->z);
		o->kind = (spec_kind)w->skind[s];
		o->metal = w->sm[s] >= 0 ? bsum[w->sm[s]] : -1;
		o->ligand = w->sl[s] >= 0 ? bsum[w->sl[s]] : -1;
		o->n_m = w->snm[s];
		o->n_l = w->snl[s];
		o->n_h = w->snh[s];
		if (o->metal >= 0) {
			spec_metal_sum *m = &r->metals[o->metal];
			m->total_mM += o->n_m * mM;
			if (o->kind == SPEC_K_METAL) {
				m->free_mM = mM;
				m->free_act_mM = mM * o->gamma;
			} else {
				m->bound_mM += o->n_m * mM;
			}
		}
		if (o->ligand >= 0) {
			spec_ligand_sum *l = &r->ligands[o->ligand];
			l->total_mM += o->n_l * mM;
			if (o->kind == SPEC_K_LIGAND)
				l->unbound_mM += mM;
			else
				l->bound_mM += o->n_l * mM;
			hsum[o->ligand] += o->n_h * mM;
		}
		if (o->kind == SPEC_K_PROTON)
			r->H_mM = mM;
		if (o->kind == SPEC_K_HYDROXIDE)
			r->OH_mM = mM;
		if (o->kind == SPEC_K_LIGAND && d->lig[w->bref[w->sl[s]]].carbonate &&
		    w->sref[s] == 2)
			r->co2_mM = mM;
	}
	for (int i = 0; i < r->nligands; i++)
		r->ligands[i].h_bound =
			r->ligands[i].total_mM > 0 ? hsum[i] / r->ligands[i].total_mM : 0;
	for (int i = 0; i < w->nst; i++) {
		double c = w->st[i].c[DEST_BASE] + w->x_tit * w->st[i].c[DEST_TIT] +
			   w->x_src * w->st[i].c[DEST_SRC];
		if (!(c > 0))
			continue;
		if (r->n == SPEC_MAX_OUT)
			return im_fail(err, "speciation: more than %d species",
				       SPEC_MAX_OUT);
		spec_out *o = &r->sp[r->n++];
		snprintf(o->symbol, SPEC_SYMLEN, "%s", w->st[i].sym);
		o->z = w->st[i].z;
		o->mM = c * 1000.0;
		o->gamma = pow(10.0, -aF * o->z * o->z);
		o->kind = SPEC_K_STRONG;
		o->metal = o->ligand = -1;
	}
	r->pH = -(log(r->H_mM / 1000.0) / LN10 - aF);
	if (w->mode == SPEC_PH_FIXED)
		r->pH = w->pH;
	r->ionic_strength_mM = w->I * 1000.0;
	for (int i = 0; i < r->n; i++)
		r->net_charge_mEq_L += r->sp[i].z * r->sp[i].mM;
	if (w->mode == SPEC_PH_FIXED)
		r->excess_H_mM = proton_excess(w) * 1000.0;
	r->newton_iterations = w->newton_it;
	r->used_fallback = w->used_fallback;
	r->max_rel_residual = w->rmax;
	/* warnings, one line each: ligands without temperature data, and
	 * metal-binding ligands without a constant for a metal present */
	char list[SPEC_WARNLEN];
	size_t len = 0;
	list[0] = '\0';
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_LIGAND && w->active[b] && w->no_t_lig[w->bref[b]] &&
		    len < sizeof list)
			len += snprintf(list + len, sizeof list - len, "%s%s",
					len ? ", " : "", d->lig[w->bref[b]].name);
	if (len)
		warnf(r,
		      "no temperature dependence entered for %s: constants used "
		      "unchanged at %.1f C",
		      list, w->t_C);
	len = 0;
	list[0] = '\0';
	for (int bl = 0; bl < w->nb; bl++) {
		if (w->btype[bl] != B_LIGAND || !w->active[bl] ||
		    !d->lig[w->bref[bl]].binds)
			continue;
		for (int bm = 0; bm < w->nb; bm++) {
			if (w->btype[bm] != B_METAL || !w->active[bm])
				continue;
			int any = 0;
			for (int c = 0; c < d->ncx; c++)
				any |= d->cx[c].active && d->cx[c].metal == w->bref[bm] &&
				       d->cx[c].lig == w->bref[bl];
			if (!any && len < sizeof list)
				len += snprintf(list + len, sizeof list - len, "%s%s-%s",
						len ? ", " : "", d->lig[w->bref[bl]].name,
						d->met[w->bref[bm]].sym);
		}
	}
	if (len)
		warnf(r,
		      "no stability constant entered for %s: taken as not binding, so "
		      "the free metal is an upper bound",
		      list);
	if (w->I > I_DAVIES_MAX_M)
		warnf(r,
		      "ionic strength %.0f mM: Davies activity coefficients are "
		      "unreliable above %.0f mM",
		      w->I * 1000.0, I_DAVIES_MAX_M * 1000.0);
	if (w->used_fallback)
		warnf(r, "the fallback solver was needed");
	if (cond && cond->osm) {
		osm_species os[SPEC_MAX_OUT];
		for (int i = 0; i < r->n; i++)
			os[i] = (osm_species){r->sp[i].symbol, r->sp[i].z, r->sp[i].mM};
		osm_result orr;
		if (osm_molar(cond->osm, os, r->n, w->t_C, &orr, err))
			return -1;
		r->osmolality_mOsm_kg = orr.osmolality_mOsm_kg;
		r->osmotic_coeff = orr.phi;
		r->osmolarity_mOsm_L = orr.osmolarity_ideal_mOsm_L;
		r->osm_fallback_frac = orr.fallback_frac;
	}
	return 0;
}

/* ------------------------------------------------------------------ */
/* public solvers                                                       */

static int check_cond(const spec_data *d, const spec_cond *c, int n, char *err)
{
	if (!d)
		return im_fail(err, "speciation: no equilibrium data loaded");
	if (!c)
		return im_fail(err, "speciation: no conditions given");
	if (n < 0 || n > SPEC_MAX_IN)
		return im_fail(err, "speciation: %d species (at most %d)", n,
			       SPEC_MAX_IN);
	if (!isfinite(c->t_C) || c->t_C < T_MIN_C || c->t_C > T_MAX_C)
		return im_fail(err, "temperature %g C outside %g-%g C", c->t_C, T_MIN_C,
			       T_MAX_C);
	if (c->mode == SPEC_PH_FIXED) {
		if (!isfinite(c->pH) || c->pH < 1 || c->pH > 13)
			return im_fail(err, "pH %g outside 1-13", c->pH);
	} else if (c->mode == SPEC_PH_CO2) {
		if (!isfinite(c->pco2_atm) || c->pco2_atm <= 0 || c->pco2_atm > 10)
			return im_fail(err,
				       "CO2 partial pressure %g atm must be above 0 and "
				       "at most 10",
				       c->pco2_atm);
		if (c->t_C < d->k0.tmin || c->t_C > d->k0.tmax)
			return im_fail(err, "CO2 solubility known for %g-%g C only",
				       d->k0.tmin, d->k0.tmax);
	} else if (c->mode != SPEC_PH_CLOSED) {
		return im_fail(err, "speciation: unknown pH mode");
	}
	return 0;
}

/* Build the work for inputs (+ titrant, + source); mode from cond. */
static int setup(work *w, const spec_data *d, const spec_in *in, int n,
		 const spec_cond *c, const spec_in *tit, int nt, const spec_in *src,
		 int ns, char *err)
{
	work_init(w, d, c->t_C);
	w->mode = c->mode;
	w->pH = c->pH;
	w->fallback_only = c->fallback_only;
	if (c->mode == SPEC_PH_FIXED)
		w->fixed[w->hb] = 1;
	if (n > 0 && !in)
		return im_fail(err, "speciation: no species given");
	for (int i = 0; i < n; i++)
		if (add_input(w, &in[i], DEST_BASE, err))
			return -1;
	for (int i = 0; i < nt; i++)
		if (add_input(w, &tit[i], DEST_TIT, err))
			return -1;
	for (int i = 0; i < ns; i++)
		if (add_input(w, &src[i], DEST_SRC, err))
			return -1;
	if (c->mode == SPEC_PH_CO2) {
		int k = -1;
		for (int i = 0; i < d->nlig; i++)
			if (d->lig[i].carbonate)
				k = i;
		if (k < 0 || d->lig[k].nsteps < 2)
			return im_fail(err,
				       "speciation: no carbonate constants for the CO2 "
				       "mode");
		int b = add_basis(w, B_LIGAND, k, err);
		if (b < 0)
			return -1;
		w->co2b = b;
		w->fixed[b] = 1;
		w->co2_M = spec_co2_mM_per_atm(d, c->t_C) * c->pco2_atm / 1000.0;
		w->u[b] = log(w->co2_M);
	}
	if (build_species(w, err))
		return -1;
	/* starting ionic strength: the inputs as given */
	double s = 0;
	for (int i = 0; i < n; i++)
		s += (double)in[i].z * in[i].z * in[i].mM / 1000.0;
	w->I = 0.5 * s;
	return 0;
}

int spec_solve(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
	       spec_result *r, char *err)
{
	memset(r, 0, sizeof *r);
	if (check_cond(d, cond, n, err))
		return -1;
	work *w = im_xmalloc(sizeof *w);
	int rc = setup(w, d, in, n, cond, NULL, 0, NULL, 0, err);
	if (rc == 0)
		rc = run(w, RUN_PLAIN, err);
	if (rc == 0)
		rc = fill_result(w, cond, r, err);
	free(w);
	return rc;
}

/* the pH of the inputs as mixed, for messages; NAN when it fails */
static double ph_as_mixed(const spec_data *d, const spec_in *in, int n, double t_C)
{
	spec_cond c = {.t_C = t_C, .mode = SPEC_PH_CLOSED};
	spec_result *r = im_xmalloc(sizeof *r);
	char e[IM_ERRLEN];
	double ph = spec_solve(d, in, n, &c, r, e) == 0 ? r->pH : NAN;
	free(r);
	return ph;
}

/* a name for the titrant in messages: its weak acid or base, if any */
static const char *titrant_name(const spec_data *d, const spec_in *s, int n)
{
	for (int i = 0; i < n; i++)
		for (int k = 0; k < d->nlig; k++)
			for (int h = 0; h <= MAXH; h++)
				if (d->lig[k].has_state[h] &&
				    strcmp(d->lig[k].state[h], s[i].symbol) == 0)
					return d->lig[k].name;
	return "the titrant";
}

int spec_titrate(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
		 const spec_in *tit, int nt, double *amount_mM, spec_result *r, char *err)
{
	memset(r, 0, sizeof *r);
	*amount_mM = 0;
	if (check_cond(d, cond, n, err))
		return -1;
	if (cond->mode != SPEC_PH_FIXED)
		return im_fail(err, "titration needs a target pH");
	if (nt <= 0 || nt > SPEC_MAX_IN || !tit)
		return im_fail(err, "no titrant given");
	work *w = im_xmalloc(sizeof *w);
	int rc = setup(w, d, in, n, cond, tit, nt, NULL, 0, err);
	if (rc)
		goto out;
	/* at x = 0: how far off, and which way the titrant goes */
	w->x_tit = 0;
	if ((rc = run(w, RUN_PLAIN, err)))
		goto out;
	double g0 = proton_excess(w);
	double q0 = -w->T[DEST_TIT][w->hb];
	double strong_base = 0, strong_acid = 0, cap_up = 0, cap_down = 0;
	for (int i = 0; i < nt; i++) {
		if (strcmp(tit[i].symbol, "OH-") == 0)
			strong_base += tit[i].mM;
		if (strcmp(tit[i].symbol, "H+") == 0)
			strong_acid += tit[i].mM;
		for (int k = 0; k < d->nlig; k++)
			for (int h = 0; h <= MAXH; h++)
				if (d->lig[k].has_state[h] &&
				    strcmp(d->lig[k].state[h], tit[i].symbol) == 0) {
					int ns = d->lig[k].nsteps, hm = h < ns ? h : ns;
					cap_up += (ns - hm) * tit[i].mM;
					cap_down += hm * tit[i].mM;
					strong_acid += (h - hm) * tit[i].mM;
				}
	}
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_LIGAND && w->T[DEST_TIT][b] > 0)
			q0 += w->T[DEST_TIT][b] * mean_h(w, b);
	const char *tname = titrant_name(d, tit, nt);
	double scale = fabs(w->Tcur[w->hb]) + 1e-12;
	if (fabs(g0) <= X_RTOL * scale) {
		rc = fill_result(w, cond, r, err);
		goto out;
	}
	if (fabs(q0) < 1e-9 * (strong_base + strong_acid + cap_up + cap_down + 1e-30) ||
	    (strong_base + strong_acid + cap_up + cap_down) == 0) {
		rc = im_fail(err, "%s is neither an acid nor a base at pH %.2f", tname,
			     cond->pH);
		goto out;
	}
	double x1 = -g0 / q0;
	if (x1 < 0) {
		double ph0 = ph_as_mixed(d, in, n, cond->t_C);
		if (q0 > 0)
			rc = im_fail(err,
				     "%s raises the pH, but the solution is at pH %.2f "
				     "as mixed, above the target %.2f: titrate with an "
				     "acid",
				     tname, ph0, cond->pH);
		else
			rc = im_fail(err,
				     "%s lowers the pH, but the solution is at pH %.2f "
				     "as mixed, below the target %.2f: titrate with a "
				     "base",
				     tname, ph0, cond->pH);
		goto out;
	}
	/* a weak base (or acid) works only within about 1 pH unit of its pKa' */
	if ((q0 > 0 && strong_base == 0 && q0 < cap_up / 11.0) ||
	    (q0 < 0 && strong_acid == 0 && -q0 < cap_down / 11.0)) {
		double aF = w->A * davies_F(w->I), pk = NAN;
		for (int b = 0; b < w->nb; b++)
			if (w->btype[b] == B_LIGAND && w->T[DEST_TIT][b] > 0) {
				const lig_def *L = &d->lig[w->bref[b]];
				double hbar = mean_h(w, b);
				int step =
					q0 > 0 ? (int)floor(hbar) + 1 : (int)ceil(hbar);
				if (step < 1)
					step = 1;
				if (step > L->nsteps)
					step = L->nsteps;
				double lk = 0;
				for (int s = 0; s < w->ns; s++)
					if (w->skind[s] == SPEC_K_LIGAND &&
					    w->sl[s] == b) {
						if (w->sref[s] == step)
							lk += w->lb[s];
						if (w->sref[s] == step - 1)
							lk -= w->lb[s];
					}
				pk = lk / LN10 + aF;
				break;
			}
		rc = im_fail(err,
			     "%s cannot bring the pH to %.2f: that is beyond its "
			     "buffering range (pKa' %.2f at %.1f C, useful within 1 pH "
			     "unit of it)",
			     tname, cond->pH, pk, cond->t_C);
		goto out;
	}
	w->x_tit = x1;
	if ((rc = run(w, RUN_TITRATE, err)))
		goto out;
	if (w->x_tit > MAX_TITRANT_M) {
		rc = im_fail(err,
			     "reaching pH %.2f would take %.0f mM of %s, more than %g M",
			     cond->pH, w->x_tit * 1000.0, tname, MAX_TITRANT_M);
		goto out;
	}
	*amount_mM = w->x_tit * 1000.0;
	rc = fill_result(w, cond, r, err);
out:
	free(w);
	return rc;
}

int spec_free_target(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
		     const char *metal, const spec_in *src, int ns, double target_free_mM,
		     double *amount_mM, spec_result *r, char *err)
{
	memset(r, 0, sizeof *r);
	*amount_mM = 0;
	if (check_cond(d, cond, n, err))
		return -1;
	if (!isfinite(target_free_mM))
		return im_fail(err, "free concentration target is not a number");
	if (target_free_mM < 0)
		return im_fail(err, "free concentration target %g mM is below zero",
			       target_free_mM);
	int m = metal ? find_metal(d, metal) : -1;
	if (m < 0)
		return im_fail(err, "'%s' is not a metal of the equilibria tables",
			       metal ? metal : "");
	if (ns <= 0 || ns > SPEC_MAX_IN || !src)
		return im_fail(err, "no source of %s given", d->met[m].sym);
	work *w = im_xmalloc(sizeof *w);
	int rc = setup(w, d, in, n, cond, NULL, 0, src, ns, err);
	if (rc)
		goto out;
	int bm = metal_basis(w, m);
	if (bm < 0 || !(w->T[DEST_SRC][bm] > 0)) {
		rc = im_fail(err, "the source yields no %s", d->met[m].sym);
		goto out;
	}
	for (int b = 0; b < w->nb; b++) {
		if (w->btype[b] != B_LIGAND || !d->lig[w->bref[b]].binds ||
		    !(w->T[DEST_BASE][b] + w->T[DEST_SRC][b] > 0))
			continue;
		int any = 0;
		for (int c = 0; c < d->ncx; c++)
			any |= d->cx[c].active && d->cx[c].metal == m &&
			       d->cx[c].lig == w->bref[b];
		if (!any) {
			rc = im_fail(err,
				     "%s binds metals but has no stability constant with "
				     "%s: free %s cannot be set",
				     d->lig[w->bref[b]].name, d->met[m].sym,
				     d->met[m].sym);
			goto out;
		}
	}
	if (target_free_mM == 0) {
		if (w->T[DEST_BASE][bm] > 0) {
			rc = im_fail(err,
				     "free %s of 0 is below what the solution already "
				     "holds",
				     d->met[m].sym);
			goto out;
		}
		rc = spec_solve(d, in, n, cond, r, err);
		goto out;
	}
	w->fixed[bm] = 1;
	w->fixed_metal = bm;
	w->u[bm] = log(target_free_mM / 1000.0);
	w->x_src = 0;
	if ((rc = run(w, RUN_SOURCE, err))) {
		if (w->x_src > MAX_SOURCE_M)
			rc = im_fail(err,
				     "free %s of %g mM is above what %g M of the source "
				     "can give",
				     d->met[m].sym, target_free_mM, MAX_SOURCE_M);
		goto out;
	}
	double x = w->x_src;
	if (x < -1e-9 * (w->T[DEST_BASE][bm] + 1e-15)) {
		spec_result *r0 = im_xmalloc(sizeof *r0);
		char e2[IM_ERRLEN];
		double f0 = NAN;
		if (spec_solve(d, in, n, cond, r0, e2) == 0)
			for (int i = 0; i < r0->nmetals; i++)
				if (strcmp(r0->metals[i].symbol, d->met[m].sym) == 0)
					f0 = r0->metals[i].free_mM;
		free(r0);
		rc = im_fail(err,
			     "free %s of %g mM is below what the solution already gives "
			     "without the source (%g mM)",
			     d->met[m].sym, target_free_mM, f0);
		goto out;
	}
	if (x > MAX_SOURCE_M) {
		rc = im_fail(err,
			     "free %s of %g mM is above what %g M of the source can give",
			     d->met[m].sym, target_free_mM, MAX_SOURCE_M);
		goto out;
	}
	if (x < 0)
		x = 0;
	/* forward check: the solution with the source added, solved anew */
	spec_in *all = im_xmalloc((size_t)(n + ns) * sizeof *all);
	for (int i = 0; i < n; i++)
		all[i] = in[i];
	for (int i = 0; i < ns; i++) {
		all[n + i] = src[i];
		all[n + i].mM = src[i].mM * x * 1000.0;
	}
	rc = n + ns > SPEC_MAX_IN ? im_fail(err, "speciation: too many species")
				  : spec_solve(d, all, n + ns, cond, r, err);
	free(all);
	if (rc == 0)
		*amount_mM = x * 1000.0;
out:
	free(w);
	return rc;
}

int spec_apparent_kd(const spec_data *d, const char *metal, const char *ligand, double pH,
		     double t_C, double I_mM, double *kd_mM, char *err)
{
	*kd_mM = NAN;
	if (!d)
		return im_fail(err, "speciation: no equilibrium data loaded");
	int m = metal ? find_metal(d, metal) : -1;
	int k = ligand ? find_lig_ci(d, ligand) : -1;
	if (m < 0)
		return im_fail(err, "'%s' is not a metal of the equilibria tables",
			       metal ? metal : "");
	if (k < 0)
		return im_fail(err, "'%s' is not a ligand of the equilibria tables",
			       ligand ? ligand : "");
	if (!isfinite(pH) || pH < 1 || pH > 13)
		return im_fail(err, "pH %g outside 1-13", pH);
	if (!isfinite(t_C) || t_C < T_MIN_C || t_C > T_MAX_C)
		return im_fail(err, "temperature %g C outside %g-%g C", t_C, T_MIN_C,
			       T_MAX_C);
	if (!isfinite(I_mM) || I_mM < 0 || I_mM > 3000)
		return im_fail(err, "ionic strength %g mM outside 0-3000 mM", I_mM);
	double I = I_mM / 1000.0, A = act_dh_A(t_C), F = davies_F(I);
	double lnH = -pH * LN10 + LN10 * A * F; /* ln [H+] */
	const lig_def *L = &d->lig[k];
	int zM = d->met[m].z;
	double den = 0, num = 0;
	for (int h = 0; h <= L->nsteps; h++) {
		int z = L->zb + h;
		double D = L->zb * L->zb + h - z * z;
		den += exp(LN10 * (lig_logbeta0(d, k, h, t_C, NULL) - A * F * D) +
			   h * lnH);
	}
	int any = 0;
	for (int r = 0; r < d->ncx; r++) {
		const cx_row *c = &d->cx[r];
		if (!c->active || c->metal != m || c->lig != k || c->nm != 1 ||
		    c->nl != 1)
			continue;
		double D = zM * zM + L->zb * L->zb + c->nh - c->z * c->z;
		num += exp(LN10 * (cx_logbeta0(d, c, t_C, NULL) - A * F * D) +
			   c->nh * lnH);
		any = 1;
	}
	if (!any)
		return im_fail(err, "no stability constant of %s with %s", d->met[m].sym,
			       L->name);
	*kd_mM = den / num * 1000.0;
	return 0;
}

/* ------------------------------------------------------------------ */
/* listing                                                              */

int spec_constants(const spec_data *d, const char *name, spec_const *out, int max,
		   char *err)
{
	if (!d || !name || !*name)
		return im_fail(err, "no name given");
	int k = find_lig_ci(d, name), m = find_metal(d, name), comp = 0;
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
		o->dpka_dt_per_K = NAN;
		snprintf(o->compilation, sizeof o->compilation, "%s", c->comp);
		snprintf(o->source, sizeof o->source, "%s", c->source);
		o->in_use = c->active;
	}
	return n;
}
