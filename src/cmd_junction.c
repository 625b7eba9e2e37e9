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
#include "units.h"
#include "electrode.h"
#include "junction.h"
#include "output.h"
#include "refdb.h"
#include "solution.h"

/* Largest bridge filling accepted, mM (the 5 M the amounts take). */
#define BRIDGE_MAX_mM 5000.0
/* Net charge above this fraction of the cations earns a caution. */
#define NEUTRAL_CAUTION_REL 0.02
#define MAX_CAUTIONS 8
#define CAUTION_LEN 240

enum { M_HENDERSON = 1, M_PLANCK = 2, M_DIFFUSION = 4, M_ALL = 7 };

typedef struct cautions {
	char msg[MAX_CAUTIONS][CAUTION_LEN];
	int n;
} cautions;

static void caution(cautions *c, const char *fmt, ...)
	__attribute__((format(printf, 2, 3)));

static void caution(cautions *c, const char *fmt, ...)
{
	va_list ap;
	if (c->n >= MAX_CAUTIONS)
		return;
	va_start(ap, fmt);
	vsnprintf(c->msg[c->n++], CAUTION_LEN, fmt, ap);
	va_end(ap);
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
	*res = ws_find(&ctx->ses->ws, name);
	if (*res)
		return 0;
	return im_fail(err,
		       "unknown solution '%.60s' (see `list`; `load NAME` brings a saved "
		       "one)",
		       name);
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

static void neutral_caution(const sol_state *st, const char *name, cautions *c)
{
	double net = st->net_charge_mEq_L, cat = st->cation_mEq_L;
	if (cat > 0 && fabs(net) > NEUTRAL_CAUTION_REL * cat)
		caution(c,
			"solution %s is not electroneutral (net charge %+.3g mEq/L): the "
			"junction models assume balanced solutions",
			name, net);
}

/* A pair of sides as jn_ion rows, with the reference ion of each row. */
typedef struct pair {
	jn_ion *ions;       /* owned */
	const rd_ion **ref; /* owned array; the ions are the refdb's */
	double *D25;        /* diffusion coefficient at 25 C, m2/s; owned */
	int *unknown;       /* 1: no mobility in the data, D25 is a bound; owned */
	int n, nunknown;
	double t_C;
} pair;

static void pair_free(pair *p)
{
	free(p->ions);
	free(p->ref);
	free(p->D25);
	free(p->unknown);
	memset(p, 0, sizeof *p);
}

/*
 * Ions without a mobility in data/ (ATP, GTP, phosphocreatine and some
 * organic ions): rather than refuse every pipette solution that holds a
 * few mM of them, their mobility is bounded and the LJP reported with the
 * range it implies.  Bounds: from UNKNOWN_D_LO (practically immobile) to
 * the mobility of Na+ (1.334e-9 m2/s at 25 C), since these ions are
 * larger than a hydrated Na+ and so slower (common practice).  The
 * reported value uses the middle of that range.  Only when they carry at
 * most UNKNOWN_MAX_FRAC of the charge on each side; more, and the range
 * would say nothing, so the command stops and names the ion.
 */
#define UNKNOWN_D_LO 0.05e-9
#define UNKNOWN_D_HI 1.334e-9
#define UNKNOWN_MAX_FRAC 0.10

static const char *ion_sym(const pair *p, int k)
{
	return p->ref[k]->symbol;
}

/* D at 25 C from the reference data: the conductivity (Nernst-Einstein)
 * when known, since the Henderson equation wants electrical mobilities;
 * else the measured diffusion coefficient; NAN when neither. */
static double ion_D25(const rd_ion *ion)
{
	if (isfinite(ion->lambda_S_cm2_eq) && ion->lambda_S_cm2_eq > 0)
		return jn_D_from_lambda_m2_s(ion->lambda_S_cm2_eq, ion->z, 25.0);
	if (isfinite(ion->D_1e9_m2_s) && ion->D_1e9_m2_s > 0)
		return ion->D_1e9_m2_s * 1e-9;
	return NAN;
}

/* Charged ions of a (pip_mM) and b (bath_mM), concentrations or
 * activities, mobilities scaled to t_C.  -1 with err when an ion present
 * has no mobility. */
static int build_pair(const sol_state *a, const sol_state *b, int act, double t_C,
		      pair *p, char *err)
{
	int cap = a->n + b->n + 1;
	double eq[2] = {0, 0}, equnk[2] = {0, 0};
	memset(p, 0, sizeof *p);
	p->t_C = t_C;
	p->ions = im_xcalloc(cap, sizeof *p->ions);
	p->ref = im_xcalloc(cap, sizeof *p->ref);
	p->D25 = im_xcalloc(cap, sizeof *p->D25);
	p->unknown = im_xcalloc(cap, sizeof *p->unknown);
	for (int side = 0; side < 2; side++) {
		const sol_state *st = side ? b : a;
		for (int j = 0; j < st->n; j++) {
			const sol_species *sp = &st->sp[j];
			double v = act ? sp->act_mM : sp->mM;
			int k = 0;
			if (sp->ion->z == 0)
				continue;
			while (k < p->n && p->ref[k] != sp->ion)
				k++;
			if (k == p->n) {
				p->ref[p->n] = sp->ion;
				p->ions[p->n].symbol = sp->ion->symbol;
				p->ions[p->n].z = sp->ion->z;
				p->n++;
			}
			if (side)
				p->ions[k].bath_mM += v;
			else
				p->ions[k].pip_mM += v;
		}
	}
	for (int k = 0; k < p->n; k++) {
		const rd_ion *ion = p->ref[k];
		double D25 = ion_D25(ion);
		int unk = !(D25 > 0);
		eq[0] += abs(ion->z) * p->ions[k].pip_mM;
		eq[1] += abs(ion->z) * p->ions[k].bath_mM;
		if (unk) {
			equnk[0] += abs(ion->z) * p->ions[k].pip_mM;
			equnk[1] += abs(ion->z) * p->ions[k].bath_mM;
			D25 = 0.5 * (UNKNOWN_D_LO + UNKNOWN_D_HI);
			p->unknown[k] = 1;
			p->nunknown++;
		}
		p->D25[k] = D25;
		p->ions[k].D_m2_s = jn_D_at_T_m2_s(D25, t_C);
	}
	for (int side = 0; side < 2 && p->nunknown; side++) {
		if (equnk[side] <= UNKNOWN_MAX_FRAC * eq[side])
			continue;
		for (int k = 0; k < p->n; k++)
			if (p->unknown[k]) {
				im_fail(err,
					"ion %s has no mobility in the reference data and carries "
					"%.0f%% of the charge in the %s: add its limiting "
					"conductivity (lambda_S_cm2_eq) or diffusion coefficient "
					"(diffusion_1e9_m2_s) with its source row to data/ions.sql",
					ion_sym(p, k), 100.0 * equnk[side] / eq[side],
					side ? "bath" : "pipette");
				break;
			}
		pair_free(p);
		return -1;
	}
	if (p->n > JN_MAX_IONS) {
		im_fail(err, "too many ions for one junction (%d; at most %d)", p->n,
			JN_MAX_IONS);
		pair_free(p);
		return -1;
	}
	return 0;
}

/* The Henderson LJP with every unknown mobility at its low and at its high
 * bound (lo_mV and hi_mV may come out in either order: they are sorted). */
static int unknown_range(const pair *p, double *lo_mV, double *hi_mV, char *err)
{
	jn_ion *x = im_xcalloc(p->n, sizeof *x);
	double v[2];
	int rc = 0;
	for (int b = 0; b < 2 && rc == 0; b++) {
		memcpy(x, p->ions, p->n * sizeof *x);
		for (int k = 0; k < p->n; k++)
			if (p->unknown[k])
				x[k].D_m2_s = jn_D_at_T_m2_s(b ? UNKNOWN_D_HI : UNKNOWN_D_LO, p->t_C);
		rc = jn_henderson_mV(x, p->n, p->t_C, &v[b], err);
	}
	free(x);
	*lo_mV = fmin(v[0], v[1]);
	*hi_mV = fmax(v[0], v[1]);
	return rc;
}

static void unknown_list(const pair *p, char *buf, size_t n)
{
	size_t len = 0;
	buf[0] = '\0';
	for (int k = 0; k < p->n; k++)
		if (p->unknown[k] && len < n)
			len += snprintf(buf + len, n - len, "%s%s", len ? ", " : "", ion_sym(p, k));
}

static void unknown_caution(const pair *p, cautions *c)
{
	char list[120];
	double lo, hi;
	char e2[IM_ERRLEN];
	if (!p->nunknown || unknown_range(p, &lo, &hi, e2))
		return;
	unknown_list(p, list, sizeof list);
	caution(c,
		"no mobility in the data for %s: bounded between 0.05e-9 m2/s and that "
		"of Na+ (common practice), the Henderson LJP lies between %+.2f and "
		"%+.2f mV; the middle of the range is used",
		list, lo, hi);
}

int cmdj_henderson_mV(const sol_state *pip, const sol_state *bath, int act, double t_C,
		      double *ljp_mV, char *err)
{
	pair p;
	int rc;
	if (build_pair(pip, bath, act, t_C, &p, err))
		return -1;
	if (p.n == 0) {
		pair_free(&p);
		return im_fail(err, "no ions on either side");
	}
	rc = jn_henderson_mV(p.ions, p.n, t_C, ljp_mV, err);
	pair_free(&p);
	return rc;
}

/* Ions whose mobility is a recalled or practice value get one caution. */
static void mobility_caution(const pair *p, cautions *c)
{
	char list[160] = "";
	size_t len = 0;
	int any = 0;
	for (int k = 0; k < p->n; k++) {
		const rd_source *s = p->ref[k]->mobility_source;
		if (!s || p->unknown[k] || !(s->from_memory || s->common_practice))
			continue;
		len += snprintf(list + len, len < sizeof list ? sizeof list - len : 0,
				"%s%s", any ? ", " : "", p->ref[k]->symbol);
		any = 1;
		if (len >= sizeof list)
			break;
	}
	if (any)
		caution(c,
			"mobility recalled from memory or common practice, not looked "
			"up: %s (see `info ION`)",
			list);
}

/* The species model counts a strong base or acid (KOH, HCl) as free OH- or
 * H+, without its reaction with the buffer; in a physiological solution
 * that much free OH- or H+ is not real, and its high mobility moves the
 * LJP.  Say so, with the ion's share. */
static void strong_caution(const pair *p, const double *share, const char *pip,
			   const char *bath, cautions *c)
{
	for (int k = 0; k < p->n; k++) {
		const jn_ion *x = &p->ions[k];
		int oh = strcmp(x->symbol, "OH-") == 0, h = strcmp(x->symbol, "H+") == 0;
		double m = fmax(x->pip_mM, x->bath_mM);
		if ((oh || h) && m > 1.0 && fabs(share[k]) >= 0.01)
			caution(c,
				"%s at %.3g mM in %s is taken as free; if a buffer takes "
				"it up, the LJP changes by about %+.2f mV (minus its share)",
				x->symbol, m, x->pip_mM >= x->bath_mM ? pip : bath,
				0.0 - share[k]);
	}
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

typedef struct jres {
	int asked;              /* M_* bits */
	int done;               /* bits computed */
	double v[3];            /* henderson, planck, diffusion, mV */
	char why[3][IM_ERRLEN]; /* why a model asked for was not computed */
	jn_diffusion_report rep;
} jres;

static const char *model_name[3] = {"henderson", "planck", "diffusion"};
static const char *model_title[3] = {"Henderson", "Planck", "free diffusion"};

static int parse_junction_opts(int argc, char **argv, int *act, int *models, char *err)
{
	*act = 0;
	*models = M_HENDERSON;
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
				*models = M_HENDERSON;
			else if (im_strcaseeq(m, "planck"))
				*models = M_PLANCK;
			else if (im_strcaseeq(m, "diffusion"))
				*models = M_DIFFUSION;
			else if (im_strcaseeq(m, "all"))
				*models = M_ALL;
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

static void run_models(const pair *p, double t_C, jres *r)
{
	int (*fn2[2])(const jn_ion *, int, double, double *, char *) = {jn_henderson_mV,
									jn_planck_mV};
	for (int m = 0; m < 3; m++) {
		int rc;
		if (!(r->asked & (1 << m)))
			continue;
		if (m < 2)
			rc = fn2[m](p->ions, p->n, t_C, &r->v[m], r->why[m]);
		else
			rc = jn_diffusion_mV(p->ions, p->n, t_C, NULL, &r->rep, &r->v[m],
					     r->why[m]);
		if (rc == 0)
			r->done |= 1 << m;
	}
}

/* The model whose value is "the" LJP: the one asked, or Henderson for all. */
static int main_model(int asked)
{
	return asked == M_PLANCK ? 1 : asked == M_DIFFUSION ? 2 : 0;
}

static void print_corrections(im_ctx *ctx, double ljp)
{
	double wc = el_true_mV(EL_WHOLE_CELL, -70.0, ljp, 0.0);
	double io = el_true_mV(EL_INSIDE_OUT, 70.0, ljp, 0.0);
	out_printf(ctx->out,
		   "sign: the LJP is the potential of the bath relative to the pipette "
		   "solution\n");
	out_printf(ctx->out,
		   "correction, after zeroing with the pipette in this bath:\n");
	out_printf(ctx->out,
		   "  whole-cell, outside-out: Vm = Vpipette - LJP; a command of -70 mV "
		   "is really %.1f mV\n",
		   wc);
	out_printf(ctx->out,
		   "  cell-attached: once sealed there is no junction at the tip, but "
		   "the offset keeps the LJP:\n    the pipette is truly at Vpipette - "
		   "LJP and the patch at Vrest - (Vpipette - LJP)\n");
	out_printf(ctx->out,
		   "  inside-out: the bath faces the inner side, so Vm = -(Vpipette - "
		   "LJP0), with LJP0 the junction\n    when you zeroed (this one only if "
		   "you zeroed in this bath); +70 mV in the pipette is\n    %.1f mV "
		   "here. The patch closes the tip, so a bath change adds no tip "
		   "junction,\n    only the ground's shift (see `exchange`) (Neher 1992, "
		   "Methods Enzymol 207:123)\n",
		   io);
	out_printf(ctx->out,
		   "  perforated patch: Vm = Vpipette - LJP as for whole-cell, but this "
		   "ignores the Donnan\n    potential between pipette and cytoplasm "
		   "across the perforated patch\n");
}

static void json_corrections(jw *w, double ljp)
{
	jw_obj(w, "correction");
	jw_str(w, "whole_cell", "Vm = Vpipette - LJP");
	jw_str(w, "outside_out", "Vm = Vpipette - LJP");
	jw_num(w, "example_command_mV", -70.0, 6);
	jw_num(w, "example_true_mV", el_true_mV(EL_WHOLE_CELL, -70.0, ljp, 0.0), 6);
	jw_str(w, "cell_attached",
	       "pipette truly at Vpipette - LJP; Vpatch = Vrest - (Vpipette - LJP)");
	jw_str(w, "inside_out",
	       "Vm = -(Vpipette - LJP0), LJP0 the junction at zeroing; a bath change "
	       "adds no tip junction, only the ground's shift");
	jw_str(w, "perforated",
	       "Vm = Vpipette - LJP; ignores the Donnan potential between pipette and "
	       "cytoplasm across the perforated patch");
	jw_close(w);
}

static void print_breakdown(im_ctx *ctx, const pair *p, const double *share, int act)
{
	out_printf(ctx->out,
		   "ions and their shares of the Henderson LJP (each ion's term z D "
		   "(c_bath - c_pip),\ntimes the common factor; the shares add up to the "
		   "Henderson LJP):\n");
	out_printf(ctx->out, "  %-14s %3s %13s %12s %12s %10s\n", "ion", "z",
		   "D 1e-9 m2/s", act ? "pipette a mM" : "pipette mM",
		   act ? "bath a mM" : "bath mM", "share mV");
	for (int k = 0; k < p->n; k++)
		out_printf(ctx->out, "  %-14s %+3d %13.4g %12.4g %12.4g %+10.2f\n",
			   p->ions[k].symbol, p->ions[k].z, p->ions[k].D_m2_s * 1e9,
			   p->ions[k].pip_mM, p->ions[k].bath_mM, share[k]);
}

int cmd_junction(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *sp, *sb;
	sol_state st_p, st_b;
	pair p;
	jres r;
	cautions cw;
	double *share, ljp, hend;
	int act, same, mm;
	if (argc < 3)
		return im_fail(err, "usage: junction PIPETTE BATH [activities] [model "
				    "henderson|planck|diffusion|all]");
	memset(&r, 0, sizeof r);
	if (parse_junction_opts(argc, argv, &act, &r.asked, err) ||
	    find_solution(ctx, argv[1], &sp, err) ||
	    find_solution(ctx, argv[2], &sb, err))
		return -1;
	if (states(ctx, sp, sb, &st_p, &st_b, err))
		return -1;
	if (need_ions(&st_p, sp->name, err) || need_ions(&st_b, sb->name, err) ||
	    build_pair(&st_p, &st_b, act, ctx->ses->temp_C, &p, err)) {
		sol_state_free(&st_p);
		sol_state_free(&st_b);
		return -1;
	}
	memset(&cw, 0, sizeof cw);
	neutral_caution(&st_p, sp->name, &cw);
	if (sb != sp)
		neutral_caution(&st_b, sb->name, &cw);
	mobility_caution(&p, &cw);
	unknown_caution(&p, &cw);
	same = 1;
	for (int k = 0; k < p.n; k++)
		if (p.ions[k].pip_mM != p.ions[k].bath_mM)
			same = 0;

	/* the breakdown is Henderson's; its failure is the command's */
	share = im_xcalloc(p.n, sizeof *share);
	if (jn_henderson_contrib(p.ions, p.n, ctx->ses->temp_C, share, &hend, err)) {
		free(share);
		pair_free(&p);
		sol_state_free(&st_p);
		sol_state_free(&st_b);
		return -1;
	}
	strong_caution(&p, share, sp->name, sb->name, &cw);
	r.done = 0;
	run_models(&p, ctx->ses->temp_C, &r);
	mm = main_model(r.asked);
	if (!(r.done & (1 << mm))) {
		im_fail(err, "%s", r.why[mm]);
		free(share);
		pair_free(&p);
		sol_state_free(&st_p);
		sol_state_free(&st_b);
		return -1;
	}
	ljp = r.v[mm];
	if (ctx->out->json) {
		jw w;
		double lo = INFINITY, hi = -INFINITY;
		jw_begin(&w, ctx->out);
		jw_str(&w, "pipette", sp->name);
		jw_str(&w, "bath", sb->name);
		jw_num(&w, "temperature_C", ctx->ses->temp_C, 6);
		jw_str(&w, "from", act ? "activities" : "concentrations");
		jw_str(&w, "model", r.asked == M_ALL ? "all" : model_name[mm]);
		jw_num(&w, "ljp_mV", ljp, 6);
		if (p.nunknown) {
			double lo, hi;
			char e2[IM_ERRLEN], list[120];
			if (unknown_range(&p, &lo, &hi, e2) == 0) {
				jw_arr(&w, "henderson_range_mV");
				jw_num(&w, NULL, lo, 6);
				jw_num(&w, NULL, hi, 6);
				jw_close(&w);
			}
			unknown_list(&p, list, sizeof list);
			jw_str(&w, "mobility_unknown", list);
		}
		jw_str(&w, "sign",
		       "potential of the bath relative to the pipette solution");
		jw_bool(&w, "identical", same);
		jw_obj(&w, "models");
		for (int m = 0; m < 3; m++)
			if (r.done & (1 << m)) {
				jw_num(&w, model_name[m], r.v[m], 6);
				lo = fmin(lo, r.v[m]);
				hi = fmax(hi, r.v[m]);
			}
		jw_close(&w);
		if (r.asked != r.done) {
			jw_obj(&w, "not_applicable");
			for (int m = 0; m < 3; m++)
				if ((r.asked & (1 << m)) && !(r.done & (1 << m)))
					jw_str(&w, model_name[m], r.why[m]);
			jw_close(&w);
		}
		if (r.asked == M_ALL)
			jw_num(&w, "spread_mV", hi - lo, 6);
		if ((r.done & M_DIFFUSION) && r.rep.grid_points > 0) {
			jw_obj(&w, "diffusion_solver");
			jw_int(&w, "grid_points", r.rep.grid_points);
			jw_int(&w, "grids", r.rep.grids);
			jw_int(&w, "steps", r.rep.steps);
			jw_num(&w, "dt_ln_t", r.rep.dt, 4);
			jw_num(&w, "last_change_mV", r.rep.last_change_mV, 3);
			jw_num(&w, "error_estimate_mV", r.rep.grid_err_mV, 3);
			jw_close(&w);
		}
		jw_arr(&w, "contributions");
		for (int k = 0; k < p.n; k++) {
			jw_obj(&w, NULL);
			jw_str(&w, "ion", p.ions[k].symbol);
			jw_int(&w, "z", p.ions[k].z);
			jw_num(&w, "D_1e9_m2_s", p.ions[k].D_m2_s * 1e9, 5);
			jw_num(&w, "pipette_mM", p.ions[k].pip_mM, 8);
			jw_num(&w, "bath_mM", p.ions[k].bath_mM, 8);
			jw_num(&w, "share_mV", share[k], 5);
			jw_close(&w);
		}
		jw_close(&w);
		json_corrections(&w, ljp);
		json_cautions(&w, &cw);
		jw_end(&w);
	} else {
		out_printf(ctx->out,
			   "Liquid junction potential: pipette %s | bath %s, %.1f C, "
			   "from %s\n",
			   sp->name, sb->name, ctx->ses->temp_C,
			   act ? "activities" : "concentrations");
		if (same) {
			out_printf(ctx->out,
				   "  pipette and bath are identical: there is no liquid "
				   "junction potential (LJP = 0 mV)\n");
		} else {
			out_printf(ctx->out,
				   "  LJP = %+.1f mV (%s): the bath is %.1f mV %s to the "
				   "pipette solution\n",
				   ljp, model_title[mm], fabs(ljp),
				   ljp >= 0 ? "positive" : "negative");
		}
		if (r.asked == M_ALL) {
			double lo = INFINITY, hi = -INFINITY;
			out_printf(ctx->out, "  %-16s %10s\n", "model", "LJP mV");
			for (int m = 0; m < 3; m++) {
				if (r.done & (1 << m)) {
					out_printf(ctx->out, "  %-16s %+10.2f",
						   model_title[m], r.v[m]);
					if (m == 2 && r.rep.grid_points > 0)
						out_printf(ctx->out,
							   "   (%d points, error < %.1g "
							   "mV)",
							   r.rep.grid_points,
							   fmax(r.rep.grid_err_mV, 1e-6));
					out_printf(ctx->out, "\n");
					lo = fmin(lo, r.v[m]);
					hi = fmax(hi, r.v[m]);
				} else {
					out_printf(ctx->out,
						   "  %-16s %10s   (not applicable: %s)\n",
						   model_title[m], "-", r.why[m]);
				}
			}
			out_printf(ctx->out,
				   "  %-16s %10.2f   (largest minus smallest)\n",
				   "spread", hi - lo);
		} else if (mm != 0) {
			out_printf(ctx->out, "  (Henderson gives %+.2f mV", hend);
			if (mm == 2 && r.rep.grid_points > 0)
				out_printf(ctx->out,
					   "; free diffusion solved on %d points, %d "
					   "steps, error < %.1g mV",
					   r.rep.grid_points, r.rep.steps,
					   fmax(r.rep.grid_err_mV, 1e-6));
			out_printf(ctx->out, ")\n");
		}
		if (!same) {
			print_breakdown(ctx, &p, share, act);
			print_corrections(ctx, ljp);
		} else {
			out_printf(ctx->out, "  no correction: Vm = Vpipette\n");
		}
		print_cautions(ctx, &cw);
	}
	free(share);
	pair_free(&p);
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
		    build_pair(&st_p, &st_o, 0, ctx->ses->temp_C, &tip_o, err) ||
		    build_pair(&st_p, &st_n, 0, ctx->ses->temp_C, &tip_n, err))
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
		if (build_pair(&st_b, &st_o, 0, ctx->ses->temp_C, &br_o, err) ||
		    build_pair(&st_b, &st_n, 0, ctx->ses->temp_C, &br_n, err))
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
