/*
 * cmd_core.c - handlers of the core commands.  They parse arguments, call
 * the calculators and hand results to the output writer; no physics here.
 */
#include "cmd_core.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "ljp.h"
#include "nernst.h"
#include "units.h"
#include "userdb.h"
#include "version.h"
#include "weigh.h"
#include "benchsheet.h"
#include "fileio.h"
#include "cmd_correct.h"

/* ---- shared helpers ---- */

int core_solution(im_ctx *ctx, const char *name, solution **out, char *err)
{
	*out = name ? ws_find(&ctx->ws, name) : ws_current(&ctx->ws);
	if (*out)
		return 0;
	if (!name)
		return im_fail(err, "no current solution: start one with `solution NAME`");
	return im_fail(err, "unknown solution '%.60s' (see `list`; `load NAME` brings a saved one)",
		       name);
}

int core_compound(im_ctx *ctx, const char *name, const rd_compound **out, char *err)
{
	const char *sug[3];
	int n;
	*out = refdb_compound(ctx->ref, name);
	if (*out)
		return 0;
	n = refdb_suggest(ctx->ref, name, sug, 3);
	if (n == 0)
		return im_fail(err, "unknown compound '%.60s' (see `compounds`)", name);
	return im_fail(err, "unknown compound '%.60s'; did you mean %s%s%s%s%s?", name, sug[0],
		       n > 1 ? (n > 2 ? ", " : " or ") : "", n > 1 ? sug[1] : "",
		       n > 2 ? " or " : "", n > 2 ? sug[2] : "");
}

static int valid_name(const char *name, char *err)
{
	size_t n = strlen(name);
	if (n == 0 || n >= SOL_NAME_MAX)
		return im_fail(err, "solution name '%.40s' must be 1 to %d characters", name,
			       SOL_NAME_MAX - 1);
	for (const char *p = name; *p; p++)
		if (!((*p >= 'a' && *p <= 'z') || (*p >= 'A' && *p <= 'Z') ||
		      (*p >= '0' && *p <= '9') || *p == '-' || *p == '_' || *p == '.'))
			return im_fail(err, "solution name '%.40s': use letters, digits, '-', '_' "
					    "or '.'", name);
	return 0;
}

static const char *temp_str(im_ctx *ctx, char *buf, size_t n)
{
	snprintf(buf, n, "%.1f C", ctx->temp_C);
	return buf;
}

/* ---- temperature and model ---- */

int cmd_temp(im_ctx *ctx, int argc, char **argv, char *err)
{
	double t;
	if (argc == 1) {
		if (ctx->out->json) {
			jw w;
			jw_begin(&w, ctx->out);
			jw_num(&w, "temperature_C", ctx->temp_C, 6);
			jw_end(&w);
		}
		out_printf(ctx->out, "temperature %.1f C\n", ctx->temp_C);
		return 0;
	}
	if (units_number(argv[1], &t, err))
		return -1;
	if (t < 0 || t > 60)
		return im_fail(err, "temperature %s C is outside 0 to 60 C, where the water "
				    "data hold", argv[1]);
	ctx->temp_C = t;
	out_printf(ctx->out, "temperature %.1f C\n", t);
	return 0;
}

int cmd_activity(im_ctx *ctx, int argc, char **argv, char *err)
{
	if (argc == 2) {
		if (im_strcaseeq(argv[1], "davies"))
			ctx->model = ACT_DAVIES;
		else if (im_strcaseeq(argv[1], "dh"))
			ctx->model = ACT_DEBYE_HUCKEL;
		else
			return im_fail(err, "unknown activity model '%.30s' (use davies or dh)",
				       argv[1]);
	}
	out_printf(ctx->out, "activity coefficients: %s\n",
		   ctx->model == ACT_DAVIES ? "Davies (default)"
					    : "extended Debye-Hueckel with Kielland sizes "
					      "(Davies where no size is known)");
	return 0;
}

/* ---- composing solutions ---- */

int cmd_solution(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *src = NULL, *s;
	if (argc == 3 || argc > 4)
		return im_fail(err, "usage: solution NAME [from OTHER]");
	if (valid_name(argv[1], err))
		return -1;
	if (argc == 4) {
		if (strcmp(argv[2], "from") != 0)
			return im_fail(err, "expected 'from', got '%.40s'", argv[2]);
		if (core_solution(ctx, argv[3], &src, err))
			return -1;
		if (strcmp(argv[1], argv[3]) == 0)
			return im_fail(err, "a solution cannot be copied onto itself");
		s = im_xmalloc(sizeof *s);
		sol_copy(s, src, argv[1]);
		ws_put(&ctx->ws, s);
		ws_open(&ctx->ws, argv[1]);
		out_printf(ctx->out, "solution %s (copy of %s, %d compounds)\n", argv[1], argv[3],
			   s->n);
		return 0;
	}
	s = ws_find(&ctx->ws, argv[1]);
	ws_open(&ctx->ws, argv[1]);
	out_printf(ctx->out, "solution %s%s\n", argv[1], s ? "" : " (new)");
	return 0;
}

static int amount_args(im_ctx *ctx, int argc, char **argv, const rd_compound **c,
		       double *mM, char *err)
{
	if (core_compound(ctx, argv[1], c, err))
		return -1;
	return units_amount_mM(argv[2], argc > 3 ? argv[3] : NULL, (*c)->fw_g_mol, mM, err);
}

static void report_amount(im_ctx *ctx, const solution *s, const rd_compound *c,
			  const char *verb)
{
	sol_item *it = sol_find((solution *)s, c);
	char amt[48];
	units_fmt_conc(amt, sizeof amt, it ? it->mM : 0, ctx->out->utf8);
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "solution", s->name);
		jw_str(&w, "compound", c->name);
		jw_num(&w, "mM", it ? it->mM : 0, 10);
		if (c->hazard)
			jw_str(&w, "caution", c->hazard);
		jw_end(&w);
		return;
	}
	out_printf(ctx->out, "%s: %s %s, now %s\n", s->name, verb, c->name, amt);
	if (c->hazard)
		out_printf(ctx->out, "caution, %s: %s\n", c->name, c->hazard);
}

