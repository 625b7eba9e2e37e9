/*
 * roots.h - the one bracketing root finder of ionmix: Brent's method
 * (Brent 1973, Algorithms for Minimization without Derivatives, ch. 4),
 * inverse quadratic interpolation, secant or bisection inside a bracket
 * that always holds a sign change, so it cannot wander off or fail
 * silently.  Used by ghk.c (reversal potentials, permeability ratios) and
 * junction.c (Planck's equation).
 */
#ifndef IONMIX_ROOTS_H
#define IONMIX_ROOTS_H

typedef double (*roots_fn)(double x, void *ctx);

/* Find x in [a, b] with f(x) = 0, given fa = f(a) and fb = f(b) of
 * opposite sign (or one of them zero).  Stops when the bracket is
 * narrower than tol_abs + tol_rel |x| (plus rounding).  Returns 0 with
 * *root, or -1 with err: no sign change, a non-finite f, or no
 * convergence within max_iter evaluations. */
int roots_brent(roots_fn f, void *ctx, double a, double b, double fa, double fb,
		double tol_abs, double tol_rel, int max_iter, double *root, char *err);

#endif
