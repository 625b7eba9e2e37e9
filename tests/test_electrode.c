/*
 * test_electrode.c - Ag/AgCl potentials, bath-exchange offsets and the
 * sign of their corrections.  Each assertion names its source; hand
 * values are worked out in the comments (not with this code).
 */
#include "testutil.h"

#include <string.h>

#include "common.h"
#include "electrode.h"
#include "junction.h"

/* Limiting equivalent conductivities at 25 C, S cm2/mol of charge (CRC
 * Handbook of Chemistry and Physics, "Ionic conductivity and diffusion at
 * infinite dilution", from memory); gluconate- 0.33 of K+ (Barry & Lynch
 * 1991, J Membr Biol 121:101, from memory). */
#define L_K 73.48
#define L_NA 50.08
#define L_CL 76.31
#define REL_GLUCONATE 0.33

static double D(double lambda, int z)
{
	return jn_D_from_lambda_m2_s(lambda, z, 25.0);
}

/* Nernst for AgCl + e- = Ag + Cl-: E = E0 - (RT/F) ln a(Cl-); 59.159 mV
 * per decade at 25 C (CODATA 2018: (RT/F) ln 10 = 25.69257 * 2.302585). */
static void test_agcl_nernst(void **st)
{
	(void)st;
	assert_close(el_agcl_mV(1000, 25), 0, 0, 1e-12);
	assert_close(el_agcl_mV(10, 25) - el_agcl_mV(100, 25), 59.159, 0, 0.001);
	/* 140 -> 10 mM Cl-: E_el rises by (RT/F) ln 14 = 25.69257 * 2.639057
	 * = 67.804 mV (hand-derived) */
	assert_close(el_agcl_mV(10, 25) - el_agcl_mV(140, 25), 67.804, 0, 0.001);
	assert_true(isnan(el_agcl_mV(0, 25)));
	assert_true(isnan(el_agcl_mV(-1, 25)));
	assert_true(isnan(el_agcl_mV(NAN, 25)));
	assert_true(isnan(el_agcl_mV(140, 200)));
}

/* Old bath: 135 NaCl + 5 KCl (140 Cl-).  New bath: 130 Na-gluconate +
 * 5 NaCl + 5 KCl (10 Cl-).  Pipette: 140 K-gluconate + 5 KCl. */
static void pairs(jn_ion *tip_old, jn_ion *tip_new, jn_ion *br_old, jn_ion *br_new)
{
	double dk = D(L_K, 1), dna = D(L_NA, 1), dcl = D(L_CL, -1);
	double dg = REL_GLUCONATE * dk;
	jn_ion to[] = {{"K+", 1, dk, 145, 5},
		       {"Na+", 1, dna, 0, 135},
		       {"Cl-", -1, dcl, 5, 140},
		       {"gluconate-", -1, dg, 140, 0}};
	jn_ion tn[] = {{"K+", 1, dk, 145, 5},
		       {"Na+", 1, dna, 0, 135},
		       {"Cl-", -1, dcl, 5, 10},
		       {"gluconate-", -1, dg, 140, 130}};
	/* 3 M KCl bridge (pip_mM is the bridge filling) */
	jn_ion bo[] = {{"K+", 1, dk, 3000, 5},
		       {"Na+", 1, dna, 0, 135},
		       {"Cl-", -1, dcl, 3000, 140},
		       {"gluconate-", -1, dg, 0, 0}};
	jn_ion bn[] = {{"K+", 1, dk, 3000, 5},
		       {"Na+", 1, dna, 0, 135},
		       {"Cl-", -1, dcl, 3000, 10},
		       {"gluconate-", -1, dg, 0, 130}};
	memcpy(tip_old, to, sizeof to);
	memcpy(tip_new, tn, sizeof tn);
	memcpy(br_old, bo, sizeof bo);
	memcpy(br_new, bn, sizeof bn);
}

/* Bare Ag/AgCl ground, 140 -> 10 mM Cl- (as activities).
 * Hand derivation (electrode.h): the ground's E_el rises by 67.804 mV;
 * the bath sits at -E_el against the ground wire, so it moves by
 * g = -67.804 mV. */
