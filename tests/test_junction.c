/*
 * test_junction.c - liquid junction potentials: Henderson, Planck, free
 * diffusion; mobilities.  Each assertion names its source; "from memory"
 * marks a published value recalled, not looked up.  Hand values were
 * worked out step by step in the comments (not with this code).
 *
 * Sign everywhere: the LJP is the potential of the bath relative to the
 * pipette solution (junction.h).
 */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "diffusion.h"
#include "junction.h"

/* Limiting equivalent conductivities at 25 C, S cm2/mol of charge, from
 * the CRC Handbook of Chemistry and Physics table "Ionic conductivity and
 * diffusion at infinite dilution" (P. Vanysek), from memory:
 * H+ 349.65, K+ 73.48, Na+ 50.08, 1/2 Ca2+ 59.47, 1/2 Mg2+ 53.0,
 * Cl- 76.31, NO3- 71.42. */
#define L_H 349.65
#define L_K 73.48
#define L_NA 50.08
#define L_CA 59.47
#define L_MG 53.0
#define L_CL 76.31
#define L_NO3 71.42
/* Relative mobility of gluconate- to K+: about 0.33 (Barry & Lynch 1991,
 * J Membr Biol 121:101; Ng & Barry 1995, J Biochem Biophys Methods 30:15;
 * from memory).  HEPES-: about 0.30 of K+ (from memory; the value used in
 * the trade's mobility tables, not checked against its original). */
#define REL_GLUCONATE 0.33
#define REL_HEPES 0.30

#define EPS_MV 1e-6 /* two evaluations of one closed form, mV */

static double D(double lambda, int z)
{
	return jn_D_from_lambda_m2_s(lambda, z, 25.0);
}

static double rtf25(void)
{
	return im_rt_f_mV(25.0);
}

/* ---- mobilities ---- */

static void test_nernst_einstein(void **st)
{
	(void)st;
	/* D = RT lambda/(|z| F^2): K+ 73.48 -> 1.957e-9 m2/s; CRC Handbook
	 * table of D at infinite dilution lists 1.957 (from memory).  By hand:
	 * 8.314462618 * 298.15 * 73.48e-4 / 96485.33212^2
	 *  = 2478.957 * 7.348e-3 / 9.30942e9 = 1.9567e-9 */
	assert_close(D(L_K, 1), 1.957e-9, 1e-3, 0);
	/* Ca2+: handbook equivalent value 59.47 for 1/2 Ca2+ -> D = 0.792e-9
	 * (CRC Handbook D of Ca2+ 0.792e-9, from memory).  By hand:
	 * 2478.957 * 5.947e-3 / (2 * 9.30942e9) = 0.7918e-9 */
	assert_close(D(L_CA, 2), 0.792e-9, 2e-3, 0);
	assert_close(D(L_CA, -2), D(L_CA, 2), 1e-15, 0);
	/* Cl- 76.31 -> 2.032e-9 (CRC Handbook, from memory) */
	assert_close(D(L_CL, -1), 2.032e-9, 1e-3, 0);
	/* bad input gives NAN, the refdb's "unknown" */
	assert_true(isnan(jn_D_from_lambda_m2_s(0, 1, 25)));
	assert_true(isnan(jn_D_from_lambda_m2_s(-3, 1, 25)));
	assert_true(isnan(jn_D_from_lambda_m2_s(NAN, 1, 25)));
	assert_true(isnan(jn_D_from_lambda_m2_s(73.48, 0, 25)));
	assert_true(isnan(jn_D_from_lambda_m2_s(73.48, 1, 120)));
}

static void test_water_viscosity(void **st)
{
	(void)st;
	/* Water at 0.1 MPa: 1.792 mPa s at 0 C, 0.8900 at 25 C, 0.6913 at
	 * 37 C, 0.2818 at 100 C (CRC Handbook table "Viscosity of water",
	 * from memory) */
	assert_close(jn_water_viscosity_mPa_s(0), 1.792, 0, 0.003);
	assert_close(jn_water_viscosity_mPa_s(25), 0.8900, 0, 0.0005);
	assert_close(jn_water_viscosity_mPa_s(37), 0.6913, 0, 0.0010);
	assert_close(jn_water_viscosity_mPa_s(100), 0.2818, 0, 0.0010);
	assert_true(isnan(jn_water_viscosity_mPa_s(-5)));
	/* Stokes-Einstein: unchanged at 25 C; at 37 C by hand the factor is
	 * (310.15/298.15) * (0.8900/0.6913) = 1.04025 * 1.28743 = 1.3392 */
	assert_close(jn_D_at_T_m2_s(1.957e-9, 25), 1.957e-9, 1e-14, 0);
	assert_close(jn_D_at_T_m2_s(1.0e-9, 37) / 1.0e-9, 1.3392, 0, 0.003);
	assert_true(isnan(jn_D_at_T_m2_s(0, 25)));
}

