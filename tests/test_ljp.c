/* test_ljp.c - two solutions to a junction (ljp.c): every real internal
 * gets a value and an interval by every model; every species has a
 * mobility with a source; the interval's properties; whole cautions; the
 * free-diffusion model on a corpus of random realistic pairs.  Each check
 * names its source; "common practice" marks a fact of the trade. */
#include "testutil.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "cmd_junction.h"
#include "command.h"
#include "common.h"
#include "diffusion.h"
#include "junction.h"
#include "ljp.h"

#include "testctx.h"

static void run_all(const char *const *lines)
{
	for (int i = 0; lines[i]; i++)
		ok(lines[i]);
}

static void state_of(const char *name, sol_state *st)
{
	char err[IM_ERRLEN];
	solution *s = ws_find(&ctx.ses->ws, name);
	if (!s)
		fail_msg("no solution %s", name);
	if (sol_compute(s, ses_env(ctx.ses), st, err))
		fail_msg("compute %s: %s", name, err);
}

/* The internals issue 9 found refused (ions without a mobility carried
 * more than 10 % of the charge), the demo-like saline, and the Ba2+/TEA
 * and NMDG baths.  Invented recipes in the usual proportions. */
static const char *const recipes[] = {
	"temp 22",
	"run recipes/bath-saline.ionmix",
	"solution ba-tea", "add TEA-Cl 140", "add BaCl2 10", "add HEPES 10",
	"ph 7.4 with CsOH",
	"solution nmdg", "add NMDG 140", "add KCl 5", "add CaCl2 2", "add MgCl2 1",
	"add HEPES 10", "ph 7.4 with HCl",
	"solution cs-qx", "add Cs-methanesulfonate 130", "add CsCl 5", "add HEPES 10",
	"add EGTA 0.5", "add \"QX-314 chloride\" 5", "ph 7.3 with CsOH",
	"solution cscl-qx", "add CsCl 130", "add HEPES 10", "add EGTA 10",
	"add \"QX-314 chloride\" 5", "ph 7.3 with CsOH",
	"solution kglu-bapta", "add K-gluconate 120", "add BAPTA 10", "add HEPES 10",
	"ph 7.3 with KOH",
	"solution cs-egta-atp-pcr", "add Cs-methanesulfonate 110", "add EGTA 10",
	"add MgATP 4", "add Na2-phosphocreatine 10", "add HEPES 10", "ph 7.3 with CsOH",
	"solution kglu-pcr-gtp", "add K-gluconate 115", "add KCl 5",
	"add Na2-phosphocreatine 14", "add MgATP 4", "add Na2GTP 0.3", "add HEPES 10",
	"ph 7.3 with KOH",
	"solution kglut", "add K-glutamate 130", "add KCl 10", "add HEPES 10",
	"add EGTA 0.5", "ph 7.3 with KOH",
	NULL,
};

static const char *const pairs[][2] = {
	{"cs-qx", "bath"},           {"cscl-qx", "bath"},    {"kglu-bapta", "bath"},
	{"cs-egta-atp-pcr", "bath"}, {"kglu-pcr-gtp", "bath"}, {"kglut", "bath"},
	{"cs-qx", "ba-tea"},         {"cscl-qx", "ba-tea"},  {"kglu-pcr-gtp", "nmdg"},
	{"kglut", "nmdg"},
};

/* Every model gives a value with an interval for every internal; none is
 * refused for an estimated mobility. */
