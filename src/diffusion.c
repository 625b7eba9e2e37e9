/*
 * diffusion.c - the free-diffusion liquid junction (see diffusion.h).
 *
 * Model.  With fluxes J_i = -D_i (dc_i/dx + z_i c_i dpsi/dx), psi = F phi/RT,
 * zero current (sum z_i J_i = 0) gives dpsi/dx = -sum z D dc/dx / sum z^2 D c.
 * In the Boltzmann variable zeta = x / sqrt(D_ref t) every profile is steady:
 *     d/dzeta [d_i (c_i' + z_i c_i psi')] + (zeta / 2) c_i' = 0,
 * d_i = D_i / D_ref, with c_i(-Z) = pipette, c_i(+Z) = bath.  Summing z_i
 * times these gives (zeta/2) rho' = 0: the net charge keeps its step at
 * zeta = 0 (0 for balanced solutions).  That sum says nothing at zeta = 0,
 * so one ion's row (the ion most present on both sides) is replaced by
 * electroneutrality, sum z c = rho; every ion stays an unknown (none is
 * computed from the others, so none can be driven negative by them).
 *
 * Discretization.  Nodes zeta = Z sinh(b s) / sinh(b), s uniform on
 * [-1, 1] (denser at the junction).  Face fluxes use the arithmetic mean of
 * c and of the conductance K = sum z^2 d c, so the discrete current is zero
 * at every face; the advective term (zeta/2) c' is a central difference,
 * upwind where the cell Peclet number |zeta| h / (2 d_i) exceeds 2 (only far
 * out, where the profiles are flat).  The potential is summed cell by cell
 * as the Henderson potential of the cell, -G / logmean(K_a, K_b) with
 * G = sum z d (c_b - c_a): exact for a single salt on any grid.
 *
 * Solution.  Newton's method with the exact Jacobian, block tridiagonal
 * (one n x n block per node), solved by block elimination with partial
 * pivoting, the forward sweep done node by node as the Jacobian is
 * assembled (each node's factors and eliminated upper block are kept);
 * each step is cut back (halved up to 12 times) until the largest
 * residual falls, and
 * components that would turn negative are halved toward zero instead;
 * between such steps the factors of the last Jacobian are reused while
 * they divide the residual by ten a step (chord steps, n^2 per node
 * instead of n^3: about 40 % fewer instructions on realistic pairs); a
 * step that no cut makes lower the residual ends that Newton run as not
 * converged (it has stalled: the next Jacobian, a tiny step away, points
 * the same way).  The start is Henderson's linear mixing along one erfc
 * profile.  If Newton does not converge within max_newton iterations or
 * stalls, the concentration step is continued: the bath is taken as
 * pipette + lambda (bath - pipette), lambda raised from 0 to 1 in steps that
 * double after a success and shrink fourfold after a failure (smallest
 * DF_MIN_DLAMBDA).  Then the grid is refined (nodes doubled, the solution
 * interpolated as the start) until |E_fine - E_coarse| / 3 (second order)
 * is below tol_mV.
 */
#include "diffusion.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "signals.h"

#define DF_ZETA_MAX 12.0
#define DF_ZETA_CAP 40.0
#define DF_STRETCH 2.5
/* Newton has converged when a full step moved no scaled concentration by
 * more than DF_NEWTON_TOL, or by less than DF_NEWTON_TOL_RES while the
 * largest residual after it is below DF_RES_TOL: convergence being
 * quadratic, the iterate is then exact to about 1e-12. */
#define DF_NEWTON_TOL 1e-10
#define DF_NEWTON_TOL_RES 1e-5
#define DF_RES_TOL 1e-9
/* Trials of a Newton step: the full step, then halved up to 12 times. */
#define DF_MAX_CUTS 13
#define DF_SIGNIFICANT 1e-3  /* ions below this share of the charge do not set D_ref */
/* Trace species (H+ and OH- near neutral pH, minor protonation states and
 * complexes) whose share of the conductance is below this on both sides
 * are left out of the solve: such a share moves the LJP by about that
 * fraction of RT/F times a logarithm of order one, below 1e-4 mV, far
 * under the tolerance; it halves the work on a full internal. */
#define DF_TRACE_COND 1e-6
/* Finest first grid tried when the first solve fails (see df_ljp_mV). */
#define DF_RETRY_MAX 401
/* Largest block storage, doubles (about 100 MB). */
#define DF_MAX_DOUBLES 12500000.0

