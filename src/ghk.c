/*
 * ghk.c - Goldman-Hodgkin-Katz reversal potentials, permeability ratios and
 * current-voltage curves.  See ghk.h for units and conventions.
 *
 * The GHK current of one ion is written as
 *   I = P z F [c_in g(u) - c_out g(-u)],  u = zFV/RT,  g(u) = u / (1 - e^-u),
 * which equals the usual form (g(u) e^-u = g(-u)) and is evaluated from one
 * exp(-|u|) (expm1 for small |u|), so that it neither overflows nor divides
 * 0/0 at u = 0 (g(0) = 1).  Each ion's current increases strictly with V and
 * changes sign at its Nernst potential, so the summed current has at most
 * one zero, and it lies between the smallest and largest Nernst potential of
 * the permeant ions present on both sides.
 */
#include "ghk.h"
#include "roots.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "nernst.h"
#include "signals.h"

/* 1 A/m2 = 1e-4 A/cm2 and P[m/s] = 1e-2 P[cm/s]; mM == mol/m3. */
#define A_CM2_PER_CM_S_MM_F (1e-6 * IM_FARADAY_C_MOL)

/* A permeant ion reduced to what the current sum needs. */
typedef struct term {
	int az;     /* |z|, 1 .. GHK_MAX_Z */
	int neg;    /* z < 0 */
	double w;   /* P z */
	double ci, co;
} term;

#define GHK_MAX_Z 8

typedef struct sum_ctx {
	const term *t;
	int n;
	int maxz;      /* largest |z| among the terms */
	double inv_rtf;/* F/RT, 1/mV */
} sum_ctx;

/* g(u) and g(-u) from s = |u| without overflow, 0/0 or cancellation. */
static void gpair(double u, double *gp, double *gm)
{
	double s = fabs(u), h, hm;
	if (s < 1e-12) {
		h = 1.0 + 0.5 * s;
		hm = 1.0 - 0.5 * s;
	} else if (s < 0.5) {
		double em = expm1(-s);  /* in (-0.4, 0): 1 + em is exact enough */
		h = -s / em;            /* g(s) */
		hm = h * (1.0 + em);    /* g(s) e^-s = g(-s) */
	} else {
		double e = exp(-s);     /* 1 - e >= 0.39: no cancellation */
		h = s / (1.0 - e);
		hm = h * e;
	}
	if (u >= 0) {
		*gp = h;
		*gm = hm;
	} else {
		*gp = hm;
		*gm = h;
	}
}

double ghk_current_A_cm2(int z, double P_cm_s, double in_mM, double out_mM,
			 double V_mV, double t_C)
{
	double gp, gm;
	gpair(z * V_mV / im_rt_f_mV(t_C), &gp, &gm);
	return A_CM2_PER_CM_S_MM_F * P_cm_s * z * (in_mM * gp - out_mM * gm);
}

/* Summed current divided by F (and the unit factor): same zero.  One
 * exponential an evaluation: with a = F|V|/RT, e^-(|z| a) is the |z|-th
 * power of e^-a, and expm1(-|z| a) follows from expm1(-a) by
 * (1 + m)^k - 1 = m_(k-1) (1 + m) + m, where the terms share one sign (no
 * cancellation) - the same numbers gpair() computes, per ion. */
static double sum_current(double V_mV, void *vctx)
{
	const sum_ctx *c = vctx;
	double a = fabs(V_mV) * c->inv_rtf, e[GHK_MAX_Z + 1], m[GHK_MAX_Z + 1];
	if (a < 0.5) {
		m[1] = expm1(-a);
		e[1] = 1.0 + m[1];
	} else {
		e[1] = exp(-a);
		m[1] = e[1] - 1.0;
	}
	for (int k = 2; k <= c->maxz; k++) {
		e[k] = e[k - 1] * e[1];
		m[k] = k * a < 0.5 ? m[k - 1] * e[1] + m[1] : e[k] - 1.0;
	}
	double s = 0.0;
	for (int i = 0; i < c->n; i++) {
		const term *t = &c->t[i];
		double sk = t->az * a, h, hm;
		if (sk < 1e-12) {
			h = 1.0 + 0.5 * sk;
			hm = 1.0 - 0.5 * sk;
		} else {
			h = sk / -m[t->az];   /* g(|u|) */
			hm = h * e[t->az];    /* g(-|u|) */
		}
		/* u >= 0 when z and V have one sign: then g(u) = h */
		if ((V_mV >= 0) != t->neg)
			s += t->w * (t->ci * h - t->co * hm);
		else
			s += t->w * (t->ci * hm - t->co * h);
	}
	return s;
}

