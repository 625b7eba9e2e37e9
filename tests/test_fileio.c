/* test_fileio.c - the one file writer: atomic replacement, symlinks
 * followed, FIFOs written in place, modes kept, umask respected, failures
 * named, nothing left behind, batches all-or-nothing.  Everything happens
 * in a scratch directory; no real device node is ever a target. */
#include "testutil.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "common.h"
#include "fileio.h"

static char dir[256];

static int setup(void **state)
{
	(void)state;
	snprintf(dir, sizeof dir, "/tmp/ionmix-fileio-XXXXXX");
	return mkdtemp(dir) ? 0 : -1;
}

static int teardown(void **state)
{
	(void)state;
	DIR *d = opendir(dir);
	struct dirent *e;
	char p[512];
	while (d && (e = readdir(d)) != NULL) {
		if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) {
			snprintf(p, sizeof p, "%s/%s", dir, e->d_name);
			unlink(p);
		}
	}
	if (d)
		closedir(d);
	return rmdir(dir);
}

static char *path(const char *name)
{
	static char p[4][512];
	static int k;
	k = (k + 1) % 4;
	snprintf(p[k], sizeof p[k], "%s/%s", dir, name);
	return p[k];
}

static int entries(void)
{
	DIR *d = opendir(dir);
	int n = 0;
	struct dirent *e;
	while ((e = readdir(d)) != NULL)
		n += strcmp(e->d_name, ".") && strcmp(e->d_name, "..");
	closedir(d);
	return n;
}

static void slurp(const char *p, char *buf, size_t n)
{
	FILE *fp = fopen(p, "r");
	assert_non_null(fp);
	size_t k = fread(buf, 1, n - 1, fp);
	buf[k] = '\0';
	fclose(fp);
}

static int write_text(const char *p, const char *text, char *err)
{
	fio_file *f;
	if (fio_open(&f, p, err) != 0)
		return -1;
	fputs(text, fio_stream(f));
	return fio_commit(f, err);
}

static void new_file_respects_umask(void **state)
{
	char err[IM_ERRLEN], buf[64];
	struct stat st;
	(void)state;
	mode_t old = umask(027);
	assert_int_equal(write_text(path("a.txt"), "one\n", err), 0);
	umask(old);
	assert_int_equal(stat(path("a.txt"), &st), 0);
	assert_int_equal(st.st_mode & 0777, 0640);
	slurp(path("a.txt"), buf, sizeof buf);
	assert_string_equal(buf, "one\n");
	assert_int_equal(entries(), 1); /* no temporary left */
}

static void existing_mode_kept(void **state)
{
	char err[IM_ERRLEN], buf[64];
	struct stat st;
	(void)state;
	assert_int_equal(write_text(path("m.txt"), "old\n", err), 0);
	assert_int_equal(chmod(path("m.txt"), 0604), 0);
	assert_int_equal(write_text(path("m.txt"), "new\n", err), 0);
	assert_int_equal(stat(path("m.txt"), &st), 0);
	assert_int_equal(st.st_mode & 07777, 0604);
	slurp(path("m.txt"), buf, sizeof buf);
	assert_string_equal(buf, "new\n");
}

static void symlink_target_replaced(void **state)
{
	char err[IM_ERRLEN], buf[64];
	struct stat st;
	(void)state;
	assert_int_equal(write_text(path("real.txt"), "old\n", err), 0);
	assert_int_equal(symlink("real.txt", path("link.txt")), 0);
	assert_int_equal(write_text(path("link.txt"), "via link\n", err), 0);
	assert_int_equal(lstat(path("link.txt"), &st), 0);
	assert_true(S_ISLNK(st.st_mode));
	slurp(path("real.txt"), buf, sizeof buf);
	assert_string_equal(buf, "via link\n");
	/* a dangling link: its target is created, the link stays */
	assert_int_equal(symlink("later.txt", path("dangling")), 0);
	assert_int_equal(write_text(path("dangling"), "made\n", err), 0);
	assert_int_equal(lstat(path("dangling"), &st), 0);
	assert_true(S_ISLNK(st.st_mode));
	slurp(path("later.txt"), buf, sizeof buf);
	assert_string_equal(buf, "made\n");
	/* a loop is an error naming the path */
	assert_int_equal(symlink("loop2", path("loop1")), 0);
	assert_int_equal(symlink("loop1", path("loop2")), 0);
	assert_int_equal(write_text(path("loop1"), "x", err), -1);
	assert_non_null(strstr(err, "loop1"));
	assert_non_null(strstr(err, "symbolic links"));
}

