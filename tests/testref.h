/*
 * testref.h - the fixture of the tests that need only the reference data:
 * db, opened once per group (setup) and closed after it (teardown), and
 * C(NAME), a compound that must exist.  Include after testutil.h.  The
 * user-database tests use testdir.h, which adds a scratch directory.
 */
#ifndef IONMIX_TESTREF_H
#define IONMIX_TESTREF_H

#include "common.h"
#include "refdb.h"

static refdb *db;

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	return refdb_open(&db, err);
}

static int teardown(void **state)
{
	(void)state;
	refdb_close(db);
	return 0;
}

/* The compound called name; the test fails when there is none. */
static __attribute__((unused)) const rd_compound *C(const char *name)
{
	const rd_compound *c = refdb_compound(db, name);
	if (!c)
		fail_msg("no compound %s", name);
	return c;
}

#endif
