/*
 * junction.c - liquid junction potentials: Henderson, Planck, and the
 * free-diffusion electrodiffusion model.  See junction.h for the contract
 * (sign: bath relative to pipette, mV).
 */
#include "junction.h"
#include "roots.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "signals.h"

/* Largest concentration accepted, mM (100 M: beyond any solution, and far
 * from overflow in the sums). */
#define MAX_mM 1e5

/* ---- mobilities ---- */

double jn_D_from_lambda_m2_s(double lambda_S_cm2_eq, int z, double t_C)
{
	double T, az, F = IM_FARADAY_C_MOL;
	if (!isfinite(lambda_S_cm2_eq) || lambda_S_cm2_eq <= 0 || z == 0 ||
	    z > JN_MAX_Z || z < -JN_MAX_Z || !isfinite(t_C) || t_C < JN_T_MIN_C ||
	    t_C > JN_T_MAX_C)
		return NAN;
	T = t_C + IM_ZERO_C_K;
	az = z < 0 ? -(double)z : (double)z;
	/* lambda_eq in S m2 per mol of charge; ionic molar value |z| lambda_eq */
	return IM_GAS_J_MOL_K * T * (lambda_S_cm2_eq * 1e-4) / (az * F * F);
}

double jn_water_viscosity_mPa_s(double t_C)
{
	/* Kestin, Sokolov & Wakeham 1978, J Phys Chem Ref Data 7:941, from
	 * memory: log10(eta/eta20) = (20 - t)(1.2378 - 1.303e-3 (20 - t)
	 * + 3.06e-6 (20 - t)^2 + 2.55e-8 (20 - t)^3) / (96 + t), with
	 * eta20 = 1.002 mPa s.  Gives 1.792 at 0 C, 0.890 at 25 C, 0.691 at
	 * 37 C and 0.282 at 100 C, as the handbook tables (from memory). */
	double d, s;
	if (!isfinite(t_C) || t_C < JN_T_MIN_C || t_C > JN_T_MAX_C)
		return NAN;
	d = 20.0 - t_C;
	s = d * (1.2378 - 1.303e-3 * d + 3.06e-6 * d * d + 2.55e-8 * d * d * d) /
	    (96.0 + t_C);
	return 1.002 * pow(10.0, s);
}

double jn_D_at_T_m2_s(double D25_m2_s, double t_C)
{
	double eta = jn_water_viscosity_mPa_s(t_C);
	if (!isfinite(D25_m2_s) || D25_m2_s <= 0 || !isfinite(eta))
		return NAN;
	return D25_m2_s * ((t_C + IM_ZERO_C_K) / (25.0 + IM_ZERO_C_K)) *
	       (jn_water_viscosity_mPa_s(25.0) / eta);
}

/* ---- input checks shared by all models ---- */

static const char *sym(const jn_ion *x, int i, char *buf, size_t n)
{
	if (x->symbol && x->symbol[0])
		return x->symbol;
	snprintf(buf, n, "#%d", i + 1);
	return buf;
}

static int present(const jn_ion *x)
{
	return x->z != 0 && (x->pip_mM > 0 || x->bath_mM > 0);
}

