/*
 * bench_junction.c - speed of the junction models: one Henderson
 * evaluation for a realistic 8-ion pair (goal < 0.2 us), the same formula
 * in plain Python (tests/bench_junction.py, run with $PYTHON or
 * /usr/bin/python3) and the ratio; one free-diffusion evaluation at
 * default accuracy for a 6-ion pair (goal < 50 ms) and for the demo pair
 * (recipes/k-pipette | recipes/bath-saline, 24 species after speciation;
 * goal < 20 ms); the corpus of 1000 random realistic pairs of
 * tests/test_ljp.c (goal < 30 s in total); and the whole of ljp_compute
 * with Henderson only on the demo pair (species, mobilities, Henderson,
 * the breakdown and the interval), an upper bound on what the interval
 * adds (goal < 1 ms).  Prints bench|WHAT|FIGURE|GOAL|RATIO lines.  Run
 * from the repository root.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "common.h"
#include "command.h"
#include "diffusion.h"
#include "junction.h"
#include "ljp.h"

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

static double python_us_with(const char *py)
{
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
	/* -I: isolated from PYTHON* variables and the user's site packages */
	snprintf(cmd, sizeof cmd, "'%s' -I '%s' 200000", py,
		 script);
	p = popen(cmd, "r");
	if (!p)
		return -1;
	/* read to the end before closing, so the script never writes into a
	 * closed pipe */
	{
		char line[256];
		int got = 0;
		while (fgets(line, sizeof line, p))
			if (!got && sscanf(line, "%lf us/call", &us) == 1)
				got = 1;
		if (!got)
			us = -1;
	}
	if (pclose(p) != 0)
		return -1;
	return us;
}

/* $PYTHON, else (or when it lacks what the script needs) the Debian
 * interpreter, which has python3-scipy */
static double python_us(void)
{
	const char *env = getenv("PYTHON");
	double us = env && *env ? python_us_with(env) : -1;
	return us > 0 ? us : python_us_with("/usr/bin/python3");
}

/* The demo pair through the command layer, as a user makes it. */
static int demo_pair(double *acc)
{
	static const char *lines[] = {"run recipes/bath-saline.ionmix",
				      "run recipes/k-pipette.ionmix"};
	char err[IM_ERRLEN], *buf = NULL;
	size_t len = 0;
	refdb *db;
	im_ctx ctx;
	out o;
	sol_state a, b;
	ljp_result r;
	jn_ion *x;
	df_report rep;
	double best = INFINITY, lbest = INFINITY, v = 0;
	if (refdb_open(&db, err)) {
		fprintf(stderr, "bench_junction: %s\n", err);
		return 1;
	}
	memset(&o, 0, sizeof o);
	o.fp = open_memstream(&buf, &len);
	o.errfp = o.fp;
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = "/nonexistent/ionmix-bench.db";
	if (ctx_load_chemistry(&ctx, err))
		goto fail;
	for (size_t i = 0; i < sizeof lines / sizeof *lines; i++)
		if (cmd_exec(&ctx, lines[i], err))
			goto fail;
	if (sol_compute(ws_find(&ctx.ses->ws, "k-pipette"), ses_env(ctx.ses), &a, err))
		goto fail;
	if (sol_compute(ws_find(&ctx.ses->ws, "bath"), ses_env(ctx.ses), &b, err))
		goto fail;
	for (int k = 0; k < 200; k++) {
		double t0 = now_s(), t;
		if (ljp_compute(db, &a, &b, 0, 22.0, LJP_BIT(LJP_HENDERSON), "k-pipette", "bath",
				&r, err))
			goto fail;
		t = now_s() - t0;
		lbest = fmin(lbest, t);
		if (k < 199)
			ljp_free(&r);
	}
	x = calloc(r.n, sizeof *x);
	for (int k = 0; k < r.n; k++)
		x[k] = r.sp[k].x;
	for (int k = 0; k < 10; k++) {
		double t0 = now_s(), t;
		if (df_ljp_mV(x, r.n, 22.0, NULL, &rep, &v, err)) {
			free(x);
			goto fail;
		}
		t = now_s() - t0;
		best = fmin(best, t);
	}
	printf("bench|free-diffusion junction, demo pair (%d species, %d points, err %.1g "
	       "mV)|%.2f ms|< 20 ms|%.1fx under\n",
	       r.n, rep.grid_points, rep.grid_err_mV, best * 1e3, 20e-3 / best);
	printf("bench|junction with its interval, Henderson, demo pair (%d species; "
	       "bound on the interval's cost)|%.3f ms|< 1 ms|%.1fx under\n",
	       r.n, lbest * 1e3, 1e-3 / lbest);
	*acc += v + r.ljp_mV;
	free(x);
	ljp_free(&r);
	sol_state_free(&a);
	sol_state_free(&b);
	ctx_free(&ctx);
	fclose(o.fp);
	free(buf);
	refdb_close(db);
	return 0;
fail:
	fprintf(stderr, "bench_junction: demo pair: %s\n", err);
	return 1;
}

/* The random corpus of tests/test_ljp.c (same generator and seed; the
 * mobilities here from the same handbook values and estimates, written
 * out: K+ 73.48, Cs+ 77.2, Na+ 50.08, TEA+ 32.6, NMDG+ 24.25, Cl- 76.31,
 * Mg2+ 53.0, Ca2+ 59.47, Ba2+ 63.6, H+ 349.65, OH- 198.0 (crc-lambda,
 * from memory); the organic anions and the ATP, PCr, EGTA, HEPES species
 * as data/ions.sql and the estimation method give them). */
