/*
 * cmd_ghk.c - the erev, ratio and iv commands (see cmd_ghk.h): solutions
 * from the workspace, GHK physics from ghk.c, plots from plot.c, results
 * through output.h (human text or one JSON object).
 */
#include "cmd_ghk.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "common.h"
#include "fileio.h"
#include "render.h"
#include "units.h"
#include "ghk.h"
#include "junction.h"
#include "ljp.h"
#include "plot.h"

#define MAX_PERM 16   /* ions with a permeability in one command */

static const char CONVENTION[] =
	"membrane potential inside relative to outside; outward current positive";

typedef struct perm {
	const rd_ion *ion;
	double P;
} perm;

/* The two sides, computed at the context's temperature and model. */
typedef struct side {
	const solution *sol;
	const sol_state *st; /* the session's, held until side_close */
	session *ses;
} side;

typedef struct opts {
	perm p[MAX_PERM];
	int np;
	int activities, corrected, plain;
	int absolute;  /* 1: P given in cm/s ("K=1e-6cm/s"), -1: plain numbers */
	double v1, v2, dv, rect;
	const char *svg, *csv;
} opts;

/* ---- parsing ---- */

/* A plain decimal number, read by the one number parser (units.c). */
static int parse_num(const char *s, const char *what, double *v, char *err)
{
	char e2[IM_ERRLEN];
	if (units_number(s, v, e2))
		return im_fail(err, "%s: %s", what, e2);
	return 0;
}

static int parse_perm(im_ctx *ctx, const char *arg, opts *o, char *err)
{
	const char *eq = strchr(arg, '=');
	char name[64];
	size_t len = (size_t)(eq - arg);
	if (len == 0 || len >= sizeof name)
		return im_fail(err, "expected ION=P, got '%.40s'", arg);
	memcpy(name, arg, len);
	name[len] = '\0';
	const rd_ion *ion = refdb_ion(ctx->ses->ref, name);
	if (!ion)
		return im_fail(err, "unknown ion '%s' (try `info %s`; a symbol like K, "
			       "Na, Cl, Ca)", name, name);
	if (ion->z == 0)
		return im_fail(err, "%s is neutral: it carries no current", ion->symbol);
	for (int i = 0; i < o->np; i++)
		if (o->p[i].ion == ion)
			return im_fail(err, "%s is given twice", ion->symbol);
	if (o->np == MAX_PERM)
		return im_fail(err, "at most %d ions", MAX_PERM);
	double P;
	char num[64], e2[IM_ERRLEN];
	const char *val = eq + 1;
	size_t vl = strlen(val);
	int abs_ = vl > 4 && strcmp(val + vl - 4, "cm/s") == 0;
	if (abs_) { /* an absolute permeability: "1e-6cm/s" */
		if (vl - 4 >= sizeof num)
			return im_fail(err, "permeability '%.40s' is too long", val);
		memcpy(num, val, vl - 4);
		num[vl - 4] = '\0';
		val = num;
	}
	if (o->absolute && o->absolute != (abs_ ? 1 : -1))
		return im_fail(err, "give every permeability in cm/s or none (got '%.40s')", arg);
	o->absolute = abs_ ? 1 : -1;
	if (units_number(val, &P, e2)) /* as parse_num, the name built only when needed */
		return im_fail(err, "permeability of %s: %s", ion->symbol, e2);
	if (P < 0)
		return im_fail(err, "permeability of %s is negative", ion->symbol);
	o->p[o->np].ion = ion;
	o->p[o->np].P = P;
	o->np++;
	return 0;
}

/* Words after the fixed arguments: ION=P and keywords (value-taking ones
 * only where `with_iv`). */
static int parse_rest(im_ctx *ctx, int argc, char **argv, int first, int with_iv,
		      opts *o, char *err)
{
	const char *keywords = with_iv ? "from, to, step, rect, svg, csv, plain, "
		"activities" : "activities, corrected";
	for (int i = first; i < argc; i++) {
		const char *a = argv[i];
		if (strchr(a, '=')) {
			if (parse_perm(ctx, a, o, err))
				return -1;
		} else if (strcmp(a, "activities") == 0) {
			o->activities = 1;
		} else if (strcmp(a, "corrected") == 0 && !with_iv) {
			o->corrected = 1;
		} else if (with_iv && strcmp(a, "plain") == 0) {
			o->plain = 1;
		} else if (with_iv && (!strcmp(a, "from") || !strcmp(a, "to")
				       || !strcmp(a, "step") || !strcmp(a, "rect"))) {
			if (i + 1 >= argc)
				return im_fail(err, "'%s' needs a value in mV", a);
			double *v = a[0] == 'f' ? &o->v1 : a[0] == 't' ? &o->v2
				: a[0] == 's' ? &o->dv : &o->rect;
			char what[32];
			snprintf(what, sizeof what, "%s (mV)", a);
			if (parse_num(argv[++i], what, v, err))
				return -1;
		} else if (with_iv && (!strcmp(a, "svg") || !strcmp(a, "csv"))) {
			if (i + 1 >= argc)
				return im_fail(err, "'%s' needs a file name", a);
			if (a[0] == 's')
				o->svg = argv[++i];
			else
				o->csv = argv[++i];
		} else {
			return im_fail(err, "unexpected '%.40s' (expected ION=P or %s)", a,
				       keywords);
		}
	}
	return 0;
}

