/*
 * h5undo.h - change an HDF5 file in place, all or nothing, at a cost that
 * depends on what changes and not on the size of the file.
 *
 * An HDF5 virtual file driver (registered with the library loaded by
 * h5lazy.c) reads the file with pread and keeps every write in memory.
 * After H5Fclose, h5u_commit writes an undo journal beside the file
 * (".NAME.ionmix-undo": the old bytes of every range about to change and
 * the original length; fsync'ed, the directory too), writes the changes
 * into the file, fsyncs it and removes the journal: that removal is the
 * commit point.  A failed write is undone at once from the journal kept in
 * memory; SIGINT, SIGTERM and SIGHUP are held back while the file is being
 * written, so only a crash or SIGKILL can leave a journal behind, and
 * h5u_recover (called before any read of the file) puts the old bytes
 * back.  The journal names the file's device and inode and a checksum of
 * the old and the new bytes of every range: a journal that matches neither
 * is left alone with an error, never applied.
 *
 * One file at a time (the driver keeps its pending changes in one slot).
 * Every function returns 0 (or the documented value), or -1 with a
 * one-line err naming the file and the cause.
 *
 * For tests only: the environment variable IONMIX_TEST_NWB_FAULT set to
 * "fail:N" makes the N-th write into the file fail (EIO) during a commit,
 * "crash:N" ends the process (_exit(99)) just before it, leaving the
 * journal and the N-1 writes done; "signal:N" sends the process SIGTERM
 * there (held back until the commit is complete).
 */
#ifndef IONMIX_H5UNDO_H
#define IONMIX_H5UNDO_H

#include <stddef.h>
#include <stdint.h>

/* A file-access property list that opens through the undo driver (close
 * it with H5Pclose), or -1 with err.  The HDF5 library must be loaded. */
int64_t h5u_fapl(char *err);

/* 1 when the last open through the driver failed because another process
 * holds a lock on the file (an HDF5 reader has it open), 0 otherwise. */
int h5u_was_locked(void);

/* After a successful H5Fclose of the file opened read-write through
 * h5u_fapl: write the changes as described above.  On failure the file is
 * as it was before (or, when even the undo failed, the journal stays for
 * h5u_recover and err says so). */
int h5u_commit(const char *path, char *err);

/* Forget the pending changes of a failed change (nothing was written). */
void h5u_discard(void);

/* Look for the journal of path.  0: none; 1: an interrupted change was
 * undone, note (size n) says so in one line; -1: err (a journal that does
 * not match the file, unreadable, or the undo failed), the file and the
 * journal left as they are. */
int h5u_recover(const char *path, char *note, size_t n, char *err);

/* The journal's path for path (heap): ".NAME.ionmix-undo" beside the file
 * path resolves to. */
char *h5u_journal_path(const char *path);

#endif