/* Validate; on success *dmax holds the largest D of the present ions. */
static int check(const jn_ion *ions, int n, double t_C, double *dmax, char *err)
{
	double Bp = 0, Bb = 0, dm = 0;
	char b[24];
	if (!ions || n < 1)
		return im_fail(err, "no ions given for the junction");
	if (n > JN_MAX_IONS)
		return im_fail(err, "too many ions for one junction (%d; at most %d)", n,
			       JN_MAX_IONS);
	if (!isfinite(t_C) || t_C < JN_T_MIN_C || t_C > JN_T_MAX_C)
		return im_fail(err, "temperature %g C is outside %g to %g C", t_C,
			       JN_T_MIN_C, JN_T_MAX_C);
	for (int i = 0; i < n; i++) {
		const jn_ion *x = &ions[i];
		const char *s = sym(x, i, b, sizeof b);
		if (!isfinite(x->pip_mM) || !isfinite(x->bath_mM))
			return im_fail(err,
				       "ion %.40s: %s concentration is not a finite number",
				       s, isfinite(x->pip_mM) ? "bath" : "pipette");
		if (x->pip_mM < 0 || x->bath_mM < 0)
			return im_fail(err,
				       "ion %.40s: negative %s concentration (%g mM)", s,
				       x->pip_mM < 0 ? "pipette" : "bath",
				       x->pip_mM < 0 ? x->pip_mM : x->bath_mM);
		if (x->pip_mM > MAX_mM || x->bath_mM > MAX_mM)
			return im_fail(err, "ion %.40s: concentration above %g mM", s,
				       MAX_mM);
		if (x->z == 0)
			continue;
		if (x->z > JN_MAX_Z || x->z < -JN_MAX_Z)
			return im_fail(err, "ion %.40s: charge number %d is out of range",
				       s, x->z);
		if (!present(x))
			continue;
		if (!isfinite(x->D_m2_s) || x->D_m2_s <= 0)
			return im_fail(err,
				       "ion %.40s has no mobility (diffusion coefficient "
				       "missing or not positive)",
				       s);
		if (x->D_m2_s > dm)
			dm = x->D_m2_s;
	}
	for (int i = 0; i < n; i++)
		if (present(&ions[i])) {
			double zz = (double)ions[i].z * ions[i].z,
			       u = ions[i].D_m2_s / dm;
			Bp += zz * u * ions[i].pip_mM;
			Bb += zz * u * ions[i].bath_mM;
		}
	if (Bp <= 0 && Bb <= 0)
		return im_fail(err, "neither solution has any ions");
	if (Bp <= 0)
		return im_fail(err, "the pipette solution has no ions");
	if (Bb <= 0)
		return im_fail(err, "the bath solution has no ions");
	*dmax = dm;
	return 0;
}

int jn_identical(const jn_ion *ions, int n)
{
	for (int i = 0; i < n; i++)
		if (ions[i].z != 0 && ions[i].pip_mM != ions[i].bath_mM)
			return 0;
	return 1;
}

/* ---- Henderson ---- */

/* log1p(x)/x, accurate near x = 0; bb_bp = 1 + x computed directly. */
static double log1p_over(double x, double bb_bp)
{
	if (fabs(x) < 1e-5)
		return 1.0 - x / 2.0 + x * x / 3.0 - x * x * x / 4.0;
	if (x > -0.5)
		return log1p(x) / x;
	return log(bb_bp) / x;
}

/* The common factor f with LJP = f * sum z u (c_b - c_p), u = D/dmax. */
static double henderson_factor(const jn_ion *ions, int n, double t_C, double dmax)
{
	double Bp = 0, Bb = 0, dB = 0, x;
	for (int i = 0; i < n; i++) {
		const jn_ion *s = &ions[i];
		double zz, u;
		if (!present(s))
			continue;
		zz = (double)s->z * s->z;
		u = s->D_m2_s / dmax;
		Bp += zz * u * s->pip_mM;
		Bb += zz * u * s->bath_mM;
		dB += zz * u * (s->bath_mM - s->pip_mM);
	}
	x = dB / Bp;
	return -im_rt_f_mV(t_C) * log1p_over(x, Bb / Bp) / Bp;
}

int jn_henderson_contrib(const jn_ion *ions, int n, double t_C, double *contrib_mV,
			 double *ljp_mV, char *err)
{
	double dmax, f, sum = 0;
	if (!contrib_mV)
		return im_fail(err, "no array for the contributions");
	if (check(ions, n, t_C, &dmax, err) < 0)
		return -1;
	if (jn_identical(ions, n)) {
		for (int i = 0; i < n; i++)
			contrib_mV[i] = 0.0;
		if (ljp_mV)
			*ljp_mV = 0.0;
		return 0;
	}
	f = henderson_factor(ions, n, t_C, dmax);
	for (int i = 0; i < n; i++) {
		const jn_ion *s = &ions[i];
		double c = 0.0;
		if (present(s))
			c = f * s->z * (s->D_m2_s / dmax) * (s->bath_mM - s->pip_mM);
		contrib_mV[i] = c;
		sum += c;
	}
	if (!isfinite(sum))
		return im_fail(err, "Henderson equation: numerical overflow");
	if (ljp_mV)
		*ljp_mV = sum;
	return 0;
}

