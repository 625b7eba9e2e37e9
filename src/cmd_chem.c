/*
 * cmd_chem.c - `ph`, `gas`, `free`, `osmo` and `constants`.
 *
 * Each changes the current solution only when it succeeds (cmd_exec rolls
 * the workspace back on failure), and checks its result by computing the
 * solution forward again with sol_compute, the same path `show` takes.
 */
#include "cmd_chem.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "render.h"
#include "session.h"
#include "common.h"
#include "units.h"

#define MAX_YIELD 16

static int need_chem(im_ctx *ctx, char *err)
{
	if (!ctx->ses->chem || !ctx->ses->osm)
		return im_fail(err, "the equilibria data are not loaded");
	return 0;
}

/* A compound's yields as speciation inputs (count per formula unit). */
static int yields_in(const rd_compound *c, spec_in *in)
{
	int n = 0;
	for (int k = 0; k < c->nyields && n < MAX_YIELD; k++)
		in[n++] = (spec_in){c->yields[k].ion->symbol, c->yields[k].ion->z,
				    c->yields[k].count};
	return n;
}

static void caution_of(im_ctx *ctx, const rd_compound *c)
{
	if (c->hazard)
		out_printf(ctx->out, "caution, %s: %s\n", c->name, c->hazard);
}

/* Remove the titrant items of s; returns the compound they were, or NULL. */
static const rd_compound *drop_titrant(solution *s, double *stock_mM)
{
	const rd_compound *c = NULL;
	for (int i = s->n - 1; i >= 0; i--)
		if (s->items[i].titrant) {
			c = s->items[i].c;
			*stock_mM = s->items[i].stock_mM;
			sol_remove(s, c);
		}
	return c;
}

/* Titrate s (without its old titrant) to pH with titrant; add it as a
 * titrant item.  *amount_mM gets what was added. */
static int titrate(im_ctx *ctx, solution *s, double pH, const rd_compound *titrant,
		   double stock_mM, double *amount_mM, char *err)
{
	spec_in in[SPEC_MAX_IN], tit[MAX_YIELD];
	spec_cond cond;
	spec_result *r;
	int n, nt, rc;
	double old_stock = 0;
	drop_titrant(s, &old_stock);
	if (sol_find(s, titrant))
		return im_fail(err, "%s is already in %s as an ingredient; titrate with another "
				    "compound or remove it", titrant->name, s->name);
	if ((n = sol_spec_inputs(s, 1, in, SPEC_MAX_IN, err)) < 0)
		return -1;
	nt = yields_in(titrant, tit);
	sol_spec_cond(s, ses_env(ctx->ses), &cond);
	cond.mode = SPEC_PH_FIXED;
	cond.pH = pH;
	r = im_xmalloc(sizeof *r);
	rc = spec_titrate(ctx->ses->chem, in, n, &cond, tit, nt, amount_mM, r, err);
	free(r);
	if (rc)
		return -1;
	if (*amount_mM > 1e-9) {
		sol_add(s, titrant, *amount_mM);
		sol_find(s, titrant)->titrant = 1;
		sol_find(s, titrant)->stock_mM = stock_mM > 0 ? stock_mM : old_stock;
	}
	s->ph_target = pH;
	return 0;
}

/* The computed state of s, for checking a result forward. */
static int forward(im_ctx *ctx, const solution *s, sol_state *st, char *err)
{
	return sol_compute(s, ses_env(ctx->ses), st, err);
}

