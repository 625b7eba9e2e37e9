/* test_malformed.c - every malformed command line of tests/malformed/
 * (lines.txt, one case a line, expect.txt, a case with the words its
 * message must hold, and the *.bin files: control bytes, NUL bytes,
 * invalid UTF-8, over-long lines) fails, both through cmd_exec and as a
 * script line through cmd_run_stream, with a one-line non-empty message,
 * and leaves the workspace (solutions, current one, temperature, activity
 * model) exactly as it was; nothing is written to the database directory
 * or the working directory.  The cases of expect.txt also say what is
 * wrong: the message, as written for a terminal (out_text_escaped), holds
 * the expected words.  Run from the repository root. */
#include "testutil.h"

#include <dirent.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "command.h"
#include "common.h"

#define CASE_DIR "tests/malformed"
#define MAX_CASES 1024

typedef struct mcase {
	char *bytes;   /* the line, without its line end; owned */
	size_t n;
	char name[80]; /* "lines.txt:LINE" or the file name */
	char *expect;  /* expect.txt: words the message must hold; owned */
} mcase;

static refdb *db;
static char dir[64], dbdir[128], dbfile[160], repo[4096];
static mcase cases[MAX_CASES];
static int ncases, ntext, nbin, nexpect;

/* The workspace every case runs against (lines.txt's header says so). */
static const char setup_line[] =
	"solution bath; add NaCl 140; add KCl 5; add CaCl2.2H2O 2; add MgCl2.6H2O 1; "
	"add HEPES 10; add glucose 10; stock CaCl2.2H2O 1 M; "
	"solution pip; add K-gluconate 135; add KCl 5; add EGTA 1; add Na2ATP 4; "
	"add MgCl2.6H2O 2";

static void add_case(const char *bytes, size_t n, const char *name)
{
	mcase *c;
	if (ncases == MAX_CASES)
		return;
	c = &cases[ncases++];
	c->bytes = im_xmalloc(n + 1);
	memcpy(c->bytes, bytes, n);
	c->bytes[n] = '\0';
	c->n = n;
	snprintf(c->name, sizeof c->name, "%.*s", (int)sizeof c->name - 1, name);
}

static int read_lines(void)
{
	FILE *f = fopen(CASE_DIR "/lines.txt", "r");
	char *line = NULL, name[80];
	size_t cap = 0;
	ssize_t len;
	int lineno = 0;
	if (!f)
		return -1;
	while ((len = getline(&line, &cap, f)) >= 0) {
		lineno++;
		if (len > 0 && line[len - 1] == '\n')
			line[--len] = '\0';
		if (len == 0 || strncmp(line, "# ", 2) == 0 || strcmp(line, "#") == 0)
			continue;
		snprintf(name, sizeof name, "lines.txt:%d", lineno);
		add_case(line, (size_t)len, name);
		ntext++;
	}
	free(line);
	fclose(f);
	return 0;
}

/* expect.txt: "WORDS<TAB>LINE" a line. */
static int read_expect(void)
{
	FILE *f = fopen(CASE_DIR "/expect.txt", "r");
	char *line = NULL, name[80], *tab;
	size_t cap = 0;
	ssize_t len;
	int lineno = 0;
	if (!f)
		return -1;
	while ((len = getline(&line, &cap, f)) >= 0) {
		lineno++;
		if (len > 0 && line[len - 1] == '\n')
			line[--len] = '\0';
		if (len == 0 || strncmp(line, "# ", 2) == 0)
			continue;
		tab = strchr(line, '\t');
		if (!tab)
			return -1;
		*tab = '\0';
		snprintf(name, sizeof name, "expect.txt:%d", lineno);
		add_case(tab + 1, strlen(tab + 1), name);
		cases[ncases - 1].expect = im_xstrdup(line);
		nexpect++;
	}
	free(line);
	fclose(f);
	return 0;
}

static int by_name(const struct dirent **a, const struct dirent **b)
{
	return strcmp((*a)->d_name, (*b)->d_name);
}

static int is_bin(const struct dirent *e)
{
	size_t n = strlen(e->d_name);
	return n > 4 && strcmp(e->d_name + n - 4, ".bin") == 0;
}

static int read_bins(void)
{
	struct dirent **list;
	int n = scandir(CASE_DIR, &list, is_bin, by_name);
	if (n < 0)
		return -1;
	for (int i = 0; i < n; i++) {
		char p[512], *bytes = NULL;
		size_t len = 0;
		FILE *f, *m;
		int ch;
		snprintf(p, sizeof p, "%s/%s", CASE_DIR, list[i]->d_name);
		f = fopen(p, "rb");
		m = open_memstream(&bytes, &len);
		while (f && (ch = getc(f)) != EOF)
			putc(ch, m);
		fclose(m);
		if (f) {
			fclose(f);
			add_case(bytes, len, list[i]->d_name);
			nbin++;
		}
		free(bytes);
		free(list[i]);
	}
	free(list);
	return 0;
}

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	if (!getcwd(repo, sizeof repo) || read_lines() || read_expect() || read_bins()) {
		fprintf(stderr, "test_malformed: cannot read %s (run from the repository "
				"root)\n", CASE_DIR);
		return -1;
	}
	snprintf(dir, sizeof dir, "/tmp/ionmix-malformed-XXXXXX");
	if (!mkdtemp(dir) || refdb_open(&db, err))
		return -1;
	snprintf(dbdir, sizeof dbdir, "%s/db", dir);
	snprintf(dbfile, sizeof dbfile, "%s/user.db", dbdir);
	/* relative names in the cases (export, run, correct) land here */
	return chdir(dir);
}

