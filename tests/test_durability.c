/* test_durability.c - the user's database survives what happens to real
 * files:
 *  (a) a process saving in a loop is killed (SIGKILL) at random moments,
 *      300 times (at least 100 when a slow run, under valgrind, passes
 *      about 12 s): afterwards the file passes PRAGMA integrity_check,
 *      every saved solution is wholly one generation (all its items
 *      agree), no committed save is lost, and saves land in the order
 *      they were made;
 *  (b) two processes saving to one database at once, to the same and to
 *      different solution names, all succeed (WAL and the busy timeout),
 *      both when the file exists and when both create it;
 *  (b2) 16 writer processes start at once on a new database while another
 *      process loops fsync on a scratch file beside it and a third holds
 *      the file's write lock for 6 s (a writer stalled by the disk, longer
 *      than the 5 s SQLite timeout ionmix used to give up at): every save
 *      of every writer succeeds (the busy handler waits up to 30 s with
 *      backoff), and each writer's last save is there, whole;
 *  (c) a full disk: writes beyond a size fail (RLIMIT_FSIZE in a child
 *      process, and, where a 256 KiB tmpfs can be mounted, a real ENOSPC):
 *      the save fails with a one-line message naming the file, the
 *      earlier content is intact, and a failed export leaves neither a
 *      partial file nor its temporary behind.
 * Every writer runs in a forked child; the parent checks. */
#include "testutil.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/mount.h>
#include <sys/prctl.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include <sqlite3.h>

#include "command.h"
#include "common.h"
#include "userdb.h"

#define NITEMS 10        /* compounds in each generation's solution */
#define NSOL 3           /* solutions saved per round, in order s0, s1, s2 */
#define KILLS 300         /* kills, unless the time budget runs out ... */
#define KILLS_MIN 100     /* ... after at least these (valgrind is slow) */
#define KILL_BUDGET_S 12.0
#define KILL_MAX_US 20000
#define CHILD_MAX_S 30   /* a child that is never killed gives up */

#define TESTDIR_TAG "durable"
#include "testdir.h"

static void path_in(char *buf, size_t n, const char *sub, const char *name)
{
	snprintf(buf, n, "%s/%s/%s", dir, sub, name);
}

static void make_dir(const char *sub)
{
	char p[256];
	snprintf(p, sizeof p, "%s/%s", dir, sub);
	assert_int_equal(mkdir(p, 0755), 0);
}

static double now_s(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + t.tv_nsec * 1e-9;
}

/* Generation g of a solution: item k is compound k at g + k + 1 mM, from
 * a stock of STOCK_OF(g, k) mM, so old and new items cannot be confused;
 * the stock wraps so that it stays within the 5 M a load accepts however
 * many generations a busy machine lets the writer reach. */
#define STOCK_OF(g, k) (1000.0 + (double)(((g) + (k)) % 3000))
static void make_gen(solution *s, const char *name, int g, int nitems)
{
	sol_init(s, name);
	for (int k = 0; k < nitems; k++) {
		const rd_compound *c = refdb_compound_at(db, k);
		sol_set(s, c, g + k + 1.0);
		sol_find(s, c)->stock_mM = STOCK_OF(g, k);
	}
}

/* The generation s wholly belongs to, or -1 when its items disagree. */
static int gen_of(const solution *s, int nitems)
{
	int g;
	if (s->n != nitems)
		return -1;
	g = (int)s->items[0].mM - 1;
	for (int k = 0; k < nitems; k++)
		if (s->items[k].c != refdb_compound_at(db, k) || s->items[k].mM != g + k + 1.0 ||
		    s->items[k].stock_mM != STOCK_OF(g, k))
			return -1;
	return g;
}

