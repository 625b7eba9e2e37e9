/*
 * test_ghk.c - GHK reversal potentials, permeability ratios, currents.
 * Each assertion names its source; "from memory" marks a published value
 * recalled, not looked up.  Hand values were evaluated step by step with a
 * calculator (not with this code); the steps are in the comments.
 */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "ghk.h"

#define EPS_MV 1e-6 /* agreement of two computations of one potential, mV */

/* ---- a small seeded PRNG (xorshift64*), so random cases repeat ---- */
static uint64_t rng_state;
static void rng_seed(uint64_t s) { rng_state = s ? s : 88172645463325252ULL; }
static double rng_u01(void)
{
	rng_state ^= rng_state >> 12;
	rng_state ^= rng_state << 25;
	rng_state ^= rng_state >> 27;
	return (double)((rng_state * 2685821657736338717ULL) >> 11) * 0x1.0p-53;
}
/* log-uniform in [lo, hi] */
static double rng_log(double lo, double hi)
{
	return exp(log(lo) + (log(hi) - log(lo)) * rng_u01());
}

static double rtf(double t_C) { return im_rt_f_mV(t_C); }

/* ---- GHK with one permeant ion is its Nernst potential ----
 * Source: Goldman (1943); Hodgkin & Katz (1949): with one permeant ion the
 * zero-current potential is that ion's equilibrium potential (common
 * practice: every textbook derivation). */
static void test_single_ion_is_nernst(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double E, En;
	/* K+ 140 in / 5 out, Na+ impermeant: closed-form path */
	ghk_ion k[] = {{"K+", 1, 1.0, 140, 5}, {"Na+", 1, 0.0, 10, 145}};
	assert_int_equal(ghk_erev_mV(k, 2, 25, &E, err), 0);
	assert_int_equal(ghk_nernst_mV(1, 140, 5, 25, &En, err), 0);
	/* by hand: 25.6926 mV * ln(5/140) = 25.6926 * -3.33220 = -85.613 mV */
	assert_close(En, -85.613, 0, 1e-3);
	assert_close(E, En, 0, EPS_MV);
	/* Cl- 10 in / 150 out: E = -(RT/F) ln(150/10) = -69.576 mV */
	ghk_ion cl[] = {{"Cl-", -1, 0.3, 10, 150}};
	assert_int_equal(ghk_erev_mV(cl, 1, 25, &E, err), 0);
	assert_close(E, -rtf(25) * log(15.0), 0, EPS_MV);
	/* Ca2+ 1e-4 in / 2 out, divalent: numerical path.
	 * by hand: (25.6926/2) ln(2e4) = 12.8463 * 9.90349 = 127.22 mV */
	ghk_ion ca[] = {{"K+", 1, 0.0, 140, 5}, {"Ca2+", 2, 1.0, 1e-4, 2}};
	assert_int_equal(ghk_erev_mV(ca, 2, 25, &E, err), 0);
	assert_int_equal(ghk_nernst_mV(2, 1e-4, 2, 25, &En, err), 0);
	assert_close(En, 127.22, 0, 0.01);
	assert_close(E, En, 0, EPS_MV);
	/* SO4^2- (z = -2), 5 in / 50 out */
	ghk_ion so4[] = {{"SO4^2-", -2, 1.0, 5, 50}};
	assert_int_equal(ghk_erev_mV(so4, 1, 30, &E, err), 0);
	assert_close(E, -rtf(30) / 2 * log(10.0), 0, EPS_MV);
}

/* ---- Hodgkin & Katz (1949), squid axon at rest ----
 * Source: Hodgkin & Katz (1949) J Physiol 108:37, P_K:P_Na:P_Cl =
 * 1:0.04:0.45; concentrations as tabulated in Hille, Ion Channels of
 * Excitable Membranes (squid axoplasm / sea water): K 400/20, Na 50/440,
 * Cl 52/560 mM - ratios, concentrations and the "about -60 mV" result all
 * from memory.  Evaluated at 20 C (our choice).
 * By hand: num = 1*20 + 0.04*440 + 0.45*52 = 20 + 17.6 + 23.4 = 61.0;
 * den = 1*400 + 0.04*50 + 0.45*560 = 400 + 2 + 252 = 654;
 * E = 25.2617 mV * ln(61/654) = 25.2617 * (-2.372233) = -59.927 mV.
 * We assert the recalled "near -60 mV" to +-2 mV, and the hand value to
 * 0.001 mV (we get -59.9267 mV). */
static void test_hodgkin_katz_squid(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double E;
	ghk_ion sq[] = {{"K+", 1, 1.0, 400, 20}, {"Na+", 1, 0.04, 50, 440},
			{"Cl-", -1, 0.45, 52, 560}};
	assert_int_equal(ghk_erev_mV(sq, 3, 20, &E, err), 0);
	assert_close(E, -60.0, 0, 2.0);
	assert_close(E, -59.927, 0, 1e-3);
	/* the numerical path gives the same */
	double En;
	assert_int_equal(ghk_erev_numeric_mV(sq, 3, 20, &En, err), 0);
	assert_close(En, E, 0, EPS_MV);
}

