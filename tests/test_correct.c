/*
 * test_correct.c - the streaming LJP correction of CSV/TSV voltage columns.
 *
 * The arithmetic is checked exactly (integer decimal), so no outside
 * reference is needed: a corrected cell must equal input minus LJP to its
 * last printed digit, checked here by an independent parser.  CSV quoting
 * follows RFC 4180 (Shafranovich 2005, "Common Format and MIME Type for
 * Comma-Separated Values (CSV) Files").
 */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <sys/wait.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "testutil.h"

#include "cmd_correct.h"
#include "command.h"
#include "common.h"
#include "correct.h"
#include "electrode.h"

/* ---- helpers ---------------------------------------------------------- */

static char tmpdir[512];

static int setup_dir(void **state)
{
	(void)state;
	const char *t = getenv("TMPDIR");
	snprintf(tmpdir, sizeof tmpdir, "%s/ionmix_corr_XXXXXX", t && *t ? t : "/tmp");
	return mkdtemp(tmpdir) ? 0 : -1;
}

static int teardown_dir(void **state)
{
	(void)state;
	DIR *d = opendir(tmpdir);
	struct dirent *de;
	char p[1024];
	if (!d)
		return 0;
	while ((de = readdir(d))) {
		if (strcmp(de->d_name, ".") == 0 || strcmp(de->d_name, "..") == 0)
			continue;
		snprintf(p, sizeof p, "%s/%s", tmpdir, de->d_name);
		unlink(p);
	}
	closedir(d);
	rmdir(tmpdir);
	return 0;
}

static void path_in(char *dst, size_t n, const char *name)
{
	snprintf(dst, n, "%s/%s", tmpdir, name);
}

static void write_file(const char *path, const char *data, size_t len)
{
	FILE *fp = fopen(path, "wb");
	assert_non_null(fp);
	assert_int_equal(fwrite(data, 1, len, fp), len);
	assert_int_equal(fclose(fp), 0);
}

static char *read_file(const char *path, size_t *len)
{
	FILE *fp = fopen(path, "rb");
	assert_non_null(fp);
	fseek(fp, 0, SEEK_END);
	long n = ftell(fp);
	fseek(fp, 0, SEEK_SET);
	char *b = malloc((size_t)n + 1);
	assert_non_null(b);
	assert_int_equal(fread(b, 1, (size_t)n, fp), (size_t)n);
	b[n] = '\0';
	fclose(fp);
	*len = (size_t)n;
	return b;
}

/* Run corr_stream on an in-memory input; returns the output (malloc'd)
 * or NULL on failure (err set).  cols: NULL-terminated list or NULL. */
static char *run_mem(const char *in, size_t inlen, const char *ljp,
		     const char **cols, int skip_bad, corr_result *r, char *err,
		     size_t *outlen)
{
	corr_opts o = {0};
	char *buf = NULL;
	size_t blen = 0;
	FILE *ifp, *ofp;
	int rc;
	assert_int_equal(corr_ljp_parse(ljp, &o.ljp, err), 0);
	o.columns = cols;
	o.ncolumns = 0;
	while (cols && cols[o.ncolumns])
		o.ncolumns++;
	o.skip_bad = skip_bad;
	ifp = fmemopen((void *)in, inlen ? inlen : 1, "rb");
	assert_non_null(ifp);
	if (inlen == 0) { /* fmemopen cannot open size 0: read the byte away */
		fclose(ifp);
		ifp = fopen("/dev/null", "rb");
		assert_non_null(ifp);
	}
	ofp = open_memstream(&buf, &blen);
	assert_non_null(ofp);
	rc = corr_stream(ifp, "mem.csv", ofp, &o, r, err);
	fclose(ifp);
	fclose(ofp);
	if (outlen)
		*outlen = blen;
	if (rc != 0) {
		free(buf);
		return NULL;
	}
	return buf;
}

static char *run_str(const char *in, const char *ljp, const char **cols,
		     corr_result *r, char *err)
{
	return run_mem(in, strlen(in), ljp, cols, 0, r, err, NULL);
}

#define assert_prefix(s, pre) \
	do { \
		if (strncmp((s), (pre), strlen(pre)) != 0) \
			fail_msg("'%s' does not start with '%s'", (s), (pre)); \
	} while (0)

#define assert_contains(s, sub) \
	do { \
		if (!strstr((s), (sub))) \
			fail_msg("'%s' does not contain '%s'", (s), (sub)); \
	} while (0)

/* An independent reader of a plain decimal: value * 10^*dec as integer. */
static long long dec_parse(const char *s, size_t n, int *dec)
{
	long long v = 0;
	int neg = 0, seen_dot = 0;
	*dec = 0;
	for (size_t i = 0; i < n; i++) {
		if (s[i] == '-')
			neg = 1;
		else if (s[i] == '.')
			seen_dot = 1;
		else {
			assert_true(s[i] >= '0' && s[i] <= '9');
			v = v * 10 + (s[i] - '0');
			*dec += seen_dot;
		}
	}
	return neg ? -v : v;
}

static long long p10(int k)
{
	long long v = 1;
	while (k-- > 0)
		v *= 10;
	return v;
}

/* Check out == in - ljp exactly, with max(dec in, dec ljp) decimals. */
static void check_exact(const char *in, size_t inl, const char *res, size_t outl,
			long long L, int dl)
{
	int di, dout;
	long long a = dec_parse(in, inl, &di);
	long long b = dec_parse(res, outl, &dout);
	int D = di > dl ? di : dl;
	assert_int_equal(dout, D);
	if (b != a * p10(D - di) - L * p10(D - dl))
		fail_msg("%.*s - LJP gave %.*s", (int)inl, in, (int)outl, res);
	/* and as doubles, to half a unit in the last printed digit */
	double x = strtod(in, NULL) - (double)L / (double)p10(dl);
	assert_close(strtod(res, NULL), x, 0, 0.5000001 / (double)p10(D) + 1e-12 * fabs(x));
}

/* ---- the LJP, single cells and values --------------------------------- */

static void test_ljp_parse(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_ljp l;
	char buf[32];
	assert_int_equal(corr_ljp_parse("14.2", &l, err), 0);
	assert_int_equal(l.scaled, 142);
	assert_int_equal(l.decimals, 1);
	assert_int_equal(corr_ljp_parse("14.20", &l, err), 0); /* decimals as written */
	assert_int_equal(l.scaled, 1420);
	assert_int_equal(l.decimals, 2);
	assert_int_equal(corr_ljp_parse("1.42e1", &l, err), 0);
	assert_int_equal(l.scaled, 142);
	assert_int_equal(l.decimals, 1);
	assert_int_equal(corr_ljp_parse("-3", &l, err), 0);
	assert_int_equal(l.scaled, -3);
	assert_int_equal(corr_ljp_parse("1e2", &l, err), 0);
	assert_int_equal(l.scaled, 100);
	assert_int_equal(l.decimals, 0);
	assert_int_equal(corr_ljp_parse("-0.25", &l, err), 0);
	corr_ljp_format(&l, buf, sizeof buf);
	assert_string_equal(buf, "-0.25");
	assert_close(corr_ljp_mV(&l), -0.25, 0, 1e-15);
	const char *bad[] = {"", "nan", "NaN", "inf", "-inf", "0x10", "14.2mV", " 14.2",
			     "14.2 ", "1001", "-1000.5", "1.0000000001", "1e-10", "--1",
			     ".", "-", "1e", "1e+", "1.2.3"};
	for (size_t i = 0; i < IM_COUNT(bad); i++) {
		err[0] = '\0';
		if (corr_ljp_parse(bad[i], &l, err) != -1)
			fail_msg("LJP '%s' was accepted", bad[i]);
		assert_true(strlen(err) > 0);
		assert_null(strchr(err, '\n'));
	}
	assert_int_equal(corr_ljp_parse("1000", &l, err), 0);
}

static void test_ljp_from_mV(void **state)
{
	(void)state;
	char err[IM_ERRLEN], buf[32];
	corr_ljp l;
	assert_int_equal(corr_ljp_from_mV(14.739, 1, &l, err), 0);
	assert_int_equal(l.scaled, 147);
	assert_int_equal(corr_ljp_from_mV(2.25, 1, &l, err), 0); /* half away from 0 */
	assert_int_equal(l.scaled, 23);
	assert_int_equal(corr_ljp_from_mV(-2.25, 1, &l, err), 0);
	assert_int_equal(l.scaled, -23);
	corr_ljp_format(&l, buf, sizeof buf);
	assert_string_equal(buf, "-2.3");
	assert_int_equal(corr_ljp_from_mV(NAN, 1, &l, err), -1);
	assert_int_equal(corr_ljp_from_mV(INFINITY, 1, &l, err), -1);
	assert_int_equal(corr_ljp_from_mV(1e6, 1, &l, err), -1);
	assert_int_equal(corr_ljp_from_mV(1.0, 10, &l, err), -1);
}

static void test_value(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	double v = 0;
	assert_int_equal(corr_value(-65.3, 14.2, &v, err), 0);
	assert_close(v, -79.5, 0, 1e-12);
	assert_int_equal(corr_value(NAN, 14.2, &v, err), -1);
	assert_int_equal(corr_value(1.0, INFINITY, &v, err), -1);
}

/* One cell: in, LJP, unit exponent, expected out (NULL: an error). */
static void cell_is(const char *in, const char *ljp, int unit_exp, const char *want)
{
	char err[IM_ERRLEN], buf[256];
	corr_ljp l;
	size_t len;
	assert_int_equal(corr_ljp_parse(ljp, &l, err), 0);
	int rc = corr_cell(in, strlen(in), &l, unit_exp, buf, sizeof buf, &len, err);
	if (!want) {
		if (rc != -1)
			fail_msg("'%s' - %s gave '%s', expected an error", in, ljp, buf);
		return;
	}
	if (rc < 0)
		fail_msg("'%s' - %s: %s", in, ljp, err);
	if (strcmp(buf, want) != 0 || len != strlen(want))
		fail_msg("'%s' - %s gave '%s', expected '%s'", in, ljp, buf, want);
}

