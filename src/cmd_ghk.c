/*
 * cmd_ghk.c - the erev, ratio and iv commands (see cmd_ghk.h): solutions
 * from the workspace, GHK physics from ghk.c, plots from plot.c, results
 * through output.h (human text or one JSON object).
 */
#include "cmd_ghk.h"
#include "cmd_junction.h"

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
	solution *sol;
	sol_state st;
	int have;
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
	char what[80], num[64];
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
	snprintf(what, sizeof what, "permeability of %s", ion->symbol);
	if (parse_num(val, what, &P, err))
		return -1;
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
	if (ses_solution(ctx->ses, name, &s->sol, err))
		return -1;
	if (sol_compute(s->sol, ses_env(ctx->ses), &s->st, err))
		return -1;
	s->have = 1;
	return 0;
}

static void side_close(side *s)
{
	if (s->have)
		sol_state_free(&s->st);
	s->have = 0;
}

static double conc(const side *s, const rd_ion *ion, int act)
{
	const sol_species *sp = sol_state_find(&s->st, ion);
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
	return ljp_pair_mV(&pip->st, &bath->st, 0, t_C, ljp_mV, lo_mV, hi_mV, err);
}

/* The JSON keys erev and iv share: the pair, temperature, basis and the
 * permeabilities given. */
static void json_head(jw *w, im_ctx *ctx, const side *ins, const side *outs,
		      const opts *o, const ghk_ion *x)
{
	jw_begin(w, ctx->out);
	jw_str(w, "inside", ins->sol->name);
	jw_str(w, "outside", outs->sol->name);
	jw_num(w, "temperature_C", ctx->ses->temp_C, 6);
	jw_str(w, "from", basis(o));
	jw_obj(w, "permeabilities");
	for (int i = 0; i < o->np; i++)
		jw_num(w, x[i].symbol, x[i].P, 10);
	jw_close(w);
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
	render_text(r, "GHK reversal potential: %s inside, %s outside, %.1f C, from %s",
		    ins.sol->name, outs.sol->name, t, basis(&o));
	render_head(r, &ins, &outs, &o, x, t);
	render_table(r, "ions", NULL);
	for (int i = 0; i < o.np; i++)
		erev_row(r, &x[i], o.activities, t);
	render_table_end(r);
	render_numj(r, "E_rev_mV", NULL, "mV", E, UNITS_DEC(2), 8);
	render_text(r, "  E_rev = %+.2f mV", E);
	if (o.corrected)
		erev_corrected(r, &ins, &outs, E, t);
	render_str(r, "convention", NULL, CONVENTION);
	render_text(r, "  sign: %s", CONVENTION);
	side_close(&ins);
	side_close(&outs);
	return render_done(r);
}

/* ---- ratio ---- */