/* ---- Lewis-Sargent: 0.1 M HCl (pipette) | 0.1 M KCl (bath) ----
 * Calculated from limiting conductivities (MacInnes, The Principles of
 * Electrochemistry, 1939, chapter on liquid junctions; from memory):
 * E = (RT/F) ln((l_H + l_Cl)/(l_K + l_Cl)) = 25.6926 * ln(425.96/149.79)
 *   = 25.6926 * ln(2.84378) = 25.6926 * 1.04512 = 26.852 mV,
 * the KCl side positive: H+ runs ahead into the KCl side. */
static void test_lewis_sargent_hcl_kcl(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double h, p, d;
	df_report rep;
	jn_ion x[] = {{"H+", 1, D(L_H, 1), 100, 0},
		      {"K+", 1, D(L_K, 1), 0, 100},
		      {"Cl-", -1, D(L_CL, -1), 100, 100}};
	assert_int_equal(jn_henderson_mV(x, 3, 25, &h, err), 0);
	assert_int_equal(jn_planck_mV(x, 3, 25, &p, err), 0);
	assert_int_equal(df_ljp_mV(x, 3, 25, NULL, &rep, &d, err), 0);
	assert_close(h, 26.852, 0, 0.002);
	assert_close(p, 26.852, 0, 0.002);
	assert_close(h, rtf25() * log((L_H + L_CL) / (L_K + L_CL)), 0, EPS_MV);
	assert_close(p, h, 0, EPS_MV);
	/* Free diffusion is a different model (the total concentration is not
	 * constant across a free junction): 26.695 mV.  Source: none
	 * published; cross-checked during development against an independent
	 * method-of-lines solution in x and t (scipy BDF, 1600 cells), which
	 * gave 26.6947 mV.  It must stay within 1 mV of Lewis-Sargent and on
	 * the same side. */
	assert_close(d, 26.695, 0, 0.003);
	assert_true(d > 0 && fabs(d - h) < 1.0);
	/* the report says what was done */
	assert_true(rep.grid_points >= 201 && rep.grids >= 2 && rep.newton_its > 0);
	assert_true(rep.residual < 1e-6);
	assert_true(rep.grid_err_mV <= 0.005);
	assert_close(rep.coarse_ljp_mV, d, 0, 0.01);
}

/* ---- single-salt concentration junctions ----
 * For a 1:1 salt, E = (t+ - t-) (RT/F) ln(c_pip / c_bath) (bath relative
 * to pipette), derived by hand: zero current gives dpsi/dx =
 * -(D+ - D-)/(D+ + D-) dln c/dx, integrated from pipette to bath.  The
 * faster ion runs ahead into the dilute side and charges it with its own
 * sign.  Every model is exact here (the result does not depend on the
 * profile), so the three must agree to 0.01 mV. */
static void test_single_salt(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double h, p, d;
	/* 0.1 M | 0.01 M HCl: t+ - t- = (349.65 - 76.31)/425.96 = 0.64170;
	 * E = 0.64170 * 59.1594 = 37.963 mV, the dilute bath positive (H+
	 * faster).  Measured values are about 38 mV (MacInnes 1939, from
	 * memory). */
	jn_ion hcl[] = {{"H+", 1, D(L_H, 1), 100, 10}, {"Cl-", -1, D(L_CL, -1), 100, 10}};
	assert_int_equal(jn_henderson_mV(hcl, 2, 25, &h, err), 0);
	assert_int_equal(jn_planck_mV(hcl, 2, 25, &p, err), 0);
	assert_int_equal(df_ljp_mV(hcl, 2, 25, NULL, NULL, &d, err), 0);
	assert_close(h, 37.963, 0, 0.002);
	assert_close(p, h, 0, 0.01);
	assert_close(d, h, 0, 0.01);
	/* 0.1 M | 0.01 M KCl: t+ - t- = (73.48 - 76.31)/149.79 = -0.018893;
	 * E = -0.018893 * 59.1594 = -1.1177 mV: Cl- slightly faster, the
	 * dilute bath negative (about 1.1 mV, MacInnes 1939, from memory) */
	jn_ion kcl[] = {{"K+", 1, D(L_K, 1), 100, 10}, {"Cl-", -1, D(L_CL, -1), 100, 10}};
	assert_int_equal(jn_henderson_mV(kcl, 2, 25, &h, err), 0);
	assert_int_equal(jn_planck_mV(kcl, 2, 25, &p, err), 0);
	assert_int_equal(df_ljp_mV(kcl, 2, 25, NULL, NULL, &d, err), 0);
	assert_close(h, -1.1177, 0, 0.0005);
	assert_close(p, h, 0, 0.01);
	assert_close(d, h, 0, 0.01);
	/* The diffusion model sums the potential cell by cell as Henderson
	 * potentials (junction.c), so for one salt it is exact even on a
	 * coarse grid: 21 and 41 points */
	{
		df_opts o;
		df_defaults(&o);
		o.grid_points = 21;
		o.max_grid_points = 41;
		o.tol_mV = 10;
		assert_int_equal(df_ljp_mV(kcl, 2, 25, &o, NULL, &d, err), 0);
		assert_close(d, h, 0, 1e-9);
		assert_int_equal(df_ljp_mV(hcl, 2, 25, &o, NULL, &d, err), 0);
		assert_close(d, 37.963, 0, 0.002);
	}
	/* reversed (dilute pipette) flips the sign exactly */
	jn_ion kcl2[] = {{"K+", 1, D(L_K, 1), 10, 100},
			 {"Cl-", -1, D(L_CL, -1), 10, 100}};
	assert_int_equal(jn_henderson_mV(kcl2, 2, 25, &p, err), 0);
	assert_close(p, -h, 0, 1e-9);
}

