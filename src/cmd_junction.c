/*
 * cmd_junction.c - `junction` and `exchange`: look up the solutions,
 * turn their species into jn_ion pairs (mobilities from the reference
 * data), call junction.c / electrode.c, print text or one JSON object.
 */
#include "cmd_junction.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "electrode.h"
#include "junction.h"
#include "ljp.h"
#include "output.h"
#include "refdb.h"
#include "render.h"
#include "session.h"
#include "solution.h"
#include "units.h"

/* Largest bridge filling accepted, mM (the 5 M the amounts take). */
#define BRIDGE_MAX_mM 5000.0
/* Net charge above this fraction of the cations earns a caution. */
#define NEUTRAL_CAUTION_REL 0.02

/* Cautions of `exchange`, each a whole malloc'd line (nothing is cut). */
typedef struct cautions {
	char **msg;
	int n;
} cautions;

static void caution(cautions *c, const char *fmt, ...)
	__attribute__((format(printf, 2, 3)));

static void caution(cautions *c, const char *fmt, ...)
{
	va_list ap;
	int k;
	char *m;
	va_start(ap, fmt);
	k = vsnprintf(NULL, 0, fmt, ap);
	va_end(ap);
	if (k < 0)
		return;
	m = im_xmalloc((size_t)k + 1);
	va_start(ap, fmt);
	vsnprintf(m, (size_t)k + 1, fmt, ap);
	va_end(ap);
	c->msg = im_xrealloc(c->msg, (c->n + 1) * sizeof *c->msg);
	c->msg[c->n++] = m;
}

static void cautions_free(cautions *c)
{
	for (int i = 0; i < c->n; i++)
		free(c->msg[i]);
	free(c->msg);
	c->msg = NULL;
	c->n = 0;
}

static int find_solution(im_ctx *ctx, const char *name, solution **res, char *err)
{
	return ses_solution(ctx->ses, name, res, err); /* saved ones too */
}

/* Count the charged species of a state; 0 is an error naming the solution. */
static int need_ions(const sol_state *st, const char *name, char *err)
{
	for (int j = 0; j < st->n; j++)
		if (st->sp[j].ion->z != 0 && st->sp[j].mM > 0)
			return 0;
	return im_fail(err,
		       "solution '%.60s' has no ions (a junction needs charged species)",
		       name);
}

/* A pair of sides as jn_ion rows (Henderson only), for `exchange`. */
typedef struct pair {
	ljp_result r;
	jn_ion *ions; /* owned */
	int n;
} pair;

static void pair_free(pair *p)
{
	ljp_free(&p->r);
	free(p->ions);
	memset(p, 0, sizeof *p);
}

static int build_pair(im_ctx *ctx, const sol_state *a, const sol_state *b, double t_C,
		      pair *p, char *err)
{
	memset(p, 0, sizeof *p);
	if (ljp_compute(ctx->ses->ref, a, b, 0, t_C, LJP_BIT(LJP_HENDERSON), NULL, NULL, &p->r,
			err))
		return -1;
	p->n = p->r.n;
	p->ions = im_xcalloc(p->n ? p->n : 1, sizeof *p->ions);
	for (int k = 0; k < p->n; k++)
		p->ions[k] = p->r.sp[k].x;
	return 0;
}

/* The mobility cautions of a pair (those that name ions). */
static void mobility_caution(const pair *p, cautions *c)
{
	for (int i = 0; i < p->r.ncaution; i++)
		if (strncmp(p->r.caution[i], "mobilit", 7) == 0 ||
		    strncmp(p->r.caution[i], "no mobility", 11) == 0)
			caution(c, "%s", p->r.caution[i]);
}

int cmdj_ljp(const sol_state *pip, const sol_state *bath, int act, double t_C, double *ljp_mV,
	     double *lo_mV, double *hi_mV, char *err)
{
	return ljp_pair_mV(pip, bath, act, t_C, ljp_mV, lo_mV, hi_mV, err);
}

int cmdj_henderson_mV(const sol_state *pip, const sol_state *bath, int act, double t_C,
		      double *ljp_mV, char *err)
{
	return cmdj_ljp(pip, bath, act, t_C, ljp_mV, NULL, NULL, err);
}

static int states(im_ctx *ctx, const solution *a, const solution *b, sol_state *sa,
		  sol_state *sb, char *err)
{
	if (ses_compute(ctx->ses, a, sa, err))
		return -1;
	if (ses_compute(ctx->ses, b, sb, err)) {
		sol_state_free(sa);
		return -1;
	}
	return 0;
}