int ghk_nernst_mV(int z, double in_mM, double out_mM, double t_C, double *E_mV,
		  char *err)
{
	/* one Nernst equation in the program: nernst.c's */
	return nernst_mV(z, in_mM, out_mM, t_C, E_mV, err);
}


/* ---- input checks ---- */

static const char *sym(const ghk_ion *x, int i, char *buf, size_t nbuf)
{
	if (x->symbol && x->symbol[0])
		return x->symbol;
	snprintf(buf, nbuf, "ion #%d", i + 1);
	return buf;
}

/* Rejects bad input (-1 with err).  Otherwise 0, with *has_root telling
 * whether the summed current changes sign, and why not in why[IM_ERRLEN]. */
static int check_ions(const ghk_ion *ions, int n, double t_C, int *has_root,
		      char *why, char *err)
{
	char b[32];
	if (!ions || n < 1)
		return im_fail(err, "no ions given");
	if (!isfinite(t_C) || t_C <= -IM_ZERO_C_K)
		return im_fail(err, "temperature %g C is not a real temperature", t_C);
	double Psum = 0.0, outward = 0.0, inward = 0.0;
	for (int i = 0; i < n; i++) {
		const ghk_ion *x = &ions[i];
		const char *s = sym(x, i, b, sizeof b);
		if (!isfinite(x->P))
			return im_fail(err, "permeability of %s is not a finite number", s);
		if (!isfinite(x->in_mM) || !isfinite(x->out_mM))
			return im_fail(err, "concentration of %s is not a finite number", s);
		if (x->P < 0)
			return im_fail(err, "permeability of %s is negative (%g)", s, x->P);
		if (x->in_mM < 0 || x->out_mM < 0)
			return im_fail(err, "concentration of %s is negative", s);
		if (x->P == 0)
			continue;
		if (x->z == 0)
			return im_fail(err, "%s is neutral and carries no current: "
				       "give it no permeability", s);
		if (x->z > GHK_MAX_Z || x->z < -GHK_MAX_Z)
			return im_fail(err, "%s: charge %d is beyond %d", s, x->z,
				       GHK_MAX_Z);
		if (x->in_mM == 0 && x->out_mM == 0)
			return im_fail(err, "%s is permeant but absent from both "
				       "solutions", s);
		Psum += x->P;
		/* what drives the current to +inf at large V, and to -inf at
		 * large -V: cations inside / anions outside, and vice versa */
		outward += x->P * (x->z > 0 ? x->in_mM : x->out_mM);
		inward += x->P * (x->z > 0 ? x->out_mM : x->in_mM);
	}
	if (!(Psum > 0) || !isfinite(Psum))
		return im_fail(err, "total permeability is zero: give at least one "
			       "ion a permeability > 0");
	*has_root = 1;
	if (!(outward > 0)) {
		*has_root = 0;
		im_fail(why, "no reversal potential: no permeant cation inside and no "
			"permeant anion outside, so the current is inward at every "
			"voltage");
	} else if (!(inward > 0)) {
		*has_root = 0;
		im_fail(why, "no reversal potential: no permeant cation outside and no "
			"permeant anion inside, so the current is outward at every "
			"voltage");
	}
	return 0;
}