static void test_cells(void **state)
{
	(void)state;
	cell_is("-65.3", "14.2", 0, "-79.5");
	cell_is("-65.300", "14.2", 0, "-79.500");   /* the cell's decimals kept */
	cell_is("12", "14.25", 0, "-2.25");         /* max(decimals) */
	cell_is("1.5", "0.25", 0, "1.25");
	cell_is("14.2", "14.2", 0, "0.0");          /* no sign on zero */
	cell_is("-0.000", "0", 0, "0.000");         /* "-0" printed plainly */
	cell_is("0", "-5", 0, "5");
	cell_is("5.", "1", 0, "4.");                /* trailing dot kept */
	cell_is(".5", "0.2", 0, ".3");              /* no leading zero kept */
	cell_is(".5", "1", 0, "-.5");
	cell_is("+3.5", "1", 0, "+2.5");            /* '+' kept when >= 0 */
	cell_is("+0.5", "1", 0, "-0.5");
	cell_is("007.5", "1", 0, "6.5");            /* leading zeros dropped */
	cell_is("  -70.5 ", "14.2", 0, "  -84.7 "); /* blanks kept */
	cell_is("-70.5\r", "14.2", 0, "-84.7\r");
	cell_is("", "14.2", 0, "");
	/* scientific: exponent text kept, mantissa absorbs the change */
	cell_is("1.2e-3", "14.2", 0, "-14198.8e-3");
	cell_is("-14198.8e-3", "-14.2", 0, "1.2e-3");
	cell_is("-7.0E+01", "14.2", 0, "-8.42E+01");
	/* units: V (LJP/1000) and uV (LJP*1000) */
	cell_is("-0.070123", "14.2", -3, "-0.084323");
	cell_is("-7.0e-2", "14.2", -3, "-8.42e-2");
	cell_is("-70123", "14.2", 3, "-84323");
	cell_is("-70", "0.0005", 3, "-70.5");
	/* past 18 digits: the exact slow path */
	cell_is("123456789012345678901234.5", "0.5", 0, "123456789012345678901234.0");
	cell_is("-99999999999999999999.99", "0.01", 0, "-100000000000000000000.00");
	cell_is("99999999999999999999.99", "-0.01", 0, "100000000000000000000.00");
	cell_is("0.000000000000000000001", "-1", 0, "1.000000000000000000001");
	cell_is("-0.000000000000000000001", "-1", 0, "0.999999999999999999999");
}

static void test_cells_big(void **state)
{
	(void)state;
	char err[IM_ERRLEN], buf[512];
	corr_ljp l;
	size_t len;
	assert_int_equal(corr_ljp_parse("1", &l, err), 0);
	/* 1e40 - 1 mV: in units of 10^40 the LJP is 1e-40, so the mantissa is
	 * 0. followed by forty 9s (41 digits, within the limit) */
	char want[64] = "0.";
	memset(want + 2, '9', 40);
	strcpy(want + 42, "e40");
	assert_int_equal(corr_cell("1e40", 4, &l, 0, buf, sizeof buf, &len, err), 0);
	assert_string_equal(buf, want);
	/* 200 digits: refused rather than rounded */
	char big[202];
	memset(big, '7', 200);
	big[200] = '\0';
	assert_int_equal(corr_cell(big, 200, &l, 0, buf, sizeof buf, &len, err), -1);
	assert_contains(err, "more than 100 digits");
	/* 100 digits, the limit, taken; a carry that would make them 101
	 * refused: the result could not be read back (found by fuzz_correct:
	 * 7.25 and 98 more digits corrected by -3 mV gave 10.25..., which the
	 * way back called not a number) */
	char lim[104] = "7.";
	memset(lim + 2, '6', 99);
	lim[101] = '\0';
	assert_int_equal(corr_ljp_parse("-2", &l, err), 0);
	assert_int_equal(corr_cell(lim, 101, &l, 0, buf, sizeof buf, &len, err), 0);
	assert_int_equal(len, 101);
	assert_int_equal(buf[0], '9');
	assert_int_equal(corr_ljp_parse("-3", &l, err), 0);
	assert_int_equal(corr_cell(lim, 101, &l, 0, buf, sizeof buf, &len, err), -1);
	assert_contains(err, "more than 100 digits once aligned or corrected");
	lim[0] = '-'; /* -.66... (99 digits) + 3 mV: 2.33...4, 100 digits, taken */
	assert_int_equal(corr_cell(lim, 101, &l, 0, buf, sizeof buf, &len, err), 0);
	assert_int_equal(len, 101);
	assert_memory_equal(buf, "2.33", 4);
	assert_int_equal(buf[100], '4');
	assert_int_equal(corr_ljp_parse("1", &l, err), 0);
	assert_int_equal(corr_cell("1e-300", 6, &l, 0, buf, sizeof buf, &len, err), -1);
	const char *bad[] = {"abc", "1,5", "nan", "inf", "0x1A", "1.2.3", "--1", "1e",
			     "12mV", "- 1", "1 2", "\"1\""};
	for (size_t i = 0; i < IM_COUNT(bad); i++)
		if (corr_cell(bad[i], strlen(bad[i]), &l, 0, buf, sizeof buf, &len, err) != -1)
			fail_msg("'%s' was taken for a number", bad[i]);
	assert_int_equal(corr_cell("1,5", 3, &l, 0, buf, sizeof buf, &len, err), -1);
	assert_contains(err, "decimal comma");
}

static void test_voltage_header(void **state)
{
	(void)state;
	static const struct {
		const char *h;
		int volt, unit_exp, assumed;
	} t[] = {
		{"Vm (mV)", 1, 0, 0},   {"Vm [mV]", 1, 0, 0},  {"E/mV", 1, 0, 0},
		{"Vm_mV", 1, 0, 0},     {"Vm mV", 1, 0, 0},    {"mV", 1, 0, 0},
		{"(mV)", 1, 0, 0},      {"V (V)", 1, -3, 0},   {"Vm [V]", 1, -3, 0},
		{"Vm (uV)", 1, 3, 0},   {"Vm (\xc2\xb5V)", 1, 3, 0}, {"uV", 1, 3, 0},
		{"Vm", 1, 0, 1},        {"V", 1, 0, 1},        {"voltage", 1, 0, 1},
		{"Membrane potential", 1, 0, 1}, {"E", 1, 0, 1}, {"Vcmd", 1, 0, 1},
		{"holding_voltage", 1, 0, 1}, {" Vm ", 1, 0, 1},
		{"time (s)", 0, 0, 0},  {"I (pA)", 0, 0, 0},   {"Vm (pA)", 0, 0, 0},
		{"time", 0, 0, 0},      {"t_s", 0, 0, 0},      {"I/pA", 0, 0, 0},
		{"", 0, 0, 0},          {"sweep", 0, 0, 0},    {"Ex", 0, 0, 0},
	};
	for (size_t i = 0; i < IM_COUNT(t); i++) {
		int ux = 99, as = 99;
		int v = corr_voltage_header(t[i].h, strlen(t[i].h), &ux, &as);
		if (v != t[i].volt)
			fail_msg("'%s': voltage %d, expected %d", t[i].h, v, t[i].volt);
		if (v && (ux != t[i].unit_exp || as != t[i].assumed))
			fail_msg("'%s': unit_exp %d assumed %d", t[i].h, ux, as);
	}
}

/* ---- detection -------------------------------------------------------- */

