/*
 * test_signals.c - signals.c and what a signal leaves behind (issue 14,
 * item 5): outside the shell SIGINT, SIGTERM and SIGHUP remove every
 * temporary file and end the process by that signal (the conventional
 * status, POSIX: the parent sees WIFSIGNALED with the signal's number);
 * in the shell SIGINT only sets the cancel flag that long commands poll:
 * `correct`, `sweep` (per point), `junction` (Planck's and the
 * free-diffusion solvers, per Newton iteration) and `run` (between the
 * lines of a script).  A cancelled command fails with SIG_CANCELLED_MSG,
 * leaves the workspace as it was and writes no file; once the flag is
 * cleared (the shell does so before each command) the same command runs.
 *
 * The main check kills `ionmix -e 'correct BIG by 14.2 to OUT'` (the
 * binary in $IONMIX) with SIGTERM and SIGINT at random points 50 times:
 * no temporary file is left, no side note exists without its complete
 * data, and the previous OUT is intact unless the run completed.
 */
#include "testutil.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/time.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "correct.h"
#include "diffusion.h"
#include "fileio.h"
#include "signals.h"
#include "solution.h"
#include "testctx.h"

#define KILLS 50
#define BIG_ROWS 400000       /* about 7 MB: long enough to be hit mid-run */
#define PREVIOUS "previous output, must survive an interrupted run\n"

static char dir[512];

static int dir_setup(void **state)
{
	(void)state;
	const char *t = getenv("TMPDIR");
	snprintf(dir, sizeof dir, "%s/ionmix-signals-XXXXXX", t && *t ? t : "/tmp");
	return mkdtemp(dir) ? 0 : -1;
}

static int dir_teardown(void **state)
{
	(void)state;
	DIR *d = opendir(dir);
	struct dirent *e;
	char p[1024];
	if (!d)
		return 0;
	while ((e = readdir(d)) != NULL) {
		if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
			continue;
		snprintf(p, sizeof p, "%s/%s", dir, e->d_name);
		unlink(p);
	}
	closedir(d);
	rmdir(dir);
	return 0;
}

/* The scratch directory and the reference data of testctx.h. */
static int group_setup(void **state)
{
	return dir_setup(state) || setup(state);
}

static int group_teardown(void **state)
{
	teardown(state);
	return dir_teardown(state);
}

static char *slurp(const char *path, size_t *len)
{
	FILE *fp = fopen(path, "rb");
	if (!fp)
		return NULL;
	fseek(fp, 0, SEEK_END);
	long n = ftell(fp);
	fseek(fp, 0, SEEK_SET);
	char *b = malloc((size_t)n + 1);
	assert_non_null(b);
	assert_int_equal(fread(b, 1, (size_t)n, fp), (size_t)n);
	b[n] = '\0';
	fclose(fp);
	*len = (size_t)n;
	return b;
}

static void spit(const char *path, const char *s)
{
	FILE *fp = fopen(path, "wb");
	assert_non_null(fp);
	fputs(s, fp);
	assert_int_equal(fclose(fp), 0);
}

/* Entries of dir whose name marks a temporary of the file writer. */
static int temporaries(void)
{
	DIR *d = opendir(dir);
	struct dirent *e;
	int n = 0;
	assert_non_null(d);
	while ((e = readdir(d)) != NULL)
		n += strstr(e->d_name, ".ionmix-") != NULL;
	closedir(d);
	return n;
}

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* Start ionmix -e expr, output and errors to /dev/null. */
static pid_t start(const char *bin, const char *expr)
{
	pid_t pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		int fd = open("/dev/null", O_RDWR);
		if (fd < 0)
			_exit(126);
		dup2(fd, 0);
		dup2(fd, 1);
		dup2(fd, 2);
		setenv("IONMIX_DB", "/nonexistent/ionmix-test.db", 1);
		execl(bin, bin, "-e", expr, (char *)NULL);
		_exit(127);
	}
	return pid;
}

/* The in-process side: the cancel flag stops corr_stream at its next
 * read, with the one-line message, and an interactive SIGINT does not end
 * the process. */