static int check_root(const ghk_ion *ions, int n, double t_C, char *err)
{
	int has_root;
	char why[IM_ERRLEN];
	if (check_ions(ions, n, t_C, &has_root, why, err))
		return -1;
	if (!has_root)
		return im_fail(err, "%s", why);
	return 0;
}

/* ---- reversal potential ---- */

/* Closed-form GHK voltage equation; caller checked input and |z| == 1. */
static int erev_closed(const ghk_ion *ions, int n, double t_C, double *E_mV,
		       char *err)
{
	double num = 0.0, den = 0.0;
	for (int i = 0; i < n; i++) {
		const ghk_ion *x = &ions[i];
		if (x->P == 0)
			continue;
		num += x->P * (x->z > 0 ? x->out_mM : x->in_mM);
		den += x->P * (x->z > 0 ? x->in_mM : x->out_mM);
	}
	double E = im_rt_f_mV(t_C) * log(num / den);
	if (!isfinite(E))
		return im_fail(err, "reversal potential out of range "
			       "(concentrations or permeabilities too extreme)");
	*E_mV = E;
	return 0;
}

#define NSTACK 16

/* Root of the summed currents; caller checked input and existence. */
static int erev_root(const ghk_ion *ions, int n, double t_C, double *E_mV,
		     char *err)
{
	term stack[NSTACK];
	term *t = n <= NSTACK ? stack : im_xmalloc((size_t)n * sizeof *t);
	double rtf = im_rt_f_mV(t_C), lo = INFINITY, hi = -INFINITY;
	int m = 0, rc = -1, maxz = 1;
	for (int i = 0; i < n; i++) {
		const ghk_ion *x = &ions[i];
		if (x->P == 0)
			continue;
		t[m].az = abs(x->z);
		t[m].neg = x->z < 0;
		if (t[m].az > maxz)
			maxz = t[m].az;
		t[m].w = x->P * x->z;
		t[m].ci = x->in_mM;
		t[m].co = x->out_mM;
		m++;
		if (x->in_mM > 0 && x->out_mM > 0) {
			double E = rtf / x->z * log(x->out_mM / x->in_mM);
			if (E < lo)
				lo = E;
			if (E > hi)
				hi = E;
		}
	}
	if (lo > hi)        /* no ion on both sides: start about 0 mV */
		lo = hi = 0.0;
	/* widen a little, then expand toward the one-sided ions' side */
	lo -= 1.0;
	hi += 1.0;
	sum_ctx c = {t, m, maxz, 1.0 / rtf};
	double flo = sum_current(lo, &c), fhi = sum_current(hi, &c);
	double step = hi - lo;
	while (flo > 0 && isfinite(flo)) {
		lo -= step;
		step *= 2.0;
		if (lo < -GHK_BRACKET_MAX_MV) {
			im_fail(err, "no reversal potential above %g mV",
				-GHK_BRACKET_MAX_MV);
			goto out;
		}
		flo = sum_current(lo, &c);
	}
	step = hi - lo;
	while (fhi < 0 && isfinite(fhi)) {
		hi += step;
		step *= 2.0;
		if (hi > GHK_BRACKET_MAX_MV) {
			im_fail(err, "no reversal potential below %g mV",
				GHK_BRACKET_MAX_MV);
			goto out;
		}
		fhi = sum_current(hi, &c);
	}
	if (!isfinite(flo) || !isfinite(fhi)) {
		im_fail(err, "GHK current not finite (concentrations or "
			"permeabilities too extreme)");
		goto out;
	}
	rc = roots_brent(sum_current, &c, lo, hi, flo, fhi, GHK_TOL_ABS_MV, GHK_TOL_REL,
		   GHK_MAX_ITER, E_mV, err);
out:
	if (t != stack)
		free(t);
	return rc;
}

int ghk_erev_numeric_mV(const ghk_ion *ions, int n, double t_C, double *E_mV,
			char *err)
{
	if (check_root(ions, n, t_C, err))
		return -1;
	return erev_root(ions, n, t_C, E_mV, err);
}

