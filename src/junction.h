/*
 * junction.h - liquid junction potentials (LJP) between a pipette solution
 * and a bath: the Henderson equation (any valence) with a per-ion
 * breakdown, Planck's model (closed form for monovalent ions, numerical
 * for any valence; the free-diffusion model is in diffusion.h), and the mobility helpers they use
 * (Nernst-Einstein, Stokes-Einstein with the viscosity of water).
 *
 * SIGN, the contract of every jn_* result: the potential of the BATH
 * relative to the PIPETTE solution, in mV.  A K-gluconate pipette against
 * NaCl saline gives a positive value (K+ leaves the pipette faster than
 * gluconate); after zeroing in the bath, whole-cell Vm = Vpipette - LJP.
 *
 * Concentrations or activities: the caller fills pip_mM / bath_mM with
 * either (mM == mol/m3); the equations are the same.  Only ratios of the
 * diffusion coefficients matter for every model here, so a common
 * temperature factor on all of them leaves the LJP unchanged.
 *
 * Pure functions: nothing prints; memory taken inside a call is freed
 * before it returns; the caller owns every array passed in or out.
 * Failing functions return -1 with a one-line message in err (IM_ERRLEN)
 * and leave the outputs untouched.
 */
#ifndef IONMIX_JUNCTION_H
#define IONMIX_JUNCTION_H

/* Temperatures the functions accept, C (liquid water at 1 atm). */
#define JN_T_MIN_C 0.0
#define JN_T_MAX_C 100.0
/* Most ions one call takes, and the largest |z|. */
#define JN_MAX_IONS 64
#define JN_MAX_Z 10

typedef struct jn_ion {
	const char *symbol; /* for messages and reports ('K+'); may be NULL; not owned */
	int z;              /* charge number; z == 0 (neutral) is ignored */
	double D_m2_s;      /* diffusion coefficient, m2/s (only ratios matter) */
	double pip_mM;      /* in the pipette solution, mM (conc. or activity) */
	double bath_mM;     /* in the bath, mM */
} jn_ion;

/* ---- mobilities ---- */

/* Nernst-Einstein: D = R T lambda_eq / (|z| F^2), with the equivalent
 * conductivity lambda_eq (the handbook value for 1/|z| of the ion,
 * S cm2/mol of charge, converted with 1 S cm2 = 1e-4 S m2) at t_C.  The
 * molar ionic conductivity is |z| lambda_eq, so this is the familiar
 * D = R T lambda_ion / (z^2 F^2).  K+ 73.48 at 25 C gives 1.957e-9 m2/s.
 * Returns NAN (the refdb's "unknown") when lambda is not > 0 and finite,
 * z == 0, |z| > JN_MAX_Z or t_C is outside JN_T_MIN_C..JN_T_MAX_C; the
 * jn_* equations reject such a D naming the ion. */
double jn_D_from_lambda_m2_s(double lambda_S_cm2_eq, int z, double t_C);

/* Dynamic viscosity of liquid water at 0.1 MPa, mPa s (0.8900 at 25 C),
 * from the correlation of Kestin, Sokolov & Wakeham 1978 (J Phys Chem Ref
 * Data 7:941), from memory.  NAN outside JN_T_MIN_C..JN_T_MAX_C. */
double jn_water_viscosity_mPa_s(double t_C);

/* Stokes-Einstein scaling of a 25 C diffusion coefficient to t_C:
 * D(T) = D25 (T / 298.15 K) eta(25 C) / eta(T).  The same factor for every
 * ion, so it changes no LJP; it makes reported D values real.  NAN on bad
 * input (D25 not > 0 and finite, t_C out of range). */
double jn_D_at_T_m2_s(double D25_m2_s, double t_C);

/* ---- Henderson ---- */