/* PRAGMA integrity_check of the file, through SQLite directly. */
static void integrity_ok(const char *path)
{
	sqlite3 *h;
	sqlite3_stmt *st;
	const unsigned char *r;
	assert_int_equal(sqlite3_open_v2(path, &h, SQLITE_OPEN_READWRITE, NULL), SQLITE_OK);
	sqlite3_busy_timeout(h, 5000);
	assert_int_equal(sqlite3_prepare_v2(h, "PRAGMA integrity_check", -1, &st, NULL),
			 SQLITE_OK);
	assert_int_equal(sqlite3_step(st), SQLITE_ROW);
	r = sqlite3_column_text(st, 0);
	if (!r || strcmp((const char *)r, "ok") != 0)
		fail_msg("integrity_check of %s: %s", path, r ? (const char *)r : "(null)");
	sqlite3_finalize(st);
	sqlite3_close(h);
}

/* Load name and return its generation (-1: items disagree, -2: absent). */
static int saved_gen(userdb *u, const char *name, int nitems)
{
	char err[IM_ERRLEN];
	solution s;
	int g;
	if (udb_load(u, db, name, &s, err) != 0) {
		if (strstr(err, "no saved solution"))
			return -2;
		fail_msg("loading %s: %s", name, err);
	}
	g = gen_of(&s, nitems);
	sol_free(&s);
	return g;
}

static void child_dies_with_parent(void)
{
	prctl(PR_SET_PDEATHSIG, SIGKILL);
}

/* ---- (a) killed while saving ---- */

/* The child: continue after the last whole round (the generation of s2,
 * saved last), then save s0, s1, s2 at each next generation until killed.
 * Exit 2 when a save fails. */
static void saver_child(const char *path, int notify_fd)
{
	char err[IM_ERRLEN], name[16];
	userdb *u;
	solution s;
	int g = -1;
	double t0 = now_s();
	child_dies_with_parent();
	if (udb_open(path, 1, &u, err) != 0) {
		fprintf(stderr, "saver: %s\n", err);
		_exit(2);
	}
	snprintf(name, sizeof name, "s%d", NSOL - 1);
	if (udb_load(u, db, name, &s, err) == 0) {
		g = gen_of(&s, NITEMS);
		sol_free(&s);
	}
	while (now_s() - t0 < CHILD_MAX_S) {
		g++;
		for (int i = 0; i < NSOL; i++) {
			snprintf(name, sizeof name, "s%d", i);
			make_gen(&s, name, g, NITEMS);
			if (udb_save(u, &s, err) != 0) {
				fprintf(stderr, "saver: %s\n", err);
				_exit(2);
			}
			sol_free(&s);
		}
		if (notify_fd >= 0) { /* a whole round is saved */
			if (write(notify_fd, "r", 1) != 1)
				_exit(2);
			close(notify_fd);
			notify_fd = -1;
		}
	}
	_exit(3);
}

/* How long a saver takes from fork to its first whole round saved, in us
 * (the kill window must be wider; under valgrind it is far longer).  The
 * saver is killed as soon as it says so. */
static long first_round_us(const char *path)
{
	double t0 = now_s();
	int status, fds[2];
	char c;
	pid_t pid;
	assert_int_equal(pipe(fds), 0);
	pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		close(fds[0]);
		saver_child(path, fds[1]);
	}
	close(fds[1]);
	assert_int_equal(read(fds[0], &c, 1), 1);
	t0 = now_s() - t0;
	close(fds[0]);
	kill(pid, SIGKILL);
	assert_int_equal(waitpid(pid, &status, 0), pid);
	return (long)(t0 * 1e6);
}

