/*
 * cmd_bench.c - the bench sheet and stock solutions.  Amounts come from
 * weigh.c; these handlers only parse and render.
 */
#include "cmd_bench.h"

#include <string.h>

#include "common.h"
#include "render.h"
#include "units.h"
#include "weigh.h"

#define TITRANT_ADVICE "titrant: start from this, finish with the pH meter"

/* One line of the bench sheet; returns the grams to weigh (0 when the
 * compound comes from a stock). */
static double weigh_row(render *r, const sol_item *it, double mL, int utf8)
{
	double g = weigh_grams(it->mM, it->c->fw_g_mol, mL);
	char what[96], v[32], sc[48];
	const char *advice = it->titrant ? TITRANT_ADVICE
			     : it->stock_mM <= 0 && g < WEIGH_MIN_GOOD_g
				     ? "under 10 mg: better from a stock" : NULL;
	render_row(r);
	render_str(r, "compound", "compound", it->c->name);
	render_conc(r, "mM", "final", it->mM);
	render_numj(r, "fw_g_mol", "FW", "g/mol", it->c->fw_g_mol, UNITS_DEC(2), 8);
	render_numj(r, "grams", NULL, "g", g, UNITS_SIG(4), 6);
	if (it->titrant)
		render_bool(r, "titrant", NULL, 1);
	if (it->stock_mM > 0) {
		double sml = weigh_stock_mL(it->mM, it->stock_mM, mL);
		weigh_fmt_volume(v, sizeof v, sml, utf8);
		units_fmt_conc(sc, sizeof sc, it->stock_mM, utf8);
		snprintf(what, sizeof what, "%s of %s stock", v, sc);
		render_conc(r, "stock_mM", NULL, it->stock_mM);
		render_numj(r, "stock_mL", NULL, "mL", sml, UNITS_SIG(4), 6);
	} else {
		weigh_fmt_mass(what, sizeof what, g);
	}
	render_str(r, NULL, "weigh or pipette", what);
	if (advice)
		render_str(r, "advice", "", advice);
	return it->stock_mM > 0 ? 0 : g;
}

int cmd_weigh(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	double mL, total = 0;
	char m[32], v[32];
	render *r;
	if (ses_solution(ctx->ses, NULL, &s, err) ||
	    units_volume_mL(argv[1], argc > 2 ? argv[2] : NULL, &mL, err))
		return -1;
	if (s->n == 0)
		return im_fail(err, "%s is empty: nothing to weigh", s->name);
	r = render_new(ctx->out);
	weigh_fmt_volume(v, sizeof v, mL, ctx->out->utf8);
	render_str(r, "solution", NULL, s->name);
	render_num(r, "volume_mL", NULL, "mL", mL, UNITS_SIG(10));
	render_text(r, "bench sheet: %s, %s final volume", s->name, v);
	render_table(r, "items", NULL);
	for (int i = 0; i < s->n; i++)
		total += weigh_row(r, &s->items[i], mL, ctx->out->utf8);
	render_table_end(r);
	weigh_fmt_mass(m, sizeof m, total);
	render_numj(r, "total_grams", NULL, "g", total, UNITS_SIG(4), 6);
	render_str(r, NULL, "total to weigh", m);
	render_note_as(r, "advice", "", "dissolve in about 80%% of the volume, adjust the pH, "
		       "then make up to volume");
	return render_done(r);
}

int cmd_stock(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c;
	solution *s;
	sol_item *it;
	double mM = 0;
	char buf[48];
	render *r;
	if (ses_solution(ctx->ses, NULL, &s, err) || ses_compound(ctx->ses, argv[1], &c, err))
		return -1;
	it = sol_find(s, c);
	if (!it)
		return im_fail(err, "%s is not in %s: add it first", c->name, s->name);
	if (!(strcmp(argv[2], "off") == 0 && argc == 3)) {
		if (units_amount_mM(argv[2], argc > 3 ? argv[3] : NULL, c->fw_g_mol, &mM, err))
			return -1;
		if (mM <= it->mM)
			return im_fail(err, "a stock of %s %s is not more concentrated than the %g "
					    "mM wanted", argv[2], argc > 3 ? argv[3] : "mM", it->mM);
	}
	it->stock_mM = mM;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_str(r, "compound", NULL, c->name);
	render_conc(r, "stock_mM", NULL, mM);
	units_fmt_conc(buf, sizeof buf, mM, ctx->out->utf8);
	if (mM > 0)
		render_text(r, "%s: %s from a %s stock", s->name, c->name, buf);
	else
		render_text(r, "%s: %s is weighed", s->name, c->name);
	return render_done(r);
}
