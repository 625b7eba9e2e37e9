/*
 * targets.c - solving the targets a solution holds, jointly (targets.h).
 *
 * Each target owns the whole amount of its compound.  One pass solves
 * each target in turn for its compound with everything else held: the pH
 * with spec_titrate, the free metal with spec_free_target (at the pH
 * target when one holds at the same temperature, so that the two settle
 * in a few passes), the osmolality with osm_target_solve on the full
 * forward computation.  Passes repeat until no amount moves by more than
 * TG_MOVE relative; then every target is checked forward at its own
 * temperature.
 */
#include "targets.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "common.h"

#define MAX_YIELD 16
#define TG_MOVE 1e-12    /* relative change of every amount that ends the passes */
#define TG_PASSES 60

const char *tg_name(const sol_target *t)
{
	return t->kind == SOL_TG_PH ? "ph" : t->kind == SOL_TG_OSMO ? "osmo" : t->metal->symbol;
}

const char *tg_unit(const sol_target *t)
{
	return t->kind == SOL_TG_PH ? "" : t->kind == SOL_TG_OSMO ? "mOsm/kg" : "mM";
}

void tg_describe(const sol_target *t, char *buf, size_t n)
{
	if (t->kind == SOL_TG_PH)
		snprintf(buf, n, "pH %.2f with %s at %.1f C", t->value, t->with->name, t->at_C);
	else if (t->kind == SOL_TG_OSMO)
		snprintf(buf, n, "osmolality %.1f mOsm/kg with %s at %.1f C", t->value,
			 t->with->name, t->at_C);
	else
		snprintf(buf, n, "free %s %.4g %s with %s at %.1f C", t->metal->symbol,
			 t->value < 1e-3 ? 1e6 * t->value : t->value < 1 ? 1e3 * t->value : t->value,
			 t->value < 1e-3 ? "nM" : t->value < 1 ? "uM" : "mM", t->with->name, t->at_C);
}

int tg_find(const solution *s, const char *name)
{
	for (int k = 0; k < s->ntg; k++) {
		const sol_target *t = &s->tg[k];
		if (im_strcaseeq(name, tg_name(t)) || (t->kind == SOL_TG_OSMO &&
		    im_strcaseeq(name, "osmolality")))
			return k;
		if (t->kind == SOL_TG_FREE) {
			size_t b = strcspn(t->metal->symbol, "0123456789+");
			if (strlen(name) == b && strncasecmp(name, t->metal->symbol, b) == 0)
				return k;
		}
	}
	return -1;
}

int tg_of_compound(const solution *s, const rd_compound *c)
{
	for (int k = 0; k < s->ntg; k++)
		if (s->tg[k].with == c)
			return k;
	return -1;
}

static double amount_of(solution *s, const rd_compound *c)
{
	sol_item *it = sol_find(s, c);
	return it ? it->mM : 0;
}

/* The amount of c the solve found: in, or out when none is needed. */
static void put(solution *s, const rd_compound *c, double mM)
{
	if (mM > 0)
		sol_set(s, c, mM);
	else
		sol_remove(s, c);
}

/* s->ph_target and the titrant flags follow the pH target */
static void sync_ph(solution *s)
{
	s->ph_target = NAN;
	for (int i = 0; i < s->n; i++)
		s->items[i].titrant = 0;
	for (int k = 0; k < s->ntg; k++)
		if (s->tg[k].kind == SOL_TG_PH) {
			sol_item *it = sol_find(s, s->tg[k].with);
			s->ph_target = s->tg[k].value;
			if (it)
				it->titrant = 1;
		}
}

/* The speciation inputs of s without compound c. */
static int inputs_without(const solution *s, const rd_compound *c, spec_in *in, char *err)
{
	solution t = *s;
	sol_item items[s->n ? s->n : 1];
	t.n = 0;
	for (int i = 0; i < s->n; i++)
		if (s->items[i].c != c)
			items[t.n++] = s->items[i];
	t.items = items;
	return sol_spec_inputs(&t, 0, in, SPEC_MAX_IN, err);
}

static int yields_in(const rd_compound *c, spec_in *in)
{
	int n = 0;
	for (int k = 0; k < c->nyields && n < MAX_YIELD; k++)
		in[n++] = (spec_in){c->yields[k].ion->symbol, c->yields[k].ion->z,
				    c->yields[k].count};
	return n;
}