/* CaCl2 100 | 10 mM (2:1 salt).  By hand, with electroneutrality
 * c(Cl) = 2 c(Ca): zero current gives dpsi = -(D+ - D-)/(2 D+ + D-) dln c,
 * so E = -(D+ - D-)/(2 D+ + D-) (RT/F) ln(c_b/c_p), with D+ = 0.7918e-9,
 * D- = 2.0321e-9: -(-1.2403/3.6157) = +0.34303, ln(0.1) = -2.302585,
 * E = 0.34303 * (-2.302585) * 25.6926 = -20.293 mV: Cl- outruns Ca2+
 * into the dilute bath, which goes negative.  Henderson and the
 * diffusion model are both exact here. */
static void test_single_salt_cacl2(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double h, d, p = 123;
	jn_ion x[] = {{"Ca2+", 2, D(L_CA, 2), 100, 10},
		      {"Cl-", -1, D(L_CL, -1), 200, 20}};
	double dp = D(L_CA, 2), dm = D(L_CL, -1);
	assert_int_equal(jn_henderson_mV(x, 2, 25, &h, err), 0);
	assert_int_equal(df_ljp_mV(x, 2, 25, NULL, NULL, &d, err), 0);
	assert_close(h, -20.293, 0, 0.002);
	assert_close(h, -(dp - dm) / (2 * dp + dm) * log(0.1) * rtf25(), 0, EPS_MV);
	assert_close(d, h, 0, 0.01);
	/* Planck's numerical model takes any valence and is exact for one
	 * salt (the same closed form, to 1e-6 mV); the classic closed form
	 * takes monovalent ions only: an error naming the ion */
	assert_int_equal(jn_planck_mV(x, 2, 25, &p, err), 0);
	assert_close(p, -(dp - dm) / (2 * dp + dm) * log(0.1) * rtf25(), 0, 1e-6);
	p = 123;
	assert_int_equal(jn_planck_classic_mV(x, 2, 25, &p, err), -1);
	assert_non_null(strstr(err, "Ca2+"));
	assert_close(p, 123, 0, 0); /* output untouched */
}

/* ---- bi-ionic junctions at equal concentration ----
 * Henderson and Planck both reduce to Lewis-Sargent when the two sides
 * share an ion (MacInnes 1939, from memory); without a common ion only
 * Planck does. */