/* ---- junction ---- */

static const char *model_name[LJP_NMODELS] = {"henderson", "planck", "diffusion"};
static const char *model_title[LJP_NMODELS] = {"Henderson", "Planck", "free diffusion"};

static int parse_junction_opts(int argc, char **argv, int *act, int *models, char *err)
{
	*act = 0;
	*models = LJP_BIT(LJP_HENDERSON);
	for (int i = 3; i < argc; i++) {
		if (strcmp(argv[i], "activities") == 0) {
			*act = 1;
		} else if (strcmp(argv[i], "model") == 0) {
			const char *m;
			if (i + 1 >= argc)
				return im_fail(err,
					       "'model' needs henderson, planck, "
					       "diffusion or all");
			m = argv[++i];
			if (im_strcaseeq(m, "henderson"))
				*models = LJP_BIT(LJP_HENDERSON);
			else if (im_strcaseeq(m, "planck"))
				*models = LJP_BIT(LJP_PLANCK);
			else if (im_strcaseeq(m, "diffusion"))
				*models = LJP_BIT(LJP_DIFFUSION);
			else if (im_strcaseeq(m, "all"))
				*models = LJP_ALL;
			else
				return im_fail(err,
					       "unknown junction model '%.30s' (use "
					       "henderson, planck, diffusion or all)",
					       m);
		} else {
			return im_fail(err,
				       "unexpected '%.40s' (usage: junction PIPETTE BATH "
				       "[activities] [model "
				       "henderson|planck|diffusion|all])",
				       argv[i]);
		}
	}
	return 0;
}

static void text_corrections(render *rd, const ljp_result *r)
{
	render_text(rd, "sign: the LJP is the potential of the bath relative to the pipette "
		    "solution");
	render_text(rd, "correction, after zeroing with the pipette in this bath:");
	render_text(rd, "  whole-cell, outside-out: Vm = Vpipette - LJP; a command of %.0f mV "
		    "is really %.1f mV", r->wc_example_cmd_mV, r->wc_example_true_mV);
	render_text(rd, "  cell-attached: once sealed there is no junction at the tip, but "
		    "the offset keeps the LJP:\n    the pipette is truly at Vpipette - "
		    "LJP and the patch at Vrest - (Vpipette - LJP)");
	render_text(rd, "  inside-out: the bath faces the inner side, so Vm = -(Vpipette - "
		    "LJP0), with LJP0 the junction\n    when you zeroed (this one only if "
		    "you zeroed in this bath); %+.0f mV in the pipette is\n    %.1f mV "
		    "here. The patch closes the tip, so a bath change adds no tip "
		    "junction,\n    only the ground's shift (see `exchange`) (Neher 1992, "
		    "Methods Enzymol 207:123)", r->io_example_cmd_mV, r->io_example_true_mV);
	render_text(rd, "  perforated patch: Vm = Vpipette - LJP as for whole-cell, but this "
		    "ignores the Donnan\n    potential between pipette and cytoplasm "
		    "across the perforated patch");
}

static void json_corrections(render *rd, const ljp_result *r)
{
	render_object(rd, "correction");
	render_str(rd, "whole_cell", NULL, "Vm = Vpipette - LJP");
	render_str(rd, "outside_out", NULL, "Vm = Vpipette - LJP");
	render_numj(rd, "example_command_mV", NULL, NULL, r->wc_example_cmd_mV, 0, 6);
	render_numj(rd, "example_true_mV", NULL, NULL, r->wc_example_true_mV, 0, 6);
	render_str(rd, "cell_attached", NULL,
		   "pipette truly at Vpipette - LJP; Vpatch = Vrest - (Vpipette - LJP)");
	render_str(rd, "inside_out", NULL,
		   "Vm = -(Vpipette - LJP0), LJP0 the junction at zeroing; a bath change "
		   "adds no tip junction, only the ground's shift");
	render_numj(rd, "inside_out_example_command_mV", NULL, NULL, r->io_example_cmd_mV, 0, 6);
	render_numj(rd, "inside_out_example_true_mV", NULL, NULL, r->io_example_true_mV, 0, 6);
	render_str(rd, "perforated", NULL,
		   "Vm = Vpipette - LJP; ignores the Donnan potential between pipette and "
		   "cytoplasm across the perforated patch");
	render_object_end(rd);
}

