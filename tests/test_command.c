/* test_command.c - dispatch, argument checks, rollback on failure, scripts
 * with FILE:LINE, export/run round trip, JSON shape of core results. */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "command.h"
#include "common.h"
#include "render.h"
#include "userdb.h"

static refdb *db;
static im_ctx ctx;
static out o;
static char *buf;
static size_t len;
static char dir[64], dbfile[128];

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	snprintf(dir, sizeof dir, "/tmp/ionmix-cmd-XXXXXX");
	if (!mkdtemp(dir) || refdb_open(&db, err))
		return -1;
	snprintf(dbfile, sizeof dbfile, "%s/user.db", dir);
	return 0;
}

static int teardown(void **state)
{
	char cmd[128];
	(void)state;
	refdb_close(db);
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : -1;
}

static int fresh(void **state)
{
	(void)state;
	o.fp = open_memstream(&buf, &len);
	o.errfp = stderr;
	o.json = 0;
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = dbfile;
	{
		char err[IM_ERRLEN];
		if (ctx_load_chemistry(&ctx, err))
			fail_msg("chemistry: %s", err);
	}
	return 0;
}

static int done(void **state)
{
	(void)state;
	ctx_free(&ctx);
	fclose(o.fp);
	free(buf);
	buf = NULL;
	return 0;
}

static int run(const char *line, char *err)
{
	int rc = cmd_exec(&ctx, line, err);
	fflush(o.fp);
	return rc;
}

static void ok(const char *line)
{
	char err[IM_ERRLEN];
	if (run(line, err))
		fail_msg("'%s' failed: %s", line, err);
}

/* The session's open_db hook: every way to the user database goes
 * through it, with the create flag of the command (a read asks without
 * creating, a save with), and the connection it gives is the one used;
 * whoever set it takes the connection back before ctx_free. */
static int hook_calls[2];
static userdb *hook_db;

static int hook_open(void *arg, const char *path, int create, userdb **out, char *err)
{
	int *calls = arg;
	calls[create != 0]++;
	if (!create) {
		*out = hook_db; /* none before the first save: "no database yet" */
		return hook_db ? 0 : 1;
	}
	if (!hook_db && udb_open(path, 1, &hook_db, err) < 0)
		return -1;
	*out = hook_db;
	return 0;
}

static void open_db_hook(void **state)
{
	char path[160];
	(void)state;
	snprintf(path, sizeof path, "%s/hook.db", dir);
	ctx.ses->db_path = path;
	ctx.ses->open_db = hook_open;
	ctx.ses->open_db_arg = hook_calls;
	ok("list");
	assert_int_equal(hook_calls[0], 1);
	assert_int_equal(hook_calls[1], 0);
	assert_null(ctx.ses->user);
	assert_non_null(strstr(buf, "none"));
	ok("solution hooked; add NaCl 140; save");
	assert_int_equal(hook_calls[1], 1);
	assert_non_null(hook_db);
	assert_ptr_equal(ctx.ses->user, hook_db);
	/* the same connection, opened once, serves the reads that follow */
	ok("list");
	assert_non_null(strstr(buf, "  hooked"));
	assert_int_equal(hook_calls[0] + hook_calls[1], 2);
	assert_int_equal(access(path, F_OK), 0);
	ctx.ses->user = NULL; /* the hook's, not the session's */
	udb_close(hook_db);
	hook_db = NULL;
}

/* out_json_string against RFC 8259 (section 7: '"', '\\' and controls
 * escaped; section 8.1: UTF-8) and against its own rule for bytes that
 * are not UTF-8 (U+FFFD): runs, escapes and sequences at every position. */
static void json_strings(void **state)
{
	static const struct {
		const char *in, *out;
	} cases[] = {
		{"", "\"\""},
		{"NaCl 140", "\"NaCl 140\""},
		{"a\"b\\c", "\"a\\\"b\\\\c\""},
		{"\n\r\t", "\"\\n\\r\\t\""},
		{"x\001y\037", "\"x\\u0001y\\u001f\""},
		{"del\177", "\"del\177\""},
		{"5 \302\265M", "\"5 \302\265M\""},           /* U+00B5, two bytes */
		{"\360\237\230\200!", "\"\360\237\230\200!\""}, /* four bytes */
		{"bad\303", "\"bad\\ufffd\""},                  /* cut short at the end */
		{"\300\257x", "\"\\ufffd\\ufffdx\""},           /* overlong '/' */
		{"\355\240\200", "\"\\ufffd\\ufffd\\ufffd\""},   /* a surrogate */
		{"\"\"", "\"\\\"\\\"\""},
	};
	(void)state;
	for (size_t i = 0; i < IM_COUNT(cases); i++) {
		char *got = NULL;
		size_t n = 0;
		FILE *fp = open_memstream(&got, &n);
		out_json_string(fp, cases[i].in);
		fclose(fp);
		if (strcmp(got, cases[i].out) != 0)
			fail_msg("case %zu: got [%s], want [%s]", i, got, cases[i].out);
		free(got);
	}
}