/* The fuzz build (make fuzz; FUZZING_BUILD_MODE_UNSAFE_FOR_PRODUCTION is
 * set there alone) bounds the work one input can ask for:
 * - refinement stops at 101 nodes (one refinement), with a target error
 *   of 0.05 mV, so that both ends of refinement are reached: the target
 *   met, as for the usual pipette and bath pairs, and the finest grid
 *   reached without it (0.01 mM CaCl2 against 140 mM NaCl: 0.063 mV);
 * - the first grid is the normal build's (a first grid of 21 to 41 nodes
 *   made Newton fail, even by continuation, for a K-gluconate | NaCl pair
 *   that converges on 51: slow and not the program's behaviour);
 * - a continuation in the concentration step gives up at a step of 1/64
 *   instead of 1/4096, and a Newton run after 12 iterations instead of 40
 *   (a result that converges takes 4 to 8 over both grids).  The inputs
 *   that fail even by continuation (a pipette 600 times as concentrated as
 *   the bath, which the normal build now solves by starting again on a
 *   finer first grid) took more than half of the Newton iterations of the
 *   corpus: 77 each before, 31 now, against 5 for one that converges.
 *   The retry on a finer first grid stops at 101 nodes here.
 * Results there differ from the normal build's, which these never
 * change. */
#ifdef FUZZING_BUILD_MODE_UNSAFE_FOR_PRODUCTION
#define DF_GRID0 51
#define DF_GRID_MAX 101
#define DF_TOL_mV 0.05
#define DF_MIN_DLAMBDA (1.0 / 64)
#define DF_MAX_NEWTON 12
#else
#define DF_GRID0 51
#define DF_GRID_MAX 3201
#define DF_TOL_mV 0.005
#define DF_MIN_DLAMBDA (1.0 / 4096)
#define DF_MAX_NEWTON 40
#endif

void df_defaults(df_opts *o)
{
	o->grid_points = DF_GRID0;
	o->max_grid_points = DF_GRID_MAX;
	o->tol_mV = DF_TOL_mV;
	o->max_newton = DF_MAX_NEWTON;
}

typedef struct sys {
	int n, M, e;     /* e: the ion whose row is electroneutrality */
	double rho_p, rho_b; /* net charge of each side, scaled */
	double z[JN_MAX_IONS], d[JN_MAX_IONS], cp[JN_MAX_IONS], cb[JN_MAX_IONS];
	double lam;        /* continuation: bath = cp + lam (cb - cp) */
	double Z;
	double *zeta;      /* M */
	double *c;         /* M x n, boundaries included */
	double *trial;     /* M x n */
	double *R;         /* M x n (interior rows used) */
	double *dx;        /* M x n: the Newton correction */
	double *X;         /* M x n x n: D_k^-1 U_k after elimination */
	double *Dg;        /* M x n x n: each node's diagonal block, then its
			    * LU factors D' (kept for chord steps) */
	double *L3;        /* M x 3n: each node's lower block, Ld, Lu, Lv */
	/* its upper block, a diagonal plus rank one (see face_jac):
	 * U = diag(Ud) + Uu Uv^T (the lower one, L = diag(Ld) + Lu Lv^T, is
	 * kept per node in L3) */
	double Ud[JN_MAX_IONS], Uu[JN_MAX_IONS], Uv[JN_MAX_IONS];
	double *col;       /* n: scratch */
	int singular;      /* 1: a diagonal block was singular in the last
			    * assembly of the Jacobian */
	unsigned char *up; /* M x n: 1 = upwind advection */
	int *piv;          /* M x n: the pivots of each node's factors */
	double *Fa, *Fb;   /* scratch, n: the fluxes of two faces */
} sys;

static void sys_free(sys *s)
{
	free(s->zeta);
	free(s->c);
	free(s->trial);
	free(s->R);
	free(s->dx);
	free(s->Dg);
	free(s->L3);
	free(s->col);
	free(s->X);
	free(s->up);
	free(s->piv);
	free(s->Fa);
	free(s->Fb);
	s->zeta = s->c = s->trial = s->R = s->dx = s->Dg = s->col = s->X = s->L3 = NULL;
	s->Fa = s->Fb = NULL;
	s->up = NULL;
	s->piv = NULL;
}

static void sys_grid(sys *s, int M)
{
	int n = s->n;
	size_t nn = (size_t)n * n;
	sys_free(s);
	s->M = M;
	s->zeta = im_xmalloc(sizeof(double) * M);
	s->c = im_xmalloc(sizeof(double) * M * n);
	s->trial = im_xmalloc(sizeof(double) * M * n);
	s->R = im_xmalloc(sizeof(double) * M * n);
	s->dx = im_xmalloc(sizeof(double) * M * n);
	s->Dg = im_xmalloc(sizeof(double) * M * nn);
	s->L3 = im_xmalloc(sizeof(double) * M * 3 * n);
	s->col = im_xmalloc(sizeof(double) * n);
	s->X = im_xmalloc(sizeof(double) * M * nn);
	s->up = im_xmalloc((size_t)M * n);
	s->piv = im_xmalloc(sizeof(int) * M * n);
	s->Fa = im_xmalloc(sizeof(double) * n);
	s->Fb = im_xmalloc(sizeof(double) * n);
	for (int k = 0; k < M; k++) {
		double sk = -1.0 + 2.0 * k / (M - 1);
		s->zeta[k] = s->Z * sinh(DF_STRETCH * sk) / sinh(DF_STRETCH);
	}
	s->zeta[(M - 1) / 2] = 0.0;
	for (int k = 1; k < M - 1; k++) {
		double h = fmax(s->zeta[k + 1] - s->zeta[k], s->zeta[k] - s->zeta[k - 1]);
		for (int i = 0; i < n; i++)
			s->up[k * n + i] = fabs(s->zeta[k]) * h / (2.0 * s->d[i]) > 2.0;
	}
}