static int add_or_set(im_ctx *ctx, int argc, char **argv, char *err, int set)
{
	const rd_compound *c;
	solution *s;
	double mM;
	if (core_solution(ctx, NULL, &s, err) || amount_args(ctx, argc, argv, &c, &mM, err))
		return -1;
	if (!set) {
		sol_item *it = sol_find(s, c);
		if (it && it->mM + mM > UNITS_MAX_mM)
			return im_fail(err, "%s would reach %g mM, beyond %g M", c->name,
				       it->mM + mM, UNITS_MAX_mM / 1000);
		sol_add(s, c, mM);
	} else {
		sol_set(s, c, mM);
	}
	report_amount(ctx, s, c, set ? "set" : "added");
	return 0;
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
	if (core_solution(ctx, NULL, &s, err) || core_compound(ctx, argv[1], &c, err))
		return -1;
	if (sol_remove(s, c))
		return im_fail(err, "%s is not in %s", c->name, s->name);
	out_printf(ctx->out, "%s: removed %s\n", s->name, c->name);
	return 0;
}

int cmd_clear(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	(void)argc;
	(void)argv;
	if (core_solution(ctx, NULL, &s, err))
		return -1;
	s->n = 0;
	out_printf(ctx->out, "%s: emptied\n", s->name);
	return 0;
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

/* The largest ions of the excess sign, for naming what lacks a counter-ion. */
static void excess_ions(const sol_state *st, char *buf, size_t n)
{
	size_t len = 0;
	int sign = st->net_charge_mEq_L > 0 ? 1 : -1, used[64] = {0};
	buf[0] = '\0';
	for (int k = 0; k < 3; k++) {
		int best = -1;
		for (int j = 0; j < st->n && j < 64; j++)
			if (!used[j] && st->sp[j].ion->z * sign > 0 &&
			    (best < 0 || st->sp[j].mM * abs(st->sp[j].ion->z) >
						 st->sp[best].mM * abs(st->sp[best].ion->z)))
				best = j;
		if (best < 0)
			break;
		used[best] = 1;
		len += snprintf(buf + len, len < n ? n - len : 0, "%s%s", k ? ", " : "",
				st->sp[best].ion->symbol);
	}
}

static void show_json(im_ctx *ctx, const solution *s, const sol_state *st)
{
	jw w;
	const spec_result *r = st->chem;
	jw_begin(&w, ctx->out);
	jw_str(&w, "solution", s->name);
	jw_num(&w, "temperature_C", st->t_C, 6);
	jw_str(&w, "activity_model", st->model == ACT_DAVIES ? "davies" : "dh");
	jw_arr(&w, "compounds");
	for (int i = 0; i < s->n; i++) {
		jw_obj(&w, NULL);
		jw_str(&w, "compound", s->items[i].c->name);
		jw_num(&w, "mM", s->items[i].mM, 10);
		if (s->items[i].titrant)
			jw_bool(&w, "titrant", 1);
		jw_close(&w);
	}
	jw_close(&w);
	jw_arr(&w, "ions");
	for (int j = 0; j < st->n; j++) {
		const sol_species *x = &st->sp[j];
		if (x->ion->z == 0)
			continue;
		jw_obj(&w, NULL);
		jw_str(&w, "ion", x->ion->symbol);
		jw_int(&w, "z", x->ion->z);
		jw_num(&w, "mM", x->mM, 10);
		jw_num(&w, "gamma", x->gamma, 6);
		jw_num(&w, "activity_mM", x->act_mM, 8);
		jw_close(&w);
	}
	jw_close(&w);
	jw_arr(&w, "neutral");
	for (int j = 0; j < st->n; j++) {
		if (st->sp[j].ion->z != 0)
			continue;
		jw_obj(&w, NULL);
		jw_str(&w, "species", st->sp[j].ion->symbol);
		jw_num(&w, "mM", st->sp[j].mM, 10);
		jw_close(&w);
	}
	jw_close(&w);
	jw_num(&w, "ionic_strength_mM", st->ionic_strength_mM, 8);
	jw_num(&w, "osmolarity_mOsm_L", st->osmolarity_mOsm_L, 8);
	jw_num(&w, "net_charge_mEq_L", st->net_charge_mEq_L, 6);
	jw_bool(&w, "electroneutral", !unbalanced(st));
	if (r) {
		jw_num(&w, "pH", st->pH, 6);
		jw_str(&w, "pH_from", s->co2_frac > 0 ? "co2" : "closed");
		if (isfinite(s->ph_target))
			jw_num(&w, "target_pH", s->ph_target, 6);
		if (s->co2_frac > 0)
			jw_num(&w, "co2_fraction", s->co2_frac, 6);
		jw_obj(&w, "free");
		for (int m = 0; m < r->nmetals; m++)
			jw_num(&w, r->metals[m].symbol, r->metals[m].free_mM, 8);
		jw_close(&w);
		jw_arr(&w, "metals");
		for (int m = 0; m < r->nmetals; m++) {
			jw_obj(&w, NULL);
			jw_str(&w, "metal", r->metals[m].symbol);
			jw_num(&w, "total_mM", r->metals[m].total_mM, 8);
			jw_num(&w, "free_mM", r->metals[m].free_mM, 8);
			jw_num(&w, "bound_mM", r->metals[m].bound_mM, 8);
			jw_close(&w);
		}
		jw_close(&w);
		jw_num(&w, "osmolality_mOsm_kg", st->osmolality_mOsm_kg, 6);
		jw_arr(&w, "osmolality_range_mOsm_kg");
		jw_num(&w, NULL, st->osmolality_lo_mOsm_kg, 6);
		jw_num(&w, NULL, st->osmolality_hi_mOsm_kg, 6);
		jw_close(&w);
		jw_num(&w, "osmotic_coefficient", st->osmotic_coeff, 6);
		jw_num(&w, "osmotic_fallback_fraction", st->osm_fallback_frac, 4);
		jw_arr(&w, "warnings");
		for (int i = 0; i < r->nwarn; i++)
			jw_str(&w, NULL, r->warnings[i]);
		jw_close(&w);
	}
	jw_end(&w);
}

/* Concentration column: adaptive unit, right-aligned in width 12. */
static const char *conc_col(char *buf, size_t n, double mM, int utf8)
{
	char t[48];
	int cont = 0;
	units_fmt_conc(t, sizeof t, mM, utf8);
	for (const char *p = t; *p; p++) /* UTF-8 continuation bytes take no column */
		cont += ((unsigned char)*p & 0xc0) == 0x80;
	snprintf(buf, n, "%*s", 12 + cont, t);
	return buf;
}

/* Below this a species is not worth a line in `show` (1 pM). */
#define SHOW_MIN_mM 1e-9

static void show_chemistry(im_ctx *ctx, const solution *s, const sol_state *st)
{
	const spec_result *r = st->chem;
	char b1[48], b2[48];
	int utf8 = ctx->out->utf8;
	if (s->co2_frac > 0)
		out_printf(ctx->out, "  pH %25.2f   (equilibrated with %.3g %% CO2%s; an "
				     "electrode reads it as -log a(H+))\n", st->pH,
			   100 * s->co2_frac, s->co2_dry ? ", dry gas" : "");
	else
		out_printf(ctx->out, "  pH %25.2f   (from the protons present%s; as an "
				     "electrode reads it: -log a(H+))\n", st->pH,
			   isfinite(s->ph_target) ? ", titrated" : "");
	for (int m = 0; m < r->nmetals; m++) {
		if (!(r->metals[m].total_mM > 0))
			continue;
		units_fmt_conc(b1, sizeof b1, r->metals[m].free_mM, utf8);
		units_fmt_conc(b2, sizeof b2, r->metals[m].total_mM, utf8);
		out_printf(ctx->out, "  free %-8s %19s   (of %s total; %.1f %% bound)\n",
			   r->metals[m].symbol, b1, b2,
			   100 * r->metals[m].bound_mM / r->metals[m].total_mM);
	}
	if (isfinite(st->osmolality_mOsm_kg)) {
		out_printf(ctx->out, "  osmolality (estimate) %9.0f mOsm/kg", st->osmolality_mOsm_kg);
		/* the range the osmotic data allow, when it shows at this precision */
		if (lround(st->osmolality_lo_mOsm_kg) != lround(st->osmolality_hi_mOsm_kg))
			out_printf(ctx->out, " (%.0f to %.0f)", st->osmolality_lo_mOsm_kg,
				   st->osmolality_hi_mOsm_kg);
		out_printf(ctx->out, "  (Pitzer; osmotic coefficient %.3f", st->osmotic_coeff);
		if (st->osm_fallback_frac > 0.05)
			out_printf(ctx->out, "; %.0f %% of ion pairs lack parameters and count by "
					     "Debye-Hueckel alone", 100 * st->osm_fallback_frac);
		out_printf(ctx->out, ")\n");
	}
	for (int i = 0; i < r->nwarn; i++)
		out_printf(ctx->out, "  note: %s\n", r->warnings[i]);
}

int cmd_show(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	sol_state st;
	char buf[64], t[16], c1[48], c2[48];
	int neutral = 0, hidden = 0;
	if (core_solution(ctx, argc > 1 ? argv[1] : NULL, &s, err))
		return -1;
	if (sol_compute(s, ctx_env(ctx), &st, err))
		return -1;
	if (ctx->out->json) {
		show_json(ctx, s, &st);
		sol_state_free(&st);
		return 0;
	}
	out_printf(ctx->out, "%s at %s; activity coefficients: %s\n", s->name,
		   temp_str(ctx, t, sizeof t),
		   ctx->model == ACT_DAVIES ? "Davies" : "extended Debye-Hueckel (Kielland)");
	if (s->n == 0) {
		out_printf(ctx->out, "  (empty: add compounds with `add COMPOUND AMOUNT [UNIT]`)\n");
		sol_state_free(&st);
		return 0;
	}
	out_printf(ctx->out, "  %-22s %12s\n", "compound", "amount");
	for (int i = 0; i < s->n; i++) {
		units_fmt_conc(buf, sizeof buf, s->items[i].mM, ctx->out->utf8);
		out_printf(ctx->out, "  %-22s %12s%s%s\n", s->items[i].c->name, buf,
			   s->items[i].titrant ? "  (titrant)" : "",
			   s->items[i].stock_mM > 0 ? "  (from stock)" : "");
	}
	out_printf(ctx->out, "\n  %-14s %3s %12s %8s %12s\n", "ion", "z", "free", "gamma",
		   "activity");
	for (int j = 0; j < st.n; j++) {
		const sol_species *x = &st.sp[j];
		if (x->ion->z == 0) {
			neutral++;
			continue;
		}
		if (x->mM < SHOW_MIN_mM) {
			hidden++;
			continue;
		}
		out_printf(ctx->out, "  %-14s %+3d %s %8.4f %s%s\n", x->ion->symbol, x->ion->z,
			   conc_col(c1, sizeof c1, x->mM, ctx->out->utf8), x->gamma,
			   conc_col(c2, sizeof c2, x->act_mM, ctx->out->utf8),
			   x->dh_fallback ? "  (Davies: no size)" : "");
	}
	if (neutral) {
		out_printf(ctx->out, "\n  %-14s %16s\n", "neutral solute", "");
		for (int j = 0; j < st.n; j++)
			if (st.sp[j].ion->z == 0 && st.sp[j].mM >= SHOW_MIN_mM)
				out_printf(ctx->out, "  %-14s     %s\n", st.sp[j].ion->symbol,
					   conc_col(c1, sizeof c1, st.sp[j].mM, ctx->out->utf8));
	}
	if (hidden)
		out_printf(ctx->out, "  (%d species below 1 pM not listed)\n", hidden);
	out_printf(ctx->out, "\n  ionic strength       %10.2f mM\n", st.ionic_strength_mM);
	out_printf(ctx->out, "  osmolarity (ideal)   %10.1f mOsm/L   (sum of particles)\n",
		   st.osmolarity_mOsm_L);
	if (st.chem)
		show_chemistry(ctx, s, &st);
	out_printf(ctx->out, "  net charge           %+10.2f mEq/L%s\n",
		   fabs(st.net_charge_mEq_L) < 5e-3 ? 0.0 : st.net_charge_mEq_L, /* no -0.00 */
		   unbalanced(&st) ? "" : "   (electroneutral)");
	if (unbalanced(&st)) {
		char ions[128];
		excess_ions(&st, ions, sizeof ions);
		out_printf(ctx->out, "  warning: not electroneutral: %+.2f mEq/L of %s charge "
				     "(mostly %s) lacks counter-ions\n", st.net_charge_mEq_L,
			   st.net_charge_mEq_L > 0 ? "positive" : "negative", ions);
	}
	if (!st.chem)
		out_printf(ctx->out, "  note: buffers and chelators are taken as added (no pH or "
				     "binding); every salt dissociates fully\n");
	sol_state_free(&st);
	return 0;
}

/* ---- nernst ---- */

typedef struct nernst_row {
	const rd_ion *ion;
	double in, out;   /* mM or activity mM */
	double E;
	int ok;
	char why[IM_ERRLEN];
} nernst_row;

int cmd_nernst(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *in, *outs;
	sol_state si, so;
	int use_act = 0, n = 0;
	nernst_row *rows;
	char t[16];
	if (argc == 4) {
		if (strcmp(argv[3], "activities") != 0)
			return im_fail(err, "expected 'activities', got '%.40s'", argv[3]);
		use_act = 1;
	}
	if (core_solution(ctx, argv[1], &in, err) || core_solution(ctx, argv[2], &outs, err))
		return -1;
	if (sol_compute(in, ctx_env(ctx), &si, err))
		return -1;
	if (sol_compute(outs, ctx_env(ctx), &so, err)) {
		sol_state_free(&si);
		return -1;
	}
	rows = im_xcalloc(si.n + so.n + 1, sizeof *rows);
	for (int side = 0; side < 2; side++) {
		const sol_state *st = side ? &so : &si;
		for (int j = 0; j < st->n; j++) {
			const rd_ion *ion = st->sp[j].ion;
			int k = 0;
			/* complexes and protonation states have no channel of their
			 * own; OH- moves with H+, which is listed */
			if (ion->z == 0 || ion->derived || strcmp(ion->symbol, "OH-") == 0)
				continue;
			while (k < n && rows[k].ion != ion)
				k++;
			if (k == n)
				rows[n++].ion = ion;
		}
	}
	for (int k = 0; k < n; k++) {
		const sol_species *a = sol_state_find(&si, rows[k].ion);
		const sol_species *b = sol_state_find(&so, rows[k].ion);
		char e2[IM_ERRLEN];
		rows[k].in = a ? (use_act ? a->act_mM : a->mM) : 0;
		rows[k].out = b ? (use_act ? b->act_mM : b->mM) : 0;
		rows[k].ok = nernst_mV(rows[k].ion->z, rows[k].in, rows[k].out, ctx->temp_C,
				       &rows[k].E, e2) == 0;
		if (!rows[k].ok)
			snprintf(rows[k].why, sizeof rows[k].why, "%s", e2);
	}
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "inside", in->name);
		jw_str(&w, "outside", outs->name);
		jw_num(&w, "temperature_C", ctx->temp_C, 6);
		jw_str(&w, "from", use_act ? "activities" : "concentrations");
		jw_arr(&w, "ions");
		for (int k = 0; k < n; k++) {
			jw_obj(&w, NULL);
			jw_str(&w, "ion", rows[k].ion->symbol);
			jw_int(&w, "z", rows[k].ion->z);
			jw_num(&w, "inside_mM", rows[k].in, 10);
			jw_num(&w, "outside_mM", rows[k].out, 10);
			if (rows[k].ok) {
				jw_num(&w, "E_mV", rows[k].E, 6);
			} else {
				jw_str(&w, "E_mV", NULL);
				jw_str(&w, "note", rows[k].why);
			}
			jw_close(&w);
		}
		jw_end(&w);
	} else {
		out_printf(ctx->out, "Nernst potentials of %s (inside) against %s (outside), %s, "
				     "from %s\n", in->name, outs->name, temp_str(ctx, t, sizeof t),
			   use_act ? "activities" : "concentrations");
		out_printf(ctx->out, "sign: E = (RT/zF) ln(out/in), inside relative to outside\n");
		out_printf(ctx->out, "  %-14s %3s %12s %12s %10s\n", "ion", "z",
			   use_act ? "inside a mM" : "inside mM",
			   use_act ? "outside a mM" : "outside mM", "E mV");
		for (int k = 0; k < n; k++) {
			out_printf(ctx->out, "  %-14s %+3d %12.4g %12.4g ", rows[k].ion->symbol,
				   rows[k].ion->z, rows[k].in, rows[k].out);
			if (rows[k].ok)
				out_printf(ctx->out, "%+10.1f\n", rows[k].E);
			else
				out_printf(ctx->out, "%10s  (%s)\n", "-", rows[k].why);
		}
		if (n == 0)
			out_printf(ctx->out, "  (no ions in either solution)\n");
	}
	free(rows);
	sol_state_free(&si);
	sol_state_free(&so);
	return 0;
}

