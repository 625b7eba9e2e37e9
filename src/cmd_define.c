/*
 * cmd_define.c - `define`: user-defined compounds and ions (usercomp.c),
 * stored in the user database (userdb.c).
 */
#include "cmd_define.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "formula.h"
#include "ljp.h"
#include "render.h"
#include "units.h"
#include "usercomp.h"
#include "userdb.h"

/* Store what was just added; on failure forget it again. */
static int store(im_ctx *ctx, usercomp *uc, int nc, int ni, const rd_compound *c,
		 const rd_ion *ion, const char *source, int *stored, char *err)
{
	struct userdb *u;
	int failed = 0;
	*stored = 0;
	if (!ctx->ses->db_path)
		return 0; /* no database: for this session only (said below) */
	u = ses_userdb(ctx->ses, 1, err, &failed);
	if (u && (c ? udb_define_compound(u, c, source, err) : udb_define_ion(u, ion, err)) == 0) {
		*stored = 1;
		return 0;
	}
	uc_truncate(uc, nc, ni);
	return -1;
}

/* A definition repeated as it stands (a recipe replayed in the same
 * database) is no error: it says so. */
static int same_again(im_ctx *ctx, const char *name, char *err)
{
	(void)err;
	render *r = render_new(ctx->out);
	render_str(r, "defined", NULL, name);
	render_bool(r, "already", NULL, 1);
	render_bool(r, "stored", NULL, 1);
	render_text(r, "%s is already defined so (nothing changed)", name);
	return render_done(r);
}

/* Does c have the formula and yields that d gives? */
static int same_compound(const rd_compound *c, const uc_compound_def *d)
{
	if (strcmp(c->formula, d->formula) != 0 || c->nyields != (d->nyields ? d->nyields : 1))
		return 0;
	for (int i = 0; i < d->nyields; i++)
		if (strcmp(c->yields[i].ion->symbol, d->yield_sym[i]) != 0 ||
		    c->yields[i].count != d->yield_n[i])
			return 0;
	return 1;
}

/* The words of `define ion SYMBOL charge Z [mobility D source TEXT]
 * [formula FORMULA]` into d (and *formula, or NULL). */
static int ion_words(int argc, char **argv, uc_ion_def *d, const char **formula, char *err)
{
	double z;
	if (argc < 5 || strcmp(argv[3], "charge") != 0)
		return im_fail(err, "usage: define ion SYMBOL charge Z [mobility D source TEXT] "
				    "[formula FORMULA]");
	if (units_number(argv[4], &z, err))
		return -1;
	if (z != floor(z) || z == 0)
		return im_fail(err, "charge '%s' must be a whole number other than 0 (a neutral "
				    "solute is a compound: `define NAME formula ...`)", argv[4]);
	d->z = (int)z;
	for (int i = 5; i < argc; i += 2) {
		if (i + 1 >= argc)
			return im_fail(err, "'%s' needs a value", argv[i]);
		if (strcmp(argv[i], "mobility") == 0) {
			if (units_number(argv[i + 1], &d->D_1e9_m2_s, err))
				return -1;
		} else if (strcmp(argv[i], "source") == 0) {
			d->source = argv[i + 1];
		} else if (strcmp(argv[i], "formula") == 0) {
			*formula = argv[i + 1];
		} else if (strcmp(argv[i], "mass") == 0) {
			if (units_number(argv[i + 1], &d->mass_g_mol, err))
				return -1;
			if (!(d->mass_g_mol >= 1 && d->mass_g_mol <= 5000))
				return im_fail(err, "molar mass %s g/mol is outside 1 to 5000", argv[i + 1]);
		} else {
			return im_fail(err, "unexpected '%.40s' (mobility D source TEXT, formula F, "
				       "mass G)", argv[i]);
		}
	}
	if (isfinite(d->D_1e9_m2_s) && !d->source)
		return im_fail(err, "a mobility needs its source: `mobility %g source TEXT`",
			       d->D_1e9_m2_s);
	return 0;
}