static void test_exchange_bare(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	jn_ion to[4], tn[4], bo[4], bn[4];
	el_exchange x;
	el_exchange_in in;
	double lo, ln;
	pairs(to, tn, bo, bn);
	memset(&in, 0, sizeof in);
	in.ground = EL_GROUND_AGCL;
	in.a_cl_old_mM = 140;
	in.a_cl_new_mM = 10;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), 0);
	assert_close(x.ground_mV, -67.804, 0, 0.001);
	assert_int_equal(x.have_tip, 0);
	assert_close(x.shift_mV, x.ground_mV, 0, 0);
	/* a change this large calls for a salt bridge (common practice: more
	 * than about 2 mV) */
	assert_int_equal(x.bridge_advised, 1);

	/* with the pipette: the open-tip reading is the circuit sum
	 * V = E_el(pip) - LJP(pip|X) - E_el(X) + offset, offset zeroing OLD.
	 * Compose it here from its parts, independently of the function. */
	in.tip_old = to;
	in.tip_new = tn;
	in.n_tip_old = in.n_tip_new = 4;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), 0);
	assert_int_equal(jn_henderson_mV(to, 4, 25, &lo, err), 0);
	assert_int_equal(jn_henderson_mV(tn, 4, 25, &ln, err), 0);
	{
		double e_pip = el_agcl_mV(5, 25); /* 5 mM Cl- in the pipette */
		double v_old = e_pip - lo - el_agcl_mV(140, 25);
		double v_new = e_pip - ln - el_agcl_mV(10, 25);
		assert_close(x.shift_mV, v_new - v_old, 0, 1e-9);
	}
	assert_close(x.tip_old_mV, lo, 0, 0);
	assert_close(x.tip_new_mV, ln, 0, 0);
	/* the low-Cl- bath is mostly Na-gluconate: its junction with a
	 * K-gluconate pipette is smaller than with NaCl saline */
	assert_true(lo > 8 && ln < lo);
}

/* 3 M KCl agar bridge: the bridge junction barely moves (K+ and Cl- of
 * the bridge carry almost all the current at the junction, common
 * practice), so the ground term is a few mV at most. */
static void test_exchange_bridge(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	jn_ion to[4], tn[4], bo[4], bn[4];
	el_exchange x;
	el_exchange_in in;
	double b0, b1;
	pairs(to, tn, bo, bn);
	memset(&in, 0, sizeof in);
	in.ground = EL_GROUND_BRIDGE;
	in.bridge_old = bo;
	in.bridge_new = bn;
	in.n_bridge_old = in.n_bridge_new = 4;
	in.a_cl_old_mM = 140; /* for the comparison term */
	in.a_cl_new_mM = 10;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), 0);
	assert_int_equal(jn_henderson_mV(bo, 4, 25, &b0, err), 0);
	assert_int_equal(jn_henderson_mV(bn, 4, 25, &b1, err), 0);
	/* G(X) = LJP(bridge | X) - E_el(KCl filling): g = b1 - b0 */
	assert_close(x.ground_mV, b1 - b0, 0, 1e-12);
	assert_true(fabs(x.ground_mV) < 3.0);
	assert_true(fabs(x.ground_mV) < fabs(x.agcl_mV) / 20);
	assert_close(x.agcl_mV, -67.804, 0, 0.001);
	assert_true(fabs(b0) < 3.0 && fabs(b1) < 3.0);
}

/* The correction of a reading.  Circuit (electrode.h): a reading is
 * V = E_el(pip) + (phi_pip - phi_bath) + G(X) + offset.  Build one from
 * chosen true values and check that el_true_mV recovers them. */