int jn_henderson_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV, char *err)
{
	double dmax, A = 0, v;
	if (check(ions, n, t_C, &dmax, err) < 0)
		return -1;
	if (jn_identical(ions, n)) {
		*ljp_mV = 0.0;
		return 0;
	}
	for (int i = 0; i < n; i++)
		if (present(&ions[i]))
			A += ions[i].z * (ions[i].D_m2_s / dmax) *
			     (ions[i].bath_mM - ions[i].pip_mM);
	v = henderson_factor(ions, n, t_C, dmax) * A;
	if (!isfinite(v))
		return im_fail(err, "Henderson equation: numerical overflow");
	*ljp_mV = v;
	return 0;
}

/* ---- Planck ---- */

/* (e^s - 1)/s, 1 at s = 0. */
static double expm1_over(double s)
{
	if (fabs(s) < 1e-8)
		return 1.0 + s / 2.0;
	return expm1(s) / s;
}

typedef struct planck_eq {
	double U1, V1, U2, V2, r; /* r = ln(C2/C1) */
} planck_eq;

/* Planck's equation multiplied out so that it has no poles: with
 * xi = e^y and h(s) = (e^s - 1)/s, the right-hand side equals
 * e^-y h(r + y) / h(r - y), so the root of
 *   f(y) = (xi U2 - U1) xi h(r - y) - (V2 - xi V1) h(r + y)
 * is the root of the original equation (h > 0 everywhere). */
static double planck_f(double y, const planck_eq *q)
{
	double xi = exp(y);
	return (xi * q->U2 - q->U1) * xi * expm1_over(q->r - y) -
	       (q->V2 - xi * q->V1) * expm1_over(q->r + y);
}

/* planck_f in the shape roots_brent wants. */
static double planck_root_fn(double y, void *q)
{
	return planck_f(y, q);
}

int jn_planck_classic_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV,
			  char *err)
{
	double dmax, cat[2] = {0, 0}, an[2] = {0, 0}, U[2] = {0, 0}, V[2] = {0, 0}, C[2];
	double lo, hi, flo, fhi, y;
	static const char *side[2] = {"pipette", "bath"};
	planck_eq q;
	char b[24], e2[IM_ERRLEN];
	if (check(ions, n, t_C, &dmax, err) < 0)
		return -1;
	for (int i = 0; i < n; i++) {
		const jn_ion *s = &ions[i];
		double u, c[2];
		if (!present(s))
			continue;
		if (s->z != 1 && s->z != -1)
			return im_fail(err,
				       "Planck's equation takes monovalent ions only; "
				       "%.40s has charge %+d",
				       sym(s, i, b, sizeof b), s->z);
		u = s->D_m2_s / dmax;
		c[0] = s->pip_mM;
		c[1] = s->bath_mM;
		for (int k = 0; k < 2; k++) {
			if (s->z > 0) {
				cat[k] += c[k];
				U[k] += u * c[k];
			} else {
				an[k] += c[k];
				V[k] += u * c[k];
			}
		}
	}
	for (int k = 0; k < 2; k++) {
		C[k] = 0.5 * (cat[k] + an[k]);
		if (fabs(cat[k] - an[k]) > JN_PLANCK_NEUTRAL_REL * C[k])
			return im_fail(err,
				       "Planck's equation needs electroneutral "
				       "solutions: the %s side has %g mM cations and %g "
				       "mM anions",
				       side[k], cat[k], an[k]);
	}
	if (jn_identical(ions, n)) {
		*ljp_mV = 0.0;
		return 0;
	}
	q.U1 = U[0];
	q.V1 = V[0];
	q.U2 = U[1];
	q.V2 = V[1];
	q.r = log(C[1] / C[0]);
	lo = log(q.U1 / q.U2);
	hi = log(q.V2 / q.V1);
	if (lo > hi) {
		double t = lo;
		lo = hi;
		hi = t;
	}
	if (hi - lo <= JN_PLANCK_TOL) {
		y = 0.5 * (lo + hi);
	} else {
		flo = planck_f(lo, &q);
		fhi = planck_f(hi, &q);
		if (flo == 0.0)
			y = lo;
		else if (fhi == 0.0)
			y = hi;
		else if ((flo > 0) == (fhi > 0) || !isfinite(flo) || !isfinite(fhi))
			return im_fail(err,
				       "Planck's equation: no sign change on the bracket "
				       "[%g, %g] of ln xi",
				       lo, hi);
		else if (roots_brent(planck_root_fn, &q, lo, hi, flo, fhi, JN_PLANCK_TOL, 0.0,
				     JN_PLANCK_MAXIT, &y, e2) < 0)
			return im_fail(err, "Planck's equation: %s", e2);
	}
	*ljp_mV = im_rt_f_mV(t_C) * y;
	return 0;
}