static void test_bi_ionic(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double h, p, d;
	/* 100 NaCl | 100 KCl: (RT/F) ln((50.08 + 76.31)/(73.48 + 76.31))
	 * = 25.6926 * ln(0.84378) = 25.6926 * (-0.16986) = -4.3642 mV */
	jn_ion nak[] = {{"Na+", 1, D(L_NA, 1), 100, 0},
			{"K+", 1, D(L_K, 1), 0, 100},
			{"Cl-", -1, D(L_CL, -1), 100, 100}};
	assert_int_equal(jn_henderson_mV(nak, 3, 25, &h, err), 0);
	assert_int_equal(jn_planck_mV(nak, 3, 25, &p, err), 0);
	assert_close(h, -4.3642, 0, 0.0005);
	assert_close(p, h, 0, EPS_MV);
	/* common cation: 100 KCl | 100 KNO3: (RT/F) ln((l_K + l_NO3)/(l_K + l_Cl))
	 * = 25.6926 * ln(144.90/149.79) = 25.6926 * (-0.033190) = -0.8527 mV */
	jn_ion no3[] = {{"K+", 1, D(L_K, 1), 100, 100},
			{"Cl-", -1, D(L_CL, -1), 100, 0},
			{"NO3-", -1, D(L_NO3, -1), 0, 100}};
	assert_int_equal(jn_henderson_mV(no3, 3, 25, &h, err), 0);
	assert_int_equal(jn_planck_mV(no3, 3, 25, &p, err), 0);
	assert_close(h, -0.8527, 0, 0.0005);
	assert_close(p, h, 0, EPS_MV);
	/* no common ion: 100 HCl | 100 KNO3.  Planck = Lewis-Sargent
	 * (RT/F) ln((l_H + l_NO3)/(l_K + l_Cl)) = 25.6926 ln(421.07/149.79)
	 * = 25.6926 * 1.03357 = 26.555 mV; Henderson differs (26.740 mV), a
	 * known difference of the two (MacInnes 1939, from memory). */
	jn_ion hk[] = {{"H+", 1, D(L_H, 1), 100, 0},
		       {"K+", 1, D(L_K, 1), 0, 100},
		       {"Cl-", -1, D(L_CL, -1), 100, 0},
		       {"NO3-", -1, D(L_NO3, -1), 0, 100}};
	assert_int_equal(jn_planck_mV(hk, 4, 25, &p, err), 0);
	assert_int_equal(jn_henderson_mV(hk, 4, 25, &h, err), 0);
	assert_int_equal(df_ljp_mV(hk, 4, 25, NULL, NULL, &d, err), 0);
	assert_close(p, rtf25() * log((L_H + L_NO3) / (L_K + L_CL)), 0, EPS_MV);
	assert_close(h, 26.740, 0, 0.002);
	assert_true(fabs(h - p) > 0.1);
	/* free diffusion: 26.568 mV; no published source; cross-checked
	 * during development with an independent method-of-lines solution in
	 * x and t (scipy BDF), 26.5680 mV */
	assert_close(d, 26.568, 0, 0.003);
}

/* Planck for a junction of mixed concentration: 100 HCl | 10 KCl.
 * No published value; cross-checked during development against an
 * independent boundary-value solution of steady constrained
 * electrodiffusion (scipy solve_bvp): 52.5779 mV.  Henderson gives
 * 57.264 mV and free diffusion 57.719 mV (method of lines: 57.718). */
static void test_planck_mixed(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double p, h, d;
	jn_ion x[] = {{"H+", 1, D(L_H, 1), 100, 0},
		      {"K+", 1, D(L_K, 1), 0, 10},
		      {"Cl-", -1, D(L_CL, -1), 100, 10}};
	assert_int_equal(jn_planck_mV(x, 3, 25, &p, err), 0);
	assert_int_equal(jn_henderson_mV(x, 3, 25, &h, err), 0);
	assert_int_equal(df_ljp_mV(x, 3, 25, NULL, NULL, &d, err), 0);
	assert_close(p, 52.5779, 0, 0.0005);
	assert_close(h, 57.264, 0, 0.002);
	assert_close(d, 57.719, 0, 0.003);
}

/* ---- the common whole-cell pair ----
 * Pipette: 135 K-gluconate, 5 KCl, 10 HEPES taken as fully deprotonated
 * by 10 KOH (so 150 K+, 135 gluconate-, 5 Cl-, 10 HEPES-).  Bath: 140
 * NaCl, 5 KCl, 2 CaCl2, 1 MgCl2 (HEPES and glucose neutral, left out).
 * The LJP is about +12 to +18 mV, bath positive (common practice, no
 * published source): K+ leaves the pipette faster than gluconate. */
static jn_ion kglu_pair[] = {
	{"K+", 1, 0, 150, 5},     {"gluconate-", -1, 0, 135, 0}, {"Cl-", -1, 0, 5, 151},
	{"HEPES-", -1, 0, 10, 0}, {"Na+", 1, 0, 0, 140},         {"Ca2+", 2, 0, 0, 2},
	{"Mg2+", 2, 0, 0, 1},     {"glucose", 0, 0, 0, 10},
};

static void fill_kglu(jn_ion *x)
{
	memcpy(x, kglu_pair, sizeof kglu_pair);
	x[0].D_m2_s = D(L_K, 1);
	x[1].D_m2_s = REL_GLUCONATE * D(L_K, 1);
	x[2].D_m2_s = D(L_CL, -1);
	x[3].D_m2_s = REL_HEPES * D(L_K, 1);
	x[4].D_m2_s = D(L_NA, 1);
	x[5].D_m2_s = D(L_CA, 2);
	x[6].D_m2_s = D(L_MG, 2);
	x[7].D_m2_s = NAN; /* neutral: no mobility needed */
}