static const char *range_method =
	"interval: each mobility within +- its relative uncertainty (a bound); "
	"vertex method on the Henderson equation, the same offsets for the other "
	"models";

/* The symbols of the species whose mobility is unknown (how == LJP_NO_SIZE,
 * by 0) or estimated (by 1), as a JSON list under key. */
static void json_mobility_list(render *rd, const char *key, const ljp_result *r, int est)
{
	const char **v = im_xcalloc((size_t)r->n + 1, sizeof *v);
	int n = 0;
	for (int k = 0; k < r->n; k++)
		if (est ? r->sp[k].mob.cls == RD_MOB_ESTIMATED : r->sp[k].mob.how == LJP_NO_SIZE)
			v[n++] = r->sp[k].ion->symbol;
	render_list(rd, key, NULL, v, n);
	free(v);
}

/* The head of the JSON: the pair, the value, its range and where the
 * mobilities came from. */
static void json_head(render *rd, const char *pn, const char *bn, int act, const ljp_result *r)
{
	render_str(rd, "pipette", NULL, pn);
	render_str(rd, "bath", NULL, bn);
	render_numj(rd, "temperature_C", NULL, NULL, r->t_C, 0, 6);
	render_str(rd, "from", NULL, act ? "activities" : "concentrations");
	render_str(rd, "model", NULL, r->models_asked > 1 ? "all" : model_name[r->main_model]);
	render_numj(rd, "ljp_mV", NULL, NULL, r->ljp_mV, 0, 6);
	render_range(rd, "ljp_range_mV", NULL, "mV", r->lo_mV, r->hi_mV, UNITS_DEC(1));
	render_range(rd, "henderson_range_mV", NULL, "mV", r->henderson_lo_mV,
		     r->henderson_hi_mV, UNITS_DEC(1));
	render_str(rd, "range_method", NULL, range_method);
	render_object(rd, "mobility_sources");
	render_int(rd, "measured", NULL, r->count[RD_MOB_MEASURED]);
	render_int(rd, "from_memory", NULL, r->count[RD_MOB_MEMORY]);
	render_int(rd, "estimated", NULL, r->count[RD_MOB_ESTIMATED]);
	render_object_end(rd);
	/* species with no mobility and no size in the data (bounded widely),
	 * and those whose mobility is estimated: whole lists */
	json_mobility_list(rd, "mobility_unknown", r, 0);
	json_mobility_list(rd, "mobility_estimated", r, 1);
	if (r->driver >= 0) {
		render_object(rd, "range_driver");
		render_str(rd, "ion", NULL, r->sp[r->driver].ion->symbol);
		render_numj(rd, "width_share", NULL, NULL, r->driver_share, 0, 3);
		render_object_end(rd);
	}
	render_str(rd, "sign", NULL, "potential of the bath relative to the pipette solution");
	render_bool(rd, "identical", NULL, r->identical);
}

/* The models asked, their values and the diffusion solver's figures. */
static void json_models(render *rd, const ljp_result *r)
{
	render_object(rd, "models");
	for (int m = 0; m < LJP_NMODELS; m++)
		if (r->model[m].asked && r->model[m].ok)
			render_numj(rd, model_name[m], NULL, NULL, r->model[m].ljp_mV, 0, 9);
	render_object_end(rd);
	if (r->models_ok < r->models_asked) {
		render_object(rd, "not_applicable");
		for (int m = 0; m < LJP_NMODELS; m++)
			if (r->model[m].asked && !r->model[m].ok)
				render_str(rd, model_name[m], NULL, r->model[m].why);
		render_object_end(rd);
	}
	render_int(rd, "models_asked", NULL, r->models_asked);
	render_int(rd, "models_ok", NULL, r->models_ok);
	if (r->models_asked > 1)
		render_numj(rd, "spread_mV", NULL, NULL, r->spread_mV, 0, 6);
	if (r->model[LJP_DIFFUSION].asked && r->model[LJP_DIFFUSION].ok &&
	    r->diffusion.grid_points > 0) {
		render_object(rd, "diffusion_solver");
		render_int(rd, "grid_points", NULL, r->diffusion.grid_points);
		render_int(rd, "grids", NULL, r->diffusion.grids);
		render_int(rd, "steps", NULL, r->diffusion.newton_its);
		render_int(rd, "continuation_steps", NULL, r->diffusion.continuation);
		render_numj(rd, "error_estimate_mV", NULL, NULL, r->diffusion.grid_err_mV, 0, 3);
		render_object_end(rd);
	}
}