static void test_cancel_flag(void **state)
{
	(void)state;
	char err[IM_ERRLEN], in[600], out[600];
	corr_opts co = {0};
	corr_result r;
	assert_int_equal(corr_ljp_parse("14.2", &co.ljp, err), 0);
	snprintf(in, sizeof in, "%s/cancel.csv", dir);
	snprintf(out, sizeof out, "%s/cancel-out.csv", dir);
	FILE *fp = fopen(in, "wb");
	assert_non_null(fp);
	fputs("t,Vm (mV)\n", fp);
	for (int i = 0; i < 200000; i++)
		fprintf(fp, "%d,-70.%03d\n", i, i % 1000);
	assert_int_equal(fclose(fp), 0);
	spit(out, PREVIOUS);

	assert_int_equal(sig_install(1), 0);
	assert_int_equal(sig_cancelled(), 0);
	raise(SIGINT);      /* the shell's Ctrl-C: the process goes on */
	assert_int_equal(sig_cancelled(), 1);
	assert_int_equal(corr_file(in, out, NULL, &co, &r, err), -1);
	assert_non_null(strstr(err, SIG_CANCELLED_MSG));
	assert_null(strchr(err, '\n'));
	size_t n;
	char *b = slurp(out, &n);
	assert_string_equal(b, PREVIOUS);   /* the previous output intact */
	free(b);
	char note[700];
	snprintf(note, sizeof note, "%s%s", out, CORR_NOTE_SUFFIX);
	assert_int_equal(access(note, F_OK), -1);   /* no note for it */
	assert_int_equal(temporaries(), 0);
	sig_clear();
	assert_int_equal(sig_cancelled(), 0);
	assert_int_equal(corr_file(in, out, NULL, &co, &r, err), 0);
	assert_int_equal(r.rows, 200000);
	unlink(note);
	unlink(out);
	unlink(in);
	/* back to the defaults for the other tests */
	signal(SIGINT, SIG_DFL);
	signal(SIGTERM, SIG_DFL);
	signal(SIGHUP, SIG_DFL);
}

/* ---- cancelling the long commands in the shell (in process) ---- */

/* A long sweep, a free-diffusion junction: a pipette and a bath of several
 * ions each (made-up recipes). */
static void pair(void)
{
	ok("solution pip; add K-gluconate 130; add KCl 6; add MgCl2 2; add HEPES 10; "
	   "add EGTA 1");
	ok("solution bath; add NaCl 125; add KCl 2.5; add NaHCO3 26; add CaCl2 2; "
	   "add MgCl2 1");
}

/* What the workspace holds, as text: every solution, its items and their
 * amounts, the current one and the temperature. */
static char *workspace_text(void)
{
	char *t = NULL;
	size_t n = 0;
	FILE *fp = open_memstream(&t, &n);
	assert_non_null(fp);
	fprintf(fp, "current %d, %.17g C\n", ctx.ses->ws.current, ctx.ses->temp_C);
	for (int i = 0; i < ctx.ses->ws.n; i++) {
		const solution *sol = ctx.ses->ws.sol[i];
		fprintf(fp, "%s:", sol->name);
		for (int k = 0; k < sol->n; k++)
			fprintf(fp, " %s %.17g", sol->items[k].c->name, sol->items[k].mM);
		fputc('\n', fp);
	}
	assert_int_equal(fclose(fp), 0);
	return t;
}

/* Run line, which must fail as cancelled: the one-line message, the
 * workspace as before, no file at path (when given) and no temporary. */
static void cancelled(const char *line, const char *path)
{
	char err[IM_ERRLEN];
	char *before = workspace_text(), *after;
	if (cmd_exec(&ctx, line, err) == 0)
		fail_msg("'%s' was not cancelled", line);
	if (!strstr(err, SIG_CANCELLED_MSG))
		fail_msg("'%s' failed otherwise: %s", line, err);
	assert_null(strchr(err, '\n'));
	after = workspace_text();
	assert_string_equal(after, before);
	free(before);
	free(after);
	if (path)
		assert_int_equal(access(path, F_OK), -1);
	assert_int_equal(temporaries(), 0);
}

static volatile sig_atomic_t alarms;

/* SIGALRM: the Ctrl-C of a user at that moment. */
static void on_alarm(int sig)
{
	(void)sig;
	alarms++;
	kill(getpid(), SIGINT);
}