static void test_kgluconate_saline(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	jn_ion x[8];
	double h, d, sum = 0, c[8];
	fill_kglu(x);
	assert_int_equal(jn_henderson_mV(x, 8, 25, &h, err), 0);
	assert_true(h > 12 && h < 18);
	/* free diffusion lands in the same range, within 0.5 mV */
	assert_int_equal(df_ljp_mV(x, 8, 25, NULL, NULL, &d, err), 0);
	assert_true(d > 12 && d < 18);
	assert_close(d, h, 0, 0.5);
	/* the shares add up to the total */
	assert_int_equal(jn_henderson_contrib(x, 8, 25, c, &sum, err), 0);
	assert_close(sum, h, 0, 1e-9);
	sum = 0;
	for (int i = 0; i < 8; i++)
		sum += c[i];
	assert_close(sum, h, 0, 1e-9);
	/* K+ leaving the pipette pushes the bath positive, slow gluconate
	 * pulls back only a third as much (its mobility ratio, 0.33) */
	assert_true(c[0] > 0 && c[1] < 0);
	assert_close(c[1] / c[0], -REL_GLUCONATE * 135.0 / 145.0, 0, 1e-9);
	assert_close(c[7], 0, 0, 0);
	/* replacing gluconate by Cl- (a KCl pipette) leaves a small LJP:
	 * the anion keeps pace with K+ */
	x[1].D_m2_s = D(L_CL, -1);
	assert_int_equal(jn_henderson_mV(x, 8, 25, &d, err), 0);
	assert_true(fabs(d) < 6 && d < h - 10);
}

/* ---- other properties ---- */

static void test_identical_is_zero(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double v = 1;
	jn_ion x[] = {{"K+", 1, D(L_K, 1), 140, 140},
		      {"Cl-", -1, D(L_CL, -1), 140, 140},
		      {"sucrose", 0, 0, 10, 0}};
	/* identical charged ions -> 0 exactly (definition of the LJP) */
	assert_int_equal(jn_henderson_mV(x, 3, 25, &v, err), 0);
	assert_true(v == 0.0);
	v = 1;
	assert_int_equal(jn_planck_mV(x, 3, 25, &v, err), 0);
	assert_true(v == 0.0);
	v = 1;
	assert_int_equal(df_ljp_mV(x, 3, 25, NULL, NULL, &v, err), 0);
	assert_true(v == 0.0);
}

/* A junction with nearly equal sides stays on the closed form:
 * KCl 100 | 100.0001 mM: E = -0.018893 * 25.6926 * ln(100/100.0001)
 * = +4.854e-7 mV (single-salt formula, derived above). */
static void test_tiny_difference(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double h;
	double dk = D(L_K, 1), dc = D(L_CL, -1);
	jn_ion x[] = {{"K+", 1, dk, 100, 100.0001}, {"Cl-", -1, dc, 100, 100.0001}};
	assert_int_equal(jn_henderson_mV(x, 2, 25, &h, err), 0);
	assert_close(h, 4.854e-7, 1e-3, 0);
	assert_close(h, (dk - dc) / (dk + dc) * rtf25() * log(100 / 100.0001), 1e-9, 0);
}

/* The LJP scales with T at fixed mobility ratios: (RT/F) at 37 C is
 * 25.6926 * 310.15/298.15 = 26.7267 mV, so HCl|KCl becomes
 * 26.7267 * 1.04512 = 27.933 mV (Lewis-Sargent, as above). */
static void test_temperature(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double h, p;
	jn_ion x[] = {{"H+", 1, D(L_H, 1), 100, 0},
		      {"K+", 1, D(L_K, 1), 0, 100},
		      {"Cl-", -1, D(L_CL, -1), 100, 100}};
	assert_int_equal(jn_henderson_mV(x, 3, 37, &h, err), 0);
	assert_close(h, 27.933, 0, 0.002);
	/* Stokes-Einstein scales every D alike: no change */
	for (int i = 0; i < 3; i++)
		x[i].D_m2_s = jn_D_at_T_m2_s(x[i].D_m2_s, 37);
	assert_int_equal(jn_planck_mV(x, 3, 37, &p, err), 0);
	assert_close(p, h, 0, EPS_MV);
}

/* ---- expected failures ---- */