/* Each ion's part: a JSON-only table (the text shows the ranked bars). */
static void json_contributions(render *rd, const ljp_result *r)
{
	render_table(rd, "contributions", NULL);
	for (int k = 0; k < r->n; k++) {
		const ljp_species *s = &r->sp[k];
		render_row(rd);
		render_str(rd, "ion", NULL, s->x.symbol);
		render_int(rd, "z", NULL, s->x.z);
		render_numj(rd, "D_1e9_m2_s", NULL, NULL, s->x.D_m2_s * 1e9, 0, 10);
		render_numj(rd, "pipette_mM", NULL, NULL, s->x.pip_mM, 0, 10);
		render_numj(rd, "bath_mM", NULL, NULL, s->x.bath_mM, 0, 10);
		render_numj(rd, "share_mV", NULL, NULL, s->share_mV, 0, 5);
		render_str(rd, "mobility_class", NULL, ljp_class_name(s->mob.cls));
		render_numj(rd, "mobility_rel_unc", NULL, NULL, s->mob.rel_unc, 0, 3);
		render_str(rd, "mobility_source", NULL, s->mob.source ? s->mob.source->id : NULL);
		render_numj(rd, "range_width_share", NULL, NULL, s->width_share, 0, 3);
	}
	render_table_end(rd);
}

static void json_junction(render *rd, const char *pn, const char *bn, int act,
			  const ljp_result *r)
{
	json_head(rd, pn, bn, act, r);
	json_models(rd, r);
	json_contributions(rd, r);
	json_corrections(rd, r);
	render_list(rd, "cautions", NULL, (const char *const *)r->caution, r->ncaution);
}

static void text_model_line(render *rd, const ljp_result *r, int m)
{
	const ljp_model_run *x = &r->model[m];
	if (!x->ok) {
		render_text(rd, "  %-16s %8s   no value: %s", model_title[m], "-", x->why);
		return;
	}
	render_text(rd, "  %-16s %+8.2f   (%.1f to %.1f)", model_title[m], x->ljp_mV, x->lo_mV,
		    x->hi_mV);
	if (m == LJP_DIFFUSION && r->diffusion.grid_points > 0)
		render_text_more(rd, "   grid %d points, error ~%.1g mV", r->diffusion.grid_points,
				 fmax(r->diffusion.grid_err_mV, 1e-6));
}

/* The models compared (model all), or the Henderson value beside another. */
static void text_models(render *rd, const ljp_result *r)
{
	if (r->models_asked > 1) {
		render_text(rd, "  %-16s %8s   %s", "model", "LJP mV", "range mV");
		for (int m = 0; m < LJP_NMODELS; m++)
			if (r->model[m].asked)
				text_model_line(rd, r, m);
		if (r->models_ok >= 2)
			render_text(rd, "  %-16s %8.2f   (largest minus smallest, over %d of %d "
				    "models)", "spread", r->spread_mV, r->models_ok,
				    r->models_asked);
		else
			render_text(rd, "  %-16s %8s   (only %d of %d models gave a value)",
				    "spread", "-", r->models_ok, r->models_asked);
	} else if (r->main_model != LJP_HENDERSON) {
		render_text(rd, "  (Henderson gives %+.2f mV", r->henderson_mV);
		if (r->main_model == LJP_DIFFUSION && r->diffusion.grid_points > 0)
			render_text_more(rd, "; free diffusion solved on a grid of %d points, "
					 "estimated error ~%.1g mV", r->diffusion.grid_points,
					 fmax(r->diffusion.grid_err_mV, 1e-6));
		render_text_more(rd, ")");
	}
}

