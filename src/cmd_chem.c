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
#include "targets.h"
#include "units.h"


static int need_chem(im_ctx *ctx, char *err)
{
	if (!ctx->ses->chem || !ctx->ses->osm)
		return im_fail(err, "the equilibria data are not loaded");
	return 0;
}

/* Finish a result with the compound's hazard, if it has one. */
static int done_caution(render *r, const rd_compound *c)
{
	if (c->hazard) {
		render_str(r, "caution", NULL, c->hazard);
		render_text(r, "caution, %s: %s", c->name, c->hazard);
	}
	return render_done(r);
}

/* The amount of c in s, mM (0 when absent). */
static double have(solution *s, const rd_compound *c)
{
	sol_item *it = sol_find(s, c);
	return it ? it->mM : 0;
}

/* A concentration with its unit, into b (48 bytes). */
static const char *conc(im_ctx *ctx, char *b, double mM)
{
	units_fmt_conc(b, 48, mM, ctx->out->utf8);
	return b;
}

/* The computed state of s at t_C, for checking a result forward. */
static int forward_at(im_ctx *ctx, const solution *s, double t_C, sol_state *st, char *err)
{
	sol_env e = *ses_env(ctx->ses);
	e.t_C = t_C;
	return sol_compute(s, &e, st, err);
}

/* The trailing `at C` of a target command: the temperature at which the
 * target holds (default: the current temperature); *argc loses the two
 * words. */
static int target_temp(im_ctx *ctx, int *argc, char **argv, double *t_C, char *err)
{
	*t_C = ctx->ses->temp_C;
	if (*argc < 3 || strcmp(argv[*argc - 2], "at") != 0)
		return 0;
	if (units_number(argv[*argc - 1], t_C, err))
		return -1;
	if (!(*t_C >= 0 && *t_C <= 60))
		return im_fail(err, "target temperature %s C is outside 0 to 60 C",
			       argv[*argc - 1]);
	*argc -= 2;
	return 0;
}

/* Put target t on s and solve all its targets; then the value it has now
 * at its temperature in *now. */
static int hold(im_ctx *ctx, solution *s, const sol_target *t, double *now, char *err)
{
	int met;
	if (tg_set(s, t, ses_env(ctx->ses), err))
		return -1;
	return tg_check(s, &s->tg[tg_find(s, tg_name(t))], ses_env(ctx->ses), now, &met, err);
}

/* The words of `ph TARGET with TITRANT [stock CONC [UNIT]]` (at C taken
 * off): the target and the stock (0: none). */
static int ph_args(im_ctx *ctx, int argc, char **argv, sol_target *t, double *stock,
		   char *err)
{
	if (argc != 4 && argc != 6 && argc != 7)
		return im_fail(err, "usage: ph TARGET with TITRANT [stock CONC [UNIT]] [at C]");
	if (units_number(argv[1], &t->value, err))
		return -1;
	if (t->value < 2 || t->value > 12)
		return im_fail(err, "target pH %s is outside 2 to 12", argv[1]);
	if (strcmp(argv[2], "with") != 0)
		return im_fail(err, "expected 'with', got '%.40s' (ph TARGET with TITRANT)", argv[2]);
	if (ses_compound(ctx->ses, argv[3], &t->with, err))
		return -1;
	if (argc > 4 && strcmp(argv[4], "stock") != 0)
		return im_fail(err, "expected 'stock', got '%.40s'", argv[4]);
	if (argc > 4 && units_amount_mM(argv[5], argc > 6 ? argv[6] : NULL, t->with->fw_g_mol,
					stock, err))
		return -1;
	t->kind = SOL_TG_PH;
	return 0;
}