int jn_check(const jn_ion *ions, int n, double t_C, char *err)
{
	double dmax;
	return check(ions, n, t_C, &dmax, err);
}

/* ---- Planck, any valence ----
 *
 * Steady electrodiffusion across a layer 0 <= x <= 1 whose ends hold the
 * two solutions (Planck's boundary conditions), with constant fluxes
 * J_i = -d_i (c_i' + z_i c_i psi'), zero current sum z_i J_i = 0 and
 * electroneutrality sum z_i c_i = rho(x), rho linear between the net
 * charges of the two sides (0 for balanced solutions).  Differentiating
 * electroneutrality gives psi' = -(sum z_i J_i / d_i + rho') / K with
 * K = sum z_i^2 c_i, so for given fluxes the profile is an initial-value
 * problem from the pipette end.  Where a side is dilute, psi' grows as
 * 1/K; so the ODE is integrated in t with dx/dt = S K / K(0), in which
 * psi is linear and the profiles smooth, and the length S that brings x
 * to 1 is one more unknown.  Shooting: Newton's method on (J, S)
 * (Jacobian by forward differences, steps halved until the residual
 * falls) so that c_i(1) meets the bath for every ion but one (which
 * electroneutrality then fixes), the current is zero and x ends at 1.
 * The classical Runge-Kutta method on PL_STEPS0 steps, then on twice as
 * many from the converged unknowns until two results differ by less than
 * PL_TOL_mV (fourth order: the error is below a fifteenth of that).
 */
/* The fuzz build (make fuzz; FUZZING_BUILD_MODE_UNSAFE_FOR_PRODUCTION is
 * set there alone) bounds the work one input can ask for: at most 400
 * steps (three Newton solves: 100, 200, 400) for an agreement of 1e-4 mV,
 * so that both agreement and its failure within the limit are common; the
 * first solve is the normal build's.  Results there differ from the normal
 * build's, which these never change. */
#define PL_STEPS0 100
#ifdef FUZZING_BUILD_MODE_UNSAFE_FOR_PRODUCTION
#define PL_STEPS_MAX 400
#define PL_TOL_mV 1e-4
#else
#define PL_STEPS_MAX 25600
#define PL_TOL_mV 1e-8
#endif
#define PL_RES_TOL 1e-13
#define PL_MAXIT 60

typedef struct pl_sys {
	int n, e;
	double z[JN_MAX_IONS], d[JN_MAX_IONS], cp[JN_MAX_IONS], cb[JN_MAX_IONS];
	double zz[JN_MAX_IONS]; /* z_i^2 */
	double rho_p, rho_b, K0;
} pl_sys;

/* What the right-hand side takes from the unknowns P = (J, S), fixed
 * for a whole shot: -J_i / d_i and the numerator of -psi' K. */
typedef struct pl_flux {
	double a[JN_MAX_IONS];  /* -J_i / d_i */
	double num;             /* rho_b - rho_p + sum z_i J_i / d_i */
	double S;
} pl_flux;

static void pl_flux_of(const pl_sys *q, const double *P, pl_flux *f)
{
	f->num = q->rho_b - q->rho_p;
	for (int i = 0; i < q->n; i++) {
		f->num += q->z[i] * P[i] / q->d[i];
		f->a[i] = -P[i] / q->d[i];
	}
	f->S = P[q->n];
}

