/*
 * h5undo.c - the undo-journal HDF5 file driver and its commit and
 * recovery (see h5undo.h).
 */
#define _GNU_SOURCE
#include "h5undo.h"

#include "common.h"

#include "h5lazy.h" /* <hdf5.h>, the library loaded on first use */

#include <errno.h>
#include <fcntl.h>
#include <libgen.h>
#include <limits.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

_Static_assert(sizeof(hid_t) == sizeof(int64_t), "hid_t is 64 bits (HDF5 1.10 and later)");

/* ---- the pending changes: byte ranges kept in memory ---- */

typedef struct extent {
	uint64_t off, len; /* bytes of the file, in HDF5's addresses */
	unsigned char *b;  /* owned */
} extent;

/* The driver's file: HDF5's part first. */
typedef struct ufile {
	H5FD_t pub;
	int fd;
	int rw;              /* opened read-write: writes are kept */
	dev_t dev;
	ino_t ino;
	uint64_t orig_len;   /* the file's length at open, bytes */
	uint64_t disk_valid; /* bytes [0, disk_valid) of the disk file still hold (truncations) */
	uint64_t eof;        /* the logical length, bytes */
	uint64_t eoa;        /* HDF5's end of allocated space */
	extent *x;           /* sorted by off, disjoint (owned) */
	int nx, capx;
} ufile;

/* The file closed by HDF5 whose changes await h5u_commit (one slot), and
 * the one open read-write. */
static ufile *pending, *live;
/* 1: the last open found the file locked by another process */
static int locked;

int h5u_was_locked(void)
{
	return locked;
}

static void ufile_free(ufile *f)
{
	if (!f)
		return;
	for (int i = 0; i < f->nx; i++)
		free(f->x[i].b);
	free(f->x);
	if (f->fd >= 0)
		close(f->fd);
	free(f);
}

/* Keep len bytes at off: merged with every extent it overlaps or
 * touches, so the list stays sorted and disjoint. */
static void keep(ufile *f, uint64_t off, uint64_t len, const unsigned char *src)
{
	uint64_t lo = off, hi = off + len;
	int a = 0;
	while (a < f->nx && f->x[a].off + f->x[a].len < lo)
		a++;
	int b = a;
	while (b < f->nx && f->x[b].off <= hi)
		b++;
	/* extents a..b-1 overlap or touch [lo, hi) */
	if (b > a) {
		if (f->x[a].off < lo)
			lo = f->x[a].off;
		if (f->x[b - 1].off + f->x[b - 1].len > hi)
			hi = f->x[b - 1].off + f->x[b - 1].len;
	}
	unsigned char *nb = im_xmalloc((size_t)(hi - lo));
	for (int i = a; i < b; i++) {
		memcpy(nb + (f->x[i].off - lo), f->x[i].b, (size_t)f->x[i].len);
		free(f->x[i].b);
	}
	memcpy(nb + (off - lo), src, (size_t)len);
	if (b == a) { /* insert at a */
		if (f->nx == f->capx) {
			f->capx = f->capx ? 2 * f->capx : 16;
			f->x = im_xrealloc(f->x, (size_t)f->capx * sizeof *f->x);
		}
		memmove(f->x + a + 1, f->x + a, (size_t)(f->nx - a) * sizeof *f->x);
		f->nx++;
	} else if (b - a > 1) { /* a..b-1 become one */
		memmove(f->x + a + 1, f->x + b, (size_t)(f->nx - b) * sizeof *f->x);
		f->nx -= b - a - 1;
	}
	f->x[a] = (extent){ lo, hi - lo, nb };
}

/* Drop what lies at or beyond len (a truncation). */
static void clip(ufile *f, uint64_t len)
{
	while (f->nx > 0 && f->x[f->nx - 1].off >= len)
		free(f->x[--f->nx].b);
	if (f->nx > 0 && f->x[f->nx - 1].off + f->x[f->nx - 1].len > len)
		f->x[f->nx - 1].len = len - f->x[f->nx - 1].off;
}

/* The current bytes [off, off+len) as HDF5 sees them: the disk file where
 * it still holds, zeros beyond, the kept writes on top. */