static void compose(void **state)
{
	(void)state;
	ok("solution bath; add NaCl 140; add KCl 5 mM; add CaCl2.2H2O 2");
	ok("add NaCl 10");
	assert_close(sol_find(ws_current(&ctx.ses->ws), refdb_compound(db, "NaCl"))->mM, 150, 0, 0);
	ok("set NaCl 0.14 M");
	assert_close(sol_find(ws_current(&ctx.ses->ws), refdb_compound(db, "NaCl"))->mM, 140, 1e-12, 0);
	ok("remove KCl");
	assert_int_equal(ws_current(&ctx.ses->ws)->n, 2);
	ok("solution copy from bath");
	assert_string_equal(ws_current(&ctx.ses->ws)->name, "copy");
	assert_int_equal(ws_current(&ctx.ses->ws)->n, 2);
	ok("temp 37");
	assert_close(ctx.ses->temp_C, 37, 0, 0);
	ok("# a comment line");
	ok("");
	ok("show; show bath; nernst copy bath; nernst copy bath activities; weigh 250");
	assert_non_null(strstr(buf, "ionic strength"));
}

/* Every bad command fails with a one-line message and leaves the
 * workspace exactly as it was. */
static void bad_input_leaves_workspace(void **state)
{
	static const char *bad[] = {
		"add NaCll 10", "add NaCl -1", "add NaCl 0", "add NaCl nan", "add NaCl inf",
		"add NaCl 1e9", "add NaCl 10 parsecs", "add NaCl", "add NaCl 1 mM extra",
		"frobnicate", "show nosuch", "nernst bath nosuch", "remove glucose",
		"temp -300", "temp hot", "solution bad/name", "solution x from nosuch",
		"weigh 0", "weigh -5", "weigh 10 gallons", "stock NaCl 1", "stock glucose 1000",
		"add \"NaCl 10", "activity magic", "load nosuch", "delete nosuch",
		"run /nonexistent/file", "add Bogus 1; add NaCl 10", "info nothing",
		"set NaCl 0", "add NaCl 5 M; add NaCl 1",
	};
	char err[IM_ERRLEN];
	workspace before;
	(void)state;
	ok("solution bath; add NaCl 140; add KCl 5");
	for (size_t i = 0; i < IM_COUNT(bad); i++) {
		ws_copy(&before, &ctx.ses->ws);
		err[0] = '\0';
		if (run(bad[i], err) == 0)
			fail_msg("'%s' succeeded", bad[i]);
		assert_true(strlen(err) > 0);
		assert_null(strchr(err, '\n'));
		assert_int_equal(before.n, ctx.ses->ws.n);
		for (int k = 0; k < before.n; k++)
			if (!sol_equal(before.sol[k], ctx.ses->ws.sol[k]))
				fail_msg("'%s' changed the workspace", bad[i]);
		assert_close(ctx.ses->temp_C, 25, 0, 0);
		ws_free(&before);
	}
	/* in "a; b" a failing b leaves a's change standing, as two lines would */
	assert_int_equal(run("add NaCl 10; add Bogus 1", err), -1);
	assert_close(sol_find(ws_current(&ctx.ses->ws), refdb_compound(db, "NaCl"))->mM, 150, 0, 0);
	/* messages name the offending token */
	run("add NaCll 10", err);
	assert_non_null(strstr(err, "NaCll"));
	assert_non_null(strstr(err, "NaCl"));
	run("add NaCl 10 parsecs", err);
	assert_non_null(strstr(err, "parsecs"));
	run("frobnicate", err);
	assert_non_null(strstr(err, "frobnicate"));
	run("shwo", err);
	assert_non_null(strstr(err, "show"));
}

static void hostile_lines(void **state)
{
	char err[IM_ERRLEN], *longline = malloc(CMD_LINE_MAX + 100);
	(void)state;
	memset(longline, 'a', CMD_LINE_MAX + 99);
	longline[CMD_LINE_MAX + 99] = '\0';
	assert_int_equal(run(longline, err), -1);
	assert_non_null(strstr(err, "longer"));
	free(longline);
	assert_int_equal(run("add \x01\x02 10", err), -1);
	assert_non_null(strstr(err, "control byte"));
	assert_int_equal(run("\xff\xfe\xfd", err), -1);
}