/* d/dt of y = (c_0 .. c_n-1, x, psi) for the unknowns in f. */
static int pl_rhs(const pl_sys *q, const pl_flux *f, const double *y, double *dy)
{
	int n = q->n;
	double K = 0, p, g;
	for (int i = 0; i < n; i++)
		K += q->zz[i] * y[i];
	if (!(K > 0) || !isfinite(K))
		return -1;
	p = -f->num / K;
	g = f->S * K / q->K0;
	for (int i = 0; i < n; i++)
		dy[i] = g * (f->a[i] - q->z[i] * y[i] * p);
	dy[n] = g;
	dy[n + 1] = g * p;
	return 0;
}

/* Integrate t from 0 to 1 in N RK4 steps; the end state in y1.  -1 when
 * the conductance vanishes on the way. */
static int pl_shoot(const pl_sys *q, const double *P, int N, double *y1)
{
	int m = q->n + 2;
	double y[JN_MAX_IONS + 2], t[JN_MAX_IONS + 2], k1[JN_MAX_IONS + 2],
		k2[JN_MAX_IONS + 2], k3[JN_MAX_IONS + 2], k4[JN_MAX_IONS + 2], h = 1.0 / N;
	pl_flux f;
	pl_flux_of(q, P, &f);
	memcpy(y, q->cp, q->n * sizeof *y);
	y[q->n] = y[q->n + 1] = 0.0;
	for (int s = 0; s < N; s++) {
		if (pl_rhs(q, &f, y, k1))
			return -1;
		for (int i = 0; i < m; i++)
			t[i] = y[i] + 0.5 * h * k1[i];
		if (pl_rhs(q, &f, t, k2))
			return -1;
		for (int i = 0; i < m; i++)
			t[i] = y[i] + 0.5 * h * k2[i];
		if (pl_rhs(q, &f, t, k3))
			return -1;
		for (int i = 0; i < m; i++)
			t[i] = y[i] + h * k3[i];
		if (pl_rhs(q, &f, t, k4))
			return -1;
		for (int i = 0; i < m; i++)
			y[i] += h / 6.0 * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
	}
	memcpy(y1, y, m * sizeof *y);
	return 0;
}

/* Residual of the shooting problem (n + 1 entries); its max norm in *nrm
 * and psi(1) - psi(0) in *psi. */
static int pl_res(const pl_sys *q, const double *P, int N, double *r, double *nrm,
		  double *psi)
{
	double y1[JN_MAX_IONS + 2], cur = 0, m = 0;
	int k = 0, n = q->n;
	if (!(P[n] > 0) || pl_shoot(q, P, N, y1))
		return -1;
	for (int i = 0; i < n; i++) {
		cur += q->z[i] * P[i];
		if (i != q->e)
			r[k++] = y1[i] - q->cb[i];
	}
	r[k++] = cur;
	r[k] = y1[n] - 1.0;
	for (int i = 0; i <= n; i++)
		m = fmax(m, fabs(r[i]));
	*nrm = m;
	*psi = y1[n + 1];
	return 0;
}

/* Gaussian elimination with partial pivoting, a n x n, b n; -1 if singular. */
static int pl_solve(double *a, double *b, int n)
{
	for (int k = 0; k < n; k++) {
		int p = k;
		for (int i = k + 1; i < n; i++)
			if (fabs(a[i * n + k]) > fabs(a[p * n + k]))
				p = i;
		if (!(fabs(a[p * n + k]) > 0))
			return -1;
		if (p != k) {
			double t;
			for (int j = 0; j < n; j++) {
				t = a[k * n + j];
				a[k * n + j] = a[p * n + j];
				a[p * n + j] = t;
			}
			t = b[k];
			b[k] = b[p];
			b[p] = t;
		}
		for (int i = k + 1; i < n; i++) {
			double f = a[i * n + k] / a[k * n + k];
			for (int j = k; j < n; j++)
				a[i * n + j] -= f * a[k * n + j];
			b[i] -= f * b[k];
		}
	}
	for (int i = n - 1; i >= 0; i--) {
		for (int j = i + 1; j < n; j++)
			b[i] -= a[i * n + j] * b[j];
		b[i] /= a[i * n + i];
	}
	return 0;
}

