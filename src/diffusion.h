/*
 * diffusion.h - the free-diffusion liquid junction: two solutions meet in
 * a sharp step at t = 0 and diffuse freely into each other (Nernst-Planck
 * fluxes, zero current, hence electroneutrality).  The profile is
 * self-similar in x / sqrt(t), so the potential difference between the far
 * ends is one number at every t > 0.  Any set of ions and valences.
 *
 * Method (details in diffusion.c): the similarity ODE boundary-value
 * problem, finite differences on a stretched grid, Newton's method with
 * the exact Jacobian (block tridiagonal), started from Henderson's mixing
 * profile and continued in the concentration step when Newton alone does
 * not converge; then solved again on a grid twice as fine, and the
 * difference of the two results is the estimated numerical error.
 *
 * Sign and units as in junction.h: the potential of the bath relative to
 * the pipette solution, mV.  Pure: nothing prints; memory is freed before
 * return; -1 with a one-line message in err (IM_ERRLEN) on failure, the
 * outputs then untouched.
 */
#ifndef IONMIX_DIFFUSION_H
#define IONMIX_DIFFUSION_H

#include "junction.h"

typedef struct df_opts {
	int grid_points;     /* nodes of the first grid (odd, 21..max); default 51 */
	int max_grid_points; /* largest grid refinement may reach; default 3201 */
	double tol_mV;       /* target estimated discretization error; default 0.005
			      * (the fuzz build's defaults are smaller: diffusion.c) */
	int max_newton;      /* Newton iterations allowed per solve; default 40 (12 in the fuzz build) */
} df_opts;

typedef struct df_report {
	int grid_points;       /* nodes of the final grid */
	int grids;             /* grids solved (each twice as fine as the last) */
	int newton_its;        /* Newton iterations, all grids and steps */
	int continuation;      /* continuation steps in the concentration step
				* (1: reached directly from Henderson's profile) */
	double zeta_max;       /* half-width of the domain, units of sqrt(D_ref t) */
	double coarse_ljp_mV;  /* result on the grid before the final one */
	double grid_err_mV;    /* estimated discretization error, |fine - coarse| / 3 */
	double residual;       /* largest scaled residual at the end */
	int trace_species;     /* species left out: below 1e-6 of the conductance
				* on both sides (see diffusion.c) */
} df_report;

void df_defaults(df_opts *o);

/* The free-diffusion LJP of ions[0..n-1] at t_C.  opts may be NULL
 * (defaults); rep may be NULL.  Errors: those of jn_henderson_mV; options
 * out of range; no convergence within the limits (never a silent
 * unconverged result). */
int df_ljp_mV(const jn_ion *ions, int n, double t_C, const df_opts *opts, df_report *rep,
	      double *ljp_mV, char *err);

#endif