/* Random monovalent set with a reversal potential. */
static int random_mono(ghk_ion *x, int extreme)
{
	int n = 1 + (int)(rng_u01() * 6);
	double plo = extreme ? 1e-8 : 1e-3, phi = extreme ? 1e8 : 1e3;
	double clo = extreme ? 1e-6 : 1e-2, chi = extreme ? 1e4 : 500;
	for (;;) {
		double outw = 0, inw = 0;
		for (int i = 0; i < n; i++) {
			x[i].symbol = "X";
			x[i].z = rng_u01() < 0.6 ? 1 : -1;
			x[i].P = rng_u01() < 0.1 ? 0.0 : rng_log(plo, phi);
			double r = rng_u01();
			x[i].in_mM = r < 0.15 ? 0.0 : rng_log(clo, chi);
			x[i].out_mM = r > 0.85 ? 0.0 : rng_log(clo, chi);
			outw += x[i].P * (x[i].z > 0 ? x[i].in_mM : x[i].out_mM);
			inw += x[i].P * (x[i].z > 0 ? x[i].out_mM : x[i].in_mM);
		}
		if (outw > 0 && inw > 0)
			return n;
	}
}

/* ---- numerical root vs closed-form GHK voltage equation ----
 * Source: Goldman (1943); Hodgkin & Katz (1949): for monovalent ions the
 * zero of the summed GHK currents is
 *   E = (RT/F) ln((sum_cat P c_out + sum_an P c_in) /
 *                 (sum_cat P c_in + sum_an P c_out)).
 * 600 seeded random cases, a third with extreme P (1e-8..1e8) and
 * concentrations (1e-6..1e4 mM), ions missing on one side. */
static void test_numeric_vs_closed_mono(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	ghk_ion x[8];
	rng_seed(20240611);
	double worst = 0;
	for (int c = 0; c < 600; c++) {
		int n = random_mono(x, c % 3 == 0);
		double t = 5 + 35 * rng_u01(), Ec, En;
		assert_int_equal(ghk_erev_mV(x, n, t, &Ec, err), 0);
		assert_int_equal(ghk_erev_numeric_mV(x, n, t, &En, err), 0);
		/* the closed form written out here, independently */
		double num = 0, den = 0;
		for (int i = 0; i < n; i++) {
			num += x[i].P * (x[i].z > 0 ? x[i].out_mM : x[i].in_mM);
			den += x[i].P * (x[i].z > 0 ? x[i].in_mM : x[i].out_mM);
		}
		double Eh = rtf(t) * log(num / den);
		assert_close(Ec, Eh, 0, EPS_MV);
		assert_close(En, Eh, 0, EPS_MV);
		if (fabs(En - Eh) > worst)
			worst = fabs(En - Eh);
	}
	assert_true(worst < EPS_MV);
}

/* ---- monovalent ions plus one divalent cation: a quadratic ----
 * Source: Lewis (1979) J Physiol 286:417 (from memory: the mixed mono-/
 * divalent GHK equation); derivation here.  With v = FV/RT and x = e^v:
 *  monovalent cation (u = v):
 *    I/F = P v (c_i - c_o e^-v)/(1 - e^-v) = P v (c_i x - c_o)/(x - 1)
 *  monovalent anion (z = -1, u = -v):
 *    I/F = P (-1)(-v)(c_i - c_o e^v)/(1 - e^v) = P v (c_o x - c_i)/(x - 1)
 *  divalent cation (z = 2, u = 2v):
 *    I/F = 4 P v (c_i - c_o x^-2)/(1 - x^-2) = 4 P v (c_i x^2 - c_o)/((x-1)(x+1))
 *  Sum = 0; multiply by (x-1)(x+1)/(F v) (the V -> 0 case follows by
 *  continuity).  With A = sum_cat P c_i + sum_an P c_o and
 *  B = sum_cat P c_o + sum_an P c_i (monovalent only):
 *    (x + 1)(A x - B) + 4 P_D (D_i x^2 - D_o) = 0
 *    (A + 4 P_D D_i) x^2 + (A - B) x - (B + 4 P_D D_o) = 0,
 *  a x^2 + b x - c = 0 with a, c > 0: one positive root
 *    x = (-b + sqrt(b^2 + 4ac)) / 2a = 2c / (b + sqrt(b^2 + 4ac)),
 *  the second form used when b > 0 (no cancellation); E = (RT/F) ln x.
 *  Check: D only (A = B = 0): x^2 = D_o/D_i, E = (RT/2F) ln(D_o/D_i), the
 *  Nernst potential of D. */
static double quad_erev(const ghk_ion *x, int n, double t)
{
	double A = 0, B = 0, a, b, c;
	int d = -1;
	for (int i = 0; i < n; i++) {
		if (x[i].z == 2) {
			d = i;
			continue;
		}
		A += x[i].P * (x[i].z > 0 ? x[i].in_mM : x[i].out_mM);
		B += x[i].P * (x[i].z > 0 ? x[i].out_mM : x[i].in_mM);
	}
	a = A + 4 * x[d].P * x[d].in_mM;
	b = A - B;
	c = B + 4 * x[d].P * x[d].out_mM;
	double s = sqrt(b * b + 4 * a * c);
	double xx = b > 0 ? 2 * c / (b + s) : (s - b) / (2 * a);
	return rtf(t) * log(xx);
}