static void text_junction(render *rd, const char *pn, const char *bn, int act,
			  const ljp_result *r)
{
	render_text(rd, "Liquid junction potential: pipette %s | bath %s, %.1f C, from %s", pn,
		    bn, r->t_C, act ? "activities" : "concentrations");
	if (r->identical) {
		render_text(rd, "  pipette and bath are identical: there is no liquid junction "
			    "potential (LJP = 0 mV)\n  no correction: Vm = Vpipette");
		return;
	}
	render_text(rd, "  LJP = %+.1f mV (%.1f to %.1f), %s: the bath is %.1f mV %s to the "
		    "pipette solution", r->ljp_mV, r->lo_mV, r->hi_mV, model_title[r->main_model],
		    fabs(r->ljp_mV), r->ljp_mV >= 0 ? "positive" : "negative");
	render_text(rd, "  range: every mobility within its uncertainty (interval, vertex "
		    "method); mobilities\n    %d measured, %d from memory, %d estimated",
		    r->count[RD_MOB_MEASURED], r->count[RD_MOB_MEMORY], r->count[RD_MOB_ESTIMATED]);
	if (r->driver >= 0 && r->driver_share >= 0.4)
		render_text_more(rd, "; %s alone makes %.0f %% of the width",
				 r->sp[r->driver].ion->symbol, 100.0 * r->driver_share);
	text_models(rd, r);
	char *bd = ljp_breakdown_text(r, "  ");
	size_t n = strlen(bd);
	if (n && bd[n - 1] == '\n')
		bd[n - 1] = '\0';
	render_text(rd, "what drives it: each ion's share of the Henderson LJP, largest "
		    "first (bar to scale;\nbath-positive shares to the right of |; "
		    "all data per ion: --json or `info ION`):%s%s", n > 1 ? "\n" : "", bd);
	free(bd);
	text_corrections(rd, r);
	for (int i = 0; i < r->ncaution; i++)
		render_text(rd, "%s", r->caution[i]);
}

int cmd_junction(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *sp, *sb;
	sol_state st_p, st_b;
	ljp_result r;
	int act, models;
	if (argc < 3)
		return im_fail(err, "usage: junction PIPETTE BATH [activities] [model "
				    "henderson|planck|diffusion|all]");
	if (parse_junction_opts(argc, argv, &act, &models, err) ||
	    find_solution(ctx, argv[1], &sp, err) ||
	    find_solution(ctx, argv[2], &sb, err))
		return -1;
	if (states(ctx, sp, sb, &st_p, &st_b, err))
		return -1;
	if (ljp_compute(ctx->ses->ref, &st_p, &st_b, act, ctx->ses->temp_C, models, sp->name, sb->name,
			&r, err)) {
		sol_state_free(&st_p);
		sol_state_free(&st_b);
		return -1;
	}
	render *rd = render_new(ctx->out);
	text_junction(rd, sp->name, sb->name, act, &r);
	json_junction(rd, sp->name, sb->name, act, &r);
	render_done(rd);
	ljp_free(&r);
	sol_state_free(&st_p);
	sol_state_free(&st_b);
	return 0;
}

/* ---- exchange ---- */

static int is_conc_unit(const char *u, double *factor)
{
	if (strcmp(u, "mM") == 0 || im_strcaseeq(u, "mmol/L")) {
		*factor = 1.0;
		return 1;
	}
	if (strcmp(u, "M") == 0 || im_strcaseeq(u, "mol/L")) {
		*factor = 1000.0;
		return 1;
	}
	return 0;
}

/* A bridge concentration: num may carry its unit ("3M", "3000mM"); unit
 * may be NULL (then mM) or the next word.  The one number parser
 * (units.c) reads it. */
static int parse_conc(const char *num, const char *unit, double *mM, char *err)
{
	if (!num || !*num)
		return im_fail(err, "missing bridge concentration");
	if (units_amount_mM(num, unit, 0, mM, err))
		return -1;
	if (*mM > BRIDGE_MAX_mM)
		return im_fail(err, "bridge concentration must be > 0 and at most %g M",
			       BRIDGE_MAX_mM / 1000.0);
	return 0;
}

typedef struct xargs {
	const char *pipette;
	el_ground ground;
	const char *salt;
	const rd_compound *salt_c; /* set by bridge_state */
	double salt_mM;
} xargs;

static int parse_exchange_opts(int argc, char **argv, xargs *x, char *err)
{
	memset(x, 0, sizeof *x);
	x->ground = EL_GROUND_AGCL;
	for (int i = 3; i < argc; i++) {
		const char *w = argv[i];
		if (strcmp(w, "pipette") == 0) {
			if (i + 1 >= argc)
				return im_fail(err, "'pipette' needs a solution name");
			x->pipette = argv[++i];
			continue;
		}
		if (strcmp(w, "ground") == 0) {
			if (i + 1 >= argc)
				return im_fail(err,
					       "'ground' needs agcl or bridge SALT CONC");
			w = argv[++i];
		}
		if (im_strcaseeq(w, "agcl")) {
			x->ground = EL_GROUND_AGCL;
		} else if (strcmp(w, "bridge") == 0) {
			double f;
			const char *unit = NULL;
			if (i + 2 >= argc)
				return im_fail(err,
					       "'bridge' needs SALT and CONC, e.g. "
					       "bridge KCl 3 M");
			x->ground = EL_GROUND_BRIDGE;
			x->salt = argv[i + 1];
			if (i + 3 < argc && is_conc_unit(argv[i + 3], &f))
				unit = argv[i + 3];
			if (parse_conc(argv[i + 2], unit, &x->salt_mM, err))
				return -1;
			i += unit ? 3 : 2;
		} else {
			return im_fail(err,
				       "unexpected '%.40s' (usage: exchange OLD NEW "
				       "[pipette NAME] [ground agcl|bridge SALT CONC])",
				       w);
		}
	}
	return 0;
}