/* ---- solutions ---- */

static int side_open(im_ctx *ctx, const char *name, side *s, char *err)
{
	memset(s, 0, sizeof *s);
	if (ses_solution_read(ctx->ses, name, &s->sol, err))
		return -1;
	if (ses_compute_hold(ctx->ses, s->sol, &s->st, err))
		return -1;
	s->ses = ctx->ses;
	return 0;
}

static void side_close(side *s)
{
	if (s->st)
		ses_state_release(s->ses, s->st);
	s->st = NULL;
}

static double conc(const side *s, const rd_ion *ion, int act)
{
	const sol_species *sp = sol_state_find(s->st, ion);
	return sp ? (act ? sp->act_mM : sp->mM) : 0.0;
}

static void fill(const opts *o, const side *ins, const side *outs, ghk_ion *x)
{
	for (int i = 0; i < o->np; i++) {
		x[i].symbol = o->p[i].ion->symbol;
		x[i].z = o->p[i].ion->z;
		x[i].P = o->p[i].P;
		x[i].in_mM = conc(ins, o->p[i].ion, o->activities);
		x[i].out_mM = conc(outs, o->p[i].ion, o->activities);
	}
}

static const char *basis(const opts *o)
{
	return o->activities ? "activities" : "concentrations";
}

/* ---- the junction potential, for `corrected` ---- */

/* Henderson LJP (bath relative to pipette) with the inside as pipette,
 * from total concentrations, computed as `junction` computes it. */
static int ljp(const side *pip, const side *bath, double t_C, double *ljp_mV,
	       double *lo_mV, double *hi_mV, char *err)
{
	return ljp_pair_mV(pip->st, bath->st, 0, t_C, ljp_mV, lo_mV, hi_mV, err);
}

/* The same head as a render: the pair, temperature, basis and the
 * permeabilities given (JSON only; the text names them in its title and
 * table), and the Nernst potentials under their contract key. */
static void render_head(render *r, const side *ins, const side *outs, const opts *o,
			const ghk_ion *x, double t_C)
{
	render_str(r, "inside", NULL, ins->sol->name);
	render_str(r, "outside", NULL, outs->sol->name);
	render_num(r, "temperature_C", NULL, "C", t_C, UNITS_DEC(1));
	render_str(r, "from", NULL, basis(o));
	render_object(r, "permeabilities");
	for (int i = 0; i < o->np; i++)
		render_num(r, x[i].symbol, NULL, NULL, x[i].P, UNITS_SIG(4));
	render_object_end(r);
	render_object(r, "nernst_mV");
	for (int i = 0; i < o->np; i++) {
		double En;
		if (ghk_nernst_mV(x[i].z, x[i].in_mM, x[i].out_mM, t_C, &En, NULL) == 0)
			render_numj(r, x[i].symbol, NULL, "mV", En, UNITS_DEC(2), 8);
		else
			render_null(r, x[i].symbol, NULL);
	}
	render_object_end(r);
}

/* ---- erev ---- */

/* One permeant ion of erev: its P, the two sides and its Nernst
 * potential, or why there is none. */
static void erev_row(render *r, const ghk_ion *x, int act, double t_C)
{
	double En;
	render_row(r);
	render_str(r, "ion", "ion", x->symbol);
	render_numj(r, "P", "P", NULL, x->P, UNITS_SIG(4), 10);
	render_num(r, "inside_mM", act ? "inside a" : "inside", "mM", x->in_mM, UNITS_SIG(4));
	render_num(r, "outside_mM", act ? "outside a" : "outside", "mM", x->out_mM,
		   UNITS_SIG(4));
	if (ghk_nernst_mV(x->z, x->in_mM, x->out_mM, t_C, &En, NULL) == 0) {
		render_numj(r, "nernst_mV", "Nernst", "mV", En, UNITS_DEC(2), 8);
	} else {
		render_null(r, "nernst_mV", "Nernst");
		render_str(r, NULL, "", x->in_mM > 0 ? "(absent outside)"
				 : x->out_mM > 0 ? "(absent inside)" : "(absent)");
	}
}

/* `corrected`: the reversal potential as read before the LJP correction
 * (whole-cell, the inside solution in the pipette). */