static void test_internals_every_model(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	run_all(recipes);
	for (size_t i = 0; i < IM_COUNT(pairs); i++) {
		sol_state a, b;
		ljp_result r;
		double h;
		state_of(pairs[i][0], &a);
		state_of(pairs[i][1], &b);
		if (ljp_compute(db, &a, &b, 0, 22.0, LJP_ALL, pairs[i][0], pairs[i][1], &r, err))
			fail_msg("%s | %s: %s", pairs[i][0], pairs[i][1], err);
		/* all three models produced a value; the spread is over them */
		assert_int_equal(r.models_asked, 3);
		if (r.models_ok != 3)
			fail_msg("%s | %s: planck '%s', diffusion '%s'", pairs[i][0],
				 pairs[i][1], r.model[LJP_PLANCK].why, r.model[LJP_DIFFUSION].why);
		assert_true(isfinite(r.spread_mV) && r.spread_mV >= 0);
		/* the interval contains the central value, and is not a point
		 * (these hold estimated mobilities) */
		assert_true(r.lo_mV <= r.ljp_mV && r.ljp_mV <= r.hi_mV);
		assert_true(r.hi_mV - r.lo_mV > 0.1);
		assert_true(r.count[RD_MOB_ESTIMATED] > 0);
		/* pipettes of K+ or Cs+ with slower anions against Na+ or TEA+ or
		 * NMDG+ salines: the bath is positive, by a few to about 25 mV
		 * (common practice) */
		assert_true(r.ljp_mV > 2 && r.ljp_mV < 30);
		/* free diffusion minus Henderson within 1 mV on physiological
		 * pairs (common practice: the models differ by tenths of a mV
		 * there); its numerical error is printed and small */
		assert_true(fabs(r.model[LJP_DIFFUSION].ljp_mV - r.henderson_mV) < 1.0);
		assert_true(r.diffusion.grid_points >= 101);
		assert_true(r.diffusion.grid_err_mV < 0.01);
		/* the path of review / correct for / erev corrected agrees */
		assert_int_equal(cmdj_henderson_mV(&a, &b, 0, 22.0, &h, err), 0);
		assert_close(h, r.henderson_mV, 0, 1e-9);
		ljp_free(&r);
		sol_state_free(&a);
		sol_state_free(&b);
	}
	/* and the commands that used to fail with them now run */
	ok("junction kglu-pcr-gtp bath model all");
	ok("review cs-egta-atp-pcr bath");
	ok("correct value -70 for kglut bath");
	ok("erev kglut bath K+=1 Na+=0.05 Cl-=0.4 corrected");
}

/* Every charged species in the data, and every one speciation can make,
 * has a mobility with a source and a class; the test lists any without. */
static void test_every_species_has_mobility(void **st)
{
	(void)st;
	size_t cap = 256, n = 0;
	char *bad = calloc(cap, 1);
	int charged = 0, derived = 0;
	for (int i = 0; i < refdb_nions(db); i++) {
		const rd_ion *ion = refdb_ion_at(db, i);
		ljp_mobility m;
		const char *why = NULL;
		if (ion->z == 0)
			continue;
		charged++;
		derived += ion->derived;
		assert_int_equal(ljp_mobility_of(db, ion, &m), 0);
		if (!(m.D25_m2_s > 0))
			why = "no D";
		else if (m.how == LJP_NO_SIZE)
			why = "no mobility and no size";
		else if (!m.source)
			why = "no source";
		else if (m.cls == RD_MOB_NONE || !(m.rel_unc >= 0))
			why = "no class";
		if (why) {
			size_t k = strlen(ion->symbol) + strlen(why) + 8;
			if (n + k >= cap)
				bad = realloc(bad, cap = 2 * (n + k));
			n += (size_t)sprintf(bad + n, "%s (%s); ", ion->symbol, why);
		}
	}
	if (n)
		fail_msg("species without a mobility: %s", bad);
	free(bad);
	/* the derived species are there (ATP, EGTA, ... complexes) */
	assert_true(charged > 60 && derived > 20);
	/* sources: 'est-stokes-mass' for a derived complex */
	{
		ljp_mobility m;
		const rd_ion *mgatp = refdb_ion_exact(db, "MgATP^2-");
		assert_non_null(mgatp);
		assert_int_equal(ljp_mobility_of(db, mgatp, &m), 0);
		assert_int_equal(m.how, LJP_FROM_MASS);
		assert_string_equal(m.source->id, "est-stokes-mass");
		/* MgATP2- weighs ATP4- + Mg = 503.15 + 24.30 (IUPAC weights) */
		assert_close(mgatp->mass_g_mol, 527.45, 0, 0.02);
	}
}

/* The estimated rows of data/ions.sql hold what the method gives, and
 * the method's scatter on the organic ions with a published mobility is
 * within the relative uncertainty it is given (source: est-stokes-mass,
 * RMS 18 %). */