static int view(const ufile *f, uint64_t off, uint64_t len, unsigned char *dst)
{
	memset(dst, 0, (size_t)len);
	uint64_t disk = f->disk_valid < f->orig_len ? f->disk_valid : f->orig_len;
	if (off < disk) {
		uint64_t want = (off + len < disk ? off + len : disk) - off, got = 0;
		while (got < want) {
			ssize_t k = pread(f->fd, dst + got, (size_t)(want - got), (off_t)(off + got));
			if (k < 0 && errno == EINTR)
				continue;
			if (k < 0)
				return -1;
			if (k == 0)
				break;
			got += (uint64_t)k;
		}
	}
	for (int i = 0; i < f->nx; i++) {
		const extent *e = &f->x[i];
		if (e->off >= off + len || e->off + e->len <= off)
			continue;
		uint64_t s = e->off > off ? e->off : off;
		uint64_t t = e->off + e->len < off + len ? e->off + e->len : off + len;
		memcpy(dst + (s - off), e->b + (s - e->off), (size_t)(t - s));
	}
	return 0;
}

/* ---- the driver's callbacks ---- */

static H5FD_t *u_open(const char *name, unsigned flags, hid_t fapl, haddr_t maxaddr)
{
	(void)fapl;
	(void)maxaddr;
	int rw = (flags & H5F_ACC_RDWR) != 0;
	if (flags & (H5F_ACC_TRUNC | H5F_ACC_CREAT | H5F_ACC_EXCL))
		return NULL; /* only existing files are changed through this driver */
	if (rw && (pending || live))
		return NULL; /* one change at a time */
	int fd = open(name, (rw ? O_RDWR : O_RDONLY) | O_CLOEXEC);
	if (fd < 0)
		return NULL;
	struct stat st;
	locked = 0;
	if (fstat(fd, &st) != 0 || !S_ISREG(st.st_mode) ||
	    (rw && flock(fd, LOCK_EX | LOCK_NB) != 0 && (locked = errno == EWOULDBLOCK))) {
		close(fd);
		return NULL;
	}
	ufile *f = im_xcalloc(1, sizeof *f);
	f->fd = fd;
	f->rw = rw;
	f->dev = st.st_dev;
	f->ino = st.st_ino;
	f->orig_len = f->disk_valid = f->eof = (uint64_t)st.st_size;
	if (rw)
		live = f;
	return &f->pub;
}

static herr_t u_close(H5FD_t *file)
{
	ufile *f = (ufile *)file;
	if (f == live)
		live = NULL;
	if (f->rw && f->nx > 0 && !pending) {
		pending = f; /* h5u_commit writes it, h5u_discard forgets it */
		return 0;
	}
	if (f->rw && !pending && f->eof != f->orig_len) {
		pending = f; /* only a length to change */
		return 0;
	}
	ufile_free(f);
	return 0;
}

static int u_cmp(const H5FD_t *a, const H5FD_t *b)
{
	const ufile *x = (const ufile *)a, *y = (const ufile *)b;
	if (x->dev != y->dev)
		return x->dev < y->dev ? -1 : 1;
	if (x->ino != y->ino)
		return x->ino < y->ino ? -1 : 1;
	return 0;
}

static herr_t u_query(const H5FD_t *file, unsigned long *flags)
{
	(void)file;
	*flags = H5FD_FEAT_AGGREGATE_METADATA | H5FD_FEAT_ACCUMULATE_METADATA |
		 H5FD_FEAT_DATA_SIEVE | H5FD_FEAT_AGGREGATE_SMALLDATA;
	return 0;
}

static haddr_t u_get_eoa(const H5FD_t *file, H5FD_mem_t type)
{
	(void)type;
	return ((const ufile *)file)->eoa;
}

static herr_t u_set_eoa(H5FD_t *file, H5FD_mem_t type, haddr_t addr)
{
	(void)type;
	((ufile *)file)->eoa = addr;
	return 0;
}

static haddr_t u_get_eof(const H5FD_t *file, H5FD_mem_t type)
{
	(void)type;
	return ((const ufile *)file)->eof;
}

static herr_t u_get_handle(H5FD_t *file, hid_t fapl, void **handle)
{
	(void)fapl;
	*handle = &((ufile *)file)->fd;
	return 0;
}

static herr_t u_read(H5FD_t *file, H5FD_mem_t type, hid_t dxpl, haddr_t addr, size_t size,
		     void *buf)
{
	(void)type;
	(void)dxpl;
	ufile *f = (ufile *)file;
	if (addr == HADDR_UNDEF || addr + size < addr || addr + size > f->eoa)
		return -1;
	return view(f, addr, size, buf) == 0 ? 0 : -1;
}