static void killed_while_saving(void **state)
{
	char path[256], err[IM_ERRLEN];
	int last[NSOL], killed_mid_round = 0, opened = 0, round;
	long window_us;
	unsigned seed = (unsigned)time(NULL);
	double t0 = now_s();
	(void)state;
	make_dir("kill");
	path_in(path, sizeof path, "kill", "user.db");
	srand(seed);
	/* two rounds saved in full first (generations 0 and 1, or more: the
	 * first creates the file); the second gives the kill window: at
	 * least KILL_MAX_US, and twice what a saver needs for its first round */
	first_round_us(path);
	window_us = 2 * first_round_us(path);
	if (window_us < KILL_MAX_US)
		window_us = KILL_MAX_US;
	for (int i = 0; i < NSOL; i++)
		last[i] = 1; /* at least: each calibration saver did a round */
	for (round = 0; round < KILLS; round++) {
		if (round >= KILLS_MIN && now_s() - t0 > KILL_BUDGET_S)
			break;
		pid_t pid = fork();
		int status, g[NSOL];
		userdb *u;
		assert_true(pid >= 0);
		if (pid == 0)
			saver_child(path, -1);
		usleep((useconds_t)(rand() % (window_us + 1)));
		kill(pid, SIGKILL);
		assert_int_equal(waitpid(pid, &status, 0), pid);
		if (!WIFSIGNALED(status))
			fail_msg("the saver ended by itself (status %d) in round %d", status, round);
		integrity_ok(path);
		assert_int_equal(udb_open(path, 0, &u, err), 0);
		opened++;
		for (int i = 0; i < NSOL; i++) {
			char name[16];
			snprintf(name, sizeof name, "s%d", i);
			g[i] = saved_gen(u, name, NITEMS);
			if (g[i] == -1)
				fail_msg("round %d: %s holds items of two generations", round, name);
			/* a committed save is never lost */
			if (g[i] < last[i])
				fail_msg("round %d: %s went back from generation %d to %d", round,
					 name, last[i], g[i]);
			last[i] = g[i];
		}
		udb_close(u);
		/* saves land in order: s0 is at most one generation ahead of s2
		 * (a round cut short is redone from s0 by the next saver); a
		 * solution not saved yet counts as generation -1 */
		for (int i = 0; i < NSOL; i++)
			g[i] = g[i] == -2 ? -1 : g[i];
		for (int i = 1; i < NSOL; i++)
			if (g[i] > g[i - 1] || g[i] < g[0] - 1)
				fail_msg("round %d: generations out of order: %d %d %d", round,
					 g[0], g[1], g[2]);
		killed_mid_round += g[0] != g[NSOL - 1];
	}
	/* the loop must have saved something, or it proved nothing */
	assert_true(last[0] >= 10);
	printf("durability: %d kills within 0-%ld us (seed %u), %d generations saved, %d "
	       "kills between the saves of one round, %d checks, %.1f s\n", round, window_us,
	       seed, last[0] + 1, killed_mid_round, opened, now_s() - t0);
}

/* ---- (b) two writers at once ---- */

#define WRITER_ROUNDS 150

/* Writer `who` (0 or 1): after the start signal, save "shared" and its
 * own solution WRITER_ROUNDS times.  Exits with the number of failures
 * (capped), printing the first. */
static void writer_child(const char *path, int who, int start_fd)
{
	char err[IM_ERRLEN], own[16], c;
	userdb *u = NULL;
	solution s;
	int fails = 0;
	child_dies_with_parent();
	snprintf(own, sizeof own, "own-%d", who);
	if (read(start_fd, &c, 1) < 0)
		_exit(100);
	if (udb_open(path, 1, &u, err) != 0) {
		fprintf(stderr, "writer %d: %s\n", who, err);
		_exit(101);
	}
	for (int r = 0; r < WRITER_ROUNDS; r++) {
		/* writer 0 saves generations 1000.., writer 1 2000.. */
		make_gen(&s, "shared", 1000 * (who + 1) + r, NITEMS);
		if (udb_save(u, &s, err) != 0 && fails++ == 0)
			fprintf(stderr, "writer %d: %s\n", who, err);
		sol_free(&s);
		make_gen(&s, own, r, NITEMS);
		if (udb_save(u, &s, err) != 0 && fails++ == 0)
			fprintf(stderr, "writer %d: %s\n", who, err);
		sol_free(&s);
	}
	udb_close(u);
	_exit(fails > 99 ? 99 : fails);
}