/* SIGINT after us microseconds (0: none pending). */
static void ctrl_c_in(long us)
{
	struct itimerval t = {{0, 0}, {us / 1000000, us % 1000000}};
	assert_int_equal(setitimer(ITIMER_REAL, &t, NULL), 0);
}

/* Seconds a line takes when nothing cancels it (it must succeed). */
static double timed(const char *line)
{
	double t0 = now_s();
	ok(line);
	return now_s() - t0;
}

/* Ctrl-C typed while line runs (after a quarter of its uncancelled time,
 * measured first), when one whole run takes 20 ms or more: fails as
 * cancelled.  Shorter runs (a fast machine) skip this timed part; the
 * flag set before the command is checked by the callers regardless. */
static void cancelled_midway(const char *line, const char *path)
{
	double whole = timed(line);
	if (path)
		unlink(path);
	if (whole < 0.02) {
		print_message("'%s' takes %.1f ms: too short to interrupt midway\n", line,
			      whole * 1e3);
		return;
	}
	alarms = 0;
	sig_clear();
	ctrl_c_in((long)(0.25e6 * whole));
	cancelled(line, path);
	assert_int_equal(alarms, 1);
	sig_clear();
}

static void interactive(void)
{
	struct sigaction sa;
	assert_int_equal(sig_install(1), 0);
	memset(&sa, 0, sizeof sa);
	sa.sa_handler = on_alarm;
	sigemptyset(&sa.sa_mask);
	assert_int_equal(sigaction(SIGALRM, &sa, NULL), 0);
}

static void defaults(void)
{
	ctrl_c_in(0);
	signal(SIGALRM, SIG_DFL);
	signal(SIGINT, SIG_DFL);
	signal(SIGTERM, SIG_DFL);
	signal(SIGHUP, SIG_DFL);
	sig_clear();
}

static void test_cancel_sweep(void **state)
{
	(void)state;
	char csv[600], line[1400];
	interactive();
	pair();
	snprintf(csv, sizeof csv, "%s/sweep.csv", dir);
	snprintf(line, sizeof line, "sweep CaCl2 0 to 9 in bath show ljp pip bath points 400 "
		 "csv '%s' plain", csv);
	raise(SIGINT); /* Ctrl-C just before: the first point sees it */
	assert_int_equal(sig_cancelled(), 1);
	cancelled(line, csv);
	/* the flag stays until cleared: a second command fails the same way */
	cancelled("sweep temp 15 to 35 show ljp pip bath points 5 plain", NULL);
	sig_clear(); /* what the shell does before each command */
	ok(line);
	assert_int_equal(access(csv, F_OK), 0);
	unlink(csv);
	snprintf(line, sizeof line, "sweep CaCl2 0 to 2 in pip show free Ca points 2001 "
		 "csv '%s' plain", csv);
	cancelled_midway(line, csv);
	ok("sweep temp 15 to 35 show ljp pip bath points 5 plain");
	defaults();
}

/* `iv` on the finest grid (100,001 voltages) with an SVG, Ctrl-C pending:
 * cancelled, no figure; once the flag is cleared it runs. */
static void test_cancel_iv(void **state)
{
	(void)state;
	char svg[600], line[1400];
	interactive();
	pair();
	snprintf(svg, sizeof svg, "%s/iv.svg", dir);
	snprintf(line, sizeof line, "iv pip bath K+=1 Na+=0.05 Cl-=0.45 from -100 to 100 "
		 "step 0.002 svg '%s'", svg);
	raise(SIGINT); /* the computing loops see it (writing the table does not poll) */
	cancelled(line, svg);
	sig_clear();
	ok(line);
	assert_int_equal(access(svg, F_OK), 0);
	unlink(svg);
	defaults();
}

static void test_cancel_junction(void **state)
{
	(void)state;
	interactive();
	pair();
	raise(SIGINT);
	cancelled("junction pip bath model diffusion", NULL);
	cancelled("junction pip bath model planck", NULL);
	cancelled("junction pip bath model all", NULL);
	/* midway: test_cancel_diffusion_solver (this pair solves in a few ms) */
	sig_clear();
	ok("junction pip bath model all");
	assert_non_null(strstr(buf, "free diffusion"));
	defaults();
}

/* The free-diffusion solver itself, interrupted while it solves on a fine
 * grid (a first grid far finer than the default, so that one solve lasts
 * long enough to be hit): it stops with the message.  Made-up 6-ion pair;
 * the diffusion coefficients are round numbers of the right size. */