static herr_t u_write(H5FD_t *file, H5FD_mem_t type, hid_t dxpl, haddr_t addr, size_t size,
		      const void *buf)
{
	(void)type;
	(void)dxpl;
	ufile *f = (ufile *)file;
	if (!f->rw || addr == HADDR_UNDEF || addr + size < addr || addr + size > f->eoa)
		return -1;
	if (size == 0)
		return 0;
	keep(f, addr, size, buf);
	if (addr + size > f->eof)
		f->eof = addr + size;
	return 0;
}

static herr_t u_flush(H5FD_t *file, hid_t dxpl, hbool_t closing)
{
	(void)file;
	(void)dxpl;
	(void)closing;
	return 0; /* the changes reach the file in h5u_commit */
}

static herr_t u_truncate(H5FD_t *file, hid_t dxpl, hbool_t closing)
{
	(void)dxpl;
	(void)closing;
	ufile *f = (ufile *)file;
	if (!f->rw || f->eoa == f->eof)
		return 0;
	if (f->eoa < f->eof) {
		clip(f, f->eoa);
		if (f->eoa < f->disk_valid)
			f->disk_valid = f->eoa;
	}
	f->eof = f->eoa;
	return 0;
}

static const H5FD_class_t undo_class = {
#ifdef H5FD_CLASS_VERSION
	.version = H5FD_CLASS_VERSION,
	.value = (H5FD_class_value_t)437,
#endif
	.name = "ionmix-undo",
	.maxaddr = ((haddr_t)1 << 62),
	.fc_degree = H5F_CLOSE_WEAK,
	.open = u_open,
	.close = u_close,
	.cmp = u_cmp,
	.query = u_query,
	.get_eoa = u_get_eoa,
	.set_eoa = u_set_eoa,
	.get_eof = u_get_eof,
	.get_handle = u_get_handle,
	.read = u_read,
	.write = u_write,
	.flush = u_flush,
	.truncate = u_truncate,
	.fl_map = H5FD_FLMAP_DICHOTOMY,
};

int64_t h5u_fapl(char *err)
{
	static hid_t id = -1;
	if (id < 0)
		id = H5FDregister(&undo_class);
	if (id < 0)
		return im_fail(err, "the HDF5 library refused ionmix's file driver");
	hid_t fapl = H5Pcreate(H5P_FILE_ACCESS);
	if (fapl < 0 || H5Pset_driver(fapl, id, NULL) < 0) {
		if (fapl >= 0)
			H5Pclose(fapl);
		return im_fail(err, "the HDF5 library refused ionmix's file driver");
	}
	return fapl;
}

void h5u_discard(void)
{
	ufile_free(pending);
	pending = NULL;
}

/* ---- the journal ---- */

/* Layout, native byte order (the journal never leaves the machine):
 *   "ionmix-undo 1\n\0\0"  16 bytes
 *   u64 device, u64 inode, u64 original length, u64 final length,
 *   u64 number of ranges
 *   per range: u64 offset, u64 length, u64 FNV-1a of the old bytes,
 *              u64 FNV-1a of the new bytes, the old bytes
 *   u64 FNV-1a of everything before it */
static const char MAGIC[16] = "ionmix-undo 1\n";

static uint64_t fnv(uint64_t h, const unsigned char *p, size_t n)
{
	for (size_t i = 0; i < n; i++) {
		h ^= p[i];
		h *= 1099511628211ULL;
	}
	return h;
}
#define FNV0 14695981039346656037ULL

typedef struct buf {
	unsigned char *p;
	size_t n, cap;
} buf;

static void put(buf *b, const void *src, size_t n)
{
	if (b->n + n > b->cap) {
		while (b->n + n > b->cap)
			b->cap = b->cap ? 2 * b->cap : 4096;
		b->p = im_xrealloc(b->p, b->cap);
	}
	memcpy(b->p + b->n, src, n);
	b->n += n;
}

static void put64(buf *b, uint64_t v)
{
	put(b, &v, 8);
}

char *h5u_journal_path(const char *path)
{
	char *real = realpath(path, NULL);
	const char *p = real ? real : path;
	const char *slash = strrchr(p, '/');
	size_t dl = slash ? (size_t)(slash - p) + 1 : 0;
	char *j = im_xmalloc(strlen(p) + 16);
	memcpy(j, p, dl);
	sprintf(j + dl, ".%s.ionmix-undo", p + dl);
	free(real);
	return j;
}