static void test_failures(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double v = 7;
	df_opts o;
	jn_ion ok[] = {{"K+", 1, D(L_K, 1), 140, 5}, {"Cl-", -1, D(L_CL, -1), 140, 5}};

	/* no ions */
	assert_int_equal(jn_henderson_mV(NULL, 0, 25, &v, err), -1);
	assert_non_null(strstr(err, "no ions"));
	assert_int_equal(jn_henderson_mV(ok, 0, 25, &v, err), -1);
	assert_int_equal(jn_planck_mV(NULL, 0, 25, &v, err), -1);
	assert_int_equal(df_ljp_mV(NULL, 0, 25, NULL, NULL, &v, err), -1);

	/* an ion without a mobility is named */
	jn_ion nomob[] = {{"K+", 1, D(L_K, 1), 140, 5},
			  {"gluconate-", -1, 0, 140, 0},
			  {"Cl-", -1, D(L_CL, -1), 0, 5}};
	assert_int_equal(jn_henderson_mV(nomob, 3, 25, &v, err), -1);
	assert_non_null(strstr(err, "gluconate-"));
	assert_non_null(strstr(err, "mobility"));
	nomob[1].D_m2_s = NAN;
	assert_int_equal(df_ljp_mV(nomob, 3, 25, NULL, NULL, &v, err), -1);
	assert_non_null(strstr(err, "gluconate-"));
	/* ... unless it is absent from both sides */
	nomob[1].pip_mM = 0;
	nomob[0].pip_mM = 0;
	nomob[0].bath_mM = 5;
	assert_int_equal(jn_henderson_mV(nomob, 3, 25, &v, err), -1);
	assert_non_null(strstr(err, "pipette solution has no ions"));

	/* negative and non-finite concentrations */
	jn_ion neg[] = {{"K+", 1, D(L_K, 1), -1, 5}, {"Cl-", -1, D(L_CL, -1), 140, 5}};
	assert_int_equal(jn_henderson_mV(neg, 2, 25, &v, err), -1);
	assert_non_null(strstr(err, "negative pipette"));
	assert_non_null(strstr(err, "K+"));
	neg[0].pip_mM = 140;
	neg[1].bath_mM = NAN;
	assert_int_equal(jn_planck_mV(neg, 2, 25, &v, err), -1);
	assert_non_null(strstr(err, "Cl-"));
	assert_non_null(strstr(err, "bath"));
	neg[1].bath_mM = INFINITY;
	assert_int_equal(df_ljp_mV(neg, 2, 25, NULL, NULL, &v, err), -1);

	/* a side with no ions, and both */
	jn_ion empty[] = {{"K+", 1, D(L_K, 1), 140, 0}, {"Cl-", -1, D(L_CL, -1), 140, 0}};
	assert_int_equal(jn_henderson_mV(empty, 2, 25, &v, err), -1);
	assert_non_null(strstr(err, "bath solution has no ions"));
	empty[0].pip_mM = empty[1].pip_mM = 0;
	assert_int_equal(jn_henderson_mV(empty, 2, 25, &v, err), -1);
	assert_non_null(strstr(err, "neither"));

	/* NaN mobility, NaN or absurd temperature */
	jn_ion nand[] = {{"K+", 1, NAN, 140, 5}, {"Cl-", -1, D(L_CL, -1), 140, 5}};
	assert_int_equal(jn_henderson_mV(nand, 2, 25, &v, err), -1);
	assert_non_null(strstr(err, "K+"));
	assert_int_equal(jn_henderson_mV(ok, 2, NAN, &v, err), -1);
	assert_int_equal(jn_planck_mV(ok, 2, 150, &v, err), -1);
	assert_non_null(strstr(err, "temperature"));

	/* Planck: divalent ion, and a solution far from electroneutral */
	jn_ion ca[] = {{"Ca2+", 2, D(L_CA, 2), 0, 2},
		       {"K+", 1, D(L_K, 1), 140, 5},
		       {"Cl-", -1, D(L_CL, -1), 140, 9}};
	assert_int_equal(jn_planck_classic_mV(ca, 3, 25, &v, err), -1);
	assert_non_null(strstr(err, "Ca2+"));
	jn_ion unb[] = {{"K+", 1, D(L_K, 1), 140, 5}, {"Cl-", -1, D(L_CL, -1), 100, 5}};
	assert_int_equal(jn_planck_mV(unb, 2, 25, &v, err), -1);
	assert_non_null(strstr(err, "electroneutral"));

	/* diffusion options out of range; no refinement allowed */
	df_defaults(&o);
	o.grid_points = 100; /* even */
	assert_int_equal(df_ljp_mV(ok, 2, 25, &o, NULL, &v, err), -1);
	df_defaults(&o);
	o.tol_mV = NAN;
	assert_int_equal(df_ljp_mV(ok, 2, 25, &o, NULL, &v, err), -1);
	df_defaults(&o);
	o.max_newton = 0;
	assert_int_equal(df_ljp_mV(ok, 2, 25, &o, NULL, &v, err), -1);
	assert_non_null(strstr(err, "max_newton"));
	df_defaults(&o);
	o.max_grid_points = o.grid_points; /* no refinement, no error estimate */
	assert_int_equal(df_ljp_mV(ok, 2, 25, &o, NULL, &v, err), -1);

	/* contributions need an array */
	assert_int_equal(jn_henderson_contrib(ok, 2, 25, NULL, &v, err), -1);
	/* outputs untouched by every failure above */
	assert_close(v, 7, 0, 0);
}