static void test_estimation_method(void **st)
{
	(void)st;
	double s2 = 0, worst = 0;
	int n = 0, nest = 0;
	/* glucose, 180.16 g/mol: D = 0.67e-9 m2/s at 25 C measured (common
	 * practice, from memory); the method gives 0.70e-9 */
	assert_close(ljp_estimate_D25_m2_s(180.16), 0.67e-9, 0.10, 0);
	assert_true(isnan(ljp_estimate_D25_m2_s(0)));
	assert_true(isnan(ljp_estimate_D25_m2_s(NAN)));
	for (int i = 0; i < refdb_nions(db); i++) {
		const rd_ion *ion = refdb_ion_at(db, i);
		ljp_mobility m;
		double est;
		if (ion->z == 0 || ion->derived || !isfinite(ion->mass_g_mol))
			continue;
		ljp_mobility_of(db, ion, &m);
		est = ljp_estimate_D25_m2_s(ion->mass_g_mol);
		if (ion->mobility_class == RD_MOB_ESTIMATED) {
			/* stored rounded to 0.1 S cm2/eq: within 1 % */
			assert_close(m.D25_m2_s, est, 0.01, 0);
			assert_true(m.rel_unc >= LJP_EST_REL_UNC_1);
			nest++;
		} else {
			double e = log(est / m.D25_m2_s);
			s2 += e * e;
			worst = fmax(worst, fabs(e));
			n++;
		}
	}
	assert_true(n >= 9 && nest >= 8);
	assert_true(sqrt(s2 / n) <= LJP_EST_REL_UNC_1);
	assert_true(worst <= 0.4);
}

/* ---- the interval, on hand-made species ---- */

#define MEASURED(sym, zz, lam)                                                      \
	{                                                                           \
		.symbol = sym, .name = sym, .z = zz, .lambda_S_cm2_eq = lam,         \
		.D_1e9_m2_s = NAN, .kielland_a_pm = NAN, .mass_g_mol = NAN,         \
		.mobility_class = RD_MOB_MEASURED, .mobility_rel_unc = 0.0          \
	}
/* lambda from crc-lambda and ng-barry-1995 (as data/ions.sql), here taken
 * as exact */
static rd_ion ion_k = MEASURED("K+", 1, 73.48);
static rd_ion ion_cl = MEASURED("Cl-", -1, 76.31);
static rd_ion ion_na = MEASURED("Na+", 1, 50.08);
static rd_ion ion_g = MEASURED("gluconate-", -1, 24.25);
/* an anion of the size of glutamate whose mobility is estimated */
static rd_ion ion_x = {.symbol = "X-", .name = "estimated anion", .z = -1,
		       .lambda_S_cm2_eq = NAN, .D_1e9_m2_s = NAN, .kielland_a_pm = NAN,
		       .derived = 1, .formula = "C5H8NO4", .mass_g_mol = 146.12,
		       .mobility_class = RD_MOB_NONE, .mobility_rel_unc = NAN};

static void fake(sol_state *s, sol_species *sp, const rd_ion **ions, const double *mM,
		 int n)
{
	memset(s, 0, sizeof *s);
	for (int i = 0; i < n; i++) {
		memset(&sp[i], 0, sizeof sp[i]);
		sp[i].ion = ions[i];
		sp[i].mM = sp[i].act_mM = mM[i];
		sp[i].gamma = 1;
		if (ions[i]->z > 0)
			s->cation_mEq_L += ions[i]->z * mM[i];
		s->net_charge_mEq_L += ions[i]->z * mM[i];
	}
	s->sp = sp;
	s->n = n;
}