/* Boundary rows for the current lambda. */
static void set_ends(sys *s, double *c)
{
	int n = s->n;
	for (int i = 0; i < n; i++) {
		c[i] = s->cp[i];
		c[(s->M - 1) * n + i] = s->cp[i] + s->lam * (s->cb[i] - s->cp[i]);
	}
}

/* Henderson's mixing profile: every ion along one erfc. */
static void start_profile(sys *s)
{
	int n = s->n;
	double num = 0, den = 0, dm;
	for (int i = 0; i < n; i++) {
		double w = s->z[i] * s->z[i] * s->d[i] * (s->cp[i] + s->cb[i]);
		num += w * s->d[i];
		den += w;
	}
	dm = den > 0 ? num / den : 1.0;
	for (int k = 0; k < s->M; k++) {
		double th = 0.5 * erfc(-s->zeta[k] / (2.0 * sqrt(dm)));
		for (int i = 0; i < n; i++)
			s->c[k * n + i] = s->cp[i] + s->lam * (s->cb[i] - s->cp[i]) * th;
	}
	set_ends(s, s->c);
}

/* The net charge held at node k: the step between the two sides. */
static double node_rho(const sys *s, int k)
{
	double rb = s->rho_p + s->lam * (s->rho_b - s->rho_p);
	if (s->zeta[k] < 0)
		return s->rho_p;
	return s->zeta[k] > 0 ? rb : 0.5 * (s->rho_p + rb);
}

/* The derivatives of a face's fluxes F (n) with respect to the nodes on
 * either side, each a diagonal plus one rank-one term shared by the rows:
 *     dF_i/dc_{k,j}   = ga_i delta_ij + u_i pa_j
 *     dF_i/dc_{k+1,j} = gb_i delta_ij + u_i pb_j
 * (u_i = d_i z_i cbar_i / h, pa and pb the derivatives of the potential
 * gradient p).  Kept factored, a block costs n, not n^2, to build, and
 * the lower block's product in the elimination n^2, not n^3. */
typedef struct face_jac {
	double u[JN_MAX_IONS], pa[JN_MAX_IONS], pb[JN_MAX_IONS];
	double ga[JN_MAX_IONS], gb[JN_MAX_IONS];
} face_jac;

/* Flux term d (c' + z c psi') on the face k | k+1, times nothing else;
 * with its derivatives in J when J is not NULL.  Returns -1 when the
 * conductance is not positive. */
static int face(const sys *s, const double *c, int k, double *F, face_jac *J)
{
	int n = s->n;
	const double *a = c + (size_t)k * n, *b = a + n;
	double h = s->zeta[k + 1] - s->zeta[k], G = 0, K = 0, p;
	for (int j = 0; j < n; j++) {
		G += s->z[j] * s->d[j] * (b[j] - a[j]);
		K += s->z[j] * s->z[j] * s->d[j] * 0.5 * (a[j] + b[j]);
	}
	if (!(K > 0))
		return -1;
	p = -G / K;
	for (int i = 0; i < n; i++)
		F[i] = s->d[i] / h * (b[i] - a[i] + s->z[i] * 0.5 * (a[i] + b[i]) * p);
	if (!J)
		return 0;
	/* dp/dc of each side, the same for every row */
	for (int j = 0; j < n; j++) {
		double zd = s->z[j] * s->d[j], g2 = G * s->z[j] * zd / (2.0 * K * K);
		J->pa[j] = zd / K + g2;
		J->pb[j] = -zd / K + g2;
	}
	for (int i = 0; i < n; i++) {
		double f = s->d[i] / h;
		J->u[i] = f * s->z[i] * 0.5 * (a[i] + b[i]);
		J->ga[i] = f * (-1.0 + 0.5 * s->z[i] * p);
		J->gb[i] = f * (1.0 + 0.5 * s->z[i] * p);
	}
	return 0;
}

static int lu(double *a, int n, int *piv);
static void lu_solve(const double *a, int n, const int *piv, double *b);

/* X = D'^-1 U with D' factored by lu (a, piv) and U = diag(Ud) + Uu Uv^T:
 * column j is Ud_j (D'^-1 e_j) + Uv_j (D'^-1 Uu).  A unit vector's
 * forward substitution starts at its (permuted) row, and a column with
 * Ud_j = 0 (ion e's) needs none, so this costs about 2/3 of solving for
 * the n dense columns of U. */
