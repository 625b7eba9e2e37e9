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

static int identical(const jn_ion *ions, int n)
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
	if (identical(ions, n)) {
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
	if (identical(ions, n)) {
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

int jn_planck_mV(const jn_ion *ions, int n, double t_C, double *ljp_mV, char *err)
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
	if (identical(ions, n)) {
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

/* ---- free diffusion ----
 *
 * Model.  c_i(x, t) for x < 0 starts as the pipette solution, for x > 0 as
 * the bath.  Fluxes J_i = -D_i (dc_i/dx + z_i c_i dpsi/dx), psi = F phi/RT;
 * zero current, sum z_i J_i = 0, gives dpsi/dx = -sum z D dc/dx / sum z^2 D c;
 * electroneutrality holds the net charge where it was (a step at x = 0; 0
 * for electroneutral solutions).  The solution is self-similar: with the
 * Boltzmann variable zeta = x / sqrt(D_max t) and s = ln t the equations
 * become
 *     dc_i/ds = d/dzeta[d_i (c_i' + z_i c_i psi')] + (zeta/2) c_i',
 * d_i = D_i/D_max, and the free junction is the steady state of this
 * equation (the LJP is the same at every t > 0).
 *
 * Discretization.  Finite volumes on zeta in [-Z, Z], Z = DIFF_ZETA_MAX
 * (the fastest ion's profile is erfc(zeta/2): 2e-17 of the step at the
 * ends), nodes stretched toward zeta = 0 by zeta = Z sinh(b s)/sinh(b),
 * s uniform on [-1, 1]; Dirichlet ends (the two solutions).  Face fluxes
 * use arithmetic means of c and of the conductance K = sum z^2 d c, which
 * makes the current exactly zero at every face.  One ion (the one most
 * present on both sides) is eliminated by electroneutrality.  The
 * potential difference is summed over the cells as the Henderson
 * potential of each cell, -G / logmean(K_a, K_b) with G = sum z d dc; this
 * makes it exact for a single salt on any grid and second-order accurate
 * otherwise.
 *
 * Solution.  Implicit Euler in s from a smooth start (both solutions mixed
 * along one erfc profile), every step one Newton linearization solved by
 * block-tridiagonal elimination; the step grows eightfold after every
 * accepted step, so the stepping becomes Newton's method (pseudo-transient
 * continuation); a step that would make the conductance non-positive is
 * taken back and retried eight times shorter.  A grid is steady when, at a
 * step of at least DIFF_DS_NEWTON, the LJP changes by less than
 * step_tol_mV and no concentration by more than DIFF_DC_TOL (of the largest
 * concentration).  Then the grid is refined (interval halved, the solution
 * interpolated as the start) and solved again; (E_fine - E_coarse)/3 is
 * the error estimate (second order), and refinement stops when it is
 * below tol_mV.  Limits exceeded are errors.
 */

#define DIFF_ZETA_MAX 12.0
#define DIFF_STRETCH 2.5
#define DIFF_DS0 1.0
#define DIFF_DS_GROW 8.0
#define DIFF_DS_MAX 1e14
#define DIFF_DS_MIN 1e-9
#define DIFF_DS_NEWTON 1e8
#define DIFF_DC_TOL 1e-10
/* Largest block-system storage, in doubles (about 200 MB). */
#define DIFF_MAX_DOUBLES 25000000.0

void jn_diffusion_defaults(jn_diffusion_opts *o)
{
	o->grid_points = 161;
	o->max_grid_points = 5121;
	o->tol_mV = 0.002;
	o->step_tol_mV = 1e-9;
	o->max_steps = 200;
}

typedef struct dsys {
	int na, nu, e;        /* active ions, unknowns per node, eliminated ion */
	int unk[JN_MAX_IONS]; /* unknown slot -> active ion */
	double z[JN_MAX_IONS], d[JN_MAX_IONS], cp[JN_MAX_IONS], cb[JN_MAX_IONS];
	double rho_p, rho_b;    /* net charge of each side, scaled */
	int M;                  /* nodes */
	double *zeta, *w, *rho; /* node positions, cell widths, net charge */
	double *C;              /* M x na concentrations, scaled */
	double *R, *A, *B, *Cu; /* residual and blocks, (M-2) x nu (x nu) */
	double *save;           /* M x na, state before a step */
	int *piv;
} dsys;

static void dsys_free(dsys *s)
{
	free(s->zeta);
	free(s->w);
	free(s->rho);
	free(s->C);
	free(s->R);
	free(s->A);
	free(s->B);
	free(s->Cu);
	free(s->save);
	free(s->piv);
	s->zeta = s->w = s->rho = s->C = s->R = s->A = s->B = s->Cu = s->save = NULL;
	s->piv = NULL;
}

static void dsys_grid(dsys *s, int M)
{
	int mi = M - 2, nn = s->nu * s->nu;
	s->M = M;
	s->zeta = im_xmalloc(sizeof(double) * M);
	s->w = im_xmalloc(sizeof(double) * M);
	s->rho = im_xmalloc(sizeof(double) * M);
	s->C = im_xmalloc(sizeof(double) * M * s->na);
	s->save = im_xmalloc(sizeof(double) * M * s->na);
	s->R = im_xmalloc(sizeof(double) * mi * (s->nu ? s->nu : 1));
	s->A = im_xmalloc(sizeof(double) * mi * (nn ? nn : 1));
	s->B = im_xmalloc(sizeof(double) * mi * (nn ? nn : 1));
	s->Cu = im_xmalloc(sizeof(double) * mi * (nn ? nn : 1));
	s->piv = im_xmalloc(sizeof(int) * (s->nu ? s->nu : 1));
	for (int k = 0; k < M; k++) {
		double sk = -1.0 + 2.0 * k / (M - 1);
		s->zeta[k] = DIFF_ZETA_MAX * sinh(DIFF_STRETCH * sk) / sinh(DIFF_STRETCH);
	}
	s->zeta[(M - 1) / 2] = 0.0;
	for (int k = 0; k < M; k++) {
		s->w[k] = 0.5 *
			  (s->zeta[k < M - 1 ? k + 1 : k] - s->zeta[k > 0 ? k - 1 : k]);
		s->rho[k] = s->zeta[k] < 0   ? s->rho_p
			    : s->zeta[k] > 0 ? s->rho_b
					     : 0.5 * (s->rho_p + s->rho_b);
	}
}

/* The eliminated ion at node k from electroneutrality. */
static void fill_elim(const dsys *s, double *Ck, int k)
{
	double q = s->rho[k];
	for (int j = 0; j < s->na; j++)
		if (j != s->e)
			q -= s->z[j] * Ck[j];
	Ck[s->e] = q / s->z[s->e];
}

static double cond(const dsys *s, const double *Ck)
{
	double K = 0;
	for (int j = 0; j < s->na; j++)
		K += s->z[j] * s->z[j] * s->d[j] * Ck[j];
	return K;
}

static double logmean(double a, double b)
{
	double q;
	if (a == b)
		return a;
	q = log(b / a);
	if (fabs(q) < 1e-6)
		return a * (1.0 + q / 2.0 + q * q / 6.0);
	return (b - a) / q;
}

/* The LJP of the state, units of RT/F; 0 and *E, or -1 when some node's
 * conductance is not positive. */
static int dsys_ljp(const dsys *s, double *E)
{
	double sum = 0, Ka = cond(s, s->C);
	if (!(Ka > 0))
		return -1;
	for (int k = 0; k + 1 < s->M; k++) {
		const double *a = s->C + k * s->na, *b = a + s->na;
		double Kb = cond(s, b), G = 0;
		if (!(Kb > 0) || !isfinite(Kb))
			return -1;
		for (int j = 0; j < s->na; j++)
			G += s->z[j] * s->d[j] * (b[j] - a[j]);
		sum -= G / logmean(Ka, Kb);
		Ka = Kb;
	}
	if (!isfinite(sum))
		return -1;
	*E = sum;
	return 0;
}

/* Flux of each unknown species through the face between nodes a and a+1,
 * and its derivatives by the unknowns of node a (Fa) and a+1 (Fb). */
static void face(const dsys *s, int a, double *F, double *Fa, double *Fb, double *cae,
		 double *cbe)
{
	const double *ca = s->C + a * s->na, *cb = ca + s->na;
	double h = s->zeta[a + 1] - s->zeta[a];
	double Km = 0.5 * (cond(s, ca) + cond(s, cb)), G = 0, g;
	int nu = s->nu, e = s->e;
	for (int j = 0; j < s->na; j++)
		G += s->z[j] * s->d[j] * (cb[j] - ca[j]);
	g = G / Km;
	/* d(G/Km)/dc_j at node b and node a, then chained through the
	 * eliminated ion: dc_e/dc_j = -z_j/z_e */
	{
		double ze = s->z[e], de = s->d[e];
		double gb_e = (ze * de - 0.5 * g * ze * ze * de) / Km;
		double ga_e = (-ze * de - 0.5 * g * ze * ze * de) / Km;
		for (int q = 0; q < nu; q++) {
			int j = s->unk[q];
			double zj = s->z[j], dj = s->d[j];
			cbe[q] = (zj * dj - 0.5 * g * zj * zj * dj) / Km -
				 (zj / ze) * gb_e;
			cae[q] = (-zj * dj - 0.5 * g * zj * zj * dj) / Km -
				 (zj / ze) * ga_e;
		}
	}
	for (int p = 0; p < nu; p++) {
		int i = s->unk[p];
		double zi = s->z[i], f = s->d[i] / h, cm = 0.5 * (ca[i] + cb[i]);
		F[p] = f * (cb[i] - ca[i] - zi * cm * g);
		for (int q = 0; q < nu; q++) {
			Fb[p * nu + q] = -f * zi * cm * cbe[q];
			Fa[p * nu + q] = -f * zi * cm * cae[q];
		}
		Fb[p * nu + p] += f * (1.0 - 0.5 * zi * g);
		Fa[p * nu + p] += f * (-1.0 - 0.5 * zi * g);
	}
}

/* Residual and Jacobian blocks at pseudo-time step ds; returns max |R|. */
static double assemble(dsys *s, double ds)
{
	int nu = s->nu, nn = nu * nu, M = s->M;
	double F0[JN_MAX_IONS], F1[JN_MAX_IONS], cae[JN_MAX_IONS], cbe[JN_MAX_IONS];
	double *Fa0 = im_xmalloc(sizeof(double) * nn),
	       *Fb0 = im_xmalloc(sizeof(double) * nn);
	double *Fa1 = im_xmalloc(sizeof(double) * nn),
	       *Fb1 = im_xmalloc(sizeof(double) * nn);
	double rmax = 0;
	face(s, 0, F0, Fa0, Fb0, cae, cbe);
	for (int k = 1; k < M - 1; k++) {
		int r = k - 1;
		double *R = s->R + r * nu, *A = s->A + r * nn, *B = s->B + r * nn;
		double *Cu = s->Cu + r * nn, adv = s->zeta[k] / 4.0, tau = s->w[k] / ds;
		double *t;
		face(s, k, F1, Fa1, Fb1, cae, cbe);
		for (int p = 0; p < nu; p++) {
			int i = s->unk[p];
			R[p] = F1[p] - F0[p] +
			       adv * (s->C[(k + 1) * s->na + i] -
				      s->C[(k - 1) * s->na + i]);
			if (fabs(R[p]) > rmax)
				rmax = fabs(R[p]);
			for (int q = 0; q < nu; q++) {
				A[p * nu + q] = -Fa0[p * nu + q];
				B[p * nu + q] = Fa1[p * nu + q] - Fb0[p * nu + q];
				Cu[p * nu + q] = Fb1[p * nu + q];
			}
			A[p * nu + p] -= adv;
			Cu[p * nu + p] += adv;
			B[p * nu + p] -= tau;
		}
		memcpy(F0, F1, sizeof(double) * nu);
		t = Fa0, Fa0 = Fa1, Fa1 = t;
		t = Fb0, Fb0 = Fb1, Fb1 = t;
	}
	free(Fa0);
	free(Fb0);
	free(Fa1);
	free(Fb1);
	return rmax;
}

/* LU with partial pivoting of the n x n row-major a; -1 when singular. */
static int lu(double *a, int n, int *piv)
{
	for (int c = 0; c < n; c++) {
		int p = c;
		for (int r = c + 1; r < n; r++)
			if (fabs(a[r * n + c]) > fabs(a[p * n + c]))
				p = r;
		if (!(fabs(a[p * n + c]) > 0) || !isfinite(a[p * n + c]))
			return -1;
		piv[c] = p;
		if (p != c)
			for (int j = 0; j < n; j++) {
				double t = a[c * n + j];
				a[c * n + j] = a[p * n + j];
				a[p * n + j] = t;
			}
		for (int r = c + 1; r < n; r++) {
			double m = a[r * n + c] / a[c * n + c];
			a[r * n + c] = m;
			for (int j = c + 1; j < n; j++)
				a[r * n + j] -= m * a[c * n + j];
		}
	}
	return 0;
}

static void lu_solve(const double *a, int n, const int *piv, double *b)
{
	for (int c = 0; c < n; c++) {
		double t;
		if (piv[c] != c) {
			t = b[c];
			b[c] = b[piv[c]];
			b[piv[c]] = t;
		}
		for (int r = c + 1; r < n; r++)
			b[r] -= a[r * n + c] * b[c];
	}
	for (int c = n - 1; c >= 0; c--) {
		for (int j = c + 1; j < n; j++)
			b[c] -= a[c * n + j] * b[j];
		b[c] /= a[c * n + c];
	}
}

/* Solve the block-tridiagonal system J delta = -R in place: on return
 * s->R holds delta.  -1 when a block is singular. */
static int block_solve(dsys *s)
{
	int nu = s->nu, nn = nu * nu, mi = s->M - 2;
	double col[JN_MAX_IONS], *tmp = im_xmalloc(sizeof(double) * nn);
	for (int r = 0; r < mi; r++) {
		double *A = s->A + r * nn, *B = s->B + r * nn, *Cu = s->Cu + r * nn;
		double *y = s->R + r * nu;
		for (int p = 0; p < nu; p++)
			y[p] = -y[p];
		if (r > 0) {
			const double *X = s->Cu + (r - 1) * nn, *yp = s->R + (r - 1) * nu;
			for (int p = 0; p < nu; p++) {
				for (int q = 0; q < nu; q++) {
					double t = 0;
					for (int m = 0; m < nu; m++)
						t += A[p * nu + m] * X[m * nu + q];
					tmp[p * nu + q] = t;
				}
				for (int m = 0; m < nu; m++)
					y[p] -= A[p * nu + m] * yp[m];
			}
			for (int m = 0; m < nn; m++)
				B[m] -= tmp[m];
		}
		if (lu(B, nu, s->piv) < 0) {
			free(tmp);
			return -1;
		}
		if (r < mi - 1)
			for (int q = 0; q < nu; q++) {
				for (int p = 0; p < nu; p++)
					col[p] = Cu[p * nu + q];
				lu_solve(B, nu, s->piv, col);
				for (int p = 0; p < nu; p++)
					Cu[p * nu + q] = col[p];
			}
		lu_solve(B, nu, s->piv, y);
	}
	for (int r = mi - 2; r >= 0; r--) {
		const double *X = s->Cu + r * nn, *yn = s->R + (r + 1) * nu;
		double *y = s->R + r * nu;
		for (int p = 0; p < nu; p++)
			for (int q = 0; q < nu; q++)
				y[p] -= X[p * nu + q] * yn[q];
	}
	free(tmp);
	return 0;
}

/* Steady state on the current grid from the current state. */
static int dsys_solve(dsys *s, const jn_diffusion_opts *o, double ds, double rtf,
		      jn_diffusion_report *rep, double *E, char *err)
{
	double E0, E1, rmax = 0;
	size_t nbytes = sizeof(double) * (size_t)s->M * (size_t)s->na;
	if (dsys_ljp(s, &E0) < 0)
		return im_fail(err,
			       "diffusion model: non-positive conductance in the start");
	if (s->nu == 0) { /* one ion species: nothing to solve */
		*E = E0;
		rep->dt = 0;
		rep->last_change_mV = 0;
		rep->residual = 0;
		return 0;
	}
	for (int step = 0; step < o->max_steps; step++) {
		double dmax = 0;
		int ok = 1;
		rep->steps++;
		memcpy(s->save, s->C, nbytes);
		rmax = assemble(s, ds);
		if (block_solve(s) < 0) {
			ok = 0;
		} else {
			for (int k = 1; k < s->M - 1; k++) {
				double *Ck = s->C + k * s->na;
				const double *dk = s->R + (k - 1) * s->nu;
				for (int p = 0; p < s->nu; p++) {
					Ck[s->unk[p]] += dk[p];
					if (fabs(dk[p]) > dmax)
						dmax = fabs(dk[p]);
				}
				fill_elim(s, Ck, k);
			}
			if (!isfinite(dmax) || dsys_ljp(s, &E1) < 0)
				ok = 0;
		}
		if (!ok) {
			memcpy(s->C, s->save, nbytes);
			ds /= DIFF_DS_GROW;
			if (ds < DIFF_DS_MIN)
				return im_fail(err,
					       "diffusion model: step size underflow at "
					       "step %d",
					       step + 1);
			continue;
		}
		rep->dt = ds;
		rep->last_change_mV = fabs(E1 - E0) * rtf;
		rep->residual = rmax;
		E0 = E1;
		if (ds >= DIFF_DS_NEWTON && rep->last_change_mV <= o->step_tol_mV &&
		    dmax <= DIFF_DC_TOL) {
			*E = E1;
			return 0;
		}
		ds = fmin(ds * DIFF_DS_GROW, DIFF_DS_MAX);
	}
	return im_fail(err,
		       "diffusion model: not steady after %d steps on %d points (last "
		       "change %.3g mV)",
		       o->max_steps, s->M, rep->last_change_mV);
}

static int check_opts(const jn_diffusion_opts *o, char *err)
{
	if (o->grid_points < 21 || o->grid_points % 2 == 0 || o->grid_points > 1000001)
		return im_fail(err,
			       "diffusion model: grid_points must be odd, 21 or more");
	if (o->max_grid_points < o->grid_points || o->max_grid_points > 1000001)
		return im_fail(err,
			       "diffusion model: max_grid_points below grid_points or "
			       "too large");
	if (!isfinite(o->tol_mV) || o->tol_mV <= 0)
		return im_fail(err, "diffusion model: tol_mV must be > 0");
	if (!isfinite(o->step_tol_mV) || o->step_tol_mV <= 0)
		return im_fail(err, "diffusion model: step_tol_mV must be > 0");
	if (o->max_steps < 1 || o->max_steps > 100000)
		return im_fail(err, "diffusion model: max_steps must be 1 to 100000");
	return 0;
}

int jn_diffusion_mV(const jn_ion *ions, int n, double t_C, const jn_diffusion_opts *opts,
		    jn_diffusion_report *rep, double *ljp_mV, char *err)
{
	jn_diffusion_opts o;
	jn_diffusion_report rp;
	dsys s;
	double dmax, cmax = 0, best = -1, dbar_n = 0, dbar_d = 0, dbar, rtf, E = 0,
		     Ec = 0;
	int M;
	if (opts)
		o = *opts;
	else
		jn_diffusion_defaults(&o);
	if (check_opts(&o, err) < 0 || check(ions, n, t_C, &dmax, err) < 0)
		return -1;
	memset(&rp, 0, sizeof rp);
	rp.zeta_max = DIFF_ZETA_MAX;
	if (identical(ions, n)) {
		rp.grid_points = 0;
		if (rep)
			*rep = rp;
		*ljp_mV = 0.0;
		return 0;
	}
	memset(&s, 0, sizeof s);
	for (int i = 0; i < n; i++) {
		if (!present(&ions[i]))
			continue;
		if (ions[i].pip_mM > cmax)
			cmax = ions[i].pip_mM;
		if (ions[i].bath_mM > cmax)
			cmax = ions[i].bath_mM;
	}
	for (int i = 0; i < n; i++) {
		const jn_ion *x = &ions[i];
		int a;
		double m;
		if (!present(x))
			continue;
		a = s.na++;
		s.z[a] = x->z;
		s.d[a] = x->D_m2_s / dmax;
		s.cp[a] = x->pip_mM / cmax;
		s.cb[a] = x->bath_mM / cmax;
		s.rho_p += s.z[a] * s.cp[a];
		s.rho_b += s.z[a] * s.cb[a];
		m = fmin(s.cp[a], s.cb[a]) * fabs(s.z[a]) + 1e-3 * (s.cp[a] + s.cb[a]);
		if (m > best) {
			best = m;
			s.e = a;
		}
		dbar_n += s.z[a] * s.z[a] * (s.cp[a] + s.cb[a]) * s.d[a];
		dbar_d += s.z[a] * s.z[a] * (s.cp[a] + s.cb[a]);
	}
	s.nu = 0;
	for (int a = 0; a < s.na; a++)
		if (a != s.e)
			s.unk[s.nu++] = a;
	if (3.0 * (double)o.max_grid_points * s.nu * s.nu > DIFF_MAX_DOUBLES)
		return im_fail(err,
			       "diffusion model: %d ions need too much memory at %d grid "
			       "points",
			       s.na, o.max_grid_points);
	dbar = dbar_n / dbar_d;
	rtf = im_rt_f_mV(t_C);

	/* first grid: both solutions mixed along one erfc profile */
	M = o.grid_points;
	dsys_grid(&s, M);
	for (int k = 0; k < M; k++) {
		double S = 0.5 * erfc(-s.zeta[k] / (2.0 * sqrt(dbar)));
		double *Ck = s.C + k * s.na;
		if (k == 0)
			S = 0.0;
		if (k == M - 1)
			S = 1.0;
		for (int a = 0; a < s.na; a++)
			Ck[a] = s.cp[a] + (s.cb[a] - s.cp[a]) * S;
		if (k > 0 && k < M - 1)
			fill_elim(&s, Ck, k);
	}
	if (dsys_solve(&s, &o, DIFF_DS0, rtf, &rp, &E, err) < 0)
		goto fail;
	rp.grids = 1;
	for (;;) {
		int Mf = 2 * M - 1;
		double *Cc;
		if (Mf > o.max_grid_points) {
			if (rp.grids >= 2) {
				im_fail(err,
					"diffusion model: error estimate %.3g mV above "
					"%.3g mV at %d points (the limit)",
					rp.grid_err_mV, o.tol_mV, M);
				goto fail;
			}
			im_fail(err,
				"diffusion model: max_grid_points %d allows no "
				"refinement of %d",
				o.max_grid_points, M);
			goto fail;
		}
		Ec = E;
		Cc = s.C;
		s.C = NULL;
		dsys_free(&s);
		dsys_grid(&s, Mf);
		for (int k = 0; k < Mf; k++) {
			double *Ck = s.C + k * s.na;
			if (k % 2 == 0) {
				memcpy(Ck, Cc + (k / 2) * s.na, sizeof(double) * s.na);
			} else {
				const double *l = Cc + (k / 2) * s.na, *r = l + s.na;
				double zl = s.zeta[k - 1], zr = s.zeta[k + 1];
				double t = (s.zeta[k] - zl) / (zr - zl);
				for (int a = 0; a < s.na; a++)
					Ck[a] = l[a] + t * (r[a] - l[a]);
				fill_elim(&s, Ck, k);
			}
		}
		free(Cc);
		M = Mf;
		if (dsys_solve(&s, &o, DIFF_DS_NEWTON, rtf, &rp, &E, err) < 0)
			goto fail;
		rp.grids++;
		rp.grid_err_mV = fabs(E - Ec) * rtf / 3.0;
		if (rp.grid_err_mV <= o.tol_mV)
			break;
	}
	rp.grid_points = M;
	rp.coarse_ljp_mV = Ec * rtf;
	dsys_free(&s);
	if (!isfinite(E * rtf))
		return im_fail(err, "diffusion model: result is not finite");
	if (rep)
		*rep = rp;
	*ljp_mV = E * rtf;
	return 0;
fail:
	dsys_free(&s);
	return -1;
}