static unsigned long long rng = 0x9e3779b97f4a7c15ULL;
static double urand(void)
{
	rng ^= rng >> 12;
	rng ^= rng << 25;
	rng ^= rng >> 27;
	return (double)((rng * 2685821657736338717ULL) >> 11) / 9007199254740992.0;
}

static double uni(double a, double b)
{
	return a + (b - a) * urand();
}

static void put(jn_ion *x, int *n, const char *sym, int z, double D, double p, double b)
{
	x[*n].symbol = sym;
	x[*n].z = z;
	x[*n].D_m2_s = D;
	x[*n].pip_mM = p;
	x[*n].bath_mM = b;
	(*n)++;
}

static int random_pair(jn_ion *x)
{
	static const char *an[] = {"gluconate-", "methanesulfonate-", "Cl-", "aspartate-",
				   "glutamate-", "isethionate-"};
	static const double lan[] = {24.25, 49.09, 76.31, 22.04, 29.1, 30.6};
	static const char *bcat[] = {"Na+", "TEA+", "NMDG+"};
	static const double lb[] = {50.08, 32.6, 24.25};
	int n = 0, ic = (int)(urand() * 2), ia = (int)(urand() * 6), ib = (int)(urand() * 3);
	double main_c = uni(100, 150), cl = ia == 2 ? 0 : uni(0, 20), na = uni(0, 15),
	       mg = uni(0, 4), atp = uni(0, 5), pcr = uni(0, 15), hepes = uni(5, 10),
	       egta = urand() < 0.5 ? uni(0.1, 11) : 0, qx = urand() < 0.3 ? uni(1, 5) : 0;
	double bmain = uni(110, 150), bk = uni(2, 5), bca = uni(0, 2), bba = ib == 1 ? uni(2, 10) : 0,
	       bmg = uni(0, 2), bhepes = uni(5, 10);
	double pn = 0, pp = 0, bp = 0, bn = 0;
	put(x, &n, "MgATP^2-", -2, ljp_estimate_D25_m2_s(527.45), fmin(mg, atp), 0);
	put(x, &n, "ATP^4-", -4, ljp_estimate_D25_m2_s(503.15), fmax(0, atp - mg) * 0.7, 0);
	put(x, &n, "HATP^3-", -3, ljp_estimate_D25_m2_s(504.16), fmax(0, atp - mg) * 0.3, 0);
	put(x, &n, "PCr^2-", -2, D(51.6, -2), pcr, 0);
	put(x, &n, "HEPES-", -1, D(22.04, -1), 0.45 * hepes, 0.55 * bhepes);
	put(x, &n, "H2EGTA^2-", -2, ljp_estimate_D25_m2_s(378.34), egta, 0);
	put(x, &n, "OH-", -1, D(198.0, -1), 2e-4, 2.5e-4);
	put(x, &n, "H+", 1, D(349.65, 1), 5e-5, 4e-5);
	if (ia != 2)
		put(x, &n, an[ia], -1, D(lan[ia], -1), main_c, 0);
	if (qx > 0)
		put(x, &n, "QX-314+", 1, D(23.9, 1), qx, 0);
	put(x, &n, "Na+", 1, D(50.08, 1), na, ib == 0 ? bmain : 0);
	put(x, &n, "Mg2+", 2, D(53.0, 2), fmax(0, mg - atp) + 0.1, bmg);
	put(x, &n, "Ca2+", 2, D(59.47, 2), 0, bca);
	if (bba > 0)
		put(x, &n, "Ba2+", 2, D(63.6, 2), 0, bba);
	if (ib != 0)
		put(x, &n, bcat[ib], 1, D(lb[ib], 1), 0, bmain);
	for (int i = 0; i < n; i++) {
		double qp = x[i].z * x[i].pip_mM, qb = x[i].z * x[i].bath_mM;
		if (qp > 0)
			pp += qp;
		else
			pn -= qp;
		if (qb > 0)
			bp += qb;
		else
			bn -= qb;
	}
	pn += cl + (ia == 2 ? main_c : 0);
	bp += bk;
	if (ic == 0) {
		put(x, &n, "K+", 1, D(73.48, 1), fmax(pn - pp, 1.0), bk);
	} else {
		put(x, &n, "Cs+", 1, D(77.2, 1), fmax(pn - pp, 1.0), 0);
		put(x, &n, "K+", 1, D(73.48, 1), 0, bk);
	}
	put(x, &n, "Cl-", -1, D(76.31, -1), cl + (ia == 2 ? main_c : 0), bp - bn);
	return n;
}

static int corpus(double *acc)
{
	char err[IM_ERRLEN];
	double t0 = now_s(), t, v;
	int fails = 0;
	for (int c = 0; c < 1000; c++) {
		jn_ion x[JN_MAX_IONS];
		int n = random_pair(x);
		if (df_ljp_mV(x, n, 25.0, NULL, NULL, &v, err))
			fails++;
		else
			*acc += v;
	}
	t = now_s() - t0;
	printf("bench|free-diffusion junction, 1000 random realistic pairs (%d failed)|%.2f s|"
	       "< 30 s|%.0fx under\n",
	       fails, t, 30.0 / t);
	return fails != 0;
}

int main(void)
{
	jn_ion x[8], y[6];
	char err[IM_ERRLEN];
	double acc = 0, best = INFINITY, us, py, dbest = INFINITY, v;
	const int N = 2000000;
	df_report rep;
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
		if (df_ljp_mV(y, 6, 25.0, NULL, &rep, &v, err)) {
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
	if (demo_pair(&acc) || corpus(&acc))
		return 1;
	if (!isfinite(acc))
		return 1;
	return 0;
}