/* "target pH 7.30 with KOH at 22.0 C cannot be met: WHY" */
static int cannot(const sol_target *t, const char *why, char *err)
{
	char d[160];
	tg_describe(t, d, sizeof d);
	return im_fail(err, "target %s cannot be met: %s", d, why);
}

static int solve_ph(solution *s, const sol_target *t, const sol_env *env, char *err)
{
	spec_in in[SPEC_MAX_IN], tit[MAX_YIELD];
	spec_cond cond;
	sol_env e = *env;
	char why[IM_ERRLEN];
	double amt = 0;
	int n, rc;
	if (s->co2_frac > 0)
		return cannot(t, "the pH is set by the CO2 gas and bicarbonate (`gas off`, or "
				 "`targets drop ph`)", err);
	if ((n = inputs_without(s, t->with, in, why)) < 0)
		return cannot(t, why, err);
	e.t_C = t->at_C;
	sol_spec_cond(s, &e, &cond);
	cond.mode = SPEC_PH_FIXED;
	cond.pH = t->value;
	spec_result *r = im_xmalloc(sizeof *r);
	rc = spec_titrate(env->chem, in, n, &cond, tit, yields_in(t->with, tit), &amt, r, why);
	free(r);
	if (rc)
		return cannot(t, why, err);
	put(s, t->with, amt);
	return 0;
}

/* The pH target of s holding at t_C, when the pH is not the gas's. */
static const sol_target *ph_at(const solution *s, double t_C)
{
	for (int k = 0; k < s->ntg; k++)
		if (s->tg[k].kind == SOL_TG_PH && s->tg[k].at_C == t_C && !(s->co2_frac > 0))
			return &s->tg[k];
	return NULL;
}

static int solve_free(solution *s, const sol_target *t, const sol_env *env, char *err)
{
	spec_in in[SPEC_MAX_IN], sy[MAX_YIELD];
	spec_cond cond;
	sol_env e = *env;
	const sol_target *ph = ph_at(s, t->at_C);
	char why[IM_ERRLEN];
	double amt = 0;
	int n, rc;
	if ((n = inputs_without(s, t->with, in, why)) < 0)
		return cannot(t, why, err);
	e.t_C = t->at_C;
	sol_spec_cond(s, &e, &cond);
	if (ph) {
		cond.mode = SPEC_PH_FIXED;
		cond.pH = ph->value;
	}
	spec_result *r = im_xmalloc(sizeof *r);
	rc = spec_free_target(env->chem, in, n, &cond, t->metal->symbol, sy,
			      yields_in(t->with, sy), t->value, &amt, r, why);
	free(r);
	if (rc)
		return cannot(t, why, err);
	put(s, t->with, amt);
	return 0;
}

struct osmo_eval {
	solution *s;
	const rd_compound *c;
	sol_env env;
};

static int osmo_at(void *v, double x, double *osm, char *err)
{
	struct osmo_eval *e = v;
	sol_state st;
	sol_set(e->s, e->c, x);
	if (sol_compute(e->s, &e->env, &st, err))
		return -1;
	*osm = st.osmolality_mOsm_kg;
	sol_state_free(&st);
	if (!isfinite(*osm))
		return im_fail(err, "no osmolality estimate for %s", e->s->name);
	return 0;
}

static int solve_osmo(solution *s, const sol_target *t, const sol_env *env, char *err)
{
	struct osmo_eval e = {s, t->with, *env};
	char why[IM_ERRLEN];
	double f0, x, after, parts = 0;
	e.env.t_C = t->at_C;
	x = amount_of(s, t->with);
	/* already there (the later passes of a joint solve): keep it */
	if (x > 0 && osmo_at(&e, x, &after, why) == 0 && fabs(after - t->value) <= 1e-6)
		return 0;
	if (osmo_at(&e, 0, &f0, why))
		return cannot(t, why, err);
	if (f0 > t->value + TG_TOL_OSMO) {
		snprintf(why, sizeof why, "the rest of %s alone gives %.1f mOsm/kg, above it "
			 "(about %.0f mL of water per litre, or less of a main salt)", s->name, f0,
			 1000.0 * (f0 / t->value - 1.0));
		return cannot(t, why, err);
	}
	for (int k = 0; k < t->with->nyields; k++)
		parts += t->with->yields[k].count;
	if (!(x > 0))
		x = (t->value - f0) / (parts > 0 ? parts : 1);
	if (osm_target_solve(osmo_at, &e, t->value, f0, x, &x, &after, why))
		return cannot(t, why, err);
	sol_set(s, t->with, x);
	return 0;
}