static void test_true_potential(void **st)
{
	(void)st;
	double e_pip = 12.3, ljp0 = 14.6, G0 = -40.0, G1 = -107.8, off, vm, v;
	/* zeroing, open tip in OLD: phi_pip - phi_bath = -LJP0 */
	off = -(e_pip - ljp0 + G0);
	/* whole-cell in OLD: phi_pip = inside, so phi_pip - phi_bath = Vm.
	 * The common-practice example: a command of -70 mV with LJP +14.6 mV
	 * is really -84.6 mV (Vm = Vpipette - LJP; Neher 1992, Methods
	 * Enzymol 207:123, from memory) */
	assert_close(el_true_mV(EL_WHOLE_CELL, -70, ljp0, 0), -84.6, 0, 1e-12);
	vm = -84.6;
	v = e_pip + vm + G0 + off;
	assert_close(v, -70.0, 0, 1e-12);
	/* whole-cell after the bath changed to NEW (ground moved by G1 - G0) */
	v = e_pip + vm + G1 + off;
	assert_close(el_true_mV(EL_WHOLE_CELL, v, ljp0, G1 - G0), vm, 0, 1e-12);
	assert_close(el_true_mV(EL_OUTSIDE_OUT, v, ljp0, G1 - G0), vm, 0, 1e-12);
	/* inside-out in NEW: bath on the inner face, phi_pip - phi_bath = -Vm */
	vm = -35.0;
	v = e_pip - vm + G1 + off;
	assert_close(el_true_mV(EL_INSIDE_OUT, v, ljp0, G1 - G0), vm, 0, 1e-12);
	/* cell-attached in OLD: phi_pip - phi_bath = Vrest - Vpatch */
	{
		double vrest = -65, vpatch = -20;
		v = e_pip + (vrest - vpatch) + G0 + off;
		assert_close(el_true_mV(EL_CELL_ATTACHED, v, ljp0, 0), vpatch - vrest, 0,
			     1e-12);
	}
	/* a reversal potential read in a 10 mM Cl- bath on a bare Ag/AgCl
	 * ground zeroed in 140 mM Cl-: true = read - LJP0 + 67.8 mV */
	assert_close(el_true_mV(EL_WHOLE_CELL, -30, ljp0, -67.804), -30 - ljp0 + 67.804,
		     0, 1e-12);
	assert_true(isnan(el_true_mV(EL_WHOLE_CELL, NAN, 0, 0)));
}

static void test_exchange_failures(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	jn_ion to[4], tn[4], bo[4], bn[4];
	el_exchange x;
	el_exchange_in in;
	pairs(to, tn, bo, bn);
	memset(&in, 0, sizeof in);
	in.ground = EL_GROUND_AGCL;
	in.a_cl_old_mM = 140;
	in.a_cl_new_mM = 0; /* Cl--free bath on a bare Ag/AgCl ground */
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), -1);
	assert_non_null(strstr(err, "no Cl-"));
	assert_non_null(strstr(err, "new"));
	in.a_cl_new_mM = NAN;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), -1);
	in.a_cl_new_mM = 10;
	assert_int_equal(el_exchange_shift_mV(&in, NAN, &x, err), -1);
	assert_int_equal(el_exchange_shift_mV(NULL, 25, &x, err), -1);
	/* one tip array without the other */
	in.tip_old = to;
	in.n_tip_old = 4;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), -1);
	/* a tip junction error is passed on, saying which junction */
	in.tip_new = tn;
	in.n_tip_new = 4;
	tn[3].D_m2_s = 0;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), -1);
	assert_non_null(strstr(err, "pipette | new bath"));
	assert_non_null(strstr(err, "gluconate-"));
	/* bridge without its filling */
	memset(&in, 0, sizeof in);
	in.ground = EL_GROUND_BRIDGE;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), -1);
	assert_non_null(strstr(err, "bridge"));
	/* with a bridge a Cl--free bath is fine */
	in.bridge_old = bo;
	in.bridge_new = bn;
	in.n_bridge_old = in.n_bridge_new = 4;
	in.a_cl_old_mM = 140;
	in.a_cl_new_mM = 0;
	assert_int_equal(el_exchange_shift_mV(&in, 25, &x, err), 0);
	assert_int_equal(x.have_agcl, 0);
	assert_int_equal(x.bridge_advised, 0);
	assert_int_equal(el_bridge_advisable(1.9), 0);
	assert_int_equal(el_bridge_advisable(-2.1), 1);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_agcl_nernst),
		cmocka_unit_test(test_exchange_bare),
		cmocka_unit_test(test_exchange_bridge),
		cmocka_unit_test(test_true_potential),
		cmocka_unit_test(test_exchange_failures),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
