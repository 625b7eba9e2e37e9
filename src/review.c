/*
 * review.c - the checks of a pipette/bath pair before mixing, as a report
 * (no printing).
 *
 * Thresholds are facts of the trade (common practice), named here so a
 * reader can argue with them:
 */
#include "review.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "session.h"
#include "ljp.h"
#include "common.h"
#include "electrode.h"
#include "nernst.h"
#include "units.h"

/* pipette osmolality below the bath by 0 to 20 mOsm/kg is the usual aim;
 * beyond 40 either way cells swell or shrink within minutes */
#define OSM_DIFF_FINE_MAX 20.0
#define OSM_DIFF_BAD 40.0
/* a recording solution outside 6.8-7.8 is rarely intended */
#define PH_LOW 6.8
#define PH_HIGH 7.8
/* buffer capacity below 2 mM per pH unit holds the pH poorly */
#define BETA_MIN_mM 2.0
/* free Ca2+ inside: resting cytoplasm is about 50-200 nM; above 1 uM
 * inside is almost always a mistake */
#define CA_IN_HIGH_mM 1e-3
/* free Mg2+ inside: about 0.3-1 mM in cytoplasm; outside 0.1-3 mM check */
#define MG_IN_LOW_mM 0.1
#define MG_IN_HIGH_mM 3.0
/* an LJP above this should be corrected for */
#define LJP_CORRECT_mV 2.0
/* Cl- of the saline a bare Ag/AgCl ground is usually chlorided in */
#define REF_CL_mM 150.0

enum { FINE = REVIEW_FINE, CHECK = REVIEW_CHECK, PROBLEM = REVIEW_PROBLEM };
static const char *verdict_name[] = {"fine", "check", "problem"};

typedef review_report report;

const char *review_verdict_name(int verdict)
{
	return verdict >= 0 && verdict < 3 ? verdict_name[verdict] : "?";
}

static void add(report *r, const char *check, int verdict, double value, const char *unit,
		const char *fmt, ...) __attribute__((format(printf, 6, 7)));

static void add(report *r, const char *check, int verdict, double value, const char *unit,
		const char *fmt, ...)
{
	review_item *x;
	va_list ap, aq;
	int len;
	if (r->n == r->cap) {
		r->cap = r->cap ? 2 * r->cap : 16;
		r->it = im_xrealloc(r->it, (size_t)r->cap * sizeof *r->it);
	}
	x = &r->it[r->n++];
	x->check = im_xstrdup(check);
	x->verdict = verdict;
	x->value = fabs(value) < 1e-9 ? 0 : value; /* no -0 or 1e-15 of rounding */
	x->unit = im_xstrdup(unit);
	va_start(ap, fmt);
	va_copy(aq, ap);
	len = vsnprintf(NULL, 0, fmt, aq);
	va_end(aq);
	x->note = im_xmalloc(len > 0 ? (size_t)len + 1 : 1);
	vsnprintf(x->note, len > 0 ? (size_t)len + 1 : 1, fmt, ap);
	va_end(ap);
}

static double conc_of(const sol_state *st, const refdb *ref, const char *sym, int act)
{
	const sol_species *x = sol_state_find(st, refdb_ion(ref, sym));
	return x ? (act ? x->act_mM : x->mM) : 0;
}

/* Buffer capacity, mM of strong base per pH unit: the pH change when
 * 0.1 mM of OH- joins the solution's protons (closed system). */
static double buffer_capacity(session *ses, const solution *s, const sol_state *st)
{
	spec_in in[SPEC_MAX_IN + 1];
	spec_cond cond;
	spec_result *r;
	char err[IM_ERRLEN];
	double beta = NAN;
	int n = sol_spec_inputs(s, 0, in, SPEC_MAX_IN, err);
	if (n < 0 || !st->chem)
		return NAN;
	in[n++] = (spec_in){"OH-", -1, 0.1};
	sol_spec_cond(s, ses_env(ses), &cond);
	r = im_xmalloc(sizeof *r);
	if (spec_solve(ses->chem, in, n, &cond, r, err) == 0 && r->pH != st->pH)
		beta = 0.1 / (r->pH - st->pH);
	free(r);
	return beta;
}

static int has_chelator(const sol_state *st)
{
	for (int i = 0; st->chem && i < st->chem->nligands; i++) {
		const char *l = st->chem->ligands[i].name;
		if (strcmp(l, "EGTA") == 0 || strcmp(l, "BAPTA") == 0 || strcmp(l, "EDTA") == 0)
			return 1;
	}
	return 0;
}