int cmd_ph(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	const rd_compound *t;
	double pH, amount = 0, stock = 0;
	sol_state st;
	char b[48];
	if (need_chem(ctx, err) || ses_solution(ctx->ses, NULL, &s, err))
		return -1;
	if (argc != 4 && argc != 6 && argc != 7)
		return im_fail(err, "usage: ph TARGET with TITRANT [stock CONC [UNIT]]");
	if (units_number(argv[1], &pH, err))
		return -1;
	if (pH < 2 || pH > 12)
		return im_fail(err, "target pH %s is outside 2 to 12", argv[1]);
	if (strcmp(argv[2], "with") != 0)
		return im_fail(err, "expected 'with', got '%.40s' (ph TARGET with TITRANT)", argv[2]);
	if (ses_compound(ctx->ses, argv[3], &t, err))
		return -1;
	if (argc > 4) {
		if (strcmp(argv[4], "stock") != 0)
			return im_fail(err, "expected 'stock', got '%.40s'", argv[4]);
		if (units_amount_mM(argv[5], argc > 6 ? argv[6] : NULL, t->fw_g_mol, &stock, err))
			return -1;
	}
	if (s->co2_frac > 0)
		return im_fail(err, "the pH of %s is set by its CO2 gas and bicarbonate: change "
				    "those, or `gas off` first", s->name);
	if (s->n == 0)
		return im_fail(err, "%s is empty: nothing to titrate", s->name);
	if (titrate(ctx, s, pH, t, stock, &amount, err))
		return -1;
	if (stock > 0 && stock <= amount)
		return im_fail(err, "a stock of %s %s is weaker than the %g mM needed", argv[5],
			       argc > 6 ? argv[6] : "mM", amount);
	if (forward(ctx, s, &st, err))
		return -1;
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "solution", s->name);
		jw_num(&w, "temperature_C", ctx->ses->temp_C, 6);
		jw_num(&w, "target_pH", pH, 6);
		jw_str(&w, "titrant", t->name);
		jw_num(&w, "titrant_mM", amount, 8);
		jw_num(&w, "pH", st.pH, 6);
		if (stock > 0) {
			jw_num(&w, "stock_mM", stock, 8);
			jw_num(&w, "stock_mL_per_L", 1000.0 * amount / stock, 8);
		}
		if (t->hazard)
			jw_str(&w, "caution", t->hazard);
		jw_end(&w);
	} else {
		units_fmt_conc(b, sizeof b, amount, ctx->out->utf8);
		out_printf(ctx->out, "%s: %s %s brings the pH to %.2f at %.1f C (computed pH "
				     "%.3f)\n", s->name, b, t->name, pH, ctx->ses->temp_C, st.pH);
		if (stock > 0) {
			char sb[48];
			units_fmt_conc(sb, sizeof sb, stock, ctx->out->utf8);
			out_printf(ctx->out, "  from the %s stock: %.3g mL per litre of final "
					     "solution (`weigh` gives it for your volume)\n", sb,
				   1000.0 * amount / stock);
		}
		out_printf(ctx->out, "  start from this amount and finish with a calibrated pH "
				     "meter: the pH here is what an electrode reads, -log a(H+)\n");
		caution_of(ctx, t);
	}
	sol_state_free(&st);
	return 0;
}

/* The words of `gas co2 PERCENT [dry] [pressure ATM]`: the fraction
 * (0-1), the total pressure in atm and whether the gas is dry. */
static int gas_args(int argc, char **argv, double *frac, double *p_atm, int *dry, char *err)
{
	char num[32];
	double pct;
	*p_atm = 1.0;
	*dry = 0;
	if (!im_strcaseeq(argv[1], "co2") || argc < 3)
		return im_fail(err, "usage: gas co2 PERCENT [dry] [pressure ATM] | gas off");
	snprintf(num, sizeof num, "%s", argv[2]);
	if (num[0] && num[strlen(num) - 1] == '%')
		num[strlen(num) - 1] = '\0';
	if (units_number(num, &pct, err))
		return -1;
	if (units_in_range(num, pct, 0.01, 100, "CO2 fraction", "%", err))
		return -1;
	for (int i = 3; i < argc; i++) {
		if (strcmp(argv[i], "dry") == 0) {
			*dry = 1;
		} else if (strcmp(argv[i], "pressure") == 0 && i + 1 < argc) {
			if (units_number(argv[++i], p_atm, err))
				return -1;
			if (!(*p_atm > 0.1 && *p_atm <= 5))
				return im_fail(err, "gas pressure %s atm is outside 0.1 to 5 atm", argv[i]);
		} else {
			return im_fail(err, "unexpected '%.40s' (gas co2 PERCENT [dry] [pressure ATM])",
				       argv[i]);
		}
	}
	*frac = pct / 100.0;
	return 0;
}