/* ---- bench sheet ---- */

static int weigh_word(const char *w)
{
	return strcmp(w, "html") == 0 || strcmp(w, "csv") == 0 || strcmp(w, "prep") == 0;
}

/* The sheet as terminal text: the order of work with its lines. */
static void weigh_text(im_ctx *ctx, const bs_sheet *b)
{
	char v[32], conc[32];
	int utf8 = ctx->out->utf8;
	weigh_fmt_volume(v, sizeof v, b->volume_mL, utf8);
	out_printf(ctx->out, "bench sheet: %s, %s final volume, %.1f C", b->name, v, b->t_rec_C);
	if (isfinite(b->t_prep_C))
		out_printf(ctx->out, " (made at %.1f C)", b->t_prep_C);
	out_printf(ctx->out, "\n");
	out_printf(ctx->out, "  %-4s %-22s %12s %10s  %s\n", "step", "compound", "final",
		   "FW g/mol", "weigh or pipette");
	for (int s = 0; s < b->nsteps; s++) {
		out_printf(ctx->out, "  %2d. %s\n", s + 1, b->steps[s]);
		for (int i = 0; i < b->n; i++) {
			const bs_line *l = &b->lines[i];
			if (l->step != s)
				continue;
			units_fmt_conc(conc, sizeof conc, l->mM, utf8);
			weigh_fmt_volume(v, sizeof v, l->stock_mL, utf8);
			out_printf(ctx->out, "       %-22s %12s %10.2f  ", l->c->name, conc,
				   l->c->fw_g_mol);
			switch (l->how) {
			case BS_WEIGH:
				out_printf(ctx->out, "%s%s\n", l->amount, l->grams < WEIGH_MIN_GOOD_g ?
					   "  (under 10 mg: better from a stock)" : "");
				break;
			case BS_STOCK:
				out_printf(ctx->out, "%s of %s stock\n", v, l->stock);
				break;
			case BS_TITRANT_STOCK:
				out_printf(ctx->out, "%s of %s stock to start (titrant: %.3g mmol;"
					   " finish with the pH meter)\n", v, l->stock, l->mmol);
				break;
			case BS_TITRANT_SUGGEST:
				out_printf(ctx->out, "%.3g mmol: %s of a %s stock, suggested (titrant;"
					   " finish with the pH meter)\n", l->mmol, v, l->stock);
				break;
			}
		}
	}
	out_printf(ctx->out, "  checks:\n");
	for (int i = 0; i < b->nchecks; i++)
		out_printf(ctx->out, "       %s\n", b->checks[i]);
}