static void test_interval(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	sol_state p, b;
	sol_species ps[4], bs[3];
	const rd_ion *pi[4] = {&ion_k, &ion_g, &ion_x, &ion_cl}, *bi[3] = {&ion_na, &ion_cl, &ion_k};
	double bm[3] = {145, 150, 5}, prev = -1;
	ljp_result r;
	fake(&b, bs, bi, bm, 3);
	/* measured and exact (relative uncertainty 0): the interval is a point */
	{
		double pm[4] = {145, 135, 0, 10};
		fake(&p, ps, pi, pm, 4);
		assert_int_equal(ljp_compute(NULL, &p, &b, 0, 25.0, LJP_ALL, "p", "b", &r, err), 0);
		assert_true(r.lo_mV == r.ljp_mV && r.hi_mV == r.ljp_mV);
		assert_int_equal(r.driver, -1);
		assert_int_equal(r.models_ok, 3);
		/* the ranked breakdown: K+ and Cl- lead, bars drawn, nothing lost */
		{
			char *t = ljp_breakdown_text(&r, "  ");
			assert_non_null(strstr(t, "K+"));
			assert_non_null(strstr(t, "|#"));
			assert_true(strstr(t, "Cl-") != NULL);
			free(t);
		}
		ljp_free(&r);
	}
	/* a growing share of the estimated anion X- in place of gluconate:
	 * the interval contains the value and widens monotonically */
	for (int k = 0; k <= 10; k++) {
		double f = k / 10.0, pm[4] = {145, 135 * (1 - f), 135 * f, 10}, w;
		fake(&p, ps, pi, pm, 4);
		assert_int_equal(ljp_compute(NULL, &p, &b, 0, 25.0, LJP_BIT(LJP_HENDERSON), "p",
					     "b", &r, err),
				 0);
		assert_true(r.lo_mV <= r.ljp_mV && r.ljp_mV <= r.hi_mV);
		w = r.hi_mV - r.lo_mV;
		assert_true(w >= prev);
		if (k == 0)
			assert_true(w == 0);
		else {
			assert_true(w > prev);
			/* the one uncertain species drives all of the width: named,
			 * with its own share */
			assert_string_equal(r.sp[r.driver].ion->symbol, "X-");
			assert_close(r.driver_share, 1.0, 0, 1e-12);
			assert_int_equal(r.count[RD_MOB_ESTIMATED], 1);
		}
		prev = w;
		ljp_free(&r);
	}
	/* identical solutions: a plain 0 with a point interval */
	assert_int_equal(ljp_compute(NULL, &b, &b, 0, 25.0, LJP_ALL, "b", "b", &r, err), 0);
	assert_int_equal(r.identical, 1);
	assert_true(r.ljp_mV == 0 && r.lo_mV == 0 && r.hi_mV == 0);
	assert_int_equal(r.models_ok, 3);
	ljp_free(&r);
	/* a solution with no ions: one line naming it, nothing left */
	{
		sol_state e;
		memset(&e, 0, sizeof e);
		assert_int_equal(ljp_compute(NULL, &e, &b, 0, 25.0, LJP_ALL, "water", "b", &r,
					     err),
				 -1);
		assert_non_null(strstr(err, "water"));
		assert_null(strchr(err, '\n'));
		assert_null(r.sp);
	}
}

/* When two models fail, the spread is not 0: it is absent, and says how
 * many models gave a value.  A far-from-neutral pipette makes Planck's
 * model refuse (one line why); the other two stand. */
static void test_spread_truth(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	sol_state p, b;
	sol_species ps[2], bs[3];
	const rd_ion *pi[2] = {&ion_k, &ion_cl}, *bi[3] = {&ion_na, &ion_cl, &ion_k};
	double pm[2] = {140, 100}, bm[3] = {145, 150, 5};
	ljp_result r;
	fake(&p, ps, pi, pm, 2);
	fake(&b, bs, bi, bm, 3);
	assert_int_equal(ljp_compute(NULL, &p, &b, 0, 25.0, LJP_ALL, "p", "b", &r, err), 0);
	assert_int_equal(r.model[LJP_PLANCK].ok, 0);
	assert_non_null(strstr(r.model[LJP_PLANCK].why, "electroneutral"));
	assert_int_equal(r.models_asked, 3);
	assert_int_equal(r.models_ok, 2);
	assert_true(isfinite(r.spread_mV));
	/* the net-charge caution is there, whole */
	assert_true(r.ncaution >= 1);
	assert_non_null(strstr(r.caution[0], "not electroneutral"));
	ljp_free(&r);
	/* Planck alone on it: the command's error is the model's reason */
	assert_int_equal(ljp_compute(NULL, &p, &b, 0, 25.0, LJP_BIT(LJP_PLANCK), "p", "b", &r,
				     err),
			 -1);
	assert_non_null(strstr(err, "electroneutral"));
	/* with only Henderson and Planck asked and Planck failing: one value,
	 * no spread */
	assert_int_equal(ljp_compute(NULL, &p, &b, 0, 25.0,
				     LJP_BIT(LJP_HENDERSON) | LJP_BIT(LJP_PLANCK), "p", "b", &r,
				     err),
			 0);
	assert_int_equal(r.models_ok, 1);
	assert_true(isnan(r.spread_mV));
	ljp_free(&r);
}

/* The longest realistic caution (every product of speciation of a full
 * internal) arrives whole, in text and in JSON. */