int cmd_gas(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	sol_state st;
	double frac = 0, p = 1.0, pco2, t = ctx->ses->temp_C;
	int dry = 0, off = strcmp(argv[1], "off") == 0 && argc == 2;
	render *r;
	if (ses_solution(ctx->ses, NULL, &s, err) ||
	    (!off && (gas_args(argc, argv, &frac, &p, &dry, err) || need_chem(ctx, err))))
		return -1;
	s->co2_frac = frac;
	s->co2_p_atm = p;
	s->co2_dry = dry;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_numj(r, "co2_percent", NULL, "%", 100 * frac, UNITS_SIG(3), 6);
	if (off) {
		render_text(r, "%s: no CO2 gas; the pH follows from the protons present", s->name);
		return render_done(r);
	}
	if (forward(ctx, s, &st, err)) {
		render_drop(r);
		return -1;
	}
	pco2 = spec_pco2_atm(frac, p, t, !dry);
	render_numj(r, "pco2_atm", NULL, "atm", pco2, UNITS_DEC(4), 6);
	render_numj(r, "pressure_atm", NULL, "atm", p, UNITS_SIG(3), 6);
	render_bool(r, "dry", NULL, dry);
	render_numj(r, "pH", NULL, NULL, st.pH, UNITS_DEC(2), 6);
	double co2_mM = st.chem ? st.chem->co2_mM : NAN;
	double pk = spec_co2_pk_app(ctx->ses->chem, t, st.pH, st.ionic_strength_mM);
	render_numj(r, "co2_mM", NULL, "mM", co2_mM, UNITS_DEC(3), 6);
	render_numj(r, "pK_app", NULL, NULL, pk, UNITS_DEC(3), 6);
	render_text(r, "%s: equilibrated with %g %% CO2 (%s, %g atm; pCO2 %.4f atm at %.1f C): "
		       "pH %.2f", s->name, 100 * frac, dry ? "dry gas" : "humidified", p, pco2, t,
		    st.pH);
	render_note_as(r, "notes", "", "(CO2 %.3f mM; apparent pK' %.3f at this temperature and "
		       "ionic strength, Severinghaus 1966, CO2 solubility of Kelman 1967; confirm "
		       "with a calibrated pH meter)", co2_mM, pk);
	if (isfinite(s->ph_target))
		render_note(r, "the titrant added by `ph` stays in; with the gas the pH no longer "
			       "follows it");
	sol_state_free(&st);
	return render_done(r);
}

/* Free concentration of metal in a computed state, mM (-1 if absent). */
static double free_of(const sol_state *st, const char *metal)
{
	if (!st->chem)
		return -1;
	for (int m = 0; m < st->chem->nmetals; m++)
		if (strcmp(st->chem->metals[m].symbol, metal) == 0)
			return st->chem->metals[m].free_mM;
	return -1;
}

