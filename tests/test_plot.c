/*
 * test_plot.c - terminal and SVG plots.  Sources: the trade's convention
 * that outward current is positive and plotted upward, inward downward
 * (common practice); XML 1.0 well-formedness checked by xmllint
 * (libxml2-utils).
 */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "common.h"
#include "plot.h"

#define NPT 41
static double X[NPT], LINE[NPT], FLAT[NPT], NEG[NPT];

static int setup(void **st)
{
	(void)st;
	for (int k = 0; k < NPT; k++) {
		X[k] = -100 + 5 * k;       /* -100 .. +100 mV */
		LINE[k] = X[k] / 10;       /* inward left, outward right */
		FLAT[k] = 3.0;
		NEG[k] = -1 - k * 0.5;     /* inward only */
	}
	return 0;
}

/* Render to a string (caller frees). */
static char *render(int svg, const plot_curve *c, int nc, const plot_opts *o,
		    int *rc, char *err)
{
	char *buf = NULL;
	size_t len = 0;
	FILE *fp = open_memstream(&buf, &len);
	assert_non_null(fp);
	*rc = svg ? plot_svg(fp, c, nc, o, err) : plot_term(fp, c, nc, o, err);
	fclose(fp);
	return buf;
}

static void base_opts(plot_opts *o)
{
	plot_opts_init(o);
	o->x_label = "membrane potential (mV)";
	o->y_label = "current (pA)";
	o->has_mark = 1;
	o->mark_x = 0.0;
	o->mark_label = "E_rev 0.0 mV";
}

/* Split into lines (modifies s); returns count. */
static int lines(char *s, char **out, int max)
{
	int n = 0;
	for (char *p = strtok(s, "\n"); p && n < max; p = strtok(NULL, "\n"))
		out[n++] = p;
	return n;
}

/* Inward (negative) current is drawn below the zero line, outward above:
 * common practice (outward positive, plotted upward). */
static void test_term_ascii_orientation(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	plot_opts o;
	base_opts(&o);
	plot_curve c[] = {{"total", X, LINE, NPT}, {"K+", X, FLAT, NPT}};
	int rc;
	char *s = render(0, c, 2, &o, &rc, err);
	assert_int_equal(rc, 0);
	assert_non_null(strstr(s, "current (pA)"));
	assert_non_null(strstr(s, "membrane potential (mV)"));
	assert_non_null(strstr(s, "* total"));
	assert_non_null(strstr(s, "o K+"));
	assert_non_null(strstr(s, ": E_rev 0.0 mV"));
	for (const char *p = s; *p; p++)   /* plain ASCII only */
		assert_true((unsigned char)*p < 0x80);
	char *ln[80];
	int n = lines(s, ln, 80), zero = -1, first = -1, last = -1, axis = -1;
	for (int i = 0; i < n; i++) {
		const char *p = ln[i];
		while (*p == ' ')
			p++;
		if (strncmp(p, "0 +", 3) == 0)
			zero = i;
	}
	assert_true(zero > 0);
	axis = (int)(strchr(ln[zero], '+') - ln[zero]);
	/* the zero-current line is drawn across */
	assert_non_null(strstr(ln[zero], "--------"));
	for (int i = 0; i < n; i++) {
		int len = (int)strlen(ln[i]);
		if (len > axis + 1 && ln[i][axis + 1] == '*' && first < 0)
			first = i;
		if (len >= axis + o.width + 1 && ln[i][axis + o.width] == '*')
			last = i;
	}
	assert_true(first > zero);  /* -10 pA at -100 mV: below the zero line */
	assert_true(last >= 0 && last < zero);   /* +10 pA at +100 mV: above */
	/* the mark: a dashed column at 0 mV, in the middle of the plot */
	int marks = 0, mcol = axis + 1 + (int)lround(0.5 * (o.width - 1));
	for (int i = 0; i < n; i++)
		if ((int)strlen(ln[i]) > mcol && strchr(":*", ln[i][mcol]))
			marks++;
	assert_true(marks >= o.height / 2);
	free(s);
}

static int valid_utf8(const unsigned char *p)
{
	while (*p) {
		int len = *p < 0x80 ? 1 : (*p >> 5) == 6 ? 2 : (*p >> 4) == 14 ? 3
			: (*p >> 3) == 30 ? 4 : 0;
		if (!len)
			return 0;
		for (int k = 1; k < len; k++)
			if ((p[k] & 0xC0) != 0x80)
				return 0;
		p += len;
	}
	return 1;
}