static void test_divalent_quadratic(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	ghk_ion x[8];
	rng_seed(1979);
	for (int c = 0; c < 500; c++) {
		int n = random_mono(x, c % 4 == 0);
		double r = rng_u01();
		ghk_ion *d = &x[n++];
		d->symbol = "Ca2+";
		d->z = 2;
		d->P = rng_log(1e-3, 1e3);
		d->in_mM = r < 0.3 ? 0.0 : rng_log(1e-5, 20);
		d->out_mM = r > 0.85 ? 0.0 : rng_log(1e-2, 100);
		double t = 10 + 27 * rng_u01(), E;
		assert_int_equal(ghk_erev_mV(x, n, t, &E, err), 0);
		assert_close(E, quad_erev(x, n, t), 0, EPS_MV);
	}
	/* the derivation's own check: divalent alone is its Nernst potential */
	ghk_ion ca[] = {{"Ca2+", 2, 1.0, 1e-4, 2.0}};
	assert_close(quad_erev(ca, 1, 25), rtf(25) / 2 * log(2e4), 1e-12, 0);
}

/* ---- ratio(erev(P)) returns P ----
 * Source: common practice (an inverse must undo its forward function). */
static void test_ratio_roundtrip(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	ghk_ion x[8];
	rng_seed(4242);
	int used = 0;
	for (int c = 0; c < 300; c++) {
		int n = random_mono(x, 0);
		if (c % 2) {    /* half with a divalent cation */
			x[n] = (ghk_ion){"Ca2+", 2, rng_log(1e-2, 1e2),
					 rng_log(1e-5, 1), rng_log(0.1, 20)};
			n++;
		}
		if (n < 2)
			continue;
		int ion = (int)(rng_u01() * n), ref = (ion + 1) % n;
		x[ref].P = rng_log(0.01, 10);
		x[ion].P = x[ref].P * rng_log(1e-3, 1e3);
		double t = 20 + 10 * rng_u01(), E, Ep, Em, q;
		if (ghk_erev_mV(x, n, t, &E, err))
			continue;   /* a random set without a root */
		/* skip ill-conditioned cases, where E barely moves with P_ion */
		ghk_ion y[8];
		memcpy(y, x, sizeof y);
		y[ion].P = x[ion].P * 1.01;
		assert_int_equal(ghk_erev_mV(y, n, t, &Ep, err), 0);
		y[ion].P = x[ion].P / 1.01;
		assert_int_equal(ghk_erev_mV(y, n, t, &Em, err), 0);
		if (fabs(Ep - Em) < 1e-3)
			continue;
		assert_int_equal(ghk_ratio(x, n, ion, ref, E, t, &q, err), 0);
		assert_close(q, x[ion].P / x[ref].P, 1e-6, 0);
		used++;
	}
	assert_true(used > 150);
}

/* Shift form: bi-ionic substitution and dilution, random, round trip.
 * Source: common practice (inverse undoes forward). */
static void test_ratio_shift_roundtrip(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	rng_seed(777);
	int used = 0;
	for (int c = 0; c < 200; c++) {
		double t = 20 + 10 * rng_u01(), r = rng_log(1e-2, 1e2), q;
		ghk_ion x[4];
		double to[4], E1, E2;
		int n, ion, ref;
		if (c % 2 == 0) {
			/* bi-ionic substitution: bath Y (ref) replaced by X */
			double Y = rng_log(50, 150), Xi = rng_log(1, 20);
			x[0] = (ghk_ion){"Y+", 1, 1.0, rng_log(50, 150), Y};
			x[1] = (ghk_ion){"X+", 1, r, Xi, 0.0};
			x[2] = (ghk_ion){"Cl-", -1, rng_log(0.01, 0.5),
					 rng_log(5, 50), rng_log(100, 160)};
			to[0] = 0.0;
			to[1] = Y;
			to[2] = x[2].out_mM;
			n = 3;
			ion = 1;
			ref = 0;
		} else {
			/* dilution of the bath salt: P_Cl/P_Na from the shift */
			double f = rng_log(0.1, 0.7);
			x[0] = (ghk_ion){"Na+", 1, 1.0, rng_log(5, 150), rng_log(100, 150)};
			x[1] = (ghk_ion){"Cl-", -1, r, rng_log(5, 150), x[0].out_mM};
			x[2] = (ghk_ion){"Ca2+", 2, rng_log(0.01, 1), 1e-4, 2.0};
			to[0] = x[0].out_mM * f;
			to[1] = x[1].out_mM * f;
			to[2] = 2.0;
			n = 3;
			ion = 1;
			ref = 0;
		}
		assert_int_equal(ghk_erev_mV(x, n, t, &E1, err), 0);
		ghk_ion y[4];
		memcpy(y, x, sizeof y);
		for (int i = 0; i < n; i++)
			y[i].out_mM = to[i];
		assert_int_equal(ghk_erev_mV(y, n, t, &E2, err), 0);
		int rc = ghk_ratio_shift(x, n, to, ion, ref, E2 - E1, t, &q, err);
		if (rc)
			fail_msg("case %d: %s", c, err);
		assert_close(q, r, 1e-6, 0);
		used++;
	}
	assert_int_equal(used, 200);
}

/* ---- published closed forms, both ways ----
 * Monovalent bi-ionic, X outside only, Y inside only:
 *   P_X/P_Y = ([Y]i/[X]o) exp(E F/RT)
 * Source: Goldman (1943); Hodgkin & Katz (1949); as in Hille, Ion Channels
 * of Excitable Membranes (from memory). */
