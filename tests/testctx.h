/*
 * testctx.h - the command context the command-level cmocka tests share:
 * the reference data opened once per group (setup/teardown), a fresh
 * context per test with output captured in memory (fresh/done), no user
 * database (a path that cannot exist), and ok() to run a line that must
 * succeed.  Include after testutil.h; one test program per include.
 */
#ifndef IONMIX_TESTCTX_H
#define IONMIX_TESTCTX_H

#include <stdio.h>
#include <stdlib.h>

#include "command.h"
#include "common.h"

#define TC_UNUSED __attribute__((unused))

static refdb *db;
static im_ctx ctx;
static out o;
static char *buf;
static size_t len;

static TC_UNUSED int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	return refdb_open(&db, err);
}

static TC_UNUSED int teardown(void **state)
{
	(void)state;
	refdb_close(db);
	return 0;
}

static TC_UNUSED int fresh(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	o.fp = open_memstream(&buf, &len);
	o.errfp = stderr;
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = "/nonexistent/ionmix-test.db";
	return ctx_load_chemistry(&ctx, err);
}

static TC_UNUSED int done(void **state)
{
	(void)state;
	ctx_free(&ctx);
	fclose(o.fp);
	free(buf);
	buf = NULL;
	return 0;
}

static TC_UNUSED void ok(const char *line)
{
	char err[IM_ERRLEN];
	if (cmd_exec(&ctx, line, err))
		fail_msg("'%s' failed: %s", line, err);
}

#endif