static void script_stops_at_bad_line(void **state)
{
	char p[256], err[IM_ERRLEN];
	FILE *f;
	(void)state;
	snprintf(p, sizeof p, "%s/s.ionmix", dir);
	f = fopen(p, "w");
	fprintf(f, "solution bath\n# comment\nadd NaCl 140\nadd Nope 5\nadd KCl 5\n");
	fclose(f);
	char line[300];
	snprintf(line, sizeof line, "run %s", p);
	assert_int_equal(run(line, err), -1);
	assert_string_equal(ctx.errfile, p);
	assert_int_equal(ctx.errline, 4);
	/* lines before the bad one stand; the one after never ran */
	assert_non_null(ws_find(&ctx.ses->ws, "bath"));
	assert_int_equal(ws_find(&ctx.ses->ws, "bath")->n, 1);
}

static void script_with_bom(void **state)
{
	char p[256], line[300];
	FILE *f;
	(void)state;
	snprintf(p, sizeof p, "%s/bom.ionmix", dir);
	f = fopen(p, "w");
	fprintf(f, "\xef\xbb\xbfsolution bom\nadd NaCl 10\n");
	fclose(f);
	snprintf(line, sizeof line, "run %s", p);
	ok(line);
	assert_int_equal(ws_find(&ctx.ses->ws, "bom")->n, 1);
	ok("compounds salt");
	{
		char err[IM_ERRLEN];
		assert_int_equal(cmd_exec(&ctx, "compounds bogus", err), -1);
		assert_non_null(strstr(err, "bogus"));
	}
}

static void export_then_run(void **state)
{
	char p[256], line[300];
	workspace before;
	(void)state;
	ok("solution pip; add K-gluconate 135; add KCl 5; add EGTA 1; add Na2ATP 4");
	ok("stock Na2ATP 100");
	snprintf(p, sizeof p, "%s/pip.ionmix", dir);
	snprintf(line, sizeof line, "export pip %s", p);
	ok(line);
	ws_copy(&before, &ctx.ses->ws);
	ok("set KCl 50; add NaCl 3; solution other");
	snprintf(line, sizeof line, "run %s", p);
	ok(line);
	assert_true(sol_equal(ws_find(&before, "pip"), ws_find(&ctx.ses->ws, "pip")));
	ws_free(&before);
}

static void save_load(void **state)
{
	workspace before;
	(void)state;
	ok("solution bath; add NaCl 140; add HEPES 10; save");
	ws_copy(&before, &ctx.ses->ws);
	ok("set NaCl 1; load bath");
	assert_true(sol_equal(ws_find(&before, "bath"), ws_find(&ctx.ses->ws, "bath")));
	ok("list; delete bath");
	ws_free(&before);
}

static void json_show(void **state)
{
	(void)state;
	o.json = 1;
	ok("solution bath; add NaCl 140; add KCl 5; show");
	assert_non_null(strstr(buf, "\"solution\":\"bath\""));
	assert_non_null(strstr(buf, "\"ionic_strength_mM\":145"));
	assert_non_null(strstr(buf, "\"osmolarity_mOsm_L\":290"));
	assert_non_null(strstr(buf, "\"net_charge_mEq_L\":"));
	assert_non_null(strstr(buf, "\"electroneutral\":true"));
	/* a NaCl/KCl solution is neutral: pH 7.00 at 25 C from pKw 13.995
	 * (Harned & Robinson 1940, from memory) */
	assert_non_null(strstr(buf, "\"pH\":6.99"));
	assert_non_null(strstr(buf, "{\"ion\":\"K+\",\"z\":1,\"mM\":5,"));
	o.json = 0;
}

/* One description, two forms: the text and the JSON of a small result
 * hold the same fields, the numbers with the digits the field asks for. */
static void render_both(void **state)
{
	for (int json = 0; json < 2; json++) {
		render *r;
		o.json = json;
		r = render_new(&o);
		render_str(r, "solution", NULL, "pip");
		render_text(r, "pip at 25.0 C");
		render_num(r, "ionic_strength_mM", "ionic strength", "mM", 148.0987, UNITS_DEC(2));
		render_num(r, "net_charge_mEq_L", "net charge", "mEq/L", -0.001, UNITS_DEC(2));
		render_table(r, "ions", NULL);
		render_row(r);
		render_str(r, "ion", "ion", "K+");
		render_charge(r, "z", "z", 1);
		render_conc(r, "mM", "free", 140);
		render_row(r);
		render_str(r, "ion", "ion", "Ca2+");
		render_charge(r, "z", "z", 2);
		render_conc(r, "mM", "free", 5e-8);
		render_table_end(r);
		render_note(r, "a note");
		render_done(r);
		fflush(o.fp);
	}
	o.json = 0;
	(void)state;
	assert_string_equal(buf,
			    "pip at 25.0 C\n"
			    "  ionic strength  148.10 mM\n"
			    "  net charge      0.00 mEq/L\n"
			    "  ion    z    free\n"
			    "  K+    +1  140 mM\n"
			    "  Ca2+  +2   50 pM\n"
			    "  note: a note\n"
			    "{\"solution\":\"pip\",\"ionic_strength_mM\":148.0987,"
			    "\"net_charge_mEq_L\":-0.001,\"ions\":[{\"ion\":\"K+\",\"z\":1,"
			    "\"mM\":140},{\"ion\":\"Ca2+\",\"z\":2,\"mM\":5e-08}],"
			    "\"notes\":[\"a note\"]}\n");
}