/* The Jacobian of the residual at P (m x m, row-major, into J) by
 * forward differences; r is the residual at P. */
static int pl_jacobian(const pl_sys *q, const double *P, int N, const double *r, double *J)
{
	int m = q->n + 1;
	double rt[JN_MAX_IONS + 1], Pt[JN_MAX_IONS + 1], nt, pt, jmax = 0;
	for (int j = 0; j < m - 1; j++)
		jmax = fmax(jmax, fabs(P[j]));
	for (int j = 0; j < m; j++) {
		double h = j < m - 1 ? 1e-7 * fmax(fabs(P[j]), 1e-3 * fmax(jmax, 1e-12))
				     : 1e-7 * P[j];
		memcpy(Pt, P, m * sizeof *P);
		Pt[j] += h;
		if (pl_res(q, Pt, N, rt, &nt, &pt))
			return -1;
		for (int i = 0; i < m; i++)
			J[i * m + j] = (rt[i] - r[i]) / h;
	}
	return 0;
}

/* Newton on the unknowns P = (J, S) (in place) with N steps; psi at the
 * solution.  J (m x m) carries a Jacobian between calls: when *have_jac,
 * it is tried first as it stands (a chord step, full length only, kept
 * while it divides the residual by ten or more); a chord step that does
 * not lower the residual is dropped and the Jacobian recomputed, after
 * which the step is cut back until the residual falls.  The answer meets
 * the same test either way: the max norm of the residual below
 * PL_RES_TOL (or no decrease possible below 1e3 PL_RES_TOL).  A refined
 * grid starts from the last one's answer, where a shot or two with the
 * kept Jacobian replace the n + 1 shots of a new one.  -2 when a Ctrl-C
 * in the shell cancelled it (polled at every iteration). */
static int pl_newton(const pl_sys *q, double *P, int N, double *J, int *have_jac,
		     double *psi)
{
	int m = q->n + 1;
	double r[JN_MAX_IONS + 1], rt[JN_MAX_IONS + 1], Pt[JN_MAX_IONS + 1], nrm, nt, pt;
	double *A = im_xmalloc(sizeof(double) * m * m);
	int rc = -1;
	if (pl_res(q, P, N, r, &nrm, psi))
		goto out;
	for (int it = 0; it < PL_MAXIT; it++) {
		double a = 1.0;
		int chord = *have_jac;
		if (nrm < PL_RES_TOL) {
			rc = 0;
			goto out;
		}
		if (sig_cancelled()) {
			rc = -2;
			goto out;
		}
		if (!chord) {
			if (pl_jacobian(q, P, N, r, J))
				goto out;
			*have_jac = 1;
		}
		memcpy(A, J, sizeof(double) * m * m);
		for (int i = 0; i < m; i++)
			rt[i] = -r[i];
		if (pl_solve(A, rt, m)) {
			*have_jac = 0;
			if (chord)
				continue;
			goto out;
		}
		nt = INFINITY;
		for (int cut = 0; cut < (chord ? 1 : 30); cut++, a *= 0.5) {
			double rr[JN_MAX_IONS + 1];
			for (int j = 0; j < m; j++)
				Pt[j] = P[j] + a * rt[j];
			if (pl_res(q, Pt, N, rr, &nt, &pt) == 0 && nt < nrm) {
				memcpy(r, rr, m * sizeof *r);
				break;
			}
			nt = INFINITY;
		}
		if (!(nt < nrm)) {
			*have_jac = 0;
			if (chord)
				continue; /* a new Jacobian next */
			/* no decrease: converged to rounding, or stuck */
			rc = nrm < 1e3 * PL_RES_TOL ? 0 : -1;
			goto out;
		}
		if (chord && !(nt < 0.1 * nrm))
			*have_jac = 0; /* slow: a new Jacobian next */
		memcpy(P, Pt, m * sizeof *P);
		nrm = nt;
		*psi = pt;
	}
	rc = nrm < 1e3 * PL_RES_TOL ? 0 : -1;
out:
	free(A);
	return rc;
}

