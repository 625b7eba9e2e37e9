/* test_complete.c - the shell's completer without a terminal (issue 11
 * item 7): the typed prefix is kept and completes, case-insensitively and
 * through aliases, to the canonical name; names with spaces complete with
 * or without an opening quote; after `with` only titrants (ph), sources
 * of the metal (free) or neutral fillers (osmo); after `remove` only the
 * compounds present; after a number the units; and an unquoted
 * multi-word compound name is accepted by the command. */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "shell.h"

static refdb *db;
static im_ctx ctx;
static out o;
static char *buf;
static size_t len;

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	if (refdb_open(&db, err))
		return -1;
	o.fp = open_memstream(&buf, &len);
	o.errfp = stderr;
	ctx_init(&ctx, db, &o);
	if (ctx_load_chemistry(&ctx, err))
		return -1;
	return cmd_exec(&ctx, "solution pip; add KCl 140; add HEPES 10; add EGTA 1", err);
}

static int teardown(void **state)
{
	(void)state;
	ctx_free(&ctx);
	fclose(o.fp);
	free(buf);
	refdb_close(db);
	return 0;
}

/* Complete the end of line; quoted: the word began with a quote.  The
 * matches (index 0: the replacement) or NULL. */
static char **comp(const char *line, int quoted)
{
	int end = (int)strlen(line), start = end, files = 0;
	/* as readline gives it: after the opening quote, else after a space */
	while (start > 0 && line[start - 1] != (quoted ? '"' : ' '))
		start--;
	return shell_complete(&ctx, line, start, end, quoted, &files);
}

static void freem(char **m)
{
	for (int i = 0; m && m[i]; i++)
		free(m[i]);
	/* m[0] may repeat m[1] when there is one match: freed once above */
	free(m);
}

static int has(char **m, const char *s)
{
	for (int i = 1; m && m[i]; i++)
		if (strcmp(m[i], s) == 0)
			return 1;
	return m && m[0] && !m[1] && strcmp(m[0], s) == 0;
}

static int count(char **m)
{
	int n = 0;
	if (!m)
		return 0;
	if (!m[1])
		return 1;
	while (m[n + 1])
		n++;
	return n;
}

static void keeps_prefix(void **state)
{
	char **m;
	(void)state;
	/* the reported defect: `add K-glu<Tab>` became `add K-` */
	m = comp("add K-glu", 0);
	assert_non_null(m);
	assert_true(strlen(m[0]) >= strlen("K-glu"));
	assert_true(strncasecmp(m[0], "K-glu", 5) == 0);
	freem(m);
	/* lower case completes to the canonical name */
	m = comp("add k-gluc", 0);
	assert_non_null(m);
	assert_string_equal(m[0], "K-gluconate");
	freem(m);
	/* several matches: never shorter than what was typed */
	m = comp("add k", 0);
	assert_non_null(m);
	assert_true(count(m) > 1);
	assert_true(strlen(m[0]) >= 1);
	freem(m);
	m = comp("vers", 0);
	assert_non_null(m);
	assert_string_equal(m[0], "versions");
	freem(m);
}

static void names_with_spaces(void **state)
{
	char **m;
	(void)state;
	/* unquoted: the canonical name, quoted because it holds a space */
	m = comp("add QX-314 c", 0);
	assert_non_null(m);
	/* the words typed so far stay; the rest of the name completes */
	assert_string_equal(m[0], "chloride");
	freem(m);
	m = comp("add qx-3", 0);
	assert_non_null(m);
	assert_true(has(m, "\"QX-314 chloride\"") && has(m, "\"QX-314 bromide\""));
	assert_true(strncasecmp(m[0], "qx-3", 4) == 0 || strncmp(m[0], "\"QX-314 ", 8) == 0);
	freem(m);
	/* after an opening quote: the raw name (readline closes the quote) */
	m = comp("add \"QX-314 ch", 1);
	assert_non_null(m);
	assert_string_equal(m[0], "QX-314 chloride");
	freem(m);
	m = comp("add \"choline c", 1);
	assert_non_null(m);
	assert_string_equal(m[0], "choline chloride");
	freem(m);
}

static void after_with(void **state)
{
	char **m;
	(void)state;
	m = comp("ph 7.3 with ", 0);
	assert_non_null(m);
	assert_true(has(m, "KOH"));
	assert_false(has(m, "NaCl"));
	assert_false(has(m, "K-gluconate"));
	assert_true(count(m) < 20); /* not all the compounds */
	freem(m);
	m = comp("free Ca 100 nM with ", 0);
	assert_non_null(m);
	assert_true(has(m, "CaCl2"));
	assert_false(has(m, "MgCl2"));
	assert_false(has(m, "KOH"));
	freem(m);
	m = comp("osmo 290 with ", 0);
	assert_non_null(m);
	assert_true(has(m, "sucrose"));
	assert_false(has(m, "NaCl"));
	freem(m);
}

static void remove_present(void **state)
{
	char **m;
	(void)state;
	m = comp("remove ", 0);
	assert_non_null(m);
	assert_int_equal(count(m), 3);
	assert_true(has(m, "KCl") && has(m, "HEPES") && has(m, "EGTA"));
	freem(m);
	m = comp("remove k", 0);
	assert_non_null(m);
	assert_string_equal(m[0], "KCl");
	freem(m);
	assert_null(comp("remove NaC", 0));
}

static void units_after_number(void **state)
{
	char **m;
	(void)state;
	m = comp("add KCl 5 ", 0);
	assert_non_null(m);
	assert_true(has(m, "mM") && has(m, "uM") && has(m, "%") && has(m, "mg/L"));
	assert_false(has(m, "KCl"));
	freem(m);
	m = comp("add KCl 5 m", 0);
	assert_non_null(m);
	assert_true(has(m, "mM") && has(m, "mg/mL") && !has(m, "uM"));
	freem(m);
}

static void unquoted_multiword_accepted(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(cmd_exec(&ctx, "add QX-314 chloride 2", err), 0);
	assert_non_null(sol_find(ws_current(&ctx.ses->ws), refdb_compound(db, "QX-314 chloride")));
	assert_int_equal(cmd_exec(&ctx, "remove QX-314 chloride", err), 0);
	/* not a name: still the error with suggestions */
	assert_int_equal(cmd_exec(&ctx, "add QX-314 chlorid 2", err), -1);
	assert_non_null(strstr(err, "did you mean"));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(keeps_prefix),
		cmocka_unit_test(names_with_spaces),
		cmocka_unit_test(after_with),
		cmocka_unit_test(remove_present),
		cmocka_unit_test(units_after_number),
		cmocka_unit_test(unquoted_multiword_accepted),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