static int teardown(void **state)
{
	char cmd[128];
	(void)state;
	for (int i = 0; i < ncases; i++) {
		free(cases[i].bytes);
		free(cases[i].expect);
	}
	refdb_close(db);
	if (chdir(repo) != 0)
		return -1;
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : -1;
}

static int same_workspace(const workspace *a, const workspace *b)
{
	if (a->n != b->n || a->current != b->current)
		return 0;
	for (int i = 0; i < a->n; i++)
		if (!sol_equal(a->sol[i], b->sol[i]))
			return 0;
	return 1;
}

/* A printable form of a case for messages: bytes outside ASCII 0x20-0x7e
 * as \xNN, cut to fit. */
static const char *show(const mcase *c, char *buf, size_t n)
{
	size_t k = 0;
	for (size_t i = 0; i < c->n && k + 5 < n; i++) {
		unsigned char b = (unsigned char)c->bytes[i];
		if (b >= 0x20 && b < 0x7f)
			buf[k++] = (char)b;
		else
			k += (size_t)snprintf(buf + k, n - k, "\\x%02x", b);
	}
	buf[k] = '\0';
	return buf;
}

/* Run one case by one path; returns the number of broken promises (0). */
static int check_case(const mcase *c, int as_script)
{
	char err[IM_ERRLEN], shown[120], *text_out = NULL;
	size_t outn = 0;
	out o = {0};
	im_ctx ctx;
	workspace before;
	int rc, bad = 0, line = 0;
	o.fp = open_memstream(&text_out, &outn);
	o.errfp = o.fp;
	ctx_init(&ctx, db, &o);
	ctx.ses->db_path = dbfile;
	if (cmd_exec(&ctx, setup_line, err) != 0)
		fail_msg("setup failed: %s", err);
	ws_copy(&before, &ctx.ses->ws);
	memset(err, 0, sizeof err);
	if (as_script) {
		/* the bytes as line 1 of a script, with its line end */
		char *text = im_xmalloc(c->n + 2);
		FILE *fp;
		memcpy(text, c->bytes, c->n);
		text[c->n] = '\n';
		fp = fmemopen(text, c->n + 1, "r");
		assert_non_null(fp);
		rc = cmd_run_stream(&ctx, fp, &line, err);
		fclose(fp);
		free(text);
	} else {
		rc = cmd_exec(&ctx, c->bytes, err);
	}
	show(c, shown, sizeof shown);
	if (rc != -1) {
		print_error("%s [%s] did not fail (rc %d): %s\n", c->name,
			    as_script ? "script" : "cmd_exec", rc, shown);
		bad++;
	} else if (err[0] == '\0' || strchr(err, '\n') || strlen(err) >= IM_ERRLEN - 1) {
		print_error("%s: message not one non-empty line: '%s' for %s\n", c->name, err,
			    shown);
		bad++;
	}
	if (rc == -1 && c->expect) {
		char *shown_err = NULL;
		size_t en = 0;
		FILE *m = open_memstream(&shown_err, &en);
		out_text_escaped(m, err);
		fclose(m);
		if (!strstr(shown_err, c->expect)) {
			print_error("%s: message '%s' does not say '%s'\n", c->name, shown_err,
				    c->expect);
			bad++;
		}
		free(shown_err);
	}
	if (as_script && rc == -1 && line != 1) {
		print_error("%s: failure reported at script line %d, not 1\n", c->name, line);
		bad++;
	}
	if (!same_workspace(&before, &ctx.ses->ws) || ctx.ses->temp_C != 25.0 ||
	    ctx.ses->model != ACT_DAVIES) {
		print_error("%s [%s] changed the workspace: %s\n", c->name,
			    as_script ? "script" : "cmd_exec", shown);
		bad++;
	}
	ws_free(&before);
	ctx_free(&ctx);
	fclose(o.fp);
	free(text_out);
	return bad;
}

static void all_cases_fail_cleanly(void **state)
{
	int bad = 0, exec_runs = 0;
	struct stat st;
	DIR *d;
	struct dirent *e;
	(void)state;
	/* the corpus itself: enough cases of each kind */
	assert_true(ntext >= 200);
	assert_true(nbin >= 30);
	assert_true(nexpect >= 35);
	for (int i = 0; i < ncases; i++) {
		/* a C string ends at a NUL: those cases go as script lines only */
		if (memchr(cases[i].bytes, '\0', cases[i].n) == NULL) {
			bad += check_case(&cases[i], 0);
			exec_runs++;
		}
		bad += check_case(&cases[i], 1);
	}
	if (bad)
		fail_msg("%d broken promises in %d malformed cases", bad, ncases);
	/* no case created the database or left a file behind */
	assert_int_not_equal(stat(dbdir, &st), 0);
	d = opendir(dir);
	assert_non_null(d);
	while ((e = readdir(d)) != NULL)
		if (strcmp(e->d_name, ".") && strcmp(e->d_name, ".."))
			fail_msg("a malformed case left %s/%s behind", dir, e->d_name);
	closedir(d);
	printf("malformed: %d cases (%d from lines.txt, %d from expect.txt, %d .bin), %d via "
	       "cmd_exec, %d as script lines: all failed cleanly\n", ncases, ntext, nexpect,
	       nbin, exec_runs, ncases);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(all_cases_fail_cleanly),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