static void test_delimiters(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	const char *c2[] = {"2", NULL};
	char *o;

	o = run_str("t,Vm (mV)\n1,-70.0\n", "14.2", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t,Vm (mV)\n1,-84.2\n");
	assert_int_equal(r.delim, ',');
	assert_int_equal(r.header, 1);
	assert_int_equal(r.ncols, 1);
	assert_int_equal(r.cols[0].index, 2);
	free(o);

	o = run_str("t\tVm (mV)\tI, pA\n1\t-70.0\t3,5\n", "14.2", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t\tVm (mV)\tI, pA\n1\t-84.2\t3,5\n");
	assert_int_equal(r.delim, '\t');
	free(o);

	/* delimiters inside quotes do not count */
	o = run_str("\"t,s\";\"Vm, mV\";\"I,pA\"\n1,5;-70.0;2,5\n", "14.2", c2, &r, err);
	assert_non_null(o);
	assert_int_equal(r.delim, ';');
	assert_string_equal(o, "\"t,s\";\"Vm, mV\";\"I,pA\"\n1,5;-84.2;2,5\n");
	free(o);

	/* no header: the first row is numeric in the chosen column */
	o = run_str("1,-70\nx,-71\n", "14.2", c2, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "1,-84.2\nx,-85.2\n");
	assert_int_equal(r.header, 0);
	assert_int_equal(r.rows, 2);
	assert_int_equal(r.corrected, 2);
	assert_string_equal(r.cols[0].name, "");
	assert_int_equal(r.cols[0].unit_assumed, 1);
	free(o);

	/* first row numeric in column 2 but text in column 1: still data */
	o = run_str("a,-70\n", "1", c2, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "a,-71\n");
	assert_int_equal(r.header, 0);
	free(o);

	/* a column given by name; case-insensitive as a fallback */
	const char *byname[] = {"vm (mV)", NULL};
	o = run_str("t,Vm (mV)\n1,-70.0\n", "14.2", byname, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t,Vm (mV)\n1,-84.2\n");
	assert_int_equal(r.header, 1);
	assert_string_equal(r.cols[0].name, "Vm (mV)");
	free(o);

	/* a single column, no delimiter at all */
	o = run_str("Vm\n-70\n", "14.2", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "Vm\n-84.2\n");
	free(o);

	/* byte-order mark: copied, ignored for matching */
	o = run_str("\xef\xbb\xbfVm (mV),t\n-70,1\n", "14.2", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "\xef\xbb\xbfVm (mV),t\n-84.2,1\n");
	free(o);
	o = run_str("\xef\xbb\xbf-70,1\n", "14.2", (const char *[]){"1", NULL}, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "\xef\xbb\xbf-84.2,1\n");
	assert_int_equal(r.header, 0);
	free(o);
}

static void test_auto_columns(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	char *o = run_str("time (s),V1 (mV),I (pA),V2 (V),Vcmd\n"
			  "0.1,-70.0,12,-0.0700,-60\n", "14.2", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "time (s),V1 (mV),I (pA),V2 (V),Vcmd\n"
			    "0.1,-84.2,12,-0.0842,-74.2\n");
	assert_int_equal(r.ncols, 3);
	assert_int_equal(r.cols[0].index, 2);
	assert_int_equal(r.cols[1].index, 4);
	assert_int_equal(r.cols[1].unit_exp, -3);
	assert_int_equal(r.cols[1].unit_assumed, 0);
	assert_int_equal(r.cols[2].index, 5);
	assert_int_equal(r.cols[2].unit_assumed, 1);
	assert_int_equal(r.corrected, 3);
	free(o);

	/* none found: the error asks for a column */
	assert_null(run_str("time (s),I (pA)\n1,2\n", "14.2", NULL, &r, err));
	assert_string_equal(err, "mem.csv: no voltage column in the header (time (s),"
			    " I (pA)); give one with `column N|NAME`");
	assert_null(run_str("1,2\n3,4\n", "14.2", NULL, &r, err));
	assert_contains(err, "give one with `column N`");

	/* several columns given, repeated and out of order */
	const char *cols[] = {"3", "Vm", "3", NULL};
	o = run_str("t,Vm,E\n1,2,3\n", "1", cols, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t,Vm,E\n1,1,2\n");
	assert_int_equal(r.ncols, 2);
	assert_int_equal(r.cols[0].index, 2);
	assert_int_equal(r.cols[1].index, 3);
	free(o);
}

/* ---- quoting, line ends, unchanged bytes ------------------------------ */

static void test_quoting(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	const char *in =
		"\"time, s\",\"Vm \"\"raw\"\" (mV)\",note\n"
		"1,-70.0,\"a, b\"\n"
		"\"2,0\",\"-71.5\",\"say \"\"hi\"\"\"\n"
		"3,\" -72.25 \",\"two\nlines, and \"\"quotes\"\"\"\n"
		"4,-73,\n";
	const char *want =
		"\"time, s\",\"Vm \"\"raw\"\" (mV)\",note\n"
		"1,-84.2,\"a, b\"\n"
		"\"2,0\",\"-85.7\",\"say \"\"hi\"\"\"\n"
		"3,\" -86.45 \",\"two\nlines, and \"\"quotes\"\"\"\n"
		"4,-87.2,\n";
	char *o = run_str(in, "14.2", NULL, &r, err);
	if (!o)
		fail_msg("%s", err);
	assert_string_equal(o, want);
	assert_string_equal(r.cols[0].name, "Vm \"raw\" (mV)");
	assert_int_equal(r.rows, 4);
	assert_int_equal(r.corrected, 4);
	free(o);

	/* a line number after an embedded newline is physical */
	const char *c2[] = {"2", NULL};
	assert_null(run_str("t,V,n\n1,-70,\"a\nb\"\n2,x,c\n", "1", c2, &r, err));
	assert_string_equal(err, "mem.csv:4:2: 'x' is not a number (skip-bad copies"
			    " such cells)");
	/* text after a closing quote makes a corrected cell bad */
	assert_null(run_str("t,V\n1,\"-70\"x\n", "1", c2, &r, err));
	assert_prefix(err, "mem.csv:2:2: ");
	/* doubled quotes inside a corrected cell: not a number */
	assert_null(run_str("t,V\n1,\"-7\"\"0\"\n", "1", c2, &r, err));
	assert_prefix(err, "mem.csv:2:2: ");
	/* a quote never closed */
	assert_null(run_str("t,V\n1,-70,\"abc\n2,3\n", "1", c2, &r, err));
	assert_string_equal(err, "mem.csv:2:3: quoted field never closed (a missing"
			    " closing quote?)");
}

static void test_crlf(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	char *o = run_str("t;Vm (mV)\r\n1;-70\r\n2;-71.25\r\n\r\n3;\"-1\"\r\n", "-3.14",
			  NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t;Vm (mV)\r\n1;-66.86\r\n2;-68.11\r\n\r\n3;\"2.14\"\r\n");
	assert_int_equal(r.blank, 1);
	assert_int_equal(r.rows, 3);
	free(o);
	/* mixed line ends, each kept; no newline at the end stays so */
	o = run_str("t,Vm\n1,-70\r\n2,-71", "1", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t,Vm\n1,-71\r\n2,-72");
	free(o);
	/* header only */
	o = run_str("t,Vm\r\n", "1", NULL, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t,Vm\r\n");
	assert_int_equal(r.rows, 0);
	free(o);
}

/* A random data row, its corrected form and the voltage cell it has. */
typedef struct gen {
	unsigned long long s;
} gen;

static unsigned rnd(gen *g)
{
	g->s = g->s * 6364136223846793005ULL + 1442695040888963407ULL;
	return (unsigned)(g->s >> 33);
}

/* "-65.123" from thousandths, never "-0.000". */
static int fmt_milli(char *b, long v)
{
	long a = v < 0 ? -v : v;
	return sprintf(b, "%s%ld.%03ld", v < 0 ? "-" : "", a / 1000, a % 1000);
}

/* Build a random file of n rows with assorted quoting and line ends. */
static void gen_file(gen *g, int n, char **in, size_t *inl)
{
	FILE *fi = open_memstream(in, inl);
	assert_non_null(fi);
	fputs("\"time, s\",Vm (mV),note,I (pA)\n", fi);
	for (int i = 0; i < n; i++) {
		char t[32], v[32];
		const char *note;
		long mv = (long)(rnd(g) % 200001) - 120000;
		sprintf(t, "%d.%05d", i / 100000, i % 100000);
		fmt_milli(v, mv);
		switch (rnd(g) % 5) {
		case 0: note = "\"a, \"\"quoted\"\"\nnote\""; break;
		case 1: note = ""; break;
		case 2: note = "sweep 7"; break;
		case 3: note = "\"\""; break;
		default: note = "x;y\tz"; break;
		}
		const char *eol = rnd(g) % 3 ? "\n" : "\r\n";
		int quote = rnd(g) % 7 == 0;
		fprintf(fi, "%s,%s%s%s,%s,%u%s", t, quote ? "\"" : "", v, quote ? "\"" : "",
			note, rnd(g) % 1000, eol);
	}
	fclose(fi);
}

/* Split rows of the generated form and compare field by field: every field
 * but column 2 byte for byte, column 2 exactly in - ljp. */
static void compare_rows(const char *in, size_t inl, const char *res, size_t outl,
			 long long L, int dl, long *ncells)
{
	/* walk both with a tiny RFC 4180 splitter of our own */
	size_t i = 0, j = 0;
	int col = 1;
	*ncells = 0;
	int first = 1;
	while (i < inl && j < outl) {
		size_t fi = i, fj = j;
		int q = in[i] == '"';
		if (q) {
			i++;
			while (i < inl && !(in[i] == '"' && (i + 1 >= inl || in[i + 1] != '"')))
				i += in[i] == '"' ? 2 : 1;
			i++;
		}
		while (i < inl && in[i] != ',' && in[i] != '\n')
			i++;
		int qo = res[j] == '"';
		if (qo) {
			j++;
			while (j < outl && !(res[j] == '"' && (j + 1 >= outl || res[j + 1] != '"')))
				j += res[j] == '"' ? 2 : 1;
			j++;
		}
		while (j < outl && res[j] != ',' && res[j] != '\n')
			j++;
		if (col == 2 && !first) {
			assert_int_equal(q, qo);
			check_exact(in + fi + q, i - fi - 2 * q, res + fj + qo, j - fj - 2 * qo,
				    L, dl);
			(*ncells)++;
		} else {
			if (i - fi != j - fj || memcmp(in + fi, res + fj, i - fi) != 0)
				fail_msg("column %d changed: '%.*s' -> '%.*s'", col,
					 (int)(i - fi), in + fi, (int)(j - fj), res + fj);
		}
		assert_true(i == inl || in[i] == res[j]);
		if (i < inl && in[i] == '\n') {
			col = 1;
			first = 0;
		} else {
			col++;
		}
		i++;
		j++;
	}
	assert_true(i >= inl && j >= outl);
}

static void test_roundtrip_random(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	gen g = {20240601};
	char *in, *o1, *o2;
	size_t inl, l1, l2;
	const char *c2[] = {"Vm (mV)", NULL};
	gen_file(&g, 4000, &in, &inl);
	static const struct {
		const char *x, *minus_x;
		long long L;
		int dl;
	} ljps[] = {
		{"14.2", "-14.2", 142, 1}, {"-7.125", "7.125", -7125, 3},
		{"0", "0", 0, 0},          {"999.999", "-999.999", 999999, 3},
	};
	for (size_t k = 0; k < IM_COUNT(ljps); k++) {
		o1 = run_mem(in, inl, ljps[k].x, c2, 0, &r, err, &l1);
		if (!o1)
			fail_msg("%s", err);
		assert_int_equal(r.rows, 4000);
		assert_int_equal(r.corrected, 4000);
		assert_int_equal(r.skipped, 0);
		long cells;
		compare_rows(in, inl, o1, l1, ljps[k].L, ljps[k].dl, &cells);
		assert_int_equal(cells, 4000);
		o2 = run_mem(o1, l1, ljps[k].minus_x, c2, 0, &r, err, &l2);
		assert_non_null(o2);
		assert_int_equal(l2, inl);
		assert_memory_equal(o2, in, inl);  /* the original bytes back */
		free(o1);
		free(o2);
	}
	/* an LJP with more decimals than the cells: values exact, digits gained */
	o1 = run_mem(in, inl, "0.0625", c2, 0, &r, err, &l1);
	assert_non_null(o1);
	long cells;
	compare_rows(in, inl, o1, l1, 625, 4, &cells);
	assert_int_equal(cells, 4000);
	free(o1);
	free(in);
}

/* ---- errors and skip-bad ---------------------------------------------- */

static void test_errors(void **state)
{
	(void)state;
	char err[IM_ERRLEN], p[600];
	corr_result r;
	corr_opts o = {0};
	const char *c2[] = {"2", NULL};
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	o.columns = c2;
	o.ncolumns = 1;

	assert_null(run_str("t,Vm\n1,-70\n2,-71\n3,abc\n", "1", NULL, &r, err));
	assert_string_equal(err, "mem.csv:4:2: 'abc' is not a number (skip-bad copies"
			    " such cells)");
	assert_null(run_str("t;Vm\n1;-70,5\n", "1", NULL, &r, err));
	assert_prefix(err, "mem.csv:2:2: '-70,5' is not a number (decimal comma?");
	/* ragged */
	assert_null(run_str("t,Vm,x\n1,-70,a\n2\n3,-72,c\n", "1", NULL, &r, err));
	assert_string_equal(err, "mem.csv:3: row has 1 field; column 2 is missing"
			    " (skip-bad copies such rows)");
	/* no header, the first row is short */
	assert_null(run_str("1\n", "1", (const char *[]){"3", NULL}, &r, err));
	assert_string_equal(err, "mem.csv:1: row has 1 field; column 3 is missing"
			    " (skip-bad copies such rows)");
	/* missing columns */
	assert_null(run_str("time (s),Vm (mV),I (pA)\n1,2,3\n", "1",
			    (const char *[]){"Vx", NULL}, &r, err));
	assert_string_equal(err, "mem.csv: no column named 'Vx'; the first row has:"
			    " time (s), Vm (mV), I (pA)");
	assert_null(run_str("time (s),Vm (mV),I (pA)\n1,2,3\n", "1",
			    (const char *[]){"5", NULL}, &r, err));
	assert_string_equal(err, "mem.csv: no column 5; the header has 3 columns:"
			    " time (s), Vm (mV), I (pA)");
	assert_null(run_str("t,V\n1,2\n", "1", (const char *[]){"0", NULL}, &r, err));
	assert_contains(err, "out of range");
	/* empty, blank, binary */
	assert_null(run_mem("", 0, "1", c2, 0, &r, err, NULL));
	assert_string_equal(err, "mem.csv: empty file");
	assert_null(run_str("\n\r\n\n", "1", c2, &r, err));
	assert_string_equal(err, "mem.csv: empty file (blank lines only)");
	assert_null(run_str("\nt,V\n1,2\n", "1", c2, &r, err));
	assert_string_equal(err, "mem.csv:1: the first line is blank; expected a header"
			    " or a data row");
	assert_null(run_mem("t,V\n1,2\n3,\0\n", 12, "1", c2, 0, &r, err, NULL));
	assert_string_equal(err, "mem.csv:3: binary file (NUL byte); expected CSV or"
			    " TSV text");
	/* unreadable files, through corr_file */
	path_in(p, sizeof p, "does-not-exist.csv");
	assert_int_equal(corr_file(p, NULL, stdout, &o, &r, err), -1);
	assert_contains(err, "cannot open ");
	assert_contains(err, "No such file or directory");
	assert_int_equal(corr_file(tmpdir, NULL, stdout, &o, &r, err), -1);
	assert_contains(err, "is a directory");
	path_in(p, sizeof p, "e.csv");
	write_file(p, "", 0);
	assert_int_equal(corr_file(p, NULL, stdout, &o, &r, err), -1);
	char want[700];
	snprintf(want, sizeof want, "%s: empty file", p);
	assert_string_equal(err, want);
	unlink(p);
	/* every message is one line */
	assert_null(strchr(err, '\n'));
}

static void test_skip_bad(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	const char *cols[] = {"2", "4", NULL};
	const char *in = "t,Va,x,Vb\n"
			 "1,-70,a,-60\n"  /* both corrected */
			 "2,abc,b,\n"     /* bad + empty */
			 "3,-71\n"        /* ragged: column 4 missing */
			 "4,,c,  \n"      /* empty + blank */
			 "5,1e,d,-1\n";   /* bad + corrected */
	size_t ol;
	char *o = run_mem(in, strlen(in), "10", cols, 1, &r, err, &ol);
	if (!o)
		fail_msg("%s", err);
	assert_string_equal(o, "t,Va,x,Vb\n"
			    "1,-80,a,-70\n"
			    "2,abc,b,\n"
			    "3,-81\n"
			    "4,,c,  \n"
			    "5,1e,d,-11\n");
	assert_int_equal(r.rows, 5);
	assert_int_equal(r.corrected, 4);
	assert_int_equal(r.skipped, 6);  /* abc, '', missing, '', '  ', 1e */
	assert_int_equal(r.bad, 3);      /* abc, missing, 1e */
	assert_int_equal(r.ragged, 1);
	free(o);
	/* without skip_bad, empty cells are still copied and counted */
	o = run_str("t,V\n1,\n2,-1\n", "1", (const char *[]){"2", NULL}, &r, err);
	assert_non_null(o);
	assert_string_equal(o, "t,V\n1,\n2,-2\n");
	assert_int_equal(r.skipped, 1);
	assert_int_equal(r.bad, 0);
	free(o);
}

/* ---- files: atomic output, side note, big files ----------------------- */

static int dir_count(void)
{
	DIR *d = opendir(tmpdir);
	struct dirent *de;
	int n = 0;
	assert_non_null(d);
	while ((de = readdir(d)))
		n += strcmp(de->d_name, ".") != 0 && strcmp(de->d_name, "..") != 0;
	closedir(d);
	return n;
}

static void test_files(void **state)
{
	(void)state;
	char err[IM_ERRLEN], in[600], opath[600], note[700];
	corr_result r;
	corr_opts o = {0};
	size_t len;
	struct stat st;
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	path_in(in, sizeof in, "rec.csv");
	path_in(opath, sizeof opath, "rec-corrected.csv");
	snprintf(note, sizeof note, "%s%s", opath, CORR_NOTE_SUFFIX);
	write_file(in, "t,Vm (mV)\n1,-70.0\n2,-71.0\n", 26);
	assert_int_equal(dir_count(), 1);

	assert_int_equal(corr_file(in, opath, NULL, &o, &r, err), 0);
	char *b = read_file(opath, &len);
	assert_string_equal(b, "t,Vm (mV)\n1,-84.2\n2,-85.2\n");
	free(b);
	mode_t mask = umask(0);
	umask(mask);
	assert_int_equal(stat(opath, &st), 0);
	assert_int_equal(st.st_mode & 0777, 0666 & ~mask);
	b = read_file(note, &len);
	assert_contains(b, "LJP: 14.2 mV\n");
	assert_contains(b, "(Vm = Vrecorded - LJP)");
	assert_contains(b, "columns: 2 \"Vm (mV)\" in mV\n");
	assert_contains(b, "rows: 2; corrected: 2; skipped: 0");
	assert_contains(b, in);
	free(b);
	assert_int_equal(dir_count(), 3);

	/* the input as output is refused */
	assert_int_equal(corr_file(in, in, NULL, &o, &r, err), -1);
	assert_contains(err, "is the input file");
	/* a bad cell: the earlier output stays, nothing new or partial */
	unlink(opath);
	unlink(note);
	write_file(in, "t,Vm (mV)\n1,-70.0\n2,bad\n", 24);
	assert_int_equal(corr_file(in, opath, NULL, &o, &r, err), -1);
	char want[700];
	snprintf(want, sizeof want, "%s:3:2: 'bad' is not a number", in);
	assert_prefix(err, want);
	assert_int_equal(dir_count(), 1);
	assert_int_equal(stat(opath, &st), -1);
	/* a directory that does not exist */
	path_in(opath, sizeof opath, "no/such/dir/x.csv");
	assert_int_equal(corr_file(in, opath, NULL, &o, &r, err), -1);
	assert_contains(err, "cannot write");
	assert_contains(err, "No such file or directory");
	assert_int_equal(dir_count(), 1);
	unlink(in);

	/* the note's text */
	corr_result rr;
	memset(&rr, 0, sizeof rr);
	assert_int_equal(corr_ljp_parse("-3.5", &rr.ljp, err), 0);
	rr.delim = '\t';
	rr.header = 1;
	rr.ncols = 2;
	rr.cols[0].index = 2;
	strcpy(rr.cols[0].name, "Vm");
	rr.cols[0].unit_assumed = 1;
	rr.cols[1].index = 3;
	strcpy(rr.cols[1].name, "V2 (V)");
	rr.cols[1].unit_exp = -3;
	rr.rows = 7;
	rr.corrected = 13;
	rr.skipped = 1;
	char text[1024];
	size_t n = corr_note_format(&rr, "a.tsv", "b.tsv", text, sizeof text);
	assert_int_equal(n, strlen(text));
	assert_contains(text, "LJP: -3.5 mV\n");
	assert_contains(text, "\ninput: a.tsv\noutput: b.tsv\n");
	assert_contains(text, "(Vm = Vrecorded - LJP)\nrecording configuration: whole-cell\n");
	assert_contains(text, "columns: 2 \"Vm\" in mV (assumed); 3 \"V2 (V)\" in V\n");
	assert_contains(text, "delimiter: tab; header row: yes\n");
	assert_contains(text, "rows: 7; corrected: 13; skipped: 1");
	char tiny[10];
	n = corr_note_format(&rr, "a.tsv", NULL, tiny, sizeof tiny);
	assert_int_equal(n, 9);
	assert_int_equal(strlen(tiny), 9);
}

/* A file of about 5 MB, bigger than the read buffer, with long quoted
 * fields that cross buffer boundaries; then fields past the limit. */
static void test_big_file(void **state)
{
	(void)state;
	char err[IM_ERRLEN], in[600], opath[600];
	corr_result r;
	corr_opts o = {0};
	const char *cols[] = {"2", NULL};
	gen g = {7};
	size_t n = 0, wn = 0, len;
	char *long_field = malloc(60001);
	assert_non_null(long_field);
	for (int i = 0; i < 60000; i++)
		long_field[i] = "ab,\n\"c"[i % 6] == '"' ? 'q' : "ab,\n\"c"[i % 6];
	long_field[0] = '"';
	long_field[59999] = '"';
	long_field[60000] = '\0';

	path_in(in, sizeof in, "big.csv");
	path_in(opath, sizeof opath, "big-opath.csv");
	char *want = NULL;
	FILE *fi = fopen(in, "wb"), *fw = open_memstream(&want, &wn);
	assert_non_null(fi);
	fputs("t,Vm (mV),note\n", fi);
	fputs("t,Vm (mV),note\n", fw);
	int rows = 0;
	while (n < 5u * 1024 * 1024) {
		char v[32], vo[32];
		long mv = (long)(rnd(&g) % 200001) - 120000;
		fmt_milli(v, mv);
		fmt_milli(vo, mv - 14200);
		const char *note = rows % 97 == 0 ? long_field : "plain";
		int k = fprintf(fi, "%d,%s,%s\n", rows, v, note);
		fprintf(fw, "%d,%s,%s\n", rows, vo, note);
		n += (size_t)k;
		rows++;
	}
	fclose(fi);
	fclose(fw);
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	o.columns = cols;
	o.ncolumns = 1;
	if (corr_file(in, opath, NULL, &o, &r, err) != 0)
		fail_msg("%s", err);
	assert_int_equal(r.rows, rows);
	assert_int_equal(r.corrected, rows);
	char *b = read_file(opath, &len);
	assert_int_equal(len, wn);
	assert_memory_equal(b, want, wn);
	free(b);
	free(want);
	unlink(opath);
	{
		char note[700];
		snprintf(note, sizeof note, "%s%s", opath, CORR_NOTE_SUFFIX);
		unlink(note);
	}

	/* a field over 64 KiB deep in the file: error with line and column,
	 * no output left */
	fi = fopen(in, "ab");
	fputs("1,-70,\"", fi);
	for (int i = 0; i < 70000; i++)
		fputc('x', fi);
	fputs("\"\n", fi);
	fclose(fi);
	assert_int_equal(corr_file(in, opath, NULL, &o, &r, err), -1);
	char want_err[700];
	snprintf(want_err, sizeof want_err, "%s:%d:3: field longer than 64 KiB", in,
		 2 + rows + (rows + 96) / 97 * 10000);
	assert_prefix(err, want_err);
	assert_int_equal(dir_count(), 1);
	unlink(in);
	free(long_field);
}

/* A corrected cell that straddles a buffer boundary, at every offset near
 * it, and a NUL byte deep in a file. */
static void test_boundaries(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	const char *c2[] = {"2", NULL};
	size_t cap = 512 * 1024 + CORR_FIELD_MAX + 64; /* the reader's buffer */
	for (int shift = 0; shift < 12; shift++) {
		size_t total = cap + 4096;
		/* the corrected rows are one byte longer: room for that */
		char *in = malloc(total + 64), *want = malloc(2 * total);
		size_t i = 0, w = 0;
		i += (size_t)sprintf(in, "t,V\n");
		w += (size_t)sprintf(want, "t,V\n");
		/* pad so that a row ends near the boundary */
		int row = 0;
		while (i < cap - 40 + (size_t)shift) {
			i += (size_t)sprintf(in + i, "%d,-70.125\n", row);
			w += (size_t)sprintf(want + w, "%d,-84.325\n", row);
			row++;
		}
		while (i < total) {
			i += (size_t)sprintf(in + i, "%d,\"-1.5\"\r\n", row);
			w += (size_t)sprintf(want + w, "%d,\"-15.7\"\r\n", row);
			row++;
		}
		size_t ol;
		char *o = run_mem(in, i, "14.2", c2, 0, &r, err, &ol);
		if (!o)
			fail_msg("shift %d: %s", shift, err);
		assert_int_equal(ol, w);
		assert_memory_equal(o, want, w);
		assert_int_equal(r.rows, row);
		free(o);
		if (shift == 0) {
			in[i - 3] = '\0';
			assert_null(run_mem(in, i, "14.2", c2, 0, &r, err, NULL));
			char e[64];
			snprintf(e, sizeof e, "mem.csv:%d: binary file", row + 1);
			assert_prefix(err, e);
		}
		free(in);
		free(want);
	}
}


/* The streaming loop has its own fast arithmetic for plain cells
 * (fix_plain); every cell it writes must be the text corr_cell (the
 * general parser and arithmetic, checked exactly above against an
 * independent reader) gives for it.  Cells of every style - signs, '+',
 * leading zeros, ".5", "5.", 0 to 9 decimals, up to 18 digits - against
 * LJPs with 0 to 5 decimals, either sign or 0, in columns of mV, V and uV,
 * LF and CRLF lines; the cell in the middle of the row and last (the
 * leanest loops, short_rows, take short rows whose last field it is: one
 * row at a time, and four at a time with AVX2 where the processor has
 * it; both are run). */
static void test_fast_path_same(void **state)
{
	(void)state;
	static const char *const ljps[] = {"14.2", "-3", "0.125", "0", "999.999",
					   "-0.00001", "7", "-14.20"};
	static const struct { const char *head; int unit_exp; } units[] = {
		{"Vm (mV)", 0}, {"V (V)", -3}, {"Vu (uV)", 3},
	};
	gen g = {2026};
	char err[IM_ERRLEN];
	for (int wide = 0; wide < 2; wide++)
	for (int last = 0; last < 2; last++)
	for (size_t li = 0; li < IM_COUNT(ljps); li++)
		for (size_t ui = 0; ui < IM_COUNT(units); ui++) {
			corr_opts o = {0};
			corr_result r;
			const char *cols[] = {"2"};
			assert_int_equal(corr_ljp_parse(ljps[li], &o.ljp, err), 0);
			o.columns = cols;
			o.ncolumns = 1;
			char *in = NULL, *out = NULL;
			size_t inl = 0, outl = 0;
			FILE *fi = open_memstream(&in, &inl);
			fprintf(fi, last ? "t,%s\n" : "t,%s,x\n", units[ui].head);
			enum { ROWS = 3000 };
			static char cells[ROWS][40];
			for (int i = 0; i < ROWS; i++) {
				char *c = cells[i];
				int k = 0, ni = (int)(rnd(&g) % 8), nf = (int)(rnd(&g) % 10);
				unsigned style = rnd(&g) % 8;
				if (ni + nf > 18)
					nf = 18 - ni;
				if (style == 0)
					c[k++] = '+';
				else if (style < 4)
					c[k++] = '-';
				for (int d = 0; d < ni; d++)
					c[k++] = (char)('0' + (d == 0 && rnd(&g) % 6 ? 1 + rnd(&g) % 9
							  : rnd(&g) % 10));
				if (nf > 0 || rnd(&g) % 4 == 0)
					c[k++] = '.';
				for (int d = 0; d < nf; d++)
					c[k++] = (char)('0' + rnd(&g) % 10);
				if (ni + nf == 0)
					c[k++] = '0';
				c[k] = '\0';
				if (last)
					fprintf(fi, "%d,%s", i, c);
				else
					fprintf(fi, "%d,%s,%s", i, c, i % 3 ? "z" : "\"q,\"");
				fputs(i % 5 == 0 ? "\r\n" : "\n", fi);
			}
			fclose(fi);
			FILE *ifp = fmemopen(in, inl, "rb"), *ofp = open_memstream(&out, &outl);
			corr_set_wide(wide);
			int rc = corr_stream(ifp, "mem.csv", ofp, &o, &r, err);
			corr_set_wide(1);
			if (rc != 0)
				fail_msg("LJP %s, %s: %s", ljps[li], units[ui].head, err);
			fclose(ifp);
			fclose(ofp);
			assert_int_equal(r.corrected, ROWS);
			const char *p = strchr(out, '\n') + 1;
			for (int i = 0; i < ROWS; i++) {
				char want[160];
				size_t wl;
				assert_int_equal(corr_cell(cells[i], strlen(cells[i]), &o.ljp,
							   units[ui].unit_exp, want, sizeof want, &wl, err), 0);
				const char *c = strchr(p, ',') + 1, *ce = c + strcspn(c, last ? "\r\n" : ",");
				if ((size_t)(ce - c) != wl || memcmp(c, want, wl) != 0)
					fail_msg("LJP %s, %s, cell '%s': stream '%.*s', corr_cell '%s'",
						 ljps[li], units[ui].head, cells[i], (int)(ce - c), c, want);
				p = strchr(ce, '\n') + 1;
			}
			free(in);
			free(out);
		}
}

/* One run of corr_stream over in[0..inl) with the second thread allowed
 * or not: its output (malloc'd, *outl bytes), rc, counts and message. */
static char *run_par(const char *in, size_t inl, const corr_opts *o, int par,
		     size_t *outl, int *rc, corr_result *r, char *err)
{
	char *out = NULL;
	FILE *ifp = fmemopen((void *)in, inl, "rb"), *ofp = open_memstream(&out, outl);
	assert_non_null(ifp);
	assert_non_null(ofp);
	corr_set_parallel(par);
	*rc = corr_stream(ifp, "mem.csv", ofp, o, r, err);
	corr_set_parallel(1);
	fclose(ifp);
	fclose(ofp);
	return out;
}

/* The second thread (a large buffer cut in two) writes the same bytes,
 * counts and messages as one thread, over records of every kind: plain
 * numbers, blank lines, CRLF, quoted fields (with line ends inside, so
 * that a cut may fall inside one), blanks, exponents, empty and bad
 * cells, short rows, two corrected columns; and an error deep in the
 * file names the same line. */
static void test_parallel_same(void **state)
{
	(void)state;
	gen g = {4242};
	char err[IM_ERRLEN], err1[IM_ERRLEN];
	char *in = NULL;
	size_t inl = 0;
	FILE *fi = open_memstream(&in, &inl);
	fputs("t,Vm (mV),note,Vc (V)\n", fi);
	/* (open_memstream's size shows only after a flush: count the bytes) */
	for (long i = 0, n = 0; n < 6L * 1024 * 1024; i++) {
		unsigned k = rnd(&g) % 1000;
		long mv = (long)(rnd(&g) % 2000001) - 1000000;
		char v[40];
		fmt_milli(v, mv);
		if (k < 850)        /* the common record */
			n += fprintf(fi, "%ld,%s,x,%s\n", i, v, v);
		else if (k < 860)
			n += fprintf(fi, "\n");
		else if (k < 880)
			n += fprintf(fi, "%ld,%s,y,-0.%03u\r\n", i, v, rnd(&g) % 1000);
		else if (k < 890)
			n += fprintf(fi, "%ld,%s,\"q,\n%u\",1.5e-3\n", i, v, rnd(&g));
		else if (k < 900)
			n += fprintf(fi, "%ld, %s ,z,\"7\"\n", i, v);
		else if (k < 910)
			n += fprintf(fi, "%ld,,z,\n", i);
		else if (k < 920)
			n += fprintf(fi, "%ld,abc,z,12345678901234567890.5\n", i);
		else if (k < 930)
			n += fprintf(fi, "%ld,%s\n", i, v);
		else if (k < 940)
			n += fprintf(fi, "%ld,+%u.,w,.%u\n", i, rnd(&g) % 100, rnd(&g) % 1000);
		else if (k < 950)
			n += fprintf(fi, "%ld,%s,\"\"\"q\"\"\",%s\n", i, v, v);
		else
			n += fprintf(fi, "%ld,%s%u,x,%s\n", i, v, rnd(&g) % 10, v);
	}
	fclose(fi);

	const char *cols[] = {"2", "4"};
	corr_opts o = {0};
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	o.columns = cols;
	o.ncolumns = 2;
	o.skip_bad = 1;
	for (int pass = 0; pass < 2; pass++) {
		corr_result r1, r2;
		size_t l1 = 0, l2 = 0;
		int rc1, rc2;
		o.config = pass ? CORR_INSIDE_OUT : CORR_WHOLE_CELL;
		char *o1 = run_par(in, inl, &o, 0, &l1, &rc1, &r1, err1);
		char *o2 = run_par(in, inl, &o, 1, &l2, &rc2, &r2, err);
		if (rc1 != 0)
			fail_msg("one thread: %s", err1);
		assert_int_equal(rc2, 0);
		assert_true(r1.corrected > 100000);
		assert_int_equal(l1, l2);
		assert_memory_equal(o1, o2, l1);
		assert_int_equal(r1.rows, r2.rows);
		assert_int_equal(r1.corrected, r2.corrected);
		assert_int_equal(r1.skipped, r2.skipped);
		assert_int_equal(r1.bad, r2.bad);
		assert_int_equal(r1.ragged, r2.ragged);
		assert_int_equal(r1.blank, r2.blank);
		free(o1);
		free(o2);
	}
	/* without skip-bad: the first bad cell stops both, at the same line
	 * (near the start), and one deep in a file of plain records */
	{
		corr_result r1, r2;
		size_t l1 = 0, l2 = 0;
		int rc1, rc2;
		o.skip_bad = 0;
		char *o1 = run_par(in, inl, &o, 0, &l1, &rc1, &r1, err1);
		char *o2 = run_par(in, inl, &o, 1, &l2, &rc2, &r2, err);
		assert_int_equal(rc1, -1);
		assert_int_equal(rc2, -1);
		assert_string_equal(err1, err);
		free(o1);
		free(o2);
	}
	free(in);
	in = NULL;
	inl = 0;
	fi = open_memstream(&in, &inl);
	fputs("t,Vm (mV)\n", fi);
	int bad_at = 0;
	for (int i = 0, n = 0; n < 3 * 1024 * 1024; i++) {
		char v[40];
		fmt_milli(v, (long)(rnd(&g) % 200001) - 120000);
		if (i == 150000) {
			n += fprintf(fi, "%d,12abc\n", i);
			bad_at = i + 2;   /* the header is line 1 */
		} else {
			n += fprintf(fi, "%d,%s\n", i, v);
		}
	}
	fclose(fi);
	{
		corr_result r1, r2;
		size_t l1 = 0, l2 = 0;
		int rc1, rc2;
		char want[80];
		const char *one[] = {"2"};
		o.columns = one;
		o.ncolumns = 1;
		char *o1 = run_par(in, inl, &o, 0, &l1, &rc1, &r1, err1);
		char *o2 = run_par(in, inl, &o, 1, &l2, &rc2, &r2, err);
		assert_int_equal(rc1, -1);
		assert_int_equal(rc2, -1);
		assert_string_equal(err1, err);
		snprintf(want, sizeof want, "mem.csv:%d:2: '12abc' is not a number", bad_at);
		assert_prefix(err, want);
		free(o1);
		free(o2);
	}
	free(in);
}

/* One corrected column, the shape one_run takes, mixed with records it
 * leaves to the general loops (blank lines, CRLF, quoted and long fields,
 * blanks, empty cells, exponents, 8 or more digits, cells whose corrected
 * text is longer or shorter, a cell at the end of a buffer): the output
 * is the input with each cell replaced by what corr_cell makes of it, the
 * same with one thread and two, and the counts agree.  Several read
 * buffers, so that cuts and refills fall between and inside records. */
static void test_one_column_same(void **state)
{
	(void)state;
	gen g = {777};
	char err[IM_ERRLEN];
	static const char *const ljps[] = {"14.2", "-0.05", "3"};
	for (size_t li = 0; li < IM_COUNT(ljps); li++) {
		char *in = NULL, *want = NULL;
		size_t inl = 0, wantl = 0;
		long cells = 0, blank = 0, skipped = 0;
		corr_opts o = {0};
		const char *cols[] = {"2"};
		assert_int_equal(corr_ljp_parse(ljps[li], &o.ljp, err), 0);
		o.columns = cols;
		o.ncolumns = 1;
		FILE *fi = open_memstream(&in, &inl), *fw = open_memstream(&want, &wantl);
		fputs("t,Vm (mV),note\n", fi);
		fputs("t,Vm (mV),note\n", fw);
		for (long i = 0, n = 0; n < 3L * 1024 * 1024; i++) {
			unsigned k = rnd(&g) % 100;
			char v[48], c[160];
			size_t cl;
			long mv = (long)(rnd(&g) % 200001) - 120000;
			if (k < 70) {
				fmt_milli(v, mv);
				if (k < 7 && v[0] != '-') {   /* "+12.345" */
					memmove(v + 1, v, strlen(v) + 1);
					v[0] = '+';
				}
			} else if (k < 75) {
				snprintf(v, sizeof v, "%ld.%u", mv / 1000, rnd(&g) % 10);
			} else if (k < 78) {
				snprintf(v, sizeof v, "%ld.123456", mv / 1000);
			} else if (k < 80) {
				snprintf(v, sizeof v, " %ld.5 ", mv / 1000);
			} else if (k < 82) {
				v[0] = '\0';
			} else if (k < 84) {
				snprintf(v, sizeof v, "%ld.5e-1", mv / 1000);
			} else if (k < 86) {
				snprintf(v, sizeof v, "+%u.", rnd(&g) % 30);
			} else if (k < 88) {
				snprintf(v, sizeof v, "-.%u", rnd(&g) % 1000);
			} else {
				fmt_milli(v, mv % 20000);   /* near 0: lengths change */
			}
			int rc = corr_cell(v, strlen(v), &o.ljp, 0, c, sizeof c, &cl, err);
			assert_true(rc >= 0);
			cells += rc == 0;
			skipped += rc == 1;
			/* the cell last in half the rows (short_rows) */
			const char *rest = k % 7 == 0 ? ",\"a,b\"" : k % 2 ? "" :
				k % 13 == 0 ? ",a-field-longer-than-forty-eight-bytes-for-the-scan" : ",x";
			const char *eol = i % 9 == 0 ? "\r\n" : "\n";
			n += fprintf(fi, "%ld,%s%s%s", i, v, rest, eol);
			fprintf(fw, "%ld,%s%s%s", i, c, rest, eol);
			if (i % 97 == 0) {
				n += fprintf(fi, "\n");
				fprintf(fw, "\n");
				blank++;
			}
		}
		fclose(fi);
		fclose(fw);
		for (int run = 0; run < 4; run++) {
			int par = run & 1, wide = run >> 1;
			corr_result r;
			size_t l = 0;
			int rc;
			corr_set_wide(wide);
			char *out = run_par(in, inl, &o, par, &l, &rc, &r, err);
			corr_set_wide(1);
			if (rc != 0)
				fail_msg("LJP %s, %d threads, wide %d: %s", ljps[li], par + 1, wide, err);
			assert_int_equal(l, wantl);
			if (memcmp(out, want, l) != 0) {
				size_t at = 0;
				while (out[at] == want[at])
					at++;
				fail_msg("LJP %s, %d threads, wide %d: byte %zu differs: '%.40s' for '%.40s'",
					 ljps[li], par + 1, wide, at, out + at, want + at);
			}
			assert_int_equal(r.corrected, cells);
			assert_int_equal(r.skipped, skipped);
			assert_int_equal(r.blank, blank);
			assert_int_equal(r.rows, cells + skipped);
			free(out);
		}
		free(in);
		free(want);
	}
}

/* A blank line that ends a stretch of plain records (here the end of the
 * file) is counted once and its line once. */
static void test_blank_at_end(void **state)
{
	(void)state;
	static const char *const ins[] = {"t,Vm\n1,2\n\n", "t,Vm\n1,2\n\n\n3,4\n\n",
					  "t,Vm\n1,2\r\n\r\n"};
	static const long blanks[] = {1, 3, 1};
	char err[IM_ERRLEN];
	for (size_t i = 0; i < IM_COUNT(ins); i++) {
		corr_opts o = {0};
		corr_result r;
		const char *cols[] = {"2"};
		size_t l = 0;
		int rc;
		assert_int_equal(corr_ljp_parse("1", &o.ljp, err), 0);
		o.columns = cols;
		o.ncolumns = 1;
		char *out = run_par(ins[i], strlen(ins[i]), &o, 0, &l, &rc, &r, err);
		assert_int_equal(rc, 0);
		assert_int_equal(r.blank, blanks[i]);
		assert_int_equal(l, strlen(ins[i]));
		free(out);
	}
}

/* A full disk (/dev/full, ENOSPC on every write) is reported, whether the
 * output is small (written at the end) or large (the writer thread). */
static void test_write_error(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_opts o = {0};
	corr_result r;
	FILE *full = fopen("/dev/full", "wb");
	if (!full) {
		skip();
		return;
	}
	setvbuf(full, NULL, _IONBF, 0);
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	for (int big = 0; big < 2; big++) {
		char *in = NULL;
		size_t inl = 0;
		FILE *fi = open_memstream(&in, &inl);
		fputs("t,Vm (mV)\n", fi);
		for (int i = 0; i < (big ? 300000 : 3); i++)
			fprintf(fi, "%d,-70.%03d\n", i, i % 1000);
		fclose(fi);
		FILE *ifp = fmemopen(in, inl, "rb");
		assert_int_equal(corr_stream(ifp, "mem.csv", full, &o, &r, err), -1);
		assert_contains(err, "cannot write the output");
		assert_contains(err, strerror(ENOSPC));
		fclose(ifp);
		free(in);
	}
	fclose(full);
}

/* Without `to`, a file over CMD_CORRECT_TTY_MAX bytes is not poured onto
 * a terminal: one line saying how (a pseudo-terminal stands for it). */
static void test_tty_refusal(void **state)
{
	(void)state;
	const char *bin = getenv("IONMIX");
	char in[600], errp[600], expr[1400];
	size_t len;
	if (!bin || !*bin) {
		skip();
		return;
	}
	int m = posix_openpt(O_RDWR | O_NOCTTY);
	if (m < 0 || grantpt(m) != 0 || unlockpt(m) != 0 || !ptsname(m)) {
		if (m >= 0)
			close(m);
		skip();   /* no pseudo-terminals here */
		return;
	}
	const char *slave = ptsname(m);
	path_in(in, sizeof in, "tty.csv");
	path_in(errp, sizeof errp, "tty.err");
	FILE *fp = fopen(in, "wb");
	assert_non_null(fp);
	fputs("t,Vm (mV)\n", fp);
	for (int i = 0; ftell(fp) <= CMD_CORRECT_TTY_MAX; i++)
		fprintf(fp, "%d,-70.%03d\n", i, i % 1000);
	fclose(fp);
	snprintf(expr, sizeof expr, "correct '%s' by 14.2", in);
	pid_t pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		int s = open(slave, O_RDWR);
		int fe = open(errp, O_WRONLY | O_CREAT | O_TRUNC, 0644);
		if (s < 0 || fe < 0)
			_exit(126);
		dup2(s, 1);
		dup2(fe, 2);
		setenv("IONMIX_DB", "/nonexistent/ionmix-test.db", 1);
		execl(bin, bin, "-e", expr, (char *)NULL);
		_exit(127);
	}
	int st;
	assert_int_equal(waitpid(pid, &st, 0), pid);
	close(m);
	assert_true(WIFEXITED(st));
	assert_int_equal(WEXITSTATUS(st), 1);
	char *b = read_file(errp, &len);
	assert_contains(b, "too much for the terminal");
	assert_contains(b, "`to OUT`");
	assert_int_equal(strchr(b, '\n') - b + 1, (long)len);   /* one line */
	free(b);
	unlink(errp);
	unlink(in);
}

/* ---- metadata lines, recording configurations, standard streams ------- */

/* corr_stream on a string with every option; output (malloc'd) or NULL. */
static char *run_opts(const char *in, const corr_opts *o, corr_result *r, char *err)
{
	char *buf = NULL;
	size_t blen = 0;
	FILE *ifp = fmemopen((void *)in, strlen(in), "rb"), *ofp;
	assert_non_null(ifp);
	ofp = open_memstream(&buf, &blen);
	assert_non_null(ofp);
	int rc = corr_stream(ifp, "mem.csv", ofp, o, r, err);
	fclose(ifp);
	fclose(ofp);
	if (rc != 0) {
		free(buf);
		return NULL;
	}
	return buf;
}

/* The text-export layout of issue 13: metadata lines, then the header.
 * Expected values are input - LJP by hand (exact decimal subtraction). */
static void test_metadata(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	corr_opts o = {0};
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	const char *five = "# rig: demo rig A\n# gain: 10\n# sampling: 20 kHz\n"
			   "# filter: 5 kHz\n# cell 3, made-up values\n"
			   "t (s),Vm (mV),I (pA)\n0.00005,-70.0,12\n0.00010,-65.25,-3\n";
	char *out = run_opts(five, &o, &r, err);
	if (!out)
		fail_msg("%s", err);
	assert_string_equal(out, "# rig: demo rig A\n# gain: 10\n# sampling: 20 kHz\n"
			    "# filter: 5 kHz\n# cell 3, made-up values\n"
			    "t (s),Vm (mV),I (pA)\n0.00005,-84.2,12\n0.00010,-79.45,-3\n");
	assert_int_equal(r.meta, 5);
	assert_int_equal(r.header, 1);
	assert_int_equal(r.ncols, 1);
	assert_int_equal(r.cols[0].index, 2);
	assert_int_equal(r.rows, 2);
	free(out);

	/* a comment line recording the correction, CRLF kept */
	corr_about a = {0};
	a.temperature_C = 21.0;
	a.pipette = "kglu";
	a.bath = "saline";
	a.model = "Henderson (concentrations)";
	a.range = "13.9 to 14.5 mV";
	a.version = "9.9.9";
	a.date = "2026-01-02T03:04:05Z";
	o.comment = 1;
	o.about = &a;
	out = run_opts("# one\r\n#two\r\nVm (mV)\r\n-70\r\n", &o, &r, err);
	if (!out)
		fail_msg("%s", err);
	assert_string_equal(out, "# one\r\n#two\r\n# ionmix correct: Vm = Vrecorded - LJP,"
			    " whole-cell; LJP: 14.2 mV; LJP range: 13.9 to 14.5 mV; model:"
			    " Henderson (concentrations); pipette: kglu; bath: saline;"
			    " temperature: 21.0 C; ionmix: 9.9.9; date: 2026-01-02T03:04:05Z\r\n"
			    "Vm (mV)\r\n-84.2\r\n");
	assert_int_equal(r.comment, 1);
	free(out);
	/* no '#' lines: the format has no comments, none is added */
	o.skip = 2;
	out = run_opts("rig A\ncell 3\nVm (mV)\n-70\n", &o, &r, err);
	if (!out)
		fail_msg("%s", err);
	assert_string_equal(out, "rig A\ncell 3\nVm (mV)\n-84.2\n");
	assert_int_equal(r.meta, 2);
	assert_int_equal(r.comment, 0);
	free(out);
	o.comment = 0;
	o.about = NULL;
	/* skip N, then '#' lines, then a blank line; a BOM before it all */
	o.skip = 1;
	out = run_opts("\xef\xbb\xbfRecorded 2026\n# x\n\nt,V\n1,2\n", &o, &r, err);
	if (!out)
		fail_msg("%s", err);
	assert_string_equal(out, "\xef\xbb\xbfRecorded 2026\n# x\n\nt,V\n1,-12.2\n");
	assert_int_equal(r.meta, 3);
	free(out);
	/* errors count the metadata lines */
	o.skip = 0;
	assert_null(run_opts("# a\n# b\nt,V\n1,x\n", &o, &r, err));
	assert_prefix(err, "mem.csv:4:2: 'x' is not a number");
	assert_null(run_opts("# a\n# b\n", &o, &r, err));
	assert_prefix(err, "mem.csv: only 2 metadata lines, no header or data");
	o.skip = 5;
	assert_null(run_opts("a\nb\n", &o, &r, err));
	assert_prefix(err, "mem.csv: only 2 metadata lines");
	/* metadata longer than the read buffer streams through */
	o.skip = 0;
	size_t big = 3 * 1024 * 1024;
	char *in = malloc(big + 64);
	assert_non_null(in);
	size_t k = 0;
	while (k < big)
		k += (size_t)sprintf(in + k, "# metadata line %zu of a long preamble\n", k);
	size_t head = k;
	strcpy(in + k, "t,Vm (mV)\n1,-70\n");
	out = run_opts(in, &o, &r, err);
	if (!out)
		fail_msg("%s", err);
	assert_memory_equal(out, in, head);
	assert_string_equal(out + head, "t,Vm (mV)\n1,-84.2\n");
	free(out);
	free(in);
}

/* The forms of correction `junction` prints (electrode.h el_true_mV):
 * inside-out Vm = -(V - LJP), cell-attached Vpatch - Vrest = -(V - LJP);
 * checked against el_true_mV's formula by hand. */
static void test_configs(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	corr_result r;
	corr_opts o = {0};
	corr_config c;
	assert_int_equal(corr_ljp_parse("14.2", &o.ljp, err), 0);
	const char *in = "t,Vm (mV)\n1,70\n2,-70.05\n3,14.2\n4,+20\n5,\n";
	o.config = CORR_INSIDE_OUT;
	char *out = run_opts(in, &o, &r, err);
	if (!out)
		fail_msg("%s", err);
	/* +70 mV in the pipette, LJP0 14.2 mV: -(70 - 14.2) = -55.8 mV, the
	 * example `junction` prints for inside-out */
	assert_string_equal(out, "t,Vm (mV)\n1,-55.8\n2,84.25\n3,0.0\n4,-5.8\n5,\n");
	assert_int_equal(r.config, CORR_INSIDE_OUT);
	free(out);
	/* inside-out is its own inverse with the same LJP */
	out = run_opts("t,Vm (mV)\n1,-55.8\n2,84.25\n", &o, &r, err);
	assert_string_equal(out, "t,Vm (mV)\n1,70.0\n2,-70.05\n");
	free(out);
	o.config = CORR_CELL_ATTACHED;
	out = run_opts(in, &o, &r, err);
	assert_string_equal(out, "t,Vm (mV)\n1,-55.8\n2,84.25\n3,0.0\n4,-5.8\n5,\n");
	free(out);
	o.config = CORR_OUTSIDE_OUT;
	out = run_opts(in, &o, &r, err);
	assert_string_equal(out, "t,Vm (mV)\n1,55.8\n2,-84.25\n3,0.0\n4,+5.8\n5,\n");
	free(out);
	/* a volt column and a long number take the exact path too */
	o.config = CORR_INSIDE_OUT;
	out = run_opts("V (V)\n-0.0700\n", &o, &r, err);
	assert_string_equal(out, "V (V)\n0.0842\n");
	free(out);
	out = run_opts("Vm (mV)\n-70.0000000000000000000001\n", &o, &r, err);
	assert_string_equal(out, "Vm (mV)\n84.2000000000000000000001\n");
	free(out);
	/* names */
	assert_int_equal(corr_config_parse("inside-out", &c), 0);
	assert_int_equal(c, CORR_INSIDE_OUT);
	assert_int_equal(corr_config_parse("cell-attached", &c), 0);
	assert_int_equal(c, CORR_CELL_ATTACHED);
	assert_int_equal(corr_config_parse("insideout", &c), -1);
	assert_string_equal(corr_config_formula(CORR_INSIDE_OUT), "Vm = -(Vrecorded - LJP)");
	/* every form agrees with el_true_mV, the rule `junction` prints */
	static const struct { corr_config c; el_config e; } same[] = {
		{CORR_WHOLE_CELL, EL_WHOLE_CELL}, {CORR_OUTSIDE_OUT, EL_OUTSIDE_OUT},
		{CORR_INSIDE_OUT, EL_INSIDE_OUT}, {CORR_CELL_ATTACHED, EL_CELL_ATTACHED},
	};
	static const double v_mV[] = {70.0, -70.05, 14.2, 0.125, -123.456};
	for (size_t i = 0; i < IM_COUNT(same); i++) {
		o.config = same[i].c;
		out = run_opts("Vm (mV)\n70\n-70.05\n14.2\n0.125\n-123.456\n", &o, &r, err);
		assert_non_null(out);
		const char *p = strchr(out, '\n') + 1;
		for (size_t k = 0; k < IM_COUNT(v_mV); k++) {
			char *end;
			double got = strtod(p, &end);
			assert_close(got, el_true_mV(same[i].e, v_mV[k], 14.2, 0.0), 0, 1e-9);
			p = end + 1;
		}
		free(out);
	}
}

/* Run ionmix (IONMIX) with stdin from in_path (or /dev/null) and stdout to
 * out_path; returns the exit status, or -1 when IONMIX is not set. */
static int run_ionmix(const char *in_path, const char *out_path, const char *expr)
{
	const char *bin = getenv("IONMIX");
	if (!bin || !*bin)
		return -1;
	pid_t pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		int fi = open(in_path ? in_path : "/dev/null", O_RDONLY);
		int fo = open(out_path, O_WRONLY | O_CREAT | O_TRUNC, 0644);
		int fe = open("/dev/null", O_WRONLY);
		if (fi < 0 || fo < 0 || fe < 0)
			_exit(126);
		dup2(fi, 0);
		dup2(fo, 1);
		dup2(fe, 2);
		setenv("IONMIX_DB", "/nonexistent/ionmix-test.db", 1);
		execl(bin, bin, "-e", expr, (char *)NULL);
		_exit(127);
	}
	int st;
	assert_int_equal(waitpid(pid, &st, 0), pid);
	return WIFEXITED(st) ? WEXITSTATUS(st) : 128 + WTERMSIG(st);
}

/* `correct - ... to -`: standard input to standard output, byte for byte
 * apart from the corrected cells; and no output may be the input, the
 * side note included, also through a symbolic link or standard input. */
static void test_std_streams(void **state)
{
	(void)state;
	char in[600], outp[600], lnk[600], note[700], expr[1600], err[IM_ERRLEN];
	size_t len;
	corr_result r;
	corr_opts o = {0};
	path_in(in, sizeof in, "std.csv");
	path_in(outp, sizeof outp, "std-out.csv");
	write_file(in, "# made-up recording\nt,Vm (mV)\n1,70.0\n2,-3\n", 42);
	int rc = run_ionmix(in, outp, "correct - by 14.2 inside-out");
	if (rc == -1) {
		skip();   /* IONMIX not set: run through `make test` */
		return;
	}
	assert_int_equal(rc, 0);
	char *b = read_file(outp, &len);
	assert_prefix(b, "# made-up recording\n# ionmix correct: Vm = -(Vrecorded - LJP),"
		      " inside-out; LJP: 14.2 mV;");
	assert_contains(b, "\nt,Vm (mV)\n1,-55.8\n2,17.2\n");
	free(b);
	assert_int_equal(run_ionmix(in, outp, "correct - by 14.2 to -"), 0);
	b = read_file(outp, &len);
	assert_contains(b, "\nt,Vm (mV)\n1,55.8\n2,-17.2\n");
	free(b);
	unlink(outp);

	/* standard input that is the output file: refused, the file intact */
	snprintf(expr, sizeof expr, "correct - by 1 to '%s'", in);
	assert_int_equal(run_ionmix(in, "/dev/null", expr), 1);
	b = read_file(in, &len);
	assert_string_equal(b, "# made-up recording\nt,Vm (mV)\n1,70.0\n2,-3\n");
	free(b);

	/* the side note of the output would be the input */
	assert_int_equal(corr_ljp_parse("14", &o.ljp, err), 0);
	path_in(note, sizeof note, "rec");
	path_in(lnk, sizeof lnk, "rec" CORR_NOTE_SUFFIX);
	write_file(lnk, "t,Vm (mV)\n1,2\n", 14);
	assert_int_equal(corr_file(lnk, note, NULL, &o, &r, err), -1);
	assert_contains(err, "would replace the input file");
	b = read_file(lnk, &len);
	assert_string_equal(b, "t,Vm (mV)\n1,2\n");
	free(b);
	assert_int_equal(access(note, F_OK), -1);
	unlink(lnk);
	/* through a symbolic link */
	path_in(lnk, sizeof lnk, "link.csv");
	assert_int_equal(symlink(in, lnk), 0);
	assert_int_equal(corr_file(in, lnk, NULL, &o, &r, err), -1);
	assert_contains(err, "is the input file");
	unlink(lnk);
	/* to a non-regular file: written through, no note beside it */
	assert_int_equal(corr_file(in, "/dev/null", NULL, &o, &r, err), 0);
	assert_int_equal(r.note, 0);
	assert_int_equal(access("/dev/null" CORR_NOTE_SUFFIX, F_OK), -1);
	unlink(in);
}

/* ---- the `correct` command ------------------------------------------- */

typedef struct shell {
	refdb *db;
	im_ctx ctx;
	out o;
	char *obuf, *ebuf;
	size_t olen, elen;
} shell;

static void shell_open(shell *sh, int json)
{
	char err[IM_ERRLEN];
	memset(sh, 0, sizeof *sh);
	if (refdb_open(&sh->db, err) != 0)
		fail_msg("refdb: %s", err);
	sh->o.fp = open_memstream(&sh->obuf, &sh->olen);
	sh->o.errfp = open_memstream(&sh->ebuf, &sh->elen);
	ctx_init(&sh->ctx, sh->db, &sh->o);
	/* the workspace: a K-gluconate pipette, a NaCl bath, a copy of it */
	const char *setup[] = {"solution kglu", "add K-gluconate 140", "add KCl 4",
			       "solution saline", "add NaCl 140", "add KCl 4",
			       "solution saline2 from saline"};
	for (size_t i = 0; i < IM_COUNT(setup); i++)
		if (cmd_exec(&sh->ctx, setup[i], err) != 0)
			fail_msg("%s: %s", setup[i], err);
	sh->o.json = json;
	/* drop what the set-up printed */
	fflush(sh->o.fp);
	rewind(sh->o.fp);
	sh->olen = 0;
	fflush(sh->o.errfp);
	rewind(sh->o.errfp);
	sh->elen = 0;
}

/* Run `correct ...`; returns the handler's status, output in obuf/ebuf. */
static int shell_run(shell *sh, const char *line, char *err)
{
	char buf[1024], *argv[64];
	snprintf(buf, sizeof buf, "correct %s", line);
	int argc = cmd_split(buf, argv, 64, err);
	assert_true(argc > 0);
	fflush(sh->o.fp);
	rewind(sh->o.fp);
	fflush(sh->o.errfp);
	rewind(sh->o.errfp);
	int rc = cmd_correct(&sh->ctx, argc, argv, err);
	fputc('\0', sh->o.fp);
	fputc('\0', sh->o.errfp);
	fflush(sh->o.fp);
	fflush(sh->o.errfp);
	return rc;
}

static void shell_close(shell *sh)
{
	ctx_free(&sh->ctx);
	refdb_close(sh->db);
	fclose(sh->o.fp);
	fclose(sh->o.errfp);
	free(sh->obuf);
	free(sh->ebuf);
}

/* The number after "key": in a JSON line. */
static double json_num(const char *js, const char *key)
{
	char k[64];
	snprintf(k, sizeof k, "\"%s\":", key);
	const char *p = strstr(js, k);
	if (!p)
		fail_msg("no key %s in %s", key, js);
	return strtod(p + strlen(k), NULL);
}

static void test_cmd_values(void **state)
{
	(void)state;
	char err[IM_ERRLEN];
	shell sh;
	shell_open(&sh, 0);
	assert_int_equal(shell_run(&sh, "value -65.3 -70 by 14.2", err), 0);
	assert_contains(sh.obuf, "LJP 14.2 mV, as given");
	assert_contains(sh.obuf, "Vm = Vrecorded - LJP");
	assert_contains(sh.obuf, "-79.5\n");
	assert_contains(sh.obuf, "-84.2\n");
	/* identical solutions: the Henderson LJP is exactly 0 */
	assert_int_equal(shell_run(&sh, "value -70 for saline saline2", err), 0);
	assert_contains(sh.obuf, "LJP 0.0 mV from the Henderson equation");
	assert_contains(sh.obuf, "-70.0\n");
	/* errors */
	assert_int_equal(shell_run(&sh, "value -70", err), -1);
	assert_contains(err, "`by MV`");
	assert_int_equal(shell_run(&sh, "value by 3", err), -1);
	assert_int_equal(shell_run(&sh, "value 1 abc by 3", err), -1);
	assert_string_equal(err, "value 2: 'abc' is not a number");
	assert_int_equal(shell_run(&sh, "value 1 by inf", err), -1);
	assert_int_equal(shell_run(&sh, "value 1 by 1 for kglu saline", err), -1);
	assert_int_equal(shell_run(&sh, "value 1 for kglu nosuch", err), -1);
	assert_contains(err, "nosuch");
	shell_close(&sh);

	shell_open(&sh, 1);
	assert_int_equal(shell_run(&sh, "value -65.3 for kglu saline", err), 0);
	/* the contract of junction.h: a K-gluconate pipette against NaCl saline
	 * gives a positive LJP, so Vm is more negative than recorded */
	double l = json_num(sh.obuf, "ljp_mV"), h = json_num(sh.obuf, "henderson_ljp_mV");
	assert_true(l > 0);
	assert_close(l, round(h * 10) / 10, 0, 1e-9);       /* rounded to 0.1 mV */
	assert_close(json_num(sh.obuf, "Vm_mV"), -65.3 - l, 0, 1e-9);
	assert_contains(sh.obuf, "\"convention\":\"Vm = Vrecorded - LJP\"");
	shell_close(&sh);
}

static void test_cmd_file(void **state)
{
	(void)state;
	char err[IM_ERRLEN], in[600], opath[600], line[1400], want[700];
	shell sh;
	size_t len;
	path_in(in, sizeof in, "cmd.csv");
	path_in(opath, sizeof opath, "cmd-opath.csv");
	write_file(in, "t,Vm (mV),I (pA)\n1,-70.00,5\n2,x,6\n", 34);

	/* to stdout: the data alone on the result stream, summary beside it */
	shell_open(&sh, 0);
	snprintf(line, sizeof line, "'%s' column 'Vm (mV)' by -2.5 skip-bad", in);
	assert_int_equal(shell_run(&sh, line, err), 0);
	assert_string_equal(sh.obuf, "t,Vm (mV),I (pA)\n1,-67.50,5\n2,x,6\n");
	assert_contains(sh.ebuf, "rows 2, corrected 1, skipped 1");
	assert_contains(sh.ebuf, "Vm = Vrecorded - LJP");
	/* errors name the file, line and column */
	snprintf(line, sizeof line, "'%s' by 1", in);
	assert_int_equal(shell_run(&sh, line, err), -1);
	snprintf(want, sizeof want, "%s:3:2: 'x' is not a number", in);
	assert_prefix(err, want);
	snprintf(line, sizeof line, "'%s'", in);
	assert_int_equal(shell_run(&sh, line, err), -1);
	assert_contains(err, "say which LJP to subtract");
	snprintf(line, sizeof line, "'%s' by 1 sideways", in);
	assert_int_equal(shell_run(&sh, line, err), -1);
	assert_contains(err, "unexpected 'sideways'");
	snprintf(line, sizeof line, "'%s' by 1 to", in);
	assert_int_equal(shell_run(&sh, line, err), -1);
	shell_close(&sh);

	/* to OUT, JSON: the contract keys */
	shell_open(&sh, 1);
	snprintf(line, sizeof line, "'%s' by 14.2 to '%s' skip-bad", in, opath);
	assert_int_equal(shell_run(&sh, line, err), 0);
	assert_int_equal(json_num(sh.obuf, "rows"), 2);
	assert_int_equal(json_num(sh.obuf, "corrected"), 1);
	assert_int_equal(json_num(sh.obuf, "skipped"), 1);
	assert_close(json_num(sh.obuf, "ljp_mV"), 14.2, 0, 1e-12);
	assert_contains(sh.obuf, "\"header\":true");
	assert_string_equal(sh.ebuf, "");
	char *b = read_file(opath, &len);
	assert_string_equal(b, "t,Vm (mV),I (pA)\n1,-84.20,5\n2,x,6\n");
	free(b);
	snprintf(want, sizeof want, "%s%s", opath, CORR_NOTE_SUFFIX);
	b = read_file(want, &len);
	assert_contains(b, "LJP: 14.2 mV\n");
	free(b);
	unlink(want);
	unlink(opath);
	unlink(in);
	shell_close(&sh);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_ljp_parse),
		cmocka_unit_test(test_ljp_from_mV),
		cmocka_unit_test(test_value),
		cmocka_unit_test(test_cells),
		cmocka_unit_test(test_cells_big),
		cmocka_unit_test(test_voltage_header),
		cmocka_unit_test(test_delimiters),
		cmocka_unit_test(test_auto_columns),
		cmocka_unit_test(test_quoting),
		cmocka_unit_test(test_crlf),
		cmocka_unit_test(test_roundtrip_random),
		cmocka_unit_test(test_errors),
		cmocka_unit_test(test_skip_bad),
		cmocka_unit_test(test_files),
		cmocka_unit_test(test_big_file),
		cmocka_unit_test(test_boundaries),
		cmocka_unit_test(test_fast_path_same),
		cmocka_unit_test(test_parallel_same),
		cmocka_unit_test(test_one_column_same),
		cmocka_unit_test(test_blank_at_end),
		cmocka_unit_test(test_write_error),
		cmocka_unit_test(test_tty_refusal),
		cmocka_unit_test(test_metadata),
		cmocka_unit_test(test_configs),
		cmocka_unit_test(test_std_streams),
		cmocka_unit_test(test_cmd_values),
		cmocka_unit_test(test_cmd_file),
	};
	return cmocka_run_group_tests(tests, setup_dir, teardown_dir);
}