int cmd_weigh(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	double mL, total = 0, prep_C = NAN;
	const char *html = NULL, *csv = NULL;
	int i = 2;
	if (core_solution(ctx, NULL, &s, err))
		return -1;
	const char *unit = argc > 2 && !weigh_word(argv[2]) ? argv[i++] : NULL;
	if (units_volume_mL(argv[1], unit, &mL, err))
		return -1;
	for (; i < argc; i++) {
		const char *w = argv[i];
		if (i + 1 >= argc || !weigh_word(w))
			return im_fail(err, weigh_word(w) ? "`%s` needs a %s" :
				       "unexpected '%.40s'; expected html FILE, csv FILE or prep C", w,
				       strcmp(w, "prep") == 0 ? "temperature in C" : "file name");
		const char *val = argv[++i];
		if (strcmp(w, "html") == 0) {
			if (html)
				return im_fail(err, "`html` given twice");
			html = val;
		} else if (strcmp(w, "csv") == 0) {
			if (csv)
				return im_fail(err, "`csv` given twice");
			csv = val;
		} else {
			if (isfinite(prep_C))
				return im_fail(err, "`prep` given twice");
			if (units_number(val, &prep_C, err))
				return -1;
			if (prep_C < 0 || prep_C > 60)
				return im_fail(err, "preparation temperature %s C is outside 0 to 60", val);
		}
	}
	if (s->n == 0)
		return im_fail(err, "%s is empty: nothing to weigh", s->name);
	sol_state st;
	char e2[IM_ERRLEN], date[16];
	int have_st = sol_compute(s, ctx_env(ctx), &st, e2) == 0;
	bs_sheet b;
	bs_today(date, sizeof date);
	if (bs_build(s, have_st ? &st : NULL, ctx->ref, mL, ctx->temp_C, prep_C, date, &b, err)) {
		if (have_st)
			sol_state_free(&st);
		return -1;
	}
	if (have_st)
		sol_state_free(&st);
	if (html || csv) {
		fio_batch fb;
		FILE *fp;
		fio_batch_init(&fb);
		if (html && fio_batch_open(&fb, html, &fp, err) == 0)
			bs_write_html(fp, &b, IONMIX_VERSION);
		if ((!html || fb.n == 1) && csv && fio_batch_open(&fb, csv, &fp, err) == 0)
			bs_write_csv(fp, &b);
		if (fb.n != (html != NULL) + (csv != NULL)) {
			fio_batch_abort(&fb);
			bs_free(&b);
			return -1;
		}
		if (fio_batch_commit(&fb, err)) {
			bs_free(&b);
			return -1;
		}
	}
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "solution", s->name);
		jw_num(&w, "volume_mL", mL, 10);
		jw_num(&w, "temperature_C", ctx->temp_C, 6);
		if (isfinite(prep_C))
			jw_num(&w, "preparation_temperature_C", prep_C, 6);
		jw_arr(&w, "items");
		for (int k = 0; k < b.n; k++) {
			const bs_line *l = &b.lines[k];
			int titrant = l->how == BS_TITRANT_STOCK || l->how == BS_TITRANT_SUGGEST;
			jw_obj(&w, NULL);
			jw_str(&w, "compound", l->c->name);
			jw_num(&w, "mM", l->mM, 10);
			jw_num(&w, "fw_g_mol", l->c->fw_g_mol, 8);
			jw_num(&w, "grams", l->grams, 6);
			jw_str(&w, "action", l->how == BS_WEIGH ? "weigh" : titrant ? "titrate" : "pipette");
			jw_str(&w, "amount", l->amount);
			jw_int(&w, "step", l->step + 1);
			if (titrant) {
				jw_bool(&w, "titrant", 1);
				jw_num(&w, "mmol", l->mmol, 6);
			}
			if (l->how == BS_TITRANT_SUGGEST) {
				jw_num(&w, "suggested_stock_mM", l->stock_mM, 8);
				jw_num(&w, "suggested_stock_mL", l->stock_mL, 6);
			} else if (l->how != BS_WEIGH) {
				jw_num(&w, "stock_mM", l->stock_mM, 8);
				jw_num(&w, "stock_mL", l->stock_mL, 6);
			} else {
				total += l->grams;
			}
			jw_close(&w);
		}
		jw_close(&w);
		jw_num(&w, "total_grams", total, 6);
		jw_arr(&w, "steps");
		for (int k = 0; k < b.nsteps; k++)
			jw_str(&w, NULL, b.steps[k]);
		jw_close(&w);
		jw_str(&w, "html", html);
		jw_str(&w, "csv", csv);
		jw_end(&w);
	} else {
		weigh_text(ctx, &b);
		if (html)
			out_printf(ctx->out, "printable sheet (A4 or Letter) written to %s\n", html);
		if (csv)
			out_printf(ctx->out, "table written to %s\n", csv);
	}
	bs_free(&b);
	return 0;
}