static void erev_corrected(render *r, const side *ins, const side *outs, double E,
			   double t_C)
{
	double L, lo, hi;
	char e2[IM_ERRLEN];
	if (ljp(ins, outs, t_C, &L, &lo, &hi, e2) == 0) {
		render_numj(r, "ljp_mV", NULL, "mV", L, UNITS_DEC(2), 6);
		render_range(r, "ljp_range_mV", NULL, "mV", lo, hi, UNITS_DEC(1));
		render_numj(r, "E_rev_uncorrected_mV", NULL, "mV", E + L, UNITS_DEC(2), 8);
		render_text(r, "  reads %+.2f mV before junction-potential correction (whole-cell, "
			       "pipette = %s):\n    E_rev + LJP, Henderson LJP %+.2f mV from "
			       "concentrations (bath relative to pipette;\n    %.1f to %.1f mV with the "
			       "mobility uncertainties)", E + L, ins->sol->name, L, lo, hi);
		return;
	}
	render_null(r, "ljp_mV", NULL);
	render_null(r, "E_rev_uncorrected_mV", NULL);
	render_note_as(r, "ljp_note", "uncorrected value not available: ",
		       "no liquid junction potential: %s", e2);
	(void)outs;
}

int cmd_ghk_erev(im_ctx *ctx, int argc, char **argv, char *err)
{
	opts o;
	side ins, outs;
	ghk_ion x[MAX_PERM];
	double E, t = ctx->ses->temp_C;
	char num[48];
	render *r;
	memset(&o, 0, sizeof o);
	if (parse_rest(ctx, argc, argv, 3, 0, &o, err))
		return -1;
	if (o.np == 0)
		return im_fail(err, "give at least one permeability, e.g. K=1 Na=0.04");
	if (side_open(ctx, argv[1], &ins, err))
		return -1;
	if (side_open(ctx, argv[2], &outs, err) ||
	    (fill(&o, &ins, &outs, x), ghk_erev_mV(x, o.np, t, &E, err))) {
		side_close(&ins);
		side_close(&outs);
		return -1;
	}
	r = render_new(ctx->out);
	units_fmt_fixed(num, sizeof num, t, 1, 0);
	render_text(r, "GHK reversal potential: %s inside, %s outside, %s C, from %s",
		    ins.sol->name, outs.sol->name, num, basis(&o));
	render_head(r, &ins, &outs, &o, x, t);
	render_table(r, "ions", NULL);
	for (int i = 0; i < o.np; i++)
		erev_row(r, &x[i], o.activities, t);
	render_table_end(r);
	render_numj(r, "E_rev_mV", NULL, "mV", E, UNITS_DEC(2), 8);
	units_fmt_fixed(num, sizeof num, E, 2, 1);
	render_text(r, "  E_rev = %s mV", num);
	if (o.corrected)
		erev_corrected(r, &ins, &outs, E, t);
	render_str(r, "convention", NULL, CONVENTION);
	render_text(r, "  sign: %s", CONVENTION);
	side_close(&ins);
	side_close(&outs);
	return render_done(r);
}

/* ---- ratio ---- */

/* What `ratio` works with. */
typedef struct ratio_work {
	opts o;
	side ins, outs, to;
	ghk_ion x[MAX_PERM + 2];
	double to_out[MAX_PERM + 2], mv, q, E1, E2;
	int shift, have_E;
	const rd_ion *ion, *ref;
} ratio_work;

/* The sought ion first, the reference second (P 1 unless given), then the
 * other permeabilities given from argv[first]. */
static int ratio_perms(im_ctx *ctx, int argc, char **argv, int first, ratio_work *w,
		       char *err)
{
	opts given;
	w->ion = refdb_ion(ctx->ses->ref, argv[3]);
	w->ref = refdb_ion(ctx->ses->ref, argv[4]);
	if (!w->ion || !w->ref)
		return im_fail(err, "unknown ion '%.40s'", !w->ion ? argv[3] : argv[4]);
	if (w->ion->z == 0 || w->ref->z == 0)
		return im_fail(err, "%s is neutral: it carries no current",
			       w->ion->z == 0 ? w->ion->symbol : w->ref->symbol);
	if (w->ion == w->ref)
		return im_fail(err, "the ion and the reference are both %s", w->ion->symbol);
	w->o.p[0] = (perm){w->ion, 1.0};
	w->o.p[1] = (perm){w->ref, 1.0};
	w->o.np = 2;
	memset(&given, 0, sizeof given);
	if (parse_rest(ctx, argc, argv, first, 0, &given, err))
		return -1;
	if (given.corrected)
		return im_fail(err, "'corrected' belongs to erev; give ratio the LJP-corrected"
			       " potential");
	w->o.activities = given.activities;
	for (int i = 0; i < given.np; i++) {
		if (given.p[i].ion == w->ion)
			return im_fail(err, "P of %s is what ratio finds: leave it out",
				       w->ion->symbol);
		if (given.p[i].ion == w->ref) {
			w->o.p[1].P = given.p[i].P;
			continue;
		}
		if (w->o.np == MAX_PERM)
			return im_fail(err, "at most %d ions", MAX_PERM);
		w->o.p[w->o.np++] = given.p[i];
	}
	return 0;
}

