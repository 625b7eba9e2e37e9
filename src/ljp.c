/*
 * ljp.c - two solutions to a junction (see ljp.h): species, mobilities
 * and their uncertainty, the models, the interval, the spread, the ranked
 * breakdown, the corrections and the cautions.
 */
#include "ljp.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "electrode.h"
#include "signals.h"

/* Net charge above this fraction of the cations earns a caution. */
#define NEUTRAL_CAUTION_REL 0.02

/* ---- a growable string (no fixed buffer can cut a message) ---- */

typedef struct sbuf {
	char *s;
	size_t len, cap;
} sbuf;

static void sb_addf(sbuf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

static void sb_addf(sbuf *b, const char *fmt, ...)
{
	va_list ap;
	int k;
	va_start(ap, fmt);
	k = vsnprintf(NULL, 0, fmt, ap);
	va_end(ap);
	if (k < 0)
		return;
	if (b->len + (size_t)k + 1 > b->cap) {
		b->cap = 2 * (b->len + (size_t)k + 1) + 64;
		b->s = im_xrealloc(b->s, b->cap);
	}
	va_start(ap, fmt);
	vsnprintf(b->s + b->len, b->cap - b->len, fmt, ap);
	va_end(ap);
	b->len += (size_t)k;
}

static char *sb_take(sbuf *b)
{
	if (!b->s)
		return im_xstrdup("");
	return b->s;
}

static void add_caution(ljp_result *r, char *msg)
{
	r->caution = im_xrealloc(r->caution, (r->ncaution + 1) * sizeof *r->caution);
	r->caution[r->ncaution++] = msg;
}

/* ---- mobilities ---- */

const char *ljp_class_name(int cls)
{
	switch (cls) {
	case RD_MOB_MEASURED:
		return "measured";
	case RD_MOB_MEMORY:
		return "from memory";
	case RD_MOB_ESTIMATED:
		return "estimated";
	default:
		return "none";
	}
}

double ljp_estimate_D25_m2_s(double M_g_mol)
{
	double V_m3, r_m, eta_Pa_s, T = 25.0 + IM_ZERO_C_K;
	if (!(M_g_mol > 0) || !isfinite(M_g_mol))
		return NAN;
	/* volume of one molecule: M / rho (cm3/mol) -> m3 per molecule */
	V_m3 = M_g_mol / LJP_EST_RHO_G_CM3 * 1e-6 / IM_AVOGADRO_MOL;
	r_m = cbrt(3.0 * V_m3 / (4.0 * M_PI));
	eta_Pa_s = jn_water_viscosity_mPa_s(25.0) * 1e-3;
	return IM_BOLTZMANN_J_K * T / (6.0 * M_PI * eta_Pa_s * r_m);
}

int ljp_mobility_of(const refdb *ref, const rd_ion *ion, ljp_mobility *m)
{
	memset(m, 0, sizeof *m);
	m->D25_m2_s = NAN;
	if (ion->z == 0)
		return -1;
	if (isfinite(ion->lambda_S_cm2_eq) && ion->lambda_S_cm2_eq > 0)
		m->D25_m2_s = jn_D_from_lambda_m2_s(ion->lambda_S_cm2_eq, ion->z, 25.0);
	else if (isfinite(ion->D_1e9_m2_s) && ion->D_1e9_m2_s > 0)
		m->D25_m2_s = ion->D_1e9_m2_s * 1e-9;
	if (m->D25_m2_s > 0) {
		m->how = LJP_FROM_DATA;
		m->cls = ion->mobility_class != RD_MOB_NONE ? ion->mobility_class
							    : RD_MOB_MEMORY;
		m->rel_unc = isfinite(ion->mobility_rel_unc) ? ion->mobility_rel_unc
							     : LJP_EST_REL_UNC_1;
		m->source = ion->mobility_source;
		return 0;
	}
	m->cls = RD_MOB_ESTIMATED;
	m->D25_m2_s = ljp_estimate_D25_m2_s(ion->mass_g_mol);
	if (m->D25_m2_s > 0) {
		m->how = LJP_FROM_MASS;
		m->rel_unc = abs(ion->z) == 1 ? LJP_EST_REL_UNC_1 : LJP_EST_REL_UNC_MULTI;
		m->source = ref ? refdb_source(ref, "est-stokes-mass") : NULL;
		return 0;
	}
	m->how = LJP_NO_SIZE;
	m->D25_m2_s = LJP_NOSIZE_D25_m2_s;
	m->rel_unc = LJP_NOSIZE_REL_UNC;
	m->source = NULL;
	return 0;
}

/* ---- species of a pair ---- */

static int find_or_add(ljp_result *r, const rd_ion *ion, int cap)
{
	for (int k = 0; k < r->n; k++)
		if (r->sp[k].ion == ion)
			return k;
	if (r->n >= cap)
		return -1;
	memset(&r->sp[r->n], 0, sizeof r->sp[r->n]);
	r->sp[r->n].ion = ion;
	r->sp[r->n].x.symbol = ion->symbol;
	r->sp[r->n].x.z = ion->z;
	return r->n++;
}

static int has_ions(const sol_state *st)
{
	for (int j = 0; j < st->n; j++)
		if (st->sp[j].ion->z != 0 && st->sp[j].mM > 0)
			return 1;
	return 0;
}

static int build(const refdb *ref, const sol_state *a, const sol_state *b, int act,
		 double t_C, ljp_result *r, char *err)
{
	int cap = a->n + b->n + 1;
	r->sp = im_xcalloc(cap, sizeof *r->sp);
	for (int side = 0; side < 2; side++) {
		const sol_state *st = side ? b : a;
		for (int j = 0; j < st->n; j++) {
			const sol_species *s = &st->sp[j];
			double v = act ? s->act_mM : s->mM;
			int k;
			if (s->ion->z == 0 || !(v > 0))
				continue;
			k = find_or_add(r, s->ion, cap);
			if (side)
				r->sp[k].x.bath_mM += v;
			else
				r->sp[k].x.pip_mM += v;
		}
	}
	if (r->n > JN_MAX_IONS)
		return im_fail(err, "too many ions for one junction (%d; at most %d)", r->n,
			       JN_MAX_IONS);
	for (int k = 0; k < r->n; k++) {
		ljp_species *s = &r->sp[k];
		ljp_mobility_of(ref, s->ion, &s->mob);
		s->x.D_m2_s = jn_D_at_T_m2_s(s->mob.D25_m2_s, t_C);
		r->count[s->mob.cls]++;
	}
	return 0;
}

/* ---- the interval (vertex method, see ljp.h) ---- */

static int henderson_with(const ljp_result *r, jn_ion *x, const double *f, double *E,
			  char *err)
{
	for (int k = 0; k < r->n; k++) {
		x[k] = r->sp[k].x;
		x[k].D_m2_s *= f[k];
	}
	return jn_henderson_mV(x, r->n, r->t_C, E, err);
}

static int interval(ljp_result *r, char *err)
{
	int n = r->n, rc = -1;
	jn_ion *x = im_xcalloc(n, sizeof *x);
	double *f = im_xcalloc(n, sizeof *f), E0 = r->henderson_mV, up = 0, dn = 0, tot = 0,
	       Ehi, Elo, best = 0;
	for (int k = 0; k < n; k++)
		f[k] = 1.0;
	for (int k = 0; k < n; k++) {
		ljp_species *s = &r->sp[k];
		double u = s->mob.rel_unc, e[2];
		s->eff_lo_mV = s->eff_hi_mV = 0;
		if (!(u > 0))
			continue;
		for (int side = 0; side < 2; side++) {
			f[k] = side ? 1.0 + u : 1.0 - u;
			if (henderson_with(r, x, f, &e[side], err))
				goto out;
			e[side] -= E0;
		}
		f[k] = 1.0;
		s->eff_lo_mV = e[0];
		s->eff_hi_mV = e[1];
		up += fmax(0.0, fmax(e[0], e[1]));
		dn += fmin(0.0, fmin(e[0], e[1]));
	}
	/* the corners: every mobility at the end that raised (lowered) E */
	for (int k = 0; k < n; k++) {
		const ljp_species *s = &r->sp[k];
		f[k] = s->eff_hi_mV >= s->eff_lo_mV ? 1.0 + s->mob.rel_unc : 1.0 - s->mob.rel_unc;
	}
	if (henderson_with(r, x, f, &Ehi, err))
		goto out;
	for (int k = 0; k < n; k++) {
		const ljp_species *s = &r->sp[k];
		f[k] = s->eff_hi_mV >= s->eff_lo_mV ? 1.0 - s->mob.rel_unc : 1.0 + s->mob.rel_unc;
	}
	if (henderson_with(r, x, f, &Elo, err))
		goto out;
	r->henderson_hi_mV = fmax(E0, fmax(E0 + up, Ehi));
	r->henderson_lo_mV = fmin(E0, fmin(E0 + dn, Elo));
	r->driver = -1;
	for (int k = 0; k < n; k++) {
		ljp_species *s = &r->sp[k];
		tot += fmax(0.0, fmax(s->eff_lo_mV, s->eff_hi_mV)) -
		       fmin(0.0, fmin(s->eff_lo_mV, s->eff_hi_mV));
	}
	for (int k = 0; k < n; k++) {
		ljp_species *s = &r->sp[k];
		double w = fmax(0.0, fmax(s->eff_lo_mV, s->eff_hi_mV)) -
			   fmin(0.0, fmin(s->eff_lo_mV, s->eff_hi_mV));
		s->width_share = tot > 0 ? w / tot : 0.0;
		if (tot > 0 && s->width_share > best) {
			best = s->width_share;
			r->driver = k;
		}
	}
	r->driver_share = best;
	rc = 0;
out:
	free(x);
	free(f);
	return rc;
}

/* ---- models ---- */

static void run_models(ljp_result *r, jn_ion *x)
{
	ljp_model_run *m = r->model;
	for (int k = 0; k < r->n; k++)
		x[k] = r->sp[k].x;
	m[LJP_HENDERSON].ok = 1;
	m[LJP_HENDERSON].ljp_mV = r->henderson_mV;
	if (m[LJP_PLANCK].asked)
		m[LJP_PLANCK].ok =
			jn_planck_mV(x, r->n, r->t_C, &m[LJP_PLANCK].ljp_mV, m[LJP_PLANCK].why) == 0;
	if (m[LJP_DIFFUSION].asked && !sig_cancelled())
		m[LJP_DIFFUSION].ok = df_ljp_mV(x, r->n, r->t_C, NULL, &r->diffusion,
						&m[LJP_DIFFUSION].ljp_mV,
						m[LJP_DIFFUSION].why) == 0;
}

static void summarize(ljp_result *r)
{
	double lo = INFINITY, hi = -INFINITY;
	double dlo = r->henderson_lo_mV - r->henderson_mV,
	       dhi = r->henderson_hi_mV - r->henderson_mV;
	r->models_asked = r->models_ok = 0;
	for (int m = 0; m < LJP_NMODELS; m++) {
		ljp_model_run *x = &r->model[m];
		if (!x->asked)
			continue;
		r->models_asked++;
		if (!x->ok)
			continue;
		x->why[0] = '\0';
		r->models_ok++;
		x->lo_mV = x->ljp_mV + dlo;
		x->hi_mV = x->ljp_mV + dhi;
		lo = fmin(lo, x->ljp_mV);
		hi = fmax(hi, x->ljp_mV);
	}
	r->spread_mV = r->models_ok >= 2 ? hi - lo : NAN;
	r->ljp_mV = r->model[r->main_model].ljp_mV;
	r->lo_mV = r->model[r->main_model].lo_mV;
	r->hi_mV = r->model[r->main_model].hi_mV;
	r->wc_example_cmd_mV = -70.0;
	r->wc_example_true_mV = el_true_mV(EL_WHOLE_CELL, -70.0, r->ljp_mV, 0.0);
	r->io_example_cmd_mV = 70.0;
	r->io_example_true_mV = el_true_mV(EL_INSIDE_OUT, 70.0, r->ljp_mV, 0.0);
}

/* ---- cautions ---- */

static void neutral_caution(ljp_result *r, const sol_state *st, const char *name)
{
	double net = st->net_charge_mEq_L, cat = st->cation_mEq_L;
	sbuf b = {0};
	if (!(cat > 0 && fabs(net) > NEUTRAL_CAUTION_REL * cat))
		return;
	sb_addf(&b,
		"solution %s is not electroneutral (net charge %+.3g mEq/L): the junction "
		"models assume balanced solutions",
		name, net);
	add_caution(r, sb_take(&b));
}

/* A strong base or acid counted as free OH- or H+ (the species model
 * without a buffer to take it up): its high mobility moves the LJP; say
 * by how much. */
static void strong_caution(ljp_result *r, const char *pip, const char *bath)
{
	for (int k = 0; k < r->n; k++) {
		const jn_ion *x = &r->sp[k].x;
		int oh = strcmp(x->symbol, "OH-") == 0, h = strcmp(x->symbol, "H+") == 0;
		double m = fmax(x->pip_mM, x->bath_mM);
		sbuf b = {0};
		if (!((oh || h) && m > 1.0 && fabs(r->sp[k].share_mV) >= 0.01))
			continue;
		sb_addf(&b,
			"%s at %.3g mM in %s is taken as free; if a buffer takes it up, the "
			"LJP changes by about %+.2f mV (minus its share)",
			x->symbol, m, x->pip_mM >= x->bath_mM ? pip : bath,
			0.0 - r->sp[k].share_mV);
		add_caution(r, sb_take(&b));
	}
}

/* One caution per class that is not a looked-up measurement, naming
 * every such ion (the whole list: nothing is cut). */
static void mobility_cautions(ljp_result *r)
{
	static const struct {
		int cls;
		int how;
		const char *head;
	} kinds[] = {
		{RD_MOB_MEMORY, -1,
		 "mobility recalled from memory or common practice, not looked up: "},
		{RD_MOB_ESTIMATED, LJP_FROM_DATA,
		 "mobility estimated (Stokes-Einstein from the molar mass, see `info ION`): "},
		{RD_MOB_ESTIMATED, LJP_FROM_MASS,
		 "mobility of products of speciation estimated from the molar mass of their "
		 "parts (Stokes-Einstein): "},
		{RD_MOB_ESTIMATED, LJP_NO_SIZE,
		 "no mobility and no size in the data, bounded between about 0.05e-9 m2/s "
		 "and that of Na+ (common practice): "},
	};
	for (size_t q = 0; q < IM_COUNT(kinds); q++) {
		sbuf b = {0};
		int any = 0;
		for (int k = 0; k < r->n; k++) {
			const ljp_mobility *m = &r->sp[k].mob;
			if (m->cls != kinds[q].cls ||
			    (kinds[q].how >= 0 && (int)m->how != kinds[q].how))
				continue;
			sb_addf(&b, "%s%s", any ? ", " : kinds[q].head, r->sp[k].ion->symbol);
			any = 1;
		}
		if (any)
			add_caution(r, sb_take(&b));
	}
}

/* ---- the whole ---- */

int ljp_compute(const refdb *ref, const sol_state *pip, const sol_state *bath, int act,
		double t_C, int models, const char *pip_name, const char *bath_name,
		ljp_result *r, char *err)
{
	jn_ion *x = NULL;
	int one;
	memset(r, 0, sizeof *r);
	r->t_C = t_C;
	r->activities = act;
	r->driver = -1;
	r->spread_mV = NAN;
	if (!has_ions(pip))
		return im_fail(err,
			       "solution '%.60s' has no ions (a junction needs charged species)",
			       pip_name ? pip_name : "pipette");
	if (!has_ions(bath))
		return im_fail(err,
			       "solution '%.60s' has no ions (a junction needs charged species)",
			       bath_name ? bath_name : "bath");
	if (!(models & LJP_ALL))
		models = LJP_BIT(LJP_HENDERSON);
	if (build(ref, pip, bath, act, t_C, r, err))
		goto fail;
	x = im_xcalloc(r->n, sizeof *x);
	for (int k = 0; k < r->n; k++)
		x[k] = r->sp[k].x;
	r->identical = jn_identical(x, r->n);
	/* the breakdown and the interval are Henderson's; its failure is the
	 * junction's */
	{
		double *share = im_xcalloc(r->n, sizeof *share);
		int rc = jn_henderson_contrib(x, r->n, t_C, share, &r->henderson_mV, err);
		for (int k = 0; k < r->n && rc == 0; k++)
			r->sp[k].share_mV = share[k];
		free(share);
		if (rc)
			goto fail;
	}
	if (interval(r, err))
		goto fail;
	for (int m = 0; m < LJP_NMODELS; m++)
		r->model[m].asked = (models & LJP_BIT(m)) != 0;
	one = models == LJP_BIT(LJP_PLANCK)      ? LJP_PLANCK
	      : models == LJP_BIT(LJP_DIFFUSION) ? LJP_DIFFUSION
						 : LJP_HENDERSON;
	r->main_model = one;
	run_models(r, x);
	if (sig_cancelled()) { /* Ctrl-C in the shell: the junction fails whole */
		im_fail(err, "%s", SIG_CANCELLED_MSG);
		goto fail;
	}
	if (!r->model[one].ok) {
		im_fail(err, "%s", r->model[one].why);
		goto fail;
	}
	summarize(r);
	neutral_caution(r, pip, pip_name ? pip_name : "pipette");
	if (pip != bath)
		neutral_caution(r, bath, bath_name ? bath_name : "bath");
	mobility_cautions(r);
	strong_caution(r, pip_name ? pip_name : "the pipette", bath_name ? bath_name : "the bath");
	free(x);
	return 0;
fail:
	free(x);
	ljp_free(r);
	return -1;
}

void ljp_free(ljp_result *r)
{
	free(r->sp);
	for (int i = 0; i < r->ncaution; i++)
		free(r->caution[i]);
	free(r->caution);
	r->sp = NULL;
	r->caution = NULL;
	r->n = r->ncaution = 0;
}

/* ---- the ranked breakdown ---- */

static int by_share(const void *a, const void *b)
{
	const ljp_species *x = *(const ljp_species *const *)a,
			  *y = *(const ljp_species *const *)b;
	double u = fabs(x->share_mV), v = fabs(y->share_mV);
	if (u != v)
		return u < v ? 1 : -1;
	return strcmp(x->ion->symbol, y->ion->symbol);
}

static void bar(sbuf *b, double v, double scale)
{
	int len = scale > 0 ? (int)lround(fabs(v) / scale * LJP_BAR_WIDTH) : 0;
	if (len > LJP_BAR_WIDTH)
		len = LJP_BAR_WIDTH;
	if (len == 0 && fabs(v) >= 0.005)
		len = 1;
	for (int i = 0; i < LJP_BAR_WIDTH; i++)
		sb_addf(b, "%c", v < 0 && i >= LJP_BAR_WIDTH - len ? '#' : ' ');
	sb_addf(b, "|");
	for (int i = 0; i < len && v > 0; i++)
		sb_addf(b, "#");
}

char *ljp_breakdown_text(const ljp_result *r, const char *indent)
{
	sbuf b = {0};
	const ljp_species **o;
	double top = 0, rest = 0;
	int shown = 0, nrest = 0, w = 8;
	if (!indent)
		indent = "";
	if (r->n == 0)
		return im_xstrdup("");
	o = im_xcalloc(r->n, sizeof *o);
	for (int k = 0; k < r->n; k++) {
		o[k] = &r->sp[k];
		top = fmax(top, fabs(r->sp[k].share_mV));
		if ((int)strlen(r->sp[k].ion->symbol) > w)
			w = (int)strlen(r->sp[k].ion->symbol);
	}
	qsort(o, r->n, sizeof *o, by_share);
	for (int k = 0; k < r->n; k++) {
		const ljp_species *s = o[k];
		if (shown < LJP_RANK_MAX && top > 0 &&
		    fabs(s->share_mV) >= LJP_RANK_MIN_FRAC * top) {
			sb_addf(&b, "%s%-*s %+7.2f mV  ", indent, w, s->ion->symbol,
				s->share_mV);
			bar(&b, s->share_mV, top);
			sb_addf(&b, "\n");
			shown++;
		} else {
			rest += s->share_mV;
			nrest++;
		}
	}
	if (nrest) {
		char lab[32];
		snprintf(lab, sizeof lab, "%d other%s", nrest, nrest == 1 ? "" : "s");
		sb_addf(&b, "%s%-*s %+7.2f mV  ", indent, w, lab, rest);
		bar(&b, rest, top);
		sb_addf(&b, "\n");
	}
	free(o);
	return sb_take(&b);
}

int ljp_pair_mV(const sol_state *pip, const sol_state *bath, int act, double t_C,
		double *ljp_mV, double *lo_mV, double *hi_mV, char *err)
{
	ljp_result r;
	if (ljp_compute(NULL, pip, bath, act, t_C, LJP_BIT(LJP_HENDERSON), NULL, NULL, &r, err))
		return -1;
	*ljp_mV = r.ljp_mV;
	if (lo_mV)
		*lo_mV = r.lo_mV;
	if (hi_mV)
		*hi_mV = r.hi_mV;
	ljp_free(&r);
	return 0;
}
