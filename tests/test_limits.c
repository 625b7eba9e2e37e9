/* test_limits.c - the limits of issue 14 (items 3 and 10) at their edges:
 * the number parser against the IEEE 754 binary64 format (IEEE 754-2008,
 * table 3.5: largest finite 1.7976931348623157e308, smallest normal
 * 2.2250738585072014e-308 = 2^-1022, smallest subnormal
 * 4.9406564584124654e-324 = 2^-1074), the digit limit, NaN and infinity as
 * typed, -0; the bounds helper; message words cut between UTF-8
 * characters (RFC 3629: a continuation byte is 10xxxxxx) and escaped for a
 * terminal; and the line loop's reader, which must stop an over-long line
 * or an over-long stream having read no more than one line past the limit
 * (the memory bound: the stream position is checked after the failure). */
#include "testutil.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "command.h"
#include "common.h"
#include "output.h"
#include "units.h"

static void numbers_at_the_edges_of_binary64(void **state)
{
	char err[IM_ERRLEN];
	double v;
	(void)state;
	/* the largest finite and the smallest normal double are numbers */
	assert_int_equal(units_number("1.7976931348623157e308", &v, err), 0);
	assert_true(v == DBL_MAX);
	assert_int_equal(units_number("2.2250738585072014e-308", &v, err), 0);
	assert_true(v == DBL_MIN);
	assert_int_equal(units_number("-2.2250738585072014e-308", &v, err), 0);
	assert_true(v == -DBL_MIN);
	/* beyond them: out of range, never "not a number" */
	static const char *const out[] = {
		"1.7976931348623159e308", "1e309", "-1e400", /* overflow */
		"2.2250738585072e-308", "4.9406564584124654e-324", "1e-320",
		"-1e-310", /* subnormal */
		"1e-400", "0.1e-999", /* nonzero, rounds to 0 */
	};
	for (size_t i = 0; i < IM_COUNT(out); i++) {
		assert_int_equal(units_number(out[i], &v, err), -1);
		if (!strstr(err, "out of range"))
			fail_msg("%s: '%s'", out[i], err);
	}
	/* zero written any way is zero, and never negative zero */
	static const char *const zeros[] = {"0", "-0", "-0.0", "+0e5", "-0e-400", "0.000"};
	for (size_t i = 0; i < IM_COUNT(zeros); i++) {
		assert_int_equal(units_number(zeros[i], &v, err), 0);
		assert_true(v == 0 && !signbit(v));
	}
}

static void digits_nan_and_infinity(void **state)
{
	char err[IM_ERRLEN], buf[80];
	double v;
	(void)state;
	memset(buf, '7', UNITS_DIGITS_MAX);
	buf[UNITS_DIGITS_MAX] = '\0';
	assert_int_equal(units_number(buf, &v, err), 0); /* 32 digits: fine */
	assert_true(fabs(v / 7.777777777777778e31 - 1) < 1e-15);
	buf[UNITS_DIGITS_MAX] = '7';
	buf[UNITS_DIGITS_MAX + 1] = '\0';
	assert_int_equal(units_number(buf, &v, err), -1); /* 33 */
	assert_non_null(strstr(err, "too many digits (33; at most 32)"));
	/* NaN and infinity are named as typed */
	static const char *const nf[] = {"nan", "-nan", "NaN", "+NAN", "inf", "-inf",
					 "Infinity", "-INFINITY", "nan(123)"};
	for (size_t i = 0; i < IM_COUNT(nf); i++) {
		char want[64];
		assert_int_equal(units_number(nf[i], &v, err), -1);
		snprintf(want, sizeof want, "'%s' is not a finite number", nf[i]);
		if (!strstr(err, want))
			fail_msg("%s: '%s'", nf[i], err);
	}
	/* an amount with its unit attached: the number part is judged whole */
	assert_int_equal(units_amount_mM("-nan", NULL, 0, &v, err), -1);
	assert_non_null(strstr(err, "'-nan' is not a finite number"));
	assert_int_equal(units_amount_mM("140mM", NULL, 0, &v, err), 0);
	assert_true(v == 140);
	/* other words stay "not a number" */
	assert_int_equal(units_number("0x10", &v, err), -1);
	assert_non_null(strstr(err, "is not a number"));
}

static void bounds(void **state)
{
	char err[IM_ERRLEN];
	double mL;
	(void)state;
	assert_int_equal(units_in_range("5", 5, 0.01, 100, "CO2 fraction", "%", err), 0);
	assert_int_equal(units_in_range("100", 100, 0.01, 100, "CO2 fraction", "%", err), 0);
	assert_int_equal(units_in_range("1e-300", 1e-300, 0.01, 100, "CO2 fraction", "%", err),
			 -1);
	assert_string_equal(err, "CO2 fraction 1e-300 % is outside 0.01 to 100 %");
	assert_int_equal(units_in_range("7", 7, 1, 5, "points", NULL, err), -1);
	assert_string_equal(err, "points 7 is outside 1 to 5");
	/* volumes: 1 uL to 100 L */
	assert_int_equal(units_volume_mL("1", "uL", &mL, err), 0);
	assert_true(fabs(mL - 1e-3) < 1e-18);
	assert_int_equal(units_volume_mL("1e-300", "mL", &mL, err), -1);
	assert_non_null(strstr(err, "under 1 uL"));
	assert_int_equal(units_volume_mL("0.9", "uL", &mL, err), -1);
	assert_int_equal(units_volume_mL("100", "L", &mL, err), 0);
	assert_int_equal(units_volume_mL("100.1", "L", &mL, err), -1);
}

