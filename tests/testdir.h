/*
 * testdir.h - the fixture the user-database tests share: the reference
 * data and a scratch directory under /tmp, made once per group and
 * removed with everything in it.  Define TESTDIR_TAG (a short word for
 * the directory's name) before including; include after testutil.h.
 */
#ifndef IONMIX_TESTDIR_H
#define IONMIX_TESTDIR_H

#include <stdio.h>
#include <stdlib.h>

#include "common.h"
#include "refdb.h"

static refdb *db;
static char dir[64];

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	snprintf(dir, sizeof dir, "/tmp/ionmix-%s-XXXXXX", TESTDIR_TAG);
	if (!mkdtemp(dir))
		return -1;
	return refdb_open(&db, err);
}

static int teardown(void **state)
{
	char cmd[128];
	(void)state;
	refdb_close(db);
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : -1;
}

#endif