static void test_term_utf8(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	plot_opts o;
	base_opts(&o);
	o.utf8 = 1;
	o.width = 40;
	o.height = 10;
	plot_curve c[] = {{"total", X, LINE, NPT}, {"Na+", X, NEG, NPT}};
	int rc;
	char *s = render(0, c, 2, &o, &rc, err);
	assert_int_equal(rc, 0);
	assert_true(valid_utf8((unsigned char *)s));
	assert_non_null(strstr(s, "\u253c"));          /* zero line meets axis */
	assert_non_null(strstr(s, "\u2514"));          /* corner */
	assert_non_null(strstr(s, "\u250a E_rev"));    /* mark in the legend */
	int braille = 0;
	for (const unsigned char *p = (unsigned char *)s; *p; p++)
		if (p[0] == 0xE2 && p[1] >= 0xA0 && p[1] <= 0xA3)
			braille++;
	assert_true(braille > 20);
	/* the plot is no wider than margin + axis + width */
	char *ln[80];
	int n = lines(s, ln, 80);
	for (int i = 0; i < n; i++) {
		int cols = 0;
		for (const char *p = ln[i]; *p; p++)
			cols += ((unsigned char)*p & 0xC0) != 0x80;
		if (!strstr(ln[i], "total"))   /* the legend may be longer */
			assert_true(cols <= 8 + o.width);
	}
	free(s);
}

/* Only inward current: all of it on or below the zero line. */
static void test_term_inward_only(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	plot_opts o;
	base_opts(&o);
	o.has_mark = 1;
	o.mark_x = -150;   /* outside the plot */
	plot_curve c[] = {{"Ca2+", X, NEG, NPT}};
	int rc;
	char *s = render(0, c, 1, &o, &rc, err);
	assert_int_equal(rc, 0);
	assert_non_null(strstr(s, "(outside the plot)"));
	char *ln[80];
	int n = lines(s, ln, 80), zero = -1;
	for (int i = 0; i < n && zero < 0; i++) {
		const char *p = ln[i];
		while (*p == ' ')
			p++;
		if (strncmp(p, "0 +", 3) == 0)
			zero = i;
	}
	assert_true(zero >= 0);
	for (int i = 0; i < zero; i++)   /* nothing above the zero line */
		assert_null(strchr(ln[i], '*'));
	free(s);
}

static int have_xmllint(void)
{
	return system("command -v xmllint >/dev/null 2>&1") == 0;
}

/* SVG: well-formed XML (xmllint), text escaped, mark dashed, one polyline a
 * curve, units in the axis labels. */
static void test_svg_valid(void **st)
{
	(void)st;
	char err[IM_ERRLEN], path[] = "/tmp/ionmix-test-plot-XXXXXX";
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	FILE *fp = fdopen(fd, "w");
	assert_non_null(fp);
	plot_opts o;
	base_opts(&o);
	o.title = "pipette <A> & bath \"B\" 'C'";
	o.y_label = "current (\xc2\xb5" "A/cm\xc2\xb2)";   /* µA/cm² */
	o.mark_label = "E_rev < 0 & bad \xff byte";
	plot_curve c[] = {{"total", X, LINE, NPT}, {"K+", X, FLAT, NPT},
			  {"Cl- <x>", X, NEG, NPT}};
	assert_int_equal(plot_svg(fp, c, 3, &o, err), 0);
	assert_int_equal(fclose(fp), 0);
	FILE *in = fopen(path, "r");
	assert_non_null(in);
	static char buf[1 << 16];
	size_t len = fread(buf, 1, sizeof buf - 1, in);
	buf[len] = '\0';
	fclose(in);
	assert_non_null(strstr(buf, "pipette &lt;A&gt; &amp; bath &quot;B&quot; "
				    "&apos;C&apos;"));
	assert_non_null(strstr(buf, "Cl- &lt;x&gt;"));
	assert_non_null(strstr(buf, "E_rev &lt; 0 &amp; bad ? byte"));
	assert_non_null(strstr(buf, "current (\xc2\xb5" "A/cm\xc2\xb2)"));
	assert_non_null(strstr(buf, "membrane potential (mV)"));
	assert_non_null(strstr(buf, "stroke-dasharray=\"6 4\""));
	int npoly = 0;
	for (const char *p = buf; (p = strstr(p, "<polyline")); p++)
		npoly++;
	assert_int_equal(npoly, 3);
	assert_non_null(strstr(buf, ">-100</text>"));  /* tick numbers */
	assert_non_null(strstr(buf, ">100</text>"));
	assert_true(valid_utf8((unsigned char *)buf));
	if (!have_xmllint()) {
		unlink(path);
		print_message("xmllint not found (apt-get install libxml2-utils): "
			      "XML check skipped\n");
		skip();
	}
	char cmd[256];
	snprintf(cmd, sizeof cmd, "xmllint --noout '%s'", path);
	int st_x = system(cmd);
	unlink(path);
	assert_int_equal(st_x, 0);
}

/* y_free: a curve far from zero (pH 7.2 to 7.4) fills the rows: its
 * lowest point sits on the bottom row, its highest on the top row, and no
 * zero line is drawn; tick labels carry the decimals the step needs.
 * Notes under the legend are printed, and the SVG holds them and no zero
 * line either. */