static void review_osmo(report *r, const sol_state *p, const sol_state *b)
{
	double d = b->osmolality_mOsm_kg - p->osmolality_mOsm_kg;
	add(r, "osmolality pipette", FINE, p->osmolality_mOsm_kg, "mOsm/kg",
	    "Pitzer estimate; confirm with an osmometer");
	add(r, "osmolality bath", FINE, b->osmolality_mOsm_kg, "mOsm/kg",
	    "Pitzer estimate; confirm with an osmometer");
	if (!isfinite(d))
		return;
	if (d >= 0 && d <= OSM_DIFF_FINE_MAX)
		add(r, "osmolality difference", FINE, d, "mOsm/kg",
		    "bath minus pipette; the pipette a little below the bath is the usual aim "
		    "(common practice)");
	else if (fabs(d) > OSM_DIFF_BAD)
		add(r, "osmolality difference", PROBLEM, d, "mOsm/kg",
		    "bath minus pipette; over %.0f mOsm/kg apart, cells swell or shrink (adjust with "
		    "`osmo`)", OSM_DIFF_BAD);
	else
		add(r, "osmolality difference", CHECK, d, "mOsm/kg",
		    "bath minus pipette; usually the pipette is 0 to %.0f mOsm/kg below the bath "
		    "(common practice)", OSM_DIFF_FINE_MAX);
}

static void review_ph(report *r, session *ses, const char *which, const solution *s,
		      const sol_state *st)
{
	char check[48];
	double beta = buffer_capacity(ses, s, st);
	int set = isfinite(s->ph_target) || s->co2_frac > 0;
	snprintf(check, sizeof check, "pH %s", which);
	if (!isfinite(st->pH))
		return;
	if (st->pH < PH_LOW || st->pH > PH_HIGH)
		add(r, check, PROBLEM, st->pH, "", "%s; outside %.1f to %.1f: titrate with `ph`",
		    set ? "as set" : "not set: the solution as mixed", PH_LOW, PH_HIGH);
	else
		add(r, check, set ? FINE : CHECK, st->pH, "",
		    set ? (s->co2_frac > 0 ? "set by CO2 and bicarbonate" : "titrated")
			: "not titrated; confirm with a pH meter");
	snprintf(check, sizeof check, "buffer capacity %s", which);
	if (isfinite(beta))
		add(r, check, beta >= BETA_MIN_mM ? FINE : CHECK, beta, "mM/pH",
		    beta >= BETA_MIN_mM ? "a buffer's pKa lies within about one unit of the pH"
					: "weakly buffered at this pH: no buffer with its pKa within "
					  "about one unit (common practice)");
}

static void review_divalent(report *r, const sol_state *p)
{
	double ca = sol_state_free_mM(p, "Ca2+"), mg = sol_state_free_mM(p, "Mg2+");
	char b[48];
	if (isfinite(ca) && ca > 0) {
		units_fmt_conc(b, sizeof b, ca, 0);
		if (ca > CA_IN_HIGH_mM)
			add(r, "free Ca2+ pipette", PROBLEM, ca * 1e6, "nM",
			    "%s inside: far above resting cytoplasm (50-200 nM); almost always a "
			    "mistake unless intended", b);
		else
			add(r, "free Ca2+ pipette", has_chelator(p) ? FINE : CHECK, ca * 1e6, "nM",
			    has_chelator(p) ? "buffered by a chelator" : "not buffered: no EGTA or BAPTA");
	} else if (isfinite(ca)) {
		add(r, "free Ca2+ pipette", has_chelator(p) ? FINE : CHECK, 0, "nM",
		    has_chelator(p) ? "no Ca2+ added; the chelator holds it near zero"
				    : "no Ca2+ and no chelator: trace Ca2+ is unbuffered");
	}
	if (isfinite(mg)) {
		if (mg <= 0)
			add(r, "free Mg2+ pipette", CHECK, 0, "mM",
			    "no Mg2+: ATP needs Mg2+, and Mg2+ shapes inward rectifiers and NMDA "
			    "receptors");
		else
			add(r, "free Mg2+ pipette", mg < MG_IN_LOW_mM || mg > MG_IN_HIGH_mM ? CHECK : FINE,
			    mg, "mM",
			    "cytoplasm holds about 0.3-1 mM; Mg2+ blocks inward rectifiers and NMDA "
			    "receptors (common practice)");
	}
}

static int balanced(const sol_state *st)
{
	double lim = 0.005 * st->cation_mEq_L;
	return fabs(st->net_charge_mEq_L) <= (lim > 0.1 ? lim : 0.1);
}

