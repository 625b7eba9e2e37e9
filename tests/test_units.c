/* test_units.c - number and amount parsing, formatting. */
#include "testutil.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "units.h"

static void numbers(void **state)
{
	double v;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(units_number("140", &v, err), 0);
	assert_close(v, 140, 0, 0);
	assert_int_equal(units_number("-70.5", &v, err), 0);
	assert_close(v, -70.5, 0, 0);
	assert_int_equal(units_number("1e-3", &v, err), 0);
	assert_close(v, 1e-3, 1e-15, 0);
	assert_int_equal(units_number(".5", &v, err), 0);
	const char *bad[] = {"", "nan", "NaN", "inf", "-inf", "1e999", "0x10", "1,5", "12abc",
			     "1e", "+", ".", "--1", "1 2", "infinity"};
	for (size_t i = 0; i < IM_COUNT(bad); i++)
		assert_int_equal(units_number(bad[i], &v, err), -1);
	assert_non_null(strstr(err, "infinity"));
}

static void amounts(void **state)
{
	double mM;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(units_amount_mM("140", NULL, 0, &mM, err), 0);
	assert_close(mM, 140, 0, 0);
	assert_int_equal(units_amount_mM("0.15", "M", 0, &mM, err), 0);
	assert_close(mM, 150, 1e-12, 0);
	assert_int_equal(units_amount_mM("100", "nM", 0, &mM, err), 0);
	assert_close(mM, 1e-4, 1e-12, 0);
	assert_int_equal(units_amount_mM("50", "uM", 0, &mM, err), 0);
	assert_close(mM, 0.05, 1e-12, 0);
	assert_int_equal(units_amount_mM("50", "\xc2\xb5M", 0, &mM, err), 0);
	assert_close(mM, 0.05, 1e-12, 0);
	assert_int_equal(units_amount_mM("100nM", NULL, 0, &mM, err), 0);
	assert_close(mM, 1e-4, 1e-12, 0);
	/* 9 g/L NaCl (58.44 g/mol) is 154.0 mM: 9/58.44*1000, by hand */
	assert_int_equal(units_amount_mM("9", "g/L", 58.44, &mM, err), 0);
	assert_close(mM, 154.004, 1e-5, 0);
	assert_int_equal(units_amount_mM("9", "mg/mL", 58.44, &mM, err), 0);
	assert_close(mM, 154.004, 1e-5, 0);
	assert_int_equal(units_amount_mM("0", NULL, 0, &mM, err), -1);
	assert_non_null(strstr(err, "greater than zero"));
	assert_int_equal(units_amount_mM("-5", NULL, 0, &mM, err), -1);
	assert_int_equal(units_amount_mM("6", "M", 0, &mM, err), -1);
	assert_non_null(strstr(err, "beyond"));
	assert_int_equal(units_amount_mM("5", "mm", 0, &mM, err), -1);
	assert_non_null(strstr(err, "unknown unit 'mm'"));
	assert_int_equal(units_amount_mM("5", "g/L", 0, &mM, err), -1);
	assert_int_equal(units_amount_mM("nan", NULL, 0, &mM, err), -1);
	assert_int_equal(units_amount_mM("1e-20", NULL, 0, &mM, err), -1);
}

static void volumes(void **state)
{
	double mL;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(units_volume_mL("500", NULL, &mL, err), 0);
	assert_close(mL, 500, 0, 0);
	assert_int_equal(units_volume_mL("1", "L", &mL, err), 0);
	assert_close(mL, 1000, 0, 0);
	assert_int_equal(units_volume_mL("1", "gallon", &mL, err), -1);
	assert_int_equal(units_volume_mL("0", NULL, &mL, err), -1);
}

static void formatting(void **state)
{
	char b[64];
	(void)state;
	units_fmt_conc(b, sizeof b, 140, 0);
	assert_string_equal(b, "140 mM");
	units_fmt_conc(b, sizeof b, 0.0982e-3, 0);
	assert_string_equal(b, "98.2 nM");
	units_fmt_conc(b, sizeof b, 0.05, 0);
	assert_string_equal(b, "50 uM");
	units_fmt_conc(b, sizeof b, 0.05, 1);
	assert_string_equal(b, "50 \xc2\xb5M");
	units_fmt_sig(b, sizeof b, 2.5, 4);
	assert_string_equal(b, "2.5");
	units_fmt_sig(b, sizeof b, 1234.5678, 4);
	assert_string_equal(b, "1235");
}