static void test_cancel_diffusion_solver(void **state)
{
	(void)state;
	const jn_ion x[6] = {
		{"K+", 1, 1.96e-9, 140.0, 4.0},   {"Na+", 1, 1.33e-9, 10.0, 145.0},
		{"Ca2+", 2, 0.79e-9, 0.0, 2.0},   {"Mg2+", 2, 0.71e-9, 2.0, 1.0},
		{"Cl-", -1, 2.03e-9, 30.0, 155.0}, {"gluc-", -1, 0.65e-9, 124.0, 0.0},
	};
	df_opts op;
	df_report rep;
	char err[IM_ERRLEN];
	double E, t0, whole;
	df_defaults(&op);
	op.grid_points = 1601; /* two fine grids: 1601 and 3201 nodes */
	interactive();
	t0 = now_s();
	if (df_ljp_mV(x, 6, 25.0, &op, &rep, &E, err))
		fail_msg("%s", err);
	whole = now_s() - t0;
	print_message("fine solve: %d points, %.1f ms\n", rep.grid_points, whole * 1e3);
	raise(SIGINT);
	assert_int_equal(df_ljp_mV(x, 6, 25.0, &op, &rep, &E, err), -1);
	assert_non_null(strstr(err, SIG_CANCELLED_MSG));
	sig_clear();
	if (whole >= 0.02) {
		alarms = 0;
		ctrl_c_in((long)(0.25e6 * whole));
		assert_int_equal(df_ljp_mV(x, 6, 25.0, &op, &rep, &E, err), -1);
		assert_non_null(strstr(err, SIG_CANCELLED_MSG));
		assert_int_equal(alarms, 1);
	} else {
		print_message("the fine solve takes %.1f ms: too short to interrupt midway\n",
			      whole * 1e3);
	}
	sig_clear();
	assert_int_equal(df_ljp_mV(x, 6, 25.0, &op, &rep, &E, err), 0);
	defaults();
}

/* `run`: a cancelled script stops between lines (its finished lines stand,
 * as they do when a later line fails). */
static void test_cancel_run(void **state)
{
	(void)state;
	char script[600], line[700];
	interactive();
	pair();
	snprintf(script, sizeof script, "%s/s.ionmix", dir);
	spit(script, "add KCl 3\nadd NaCl 9\n");
	snprintf(line, sizeof line, "run '%s'", script);
	raise(SIGINT);
	cancelled(line, NULL); /* not even its first line ran */
	sig_clear();
	ok(line);
	unlink(script);
	defaults();
}

/* Outside the shell each signal removes an open temporary and ends the
 * process by that signal. */
static void test_fatal_signals(void **state)
{
	(void)state;
	static const int sigs[] = {SIGINT, SIGTERM, SIGHUP};
	for (size_t i = 0; i < IM_COUNT(sigs); i++) {
		char target[600];
		snprintf(target, sizeof target, "%s/fatal-%zu.txt", dir, i);
		pid_t pid = fork();
		assert_true(pid >= 0);
		if (pid == 0) {
			char e[IM_ERRLEN];
			fio_file *f;
			sig_install(0);
			if (fio_open(&f, target, e) != 0)
				_exit(3);
			fputs("half", fio_stream(f));
			fflush(fio_stream(f));
			raise(sigs[i]);
			_exit(4);   /* not reached */
		}
		int st;
		assert_int_equal(waitpid(pid, &st, 0), pid);
		assert_true(WIFSIGNALED(st));
		assert_int_equal(WTERMSIG(st), sigs[i]);
		assert_int_equal(temporaries(), 0);
		assert_int_equal(access(target, F_OK), -1);
	}
}