static int all_monovalent(const ghk_ion *ions, int n)
{
	for (int i = 0; i < n; i++)
		if (ions[i].P > 0 && ions[i].z != 1 && ions[i].z != -1)
			return 0;
	return 1;
}

/* Input already checked. */
static int erev_checked(const ghk_ion *ions, int n, double t_C, double *E_mV,
			char *err)
{
	if (all_monovalent(ions, n))
		return erev_closed(ions, n, t_C, E_mV, err);
	return erev_root(ions, n, t_C, E_mV, err);
}

int ghk_erev_mV(const ghk_ion *ions, int n, double t_C, double *E_mV, char *err)
{
	if (check_root(ions, n, t_C, err))
		return -1;
	return erev_checked(ions, n, t_C, E_mV, err);
}

/* ---- permeability ratios ---- */

typedef struct ratio_ctx {
	ghk_ion *work;        /* copy of the ions, P of ion_idx varied */
	int n, ion, ref;
	double Pref, t_C, target_mV;
	const double *to_out; /* NULL: absolute form; else the "to" bath */
	const double *from_out;
	double *P;            /* shift form: the permeabilities (ion's varied) */
	int failed;
	char err[IM_ERRLEN];
} ratio_ctx;

/* The ions of one state (inside, and the bath out): an ion absent from
 * both sides of this state carries no current in it, whatever its P. */
static void state_ions(ghk_ion *work, int n, const double *P, const double *out)
{
	for (int i = 0; i < n; i++) {
		work[i].out_mM = out[i];
		work[i].P = work[i].in_mM == 0 && out[i] == 0 ? 0.0 : P[i];
	}
}

static int erev_with_out(ratio_ctx *r, const double *out, double *E)
{
	state_ions(r->work, r->n, r->P, out);
	return erev_checked(r->work, r->n, r->t_C, E, r->err);
}

/* Reversal potential (or its shift) at ln(ratio) = y, minus the target. */
static double ratio_fn(double y, void *vctx)
{
	ratio_ctx *r = vctx;
	double E1, E2;
	r->work[r->ion].P = r->Pref * exp(y);
	if (r->P)
		r->P[r->ion] = r->work[r->ion].P;
	if (!r->to_out) {
		if (erev_checked(r->work, r->n, r->t_C, &E1, r->err))
			goto fail;
		return E1 - r->target_mV;
	}
	if (erev_with_out(r, r->from_out, &E1) || erev_with_out(r, r->to_out, &E2))
		goto fail;
	return (E2 - E1) - r->target_mV;
fail:
	r->failed = 1;
	return NAN;
}

#define RATIO_SCAN_PER_DECADE 4

/* Scan ln(ratio) over (MIN, MAX), then Brent in the one interval where the
 * sign changes. */
static int ratio_solve(ratio_ctx *r, const char *what, double *ratio, char *err)
{
	char b1[32], b2[32];
	const char *sx = sym(&r->work[r->ion], r->ion, b1, sizeof b1);
	const char *sr = sym(&r->work[r->ref], r->ref, b2, sizeof b2);
	double y0 = log(GHK_RATIO_MIN), y1 = log(GHK_RATIO_MAX);
	int nseg = (int)lround(log10(GHK_RATIO_MAX / GHK_RATIO_MIN))
		* RATIO_SCAN_PER_DECADE;
	double ya = 0, yb = 0, fa = 0, fb = 0, yprev = y0, fprev = 0;
	double fmin = INFINITY, fmax = -INFINITY, first = 0;
	int nchange = 0;
	for (int k = 0; k <= nseg; k++) {
		double y = y0 + (y1 - y0) * k / nseg;
		double f = ratio_fn(y, r);
		if (r->failed)
			return im_fail(err, "%s", r->err);
		if (f < fmin)
			fmin = f;
		if (f > fmax)
			fmax = f;
		if (k > 0 && (f == 0 || (fprev != 0 && (f > 0) != (fprev > 0)))) {
			if (nchange == 0) {
				ya = yprev;
				fa = fprev;
				yb = y;
				fb = f;
				first = exp(y);
			} else {
				return im_fail(err, "more than one ratio %s/%s fits "
					       "(near %.3g and %.3g)", sx, sr, first,
					       exp(y));
			}
			nchange++;
		}
		yprev = y;
		fprev = f;
	}
	if (nchange == 0)
		return im_fail(err, "no ratio %s/%s in (%g, %g) gives %s %.4g mV: "
			       "that range gives %.4g to %.4g mV", sx, sr,
			       GHK_RATIO_MIN, GHK_RATIO_MAX, what, r->target_mV,
			       fmin + r->target_mV, fmax + r->target_mV);
	double y;
	if (roots_brent(ratio_fn, r, ya, yb, fa, fb, 1e-13, 0.0, GHK_MAX_ITER, &y, err))
		return -1;
	if (r->failed)
		return im_fail(err, "%s", r->err);
	double q = exp(y);
	if (!(q > GHK_RATIO_MIN && q < GHK_RATIO_MAX) || !isfinite(q))
		return im_fail(err, "no ratio %s/%s in (%g, %g) fits", sx, sr,
			       GHK_RATIO_MIN, GHK_RATIO_MAX);
	*ratio = q;
	return 0;
}