/* The one number formatter (issue 12): digits by quantity, no exponent
 * for ordinary values, never a signed zero, concentrations switching
 * M/mM/uM/nM/pM at the same places. */
static void one_formatter(void **state)
{
	char b[64];
	(void)state;
	units_fmt_num(b, sizeof b, 289.816, UNITS_DEC(0));
	assert_string_equal(b, "290");
	units_fmt_num(b, sizeof b, -0.001, UNITS_DEC(2));
	assert_string_equal(b, "0.00");
	units_fmt_num(b, sizeof b, -0.0, UNITS_DEC(1));
	assert_string_equal(b, "0.0");
	units_fmt_num(b, sizeof b, -85.6129, UNITS_DEC(1));
	assert_string_equal(b, "-85.6");
	units_fmt_num(b, sizeof b, 0.0347294, UNITS_SIG(3));
	assert_string_equal(b, "0.0347");
	units_fmt_num(b, sizeof b, 1.0 / 0.0, UNITS_SIG(3));
	assert_string_equal(b, "-");
	units_fmt_conc(b, sizeof b, 2.0, 0); /* not "2e+06 nM" */
	assert_string_equal(b, "2 mM");
	units_fmt_conc(b, sizeof b, 0.05, 0);
	assert_string_equal(b, "50 uM");
	units_fmt_conc(b, sizeof b, 5e-5, 0);
	assert_string_equal(b, "50 nM");
	units_fmt_conc(b, sizeof b, 5e-8, 0);
	assert_string_equal(b, "50 pM");
	units_fmt_conc(b, sizeof b, 1500, 0);
	assert_string_equal(b, "1.5 M");
}

/* The formatter's result as printf writes it (the definition the fast
 * path must reproduce byte for byte): "%.*f" after the significant-digit
 * count, trailing zeros dropped; "%.*g" outside 1e-4 to 1e7; no "-0". */
static void printf_model(char *buf, size_t n, double v, int digits)
{
	double a = fabs(v);
	if (digits <= 0) {
		snprintf(buf, n, "%.*f", -1 - digits, v);
	} else if (v == 0) {
		snprintf(buf, n, "0");
	} else if (a >= 1e7 || a < 1e-4) {
		snprintf(buf, n, "%.*g", digits, v);
	} else {
		int dec = digits - 1 - (int)floor(log10(a));
		snprintf(buf, n, "%.*f", dec < 0 ? 0 : dec, v);
		if (dec > 0) {
			char *p = buf + strlen(buf) - 1;
			while (*p == '0')
				*p-- = '\0';
			if (*p == '.')
				*p = '\0';
		}
	}
	if (buf[0] == '-' && strspn(buf + 1, "0.") == strlen(buf + 1))
		memmove(buf, buf + 1, strlen(buf));
}

/* The formatter against printf's exact rounding: ties of the decimal
 * value (2.5, 0.125, 1.0005 as stored), values next to ties, round
 * numbers, and a deterministic spread of magnitudes and digit counts. */