/* fsync the directory that holds path. */
static int sync_dir(const char *path)
{
	char *c = im_xstrdup(path);
	int fd = open(dirname(c), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
	free(c);
	if (fd < 0)
		return -1;
	int rc = fsync(fd) == 0 || errno == EINVAL ? 0 : -1;
	close(fd);
	return rc;
}

static int write_all(int fd, const unsigned char *p, size_t n, off_t off)
{
	while (n > 0) {
		ssize_t k = off >= 0 ? pwrite(fd, p, n, off) : write(fd, p, n);
		if (k < 0 && errno == EINTR)
			continue;
		if (k <= 0)
			return -1;
		p += k;
		n -= (size_t)k;
		if (off >= 0)
			off += k;
	}
	return 0;
}

/* The test hook: the fault for the n-th write into the file. */
static int fault(int n)
{
	const char *e = getenv("IONMIX_TEST_NWB_FAULT");
	int k;
	if (!e)
		return 0;
	if (sscanf(e, "crash:%d", &k) == 1 && k == n)
		_exit(99);
	if (sscanf(e, "signal:%d", &k) == 1 && k == n)
		raise(SIGTERM); /* held back until the commit is complete */
	if (sscanf(e, "fail:%d", &k) == 1 && k == n) {
		errno = EIO;
		return -1;
	}
	return 0;
}

/* One range of the journal as parsed (points into the journal). */
typedef struct range {
	uint64_t off, len, h_old, h_new;
	const unsigned char *old;
} range;

typedef struct journal {
	uint64_t dev, ino, orig_len, final_len, n;
	range *r; /* owned */
} journal;

/* Parse a journal image; -1 when it is not a complete one. */
static int parse(const unsigned char *p, size_t n, journal *j)
{
	memset(j, 0, sizeof *j);
	if (n < 16 + 5 * 8 + 8 || memcmp(p, MAGIC, 16) != 0)
		return -1;
	uint64_t sum;
	memcpy(&sum, p + n - 8, 8);
	if (fnv(FNV0, p, n - 8) != sum)
		return -1;
	const unsigned char *q = p + 16, *end = p + n - 8;
	uint64_t h[5];
	memcpy(h, q, sizeof h);
	q += sizeof h;
	j->dev = h[0], j->ino = h[1], j->orig_len = h[2], j->final_len = h[3], j->n = h[4];
	if (j->n > (uint64_t)(end - q) / 32)
		return -1;
	j->r = im_xcalloc((size_t)j->n + 1, sizeof *j->r);
	for (uint64_t i = 0; i < j->n; i++) {
		uint64_t v[4];
		if ((size_t)(end - q) < sizeof v)
			goto bad;
		memcpy(v, q, sizeof v);
		q += sizeof v;
		if (v[1] > (uint64_t)(end - q))
			goto bad;
		j->r[i] = (range){ v[0], v[1], v[2], v[3], q };
		q += v[1];
	}
	if (q != end)
		goto bad;
	return 0;
bad:
	free(j->r);
	j->r = NULL;
	return -1;
}

/* Put the old bytes back and the original length; fsync. */
static int undo(int fd, const journal *j)
{
	for (uint64_t i = 0; i < j->n; i++)
		if (write_all(fd, j->r[i].old, (size_t)j->r[i].len, (off_t)j->r[i].off))
			return -1;
	if (ftruncate(fd, (off_t)j->orig_len) != 0 || fsync(fd) != 0)
		return -1;
	return 0;
}

/* The journal image of f's pending changes (heap, *n bytes). */
static unsigned char *build(const ufile *f, size_t *n)
{
	buf b = { 0 };
	uint64_t disk = f->disk_valid < f->orig_len ? f->disk_valid : f->orig_len;
	uint64_t nr = 0;
	for (int i = 0; i < f->nx; i++)
		nr += f->x[i].off < disk;
	nr += disk < f->orig_len;
	put(&b, MAGIC, 16);
	put64(&b, (uint64_t)f->dev);
	put64(&b, (uint64_t)f->ino);
	put64(&b, f->orig_len);
	put64(&b, f->eof);
	put64(&b, nr);
	for (int i = 0; i <= f->nx; i++) {
		uint64_t off, len;
		if (i < f->nx) {
			off = f->x[i].off;
			if (off >= disk)
				continue;
			len = (off + f->x[i].len < disk ? off + f->x[i].len : disk) - off;
		} else if (disk < f->orig_len) {
			off = disk;
			len = f->orig_len - disk;
		} else {
			break;
		}
		unsigned char *old = im_xmalloc((size_t)len), *now = im_xmalloc((size_t)len);
		ufile tmp = *f;
		tmp.nx = 0; /* the disk as it is */
		tmp.disk_valid = f->orig_len;
		int bad = view(&tmp, off, len, old) || view(f, off, len, now);
		if (bad) {
			free(old);
			free(now);
			free(b.p);
			return NULL;
		}
		put64(&b, off);
		put64(&b, len);
		put64(&b, fnv(FNV0, old, (size_t)len));
		put64(&b, fnv(FNV0, now, (size_t)len));
		put(&b, old, (size_t)len);
		free(old);
		free(now);
	}
	put64(&b, fnv(FNV0, b.p, b.n));
	*n = b.n;
	return b.p;
}

/* Write the pending changes into the file; the n-th write counted for
 * the test hook. */
static int apply(const ufile *f)
{
	int w = 0;
	uint64_t disk = f->disk_valid < f->orig_len ? f->disk_valid : f->orig_len;
	if (disk < f->orig_len && (fault(++w) || ftruncate(f->fd, (off_t)disk) != 0))
		return -1;
	for (int i = 0; i < f->nx; i++)
		if (fault(++w) ||
		    write_all(f->fd, f->x[i].b, (size_t)f->x[i].len, (off_t)f->x[i].off))
			return -1;
	if (f->eof != disk && (fault(++w) || ftruncate(f->fd, (off_t)f->eof) != 0))
		return -1;
	return fdatasync(f->fd); /* the data and the length: all a reader needs */
}

/* Hold SIGINT, SIGTERM and SIGHUP back (block 1) or let them in (0). */
static void hold(int block, sigset_t *old)
{
	if (block) {
		sigset_t s;
		sigemptyset(&s);
		sigaddset(&s, SIGINT);
		sigaddset(&s, SIGTERM);
		sigaddset(&s, SIGHUP);
		sigprocmask(SIG_BLOCK, &s, old);
	} else {
		sigprocmask(SIG_SETMASK, old, NULL);
	}
}

/* Write the journal file jp (new) with image p; fsync it and its directory. */
static int write_journal(const char *jp, const unsigned char *p, size_t n)
{
	int fd = open(jp, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0600);
	if (fd < 0)
		return -1;
	if (write_all(fd, p, n, -1) || fdatasync(fd) != 0) {
		int e = errno;
		close(fd);
		unlink(jp);
		errno = e;
		return -1;
	}
	close(fd);
	if (sync_dir(jp)) {
		int e = errno;
		unlink(jp);
		errno = e;
		return -1;
	}
	return 0;
}

int h5u_commit(const char *path, char *err)
{
	ufile *f = pending;
	pending = NULL;
	if (live) { /* an HDF5 object left open: its changes are not all here */
		ufile_free(f);
		return im_fail(err, "cannot write %s: the HDF5 library still holds it open"
			       " (nothing was written)", path);
	}
	if (!f)
		return 0; /* nothing changed */
	size_t n = 0;
	unsigned char *img = build(f, &n);
	if (!img) {
		int e = errno;
		ufile_free(f);
		return im_fail(err, "cannot read %s: %s", path, strerror(e));
	}
	journal j;
	parse(img, n, &j); /* the image just built: the ranges for an undo */
	char *jp = h5u_journal_path(path);
	sigset_t old;
	int rc = 0;
	hold(1, &old);
	if (write_journal(jp, img, n)) {
		rc = im_fail(err, "cannot write the undo journal %s: %s (%s is unchanged)", jp,
			     strerror(errno), path);
	} else if (apply(f)) {
		int e = errno;
		if (undo(f->fd, &j) == 0) {
			unlink(jp);
			sync_dir(jp);
			rc = im_fail(err, "cannot write %s: %s (undone: the file is as it was)",
				     path, strerror(e));
		} else {
			rc = im_fail(err, "cannot write %s: %s; the undo failed too: the next"
				     " `list` or `correct` of it restores it from %s", path,
				     strerror(e), jp);
		}
	} else if (unlink(jp) != 0 || sync_dir(jp) != 0) {
		/* the changes are complete and fsync'ed; only the journal's
		 * removal is not known to be durable: the next open finds the
		 * journal matching the new bytes and undoes it, so say so */
		rc = im_fail(err, "cannot remove the undo journal %s: %s", jp, strerror(errno));
	}
	hold(0, &old);
	free(jp);
	free(j.r);
	free(img);
	ufile_free(f);
	return rc;
}

/* ---- recovery ---- */

/* Read the whole file fd (heap, *n bytes), or NULL. */
static unsigned char *slurp(int fd, size_t *n)
{
	buf b = { 0 };
	unsigned char tmp[65536];
	ssize_t k;
	while ((k = read(fd, tmp, sizeof tmp)) != 0) {
		if (k < 0 && errno == EINTR)
			continue;
		if (k < 0) {
			free(b.p);
			return NULL;
		}
		put(&b, tmp, (size_t)k);
	}
	*n = b.n;
	return b.p ? b.p : im_xmalloc(1);
}

/* 1 when every range of j holds either its old or its new bytes in fd
 * (ranges beyond the file's end count as either), 0 otherwise. */
static int matches(int fd, const journal *j, uint64_t size)
{
	for (uint64_t i = 0; i < j->n; i++) {
		const range *r = &j->r[i];
		if (r->off >= size)
			continue;
		unsigned char *now = im_xcalloc((size_t)r->len + 1, 1);
		uint64_t want = (r->off + r->len < size ? r->off + r->len : size) - r->off;
		ssize_t k = pread(fd, now, (size_t)want, (off_t)r->off);
		uint64_t h = fnv(FNV0, now, (size_t)r->len);
		free(now);
		if (k < 0 || (uint64_t)k != want)
			return 0;
		if (h != r->h_old && h != r->h_new && want == r->len)
			return 0;
	}
	return 1;
}

int h5u_recover(const char *path, char *note, size_t nn, char *err)
{
	char *jp = h5u_journal_path(path);
	int jfd = open(jp, O_RDONLY | O_CLOEXEC);
	if (jfd < 0) {
		int e = errno;
		free(jp);
		if (e == ENOENT)
			return 0;
		return im_fail(err, "cannot read the undo journal of %s: %s", path, strerror(e));
	}
	size_t n = 0;
	unsigned char *img = slurp(jfd, &n);
	close(jfd);
	journal j = { 0 };
	int rc = -1, fd = -1;
	sigset_t old;
	struct stat st;
	if (!img) {
		im_fail(err, "cannot read the undo journal %s: %s", jp, strerror(errno));
		goto out;
	}
	if (n >= 16 && memcmp(img, MAGIC, 16) == 0 && parse(img, n, &j) != 0) {
		/* cut short while being written: the file was not yet touched */
		if (unlink(jp) == 0) {
			snprintf(note, nn, "removed an incomplete undo journal of %s (%s was not"
				 " changed by it)", path, path);
			rc = 1;
		} else {
			im_fail(err, "cannot remove the incomplete undo journal %s: %s", jp,
				strerror(errno));
		}
		goto out;
	}
	if (!j.r) {
		im_fail(err, "%s is not an ionmix undo journal: left alone; move it away to use"
			" %s", jp, path);
		goto out;
	}
	fd = open(path, O_RDWR | O_CLOEXEC);
	if (fd < 0) {
		im_fail(err, "%s has an undo journal from an interrupted correction, but cannot be"
			" opened to restore it: %s", path, strerror(errno));
		goto out;
	}
	if (flock(fd, LOCK_EX | LOCK_NB) != 0 && errno == EWOULDBLOCK) {
		im_fail(err, "%s is being changed by another program (locked); try again", path);
		goto out;
	}
	if (fstat(fd, &st) != 0 || (uint64_t)st.st_dev != j.dev || (uint64_t)st.st_ino != j.ino ||
	    (uint64_t)st.st_size > (j.orig_len > j.final_len ? j.orig_len : j.final_len) ||
	    !matches(fd, &j, (uint64_t)st.st_size)) {
		im_fail(err, "the undo journal %s does not match %s (another file, or changed"
			" since): both left alone; remove the journal once the file is known to be"
			" good", jp, path);
		goto out;
	}
	hold(1, &old);
	if (undo(fd, &j) != 0) {
		im_fail(err, "cannot restore %s from its undo journal %s: %s", path, jp,
			strerror(errno));
	} else if (unlink(jp) != 0 || sync_dir(jp) != 0) {
		im_fail(err, "restored %s, but cannot remove its undo journal %s: %s", path, jp,
			strerror(errno));
	} else {
		snprintf(note, nn, "%s: an interrupted correction was undone from its journal;"
			 " the file is as it was before it", path);
		rc = 1;
	}
	hold(0, &old);
out:
	if (fd >= 0)
		close(fd);
	free(j.r);
	free(img);
	free(jp);
	return rc;
}