static void two_writers(const char *sub, int precreate)
{
	char path[256], err[IM_ERRLEN];
	int fds[2], g;
	pid_t pid[2];
	userdb *u;
	make_dir(sub);
	path_in(path, sizeof path, sub, "user.db");
	if (precreate) {
		solution s;
		assert_int_equal(udb_open(path, 1, &u, err), 0);
		make_gen(&s, "shared", 0, NITEMS);
		assert_int_equal(udb_save(u, &s, err), 0);
		sol_free(&s);
		udb_close(u);
	}
	assert_int_equal(pipe(fds), 0);
	for (int w = 0; w < 2; w++) {
		pid[w] = fork();
		assert_true(pid[w] >= 0);
		if (pid[w] == 0) {
			close(fds[1]);
			writer_child(path, w, fds[0]);
		}
	}
	close(fds[0]);
	close(fds[1]); /* both start now: their read returns 0 */
	for (int w = 0; w < 2; w++) {
		int status;
		assert_int_equal(waitpid(pid[w], &status, 0), pid[w]);
		if (!WIFEXITED(status) || WEXITSTATUS(status) != 0)
			fail_msg("%s: writer %d: %s %d (failures, see stderr)", sub, w,
				 WIFEXITED(status) ? "exit" : "signal",
				 WIFEXITED(status) ? WEXITSTATUS(status) : WTERMSIG(status));
	}
	integrity_ok(path);
	assert_int_equal(udb_open(path, 0, &u, err), 0);
	g = saved_gen(u, "shared", NITEMS);
	/* the last save of one of the two, whole */
	if (g != 1000 + WRITER_ROUNDS - 1 && g != 2000 + WRITER_ROUNDS - 1)
		fail_msg("%s: shared is generation %d", sub, g);
	assert_int_equal(saved_gen(u, "own-0", NITEMS), WRITER_ROUNDS - 1);
	assert_int_equal(saved_gen(u, "own-1", NITEMS), WRITER_ROUNDS - 1);
	udb_close(u);
}

static void concurrent_writers(void **state)
{
	double t0 = now_s();
	(void)state;
	two_writers("two-existing", 1);
	two_writers("two-new", 0);
	printf("durability: 2 x 2 writers, %d saves each, no failures, %.1f s\n",
	       2 * WRITER_ROUNDS, now_s() - t0);
}

/* ---- (b2) 16 writers under an fsync load ---- */

#define NWRITERS 16
#define LOAD_ROUNDS 5          /* each writer saves own-N and "shared" this often */
#define LOAD_CHUNK (256 * 1024) /* bytes the loader writes before each fsync */
#define WRITER_ALARM_S 120     /* a writer stuck beyond any wait is killed */
#define STALL_S 6.0            /* the lock is held this long at the start */

/* Create path as an empty SQLite file and hold its write lock for
 * STALL_S seconds; say when it is held on ready_fd. */
static void stalled_writer(const char *path, int ready_fd)
{
	sqlite3 *h;
	child_dies_with_parent();
	if (sqlite3_open(path, &h) != SQLITE_OK ||
	    sqlite3_exec(h, "BEGIN EXCLUSIVE", NULL, NULL, NULL) != SQLITE_OK)
		_exit(2);
	if (write(ready_fd, "l", 1) != 1)
		_exit(3);
	close(ready_fd);
	usleep((useconds_t)(STALL_S * 1e6));
	sqlite3_exec(h, "COMMIT", NULL, NULL, NULL);
	sqlite3_close(h);
	_exit(0);
}

/* Loop write + fsync on a scratch file until killed; count in *fsyncs. */
static void fsync_loader(const char *scratch, volatile long *fsyncs, int ready_fd)
{
	static char chunk[LOAD_CHUNK];
	int fd;
	child_dies_with_parent();
	memset(chunk, 'x', sizeof chunk);
	if ((fd = open(scratch, O_WRONLY | O_CREAT | O_TRUNC, 0644)) < 0)
		_exit(2);
	for (;;) {
		if (pwrite(fd, chunk, sizeof chunk, 0) != (ssize_t)sizeof chunk || fsync(fd) != 0)
			_exit(3);
		if ((*fsyncs)++ == 0) {
			if (write(ready_fd, "r", 1) != 1)
				_exit(4);
			close(ready_fd);
		}
	}
}