int cmd_ghk_ratio(im_ctx *ctx, int argc, char **argv, char *err)
{
	opts o;
	side ins, outs, to;
	ghk_ion x[MAX_PERM + 2];
	double to_out[MAX_PERM + 2], mv, q;
	int shift, first, rc = -1;
	memset(&o, 0, sizeof o);
	memset(&to, 0, sizeof to);
	if (argc < 7)
		return im_fail(err, "usage: ratio INSIDE OUTSIDE ION REF at MV [ION=P ...] "
			       "| ... shift FROM_BATH TO_BATH by MV [ION=P ...]");
	shift = strcmp(argv[5], "shift") == 0;
	if (!shift && strcmp(argv[5], "at") != 0)
		return im_fail(err, "expected 'at MV' or 'shift FROM_BATH TO_BATH by MV' "
			       "after the two ions, got '%.40s'", argv[5]);
	if (shift && (argc < 10 || strcmp(argv[8], "by") != 0))
		return im_fail(err, "usage: ratio INSIDE OUTSIDE ION REF shift FROM_BATH "
			       "TO_BATH by MV [ION=P ...]");
	if (parse_num(argv[shift ? 9 : 6], shift ? "shift (mV)" : "reversal potential "
		      "(mV)", &mv, err))
		return -1;
	first = shift ? 10 : 7;
	const rd_ion *ion = refdb_ion(ctx->ses->ref, argv[3]);
	const rd_ion *ref = refdb_ion(ctx->ses->ref, argv[4]);
	if (!ion || !ref)
		return im_fail(err, "unknown ion '%.40s'", !ion ? argv[3] : argv[4]);
	if (ion->z == 0 || ref->z == 0)
		return im_fail(err, "%s is neutral: it carries no current",
			       ion->z == 0 ? ion->symbol : ref->symbol);
	if (ion == ref)
		return im_fail(err, "the ion and the reference are both %s", ion->symbol);
	/* the sought ion first, the reference second (P 1 unless given) */
	o.p[0].ion = ion;
	o.p[0].P = 1.0;
	o.p[1].ion = ref;
	o.p[1].P = 1.0;
	o.np = 2;
	opts given;
	memset(&given, 0, sizeof given);
	if (parse_rest(ctx, argc, argv, first, 0, &given, err))
		return -1;
	if (given.corrected)
		return im_fail(err, "'corrected' belongs to erev; give ratio the "
			       "LJP-corrected potential");
	o.activities = given.activities;
	for (int i = 0; i < given.np; i++) {
		if (given.p[i].ion == ion)
			return im_fail(err, "P of %s is what ratio finds: leave it out",
				       ion->symbol);
		if (given.p[i].ion == ref) {
			o.p[1].P = given.p[i].P;
			continue;
		}
		if (o.np == MAX_PERM)
			return im_fail(err, "at most %d ions", MAX_PERM);
		o.p[o.np++] = given.p[i];
	}
	if (side_open(ctx, argv[1], &ins, err))
		return -1;
	if (side_open(ctx, argv[shift ? 6 : 2], &outs, err))
		goto done;
	if (shift) {
		solution *from;
		if (ses_solution(ctx->ses, argv[2], &from, err)) /* saved ones too */
			goto done;
		if (side_open(ctx, argv[7], &to, err))
			goto done;
	}
	fill(&o, &ins, &outs, x);
	if (shift) {
		for (int i = 0; i < o.np; i++)
			to_out[i] = conc(&to, o.p[i].ion, o.activities);
		if (ghk_ratio_shift(x, o.np, to_out, 0, 1, mv, ctx->ses->temp_C, &q, err))
			goto done;
	} else if (ghk_ratio(x, o.np, 0, 1, mv, ctx->ses->temp_C, &q, err)) {
		goto done;
	}
	/* the reversal potentials at the ratio found, for the record */
	double E1 = 0, E2 = 0;
	int have_E = 0;
	x[0].P = q * x[1].P;
	if (ghk_erev_present_mV(x, o.np, ctx->ses->temp_C, &E1, NULL) == 0) {
		have_E = 1;
		if (shift) {
			for (int i = 0; i < o.np; i++)
				x[i].out_mM = to_out[i];
			have_E = ghk_erev_present_mV(x, o.np, ctx->ses->temp_C, &E2, NULL) == 0;
		}
	}
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "inside", ins.sol->name);
		jw_str(&w, "outside", outs.sol->name);
		if (shift) {
			jw_str(&w, "from_bath", outs.sol->name);
			jw_str(&w, "to_bath", to.sol->name);
		}
		jw_num(&w, "temperature_C", ctx->ses->temp_C, 6);
		jw_str(&w, "from", basis(&o));
		jw_str(&w, "ion", ion->symbol);
		jw_str(&w, "ref", ref->symbol);
		jw_num(&w, "ratio", q, 8);
		jw_str(&w, "method", shift ? "shift" : "reversal potential");
		jw_num(&w, "measured_mV", mv, 8);
		jw_obj(&w, "held_permeabilities");
		for (int i = 1; i < o.np; i++)
			jw_num(&w, o.p[i].ion->symbol, o.p[i].P, 10);
		jw_close(&w);
		if (have_E && shift) {
			jw_num(&w, "E_rev_from_mV", E1, 8);
			jw_num(&w, "E_rev_to_mV", E2, 8);
		}
		jw_str(&w, "convention", CONVENTION);
		jw_end(&w);
	} else {
		if (shift)
			out_printf(ctx->out, "permeability ratio from a reversal-potential "
				   "shift: %s inside, bath %s -> %s, %.1f C, from %s\n",
				   ins.sol->name, outs.sol->name, to.sol->name, ctx->ses->temp_C,
				   basis(&o));
		else
			out_printf(ctx->out, "permeability ratio from a reversal potential: "
				   "%s inside, %s outside, %.1f C, from %s\n",
				   ins.sol->name, outs.sol->name, ctx->ses->temp_C, basis(&o));
		out_printf(ctx->out, "  P(%s)/P(%s) = %.4g\n", ion->symbol, ref->symbol, q);
		if (shift)
			out_printf(ctx->out, "  measured shift %+.2f mV", mv);
		else
			out_printf(ctx->out, "  measured E_rev %+.2f mV", mv);
		out_printf(ctx->out, "; held: P(%s) = %g", ref->symbol, o.p[1].P);
		for (int i = 2; i < o.np; i++)
			out_printf(ctx->out, ", P(%s) = %g", o.p[i].ion->symbol, o.p[i].P);
		out_printf(ctx->out, "\n");
		if (shift && have_E)
			out_printf(ctx->out, "  at this ratio E_rev is %+.2f mV in %s and "
				   "%+.2f mV in %s\n", E1, outs.sol->name, E2, to.sol->name);
		if (shift && strcmp(argv[2], argv[6]) != 0 && strcmp(argv[2], argv[7]) != 0)
			out_printf(ctx->out, "  note: %s is not used in the shift form (the "
				   "baths are %s and %s)\n", argv[2], argv[6], argv[7]);
		out_printf(ctx->out, "  sign: %s\n", CONVENTION);
	}
	rc = 0;
