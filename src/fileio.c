/*
 * fileio.c - the one file writer: atomic replacement of regular files,
 * straight-through writes to everything else, symlinks followed, temporary
 * files registered for signal-time removal.  See fileio.h.
 */
#include "fileio.h"

#include "common.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#define MAX_LINKS 40  /* symbolic links followed, as the kernel's ELOOP limit */

struct fio_file {
	char *path;   /* as given */
	char *target; /* the file replaced on commit (links resolved); NULL if direct */
	char *tmp;    /* temporary file in target's directory; NULL if direct */
	FILE *fp;
	int is_stdout;
	int slot;     /* index in the temp registry, -1 if none */
};

/* ---- the registry of live temporary files ----
 * A fixed table of pointers to heap strings that stay valid while
 * registered; the signal-side reader only reads pointers and unlinks. */
#define REG_MAX 64
static char *volatile reg[REG_MAX];

static int reg_add(char *tmp)
{
	for (int i = 0; i < REG_MAX; i++) {
		if (reg[i] == NULL) {
			reg[i] = tmp;
			return i;
		}
	}
	return -1;
}

static void reg_del(int slot)
{
	if (slot >= 0 && slot < REG_MAX)
		reg[slot] = NULL;
}

void fio_remove_temps(void)
{
	for (int i = 0; i < REG_MAX; i++) {
		char *p = reg[i];
		if (p != NULL)
			unlink(p);
	}
}

/* ---- paths ---- */

static char *dir_of(const char *path)
{
	const char *slash = strrchr(path, '/');
	if (slash == NULL)
		return im_xstrdup(".");
	if (slash == path)
		return im_xstrdup("/");
	size_t n = (size_t)(slash - path);
	char *d = im_xmalloc(n + 1);
	memcpy(d, path, n);
	d[n] = '\0';
	return d;
}

static const char *base_of(const char *path)
{
	const char *slash = strrchr(path, '/');
	return slash ? slash + 1 : path;
}

/* Follow symbolic links from path to the file a write should replace.
 * The result (heap) may not exist yet.  -1 with err on a loop or a
 * read error. */
static int resolve_links(const char *path, char **out, char *err)
{
	char *cur = im_xstrdup(path);
	for (int hops = 0;; hops++) {
		struct stat st;
		if (lstat(cur, &st) != 0 || !S_ISLNK(st.st_mode)) {
			*out = cur;
			return 0;
		}
		if (hops >= MAX_LINKS) {
			free(cur);
			return im_fail(err, "cannot write %s: too many levels of symbolic links", path);
		}
		size_t cap = (size_t)st.st_size + 1;
		if (cap < 64)
			cap = 64;
		char *buf = im_xmalloc(cap + 1);
		ssize_t len = readlink(cur, buf, cap);
		if (len < 0) {
			int e = errno;
			free(buf);
			free(cur);
			return im_fail(err, "cannot write %s: %s", path, strerror(e));
		}
		buf[len] = '\0';
		if (buf[0] == '/') {
			free(cur);
			cur = buf;
		} else {
			char *d = dir_of(cur);
			char *next = im_xmalloc(strlen(d) + 1 + (size_t)len + 1);
			sprintf(next, "%s/%s", d, buf);
			free(d);
			free(buf);
			free(cur);
			cur = next;
		}
	}
}

static mode_t new_file_mode(void)
{
	mode_t um = umask(0);
	umask(um);
	return (mode_t)(0666 & ~um);
}

/* ---- one file ---- */

static int open_direct(fio_file *f, char *err)
{
	f->fp = fopen(f->path, "w");
	if (f->fp == NULL)
		return im_fail(err, "cannot write %s: %s", f->path, strerror(errno));
	return 0;
}