/* ratio INSIDE OUTSIDE ION REF at MV | ... shift FROM TO by MV, [ION=P ...] */
static int ratio_words(im_ctx *ctx, int argc, char **argv, ratio_work *w, char *err)
{
	if (argc < 7)
		return im_fail(err, "usage: ratio INSIDE OUTSIDE ION REF at MV [ION=P ...] "
			       "| ... shift FROM_BATH TO_BATH by MV [ION=P ...]");
	w->shift = strcmp(argv[5], "shift") == 0;
	if (!w->shift && strcmp(argv[5], "at") != 0)
		return im_fail(err, "expected 'at MV' or 'shift FROM_BATH TO_BATH by MV' "
			       "after the two ions, got '%.40s'", argv[5]);
	if (w->shift && (argc < 10 || strcmp(argv[8], "by") != 0))
		return im_fail(err, "usage: ratio INSIDE OUTSIDE ION REF shift FROM_BATH "
			       "TO_BATH by MV [ION=P ...]");
	if (parse_num(argv[w->shift ? 9 : 6], w->shift ? "shift (mV)" : "reversal potential "
		      "(mV)", &w->mv, err))
		return -1;
	return ratio_perms(ctx, argc, argv, w->shift ? 10 : 7, w, err);
}

/* Open the sides and find the ratio, and the reversal potentials at it. */
static int ratio_compute(im_ctx *ctx, char **argv, ratio_work *w, char *err)
{
	double t_C = ctx->ses->temp_C;
	if (side_open(ctx, argv[1], &w->ins, err) ||
	    side_open(ctx, argv[w->shift ? 6 : 2], &w->outs, err))
		return -1;
	solution *from;
	if (w->shift && ses_solution(ctx->ses, argv[2], &from, err)) /* saved ones too */
		return -1;
	if (w->shift && side_open(ctx, argv[7], &w->to, err))
		return -1;
	fill(&w->o, &w->ins, &w->outs, w->x);
	if (w->shift) {
		for (int i = 0; i < w->o.np; i++)
			w->to_out[i] = conc(&w->to, w->o.p[i].ion, w->o.activities);
		if (ghk_ratio_shift(w->x, w->o.np, w->to_out, 0, 1, w->mv, t_C, &w->q, err))
			return -1;
	} else if (ghk_ratio(w->x, w->o.np, 0, 1, w->mv, t_C, &w->q, err)) {
		return -1;
	}
	/* the reversal potentials at the ratio found, for the record */
	w->x[0].P = w->q * w->x[1].P;
	if (ghk_erev_present_mV(w->x, w->o.np, t_C, &w->E1, NULL) == 0) {
		w->have_E = 1;
		if (w->shift) {
			for (int i = 0; i < w->o.np; i++)
				w->x[i].out_mM = w->to_out[i];
			w->have_E = ghk_erev_present_mV(w->x, w->o.np, t_C, &w->E2, NULL) == 0;
		}
	}
	return 0;
}

static void ratio_json(render *r, double t_C, const ratio_work *w)
{
	render_str(r, "inside", NULL, w->ins.sol->name);
	render_str(r, "outside", NULL, w->outs.sol->name);
	if (w->shift) {
		render_str(r, "from_bath", NULL, w->outs.sol->name);
		render_str(r, "to_bath", NULL, w->to.sol->name);
	}
	render_numj(r, "temperature_C", NULL, NULL, t_C, 0, 6);
	render_str(r, "from", NULL, basis(&w->o));
	render_str(r, "ion", NULL, w->ion->symbol);
	render_str(r, "ref", NULL, w->ref->symbol);
	render_numj(r, "ratio", NULL, NULL, w->q, 0, 8);
	render_str(r, "method", NULL, w->shift ? "shift" : "reversal potential");
	render_numj(r, "measured_mV", NULL, NULL, w->mv, 0, 8);
	render_object(r, "held_permeabilities");
	for (int i = 1; i < w->o.np; i++)
		render_numj(r, w->o.p[i].ion->symbol, NULL, NULL, w->o.p[i].P, 0, 10);
	render_object_end(r);
	if (w->have_E && w->shift) {
		render_numj(r, "E_rev_from_mV", NULL, NULL, w->E1, 0, 8);
		render_numj(r, "E_rev_to_mV", NULL, NULL, w->E2, 0, 8);
	}
	render_str(r, "convention", NULL, CONVENTION);
}