static void test_cautions_whole(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	sol_state a, b;
	ljp_result r;
	const char *longest = NULL;
	run_all(recipes);
	ok("run recipes/k-pipette.ionmix");
	state_of("k-pipette", &a);
	state_of("bath", &b);
	assert_int_equal(ljp_compute(db, &a, &b, 0, 22.0, LJP_BIT(LJP_HENDERSON), "k-pipette",
				     "bath", &r, err),
			 0);
	for (int i = 0; i < r.ncaution; i++)
		if (!longest || strlen(r.caution[i]) > strlen(longest))
			longest = r.caution[i];
	assert_non_null(longest);
	/* longer than the fixed buffers that cut it before (a list of 120
	 * characters inside a caution of 240) */
	assert_true(strlen(longest) > 200);
	/* every species estimated from its parts is named, the list ends
	 * with a symbol, not a separator */
	for (int k = 0; k < r.n; k++)
		if (r.sp[k].mob.how == LJP_FROM_MASS)
			assert_non_null(strstr(longest, r.sp[k].ion->symbol));
	assert_true(longest[strlen(longest) - 1] != ' ' && longest[strlen(longest) - 1] != ',');
	/* the text and the JSON carry it whole */
	fflush(o.fp);
	{
		size_t before = len;
		ok("junction k-pipette bath");
		fflush(o.fp);
		assert_non_null(strstr(buf + before, longest));
	}
	ctx.out->json = 1;
	{
		size_t before = len;
		ok("junction k-pipette bath model all");
		fflush(o.fp);
		assert_non_null(strstr(buf + before, longest));
		assert_non_null(strstr(buf + before, "\"ljp_range_mV\":["));
		assert_non_null(strstr(buf + before, "\"mobility_sources\":{"));
		assert_non_null(strstr(buf + before, "\"spread_mV\":"));
		assert_null(strstr(buf + before, ", \""));
	}
	ctx.out->json = 0;
	ljp_free(&r);
	sol_state_free(&a);
	sol_state_free(&b);
}

/* ---- the random corpus ---- */

/* A small deterministic generator (xorshift64*), so the corpus is the
 * same on every run. */
static unsigned long long rng = 0x9e3779b97f4a7c15ULL;
static double urand(void)
{
	rng ^= rng >> 12;
	rng ^= rng << 25;
	rng ^= rng >> 27;
	return (double)((rng * 2685821657736338717ULL) >> 11) / 9007199254740992.0;
}

static double uni(double a, double b)
{
	return a + (b - a) * urand();
}

static double D_of(const char *sym)
{
	ljp_mobility m;
	const rd_ion *ion = refdb_ion_exact(db, sym);
	if (!ion || ljp_mobility_of(db, ion, &m))
		fail_msg("no ion %s", sym);
	return m.D25_m2_s;
}

static void add(jn_ion *x, int *n, const char *sym, int z, double pip, double bath)
{
	x[*n].symbol = sym;
	x[*n].z = z;
	x[*n].D_m2_s = D_of(sym);
	x[*n].pip_mM = pip;
	x[*n].bath_mM = bath;
	(*n)++;
}

/* A realistic pair: a K+ or Cs+ internal with one main anion, some Cl-,
 * Na+, Mg2+, ATP and phosphocreatine (as their usual species), HEPES-,
 * EGTA; a Na+ saline, or a TEA+/Ba2+ or NMDG+ bath; each side balanced
 * by its main counter-ion; pH trace ions included. */