int jn_planck_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV, char *err)
{
	pl_sys q;
	double dmax, cs = 0, P[JN_MAX_IONS + 1], rtf, psi = 0, prev, hend, best = -1, Kb = 0,
							       ratio;
	double tot[2] = {0, 0}, *J;
	int N, have_jac = 0, rc = -1, nrc;
	if (check(ions, n, t_C, &dmax, err) < 0)
		return -1;
	if (jn_identical(ions, n)) {
		*ljp_mV = 0.0;
		return 0;
	}
	memset(&q, 0, sizeof q);
	for (int i = 0; i < n; i++)
		if (present(&ions[i]))
			cs = fmax(cs, abs(ions[i].z) * fmax(ions[i].pip_mM, ions[i].bath_mM));
	for (int i = 0; i < n; i++) {
		const jn_ion *x = &ions[i];
		int k = q.n;
		if (!present(x))
			continue;
		q.z[k] = x->z;
		q.zz[k] = q.z[k] * q.z[k];
		q.d[k] = x->D_m2_s / dmax;
		q.cp[k] = x->pip_mM / cs;
		q.cb[k] = x->bath_mM / cs;
		q.rho_p += q.z[k] * q.cp[k];
		q.rho_b += q.z[k] * q.cb[k];
		q.K0 += q.z[k] * q.z[k] * q.cp[k];
		Kb += q.z[k] * q.z[k] * q.cb[k];
		tot[0] += abs(x->z) * q.cp[k];
		tot[1] += abs(x->z) * q.cb[k];
		/* the ion left to electroneutrality: the most present on both sides */
		if (fmin(q.cp[k], q.cb[k]) * abs(x->z) > best) {
			best = fmin(q.cp[k], q.cb[k]) * abs(x->z);
			q.e = k;
		}
		q.n++;
	}
	for (int k = 0; k < 2; k++) {
		double net = k ? q.rho_b : q.rho_p;
		if (fabs(net) > JN_PLANCK_NEUTRAL_REL * 0.5 * tot[k])
			return im_fail(err,
				       "Planck's model needs electroneutral solutions: the %s "
				       "side has a net charge of %+.3g mEq/L",
				       k ? "bath" : "pipette", net * cs);
	}
	rtf = im_rt_f_mV(t_C);
	if (jn_henderson_mV(ions, n, t_C, &hend, err))
		return -1;
	/* start: linear profiles with Henderson's potential drop; S for a
	 * conductance linear in x */
	for (int i = 0; i < q.n; i++)
		P[i] = -q.d[i] * (q.cb[i] - q.cp[i] +
				  q.z[i] * 0.5 * (q.cp[i] + q.cb[i]) * hend / rtf);
	ratio = Kb / q.K0;
	P[q.n] = fabs(ratio - 1.0) < 1e-9 ? 1.0 : log(ratio) / (ratio - 1.0);
	N = PL_STEPS0;
	J = im_xmalloc(sizeof(double) * (q.n + 1) * (q.n + 1));
	nrc = pl_newton(&q, P, N, J, &have_jac, &psi);
	if (nrc) {
		im_fail(err, "Planck: %s", nrc == -2 ? SIG_CANCELLED_MSG
					: "the shooting method did not converge");
		goto out;
	}
	for (;;) {
		prev = psi;
		N *= 2;
		if (N > PL_STEPS_MAX) {
			im_fail(err, "Planck: no agreement between step sizes within %d steps",
				PL_STEPS_MAX);
			goto out;
		}
		nrc = pl_newton(&q, P, N, J, &have_jac, &psi);
		if (nrc == -2) {
			im_fail(err, "Planck: %s", SIG_CANCELLED_MSG);
			goto out;
		}
		if (nrc) {
			im_fail(err, "Planck: the shooting method did not converge on %d steps",
				N);
			goto out;
		}
		if (fabs(psi - prev) * rtf < PL_TOL_mV)
			break;
	}
	*ljp_mV = rtf * psi;
	rc = 0;
out:
	free(J);
	return rc;
}