static void formatter_matches_printf(void **state)
{
	char got[64], want[64];
	static const double edge[] = {
		0.5, 1.5, 2.5, -2.5, 0.125, 0.375, 1.0005, 2.675, 1.005, 0.045,
		-0.045, 9.9995, 99.995, 999.95, 0.0001, 0.00015, 9999999.5, 1e7,
		-85.241026, 73.609514, 142.7207342, 144.5424348, 0.05, 0.45, 1,
		-0.0049, -0.005, 0.005, 4503599627370495.5, 1e15, 123456789012.5,
	};
	static const int digs[] = {
		UNITS_SIG(1), UNITS_SIG(2), UNITS_SIG(3), UNITS_SIG(4), UNITS_SIG(6),
		UNITS_SIG(10), UNITS_DEC(0), UNITS_DEC(1), UNITS_DEC(2), UNITS_DEC(3),
		UNITS_DEC(6),
	};
	unsigned long long s = 88172645463325252ull; /* xorshift64 */
	(void)state;
	for (size_t i = 0; i < IM_COUNT(edge); i++)
		for (size_t d = 0; d < IM_COUNT(digs); d++) {
			double v[3] = {edge[i], nextafter(edge[i], 0), nextafter(edge[i], 1e300)};
			for (int k = 0; k < 3; k++) {
				units_fmt_num(got, sizeof got, v[k], digs[d]);
				printf_model(want, sizeof want, v[k], digs[d]);
				assert_string_equal(got, want);
			}
		}
	for (int i = 0; i < 200000; i++) {
		double v;
		s ^= s << 13;
		s ^= s >> 7;
		s ^= s << 17;
		/* mantissa from the bits, exponent 1e-6 to 1e9, either sign */
		v = (double)(s >> 11) / 9007199254740992.0 * pow(10, (int)(s % 16) - 6);
		if (s & 1)
			v = -v;
		if (i % 4 == 0) /* a decimal with few digits, as typed, often a tie */
			v = round(v * 1000) / 1000 + ((s >> 3) % 2 ? 0.0005 : 0.005);
		int dg = digs[(s >> 20) % IM_COUNT(digs)];
		units_fmt_num(got, sizeof got, v, dg);
		printf_model(want, sizeof want, v, dg);
		assert_string_equal(got, want);
		/* printf's own forms, signed zeros and all */
		int dec = (int)((s >> 30) % 8), plus = (int)((s >> 40) & 1);
		units_fmt_fixed(got, sizeof got, v, dec, plus);
		snprintf(want, sizeof want, plus ? "%+.*f" : "%.*f", dec, v);
		assert_string_equal(got, want);
	}
	units_fmt_fixed(got, sizeof got, -0.001, 2, 1);
	assert_string_equal(got, "-0.00");
	units_fmt_fixed(got, sizeof got, 0.0, 1, 1);
	assert_string_equal(got, "+0.0");
	units_fmt_fixed(got, sizeof got, 2.5, 0, 0);
	assert_string_equal(got, "2");
}

/* The number parser gives strtod's value, bit for bit, for the plain
 * decimals it reads without strtod and for the rest: a deterministic
 * spread of digit counts, point positions and signs. */
static void parser_matches_strtod(void **state)
{
	char txt[64], err[IM_ERRLEN];
	unsigned long long s = 0x9e3779b97f4a7c15ull;
	(void)state;
	for (int i = 0; i < 200000; i++) {
		double got, want;
		int nd, pt, len = 0;
		s ^= s << 13;
		s ^= s >> 7;
		s ^= s << 17;
		nd = 1 + (int)(s % 18);        /* 1 to 18 digits: both sides of 15 */
		pt = (int)((s >> 8) % (nd + 2)); /* the point anywhere, or none */
		if ((s >> 16) & 1)
			txt[len++] = '-';
		for (int d = 0; d < nd; d++) {
			if (d == pt)
				txt[len++] = '.';
			txt[len++] = (char)('0' + (s >> (20 + 2 * (d % 20))) % 10);
		}
		if (i % 3 == 0) /* leading zeros after the point: small values */
			len = snprintf(txt, sizeof txt, "0.%0*d%llu", (int)(s % 12), 0,
				       (s >> 24) % 100000);
		txt[len] = '\0';
		want = strtod(txt, NULL);
		if (units_number(txt, &got, err) != 0) {
			assert_true(want == 0 || fabs(want) < 1e-300);
			continue;
		}
		if (want == 0)
			want = 0; /* the parser never gives -0 */
		assert_memory_equal(&got, &want, sizeof got);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(numbers), cmocka_unit_test(amounts),
		cmocka_unit_test(volumes), cmocka_unit_test(formatting),
		cmocka_unit_test(one_formatter), cmocka_unit_test(formatter_matches_printf),
		cmocka_unit_test(parser_matches_strtod),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