static double cl_activity(im_ctx *ctx, const sol_state *st)
{
	const rd_ion *cl = refdb_ion(ctx->ses->ref, "Cl-");
	const sol_species *s = cl ? sol_state_find(st, cl) : NULL;
	return s ? s->act_mM : 0.0;
}

static int bridge_state(im_ctx *ctx, xargs *x, sol_state *st, char *err)
{
	const rd_compound *c = refdb_compound(ctx->ses->ref, x->salt);
	solution tmp;
	int rc;
	if (!c) {
		const char *sug[3];
		int n = refdb_suggest(ctx->ses->ref, x->salt, sug, 3);
		if (n > 0)
			return im_fail(err,
				       "unknown compound '%.60s' for the bridge; did you "
				       "mean %s?",
				       x->salt, sug[0]);
		return im_fail(err,
			       "unknown compound '%.60s' for the bridge (see `compounds`)",
			       x->salt);
	}
	x->salt_c = c;
	sol_init(&tmp, "bridge");
	sol_add(&tmp, c, x->salt_mM);
	rc = sol_compute(&tmp, ses_env(ctx->ses), st, err);
	sol_free(&tmp);
	if (rc)
		return -1;
	if (need_ions(st, c->name, err)) {
		sol_state_free(st);
		return -1;
	}
	return 0;
}

/* Everything an exchange works with; exch_free releases what was made. */
typedef struct exch {
	xargs xa;
	solution *so, *sn, *spp;
	sol_state st_o, st_n, st_p, st_b;
	pair tip_o, tip_n, br_o, br_n;
	el_exchange_in in;
	el_exchange x;
	cautions cw;
	int have_on, have_p, have_b;
} exch;

static void exch_free(exch *e)
{
	cautions_free(&e->cw);
	pair_free(&e->tip_o);
	pair_free(&e->tip_n);
	pair_free(&e->br_o);
	pair_free(&e->br_n);
	if (e->have_p)
		sol_state_free(&e->st_p);
	if (e->have_b)
		sol_state_free(&e->st_b);
	if (e->have_on) {
		sol_state_free(&e->st_o);
		sol_state_free(&e->st_n);
	}
}

/* The tip junctions of the pipette against the old and the new bath. */
static int exch_tip(im_ctx *ctx, exch *e, char *err)
{
	if (sol_compute(e->spp, ses_env(ctx->ses), &e->st_p, err))
		return -1;
	e->have_p = 1;
	if (need_ions(&e->st_p, e->spp->name, err) ||
	    build_pair(ctx, &e->st_p, &e->st_o, ctx->ses->temp_C, &e->tip_o, err) ||
	    build_pair(ctx, &e->st_p, &e->st_n, ctx->ses->temp_C, &e->tip_n, err))
		return -1;
	e->in.tip_old = e->tip_o.ions;
	e->in.n_tip_old = e->tip_o.n;
	e->in.tip_new = e->tip_n.ions;
	e->in.n_tip_new = e->tip_n.n;
	mobility_caution(&e->tip_o, &e->cw);
	return 0;
}

/* The junctions of a salt bridge against the old and the new bath. */
static int exch_bridge(im_ctx *ctx, exch *e, char *err)
{
	if (bridge_state(ctx, &e->xa, &e->st_b, err))
		return -1;
	e->have_b = 1;
	if (build_pair(ctx, &e->st_b, &e->st_o, ctx->ses->temp_C, &e->br_o, err) ||
	    build_pair(ctx, &e->st_b, &e->st_n, ctx->ses->temp_C, &e->br_n, err))
		return -1;
	e->in.bridge_old = e->br_o.ions;
	e->in.n_bridge_old = e->br_o.n;
	e->in.bridge_new = e->br_n.ions;
	e->in.n_bridge_new = e->br_n.n;
	if (!e->spp)
		mobility_caution(&e->br_o, &e->cw);
	return 0;
}

