/*
 * bench_correct.c - speed and memory of the streaming LJP correction,
 * against the I/O floor and a peer, whole-process and per call, in one
 * run with the rounds interleaved (so that a busy machine slows every
 * contender alike).
 *
 * The file: BENCH_CORRECT_ROWS rows (default 10,000,000; about 174 MB) of
 * "time (s),Vm (mV)" at 20 kHz with a membrane potential wandering between
 * -120 and +80 mV (made-up numbers; only their format matters), in $TMPDIR
 * (or /tmp), removed at the end.
 *
 * Whole process, output redirected to a new file (on /dev/shm where there
 * is one, so that disk writeback does not enter anyone's time), medians
 * of ROUNDS rounds, and the best:
 *   cat FILE > OUT                                  the floor
 *   ionmix -e 'correct FILE by 14.2' > OUT          ($IONMIX, else build/ionmix)
 *   mawk -F, '{print $1","$2-14.2}' FILE > OUT     the peer (inexact: floats)
 * None of these three syncs: ionmix writes standard output straight
 * through (fileio.h), as cat and mawk do, so the ratios compare like with
 * like.  The form a user runs to keep the result, `correct FILE by 14.2 to
 * OUT`, writes a temporary file, fsyncs it, renames it into place and
 * writes the side note beside it; it is timed too, against cat FILE > OUT
 * followed by an fsync of OUT (in this process, inside cat's time), the
 * same durability for the copy.  (On a tmpfs an fsync costs next to
 * nothing; elsewhere it is the disk's time, and both sides pay it.)
 * Per call, in this process, to /dev/null: corr_stream on the file, and the
 * floor as a read/write loop of the same file with the same buffer size.
 * Also the peak resident memory of the ionmix process (constant memory).
 * Goals (issue 15): ionmix / cat <= 2.5 whole-process; ionmix / mawk <= 0.1.
 * Prints bench|WHAT|FIGURE|GOAL|RATIO lines.
 */
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "correct.h"

#define ROUNDS 11   /* the ratio of medians is steadier than that of one run on a shared machine */
#define MAWK_ROUNDS 2
#define FLOOR_BUF (512 * 1024)

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int cmp_d(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return (x > y) - (x < y);
}