static void test_y_free_and_notes(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	double y[NPT];
	for (int k = 0; k < NPT; k++)
		y[k] = 7.2 + 0.2 * k / (NPT - 1);
	plot_opts o;
	plot_opts_init(&o);
	o.y_free = 1;
	o.x_label = "CaCl2 (mM)";
	const char *notes[] = {"at 22.0 C", "inside: pip & <x>"};
	o.notes = notes;
	o.nnotes = 2;
	plot_curve c = {"pH", X, y, NPT};
	int rc;
	char *s = render(0, &c, 1, &o, &rc, err);
	assert_int_equal(rc, 0);
	assert_non_null(strstr(s, "at 22.0 C"));
	assert_non_null(strstr(s, "inside: pip & <x>"));
	assert_non_null(strstr(s, "7.20"));
	assert_non_null(strstr(s, "7.40"));
	assert_null(strstr(s, " 0.00 "));
	char *ln[80];
	int n = lines(s, ln, 80), top = -1, bottom = -1;
	for (int i = 0; i < n; i++) {
		char *bar = strchr(ln[i], '|'), *plus = strchr(ln[i], '+');
		char *ax = bar && (!plus || bar < plus) ? bar : plus;
		if (!ax || strstr(ln[i], "+--"))
			continue;
		if (strchr(ax + 1, '*')) {
			if (top < 0)
				top = i;
			bottom = i;
		}
	}
	/* no zero line: the x axis is the only line of dashes */
	int dashes = 0;
	for (int i = 0; i < n; i++)
		dashes += strstr(ln[i], "-----") != NULL;
	assert_int_equal(dashes, 1);
	/* the curve spans the rows */
	assert_true(bottom - top >= o.height - 3);
	free(s);
	s = render(1, &c, 1, &o, &rc, err);
	assert_int_equal(rc, 0);
	assert_non_null(strstr(s, "inside: pip &amp; &lt;x&gt;"));
	assert_null(strstr(s, "stroke-width=\"1.2\"/>"));  /* no zero line */
	free(s);
	/* a curve flat to 1e-9 relative (rounding, not a trend) is drawn
	 * flat in a range about its value, ticks and all */
	for (int k = 0; k < NPT; k++)
		y[k] = 5.000108545 + 1e-9 * k;
	s = render(0, &c, 1, &o, &rc, err);
	assert_int_equal(rc, 0);
	free(s);
	s = render(1, &c, 1, &o, &rc, err);
	assert_int_equal(rc, 0);
	free(s);
	/* too many notes is refused */
	o.nnotes = PLOT_MAX_NOTES + 1;
	assert_int_equal(plot_term(stdout, &c, 1, &o, err), -1);
}

static void test_errors(void **st)
{
	(void)st;
	char err[IM_ERRLEN];
	plot_opts o;
	base_opts(&o);
	double bad[NPT], desc[NPT];
	memcpy(bad, LINE, sizeof bad);
	bad[7] = NAN;
	for (int k = 0; k < NPT; k++)
		desc[k] = -X[k];
	double same[3] = {1, 1, 1};
	plot_curve one[] = {{"total", X, LINE, 1}};
	plot_curve nan[] = {{"total", X, bad, NPT}};
	plot_curve dsc[] = {{"total", desc, LINE, NPT}};
	plot_curve flat[] = {{"total", same, same, 3}};
	plot_curve ok[] = {{"total", X, LINE, NPT}};
	int rc;
	char *s;
	for (int svg = 0; svg <= 1; svg++) {
		s = render(svg, one, 1, &o, &rc, err);
		assert_int_equal(rc, -1);
		assert_non_null(strstr(err, "at least two points"));
		free(s);
		s = render(svg, nan, 1, &o, &rc, err);
		assert_int_equal(rc, -1);
		assert_non_null(strstr(err, "point 8 is not a finite"));
		free(s);
		s = render(svg, dsc, 1, &o, &rc, err);
		assert_int_equal(rc, -1);
		assert_non_null(strstr(err, "ascend"));
		free(s);
		s = render(svg, flat, 1, &o, &rc, err);
		assert_int_equal(rc, -1);
		free(s);
		s = render(svg, ok, 0, &o, &rc, err);
		assert_int_equal(rc, -1);
		free(s);
	}
	o.width = 5;
	s = render(0, ok, 1, &o, &rc, err);
	assert_int_equal(rc, -1);
	assert_non_null(strstr(err, "plot size"));
	free(s);
	base_opts(&o);
	o.mark_x = NAN;
	s = render(1, ok, 1, &o, &rc, err);
	assert_int_equal(rc, -1);
	free(s);
	/* a stream that cannot be written: the error is reported */
	base_opts(&o);
	FILE *ro = fopen("/dev/null", "r");
	assert_non_null(ro);
	assert_int_equal(plot_term(ro, ok, 1, &o, err), -1);
	assert_non_null(strstr(err, "write error"));
	assert_int_equal(plot_svg(ro, ok, 1, &o, err), -1);
	fclose(ro);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_term_ascii_orientation),
		cmocka_unit_test(test_term_utf8),
		cmocka_unit_test(test_term_inward_only),
		cmocka_unit_test(test_svg_valid),
		cmocka_unit_test(test_errors),
		cmocka_unit_test(test_y_free_and_notes),
	};
	return cmocka_run_group_tests(tests, setup, NULL);
}