int cmd_free(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	const rd_ion *metal;
	const rd_compound *src = NULL;
	double target, amount = 0, got;
	const char *unit = NULL;
	int i = 3, yields_metal = 0;
	char name[64], b1[48], b2[48];
	sol_state st;
	if (need_chem(ctx, err) || ses_solution(ctx->ses, NULL, &s, err))
		return -1;
	metal = refdb_ion(ctx->ses->ref, argv[1]);
	if (!metal || metal->z != 2)
		return im_fail(err, "'%.20s' is not a divalent metal ionmix binds (Ca, Mg, Ba, Sr, "
				    "Zn)", argv[1]);
	if (argc > 3 && units_is_unit(argv[3])) {
		unit = argv[3];
		i = 4;
	}
	if (units_amount_mM(argv[2], unit, 0, &target, err))
		return -1;
	if (i < argc) {
		if (strcmp(argv[i], "with") != 0 || i + 2 != argc)
			return im_fail(err, "usage: free METAL AMOUNT [UNIT] [with COMPOUND]");
		if (ses_compound(ctx->ses, argv[i + 1], &src, err))
			return -1;
	} else {
		size_t b = strcspn(metal->symbol, "0123456789+");
		snprintf(name, sizeof name, "%.*sCl2", (int)b, metal->symbol);
		if (ses_compound(ctx->ses, name, &src, err))
			return -1;
	}
	for (int k = 0; k < src->nyields; k++)
		yields_metal |= src->yields[k].ion == metal;
	if (!yields_metal)
		return im_fail(err, "%s yields no %s", src->name, metal->symbol);
	if (s->co2_frac > 0 && isfinite(s->ph_target))
		return im_fail(err, "%s has both a titrant and CO2 gas: remove one first", s->name);

	/* the total of src that gives the target: solve with src taken out;
	 * with a titrant, hold the target pH and titrate again, until both
	 * settle (they couple only through the ionic strength and the protons
	 * the metal frees from the chelators) */
	sol_remove(s, src);
	for (int iter = 0; iter < 12; iter++) {
		spec_in in[SPEC_MAX_IN], sy[MAX_YIELD];
		spec_cond cond;
		spec_result *r = im_xmalloc(sizeof *r);
		int n = sol_spec_inputs(s, 0, in, SPEC_MAX_IN, err), ns = yields_in(src, sy), rc;
		double prev = amount;
		if (n < 0) {
			free(r);
			return -1;
		}
		sol_spec_cond(s, ses_env(ctx->ses), &cond);
		if (isfinite(s->ph_target) && s->co2_frac == 0) {
			cond.mode = SPEC_PH_FIXED;
			cond.pH = s->ph_target;
		}
		rc = spec_free_target(ctx->ses->chem, in, n, &cond, metal->symbol, sy, ns, target,
				      &amount, r, err);
		free(r);
		if (rc)
			return -1;
		sol_remove(s, src);
		if (amount > 0)
			sol_add(s, src, amount);
		if (!isfinite(s->ph_target) || s->co2_frac > 0)
			break;
		{
			const rd_compound *t = NULL;
			double stock = 0, tm;
			for (int k = 0; k < s->n; k++)
				if (s->items[k].titrant) {
					t = s->items[k].c;
					stock = s->items[k].stock_mM;
				}
			if (!t)
				break;
			if (titrate(ctx, s, s->ph_target, t, stock, &tm, err))
				return -1;
		}
		if (iter > 0 && fabs(amount - prev) <= 1e-12 * amount)
			break;
		sol_remove(s, src); /* solved again with the new titrant */
	}
	if (forward(ctx, s, &st, err))
		return -1;
	got = free_of(&st, metal->symbol);
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "solution", s->name);
		jw_str(&w, "metal", metal->symbol);
		jw_num(&w, "target_mM", target, 8);
		jw_str(&w, "compound", src->name);
		jw_num(&w, "added_mM", amount, 8);
		jw_num(&w, "free_mM", got, 8);
		jw_num(&w, "pH", st.pH, 6);
		jw_end(&w);
	} else {
		units_fmt_conc(b1, sizeof b1, amount, ctx->out->utf8);
		units_fmt_conc(b2, sizeof b2, got, ctx->out->utf8);
		out_printf(ctx->out, "%s: %s %s in all gives free %s %s at pH %.2f, %.1f C\n",
			   s->name, b1, src->name, metal->symbol, b2, st.pH, ctx->ses->temp_C);
		if (isfinite(s->ph_target) && s->co2_frac == 0)
			out_printf(ctx->out, "  (the titrant was recomputed to hold pH %.2f)\n",
				   s->ph_target);
		for (int k = 0; st.chem && k < st.chem->nwarn; k++)
			out_printf(ctx->out, "  note: %s\n", st.chem->warnings[k]);
		caution_of(ctx, src);
	}
	sol_state_free(&st);
	return 0;
}