static int random_pair(jn_ion *x)
{
	static const char *cat[] = {"K+", "Cs+"};
	static const char *an[] = {"gluconate-", "methanesulfonate-", "Cl-", "aspartate-",
				   "glutamate-", "isethionate-"};
	static const char *bcat[] = {"Na+", "TEA+", "NMDG+"};
	int n = 0, ic = (int)(urand() * 2), ia = (int)(urand() * 6), ib = (int)(urand() * 3);
	double main_c = uni(100, 150), cl = ia == 2 ? 0 : uni(0, 20), na = uni(0, 15),
	       mg = uni(0, 4), atp = uni(0, 5), pcr = uni(0, 15), hepes = uni(5, 10),
	       egta = urand() < 0.5 ? uni(0.1, 11) : 0, qx = urand() < 0.3 ? uni(1, 5) : 0;
	double bmain = uni(110, 150), bk = uni(2, 5), bca = uni(0, 2), bba = ib == 1 ? uni(2, 10) : 0,
	       bmg = uni(0, 2), bhepes = uni(5, 10);
	double pip_neg, pip_pos, bath_pos, bath_neg;
	/* pipette anions and the divalent/organic ones; Cl- fills in */
	add(x, &n, "MgATP^2-", -2, fmin(mg, atp), 0);
	add(x, &n, "ATP^4-", -4, fmax(0, atp - mg) * 0.7, 0);
	add(x, &n, "HATP^3-", -3, fmax(0, atp - mg) * 0.3, 0);
	add(x, &n, "PCr^2-", -2, pcr, 0);
	add(x, &n, "HEPES-", -1, 0.45 * hepes, 0.55 * bhepes);
	add(x, &n, "H2EGTA^2-", -2, egta, 0);
	add(x, &n, "OH-", -1, 2e-4, 2.5e-4);
	add(x, &n, "H+", 1, 5e-5, 4e-5);
	if (ia != 2)
		add(x, &n, an[ia], -1, main_c, 0);
	if (qx > 0)
		add(x, &n, "QX-314+", 1, qx, 0);
	add(x, &n, "Na+", 1, na, ib == 0 ? bmain : 0);
	add(x, &n, "Mg2+", 2, fmax(0, mg - atp) + 0.1, bmg);
	add(x, &n, "Ca2+", 2, 0, bca);
	if (bba > 0)
		add(x, &n, "Ba2+", 2, 0, bba);
	if (ib != 0)
		add(x, &n, bcat[ib], 1, 0, bmain);
	/* balance: the pipette's main cation and the bath's Cl- */
	pip_neg = pip_pos = bath_pos = bath_neg = 0;
	for (int i = 0; i < n; i++) {
		double qp = x[i].z * x[i].pip_mM, qb = x[i].z * x[i].bath_mM;
		if (qp > 0)
			pip_pos += qp;
		else
			pip_neg -= qp;
		if (qb > 0)
			bath_pos += qb;
		else
			bath_neg -= qb;
	}
	pip_neg += cl + (ia == 2 ? main_c : 0);
	bath_pos += bk;
	/* the pipette cation makes up the charge; the bath Cl- likewise */
	add(x, &n, cat[ic], 1, fmax(pip_neg - pip_pos, 1.0), 0);
	if (strcmp(cat[ic], "K+") == 0)
		x[n - 1].bath_mM = bk;
	else
		add(x, &n, "K+", 1, 0, bk);
	add(x, &n, "Cl-", -1, cl + (ia == 2 ? main_c : 0), bath_pos - bath_neg);
	return n;
}

/* 1000 random realistic pairs: free diffusion converges on every one (0
 * failures) within 1 mV of Henderson (common practice: the models differ
 * by tenths of a mV on physiological pairs); Planck's model on every 20th.
 * The timing goal is in tests/bench_junction.c. */
#define CORPUS_N 1000
static void test_random_corpus(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	int fails = 0, its = 0, cont = 0;
	double worst = 0;
	for (int c = 0; c < CORPUS_N; c++) {
		jn_ion x[JN_MAX_IONS];
		int n = random_pair(x);
		double h, d, p;
		df_report rep;
		assert_int_equal(jn_henderson_mV(x, n, 25, &h, err), 0);
		if (df_ljp_mV(x, n, 25, NULL, &rep, &d, err)) {
			fails++;
			print_message("pair %d: %s\n", c, err);
			continue;
		}
		worst = fmax(worst, fabs(d - h));
		its += rep.newton_its;
		cont += rep.continuation;
		assert_true(rep.grid_err_mV <= 0.005);
		if (c % 20 == 0 && jn_planck_mV(x, n, 25, &p, err))
			fail_msg("Planck on pair %d: %s", c, err);
	}
	print_message("corpus: %d pairs, %d Newton iterations, %d continuation steps, largest |diffusion - Henderson| %.3f mV\n",
		      CORPUS_N, its, cont, worst);
	assert_int_equal(fails, 0);
	assert_true(worst < 1.0);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(test_internals_every_model, fresh, done),
		cmocka_unit_test(test_every_species_has_mobility),
		cmocka_unit_test(test_estimation_method),
		cmocka_unit_test(test_interval),
		cmocka_unit_test(test_spread_truth),
		cmocka_unit_test_setup_teardown(test_cautions_whole, fresh, done),
		cmocka_unit_test(test_random_corpus),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