int cmd_ph(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	sol_target t = {0};
	double stock = 0, amount, now;
	char b[48];
	render *r;
	if (need_chem(ctx, err) || ses_solution(ctx->ses, NULL, &s, err) ||
	    target_temp(ctx, &argc, argv, &t.at_C, err) || ph_args(ctx, argc, argv, &t, &stock, err))
		return -1;
	if (s->n == 0)
		return im_fail(err, "%s is empty: nothing to titrate", s->name);
	if (sol_find(s, t.with) && tg_of_compound(s, t.with) < 0)
		return im_fail(err, "%s is already in %s as an ingredient; titrate with another "
				    "compound or remove it", t.with->name, s->name);
	if (hold(ctx, s, &t, &now, err))
		return -1;
	amount = have(s, t.with);
	if (stock > 0 && stock <= amount)
		return im_fail(err, "a stock of %g mM %s is weaker than the %g mM needed", stock,
			       t.with->name, amount);
	if (stock > 0 && sol_find(s, t.with))
		sol_find(s, t.with)->stock_mM = stock;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_num(r, "temperature_C", NULL, "C", ctx->ses->temp_C, UNITS_DEC(1));
	render_numj(r, "target_pH", NULL, NULL, t.value, UNITS_DEC(2), 6);
	render_num(r, "at_C", NULL, "C", t.at_C, UNITS_DEC(1));
	render_str(r, "titrant", NULL, t.with->name);
	render_numj(r, "titrant_mM", NULL, "mM", amount, UNITS_SIG(4), 8);
	render_numj(r, "pH", NULL, NULL, now, UNITS_DEC(3), 6);
	render_text(r, "%s: %s %s brings the pH to %.2f at %.1f C (computed pH %.3f)", s->name,
		    conc(ctx, b, amount), t.with->name, t.value, t.at_C, now);
	if (stock > 0) {
		render_numj(r, "stock_mM", NULL, "mM", stock, UNITS_SIG(4), 8);
		render_numj(r, "stock_mL_per_L", NULL, "mL/L", 1000.0 * amount / stock, UNITS_SIG(3), 8);
		render_text(r, "  from the %s stock: %.3g mL per litre of final solution (`weigh` "
			       "gives it for your volume)", conc(ctx, b, stock), 1000.0 * amount / stock);
	}
	render_text(r, "  a target: solved again after every change; start from this amount and "
		       "finish with a calibrated pH meter (it reads -log a(H+))");
	return done_caution(r, t.with);
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
	if (tg_solve(s, ses_env(ctx->ses), err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_numj(r, "co2_percent", NULL, "%", 100 * frac, UNITS_SIG(3), 6);
	if (off) {
		render_text(r, "%s: no CO2 gas; the pH follows from the protons present", s->name);
		return render_done(r);
	}
	if (forward_at(ctx, s, t, &st, err)) {
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
	sol_state_free(&st);
	return render_done(r);
}

/* The words of `free METAL AMOUNT [UNIT] [with COMPOUND]` (at C taken
 * off) as a target; the source defaults to the metal's chloride. */
static int free_args(im_ctx *ctx, int argc, char **argv, sol_target *t, char *err)
{
	const char *unit = NULL;
	int i = 3, yields = 0;
	char name[64];
	t->kind = SOL_TG_FREE;
	t->metal = refdb_ion(ctx->ses->ref, argv[1]);
	if (!t->metal || t->metal->z != 2)
		return im_fail(err, "'%.20s' is not a divalent metal ionmix binds (Ca, Mg, Ba, Sr, "
				    "Zn)", argv[1]);
	if (argc > 3 && units_is_unit(argv[3])) {
		unit = argv[3];
		i = 4;
	}
	if (units_amount_mM(argv[2], unit, 0, &t->value, err))
		return -1;
	if (i < argc && (strcmp(argv[i], "with") != 0 || i + 2 != argc))
		return im_fail(err, "usage: free METAL AMOUNT [UNIT] [with COMPOUND] [at C]");
	snprintf(name, sizeof name, "%.*sCl2", (int)strcspn(t->metal->symbol, "0123456789+"),
		 t->metal->symbol);
	if (ses_compound(ctx->ses, i < argc ? argv[i + 1] : name, &t->with, err))
		return -1;
	for (int k = 0; k < t->with->nyields; k++)
		yields |= t->with->yields[k].ion == t->metal;
	if (!yields)
		return im_fail(err, "%s yields no %s", t->with->name, t->metal->symbol);
	return 0;
}

int cmd_free(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	sol_target t = {0};
	double got;
	char b[48], b2[48];
	sol_state st;
	render *r;
	if (need_chem(ctx, err) || ses_solution(ctx->ses, NULL, &s, err) ||
	    target_temp(ctx, &argc, argv, &t.at_C, err) || free_args(ctx, argc, argv, &t, err))
		return -1;
	if (hold(ctx, s, &t, &got, err))
		return -1;
	if (forward_at(ctx, s, t.at_C, &st, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_str(r, "metal", NULL, t.metal->symbol);
	render_conc(r, "target_mM", NULL, t.value);
	render_num(r, "at_C", NULL, "C", t.at_C, UNITS_DEC(1));
	render_str(r, "compound", NULL, t.with->name);
	render_conc(r, "added_mM", NULL, have(s, t.with));
	render_conc(r, "free_mM", NULL, got);
	render_numj(r, "pH", NULL, NULL, st.pH, UNITS_DEC(2), 6);
	render_text(r, "%s: %s %s in all gives free %s %s at pH %.2f, %.1f C", s->name,
		    conc(ctx, b, have(s, t.with)), t.with->name,
		    t.metal->symbol, conc(ctx, b2, got), st.pH, t.at_C);
	if (isfinite(s->ph_target))
		render_text(r, "  (the titrant was recomputed to hold pH %.2f)", s->ph_target);
	for (int k = 0; st.chem && k < st.chem->nwarn; k++)
		render_note(r, "%s", st.chem->warnings[k]);
	sol_state_free(&st);
	return done_caution(r, t.with);
}

int cmd_osmo(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	sol_target t = {.kind = SOL_TG_OSMO};
	double after, lo, hi;
	char b[48];
	sol_state st;
	render *r;
	if (need_chem(ctx, err) || ses_solution(ctx->ses, NULL, &s, err) ||
	    target_temp(ctx, &argc, argv, &t.at_C, err) || units_number(argv[1], &t.value, err))
		return -1;
	if (!(t.value > 0 && t.value <= 2000))
		return im_fail(err, "osmolality target %s mOsm/kg must be above 0 and at most 2000",
			       argv[1]);
	if (!((argc == 4 && strcmp(argv[2], "with") == 0) || argc == 2))
		return im_fail(err, "usage: osmo TARGET [with COMPOUND] [at C]");
	if (ses_compound(ctx->ses, argc == 4 ? argv[3] : "sucrose", &t.with, err))
		return -1;
	if (s->n == 0)
		return im_fail(err, "%s is empty", s->name);
	if (hold(ctx, s, &t, &after, err) || forward_at(ctx, s, t.at_C, &st, err))
		return -1;
	lo = st.osmolality_lo_mOsm_kg;
	hi = st.osmolality_hi_mOsm_kg;
	sol_state_free(&st);
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_numj(r, "target_mOsm_kg", NULL, "mOsm/kg", t.value, UNITS_DEC(1), 8);
	render_num(r, "at_C", NULL, "C", t.at_C, UNITS_DEC(1));
	render_str(r, "compound", NULL, t.with->name);
	render_conc(r, "added_mM", NULL, have(s, t.with));
	render_numj(r, "after_mOsm_kg", NULL, "mOsm/kg", after, UNITS_DEC(1), 8);
	render_range(r, "osmolality_range_mOsm_kg", NULL, "mOsm/kg", lo, hi, UNITS_DEC(0));
	render_text(r, "%s: %s %s in all gives %.1f mOsm/kg at %.1f C (Pitzer estimate)",
		    s->name, conc(ctx, b, have(s, t.with)), t.with->name,
		    after, t.at_C);
	if (lround(lo) != lround(hi))
		render_text(r, "  aimed at the central estimate; the osmotic data allow %.0f to %.0f "
			       "mOsm/kg", lo, hi);
	render_text(r, "  hint: a pipette solution is usually made a little (about 5 to 15 "
		       "mOsm/kg) below the bath (common practice); check with an osmometer");
	return render_done(r);
}

#define MAX_CONST 160

/* One stored constant as a row: the JSON keys of every row (the value
 * under "value", the key "pKa" or "log_K" as null naming its kind) and
 * the text columns. */
static void constant_row(render *r, const refdb *ref, const spec_const *c)
{
	const rd_source *src = refdb_source(ref, c->source);
	const rd_source *ds = c->dh_source[0] ? refdb_source(ref, c->dh_source) : NULL;
	char dh[48] = "-", val[24];
	if (isfinite(c->dh_kJ_mol))
		snprintf(dh, sizeof dh, "%+.1f%s%s", c->dh_kJ_mol, c->dh_analogue[0] ? " as " : "",
			 c->dh_analogue);
	else if (isfinite(c->dpka_dt_per_K))
		snprintf(dh, sizeof dh, "dpKa/dT %+.4f", c->dpka_dt_per_K);
	snprintf(val, sizeof val, "%s %5.2f", c->is_pka ? "pKa" : "logK", c->value);
	render_row(r);
	render_str(r, "species", "species", c->what);
	render_str(r, "reaction", "reaction", c->reaction);
	render_str(r, c->is_pka ? "pKa" : "log_K", NULL, NULL);
	render_numj(r, "value", NULL, NULL, c->value, UNITS_DEC(2), 6);
	render_str(r, NULL, "value", val);
	render_numj(r, "t_ref_C", "t C", NULL, c->t_ref_C, UNITS_DEC(1), 6);
	render_numj(r, "i_ref_M", "I M", NULL, c->i_ref_M, UNITS_DEC(3), 6);
	render_numj(r, "dH_kJ_mol", NULL, NULL, c->dh_kJ_mol, UNITS_DEC(1), 6);
	render_str(r, NULL, "dH kJ/mol", dh);
	render_str(r, "dH_analogue", NULL, c->dh_analogue[0] ? c->dh_analogue : NULL);
	render_str(r, "dH_source", NULL, ds ? ds->citation : NULL);
	render_str(r, "compilation", "compilation", c->compilation);
	render_bool(r, "in_use", NULL, c->in_use);
	render_str(r, NULL, "in use", c->in_use ? "*" : "");
	render_str(r, "source", NULL, src ? src->citation : c->source);
}

/* Every source of rows once, the constants' then the enthalpies'. */
static void constant_sources(render *r, const refdb *ref, const spec_const *rows, int n)
{
	for (int i = 0; i < 2 * n; i++) {
		const char *key = i < n ? rows[i].source : rows[i - n].dh_source;
		const rd_source *src = *key ? refdb_source(ref, key) : NULL;
		int dup = 0;
		for (int j = 0; j < i; j++)
			dup |= strcmp(j < n ? rows[j].source : rows[j - n].dh_source, key) == 0;
		if (!dup && src)
			render_text(r, "  [%s] %s%s", src->id, src->citation,
				    src->from_memory ? " [from memory]" : "");
	}
}

/* `constants`: the compilations; `constants default`; `constants NAME`:
 * pick a compilation and/or list the constants of a ligand or metal. */
int cmd_constants(im_ctx *ctx, int argc, char **argv, char *err)
{
	char comp[32][32];
	const char *names[32];
	int nc, picked = 0, n;
	spec_const *rows;
	render *r;
	if (need_chem(ctx, err))
		return -1;
	nc = spec_compilations(ctx->ses->chem, ctx->ses->osm, comp, 32);
	for (int i = 0; i < nc; i++) {
		names[i] = comp[i];
		picked |= argc > 1 && strcmp(comp[i], argv[1]) == 0;
	}
	if (argc > 1 && (picked || strcmp(argv[1], "default") == 0) &&
	    spec_pick_compilation(ctx->ses->chem, ctx->ses->osm, argv[1], err))
		return -1;
	rows = im_xcalloc(MAX_CONST, sizeof *rows);
	n = argc > 1 && strcmp(argv[1], "default") != 0
		    ? spec_constants(ctx->ses->chem, argv[1], rows, MAX_CONST, err) : 0;
	if (n < 0 && !picked) {
		free(rows);
		return -1;
	}
	r = render_new(ctx->out);
	if (argc == 1) {
		render_text(r, "compilations of constants (pick one with `constants NAME`, "
			       "`constants default` to go back):");
		for (int i = 0; i < nc; i++)
			render_text(r, "  %s", comp[i]);
		render_list(r, "compilations", NULL, names, nc);
		render_text(r, "list the constants of a ligand or metal with `constants EGTA`, "
			       "`constants Ca2+`");
	} else {
		render_str(r, "name", NULL, argv[1]);
		render_bool(r, "picked", NULL, picked);
	}
	if (argc > 1 && strcmp(argv[1], "default") == 0)
		render_text(r, "constants: every default in use again");
	else if (picked)
		render_text(r, "constants: using %s where it has a value (the others keep their "
			       "defaults)", argv[1]);
	if (argc > 1 && strcmp(argv[1], "default") != 0) {
		render_table(r, "constants", NULL);
		for (int i = 0; i < n; i++)
			constant_row(r, ctx->ses->ref, &rows[i]);
		render_table_end(r);
		render_text(r, "  (dH 'as X': estimated, taken from the analogous reaction X)");
		constant_sources(r, ctx->ses->ref, rows, n > 0 ? n : 0);
	}
	free(rows);
	return render_done(r);
}