static int open_temp(fio_file *f, const struct stat *old, char *err)
{
	char *d = dir_of(f->target);
	const char *b = base_of(f->target);
	f->tmp = im_xmalloc(strlen(d) + strlen(b) + 32);
	sprintf(f->tmp, "%s/.%s.ionmix-XXXXXX", d, b);
	free(d);
	/* Block signals between creating the file and registering it, so a
	 * handler never misses a temporary. */
	sigset_t all, prev;
	sigfillset(&all);
	sigprocmask(SIG_BLOCK, &all, &prev);
	int fd = mkstemp(f->tmp);
	int e = errno;
	if (fd >= 0)
		f->slot = reg_add(f->tmp);
	sigprocmask(SIG_SETMASK, &prev, NULL);
	if (fd < 0) {
		free(f->tmp);
		f->tmp = NULL;
		return im_fail(err, "cannot write %s: %s", f->path, strerror(e));
	}
	mode_t mode = old ? (old->st_mode & 07777) : new_file_mode();
	if (fchmod(fd, mode) != 0) {
		/* not fatal: the file is still written; the mode is best effort */
	}
	f->fp = fdopen(fd, "w");
	if (f->fp == NULL) {
		e = errno;
		close(fd);
		unlink(f->tmp);
		reg_del(f->slot);
		f->slot = -1;
		free(f->tmp);
		f->tmp = NULL;
		return im_fail(err, "cannot write %s: %s", f->path, strerror(e));
	}
	return 0;
}

static void file_free(fio_file *f)
{
	if (f->slot >= 0) {
		reg_del(f->slot);
		f->slot = -1;
	}
	free(f->path);
	free(f->target);
	free(f->tmp);
	free(f);
}

int fio_open(fio_file **out, const char *path, char *err)
{
	*out = NULL;
	if (path == NULL || path[0] == '\0')
		return im_fail(err, "an empty file name");
	fio_file *f = im_xcalloc(1, sizeof *f);
	f->slot = -1;
	f->path = im_xstrdup(path);
	if (strcmp(path, "-") == 0) {
		f->is_stdout = 1;
		f->fp = stdout;
		*out = f;
		return 0;
	}
	if (resolve_links(path, &f->target, err) != 0) {
		file_free(f);
		return -1;
	}
	struct stat st;
	int exists = stat(f->target, &st) == 0;
	if (!exists && errno != ENOENT) {
		im_fail(err, "cannot write %s: %s", path, strerror(errno));
		file_free(f);
		return -1;
	}
	if (exists && S_ISDIR(st.st_mode)) {
		im_fail(err, "cannot write %s: it is a directory", path);
		file_free(f);
		return -1;
	}
	if (exists && S_ISBLK(st.st_mode)) {
		im_fail(err, "cannot write %s: it is a block device", path);
		file_free(f);
		return -1;
	}
	int rc;
	if (exists && !S_ISREG(st.st_mode)) {
		free(f->target);
		f->target = NULL;
		/* a terminal or /dev/stdout may be where the results go: those
		 * a script's stdio still holds come first */
		fflush(stdout);
		rc = open_direct(f, err);
	} else {
		rc = open_temp(f, exists ? &st : NULL, err);
	}
	if (rc != 0) {
		file_free(f);
		return -1;
	}
	*out = f;
	return 0;
}

FILE *fio_stream(fio_file *f)
{
	return f->fp;
}

const char *fio_path(const fio_file *f)
{
	return f->path;
}

const char *fio_temp_path(const fio_file *f)
{
	return f->tmp;
}

int fio_is_direct(const fio_file *f)
{
	return f->tmp == NULL;
}

/* Flush, check, fsync and close; the file stays in place (not renamed).
 * -1 with err; the stream is closed either way (standard output only
 * flushed). */
static int finish_stream(fio_file *f, char *err)
{
	int bad = 0, e = 0;
	if (fflush(f->fp) != 0 || ferror(f->fp)) {
		bad = 1;
		e = errno ? errno : EIO;
	}
	if (f->is_stdout) {
		f->fp = NULL;
		if (bad)
			return im_fail(err, "cannot write to standard output: %s", strerror(e));
		return 0;
	}
	if (!bad && f->tmp != NULL && fsync(fileno(f->fp)) != 0) {
		bad = 1;
		e = errno;
	}
	if (fclose(f->fp) != 0 && !bad) {
		bad = 1;
		e = errno;
	}
	f->fp = NULL;
	if (bad)
		return im_fail(err, "cannot write %s: %s", f->path, strerror(e));
	return 0;
}