int cmd_stock(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c;
	solution *s;
	sol_item *it;
	double mM;
	char buf[48];
	if (core_solution(ctx, NULL, &s, err) || core_compound(ctx, argv[1], &c, err))
		return -1;
	it = sol_find(s, c);
	if (!it)
		return im_fail(err, "%s is not in %s: add it first", c->name, s->name);
	if (strcmp(argv[2], "off") == 0 && argc == 3) {
		it->stock_mM = 0;
		out_printf(ctx->out, "%s: %s is weighed\n", s->name, c->name);
		return 0;
	}
	if (units_amount_mM(argv[2], argc > 3 ? argv[3] : NULL, c->fw_g_mol, &mM, err))
		return -1;
	if (mM <= it->mM)
		return im_fail(err, "a stock of %s %s is not more concentrated than the %g mM "
				    "wanted", argv[2], argc > 3 ? argv[3] : "mM", it->mM);
	it->stock_mM = mM;
	units_fmt_conc(buf, sizeof buf, mM, ctx->out->utf8);
	out_printf(ctx->out, "%s: %s from a %s stock\n", s->name, c->name, buf);
	return 0;
}

/* ---- keeping solutions ---- */

int cmd_save(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	userdb *u;
	int failed = 0;
	if (core_solution(ctx, argc > 1 ? argv[1] : NULL, &s, err))
		return -1;
	if (!(u = ctx_userdb(ctx, 1, err, &failed)))
		return -1;
	if (udb_save(u, s, err))
		return -1;
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "saved", s->name);
		jw_str(&w, "database", ctx->db_path);
		jw_end(&w);
	}
	out_printf(ctx->out, "saved %s (%d compounds) to %s\n", s->name, s->n, ctx->db_path);
	return 0;
}

