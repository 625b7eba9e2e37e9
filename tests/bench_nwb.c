/*
 * bench_nwb.c - speed of `correct FILE.nwb` (nwb_correct) on files with
 * 100 patch-clamp series, for two data sizes.
 *
 * The files are written by tests/ref/nwbfiles.py (python3-h5py, the NWB
 * 2.x layout) in $TMPDIR (or /tmp): 100 series of 2,000 samples (under
 * 1 MB) and of 200,000 samples (about 80 MB).  In place (the file
 * itself, through the undo driver of h5undo.c: only the changed metadata
 * is written, after its undo journal) every potential series is
 * corrected; best of several runs, CLOCK_MONOTONIC.  Goal: under 50 ms
 * whatever the data size.  `to OUT.nwb` has to write a whole new file:
 * its time is printed beside the time of a plain copy of the same file
 * (copy_file_range: a clone on filesystems with reflinks, a byte copy on
 * ext4), its floor.
 * Prints bench|WHAT|FIGURE|GOAL|RATIO lines.
 */
#define _GNU_SOURCE
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "nwb.h"

#define RUNS 5

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* The time of copying src to dst with copy_file_range and fsync, s. */
static double copy_time(const char *src, const char *dst)
{
	double t0 = now_s();
	int in = open(src, O_RDONLY), out = open(dst, O_WRONLY | O_CREAT | O_TRUNC, 0644);
	struct stat st;
	if (in < 0 || out < 0 || fstat(in, &st) != 0)
		return -1;
	off_t left = st.st_size;
	while (left > 0) {
		ssize_t k = copy_file_range(in, NULL, out, NULL, (size_t)left, 0);
		if (k <= 0)
			break;
		left -= k;
	}
	fsync(out);
	close(in);
	close(out);
	unlink(dst);
	return now_s() - t0;
}

/* The best of RUNS corrections of path, in place (out NULL) or to out;
 * ms, or -1 with err.  *nser: the series changed. */
static double best_ms(const char *path, const char *out, int *nser, char *err)
{
	nwb_record rec = { .ljp_text = "14.6", .ljp_mV = 14.6, .model = "given by the user",
			   .version = "bench", .date = "2026-01-01T00:00:00Z" };
	double best = 1e30;
	for (int r = 0; r < RUNS; r++) {
		nwb_result res;
		if (out)
			unlink(out);
		double t0 = now_s();
		/* in place the file keeps each correction: the later runs add one */
		if (nwb_correct(path, out, NULL, 0, 1, &rec, &res, err))
			return -1;
		double t = now_s() - t0;
		*nser = res.n;
		nwb_result_free(&res);
		if (t < best)
			best = t;
	}
	return best * 1e3;
}

static int one(const char *dir, int samples, const char *label)
{
	char path[600], outp[620], cmd[1600], err[IM_ERRLEN];
	const char *py = getenv("PYTHON") ? getenv("PYTHON") : "/usr/bin/python3";
	snprintf(path, sizeof path, "%s/ionmix_bench_nwb_%ld_%d.nwb", dir, (long)getpid(), samples);
	snprintf(outp, sizeof outp, "%s.out.nwb", path);
	/* -I: isolated from PYTHON* variables; the helper's folder by path;
	 * -B: no __pycache__ left in tests/ref */
	snprintf(cmd, sizeof cmd, "%s -I -B -c 'import sys; sys.path.insert(0, \"tests/ref\"); import nwbfiles; "
		 "nwbfiles.write(\"%s\", nsamples=%d, extra_ccs=95)'", py, path, samples);
	if (system(cmd) != 0) {
		printf("bench|nwb correct, %s: could not write the test file|-|-|-\n", label);
		return 1;
	}
	struct stat st;
	stat(path, &st);
	int fd = open(path, O_RDONLY); /* the file on disk first: its writing is not measured */
	if (fd >= 0) {
		fsync(fd);
		close(fd);
	}
	int nser = 0;
	/* in place first, before the copies fill the disk's queue */
	double inpl = best_ms(path, NULL, &nser, err);
	double to = inpl >= 0 ? best_ms(path, outp, &nser, err) : -1;
	double cbest = 1e30;
	for (int r = 0; r < RUNS && to >= 0; r++) {
		double c = copy_time(path, outp);
		if (c >= 0 && c < cbest)
			cbest = c;
	}
	unlink(outp);
	unlink(path);
	if (to < 0 || inpl < 0) {
		printf("bench|nwb correct, %s: %s|-|-|-\n", label, err);
		return 1;
	}
	printf("bench|nwb correct in place, 100 series (%d potential), %s, %.1f MB|%.1f ms|< 50 ms|%.2f\n",
	       nser, label, st.st_size / 1e6, inpl, inpl / 50.0);
	printf("bench|nwb correct to OUT.nwb (a full copy), same file|%.1f ms|floor: the copy|-\n", to);
	printf("bench|  the floor: a plain copy of the same file (copy_file_range + fsync)|%.1f ms|-|-\n",
	       cbest * 1e3);
	return 0;
}

int main(void)
{
	const char *dir = getenv("TMPDIR") ? getenv("TMPDIR") : "/tmp";
	int bad = one(dir, 2000, "2,000 samples each");
	bad |= one(dir, 200000, "200,000 samples each");
	return bad;
}