/* Shared checks; on success r->work is an owned copy (free it). */
static int ratio_setup(ratio_ctx *r, const ghk_ion *ions, int n, int ion_idx,
		       int ref_idx, double target_mV, double t_C, char *err)
{
	memset(r, 0, sizeof *r);
	if (!ions || n < 2)
		return im_fail(err, "a ratio needs at least two ions");
	if (ion_idx < 0 || ion_idx >= n || ref_idx < 0 || ref_idx >= n)
		return im_fail(err, "ion index out of range");
	if (ion_idx == ref_idx)
		return im_fail(err, "the ion and the reference ion are the same");
	if (!isfinite(target_mV))
		return im_fail(err, "measured potential is not a finite number");
	if (fabs(target_mV) > GHK_MEASURED_MAX_mV)
		return im_fail(err, "a measured potential of %.4g mV is outside -%g to +%g mV, "
			       "where a reversal potential or its shift can lie", target_mV,
			       GHK_MEASURED_MAX_mV, GHK_MEASURED_MAX_mV);
	double Pref = ions[ref_idx].P;
	if (!isfinite(Pref) || !(Pref > 0)) {
		char b[32];
		return im_fail(err, "reference ion %s needs a permeability > 0",
			       sym(&ions[ref_idx], ref_idx, b, sizeof b));
	}
	r->work = im_xmalloc((size_t)n * sizeof *r->work);
	memcpy(r->work, ions, (size_t)n * sizeof *r->work);
	r->work[ion_idx].P = Pref;  /* any P > 0 for the checks */
	r->n = n;
	r->ion = ion_idx;
	r->ref = ref_idx;
	r->Pref = Pref;
	r->t_C = t_C;
	r->target_mV = target_mV;
	return 0;
}

int ghk_ratio(const ghk_ion *ions, int n, int ion_idx, int ref_idx,
	      double measured_mV, double t_C, double *ratio, char *err)
{
	ratio_ctx r;
	if (ratio_setup(&r, ions, n, ion_idx, ref_idx, measured_mV, t_C, err))
		return -1;
	int rc = check_root(r.work, n, t_C, err);
	if (rc == 0)
		rc = ratio_solve(&r, "E_rev", ratio, err);
	free(r.work);
	return rc;
}