static void upper_solve(sys *s, const double *a, const int *piv, double *X)
{
	int n = s->n;
	double *w = s->col;
	memcpy(w, s->Uu, (size_t)n * sizeof *w);
	lu_solve(a, n, piv, w);
	for (int j = 0; j < n; j++) {
		double dj = s->Ud[j], vj = s->Uv[j];
		int pos = j;
		if (dj == 0) {
			for (int i = 0; i < n; i++)
				X[i * n + j] = vj * w[i];
			continue;
		}
		/* P e_j: the row swaps of lu move the 1 */
		for (int k = 0; k < n; k++)
			if (piv[k] == pos)
				pos = k;
			else if (k == pos)
				pos = piv[k];
		double y[JN_MAX_IONS];
		for (int i = 0; i < pos; i++)
			y[i] = 0.0;
		y[pos] = 1.0;
		for (int i = pos + 1; i < n; i++) {
			double t = 0.0;
			for (int k = pos; k < i; k++)
				t -= a[i * n + k] * y[k];
			y[i] = t;
		}
		for (int i = n - 1; i >= 0; i--) {
			double t = y[i];
			for (int k = i + 1; k < n; k++)
				t -= a[i * n + k] * y[k];
			y[i] = t / a[i * n + i];
		}
		for (int i = 0; i < n; i++)
			X[i * n + j] = dj * y[i] + vj * w[i];
	}
}

/* The forward sweep of block elimination at node k, whose blocks are in
 * s->L3 (L, factored), s->Dg, s->Ud, Uu, Uv (U, factored) and
 * residual in R: R becomes
 * D'^-1 (R - L R_{k-1}'), X_k = D'^-1 U with D' = D - L X_{k-1}.  Sets
 * s->singular when D' is. */
static void eliminate(sys *s, int k, double *R)
{
	int n = s->n, M = s->M, *piv = s->piv + (size_t)k * n;
	size_t nn = (size_t)n * n;
	double *D = s->Dg + k * nn, *X = s->X + k * nn;
	const double *Ld = s->L3 + (size_t)k * 3 * n, *Lu = Ld + n, *Lv = Lu + n;
	if (k > 1) {
		/* L X = diag(Ld) X + Lu (Lv^T X) */
		const double *Xp = s->X + (k - 1) * nn, *rp = R - n;
		double vX[JN_MAX_IONS], vr = 0;
		for (int j = 0; j < n; j++)
			vX[j] = 0;
		for (int m = 0; m < n; m++) {
			double v = Lv[m];
			vr += v * rp[m];
			for (int j = 0; j < n; j++)
				vX[j] += v * Xp[m * n + j];
		}
		for (int i = 0; i < n; i++) {
			double ld = Ld[i], lk = Lu[i];
			R[i] -= ld * rp[i] + lk * vr;
			for (int j = 0; j < n; j++)
				D[i * n + j] -= ld * Xp[i * n + j] + lk * vX[j];
		}
	}
	if (lu(D, n, piv)) {
		s->singular = 1;
		return;
	}
	lu_solve(D, n, piv, R);
	if (k < M - 2)
		upper_solve(s, D, piv, X);
}

/* The forward sweep of eliminate for a new residual (all interior rows of
 * s->R, from assemble without the Jacobian) with the factors kept from
 * the last assembly of the Jacobian: a chord step costs n^2 per node
 * where the Jacobian's elimination costs n^3. */
static void chord_forward(sys *s)
{
	int n = s->n, M = s->M;
	size_t nn = (size_t)n * n;
	for (int k = 1; k < M - 1; k++) {
		double *R = s->R + (size_t)k * n;
		if (k > 1) {
			const double *L = s->L3 + (size_t)k * 3 * n, *rp = R - n;
			double vr = 0;
			for (int m = 0; m < n; m++)
				vr += L[2 * n + m] * rp[m];
			for (int i = 0; i < n; i++)
				R[i] -= L[i] * rp[i] + L[n + i] * vr;
		}
		lu_solve(s->Dg + k * nn, n, s->piv + (size_t)k * n, R);
	}
}

/* The Jacobian blocks of node k's residual R from the derivatives of its
 * left face Jm (k-1 | k) and right face Jp (k | k+1): the lower block
 * L = -dFm/dc_{k-1} / w (kept factored), the diagonal block
 * D = (dFp/dc_k - dFm/dc_k) / w and the upper U = dFp/dc_{k+1} / w, plus
 * the advection term on the diagonals; ion e's row is electroneutrality.
 * Then the forward elimination of the node (unless an earlier block was
 * singular). */