static void test_bi_ionic_monovalent(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double E, q;
	/* forward: P_Na/P_K = 0.3, Na 100 outside, K 140 inside, 25 C.
	 * by hand: 25.6926 * ln(0.3*100/140) = 25.6926 * -1.540445 = -39.578 */
	ghk_ion x[] = {{"K+", 1, 1.0, 140, 0}, {"Na+", 1, 0.3, 0, 100}};
	assert_int_equal(ghk_erev_mV(x, 2, 25, &E, err), 0);
	assert_close(E, -39.578, 0, 1e-3);
	assert_close(0.3, (140.0 / 100.0) * exp(E / rtf(25)), 1e-9, 0);
	/* inverse: E = -40 mV; by hand 1.4 * exp(-40/25.6926) = 1.4 * 0.210795
	 * = 0.295113 */
	assert_int_equal(ghk_ratio(x, 2, 1, 0, -40.0, 25, &q, err), 0);
	assert_close(q, 1.4 * exp(-40.0 / rtf(25)), 1e-9, 0);
	assert_close(q, 0.295113, 1e-5, 0);
}

/* Divalent bi-ionic: Ca2+ outside only, monovalent cation Y inside only.
 * Source: Lewis (1979) J Physiol 286:417; Fatt & Ginsborg (1958) J Physiol
 * 142:516 (both from memory):
 *   P_Ca/P_Y = [Y]i exp(EF/RT) (1 + exp(EF/RT)) / (4 [Ca]o).
 * Derivation (see test_divalent_quadratic): with A = P_Y [Y]i, B = 0,
 * D_i = 0, D_o = [Ca]o:  A x^2 + A x - 4 P_Ca [Ca]o = 0, so
 * P_Ca/P_Y = x (x + 1) [Y]i / (4 [Ca]o), x = e^(EF/RT): the formula.
 * Double check with Y = Cs 140, Ca 10 mM, P_Ca/P_Cs = 0.5 (also the case
 * ca_bi_ionic_cs of tests/ghk_cases.txt): x^2 + x - 4*0.5*10/140 = 0,
 * x = (-1 + sqrt(1 + 0.571429))/2 = 0.126783, E = 25.6926 ln x = -53.062 mV,
 * and scipy's brentq found -53.0623 mV. */
static void test_bi_ionic_divalent(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double E, q;
	ghk_ion x[] = {{"Cs+", 1, 1.0, 140, 0}, {"Ca2+", 2, 0.5, 0, 10}};
	assert_int_equal(ghk_erev_mV(x, 2, 25, &E, err), 0);
	assert_close(E, -53.062, 0, 1e-3);
	double xx = exp(E / rtf(25));
	assert_close(140 * xx * (1 + xx) / (4 * 10), 0.5, 1e-9, 0);
	/* inverse at E = +20 mV: by hand x = exp(20/25.6926) = 2.178061,
	 * P_Ca/P_Cs = 140 * 2.178061 * 3.178061 / 40 = 24.2270 */
	assert_int_equal(ghk_ratio(x, 2, 1, 0, 20.0, 25, &q, err), 0);
	xx = exp(20.0 / rtf(25));
	assert_close(q, 140 * xx * (1 + xx) / 40, 1e-9, 0);
	assert_close(q, 24.2270, 1e-5, 0);
	/* and forward again at that ratio */
	x[1].P = q;
	assert_int_equal(ghk_erev_mV(x, 2, 25, &E, err), 0);
	assert_close(E, 20.0, 0, EPS_MV);
}

/* ---- issue 10: full substitutions, both directions ----
 * The shift of E_rev when the test ion is absent from one of the two
 * states, generated from the closed forms (not from ghk.c) and recovered
 * to 1e-6 relative:
 *  (a) Na -> K replacement, Na inside: before, Na on both sides (E = Nernst
 *      Na); after, bi-ionic (monovalent closed form above):
 *      shift = (RT/F) ln(P_K [K]o' / (P_Na [Na]o)) when [Na]i = [Na]o;
 *  (b) adding 20 mM Ca2+ to a Na bath, Na inside: Lewis (1979) J Physiol
 *      286:417 (from memory), with Na on both sides:
 *      P_Ca/P_Na = ([Na]i x - [Na]o)(x + 1) / (4 [Ca]o), x = e^(EF/RT),
 *      so x is the positive root of [Na]i x^2 + ([Na]i - [Na]o) x
 *      - ([Na]o + 4 r [Ca]o) = 0;
 *  (c) Na -> Li with Cs+ inside (both bi-ionic):
 *      shift = (RT/F) ln(P_Li [Li]o' / (P_Na [Na]o)).
 * Each also run backwards (the "to" bath first, the shift negated). */