/* Writer who: after the start signal, open (creating, maybe racing the
 * others) and save own-WHO (generation r) and "shared" (generation
 * 100 (who + 1) + r: amounts stay below 5 M) LOAD_ROUNDS times; report the
 * longest save (the first with the open) on report_fd; exit with the number of failures. */
static void loaded_writer(const char *path, int who, int start_fd, int report_fd)
{
	char err[IM_ERRLEN], own[16], c, line[64];
	userdb *u = NULL;
	solution s;
	int fails = 0;
	double longest = 0;
	child_dies_with_parent();
	alarm(WRITER_ALARM_S);
	snprintf(own, sizeof own, "own-%d", who);
	double t0;
	if (read(start_fd, &c, 1) < 0)
		_exit(100);
	t0 = now_s(); /* the first save counts from the open */
	if (udb_open(path, 1, &u, err) != 0) {
		fprintf(stderr, "writer %d: %s\n", who, err);
		_exit(101);
	}
	for (int r = 0; r < LOAD_ROUNDS; r++) {
		for (int k = 0; k < 2; k++) {
			if (r + k > 0)
				t0 = now_s();
			if (k == 0)
				make_gen(&s, own, r, NITEMS);
			else
				make_gen(&s, "shared", 100 * (who + 1) + r, NITEMS);
			if (udb_save(u, &s, err) != 0 && fails++ == 0)
				fprintf(stderr, "writer %d: %s\n", who, err);
			sol_free(&s);
			if (now_s() - t0 > longest)
				longest = now_s() - t0;
		}
	}
	udb_close(u);
	snprintf(line, sizeof line, "%d %.3f\n", who, longest);
	if (write(report_fd, line, strlen(line)) < 0)
		_exit(102);
	_exit(fails > 99 ? 99 : fails);
}

static void writers_under_fsync_load(void **state)
{
	char path[256], scratch[256], err[IM_ERRLEN], report[NWRITERS * 64 + 1], c;
	int start[2], ready[2], rep[2], g, status, got = 0;
	pid_t loader, staller, pid[NWRITERS];
	volatile long *fsyncs;
	double t0 = now_s(), longest = 0;
	userdb *u;
	ssize_t n;
	(void)state;
	make_dir("sixteen");
	path_in(path, sizeof path, "sixteen", "user.db");
	path_in(scratch, sizeof scratch, "sixteen", "scratch");
	fsyncs = mmap(NULL, sizeof *fsyncs, PROT_READ | PROT_WRITE, MAP_SHARED | MAP_ANONYMOUS,
		      -1, 0);
	assert_true(fsyncs != MAP_FAILED);
	*fsyncs = 0;
	assert_int_equal(pipe(ready), 0);
	loader = fork();
	assert_true(loader >= 0);
	if (loader == 0) {
		close(ready[0]);
		fsync_loader(scratch, fsyncs, ready[1]);
	}
	close(ready[1]);
	assert_int_equal(read(ready[0], &c, 1), 1); /* the load is on */
	close(ready[0]);
	assert_int_equal(pipe(ready), 0);
	staller = fork();
	assert_true(staller >= 0);
	if (staller == 0) {
		close(ready[0]);
		stalled_writer(path, ready[1]);
	}
	close(ready[1]);
	assert_int_equal(read(ready[0], &c, 1), 1); /* the lock is held */
	close(ready[0]);
	assert_int_equal(pipe(start), 0);
	assert_int_equal(pipe(rep), 0);
	for (int w = 0; w < NWRITERS; w++) {
		pid[w] = fork();
		assert_true(pid[w] >= 0);
		if (pid[w] == 0) {
			close(start[1]);
			close(rep[0]);
			loaded_writer(path, w, start[0], rep[1]);
		}
	}
	close(start[0]);
	close(rep[1]);
	close(start[1]); /* all start now */
	for (int w = 0; w < NWRITERS; w++) {
		assert_int_equal(waitpid(pid[w], &status, 0), pid[w]);
		if (!WIFEXITED(status) || WEXITSTATUS(status) != 0)
			fail_msg("writer %d of %d under fsync load: %s %d (see stderr)", w, NWRITERS,
				 WIFEXITED(status) ? "exit" : "signal",
				 WIFEXITED(status) ? WEXITSTATUS(status) : WTERMSIG(status));
	}
	kill(loader, SIGKILL);
	assert_int_equal(waitpid(loader, &status, 0), loader);
	assert_int_equal(waitpid(staller, &status, 0), staller);
	assert_true(WIFEXITED(status) && WEXITSTATUS(status) == 0);
	while ((n = read(rep[0], report + got, sizeof report - 1 - got)) > 0)
		got += (int)n;
	close(rep[0]);
	report[got] = '\0';
	for (char *l = report; *l; l = strchr(l, '\n') + 1) {
		int who;
		double t;
		assert_int_equal(sscanf(l, "%d %lf", &who, &t), 2);
		longest = t > longest ? t : longest;
	}
	integrity_ok(path);
	assert_int_equal(udb_open(path, 0, &u, err), 0);
	for (int w = 0; w < NWRITERS; w++) {
		char own[16];
		snprintf(own, sizeof own, "own-%d", w);
		assert_int_equal(saved_gen(u, own, NITEMS), LOAD_ROUNDS - 1);
	}
	g = saved_gen(u, "shared", NITEMS);
	if (g % 100 != LOAD_ROUNDS - 1 || g / 100 < 1 || g / 100 > NWRITERS)
		fail_msg("shared is generation %d, not one writer's last", g);
	udb_close(u);
	/* someone waited out the stalled lock (the first saves all did) */
	assert_true(longest >= STALL_S - 1);
	printf("durability: %d writers under an fsync load (%ld fsyncs of %d KiB) and a lock "
	       "held %.0f s, %d saves, all succeeded; longest save %.2f s; %.1f s\n", NWRITERS,
	       *fsyncs, LOAD_CHUNK / 1024, STALL_S, NWRITERS * LOAD_ROUNDS * 2, longest,
	       now_s() - t0);
	munmap((void *)fsyncs, sizeof *fsyncs);
}

