/*
 * cmd_ref.c - the reference data as the user reads it: a compound or an
 * ion with the sources of its numbers, and the list of compounds.
 */
#include "cmd_ref.h"

#include <math.h>
#include <stdio.h>

#include "common.h"
#include "ljp.h"
#include "render.h"
#include "usercomp.h"

/* A source: an object in the JSON, a line "  what: citation [flags]". */
static void source(render *r, const char *key, const char *what, const rd_source *src)
{
	if (!src) {
		render_null(r, key, NULL);
		return;
	}
	render_object(r, key);
	render_str(r, "id", NULL, src->id);
	render_str(r, "citation", NULL, src->citation);
	render_bool(r, "common_practice", NULL, src->common_practice);
	render_bool(r, "from_memory", NULL, src->from_memory);
	render_object_end(r);
	render_text(r, "  %s: %s%s%s", what, src->citation,
		    src->common_practice ? " [common practice]" : "",
		    src->from_memory ? " [from memory]" : "");
}

static int info_compound(im_ctx *ctx, const rd_compound *c)
{
	render *r = render_new(ctx->out);
	char line[1024];
	size_t len = 0;
	render_str(r, "compound", NULL, c->name);
	render_str(r, "formula", NULL, c->formula);
	render_numj(r, "fw_g_mol", NULL, "g/mol", c->fw_g_mol, UNITS_DEC(3), 8);
	render_str(r, "kind", NULL, c->kind);
	render_str(r, "description", NULL, c->description);
	render_str(r, "hazard", NULL, c->hazard);
	render_str(r, "hydrate_of", NULL, c->hydrate_of);
	render_bool(r, "user_defined", NULL, uc_owns_compound(ctx->ses->uc, c));
	render_text(r, "%s  (%s)\n  %s\n  formula %s, %.3f g/mol", c->name, c->kind,
		    c->description, c->formula, c->fw_g_mol);
	render_object(r, "yields");
	for (int k = 0; k < c->nyields; k++) {
		render_numj(r, c->yields[k].ion->symbol, NULL, NULL, c->yields[k].count,
			    UNITS_SIG(6), 6);
		len += (size_t)snprintf(line + len, len < sizeof line ? sizeof line - len : 0,
					" %g %s", c->yields[k].count, c->yields[k].ion->symbol);
	}
	render_object_end(r);
	render_text(r, "  yields per formula unit:%s", line);
	if (c->hydrate_of)
		render_text(r, "  hydrate of %s", c->hydrate_of);
	if (c->hazard)
		render_text(r, "  caution: %s", c->hazard);
	source(r, "fw_source", "formula weight", c->fw_source);
	return render_done(r);
}

static int info_ion(im_ctx *ctx, const rd_ion *ion)
{
	render *r = render_new(ctx->out);
	render_str(r, "ion", NULL, ion->symbol);
	render_str(r, "name", NULL, ion->name);
	render_int(r, "z", NULL, ion->z);
	render_bool(r, "user_defined", NULL, uc_owns_ion(ctx->ses->uc, ion));
	render_text(r, "%s  (%s), z = %+d%s", ion->symbol, ion->name, ion->z,
		    uc_owns_ion(ctx->ses->uc, ion) ? "; user-defined" : "");
	render_numj(r, "lambda_S_cm2_eq", NULL, NULL, ion->lambda_S_cm2_eq, UNITS_DEC(2), 6);
	render_numj(r, "D_1e9_m2_s", NULL, NULL, ion->D_1e9_m2_s, UNITS_DEC(3), 6);
	render_numj(r, "kielland_a_pm", NULL, NULL, ion->kielland_a_pm, UNITS_DEC(0), 6);
	if (isfinite(ion->lambda_S_cm2_eq))
		render_text(r, "  limiting equivalent conductivity %.2f S cm2/eq at 25 C",
			    ion->lambda_S_cm2_eq);
	if (isfinite(ion->D_1e9_m2_s))
		render_text(r, "  diffusion coefficient %.3f x 1e-9 m2/s at 25 C",
			    ion->D_1e9_m2_s);
	source(r, "mobility_source", "mobility", ion->mobility_source);
	if (ion->z != 0) {
		/* the mobility junctions use (ljp.c), with its class */
		ljp_mobility m;
		ljp_mobility_of(ctx->ses->ref, ion, &m);
		render_numj(r, "junction_D25_1e9_m2_s", NULL, NULL, m.D25_m2_s * 1e9, UNITS_SIG(3), 6);
		render_str(r, "mobility_class", NULL, ljp_class_name(m.cls));
		render_numj(r, "mobility_rel_unc", NULL, NULL, m.rel_unc, UNITS_SIG(2), 3);
		render_numj(r, "mass_g_mol", NULL, NULL, ion->mass_g_mol, UNITS_SIG(6), 6);
		render_text(r, "  junctions use D = %.3g x 1e-9 m2/s at 25 C, %s, within %.0f %%%s",
			    m.D25_m2_s * 1e9, ljp_class_name(m.cls), 100.0 * m.rel_unc,
			    m.how == LJP_FROM_MASS ? " (Stokes-Einstein from the molar mass of its parts)"
			    : m.how == LJP_NO_SIZE ? " (no size known: a wide bound)" : "");
		if (m.how == LJP_FROM_MASS)
			source(r, "junction_mobility_source", "mobility", m.source);
	}
	if (isfinite(ion->kielland_a_pm))
		render_text(r, "  Kielland ion size %.0f pm", ion->kielland_a_pm);
	source(r, "size_source", "ion size", ion->size_source);
	return render_done(r);
}

