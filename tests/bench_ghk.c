/*
 * bench_ghk.c - speed of the GHK reversal potential with a divalent ion
 * (numerical root): one solve, a sweep of 100,000, and the same in python3
 * with scipy's brentq (tests/bench_ghk.py, run with /usr/bin/python3 or
 * $PYTHON).  Prints bench|WHAT|FIGURE|GOAL|RATIO lines.  Run from the
 * repository root (or the script is looked for beside this source file).
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "common.h"
#include "ghk.h"

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return ts.tv_sec + ts.tv_nsec * 1e-9;
}

/* The case bench_ghk.py solves too: Ca2+ outside swept 0.01 .. 10 mM. */
static void set_case(ghk_ion *x, double ca_out)
{
	x[0] = (ghk_ion){"K+", 1, 1.0, 140.0, 5.0};
	x[1] = (ghk_ion){"Na+", 1, 0.04, 10.0, 145.0};
	x[2] = (ghk_ion){"Cl-", -1, 0.1, 10.0, 150.0};
	x[3] = (ghk_ion){"Ca2+", 2, 5.0, 1e-4, ca_out};
}

/* Seconds for n solves over the sweep; the sum of results is returned in
 * *acc so that nothing is optimised away. */
static double sweep(int n, double *acc)
{
	ghk_ion x[4];
	char err[IM_ERRLEN];
	double E, s = 0.0, t0 = now_s();
	for (int k = 0; k < n; k++) {
		set_case(x, 0.01 * pow(1000.0, (double)k / (n - 1)));
		if (ghk_erev_mV(x, 4, 22.0, &E, err)) {
			fprintf(stderr, "bench_ghk: %s\n", err);
			exit(1);
		}
		s += E;
	}
	*acc = s;
	return now_s() - t0;
}

static double python_us_with(const char *py)
{
	char script[1024], cmd[2200];
	snprintf(script, sizeof script, "tests/bench_ghk.py");
	FILE *t = fopen(script, "r");
	if (!t) {
		const char *f = __FILE__, *sl = strrchr(f, '/');
		snprintf(script, sizeof script, "%.*sbench_ghk.py",
			 sl ? (int)(sl - f + 1) : 0, f);
		t = fopen(script, "r");
	}
	if (!t)
		return -1;
	fclose(t);
	/* -I: isolated from PYTHON* variables and the user's site packages,
	 * so any environment gives the same interpreter setup */
	snprintf(cmd, sizeof cmd, "'%s' -I '%s' 3000", py,
		 script);
	FILE *p = popen(cmd, "r");
	if (!p)
		return -1;
	double us = -1;
	if (fscanf(p, "%lf us/solve", &us) != 1)
		us = -1;
	/* read to the end: closing early would break the pipe under Python's
	 * last write (its newline, written apart with PYTHONUNBUFFERED set) */
	while (fgetc(p) != EOF)
		;
	if (pclose(p) != 0)
		return -1;
	return us;
}

/* The floor: the closed form of the monovalent case (Goldman-Hodgkin-
 * Katz voltage equation, K+, Na+, Cl- of the same case), per call over
 * the same sweep, s for n; a reference for how far the divalent root is
 * from a single logarithm. */
static double closed_form(int n, double *acc)
{
	const double RT_F = 8.314462618 * (273.15 + 22.0) / 96485.33212 * 1e3; /* mV */
	double s = 0.0, t0 = now_s();
	for (int k = 0; k < n; k++) {
		volatile double na_out = 145.0 * (0.5 + (double)k / n);
		double num = 1.0 * 5.0 + 0.04 * na_out + 0.1 * 10.0;
		double den = 1.0 * 140.0 + 0.04 * 10.0 + 0.1 * 150.0;
		s += RT_F * log(num / den);
	}
	*acc = s;
	return now_s() - t0;
}

/* $PYTHON, else (or when it lacks what the script needs) the Debian
 * interpreter, which has python3-scipy */
static double python_us(void)
{
	const char *env = getenv("PYTHON");
	double us = env && *env ? python_us_with(env) : -1;
	return us > 0 ? us : python_us_with("/usr/bin/python3");
}

int main(void)
{
	double acc, best = INFINITY;
	const int N1 = 200000;
	sweep(20000, &acc);   /* warm up */
	for (int r = 0; r < 5; r++) {
		double t = sweep(N1, &acc);
		if (t < best)
			best = t;
	}
	double us1 = best / N1 * 1e6;
	double t100k = INFINITY;
	for (int r = 0; r < 3; r++) {
		double t = sweep(100000, &acc);
		if (t < t100k)
			t100k = t;
	}
	double floor_best = INFINITY, acc2;
	for (int r = 0; r < 5; r++) { /* interleaved with the solves above */
		double t = closed_form(N1, &acc2);
		if (t < floor_best)
			floor_best = t;
		t = sweep(N1 / 10, &acc);
	}
	double ns_floor = floor_best / N1 * 1e9;
	double py = python_us();
	char ratio[96] = "-";
	if (py > 0)
		snprintf(ratio, sizeof ratio, "%.0fx the closed form; python3 %.0fx slower",
			 us1 * 1e3 / ns_floor, py / us1);
	else
		snprintf(ratio, sizeof ratio, "%.0fx the closed form", us1 * 1e3 / ns_floor);
	printf("bench|GHK closed form, monovalent ions only (the floor), per call|%.1f ns|-|-\n",
	       ns_floor);
	if (!isfinite(acc2))
		return 1;
	printf("bench|GHK reversal potential with Ca2+ (Brent), one solve|%.3f us"
	       "|< 1 us|%s\n", us1, ratio);
	printf("bench|GHK reversal potential with Ca2+, 100000 in a sweep|%.1f ms"
	       "|< 1000 ms|-\n", t100k * 1e3);
	if (py > 0) {
		printf("bench|GHK reversal potential with Ca2+, python3 scipy brentq "
		       "loop|%.2f us|-|-\n", py);
		printf("bench|GHK reversal potential with Ca2+, C against python3"
		       "|%.0fx|>= 10x|%.0fx vs python3\n", py / us1, py / us1);
	} else {
		fprintf(stderr, "bench_ghk: python3 comparison not run (needs "
			"/usr/bin/python3 with python3-scipy and tests/bench_ghk.py)\n");
		printf("bench|GHK reversal potential with Ca2+, C against python3|-"
		       "|>= 10x|-\n");
	}
	if (!isfinite(acc))
		return 1;
	return 0;
}