/* The shift of an exchange (electrode.c), with its cautions. */
static int exch_compute(im_ctx *ctx, exch *e, char *err)
{
	if (need_ions(&e->st_o, e->so->name, err) || need_ions(&e->st_n, e->sn->name, err))
		return -1;
	e->in.ground = e->xa.ground;
	e->in.a_cl_old_mM = cl_activity(ctx, &e->st_o);
	e->in.a_cl_new_mM = cl_activity(ctx, &e->st_n);
	if (e->xa.ground == EL_GROUND_AGCL && (e->in.a_cl_old_mM <= 0 || e->in.a_cl_new_mM <= 0))
		return im_fail(err, "bath '%.60s' has no Cl-: a bare Ag/AgCl ground has no defined"
			       " potential there; use a salt bridge (e.g. `ground bridge KCl 3 M`)",
			       e->in.a_cl_old_mM <= 0 ? e->so->name : e->sn->name);
	if (e->spp && exch_tip(ctx, e, err))
		return -1;
	if (e->xa.ground == EL_GROUND_BRIDGE && exch_bridge(ctx, e, err))
		return -1;
	if (el_exchange_shift_mV(&e->in, ctx->ses->temp_C, &e->x, err))
		return -1;
	if (e->x.bridge_advised && e->xa.ground == EL_GROUND_AGCL)
		caution(&e->cw, "the Ag/AgCl term is %.1f mV, above %.0f mV: a salt-bridge ground"
			" (e.g. 3 M KCl in agar) is advisable (common practice)", e->x.agcl_mV,
			EL_BRIDGE_ADVISE_mV);
	return 0;
}

static void exch_json(render *r, double t_C, const exch *e)
{
	const el_exchange *x = &e->x;
	render_str(r, "from", NULL, e->so->name);
	render_str(r, "to", NULL, e->sn->name);
	render_str(r, "ground", NULL, e->xa.ground == EL_GROUND_AGCL ? "agcl" : "bridge");
	render_numj(r, "temperature_C", NULL, NULL, t_C, 0, 6);
	render_numj(r, "shift_mV", NULL, NULL, x->shift_mV, 0, 6);
	render_bool(r, "includes_tip", NULL, x->have_tip);
	render_numj(r, "ground_term_mV", NULL, NULL, x->ground_mV, 0, 6);
	render_str(r, "sign", NULL, "shift: open-tip reading (pipette minus ground) in the new"
		   " bath after zeroing in the old; ground term: change of the bath against the"
		   " ground wire");
	render_numj(r, "a_cl_old_mM", NULL, NULL, e->in.a_cl_old_mM, 0, 6);
	render_numj(r, "a_cl_new_mM", NULL, NULL, e->in.a_cl_new_mM, 0, 6);
	if (x->have_agcl)
		render_numj(r, "agcl_term_mV", NULL, NULL, x->agcl_mV, 0, 6);
	render_bool(r, "bridge_advised", NULL, x->bridge_advised);
	if (e->xa.ground == EL_GROUND_BRIDGE) {
		render_object(r, "bridge");
		render_str(r, "salt", NULL, e->xa.salt_c ? e->xa.salt_c->name : e->xa.salt);
		render_numj(r, "conc_mM", NULL, NULL, e->xa.salt_mM, 0, 6);
		render_numj(r, "old_ljp_mV", NULL, NULL, x->bridge_old_mV, 0, 6);
		render_numj(r, "new_ljp_mV", NULL, NULL, x->bridge_new_mV, 0, 6);
		render_object_end(r);
	}
	render_str(r, "pipette", NULL, e->spp ? e->spp->name : NULL);
	if (x->have_tip) {
		render_numj(r, "tip_old_mV", NULL, NULL, x->tip_old_mV, 0, 6);
		render_numj(r, "tip_new_mV", NULL, NULL, x->tip_new_mV, 0, 6);
		render_numj(r, "tip_change_mV", NULL, NULL, x->tip_new_mV - x->tip_old_mV, 0, 6);
	}
	render_str(r, "correction", NULL, "whole-cell, outside-out in the new bath: Vm ="
		   " Vpipette - LJP(pipette|old) - ground_term; inside-out: Vm = -(Vpipette -"
		   " LJP0 - ground_term)");
	render_numj(r, "erev_add_mV", NULL, NULL, 0.0 - x->ground_mV, 0, 6);
	render_list(r, "cautions", NULL, (const char *const *)e->cw.msg, e->cw.n);
}