/* Osmolality of s, mOsm/kg, computed forward. */
static int osmolality(im_ctx *ctx, const solution *s, double *v, char *err)
{
	sol_state st;
	if (forward(ctx, s, &st, err))
		return -1;
	*v = st.osmolality_mOsm_kg;
	sol_state_free(&st);
	if (!isfinite(*v))
		return im_fail(err, "no osmolality estimate for %s", s->name);
	return 0;
}

/* The range the osmotic data allow for s, mOsm/kg. */
static int osmolality_range(im_ctx *ctx, const solution *s, double *lo, double *hi,
			    char *err)
{
	sol_state st;
	if (forward(ctx, s, &st, err))
		return -1;
	*lo = st.osmolality_lo_mOsm_kg;
	*hi = st.osmolality_hi_mOsm_kg;
	sol_state_free(&st);
	return 0;
}

struct osmo_eval {
	im_ctx *ctx;
	solution *s;
	const rd_compound *c;
	double base_mM;
};

/* osm_target_solve's evaluation: the compound at base + add_mM, forward */
static int osmo_eval_at(void *v, double add_mM, double *osm, char *err)
{
	struct osmo_eval *e = v;
	sol_set(e->s, e->c, e->base_mM + add_mM);
	return osmolality(e->ctx, e->s, osm, err);
}