/* Generalized Henderson equation (Henderson 1907; the form for ions of
 * any valence of Barry & Lynch 1991, J Membr Biol 121:101), with the
 * mobility u_i taken proportional to D_i (Nernst-Einstein, u = D/RT):
 *
 *   V_bath - V_pip = (RT/F) * [sum z u (c_b - c_p) / sum z^2 u (c_b - c_p)]
 *                           * ln(sum z^2 u c_p / sum z^2 u c_b)
 *
 * It follows from zero current and linear mixing of the two solutions
 * across the junction.  Evaluated as -(RT/F) (A/B_p) log1p(x)/x, with
 * A = sum z u (c_b - c_p), B_p = sum z^2 u c_p, x = sum z^2 u (c_b - c_p)/B_p,
 * which stays accurate when the two sides have the same conductance.
 * Identical solutions give exactly 0.
 * Errors: ions NULL or n < 1 or n > JN_MAX_IONS; t_C out of range or not
 * finite; a concentration negative or not finite (ion and side named);
 * |z| > JN_MAX_Z; a charged ion present on either side whose D is not
 * > 0 and finite (named by its symbol); a side with no charged ion (named;
 * the logarithm needs ions on both sides). */
int jn_henderson_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV, char *err);

/* The same LJP split by ion: contrib_mV[i] (caller-owned, n entries) is
 * ion i's term in the numerator, z_i u_i (c_b,i - c_p,i), times the common
 * factor (RT/F) ln(B_p/B_b) / sum z^2 u (c_b - c_p); the shares add up to
 * the total (written to *ljp_mV when ljp_mV is not NULL).  A fast ion
 * leaving the pipette gives a share of its own sign; a slow partner left
 * behind (gluconate-, methanesulfonate-) cancels little of it, which is why
 * such pipettes give large LJPs.  Neutral and absent ions get 0.
 * Errors as jn_henderson_mV. */
int jn_henderson_contrib(const jn_ion *ions, int n, double t_C, double *contrib_mV,
			 double *ljp_mV, char *err);

/* ---- Planck ---- */

/* Largest net charge of a side Planck's equation accepts, as a fraction of
 * (cations + anions) / 2 of that side; within it C = (cations + anions)/2. */
#define JN_PLANCK_NEUTRAL_REL 0.02

/* Tolerance and iteration limit of the root finder (on ln xi). */
#define JN_PLANCK_TOL 1e-13
#define JN_PLANCK_MAXIT 200

/* Planck's closed form (1890) for junctions of monovalent ions (steady
 * constrained diffusion).  With U = sum over cations of u c, V = the same
 * over anions, C the total salt concentration of a side (1 = pipette,
 * 2 = bath), the LJP is (RT/F) ln xi where xi solves
 *   (xi U2 - U1) / (V2 - xi V1) =
 *       [ln(C2/C1) - ln xi] / [ln(C2/C1) + ln xi] * (xi C2 - C1) / (C2 - xi C1).
 * It is solved in y = ln xi on the bracket between ln(U1/U2) and
 * ln(V2/V1), where both sides of the equation are positive, by Brent's
 * method (tolerance JN_PLANCK_TOL on y, JN_PLANCK_MAXIT iterations; a
 * missing sign change or no convergence is an error, never a silent
 * result).  For equal concentrations it reduces to the Lewis-Sargent
 * formula (RT/F) ln((U1 + V2)/(U2 + V1)); for one salt to the
 * single-salt result (t+ - t-) (RT/F) ln(c_p/c_b).
 * Errors: those of jn_henderson_mV; an ion present with |z| != 1 (named);
 * a side whose net charge exceeds JN_PLANCK_NEUTRAL_REL (named). */
int jn_planck_classic_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV,
			 char *err);

/* Planck's model for ions of any valence: the steady (stationary)
 * electroneutral Nernst-Planck junction with Planck's boundary conditions
 * (each end holds its solution), zero current, solved numerically by
 * shooting on the fluxes with fourth-order Runge-Kutta and Newton's method
 * (details in junction.c); the step count is doubled until two results
 * agree to 1e-8 mV.  For monovalent ions it is the problem whose exact
 * solution is jn_planck_classic_mV; for a single salt it gives the exact
 * single-salt result.  A slight net charge of a side (up to
 * JN_PLANCK_NEUTRAL_REL) is carried as a linear background charge.
 * Errors: those of jn_henderson_mV; a side further from electroneutral;
 * no convergence (named). */
int jn_planck_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV, char *err);

/* ---- shared checks (for diffusion.c) ---- */

/* The input checks every model makes (see jn_henderson_mV): 0, or -1 with
 * err. */
int jn_check(const jn_ion *ions, int n, double t_C, char *err);

/* 1 when every charged ion has the same concentration on both sides. */
int jn_identical(const jn_ion *ions, int n);


#endif
