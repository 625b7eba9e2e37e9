/*
 * bench_junction.c - speed of the junction models: one Henderson
 * evaluation for a realistic 8-ion pair (goal < 0.2 us), the same formula
 * in plain Python (tests/bench_junction.py, run with $PYTHON or
 * /usr/bin/python3) and the ratio, and one free-diffusion evaluation at
 * default accuracy for a 6-ion pair (goal < 50 ms).  Prints
 * bench|WHAT|FIGURE|GOAL|RATIO lines.  Run from the repository root.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "common.h"
#include "junction.h"

static double now_s(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + 1e-9 * t.tv_nsec;
}

static double D(double lambda, int z)
{
	return jn_D_from_lambda_m2_s(lambda, z, 25.0);
}

/* Pipette 135 K-gluconate, 4 KCl, 2 MgCl2, 10 HEPES with 10 KOH; bath
 * bicarbonate saline 125 NaCl, 2.5 KCl, 26 NaHCO3, 2 CaCl2, 1 MgCl2.
 * Conductivities: CRC Handbook, from memory; gluconate- 0.33 and HEPES-
 * 0.30 of K+ (from memory).  The same table is in bench_junction.py. */
static void pair8(jn_ion *x)
{
	double dk = D(73.48, 1);
	jn_ion t[8] = {
		{"K+", 1, dk, 149.0, 2.5},
		{"Na+", 1, D(50.08, 1), 0.0, 151.0},
		{"Ca2+", 2, D(59.47, 2), 0.0, 2.0},
		{"Mg2+", 2, D(53.0, 2), 2.0, 1.0},
		{"Cl-", -1, D(76.31, -1), 8.0, 133.5},
		{"gluconate-", -1, 0.33 * dk, 135.0, 0.0},
		{"HEPES-", -1, 0.30 * dk, 10.0, 0.0},
		{"HCO3-", -1, D(44.5, -1), 0.0, 26.0},
	};
	memcpy(x, t, sizeof t);
}

static double henderson_loop(const jn_ion *x, int n, double *acc)
{
	char err[IM_ERRLEN];
	double s = 0, v, t0 = now_s();
	for (int k = 0; k < n; k++) {
		if (jn_henderson_mV(x, 8, 25.0, &v, err)) {
			fprintf(stderr, "bench_junction: %s\n", err);
			exit(1);
		}
		s += v;
	}
	*acc += s;
	return now_s() - t0;
}

static double python_us(void)
{
	const char *py = getenv("PYTHON");
	char script[1024], cmd[2200];
	double us = -1;
	FILE *t, *p;
	snprintf(script, sizeof script, "tests/bench_junction.py");
	t = fopen(script, "r");
	if (!t) {
		const char *f = __FILE__, *sl = strrchr(f, '/');
		snprintf(script, sizeof script, "%.*sbench_junction.py",
			 sl ? (int)(sl - f + 1) : 0, f);
		t = fopen(script, "r");
	}
	if (!t)
		return -1;
	fclose(t);
	snprintf(cmd, sizeof cmd, "'%s' '%s' 200000", py && *py ? py : "/usr/bin/python3",
		 script);
	p = popen(cmd, "r");
	if (!p)
		return -1;
	if (fscanf(p, "%lf us/call", &us) != 1)
		us = -1;
	/* read to the end: closing early would break the pipe under Python's
	 * last write (its newline, written apart with PYTHONUNBUFFERED set) */
	while (fgetc(p) != EOF)
		;
	if (pclose(p) != 0)
		return -1;
	return us;
}

int main(void)
{
	jn_ion x[8], y[6];
	char err[IM_ERRLEN];
	double acc = 0, best = INFINITY, us, py, dbest = INFINITY, v;
	const int N = 2000000;
	jn_diffusion_report rep;
	char ratio[64] = "-";

	pair8(x);
	henderson_loop(x, N / 10, &acc); /* warm up */
	for (int r = 0; r < 5; r++) {
		double t = henderson_loop(x, N, &acc);
		if (t < best)
			best = t;
	}
	us = best / N * 1e6;
	py = python_us();
	if (py > 0)
		snprintf(ratio, sizeof ratio, "%.0fx vs python3", py / us);
	printf("bench|Henderson junction, one evaluation (8 ions)|%.3f us|< 0.2 us|%s\n",
	       us, ratio);
	if (py > 0) {
		printf("bench|Henderson junction, plain python3 (8 ions)|%.2f us|-|-\n",
		       py);
	} else {
		fprintf(stderr, "bench_junction: python3 comparison not run (needs "
				"/usr/bin/python3 and tests/bench_junction.py)\n");
	}

	/* diffusion: 6 ions (the pair without HEPES- and HCO3-, the bath's
	 * Na+ from NaCl and its Cl- made up accordingly) */
	memcpy(y, x, sizeof(jn_ion) * 6);
	y[1].bath_mM = 125.0;
	y[4].bath_mM = 133.5;
	y[4].pip_mM = 8.0;
	y[0].pip_mM = 139.0; /* without the KOH of HEPES */
	for (int r = 0; r < 20; r++) {
		double t0 = now_s(), t;
		if (jn_diffusion_mV(y, 6, 25.0, NULL, &rep, &v, err)) {
			fprintf(stderr, "bench_junction: %s\n", err);
			return 1;
		}
		t = now_s() - t0;
		acc += v;
		if (t < dbest)
			dbest = t;
	}
	printf("bench|free-diffusion junction, one evaluation "
	       "(6 ions, %d points, err %.1g mV)|%.2f ms|< 50 ms|-\n",
	       rep.grid_points, rep.grid_err_mV, dbest * 1e3);
	if (!isfinite(acc))
		return 1;
	return 0;
}