done:
	side_close(&ins);
	side_close(&outs);
	side_close(&to);
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

/* RFC 4180: quote a field holding a comma, quote or line break. */
static void csv_field(FILE *fp, const char *s)
{
	if (!strpbrk(s, ",\"\r\n")) {
		fputs(s, fp);
		return;
	}
	fputc('"', fp);
	for (; *s; s++) {
		if (*s == '"')
			fputc('"', fp);
		fputc(*s, fp);
	}
	fputc('"', fp);
}

static int write_csv(FILE *fp, const iv_out *a, char *err)
{
	const ghk_iv_curve *iv = a->iv;
	char h[96];
	fprintf(fp, "V_mV,total_%s", a->unit);
	for (int i = 0; i < iv->nions; i++) {
		snprintf(h, sizeof h, "%s_%s", a->x[i].symbol, a->unit);
		fputc(',', fp);
		csv_field(fp, h);
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

int cmd_ghk_iv(im_ctx *ctx, int argc, char **argv, char *err)
{
	opts o;
	side ins, outs;
	ghk_ion x[MAX_PERM];
	ghk_iv_curve iv;
	int rc = -1;
	double *ys = NULL, *fine = NULL;
	memset(&o, 0, sizeof o);
	memset(&iv, 0, sizeof iv);
	o.v1 = GHK_IV_V1_MV;
	o.v2 = GHK_IV_V2_MV;
	o.dv = GHK_IV_DV_MV;
	o.rect = GHK_IV_RECT_MV;
	if (argc < 4)
		return im_fail(err, "usage: iv INSIDE OUTSIDE ION=P [...] [from V1] [to V2] "
			       "[step DV] [rect MV] [svg FILE] [csv FILE] [plain]");
	if (parse_rest(ctx, argc, argv, 3, 1, &o, err))
		return -1;
	if (o.np == 0)
		return im_fail(err, "give at least one permeability, e.g. K=1 Na=0.04 "
			       "(relative) or K=1e-6cm/s (absolute)");
	if (side_open(ctx, argv[1], &ins, err))
		return -1;
	if (side_open(ctx, argv[2], &outs, err))
		goto done;
	fill(&o, &ins, &outs, x);
	if (ghk_iv(x, o.np, ctx->ses->temp_C, o.v1, o.v2, o.dv, o.rect, &iv, err))
		goto done;
	/* the plots draw a fine grid, whatever the table step */
	const int nf = GHK_IV_FINE_PTS;
	fine = im_xmalloc((size_t)nf * (2 + (size_t)o.np) * sizeof *fine);
	double *fV = fine, *ftot = fine + nf, *fion = fine + 2 * (size_t)nf;
	if (ghk_iv_fill(x, o.np, ctx->ses->temp_C, o.v1, o.v2, nf, fV, ftot, fion, err))
		goto done;

	/* curves in a display unit: total, then each ion (as many as fit);
	 * the largest current over the range is at one of its ends (each GHK
	 * current rises with V), which the fine grid holds */
	double maxabs = 0;
	for (size_t k = 0; k < (size_t)nf * (1 + (size_t)o.np); k++)
		if (fabs(ftot[k]) > maxabs)
			maxabs = fabs(ftot[k]);
	int term_utf8 = ctx->out->utf8 && !o.plain;
	const char *unit_t, *unit_svg;
	double f = cur_scale(maxabs, term_utf8, &unit_t);
	cur_scale(maxabs, 1, &unit_svg);
	if (o.absolute != 1) {
		/* relative permeabilities: the current has no absolute scale;
		 * every output divides by the largest |current| on the range */
		unit_t = unit_svg = "relative units";
		f = maxabs > 0 ? 1.0 / maxabs : 1.0;
	}
	const char *rel_unit = "relative: largest |current| from V1 to V2 = 1";
	/* one ion: its curve is the total, drawn once */
	int nc = o.np == 1 ? 1
		: 1 + (o.np < PLOT_MAX_CURVES - 1 ? o.np : PLOT_MAX_CURVES - 1);
	char one[48];
	snprintf(one, sizeof one, "total (%s)", x[0].symbol);
	ys = im_xmalloc((size_t)nc * nf * sizeof *ys);
	plot_curve c[PLOT_MAX_CURVES];
	for (int j = 0; j < nc; j++) {
		double *y = ys + (size_t)j * nf;
		for (int k = 0; k < nf; k++)
			y[k] = f * (j == 0 ? ftot[k] : fion[(size_t)k * o.np + (j - 1)]);
		c[j] = (plot_curve){j > 0 ? x[j - 1].symbol : nc == 1 ? one : "total",
				    fV, y, nf};
	}
	/* the legend's conditions: the pair, the temperature, each P */
	char nb[PLOT_MAX_NOTES][96];
	const char *notes[PLOT_MAX_NOTES];
	int nn = 0;
	snprintf(nb[nn++], sizeof nb[0], "inside: %.80s", ins.sol->name);
	snprintf(nb[nn++], sizeof nb[0], "outside: %.80s", outs.sol->name);
	snprintf(nb[nn++], sizeof nb[0], "%.1f C, from %s", ctx->ses->temp_C, basis(&o));
	snprintf(nb[nn++], sizeof nb[0], "permeabilities (%s):",
		 o.absolute == 1 ? "cm/s" : "relative");
	for (int i = 0; i < o.np && nn < PLOT_MAX_NOTES; i++)
		snprintf(nb[nn++], sizeof nb[0], "  P(%s) = %.4g", x[i].symbol, x[i].P);
	for (int i = 0; i < nn; i++)
		notes[i] = nb[i];
	char mark[64], title[200], ylab_t[64], ylab_svg[64];
	snprintf(mark, sizeof mark, "E_rev %+.1f mV", iv.E_rev_mV);
	snprintf(title, sizeof title, "GHK current: %.64s inside, %.64s outside, "
		 "%.1f C",
		 ins.sol->name, outs.sol->name, ctx->ses->temp_C);
	snprintf(ylab_t, sizeof ylab_t, "current density (%s), outward up", unit_t);
	snprintf(ylab_svg, sizeof ylab_svg, "current density (%s), outward up",
		 unit_svg);
	plot_opts po;
	plot_opts_init(&po);
	po.x_label = "membrane potential (mV), inside relative to outside";
	po.has_mark = iv.has_erev;
	po.mark_x = iv.E_rev_mV;
	po.mark_label = mark;
	po.notes = notes;
	po.nnotes = nn;

	/* both files, or neither */
	if (o.svg || o.csv) {
		fio_batch b;
		FILE *fp;
		fio_batch_init(&b);
		if (o.svg) {
			plot_opts ps = po;
			ps.utf8 = 1;
			ps.title = title;
			ps.y_label = ylab_svg;
			if (fio_batch_open(&b, o.svg, &fp, err) ||
			    plot_svg(fp, c, nc, &ps, err)) {
				fio_batch_abort(&b);
				goto done;
			}
		}
		if (o.csv) {
			iv_out a = {&iv, x, o.absolute == 1 ? 1.0 : f,
				    o.absolute == 1 ? "A_cm2" : "relative"};
			if (fio_batch_open(&b, o.csv, &fp, err) || write_csv(fp, &a, err)) {
				fio_batch_abort(&b);
				goto done;
			}
		}
		if (fio_batch_commit(&b, err))
			goto done;
	}

	if (ctx->out->json) {
		jw w;
		json_head(&w, ctx, &ins, &outs, &o, x);
		/* the same numbers and unit as the text table and the CSV */
		double g = o.absolute == 1 ? 1.0 : f;
		jw_str(&w, "permeability_unit", o.absolute == 1 ? "cm/s" : "relative");
		jw_str(&w, "current_unit", o.absolute == 1 ? "A/cm2" : rel_unit);
		if (o.absolute != 1)
			jw_num(&w, "relative_unit_A_cm2_per_cm_s", maxabs, 8);
		jw_arr(&w, "points");
		for (int k = 0; k < iv.npts; k++) {
			jw_obj(&w, NULL);
			jw_num(&w, "mV", iv.V_mV[k], 10);
			jw_num(&w, "total", g * iv.total_A_cm2[k], 10);
			for (int i = 0; i < iv.nions; i++)
				jw_num(&w, x[i].symbol,
				       g * iv.ion_A_cm2[(size_t)k * iv.nions + i], 10);
			jw_close(&w);
		}
		jw_close(&w);
		if (iv.has_erev) {
			jw_num(&w, "E_rev_mV", iv.E_rev_mV, 8);
			jw_num(&w, "rectification", iv.rect, 8);
		} else {
			jw_str(&w, "E_rev_mV", NULL);
			jw_str(&w, "rectification", NULL);
			jw_str(&w, "note", iv.no_erev);
		}
		jw_num(&w, "rect_distance_mV", iv.rect_mV, 6);
		if (o.svg)
			jw_str(&w, "svg", o.svg);
		if (o.csv)
			jw_str(&w, "csv", o.csv);
		jw_str(&w, "convention", CONVENTION);
		jw_end(&w);
	} else {
		out_printf(ctx->out, "GHK current-voltage curve: %s inside, %s outside, "
			   "%.1f C, from %s; %s\n", ins.sol->name,
			   outs.sol->name, ctx->ses->temp_C, basis(&o),
			   o.absolute == 1 ? "P in cm/s, current in A/cm2"
			   : "P relative, current in relative units");
		if (o.absolute != 1)
			out_printf(ctx->out, "  note: permeabilities without a unit (%s=%g) are "
				   "taken as relative: the current is scaled so that the "
				   "largest |current| from %g to %g mV is 1 (the same in the "
				   "CSV, SVG and JSON); give P as %s=%gcm/s for A/cm2\n",
				   x[0].symbol, x[0].P, o.v1, o.v2, x[0].symbol, x[0].P);
		out_printf(ctx->out, "  %8s %12s", "V mV", "total");
		for (int i = 0; i < o.np; i++)
			out_printf(ctx->out, " %12s", x[i].symbol);
		out_printf(ctx->out, "   (%s)\n", unit_t);
		for (int k = 0; k < iv.npts; k++) {
			out_printf(ctx->out, "  %8.2f %12.5g", iv.V_mV[k],
				   f * iv.total_A_cm2[k]);
			for (int i = 0; i < o.np; i++)
				out_printf(ctx->out, " %12.5g",
					   f * iv.ion_A_cm2[(size_t)k * iv.nions + i]);
			out_printf(ctx->out, "\n");
		}
		if (iv.has_erev) {
			out_printf(ctx->out, "  E_rev = %+.2f mV\n", iv.E_rev_mV);
			out_printf(ctx->out, "  rectification |I(E_rev%+g)|/|I(E_rev%+g)| = "
				   "%.4g (%s)\n", iv.rect_mV, -iv.rect_mV, iv.rect,
				   iv.rect > 1 ? "> 1: outward rectification"
				   : iv.rect < 1 ? "< 1: inward rectification"
				   : "no rectification");
		} else {
			out_printf(ctx->out, "  %s\n", iv.no_erev);
		}
		if (o.np > 1 && nc - 1 < o.np)
			out_printf(ctx->out, "  (the plot shows the total and the first %d "
				   "ions)\n", nc - 1);
		out_printf(ctx->out, "\n");
		po.utf8 = term_utf8;
		po.y_label = ylab_t;
		char *buf = NULL;
		size_t len = 0;
		FILE *mem = open_memstream(&buf, &len);
		if (!mem) {
			im_fail(err, "cannot draw the plot: %s", strerror(errno));
			goto done;
		}
		int prc = plot_term(mem, c, nc, &po, err);
		fclose(mem);
		if (prc == 0)
			out_printf(ctx->out, "%s", buf);
		free(buf);
		if (prc)
			goto done;
		if (o.svg)
			out_printf(ctx->out, "  wrote %s\n", o.svg);
		if (o.csv)
			out_printf(ctx->out, "  wrote %s\n", o.csv);
		out_printf(ctx->out, "  sign: %s, plotted upward\n", CONVENTION);
	}
	rc = 0;
done:
	free(ys);
	free(fine);
	ghk_iv_free(&iv);
	side_close(&ins);
	side_close(&outs);
	return rc;
}
