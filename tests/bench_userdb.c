/* bench_userdb.c - the user database's cost per command: opening an
 * existing file (the checks of the path included), loading a 12-compound
 * solution (every row checked as typed input) and saving it (one
 * transaction, synced to disk: the figure depends on the disk).
 * Prints "bench|WHAT|FIGURE|GOAL|RATIO" lines for tests/bench.sh. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "userdb.h"

static double now_s(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + t.tv_nsec * 1e-9;
}

int main(void)
{
	static const char *const names[] = {"K-gluconate", "KCl", "HEPES", "EGTA", "MgCl2.6H2O",
					    "Na2ATP", "Na2GTP", "Na2-phosphocreatine", "NaCl",
					    "CaCl2", "sucrose", "KOH"};
	static const double mM[] = {120, 10, 10, 0.5, 2, 4, 0.3, 10, 2, 0.1, 5, 3.68};
	char dir[] = "/tmp/ionmix-bench-udb-XXXXXX", path[64], err[IM_ERRLEN], cmd[96];
	refdb *db;
	userdb *u;
	solution s, back;
	double t0, dt_open, dt_load, dt_save;
	int n_open = 2000, n_load = 20000, n_save = 200;
	if (!mkdtemp(dir) || refdb_open(&db, err)) {
		fprintf(stderr, "bench_userdb: set-up failed\n");
		return 1;
	}
	snprintf(path, sizeof path, "%s/user.db", dir);
	sol_init(&s, "pip");
	for (size_t i = 0; i < IM_COUNT(names); i++)
		sol_add(&s, refdb_compound(db, names[i]), mM[i]);
	if (udb_open(path, 1, &u, err) || udb_save(u, &s, err)) {
		fprintf(stderr, "bench_userdb: %s\n", err);
		return 1;
	}
	t0 = now_s();
	for (int i = 0; i < n_save; i++)
		if (udb_save(u, &s, err)) {
			fprintf(stderr, "bench_userdb: %s\n", err);
			return 1;
		}
	dt_save = (now_s() - t0) / n_save * 1e3;
	t0 = now_s();
	for (int i = 0; i < n_load; i++) {
		if (udb_load(u, db, "pip", &back, err)) {
			fprintf(stderr, "bench_userdb: %s\n", err);
			return 1;
		}
		sol_free(&back);
	}
	dt_load = (now_s() - t0) / n_load * 1e6;
	udb_close(u);
	t0 = now_s();
	for (int i = 0; i < n_open; i++) {
		if (udb_open(path, 0, &u, err) != 0) {
			fprintf(stderr, "bench_userdb: %s\n", err);
			return 1;
		}
		udb_close(u);
	}
	dt_open = (now_s() - t0) / n_open * 1e6;
	printf("bench|open an existing user database (path checks, schema read), mean of %d|%.0f us|< 2000 us|-\n",
	       n_open, dt_open);
	printf("bench|load a 12-compound saved solution, every row checked, mean of %d|%.1f us|< 1000 us|-\n",
	       n_load, dt_load);
	printf("bench|save a 12-compound solution (one synced transaction), mean of %d|%.2f ms|< 50 ms|-\n",
	       n_save, dt_save);
	sol_free(&s);
	refdb_close(db);
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : 1;
}