static void node_blocks(sys *s, int k, const face_jac *Jm, const face_jac *Jp, double *R)
{
	int n = s->n, e = s->e;
	double w = 0.5 * (s->zeta[k + 1] - s->zeta[k - 1]);
	double hm = s->zeta[k] - s->zeta[k - 1], hp = s->zeta[k + 1] - s->zeta[k];
	double zh = 0.5 * s->zeta[k], *D = s->Dg + (size_t)k * n * n;
	double *Ld = s->L3 + (size_t)k * 3 * n, *Lu = Ld + n, *Lv = Lu + n;
	for (int i = 0; i < n; i++) {
		double um = Jm->u[i] / w, up = Jp->u[i] / w;
		double *Di = D + (size_t)i * n;
		Lu[i] = -um;
		Lv[i] = Jm->pa[i];
		Ld[i] = -Jm->ga[i] / w;
		s->Uu[i] = up;
		s->Uv[i] = Jp->pb[i];
		s->Ud[i] = Jp->gb[i] / w;
		for (int j = 0; j < n; j++)
			Di[j] = up * Jp->pa[j] - um * Jm->pb[j];
		Di[i] += (Jp->ga[i] - Jm->gb[i]) / w;
		if (!s->up[k * n + i]) {
			Ld[i] -= zh / (2.0 * w);
			s->Ud[i] += zh / (2.0 * w);
		} else if (s->zeta[k] > 0) {
			s->Ud[i] += zh / hp;
			Di[i] -= zh / hp;
		} else {
			Di[i] += zh / hm;
			Ld[i] -= zh / hm;
		}
	}
	Ld[e] = Lu[e] = s->Ud[e] = s->Uu[e] = 0.0;
	for (int j = 0; j < n; j++)
		D[e * n + j] = s->z[j];
	if (!s->singular)
		eliminate(s, k, R);
}

/* Residual of c; the largest |R| in *rmax.  When jac, also the Jacobian,
 * eliminated node by node as it is built (block_solve finishes).  -1 when
 * a conductance is not positive. */
static int assemble(sys *s, const double *c, int jac, double *rmax)
{
	int n = s->n, M = s->M;
	double *Fm = s->Fa, *Fp = s->Fb, *t;
	face_jac ja, jb, *Jm = jac ? &ja : NULL, *Jp = jac ? &jb : NULL, *tj;
	double mx = 0;
	if (jac)
		s->singular = 0;
	if (face(s, c, 0, Fm, Jm))
		return -1;
	for (int k = 1; k < M - 1; k++) {
		double w = 0.5 * (s->zeta[k + 1] - s->zeta[k - 1]);
		double hm = s->zeta[k] - s->zeta[k - 1], hp = s->zeta[k + 1] - s->zeta[k];
		double zh = 0.5 * s->zeta[k];
		double *R = s->R + (size_t)k * n;
		const double *ck = c + (size_t)k * n;
		if (face(s, c, k, Fp, Jp))
			return -1;
		for (int i = 0; i < n; i++) {
			double adv;
			if (!s->up[k * n + i])
				adv = (ck[n + i] - ck[i - n]) / (2.0 * w);
			else if (s->zeta[k] > 0)
				adv = (ck[n + i] - ck[i]) / hp;
			else
				adv = (ck[i] - ck[i - n]) / hm;
			R[i] = (Fp[i] - Fm[i]) / w + zh * adv;
		}
		/* ion e's row: electroneutrality (the z-weighted sum of the rows
		 * is (zeta/2) rho', which vanishes at zeta = 0, so without this
		 * row the system would be singular there) */
		R[s->e] = -node_rho(s, k);
		for (int j = 0; j < n; j++)
			R[s->e] += s->z[j] * ck[j];
		for (int i = 0; i < n; i++)
			if (fabs(R[i]) > mx)
				mx = fabs(R[i]);
		if (jac)
			node_blocks(s, k, Jm, Jp, R);
		/* this face's flux is the next node's left flux */
		t = Fm;
		Fm = Fp;
		Fp = t;
		tj = Jm;
		Jm = Jp;
		Jp = tj;
	}
	*rmax = mx;
	return 0;
}


/* LU with partial pivoting of the n x n a, in place; -1 if singular. */
static int lu(double *a, int n, int *piv)
{
	for (int k = 0; k < n; k++) {
		int p = k;
		double m = fabs(a[k * n + k]);
		for (int i = k + 1; i < n; i++)
			if (fabs(a[i * n + k]) > m) {
				m = fabs(a[i * n + k]);
				p = i;
			}
		if (!(m > 0) || !isfinite(m))
			return -1;
		piv[k] = p;
		if (p != k)
			for (int j = 0; j < n; j++) {
				double t = a[k * n + j];
				a[k * n + j] = a[p * n + j];
				a[p * n + j] = t;
			}
		for (int i = k + 1; i < n; i++) {
			double f = a[i * n + k] /= a[k * n + k];
			if (f != 0)
				for (int j = k + 1; j < n; j++)
					a[i * n + j] -= f * a[k * n + j];
		}
	}
	return 0;
}

/* Solve a x = b in place (b n long) with the factors of lu: the
 * substitutions as dot products, in the same order of terms as row
 * operations would take them. */
static void lu_solve(const double *a, int n, const int *piv, double *b)
{
	for (int k = 0; k < n; k++)
		if (piv[k] != k) {
			double t = b[k];
			b[k] = b[piv[k]];
			b[piv[k]] = t;
		}
	for (int i = 1; i < n; i++) {
		const double *ai = a + (size_t)i * n;
		double t = b[i];
		for (int k = 0; k < i; k++)
			t -= ai[k] * b[k];
		b[i] = t;
	}
	for (int i = n - 1; i >= 0; i--) {
		const double *ai = a + (size_t)i * n;
		double t = b[i];
		for (int k = i + 1; k < n; k++)
			t -= ai[k] * b[k];
		b[i] = t / ai[i];
	}
}