static void review_potentials(report *r, session *ses, const sol_state *p,
			      const sol_state *b)
{
	static const char *ions[] = {"K+", "Na+", "Cl-", "Ca2+"};
	for (size_t i = 0; i < IM_COUNT(ions); i++) {
		char check[32], e2[IM_ERRLEN];
		const rd_ion *ion = refdb_ion(ses->ref, ions[i]);
		double E;
		snprintf(check, sizeof check, "E_%.*s", (int)strcspn(ions[i], "0123456789+-"),
			 ions[i]);
		if (nernst_mV(ion->z, conc_of(p, ses->ref, ions[i], 0),
			      conc_of(b, ses->ref, ions[i], 0), ses->temp_C, &E, e2)) {
			add(r, check, FINE, NAN, "mV", "%s on one side only: %s", ions[i], e2);
			continue;
		}
		add(r, check, FINE, E, "mV", "%s",
		    strcmp(ions[i], "Cl-") == 0
			    ? "inhibitory (GABA-A, glycine) currents reverse near E_Cl"
			    : "Nernst, inside relative to outside");
	}
}

static void review_ljp(report *r, session *ses, const sol_state *p, const sol_state *b)
{
	double ljp, lo, hi, cl;
	char e2[IM_ERRLEN];
	if (ljp_pair_mV(p, b, 0, ses->temp_C, &ljp, &lo, &hi, e2)) {
		add(r, "liquid junction potential", CHECK, NAN, "mV", "%s", e2);
	} else {
		add(r, "liquid junction potential", fabs(ljp) > LJP_CORRECT_mV ? CHECK : FINE, ljp,
		    "mV",
		    "bath relative to pipette (Henderson; %.1f to %.1f mV with the mobility "
		    "uncertainties); whole-cell Vm = Vpipette - LJP: a command of -70 mV is "
		    "really %.1f mV", lo, hi, -70.0 - ljp);
	}
	cl = conc_of(b, ses->ref, "Cl-", 1);
	if (cl > 0) {
		/* the ground against one chlorided in a 150 mM Cl- saline */
		double ref_act = REF_CL_mM * conc_of(b, ses->ref, "Cl-", 1) /
				 conc_of(b, ses->ref, "Cl-", 0);
		double shift = el_agcl_mV(cl, ses->temp_C) - el_agcl_mV(ref_act, ses->temp_C);
		add(r, "Ag/AgCl ground in the bath", el_bridge_advisable(shift) ? CHECK : FINE,
		    shift, "mV",
		    el_bridge_advisable(shift)
			    ? "a bare Ag/AgCl ground here sits this far from its value in 150 mM "
			      "Cl-: use a salt bridge (common practice)"
			    : "against a 150 mM Cl- saline; a bare Ag/AgCl ground is fine");
	} else {
		add(r, "Ag/AgCl ground in the bath", PROBLEM, NAN, "mV",
		    "no Cl- in the bath: a bare Ag/AgCl ground has no defined potential; use a "
		    "salt bridge");
	}
}

static void review_hazards(report *r, const solution *p, const solution *b)
{
	for (int side = 0; side < 2; side++) {
		const solution *s = side ? b : p;
		for (int i = 0; i < s->n; i++) {
			const rd_compound *c = s->items[i].c;
			int dup = 0;
			if (!c->hazard)
				continue;
			for (int k = 0; side && k < p->n; k++)
				dup |= p->items[k].c == c;
			if (!dup)
				add(r, "caution", CHECK, NAN, "", "%s: %s", c->name, c->hazard);
		}
	}
}

int review_pair(session *ses, const solution *sp, const solution *sb, review_report *r,
		char *err)
{
	sol_state p, b;
	memset(r, 0, sizeof *r);
	if (sp->n == 0 || sb->n == 0)
		return im_fail(err, "%s is empty: nothing to review", sp->n ? sb->name : sp->name);
	if (sol_compute(sp, ses_env(ses), &p, err))
		return -1;
	if (sol_compute(sb, ses_env(ses), &b, err)) {
		sol_state_free(&p);
		return -1;
	}
	r->temp_C = ses->temp_C;
	review_osmo(r, &p, &b);
	review_ph(r, ses, "pipette", sp, &p);
	review_ph(r, ses, "bath", sb, &b);
	review_divalent(r, &p);
	add(r, "charge balance pipette", balanced(&p) ? FINE : PROBLEM, p.net_charge_mEq_L,
	    "mEq/L", balanced(&p) ? "electroneutral" : "not electroneutral: a counter-ion is missing");
	add(r, "charge balance bath", balanced(&b) ? FINE : PROBLEM, b.net_charge_mEq_L, "mEq/L",
	    balanced(&b) ? "electroneutral" : "not electroneutral: a counter-ion is missing");
	review_potentials(r, ses, &p, &b);
	review_ljp(r, ses, &p, &b);
	review_hazards(r, sp, sb);
	for (int i = 0; i < r->n; i++)
		r->count[r->it[i].verdict]++;
	sol_state_free(&p);
	sol_state_free(&b);
	return 0;
}

void review_free(review_report *r)
{
	for (int i = 0; i < r->n; i++) {
		free(r->it[i].check);
		free(r->it[i].unit);
		free(r->it[i].note);
	}
	free(r->it);
	memset(r, 0, sizeof *r);
}
