/*
 * roots.c - Brent's bracketing root finder (see roots.h).
 */
#include "roots.h"

#include <float.h>
#include <math.h>

#include "common.h"

int roots_brent(roots_fn f, void *ctx, double a, double b, double fa,
		 double fb, double tol_abs, double tol_rel, int max_iter,
		 double *root, char *err)
{
	if (fa == 0.0) {
		*root = a;
		return 0;
	}
	if (fb == 0.0) {
		*root = b;
		return 0;
	}
	if ((fa > 0) == (fb > 0))
		return im_fail(err, "internal: root search without a sign change");
	double c = b, fc = fb, d = b - a, e = d;
	for (int it = 0; it < max_iter; it++) {
		if ((fb > 0) == (fc > 0)) {
			c = a;
			fc = fa;
			d = e = b - a;
		}
		if (fabs(fc) < fabs(fb)) {
			a = b;
			b = c;
			c = a;
			fa = fb;
			fb = fc;
			fc = fa;
		}
		double tol = 2.0 * DBL_EPSILON * fabs(b)
			+ 0.5 * (tol_abs + tol_rel * fabs(b));
		double xm = 0.5 * (c - b);
		if (fabs(xm) <= tol || fb == 0.0) {
			*root = b;
			return 0;
		}
		if (fabs(e) >= tol && fabs(fa) > fabs(fb)) {
			double s = fb / fa, p, q;
			if (a == c) {
				p = 2.0 * xm * s;
				q = 1.0 - s;
			} else {
				double qq = fa / fc, r = fb / fc;
				p = s * (2.0 * xm * qq * (qq - r) - (b - a) * (r - 1.0));
				q = (qq - 1.0) * (r - 1.0) * (s - 1.0);
			}
			if (p > 0)
				q = -q;
			p = fabs(p);
			double m1 = 3.0 * xm * q - fabs(tol * q), m2 = fabs(e * q);
			if (2.0 * p < (m1 < m2 ? m1 : m2)) {
				e = d;
				d = p / q;
			} else {
				d = xm;
				e = d;
			}
		} else {
			d = xm;
			e = d;
		}
		a = b;
		fa = fb;
		b += fabs(d) > tol ? d : (xm > 0 ? tol : -tol);
		fb = f(b, ctx);
		if (!isfinite(fb))
			return im_fail(err, "root search met a non-finite value at %g", b);
	}
	return im_fail(err, "root search did not converge in %d iterations",
		       max_iter);
}
