/*
 * bench_sweep.c - speed of `sweep`: 200 points of the LJP of a pair of
 * 12-compound solutions (a bicarbonate bath gassed with 5 % CO2 and a
 * titrated K-gluconate pipette, both speciated), over the temperature
 * (both solutions computed again at every point) and over an amount in
 * the bath (the pipette computed once); the whole command as a user runs
 * it, with its table and terminal plot (written to /dev/null).  Goal:
 * < 100 ms each (issue 13).  Median of 15 runs.  Prints
 * bench|WHAT|FIGURE|GOAL|RATIO lines.
 */
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "command.h"
#include "benchpair.h"
#include "common.h"

#define RUNS 15

static double now_s(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + 1e-9 * t.tv_nsec;
}

static int cmp_d(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return (x > y) - (x < y);
}

static double median_ms(im_ctx *ctx, const char *line)
{
	char err[IM_ERRLEN];
	double t[RUNS];
	for (int i = 0; i < RUNS; i++) {
		double t0 = now_s();
		if (cmd_exec(ctx, line, err)) {
			fprintf(stderr, "bench_sweep: %s: %s\n", line, err);
			exit(1);
		}
		t[i] = (now_s() - t0) * 1e3;
	}
	qsort(t, RUNS, sizeof t[0], cmp_d);
	return t[RUNS / 2];
}

int main(void)
{
	refdb *db;
	im_ctx ctx;
	out o = {.errfp = stderr, .utf8 = 1};
	if (bench_pair(&db, &ctx, &o))
		return 1;
	printf("bench|sweep temp, 200 points, LJP of a 12-compound pair (both speciated each point)|%.1f ms|< 100 ms|-\n",
	       median_ms(&ctx, "sweep temp 10 to 37 show ljp pip bath points 200"));
	printf("bench|sweep KCl in the bath, 200 points, LJP of a 12-compound pair|%.1f ms|< 100 ms|-\n",
	       median_ms(&ctx, "sweep KCl 1 to 20 in bath show ljp pip bath points 200"));
	printf("bench|sweep CaCl2 with keep-pH, 200 points, free Ca2+ of the pipette|%.1f ms|< 100 ms|-\n",
	       median_ms(&ctx, "sweep CaCl2 0 to 0.45 in pip show free Ca keep-pH points 200"));
	ctx_free(&ctx);
	fclose(o.fp);
	refdb_close(db);
	return 0;
}