static void test_full_substitution(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double q, t = 22, u = rtf(t);
	for (int k = 0; k < 3; k++) {
		double r = k == 0 ? 1.37 : k == 1 ? 0.21 : 0.74;
		/* (a) */
		ghk_ion a[] = {{"Na+", 1, 1.0, 140, 140}, {"K+", 1, 0, 0, 0}};
		double a_to[] = {0, 140};
		double sa = u * log(r * 140 / 140);
		assert_int_equal(ghk_ratio_shift(a, 2, a_to, 1, 0, sa, t, &q, err), 0);
		assert_close(q, r, 1e-6, 0);
		ghk_ion a2[] = {{"Na+", 1, 1.0, 140, 0}, {"K+", 1, 0, 0, 140}};
		double a2_to[] = {140, 0};
		assert_int_equal(ghk_ratio_shift(a2, 2, a2_to, 1, 0, -sa, t, &q, err), 0);
		assert_close(q, r, 1e-6, 0);
		/* (b) */
		double ni = 140, no = 140, ca = 20;
		double qa = ni, qb = ni - no, qc = -(no + 4 * r * ca);
		double x = (-qb + sqrt(qb * qb - 4 * qa * qc)) / (2 * qa);
		double sb = u * log(x) - u * log(no / ni);
		ghk_ion b[] = {{"Na+", 1, 1.0, ni, no}, {"Ca2+", 2, 0, 0, 0}};
		double b_to[] = {no, ca};
		assert_int_equal(ghk_ratio_shift(b, 2, b_to, 1, 0, sb, t, &q, err), 0);
		assert_close(q, r, 1e-6, 0);
		ghk_ion b2[] = {{"Na+", 1, 1.0, ni, no}, {"Ca2+", 2, 0, 0, ca}};
		double b2_to[] = {no, 0};
		assert_int_equal(ghk_ratio_shift(b2, 2, b2_to, 1, 0, -sb, t, &q, err), 0);
		assert_close(q, r, 1e-6, 0);
		/* (c): Cs+ inside with its own P, Na+ the reference */
		ghk_ion c[] = {{"Na+", 1, 1.0, 0, 140}, {"Li+", 1, 0, 0, 0},
			       {"Cs+", 1, 0.1, 140, 0}};
		double c_to[] = {0, 140, 0};
		double sc = u * log(r * 140 / (1.0 * 140));
		assert_int_equal(ghk_ratio_shift(c, 3, c_to, 1, 0, sc, t, &q, err), 0);
		assert_close(q, r, 1e-6, 0);
		ghk_ion c2[] = {{"Na+", 1, 1.0, 0, 0}, {"Li+", 1, 0, 0, 140},
				{"Cs+", 1, 0.1, 140, 0}};
		double c2_to[] = {140, 0, 0};
		assert_int_equal(ghk_ratio_shift(c2, 3, c2_to, 1, 0, -sc, t, &q, err), 0);
		assert_close(q, r, 1e-6, 0);
	}
	/* bad input: a state without a reversal potential (every permeant ion
	 * outside: the inside holds only an impermeant solute), named */
	ghk_ion one[] = {{"Na+", 1, 1.0, 0, 140}, {"K+", 1, 0, 0, 0}};
	double one_to[] = {0, 140};
	assert_int_equal(ghk_ratio_shift(one, 2, one_to, 1, 0, -5, t, &q, err), -1);
	assert_non_null(strstr(err, "in the first bath: no reversal potential"));
	assert_null(strchr(err, '\n'));
	/* the test ion absent from every state */
	ghk_ion none[] = {{"Na+", 1, 1.0, 140, 140}, {"K+", 1, 0, 0, 0}};
	double none_to[] = {140, 0};
	assert_int_equal(ghk_ratio_shift(none, 2, none_to, 1, 0, 0, t, &q, err), -1);
	assert_non_null(strstr(err, "K+ is absent inside and from both baths"));
	/* both states' reversal potentials with the absent ions taken out */
	double E;
	ghk_ion a[] = {{"Na+", 1, 1.0, 140, 140}, {"K+", 1, 1.0, 0, 0}};
	assert_int_equal(ghk_erev_present_mV(a, 2, t, &E, err), 0);
	assert_close(E, 0, 0, 1e-9);
}

/* ---- outward rectification of a GHK K+ current ----
 * Source: Goldman (1943); Hodgkin & Katz (1949): the GHK current rectifies
 * outward when [K]i > [K]o (common practice).  Hand value, K 140 in / 5 out,
 * 25 C, +-50 mV about E_K:  I(E_K + d) is P F c_i u (1 - e^-delta)/(1 - e^-u)
 * with u_E = ln(5/140) = -3.332205, delta = 50/25.69258 = 1.946087;
 * at +50: u = -1.386117, (1 - e^-delta) = 0.857168, (1 - e^-u) = -2.999292,
 *   product -1.386117 * 0.857168 / -2.999292 = 0.396139;
 * at -50: u = -5.278292, (1 - e^delta) = -6.001240, (1 - e^-u) = -195.0347,
 *   -5.278292 * -6.001240 / -195.0347 = -0.162414;
 * ratio 0.396139 / 0.162414 = 2.4391. */