static void ion_render(render *r, const session *ses, const rd_ion *ion, const uc_ion_def *d)
{
	render_str(r, "defined_ion", NULL, ion->symbol);
	render_int(r, "z", NULL, ion->z);
	if (isfinite(ion->D_1e9_m2_s)) {
		render_numj(r, "D_1e9_m2_s", NULL, NULL, ion->D_1e9_m2_s, UNITS_SIG(3), 6);
		render_bool(r, "mobility_estimated", NULL, 0);
		render_text(r, "defined ion %s (z = %+d), D = %.3g x 1e-9 m2/s at 25 C (%s)",
			    ion->symbol, ion->z, ion->D_1e9_m2_s, d->source);
		return;
	}
	ljp_mobility m;
	ljp_mobility_of(ses->ref, ion, &m);
	render_numj(r, "D_1e9_m2_s", NULL, NULL, m.D25_m2_s * 1e9, UNITS_SIG(2), 6);
	render_bool(r, "mobility_estimated", NULL, 1);
	render_text(r, "defined ion %s (z = %+d); no mobility given: %s D = %.2g x 1e-9 m2/s, "
		    "within %.0f %% (estimated)", ion->symbol, ion->z,
		    m.how == LJP_FROM_MASS ? "Stokes-Einstein from its molar mass gives"
					   : "no molar mass either, so junctions take a wide bound,",
		    m.D25_m2_s * 1e9, 100 * m.rel_unc);
}

static int define_ion(im_ctx *ctx, usercomp *uc, int argc, char **argv, char *err)
{
	uc_ion_def d = {argv[2], 0, NAN, NULL, NAN};
	const char *formula = NULL;
	const rd_ion *ion;
	int nc = uc_ncompounds(uc), ni = uc_nions(uc), stored;
	formula_info fi;
	render *r;
	if (ion_words(argc, argv, &d, &formula, err))
		return -1;
	/* the molar mass, for the mobility estimate: the formula given, or
	 * the symbol itself when it reads as one */
	if (isfinite(d.mass_g_mol) && !formula) {
		/* a molar mass given as such (exported recipes) */
	} else if (formula ? formula_parse(formula, &fi, err) == 0
			   : formula_parse(d.symbol, &fi, err) == 0) {
		if (fi.charge != 0 && fi.charge != d.z)
			return im_fail(err, "%s has a charge of %+d, not %+d", formula ? formula
				       : d.symbol, fi.charge, d.z);
		d.mass_g_mol = fi.fw_g_mol;
	} else if (formula) {
		return -1;
	}
	if ((ion = uc_ion(uc, d.symbol)) != NULL && ion->z == d.z)
		return same_again(ctx, ion->symbol, err); /* a recipe run twice */
	if (uc_add_ion(uc, ctx->ses->ref, &d, &ion, err) ||
	    store(ctx, uc, nc, ni, NULL, ion, NULL, &stored, err))
		return -1;
	r = render_new(ctx->out);
	ion_render(r, ctx->ses, ion, &d);
	render_bool(r, "stored", NULL, stored);
	if (!stored)
		render_note(r, "no user database: the definition holds for this session only");
	return render_done(r);
}

/* The words of `define COMPOUND formula FORMULA [yields ION N ...]
 * [hazard TEXT] [source TEXT]` into d. */
static int compound_words(int argc, char **argv, uc_compound_def *d, char *err)
{
	int i = 4;
	memset(d, 0, sizeof *d);
	d->name = argv[1];
	if (argc < 4 || strcmp(argv[2], "formula") != 0)
		return im_fail(err, "usage: define COMPOUND formula FORMULA [yields ION N ...] "
				    "[hazard TEXT] [source TEXT]");
	d->formula = argv[3];
	while (i < argc) {
		if (i + 1 >= argc)
			return im_fail(err, "'%s' needs a value", argv[i]);
		if (strcmp(argv[i], "yields") == 0) {
			i++;
			while (i + 1 < argc && strcmp(argv[i], "hazard") != 0 &&
			       strcmp(argv[i], "source") != 0) {
				if (d->nyields == UC_MAX_YIELDS)
					return im_fail(err, "at most %d yields", UC_MAX_YIELDS);
				d->yield_sym[d->nyields] = argv[i];
				if (units_number(argv[i + 1], &d->yield_n[d->nyields], err))
					return im_fail(err, "yields: '%s' after %s is not a count",
						       argv[i + 1], argv[i]);
				d->nyields++;
				i += 2;
			}
			if (i < argc && strcmp(argv[i], "hazard") != 0 &&
			    strcmp(argv[i], "source") != 0)
				return im_fail(err, "yields: %s has no count", argv[i]);
			if (d->nyields == 0)
				return im_fail(err, "yields: name the ions, e.g. `yields K+ 1 Cl- 1`");
		} else if (strcmp(argv[i], "hazard") == 0) {
			d->hazard = argv[i + 1];
			i += 2;
		} else if (strcmp(argv[i], "source") == 0) {
			d->source = argv[i + 1];
			i += 2;
		} else {
			return im_fail(err, "unexpected '%.40s' (yields, hazard, source)", argv[i]);
		}
	}
	return 0;
}