int cmd_load(im_ctx *ctx, int argc, char **argv, char *err)
{
	userdb *u;
	solution *s;
	int failed = 0;
	(void)argc;
	if (valid_name(argv[1], err))
		return -1;
	u = ctx_userdb(ctx, 0, err, &failed);
	if (!u)
		return failed ? -1 : im_fail(err, "no saved solution named '%s' (no database yet "
						   "at %s)", argv[1], ctx->db_path);
	s = im_xmalloc(sizeof *s);
	if (udb_load(u, ctx->ref, argv[1], s, err)) {
		free(s);
		return -1;
	}
	ws_put(&ctx->ws, s);
	ws_open(&ctx->ws, argv[1]);
	out_printf(ctx->out, "loaded %s (%d compounds)\n", argv[1], s->n);
	return 0;
}

int cmd_list(im_ctx *ctx, int argc, char **argv, char *err)
{
	char **names = NULL;
	int n = 0, failed = 0;
	userdb *u;
	if (argc > 1)
		return cmd_correct_list_nwb(ctx, argv[1], err);
	u = ctx_userdb(ctx, 0, err, &failed);
	if (failed)
		return -1;
	if (u && (n = udb_list(u, &names, err)) < 0)
		return -1;
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_arr(&w, "workspace");
		for (int i = 0; i < ctx->ws.n; i++)
			jw_str(&w, NULL, ctx->ws.sol[i]->name);
		jw_close(&w);
		jw_arr(&w, "saved");
		for (int i = 0; i < n; i++)
			jw_str(&w, NULL, names[i]);
		jw_close(&w);
		jw_end(&w);
	} else {
		out_printf(ctx->out, "in the workspace:%s\n", ctx->ws.n ? "" : " none");
		for (int i = 0; i < ctx->ws.n; i++)
			out_printf(ctx->out, "  %s%s (%d compounds)\n", ctx->ws.sol[i]->name,
				   i == ctx->ws.current ? " *" : "", ctx->ws.sol[i]->n);
		out_printf(ctx->out, "saved in %s:%s\n", ctx->db_path, n ? "" : " none");
		for (int i = 0; i < n; i++)
			out_printf(ctx->out, "  %s\n", names[i]);
	}
	for (int i = 0; i < n; i++)
		free(names[i]);
	free(names);
	return 0;
}

int cmd_delete(im_ctx *ctx, int argc, char **argv, char *err)
{
	userdb *u;
	int failed = 0;
	(void)argc;
	u = ctx_userdb(ctx, 0, err, &failed);
	if (!u)
		return failed ? -1 : im_fail(err, "no saved solution named '%.60s'", argv[1]);
	if (udb_delete(u, argv[1], err))
		return -1;
	out_printf(ctx->out, "deleted saved solution %s (the workspace copy, if any, stays)\n",
		   argv[1]);
	return 0;
}

/* Write the recipe of s to fp: a commented script that rebuilds it. */
static void write_recipe(FILE *fp, const solution *s)
{
	char stamp[32];
	time_t now = time(NULL);
	strftime(stamp, sizeof stamp, "%Y-%m-%d", gmtime(&now));
	fprintf(fp, "# ionmix recipe: %s\n# exported %s by ionmix %s; replay with "
		    "`ionmix FILE` or `run FILE`\n", s->name, stamp, IONMIX_VERSION);
	fprintf(fp, "solution %s\nclear\ngas off\n", s->name);
	for (int i = 0; i < s->n; i++) {
		const sol_item *it = &s->items[i];
		if (it->titrant)
			continue;
		fprintf(fp, "set \"%s\" %.10g mM\n", it->c->name, it->mM);
		if (it->stock_mM > 0)
			fprintf(fp, "stock \"%s\" %.10g mM\n", it->c->name, it->stock_mM);
	}
	/* the titrant is computed again by `ph` when the recipe runs */
	for (int i = 0; i < s->n; i++) {
		const sol_item *it = &s->items[i];
		if (!it->titrant)
			continue;
		fprintf(fp, "# %s: %.10g mM when exported\n", it->c->name, it->mM);
		if (it->stock_mM > 0)
			fprintf(fp, "ph %.10g with \"%s\" stock %.10g mM\n", s->ph_target,
				it->c->name, it->stock_mM);
		else
			fprintf(fp, "ph %.10g with \"%s\"\n", s->ph_target, it->c->name);
	}
	if (s->co2_frac > 0)
		fprintf(fp, "gas co2 %.10g%%%s pressure %.10g\n", 100 * s->co2_frac,
			s->co2_dry ? " dry" : "", s->co2_p_atm);
}

