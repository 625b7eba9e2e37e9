/*
 * titrate.c - searches built on the equilibrium solver: the amount of a
 * titrant that brings a solution to a pH, and the amount of a metal source
 * that gives a free metal concentration.  Declared in speciation.h; the
 * working state is spec_work.h's.
 */
#include "speciation.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "eqdata.h"
#include "spec_work.h"

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
	if (specw_check_cond(d, cond, n, err))
		return -1;
	if (cond->mode != SPEC_PH_FIXED)
		return im_fail(err, "titration needs a target pH");
	if (nt <= 0 || nt > SPEC_MAX_IN || !tit)
		return im_fail(err, "no titrant given");
	work *w = im_xmalloc(sizeof *w);
	int rc = specw_setup(w, d, in, n, cond, tit, nt, NULL, 0, err);
	if (rc)
		goto out;
	/* at x = 0: how far off, and which way the titrant goes */
	w->x_tit = 0;
	if ((rc = specw_run(w, RUN_PLAIN, err)))
		goto out;
	double g0 = specw_proton_excess(w);
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
			q0 += w->T[DEST_TIT][b] * specw_mean_h(w, b);
	const char *tname = titrant_name(d, tit, nt);
	double scale = fabs(w->Tcur[w->hb]) + 1e-12;
	if (fabs(g0) <= X_RTOL * scale) {
		rc = specw_fill_result(w, r, err);
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
				double hbar = specw_mean_h(w, b);
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
	if ((rc = specw_run(w, RUN_TITRATE, err)))
		goto out;
	if (w->x_tit > MAX_TITRANT_M) {
		rc = im_fail(err,
			     "reaching pH %.2f would take %.0f mM of %s, more than %g M",
			     cond->pH, w->x_tit * 1000.0, tname, MAX_TITRANT_M);
		goto out;
	}
	*amount_mM = w->x_tit * 1000.0;
	rc = specw_fill_result(w, r, err);
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
	if (specw_check_cond(d, cond, n, err))
		return -1;
	if (!isfinite(target_free_mM))
		return im_fail(err, "free concentration target is not a number");
	if (target_free_mM < 0)
		return im_fail(err, "free concentration target %g mM is below zero",
			       target_free_mM);
	int m = metal ? eqd_find_metal(d, metal) : -1;
	if (m < 0)
		return im_fail(err, "'%s' is not a metal of the equilibria tables",
			       metal ? metal : "");
	if (ns <= 0 || ns > SPEC_MAX_IN || !src)
		return im_fail(err, "no source of %s given", d->met[m].sym);
	work *w = im_xmalloc(sizeof *w);
	int rc = specw_setup(w, d, in, n, cond, NULL, 0, src, ns, err);
	if (rc)
		goto out;
	int bm = specw_metal_basis(w, m);
	if (bm < 0 || !(w->T[DEST_SRC][bm] > 0)) {
		rc = im_fail(err, "the source yields no %s", d->met[m].sym);
		goto out;
	}
	/* a metal-binding ligand without a constant for this metal is taken
	 * as not binding it; the result's warnings say so */
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
	if ((rc = specw_run(w, RUN_SOURCE, err))) {
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