/* ---- (c) a full disk ---- */

/* What the full-disk child reports through a pipe. */
typedef struct full_report {
	int setup_rc;        /* 0: the earlier content was saved and exported */
	char setup_err[IM_ERRLEN];
	long limit;          /* the RLIMIT_FSIZE set, bytes (0: none) */
	int saves_ok;        /* saves of "big" that succeeded before the failure */
	int save_failed;     /* 1: a save failed */
	char save_err[IM_ERRLEN];
	int export_rc;       /* -1 expected */
	char export_err[IM_ERRLEN];
} full_report;

static char *read_text(const char *p)
{
	FILE *f = fopen(p, "r"), *m;
	char *buf = NULL;
	size_t n = 0;
	int c;
	if (!f)
		return NULL;
	m = open_memstream(&buf, &n);
	while ((c = getc(f)) != EOF)
		putc(c, m);
	fclose(m);
	fclose(f);
	return buf;
}

static long file_size(const char *p)
{
	struct stat st;
	return stat(p, &st) == 0 ? (long)st.st_size : 0;
}

/* Fill the file system holding p until a write fails. */
static void fill_disk(const char *p)
{
	static char block[4096];
	int fd = open(p, O_WRONLY | O_CREAT | O_TRUNC, 0644);
	if (fd < 0)
		return;
	memset(block, 'f', sizeof block);
	while (write(fd, block, sizeof block) > 0)
		;
	while (write(fd, block, 1) > 0)
		;
	close(fd);
}

static void put_copy(im_ctx *ctx, const char *name, int g, int nitems)
{
	solution s, *t = im_xmalloc(sizeof *t);
	make_gen(&s, name, g, nitems);
	sol_copy(t, &s, name);
	sol_free(&s);
	ws_put(&ctx->ses->ws, t);
}

/* The child: with the earlier content in place ("keep" saved, its recipe
 * exported), make writes fail - RLIMIT_FSIZE at limit_extra bytes beyond
 * the largest database file (limit_extra > 0), or a full disk (filler) -
 * then save "big" (every compound) until a save fails, and export "big"
 * over keep's recipe. */