int cmd_osmo(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	const rd_compound *c = NULL;
	double target, before, after, add = 0, lo = NAN, hi = NAN;
	int dilute = 0;
	double water = 0;
	char b[48];
	if (need_chem(ctx, err) || ses_solution(ctx->ses, NULL, &s, err))
		return -1;
	if (units_number(argv[1], &target, err))
		return -1;
	if (!(target > 0 && target <= 2000))
		return im_fail(err, "osmolality target %s mOsm/kg must be above 0 and at most 2000",
			       argv[1]);
	if (argc == 4 && strcmp(argv[2], "with") == 0) {
		if (ses_compound(ctx->ses, argv[3], &c, err))
			return -1;
	} else if (argc == 2) {
		if (ses_compound(ctx->ses, "sucrose", &c, err))
			return -1;
	} else {
		return im_fail(err, "usage: osmo TARGET [with COMPOUND]");
	}
	if (s->n == 0)
		return im_fail(err, "%s is empty", s->name);
	if (osmolality(ctx, s, &before, err))
		return -1;
	if (before > target) {
		/* water per litre: osmolality scales as 1/(1 + w) at fixed
		 * speciation (volumes additive) */
		dilute = 1;
		water = 1000.0 * (before / target - 1.0);
		after = target;
	} else {
		sol_state st;
		osm_species sp[SPEC_MAX_OUT], ad[MAX_YIELD];
		osm_adjust_result r;
		int n = 0, na = 0;
		if (forward(ctx, s, &st, err))
			return -1;
		for (int j = 0; j < st.n && n < SPEC_MAX_OUT; j++)
			sp[n++] = (osm_species){st.sp[j].ion->symbol, st.sp[j].ion->z, st.sp[j].mM};
		for (int k = 0; k < c->nyields && na < MAX_YIELD; k++)
			ad[na++] = (osm_species){c->yields[k].ion->symbol, c->yields[k].ion->z,
						 c->yields[k].count};
		if (osm_adjust(ctx->ses->osm, sp, n, ctx->ses->temp_C, target, ad, na, &r, err)) {
			sol_state_free(&st);
			return -1;
		}
		sol_state_free(&st);
		add = r.add_mM;
		/* polish against the full forward computation (the added
		 * compound may react, and shifts the ionic strength); a compound
		 * already in the solution keeps its amount, the solve is on what
		 * is added to it */
		struct osmo_eval e = {ctx, s, c, sol_find(s, c) ? sol_find(s, c)->mM : 0};
		if (osm_target_solve(osmo_eval_at, &e, target, before, add, &add, &after, err))
			return -1;
	}
	if (osmolality_range(ctx, s, &lo, &hi, err))
		return -1;
	if (dilute) { /* the range of the diluted solution */
		lo *= target / before;
		hi *= target / before;
	}
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "solution", s->name);
		jw_num(&w, "target_mOsm_kg", target, 8);
		jw_num(&w, "before_mOsm_kg", before, 8);
		if (dilute) {
			jw_num(&w, "dilute_mL_per_L", water, 6);
		} else {
			jw_str(&w, "compound", c->name);
			jw_num(&w, "added_mM", add, 8);
		}
		jw_num(&w, "after_mOsm_kg", after, 8);
		jw_arr(&w, "osmolality_range_mOsm_kg");
		jw_num(&w, NULL, lo, 6);
		jw_num(&w, NULL, hi, 6);
		jw_close(&w);
		jw_end(&w);
		return 0;
	}
	if (dilute) {
		out_printf(ctx->out, "%s: %.0f mOsm/kg is above the target %.0f: add %.1f mL of "
				     "water per litre (or make the main salt less concentrated)\n",
			   s->name, before, target, water);
	} else {
		units_fmt_conc(b, sizeof b, add, ctx->out->utf8);
		out_printf(ctx->out, "%s: added %s %s: %.0f -> %.1f mOsm/kg (Pitzer estimate)\n",
			   s->name, b, c->name, before, after);
	}
	if (lround(lo) != lround(hi))
		out_printf(ctx->out, "  aimed at the central estimate; the osmotic data allow %.0f to "
				     "%.0f mOsm/kg\n", lo, hi);
	out_printf(ctx->out, "  hint: a pipette solution is usually made a little (about 5 to 15 "
			     "mOsm/kg) below the bath (common practice); check with an osmometer\n");
	return 0;
}

#define MAX_CONST 160

