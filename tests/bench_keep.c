/* bench_keep.c - what keeping the workspace costs (issue 11 item 4, issue
 * 14 item 4): a script making 10,000 solutions (time and peak memory of
 * the process that runs it); the extra time per shell command of writing
 * the changed solution to the user database (a 12-compound internal in a
 * workspace of 20); start-up with a kept workspace of 20 solutions
 * (session, chemistry data, the restore itself).
 * Prints "bench|WHAT|FIGURE|GOAL|RATIO" lines for tests/bench.sh. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "command.h"
#include "common.h"

static double now_s(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + t.tv_nsec * 1e-9;
}

static const char *const names[] = {"K-gluconate", "KCl", "HEPES", "EGTA", "MgCl2.6H2O",
				    "Na2ATP", "Na2GTP", "Na2-phosphocreatine", "NaCl",
				    "CaCl2", "sucrose", "KOH"};
static const double mM[] = {120, 10, 10, 0.5, 2, 4, 0.3, 10, 2, 0.1, 5, 3.68};

static int fresh(im_ctx *ctx, refdb *db, out *o, const char *dbpath)
{
	char err[IM_ERRLEN];
	ctx_init(ctx, db, o);
	ctx->ses->db_path = dbpath;
	if (ctx_load_chemistry(ctx, err)) {
		fprintf(stderr, "bench_keep: %s\n", err);
		return -1;
	}
	return 0;
}

/* 20 solutions, the last a 12-compound internal, made through commands. */
static int fill(im_ctx *ctx)
{
	char line[160], err[IM_ERRLEN];
	for (int k = 0; k < 20; k++) {
		snprintf(line, sizeof line, "solution s%02d", k);
		if (cmd_exec(ctx, line, err))
			goto bad;
		for (size_t i = 0; i < IM_COUNT(names); i++) {
			snprintf(line, sizeof line, "add \"%s\" %g", names[i], mM[i] + k);
			if (cmd_exec(ctx, line, err))
				goto bad;
		}
	}
	return 0;
bad:
	fprintf(stderr, "bench_keep: %s\n", err);
	return -1;
}

/* Mean seconds of a `set` on the current solution, n times. */
static double per_command(im_ctx *ctx, int n)
{
	char line[64], err[IM_ERRLEN];
	double t0 = now_s();
	for (int i = 0; i < n; i++) {
		snprintf(line, sizeof line, "set NaCl %g", 2.0 + (i % 7) * 0.1);
		if (cmd_exec(ctx, line, err)) {
			fprintf(stderr, "bench_keep: %s\n", err);
			return -1;
		}
	}
	return (now_s() - t0) / n;
}

int main(void)
{
	char dir[] = "/tmp/ionmix-bench-keep-XXXXXX", path[96], script[96], err[IM_ERRLEN];
	char cmd[128];
	refdb *db;
	out o = {0};
	im_ctx ctx;
	FILE *fp;
	double t0, dt_plain, dt_kept, dt_start, dt_script;
	struct rusage ru;
	pid_t pid;
	int status, n, nstart = 50, nsol = 10000;
	if (!mkdtemp(dir) || refdb_open(&db, err)) {
		fprintf(stderr, "bench_keep: set-up failed\n");
		return 1;
	}
	snprintf(path, sizeof path, "%s/user.db", dir);
	snprintf(script, sizeof script, "%s/many.txt", dir);
	o.fp = fopen("/dev/null", "w");
	o.errfp = stderr;

	/* 10,000 solutions in one script, in a child: its time and peak RSS */
	fp = fopen(script, "w");
	for (int i = 0; i < nsol; i++)
		fprintf(fp, "solution s%d\nadd NaCl %d\nadd KCl 4\n", i, 100 + i % 50);
	fprintf(fp, "show s0\nshow s%d\n", nsol - 1);
	fclose(fp);
	t0 = now_s();
	pid = fork();
	if (pid == 0) {
		int line;
		if (fresh(&ctx, db, &o, NULL))
			_exit(1);
		fp = fopen(script, "r");
		if (!fp || cmd_run_stream(&ctx, fp, &line, err)) {
			fprintf(stderr, "bench_keep: line %d: %s\n", line, err);
			_exit(1);
		}
		_exit(ctx.ses->ws.n == nsol ? 0 : 1);
	}
	if (pid < 0 || wait4(pid, &status, 0, &ru) != pid || !WIFEXITED(status) ||
	    WEXITSTATUS(status) != 0) {
		fprintf(stderr, "bench_keep: the 10,000-solution script failed\n");
		return 1;
	}
	dt_script = now_s() - t0;

	/* a shell command with and without keeping the workspace */
	if (fresh(&ctx, db, &o, path) || fill(&ctx))
		return 1;
	per_command(&ctx, 50); /* warm */
	dt_plain = per_command(&ctx, 2000);
	ctx.ses->keep_ws = 1;
	per_command(&ctx, 50); /* creates the file, writes all 20 once */
	if (cmd_exec(&ctx, "temp 25.5", err))
		return 1;
	for (int k = 0; k < 20; k++) { /* every solution into the kept workspace */
		snprintf(cmd, sizeof cmd, "solution s%02d; set NaCl 2.55", k);
		if (cmd_exec(&ctx, cmd, err)) {
			fprintf(stderr, "bench_keep: %s\n", err);
			return 1;
		}
	}
	dt_kept = per_command(&ctx, 2000);
	if (ctx.ses->keep_err[0]) {
		fprintf(stderr, "bench_keep: %s\n", ctx.ses->keep_err);
		return 1;
	}
	ctx_free(&ctx);

	/* start-up with the kept workspace of 20 */
	t0 = now_s();
	for (int i = 0; i < nstart; i++) {
		if (fresh(&ctx, db, &o, path) || ses_restore_kept(ctx.ses, &n, err) != 0 ||
		    n != 20) {
			fprintf(stderr, "bench_keep: restore: %s (%d)\n", err, n);
			return 1;
		}
		ctx_free(&ctx);
	}
	dt_start = (now_s() - t0) / nstart;

	printf("bench|a script making %d solutions (solution, 2 adds each), one process|%.2f s|< 3 s|%.2f\n",
	       nsol, dt_script, dt_script / 3);
	printf("bench|peak memory of that process (max RSS)|%.1f MB|< 50 MB|%.2f\n",
	       ru.ru_maxrss / 1024.0, ru.ru_maxrss / 1024.0 / 50);
	printf("bench|keeping the workspace in the user database: extra per shell command (set on a 12-compound internal, 20 solutions; %.3f vs %.3f ms)|%.3f ms|< 2 ms|%.2f\n",
	       dt_kept * 1e3, dt_plain * 1e3, (dt_kept - dt_plain) * 1e3,
	       (dt_kept - dt_plain) * 1e3 / 2);
	printf("bench|start-up with a kept workspace of 20 solutions (session, chemistry data, restore), mean of %d|%.2f ms|< 15 ms|%.2f\n",
	       nstart, dt_start * 1e3, dt_start * 1e3 / 15);
	fclose(o.fp);
	refdb_close(db);
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : 1;
}