/* Write a file through a temporary in the same directory and rename, so a
 * failure never leaves a partial file.  fill writes the content. */
static int write_atomic(const char *path, void (*fill)(FILE *, const solution *),
			const solution *s, char *err)
{
	char tmp[4096];
	int fd;
	FILE *fp;
	if (snprintf(tmp, sizeof tmp, "%s.XXXXXX", path) >= (int)sizeof tmp)
		return im_fail(err, "file name too long");
	fd = mkstemp(tmp);
	if (fd < 0)
		return im_fail(err, "cannot write %s: %s", path, strerror(errno));
	fp = fdopen(fd, "w");
	if (!fp) {
		close(fd);
		unlink(tmp);
		return im_fail(err, "cannot write %s: %s", path, strerror(errno));
	}
	fill(fp, s);
	if (fflush(fp) != 0 || ferror(fp) || fsync(fd) != 0) {
		int e = errno;
		fclose(fp);
		unlink(tmp);
		return im_fail(err, "cannot write %s: %s", path, strerror(e));
	}
	if (fclose(fp) != 0 || rename(tmp, path) != 0) {
		int e = errno;
		unlink(tmp);
		return im_fail(err, "cannot write %s: %s", path, strerror(e));
	}
	return 0;
}

int cmd_export(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	(void)argc;
	if (core_solution(ctx, argv[1], &s, err))
		return -1;
	if (write_atomic(argv[2], write_recipe, s, err))
		return -1;
	out_printf(ctx->out, "wrote the recipe of %s to %s\n", s->name, argv[2]);
	return 0;
}

int core_run_stream(im_ctx *ctx, void *stream, const char *file, int *line_out,
		    char *err)
{
	FILE *fp = stream;
	char *line = NULL;
	size_t cap = 0;
	ssize_t len;
	int lineno = 0, rc = 0, e;
	(void)file; /* the caller names the file in its message */
	while (errno = 0, (len = getline(&line, &cap, fp)) >= 0) {
		lineno++;
		if (lineno == 1 && len >= 3 && memcmp(line, "\xef\xbb\xbf", 3) == 0) {
			/* a UTF-8 byte-order mark, as some editors write: not a command */
			memmove(line, line + 3, len - 2);
			len -= 3;
		}
		if (len > CMD_LINE_MAX) {
			rc = im_fail(err, "line is longer than %d bytes", CMD_LINE_MAX);
			break;
		}
		if ((size_t)len != strlen(line)) {
			rc = im_fail(err, "line holds a NUL byte: not a text script");
			break;
		}
		ctx->errfile[0] = '\0';
		if (cmd_exec(ctx, line, err)) {
			rc = -1;
			break;
		}
	}
	/* a directory opens but does not read (EISDIR); neither may pass for
	 * an empty script */
	e = errno;
	if (rc == 0 && ferror(fp)) {
		lineno++;
		rc = im_fail(err, "cannot read it: %s", strerror(e ? e : EIO));
	}
	free(line);
	*line_out = lineno;
	return rc;
}

int cmd_run(im_ctx *ctx, int argc, char **argv, char *err)
{
	FILE *fp;
	int line = 0, rc;
	char inner[IM_ERRLEN];
	(void)argc;
	if (ctx->run_depth >= 8)
		return im_fail(err, "run: scripts nested more than 8 deep (a script runs itself?)");
	fp = fopen(argv[1], "r");
	if (!fp)
		return im_fail(err, "cannot open %s: %s", argv[1], strerror(errno));
	ctx->run_depth++;
	rc = core_run_stream(ctx, fp, argv[1], &line, inner);
	ctx->run_depth--;
	fclose(fp);
	if (rc == 0)
		return 0;
	if (ctx->errfile[0] == '\0') { /* the failure was in this file, not deeper */
		snprintf(ctx->errfile, sizeof ctx->errfile, "%s", argv[1]);
		ctx->errline = line;
	}
	snprintf(err, IM_ERRLEN, "%s", inner);
	return -1;
}

/* ---- reference data ---- */

static void print_source(im_ctx *ctx, const char *what, const rd_source *src)
{
	if (!src)
		return;
	out_printf(ctx->out, "  %s: %s%s%s\n", what, src->citation,
		   src->common_practice ? " [common practice]" : "",
		   src->from_memory ? " [from memory]" : "");
}

static void source_json(jw *w, const char *key, const rd_source *src)
{
	if (!src) {
		jw_str(w, key, NULL);
		return;
	}
	jw_obj(w, key);
	jw_str(w, "id", src->id);
	jw_str(w, "citation", src->citation);
	jw_bool(w, "common_practice", src->common_practice);
	jw_bool(w, "from_memory", src->from_memory);
	jw_close(w);
}