static void words_cut_and_escaped(void **state)
{
	char buf[16], *txt = NULL;
	size_t n = 0;
	FILE *m;
	(void)state;
	/* fits: as it is */
	assert_string_equal(out_clip(buf, sizeof buf, "short"), "short");
	/* 10 two-byte characters (20 bytes) into 16: 12 bytes kept, 6 characters */
	assert_string_equal(out_clip(buf, sizeof buf,
				     "\xce\xbc\xce\xbc\xce\xbc\xce\xbc\xce\xbc"
				     "\xce\xbc\xce\xbc\xce\xbc\xce\xbc\xce\xbc"),
			    "\xce\xbc\xce\xbc\xce\xbc\xce\xbc\xce\xbc\xce\xbc...");
	/* "a" + 3-byte characters: the cut backs off to a character start */
	assert_string_equal(out_clip(buf, sizeof buf,
				     "a\xe2\x82\xac\xe2\x82\xac\xe2\x82\xac\xe2\x82\xac\xe2\x82\xac"),
			    "a\xe2\x82\xac\xe2\x82\xac\xe2\x82\xac...");
	m = open_memstream(&txt, &n);
	out_text_escaped(m, "caf\xe9 \x1b[2J tab\there \xce\xbcM \xed\xa0\x80 \xc0\xaf");
	fclose(m);
	/* Latin-1 e-acute, ESC, a surrogate and an overlong '/' are escaped;
	 * the tab and the micro sign (valid UTF-8) stay */
	assert_string_equal(txt, "caf\\xe9 \\x1b[2J tab\there \xce\xbcM \\xed\\xa0\\x80 "
				 "\\xc0\\xaf");
	free(txt);
}

/* A message longer than its buffer is cut between characters with "...". */
static void long_messages_cut_whole(void **state)
{
	char err[IM_ERRLEN], *word = im_xmalloc(3 * IM_ERRLEN + 1);
	size_t n;
	(void)state;
	for (int i = 0; i < IM_ERRLEN; i++)
		memcpy(word + 3 * i, "\xe2\x82\xac", 3); /* the euro sign, 3 bytes */
	word[3 * IM_ERRLEN] = '\0';
	assert_int_equal(im_fail(err, "x%s", word), -1);
	n = strlen(err);
	assert_true(n <= IM_ERRLEN - 1 && n > IM_ERRLEN - 8);
	assert_string_equal(err + n - 3, "...");
	/* what precedes "..." is "x" and whole euro signs */
	assert_int_equal((n - 4) % 3, 0);
	assert_memory_equal(err + n - 6, "\xe2\x82\xac", 3);
	free(word);
}

/* A stream of `len` bytes of `fill` with a newline every `every` bytes (0:
 * none), through cmd_run_stream.  Returns the loop's result; *pos is how
 * far the reader got. */
static int run_bytes(size_t len, char fill, size_t every, char *err, int *line, long *pos)
{
	char *text = im_xmalloc(len);
	out o = {0};
	im_ctx ctx;
	FILE *fp;
	int rc;
	refdb *db;
	char e2[IM_ERRLEN];
	memset(text, fill, len);
	if (every)
		for (size_t i = every - 1; i < len; i += every)
			text[i] = '\n';
	assert_int_equal(refdb_open(&db, e2), 0);
	o.fp = fopen("/dev/null", "w");
	o.errfp = o.fp;
	ctx_init(&ctx, db, &o);
	fp = fmemopen(text, len, "r");
	assert_non_null(fp);
	rc = cmd_run_stream(&ctx, fp, line, err);
	*pos = ftell(fp);
	fclose(fp);
	ctx_free(&ctx);
	refdb_close(db);
	fclose(o.fp);
	free(text);
	return rc;
}

static void reader_stops_at_the_limits(void **state)
{
	char err[IM_ERRLEN];
	int line;
	long pos;
	(void)state;
	/* 8 MB of NUL bytes (as from /dev/zero): stops at line 1, having
	 * read one line's worth */
	assert_int_equal(run_bytes(8u << 20, '\0', 0, err, &line, &pos), -1);
	assert_int_equal(line, 1);
	assert_non_null(strstr(err, "longer than 4096 bytes"));
	assert_true(pos <= CMD_LINE_MAX + 1);
	/* one endless line of letters: the same */
	assert_int_equal(run_bytes(8u << 20, 'x', 0, err, &line, &pos), -1);
	assert_true(pos <= CMD_LINE_MAX + 1);
	/* a line of exactly 4096 bytes (a comment) and its newline is fine;
	 * one more byte is not */
	assert_int_equal(run_bytes(2 * (CMD_LINE_MAX + 1), '#', CMD_LINE_MAX + 1, err, &line,
				   &pos), 0);
	assert_int_equal(line, 2);
	assert_int_equal(run_bytes(CMD_LINE_MAX + 2, '#', CMD_LINE_MAX + 2, err, &line, &pos),
			 -1);
	/* 20 MB of short comment lines: the script limit, named with its
	 * number, at the line where it was passed, not one byte later */
	assert_int_equal(run_bytes(20u << 20, '#', 64, err, &line, &pos), -1);
	assert_non_null(strstr(err, "longer than 16777216 bytes"));
	assert_int_equal(line, CMD_SCRIPT_MAX / 64 + 1);
	assert_int_equal(pos, (long)CMD_SCRIPT_MAX + 1);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(numbers_at_the_edges_of_binary64),
		cmocka_unit_test(digits_nan_and_infinity),
		cmocka_unit_test(bounds),
		cmocka_unit_test(words_cut_and_escaped),
		cmocka_unit_test(long_messages_cut_whole),
		cmocka_unit_test(reader_stops_at_the_limits),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