int cmd_info(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c = refdb_compound(ctx->ses->ref, argv[1]);
	const rd_ion *ion = c ? NULL : refdb_ion(ctx->ses->ref, argv[1]);
	char uerr[IM_ERRLEN];
	(void)argc;
	if (!c && !ion) { /* one the user defined? */
		c = uc_compound(ses_defs(ctx->ses, uerr), argv[1]);
		ion = c ? NULL : uc_ion(ctx->ses->uc, argv[1]);
	}
	if (c)
		return info_compound(ctx, c);
	if (ion)
		return info_ion(ctx, ion);
	return ses_compound(ctx->ses, argv[1], &c, err); /* fails with suggestions */
}

/* `compounds mine`: the compounds and ions the user defined. */
static int compounds_mine(im_ctx *ctx, char *err)
{
	char uerr[IM_ERRLEN], yields[256];
	usercomp *uc = ses_defs(ctx->ses, uerr);
	render *r;
	if (uerr[0])
		return im_fail(err, "%s", uerr);
	r = render_new(ctx->out);
	if (uc_ncompounds(uc) == 0)
		render_text(r, "no compounds of your own yet (`define NAME formula FORMULA ...`)");
	render_table(r, "compounds", NULL);
	for (int i = 0; i < uc_ncompounds(uc); i++) {
		const rd_compound *c = uc_compound_at(uc, i);
		uc_yields_text(c, yields, sizeof yields);
		render_row(r);
		render_str(r, "compound", "compound", c->name);
		render_str(r, "formula", "formula", c->formula);
		render_numj(r, "fw_g_mol", "FW", "g/mol", c->fw_g_mol, UNITS_DEC(3), 8);
		render_str(r, "yields", "yields", yields);
		render_bool(r, "hazard", NULL, c->hazard != NULL);
	}
	render_table_end(r);
	render_table(r, "ions", NULL);
	for (int i = 0; i < uc_nions(uc); i++) {
		const rd_ion *ion = uc_ion_at(uc, i);
		if (ion->z == 0)
			continue; /* a neutral solute's own particle */
		render_row(r);
		render_str(r, "ion", "ion", ion->symbol);
		render_int(r, "z", "z", ion->z);
		render_numj(r, "D_1e9_m2_s", "D (1e-9 m2/s)", NULL, ion->D_1e9_m2_s, UNITS_DEC(3), 6);
		render_str(r, "mobility", "mobility",
			   isfinite(ion->D_1e9_m2_s) ? "given" : "estimated from the molar mass "
			   "(or a wide bound)");
	}
	render_table_end(r);
	return render_done(r);
}

int cmd_compounds(im_ctx *ctx, int argc, char **argv, char *err)
{
	const refdb *ref = ctx->ses->ref;
	int n = refdb_ncompounds(ref), any = argc < 2;
	render *r;
	if (argc > 1 && im_strcaseeq(argv[1], "mine"))
		return compounds_mine(ctx, err);
	for (int i = 0; i < n && !any; i++)
		any = im_strcaseeq(argv[1], refdb_compound_at(ref, i)->kind);
	if (!any)
		return im_fail(err, "no compounds of kind '%.30s' (kinds: salt, acid, base, buffer, "
				    "chelator, sugar, organic-salt, nucleotide, drug)", argv[1]);
	r = render_new(ctx->out);
	render_table(r, "compounds", NULL);
	for (int i = 0; i < n; i++) {
		const rd_compound *c = refdb_compound_at(ref, i);
		if (argc > 1 && !im_strcaseeq(argv[1], c->kind))
			continue;
		render_row(r);
		render_str(r, "compound", "compound", c->name);
		render_str(r, "kind", "kind", c->kind);
		render_numj(r, "fw_g_mol", "FW", "g/mol", c->fw_g_mol, UNITS_DEC(3), 8);
		render_bool(r, "hazard", NULL, c->hazard != NULL);
		render_str(r, NULL, "", c->hazard ? "(caution)" : "");
	}
	render_table_end(r);
	return render_done(r);
}