/* A tight tolerance forces refinement; the result converges (second
 * order: the estimate shrinks about fourfold per refinement). */
static void test_diffusion_refinement(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double d1, d2;
	df_opts o;
	df_report r1, r2;
	jn_ion x[8];
	fill_kglu(x);
	df_defaults(&o);
	o.grid_points = 41;
	o.tol_mV = 1.0;
	assert_int_equal(df_ljp_mV(x, 8, 25, &o, &r1, &d1, err), 0);
	o.tol_mV = 1e-5;
	assert_int_equal(df_ljp_mV(x, 8, 25, &o, &r2, &d2, err), 0);
	assert_true(r2.grid_points > r1.grid_points);
	assert_true(r2.grid_err_mV <= 1e-5);
	assert_close(d1, d2, 0, 3 * r1.grid_err_mV + 1e-6);
}

/* A pipette 580 times as concentrated as the bath (K-gluconate against
 * 1 mM NaCl, with the H+ and OH- of neutral water, which are not trace
 * ions beside 1 mM): Newton fails on the first grid of 51 nodes, even by
 * continuation, and the solve starts again on 101, where it converges.
 * The answer is the one a first grid of 201 nodes gives directly (the
 * same code, another start: a consistency check, not a reference). */
static void test_diffusion_steep_layer(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double d, d201;
	df_opts o;
	df_report r;
	jn_ion x[6] = {
		{"H+", 1, 9.3106e-9, 1.362e-4, 1.043e-4},
		{"K+", 1, 1.9567e-9, 586, 0},
		{"Cl-", -1, 2.0320e-9, 6, 1},
		{"OH-", -1, 5.2724e-9, 1.362e-4, 1.043e-4},
		{"gluconate-", -1, 0.6457e-9, 580, 0},
		{"Na+", 1, 1.3336e-9, 0, 1},
	};
	if (df_ljp_mV(x, 6, 25, NULL, &r, &d, err) != 0)
		fail_msg("%s", err);
	assert_true(r.grid_points >= 201);
	df_defaults(&o);
	o.grid_points = 201;
	assert_int_equal(df_ljp_mV(x, 6, 25, &o, NULL, &d201, err), 0);
	assert_close(d, d201, 0, 0.01);
	assert_true(d > 60 && d < 75); /* Henderson gives +78, Planck +82 */
}

/* ---- Planck for any valence ----
 * The numerical model (shooting, junction.c) against Planck's closed form
 * for 1:1 electrolytes (Planck 1890; the equation as given in junction.h),
 * to 1e-6 mV on mixtures of several concentrations. */
static void test_planck_numeric_vs_classic(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	jn_ion m1[] = {{"H+", 1, D(L_H, 1), 100, 0},
		       {"K+", 1, D(L_K, 1), 0, 10},
		       {"Cl-", -1, D(L_CL, -1), 100, 10}};
	jn_ion m2[] = {{"Na+", 1, D(L_NA, 1), 140, 10},
		       {"K+", 1, D(L_K, 1), 5, 130},
		       {"Cl-", -1, D(L_CL, -1), 135, 20},
		       {"NO3-", -1, D(L_NO3, -1), 10, 120}};
	jn_ion m3[] = {{"K+", 1, D(L_K, 1), 150, 5},
		       {"gluconate-", -1, REL_GLUCONATE * D(L_K, 1), 140, 0},
		       {"Cl-", -1, D(L_CL, -1), 10, 150},
		       {"Na+", 1, D(L_NA, 1), 0, 145}};
	jn_ion *all[] = {m1, m2, m3};
	int n[] = {3, 4, 4};
	for (int i = 0; i < 3; i++) {
		double p, c;
		assert_int_equal(jn_planck_mV(all[i], n[i], 25, &p, err), 0);
		assert_int_equal(jn_planck_classic_mV(all[i], n[i], 25, &c, err), 0);
		assert_close(p, c, 0, 1e-6);
	}
}

/* Single-salt concentration junctions of any valence: all three models
 * agree within 0.01 mV with the exact result
 *   E = -(D+ - D-) / (z+ D+ - z- D-) (RT/F) ln(c_bath / c_pip)
 * (it follows from zero current and electroneutrality alone, so every
 * model that keeps both is exact: the CaCl2 derivation above, for any
 * z+ and z-).  Mobilities: crc-lambda (from memory); SO4 2- 80.0. */