static void ratio_text(render *r, double t_C, char **argv, const ratio_work *w)
{
	const char *in = w->ins.sol->name, *out = w->outs.sol->name;
	if (w->shift)
		render_text(r, "permeability ratio from a reversal-potential shift: %s inside,"
			    " bath %s -> %s, %.1f C, from %s", in, out, w->to.sol->name, t_C,
			    basis(&w->o));
	else
		render_text(r, "permeability ratio from a reversal potential: %s inside, %s"
			    " outside, %.1f C, from %s", in, out, t_C, basis(&w->o));
	render_text(r, "  P(%s)/P(%s) = %.4g", w->ion->symbol, w->ref->symbol, w->q);
	render_text(r, "  measured %s %+.2f mV; held: P(%s) = %g", w->shift ? "shift" : "E_rev",
		    w->mv, w->ref->symbol, w->o.p[1].P);
	for (int i = 2; i < w->o.np; i++)
		render_text_more(r, ", P(%s) = %g", w->o.p[i].ion->symbol, w->o.p[i].P);
	if (w->shift && w->have_E)
		render_text(r, "  at this ratio E_rev is %+.2f mV in %s and %+.2f mV in %s", w->E1,
			    out, w->E2, w->to.sol->name);
	if (w->shift && strcmp(argv[2], argv[6]) != 0 && strcmp(argv[2], argv[7]) != 0)
		render_text(r, "  note: %s is not used in the shift form (the baths are %s and"
			    " %s)", argv[2], argv[6], argv[7]);
	render_text(r, "  sign: %s", CONVENTION);
}

int cmd_ghk_ratio(im_ctx *ctx, int argc, char **argv, char *err)
{
	ratio_work w;
	int rc = -1;
	memset(&w, 0, sizeof w);
	if (ratio_words(ctx, argc, argv, &w, err) == 0 && ratio_compute(ctx, argv, &w, err) == 0) {
		render *r = render_new(ctx->out);
		ratio_text(r, ctx->ses->temp_C, argv, &w);
		ratio_json(r, ctx->ses->temp_C, &w);
		render_done(r);
		rc = 0;
	}
	side_close(&w.ins);
	side_close(&w.outs);
	side_close(&w.to);
	return rc;
}

/* ---- iv ---- */

/* A display unit for current densities up to maxabs A/cm2. */
static double cur_scale(double maxabs, int utf8, const char **unit)
{
	static const char *const ascii[] = {"A/cm2", "mA/cm2", "uA/cm2", "nA/cm2",
					    "pA/cm2"};
	static const char *const uni[] = {"A/cm\u00b2", "mA/cm\u00b2",
					  "\u00b5A/cm\u00b2", "nA/cm\u00b2",
					  "pA/cm\u00b2"};
	double f = 1.0;
	int k = 0;
	while (k < 4 && maxabs * f < 1.0) {
		f *= 1e3;
		k++;
	}
	*unit = utf8 ? uni[k] : ascii[k];
	return f;
}

/* What the CSV writes: the table rows, in the unit the other outputs use
 * (A/cm2, or relative with the same scale as text, SVG and JSON). */
typedef struct iv_out {
	const ghk_iv_curve *iv;
	const ghk_ion *x;
	double scale;     /* multiplies A/cm2 into the unit written */
	const char *unit; /* column-name suffix: "A_cm2" or "relative" */
} iv_out;

static int write_csv(FILE *fp, const iv_out *a, char *err)
{
	const ghk_iv_curve *iv = a->iv;
	char h[96];
	fprintf(fp, "V_mV,total_%s", a->unit);
	for (int i = 0; i < iv->nions; i++) {
		snprintf(h, sizeof h, "%s_%s", a->x[i].symbol, a->unit);
		fputc(',', fp);
		out_csv_field(fp, h);
	}
	fputs("\r\n", fp);
	for (int k = 0; k < iv->npts; k++) {
		fprintf(fp, "%.10g,%.10g", iv->V_mV[k], a->scale * iv->total_A_cm2[k]);
		for (int i = 0; i < iv->nions; i++)
			fprintf(fp, ",%.10g",
				a->scale * iv->ion_A_cm2[(size_t)k * iv->nions + i]);
		fputs("\r\n", fp);
	}
	if (ferror(fp))
		return im_fail(err, "write error");
	return 0;
}

/* What `iv` works with: the curve, the fine grid the plots draw, and the
 * plot's curves, legend and labels. */