/* The electrode lines: a bare Ag/AgCl wire or a salt bridge. */
static void exch_text_ground(render *r, const exch *e)
{
	const el_exchange *x = &e->x;
	if (x->have_agcl && e->xa.ground == EL_GROUND_AGCL)
		render_text(r, "  Ag/AgCl in the bath: Cl- activity %.4g -> %.4g mM: electrode"
			    " %+.1f mV,\n    so the bath %+.1f mV against it", e->in.a_cl_old_mM,
			    e->in.a_cl_new_mM, 0.0 - x->agcl_mV, x->agcl_mV);
	if (e->xa.ground != EL_GROUND_BRIDGE)
		return;
	render_text(r, "  bridge %s %.4g mM: junction to the old bath %+.2f mV, to the new"
		    " %+.2f mV\n    (bath relative to bridge, Henderson with concentrations)",
		    e->xa.salt_c ? e->xa.salt_c->name : e->xa.salt, e->xa.salt_mM,
		    x->bridge_old_mV, x->bridge_new_mV);
	if (x->have_agcl)
		render_text(r, "  for comparison, a bare Ag/AgCl ground would move the bath"
			    " %+.1f mV\n    (Cl- activity %.4g -> %.4g mM)", x->agcl_mV,
			    e->in.a_cl_old_mM, e->in.a_cl_new_mM);
}

static void exch_text(render *r, double t_C, const exch *e)
{
	const el_exchange *x = &e->x;
	const char *o = e->so->name, *n = e->sn->name;
	render_text(r, "Bath exchange %s -> %s, %.1f C, ground: %s", o, n, t_C,
		    e->xa.ground == EL_GROUND_AGCL ? "bare Ag/AgCl" : "salt bridge");
	if (e->so == e->sn || sol_equal(e->so, e->sn))
		render_text(r, "  the two baths are identical: nothing shifts (0 mV)");
	exch_text_ground(r, e);
	render_text(r, "  ground term g = %+.2f mV: the bath moves this much against the ground"
		    " wire", x->ground_mV);
	if (x->have_tip)
		render_text(r, "  tip junction: pipette %s | old %+.2f mV, | new %+.2f mV (change"
			    " %+.2f mV)", e->spp->name, x->tip_old_mV, x->tip_new_mV,
			    x->tip_new_mV - x->tip_old_mV);
	render_text(r, "  shift = %+.2f mV: the open-tip reading in the new bath after zeroing"
		    " in the old\n    %s", x->shift_mV, x->have_tip ?
		    "(g minus the change of the tip junction)" :
		    "(ground term only: give `pipette NAME` for the tip term)");
	render_text(r, "correction, zeroed in %s, recording in %s:", o, n);
	render_text(r, "  whole-cell, outside-out: Vm = Vpipette - LJP(pipette|%s) - g; the"
		    " sealed tip has no junction,\n    so the bath's shift appears with the"
		    " opposite sign in Vm: a reversal potential read\n    in %s is truly Erev ="
		    " read - LJP(pipette|%s) %+.2f mV", o, n, o, 0.0 - x->ground_mV);
	render_text(r, "  inside-out: Vm = -(Vpipette - LJP0 - g)");
	for (int i = 0; i < e->cw.n; i++)
		render_text(r, "%s", e->cw.msg[i]);
}

int cmd_exchange(im_ctx *ctx, int argc, char **argv, char *err)
{
	exch e;
	int rc = -1;
	memset(&e, 0, sizeof e);
	if (argc < 3)
		return im_fail(err, "usage: exchange OLD NEW [pipette NAME] [ground agcl|bridge"
			       " SALT CONC]");
	if (parse_exchange_opts(argc, argv, &e.xa, err) ||
	    find_solution(ctx, argv[1], &e.so, err) || find_solution(ctx, argv[2], &e.sn, err) ||
	    (e.xa.pipette && find_solution(ctx, e.xa.pipette, &e.spp, err)))
		return -1;
	if (states(ctx, e.so, e.sn, &e.st_o, &e.st_n, err))
		return -1;
	e.have_on = 1;
	if (exch_compute(ctx, &e, err) == 0) {
		render *r = render_new(ctx->out);
		exch_text(r, ctx->ses->temp_C, &e);
		exch_json(r, ctx->ses->temp_C, &e);
		render_done(r);
		rc = 0;
	}
	exch_free(&e);
	return rc;
}
