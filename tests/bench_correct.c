/*
 * bench_correct.c - speed of the streaming LJP correction against mawk.
 *
 * Generates a 1,000,000-row CSV (time, mV with 3 decimals) in $TMPDIR (or
 * /tmp), times corr_file correcting column 2 to /dev/null, and in the same
 * run times mawk doing the same subtraction (mawk -F, '{print $1","$2-X}').
 * Best of several runs each, CLOCK_MONOTONIC.  Goal: at least 5x faster.
 * Prints bench|WHAT|FIGURE|GOAL|RATIO lines.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "correct.h"

#define ROWS 1000000
#define RUNS 5
#define MAWK_RUNS 3

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* The recording: 20 kHz samples, a membrane potential wandering between
 * -120 and +80 mV (made-up numbers, only their format matters). */
static int generate(const char *path)
{
	FILE *fp = fopen(path, "wb");
	unsigned long long s = 12345;
	if (!fp)
		return -1;
	fputs("time (s),Vm (mV)\n", fp);
	for (long i = 0; i < ROWS; i++) {
		s = s * 6364136223846793005ULL + 1442695040888963407ULL;
		long mv = (long)((s >> 33) % 200001) - 120000; /* thousandths of mV */
		long a = mv < 0 ? -mv : mv;
		fprintf(fp, "%ld.%05ld,%s%ld.%03ld\n", i / 20000, (i % 20000) * 5,
			mv < 0 ? "-" : "", a / 1000, a % 1000);
	}
	return fclose(fp);
}

int main(void)
{
	const char *tmp = getenv("TMPDIR");
	char path[512], cmd[1200], err[IM_ERRLEN];
	struct stat st;
	corr_opts o = {0};
	corr_result r;
	const char *cols[] = {"2"};
	double best = 1e30, mawk_best = 1e30;

	snprintf(path, sizeof path, "%s/ionmix_bench_correct_%ld.csv",
		 tmp && *tmp ? tmp : "/tmp", (long)getpid());
	if (generate(path) != 0 || stat(path, &st) != 0) {
		fprintf(stderr, "bench_correct: cannot write %s\n", path);
		return 1;
	}
	if (corr_ljp_parse("14.2", &o.ljp, err) != 0) {
		fprintf(stderr, "bench_correct: %s\n", err);
		unlink(path);
		return 1;
	}
	o.columns = cols;
	o.ncolumns = 1;
	FILE *devnull = fopen("/dev/null", "wb");
	if (!devnull) {
		unlink(path);
		return 1;
	}
	for (int i = 0; i < RUNS; i++) {
		double t0 = now_s();
		if (corr_file(path, NULL, devnull, &o, &r, err) != 0) {
			fprintf(stderr, "bench_correct: %s\n", err);
			unlink(path);
			return 1;
		}
		double t = now_s() - t0;
		if (t < best)
			best = t;
	}
	fclose(devnull);
	if (r.corrected != ROWS) {
		fprintf(stderr, "bench_correct: corrected %ld of %d cells\n", r.corrected, ROWS);
		unlink(path);
		return 1;
	}

	int have_mawk = system("command -v mawk >/dev/null 2>&1") == 0;
	if (have_mawk) {
		snprintf(cmd, sizeof cmd, "mawk -F, '{print $1\",\"$2-14.2}' '%s' > /dev/null",
			 path);
		for (int i = 0; i < MAWK_RUNS; i++) {
			double t0 = now_s();
			if (system(cmd) != 0) {
				have_mawk = 0;
				break;
			}
			double t = now_s() - t0;
			if (t < mawk_best)
				mawk_best = t;
		}
	}
	unlink(path);

	double mb = (double)st.st_size / 1e6;
	printf("bench|correct column 2, 1e6-row CSV (%.1f MB), to /dev/null"
	       "|%.0f ms (%.0f MB/s)|>= 5x vs mawk|", mb, best * 1e3, mb / best);
	if (have_mawk)
		printf("%.1fx vs mawk\n", mawk_best / best);
	else
		printf("-\n");
	if (have_mawk)
		printf("bench|mawk -F, '{print $1\",\"$2-14.2}', same file|%.0f ms|-|-\n",
		       mawk_best * 1e3);
	else
		printf("bench|mawk, same file|not installed|-|-\n");
	return 0;
}