typedef struct iv_work {
	opts o;
	side ins, outs;
	ghk_ion x[MAX_PERM];
	ghk_iv_curve iv;
	double *fine, *fV, *ftot, *fion, *ys;
	int nf, nc, nn, term_utf8;
	double maxabs, f;          /* f: A/cm2 into the display unit */
	const char *unit_t, *unit_svg;
	plot_curve c[PLOT_MAX_CURVES];
	char nb[PLOT_MAX_NOTES][96], one[48], mark[64], title[200], ylab_t[64], ylab_svg[64];
	const char *notes[PLOT_MAX_NOTES];
	plot_opts po;
} iv_work;

static const char IV_REL_UNIT[] = "relative: largest |current| from V1 to V2 = 1";

static void iv_free(iv_work *w)
{
	free(w->ys);
	free(w->fine);
	ghk_iv_free(&w->iv);
	side_close(&w->ins);
	side_close(&w->outs);
}

/* iv INSIDE OUTSIDE ION=P [...] [from V1] [to V2] [step DV] [rect MV] ... */
static int iv_words(im_ctx *ctx, int argc, char **argv, iv_work *w, char *err)
{
	w->o.v1 = GHK_IV_V1_MV;
	w->o.v2 = GHK_IV_V2_MV;
	w->o.dv = GHK_IV_DV_MV;
	w->o.rect = GHK_IV_RECT_MV;
	if (argc < 4)
		return im_fail(err, "usage: iv INSIDE OUTSIDE ION=P [...] [from V1] [to V2] "
			       "[step DV] [rect MV] [svg FILE] [csv FILE] [plain]");
	if (parse_rest(ctx, argc, argv, 3, 1, &w->o, err))
		return -1;
	if (w->o.np == 0)
		return im_fail(err, "give at least one permeability, e.g. K=1 Na=0.04 "
			       "(relative) or K=1e-6cm/s (absolute)");
	return 0;
}

/* The table, the fine grid the plots draw (whatever the table step), and
 * the display scale. */
static int iv_compute(im_ctx *ctx, char **argv, iv_work *w, char *err)
{
	double t_C = ctx->ses->temp_C;
	if (side_open(ctx, argv[1], &w->ins, err) || side_open(ctx, argv[2], &w->outs, err))
		return -1;
	fill(&w->o, &w->ins, &w->outs, w->x);
	if (ghk_iv(w->x, w->o.np, t_C, w->o.v1, w->o.v2, w->o.dv, w->o.rect, &w->iv, err))
		return -1;
	w->nf = GHK_IV_FINE_PTS;
	w->fine = im_xmalloc((size_t)w->nf * (2 + (size_t)w->o.np) * sizeof *w->fine);
	w->fV = w->fine;
	w->ftot = w->fine + w->nf;
	w->fion = w->fine + 2 * (size_t)w->nf;
	if (ghk_iv_fill(w->x, w->o.np, t_C, w->o.v1, w->o.v2, w->nf, w->fV, w->ftot, w->fion,
			err))
		return -1;
	/* the largest current over the range is at one of its ends (each GHK
	 * current rises with V), which the fine grid holds */
	for (size_t k = 0; k < (size_t)w->nf * (1 + (size_t)w->o.np); k++)
		if (fabs(w->ftot[k]) > w->maxabs)
			w->maxabs = fabs(w->ftot[k]);
	w->term_utf8 = ctx->out->utf8 && !w->o.plain;
	w->f = cur_scale(w->maxabs, w->term_utf8, &w->unit_t);
	cur_scale(w->maxabs, 1, &w->unit_svg);
	if (w->o.absolute != 1) {
		/* relative permeabilities: the current has no absolute scale;
		 * every output divides by the largest |current| on the range */
		w->unit_t = w->unit_svg = "relative units";
		w->f = w->maxabs > 0 ? 1.0 / w->maxabs : 1.0;
	}
	return 0;
}

/* The curves in the display unit: total, then each ion (as many as fit;
 * one ion: its curve is the total, drawn once). */
static void iv_curves(iv_work *w)
{
	int np = w->o.np, nf = w->nf;
	w->nc = np == 1 ? 1 : 1 + (np < PLOT_MAX_CURVES - 1 ? np : PLOT_MAX_CURVES - 1);
	snprintf(w->one, sizeof w->one, "total (%s)", w->x[0].symbol);
	w->ys = im_xmalloc((size_t)w->nc * nf * sizeof *w->ys);
	for (int j = 0; j < w->nc; j++) {
		double *y = w->ys + (size_t)j * nf;
		for (int k = 0; k < nf; k++)
			y[k] = w->f * (j == 0 ? w->ftot[k] : w->fion[(size_t)k * np + (j - 1)]);
		w->c[j] = (plot_curve){j > 0 ? w->x[j - 1].symbol : w->nc == 1 ? w->one : "total",
				       w->fV, y, nf};
	}
}

