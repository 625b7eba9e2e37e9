/*
 * junction.h - liquid junction potentials (LJP) between a pipette solution
 * and a bath: the Henderson equation (any valence) with a per-ion
 * breakdown, Planck's equation (monovalent ions), a numerical
 * free-diffusion electrodiffusion model, and the mobility helpers they use
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

/* Planck's equation (1890) for junctions of monovalent ions (steady
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
int jn_planck_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV, char *err);

/* ---- free diffusion (numerical electrodiffusion) ---- */

typedef struct jn_diffusion_opts {
	int grid_points;     /* nodes of the first grid (odd, >= 21); default 161 */
	int max_grid_points; /* largest grid refinement may reach; default 5121 */
	double tol_mV;       /* target estimated discretization error; default 0.002 */
	double step_tol_mV;  /* steady when the LJP changes less per step; default 1e-9 */
	int max_steps;       /* pseudo-time steps allowed per grid; default 200 */
} jn_diffusion_opts;

typedef struct jn_diffusion_report {
	int grid_points;       /* nodes of the final grid */
	int grids;             /* grids solved (each a refinement of the last) */
	int steps;             /* pseudo-time steps taken, all grids (rejected too) */
	double zeta_max;       /* half-width of the domain, units of sqrt(D_max t) */
	double dt;             /* last pseudo-time step, units of ln t */
	double last_change_mV; /* change of the LJP over the last step */
	double residual;       /* largest scaled residual at the end */
	double coarse_ljp_mV;  /* result on the grid before the final one */
	double grid_err_mV;    /* estimated discretization error of the result */
} jn_diffusion_report;

void jn_diffusion_defaults(jn_diffusion_opts *o);

/* Free-diffusion junction: the pipette solution (x < 0) and the bath
 * (x > 0) meet in a sharp step at t = 0 and diffuse freely into each other
 * (Nernst-Planck fluxes, zero current, electroneutrality).  The profile is
 * self-similar in x/sqrt(t), so the LJP is the same at every t > 0; the
 * model solves for that profile numerically (method in junction.c) and
 * returns the potential difference between the two far ends.  Any set of
 * ions and valences.  opts may be NULL (defaults); rep may be NULL.
 * Errors: those of jn_henderson_mV; options out of range; a solver that
 * did not reach steady state or the error tolerance within its limits
 * (never a silent unconverged result). */
int jn_diffusion_mV(const jn_ion *ions, int n, double t_C, const jn_diffusion_opts *opts,
		    jn_diffusion_report *rep, double *ljp_mV, char *err);

#endif