/* A message of any length reaches the output whole (no fixed buffer). */
static void render_long_note(void **state)
{
	char *long_note = malloc(3001);
	render *r;
	(void)state;
	memset(long_note, 'x', 3000);
	long_note[3000] = '\0';
	r = render_new(&o);
	render_note(r, "%s", long_note);
	render_done(r);
	fflush(o.fp);
	assert_int_equal(strlen(buf), strlen("  note: ") + 3000 + 1);
	free(long_note);
}

/* Prose lines come out as printf writes them, whether they hold only
 * strings (filled without printf) or numbers too; a string past the
 * stack buffer, and "%%". */
static void render_text_printf(void **state)
{
	char big[400], want[600];
	render *r;
	(void)state;
	memset(big, 'y', sizeof big - 1);
	big[sizeof big - 1] = '\0';
	r = render_new(&o);
	render_text(r, "a %s b %% c %s", "one", "two");
	render_text(r, "%s|%s", big, "end");
	render_text(r, "%s at %.1f C, %+.2f mV, %g %%", "pip", 22.04, -0.001, 5.0);
	render_text(r, "%%s stays %s", "put");
	render_done(r);
	fflush(o.fp);
	snprintf(want, sizeof want, "a one b %% c two\n%s|end\npip at 22.0 C, -0.00 mV, 5 %%\n"
		 "%%s stays put\n", big);
	assert_string_equal(buf, want);
}

/* The line loop: quit stops a script there; run, help and quit are
 * commands of the table; a script run from the shell still stops at its
 * first error while the shell goes on. */
static void loop_rules(void **state)
{
	char p[160], err[IM_ERRLEN];
	FILE *fp;
	int line;
	(void)state;
	assert_non_null(cmd_lookup("run"));
	assert_non_null(cmd_lookup("help"));
	assert_non_null(cmd_lookup("quit"));
	snprintf(p, sizeof p, "%s/q.ionmix", dir);
	fp = fopen(p, "w");
	fputs("solution q\r\nadd NaCl 1\nquit\nadd KCl 1\n", fp);
	fclose(fp);
	fp = fopen(p, "r");
	assert_int_equal(cmd_run_stream(&ctx, fp, &line, err), 0);
	fclose(fp);
	assert_int_equal(line, 3);
	assert_int_equal(ws_find(&ctx.ses->ws, "q")->n, 1);
	assert_true(ctx.quit);
	ctx.quit = 0;
	/* interactive: an error is reported and the loop goes on */
	fp = fopen(p, "w");
	fputs("add Nope 1\nadd KCl 2\n", fp);
	fclose(fp);
	fp = fopen(p, "r");
	ctx.interactive = 1;
	assert_int_equal(cmd_run_stream(&ctx, fp, &line, err), 0);
	ctx.interactive = 0;
	fclose(fp);
	assert_int_equal(line, 2);
	assert_non_null(sol_find(ws_find(&ctx.ses->ws, "q"), refdb_compound(db, "KCl")));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(compose, fresh, done),
		cmocka_unit_test_setup_teardown(bad_input_leaves_workspace, fresh, done),
		cmocka_unit_test_setup_teardown(hostile_lines, fresh, done),
		cmocka_unit_test_setup_teardown(script_stops_at_bad_line, fresh, done),
		cmocka_unit_test_setup_teardown(script_with_bom, fresh, done),
		cmocka_unit_test_setup_teardown(export_then_run, fresh, done),
		cmocka_unit_test_setup_teardown(save_load, fresh, done),
		cmocka_unit_test_setup_teardown(json_show, fresh, done),
		cmocka_unit_test_setup_teardown(render_both, fresh, done),
		cmocka_unit_test_setup_teardown(render_long_note, fresh, done),
		cmocka_unit_test_setup_teardown(render_text_printf, fresh, done),
		cmocka_unit_test_setup_teardown(loop_rules, fresh, done),
		cmocka_unit_test_setup_teardown(open_db_hook, fresh, done),
		cmocka_unit_test(json_strings),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
