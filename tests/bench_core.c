/* bench_core.c - start-up to first result (`ionmix -e show`, one process
 * per run) and a full show plus nernst on a 12-compound pair, in process.
 * Prints "bench|WHAT|FIGURE|GOAL|RATIO" lines for tests/bench.sh. */
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
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

static int cmp_d(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return (x > y) - (x < y);
}

/* Median wall time of runs start-ups, ms. */
static double startup_ms(const char *bin, int runs)
{
	double *t = calloc(runs, sizeof *t);
	int ok = 0;
	for (int i = 0; i < runs; i++) {
		double t0 = now_s();
		int st;
		pid_t p = fork();
		if (p == 0) {
			int fd = open("/dev/null", O_WRONLY);
			dup2(fd, 1);
			dup2(fd, 2);
			execl(bin, bin, "--db", "/nonexistent/bench.db", "-e",
			      "solution a; add NaCl 140; show", (char *)NULL);
			_exit(127);
		}
		waitpid(p, &st, 0);
		if (WIFEXITED(st) && WEXITSTATUS(st) == 0)
			t[ok++] = (now_s() - t0) * 1e3;
	}
	qsort(t, ok, sizeof *t, cmp_d);
	double m = ok ? t[ok / 2] : -1;
	free(t);
	return m;
}

int main(int argc, char **argv)
{
	const char *bin = argc > 1 ? argv[1] : "build/ionmix";
	char err[IM_ERRLEN];
	refdb *db;
	im_ctx ctx;
	out o = {NULL, stderr, 0, 0};
	double t0, dt_show, dt_nernst, ms;
	int n = 20000;

	ms = startup_ms(bin, 200);
	printf("bench|start-up to first result (ionmix -e 'solution; add; show'), median of 200|%.2f ms|< 10 ms|-\n",
	       ms);

	if (refdb_open(&db, err)) {
		fprintf(stderr, "%s\n", err);
		return 1;
	}
	o.fp = fopen("/dev/null", "w");
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = "/nonexistent/bench.db";
	if (ctx_load_chemistry(&ctx, err)) {
		fprintf(stderr, "%s\n", err);
		return 1;
	}
	if (cmd_exec(&ctx, "solution bath; add NaCl 125; add KCl 2.5; add CaCl2.2H2O 2;"
			   "add MgCl2.6H2O 1; add NaHCO3 26; add NaH2PO4.H2O 1.25;"
			   "add glucose 25; add HEPES 5; add Na-pyruvate 2; add sucrose 5;"
			   "add MgSO4.7H2O 0.5; add \"choline chloride\" 1; gas co2 5%", err) ||
	    cmd_exec(&ctx, "solution pip; add K-gluconate 120; add KCl 10; add HEPES 10;"
			   "add EGTA 0.5; add MgCl2.6H2O 2; add Na2ATP 4; add Na2GTP 0.3;"
			   "add Na2-phosphocreatine 10; add NaCl 2; add CaCl2 0.1; add sucrose 5;"
			   "ph 7.3 with KOH", err)) {
		fprintf(stderr, "set-up: %s\n", err);
		return 1;
	}
	t0 = now_s();
	for (int i = 0; i < n; i++)
		cmd_exec(&ctx, "show pip", err);
	dt_show = (now_s() - t0) / n * 1e6;
	t0 = now_s();
	for (int i = 0; i < n; i++)
		cmd_exec(&ctx, "nernst pip bath", err);
	dt_nernst = (now_s() - t0) / n * 1e6;
	printf("bench|show of a 12-compound pipette solution, with speciation and osmolality|%.1f us|< 1000 us|-\n",
	       dt_show);
	printf("bench|nernst on a 12-compound pair, both speciated|%.1f us|< 1000 us|-\n",
	       dt_nernst);
	ctx_free(&ctx);
	fclose(o.fp);
	refdb_close(db);
	return 0;
}