/* Block elimination, finished: the forward sweep was done by assemble
 * (jac); the backward one here.  On return s->R (interior rows) holds the
 * Newton correction -J^-1 R.  -1 if a block was singular. */
static int block_solve(sys *s)
{
	int n = s->n, M = s->M;
	size_t nn = (size_t)n * n;
	if (s->singular)
		return -1;
	for (int k = M - 3; k >= 1; k--) {
		double *r = s->R + (size_t)k * n;
		const double *X = s->X + k * nn, *rn = s->R + (size_t)(k + 1) * n;
		for (int i = 0; i < n; i++)
			for (int j = 0; j < n; j++)
				r[i] -= X[i * n + j] * rn[j];
	}
	for (size_t q = (size_t)n; q < (size_t)(M - 1) * n; q++)
		s->R[q] = -s->R[q];
	return 0;
}

/* Newton's method from s->c; 0 when the correction fell below
 * DF_NEWTON_TOL, -1 otherwise (s->c then unspecified), -2 when a Ctrl-C
 * in the shell cancelled it (polled at every iteration).
 *
 * After a Newton step the Jacobian kept from it is tried first as it
 * stands (a chord step: the factors of the last elimination, full length
 * only, kept while each step divides the largest residual by ten or
 * more); a chord step that does not is dropped and the Jacobian assembled
 * afresh at the same point, for a Newton step with its cuts.  Near the
 * answer, where Newton's steps are short, chord steps cost n^2 per node
 * instead of n^3 and take most of the iterations.  The answer meets the
 * same test either way.  max_newton counts the Newton steps; chord steps
 * are bounded apart (DF_MAX_CHORD per Newton step). */
#define DF_MAX_CHORD 8
static int newton(sys *s, int maxit, int *its, double *res)
{
	int n = s->n, M = s->M, chord = 0, chords = 0;
	size_t tot = (size_t)M * n;
	double r0;
	if (assemble(s, s->c, 1, &r0))
		return -1;
	for (int it = 0; it < maxit;) {
		double dmax = 0, r1 = INFINITY, a = 1.0;
		if (sig_cancelled())
			return -2;
		(*its)++;
		if (chord)
			chord_forward(s);
		if (block_solve(s))
			return -1;
		/* the correction, kept apart: assemble() reuses s->R */
		memcpy(s->dx, s->R, tot * sizeof *s->R);
		for (size_t q = (size_t)n; q < tot - n; q++)
			if (fabs(s->dx[q]) > dmax)
				dmax = fabs(s->dx[q]);
		if (!isfinite(dmax))
			return -1;
		if (chord) {
			memcpy(s->trial, s->c, tot * sizeof *s->c);
			for (size_t q = (size_t)n; q < tot - n; q++) {
				double v = s->c[q] + s->dx[q];
				s->trial[q] = v >= 0 ? v : 0.5 * s->c[q];
			}
			if (assemble(s, s->trial, 0, &r1) == 0 && r1 < 0.1 * r0) {
				memcpy(s->c, s->trial, tot * sizeof *s->c);
				if (dmax < DF_NEWTON_TOL ||
				    (dmax < DF_NEWTON_TOL_RES && r1 < DF_RES_TOL)) {
					*res = r1;
					return 0;
				}
				r0 = r1; /* s->R: the residual at the new s->c */
				chord = ++chords < DF_MAX_CHORD;
				if (!chord && assemble(s, s->c, 1, &r0))
					return -1;
				continue;
			}
			/* too slow: a new Jacobian at the same point */
			(*its)--;
			chord = 0;
			if (assemble(s, s->c, 1, &r0))
				return -1;
			continue;
		}
		it++;
		int cut, fell = 0;
		for (cut = 0; cut < DF_MAX_CUTS; cut++, a *= 0.5) {
			memcpy(s->trial, s->c, tot * sizeof *s->c);
			for (size_t q = (size_t)n; q < tot - n; q++) {
				double v = s->c[q] + a * s->dx[q];
				s->trial[q] = v >= 0 ? v : 0.5 * s->c[q];
			}
			if (assemble(s, s->trial, 0, &r1) == 0 && r1 < r0 * (1 - 1e-4 * a)) {
				fell = 1;
				break;
			}
			if (dmax * a < DF_NEWTON_TOL)
				break;
		}
		/* stalled: no cut of the step lowered the residual.  The next
		 * Jacobian, a tiny step away, gives nearly the same direction,
		 * so iterating on (up to max_newton assemblies, each with
		 * DF_MAX_CUTS trials) only repeats the failure: give up at
		 * once and let the caller continue in the concentration step */
		if (cut == DF_MAX_CUTS || !isfinite(r1))
			return -1;
		memcpy(s->c, s->trial, tot * sizeof *s->c);
		if (a == 1.0 &&
		    (dmax < DF_NEWTON_TOL || (dmax < DF_NEWTON_TOL_RES && r1 < DF_RES_TOL))) {
			*res = r1;
			return 0;
		}
		/* a chord step next when the residual at the new point is in
		 * s->R (the last trial was assembled there and fell) */
		chords = 0;
		chord = fell;
		if (chord)
			r0 = r1;
		else if (assemble(s, s->c, 1, &r0))
			return -1;
	}
	return -1;
}