int ghk_ratio_shift(const ghk_ion *ions, int n, const double *to_out_mM,
		    int ion_idx, int ref_idx, double shift_mV, double t_C,
		    double *ratio, char *err)
{
	ratio_ctx r;
	char b[32];
	if (!to_out_mM)
		return im_fail(err, "no second bath given");
	if (ratio_setup(&r, ions, n, ion_idx, ref_idx, shift_mV, t_C, err))
		return -1;
	double *from = im_xmalloc((size_t)n * sizeof *from);
	r.P = im_xmalloc((size_t)n * sizeof *r.P);
	for (int i = 0; i < n; i++) {
		from[i] = ions[i].out_mM;
		r.P[i] = r.work[i].P;
	}
	r.from_out = from;
	r.to_out = to_out_mM;
	int rc = 0;
	for (int i = 0; i < n && rc == 0; i++)
		if (!isfinite(to_out_mM[i]) || to_out_mM[i] < 0)
			rc = im_fail(err, "concentration of %s in the second bath is not a "
				     "finite number >= 0", sym(&ions[i], i, b, sizeof b));
	if (rc == 0 && ions[ion_idx].in_mM == 0 && ions[ion_idx].out_mM == 0 &&
	    to_out_mM[ion_idx] == 0)
		rc = im_fail(err, "%s is absent inside and from both baths: the shift says "
			     "nothing about its permeability",
			     sym(&ions[ion_idx], ion_idx, b, sizeof b));
	/* each state needs a reversal potential; an ion absent from both
	 * sides of a state carries no current in it */
	if (rc == 0) {
		state_ions(r.work, n, r.P, from);
		if (check_root(r.work, n, t_C, r.err))
			rc = im_fail(err, "in the first bath: %s", r.err);
	}
	if (rc == 0) {
		state_ions(r.work, n, r.P, to_out_mM);
		if (check_root(r.work, n, t_C, r.err))
			rc = im_fail(err, "in the second bath: %s", r.err);
	}
	if (rc == 0)
		rc = ratio_solve(&r, "a shift of", ratio, err);
	free(from);
	free(r.P);
	free(r.work);
	return rc;
}

int ghk_erev_present_mV(const ghk_ion *ions, int n, double t_C, double *E_mV, char *err)
{
	if (!ions || n < 1)
		return im_fail(err, "no ions given");
	ghk_ion *w = im_xmalloc((size_t)n * sizeof *w);
	memcpy(w, ions, (size_t)n * sizeof *w);
	for (int i = 0; i < n; i++)
		if (w[i].in_mM == 0 && w[i].out_mM == 0)
			w[i].P = 0;
	int rc = ghk_erev_mV(w, n, t_C, E_mV, err);
	free(w);
	return rc;
}

/* ---- current-voltage curve ---- */

static double total_at(const ghk_ion *ions, int n, double V, double t_C)
{
	double s = 0.0;
	for (int i = 0; i < n; i++)
		if (ions[i].P > 0)
			s += ghk_current_A_cm2(ions[i].z, ions[i].P, ions[i].in_mM,
					       ions[i].out_mM, V, t_C);
	return s;
}

void ghk_iv_free(ghk_iv_curve *iv)
{
	if (!iv)
		return;
	free(iv->V_mV);
	free(iv->total_A_cm2);
	free(iv->ion_A_cm2);
	memset(iv, 0, sizeof *iv);
}

