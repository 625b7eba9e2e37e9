/*
 * fileio.h - the one way ionmix writes a file a user names (SVG, CSV,
 * recipes, corrected recordings, side notes, bench sheets).
 *
 * What a path gets:
 *  - "-": standard output, written straight through (never closed here).
 *  - a regular file, or a name that does not exist yet: written to a
 *    temporary file in the same directory, flushed, fsync'ed and renamed
 *    over the target on commit, so a reader sees the old file or the whole
 *    new one, never a torn one.  An existing file keeps its permission
 *    bits; a new one gets 0666 minus the umask.
 *  - a symbolic link (also a dangling one, up to 40 links deep): the link
 *    is followed and its final target is replaced as above; the link
 *    itself stays a link.
 *  - anything else that is not a directory or a block device (a FIFO, a
 *    terminal, /dev/null, /dev/stdout): opened and written directly, never
 *    replaced.
 *  - a directory or a block device: refused.
 *
 * Every failure is one line naming the file and the cause (strerror).
 * Nothing is left behind on failure or abort: the temporary file is
 * removed.  While a temporary file exists its name is kept in a small
 * registry that fio_remove_temps(), which is async-signal-safe, unlinks,
 * so a signal handler can leave no debris.
 *
 * Several outputs of one command go through a fio_batch: all are written
 * to temporaries first and renamed only when every one was written, so a
 * command completes all its outputs or leaves none (a rename that fails
 * after earlier ones succeeded is the one case that cannot be undone; it
 * is reported by name).
 */
#ifndef IONMIX_FILEIO_H
#define IONMIX_FILEIO_H

#include <stdio.h>

typedef struct fio_file fio_file;

/* Open `path` for writing as described above.  On success *f owns the
 * handle (free it with fio_commit or fio_abort, exactly once) and
 * fio_stream(*f) is the stream to write to.  -1 with err (naming path)
 * and *f == NULL on failure; nothing is created then. */
int fio_open(fio_file **f, const char *path, char *err);

/* The stream to write to; owned by f. */
FILE *fio_stream(fio_file *f);

/* The path as the user gave it (owned by f). */
const char *fio_path(const fio_file *f);

/* The temporary file f writes to (owned by f), or NULL when f writes
 * straight through.  For writers that must reopen the file by name (the
 * HDF5 library, see nwb.c): flush fio_stream(f) first, write through the
 * name, then fio_commit fsyncs and renames it as usual. */
const char *fio_temp_path(const fio_file *f);

/* 1 when f writes straight through (standard output, a FIFO, a terminal
 * or another non-regular file), 0 when through a temporary file. */
int fio_is_direct(const fio_file *f);

/* Finish: flush and check every write, fsync and close the temporary
 * file, and rename it over the target.  Returns 0, or -1 with err naming
 * the file and the cause (a full disk, an I/O error, a failed rename);
 * the temporary file is removed then.  Frees f either way. */
int fio_commit(fio_file *f, char *err);

/* Finish as fio_commit, but never replace anything: the temporary file is
 * linked to the target, which appears whole or not at all.  When the
 * target exists by then (another process made it first), *existed is set
 * to 1, the temporary is removed and that file stands; 0 is returned.
 * -2 (temporary removed, no message) when the file system has no hard
 * links or f writes straight through; -1 with err naming the file and
 * the cause on any other failure.  Frees f either way.  For a file that
 * must never be overwritten once made (a new database). */
int fio_commit_new(fio_file *f, int *existed, char *err);

/* Give up: close and remove the temporary file (a direct stream is only
 * flushed).  Frees f; f may be NULL. */
void fio_abort(fio_file *f);

/* 1 when a and b name the same existing file (same device and inode,
 * symbolic links followed), 0 otherwise (also when either does not
 * exist).  "-" is never the same as a named file.  Commands use it so
 * that no output path can be one of their inputs. */
int fio_same_file(const char *a, const char *b);

/* Unlink every temporary file currently open through this module.  Only
 * async-signal-safe calls; for signal handlers and exit paths. */
void fio_remove_temps(void);

/* ---- several outputs committed together ---- */

#define FIO_BATCH_MAX 8

typedef struct fio_batch {
	fio_file *f[FIO_BATCH_MAX];
	int n;
} fio_batch;

void fio_batch_init(fio_batch *b);
/* Open one more output of the batch (as fio_open); *fp is its stream.
 * -1 with err when it cannot be opened or the batch is full; the files
 * opened before stay open (call fio_batch_abort). */
int fio_batch_open(fio_batch *b, const char *path, FILE **fp, char *err);
/* Flush, check and fsync every output; only when all succeeded rename
 * them into place.  -1 with err on the first failure, after removing
 * every temporary.  The batch is empty afterwards either way. */
int fio_batch_commit(fio_batch *b, char *err);
/* Remove every temporary of the batch; the batch is empty afterwards. */
void fio_batch_abort(fio_batch *b);

#endif