static double median(double *v, int n)
{
	qsort(v, (size_t)n, sizeof *v, cmp_d);
	return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

/* The smallest of v[0..n) (call after median: v is sorted). */
static double best(const double *v)
{
	return v[0];
}

static int generate(const char *path, long rows)
{
	FILE *fp = fopen(path, "wb");
	unsigned long long s = 12345;
	static char buf[1 << 20];
	if (!fp)
		return -1;
	setvbuf(fp, buf, _IOFBF, sizeof buf);
	fputs("time (s),Vm (mV)\n", fp);
	for (long i = 0; i < rows; i++) {
		s = s * 6364136223846793005ULL + 1442695040888963407ULL;
		long mv = (long)((s >> 33) % 200001) - 120000; /* thousandths of mV */
		long a = mv < 0 ? -mv : mv;
		fprintf(fp, "%ld.%05ld,%s%ld.%03ld\n", i / 20000, (i % 20000) * 5,
			mv < 0 ? "-" : "", a / 1000, a % 1000);
	}
	return fclose(fp);
}

/* Run argv with standard output to out_path (standard error to
 * /dev/null); seconds of wall time, or -1 when it failed.  *rss_kb: the
 * child's peak resident memory.  With sync, out_path is fsynced after the
 * child ends, inside the time. */
static double run_sync(char *const argv[], const char *out_path, long *rss_kb, int sync);

static double run(char *const argv[], const char *out_path, long *rss_kb)
{
	return run_sync(argv, out_path, rss_kb, 0);
}

static double run_sync(char *const argv[], const char *out_path, long *rss_kb, int sync)
{
	/* a fresh file for each contender: truncating the last one's 174 MB
	 * is not part of anyone's time */
	unlink(out_path);
	double t0 = now_s();
	pid_t pid = fork();
	if (pid < 0)
		return -1;
	if (pid == 0) {
		int fo = open(out_path, O_WRONLY | O_CREAT | O_TRUNC, 0644);
		int fe = open("/dev/null", O_WRONLY);
		if (fo < 0 || fe < 0)
			_exit(126);
		dup2(fo, 1);
		dup2(fe, 2);
		execvp(argv[0], argv);
		_exit(127);
	}
	int st;
	struct rusage ru;
	if (wait4(pid, &st, 0, &ru) != pid)
		return -1;
	if (sync) {
		int fd = open(out_path, O_WRONLY);
		if (fd < 0 || fsync(fd) != 0) {
			if (fd >= 0)
				close(fd);
			return -1;
		}
		close(fd);
	}
	double t = now_s() - t0;
	if (rss_kb)
		*rss_kb = ru.ru_maxrss;
	return WIFEXITED(st) && WEXITSTATUS(st) == 0 ? t : -1;
}

/* The I/O floor in this process: read the file and write it to /dev/null. */
static double floor_call(const char *path)
{
	static char buf[FLOOR_BUF];
	double t0 = now_s();
	int fi = open(path, O_RDONLY), fo = open("/dev/null", O_WRONLY);
	ssize_t n;
	if (fi < 0 || fo < 0)
		return -1;
	while ((n = read(fi, buf, sizeof buf)) > 0)
		if (write(fo, buf, (size_t)n) != n)
			break;
	close(fi);
	close(fo);
	return now_s() - t0;
}

static double correct_call(const char *path, const corr_opts *o, long *rows)
{
	char err[IM_ERRLEN];
	corr_result r;
	FILE *devnull = fopen("/dev/null", "wb");
	if (!devnull)
		return -1;
	double t0 = now_s();
	int rc = corr_file(path, NULL, devnull, o, &r, err);
	double t = now_s() - t0;
	fclose(devnull);
	if (rc != 0) {
		fprintf(stderr, "bench_correct: %s\n", err);
		return -1;
	}
	*rows = r.corrected;
	return t;
}

int main(void)
{
	const char *tmp = getenv("TMPDIR"), *bin = getenv("IONMIX"), *rs = getenv("BENCH_CORRECT_ROWS");
	long rows = rs && atol(rs) > 0 ? atol(rs) : 10000000L;
	char path[512], out[600], expr[700], err[IM_ERRLEN];
	struct stat st;
	corr_opts o = {0};
	const char *cols[] = {"2"};
	double t_cat[ROUNDS], t_ion[ROUNDS], t_mawk[MAWK_ROUNDS], c_ion[ROUNDS], c_floor[ROUNDS];
	double t_cats[ROUNDS], t_ionto[ROUNDS];
	char expr_to[1400], note[700], summary[700];
	int n_mawk = 0, have_mawk = system("command -v mawk >/dev/null 2>&1") == 0;
	long rss = 0, rss_max = 0, got = 0;

	if (!bin || !*bin)
		bin = "build/ionmix";
	snprintf(path, sizeof path, "%s/ionmix_bench_correct_%ld.csv", tmp && *tmp ? tmp : "/tmp",
		 (long)getpid());
	/* the outputs on a tmpfs where there is one: no disk writeback in
	 * anyone's time, only the work and the copies */
	struct stat sh;
	if (stat("/dev/shm", &sh) == 0 && S_ISDIR(sh.st_mode) && access("/dev/shm", W_OK) == 0)
		snprintf(out, sizeof out, "/dev/shm/ionmix_bench_correct_%ld.out", (long)getpid());
	else
		snprintf(out, sizeof out, "%s.out", path);
	if (generate(path, rows) != 0 || stat(path, &st) != 0) {
		fprintf(stderr, "bench_correct: cannot write %s\n", path);
		unlink(path);
		return 1;
	}
	if (corr_ljp_parse("14.2", &o.ljp, err) != 0)
		return 1;
	o.columns = cols;
	o.ncolumns = 1;
	snprintf(expr, sizeof expr, "correct '%s' by 14.2", path);
	char *cat_argv[] = {"cat", path, NULL};
	char *ion_argv[] = {(char *)bin, "-e", expr, NULL};
	char *mawk_argv[] = {"mawk", "-F,", "{print $1\",\"$2-14.2}", path, NULL};
	/* `to OUT`: the output file named in the command, its note beside it;
	 * standard output (the summary) to a file of its own */
	snprintf(expr_to, sizeof expr_to, "correct '%s' by 14.2 to '%s'", path, out);
	snprintf(note, sizeof note, "%s.ionmix.txt", out);
	snprintf(summary, sizeof summary, "%s.summary", out);
	char *ionto_argv[] = {(char *)bin, "-e", expr_to, NULL};

	for (int k = 0; k < ROUNDS; k++) {
		t_cat[k] = run(cat_argv, out, NULL);
		t_ion[k] = run(ion_argv, out, &rss);
		if (t_cat[k] < 0 || t_ion[k] < 0) {
			fprintf(stderr, "bench_correct: %s failed\n", t_cat[k] < 0 ? "cat" : bin);
			unlink(path);
			unlink(out);
			return 1;
		}
		if (rss > rss_max)
			rss_max = rss;
		t_cats[k] = run_sync(cat_argv, out, NULL, 1);
		unlink(out);
		t_ionto[k] = run_sync(ionto_argv, summary, NULL, 0);  /* OUT is new: unlinked above */
		unlink(note);
		unlink(summary);
		if (t_cats[k] < 0 || t_ionto[k] < 0) {
			fprintf(stderr, "bench_correct: %s failed\n",
				t_cats[k] < 0 ? "cat + fsync" : "correct ... to OUT");
			unlink(path);
			unlink(out);
			return 1;
		}
		if (have_mawk && k < MAWK_ROUNDS) {
			double t = run(mawk_argv, out, NULL);
			if (t >= 0)
				t_mawk[n_mawk++] = t;
		}
		c_ion[k] = correct_call(path, &o, &got);
		c_floor[k] = floor_call(path);
		if (c_ion[k] < 0 || c_floor[k] < 0 || got != rows) {
			fprintf(stderr, "bench_correct: the in-process run failed\n");
			unlink(path);
			unlink(out);
			return 1;
		}
	}
	unlink(out);
	unlink(path);

	double mb = (double)st.st_size / 1e6;
	double cat = median(t_cat, ROUNDS), ion = median(t_ion, ROUNDS);
	double ci = median(c_ion, ROUNDS), cf = median(c_floor, ROUNDS);
	printf("bench|correct, %.0e rows (%.0f MB), whole process > file, median|%.0f ms (%.0f MB/s)"
	       "|<= 2.5x cat|%.2fx cat\n", (double)rows, mb, ion * 1e3, mb / ion, ion / cat);
	printf("bench|correct, same, best of %d|%.0f ms|<= 2.5x cat|%.2fx cat (best)\n", ROUNDS,
	       best(t_ion) * 1e3, best(t_ion) / best(t_cat));
	printf("bench|cat FILE > OUT, same file (the I/O floor), median|%.0f ms (best %.0f ms)|-|-\n",
	       cat * 1e3, best(t_cat) * 1e3);
	{
		double cs = median(t_cats, ROUNDS), it = median(t_ionto, ROUNDS);
		printf("bench|correct FILE by 14.2 to OUT (temporary, fsync, rename, note), median"
		       "|%.0f ms|-|%.2fx cat+fsync\n", it * 1e3, it / cs);
		printf("bench|cat FILE > OUT then fsync(OUT), median|%.0f ms|-|-\n", cs * 1e3);
	}
	if (n_mawk) {
		double mk = median(t_mawk, n_mawk);
		printf("bench|correct against mawk, whole process > file|%.0f ms mawk|<= 0.1x mawk"
		       "|%.3fx mawk\n", mk * 1e3, ion / mk);
	} else {
		printf("bench|correct against mawk|mawk not installed|<= 0.1x mawk|-\n");
	}
	printf("bench|correct per call (corr_file to /dev/null), same file|%.0f ms (%.1f ns/row)"
	       "|-|%.2fx read+write\n", ci * 1e3, ci * 1e9 / (double)rows, ci / cf);
	printf("bench|read+write loop per call (the floor in process)|%.0f ms|-|-\n", cf * 1e3);
	printf("bench|correct peak memory, whole process, %.0f MB file|%.1f MB|constant|-\n", mb,
	       (double)rss_max / 1024.0);
	return 0;
}
