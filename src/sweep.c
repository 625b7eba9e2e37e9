/*
 * sweep.c - one quantity followed over a range of an amount or of the
 * temperature.  See sweep.h.
 *
 * Every point is computed as the single commands compute it: the solution
 * (a copy, with the compound set to the point's amount, or removed at 0)
 * goes through sol_compute, and the quantity is read from the state as
 * `show` reads it, or computed by the calculator `nernst`, `junction`
 * (ljp_pair_mV, the one way solutions become a junction) or `erev`
 * use.
 */
#include "sweep.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ljp.h"
#include "common.h"
#include "ghk.h"
#include "signals.h"

/* 1: the quantity reads two solutions (inside | outside). */
static int is_pair(sweep_qty q)
{
	return q == SWQ_NERNST || q == SWQ_LJP || q == SWQ_EREV;
}

/* The titrant item of s, or NULL. */
static const sol_item *titrant_of(const solution *s)
{
	for (int i = 0; i < s->n; i++)
		if (s->items[i].titrant)
			return &s->items[i];
	return NULL;
}

/* 1 when s would be titrated again under keep_pH. */
static int retitrates(const solution *s)
{
	return isfinite(s->ph_target) && titrant_of(s) && !(s->co2_frac > 0);
}

int sweep_check(const sweep_spec *sp, char *err)
{
	if (!sp)
		return im_fail(err, "no sweep given");
	if (sp->qty < 0 || sp->qty >= SWQ_COUNT)
		return im_fail(err, "unknown quantity to follow");
	if (!isfinite(sp->from) || !isfinite(sp->to))
		return im_fail(err, "the range is not a pair of finite numbers");
	if (!(sp->to > sp->from))
		return im_fail(err, "the range %g to %g %s covers nothing: give a "
			       "range from low to high", sp->from, sp->to,
			       sp->var == SWEEP_TEMP ? "C" : "mM");
	if (sp->to - sp->from < 1e-6 * fmax(fabs(sp->from), fabs(sp->to)))
		return im_fail(err, "the range %.10g to %.10g is too narrow: widen it",
			       sp->from, sp->to);
	if (sp->npts < 2 || sp->npts > SWEEP_MAX_PTS)
		return im_fail(err, "%d points: give 2 to %d", sp->npts, SWEEP_MAX_PTS);
	if (sp->var == SWEEP_TEMP) {
		if (sp->from < SWEEP_T_MIN_C || sp->to > SWEEP_T_MAX_C)
			return im_fail(err, "temperatures %g to %g C reach outside %g to "
				       "%g C, where the water data hold", sp->from, sp->to,
				       SWEEP_T_MIN_C, SWEEP_T_MAX_C);
	} else {
		if (!sp->compound || !sp->target)
			return im_fail(err, "a compound sweep needs the compound and "
				       "the solution it is varied in");
		if (sp->from < 0)
			return im_fail(err, "an amount cannot be negative (%g mM)",
				       sp->from);
		if (sp->to > 5000.0)
			return im_fail(err, "%g mM is beyond 5 M", sp->to);
	}
	if (is_pair(sp->qty)) {
		if (!sp->inside || !sp->outside)
			return im_fail(err, "%s needs a pair of solutions (INSIDE "
				       "OUTSIDE; for the LJP: PIPETTE BATH)",
				       sp->qty == SWQ_LJP ? "the LJP"
				       : sp->qty == SWQ_NERNST ? "an equilibrium "
				       "potential" : "a reversal potential");
	} else if (!sp->sol) {
		return im_fail(err, "no solution to follow");
	} else if (sp->sol->n == 0 && sp->var == SWEEP_TEMP) {
		return im_fail(err, "%s is empty: nothing to follow", sp->sol->name);
	}
	if ((sp->qty == SWQ_FREE || sp->qty == SWQ_NERNST) && !sp->ion)
		return im_fail(err, "no ion given");
	if (sp->qty == SWQ_NERNST && sp->ion->z == 0)
		return im_fail(err, "%s is neutral: it has no equilibrium potential",
			       sp->ion->symbol);
	if (sp->qty == SWQ_FREE && sp->ion->z <= 0)
		return im_fail(err, "%s is not a metal ion", sp->ion->symbol);
	if (sp->qty == SWQ_EREV) {
		if (sp->nperm < 1 || sp->nperm > SWEEP_MAX_PERM)
			return im_fail(err, "give 1 to %d permeabilities, e.g. K=1 Na=0.04",
				       SWEEP_MAX_PERM);
		for (int i = 0; i < sp->nperm; i++)
			if (!sp->perm_ion[i] || !isfinite(sp->perm[i]) || sp->perm[i] < 0)
				return im_fail(err, "permeability %d is not a number >= 0",
					       i + 1);
	}
	if (sp->keep_pH) {
		const solution *a = is_pair(sp->qty) ? sp->inside : sp->sol;
		const solution *b = is_pair(sp->qty) ? sp->outside : NULL;
		const solution *v = sp->var == SWEEP_AMOUNT ? sp->target : NULL;
		int any = v ? retitrates(v) : retitrates(a) || (b && retitrates(b));
		if (!any)
			return im_fail(err, "keep-pH: %s was not titrated (use `ph TARGET "
				       "with TITRANT` first)", v ? v->name : a->name);
		if (v && titrant_of(v)->c == sp->compound)
			return im_fail(err, "keep-pH: %s is the titrant of %s; vary "
				       "something else", sp->compound->name, v->name);
	}
	if (sp->var == SWEEP_AMOUNT) {
		const solution *a = is_pair(sp->qty) ? sp->inside : sp->sol;
		const solution *b = is_pair(sp->qty) ? sp->outside : NULL;
		if (a != sp->target && b != sp->target)
			return im_fail(err, "varying %s in %s changes nothing the %s "
				       "reads (it reads %s%s%s)", sp->compound->name,
				       sp->target->name, is_pair(sp->qty) ? "pair" : "quantity",
				       a->name, b ? " and " : "", b ? b->name : "");
	}
	return 0;
}