/* The potential, units of RT/F, summed cell by cell. */
static double potential(const sys *s)
{
	int n = s->n;
	double E = 0;
	for (int k = 0; k < s->M - 1; k++) {
		const double *a = s->c + (size_t)k * n, *b = a + n;
		double G = 0, Ka = 0, Kb = 0, lm;
		for (int j = 0; j < n; j++) {
			double zd = s->z[j] * s->d[j];
			G += zd * (b[j] - a[j]);
			Ka += s->z[j] * zd * a[j];
			Kb += s->z[j] * zd * b[j];
		}
		lm = fabs(Kb - Ka) <= 1e-12 * Ka ? 0.5 * (Ka + Kb) : (Kb - Ka) / log(Kb / Ka);
		E -= G / lm;
	}
	return E;
}

/* Solve on the current grid: Newton from the start (or the given guess),
 * else continuation in lambda from Henderson's profile.  0, -1 (no
 * convergence) or -2 (cancelled). */
static int solve_grid(sys *s, const df_opts *o, int have_guess, df_report *r)
{
	size_t tot = (size_t)s->M * s->n;
	double *keep, done = 0, step = 0.25;
	int rc;
	s->lam = 1.0;
	if (!have_guess)
		start_profile(s);
	r->continuation = 1;
	rc = newton(s, o->max_newton, &r->newton_its, &r->residual);
	if (rc != -1)
		return rc;
	keep = im_xmalloc(tot * sizeof *keep);
	while (done < 1.0) {
		double lam = fmin(1.0, done + step);
		r->continuation++;
		if (done == 0) {
			s->lam = lam;
			start_profile(s);
		} else {
			int n = s->n;
			s->lam = lam;
			for (int k = 0; k < s->M; k++)
				for (int i = 0; i < n; i++) {
					double v = s->cp[i] + lam / done * (keep[k * n + i] - s->cp[i]);
					s->c[k * n + i] = v > 0 ? v : 0;
				}
			set_ends(s, s->c);
		}
		rc = newton(s, o->max_newton, &r->newton_its, &r->residual);
		if (rc == -2) {
			free(keep);
			return -2;
		}
		if (rc == 0) {
			memcpy(keep, s->c, tot * sizeof *keep);
			done = lam;
			step *= 2;
		} else {
			step /= 4;
			if (step < DF_MIN_DLAMBDA) {
				free(keep);
				return -1;
			}
		}
	}
	free(keep);
	return 0;
}

/* The solution of the grid of M nodes interpolated onto 2M - 1 nodes. */
static void refine(sys *s)
{
	int n = s->n, M = s->M, M2 = 2 * M - 1;
	double *old = s->c, *oz = s->zeta;
	s->c = NULL;
	s->zeta = NULL;
	sys_grid(s, M2);
	for (int k = 0; k < M; k++)
		for (int i = 0; i < n; i++)
			s->c[2 * k * n + i] = old[k * n + i];
	for (int k = 0; k < M - 1; k++) {
		double t = (s->zeta[2 * k + 1] - oz[k]) / (oz[k + 1] - oz[k]);
		for (int i = 0; i < n; i++)
			s->c[(2 * k + 1) * n + i] =
				(1 - t) * old[k * n + i] + t * old[(k + 1) * n + i];
	}
	free(old);
	free(oz);
}

static int check_opts(const df_opts *o, char *err)
{
	if (o->grid_points < 21 || o->grid_points % 2 == 0 ||
	    o->grid_points > o->max_grid_points)
		return im_fail(err,
			       "free diffusion: grid_points must be odd, at least 21 and "
			       "at most max_grid_points");
	if (!(o->tol_mV > 0) || !isfinite(o->tol_mV))
		return im_fail(err, "free diffusion: tol_mV must be > 0");
	if (o->max_newton < 1)
		return im_fail(err, "free diffusion: max_newton must be at least 1");
	return 0;
}