int cmd_info(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c = refdb_compound(ctx->ref, argv[1]);
	const rd_ion *ion = c ? NULL : refdb_ion(ctx->ref, argv[1]);
	(void)argc;
	if (!c && !ion)
		return core_compound(ctx, argv[1], &c, err); /* fails with suggestions */
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		if (c) {
			jw_str(&w, "compound", c->name);
			jw_str(&w, "formula", c->formula);
			jw_num(&w, "fw_g_mol", c->fw_g_mol, 8);
			jw_str(&w, "kind", c->kind);
			jw_str(&w, "hazard", c->hazard);
			jw_obj(&w, "yields");
			for (int k = 0; k < c->nyields; k++)
				jw_num(&w, c->yields[k].ion->symbol, c->yields[k].count, 6);
			jw_close(&w);
			source_json(&w, "fw_source", c->fw_source);
		} else {
			jw_str(&w, "ion", ion->symbol);
			jw_str(&w, "name", ion->name);
			jw_int(&w, "z", ion->z);
			jw_num(&w, "lambda_S_cm2_eq", ion->lambda_S_cm2_eq, 6);
			jw_num(&w, "D_1e9_m2_s", ion->D_1e9_m2_s, 6);
			jw_num(&w, "kielland_a_pm", ion->kielland_a_pm, 6);
			source_json(&w, "mobility_source", ion->mobility_source);
			source_json(&w, "size_source", ion->size_source);
			if (ion->z != 0) {
				/* the mobility junctions use (ljp.c), with its class */
				ljp_mobility m;
				ljp_mobility_of(ctx->ref, ion, &m);
				jw_num(&w, "junction_D25_1e9_m2_s", m.D25_m2_s * 1e9, 6);
				jw_str(&w, "mobility_class", ljp_class_name(m.cls));
				jw_num(&w, "mobility_rel_unc", m.rel_unc, 3);
				jw_num(&w, "mass_g_mol", ion->mass_g_mol, 6);
			}
		}
		jw_end(&w);
		return 0;
	}
	if (c) {
		out_printf(ctx->out, "%s  (%s)\n  %s\n  formula %s, %.3f g/mol\n", c->name, c->kind,
			   c->description, c->formula, c->fw_g_mol);
		out_printf(ctx->out, "  yields per formula unit:");
		for (int k = 0; k < c->nyields; k++)
			out_printf(ctx->out, " %g %s", c->yields[k].count, c->yields[k].ion->symbol);
		out_printf(ctx->out, "\n");
		if (c->hydrate_of)
			out_printf(ctx->out, "  hydrate of %s\n", c->hydrate_of);
		if (c->hazard)
			out_printf(ctx->out, "  caution: %s\n", c->hazard);
		print_source(ctx, "formula weight", c->fw_source);
		return 0;
	}
	out_printf(ctx->out, "%s  (%s), z = %+d\n", ion->symbol, ion->name, ion->z);
	if (isfinite(ion->lambda_S_cm2_eq))
		out_printf(ctx->out, "  limiting equivalent conductivity %.2f S cm2/eq at 25 C\n",
			   ion->lambda_S_cm2_eq);
	if (isfinite(ion->D_1e9_m2_s))
		out_printf(ctx->out, "  diffusion coefficient %.3f x 1e-9 m2/s at 25 C\n",
			   ion->D_1e9_m2_s);
	print_source(ctx, "mobility", ion->mobility_source);
	if (ion->z != 0) {
		/* the mobility junctions use (ljp.c), with its class */
		ljp_mobility m;
		ljp_mobility_of(ctx->ref, ion, &m);
		out_printf(ctx->out,
			   "  junctions use D = %.3g x 1e-9 m2/s at 25 C, %s, within %.0f %%%s\n",
			   m.D25_m2_s * 1e9, ljp_class_name(m.cls), 100.0 * m.rel_unc,
			   m.how == LJP_FROM_MASS ? " (Stokes-Einstein from the molar mass of its parts)"
			   : m.how == LJP_NO_SIZE ? " (no size known: a wide bound)" : "");
		if (m.how == LJP_FROM_MASS)
			print_source(ctx, "mobility", m.source);
	}
	if (isfinite(ion->kielland_a_pm))
		out_printf(ctx->out, "  Kielland ion size %.0f pm\n", ion->kielland_a_pm);
	print_source(ctx, "ion size", ion->size_source);
	return 0;
}

int cmd_compounds(im_ctx *ctx, int argc, char **argv, char *err)
{
	int n = refdb_ncompounds(ctx->ref), any = argc < 2;
	for (int i = 0; i < n && !any; i++)
		any = im_strcaseeq(argv[1], refdb_compound_at(ctx->ref, i)->kind);
	if (!any)
		return im_fail(err, "no compounds of kind '%.30s' (kinds: salt, acid, base, buffer, "
				    "chelator, sugar, organic-salt, nucleotide, drug)", argv[1]);
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_arr(&w, "compounds");
		for (int i = 0; i < n; i++) {
			const rd_compound *c = refdb_compound_at(ctx->ref, i);
			if (argc > 1 && !im_strcaseeq(argv[1], c->kind))
				continue;
			jw_obj(&w, NULL);
			jw_str(&w, "compound", c->name);
			jw_str(&w, "kind", c->kind);
			jw_num(&w, "fw_g_mol", c->fw_g_mol, 8);
			jw_close(&w);
		}
		jw_end(&w);
		return 0;
	}
	out_printf(ctx->out, "  %-24s %-13s %10s\n", "compound", "kind", "FW g/mol");
	for (int i = 0; i < n; i++) {
		const rd_compound *c = refdb_compound_at(ctx->ref, i);
		if (argc > 1 && !im_strcaseeq(argv[1], c->kind))
			continue;
		out_printf(ctx->out, "  %-24s %-13s %10.3f%s\n", c->name, c->kind, c->fw_g_mol,
			   c->hazard ? "  (caution)" : "");
	}
	return 0;
}

int cmd_help(im_ctx *ctx, int argc, char **argv, char *err)
{
	int n;
	const cmd_def *t = cmd_table(&n);
	if (argc > 1) {
		const cmd_def *d = cmd_lookup(argv[1]);
		if (!d)
			return im_fail(err, "no command '%.40s' (type `help` for the list)", argv[1]);
		out_printf(ctx->out, "usage: %s %s\n  %s\n", d->name, d->synopsis, d->help);
		return 0;
	}
	out_printf(ctx->out, "commands (`help COMMAND` for its arguments):\n");
	for (int i = 0; i < n; i++)
		out_printf(ctx->out, "  %-10s %s\n", t[i].name, t[i].help);
	return 0;
}