static void test_rectification_k(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	ghk_iv_curve iv;
	ghk_ion k[] = {{"K+", 1, 1e-6, 140, 5}};
	assert_int_equal(ghk_iv(k, 1, 25, GHK_IV_V1_MV, GHK_IV_V2_MV, GHK_IV_DV_MV,
				GHK_IV_RECT_MV, &iv, err), 0);
	assert_true(iv.has_erev);
	assert_close(iv.E_rev_mV, rtf(25) * log(5.0 / 140.0), 0, EPS_MV);
	assert_close(iv.rect, 2.4391, 1e-4, 0);
	assert_true(iv.rect > 1);
	/* default grid -120..60 by 5: 37 points, ends included */
	assert_int_equal(iv.npts, 37);
	assert_close(iv.V_mV[0], -120, 0, 1e-12);
	assert_close(iv.V_mV[36], 60, 0, 1e-12);
	ghk_iv_free(&iv);
	/* [K]i < [K]o: inward rectification, the reciprocal by symmetry
	 * (swap in and out and the sign of V) */
	ghk_ion kr[] = {{"K+", 1, 1e-6, 5, 140}};
	assert_int_equal(ghk_iv(kr, 1, 25, -120, 60, 5, 50, &iv, err), 0);
	assert_close(iv.rect, 1 / 2.4391, 1e-4, 0);
	ghk_iv_free(&iv);
}

/* ---- units: P in cm/s, c in mM -> A/cm2 ----
 * Source: SI arithmetic (common practice).  P = 1e-6 cm/s = 1e-8 m/s;
 * 1 mM = 1 mol/m3; 1 A/m2 = 1e-4 A/cm2.
 *  V = 0, K 140 in / 5 out: I = P z F (c_i - c_o)
 *   = 1e-8 * 96485.33212 * 135 = 0.130255198 A/m2 = 1.30255198e-5 A/cm2.
 *  V = RT/F (u = 1), K 140 in / 0 out: I = P F c_i / (1 - e^-1)
 *   = 1e-8 * 96485.33212 * 140 / 0.6321205588 = 0.213692567 A/m2
 *   = 2.13692567e-5 A/cm2.
 *  Ca2+ 0 in / 2 out, P = 1e-7 cm/s, V = 0: 1e-9 * 2 * 96485.33212 * -2
 *   = -3.85941329e-4 A/m2 = -3.85941329e-8 A/cm2 (inward, negative). */
static void test_units(void **st)
{
	(void)st;
	assert_close(ghk_current_A_cm2(1, 1e-6, 140, 5, 0.0, 25), 1.30255198e-5,
		     1e-8, 0);
	assert_close(ghk_current_A_cm2(1, 1e-6, 140, 0, rtf(25), 25),
		     2.13692567e-5, 1e-8, 0);
	assert_close(ghk_current_A_cm2(2, 1e-7, 0, 2, 0.0, 25), -3.85941329e-8,
		     1e-8, 0);
	/* V -> 0 is continuous (no 0/0): 1e-9 mV and 1e-5 mV from 0 */
	double I0 = ghk_current_A_cm2(2, 1e-6, 1e-4, 2, 0.0, 25);
	assert_close(ghk_current_A_cm2(2, 1e-6, 1e-4, 2, 1e-9, 25), I0, 1e-9, 0);
	assert_close(ghk_current_A_cm2(2, 1e-6, 1e-4, 2, -1e-5, 25), I0, 1e-5, 0);
	/* far out: no overflow, the one-sided limit P z^2 F^2 V/RT c */
	double V = 5000, I = ghk_current_A_cm2(1, 1e-6, 140, 5, V, 25);
	assert_close(I, 1e-6 * IM_FARADAY_C_MOL * 1e-6 * 140 * V / rtf(25), 1e-9, 0);
	assert_true(isfinite(ghk_current_A_cm2(2, 1e-6, 140, 5, -1e5, 25)));
}

/* The iv totals are the per-ion sums, the reversal potential is where the
 * total crosses zero.  Source: common practice (Kirchhoff: currents add). */
static void test_iv_sums(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	ghk_iv_curve iv;
	ghk_ion x[] = {{"K+", 1, 1e-6, 140, 5}, {"Na+", 1, 4e-8, 10, 145},
		       {"Ca2+", 2, 1e-7, 1e-4, 2}, {"Cl-", -1, 0, 10, 150}};
	assert_int_equal(ghk_iv(x, 4, 22, -100, 50, 2.5, 30, &iv, err), 0);
	assert_int_equal(iv.npts, 61);
	assert_int_equal(iv.nions, 4);
	for (int k = 0; k < iv.npts; k++) {
		double s = 0;
		for (int i = 0; i < 4; i++)
			s += iv.ion_A_cm2[k * 4 + i];
		assert_close(iv.total_A_cm2[k], s, 1e-12, 1e-30);
		assert_true(iv.ion_A_cm2[k * 4 + 3] == 0.0); /* impermeant */
		if (k > 0)   /* the total rises with V */
			assert_true(iv.total_A_cm2[k] > iv.total_A_cm2[k - 1]);
	}
	double E;
	assert_int_equal(ghk_erev_mV(x, 4, 22, &E, err), 0);
	assert_close(iv.E_rev_mV, E, 0, 1e-12);
	double tot = 0;
	for (int i = 0; i < 4; i++)
		tot += x[i].P > 0 ? ghk_current_A_cm2(x[i].z, x[i].P, x[i].in_mM,
						      x[i].out_mM, E, 22) : 0;
	assert_close(tot, 0, 0, 1e-15);
	assert_close(iv.rect_mV, 30, 0, 0);
	ghk_iv_free(&iv);
	/* no reversal potential is no error for a curve */
	ghk_ion in_only[] = {{"Ca2+", 2, 1e-6, 0, 2}};
	assert_int_equal(ghk_iv(in_only, 1, 25, -50, 50, 10, 50, &iv, err), 0);
	assert_false(iv.has_erev);
	assert_non_null(strstr(iv.no_erev, "inward at every voltage"));
	assert_int_equal(iv.npts, 11);
	for (int k = 0; k < iv.npts; k++)
		assert_true(iv.total_A_cm2[k] < 0);
	ghk_iv_free(&iv);
}