static void full_disk_child(const char *sub, long limit_extra, const char *filler,
			    int report_fd)
{
	char path[256], wal[270], recipe[256], err[IM_ERRLEN], line[600];
	full_report rep;
	userdb *u = NULL;
	solution s;
	out o = {0};
	im_ctx ctx;
	int n = refdb_ncompounds(db);
	child_dies_with_parent();
	memset(&rep, 0, sizeof rep);
	o.fp = fopen("/dev/null", "w");
	o.errfp = o.fp;
	path_in(path, sizeof path, sub, "user.db");
	snprintf(wal, sizeof wal, "%s-wal", path);
	path_in(recipe, sizeof recipe, sub, "keep.ionmix");
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = path;
	rep.setup_rc = udb_open(path, 1, &u, rep.setup_err);
	ctx.ses->user = u;
	if (rep.setup_rc == 0) {
		make_gen(&s, "keep", 7, NITEMS);
		rep.setup_rc = udb_save(u, &s, rep.setup_err);
		sol_free(&s);
	}
	put_copy(&ctx, "keep", 7, NITEMS);
	snprintf(line, sizeof line, "export keep %s", recipe);
	if (rep.setup_rc == 0)
		rep.setup_rc = cmd_exec(&ctx, line, rep.setup_err);
	if (limit_extra > 0) {
		struct rlimit rl;
		long big = file_size(path) > file_size(wal) ? file_size(path) : file_size(wal);
		signal(SIGXFSZ, SIG_IGN); /* the write fails with EFBIG instead */
		getrlimit(RLIMIT_FSIZE, &rl);
		rep.limit = big + limit_extra;
		rl.rlim_cur = (rlim_t)rep.limit;
		setrlimit(RLIMIT_FSIZE, &rl);
	}
	if (filler)
		fill_disk(filler);
	for (int g = 0; rep.setup_rc == 0 && g < 500; g++) {
		make_gen(&s, "big", g, n);
		if (udb_save(u, &s, err) != 0) {
			rep.save_failed = 1;
			snprintf(rep.save_err, sizeof rep.save_err, "%s", err);
			sol_free(&s);
			break;
		}
		rep.saves_ok++;
		sol_free(&s);
	}
	/* a recipe of every compound is larger than 1 KiB */
	if (limit_extra > 0) {
		struct rlimit rl;
		getrlimit(RLIMIT_FSIZE, &rl);
		rl.rlim_cur = 1024;
		setrlimit(RLIMIT_FSIZE, &rl);
	}
	put_copy(&ctx, "big", 0, n);
	snprintf(line, sizeof line, "export big %s", recipe);
	rep.export_rc = cmd_exec(&ctx, line, rep.export_err);
	ctx_free(&ctx); /* closes u */
	fclose(o.fp);
	if (write(report_fd, &rep, sizeof rep) != (ssize_t)sizeof rep)
		_exit(1);
	_exit(0);
}