/* The legend's conditions (the pair, the temperature, each P), title,
 * labels and mark. */
static void iv_legend(iv_work *w, double t_C)
{
	const char *in = w->ins.sol->name, *out = w->outs.sol->name;
	w->nn = 0;
	snprintf(w->nb[w->nn++], sizeof w->nb[0], "inside: %.80s", in);
	snprintf(w->nb[w->nn++], sizeof w->nb[0], "outside: %.80s", out);
	snprintf(w->nb[w->nn++], sizeof w->nb[0], "%.1f C, from %s", t_C, basis(&w->o));
	snprintf(w->nb[w->nn++], sizeof w->nb[0], "permeabilities (%s):",
		 w->o.absolute == 1 ? "cm/s" : "relative");
	for (int i = 0; i < w->o.np && w->nn < PLOT_MAX_NOTES; i++)
		snprintf(w->nb[w->nn++], sizeof w->nb[0], "  P(%s) = %.4g", w->x[i].symbol,
			 w->x[i].P);
	for (int i = 0; i < w->nn; i++)
		w->notes[i] = w->nb[i];
	snprintf(w->mark, sizeof w->mark, "E_rev %+.1f mV", w->iv.E_rev_mV);
	snprintf(w->title, sizeof w->title, "GHK current: %.64s inside, %.64s outside, %.1f C",
		 in, out, t_C);
	snprintf(w->ylab_t, sizeof w->ylab_t, "current density (%s), outward up", w->unit_t);
	snprintf(w->ylab_svg, sizeof w->ylab_svg, "current density (%s), outward up",
		 w->unit_svg);
	plot_opts_init(&w->po);
	w->po.x_label = "membrane potential (mV), inside relative to outside";
	w->po.has_mark = w->iv.has_erev;
	w->po.mark_x = w->iv.E_rev_mV;
	w->po.mark_label = w->mark;
	w->po.notes = w->notes;
	w->po.nnotes = w->nn;
}

/* The SVG and CSV files: both, or neither. */
static int iv_files(const iv_work *w, char *err)
{
	fio_batch b;
	FILE *fp;
	if (!w->o.svg && !w->o.csv)
		return 0;
	fio_batch_init(&b);
	if (w->o.svg) {
		plot_opts ps = w->po;
		ps.utf8 = 1;
		ps.title = w->title;
		ps.y_label = w->ylab_svg;
		if (fio_batch_open(&b, w->o.svg, &fp, err) || plot_svg(fp, w->c, w->nc, &ps, err))
			goto fail;
	}
	if (w->o.csv) {
		iv_out a = {&w->iv, w->x, w->o.absolute == 1 ? 1.0 : w->f,
			    w->o.absolute == 1 ? "A_cm2" : "relative"};
		if (fio_batch_open(&b, w->o.csv, &fp, err) || write_csv(fp, &a, err))
			goto fail;
	}
	return fio_batch_commit(&b, err);
fail:
	fio_batch_abort(&b);
	return -1;
}

/* The JSON fields: the same numbers and unit as the text table and CSV. */
static void iv_json(render *r, double t_C, const iv_work *w)
{
	const ghk_iv_curve *iv = &w->iv;
	double g = w->o.absolute == 1 ? 1.0 : w->f;
	render_str(r, "inside", NULL, w->ins.sol->name);
	render_str(r, "outside", NULL, w->outs.sol->name);
	render_numj(r, "temperature_C", NULL, NULL, t_C, 0, 6);
	render_str(r, "from", NULL, basis(&w->o));
	render_object(r, "permeabilities");
	for (int i = 0; i < w->o.np; i++)
		render_numj(r, w->x[i].symbol, NULL, NULL, w->x[i].P, 0, 10);
	render_object_end(r);
	render_str(r, "permeability_unit", NULL, w->o.absolute == 1 ? "cm/s" : "relative");
	render_str(r, "current_unit", NULL, w->o.absolute == 1 ? "A/cm2" : IV_REL_UNIT);
	if (w->o.absolute != 1)
		render_numj(r, "relative_unit_A_cm2_per_cm_s", NULL, NULL, w->maxabs, 0, 8);
	render_table(r, "points", NULL);
	for (int k = 0; k < iv->npts; k++) {
		render_row(r);
		render_numj(r, "mV", NULL, NULL, iv->V_mV[k], 0, 10);
		render_numj(r, "total", NULL, NULL, g * iv->total_A_cm2[k], 0, 10);
		for (int i = 0; i < iv->nions; i++)
			render_numj(r, w->x[i].symbol, NULL, NULL,
				    g * iv->ion_A_cm2[(size_t)k * iv->nions + i], 0, 10);
	}
	render_table_end(r);
	if (iv->has_erev) {
		render_numj(r, "E_rev_mV", NULL, NULL, iv->E_rev_mV, 0, 8);
		render_numj(r, "rectification", NULL, NULL, iv->rect, 0, 8);
	} else {
		render_null(r, "E_rev_mV", NULL);
		render_null(r, "rectification", NULL);
		render_str(r, "note", NULL, iv->no_erev);
	}
	render_numj(r, "rect_distance_mV", NULL, NULL, iv->rect_mV, 0, 6);
	if (w->o.svg)
		render_str(r, "svg", NULL, w->o.svg);
	if (w->o.csv)
		render_str(r, "csv", NULL, w->o.csv);
	render_str(r, "convention", NULL, CONVENTION);
}