/* ---- expected failures ----  Source: common practice (bad input gets a
 * one-line error naming the cause, never NaN). */
static void expect_fail(const ghk_ion *x, int n, double t, const char *want)
{
	char err[IM_ERRLEN] = "";
	double E = 12345;
	if (ghk_erev_mV(x, n, t, &E, err) != -1)
		fail_msg("expected failure '%s', got %g", want, E);
	if (!strstr(err, want))
		fail_msg("message '%s' lacks '%s'", err, want);
	assert_true(E == 12345);   /* untouched, never NaN */
}

static void test_failures(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double E, q;
	ghk_ion absent[] = {{"K+", 1, 1, 140, 5}, {"Li+", 1, 0.5, 0, 0}};
	expect_fail(absent, 2, 25, "Li+ is permeant but absent from both");
	ghk_ion zero[] = {{"K+", 1, 0, 140, 5}, {"Na+", 1, 0, 10, 145}};
	expect_fail(zero, 2, 25, "total permeability is zero");
	ghk_ion cat_in[] = {{"K+", 1, 1, 140, 0}, {"Na+", 1, 0.1, 10, 0},
			    {"Cl-", -1, 0.0, 0, 150}};
	expect_fail(cat_in, 3, 25, "outward at every voltage");
	ghk_ion ca_out[] = {{"Ca2+", 2, 1, 0, 2}, {"K+", 1, 0, 140, 5}};
	expect_fail(ca_out, 2, 25, "inward at every voltage");
	ghk_ion nanp[] = {{"K+", 1, NAN, 140, 5}};
	expect_fail(nanp, 1, 25, "permeability of K+ is not a finite");
	ghk_ion nanc[] = {{"Ca2+", 2, 1, 1e-4, NAN}};
	expect_fail(nanc, 1, 25, "concentration of Ca2+ is not a finite");
	ghk_ion ok[] = {{"K+", 1, 1, 140, 5}};
	expect_fail(ok, 1, NAN, "temperature");
	expect_fail(ok, 1, INFINITY, "temperature");
	expect_fail(ok, 0, 25, "no ions");
	ghk_ion neg[] = {{"K+", 1, -1, 140, 5}};
	expect_fail(neg, 1, 25, "negative");
	ghk_ion negc[] = {{"K+", 1, 1, -140, 5}};
	expect_fail(negc, 1, 25, "negative");
	ghk_ion neutral[] = {{"K+", 1, 1, 140, 5}, {"glucose", 0, 1, 10, 10}};
	expect_fail(neutral, 2, 25, "glucose is neutral");
	/* the numerical path checks the same */
	assert_int_equal(ghk_erev_numeric_mV(cat_in, 3, 25, &E, err), -1);
	/* Nernst */
	assert_int_equal(ghk_nernst_mV(1, 0, 5, 25, &E, err), -1);
	assert_non_null(strstr(err, "absent inside"));
	assert_int_equal(ghk_nernst_mV(0, 1, 5, 25, &E, err), -1);
	/* ratios: nothing in (1e-6, 1e6) reaches +100 mV for a Na/K pair with
	 * E_Na = +67 mV: E tends to E_Na as the ratio grows */
	ghk_ion nk[] = {{"K+", 1, 1, 140, 5}, {"Na+", 1, 1, 10, 145}};
	assert_int_equal(ghk_ratio(nk, 2, 1, 0, 100.0, 25, &q, err), -1);
	assert_non_null(strstr(err, "no ratio Na+/K+ in (1e-06, 1e+06)"));
	assert_int_equal(ghk_ratio(nk, 2, 1, 1, -50.0, 25, &q, err), -1);
	assert_int_equal(ghk_ratio(nk, 2, 1, 0, NAN, 25, &q, err), -1);
	ghk_ion pref0[] = {{"K+", 1, 0, 140, 5}, {"Na+", 1, 1, 10, 145}};
	assert_int_equal(ghk_ratio(pref0, 2, 1, 0, -50.0, 25, &q, err), -1);
	assert_non_null(strstr(err, "reference ion K+"));
	double to[] = {5, 145};
	assert_int_equal(ghk_ratio_shift(nk, 2, to, 1, 0, 500.0, 25, &q, err), -1);
	assert_non_null(strstr(err, "no ratio"));
	double to_bad[] = {0, 0};   /* second bath empty: outward always */
	ghk_ion nk_out[] = {{"K+", 1, 1, 140, 5}, {"Na+", 1, 1, 0, 145}};
	assert_int_equal(ghk_ratio_shift(nk_out, 2, to_bad, 1, 0, 5.0, 25, &q, err),
			 -1);
	assert_non_null(strstr(err, "second bath"));
	/* iv */
	ghk_iv_curve iv;
	assert_int_equal(ghk_iv(ok, 1, 25, 60, -120, 5, 50, &iv, err), -1);
	assert_int_equal(ghk_iv(ok, 1, 25, -120, 60, 0, 50, &iv, err), -1);
	assert_int_equal(ghk_iv(ok, 1, 25, -120, 60, 1e-6, 50, &iv, err), -1);
	assert_non_null(strstr(err, "too many"));
	assert_int_equal(ghk_iv(ok, 1, 25, -120, 60, 5, -1, &iv, err), -1);
	assert_int_equal(ghk_iv(absent, 2, 25, -120, 60, 5, 50, &iv, err), -1);
	assert_null(iv.V_mV);
}