int ghk_iv(const ghk_ion *ions, int n, double t_C, double v1_mV, double v2_mV,
	   double dv_mV, double rect_mV, ghk_iv_curve *iv, char *err)
{
	int has_root;
	char why[IM_ERRLEN];
	memset(iv, 0, sizeof *iv);
	if (!isfinite(v1_mV) || !isfinite(v2_mV) || !isfinite(dv_mV))
		return im_fail(err, "voltage range is not finite");
	if (!(v1_mV < v2_mV))
		return im_fail(err, "voltage range: from %g must be below to %g mV",
			       v1_mV, v2_mV);
	if (!(dv_mV > 0))
		return im_fail(err, "voltage step must be > 0 mV");
	if (!isfinite(rect_mV) || !(rect_mV > 0))
		return im_fail(err, "rectification distance must be > 0 mV");
	double npd = floor((v2_mV - v1_mV) / dv_mV * (1.0 + 1e-12) + 1e-9) + 1.0;
	if (npd > GHK_IV_MAX_PTS)
		return im_fail(err, "%.0f voltages is too many (at most %d)", npd,
			       GHK_IV_MAX_PTS);
	if (check_ions(ions, n, t_C, &has_root, why, err))
		return -1;
	double E = 0.0, rect = 0.0;
	if (has_root) {
		if (erev_checked(ions, n, t_C, &E, err))
			return -1;
		double Ip = total_at(ions, n, E + rect_mV, t_C);
		double Im = total_at(ions, n, E - rect_mV, t_C);
		rect = fabs(Ip) / fabs(Im);
		if (Im == 0 || !isfinite(rect))
			return im_fail(err, "rectification undefined: no current at "
				       "%g mV", E - rect_mV);
	}
	int np = (int)npd;
	iv->npts = np;
	iv->nions = n;
	iv->V_mV = im_xmalloc((size_t)np * sizeof(double));
	iv->total_A_cm2 = im_xmalloc((size_t)np * sizeof(double));
	iv->ion_A_cm2 = im_xmalloc((size_t)np * (size_t)n * sizeof(double));
	for (int k = 0; k < np; k++) {
		double V = v1_mV + k * dv_mV, s = 0.0;
		if ((k & 4095) == 4095 && sig_cancelled()) { /* Ctrl-C in the shell */
			ghk_iv_free(iv);
			return im_fail(err, SIG_CANCELLED_MSG);
		}
		if (V > v2_mV)
			V = v2_mV;
		iv->V_mV[k] = V;
		for (int i = 0; i < n; i++) {
			const ghk_ion *x = &ions[i];
			double I = x->P > 0 ? ghk_current_A_cm2(x->z, x->P, x->in_mM,
						x->out_mM, V, t_C) : 0.0;
			iv->ion_A_cm2[(size_t)k * n + i] = I;
			s += I;
		}
		iv->total_A_cm2[k] = s;
		if (!isfinite(s)) {
			ghk_iv_free(iv);
			return im_fail(err, "current not finite at %g mV", V);
		}
	}
	iv->has_erev = has_root;
	iv->E_rev_mV = E;
	iv->rect_mV = rect_mV;
	iv->rect = rect;
	if (!has_root)
		snprintf(iv->no_erev, sizeof iv->no_erev, "%s", why);
	return 0;
}

int ghk_iv_fill(const ghk_ion *ions, int n, double t_C, double v1_mV,
		double v2_mV, int npts, double *V_mV, double *total_A_cm2,
		double *ion_A_cm2, char *err)
{
	int has_root;
	char why[IM_ERRLEN];
	if (!isfinite(v1_mV) || !isfinite(v2_mV) || !(v1_mV < v2_mV))
		return im_fail(err, "voltage range: from %g must be below to %g mV",
			       v1_mV, v2_mV);
	if (npts < 2 || npts > GHK_IV_MAX_PTS)
		return im_fail(err, "%d voltages: give 2 to %d", npts, GHK_IV_MAX_PTS);
	if (!V_mV || !total_A_cm2)
		return im_fail(err, "no arrays for the currents");
	if (check_ions(ions, n, t_C, &has_root, why, err))
		return -1;
	for (int k = 0; k < npts; k++) {
		/* the last point is v2 exactly, not v1 plus rounded steps */
		double V = k == npts - 1 ? v2_mV
			: v1_mV + (v2_mV - v1_mV) * k / (npts - 1), s = 0.0;
		V_mV[k] = V;
		if ((k & 4095) == 4095 && sig_cancelled()) /* Ctrl-C in the shell */
			return im_fail(err, SIG_CANCELLED_MSG);
		for (int i = 0; i < n; i++) {
			const ghk_ion *x = &ions[i];
			double I = x->P > 0 ? ghk_current_A_cm2(x->z, x->P, x->in_mM,
						x->out_mM, V, t_C) : 0.0;
			if (ion_A_cm2)
				ion_A_cm2[(size_t)k * n + i] = I;
			s += I;
		}
		if (!isfinite(s))
			return im_fail(err, "current not finite at %g mV", V);
		total_A_cm2[k] = s;
	}
	return 0;
}