static int define_compound(im_ctx *ctx, usercomp *uc, int argc, char **argv, char *err)
{
	uc_compound_def d;
	const rd_compound *c;
	int nc = uc_ncompounds(uc), ni = uc_nions(uc), stored;
	render *r;
	if (compound_words(argc, argv, &d, err))
		return -1;
	if ((c = uc_compound(uc, d.name)) != NULL && same_compound(c, &d))
		return same_again(ctx, c->name, err); /* a recipe run twice */
	if (uc_add_compound(uc, ctx->ses->ref, &d, &c, err) ||
	    store(ctx, uc, nc, ni, c, NULL, d.source, &stored, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "defined", NULL, c->name);
	render_str(r, "formula", NULL, c->formula);
	render_numj(r, "fw_g_mol", NULL, "g/mol", c->fw_g_mol, UNITS_DEC(3), 8);
	render_bool(r, "stored", NULL, stored);
	render_text(r, "defined %s: %s, %.3f g/mol (standard atomic weights)", c->name, c->formula,
		    c->fw_g_mol);
	if (c->hazard)
		render_text(r, "  caution: %s; see its safety data sheet and your local chemical-"
			    "safety rules", c->hazard);
	if (!stored)
		render_note(r, "no user database: the definition holds for this session only");
	return render_done(r);
}

int cmd_fw(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c;
	solution *s;
	sol_item *it;
	double fw = 0;
	render *r;
	(void)argc;
	if (ses_solution(ctx->ses, NULL, &s, err) || ses_compound(ctx->ses, argv[1], &c, err))
		return -1;
	if (!(it = sol_find(s, c)))
		return im_fail(err, "%s is not in %s: add it first", c->name, s->name);
	if (strcmp(argv[2], "off") != 0) {
		if (units_number(argv[2], &fw, err))
			return -1;
		if (!(fw >= 1 && fw <= 5000))
			return im_fail(err, "formula weight %s g/mol is outside 1 to 5000 g/mol", argv[2]);
	}
	it->fw_g_mol = fw;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_str(r, "compound", NULL, c->name);
	render_numj(r, "fw_g_mol", NULL, "g/mol", fw > 0 ? fw : c->fw_g_mol, UNITS_SIG(8), 8);
	render_numj(r, "table_fw_g_mol", NULL, "g/mol", c->fw_g_mol, UNITS_SIG(8), 8);
	render_bool(r, "from_bottle", NULL, fw > 0);
	if (fw > 0)
		render_text(r, "%s: %s weighed with %.4g g/mol from the bottle (the table has %.4g "
			    "g/mol%s)", s->name, c->name, fw, c->fw_g_mol,
			    fabs(fw / c->fw_g_mol - 1) > 0.2 ? "; a different hydrate or salt?" : "");
	else
		render_text(r, "%s: %s weighed with the table's %.4g g/mol", s->name, c->name,
			    c->fw_g_mol);
	return render_done(r);
}

int cmd_define(im_ctx *ctx, int argc, char **argv, char *err)
{
	char uerr[IM_ERRLEN];
	usercomp *uc = ses_defs(ctx->ses, uerr);
	if (uerr[0])
		return im_fail(err, "%s", uerr);
	if (im_strcaseeq(argv[1], "ion"))
		return define_ion(ctx, uc, argc, argv, err);
	return define_compound(ctx, uc, argc, argv, err);
}