/* Run the child, then check what it left. */
static void full_disk_case(const char *sub, long limit_extra, int fill)
{
	char path[256], recipe[256], filler[256], subdir[256], err[IM_ERRLEN], *text;
	int fds[2], status, g, sets = 0;
	full_report rep;
	pid_t pid;
	userdb *u;
	DIR *d;
	struct dirent *e;
	path_in(path, sizeof path, sub, "user.db");
	path_in(recipe, sizeof recipe, sub, "keep.ionmix");
	path_in(filler, sizeof filler, sub, "filler");
	assert_int_equal(pipe(fds), 0);
	pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		close(fds[0]);
		full_disk_child(sub, limit_extra, fill ? filler : NULL, fds[1]);
	}
	close(fds[1]);
	memset(&rep, 0, sizeof rep);
	assert_int_equal(read(fds[0], &rep, sizeof rep), (ssize_t)sizeof rep);
	close(fds[0]);
	assert_int_equal(waitpid(pid, &status, 0), pid);
	assert_true(WIFEXITED(status) && WEXITSTATUS(status) == 0);
	if (rep.setup_rc != 0)
		fail_msg("%s: saving the earlier content failed: %s", sub, rep.setup_err);
	/* the save failed, in one line that names the file */
	if (!rep.save_failed)
		fail_msg("%s: %d saves of every compound fit: the limit did not bite", sub,
			 rep.saves_ok);
	assert_null(strchr(rep.save_err, '\n'));
	if (!strstr(rep.save_err, path))
		fail_msg("%s: the message does not name the file: %s", sub, rep.save_err);
	/* ... and the cause: the system's words, a failed write, or a full disk */
	if (!strstr(rep.save_err, strerror(EFBIG)) && !strstr(rep.save_err, "write") &&
	    !strstr(rep.save_err, "disk full"))
		fail_msg("%s: the message does not say why: %s", sub, rep.save_err);
	/* the export failed, in one line */
	assert_int_equal(rep.export_rc, -1);
	assert_non_null(strstr(rep.export_err, "cannot write"));
	assert_null(strchr(rep.export_err, '\n'));
	/* the earlier content is intact; "big" is wholly its last saved generation */
	if (fill)
		unlink(filler);
	integrity_ok(path);
	assert_int_equal(udb_open(path, 0, &u, err), 0);
	assert_int_equal(saved_gen(u, "keep", NITEMS), 7);
	g = saved_gen(u, "big", refdb_ncompounds(db));
	assert_int_equal(g, rep.saves_ok == 0 ? -2 : rep.saves_ok - 1);
	udb_close(u);
	/* the recipe is keep's, whole; no temporary file is left beside it */
	text = read_text(recipe);
	assert_non_null(text);
	assert_non_null(strstr(text, "\nsolution keep\n"));
	assert_null(strstr(text, "big"));
	for (const char *q = text; (q = strstr(q, "\nset ")) != NULL; q++)
		sets++;
	assert_int_equal(sets, NITEMS);
	free(text);
	snprintf(subdir, sizeof subdir, "%s/%s", dir, sub);
	d = opendir(subdir);
	assert_non_null(d);
	while ((e = readdir(d)) != NULL)
		if (strncmp(e->d_name, "keep.ionmix.", 12) == 0)
			fail_msg("%s: the failed export left %s behind", sub, e->d_name);
	closedir(d);
	printf("durability: %s: %d saves fit%s, then: %s; export: %s\n", sub, rep.saves_ok,
	       rep.limit ? " under RLIMIT_FSIZE" : "", rep.save_err, rep.export_err);
}

/* Writes beyond the files' size plus 64 KiB fail with EFBIG. */
static void file_size_limit(void **state)
{
	(void)state;
	make_dir("fsize");
	full_disk_case("fsize", 64 * 1024, 0);
}

static char mnt[256];

/* A real full disk (ENOSPC) on a 256 KiB tmpfs, where mounting one is
 * allowed (root with CAP_SYS_ADMIN); skipped with a message otherwise. */
static void tmpfs_full(void **state)
{
	(void)state;
	make_dir("tmpfs");
	snprintf(mnt, sizeof mnt, "%s/tmpfs", dir);
	if (mount("tmpfs", mnt, "tmpfs", MS_NOSUID | MS_NODEV, "size=256k,mode=0755") != 0) {
		printf("durability: cannot mount a tmpfs here (%s): the ENOSPC case is "
		       "skipped (the RLIMIT_FSIZE case covers a failing write)\n",
		       strerror(errno));
		mnt[0] = '\0';
		skip();
	}
	full_disk_case("tmpfs", 0, 1);
}

static int unmount(void **state)
{
	(void)state;
	if (mnt[0])
		umount2(mnt, MNT_DETACH);
	mnt[0] = '\0';
	return 0;
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(killed_while_saving),
		cmocka_unit_test(concurrent_writers),
		cmocka_unit_test(writers_under_fsync_load),
		cmocka_unit_test(file_size_limit),
		cmocka_unit_test_teardown(tmpfs_full, unmount),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