/* The text table and E_rev lines. */
static void iv_text_table(render *r, double t_C, const iv_work *w)
{
	const ghk_iv_curve *iv = &w->iv;
	const ghk_ion *x = w->x;
	render_text(r, "GHK current-voltage curve: %s inside, %s outside, %.1f C, from %s; %s",
		    w->ins.sol->name, w->outs.sol->name, t_C, basis(&w->o),
		    w->o.absolute == 1 ? "P in cm/s, current in A/cm2"
		    : "P relative, current in relative units");
	if (w->o.absolute != 1)
		render_text(r, "  note: permeabilities without a unit (%s=%g) are taken as"
			    " relative: the current is scaled so that the largest |current| from"
			    " %g to %g mV is 1 (the same in the CSV, SVG and JSON); give P as"
			    " %s=%gcm/s for A/cm2", x[0].symbol, x[0].P, w->o.v1, w->o.v2,
			    x[0].symbol, x[0].P);
	render_text(r, "  %8s %12s", "V mV", "total");
	for (int i = 0; i < w->o.np; i++)
		render_text_more(r, " %12s", x[i].symbol);
	render_text_more(r, "   (%s)", w->unit_t);
	for (int k = 0; k < iv->npts; k++) {
		render_text(r, "  %8.2f %12.5g", iv->V_mV[k], w->f * iv->total_A_cm2[k]);
		for (int i = 0; i < w->o.np; i++)
			render_text_more(r, " %12.5g",
					 w->f * iv->ion_A_cm2[(size_t)k * iv->nions + i]);
	}
	if (iv->has_erev) {
		render_text(r, "  E_rev = %+.2f mV", iv->E_rev_mV);
		render_text(r, "  rectification |I(E_rev%+g)|/|I(E_rev%+g)| = %.4g (%s)",
			    iv->rect_mV, -iv->rect_mV, iv->rect,
			    iv->rect > 1 ? "> 1: outward rectification"
			    : iv->rect < 1 ? "< 1: inward rectification" : "no rectification");
	} else {
		render_text(r, "  %s", iv->no_erev);
	}
	if (w->o.np > 1 && w->nc - 1 < w->o.np)
		render_text(r, "  (the plot shows the total and the first %d ions)", w->nc - 1);
	render_text(r, "%s", "");
}

/* The terminal plot and the closing lines (text only; nothing when JSON). */
static int iv_text_plot(render *r, int json, iv_work *w, char *err)
{
	char *buf = NULL;
	size_t len = 0;
	if (json)
		return 0;
	w->po.utf8 = w->term_utf8;
	w->po.y_label = w->ylab_t;
	FILE *mem = open_memstream(&buf, &len);
	if (!mem)
		return im_fail(err, "cannot draw the plot: %s", strerror(errno));
	int prc = plot_term(mem, w->c, w->nc, &w->po, err);
	fclose(mem);
	if (prc == 0) {
		if (len && buf[len - 1] == '\n')
			buf[len - 1] = '\0';
		render_text(r, "%s", buf);
	}
	free(buf);
	if (prc)
		return -1;
	if (w->o.svg)
		render_text(r, "  wrote %s", w->o.svg);
	if (w->o.csv)
		render_text(r, "  wrote %s", w->o.csv);
	render_text(r, "  sign: %s, plotted upward", CONVENTION);
	return 0;
}

int cmd_ghk_iv(im_ctx *ctx, int argc, char **argv, char *err)
{
	iv_work *w = im_xcalloc(1, sizeof *w);
	double t_C = ctx->ses->temp_C;
	int rc = -1;
	if (iv_words(ctx, argc, argv, w, err) == 0 && iv_compute(ctx, argv, w, err) == 0) {
		iv_curves(w);
		iv_legend(w, t_C);
		render *r = render_new(ctx->out);
		iv_text_table(r, t_C, w);
		iv_json(r, t_C, w);
		if (iv_files(w, err) == 0 && iv_text_plot(r, ctx->out->json, w, err) == 0) {
			render_done(r);
			rc = 0;
		} else {
			render_drop(r);
		}
	}
	iv_free(w);
	free(w);
	return rc;
}