static void sync_dir_of(const char *path)
{
	char *d = dir_of(path);
	int fd = open(d, O_RDONLY | O_DIRECTORY);
	if (fd >= 0) {
		fsync(fd); /* best effort: the rename is already visible */
		close(fd);
	}
	free(d);
}

static int rename_into_place(fio_file *f, char *err)
{
	if (f->tmp == NULL)
		return 0;
	if (rename(f->tmp, f->target) != 0) {
		int e = errno;
		unlink(f->tmp);
		return im_fail(err, "cannot write %s: %s", f->path, strerror(e));
	}
	sync_dir_of(f->target);
	return 0;
}

int fio_commit(fio_file *f, char *err)
{
	int rc = finish_stream(f, err);
	if (rc == 0)
		rc = rename_into_place(f, err);
	else if (f->tmp != NULL)
		unlink(f->tmp);
	file_free(f);
	return rc;
}

int fio_commit_new(fio_file *f, int *existed, char *err)
{
	int rc;
	*existed = 0;
	if (f->tmp == NULL) {
		fio_abort(f);
		return -2;
	}
	rc = finish_stream(f, err);
	if (rc == 0 && link(f->tmp, f->target) != 0) {
		int e = errno;
		if (e == EEXIST)
			*existed = 1;
		else if (e == EPERM || e == ENOSYS || e == EOPNOTSUPP)
			rc = -2; /* no hard links here */
		else
			rc = im_fail(err, "cannot write %s: %s", f->path, strerror(e));
	} else if (rc == 0) {
		sync_dir_of(f->target);
	}
	unlink(f->tmp);
	file_free(f);
	return rc;
}

void fio_abort(fio_file *f)
{
	if (f == NULL)
		return;
	if (f->fp != NULL) {
		if (f->is_stdout)
			fflush(f->fp);
		else
			fclose(f->fp);
	}
	if (f->tmp != NULL)
		unlink(f->tmp);
	file_free(f);
}

int fio_same_file(const char *a, const char *b)
{
	struct stat sa, sb;
	if (a == NULL || b == NULL || strcmp(a, "-") == 0 || strcmp(b, "-") == 0)
		return 0;
	if (stat(a, &sa) != 0 || stat(b, &sb) != 0)
		return 0;
	return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}

/* ---- batches ---- */

void fio_batch_init(fio_batch *b)
{
	b->n = 0;
}

int fio_batch_open(fio_batch *b, const char *path, FILE **fp, char *err)
{
	if (b->n >= FIO_BATCH_MAX)
		return im_fail(err, "too many output files in one command (at most %d)", FIO_BATCH_MAX);
	for (int i = 0; i < b->n; i++) {
		if (strcmp(b->f[i]->path, path) == 0 ||
		    (b->f[i]->target && fio_same_file(b->f[i]->target, path)))
			return im_fail(err, "%s is named twice as an output", path);
	}
	fio_file *f;
	if (fio_open(&f, path, err) != 0)
		return -1;
	b->f[b->n++] = f;
	*fp = fio_stream(f);
	return 0;
}

int fio_batch_commit(fio_batch *b, char *err)
{
	int rc = 0;
	for (int i = 0; i < b->n && rc == 0; i++)
		rc = finish_stream(b->f[i], err);
	for (int i = 0; i < b->n; i++) {
		fio_file *f = b->f[i];
		if (rc == 0)
			rc = rename_into_place(f, err);
		else {
			if (f->fp != NULL && !f->is_stdout)
				fclose(f->fp);
			f->fp = NULL;
			if (f->tmp != NULL)
				unlink(f->tmp);
		}
		file_free(f);
	}
	b->n = 0;
	return rc;
}

void fio_batch_abort(fio_batch *b)
{
	for (int i = 0; i < b->n; i++)
		fio_abort(b->f[i]);
	b->n = 0;
}