static int solve_one(solution *s, const sol_target *t, const sol_env *env, char *err)
{
	if (t->kind == SOL_TG_PH)
		return solve_ph(s, t, env, err);
	if (t->kind == SOL_TG_FREE)
		return solve_free(s, t, env, err);
	return solve_osmo(s, t, env, err);
}

int tg_check(const solution *s, const sol_target *t, const sol_env *env, double *now,
	     int *met, char *err)
{
	sol_state st;
	sol_env e = *env;
	e.t_C = t->at_C;
	if (sol_compute(s, &e, &st, err))
		return -1;
	if (t->kind == SOL_TG_PH) {
		*now = st.pH;
		*met = fabs(*now - t->value) <= TG_TOL_PH;
	} else if (t->kind == SOL_TG_FREE) {
		*now = sol_state_free_mM(&st, t->metal->symbol);
		*met = fabs(*now - t->value) <= TG_TOL_FREE * t->value + 1e-15;
	} else {
		*now = st.osmolality_mOsm_kg;
		*met = fabs(*now - t->value) <= TG_TOL_OSMO;
	}
	sol_state_free(&st);
	return 0;
}

int tg_solve(solution *s, const sol_env *env, char *err)
{
	double moved = 0;
	if (s->ntg == 0)
		return 0;
	if (!env->chem || !env->osm)
		return im_fail(err, "the equilibria data are not loaded: the targets of %s cannot "
				    "be solved", s->name);
	for (int pass = 0; pass < TG_PASSES; pass++) {
		moved = 0;
		for (int k = 0; k < s->ntg; k++) {
			double old = amount_of(s, s->tg[k].with), now;
			if (solve_one(s, &s->tg[k], env, err))
				return -1;
			now = amount_of(s, s->tg[k].with);
			if (fabs(now - old) > moved * fmax(fabs(now), 1e-9))
				moved = fabs(now - old) / fmax(fabs(now), 1e-9);
		}
		if (s->ntg == 1 || moved <= TG_MOVE)
			break;
	}
	sync_ph(s);
	for (int k = 0; k < s->ntg; k++) {
		double now;
		int met;
		if (tg_check(s, &s->tg[k], env, &now, &met, err))
			return -1;
		if (!met) {
			char why[IM_ERRLEN];
			snprintf(why, sizeof why, "together with the other targets it reaches only "
				 "%.6g %s", now, tg_unit(&s->tg[k]));
			return cannot(&s->tg[k], why, err);
		}
	}
	return 0;
}

int tg_set(solution *s, const sol_target *t, const sol_env *env, char *err)
{
	int k = -1;
	for (int i = 0; i < s->ntg; i++)
		if (s->tg[i].kind == t->kind && s->tg[i].metal == t->metal)
			k = i;
	for (int i = 0; i < s->ntg; i++)
		if (i != k && s->tg[i].with == t->with) {
			char d[160], why[IM_ERRLEN];
			tg_describe(&s->tg[i], d, sizeof d);
			snprintf(why, sizeof why, "%s is already added by the target %s",
				 t->with->name, d);
			return cannot(t, why, err);
		}
	if (k >= 0 && s->tg[k].with != t->with)
		sol_remove(s, s->tg[k].with); /* the old compound was the target's */
	if (k < 0) {
		if (s->ntg == SOL_TG_MAX)
			return cannot(t, "too many targets", err);
		k = s->ntg++;
	}
	s->tg[k] = *t;
	return tg_solve(s, env, err);
}

void tg_drop(solution *s, int idx)
{
	memmove(&s->tg[idx], &s->tg[idx + 1], (s->ntg - idx - 1) * sizeof s->tg[0]);
	s->ntg--;
	sync_ph(s);
}
