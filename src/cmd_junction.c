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

static void print_cautions(im_ctx *ctx, const cautions *c)
{
	for (int i = 0; i < c->n; i++)
		out_note(ctx->out, "%s", c->msg[i]);
}

static void json_cautions(jw *w, const cautions *c)
{
	jw_arr(w, "cautions");
	for (int i = 0; i < c->n; i++)
		jw_str(w, NULL, c->msg[i]);
	jw_close(w);
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
	if (sol_compute(a, ses_env(ctx->ses), sa, err))
		return -1;
	if (sol_compute(b, ses_env(ctx->ses), sb, err)) {
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

static void print_corrections(im_ctx *ctx, const ljp_result *r)
{
	out_printf(ctx->out,
		   "sign: the LJP is the potential of the bath relative to the pipette "
		   "solution\n");
	out_printf(ctx->out,
		   "correction, after zeroing with the pipette in this bath:\n");
	out_printf(ctx->out,
		   "  whole-cell, outside-out: Vm = Vpipette - LJP; a command of %.0f mV "
		   "is really %.1f mV\n",
		   r->wc_example_cmd_mV, r->wc_example_true_mV);
	out_printf(ctx->out,
		   "  cell-attached: once sealed there is no junction at the tip, but "
		   "the offset keeps the LJP:\n    the pipette is truly at Vpipette - "
		   "LJP and the patch at Vrest - (Vpipette - LJP)\n");
	out_printf(ctx->out,
		   "  inside-out: the bath faces the inner side, so Vm = -(Vpipette - "
		   "LJP0), with LJP0 the junction\n    when you zeroed (this one only if "
		   "you zeroed in this bath); %+.0f mV in the pipette is\n    %.1f mV "
		   "here. The patch closes the tip, so a bath change adds no tip "
		   "junction,\n    only the ground's shift (see `exchange`) (Neher 1992, "
		   "Methods Enzymol 207:123)\n",
		   r->io_example_cmd_mV, r->io_example_true_mV);
	out_printf(ctx->out,
		   "  perforated patch: Vm = Vpipette - LJP as for whole-cell, but this "
		   "ignores the Donnan\n    potential between pipette and cytoplasm "
		   "across the perforated patch\n");
}

static void json_corrections(jw *w, const ljp_result *r)
{
	jw_obj(w, "correction");
	jw_str(w, "whole_cell", "Vm = Vpipette - LJP");
	jw_str(w, "outside_out", "Vm = Vpipette - LJP");
	jw_num(w, "example_command_mV", r->wc_example_cmd_mV, 6);
	jw_num(w, "example_true_mV", r->wc_example_true_mV, 6);
	jw_str(w, "cell_attached",
	       "pipette truly at Vpipette - LJP; Vpatch = Vrest - (Vpipette - LJP)");
	jw_str(w, "inside_out",
	       "Vm = -(Vpipette - LJP0), LJP0 the junction at zeroing; a bath change "
	       "adds no tip junction, only the ground's shift");
	jw_num(w, "inside_out_example_command_mV", r->io_example_cmd_mV, 6);
	jw_num(w, "inside_out_example_true_mV", r->io_example_true_mV, 6);
	jw_str(w, "perforated",
	       "Vm = Vpipette - LJP; ignores the Donnan potential between pipette and "
	       "cytoplasm across the perforated patch");
	jw_close(w);
}

static const char *range_method =
	"interval: each mobility within +- its relative uncertainty (a bound); "
	"vertex method on the Henderson equation, the same offsets for the other "
	"models";

static void json_junction(im_ctx *ctx, const char *pn, const char *bn, int act,
			  const ljp_result *r)
{
	jw w;
	jw_begin(&w, ctx->out);
	jw_str(&w, "pipette", pn);
	jw_str(&w, "bath", bn);
	jw_num(&w, "temperature_C", r->t_C, 6);
	jw_str(&w, "from", act ? "activities" : "concentrations");
	jw_str(&w, "model", r->models_asked > 1 ? "all" : model_name[r->main_model]);
	jw_num(&w, "ljp_mV", r->ljp_mV, 6);
	jw_arr(&w, "ljp_range_mV");
	jw_num(&w, NULL, r->lo_mV, 6);
	jw_num(&w, NULL, r->hi_mV, 6);
	jw_close(&w);
	jw_arr(&w, "henderson_range_mV");
	jw_num(&w, NULL, r->henderson_lo_mV, 6);
	jw_num(&w, NULL, r->henderson_hi_mV, 6);
	jw_close(&w);
	jw_str(&w, "range_method", range_method);
	jw_obj(&w, "mobility_sources");
	jw_int(&w, "measured", r->count[RD_MOB_MEASURED]);
	jw_int(&w, "from_memory", r->count[RD_MOB_MEMORY]);
	jw_int(&w, "estimated", r->count[RD_MOB_ESTIMATED]);
	jw_close(&w);
	/* species with no mobility and no size in the data (bounded widely),
	 * and those whose mobility is estimated: whole lists */
	jw_arr(&w, "mobility_unknown");
	for (int k = 0; k < r->n; k++)
		if (r->sp[k].mob.how == LJP_NO_SIZE)
			jw_str(&w, NULL, r->sp[k].ion->symbol);
	jw_close(&w);
	jw_arr(&w, "mobility_estimated");
	for (int k = 0; k < r->n; k++)
		if (r->sp[k].mob.cls == RD_MOB_ESTIMATED)
			jw_str(&w, NULL, r->sp[k].ion->symbol);
	jw_close(&w);
	if (r->driver >= 0) {
		jw_obj(&w, "range_driver");
		jw_str(&w, "ion", r->sp[r->driver].ion->symbol);
		jw_num(&w, "width_share", r->driver_share, 3);
		jw_close(&w);
	}
	jw_str(&w, "sign", "potential of the bath relative to the pipette solution");
	jw_bool(&w, "identical", r->identical);
	jw_obj(&w, "models");
	for (int m = 0; m < LJP_NMODELS; m++)
		if (r->model[m].asked && r->model[m].ok)
			jw_num(&w, model_name[m], r->model[m].ljp_mV, 9);
	jw_close(&w);
	if (r->models_ok < r->models_asked) {
		jw_obj(&w, "not_applicable");
		for (int m = 0; m < LJP_NMODELS; m++)
			if (r->model[m].asked && !r->model[m].ok)
				jw_str(&w, model_name[m], r->model[m].why);
		jw_close(&w);
	}
	jw_int(&w, "models_asked", r->models_asked);
	jw_int(&w, "models_ok", r->models_ok);
	if (r->models_asked > 1)
		jw_num(&w, "spread_mV", r->spread_mV, 6);
	if (r->model[LJP_DIFFUSION].asked && r->model[LJP_DIFFUSION].ok &&
	    r->diffusion.grid_points > 0) {
		jw_obj(&w, "diffusion_solver");
		jw_int(&w, "grid_points", r->diffusion.grid_points);
		jw_int(&w, "grids", r->diffusion.grids);
		jw_int(&w, "steps", r->diffusion.newton_its);
		jw_int(&w, "continuation_steps", r->diffusion.continuation);
		jw_num(&w, "error_estimate_mV", r->diffusion.grid_err_mV, 3);
		jw_close(&w);
	}
	jw_arr(&w, "contributions");
	for (int k = 0; k < r->n; k++) {
		const ljp_species *s = &r->sp[k];
		jw_obj(&w, NULL);
		jw_str(&w, "ion", s->x.symbol);
		jw_int(&w, "z", s->x.z);
		jw_num(&w, "D_1e9_m2_s", s->x.D_m2_s * 1e9, 10);
		jw_num(&w, "pipette_mM", s->x.pip_mM, 10);
		jw_num(&w, "bath_mM", s->x.bath_mM, 10);
		jw_num(&w, "share_mV", s->share_mV, 5);
		jw_str(&w, "mobility_class", ljp_class_name(s->mob.cls));
		jw_num(&w, "mobility_rel_unc", s->mob.rel_unc, 3);
		jw_str(&w, "mobility_source", s->mob.source ? s->mob.source->id : NULL);
		jw_num(&w, "range_width_share", s->width_share, 3);
		jw_close(&w);
	}
	jw_close(&w);
	json_corrections(&w, r);
	jw_arr(&w, "cautions");
	for (int i = 0; i < r->ncaution; i++)
		jw_str(&w, NULL, r->caution[i]);
	jw_close(&w);
	jw_end(&w);
}

static void print_model_line(im_ctx *ctx, const ljp_result *r, int m)
{
	const ljp_model_run *x = &r->model[m];
	if (!x->ok) {
		out_printf(ctx->out, "  %-16s %8s   no value: %s\n", model_title[m], "-",
			   x->why);
		return;
	}
	out_printf(ctx->out, "  %-16s %+8.2f   (%.1f to %.1f)", model_title[m], x->ljp_mV,
		   x->lo_mV, x->hi_mV);
	if (m == LJP_DIFFUSION && r->diffusion.grid_points > 0)
		out_printf(ctx->out, "   grid %d points, error ~%.1g mV",
			   r->diffusion.grid_points, fmax(r->diffusion.grid_err_mV, 1e-6));
	out_printf(ctx->out, "\n");
}

static void text_junction(im_ctx *ctx, const char *pn, const char *bn, int act,
			  const ljp_result *r)
{
	out_printf(ctx->out,
		   "Liquid junction potential: pipette %s | bath %s, %.1f C, from %s\n", pn,
		   bn, r->t_C, act ? "activities" : "concentrations");
	if (r->identical) {
		out_printf(ctx->out,
			   "  pipette and bath are identical: there is no liquid junction "
			   "potential (LJP = 0 mV)\n  no correction: Vm = Vpipette\n");
		return;
	}
	out_printf(ctx->out,
		   "  LJP = %+.1f mV (%.1f to %.1f), %s: the bath is %.1f mV %s to the "
		   "pipette solution\n",
		   r->ljp_mV, r->lo_mV, r->hi_mV, model_title[r->main_model], fabs(r->ljp_mV),
		   r->ljp_mV >= 0 ? "positive" : "negative");
	out_printf(ctx->out,
		   "  range: every mobility within its uncertainty (interval, vertex "
		   "method); mobilities\n    %d measured, %d from memory, %d estimated",
		   r->count[RD_MOB_MEASURED], r->count[RD_MOB_MEMORY],
		   r->count[RD_MOB_ESTIMATED]);
	if (r->driver >= 0 && r->driver_share >= 0.4)
		out_printf(ctx->out, "; %s alone makes %.0f %% of the width",
			   r->sp[r->driver].ion->symbol, 100.0 * r->driver_share);
	out_printf(ctx->out, "\n");
	if (r->models_asked > 1) {
		out_printf(ctx->out, "  %-16s %8s   %s\n", "model", "LJP mV", "range mV");
		for (int m = 0; m < LJP_NMODELS; m++)
			if (r->model[m].asked)
				print_model_line(ctx, r, m);
		if (r->models_ok >= 2)
			out_printf(ctx->out,
				   "  %-16s %8.2f   (largest minus smallest, over %d of %d "
				   "models)\n",
				   "spread", r->spread_mV, r->models_ok, r->models_asked);
		else
			out_printf(ctx->out,
				   "  %-16s %8s   (only %d of %d models gave a value)\n",
				   "spread", "-", r->models_ok, r->models_asked);
	} else if (r->main_model != LJP_HENDERSON) {
		out_printf(ctx->out, "  (Henderson gives %+.2f mV", r->henderson_mV);
		if (r->main_model == LJP_DIFFUSION && r->diffusion.grid_points > 0)
			out_printf(ctx->out,
				   "; free diffusion solved on a grid of %d points, "
				   "estimated error ~%.1g mV",
				   r->diffusion.grid_points,
				   fmax(r->diffusion.grid_err_mV, 1e-6));
		out_printf(ctx->out, ")\n");
	}
	{
		char *bd = ljp_breakdown_text(r, "  ");
		out_printf(ctx->out,
			   "what drives it: each ion's share of the Henderson LJP, largest "
			   "first (bar to scale;\nbath-positive shares to the right of |; "
			   "all data per ion: --json or `info ION`):\n%s",
			   bd);
		free(bd);
	}
	print_corrections(ctx, r);
	for (int i = 0; i < r->ncaution; i++)
		out_note(ctx->out, "%s", r->caution[i]);
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
	if (ctx->out->json)
		json_junction(ctx, sp->name, sb->name, act, &r);
	else
		text_junction(ctx, sp->name, sb->name, act, &r);
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

int cmd_exchange(im_ctx *ctx, int argc, char **argv, char *err)
{
	xargs xa;
	solution *so, *sn, *spp = NULL;
	sol_state st_o, st_n, st_p, st_b;
	pair tip_o, tip_n, br_o, br_n;
	el_exchange_in in;
	el_exchange x;
	cautions cw;
	int have_p = 0, have_b = 0, rc = -1;
	const char *gname;
	if (argc < 3)
		return im_fail(err,
			       "usage: exchange OLD NEW [pipette NAME] [ground "
			       "agcl|bridge SALT CONC]");
	if (parse_exchange_opts(argc, argv, &xa, err) ||
	    find_solution(ctx, argv[1], &so, err) ||
	    find_solution(ctx, argv[2], &sn, err) ||
	    (xa.pipette && find_solution(ctx, xa.pipette, &spp, err)))
		return -1;
	if (states(ctx, so, sn, &st_o, &st_n, err))
		return -1;
	memset(&tip_o, 0, sizeof tip_o);
	memset(&tip_n, 0, sizeof tip_n);
	memset(&br_o, 0, sizeof br_o);
	memset(&br_n, 0, sizeof br_n);
	memset(&in, 0, sizeof in);
	memset(&cw, 0, sizeof cw);
	if (need_ions(&st_o, so->name, err) || need_ions(&st_n, sn->name, err))
		goto done;
	in.ground = xa.ground;
	in.a_cl_old_mM = cl_activity(ctx, &st_o);
	in.a_cl_new_mM = cl_activity(ctx, &st_n);
	if (xa.ground == EL_GROUND_AGCL && (in.a_cl_old_mM <= 0 || in.a_cl_new_mM <= 0)) {
		im_fail(err,
			"bath '%.60s' has no Cl-: a bare Ag/AgCl ground has no defined "
			"potential there; use a salt bridge (e.g. `ground bridge KCl 3 "
			"M`)",
			in.a_cl_old_mM <= 0 ? so->name : sn->name);
		goto done;
	}
	if (spp) {
		if (sol_compute(spp, ses_env(ctx->ses), &st_p, err))
			goto done;
		have_p = 1;
		if (need_ions(&st_p, spp->name, err) ||
		    build_pair(ctx, &st_p, &st_o, ctx->ses->temp_C, &tip_o, err) ||
		    build_pair(ctx, &st_p, &st_n, ctx->ses->temp_C, &tip_n, err))
			goto done;
		in.tip_old = tip_o.ions;
		in.n_tip_old = tip_o.n;
		in.tip_new = tip_n.ions;
		in.n_tip_new = tip_n.n;
		mobility_caution(&tip_o, &cw);
	}
	if (xa.ground == EL_GROUND_BRIDGE) {
		if (bridge_state(ctx, &xa, &st_b, err))
			goto done;
		have_b = 1;
		if (build_pair(ctx, &st_b, &st_o, ctx->ses->temp_C, &br_o, err) ||
		    build_pair(ctx, &st_b, &st_n, ctx->ses->temp_C, &br_n, err))
			goto done;
		in.bridge_old = br_o.ions;
		in.n_bridge_old = br_o.n;
		in.bridge_new = br_n.ions;
		in.n_bridge_new = br_n.n;
		if (!spp)
			mobility_caution(&br_o, &cw);
	}
	if (el_exchange_shift_mV(&in, ctx->ses->temp_C, &x, err))
		goto done;
	gname = xa.ground == EL_GROUND_AGCL ? "agcl" : "bridge";
	if (x.bridge_advised && xa.ground == EL_GROUND_AGCL)
		caution(&cw,
			"the Ag/AgCl term is %.1f mV, above %.0f mV: a salt-bridge "
			"ground (e.g. 3 M KCl in agar) is advisable (common practice)",
			x.agcl_mV, EL_BRIDGE_ADVISE_mV);
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "from", so->name);
		jw_str(&w, "to", sn->name);
		jw_str(&w, "ground", gname);
		jw_num(&w, "temperature_C", ctx->ses->temp_C, 6);
		jw_num(&w, "shift_mV", x.shift_mV, 6);
		jw_bool(&w, "includes_tip", x.have_tip);
		jw_num(&w, "ground_term_mV", x.ground_mV, 6);
		jw_str(&w, "sign",
		       "shift: open-tip reading (pipette minus ground) in the new bath "
		       "after zeroing in the old; ground term: change of the bath "
		       "against the ground wire");
		jw_num(&w, "a_cl_old_mM", in.a_cl_old_mM, 6);
		jw_num(&w, "a_cl_new_mM", in.a_cl_new_mM, 6);
		if (x.have_agcl)
			jw_num(&w, "agcl_term_mV", x.agcl_mV, 6);
		jw_bool(&w, "bridge_advised", x.bridge_advised);
		if (xa.ground == EL_GROUND_BRIDGE) {
			jw_obj(&w, "bridge");
			jw_str(&w, "salt", xa.salt_c ? xa.salt_c->name : xa.salt);
			jw_num(&w, "conc_mM", xa.salt_mM, 6);
			jw_num(&w, "old_ljp_mV", x.bridge_old_mV, 6);
			jw_num(&w, "new_ljp_mV", x.bridge_new_mV, 6);
			jw_close(&w);
		}
		jw_str(&w, "pipette", spp ? spp->name : NULL);
		if (x.have_tip) {
			jw_num(&w, "tip_old_mV", x.tip_old_mV, 6);
			jw_num(&w, "tip_new_mV", x.tip_new_mV, 6);
			jw_num(&w, "tip_change_mV", x.tip_new_mV - x.tip_old_mV, 6);
		}
		jw_str(&w, "correction",
		       "whole-cell, outside-out in the new bath: Vm = Vpipette - "
		       "LJP(pipette|old) - ground_term; inside-out: Vm = -(Vpipette - "
		       "LJP0 - ground_term)");
		jw_num(&w, "erev_add_mV", 0.0 - x.ground_mV, 6);
		json_cautions(&w, &cw);
		jw_end(&w);
	} else {
		out_printf(ctx->out, "Bath exchange %s -> %s, %.1f C, ground: %s\n",
			   so->name, sn->name, ctx->ses->temp_C,
			   xa.ground == EL_GROUND_AGCL ? "bare Ag/AgCl" : "salt bridge");
		if (so == sn || sol_equal(so, sn))
			out_printf(ctx->out,
				   "  the two baths are identical: nothing shifts (0 "
				   "mV)\n");
		if (x.have_agcl && xa.ground == EL_GROUND_AGCL)
			out_printf(ctx->out,
				   "  Ag/AgCl in the bath: Cl- activity %.4g -> %.4g mM: "
				   "electrode %+.1f mV,\n    so the bath %+.1f mV against "
				   "it\n",
				   in.a_cl_old_mM, in.a_cl_new_mM, 0.0 - x.agcl_mV,
				   x.agcl_mV);
		if (xa.ground == EL_GROUND_BRIDGE) {
			out_printf(ctx->out,
				   "  bridge %s %.4g mM: junction to the old bath %+.2f mV, "
				   "to the new %+.2f mV\n    (bath relative to bridge, "
				   "Henderson with concentrations)\n",
				   xa.salt_c ? xa.salt_c->name : xa.salt, xa.salt_mM,
				   x.bridge_old_mV, x.bridge_new_mV);
			if (x.have_agcl)
				out_printf(ctx->out,
					   "  for comparison, a bare Ag/AgCl ground would "
					   "move the bath %+.1f mV\n    (Cl- activity %.4g "
					   "-> %.4g mM)\n",
					   x.agcl_mV, in.a_cl_old_mM, in.a_cl_new_mM);
		}
		out_printf(ctx->out,
			   "  ground term g = %+.2f mV: the bath moves this much against "
			   "the ground wire\n",
			   x.ground_mV);
		if (x.have_tip)
			out_printf(ctx->out,
				   "  tip junction: pipette %s | old %+.2f mV, | new "
				   "%+.2f mV (change %+.2f mV)\n",
				   spp->name, x.tip_old_mV, x.tip_new_mV,
				   x.tip_new_mV - x.tip_old_mV);
		out_printf(ctx->out,
			   "  shift = %+.2f mV: the open-tip reading in the new bath "
			   "after zeroing in the old\n    %s\n",
			   x.shift_mV,
			   x.have_tip ? "(g minus the change of the tip junction)"
				      : "(ground term only: give `pipette NAME` for the tip "
					"term)");
		out_printf(ctx->out, "correction, zeroed in %s, recording in %s:\n",
			   so->name, sn->name);
		out_printf(ctx->out,
			   "  whole-cell, outside-out: Vm = Vpipette - LJP(pipette|%s) - "
			   "g; the sealed tip has no junction,\n    so the bath's shift "
			   "appears with the opposite sign in Vm: a reversal potential "
			   "read\n    in %s is truly Erev = read - LJP(pipette|%s) %+.2f "
			   "mV\n",
			   so->name, sn->name, so->name, 0.0 - x.ground_mV);
		out_printf(ctx->out, "  inside-out: Vm = -(Vpipette - LJP0 - g)\n");
		print_cautions(ctx, &cw);
	}
	rc = 0;
done:
	cautions_free(&cw);
	pair_free(&tip_o);
	pair_free(&tip_n);
	pair_free(&br_o);
	pair_free(&br_n);
	if (have_p)
		sol_state_free(&st_p);
	if (have_b)
		sol_state_free(&st_b);
	sol_state_free(&st_o);
	sol_state_free(&st_n);
	return rc;
}