int df_ljp_mV(const jn_ion *ions, int n, double t_C, const df_opts *opts, df_report *rep,
	      double *ljp_mV, char *err)
{
	df_opts o;
	df_report r;
	sys s;
	double dref = 0, dmax = 0, cs = 0, E, Ec = NAN, rtf, Kp = 0, Kb = 0;
	int rc = -1, grid_rc;
	if (opts)
		o = *opts;
	else
		df_defaults(&o);
	if (check_opts(&o, err) || jn_check(ions, n, t_C, err))
		return -1;
	if (jn_identical(ions, n)) {
		memset(&r, 0, sizeof r);
		if (rep)
			*rep = r;
		*ljp_mV = 0.0;
		return 0;
	}
	memset(&s, 0, sizeof s);
	memset(&r, 0, sizeof r);
	for (int i = 0; i < n; i++)
		if (ions[i].z != 0 && (ions[i].pip_mM > 0 || ions[i].bath_mM > 0)) {
			double zz = (double)ions[i].z * ions[i].z;
			cs = fmax(cs, abs(ions[i].z) * fmax(ions[i].pip_mM, ions[i].bath_mM));
			Kp += zz * ions[i].D_m2_s * ions[i].pip_mM;
			Kb += zz * ions[i].D_m2_s * ions[i].bath_mM;
		}
	for (int i = 0; i < n; i++) {
		const jn_ion *x = &ions[i];
		double zz = (double)x->z * x->z;
		if (x->z == 0 || !(x->pip_mM > 0 || x->bath_mM > 0))
			continue;
		if (zz * x->D_m2_s * x->pip_mM < DF_TRACE_COND * Kp &&
		    zz * x->D_m2_s * x->bath_mM < DF_TRACE_COND * Kb) {
			r.trace_species++;
			continue;
		}
		s.z[s.n] = x->z;
		s.d[s.n] = x->D_m2_s;
		s.cp[s.n] = x->pip_mM / cs;
		s.cb[s.n] = x->bath_mM / cs;
		dmax = fmax(dmax, x->D_m2_s);
		s.rho_p += x->z * s.cp[s.n];
		s.rho_b += x->z * s.cb[s.n];
		if (abs(x->z) * fmin(s.cp[s.n], s.cb[s.n]) >
		    fabs(s.z[s.e]) * fmin(s.cp[s.e], s.cb[s.e]))
			s.e = s.n;
		if (abs(x->z) * fmax(s.cp[s.n], s.cb[s.n]) >= DF_SIGNIFICANT)
			dref = fmax(dref, x->D_m2_s);
		s.n++;
	}
	for (int i = 0; i < s.n; i++)
		s.d[i] /= dref;
	s.Z = fmin(DF_ZETA_CAP, DF_ZETA_MAX * sqrt(fmax(1.0, dmax / dref)));
	if ((double)o.max_grid_points * s.n * s.n * 5.0 > DF_MAX_DOUBLES)
		o.max_grid_points = (int)(DF_MAX_DOUBLES / (5.0 * s.n * s.n)) | 1;
	if (o.grid_points > o.max_grid_points)
		return im_fail(err, "free diffusion: too many ions for the grid (%d)", s.n);
	r.zeta_max = s.Z;
	sys_grid(&s, o.grid_points);
	rtf = im_rt_f_mV(t_C);
	grid_rc = solve_grid(&s, &o, 0, &r);
	/* A first grid too coarse for the layer where a dilute side meets a
	 * concentrated one (580 mM K-gluconate against 1 mM NaCl with its
	 * H+ and OH-: no convergence on 51 nodes, even by continuation, but
	 * directly on 101, with the same LJP to 1e-4 mV from 101, 201 or 401
	 * first nodes) starts again from Henderson's profile on a finer one,
	 * up to DF_RETRY_MAX nodes. */
	while (grid_rc == -1 && 2 * s.M - 1 <= o.max_grid_points && 2 * s.M - 1 <= DF_RETRY_MAX) {
		sys_grid(&s, 2 * s.M - 1);
		grid_rc = solve_grid(&s, &o, 0, &r);
	}
	if (grid_rc == -2) {
		im_fail(err, "free diffusion: %s", SIG_CANCELLED_MSG);
		goto out;
	}
	if (grid_rc) {
		im_fail(err, "free diffusion: Newton's method did not converge on %d points, "
			     "even by continuation in the concentration step", s.M);
		goto out;
	}
	r.grids = 1;
	E = rtf * potential(&s);
	for (;;) {
		if (2 * s.M - 1 > o.max_grid_points) {
			im_fail(err,
				"free diffusion: estimated error %.2g mV above %.2g mV on "
				"the finest grid allowed (%d points)",
				r.grid_err_mV, o.tol_mV, s.M);
			goto out;
		}
		refine(&s);
		Ec = E;
		grid_rc = solve_grid(&s, &o, 1, &r);
		if (grid_rc == -2) {
			im_fail(err, "free diffusion: %s", SIG_CANCELLED_MSG);
			goto out;
		}
		if (grid_rc) {
			im_fail(err, "free diffusion: Newton's method did not converge on %d "
				     "points", s.M);
			goto out;
		}
		r.grids++;
		E = rtf * potential(&s);
		r.grid_err_mV = fabs(E - Ec) / 3.0;
		if (r.grid_err_mV <= o.tol_mV)
			break;
	}
	r.grid_points = s.M;
	r.coarse_ljp_mV = Ec;
	*ljp_mV = E;
	if (rep)
		*rep = r;
	rc = 0;
out:
	sys_free(&s);
	return rc;
}