static void test_kill_correct(void **state)
{
	(void)state;
	const char *bin = getenv("IONMIX");
	char in[600], out[600], note[700], expr[2000], err[IM_ERRLEN];
	if (!bin || !*bin) {
		skip();   /* run through `make test`, which sets IONMIX */
		return;
	}
	snprintf(in, sizeof in, "%s/rec.csv", dir);
	snprintf(out, sizeof out, "%s/rec-corrected.csv", dir);
	snprintf(note, sizeof note, "%s%s", out, CORR_NOTE_SUFFIX);
	FILE *fp = fopen(in, "wb");
	assert_non_null(fp);
	fputs("time (s),Vm (mV),I (pA)\n", fp);  /* made-up numbers */
	for (int i = 0; i < BIG_ROWS; i++)
		fprintf(fp, "%d.%05d,-%d.%03d,%d\n", i / 20000, (i % 20000) * 5,
			60 + i % 30, (i * 7) % 1000, i % 50 - 25);
	assert_int_equal(fclose(fp), 0);

	/* what a complete run writes */
	char ref[700];
	corr_opts co = {0};
	corr_result r;
	snprintf(ref, sizeof ref, "%s/expected.csv", dir);
	assert_int_equal(corr_ljp_parse("14.2", &co.ljp, err), 0);
	FILE *rf = fopen(ref, "wb");
	assert_non_null(rf);
	assert_int_equal(corr_file(in, NULL, rf, &co, &r, err), 0);
	fclose(rf);
	size_t wantn;
	char *want = slurp(ref, &wantn);
	unlink(ref);

	/* a whole run, for the time scale of the kills */
	snprintf(expr, sizeof expr, "correct '%s' by 14.2 to '%s'", in, out);
	double t0 = now_s();
	pid_t pid = start(bin, expr);
	int st;
	assert_int_equal(waitpid(pid, &st, 0), pid);
	double full = now_s() - t0;
	assert_true(WIFEXITED(st) && WEXITSTATUS(st) == 0);

	unsigned seed = (unsigned)getpid() ^ (unsigned)time(NULL);
	int killed = 0, finished = 0;
	for (int k = 0; k < KILLS; k++) {
		int sig = (rand_r(&seed) & 1) ? SIGTERM : SIGINT;
		spit(out, PREVIOUS);
		unlink(note);
		pid = start(bin, expr);
		/* a random point within 1.2 times a whole run */
		long us = (long)(1.2e6 * full * ((double)rand_r(&seed) / RAND_MAX));
		struct timespec d = {us / 1000000, (us % 1000000) * 1000};
		nanosleep(&d, NULL);
		kill(pid, sig);
		assert_int_equal(waitpid(pid, &st, 0), pid);
		if (WIFSIGNALED(st)) {
			if (WTERMSIG(st) != sig)
				fail_msg("kill %d: ended by signal %d, sent %d", k, WTERMSIG(st), sig);
			killed++;
		} else {
			if (!WIFEXITED(st) || WEXITSTATUS(st) != 0)
				fail_msg("kill %d: exit status %d", k, WEXITSTATUS(st));
			finished++;
		}
		if (temporaries() != 0)
			fail_msg("kill %d (signal %d after %ld us): a temporary file is left",
				 k, sig, us);
		size_t n;
		char *got = slurp(out, &n);
		assert_non_null(got);
		int complete = n == wantn && memcmp(got, want, n) == 0;
		int previous = strcmp(got, PREVIOUS) == 0;
		free(got);
		if (!complete && !previous)
			fail_msg("kill %d: the output is neither the previous nor the whole new one", k);
		if (access(note, F_OK) == 0 && !complete)
			fail_msg("kill %d: a side note without its data", k);
		if (WIFEXITED(st) && (!complete || access(note, F_OK) != 0))
			fail_msg("kill %d: a finished run without its output or note", k);
	}
	print_message("%d runs killed mid-way, %d finished before the signal"
		      " (a whole run %.0f ms)\n", killed, finished, full * 1e3);
	/* the check means something only when most runs were hit */
	assert_true(killed >= KILLS / 4);
	free(want);
	unlink(out);
	unlink(note);
	unlink(in);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_cancel_flag),
		cmocka_unit_test_setup_teardown(test_cancel_sweep, fresh, done),
		cmocka_unit_test_setup_teardown(test_cancel_junction, fresh, done),
		cmocka_unit_test_setup_teardown(test_cancel_iv, fresh, done),
		cmocka_unit_test_setup_teardown(test_cancel_run, fresh, done),
		cmocka_unit_test(test_cancel_diffusion_solver),
		cmocka_unit_test(test_fatal_signals),
		cmocka_unit_test(test_kill_correct),
	};
	return cmocka_run_group_tests(tests, group_setup, group_teardown);
}