#define MAX_YIELD 16

/* Titrate s again to its target pH with its titrant, as `ph TARGET with
 * TITRANT` does: the old titrant out, spec_titrate on what is left, the
 * new amount in as the titrant item (its stock kept). */
static int retitrate(solution *s, const sol_env *env, char *err)
{
	spec_in in[SPEC_MAX_IN], tit[MAX_YIELD];
	spec_cond cond;
	spec_result *res;
	const sol_item *t = titrant_of(s);
	const rd_compound *c = t->c;
	double stock = t->stock_mM, amount = 0;
	int n, nt = 0, rc;
	if (!env->chem)
		return im_fail(err, "no titration without the equilibrium data");
	sol_remove(s, c);
	if ((n = sol_spec_inputs(s, 1, in, SPEC_MAX_IN, err)) < 0)
		return -1;
	for (int k = 0; k < c->nyields && nt < MAX_YIELD; k++)
		tit[nt++] = (spec_in){c->yields[k].ion->symbol, c->yields[k].ion->z,
				      c->yields[k].count};
	sol_spec_cond(s, env, &cond);
	cond.mode = SPEC_PH_FIXED;
	cond.pH = s->ph_target;
	res = im_xmalloc(sizeof *res);
	rc = spec_titrate(env->chem, in, n, &cond, tit, nt, &amount, res, err);
	free(res);
	if (rc)
		return -1;
	if (amount > 1e-9) {
		sol_add(s, c, amount);
		sol_find(s, c)->titrant = 1;
		sol_find(s, c)->stock_mM = stock;
	}
	return 0;
}

/* A concentration (or activity) of ion in a state; 0 when absent. */
static double conc(const sol_state *st, const rd_ion *ion, int act)
{
	const sol_species *x = sol_state_find(st, ion);
	return x ? (act ? x->act_mM : x->mM) : 0.0;
}