int cmd_constants(im_ctx *ctx, int argc, char **argv, char *err)
{
	char comp[32][32];
	int nc, picked = 0, n;
	spec_const *rows;
	if (need_chem(ctx, err))
		return -1;
	nc = spec_compilations(ctx->ses->chem, ctx->ses->osm, comp, 32);
	if (argc == 1) {
		if (ctx->out->json) {
			jw w;
			jw_begin(&w, ctx->out);
			jw_arr(&w, "compilations");
			for (int i = 0; i < nc; i++)
				jw_str(&w, NULL, comp[i]);
			jw_end(&w);
			return 0;
		}
		out_printf(ctx->out, "compilations of constants (pick one with `constants NAME`, "
				     "`constants default` to go back):\n");
		for (int i = 0; i < nc; i++)
			out_printf(ctx->out, "  %s\n", comp[i]);
		out_printf(ctx->out, "list the constants of a ligand or metal with `constants EGTA`, "
				     "`constants Ca2+`\n");
		return 0;
	}
	if (strcmp(argv[1], "default") == 0) {
		if (spec_pick_compilation(ctx->ses->chem, ctx->ses->osm, "default", err))
			return -1;
		render *r = render_new(ctx->out);
		render_str(r, "name", NULL, "default");
		render_bool(r, "picked", NULL, 0);
		render_text(r, "constants: every default in use again");
		return render_done(r);
	}
	for (int i = 0; i < nc; i++)
		if (strcmp(comp[i], argv[1]) == 0) {
			if (spec_pick_compilation(ctx->ses->chem, ctx->ses->osm, argv[1], err))
				return -1;
			picked = 1;
		}
	rows = im_xcalloc(MAX_CONST, sizeof *rows);
	n = spec_constants(ctx->ses->chem, argv[1], rows, MAX_CONST, err);
	if (n < 0 && !picked) {
		free(rows);
		return -1;
	}
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "name", argv[1]);
		jw_bool(&w, "picked", picked);
		jw_arr(&w, "constants");
		for (int i = 0; i < n; i++) {
			const rd_source *src = refdb_source(ctx->ses->ref, rows[i].source);
			jw_obj(&w, NULL);
			jw_str(&w, "species", rows[i].what);
			jw_str(&w, "reaction", rows[i].reaction);
			jw_str(&w, rows[i].is_pka ? "pKa" : "log_K", NULL);
			jw_num(&w, "value", rows[i].value, 6);
			jw_num(&w, "t_ref_C", rows[i].t_ref_C, 6);
			jw_num(&w, "i_ref_M", rows[i].i_ref_M, 6);
			jw_num(&w, "dH_kJ_mol", rows[i].dh_kJ_mol, 6);
			jw_str(&w, "dH_analogue", rows[i].dh_analogue[0] ? rows[i].dh_analogue : NULL);
			{
				const rd_source *ds = rows[i].dh_source[0]
							      ? refdb_source(ctx->ses->ref, rows[i].dh_source)
							      : NULL;
				jw_str(&w, "dH_source", ds ? ds->citation : NULL);
			}
			jw_str(&w, "compilation", rows[i].compilation);
			jw_bool(&w, "in_use", rows[i].in_use);
			jw_str(&w, "source", src ? src->citation : rows[i].source);
			jw_close(&w);
		}
		jw_end(&w);
		free(rows);
		return 0;
	}
	if (picked)
		out_printf(ctx->out, "constants: using %s where it has a value (the others keep "
				     "their defaults)\n", argv[1]);
	out_printf(ctx->out, "  %-14s %-30s %8s %6s %6s %-18s %-16s %s\n", "species", "reaction",
		   "value", "t C", "I M", "dH kJ/mol", "compilation", "in use");
	for (int i = 0; i < n; i++) {
		char dh[40] = "-";
		if (isfinite(rows[i].dh_kJ_mol))
			snprintf(dh, sizeof dh, "%+.1f%s%s", rows[i].dh_kJ_mol,
				 rows[i].dh_analogue[0] ? " as " : "", rows[i].dh_analogue);
		else if (isfinite(rows[i].dpka_dt_per_K))
			snprintf(dh, sizeof dh, "dpKa/dT %+.4f", rows[i].dpka_dt_per_K);
		out_printf(ctx->out, "  %-14s %-30s %5s %5.2f %6.1f %6.3f %-18s %-16s %s\n",
			   rows[i].what, rows[i].reaction, rows[i].is_pka ? "pKa" : "logK",
			   rows[i].value, rows[i].t_ref_C, rows[i].i_ref_M, dh,
			   rows[i].compilation, rows[i].in_use ? "*" : "");
	}
	out_printf(ctx->out, "  (dH 'as X': estimated, taken from the analogous reaction X)\n");
	/* every source once: the constants', then the enthalpies' */
	for (int i = 0; i < 2 * n; i++) {
		const char *key = i < n ? rows[i].source : rows[i - n].dh_source;
		const rd_source *src = *key ? refdb_source(ctx->ses->ref, key) : NULL;
		int dup = 0;
		for (int j = 0; j < i; j++)
			dup |= strcmp(j < n ? rows[j].source : rows[j - n].dh_source, key) == 0;
		if (!dup && src)
			out_printf(ctx->out, "  [%s] %s%s\n", src->id, src->citation,
				   src->from_memory ? " [from memory]" : "");
	}
	free(rows);
	return 0;
}