/* ---- the shared table with the scipy reference check ----
 * Source: tests/ghk_cases.txt, E_rev by scipy.optimize.brentq on the GHK
 * current sum written independently in tests/ref/check_ghk_scipy.py, which
 * recomputes the table every run. */
static FILE *open_cases(void)
{
	const char *env = getenv("IONMIX_SRCDIR");
	char path[1024];
	if (env) {
		snprintf(path, sizeof path, "%s/tests/ghk_cases.txt", env);
		return fopen(path, "r");
	}
	FILE *fp = fopen("tests/ghk_cases.txt", "r");
	if (!fp) {   /* beside this source file */
		const char *f = __FILE__, *slash = strrchr(f, '/');
		int len = slash ? (int)(slash - f + 1) : 0;
		snprintf(path, sizeof path, "%.*sghk_cases.txt", len, f);
		fp = fopen(path, "r");
	}
	return fp;
}

static void test_scipy_table(void **st)
{
	(void)st;
	FILE *fp = open_cases();
	if (!fp)
		fail_msg("cannot open tests/ghk_cases.txt (run from the repository "
			 "root or set IONMIX_SRCDIR)");
	char line[512], name[64], syms[8][16], err[IM_ERRLEN];
	ghk_ion x[8];
	int n = 0, ncases = 0, in_case = 0;
	double t = 0, Eref = 0;
	while (fgets(line, sizeof line, fp)) {
		if (line[0] == '#' || line[0] == '\n')
			continue;
		if (sscanf(line, "case %63s %lf %lf", name, &t, &Eref) == 3) {
			n = 0;
			in_case = 1;
		} else if (in_case && n < 8 && sscanf(line, "ion %15s %d %lf %lf %lf",
					syms[n], &x[n].z, &x[n].P, &x[n].in_mM,
					&x[n].out_mM) == 5) {
			x[n].symbol = syms[n];
			n++;
		} else if (in_case && strncmp(line, "end", 3) == 0) {
			double E;
			if (ghk_erev_mV(x, n, t, &E, err))
				fail_msg("%s: %s", name, err);
			if (fabs(E - Eref) > EPS_MV)
				fail_msg("%s: %.9f mV, scipy %.9f mV", name, E, Eref);
			ncases++;
			in_case = 0;
		} else {
			fclose(fp);
			fail_msg("tests/ghk_cases.txt: bad line: %s", line);
		}
	}
	fclose(fp);
	assert_int_equal(ncases, 20);
}

/* The fine grid for plots: the ends exact (v2 included whatever the
 * spacing), even spacing, each value the GHK current of ghk_current_A_cm2
 * and the total their sum; bad ranges refused. */
static void test_iv_fill(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	ghk_ion x[2] = {{"K+", 1, 1.0, 140, 5, }, {"Na+", 1, 0.05, 10, 145}};
	enum { N = GHK_IV_FINE_PTS };
	static double V[N], tot[N], ion[2 * N];
	assert_int_equal(ghk_iv_fill(x, 2, 25, -100, 45, N, V, tot, ion, err), 0);
	assert_true(V[0] == -100 && V[N - 1] == 45);
	for (int k = 0; k < N; k++) {
		assert_close(V[k], -100 + 145.0 * k / (N - 1), 0, 1e-9);
		double a = ghk_current_A_cm2(1, 1.0, 140, 5, V[k], 25);
		double b = ghk_current_A_cm2(1, 0.05, 10, 145, V[k], 25);
		assert_close(ion[2 * k], a, 1e-15, 0);
		assert_close(ion[2 * k + 1], b, 1e-15, 0);
		assert_close(tot[k], a + b, 1e-12, 1e-30);
		if (k > 0)   /* each GHK current rises with V */
			assert_true(tot[k] > tot[k - 1]);
	}
	assert_int_equal(ghk_iv_fill(x, 2, 25, 10, 10, N, V, tot, NULL, err), -1);
	assert_int_equal(ghk_iv_fill(x, 2, 25, -10, 10, 1, V, tot, NULL, err), -1);
	assert_int_equal(ghk_iv_fill(x, 2, 25, -10, 10, N, V, tot, NULL, err), 0);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_iv_fill),
		cmocka_unit_test(test_single_ion_is_nernst),
		cmocka_unit_test(test_hodgkin_katz_squid),
		cmocka_unit_test(test_numeric_vs_closed_mono),
		cmocka_unit_test(test_divalent_quadratic),
		cmocka_unit_test(test_ratio_roundtrip),
		cmocka_unit_test(test_ratio_shift_roundtrip),
		cmocka_unit_test(test_full_substitution),
		cmocka_unit_test(test_bi_ionic_monovalent),
		cmocka_unit_test(test_bi_ionic_divalent),
		cmocka_unit_test(test_rectification_k),
		cmocka_unit_test(test_units),
		cmocka_unit_test(test_iv_sums),
		cmocka_unit_test(test_failures),
		cmocka_unit_test(test_scipy_table),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