int sweep_value(const sweep_spec *sp, const sol_state *a, const sol_state *b,
		double t_C, double *y, char *err)
{
	ghk_ion g[SWEEP_MAX_PERM];
	if (!is_pair(sp->qty) && a->n == 0)
		return im_fail(err, "the solution is empty at this point");
	switch (sp->qty) {
	case SWQ_PH:
		if (!a->chem || !isfinite(a->pH))
			return im_fail(err, "no pH without the equilibrium data");
		*y = a->pH;
		return 0;
	case SWQ_FREE:
		if (!a->chem)
			return im_fail(err, "no free %s without the equilibrium data",
				       sp->ion->symbol);
		for (int m = 0; m < a->chem->nmetals; m++)
			if (strcmp(a->chem->metals[m].symbol, sp->ion->symbol) == 0) {
				*y = a->chem->metals[m].free_mM;
				return 0;
			}
		/* a metal the equilibria do not bind: free is what is there */
		*y = conc(a, sp->ion, 0);
		return 0;
	case SWQ_OSMOLALITY:
		if (!isfinite(a->osmolality_mOsm_kg))
			return im_fail(err, "no osmolality estimate (no Pitzer data)");
		*y = a->osmolality_mOsm_kg;
		return 0;
	case SWQ_IONIC_STRENGTH:
		*y = a->ionic_strength_mM;
		return 0;
	case SWQ_NERNST:
		return ghk_nernst_mV(sp->ion->z, conc(a, sp->ion, sp->activities),
				     conc(b, sp->ion, sp->activities), t_C, y, err);
	case SWQ_LJP:
		return ljp_pair_mV(a, b, sp->activities, t_C, y, NULL, NULL, err);
	case SWQ_EREV:
		for (int i = 0; i < sp->nperm; i++) {
			g[i].symbol = sp->perm_ion[i]->symbol;
			g[i].z = sp->perm_ion[i]->z;
			g[i].P = sp->perm[i];
			g[i].in_mM = conc(a, sp->perm_ion[i], sp->activities);
			g[i].out_mM = conc(b, sp->perm_ion[i], sp->activities);
		}
		return ghk_erev_mV(g, sp->nperm, t_C, y, err);
	default:
		return im_fail(err, "unknown quantity to follow");
	}
}

void sweep_free(sweep_result *r)
{
	if (!r)
		return;
	if (r->why)
		for (int i = 0; i < r->n; i++)
			free(r->why[i]);
	free(r->why);
	free(r->x);
	free(r->y);
	memset(r, 0, sizeof *r);
}

static void names(const sweep_spec *sp, sweep_result *r)
{
	const char *s = sp->sol ? sp->sol->name : "";
	const char *in = sp->inside ? sp->inside->name : "";
	const char *out = sp->outside ? sp->outside->name : "";
	if (sp->var == SWEEP_TEMP) {
		r->x_unit = "C";
		snprintf(r->x_name, sizeof r->x_name, "temperature");
	} else {
		r->x_unit = "mM";
		snprintf(r->x_name, sizeof r->x_name, "%.30s in %.40s",
			 sp->compound->name, sp->target->name);
	}
	switch (sp->qty) {
	case SWQ_PH:
		r->y_unit = "";
		snprintf(r->y_name, sizeof r->y_name, "pH of %.60s", s);
		snprintf(r->y_key, sizeof r->y_key, "pH");
		snprintf(r->y_short, sizeof r->y_short, "pH");
		break;
	case SWQ_FREE:
		r->y_unit = "mM";
		snprintf(r->y_name, sizeof r->y_name, "free %s in %.60s",
			 sp->ion->symbol, s);
		snprintf(r->y_key, sizeof r->y_key, "free_%.40s", sp->ion->symbol);
		snprintf(r->y_short, sizeof r->y_short, "free %.30s", sp->ion->symbol);
		break;
	case SWQ_OSMOLALITY:
		r->y_unit = "mOsm/kg";
		snprintf(r->y_name, sizeof r->y_name, "osmolality of %.60s (estimate)", s);
		snprintf(r->y_key, sizeof r->y_key, "osmolality");
		snprintf(r->y_short, sizeof r->y_short, "osmolality");
		break;
	case SWQ_IONIC_STRENGTH:
		r->y_unit = "mM";
		snprintf(r->y_name, sizeof r->y_name, "ionic strength of %.60s", s);
		snprintf(r->y_key, sizeof r->y_key, "ionic_strength");
		snprintf(r->y_short, sizeof r->y_short, "ionic strength");
		break;
	case SWQ_NERNST:
		r->y_unit = "mV";
		snprintf(r->y_name, sizeof r->y_name, "E(%s), %.40s inside, %.40s outside",
			 sp->ion->symbol, in, out);
		snprintf(r->y_key, sizeof r->y_key, "E_%.40s", sp->ion->symbol);
		snprintf(r->y_short, sizeof r->y_short, "E(%.30s)", sp->ion->symbol);
		break;
	case SWQ_LJP:
		r->y_unit = "mV";
		snprintf(r->y_name, sizeof r->y_name, "LJP, pipette %.40s, bath %.40s",
			 in, out);
		snprintf(r->y_key, sizeof r->y_key, "ljp");
		snprintf(r->y_short, sizeof r->y_short, "LJP");
		break;
	case SWQ_EREV:
	default:
		r->y_unit = "mV";
		snprintf(r->y_name, sizeof r->y_name, "E_rev, %.40s inside, %.40s outside",
			 in, out);
		snprintf(r->y_key, sizeof r->y_key, "E_rev");
		snprintf(r->y_short, sizeof r->y_short, "E_rev");
		break;
	}
}