static void fifo_written_in_place(void **state)
{
	char err[IM_ERRLEN], buf[64];
	struct stat st;
	(void)state;
	assert_int_equal(mkfifo(path("fifo"), 0600), 0);
	/* hold both ends so the writer's open does not block */
	int rd = open(path("fifo"), O_RDWR | O_NONBLOCK);
	assert_true(rd >= 0);
	fio_file *f;
	assert_int_equal(fio_open(&f, path("fifo"), err), 0);
	assert_true(fio_is_direct(f));
	fputs("through\n", fio_stream(f));
	assert_int_equal(fio_commit(f, err), 0);
	ssize_t n = read(rd, buf, sizeof buf - 1);
	assert_int_equal(n, 8);
	buf[n] = '\0';
	assert_string_equal(buf, "through\n");
	close(rd);
	assert_int_equal(lstat(path("fifo"), &st), 0);
	assert_true(S_ISFIFO(st.st_mode)); /* not replaced by a regular file */
}

static void failures_named_nothing_left(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	/* a directory */
	assert_int_equal(write_text(dir, "x", err), -1);
	assert_non_null(strstr(err, "directory"));
	/* a path below a regular file (ENOTDIR), unwritable whoever runs */
	assert_int_equal(write_text(path("plain"), "x", err), 0);
	assert_int_equal(write_text(path("plain/sub.txt"), "x", err), -1);
	assert_non_null(strstr(err, "plain/sub.txt"));
	assert_non_null(strstr(err, strerror(ENOTDIR)));
	/* a missing directory */
	assert_int_equal(write_text(path("nodir/x.svg"), "x", err), -1);
	assert_non_null(strstr(err, "nodir/x.svg"));
	fio_file *none;
	assert_int_equal(fio_open(&none, "", err), -1);
	assert_null(none);
	assert_int_equal(entries(), 1); /* only "plain" */
}

static void abort_leaves_old_file(void **state)
{
	char err[IM_ERRLEN], buf[64];
	(void)state;
	assert_int_equal(write_text(path("keep.txt"), "old\n", err), 0);
	fio_file *f;
	assert_int_equal(fio_open(&f, path("keep.txt"), err), 0);
	fputs("half", fio_stream(f));
	assert_int_equal(entries(), 2); /* the file and its temporary */
	fio_remove_temps();             /* as a signal handler would */
	assert_int_equal(entries(), 1);
	fio_abort(f);
	assert_int_equal(entries(), 1);
	slurp(path("keep.txt"), buf, sizeof buf);
	assert_string_equal(buf, "old\n");
}

static void same_file(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(write_text(path("in.csv"), "v\n1\n", err), 0);
	assert_int_equal(symlink("in.csv", path("alias.csv")), 0);
	assert_int_equal(link(path("in.csv"), path("hard.csv")), 0);
	assert_true(fio_same_file(path("in.csv"), path("alias.csv")));
	assert_true(fio_same_file(path("in.csv"), path("hard.csv")));
	assert_false(fio_same_file(path("in.csv"), path("missing.csv")));
	assert_false(fio_same_file("-", "-"));
}

static void batch_all_or_nothing(void **state)
{
	char err[IM_ERRLEN], buf[64];
	FILE *fp;
	fio_batch b;
	(void)state;
	fio_batch_init(&b);
	assert_int_equal(fio_batch_open(&b, path("one.svg"), &fp, err), 0);
	fputs("<svg/>\n", fp);
	/* the second output cannot be opened: the first is never created */
	assert_int_equal(fio_batch_open(&b, path("nodir/two.csv"), &fp, err), -1);
	assert_non_null(strstr(err, "two.csv"));
	fio_batch_abort(&b);
	assert_int_equal(entries(), 0);
	/* the same name twice is refused */
	assert_int_equal(fio_batch_open(&b, path("x.csv"), &fp, err), 0);
	assert_int_equal(fio_batch_open(&b, path("x.csv"), &fp, err), -1);
	assert_non_null(strstr(err, "twice"));
	fio_batch_abort(&b);
	/* both written, both renamed */
	assert_int_equal(fio_batch_open(&b, path("p.svg"), &fp, err), 0);
	fputs("svg\n", fp);
	assert_int_equal(fio_batch_open(&b, path("p.csv"), &fp, err), 0);
	fputs("csv\n", fp);
	assert_int_equal(entries(), 2); /* temporaries only */
	assert_int_equal(fio_batch_commit(&b, err), 0);
	slurp(path("p.svg"), buf, sizeof buf);
	assert_string_equal(buf, "svg\n");
	slurp(path("p.csv"), buf, sizeof buf);
	assert_string_equal(buf, "csv\n");
	assert_int_equal(entries(), 2);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(new_file_respects_umask, setup, teardown),
		cmocka_unit_test_setup_teardown(existing_mode_kept, setup, teardown),
		cmocka_unit_test_setup_teardown(symlink_target_replaced, setup, teardown),
		cmocka_unit_test_setup_teardown(fifo_written_in_place, setup, teardown),
		cmocka_unit_test_setup_teardown(failures_named_nothing_left, setup, teardown),
		cmocka_unit_test_setup_teardown(abort_leaves_old_file, setup, teardown),
		cmocka_unit_test_setup_teardown(same_file, setup, teardown),
		cmocka_unit_test_setup_teardown(batch_all_or_nothing, setup, teardown),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