static void test_single_salt_any_valence(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double dmg = D(L_MG, 2), dso4 = D(80.0, -2), dna = D(L_NA, 1), dcl = D(L_CL, -1);
	struct {
		jn_ion x[2];
		double dp, dm;
		int zp, zm;
		double ratio; /* c_bath / c_pip */
	} c[] = {
		{{{"Mg2+", 2, 0, 50, 5}, {"SO4^2-", -2, 0, 50, 5}}, 0, 0, 2, -2, 0.1},
		{{{"Na+", 1, 0, 20, 200}, {"SO4^2-", -2, 0, 10, 100}}, 0, 0, 1, -2, 10},
		{{{"Mg2+", 2, 0, 100, 1}, {"Cl-", -1, 0, 200, 2}}, 0, 0, 2, -1, 0.01},
		{{{"Na+", 1, 0, 150, 15}, {"Cl-", -1, 0, 150, 15}}, 0, 0, 1, -1, 0.1},
		/* a ratio of 1e4 (the steep end of the Planck layer) */
		{{{"Na+", 1, 0, 1000, 0.1}, {"Cl-", -1, 0, 1000, 0.1}}, 0, 0, 1, -1, 1e-4},
	};
	c[0].x[0].D_m2_s = c[0].dp = dmg;
	c[0].x[1].D_m2_s = c[0].dm = dso4;
	c[1].x[0].D_m2_s = c[1].dp = dna;
	c[1].x[1].D_m2_s = c[1].dm = dso4;
	c[2].x[0].D_m2_s = c[2].dp = dmg;
	c[2].x[1].D_m2_s = c[2].dm = dcl;
	c[3].x[0].D_m2_s = c[3].dp = dna;
	c[3].x[1].D_m2_s = c[3].dm = dcl;
	c[4].x[0].D_m2_s = c[4].dp = dna;
	c[4].x[1].D_m2_s = c[4].dm = dcl;
	for (size_t i = 0; i < IM_COUNT(c); i++) {
		double exact = -(c[i].dp - c[i].dm) / (c[i].zp * c[i].dp - c[i].zm * c[i].dm) *
			       rtf25() * log(c[i].ratio);
		double h, p, d;
		assert_int_equal(jn_henderson_mV(c[i].x, 2, 25, &h, err), 0);
		assert_int_equal(jn_planck_mV(c[i].x, 2, 25, &p, err), 0);
		assert_int_equal(df_ljp_mV(c[i].x, 2, 25, NULL, NULL, &d, err), 0);
		assert_close(h, exact, 0, 0.01);
		assert_close(p, exact, 0, 0.01);
		assert_close(d, exact, 0, 0.01);
		/* Planck's model and Henderson are exact to rounding here */
		assert_close(p, exact, 0, 1e-6);
	}
}

/* A bath with Ca2+ and Mg2+ no longer drops Planck's model: a NaCl |
 * CaCl2 bi-ionic junction is computed, differs from Henderson, and
 * reverses sign exactly when the sides are swapped. */
static void test_planck_divalent(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double p1, p2, h;
	jn_ion a[] = {{"Na+", 1, D(L_NA, 1), 150, 0},
		      {"Ca2+", 2, D(L_CA, 2), 0, 100},
		      {"Cl-", -1, D(L_CL, -1), 150, 200}};
	jn_ion b[] = {{"Na+", 1, D(L_NA, 1), 0, 150},
		      {"Ca2+", 2, D(L_CA, 2), 100, 0},
		      {"Cl-", -1, D(L_CL, -1), 200, 150}};
	assert_int_equal(jn_planck_mV(a, 3, 25, &p1, err), 0);
	assert_int_equal(jn_planck_mV(b, 3, 25, &p2, err), 0);
	assert_int_equal(jn_henderson_mV(a, 3, 25, &h, err), 0);
	assert_close(p1, -p2, 0, 1e-7);
	assert_true(p1 > 0 && fabs(p1 - h) < 2.0);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_nernst_einstein),
		cmocka_unit_test(test_water_viscosity),
		cmocka_unit_test(test_lewis_sargent_hcl_kcl),
		cmocka_unit_test(test_single_salt),
		cmocka_unit_test(test_single_salt_cacl2),
		cmocka_unit_test(test_bi_ionic),
		cmocka_unit_test(test_planck_mixed),
		cmocka_unit_test(test_kgluconate_saline),
		cmocka_unit_test(test_identical_is_zero),
		cmocka_unit_test(test_tiny_difference),
		cmocka_unit_test(test_temperature),
		cmocka_unit_test(test_failures),
		cmocka_unit_test(test_diffusion_refinement),
		cmocka_unit_test(test_diffusion_steep_layer),
		cmocka_unit_test(test_planck_numeric_vs_classic),
		cmocka_unit_test(test_single_salt_any_valence),
		cmocka_unit_test(test_planck_divalent),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
