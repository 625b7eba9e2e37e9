/*
 * cmd_solution.c - composing a solution and showing what it holds.
 * Handlers parse their words, call solution.c and session.c, and render
 * one result; no physics here.
 */
#include "cmd_solution.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "render.h"
#include "targets.h"
#include "units.h"

/* ---- temperature and model ---- */

int cmd_temp(im_ctx *ctx, int argc, char **argv, char *err)
{
	render *r;
	double t;
	if (argc > 1 && (units_number(argv[1], &t, err) ||
			 ses_set_temp(ctx->ses, t, argv[1], err)))
		return -1;
	r = render_new(ctx->out);
	render_num(r, "temperature_C", NULL, "C", ctx->ses->temp_C, UNITS_DEC(1));
	render_text(r, "temperature %.1f C", ctx->ses->temp_C);
	return render_done(r);
}

int cmd_activity(im_ctx *ctx, int argc, char **argv, char *err)
{
	render *r;
	if (argc == 2 && ses_set_model(ctx->ses, argv[1], err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "activity_model", NULL, ses_model_key(ctx->ses->model));
	render_str(r, "description", NULL, ses_model_text(ctx->ses->model));
	render_text(r, "activity coefficients: %s%s", ses_model_text(ctx->ses->model),
		    ctx->ses->model == ACT_DAVIES ? " (default)" : "");
	return render_done(r);
}

/* ---- composing solutions ---- */

int cmd_solution(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *src = NULL, *s;
	render *r;
	int isnew;
	if (argc == 3 || argc > 4)
		return im_fail(err, "usage: solution NAME [from OTHER]");
	if (ses_valid_name(argv[1], err))
		return -1;
	if (argc == 4) {
		if (strcmp(argv[2], "from") != 0)
			return im_fail(err, "expected 'from', got '%.40s'", argv[2]);
		if (ses_solution(ctx->ses, argv[3], &src, err))
			return -1;
		if (strcmp(argv[1], argv[3]) == 0)
			return im_fail(err, "a solution cannot be copied onto itself");
		s = im_xmalloc(sizeof *s);
		sol_copy(s, src, argv[1]);
		ws_put(&ctx->ses->ws, s);
	}
	isnew = !src && !ws_find(&ctx->ses->ws, argv[1]);
	s = ws_open(&ctx->ses->ws, argv[1]);
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_bool(r, "new", NULL, isnew);
	render_int(r, "compounds", NULL, s->n);
	if (src) {
		render_str(r, "copy_of", NULL, src->name);
		render_text(r, "solution %s (copy of %s, %d compounds)", s->name, src->name, s->n);
	} else {
		render_text(r, "solution %s%s", s->name, isnew ? " (new)" : "");
	}
	return render_done(r);
}

/* The answer of add, set and remove: the solution, the compound and its
 * amount now (and before, for an add to what was there), the compound's
 * hazard, and what the targets moved. */
static int report_amount(im_ctx *ctx, const solution *s, const rd_compound *c,
			 const char *verb, double was_mM)
{
	sol_item *it = sol_find((solution *)s, c);
	double mM = it ? it->mM : 0;
	char amt[48], was[48];
	render *r = render_new(ctx->out);
	units_fmt_conc(amt, sizeof amt, mM, ctx->out->utf8);
	units_fmt_conc(was, sizeof was, was_mM, ctx->out->utf8);
	render_str(r, "solution", NULL, s->name);
	render_str(r, "action", NULL, verb);
	render_str(r, "compound", NULL, c->name);
	render_conc(r, "mM", NULL, mM);
	if (strcmp(verb, "removed") == 0)
		render_text(r, "%s: removed %s", s->name, c->name);
	else if (strcmp(verb, "added") == 0 && was_mM > 0) {
		render_conc(r, "was_mM", NULL, was_mM);
		render_text(r, "%s: added %s, was %s, now %s (`set` replaces)", s->name, c->name,
			    was, amt);
	} else
		render_text(r, "%s: %s %s, now %s", s->name, verb, c->name, amt);
	for (int k = 0; k < s->ntg; k++) {
		sol_item *t = sol_find((solution *)s, s->tg[k].with);
		units_fmt_conc(amt, sizeof amt, t ? t->mM : 0, ctx->out->utf8);
		render_text(r, "  target %s holds: %s %s", tg_name(&s->tg[k]), s->tg[k].with->name,
			    amt);
	}
	if (c->hazard && strcmp(verb, "removed") != 0) {
		render_str(r, "caution", NULL, c->hazard);
		render_text(r, "caution, %s: %s", c->name, c->hazard);
	}
	return render_done(r);
}

/* -1 with err when a target of s adds c (its amount is the target's). */
static int not_a_target(const solution *s, const rd_compound *c, char *err)
{
	int k = tg_of_compound(s, c);
	if (k < 0)
		return 0;
	return im_fail(err, "%s in %s is set by its %s target; change the target, or `targets "
			    "drop %s` first", c->name, s->name, tg_name(&s->tg[k]), tg_name(&s->tg[k]));
}

static int add_or_set(im_ctx *ctx, int argc, char **argv, char *err, int set)
{
	const rd_compound *c;
	solution *s;
	double mM, was;
	if (ses_solution(ctx->ses, NULL, &s, err) || ses_compound(ctx->ses, argv[1], &c, err) ||
	    units_amount_mM(argv[2], argc > 3 ? argv[3] : NULL, c->fw_g_mol, &mM, err) ||
	    not_a_target(s, c, err))
		return -1;
	was = sol_find(s, c) ? sol_find(s, c)->mM : 0;
	if (!set && was + mM > UNITS_MAX_mM)
		return im_fail(err, "%s would reach %g mM, beyond %g M", c->name, was + mM,
			       UNITS_MAX_mM / 1000);
	if (set)
		sol_set(s, c, mM);
	else
		sol_add(s, c, mM);
	if (tg_solve(s, ses_env(ctx->ses), err))
		return -1;
	return report_amount(ctx, s, c, set ? "set" : "added", was);
}

int cmd_add(im_ctx *ctx, int argc, char **argv, char *err)
{
	return add_or_set(ctx, argc, argv, err, 0);
}

int cmd_set(im_ctx *ctx, int argc, char **argv, char *err)
{
	return add_or_set(ctx, argc, argv, err, 1);
}

int cmd_remove(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c;
	solution *s;
	(void)argc;
	if (ses_solution(ctx->ses, NULL, &s, err) || ses_compound(ctx->ses, argv[1], &c, err) ||
	    not_a_target(s, c, err))
		return -1;
	if (sol_remove(s, c))
		return im_fail(err, "%s is not in %s", c->name, s->name);
	if (tg_solve(s, ses_env(ctx->ses), err))
		return -1;
	return report_amount(ctx, s, c, "removed", 0);
}

int cmd_clear(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	render *r;
	(void)argc;
	(void)argv;
	if (ses_solution(ctx->ses, NULL, &s, err))
		return -1;
	s->n = 0;
	s->ntg = 0;
	s->ph_target = NAN;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_int(r, "compounds", NULL, 0);
	render_text(r, "%s: emptied", s->name);
	return render_done(r);
}

/* ---- show ---- */

/* Net charge this far from zero is reported as not electroneutral:
 * 0.1 mEq/L, or 0.5 % of the cation charge (common practice: a rounding
 * error in a recipe, not a real imbalance, stays below it). */
static int unbalanced(const sol_state *st)
{
	double lim = 0.005 * st->cation_mEq_L;
	return fabs(st->net_charge_mEq_L) > (lim > 0.1 ? lim : 0.1);
}

/* The largest ions of the excess sign (up to three), for naming what
 * lacks a counter-ion; indexes into st->sp, -1 for none. */
static void excess_ions(const sol_state *st, int idx[3])
{
	int sign = st->net_charge_mEq_L > 0 ? 1 : -1;
	for (int k = 0; k < 3; k++) {
		idx[k] = -1;
		for (int j = 0; j < st->n; j++) {
			int used = 0;
			for (int m = 0; m < k; m++)
				used |= idx[m] == j;
			if (!used && st->sp[j].ion->z * sign > 0 &&
			    (idx[k] < 0 || st->sp[j].mM * abs(st->sp[j].ion->z) >
						   st->sp[idx[k]].mM * abs(st->sp[idx[k]].ion->z)))
				idx[k] = j;
		}
	}
}

/* Below this a species is not worth a line in `show` (1 pM). */
#define SHOW_MIN_mM 1e-9

static void show_compounds(render *r, const solution *s)
{
	render_table(r, "compounds", NULL);
	for (int i = 0; i < s->n; i++) {
		const sol_item *it = &s->items[i];
		render_row(r);
		render_str(r, "compound", "compound", it->c->name);
		render_conc(r, "mM", "amount", it->mM);
		if (it->titrant)
			render_bool(r, "titrant", NULL, 1);
		if (it->stock_mM > 0)
			render_conc(r, "stock_mM", NULL, it->stock_mM);
		render_str(r, NULL, "", it->titrant && it->stock_mM > 0 ? "(titrant)  (from stock)"
				: it->titrant ? "(titrant)" : it->stock_mM > 0 ? "(from stock)" : "");
	}
	render_table_end(r);
}

static void show_species(render *r, const sol_state *st)
{
	int hidden = 0;
	render_text(r, "%s", "");
	render_table(r, "ions", NULL);
	for (int j = 0; j < st->n; j++) {
		const sol_species *x = &st->sp[j];
		if (x->ion->z == 0)
			continue;
		if (x->mM < SHOW_MIN_mM) {
			hidden++;
			continue;
		}
		render_row(r);
		render_str(r, "ion", "ion", x->ion->symbol);
		render_charge(r, "z", "z", x->ion->z);
		render_conc(r, "mM", "free", x->mM);
		render_numj(r, "gamma", "gamma", NULL, x->gamma, UNITS_DEC(4), 6);
		render_conc(r, "activity_mM", "activity", x->act_mM);
		if (x->dh_fallback)
			render_bool(r, "dh_fallback", NULL, 1);
		render_str(r, NULL, "", x->dh_fallback ? "(Davies: no size)" : "");
	}
	render_table_end(r);
	render_table(r, "neutral", "");
	for (int j = 0; j < st->n; j++) {
		if (st->sp[j].ion->z != 0)
			continue;
		if (st->sp[j].mM < SHOW_MIN_mM) {
			hidden++;
			continue;
		}
		render_row(r);
		render_str(r, "species", "neutral solute", st->sp[j].ion->symbol);
		render_conc(r, "mM", "free", st->sp[j].mM);
	}
	render_table_end(r);
	render_int(r, "species_below_1_pM", NULL, hidden);
	if (hidden)
		render_text(r, "  (%d species below 1 pM not listed)", hidden);
	render_text(r, "%s", "");
}

static void show_chemistry(render *r, const solution *s, const sol_state *st)
{
	const spec_result *c = st->chem;
	render_num(r, "pH", "pH", NULL, st->pH, UNITS_DEC(2));
	render_str(r, "pH_from", NULL, s->co2_frac > 0 ? "co2" : "closed");
	if (isfinite(s->ph_target))
		render_num(r, "target_pH", NULL, NULL, s->ph_target, UNITS_DEC(2));
	if (s->co2_frac > 0)
		render_numj(r, "co2_fraction", "CO2 in the gas", "%", 100 * s->co2_frac,
			    UNITS_SIG(3), 6);
	render_object(r, "free");
	for (int m = 0; m < c->nmetals; m++) {
		char label[48];
		snprintf(label, sizeof label, "free %s", c->metals[m].symbol);
		render_conc(r, c->metals[m].symbol, c->metals[m].total_mM > 0 ? label : NULL,
			    c->metals[m].free_mM);
	}
	render_object_end(r);
	render_num(r, "osmolality_mOsm_kg", NULL, "mOsm/kg", st->osmolality_mOsm_kg, UNITS_DEC(0));
	render_range(r, "osmolality_range_mOsm_kg", NULL, "mOsm/kg", st->osmolality_lo_mOsm_kg,
		     st->osmolality_hi_mOsm_kg, UNITS_DEC(0));
	{
		/* one text line: the estimate, and the range the osmotic data allow
		 * when it shows at this precision */
		char osm[96];
		if (!isfinite(st->osmolality_mOsm_kg))
			snprintf(osm, sizeof osm, "-");
		else if (lround(st->osmolality_lo_mOsm_kg) != lround(st->osmolality_hi_mOsm_kg))
			snprintf(osm, sizeof osm, "%.0f mOsm/kg (%.0f to %.0f)",
				 st->osmolality_mOsm_kg, st->osmolality_lo_mOsm_kg,
				 st->osmolality_hi_mOsm_kg);
		else
			snprintf(osm, sizeof osm, "%.0f mOsm/kg", st->osmolality_mOsm_kg);
		render_str(r, NULL, "osmolality (estimate)", osm);
	}
	render_numj(r, "osmotic_coefficient", "osmotic coefficient", NULL, st->osmotic_coeff,
		    UNITS_DEC(3), 6);
	render_numj(r, "osmotic_fallback_fraction", NULL, NULL, st->osm_fallback_frac,
		    UNITS_DEC(2), 4);
	render_table(r, "metals", NULL);
	for (int m = 0; m < c->nmetals; m++) {
		render_row(r);
		render_str(r, "metal", NULL, c->metals[m].symbol);
		render_conc(r, "total_mM", NULL, c->metals[m].total_mM);
		render_conc(r, "free_mM", NULL, c->metals[m].free_mM);
		render_conc(r, "bound_mM", NULL, c->metals[m].bound_mM);
	}
	render_table_end(r);
	render_note_as(r, "warnings", "note: ", "%s",
		       s->co2_frac > 0 ? "pH from the CO2 equilibrium; an electrode reads it as "
					 "-log a(H+)"
				       : "pH from the protons present; an electrode reads it as "
					 "-log a(H+)");
	if (st->osm_fallback_frac > 0.05)
		render_note_as(r, "warnings", "note: ", "osmolality: %.0f %% of ion pairs lack "
			       "Pitzer parameters and count by Debye-Hueckel alone",
			       100 * st->osm_fallback_frac);
	for (int i = 0; i < c->nwarn; i++)
		render_note_as(r, "warnings", "note: ", "%s", c->warnings[i]);
}

static void show_charge(render *r, const sol_state *st)
{
	int ok = !unbalanced(st), idx[3];
	render_num(r, "net_charge_mEq_L", "net charge", "mEq/L", st->net_charge_mEq_L,
		   UNITS_DEC(2));
	render_bool(r, "electroneutral", NULL, ok);
	if (ok)
		return;
	excess_ions(st, idx);
	render_note_as(r, "cautions", "warning: ", "not electroneutral: %+.2f mEq/L of %s charge "
		       "(mostly %s%s%s%s%s) lacks counter-ions", st->net_charge_mEq_L,
		       st->net_charge_mEq_L > 0 ? "positive" : "negative",
		       idx[0] >= 0 ? st->sp[idx[0]].ion->symbol : "",
		       idx[1] >= 0 ? ", " : "", idx[1] >= 0 ? st->sp[idx[1]].ion->symbol : "",
		       idx[2] >= 0 ? ", " : "", idx[2] >= 0 ? st->sp[idx[2]].ion->symbol : "");
}

/* The targets of s: a table for JSON (kind, value, unit, with, at_C,
 * met, now) and a line each for the text, with the value at the recording
 * temperature beside a target set at another ("titrated to pH 7.30 at
 * 22.0 C; 7.14 at 35.0 C").  Also the targets command's list. */
static int show_targets(render *r, session *ses, const solution *s, const sol_state *st,
			int utf8, char *err)
{
	render_table(r, "targets", NULL);
	for (int k = 0; k < s->ntg; k++) {
		const sol_target *t = &s->tg[k];
		double now, here = NAN;
		int met;
		char d[160], h[64] = "";
		if (tg_check(s, t, ses_env(ses), &now, &met, err))
			return -1;
		if (st && t->kind == SOL_TG_PH)
			here = st->pH;
		else if (st && t->kind == SOL_TG_FREE)
			here = sol_state_free_mM(st, t->metal->symbol);
		else if (st)
			here = st->osmolality_mOsm_kg;
		render_row(r);
		render_str(r, "kind", NULL, t->kind == SOL_TG_PH ? "ph" : t->kind == SOL_TG_FREE
					       ? "free" : "osmo");
		if (t->metal)
			render_str(r, "metal", NULL, t->metal->symbol);
		render_numj(r, "value", NULL, NULL, t->value, UNITS_SIG(4), 10);
		render_str(r, "unit", NULL, tg_unit(t));
		render_str(r, "with", NULL, t->with->name);
		render_conc(r, "with_mM", NULL, sol_find((solution *)s, t->with)
						    ? sol_find((solution *)s, t->with)->mM : 0);
		render_numj(r, "at_C", NULL, NULL, t->at_C, UNITS_DEC(1), 6);
		render_bool(r, "met", NULL, met);
		render_numj(r, "now", NULL, NULL, now, UNITS_SIG(4), 8);
		tg_describe(t, d, sizeof d);
		if (st && t->at_C != st->t_C && t->kind == SOL_TG_PH)
			snprintf(h, sizeof h, "; %.2f at %.1f C", here, st->t_C);
		else if (st && t->at_C != st->t_C && t->kind == SOL_TG_FREE) {
			char c[48];
			units_fmt_conc(c, sizeof c, here, utf8);
			snprintf(h, sizeof h, "; %s at %.1f C", c, st->t_C);
		}
		else if (st && t->at_C != st->t_C)
			snprintf(h, sizeof h, "; %.0f mOsm/kg at %.1f C", here, st->t_C);
		render_str(r, NULL, "target", d);
		render_str(r, NULL, "", met ? "met" : "NOT met");
		if (st)
			render_str(r, NULL, "at the recording temperature", h[0] ? h + 2 : "");
	}
	render_table_end(r);
	return 0;
}

int cmd_targets(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	render *r;
	int k = -1;
	if (ses_solution(ctx->ses, NULL, &s, err))
		return -1;
	if (argc > 1 && !(argc == 3 && strcmp(argv[1], "drop") == 0))
		return im_fail(err, "usage: targets [drop NAME]");
	if (argc == 3 && (k = tg_find(s, argv[2])) < 0)
		return im_fail(err, "%s has no target '%.40s' (`targets` lists them)", s->name,
			       argv[2]);
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	if (k >= 0) {
		render_str(r, "dropped", NULL, tg_name(&s->tg[k]));
		render_text(r, "%s: target %s dropped; %s keeps its amount", s->name,
			    tg_name(&s->tg[k]), s->tg[k].with->name);
		tg_drop(s, k);
	}
	if (s->ntg == 0)
		render_text(r, "%s: no targets (`ph`, `free` and `osmo` set them)", s->name);
	if (show_targets(r, ctx->ses, s, NULL, ctx->out->utf8, err)) {
		render_drop(r);
		return -1;
	}
	return render_done(r);
}

int cmd_show(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	sol_state st;
	render *r;
	if (ses_solution(ctx->ses, argc > 1 ? argv[1] : NULL, &s, err) ||
	    ses_compute(ctx->ses, s, &st, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_num(r, "temperature_C", NULL, "C", st.t_C, UNITS_DEC(1));
	render_str(r, "activity_model", NULL, ses_model_key(st.model));
	render_text(r, "%s at %.1f C; activity coefficients: %s", s->name, st.t_C,
		    st.model == ACT_DAVIES ? "Davies" : "extended Debye-Hueckel (Kielland)");
	if (s->n == 0)
		render_text(r, "  (empty: add compounds with `add COMPOUND AMOUNT [UNIT]`)");
	show_compounds(r, s);
	if (s->n > 0) {
		show_species(r, &st);
		render_num(r, "ionic_strength_mM", "ionic strength", "mM", st.ionic_strength_mM,
			   UNITS_DEC(2));
		render_num(r, "osmolarity_mOsm_L", "osmolarity (ideal)", "mOsm/L",
			   st.osmolarity_mOsm_L, UNITS_DEC(1));
		if (st.chem)
			show_chemistry(r, s, &st);
		if (st.chem)
			render_numj(r, "pH_at_temperature", NULL, NULL, st.pH, UNITS_DEC(2), 6);
		if (s->ntg && show_targets(r, ctx->ses, s, &st, ctx->out->utf8, err)) {
			render_drop(r);
			sol_state_free(&st);
			return -1;
		}
		show_charge(r, &st);
		if (!st.chem)
			render_note(r, "buffers and chelators are taken as added (no pH or binding); "
				       "every salt dissociates fully");
	}
	sol_state_free(&st);
	return render_done(r);
}