/* One side of the quantity: the solution, whether the sweep changes it,
 * and its state when it does not (computed once). */
typedef struct side {
	const solution *sol;
	int varies;
	int have;
	sol_state st;
} side;

int sweep_run(const sweep_spec *sp, const sol_env *env, sweep_result *r,
	      char *err)
{
	side s[2];
	int ns, rc = -1;
	solution work, cp;
	int have_work = 0;
	char why[IM_ERRLEN];
	memset(r, 0, sizeof *r);
	memset(s, 0, sizeof s);
	if (sweep_check(sp, err))
		return -1;
	if (!env)
		return im_fail(err, "no environment to compute in");
	ns = is_pair(sp->qty) ? 2 : 1;
	s[0].sol = ns == 2 ? sp->inside : sp->sol;
	if (ns == 2)
		s[1].sol = sp->outside;
	for (int k = 0; k < ns; k++) {
		s[k].varies = sp->var == SWEEP_TEMP || s[k].sol == sp->target;
		if (s[k].varies)
			continue;
		if (sol_compute(s[k].sol, env, &s[k].st, why)) {
			im_fail(err, "%.60s: %.180s", s[k].sol->name, why);
			goto done;
		}
		s[k].have = 1;
	}
	if (sp->var == SWEEP_AMOUNT) {
		sol_copy(&work, sp->target, sp->target->name);
		have_work = 1;
	}
	r->n = sp->npts;
	r->pH_lo = r->pH_hi = NAN;
	r->x = im_xmalloc((size_t)r->n * sizeof *r->x);
	r->y = im_xmalloc((size_t)r->n * sizeof *r->y);
	r->why = im_xcalloc((size_t)r->n, sizeof *r->why);
	names(sp, r);
	for (int i = 0; i < r->n; i++) {
		double x = i == r->n - 1 ? sp->to
			: sp->from + (sp->to - sp->from) * i / (r->n - 1);
		sol_env e = *env;
		sol_state st[2];
		int ok = 1;
		if (sig_cancelled()) { /* Ctrl-C in the shell: between points */
			im_fail(err, "%s", SIG_CANCELLED_MSG);
			sweep_free(r);
			goto done;
		}
		r->x[i] = x;
		r->y[i] = NAN;
		if (sp->var == SWEEP_TEMP) {
			e.t_C = x;
		} else if (x > 0) {
			sol_set(&work, sp->compound, x);
		} else {
			sol_remove(&work, sp->compound);
		}
		for (int k = 0; k < ns && ok; k++) {
			const solution *src = have_work && s[k].sol == sp->target ? &work
				: s[k].sol;
			int fail = 0, tit = 0;
			if (!s[k].varies) {
				st[k] = s[k].st;
			} else {
				if (sp->keep_pH && retitrates(src)) {
					/* titrated again on a copy of this point */
					sol_copy(&cp, src, src->name);
					tit = 1;
					fail = retitrate(&cp, &e, why);
					src = &cp;
				}
				fail = fail || sol_compute(src, &e, &st[k], why);
				if (tit)
					sol_free(&cp);
				if (!fail && st[k].chem && isfinite(st[k].pH)) {
					if (!(st[k].pH >= r->pH_lo))
						r->pH_lo = st[k].pH;
					if (!(st[k].pH <= r->pH_hi))
						r->pH_hi = st[k].pH;
				}
			}
			if (fail) {
				/* states 0..k-1 computed here are freed below */
				for (int j = 0; j < k; j++)
					if (s[j].varies)
						sol_state_free(&st[j]);
				ok = 0;
				break;
			}
			if (k == ns - 1) {
				double y;
				if (sweep_value(sp, &st[0], ns == 2 ? &st[1] : NULL, e.t_C,
						&y, why) == 0)
					r->y[i] = y;
				else
					ok = 0;
				for (int j = 0; j < ns; j++)
					if (s[j].varies)
						sol_state_free(&st[j]);
			}
		}
		if (!ok) {
			r->why[i] = im_xstrdup(why);
			r->nfail++;
		}
	}
	if (r->nfail == r->n) {
		im_fail(err, "no point could be computed: at %g %s: %.180s", r->x[0],
			r->x_unit, r->why[0]);
		sweep_free(r);
		goto done;
	}
	rc = 0;
done:
	if (have_work)
		sol_free(&work);
	for (int k = 0; k < ns; k++)
		if (s[k].have)
			sol_state_free(&s[k].st);
	return rc;
}
